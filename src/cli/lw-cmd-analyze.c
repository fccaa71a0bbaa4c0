/* lw-cmd-analyze.c — `loopwright-cli analyze`: a sampled loop given on the command line,
 * reported as text or JSON (docs/cli.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-cli-commands.h"
#include "lw-cli-common.h"
#include "lw-cli-doc.h"
#include "lw-cli-json.h"
#include "lw-cli-family.h"
#include "lw-cli-family-members.h"
#include "lw-cli-family-measured.h"
#include "lw-cli-measured.h"
#include "lw-cli-analyze-text.h"
#include "lw-simulate.h"

/* ---- analyze ---------------------------------------------------------------------------- */

static const char analyze_help[] =
  "Usage: " LW_CLI_PROG " analyze --plant EXPR --period SECONDS [options]\n"
  "       " LW_CLI_PROG " analyze --measured FILE.csv --measured-kind KIND\n"
  "       --period SECONDS [options]\n"
  "       " LW_CLI_PROG " analyze FILE.lwd [--variant NAME | --all-variants]\n"
  "       [--measured FILE.csv --measured-kind KIND] [options]\n"
  "\n"
  "Discretizes a continuous plant with a zero-order hold, closes the loop through a\n"
  "controller and reports crossovers, margins, closed-loop poles, the step response and\n"
  "the time-domain verification: actuator signal, continuous output between samples,\n"
  "input- and output-disturbance steps and performance indices (docs/simulation.md).\n"
  "\n"
  "Given a design document (FILE.lwd), the plant, sampling and controller (the stages of\n"
  "the active variant, or of --variant NAME) come from it, and its requirements are\n"
  "checked too; the loop options below are then not accepted. --measured with a document\n"
  "takes the place of the measurement it holds, judged on as analysis=\"data\"; given more\n"
  "than once (or a document with several <measured>), a measured family: the worst\n"
  "margins over the responses (docs/families.md).\n"
  "\n"
  "Options:\n"
  "  --variant NAME           the variant of FILE.lwd to analyze (default: the active one)\n"
  "  --all-variants           analyze every variant of FILE.lwd in turn; with --json one\n"
  "                           object {\"variants\": [...]}, each entry with its \"name\"\n"
  "  --plant EXPR             plant P(s), a proper rational expression in s (required)\n"
  "  --period SECONDS         sample period T in seconds, > 0 (required)\n"
  "  --compute-delay N        computation delay in whole samples, 0 to 1000 (default 1)\n"
  "  --dead-time SECONDS      plant input dead time in seconds, >= 0 (default 0)\n"
  "  --controller EXPR        controller C(w), proper, in the w-plane variable w (default 1)\n"
  "  --controller-z EXPR      controller C(z), proper, in z (instead of --controller)\n"
  "  --param NAME=VALUE       a named parameter of the plant expression and its value\n"
  "                           (repeat for each; e.g. --plant 'K/(s*(s+a))' --param K=40\n"
  "                           --param a=8)\n"  LW_CLI_FAMILY_HELP
  "  --each-member            with a plant family: every member's values, where it comes\n"
  "                           from, whether its loop is stable and its figures\n"
  LW_CLI_MEASURED_HELP
  LW_CLI_MEASURED_POLES_HELP
  "  --points N               frequency points up to pi/T, 16 to 100000 (default 2000)\n"
  "  --steps N                step-response samples, 2 to 1000000 (default 500)\n"
  "  --saturation LOW:HIGH    actuator limits on the controller output, LOW < HIGH\n"
  "  --anti-windup            hold the integrators while the output is limited\n"
  "                           (clamping; needs --saturation)\n"
  "  --substeps M             continuous output at M points per sample, 0 to 1000\n"
  "                           (default 20; 0: none)\n"
  "  --json                   print the results as JSON instead of a report\n"
  "  -h, --help               show this help\n"
  "\n"
  "Expressions: numbers, the variable, + - * / ( ) and ^ with a whole exponent;\n"
  "write every product with '*', e.g. '40/(s*(s+8))'.\n"
  "Exit status: 0 success, 2 bad input, 1 internal failure.\n";

