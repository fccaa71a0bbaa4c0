/* lw-cmd-emit.c — `loopwright-cli emit`: a controller as C99 code in one of its implementation
 * forms (difference equation, second-order sections, fixed-point sections), with a summary of
 * the coefficients, sections, pole shifts and margins (docs/cli.md, docs/implementation.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-cli-commands.h"
#include "lw-cli-common.h"
#include "lw-implementation.h"
#include "lw-file-write.h"
#include "lw-cli-doc.h"
#include "lw-cli-json.h"
#include "lw-emit-c.h"
#include "lw-implement.h"

static const char emit_help[] =
  "Usage: " LW_CLI_PROG " emit --plant EXPR --period SECONDS --controller EXPR\n"
  "       --form difference|sections --out DIR [options]\n"
  "       " LW_CLI_PROG " emit FILE.lwd [--variant NAME] --form difference|sections --out DIR\n"
  "       [options]\n"
  "\n"
  "Given a design document (FILE.lwd), the loop and the controller (the stages of the\n"
  "active variant, or of --variant NAME) come from it; the loop options are then not\n"
  "accepted.\n"
  "\n"
  "Writes the controller as C99 code: DIR/<prefix>controller.h and DIR/<prefix>controller.c,\n"
  "with a state struct, an init and a step function, the design's figures and a self-test.\n"
  "The computation delay is not in the coefficients: the firmware writes the output computed\n"
  "from sample k N ticks later.\n"
  "\n"
  "Options:\n"
  "  --plant EXPR             plant P(s), a proper rational expression in s (required)\n"
  "  --period SECONDS         sample period T in seconds, > 0 (required)\n"
  "  --compute-delay N        computation delay in whole samples, 0 to 1000 (default 1)\n"
  "  --dead-time SECONDS      plant input dead time in seconds, >= 0 (default 0)\n"
  "  --controller EXPR        controller C(w), proper, in the w-plane variable w (default 1)\n"
  "  --controller-z EXPR      controller C(z), proper, in z (instead of --controller)\n"
  "  --param NAME=VALUE       a named parameter of the plant expression and its value\n"
  "                           (repeat for each; e.g. --plant 'K/(s*(s+a))' --param K=40\n"
  "                           --param a=8)\n"
  "  --variant NAME           the variant of FILE.lwd (default: the active one)\n"
  "  --lang c                 language of the code (only c; the default)\n"
  "  --form FORM              difference (one difference equation) or sections (cascaded\n"
  "                           second-order sections) (required)\n"
  "  --fixed Qm.n             fixed-point sections: int16_t coefficients in Qm.n (m integer\n"
  "                           bits including the sign, n fraction bits, m + n <= 16),\n"
  "                           int16_t signals, int32_t states; needs --form sections\n"
  "  --prefix NAME            prefix of every name in the code and of the file names,\n"
  "                           a C identifier (default lw_ctrl_)\n"
  "  --out DIR                existing directory to write the two files into (required)\n"
  "  --json                   print the summary as JSON instead of text\n"
  "  -h, --help               show this help\n"
  "\n"
  "Exit status: 0 success, 2 bad input, 1 internal failure (also: a file not written).\n";

typedef struct
{
  LwCliLoopArgs loop;
  char *lang;
  char *form;
  char *fixed;
  char *prefix;
  char *out;
  char **files;
  char *variant;
  gboolean json;
  gboolean help;
} EmitArgs;

/* The evaluated loop from a design document (a->files) or from the loop options (then built
 * into lp, which must outlive *e); *ctl_place names the controller in messages (g_free). */
static int
emit_loop (const EmitArgs *a, LwCliLoop *lp, LwVariantEval **e, char **ctl_place)
{
  memset (lp, 0, sizeof *lp);
  *ctl_place = NULL;
  *e = NULL;
  if (a->files == NULL || a->files[0] == NULL)
    {
      if (a->variant != NULL)
        {
          lw_cli_bad_input ("--variant", "needs a design document (FILE.lwd) to pick from");
          return LW_EXIT_BAD_INPUT;
        }
      *ctl_place = g_strdup (a->loop.controller_z != NULL ? "--controller-z" : "--controller");
      int status = lw_cli_loop_build ("emit", &a->loop, lp);
      if (status == LW_EXIT_OK)
        status = lw_cli_loop_evaluate ("emit", lp, NULL, FALSE, e);
      return status;
    }
  const char *path = NULL;
  int status = lw_cli_doc_one_file ("emit", a->files, &path);
  if (status == LW_EXIT_OK)
    status = lw_cli_doc_refuse_loop_options ("emit", path, &a->loop);
  if (status != LW_EXIT_OK)
    return status;
  g_autoptr (LwDesign) d = NULL;
  size_t index = 0;
  status = lw_cli_doc_load (path, &d);
  if (status == LW_EXIT_OK)
    status = lw_cli_doc_variant (d, "--variant", a->variant, &index);
  if (status == LW_EXIT_OK)
    status = lw_cli_doc_evaluate (path, d, index, NULL, FALSE, e);
  if (status == LW_EXIT_OK)
    *ctl_place = g_strdup_printf ("%s: variant '%s'", path, d->variants[index].name);
  return status;
}

