/* lw-stage-real.c — REAL_ZERO: C = 1 + w/a; REAL_POLE: C = 1/(1 + w/a); a: corner, rad/s,
 * > 0. One handle each, at a.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-stage-kind-impl.h"

LwStage
lw_stage_real_zero (double corner_rad_s)
{
  LwStage s = lw_stage_placed (LW_STAGE_REAL_ZERO, 1.0);
  s.p.real.corner_rad_s = corner_rad_s;
  return s;
}

LwStage
lw_stage_real_pole (double corner_rad_s)
{
  LwStage s = lw_stage_placed (LW_STAGE_REAL_POLE, 1.0);
  s.p.real.corner_rad_s = corner_rad_s;
  return s;
}

static LwStatus
real_model (const LwStage *s, double period_s, LwModel **out, LwError *err)
{
  (void) err;
  double a = s->p.real.corner_rad_s;
  bool zero = s->kind == LW_STAGE_REAL_ZERO;
  LwModel *m = lw_model_new (LW_DOMAIN_W, period_s, zero ? 1.0 / a : a, zero ? 1 : 0,
                             zero ? 0 : 1);
  if (m == NULL)
    return LW_ERR_NOMEM;
  if (zero)
    m->zeros[0] = -a;
  else
    m->poles[0] = -a;
  *out = m;
  return LW_OK;
}

static double
real_corner_get (const LwStage *s, size_t i, LwHandleKind *kind)
{
  (void) i;
  *kind = s->kind == LW_STAGE_REAL_ZERO ? LW_HANDLE_ZERO : LW_HANDLE_POLE;
  return s->p.real.corner_rad_s;
}

static LwStatus
real_corner_set (LwStage *t, size_t i, double nu, double f, bool keep_ratio, const char *name,
                 LwError *err)
{
  (void) i, (void) f, (void) keep_ratio, (void) name, (void) err;
  t->p.real.corner_rad_s = nu;
  return LW_OK;
}

#define REAL_CORNER(place)                                                                     \
  { "corner_rad_s", N_("Corner"), "corner", "rad/s", LW_PARAM_POSITIVE, 1e-6, 1e9, 3,          \
    LW_PLACE_TIMES_NU, place, LW_OFF (p.real.corner_rad_s) }

const LwStageKindInfo lw_stage_kind_real_zero = {
  .kind = LW_STAGE_REAL_ZERO,
  .name = "real-zero",
  .title = N_("Real zero"),
  .definition = "C = 1 + w/a",
  .n_params = 1,
  .params = { REAL_CORNER (1.0) },
  .to_model = real_model,
  .corner_count = lw_stage_one_corner,
  .corner_get = real_corner_get,
  .corner_set = real_corner_set,
};

const LwStageKindInfo lw_stage_kind_real_pole = {
  .kind = LW_STAGE_REAL_POLE,
  .name = "real-pole",
  .title = N_("Real pole"),
  .definition = "C = 1/(1 + w/a)",
  .n_params = 1,
  .params = { REAL_CORNER (5.0) },
  .to_model = real_model,
  .corner_count = lw_stage_one_corner,
  .corner_get = real_corner_get,
  .corner_set = real_corner_set,
};