typedef struct
{
  LwCliLoopArgs loop;
  LwCliMeasuredArgs measured;
  LwCliFamilyArgs family;
  char **files;                /* FILE.lwd, when given */
  char *variant;
  char *points;
  char *steps;
  char *saturation;
  char *substeps;
  gboolean anti_windup;
  gboolean each_member;         /* --each-member: every member of a family */
  gboolean all;
  gboolean json;
  gboolean help;
} AnalyzeArgs;

/* --saturation LOW:HIGH: two finite numbers, LOW < HIGH. */
static bool
parse_saturation (const char *text, double *low, double *high)
{
  const char *colon = strchr (text, ':');
  if (colon == NULL)
    {
      lw_cli_bad_input ("--saturation", "'%s' is not of the form LOW:HIGH (e.g. 0:1 or -10:10)",
                        text);
      return false;
    }
  g_autofree char *lo = g_strndup (text, (gsize) (colon - text));
  if (!lw_cli_parse_double ("--saturation (LOW)", lo, low)
      || !lw_cli_parse_double ("--saturation (HIGH)", colon + 1, high))
    return false;
  if (!(*low < *high))
    {
      lw_cli_bad_input ("--saturation", "LOW must be less than HIGH (got %.17g:%.17g)", *low,
                        *high);
      return false;
    }
  return true;
}

/* The checked options of the run, shared by every variant. */
typedef struct
{
  LwAnalysisOptions opts;
  LwSimOptions so;
  gboolean steps_given;         /* --steps: else the engine chooses the horizon */
} AnalyzeSpec;

static int
analyze_spec (const AnalyzeArgs *a, AnalyzeSpec *sp)
{
  gint64 v;
  lw_analysis_options_init (&sp->opts);
  lw_sim_options_init (&sp->so);
  sp->steps_given = FALSE;
  if (a->points != NULL)
    {
      if (!lw_cli_parse_integer ("--points", a->points, 16, LW_CLI_MAX_POINTS, &v))
        return LW_EXIT_BAD_INPUT;
      sp->opts.n_points = (size_t) v;
    }
  if (a->steps != NULL)
    {
      if (!lw_cli_parse_integer ("--steps", a->steps, 2, LW_CLI_MAX_STEPS, &v))
        return LW_EXIT_BAD_INPUT;
      sp->opts.n_steps = (size_t) v;
      sp->steps_given = TRUE;
    }
  sp->so.n_steps = sp->opts.n_steps;
  if (a->saturation != NULL)
    {
      if (!parse_saturation (a->saturation, &sp->so.u_low, &sp->so.u_high))
        return LW_EXIT_BAD_INPUT;
      sp->so.has_limits = true;
    }
  if (a->anti_windup)
    {
      if (!sp->so.has_limits)
        {
          lw_cli_bad_input ("--anti-windup", "needs --saturation LOW:HIGH (clamping acts only "
                            "while the controller output is limited)");
          return LW_EXIT_BAD_INPUT;
        }
      sp->so.anti_windup = true;
    }
  if (a->substeps != NULL)
    {
      if (!lw_cli_parse_integer ("--substeps", a->substeps, 0, 1000, &v))
        return LW_EXIT_BAD_INPUT;
      sp->so.substeps = (size_t) v;
    }
  double continuous = (double) (sp->so.n_steps - 1) * (double) sp->so.substeps;
  if (continuous > LW_CLI_MAX_CONTINUOUS)
    {
      lw_cli_bad_input ("--substeps", "%zu sub-steps for %zu samples make %.0f continuous "
                        "points, more than the limit of %.0f; use fewer (or 0) with this many "
                        "--steps (docs/cli.md, Limits)", sp->so.substeps, sp->so.n_steps,
                        continuous, LW_CLI_MAX_CONTINUOUS);
      return LW_EXIT_BAD_INPUT;
    }
  /* --json writes every sample: six series of N samples (reference, input and output
   * disturbance: output and actuator each) and the continuous output (t, y) at
   * (N - 1) * M + 1 points */
  double values = 6.0 * (double) sp->so.n_steps + (continuous > 0 ? 2.0 * (continuous + 1) : 0);
  if (a->json && values > LW_CLI_MAX_JSON_VALUES)
    {
      lw_cli_bad_input (a->substeps != NULL && continuous > 0 ? "--substeps" : "--steps",
                        "--json with %zu samples and %zu sub-steps writes %.0f numbers "
                        "(6 x steps + 2 x ((steps - 1) x substeps + 1)), more than the limit of %.0f; "
                        "use fewer --steps or --substeps, or the text report (docs/cli.md, "
                        "Limits)", sp->so.n_steps, sp->so.substeps, values,
                        LW_CLI_MAX_JSON_VALUES);
      return LW_EXIT_BAD_INPUT;
    }
  return LW_EXIT_OK;
}

