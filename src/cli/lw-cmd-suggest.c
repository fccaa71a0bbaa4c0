/* lw-cmd-suggest.c — `loopwright-cli suggest`: a crossover gain and lead stages proposed for a
 * phase-margin target at a crossover (docs/cli.md, docs/design-helpers.md).
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
#include "lw-cmd-suggest-helper.h"
#include "lw-require.h"
#include "lw-stage.h"
#include "lw-synth.h"

/* ---- the controller as an expression that the parser reads back ------------------------- */

static void
append_number (GString *s, double v)
{
  char buf[G_ASCII_DTOSTR_BUF_SIZE];
  g_string_append (s, g_ascii_formatd (buf, sizeof buf, "%.17g", v));
}

/* (w+a), w, (w-a) or (w^2+b*w+c) for the roots at r[*i] (advances *i). */
static void
append_factor (GString *s, const double complex *r, size_t n, size_t *i)
{
  double complex x = r[*i];
  if (cimag (x) != 0.0 && *i + 1 < n && r[*i + 1] == conj (x))
    {
      double b = -2.0 * creal (x), c = creal (x) * creal (x) + cimag (x) * cimag (x);
      g_string_append (s, "(w^2");
      if (b != 0.0)
        {
          g_string_append_c (s, b < 0 ? '-' : '+');
          append_number (s, fabs (b));
          g_string_append (s, "*w");
        }
      g_string_append_c (s, '+');
      append_number (s, c);
      g_string_append_c (s, ')');
      *i += 2;
      return;
    }
  double a = creal (x);
  if (a == 0.0)
    g_string_append_c (s, 'w');
  else
    {
      g_string_append (s, a < 0 ? "(w+" : "(w-");
      append_number (s, fabs (a));
      g_string_append_c (s, ')');
    }
  *i += 1;
}

/* gain*(factors)/((factors)), every product written with '*' (lw-expr.h), 17 digits. */
static char *
format_expression (const LwModel *m)
{
  GString *s = g_string_new (NULL);
  append_number (s, m->gain);
  for (size_t i = 0; i < m->n_zeros;)
    {
      g_string_append_c (s, '*');
      append_factor (s, m->zeros, m->n_zeros, &i);
    }
  if (m->n_poles > 0)
    {
      /* one factor: "/(w+a)"; several: "/((w+a)*(w+b))" */
      bool single = m->n_poles == 1 || (m->n_poles == 2 && cimag (m->poles[0]) != 0.0);
      g_string_append (s, single ? "/" : "/(");
      bool first = true;
      for (size_t i = 0; i < m->n_poles;)
        {
          if (!first)
            g_string_append_c (s, '*');
          first = false;
          append_factor (s, m->poles, m->n_poles, &i);
        }
      if (!single)
        g_string_append_c (s, ')');
    }
  return g_string_free (s, FALSE);
}

/* ---- report ------------------------------------------------------------------------------ */

static void
print_stage (size_t k, const LwStage *st)
{
  LwStageParam p[LW_STAGE_MAX_PARAMS];
  size_t np = lw_stage_params (st, p);
  printf ("  %zu. %-16s %-6s", k + 1, st->label, lw_stage_kind_name (st->kind));
  for (size_t i = 0; i < np; i++)
    {
      bool unit = p[i].unit[0] != '\0' && strcmp (p[i].unit, "ratio") != 0;
      printf ("%s%s %.6g%s%s", i == 0 ? " " : ", ", p[i].name, p[i].value, unit ? " " : "",
              unit ? p[i].unit : "");
    }
  printf ("\n");
}

