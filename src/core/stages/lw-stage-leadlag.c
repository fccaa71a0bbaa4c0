/* lw-stage-leadlag.c — LEAD and LAG: C = (1 + w/z)/(1 + w/p); lead 0 < z < p, lag 0 < p < z.
 * Handles z then p; with keep_ratio both move (α = p/z kept).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-stage-kind-impl.h"

#define DEG2RAD (3.14159265358979323846 / 180.0)
#define RAD2DEG (180.0 / 3.14159265358979323846)

LwStage
lw_stage_lead (double zero_rad_s, double pole_rad_s)
{
  LwStage s = lw_stage_placed (LW_STAGE_LEAD, 1.0);
  s.p.leadlag.zero_rad_s = zero_rad_s;
  s.p.leadlag.pole_rad_s = pole_rad_s;
  return s;
}

LwStage
lw_stage_lag (double zero_rad_s, double pole_rad_s)
{
  LwStage s = lw_stage_placed (LW_STAGE_LAG, 1.0);
  s.p.leadlag.zero_rad_s = zero_rad_s;
  s.p.leadlag.pole_rad_s = pole_rad_s;
  return s;
}

static double
alpha_of_phase (double phi_deg)
{
  double sn = sin (phi_deg * DEG2RAD);
  return (1.0 + sn) / (1.0 - sn);
}

LwStage
lw_stage_lead_centred (double centre_rad_s, double max_phase_deg)
{
  double r = sqrt (alpha_of_phase (max_phase_deg));
  return lw_stage_lead (centre_rad_s / r, centre_rad_s * r);
}

LwStage
lw_stage_lag_centred (double centre_rad_s, double max_phase_lag_deg)
{
  double r = sqrt (alpha_of_phase (max_phase_lag_deg));
  return lw_stage_lag (centre_rad_s * r, centre_rad_s / r);
}

static bool
is_leadlag (const LwStage *s)
{
  return s != NULL && (s->kind == LW_STAGE_LEAD || s->kind == LW_STAGE_LAG);
}

double
lw_stage_leadlag_alpha (const LwStage *s)
{
  return is_leadlag (s) ? s->p.leadlag.pole_rad_s / s->p.leadlag.zero_rad_s : NAN;
}

double
lw_stage_leadlag_centre_rad_s (const LwStage *s)
{
  return is_leadlag (s) ? sqrt (s->p.leadlag.pole_rad_s * s->p.leadlag.zero_rad_s) : NAN;
}

double
lw_stage_leadlag_max_phase_deg (const LwStage *s)
{
  double a = lw_stage_leadlag_alpha (s);
  return asin ((a - 1.0) / (a + 1.0)) * RAD2DEG;
}

static LwStatus
leadlag_check (const LwStage *s, const char *nm, LwError *err)
{
  if (s->kind == LW_STAGE_LEAD && !(s->p.leadlag.zero_rad_s < s->p.leadlag.pole_rad_s))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "stage '%s': a lead needs its zero corner below its pole corner", nm);
  if (s->kind == LW_STAGE_LAG && !(s->p.leadlag.pole_rad_s < s->p.leadlag.zero_rad_s))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "stage '%s': a lag needs its pole corner below its zero corner", nm);
  return LW_OK;
}

static LwStatus
leadlag_model (const LwStage *s, double period_s, LwModel **out, LwError *err)
{
  (void) err;
  LwModel *m = lw_model_new (LW_DOMAIN_W, period_s,
                             s->p.leadlag.pole_rad_s / s->p.leadlag.zero_rad_s, 1, 1);
  if (m == NULL)
    return LW_ERR_NOMEM;
  m->zeros[0] = -s->p.leadlag.zero_rad_s;
  m->poles[0] = -s->p.leadlag.pole_rad_s;
  *out = m;
  return LW_OK;
}

static size_t
two_corners (const LwStage *s)
{
  (void) s;
  return 2;
}

static double
leadlag_corner_get (const LwStage *s, size_t i, LwHandleKind *kind)
{
  *kind = i == 0 ? LW_HANDLE_ZERO : LW_HANDLE_POLE;
  return i == 0 ? s->p.leadlag.zero_rad_s : s->p.leadlag.pole_rad_s;
}

static LwStatus
leadlag_corner_set (LwStage *t, size_t i, double nu, double f, bool keep_ratio,
                    const char *name, LwError *err)
{
  (void) name, (void) err;
  if (keep_ratio)
    {
      t->p.leadlag.zero_rad_s *= f;
      t->p.leadlag.pole_rad_s *= f;
    }
  if (i == 0)
    t->p.leadlag.zero_rad_s = nu;    /* exactly where it was put */
  else
    t->p.leadlag.pole_rad_s = nu;
  return LW_OK;
}

static size_t
leadlag_derived (const LwStage *s, LwStageParam *o)
{
  size_t k = lw_stage_put_param (o, 0, "centre_rad_s", N_("centre"),
                                 lw_stage_leadlag_centre_rad_s (s), "rad/s", true);
  return lw_stage_put_param (o, k, "max_phase_deg", N_("maximum phase"),
                             lw_stage_leadlag_max_phase_deg (s), "deg", true);
}

/* New stages: a lead of 30° maximum phase centred at ν_c (α = 3: z = ν_c/√3, p = ν_c·√3); a
 * lag of 10° centred a decade below (α = (1 + sin 10°)/(1 − sin 10°): z = 0.1·√α·ν_c,
 * p = 0.1·ν_c/√α). */
const LwStageKindInfo lw_stage_kind_lead = {
  .kind = LW_STAGE_LEAD,
  .name = "lead",
  .title = N_("Lead"),
  .definition = "C = (1 + w/z)/(1 + w/p), z < p",
  .n_params = 2,
  .params = {
    { "zero_rad_s", N_("Zero"), "zero corner", "rad/s", LW_PARAM_POSITIVE, 1e-6, 1e9, 3,
      LW_PLACE_TIMES_NU, 0.5773502691896258, LW_OFF (p.leadlag.zero_rad_s) },
    { "pole_rad_s", N_("Pole"), "pole corner", "rad/s", LW_PARAM_POSITIVE, 1e-6, 1e9, 3,
      LW_PLACE_TIMES_NU, 1.7320508075688772, LW_OFF (p.leadlag.pole_rad_s) },
  },
  .check = leadlag_check,
  .to_model = leadlag_model,
  .corner_count = two_corners,
  .corner_get = leadlag_corner_get,
  .corner_set = leadlag_corner_set,
  .derived = leadlag_derived,
};

const LwStageKindInfo lw_stage_kind_lag = {
  .kind = LW_STAGE_LAG,
  .name = "lag",
  .title = N_("Lag"),
  .definition = "C = (1 + w/z)/(1 + w/p), p < z",
  .n_params = 2,
  .params = {
    { "zero_rad_s", N_("Zero"), "zero corner", "rad/s", LW_PARAM_POSITIVE, 1e-6, 1e9, 3,
      LW_PLACE_TIMES_NU, 0.11917535925942101, LW_OFF (p.leadlag.zero_rad_s) },
    { "pole_rad_s", N_("Pole"), "pole corner", "rad/s", LW_PARAM_POSITIVE, 1e-6, 1e9, 3,
      LW_PLACE_TIMES_NU, 0.083909963117728, LW_OFF (p.leadlag.pole_rad_s) },
  },
  .check = leadlag_check,
  .to_model = leadlag_model,
  .corner_count = two_corners,
  .corner_get = leadlag_corner_get,
  .corner_set = leadlag_corner_set,
  .derived = leadlag_derived,
};
