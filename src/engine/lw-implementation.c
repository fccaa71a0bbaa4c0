/* lw-implementation.c — the controller as firmware takes it (lw-implementation.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <complex.h>
#include <locale.h>
#include <math.h>
#include <string.h>

#include "lw-file-write.h"
#include "lw-implementation.h"

G_DEFINE_QUARK (lw-impl-error-quark, lw_impl_error)

/* Relative error of a quantized coefficient above which a warning is given: 1 %, a rule of
 * our own (common practice, no source): beyond it the section's roots and gain move visibly. */
#define COEFF_REL_WARN 0.01

static void
set_core_error (GError **error, const LwError *err)
{
  gboolean input = err->code == LW_ERR_PARSE || err->code == LW_ERR_INVALID;
  g_set_error_literal (error, LW_IMPL_ERROR, input ? LW_IMPL_ERROR_INPUT : LW_IMPL_ERROR_FAILED,
                       err->message[0] != '\0' ? err->message : "unknown error");
}

static void
set_step (LwImplStep *failed, LwImplStep step)
{
  if (failed != NULL)
    *failed = step;
}

/* The warnings about a quantized design, one sentence each. */
static void
add_fixed_warnings (LwImplementation *im)
{
  static const char *const names[5] = { "b0", "b1", "b2", "a1", "a2" };
  const LwSos *sos = im->sos;
  const LwSosFixed *fx = im->fixed;
  for (size_t k = 0; k < fx->n; k++)
    {
      for (int i = 0; i < 5; i++)
        {
          double c = i < 3 ? sos->s[k].b[i] : sos->s[k].a[i - 2];
          int32_t v = i < 3 ? fx->s[k].b[i] : fx->s[k].a[i - 2];
          double cq = ldexp ((double) v, -fx->q.frac_bits);
          if (c != 0.0 && fabs (cq - c) > COEFF_REL_WARN * fabs (c))
            g_ptr_array_add (im->warnings, g_strdup_printf (
              "section %zu: %s = %.6g becomes %.6g in Q%d.%d (%.3g %% off); scale the "
              "controller's signals or use more fraction bits", k + 1, names[i], c, cq,
              fx->q.int_bits, fx->q.frac_bits, 100.0 * fabs (cq - c) / fabs (c)));
        }
      for (size_t i = 0; i < fx->s[k].n_poles; i++)
        {
          double rq = cabs (fx->s[k].poles_quant[i]);
          double re = cabs (fx->s[k].poles_exact[i]);
          if (rq >= 1.0)
            g_ptr_array_add (im->warnings, g_strdup_printf (
              "section %zu: quantized pole |z| = %.10g is %s the unit circle%s", k + 1, rq,
              rq == 1.0 ? "on" : "outside",
              re >= 1.0 ? " (as designed: the exact pole is too)" : ""));
        }
    }
  const LwEvaluation *ev = im->eval->ev, *evq = im->quantized->ev;
  if (!evq->stable)
    g_ptr_array_add (im->warnings, g_strdup_printf ("the loop with the quantized controller is "
                                                    "NOT stable%s",
                                                    ev->stable ? " (the exact design is)" : ""));
}

void
lw_implementation_free (LwImplementation *im)
{
  if (im == NULL)
    return;
  g_free (im->prefix);
  lw_variant_eval_unref (im->eval);
  lw_diffeq_free (im->diffeq);
  lw_sos_free (im->sos);
  lw_sos_fixed_free (im->fixed);
  lw_model_free (im->controller_zq);
  lw_variant_eval_unref (im->quantized);
  g_clear_pointer (&im->warnings, g_ptr_array_unref);
  g_free (im->header_name);
  g_free (im->source_name);
  g_free (im->header);
  g_free (im->source);
  g_free (im);
}

