/* lw-stage-notch.c — NOTCH: C = (w² + 2ζz·ν0·w + ν0²)/(w² + 2ζp·ν0·w + ν0²), ζz < ζp, from
 * centre ν0, depth (attenuation at ν0, dB, ζz/ζp = 10^(−depth/20)) and width = 2ζp·ν0 (the
 * −3 dB width of the infinitely deep notch with the same poles). One handle, at ν0.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-stage-kind-impl.h"

LwStage
lw_stage_notch (double centre_rad_s, double depth_db, double width_rad_s)
{
  LwStage s = lw_stage_placed (LW_STAGE_NOTCH, 1.0);
  s.p.notch.centre_rad_s = centre_rad_s;
  s.p.notch.depth_db = depth_db;
  s.p.notch.width_rad_s = width_rad_s;
  return s;
}

static LwStatus
notch_model (const LwStage *s, double period_s, LwModel **out, LwError *err)
{
  (void) err;
  double nu0 = s->p.notch.centre_rad_s;
  double zp = s->p.notch.width_rad_s / (2.0 * nu0);
  double zz = zp * pow (10.0, -s->p.notch.depth_db / 20.0);
  LwModel *m = lw_model_new (LW_DOMAIN_W, period_s, 1.0, 2, 2);
  if (m == NULL)
    return LW_ERR_NOMEM;
  lw_stage_quad_roots (nu0, zz, m->zeros);
  lw_stage_quad_roots (nu0, zp, m->poles);
  *out = m;
  return LW_OK;
}

static double
notch_corner_get (const LwStage *s, size_t i, LwHandleKind *kind)
{
  (void) i;
  *kind = LW_HANDLE_NOTCH;
  return s->p.notch.centre_rad_s;
}

/* keep_ratio keeps the damping (the width scales with ν0); otherwise the width in rad/s,
 * refused when it would exceed 2ν0 (ζp > 1). */
static LwStatus
notch_corner_set (LwStage *t, size_t i, double nu, double f, bool keep_ratio, const char *name,
                  LwError *err)
{
  (void) i;
  if (keep_ratio)
    t->p.notch.width_rad_s *= f;
  else if (t->p.notch.width_rad_s > 2.0 * nu)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "stage '%s': a notch %.6g rad/s wide cannot be centred below %.6g "
                         "rad/s (its pole damping would exceed 1)",
                         name, t->p.notch.width_rad_s, t->p.notch.width_rad_s / 2.0);
  t->p.notch.centre_rad_s = nu;
  return LW_OK;
}

/* New notch: 20 dB deep, ν_c wide, at 3·ν_c (a resonance above the crossover). */
const LwStageKindInfo lw_stage_kind_notch = {
  .kind = LW_STAGE_NOTCH,
  .name = "notch",
  .title = N_("Notch"),
  .definition = "C = (w² + 2ζz ν0 w + ν0²)/(w² + 2ζp ν0 w + ν0²), ζz < ζp",
  .n_params = 3,
  .params = {
    { "centre_rad_s", N_("Centre"), "notch centre", "rad/s", LW_PARAM_POSITIVE, 1e-6, 1e9, 3,
      LW_PLACE_TIMES_NU, 3.0, LW_OFF (p.notch.centre_rad_s) },
    { "depth_db", N_("Depth"), "notch depth", "dB", LW_PARAM_POSITIVE, 1e-3, 300, 2,
      LW_PLACE_FIXED, 20.0, LW_OFF (p.notch.depth_db) },
    { "width_rad_s", N_("Width"), "notch width", "rad/s", LW_PARAM_POSITIVE, 1e-6, 1e9, 3,
      LW_PLACE_TIMES_NU, 1.0, LW_OFF (p.notch.width_rad_s) },
  },
  .to_model = notch_model,
  .corner_count = lw_stage_one_corner,
  .corner_get = notch_corner_get,
  .corner_set = notch_corner_set,
};
