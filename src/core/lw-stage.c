/* lw-stage.c — compensator stages in the w-plane; definitions in lw-stage.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-stage.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-analysis.h"

#define DEG2RAD (3.14159265358979323846 / 180.0)
#define RAD2DEG (180.0 / 3.14159265358979323846)

static LwStage
stage_new (LwStageKind kind)
{
  LwStage s;
  memset (&s, 0, sizeof s);
  s.kind = kind;
  s.enabled = true;
  return s;
}

LwStage
lw_stage_gain (double ratio)
{
  LwStage s = stage_new (LW_STAGE_GAIN);
  s.p.gain.ratio = ratio;
  return s;
}

LwStage
lw_stage_gain_db (double gain_db)
{
  return lw_stage_gain (pow (10.0, gain_db / 20.0));
}

LwStage
lw_stage_integrator (int count)
{
  LwStage s = stage_new (LW_STAGE_INTEGRATOR);
  s.p.integrator.count = count;
  return s;
}

LwStage
lw_stage_real_zero (double corner_rad_s)
{
  LwStage s = stage_new (LW_STAGE_REAL_ZERO);
  s.p.real.corner_rad_s = corner_rad_s;
  return s;
}

LwStage
lw_stage_real_pole (double corner_rad_s)
{
  LwStage s = stage_new (LW_STAGE_REAL_POLE);
  s.p.real.corner_rad_s = corner_rad_s;
  return s;
}

LwStage
lw_stage_lead (double zero_rad_s, double pole_rad_s)
{
  LwStage s = stage_new (LW_STAGE_LEAD);
  s.p.leadlag.zero_rad_s = zero_rad_s;
  s.p.leadlag.pole_rad_s = pole_rad_s;
  return s;
}

LwStage
lw_stage_lag (double zero_rad_s, double pole_rad_s)
{
  LwStage s = stage_new (LW_STAGE_LAG);
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

LwStage
lw_stage_pi (double gain, double zero_rad_s)
{
  LwStage s = stage_new (LW_STAGE_PI);
  s.p.pi.gain = gain;
  s.p.pi.zero_rad_s = zero_rad_s;
  return s;
}

LwStage
lw_stage_pid (double kp, double ti_s, double td_s, double filter_n)
{
  LwStage s = stage_new (LW_STAGE_PID);
  s.p.pid.kp = kp;
  s.p.pid.ti_s = ti_s;
  s.p.pid.td_s = td_s;
  s.p.pid.filter_n = filter_n;
  return s;
}

LwStage
lw_stage_notch (double centre_rad_s, double depth_db, double width_rad_s)
{
  LwStage s = stage_new (LW_STAGE_NOTCH);
  s.p.notch.centre_rad_s = centre_rad_s;
  s.p.notch.depth_db = depth_db;
  s.p.notch.width_rad_s = width_rad_s;
  return s;
}

LwStage
lw_stage_zero_pair (double natural_rad_s, double damping)
{
  LwStage s = stage_new (LW_STAGE_ZERO_PAIR);
  s.p.pair.natural_rad_s = natural_rad_s;
  s.p.pair.damping = damping;
  return s;
}

LwStage
lw_stage_pole_pair (double natural_rad_s, double damping)
{
  LwStage s = stage_new (LW_STAGE_POLE_PAIR);
  s.p.pair.natural_rad_s = natural_rad_s;
  s.p.pair.damping = damping;
  return s;
}

void
lw_stage_set_label (LwStage *s, const char *label)
{
  if (s == NULL)
    return;
  snprintf (s->label, sizeof s->label, "%s", label != NULL ? label : "");
}

const char *
lw_stage_kind_name (LwStageKind kind)
{
  switch (kind)
    {
    case LW_STAGE_GAIN: return "gain";
    case LW_STAGE_INTEGRATOR: return "integrator";
    case LW_STAGE_REAL_ZERO: return "real-zero";
    case LW_STAGE_REAL_POLE: return "real-pole";
    case LW_STAGE_LEAD: return "lead";
    case LW_STAGE_LAG: return "lag";
    case LW_STAGE_PI: return "pi";
    case LW_STAGE_PID: return "pid";
    case LW_STAGE_NOTCH: return "notch";
    case LW_STAGE_ZERO_PAIR: return "zero-pair";
    case LW_STAGE_POLE_PAIR: return "pole-pair";
    }
  return NULL;
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

/* ---- checking ----------------------------------------------------------------------------- */

