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

/* ---- warnings --------------------------------------------------------------------------- */

/* Relative error of a quantized coefficient above which a warning is printed: 1 %, a rule of
 * our own (common practice, no source): beyond it the section's roots and gain move visibly. */
#define COEFF_REL_WARN 0.01

/* The warnings about a quantized design, one sentence each (g_ptr_array_unref the result). */
static GPtrArray *
fixed_warnings (const LwSos *sos, const LwSosFixed *fx, const LwEvaluation *ev,
                const LwEvaluation *evq)
{
  GPtrArray *w = g_ptr_array_new_with_free_func (g_free);
  static const char *const names[5] = { "b0", "b1", "b2", "a1", "a2" };
  for (size_t k = 0; k < fx->n; k++)
    {
      for (int i = 0; i < 5; i++)
        {
          double c = i < 3 ? sos->s[k].b[i] : sos->s[k].a[i - 2];
          int32_t v = i < 3 ? fx->s[k].b[i] : fx->s[k].a[i - 2];
          double cq = ldexp ((double) v, -fx->q.frac_bits);
          if (c != 0.0 && fabs (cq - c) > COEFF_REL_WARN * fabs (c))
            g_ptr_array_add (w, g_strdup_printf (
              "section %zu: %s = %.6g becomes %.6g in Q%d.%d (%.3g %% off); scale the "
              "controller's signals or use more fraction bits", k + 1, names[i], c, cq,
              fx->q.int_bits, fx->q.frac_bits, 100.0 * fabs (cq - c) / fabs (c)));
        }
      for (size_t i = 0; i < fx->s[k].n_poles; i++)
        {
          double rq = cabs (fx->s[k].poles_quant[i]);
          double re = cabs (fx->s[k].poles_exact[i]);
          if (rq >= 1.0)
            g_ptr_array_add (w, g_strdup_printf (
              "section %zu: quantized pole |z| = %.10g is %s the unit circle%s", k + 1, rq,
              rq == 1.0 ? "on" : "outside",
              re >= 1.0 ? " (as designed: the exact pole is too)" : ""));
        }
    }
  if (evq != NULL && !evq->stable)
    g_ptr_array_add (w, g_strdup_printf ("the loop with the quantized controller is NOT "
                                         "stable%s", ev->stable ? " (the exact design is)" : ""));
  return w;
}

/* ---- summary as text -------------------------------------------------------------------- */

static void
print_complex (double complex r, int digits)
{
  if (cimag (r) == 0.0)
    printf ("%.*g", digits, creal (r));
  else
    printf ("%.*g %c %.*gj", digits, creal (r), cimag (r) < 0 ? '-' : '+', digits,
            fabs (cimag (r)));
}

static void
print_margin_line (const char *label, const LwEvaluation *ev)
{
  const LwMargins *m = &ev->margins;
  printf ("  %-10s", label);
  if (m->has_phase_margin)
    printf ("  PM %.4g deg at %.6g rad/s", m->phase_margin_deg, m->gain_crossover_rad_s);
  else
    printf ("  PM none");
  if (m->has_gain_margin)
    printf (", GM %.4g dB at %.6g rad/s", m->gain_margin_db, m->phase_crossover_rad_s);
  else
    printf (", GM none");
  if (m->has_sensitivity)
    printf (", max|S| %.4g", m->sensitivity_peak);
  printf (", %s\n", ev->stable ? "stable" : "NOT STABLE");
}