static void
print_report (const LwLeadDesign *d, double safety, const LwReqCrossover *rise,
              const char *expr, const LwEvaluation *ev)
{
  double T = ev->period_s;
  printf ("Suggested compensator for a %.4g deg phase margin (+ %.4g deg safety) at a crossover "
          "of %.6g rad/s\n", d->pm_target_deg, safety, d->omega_c_rad_s);
  printf ("  period T = %.6g s, computation delay %d sample(s)\n", T, ev->compute_delay);
  if (rise != NULL)
    {
      printf ("  rise time %.6g s:\n", rise->rise_time_s);
      printf ("    omega_c = 1.7/t_r = %.6g rad/s (common practice, used here)\n",
              rise->omega_rule_rad_s);
      if (isfinite (rise->zeta))
        printf ("    second-order model, zeta = %.4g from the phase margin: omega_n = 1.8/t_r = "
                "%.6g rad/s, omega_c = %.6g rad/s, nu_c = %.6g rad/s (%+.3g %% from warping)\n",
                rise->zeta, rise->omega_n_rad_s, rise->omega_second_rad_s,
                rise->nu_second_rad_s, rise->warp_second_pct);
    }
  printf ("  crossover in the w-plane: nu_c = (2/T) tan(omega_c T/2) = %.6g rad/s "
          "(%+.3g %% from warping)\n", d->nu_c_rad_s,
          100.0 * (d->nu_c_rad_s - d->omega_c_rad_s) / d->omega_c_rad_s);
  printf ("  phase margin at nu_c before the lead: %.4g deg; required %.4g deg + safety %.4g deg "
          "= %.4g deg\n", d->pm_before_deg, d->required_deg, safety, d->lead_total_deg);
  if (d->n_leads == 0)
    printf ("  no lead needed: the loop already has the phase; only the crossover gain\n");
  else if (d->n_leads == 1)
    printf ("  one lead of %.4g deg (alpha %.6g), centred at nu_c\n", d->lead_each_deg, d->alpha);
  else
    printf ("  two equal leads of %.4g deg each (alpha %.6g), centred at nu_c (more than 60 deg "
            "in one lead)\n", d->lead_each_deg, d->alpha);
  printf ("  crossover gain re-solved with the lead in place: %d passes\n", d->passes);

  printf ("\nStages (w-plane; frequencies are nu in rad/s)\n");
  for (size_t k = 0; k < d->n_stages; k++)
    print_stage (k, &d->stages[k]);

  printf ("\nController in w (give it to --controller):\n  %s\n", expr);

  const LwMargins *m = &ev->margins;
  printf ("\nMargins reached, loop L(z) = z^-%d C(z) P(z)\n", ev->compute_delay);
  if (m->has_phase_margin)
    printf ("  %-24s %.4g deg at %.6g rad/s\n", "phase margin", m->phase_margin_deg,
            m->gain_crossover_rad_s);
  else
    printf ("  %-24s none (no gain crossover)\n", "phase margin");
  if (m->n_gain_crossovers > 1)
    printf ("  note: %zu gain crossovers; the governing one is shown (see analyze)\n",
            m->n_gain_crossovers);
  if (m->has_gain_margin)
    printf ("  %-24s %.4g dB at %.6g rad/s\n", "gain margin", m->gain_margin_db,
            m->phase_crossover_rad_s);
  else
    printf ("  %-24s none (no phase crossover)\n", "gain margin");
  if (m->has_delay_margin)
    printf ("  %-24s %.6g s = %.4g samples\n", "delay margin", m->delay_margin_s,
            m->delay_margin_samples);
  if (m->has_sensitivity)
    printf ("  %-24s %.4g (%.3g dB) at %.6g rad/s\n", "sensitivity peak |S|", m->sensitivity_peak,
            20.0 * log10 (m->sensitivity_peak), m->sensitivity_peak_rad_s);
  printf ("  %-24s %s\n", "closed loop", ev->stable ? "stable" : "UNSTABLE");
  printf ("\ncaution: simulation is not validation; commission with safe limits; follow the "
          "applicable functional-safety standards and qualified review; local codes prevail.\n");
}

