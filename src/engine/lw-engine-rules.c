/* lw-engine-rules.c — the engine's small rules and words, shared by its callers: the sample
 * period against the rise time, the words of a verdict, a model's text and its plant
 * expression, a requirement's target in words, which requirements a frequency response judges
 * (lw-engine.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <complex.h>
#include <math.h>
#include <string.h>

#include "lw-engine.h"

LwSamplingAdvice
lw_engine_sampling_advice (const LwStep *step, double period_s, double *per_rise)
{
  if (per_rise != NULL)
    *per_rise = NAN;
  if (step == NULL || !step->has_rise || !(step->rise_time_s > 0.0) || !(period_s > 0.0))
    return LW_SAMPLING_ADVICE_NONE;
  double r = step->rise_time_s / period_s;
  if (per_rise != NULL)
    *per_rise = r;
  if (r < LW_SAMPLES_PER_RISE_MIN)
    return LW_SAMPLING_ADVICE_TOO_FEW;
  if (r > LW_SAMPLES_PER_RISE_MAX)
    return LW_SAMPLING_ADVICE_TOO_MANY;
  return LW_SAMPLING_ADVICE_NONE;
}

const char *
lw_req_status_word (LwReqStatus s)
{
  switch (s)
    {
    case LW_REQ_PASS: return "pass";
    case LW_REQ_FAIL: return "fail";
    case LW_REQ_NOT_AVAILABLE: return "not-available";
    }
  return "unknown";
}

char *
lw_model_text (const LwModel *m)
{
  char small[256];
  size_t need = lw_model_format (m, 6, small, sizeof small);
  if (need < sizeof small)
    return g_strdup (small);
  char *big = g_malloc (need + 1);
  lw_model_format (m, 6, big, need + 1);
  return big;
}

char *
lw_model_expression (const LwModel *m)
{
  GString *s = g_string_new (NULL);
  g_string_append_printf (s, "%.17g", m->gain);
  for (int part = 0; part < 2; part++)
    {
      size_t n = part == 0 ? m->n_zeros : m->n_poles;
      const double complex *r = part == 0 ? m->zeros : m->poles;
      g_autoptr (GPtrArray) f = g_ptr_array_new_with_free_func (g_free);
      for (size_t i = 0; i < n; i++)
        if (cimag (r[i]) == 0.0)
          g_ptr_array_add (f, g_strdup_printf ("(s+(%.17g))", -creal (r[i])));
        else if (cimag (r[i]) > 0.0)   /* the pair, once (its partner below the axis skipped) */
          g_ptr_array_add (f, g_strdup_printf ("(s^2+(%.17g)*s+(%.17g))", -2.0 * creal (r[i]),
                                               creal (r[i]) * creal (r[i])
                                               + cimag (r[i]) * cimag (r[i])));
      if (f->len == 0)
        continue;
      g_ptr_array_add (f, NULL);
      g_autofree char *joined = g_strjoinv ("*", (char **) f->pdata);
      g_string_append_printf (s, part == 0 ? "*%s" : "/(%s)", joined);
    }
  return g_string_free (s, FALSE);
}

char *
lw_requirement_target_text (const LwRequirement *r)
{
  const char *unit = lw_req_kind_unit (r->kind);
  const char *sep = strcmp (unit, "%") == 0 ? "" : " ";
  switch (r->kind)
    {
    case LW_REQ_MIN_PHASE_MARGIN:
    case LW_REQ_MIN_GAIN_MARGIN:
      return g_strdup_printf ("at least %.6g%s%s", r->limit, sep, unit);
    case LW_REQ_CROSSOVER_RANGE:
      return g_strdup_printf ("%.6g to %.6g %s", r->limit, r->limit_hi, unit);
    case LW_REQ_MAX_SENSITIVITY:
    case LW_REQ_MAX_STEP_ERROR:
    case LW_REQ_MAX_RAMP_ERROR:
    case LW_REQ_MAX_OVERSHOOT:
    case LW_REQ_MAX_RISE_TIME:
    case LW_REQ_MAX_SETTLING_TIME:
    case LW_REQ_MAX_ACTUATOR:
      return g_strdup_printf ("at most %.6g%s%s", r->limit, sep, unit);
    }
  return g_strdup ("?");
}

gboolean
lw_req_kind_from_frequency_response (LwReqKind kind)
{
  switch (kind)
    {
    case LW_REQ_MIN_PHASE_MARGIN:
    case LW_REQ_MIN_GAIN_MARGIN:
    case LW_REQ_MAX_SENSITIVITY:
    case LW_REQ_CROSSOVER_RANGE:
      return TRUE;
    case LW_REQ_MAX_STEP_ERROR:   /* from the loop's type and low-frequency gain: the model's */
    case LW_REQ_MAX_RAMP_ERROR:
    case LW_REQ_MAX_OVERSHOOT:
    case LW_REQ_MAX_RISE_TIME:
    case LW_REQ_MAX_SETTLING_TIME:
    case LW_REQ_MAX_ACTUATOR:
      return FALSE;
    }
  return FALSE;
}