LwImplementation *
lw_implementation_make (LwVariantEval *e, const LwImplOptions *o, LwImplStep *failed,
                        GError **error)
{
  g_return_val_if_fail (e != NULL && e->ev != NULL && o != NULL, NULL);
  g_return_val_if_fail (!o->fixed || o->form == LW_FORM_SECTIONS, NULL);
  LwImplementation *im = g_new0 (LwImplementation, 1);
  im->o = *o;
  im->prefix = g_strdup (o->prefix != NULL ? o->prefix : LW_EMIT_DEFAULT_PREFIX);
  im->o.prefix = im->prefix;
  im->eval = lw_variant_eval_ref (e);
  im->warnings = g_ptr_array_new_with_free_func (g_free);
  LwError err;
  lw_error_clear (&err);

  if (lw_diffeq_from_model (e->controller_z, &im->diffeq, &err) != LW_OK
      || lw_sos_from_model (e->controller_z, &im->sos, &err) != LW_OK)
    {
      set_step (failed, LW_IMPL_STEP_CONTROLLER);
      set_core_error (error, &err);
      goto fail;
    }
  if (o->fixed)
    {
      if (lw_sos_quantize (im->sos, o->q, &im->fixed, &err) != LW_OK
          || lw_sos_fixed_model (im->fixed, e->period_s, &im->controller_zq, &err) != LW_OK)
        {
          set_step (failed, LW_IMPL_STEP_FIXED);
          set_core_error (error, &err);
          goto fail;
        }
      /* the quantized controller's loop, by the same evaluation */
      LwEngineLoop ql = { .plant_s = e->plant_s, .sampled = e->sampled,
                          .controller_z = im->controller_zq, .dead_time_s = e->dead_time_s,
                          .compute_delay = e->compute_delay };
      LwEngineOptions qo;
      lw_engine_options_init (&qo);
      im->quantized = lw_engine_evaluate_loop (&ql, &qo);
      if (!lw_variant_eval_ok (im->quantized, error))
        {
          set_step (failed, LW_IMPL_STEP_FIXED);
          goto fail;
        }
      add_fixed_warnings (im);
    }

  const LwEvaluation *ev = e->ev, *evq = im->quantized != NULL ? im->quantized->ev : NULL;
  LwEmitInput in = {
    .prefix = im->prefix,
    .form = o->form,
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
    .diffeq = im->diffeq,
    .sos = im->sos,
    .fixed = im->fixed,
  };
  LwText hdr, src;
  lw_text_init (&hdr);
  lw_text_init (&src);
  if (lw_emit_c (&in, &hdr, &src, &err) != LW_OK
      || lw_emit_selftest_vectors (&in, im->impulse, im->impulse_counts, &err) != LW_OK)
    {
      lw_text_clear (&hdr);
      lw_text_clear (&src);
      set_step (failed, LW_IMPL_STEP_CODE);
      set_core_error (error, &err);
      goto fail;
    }
  im->header = g_strndup (hdr.data != NULL ? hdr.data : "", hdr.len);
  im->header_len = hdr.len;
  im->source = g_strndup (src.data != NULL ? src.data : "", src.len);
  im->source_len = src.len;
  lw_text_clear (&hdr);
  lw_text_clear (&src);
  im->header_name = g_strdup_printf ("%scontroller.h", im->prefix);
  im->source_name = g_strdup_printf ("%scontroller.c", im->prefix);
  return im;

fail:
  lw_implementation_free (im);
  return NULL;
}

/* ---- in words ------------------------------------------------------------------------------ */

static void
append_complex (GString *s, double complex r, int digits)
{
  if (cimag (r) == 0.0)
    g_string_append_printf (s, "%.*g", digits, creal (r));
  else
    g_string_append_printf (s, "%.*g %c %.*gj", digits, creal (r), cimag (r) < 0 ? '-' : '+',
                            digits, fabs (cimag (r)));
}

static void
append_margin_line (GString *s, const char *label, const LwEvaluation *ev)
{
  const LwMargins *m = &ev->margins;
  g_string_append_printf (s, "  %-10s", label);
  if (m->has_phase_margin)
    g_string_append_printf (s, "  PM %.4g deg at %.6g rad/s", m->phase_margin_deg,
                            m->gain_crossover_rad_s);
  else
    g_string_append (s, "  PM none");
  if (m->has_gain_margin)
    g_string_append_printf (s, ", GM %.4g dB at %.6g rad/s", m->gain_margin_db,
                            m->phase_crossover_rad_s);
  else
    g_string_append (s, ", GM none");
  if (m->has_sensitivity)
    g_string_append_printf (s, ", max|S| %.4g", m->sensitivity_peak);
  g_string_append_printf (s, ", %s\n", ev->stable ? "stable" : "NOT STABLE");
}

