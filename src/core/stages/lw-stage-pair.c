/* lw-stage-pair.c — ZERO_PAIR: C = (w² + 2ζ·ν0·w + ν0²)/ν0²; POLE_PAIR: its inverse.
 * ν0 > 0 rad/s, ζ >= 0 (>= 1: two real roots). One handle each, at ν0.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-stage-kind-impl.h"

LwStage
lw_stage_zero_pair (double natural_rad_s, double damping)
{
  LwStage s = lw_stage_placed (LW_STAGE_ZERO_PAIR, 1.0);
  s.p.pair.natural_rad_s = natural_rad_s;
  s.p.pair.damping = damping;
  return s;
}

LwStage
lw_stage_pole_pair (double natural_rad_s, double damping)
{
  LwStage s = lw_stage_placed (LW_STAGE_POLE_PAIR, 1.0);
  s.p.pair.natural_rad_s = natural_rad_s;
  s.p.pair.damping = damping;
  return s;
}

static LwStatus
pair_model (const LwStage *s, double period_s, LwModel **out, LwError *err)
{
  (void) err;
  double nu0 = s->p.pair.natural_rad_s;
  bool zero = s->kind == LW_STAGE_ZERO_PAIR;
  LwModel *m = lw_model_new (LW_DOMAIN_W, period_s, zero ? 1.0 / (nu0 * nu0) : nu0 * nu0,
                             zero ? 2 : 0, zero ? 0 : 2);
  if (m == NULL)
    return LW_ERR_NOMEM;
  lw_stage_quad_roots (nu0, s->p.pair.damping, zero ? m->zeros : m->poles);
  *out = m;
  return LW_OK;
}

static double
pair_corner_get (const LwStage *s, size_t i, LwHandleKind *kind)
{
  (void) i;
  *kind = s->kind == LW_STAGE_ZERO_PAIR ? LW_HANDLE_ZERO_PAIR : LW_HANDLE_POLE_PAIR;
  return s->p.pair.natural_rad_s;
}

static LwStatus
pair_corner_set (LwStage *t, size_t i, double nu, double f, bool keep_ratio, const char *name,
                 LwError *err)
{
  (void) i, (void) f, (void) keep_ratio, (void) name, (void) err;
  t->p.pair.natural_rad_s = nu;
  return LW_OK;
}

#define PAIR_PARAMS(place)                                                                     \
  { "natural_rad_s", N_("Natural frequency"), "natural frequency", "rad/s", LW_PARAM_POSITIVE, \
    1e-6, 1e9, 3, LW_PLACE_TIMES_NU, place, LW_OFF (p.pair.natural_rad_s) },                   \
  { "damping", N_("Damping"), "damping", "", LW_PARAM_NONNEGATIVE, 0, 1e3, 4,                   \
    LW_PLACE_FIXED, 0.7, LW_OFF (p.pair.damping) }

const LwStageKindInfo lw_stage_kind_zero_pair = {
  .kind = LW_STAGE_ZERO_PAIR,
  .name = "zero-pair",
  .title = N_("Zero pair"),
  .definition = "C = (w² + 2ζ ν0 w + ν0²)/ν0²",
  .n_params = 2,
  .params = { PAIR_PARAMS (1.0) },
  .to_model = pair_model,
  .corner_count = lw_stage_one_corner,
  .corner_get = pair_corner_get,
  .corner_set = pair_corner_set,
};

const LwStageKindInfo lw_stage_kind_pole_pair = {
  .kind = LW_STAGE_POLE_PAIR,
  .name = "pole-pair",
  .title = N_("Pole pair"),
  .definition = "C = ν0²/(w² + 2ζ ν0 w + ν0²)",
  .n_params = 2,
  .params = { PAIR_PARAMS (5.0) },
  .to_model = pair_model,
  .corner_count = lw_stage_one_corner,
  .corner_get = pair_corner_get,
  .corner_set = pair_corner_set,
};
