/* lw-engine-rules.c — the engine's small rules and words, shared by its callers: the sample
 * period against the rise time, the words of a verdict, a model's text, a requirement's
 * target in words, which requirements a frequency response judges (lw-engine.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

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