/* The engine's options for the analysis options given. */
static void
engine_options (const AnalyzeSpec *spec, LwEngineOptions *eo)
{
  lw_engine_options_init (eo);
  eo->n_points = spec->opts.n_points;
  /* without --steps the engine chooses: 500 samples, longer when the step has not settled */
  eo->n_steps = spec->steps_given ? spec->opts.n_steps : 0;
  eo->sim = spec->so;
  eo->disturbances = TRUE;
}

/* Prints the analysis of one evaluated loop as text, or (json) returns the JSON object in
 * *json. design/index: the document and variant the loop is from (design NULL: inline
 * options). */
/* A design without a plant model (LW_EVAL_NO_MODEL): the requirements judged on the data and
 * the loop on the data, which is the "loop" block of the JSON, as with --measured. */
static int
analyze_data_alone (const AnalyzeArgs *a, const LwVariantEval *e, const LwDesign *design,
                    size_t index, JsonNode **json)
{
  if (a->json)
    {
      JsonNode *root = json_node_new (JSON_NODE_OBJECT);
      JsonObject *o = json_object_new ();
      json_node_take_object (root, o);
      json_object_set_double_member (o, "sample_period_s", e->period_s);
      json_object_set_null_member (o, "model");
      JsonBuilder *b = json_builder_new ();
      lw_cli_doc_json_requirements (b, design, e->requirements);
      json_object_set_member (o, "requirements", json_builder_get_root (b));
      g_object_unref (b);
      int status = lw_cli_measured_doc_analyze (a->files[0], design, e, o);
      if (status != LW_EXIT_OK)
        {
          json_node_unref (root);
          return status;
        }
      *json = root;
      return LW_EXIT_OK;
    }
  printf ("Design '%s' (%s), variant '%s'\n\n", design->title, a->files[0],
          design->variants[index].name);
  printf ("No plant model: the design is on its measured response alone. Steps, closed-loop\n"
          "poles and the code's margins after quantization need a model (fit one to the data:\n"
          "loopwright-cli fit).\n");
  printf ("\nRequirements of the design\n");
  lw_cli_doc_print_requirements (design, e->requirements);
  return lw_cli_measured_doc_analyze (a->files[0], design, e, NULL);
}