static const char *
stage_name (const LwStage *s)
{
  if (s->label[0] != '\0')
    return s->label;
  const char *k = lw_stage_kind_name (s->kind);
  return k != NULL ? k : "stage";
}

static bool
positive (double v)
{
  return isfinite (v) && v > 0.0;
}

LwStatus
lw_stage_check (const LwStage *s, LwError *err)
{
  if (s == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "missing stage");
  const char *nm = stage_name (s);
  switch (s->kind)
    {
    case LW_STAGE_GAIN:
      if (!isfinite (s->p.gain.ratio) || s->p.gain.ratio == 0.0)
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': the gain must be a finite ratio other than 0", nm);
      return LW_OK;
    case LW_STAGE_INTEGRATOR:
      if (s->p.integrator.count < 1 || s->p.integrator.count > LW_STAGE_MAX_COUNT)
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': the integrator count must be 1 to %d", nm,
                             LW_STAGE_MAX_COUNT);
      return LW_OK;
    case LW_STAGE_REAL_ZERO:
    case LW_STAGE_REAL_POLE:
      if (!positive (s->p.real.corner_rad_s))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': the corner must be a finite frequency > 0 rad/s", nm);
      return LW_OK;
    case LW_STAGE_LEAD:
    case LW_STAGE_LAG:
      if (!positive (s->p.leadlag.zero_rad_s) || !positive (s->p.leadlag.pole_rad_s))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': both corners must be finite frequencies > 0 rad/s", nm);
      if (s->kind == LW_STAGE_LEAD && !(s->p.leadlag.zero_rad_s < s->p.leadlag.pole_rad_s))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': a lead needs its zero corner below its pole corner", nm);
      if (s->kind == LW_STAGE_LAG && !(s->p.leadlag.pole_rad_s < s->p.leadlag.zero_rad_s))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': a lag needs its pole corner below its zero corner", nm);
      return LW_OK;
    case LW_STAGE_PI:
      if (!isfinite (s->p.pi.gain) || s->p.pi.gain == 0.0)
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': the PI gain must be a finite ratio other than 0", nm);
      if (!positive (s->p.pi.zero_rad_s))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': the PI zero corner must be a finite frequency > 0 rad/s",
                             nm);
      return LW_OK;
    case LW_STAGE_PID:
      if (!isfinite (s->p.pid.kp) || s->p.pid.kp == 0.0)
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': the proportional gain must be a finite ratio other than 0",
                             nm);
      if (!positive (s->p.pid.ti_s))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': the integral time must be finite and > 0 s", nm);
      if (!(isfinite (s->p.pid.td_s) && s->p.pid.td_s >= 0.0))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': the derivative time must be finite and >= 0 s", nm);
      if (s->p.pid.td_s > 0.0 && !positive (s->p.pid.filter_n))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': the derivative filter N must be finite and > 0", nm);
      return LW_OK;
    case LW_STAGE_NOTCH:
      if (!positive (s->p.notch.centre_rad_s))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': the notch centre must be a finite frequency > 0 rad/s",
                             nm);
      if (!positive (s->p.notch.depth_db))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': the notch depth must be finite and > 0 dB", nm);
      if (!positive (s->p.notch.width_rad_s))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': the notch width must be a finite frequency > 0 rad/s",
                             nm);
      return LW_OK;
    case LW_STAGE_ZERO_PAIR:
    case LW_STAGE_POLE_PAIR:
      if (!positive (s->p.pair.natural_rad_s))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': the natural frequency must be finite and > 0 rad/s", nm);
      if (!(isfinite (s->p.pair.damping) && s->p.pair.damping >= 0.0))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': the damping must be finite and >= 0", nm);
      return LW_OK;
    }
  return lw_error_set (err, LW_ERR_INVALID, -1, "stage '%s': unknown kind %d", nm, (int) s->kind);
}

