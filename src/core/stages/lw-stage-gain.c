/* lw-stage-gain.c — GAIN: C = k (a ratio, finite, != 0, may be < 0); and INTEGRATOR:
 * C = 1/w^n (n = 1 … LW_STAGE_MAX_COUNT). Neither has a corner handle.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-stage-kind-impl.h"

LwStage
lw_stage_gain (double ratio)
{
  LwStage s = lw_stage_placed (LW_STAGE_GAIN, 1.0);
  s.p.gain.ratio = ratio;
  return s;
}

LwStage
lw_stage_gain_db (double gain_db)
{
  return lw_stage_gain (pow (10.0, gain_db / 20.0));
}

static LwStatus
gain_model (const LwStage *s, double period_s, LwModel **out, LwError *err)
{
  (void) err;
  *out = lw_model_new_constant (LW_DOMAIN_W, period_s, s->p.gain.ratio);
  return *out != NULL ? LW_OK : LW_ERR_NOMEM;
}

static size_t
gain_derived (const LwStage *s, LwStageParam *o)
{
  return lw_stage_put_param (o, 0, "gain_db", N_("gain"), 20.0 * log10 (fabs (s->p.gain.ratio)),
                             "dB", true);
}

const LwStageKindInfo lw_stage_kind_gain = {
  .kind = LW_STAGE_GAIN,
  .name = "gain",
  .title = N_("Gain"),
  .definition = "C = k",
  .n_params = 1,
  .params = {
    { "ratio", N_("Gain"), "gain", "ratio", LW_PARAM_NONZERO, -1e9, 1e9, 4,
      LW_PLACE_FIXED, 1.0, LW_OFF (p.gain.ratio) },
  },
  .to_model = gain_model,
  .derived = gain_derived,
};

LwStage
lw_stage_integrator (int count)
{
  LwStage s = lw_stage_placed (LW_STAGE_INTEGRATOR, 1.0);
  s.p.integrator.count = count;
  return s;
}

static LwStatus
integrator_model (const LwStage *s, double period_s, LwModel **out, LwError *err)
{
  (void) err;
  /* poles zero-filled: at w = 0 */
  *out = lw_model_new (LW_DOMAIN_W, period_s, 1.0, 0, (size_t) s->p.integrator.count);
  return *out != NULL ? LW_OK : LW_ERR_NOMEM;
}

const LwStageKindInfo lw_stage_kind_integrator = {
  .kind = LW_STAGE_INTEGRATOR,
  .name = "integrator",
  .title = N_("Integrator"),
  .definition = "C = 1/w^n",
  .n_params = 1,
  .params = {
    { "count", N_("Count"), "integrator count", "", LW_PARAM_COUNT, 1, LW_STAGE_MAX_COUNT, 0,
      LW_PLACE_FIXED, 1.0, LW_OFF (p.integrator.count) },
  },
  .to_model = integrator_model,
};