static void
json_stage (JsonBuilder *b, const LwStage *st)
{
  LwStageParam p[LW_STAGE_MAX_PARAMS];
  size_t np = lw_stage_params (st, p);
  json_builder_begin_object (b);
  json_builder_set_member_name (b, "kind");
  json_builder_add_string_value (b, lw_stage_kind_name (st->kind));
  json_builder_set_member_name (b, "label");
  json_builder_add_string_value (b, st->label);
  json_builder_set_member_name (b, "enabled");
  json_builder_add_boolean_value (b, st->enabled);
  json_builder_set_member_name (b, "params");
  json_builder_begin_object (b);
  for (size_t i = 0; i < np; i++)
    {
      json_builder_set_member_name (b, p[i].name);
      lw_cli_json_add_number (b, p[i].value);
    }
  json_builder_end_object (b);
  json_builder_end_object (b);
}

static void
json_member_number (JsonBuilder *b, const char *name, double v)
{
  json_builder_set_member_name (b, name);
  lw_cli_json_add_number (b, v);
}

static void
print_json (const LwLeadDesign *d, double safety, const LwModel *cw, const char *expr,
            const LwEvaluation *ev)
{
  JsonBuilder *b = json_builder_new ();
  json_builder_begin_object (b);
  json_builder_set_member_name (b, "stages");
  json_builder_begin_array (b);
  for (size_t k = 0; k < d->n_stages; k++)
    json_stage (b, &d->stages[k]);
  json_builder_end_array (b);
  json_builder_set_member_name (b, "controller_w");
  lw_cli_json_add_model (b, cw);
  json_builder_set_member_name (b, "controller_w_expression");
  json_builder_add_string_value (b, expr);
  json_builder_set_member_name (b, "design");
  json_builder_begin_object (b);
  json_member_number (b, "phase_margin_target_deg", d->pm_target_deg);
  json_member_number (b, "safety_deg", safety);
  json_member_number (b, "crossover_rad_s", d->omega_c_rad_s);
  json_member_number (b, "crossover_w_rad_s", d->nu_c_rad_s);
  json_member_number (b, "phase_margin_before_deg", d->pm_before_deg);
  json_member_number (b, "required_deg", d->required_deg);
  json_member_number (b, "lead_total_deg", d->lead_total_deg);
  json_builder_set_member_name (b, "leads");
  json_builder_add_int_value (b, (gint64) d->n_leads);
  json_builder_set_member_name (b, "passes");
  json_builder_add_int_value (b, d->passes);
  json_builder_end_object (b);
  json_builder_set_member_name (b, "loop");
  lw_cli_json_add_loop (b, &ev->margins);
  json_builder_set_member_name (b, "stable");
  json_builder_add_boolean_value (b, ev->stable);
  json_builder_end_object (b);
  JsonNode *root = json_builder_get_root (b);
  char *text = lw_cli_json_to_text (root);
  fputs (text, stdout);
  g_free (text);
  json_node_unref (root);
  g_object_unref (b);
}

/* ---- suggest ----------------------------------------------------------------------------- */