static int
analyze_loop_run (const AnalyzeArgs *a, const AnalyzeSpec *spec, const LwVariantEval *e,
                  const LwDesign *design, size_t index, JsonNode **json)
{
  const LwEvaluation *ev = e->ev;
  if (ev == NULL)
    return analyze_data_alone (a, e, design, index, json);
  if (a->json)
    {
      JsonNode *root = lw_cli_json_analysis (ev, &e->step, e->sim_ref, e->sim_in, e->sim_out);
      /* how far the factored plant_z and plant_w are from the plant (docs/cli.md) */
      JsonObject *o = json_node_get_object (root);
      if (isfinite (e->plant_z_form_error))
        json_object_set_double_member (o, "plant_z_form_error", e->plant_z_form_error);
      else
        json_object_set_null_member (o, "plant_z_form_error");
      if (isfinite (e->plant_w_form_error))
        json_object_set_double_member (o, "plant_w_form_error", e->plant_w_form_error);
      else
        json_object_set_null_member (o, "plant_w_form_error");
      if (design != NULL)
        {
          /* the document's requirements, as "requirements": [...] */
          JsonBuilder *b = json_builder_new ();
          lw_cli_doc_json_requirements (b, design, e->requirements);
          json_object_set_member (json_node_get_object (root), "requirements",
                                  json_builder_get_root (b));
          g_object_unref (b);
          int status = lw_cli_measured_doc_analyze (a->files[0], design, e,
                                                    json_node_get_object (root));
          if (status != LW_EXIT_OK)
            {
              json_node_unref (root);
              return status;
            }
        }
      *json = root;
    }
  else
    {
      if (design != NULL)
        printf ("Design '%s' (%s), variant '%s'\n\n", design->title, a->files[0],
                design->variants[index].name);
      lw_cli_analyze_print_report (e->plant_s, e->dead_time_s, ev, &e->step, &e->sim_options,
                    e->reference_step, e->sim_ref, e->sim_in, e->sim_out,
                    e->plant_z_form_error, e->plant_w_form_error);
      if (design != NULL)
        {
          printf ("\nRequirements of the design\n");
          lw_cli_doc_print_requirements (design, e->requirements);
          return lw_cli_measured_doc_analyze (a->files[0], design, e, NULL);
        }
    }
  return LW_EXIT_OK;
}

static void
print_json (JsonNode *root)
{
  char *text = lw_cli_json_to_text (root);
  fputs (text, stdout);
  g_free (text);
}

/* The plant family of the design fd (its ranged parameters) with variant `index`'s
 * controller, or with controller_z at period_s when given: added to root ("family") with
 * --json, else printed. */
static int
analyze_family (const AnalyzeArgs *a, const LwDesign *fd, double period_s,
                const LwModel *controller_z, size_t index, JsonNode *root)
{
  LwFamilyOptions fo;
  int status = lw_cli_family_options (&a->family, fd, &fo);
  if (status != LW_EXIT_OK)
    return status;
  GError *error = NULL;
  g_autoptr (LwFamily) f = controller_z != NULL
    ? lw_family_evaluate_controller (fd, period_s, controller_z, &fo, &error)
    : lw_family_evaluate (fd, index, &fo, &error);
  if (f == NULL)
    {
      status = lw_cli_report_gerror ("family", error);
      g_error_free (error);
      return status;
    }
  if (root != NULL)
    {
      lw_cli_family_json (json_node_get_object (root), f, fd);
      if (a->each_member)
        lw_cli_family_members_json (json_object_get_object_member (json_node_get_object (root),
                                                                    "family"), f);
    }
  else if (!a->json)
    {
      lw_cli_family_print (f, fd);
      if (a->each_member)
        lw_cli_family_members_print (f);
    }
  return LW_EXIT_OK;
}

static int
each_member_refused (void)
{
  lw_cli_bad_input ("--each-member", "needs a plant family: --range or --point with the loop "
                    "options, or a document with ranged parameters or operating points");
  return LW_EXIT_BAD_INPUT;
}

/* The first option given that only a model can serve, or NULL. */
static const char *
model_only_option (const AnalyzeArgs *a)
{
  return a->saturation ? "--saturation" : a->anti_windup ? "--anti-windup"
         : a->steps ? "--steps" : a->substeps ? "--substeps" : a->points ? "--points" : NULL;
}