/* ---- to a model in w ---------------------------------------------------------------------- */

/* The two roots of x² + 2ζν0 x + ν0², conjugate pair first-positive when complex. */
static void
quad_roots (double nu0, double zeta, double complex *r)
{
  if (zeta < 1.0)
    {
      double im = nu0 * sqrt ((1.0 - zeta) * (1.0 + zeta));
      r[0] = CMPLX (-zeta * nu0, im);
      r[1] = CMPLX (-zeta * nu0, -im);
    }
  else
    {
      /* the larger root by the stable formula, the smaller from the product ν0² */
      double big = -nu0 * (zeta + sqrt ((zeta - 1.0) * (zeta + 1.0)));
      r[0] = big;
      r[1] = nu0 * nu0 / big;
    }
}

LwStatus
lw_stage_to_model (const LwStage *s, double period_s, LwModel **out, LwError *err)
{
  *out = NULL;
  if (!(period_s > 0.0) || !isfinite (period_s))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the sample period must be finite and > 0 s");
  LwStatus st = lw_stage_check (s, err);
  if (st != LW_OK)
    return st;
  LwModel *m = NULL;
  const LwDomain d = LW_DOMAIN_W;
  switch (s->kind)
    {
    case LW_STAGE_GAIN:
      m = lw_model_new_constant (d, period_s, s->p.gain.ratio);
      break;
    case LW_STAGE_INTEGRATOR:
      m = lw_model_new (d, period_s, 1.0, 0, (size_t) s->p.integrator.count);
      break;                                  /* poles zero-filled: at w = 0 */
    case LW_STAGE_REAL_ZERO:
      m = lw_model_new (d, period_s, 1.0 / s->p.real.corner_rad_s, 1, 0);
      if (m)
        m->zeros[0] = -s->p.real.corner_rad_s;
      break;
    case LW_STAGE_REAL_POLE:
      m = lw_model_new (d, period_s, s->p.real.corner_rad_s, 0, 1);
      if (m)
        m->poles[0] = -s->p.real.corner_rad_s;
      break;
    case LW_STAGE_LEAD:
    case LW_STAGE_LAG:
      m = lw_model_new (d, period_s, s->p.leadlag.pole_rad_s / s->p.leadlag.zero_rad_s, 1, 1);
      if (m)
        {
          m->zeros[0] = -s->p.leadlag.zero_rad_s;
          m->poles[0] = -s->p.leadlag.pole_rad_s;
        }
      break;
    case LW_STAGE_PI:
      m = lw_model_new (d, period_s, s->p.pi.gain, 1, 1);
      if (m)
        m->zeros[0] = -s->p.pi.zero_rad_s;    /* pole at 0 */
      break;
    case LW_STAGE_PID:
      {
        double kp = s->p.pid.kp, ti = s->p.pid.ti_s, td = s->p.pid.td_s, n = s->p.pid.filter_n;
        if (td == 0.0)
          {
            m = lw_model_new (d, period_s, kp, 1, 1);
            if (m)
              m->zeros[0] = -1.0 / ti;
            break;
          }
        /* Kp [Ti·Td(1 + 1/N) w² + (Ti + Td/N) w + 1] / [Ti w (1 + Td w/N)] */
        double a2 = ti * td * (1.0 + 1.0 / n), a1 = ti + td / n;
        double c[3] = { 1.0, a1, a2 };
        m = lw_model_new (d, period_s, kp * (1.0 + n), 2, 2);
        if (m)
          {
            st = lw_poly_roots (c, 2, m->zeros, err);
            if (st != LW_OK)
              {
                lw_model_free (m);
                return st;
              }
            m->poles[0] = 0.0;
            m->poles[1] = -n / td;
          }
        break;
      }
    case LW_STAGE_NOTCH:
      {
        double nu0 = s->p.notch.centre_rad_s;
        double zp = s->p.notch.width_rad_s / (2.0 * nu0);
        double zz = zp * pow (10.0, -s->p.notch.depth_db / 20.0);
        m = lw_model_new (d, period_s, 1.0, 2, 2);
        if (m)
          {
            quad_roots (nu0, zz, m->zeros);
            quad_roots (nu0, zp, m->poles);
          }
        break;
      }
    case LW_STAGE_ZERO_PAIR:
    case LW_STAGE_POLE_PAIR:
      {
        double nu0 = s->p.pair.natural_rad_s;
        bool zero = s->kind == LW_STAGE_ZERO_PAIR;
        m = lw_model_new (d, period_s, zero ? 1.0 / (nu0 * nu0) : nu0 * nu0, zero ? 2 : 0,
                        zero ? 0 : 2);
        if (m)
          quad_roots (nu0, s->p.pair.damping, zero ? m->zeros : m->poles);
        break;
      }
    }
  if (m == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
  lw_model_canonicalize (m);
  *out = m;
  return LW_OK;
}

/* ---- corner handles ----------------------------------------------------------------------- */

size_t
lw_stage_corner_count (const LwStage *s)
{
  if (s == NULL)
    return 0;
  switch (s->kind)
    {
    case LW_STAGE_GAIN:
    case LW_STAGE_INTEGRATOR:
      return 0;
    case LW_STAGE_LEAD:
    case LW_STAGE_LAG:
      return 2;
    case LW_STAGE_PID:
      return s->p.pid.td_s > 0.0 ? 3 : 1;
    case LW_STAGE_REAL_ZERO:
    case LW_STAGE_REAL_POLE:
    case LW_STAGE_PI:
    case LW_STAGE_NOTCH:
    case LW_STAGE_ZERO_PAIR:
    case LW_STAGE_POLE_PAIR:
      return 1;
    }
  return 0;
}

LwStatus
lw_stage_corner_get (const LwStage *s, size_t i, double *nu_rad_s, LwHandleKind *kind,
                     LwError *err)
{
  size_t n = lw_stage_corner_count (s);
  if (i >= n)
    return lw_error_set (err, LW_ERR_INVALID, -1, "stage '%s' has no corner %zu (it has %zu)",
                         s != NULL ? stage_name (s) : "(null)", i, n);
  double nu = NAN;
  LwHandleKind k = LW_HANDLE_ZERO;
  switch (s->kind)
    {
    case LW_STAGE_REAL_ZERO:
      nu = s->p.real.corner_rad_s;
      break;
    case LW_STAGE_REAL_POLE:
      nu = s->p.real.corner_rad_s;
      k = LW_HANDLE_POLE;
      break;
    case LW_STAGE_LEAD:
    case LW_STAGE_LAG:
      nu = i == 0 ? s->p.leadlag.zero_rad_s : s->p.leadlag.pole_rad_s;
      k = i == 0 ? LW_HANDLE_ZERO : LW_HANDLE_POLE;
      break;
    case LW_STAGE_PI:
      nu = s->p.pi.zero_rad_s;
      break;
    case LW_STAGE_PID:
      nu = i == 0 ? 1.0 / s->p.pid.ti_s
         : i == 1 ? 1.0 / s->p.pid.td_s : s->p.pid.filter_n / s->p.pid.td_s;
      k = i == 2 ? LW_HANDLE_POLE : LW_HANDLE_ZERO;
      break;
    case LW_STAGE_NOTCH:
      nu = s->p.notch.centre_rad_s;
      k = LW_HANDLE_NOTCH;
      break;
    case LW_STAGE_ZERO_PAIR:
      nu = s->p.pair.natural_rad_s;
      k = LW_HANDLE_ZERO_PAIR;
      break;
    case LW_STAGE_POLE_PAIR:
      nu = s->p.pair.natural_rad_s;
      k = LW_HANDLE_POLE_PAIR;
      break;
    case LW_STAGE_GAIN:
    case LW_STAGE_INTEGRATOR:
      break;
    }
  if (nu_rad_s != NULL)
    *nu_rad_s = nu;
  if (kind != NULL)
    *kind = k;
  return LW_OK;
}

LwStatus
lw_stage_corner_set (LwStage *s, size_t i, double nu_rad_s, bool keep_ratio, LwError *err)
{
  size_t n = lw_stage_corner_count (s);
  if (i >= n)
    return lw_error_set (err, LW_ERR_INVALID, -1, "stage '%s' has no corner %zu (it has %zu)",
                         s != NULL ? stage_name (s) : "(null)", i, n);
  if (!positive (nu_rad_s))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "stage '%s': a corner must be a finite frequency > 0 rad/s",
                         stage_name (s));
  double old = NAN;
  lw_stage_corner_get (s, i, &old, NULL, NULL);
  double f = nu_rad_s / old;                 /* factor along the frequency axis */
  LwStage t = *s;
  switch (t.kind)
    {
    case LW_STAGE_REAL_ZERO:
    case LW_STAGE_REAL_POLE:
      t.p.real.corner_rad_s = nu_rad_s;
      break;
    case LW_STAGE_LEAD:
    case LW_STAGE_LAG:
      if (keep_ratio)
        {
          t.p.leadlag.zero_rad_s *= f;
          t.p.leadlag.pole_rad_s *= f;
          if (i == 0)
            t.p.leadlag.zero_rad_s = nu_rad_s;  /* exactly where it was put */
          else
            t.p.leadlag.pole_rad_s = nu_rad_s;
        }
      else if (i == 0)
        t.p.leadlag.zero_rad_s = nu_rad_s;
      else
        t.p.leadlag.pole_rad_s = nu_rad_s;
      break;
    case LW_STAGE_PI:
      t.p.pi.zero_rad_s = nu_rad_s;
      break;
    case LW_STAGE_PID:
      if (keep_ratio)
        {
          t.p.pid.ti_s /= f;
          t.p.pid.td_s /= f;
        }
      else if (i == 0)
        t.p.pid.ti_s = 1.0 / nu_rad_s;
      else if (i == 1)
        t.p.pid.td_s = 1.0 / nu_rad_s;
      else
        t.p.pid.filter_n = nu_rad_s * t.p.pid.td_s;
      break;
    case LW_STAGE_NOTCH:
      if (keep_ratio)
        t.p.notch.width_rad_s *= f;
      else if (t.p.notch.width_rad_s > 2.0 * nu_rad_s)
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "stage '%s': a notch %.6g rad/s wide cannot be centred below %.6g "
                             "rad/s (its pole damping would exceed 1)",
                             stage_name (s), t.p.notch.width_rad_s, t.p.notch.width_rad_s / 2.0);
      t.p.notch.centre_rad_s = nu_rad_s;
      break;
    case LW_STAGE_ZERO_PAIR:
    case LW_STAGE_POLE_PAIR:
      t.p.pair.natural_rad_s = nu_rad_s;
      break;
    case LW_STAGE_GAIN:
    case LW_STAGE_INTEGRATOR:
      break;
    }
  LwStatus st = lw_stage_check (&t, err);
  if (st != LW_OK)
    return st;
  *s = t;
  return LW_OK;
}

