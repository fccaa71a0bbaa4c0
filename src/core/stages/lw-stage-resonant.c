/* lw-stage-resonant.c — RESONANT: a peak that raises the loop gain in a narrow band around ν0,
 * to reject a periodic disturbance at a known frequency (the counterpart of the notch):
 *
 *   C = (w² + 2ζz·ν0·w + ν0²) / (w² + 2ζp·ν0·w + ν0²),   ζz > ζp > 0,
 *
 * from centre ν0 (rad/s, > 0), peak (the gain at ν0 in dB, > 0: |C(jν0)| = ζz/ζp =
 * 10^(peak/20)) and width (rad/s, > 0): width = 2ζz·ν0, exactly the band where the infinitely
 * high peak with the same zeros is more than 3 dB above unity (|C| = √2 where
 * |ν0² − ν²| = 2ζz·ν0·ν, so ν2 − ν1 = 2ζz·ν0).  For a finite peak G = ζz/ζp (ratio) the points
 * 3 dB above unity are 2ζz·ν0·√(1 − 2/G²) apart, geometrically centred on ν0.
 * Unit gain at DC and at high frequency.  One handle, at ν0: with keep_ratio the damping is
 * kept (the width scales with ν0), otherwise the width in rad/s (refused when it would exceed
 * 2ν0, i.e. ζz > 1).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <float.h>

#include "lw-stage-kind-impl.h"

LwStage
lw_stage_resonant (double centre_rad_s, double peak_db, double width_rad_s)
{
  LwStage s = lw_stage_placed (LW_STAGE_RESONANT, 1.0);
  s.p.resonant.centre_rad_s = centre_rad_s;
  s.p.resonant.peak_db = peak_db;
  s.p.resonant.width_rad_s = width_rad_s;
  return s;
}

static void
dampings (const LwStage *s, double *zz, double *zp)
{
  *zz = s->p.resonant.width_rad_s / (2.0 * s->p.resonant.centre_rad_s);
  *zp = *zz * pow (10.0, -s->p.resonant.peak_db / 20.0);
}

/* The pole damping must stay a normal number > 0: poles on the imaginary axis would make the
 * gain at ν0 infinite. */
static LwStatus
resonant_check (const LwStage *s, const char *nm, LwError *err)
{
  double zz, zp;
  dampings (s, &zz, &zp);
  if (!(isfinite (zz) && zp >= DBL_MIN))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "stage '%s': a resonant stage %.6g dB high and %.6g rad/s wide at "
                         "%.6g rad/s has its pole damping out of range (%.3g)", nm,
                         s->p.resonant.peak_db, s->p.resonant.width_rad_s,
                         s->p.resonant.centre_rad_s, zp);
  return LW_OK;
}

static LwStatus
resonant_model (const LwStage *s, double period_s, LwModel **out, LwError *err)
{
  (void) err;
  double zz, zp;
  dampings (s, &zz, &zp);
  LwModel *m = lw_model_new (LW_DOMAIN_W, period_s, 1.0, 2, 2);
  if (m == NULL)
    return LW_ERR_NOMEM;
  lw_stage_quad_roots (s->p.resonant.centre_rad_s, zz, m->zeros);
  lw_stage_quad_roots (s->p.resonant.centre_rad_s, zp, m->poles);
  *out = m;
  return LW_OK;
}

static double
resonant_corner_get (const LwStage *s, size_t i, LwHandleKind *kind)
{
  (void) i;
  *kind = LW_HANDLE_PEAK;
  return s->p.resonant.centre_rad_s;
}

static LwStatus
resonant_corner_set (LwStage *t, size_t i, double nu, double f, bool keep_ratio,
                     const char *name, LwError *err)
{
  (void) i;
  if (keep_ratio)
    t->p.resonant.width_rad_s *= f;
  else if (t->p.resonant.width_rad_s > 2.0 * nu)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "stage '%s': a resonant stage %.6g rad/s wide cannot be centred below "
                         "%.6g rad/s (its zero damping would exceed 1)",
                         name, t->p.resonant.width_rad_s, t->p.resonant.width_rad_s / 2.0);
  t->p.resonant.centre_rad_s = nu;
  return LW_OK;
}

/* New resonant stage: 20 dB high, at 0.3·ν_c (a disturbance inside the loop's bandwidth, where
 * more loop gain rejects it), 0.1·ν_c wide (ζz = 1/6). */
const LwStageKindInfo lw_stage_kind_resonant = {
  .kind = LW_STAGE_RESONANT,
  .name = "resonant",
  .title = N_("Resonant"),
  .definition = "C = (w² + 2ζz ν0 w + ν0²)/(w² + 2ζp ν0 w + ν0²), ζz > ζp",
  .n_params = 3,
  .params = {
    { "centre_rad_s", N_("Centre"), "resonant centre", "rad/s", LW_PARAM_POSITIVE, 1e-6, 1e9,
      3, LW_PLACE_TIMES_NU, 0.3, LW_OFF (p.resonant.centre_rad_s) },
    { "peak_db", N_("Peak"), "resonant peak", "dB", LW_PARAM_POSITIVE, 1e-3, 300, 2,
      LW_PLACE_FIXED, 20.0, LW_OFF (p.resonant.peak_db) },
    { "width_rad_s", N_("Width"), "resonant width", "rad/s", LW_PARAM_POSITIVE, 1e-6, 1e9, 3,
      LW_PLACE_TIMES_NU, 0.1, LW_OFF (p.resonant.width_rad_s) },
  },
  .check = resonant_check,
  .to_model = resonant_model,
  .corner_count = lw_stage_one_corner,
  .corner_get = resonant_corner_get,
  .corner_set = resonant_corner_set,
};