static int
analyze_run (void *data)
{
  const AnalyzeArgs *a = data;
  AnalyzeSpec spec;
  LwCliLoop lp;
  if (lw_cli_measured_file (&a->measured) == NULL && (a->measured.kind != NULL || a->measured.unstable_poles))
    {
      lw_cli_bad_input (a->measured.kind != NULL ? "--measured-kind"
                        : "--measured-unstable-poles", "needs --measured FILE.csv%s",
                        a->measured.kind != NULL ? "" : " (a design document gives its own: "
                        "<measured open_loop_unstable_poles>)");
      return LW_EXIT_BAD_INPUT;
    }
  if (lw_cli_measured_file (&a->measured) != NULL
      && lw_cli_family_refuse_measured (&a->family) != LW_EXIT_OK)
    return LW_EXIT_BAD_INPUT;
  if (lw_cli_measured_file (&a->measured) != NULL && (a->files == NULL || a->files[0] == NULL))
    {
      const char *model_only = model_only_option (a);
      if (model_only != NULL)
        {
          lw_cli_bad_input (model_only, "needs a model (the time responses and the frequency "
                            "grid are a model's); the data are analysed at their own points");
          return LW_EXIT_BAD_INPUT;
        }
      if (lw_cli_measured_one (&a->measured, "several tables make a measured family, judged "
                               "with a design document's variants and requirements (analyze "
                               "FILE.lwd --measured A.csv --measured B.csv)") != LW_EXIT_OK)
        return LW_EXIT_BAD_INPUT;
      return lw_cli_measured_analyze ("analyze", &a->loop, &a->measured, a->json);
    }
  if (a->files == NULL || a->files[0] == NULL)
    {
      if (a->variant != NULL || a->all)
        {
          lw_cli_bad_input (a->all ? "--all-variants" : "--variant",
                            "needs a design document (FILE.lwd) to pick from");
          return LW_EXIT_BAD_INPUT;
        }
      if (a->each_member && !lw_cli_family_wanted (&a->family, NULL))
        return each_member_refused ();
      int status = lw_cli_loop_build ("analyze", &a->loop, &lp);
      if (status != LW_EXIT_OK)
        return status;
      status = analyze_spec (a, &spec);
      JsonNode *root = NULL;
      LwEngineOptions eo;
      engine_options (&spec, &eo);
      g_autoptr (LwVariantEval) e = NULL;
      if (status == LW_EXIT_OK)
        status = lw_cli_loop_evaluate ("analyze", &lp, &eo, TRUE, &e);
      if (status == LW_EXIT_OK)
        status = analyze_loop_run (a, &spec, e, NULL, 0, &root);
      if (status == LW_EXIT_OK && lw_cli_family_wanted (&a->family, NULL))
        {
          g_autoptr (LwDesign) fd = NULL;
          status = lw_cli_family_design (&a->loop, &a->family, &lp, &fd);
          if (status == LW_EXIT_OK)
            status = analyze_family (a, fd, lp.period_s, lp.controller_z, 0, root);
        }
      if (root != NULL)
        {
          print_json (root);
          json_node_unref (root);
        }
      lw_cli_loop_clear (&lp);
      return status;
    }

  if (a->files[1] != NULL)
    {
      lw_cli_bad_input ("analyze", "unexpected argument '%s': one design document at a time",
                        a->files[1]);
      return LW_EXIT_BAD_INPUT;
    }
  int status = lw_cli_doc_refuse_loop_options ("analyze", a->files[0], &a->loop);
  if (status != LW_EXIT_OK)
    return status;
  if ((status = lw_cli_family_refuse_doc (&a->family)) != LW_EXIT_OK)
    return status;
  g_autoptr (LwDesign) design = NULL;
  status = lw_cli_doc_load (a->files[0], &design);
  if (status != LW_EXIT_OK)
    return status;
  /* a measurement given here takes the place of the document's, judged on as check does */
  status = lw_cli_measured_doc_set (design, &a->measured, LW_DESIGN_ANALYSIS_DATA);
  if (status != LW_EXIT_OK)
    return status;
  g_autofree size_t *which = NULL;
  size_t n = 0;
  status = lw_cli_doc_select (design, a->variant, a->all, "--all-variants", &which, &n);
  if (status != LW_EXIT_OK)
    return status;
  status = analyze_spec (a, &spec);
  if (status != LW_EXIT_OK)
    return status;
  const char *model_only = model_only_option (a);
  if (!lw_design_has_model (design) && model_only != NULL)
    {
      lw_cli_bad_input (model_only, "needs a model (the time responses and the frequency grid "
                        "are a model's); %s holds only measured data", a->files[0]);
      return LW_EXIT_BAD_INPUT;
    }
  if (a->each_member && !lw_cli_family_wanted (&a->family, design))
    return each_member_refused ();
  JsonBuilder *b = NULL;
  if (a->json && a->all)
    {
      b = json_builder_new ();
      json_builder_begin_object (b);
      json_builder_set_member_name (b, "variants");
      json_builder_begin_array (b);
    }
  for (size_t k = 0; k < n && status == LW_EXIT_OK; k++)
    {
      LwEngineOptions eo;
      engine_options (&spec, &eo);
      g_autoptr (LwVariantEval) e = NULL;
      status = lw_cli_doc_evaluate_data (a->files[0], design, which[k], &eo, TRUE, &e);
      if (status != LW_EXIT_OK)
        break;
      if (!a->json && k > 0)
        printf ("\n\n");
      JsonNode *root = NULL;
      status = analyze_loop_run (a, &spec, e, design, which[k], &root);
      if (status == LW_EXIT_OK && e->ev != NULL && lw_cli_family_wanted (&a->family, design))
        status = analyze_family (a, design, 0.0, NULL, which[k], root);
      /* several measured responses: the worst margins over them */
      if (status == LW_EXIT_OK && (root != NULL || !a->json))
        status = lw_cli_measured_family_run (design, e,
                                             root != NULL ? json_node_get_object (root) : NULL,
                                             NULL);
      if (root == NULL)
        continue;
      if (b != NULL)
        {
          /* each entry: the analyze keys plus the variant's name */
          json_object_set_string_member (json_node_get_object (root), "name",
                                         design->variants[which[k]].name);
          json_builder_add_value (b, root);
        }
      else
        {
          print_json (root);
          json_node_unref (root);
        }
    }
  if (b != NULL)
    {
      json_builder_end_array (b);
      json_builder_end_object (b);
      JsonNode *all = json_builder_get_root (b);
      if (status == LW_EXIT_OK)
        print_json (all);
      json_node_unref (all);
      g_object_unref (b);
    }
  return status;
}