/* ---- summary as text -------------------------------------------------------------------- */

static void
print_summary (const char *hpath, const char *cpath, const char *form_name,
               const LwImplementation *im)
{
  printf ("Wrote %s\n  and %s\n  (C99, form %s, %s)\n", hpath, cpath, form_name,
          im->fixed != NULL ? "fixed point" : "double");
  if (im->fixed != NULL)
    printf ("  fixed point Q%d.%d: int16_t coefficients (value = integer / 2^%d), int16_t e "
            "and u, int32_t states\n", im->o.q.int_bits, im->o.q.frac_bits, im->o.q.frac_bits);
  g_autofree char *text = lw_implementation_describe (im);
  fputs (text, stdout);
}

/* ---- summary as JSON -------------------------------------------------------------------- */

static void
json_section (JsonBuilder *b, const LwSection *s)
{
  json_builder_begin_object (b);
  json_builder_set_member_name (b, "order");
  json_builder_add_int_value (b, s->order);
  json_builder_set_member_name (b, "b");
  lw_cli_json_add_number_array (b, s->b, 3);
  json_builder_set_member_name (b, "a");
  lw_cli_json_add_number_array (b, s->a, 3);
  json_builder_set_member_name (b, "poles");
  lw_cli_json_add_complex_array (b, s->poles, s->n_poles);
  json_builder_set_member_name (b, "zeros");
  lw_cli_json_add_complex_array (b, s->zeros, s->n_zeros);
  json_builder_set_member_name (b, "peak_gain");
  lw_cli_json_add_number (b, s->peak_gain);
  json_builder_end_object (b);
}

static void
json_ints (JsonBuilder *b, const int32_t *v, size_t n)
{
  json_builder_begin_array (b);
  for (size_t i = 0; i < n; i++)
    json_builder_add_int_value (b, v[i]);
  json_builder_end_array (b);
}

static void
json_evaluation (JsonBuilder *b, const LwEvaluation *ev)
{
  json_builder_begin_object (b);
  json_builder_set_member_name (b, "loop");
  lw_cli_json_add_loop (b, &ev->margins);
  json_builder_set_member_name (b, "closed_loop");
  lw_cli_json_add_closed_loop (b, ev);
  json_builder_end_object (b);
}