static void
describe (GString *s, const LwImplementation *im)
{
  const LwVariantEval *lp = im->eval;
  const LwDiffEq *de = im->diffeq;
  const LwSos *sos = im->sos;
  const LwSosFixed *fx = im->fixed;
  g_autofree char *cz = lw_model_text (lp->controller_z);
  g_string_append_printf (s, "\nController C(z) = %s\n", cz);
  g_string_append_printf (s, "Period %.6g s; computation delay %d sample(s), realized by the "
                          "firmware's timing (not in the coefficients)\n", lp->period_s,
                          lp->compute_delay);

  g_string_append_printf (s, "\nDifference equation, order %zu: u[k] = sum b[i] e[k-i] - sum "
                          "a[i] u[k-i]\n", de->order);
  for (size_t i = 0; i <= de->order; i++)
    g_string_append_printf (s, "  b[%zu] = %-25.17g a[%zu] = %.17g\n", i, de->b[i], i,
                            de->a[i]);

  g_string_append (s, "\nSections, in cascade order: H = (b0 + b1 z^-1 + b2 z^-2) / (1 + a1 "
                   "z^-1 + a2 z^-2)\n");
  for (size_t k = 0; k < sos->n; k++)
    {
      const LwSection *t = &sos->s[k];
      g_string_append_printf (s, "  section %zu (order %d): b = [%.17g, %.17g, %.17g]  a = [1, "
                              "%.17g, %.17g]\n", k + 1, t->order, t->b[0], t->b[1], t->b[2],
                              t->a[1], t->a[2]);
      g_string_append (s, "    poles");
      for (size_t i = 0; i < t->n_poles; i++)
        {
          g_string_append (s, i ? ", " : " ");
          append_complex (s, t->poles[i], 8);
          g_string_append_printf (s, " (|z| %.8g)", cabs (t->poles[i]));
        }
      if (t->n_poles == 0)
        g_string_append (s, " none");
      g_string_append (s, "; zeros");
      for (size_t i = 0; i < t->n_zeros; i++)
        {
          g_string_append (s, i ? ", " : " ");
          append_complex (s, t->zeros[i], 8);
        }
      if (t->n_zeros == 0)
        g_string_append (s, " none");
      if (isfinite (t->peak_gain))
        g_string_append_printf (s, "; peak gain %.6g\n", t->peak_gain);
      else
        g_string_append (s, "; peak gain unbounded (pole on the unit circle)\n");
    }

  if (fx != NULL)
    {
      const LwQFormat *q = &im->o.q;
      g_string_append_printf (s, "\nQuantized to Q%d.%d (integers; value = integer / 2^%d)\n",
                              q->int_bits, q->frac_bits, q->frac_bits);
      for (size_t k = 0; k < fx->n; k++)
        {
          const LwSectionQ *t = &fx->s[k];
          g_string_append_printf (s, "  section %zu: b = [%ld, %ld, %ld]  a = [1, %ld, %ld]\n",
                                  k + 1, (long) t->b[0], (long) t->b[1], (long) t->b[2],
                                  (long) t->a[1], (long) t->a[2]);
          for (size_t i = 0; i < t->n_poles; i++)
            {
              g_string_append (s, "    pole ");
              append_complex (s, t->poles_exact[i], 10);
              g_string_append (s, " -> ");
              append_complex (s, t->poles_quant[i], 10);
              g_string_append_printf (s, "  shift %.3g, |z| %.10g -> %.10g\n",
                                      cabs (t->poles_quant[i] - t->poles_exact[i]),
                                      cabs (t->poles_exact[i]), cabs (t->poles_quant[i]));
            }
        }
      for (guint i = 0; i < im->warnings->len; i++)
        g_string_append_printf (s, "warning: %s\n",
                                (const char *) g_ptr_array_index (im->warnings, i));
    }

  g_string_append_printf (s, "\nMargins of L(z) = z^-%d C(z) P(z)\n", lp->compute_delay);
  append_margin_line (s, "design", lp->ev);
  if (im->quantized != NULL)
    append_margin_line (s, "quantized", im->quantized->ev);
  g_string_append (s, "caution: simulation is not validation; commission with safe limits; "
                   "follow the applicable functional-safety standards and qualified review; "
                   "local codes prevail.\n");
}

char *
lw_implementation_describe (const LwImplementation *im)
{
  g_return_val_if_fail (im != NULL, NULL);
  GString *s = g_string_new (NULL);
  /* numbers with '.' whatever the user's locale: they are copied into firmware */
  locale_t c = newlocale (LC_NUMERIC_MASK, "C", (locale_t) 0);
  locale_t old = c != (locale_t) 0 ? uselocale (c) : (locale_t) 0;
  describe (s, im);
  if (c != (locale_t) 0)
    {
      uselocale (old);
      freelocale (c);
    }
  return g_string_free (s, FALSE);
}

gboolean
lw_implementation_write (const LwImplementation *im, const char *dir, char **header_path,
                         char **source_path, GError **error)
{
  g_return_val_if_fail (im != NULL && dir != NULL, FALSE);
  g_autofree char *hpath = g_build_filename (dir, im->header_name, NULL);
  g_autofree char *cpath = g_build_filename (dir, im->source_name, NULL);
  const LwFileContents files[2] = {
    { hpath, im->header, im->header_len },
    { cpath, im->source, im->source_len },
  };
  if (!lw_files_replace (files, 2, error))
    return FALSE;
  if (header_path != NULL)
    *header_path = g_steal_pointer (&hpath);
  if (source_path != NULL)
    *source_path = g_steal_pointer (&cpath);
  return TRUE;
}