int
lw_cmd_analyze (int argc, char **argv)
{
  AnalyzeArgs a = { 0 };
  const GOptionEntry entries[] = {
    LW_CLI_LOOP_ENTRIES (&a.loop),
    LW_CLI_MEASURED_ENTRIES (&a.measured),
    LW_CLI_MEASURED_POLES_ENTRY (&a.measured),
    LW_CLI_FAMILY_ENTRIES (&a.family),
    { "points", 0, 0, G_OPTION_ARG_STRING, &a.points, NULL, NULL },
    { "steps", 0, 0, G_OPTION_ARG_STRING, &a.steps, NULL, NULL },
    { "saturation", 0, 0, G_OPTION_ARG_STRING, &a.saturation, NULL, NULL },
    { "anti-windup", 0, 0, G_OPTION_ARG_NONE, &a.anti_windup, NULL, NULL },
    { "each-member", 0, 0, G_OPTION_ARG_NONE, &a.each_member, NULL, NULL },
    { "substeps", 0, 0, G_OPTION_ARG_STRING, &a.substeps, NULL, NULL },
    { "json", 0, 0, G_OPTION_ARG_NONE, &a.json, NULL, NULL },
    { "help", 'h', 0, G_OPTION_ARG_NONE, &a.help, NULL, NULL },
    { "variant", 0, 0, G_OPTION_ARG_STRING, &a.variant, NULL, NULL },
    { "all-variants", 0, 0, G_OPTION_ARG_NONE, &a.all, NULL, NULL },
    { G_OPTION_REMAINING, 0, 0, G_OPTION_ARG_FILENAME_ARRAY, &a.files, NULL, NULL },
    { NULL, 0, 0, 0, NULL, NULL, NULL }
  };
  int status = lw_cli_run_command ("analyze", argc, argv, entries, &a.help, analyze_help,
                                   analyze_run, &a);
  lw_cli_loop_args_clear (&a.loop);
  lw_cli_measured_args_clear (&a.measured);
  lw_cli_family_args_clear (&a.family);
  g_strfreev (a.files);
  g_free (a.variant);
  g_free (a.points);
  g_free (a.steps);
  g_free (a.saturation);
  g_free (a.substeps);
  return status;
}