static char *
summary_json (const char *hpath, const char *cpath, const char *form_name,
              const LwImplementation *im)
{
  const LwVariantEval *lp = im->eval;
  const LwDiffEq *de = im->diffeq;
  const LwSos *sos = im->sos;
  const LwSosFixed *fx = im->fixed;
  const LwModel *czq = im->controller_zq;
  const LwEvaluation *ev = lp->ev;
  const LwEvaluation *evq = im->quantized != NULL ? im->quantized->ev : NULL;
  const double *h = im->impulse;
  const int16_t *hq = im->impulse_counts;
  JsonBuilder *b = json_builder_new ();
  json_builder_begin_object (b);
  json_builder_set_member_name (b, "files");
  json_builder_begin_array (b);
  json_builder_add_string_value (b, hpath);
  json_builder_add_string_value (b, cpath);
  json_builder_end_array (b);
  json_builder_set_member_name (b, "form");
  json_builder_add_string_value (b, form_name);
  json_builder_set_member_name (b, "sample_period_s");
  lw_cli_json_add_number (b, lp->period_s);
  json_builder_set_member_name (b, "compute_delay");
  json_builder_add_int_value (b, lp->compute_delay);
  json_builder_set_member_name (b, "controller_z");
  lw_cli_json_add_model (b, lp->controller_z);
  json_builder_set_member_name (b, "controller_w");
  if (lp->controller_w != NULL)
    lw_cli_json_add_model (b, lp->controller_w);
  else
    json_builder_add_null_value (b);
  json_builder_set_member_name (b, "difference");
  json_builder_begin_object (b);
  json_builder_set_member_name (b, "b");
  lw_cli_json_add_number_array (b, de->b, de->order + 1);
  json_builder_set_member_name (b, "a");
  lw_cli_json_add_number_array (b, de->a, de->order + 1);
  json_builder_end_object (b);
  json_builder_set_member_name (b, "sections");
  json_builder_begin_array (b);
  for (size_t k = 0; k < sos->n; k++)
    json_section (b, &sos->s[k]);
  json_builder_end_array (b);
  json_builder_set_member_name (b, "impulse_response");
  lw_cli_json_add_number_array (b, h, LW_EMIT_SELFTEST_LEN);
  json_builder_set_member_name (b, "design");
  json_evaluation (b, ev);
  json_builder_set_member_name (b, "fixed");
  if (fx == NULL)
    json_builder_add_null_value (b);
  else
    {
      json_builder_begin_object (b);
      json_builder_set_member_name (b, "int_bits");
      json_builder_add_int_value (b, fx->q.int_bits);
      json_builder_set_member_name (b, "frac_bits");
      json_builder_add_int_value (b, fx->q.frac_bits);
      json_builder_set_member_name (b, "sections");
      json_builder_begin_array (b);
      for (size_t k = 0; k < fx->n; k++)
        {
          const LwSectionQ *t = &fx->s[k];
          json_builder_begin_object (b);
          json_builder_set_member_name (b, "b");
          json_ints (b, t->b, 3);
          json_builder_set_member_name (b, "a");
          int32_t a[3] = { (int32_t) 1 << fx->q.frac_bits, t->a[1], t->a[2] };
          json_ints (b, a, 3);
          json_builder_set_member_name (b, "poles_exact");
          lw_cli_json_add_complex_array (b, t->poles_exact, t->n_poles);
          json_builder_set_member_name (b, "poles_quantized");
          lw_cli_json_add_complex_array (b, t->poles_quant, t->n_poles);
          json_builder_end_object (b);
        }
      json_builder_end_array (b);
      json_builder_set_member_name (b, "controller_z");
      lw_cli_json_add_model (b, czq);
      json_builder_set_member_name (b, "impulse_counts");
      json_builder_add_int_value (b, LW_EMIT_FIXED_IMPULSE);
      json_builder_set_member_name (b, "impulse_response");
      json_builder_begin_array (b);
      for (size_t k = 0; k < LW_EMIT_SELFTEST_LEN; k++)
        json_builder_add_int_value (b, hq[k]);
      json_builder_end_array (b);
      json_builder_set_member_name (b, "quantized");
      json_evaluation (b, evq);
      json_builder_set_member_name (b, "warnings");
      json_builder_begin_array (b);
      for (guint i = 0; i < im->warnings->len; i++)
        json_builder_add_string_value (b, g_ptr_array_index (im->warnings, i));
      json_builder_end_array (b);
      json_builder_end_object (b);
    }
  json_builder_end_object (b);
  JsonNode *root = json_builder_get_root (b);
  char *text = lw_cli_json_to_text (root);
  json_node_unref (root);
  g_object_unref (b);
  return text;
}

/* ---- run -------------------------------------------------------------------------------- */