static const char suggest_help[] =
  "Usage: " LW_CLI_PROG " suggest --plant EXPR --period SECONDS --phase-margin DEG\n"
  "       (--crossover RAD_S | --rise-time SECONDS) [options]\n"
  "       " LW_CLI_PROG " suggest FILE.lwd --phase-margin DEG (--crossover RAD_S |\n"
  "       --rise-time SECONDS) [options]\n"
  "       " LW_CLI_PROG " suggest (FILE.lwd | --plant EXPR --period SECONDS)\n"
  "       --helper NAME [options]\n"
  "\n"
  "Given a design document (FILE.lwd), the plant, dead time, period and computation delay\n"
  "come from it (its stages are not used: the controller is what is proposed); the loop\n"
  "options are then not accepted.\n"
  "\n"
  "Proposes a crossover gain and lead stages, designed in the w-plane, that give the loop\n"
  "the phase margin asked at the crossover asked, and reports the margins they reach.\n"
  "\n"
  "Options:\n"
  "  --plant EXPR             plant P(s), a proper rational expression in s (required)\n"
  "  --period SECONDS         sample period T in seconds, > 0 (required)\n"
  "  --compute-delay N        computation delay in whole samples, 0 to 1000 (default 1)\n"
  "  --dead-time SECONDS      plant input dead time in seconds, >= 0 (default 0)\n"
  "  --phase-margin DEG       phase margin wanted, degrees, more than 0 and less than 180\n"
  "                           (required)\n"
  "  --crossover RAD_S        gain crossover wanted, physical omega in rad/s, below pi/T\n"
  "  --rise-time SECONDS      or a rise time; crossover 1.7/t_r (common practice)\n"
  "  --safety DEG             phase added to the lead and kept as a reserve, 0 to 90\n"
  "                           (default 5)\n"
  "  --json                   print the results as JSON instead of a report\n"
  "\n"
  "With --helper, one formula helper, its targets taken from the options or else from\n"
  "the document's requirements (docs/design-helpers.md):\n"
  "  --helper NAME            crossover-gain, lead, lag, pi, notch, or meet (gain + lead,\n"
  "                           + PI or lag for an error requirement, checked and adjusted\n"
  "                           until the requirements pass; replaces the variant's stages);\n"
  "                           the others add stages after the variant's\n"
  "  --variant NAME           the variant to work on (default: the active one)\n"
  "  --ratio R                lag: low-frequency gain ratio, > 1 (default: from the\n"
  "                           step- or ramp-error requirement)\n"
  "  --decades-below D        lag: its zero D decades below the crossover (default 1)\n"
  "  --zero-fraction F        PI: its zero at F times the crossover, 0 < F < 1 (default 0.1)\n"
  "  --output FILE.lwd        also save the document with the proposal applied\n"
  "  -h, --help               show this help\n"
  "\n"
  "Exit status: 0 success, 2 bad input (or a design that needs more than 120 degrees of\n"
  "lead), 1 internal failure.\n";

typedef struct
{
  LwCliLoopArgs loop;
  char **files;
  char *phase_margin;
  char *crossover;
  char *rise_time;
  char *safety;
  char *helper;
  char *variant;
  char *ratio;
  char *decades;
  char *fraction;
  char *output;
  gboolean json;
  gboolean help;
} SuggestArgs;

/* The loop options of the run: as given, or (with a design document) the document's loop
 * written as those options, so the proposal and its read-back below use one path. */
static int
suggest_loop_args (const SuggestArgs *a, LwCliLoopArgs *out)
{
  memset (out, 0, sizeof *out);
  if (a->files == NULL || a->files[0] == NULL)
    {
      out->plant = g_strdup (a->loop.plant);
      out->period = g_strdup (a->loop.period);
      out->compute_delay = g_strdup (a->loop.compute_delay);
      out->dead_time = g_strdup (a->loop.dead_time);
      return LW_EXIT_OK;
    }
  const char *path = NULL;
  int status = lw_cli_doc_one_file ("suggest", a->files, &path);
  if (status == LW_EXIT_OK)
    status = lw_cli_doc_refuse_loop_options ("suggest", path, &a->loop);
  if (status != LW_EXIT_OK)
    return status;
  g_autoptr (LwDesign) d = NULL;
  status = lw_cli_doc_load (path, &d);
  if (status != LW_EXIT_OK)
    return status;
  lw_cli_doc_loop_args (d, out);
  return LW_EXIT_OK;
}

