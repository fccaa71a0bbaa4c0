/* lw-stage-pid.c — PI: C = k·(1 + a/w); PID: C = Kp·(1 + 1/(Ti·w) + Td·w/(1 + Td·w/N)).
 * Handles: PI a; PID 1/Ti, then (Td > 0) 1/Td and N/Td (see lw-stage.h for how they move).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-stage-kind-impl.h"

LwStage
lw_stage_pi (double gain, double zero_rad_s)
{
  LwStage s = lw_stage_placed (LW_STAGE_PI, 1.0);
  s.p.pi.gain = gain;
  s.p.pi.zero_rad_s = zero_rad_s;
  return s;
}

LwStage
lw_stage_pid (double kp, double ti_s, double td_s, double filter_n)
{
  LwStage s = lw_stage_placed (LW_STAGE_PID, 1.0);
  s.p.pid.kp = kp;
  s.p.pid.ti_s = ti_s;
  s.p.pid.td_s = td_s;
  s.p.pid.filter_n = filter_n;
  return s;
}

static LwStatus
pi_model (const LwStage *s, double period_s, LwModel **out, LwError *err)
{
  (void) err;
  LwModel *m = lw_model_new (LW_DOMAIN_W, period_s, s->p.pi.gain, 1, 1);
  if (m == NULL)
    return LW_ERR_NOMEM;
  m->zeros[0] = -s->p.pi.zero_rad_s;    /* pole at 0 */
  *out = m;
  return LW_OK;
}

static double
pi_corner_get (const LwStage *s, size_t i, LwHandleKind *kind)
{
  (void) i;
  *kind = LW_HANDLE_ZERO;
  return s->p.pi.zero_rad_s;
}

static LwStatus
pi_corner_set (LwStage *t, size_t i, double nu, double f, bool keep_ratio, const char *name,
               LwError *err)
{
  (void) i, (void) f, (void) keep_ratio, (void) name, (void) err;
  t->p.pi.zero_rad_s = nu;
  return LW_OK;
}

const LwStageKindInfo lw_stage_kind_pi = {
  .kind = LW_STAGE_PI,
  .name = "pi",
  .title = N_("PI"),
  .definition = "C = k (1 + a/w)",
  .n_params = 2,
  .params = {
    { "gain", N_("Gain"), "PI gain", "ratio", LW_PARAM_NONZERO, -1e9, 1e9, 4,
      LW_PLACE_FIXED, 1.0, LW_OFF (p.pi.gain) },
    { "zero_rad_s", N_("Zero"), "PI zero corner", "rad/s", LW_PARAM_POSITIVE, 1e-6, 1e9, 3,
      LW_PLACE_TIMES_NU, 0.1, LW_OFF (p.pi.zero_rad_s) },
  },
  .to_model = pi_model,
  .corner_count = lw_stage_one_corner,
  .corner_get = pi_corner_get,
  .corner_set = pi_corner_set,
};

static LwStatus
pid_model (const LwStage *s, double period_s, LwModel **out, LwError *err)
{
  double kp = s->p.pid.kp, ti = s->p.pid.ti_s, td = s->p.pid.td_s, n = s->p.pid.filter_n;
  LwModel *m;
  if (td == 0.0)
    {
      m = lw_model_new (LW_DOMAIN_W, period_s, kp, 1, 1);
      if (m == NULL)
        return LW_ERR_NOMEM;
      m->zeros[0] = -1.0 / ti;
      *out = m;
      return LW_OK;
    }
  /* Kp [Ti·Td(1 + 1/N) w² + (Ti + Td/N) w + 1] / [Ti w (1 + Td w/N)] */
  double a2 = ti * td * (1.0 + 1.0 / n), a1 = ti + td / n;
  double c[3] = { 1.0, a1, a2 };
  m = lw_model_new (LW_DOMAIN_W, period_s, kp * (1.0 + n), 2, 2);
  if (m == NULL)
    return LW_ERR_NOMEM;
  LwStatus st = lw_poly_roots (c, 2, m->zeros, err);
  if (st != LW_OK)
    {
      lw_model_free (m);
      return st;
    }
  m->poles[0] = 0.0;
  m->poles[1] = -n / td;
  *out = m;
  return LW_OK;
}

static size_t
pid_corner_count (const LwStage *s)
{
  return s->p.pid.td_s > 0.0 ? 3 : 1;
}

static double
pid_corner_get (const LwStage *s, size_t i, LwHandleKind *kind)
{
  *kind = i == 2 ? LW_HANDLE_POLE : LW_HANDLE_ZERO;
  return i == 0 ? 1.0 / s->p.pid.ti_s
       : i == 1 ? 1.0 / s->p.pid.td_s : s->p.pid.filter_n / s->p.pid.td_s;
}

static LwStatus
pid_corner_set (LwStage *t, size_t i, double nu, double f, bool keep_ratio, const char *name,
                LwError *err)
{
  (void) name, (void) err;
  if (keep_ratio)
    {
      t->p.pid.ti_s /= f;
      t->p.pid.td_s /= f;
    }
  else if (i == 0)
    t->p.pid.ti_s = 1.0 / nu;
  else if (i == 1)
    t->p.pid.td_s = 1.0 / nu;
  else
    t->p.pid.filter_n = nu * t->p.pid.td_s;
  return LW_OK;
}

/* New PID: its integral corner a decade below ν_c, its derivative corner at 2·ν_c, N = 10. */
const LwStageKindInfo lw_stage_kind_pid = {
  .kind = LW_STAGE_PID,
  .name = "pid",
  .title = N_("PID"),
  .definition = "C = Kp (1 + 1/(Ti w) + Td w/(1 + Td w/N))",
  .n_params = 4,
  .params = {
    { "kp", N_("Kp"), "proportional gain", "ratio", LW_PARAM_NONZERO, -1e9, 1e9, 4,
      LW_PLACE_FIXED, 1.0, LW_OFF (p.pid.kp) },
    { "ti_s", N_("Ti"), "integral time", "s", LW_PARAM_POSITIVE, 1e-9, 1e6, 6,
      LW_PLACE_PER_NU, 10.0, LW_OFF (p.pid.ti_s) },
    { "td_s", N_("Td"), "derivative time", "s", LW_PARAM_NONNEGATIVE, 0, 1e6, 6,
      LW_PLACE_PER_NU, 0.5, LW_OFF (p.pid.td_s) },
    { "filter_n", N_("N"), "derivative filter N", "", LW_PARAM_POSITIVE, 1e-3, 1e6, 3,
      LW_PLACE_FIXED, 10.0, LW_OFF (p.pid.filter_n) },
  },
  .to_model = pid_model,
  .corner_count = pid_corner_count,
  .corner_get = pid_corner_get,
  .corner_set = pid_corner_set,
};