static int
emit_run (void *data)
{
  const EmitArgs *a = data;
  LwError err;
  lw_error_clear (&err);

  /* options of this command first (cheap checks), then the loop */
  if (a->lang != NULL && strcmp (a->lang, "c") != 0)
    {
      lw_cli_bad_input ("--lang", "'%s' is not supported; the only language is c", a->lang);
      return LW_EXIT_BAD_INPUT;
    }
  if (a->form == NULL)
    {
      lw_cli_bad_input ("emit", "--form is required: difference or sections (see '"
                        LW_CLI_PROG " emit --help')");
      return LW_EXIT_BAD_INPUT;
    }
  LwImplForm form;
  if (strcmp (a->form, "difference") == 0)
    form = LW_FORM_DIFFERENCE;
  else if (strcmp (a->form, "sections") == 0)
    form = LW_FORM_SECTIONS;
  else
    {
      lw_cli_bad_input ("--form", "'%s' is not a form: use difference or sections", a->form);
      return LW_EXIT_BAD_INPUT;
    }
  LwQFormat q = { 0, 0 };
  if (a->fixed != NULL)
    {
      if (lw_qformat_parse (a->fixed, &q, &err) != LW_OK)
        return lw_cli_report_expr_error ("--fixed", a->fixed, &err);
      if (form != LW_FORM_SECTIONS)
        {
          lw_cli_bad_input ("--fixed", "fixed point needs --form sections (a quantized "
                            "high-order difference equation moves its poles far more)");
          return LW_EXIT_BAD_INPUT;
        }
    }
  const char *prefix = a->prefix != NULL ? a->prefix : LW_EMIT_DEFAULT_PREFIX;
  if (lw_emit_prefix_check (prefix, &err) != LW_OK)
    return lw_cli_report_expr_error ("--prefix", prefix, &err);
  if (a->out == NULL)
    {
      lw_cli_bad_input ("emit", "--out is required (see '" LW_CLI_PROG " emit --help')");
      return LW_EXIT_BAD_INPUT;
    }
  if (!g_file_test (a->out, G_FILE_TEST_IS_DIR))
    {
      lw_cli_bad_input ("--out", "'%s' is not an existing directory", a->out);
      return LW_EXIT_BAD_INPUT;
    }

  LwCliLoop lp;
  LwVariantEval *e = NULL;
  g_autofree char *ctl_opt = NULL;
  int status = emit_loop (a, &lp, &e, &ctl_opt);
  if (status != LW_EXIT_OK)
    {
      lw_cli_loop_clear (&lp);
      return status;
    }

  /* declared before the first goto: their cleanup runs at out */
  g_autofree char *hpath = NULL, *cpath = NULL;
  g_autoptr (GError) werr = NULL;
  LwImplOptions io = { .form = form, .fixed = a->fixed != NULL, .q = q, .prefix = prefix };
  LwImplStep step = LW_IMPL_STEP_CONTROLLER;
  g_autoptr (GError) ierr = NULL;
  g_autoptr (LwImplementation) im = lw_implementation_make (e, &io, &step, &ierr);
  if (im == NULL)
    {
      const char *place = step == LW_IMPL_STEP_CONTROLLER ? ctl_opt
                          : step == LW_IMPL_STEP_FIXED ? "--fixed" : "emit";
      if (ierr->domain != LW_IMPL_ERROR)
        status = lw_cli_report_gerror (place, ierr);
      else if (ierr->code == LW_IMPL_ERROR_INPUT)
        {
          lw_cli_bad_input (place, "%s", ierr->message);
          status = LW_EXIT_BAD_INPUT;
        }
      else
        {
          lw_cli_bad_input (place, "internal failure: %s", ierr->message);
          status = LW_EXIT_INTERNAL;
        }
      goto out;
    }
  if (!lw_implementation_write (im, a->out, &hpath, &cpath, &werr))
    {
      /* both files or neither (lw_files_replace) */
      lw_cli_bad_input ("--out", "%s; neither file was changed", werr->message);
      status = LW_EXIT_INTERNAL;
      goto out;
    }

  const char *form_name = form == LW_FORM_DIFFERENCE ? "difference" : "sections";
  if (a->json)
    {
      char *text = summary_json (hpath, cpath, form_name, im);
      fputs (text, stdout);
      g_free (text);
    }
  else
    print_summary (hpath, cpath, form_name, im);

out:
  lw_variant_eval_unref (e);
  lw_cli_loop_clear (&lp);
  return status;
}

int
lw_cmd_emit (int argc, char **argv)
{
  EmitArgs a = { 0 };
  const GOptionEntry entries[] = {
    LW_CLI_LOOP_ENTRIES (&a.loop),
    { "lang", 0, 0, G_OPTION_ARG_STRING, &a.lang, NULL, NULL },
    { "form", 0, 0, G_OPTION_ARG_STRING, &a.form, NULL, NULL },
    { "fixed", 0, 0, G_OPTION_ARG_STRING, &a.fixed, NULL, NULL },
    { "prefix", 0, 0, G_OPTION_ARG_STRING, &a.prefix, NULL, NULL },
    { "out", 0, 0, G_OPTION_ARG_STRING, &a.out, NULL, NULL },
    { "json", 0, 0, G_OPTION_ARG_NONE, &a.json, NULL, NULL },
    { "variant", 0, 0, G_OPTION_ARG_STRING, &a.variant, NULL, NULL },
    { "help", 'h', 0, G_OPTION_ARG_NONE, &a.help, NULL, NULL },
    { G_OPTION_REMAINING, 0, 0, G_OPTION_ARG_FILENAME_ARRAY, &a.files, NULL, NULL },
    { NULL, 0, 0, 0, NULL, NULL, NULL }
  };
  int status = lw_cli_run_command ("emit", argc, argv, entries, &a.help, emit_help, emit_run,
                                   &a);
  lw_cli_loop_args_clear (&a.loop);
  g_free (a.lang);
  g_free (a.form);
  g_free (a.fixed);
  g_free (a.prefix);
  g_free (a.out);
  g_strfreev (a.files);
  g_free (a.variant);
  return status;
}