static int
suggest_run (void *data)
{
  const SuggestArgs *a = data;
  if (a->helper != NULL)
    {
      LwSuggestHelperArgs h = { &a->loop, a->files, a->helper, a->variant, a->phase_margin,
                                a->crossover, a->rise_time, a->safety, a->ratio, a->decades,
                                a->fraction, a->output, a->json };
      return lw_cmd_suggest_helper (&h);
    }
  const char *only_helper = a->variant ? "--variant" : a->ratio ? "--ratio"
                            : a->decades ? "--decades-below" : a->fraction ? "--zero-fraction"
                            : a->output ? "--output" : NULL;
  if (only_helper != NULL)
    {
      lw_cli_bad_input (only_helper, "needs --helper (see '" LW_CLI_PROG " suggest --help')");
      return LW_EXIT_BAD_INPUT;
    }
  g_auto (LwCliLoopArgs) loop_args = { 0 };
  int status = suggest_loop_args (a, &loop_args);
  if (status != LW_EXIT_OK)
    return status;
  LwCliLoop lp;
  status = lw_cli_loop_build ("suggest", &loop_args, &lp);
  if (status != LW_EXIT_OK)
    return status;
  double T = lp.period_s, pm = NAN, omega_c = NAN, safety = 5.0;
  LwReqCrossover rise;
  bool have_rise = false;
  LwModel *cw = NULL;
  LwEvaluation *ev = NULL;
  char *expr = NULL;
  LwError err;
  lw_error_clear (&err);
  status = LW_EXIT_BAD_INPUT;

  if (a->phase_margin == NULL)
    {
      lw_cli_bad_input ("suggest", "--phase-margin is required (see '" LW_CLI_PROG
                        " suggest --help')");
      goto out;
    }
  if (!lw_cli_parse_double ("--phase-margin", a->phase_margin, &pm))
    goto out;
  if (!(pm > 0.0 && pm < 180.0))
    {
      lw_cli_bad_input ("--phase-margin", "must be more than 0 and less than 180 degrees, got %s",
                        a->phase_margin);
      goto out;
    }
  if ((a->crossover == NULL) == (a->rise_time == NULL))
    {
      lw_cli_bad_input ("suggest", "give exactly one of --crossover and --rise-time (see '"
                        LW_CLI_PROG " suggest --help')");
      goto out;
    }
  if (a->safety != NULL)
    {
      if (!lw_cli_parse_double ("--safety", a->safety, &safety))
        goto out;
      if (!(safety >= 0.0 && safety < 90.0))
        {
          lw_cli_bad_input ("--safety", "must be from 0 to less than 90 degrees, got %s",
                            a->safety);
          goto out;
        }
    }
  const char *place = a->crossover != NULL ? "--crossover" : "--rise-time";
  if (a->crossover != NULL)
    {
      if (!lw_cli_parse_double ("--crossover", a->crossover, &omega_c))
        goto out;
      if (!(omega_c > 0.0))
        {
          lw_cli_bad_input ("--crossover", "must be more than 0 rad/s, got %s", a->crossover);
          goto out;
        }
    }
  else
    {
      double tr;
      if (!lw_cli_parse_double ("--rise-time", a->rise_time, &tr))
        goto out;
      if (!(tr > 0.0))
        {
          lw_cli_bad_input ("--rise-time", "must be more than 0 seconds, got %s", a->rise_time);
          goto out;
        }
      /* the second-order figures use ζ from the phase margin (exact relation, PM < 90°) */
      double zeta = lw_req_zeta_from_pm_deg (pm);
      if (lw_req_crossover_from_rise (tr, isfinite (zeta) ? zeta : 0.0, T, &rise, &err) != LW_OK)
        {
          status = lw_cli_report_core_error ("--rise-time", &err);
          goto out;
        }
      rise.zeta = zeta;
      have_rise = true;
      omega_c = rise.omega_rule_rad_s;
    }
  if (!(omega_c < G_PI / T))
    {
      lw_cli_bad_input (place, "the crossover %.6g rad/s must lie below the Nyquist frequency "
                        "pi/T = %.6g rad/s", omega_c, G_PI / T);
      goto out;
    }

  LwSynthLoop sl = { .plant = lp.sampled, .compute_delay = lp.compute_delay };
  LwLeadOptions o;
  lw_lead_options_init (&o);
  o.safety_deg = safety;
  LwLeadDesign d;
  if (lw_synth_lead (&sl, pm, lw_warp_omega_to_nu (omega_c, T), &o, &d, &err) != LW_OK)
    {
      status = lw_cli_report_core_error ("suggest", &err);
      goto out;
    }
  if (lw_compensator_w (d.stages, d.n_stages, T, &cw, &err) != LW_OK)
    {
      status = lw_cli_report_core_error ("suggest", &err);
      goto out;
    }
  expr = format_expression (cw);
  /* the margins as analyze reports them: the same controller, read back from its text, so
   * what is printed is what was evaluated */
  {
    LwCliLoopArgs back = loop_args;
    back.controller = expr;
    back.controller_z = NULL;
    LwCliLoop lb;
    status = lw_cli_loop_build ("suggest", &back, &lb);
    if (status != LW_EXIT_OK)
      goto out;
    LwAnalysisOptions opts;
    lw_analysis_options_init (&opts);
    opts.compute_delay = lb.compute_delay;
    LwStatus st = lw_evaluate (lb.sampled, lb.controller_z, &opts, &ev, &err);
    lw_cli_loop_clear (&lb);
    if (st != LW_OK)
      {
        status = lw_cli_report_core_error ("suggest", &err);
        goto out;
      }
  }
  if (a->json)
    print_json (&d, safety, cw, expr, ev);
  else
    print_report (&d, safety, have_rise ? &rise : NULL, expr, ev);
  status = LW_EXIT_OK;
out:
  g_free (expr);
  lw_evaluation_free (ev);
  lw_model_free (cw);
  lw_cli_loop_clear (&lp);
  return status;
}