/* ---- parameters --------------------------------------------------------------------------- */

static size_t
put (LwStageParam *o, size_t k, const char *name, double v, const char *unit, bool derived)
{
  o[k].name = name;
  o[k].value = v;
  o[k].unit = unit;
  o[k].derived = derived;
  return k + 1;
}

size_t
lw_stage_params (const LwStage *s, LwStageParam *o)
{
  size_t k = 0;
  if (s == NULL)
    return 0;
  switch (s->kind)
    {
    case LW_STAGE_GAIN:
      k = put (o, k, "ratio", s->p.gain.ratio, "ratio", false);
      k = put (o, k, "gain_db", 20.0 * log10 (fabs (s->p.gain.ratio)), "dB", true);
      break;
    case LW_STAGE_INTEGRATOR:
      k = put (o, k, "count", s->p.integrator.count, "", false);
      break;
    case LW_STAGE_REAL_ZERO:
    case LW_STAGE_REAL_POLE:
      k = put (o, k, "corner_rad_s", s->p.real.corner_rad_s, "rad/s", false);
      break;
    case LW_STAGE_LEAD:
    case LW_STAGE_LAG:
      k = put (o, k, "zero_rad_s", s->p.leadlag.zero_rad_s, "rad/s", false);
      k = put (o, k, "pole_rad_s", s->p.leadlag.pole_rad_s, "rad/s", false);
      k = put (o, k, "centre_rad_s", lw_stage_leadlag_centre_rad_s (s), "rad/s", true);
      k = put (o, k, "max_phase_deg", lw_stage_leadlag_max_phase_deg (s), "deg", true);
      break;
    case LW_STAGE_PI:
      k = put (o, k, "gain", s->p.pi.gain, "ratio", false);
      k = put (o, k, "zero_rad_s", s->p.pi.zero_rad_s, "rad/s", false);
      break;
    case LW_STAGE_PID:
      k = put (o, k, "kp", s->p.pid.kp, "ratio", false);
      k = put (o, k, "ti_s", s->p.pid.ti_s, "s", false);
      k = put (o, k, "td_s", s->p.pid.td_s, "s", false);
      k = put (o, k, "filter_n", s->p.pid.filter_n, "", false);
      break;
    case LW_STAGE_NOTCH:
      k = put (o, k, "centre_rad_s", s->p.notch.centre_rad_s, "rad/s", false);
      k = put (o, k, "depth_db", s->p.notch.depth_db, "dB", false);
      k = put (o, k, "width_rad_s", s->p.notch.width_rad_s, "rad/s", false);
      break;
    case LW_STAGE_ZERO_PAIR:
    case LW_STAGE_POLE_PAIR:
      k = put (o, k, "natural_rad_s", s->p.pair.natural_rad_s, "rad/s", false);
      k = put (o, k, "damping", s->p.pair.damping, "", false);
      break;
    }
  return k;
}