static void
print_summary (const char *hpath, const char *cpath, const char *form_name,
               const LwQFormat *q, const LwVariantEval *lp, const LwDiffEq *de, const LwSos *sos,
               const LwSosFixed *fx, const LwEvaluation *ev, const LwEvaluation *evq)
{
  printf ("Wrote %s\n  and %s\n  (C99, form %s, %s)\n", hpath, cpath, form_name,
          fx != NULL ? "fixed point" : "double");
  if (fx != NULL)
    printf ("  fixed point Q%d.%d: int16_t coefficients (value = integer / 2^%d), int16_t e "
            "and u, int32_t states\n", q->int_bits, q->frac_bits, q->frac_bits);
  g_autofree char *cz = lw_model_text (lp->controller_z);
  printf ("\nController C(z) = %s\n", cz);
  printf ("Period %.6g s; computation delay %d sample(s), realized by the firmware's timing "
          "(not in the coefficients)\n", lp->period_s, lp->compute_delay);

  printf ("\nDifference equation, order %zu: u[k] = sum b[i] e[k-i] - sum a[i] u[k-i]\n",
          de->order);
  for (size_t i = 0; i <= de->order; i++)
    printf ("  b[%zu] = %-25.17g a[%zu] = %.17g\n", i, de->b[i], i, de->a[i]);

  printf ("\nSections, in cascade order: H = (b0 + b1 z^-1 + b2 z^-2) / (1 + a1 z^-1 + a2 z^-2)\n");
  for (size_t k = 0; k < sos->n; k++)
    {
      const LwSection *s = &sos->s[k];
      printf ("  section %zu (order %d): b = [%.17g, %.17g, %.17g]  a = [1, %.17g, %.17g]\n",
              k + 1, s->order, s->b[0], s->b[1], s->b[2], s->a[1], s->a[2]);
      printf ("    poles");
      for (size_t i = 0; i < s->n_poles; i++)
        {
          printf (i ? ", " : " ");
          print_complex (s->poles[i], 8);
          printf (" (|z| %.8g)", cabs (s->poles[i]));
        }
      if (s->n_poles == 0)
        printf (" none");
      printf ("; zeros");
      for (size_t i = 0; i < s->n_zeros; i++)
        {
          printf (i ? ", " : " ");
          print_complex (s->zeros[i], 8);
        }
      if (s->n_zeros == 0)
        printf (" none");
      if (isfinite (s->peak_gain))
        printf ("; peak gain %.6g\n", s->peak_gain);
      else
        printf ("; peak gain unbounded (pole on the unit circle)\n");
    }

  if (fx != NULL)
    {
      printf ("\nQuantized to Q%d.%d (integers; value = integer / 2^%d)\n", q->int_bits,
              q->frac_bits, q->frac_bits);
      for (size_t k = 0; k < fx->n; k++)
        {
          const LwSectionQ *t = &fx->s[k];
          printf ("  section %zu: b = [%ld, %ld, %ld]  a = [1, %ld, %ld]\n", k + 1,
                  (long) t->b[0], (long) t->b[1], (long) t->b[2], (long) t->a[1],
                  (long) t->a[2]);
          for (size_t i = 0; i < t->n_poles; i++)
            {
              printf ("    pole ");
              print_complex (t->poles_exact[i], 10);
              printf (" -> ");
              print_complex (t->poles_quant[i], 10);
              printf ("  shift %.3g, |z| %.10g -> %.10g\n",
                      cabs (t->poles_quant[i] - t->poles_exact[i]), cabs (t->poles_exact[i]),
                      cabs (t->poles_quant[i]));
            }
        }
      GPtrArray *w = fixed_warnings (sos, fx, ev, evq);
      for (guint i = 0; i < w->len; i++)
        printf ("warning: %s\n", (const char *) g_ptr_array_index (w, i));
      g_ptr_array_unref (w);
    }

  printf ("\nMargins of L(z) = z^-%d C(z) P(z)\n", lp->compute_delay);
  print_margin_line ("design", ev);
  if (evq != NULL)
    print_margin_line ("quantized", evq);
  printf ("caution: simulation is not validation; commission with safe limits; follow the "
          "applicable functional-safety standards and qualified review; local codes prevail.\n");
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
              const LwVariantEval *lp,
              const LwDiffEq *de, const LwSos *sos, const LwSosFixed *fx, const LwModel *czq,
              const LwEvaluation *ev, const LwEvaluation *evq, const double *h,
              const int16_t *hq)
{
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
      GPtrArray *w = fixed_warnings (sos, fx, ev, evq);
      for (guint i = 0; i < w->len; i++)
        json_builder_add_string_value (b, g_ptr_array_index (w, i));
      g_ptr_array_unref (w);
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

/* The header and the source as a pair: both replaced or neither, also under kill -9
 * (lw_files_replace: synced temporary files, backups, a commit journal; docs/cli.md). */
static bool
write_pair (const char *hpath, const LwText *hdr, const char *cpath, const LwText *src)
{
  const LwFileContents files[2] = {
    { hpath, hdr->data ? hdr->data : "", hdr->len },
    { cpath, src->data ? src->data : "", src->len },
  };
  GError *gerr = NULL;
  if (!lw_files_replace (files, 2, &gerr))
    {
      lw_cli_bad_input ("--out", "%s; neither file was changed", gerr->message);
      g_error_free (gerr);
      return false;
    }
  return true;
}

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

  LwDiffEq *de = NULL;
  LwSos *sos = NULL;
  LwSosFixed *fx = NULL;
  LwModel *czq = NULL;
  const LwEvaluation *ev = e->ev, *evq = NULL;
  LwVariantEval *eq = NULL;
  LwText hdr, src;
  lw_text_init (&hdr);
  lw_text_init (&src);
  char *hpath = NULL, *cpath = NULL;

  if (lw_diffeq_from_model (e->controller_z, &de, &err) != LW_OK
      || lw_sos_from_model (e->controller_z, &sos, &err) != LW_OK)
    {
      status = lw_cli_report_core_error (ctl_opt, &err);
      goto out;
    }
  if (a->fixed != NULL)
    {
      if (lw_sos_quantize (sos, q, &fx, &err) != LW_OK)
        {
          status = lw_cli_report_core_error ("--fixed", &err);
          goto out;
        }
      if (lw_sos_fixed_model (fx, e->period_s, &czq, &err) != LW_OK)
        {
          status = lw_cli_report_core_error ("--fixed", &err);
          goto out;
        }
      /* the quantized controller's loop, by the same evaluation */
      LwEngineLoop ql = { .plant_s = e->plant_s, .sampled = e->sampled, .controller_z = czq,
                          .dead_time_s = e->dead_time_s, .compute_delay = e->compute_delay };
      LwEngineOptions qo;
      lw_engine_options_init (&qo);
      eq = lw_engine_evaluate_loop (&ql, &qo);
      g_autoptr (GError) qerr = NULL;
      if (!lw_variant_eval_ok (eq, &qerr))
        {
          status = lw_cli_report_gerror ("--fixed", qerr);
          goto out;
        }
      evq = eq->ev;
    }

  LwEmitInput in = {
    .prefix = prefix,
    .form = form,
    .period_s = e->period_s,
    .compute_delay = e->compute_delay,
    .dead_time_s = e->dead_time_s,
    .plant_s = e->plant_s,
    .controller_w = e->controller_w,
    .controller_z = e->controller_z,
    .margins = &ev->margins,
    .margins_fixed = evq != NULL ? &evq->margins : NULL,
    .stable = ev->stable,
    .stable_fixed = evq != NULL && evq->stable,
    .diffeq = de,
    .sos = sos,
    .fixed = fx,
  };
  double h[LW_EMIT_SELFTEST_LEN];
  int16_t hq[LW_EMIT_SELFTEST_LEN] = { 0 };
  if (lw_emit_c (&in, &hdr, &src, &err) != LW_OK
      || lw_emit_selftest_vectors (&in, h, hq, &err) != LW_OK)
    {
      status = lw_cli_report_core_error ("emit", &err);
      goto out;
    }
  char *hname = g_strdup_printf ("%scontroller.h", prefix);
  char *cname = g_strdup_printf ("%scontroller.c", prefix);
  hpath = g_build_filename (a->out, hname, NULL);
  cpath = g_build_filename (a->out, cname, NULL);
  g_free (hname);
  g_free (cname);
  if (!write_pair (hpath, &hdr, cpath, &src))
    {
      status = LW_EXIT_INTERNAL;
      goto out;
    }

  const char *form_name = form == LW_FORM_DIFFERENCE ? "difference" : "sections";
  if (a->json)
    {
      char *text = summary_json (hpath, cpath, form_name, e, de, sos, fx, czq, ev, evq, h, hq);
      fputs (text, stdout);
      g_free (text);
    }
  else
    print_summary (hpath, cpath, form_name, &q, e, de, sos, fx, ev, evq);

out:
  g_free (hpath);
  g_free (cpath);
  lw_text_clear (&hdr);
  lw_text_clear (&src);
  lw_variant_eval_unref (eq);
  lw_variant_eval_unref (e);
  lw_model_free (czq);
  lw_sos_fixed_free (fx);
  lw_sos_free (sos);
  lw_diffeq_free (de);
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