int
lw_cmd_suggest (int argc, char **argv)
{
  SuggestArgs a = { 0 };
  const GOptionEntry entries[] = {
    { "plant", 0, 0, G_OPTION_ARG_FILENAME, &a.loop.plant, NULL, NULL },
    { "period", 0, 0, G_OPTION_ARG_FILENAME, &a.loop.period, NULL, NULL },
    { "compute-delay", 0, 0, G_OPTION_ARG_FILENAME, &a.loop.compute_delay, NULL, NULL },
    { "dead-time", 0, 0, G_OPTION_ARG_FILENAME, &a.loop.dead_time, NULL, NULL },
    { "phase-margin", 0, 0, G_OPTION_ARG_STRING, &a.phase_margin, NULL, NULL },
    { "crossover", 0, 0, G_OPTION_ARG_STRING, &a.crossover, NULL, NULL },
    { "rise-time", 0, 0, G_OPTION_ARG_STRING, &a.rise_time, NULL, NULL },
    { "safety", 0, 0, G_OPTION_ARG_STRING, &a.safety, NULL, NULL },
    { "helper", 0, 0, G_OPTION_ARG_STRING, &a.helper, NULL, NULL },
    { "variant", 0, 0, G_OPTION_ARG_STRING, &a.variant, NULL, NULL },
    { "ratio", 0, 0, G_OPTION_ARG_STRING, &a.ratio, NULL, NULL },
    { "decades-below", 0, 0, G_OPTION_ARG_STRING, &a.decades, NULL, NULL },
    { "zero-fraction", 0, 0, G_OPTION_ARG_STRING, &a.fraction, NULL, NULL },
    { "output", 0, 0, G_OPTION_ARG_FILENAME, &a.output, NULL, NULL },
    { "json", 0, 0, G_OPTION_ARG_NONE, &a.json, NULL, NULL },
    { "help", 'h', 0, G_OPTION_ARG_NONE, &a.help, NULL, NULL },
    { G_OPTION_REMAINING, 0, 0, G_OPTION_ARG_FILENAME_ARRAY, &a.files, NULL, NULL },
    { NULL, 0, 0, 0, NULL, NULL, NULL }
  };
  int status = lw_cli_run_command ("suggest", argc, argv, entries, &a.help, suggest_help,
                                   suggest_run, &a);
  lw_cli_loop_args_clear (&a.loop);
  g_free (a.phase_margin);
  g_free (a.crossover);
  g_free (a.rise_time);
  g_free (a.safety);
  g_free (a.helper);
  g_free (a.variant);
  g_free (a.ratio);
  g_free (a.decades);
  g_free (a.fraction);
  g_free (a.output);
  g_strfreev (a.files);
  return status;
}