/* ---- the compensator ---------------------------------------------------------------------- */

LwStatus
lw_compensator_w (const LwStage *stages, size_t n, double period_s, LwModel **out, LwError *err)
{
  *out = NULL;
  if (n > 0 && stages == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "missing stages");
  if (!(period_s > 0.0) || !isfinite (period_s))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the sample period must be finite and > 0 s");
  LwModel *acc = lw_model_new_constant (LW_DOMAIN_W, period_s, 1.0);
  if (acc == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
  for (size_t i = 0; i < n; i++)
    {
      if (!stages[i].enabled)
        continue;
      LwModel *m = NULL;
      LwStatus st = lw_stage_to_model (&stages[i], period_s, &m, err);
      if (st != LW_OK)
        {
          lw_model_free (acc);
          return st;
        }
      if (acc->n_zeros + m->n_zeros > LW_MAX_DEGREE || acc->n_poles + m->n_poles > LW_MAX_DEGREE)
        {
          lw_model_free (m);
          lw_model_free (acc);
          return lw_error_set (err, LW_ERR_INVALID, -1,
                               "the compensator exceeds degree %d at stage %zu", LW_MAX_DEGREE,
                               i + 1);
        }
      LwModel *p = lw_model_mul (acc, m);
      lw_model_free (m);
      lw_model_free (acc);
      if (p == NULL)
        return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
      acc = p;
    }
  *out = acc;
  return LW_OK;
}

LwStatus
lw_compensator_z (const LwStage *stages, size_t n, double period_s, LwModel **out, LwError *err)
{
  *out = NULL;
  LwModel *w = NULL;
  LwStatus st = lw_compensator_w (stages, n, period_s, &w, err);
  if (st != LW_OK)
    return st;
  double edge = 2.0 / period_s;
  for (size_t i = 0; i < w->n_zeros + w->n_poles; i++)
    {
      double complex r = i < w->n_zeros ? w->zeros[i] : w->poles[i - w->n_zeros];
      if (cabs (r - edge) <= 1e-12 * edge)
        {
          lw_model_free (w);
          return lw_error_set (err, LW_ERR_INVALID, -1,
                               "a compensator root at w = 2/T = %.6g rad/s has no image in z",
                               edge);
        }
    }
  LwModel *z = lw_model_w_to_z (w);
  lw_model_free (w);
  if (z == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
  *out = z;
  return LW_OK;
}
