/* lw-require.c — requirement translations and checks; definitions in lw-require.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-require.h"

#include <math.h>
#include <string.h>

#define PI_ 3.14159265358979323846
#define DEG2RAD (PI_ / 180.0)
#define RAD2DEG (180.0 / PI_)

/* Common practice, no source: ω_c ≈ 1.7/t_r and t_r ≈ 1.8/ω_n. */
#define RISE_RULE_CROSSOVER 1.7
#define RISE_RULE_WN 1.8

double
lw_req_zeta_from_overshoot (double os_pct)
{
  if (!(os_pct > 0.0 && os_pct < 100.0))
    return NAN;
  double l = log (os_pct / 100.0);
  return -l / sqrt (PI_ * PI_ + l * l);
}

double
lw_req_overshoot_pct_from_zeta (double zeta)
{
  if (!(zeta >= 0.0))
    return NAN;
  if (zeta >= 1.0)
    return 0.0;
  return 100.0 * exp (-PI_ * zeta / sqrt ((1.0 - zeta) * (1.0 + zeta)));
}

double
lw_req_crossover_over_wn (double zeta)
{
  double z2 = zeta * zeta;
  /* √(1+4ζ⁴) − 2ζ² = 1/(√(1+4ζ⁴) + 2ζ²): no cancellation for large ζ */
  return sqrt (1.0 / (sqrt (1.0 + 4.0 * z2 * z2) + 2.0 * z2));
}

double
lw_req_pm_deg_from_zeta (double zeta)
{
  if (!(zeta >= 0.0))
    return NAN;
  return atan (2.0 * zeta / lw_req_crossover_over_wn (zeta)) * RAD2DEG;
}

double
lw_req_zeta_from_pm_deg (double pm_deg)
{
  if (!(pm_deg >= 0.0 && pm_deg < 90.0))
    return NAN;
  double r = pm_deg * DEG2RAD;
  return sin (r) / (2.0 * sqrt (cos (r)));
}

double
lw_req_pm_deg_rule (double zeta)
{
  return 100.0 * zeta;
}

double
lw_req_zeta_rule (double pm_deg)
{
  return pm_deg / 100.0;
}

void
lw_req_damping_from_overshoot (double os_pct, LwReqDamping *out)
{
  out->overshoot_pct = os_pct;
  out->zeta = lw_req_zeta_from_overshoot (os_pct);
  out->pm_exact_deg = lw_req_pm_deg_from_zeta (out->zeta);
  out->pm_rule_deg = lw_req_pm_deg_rule (out->zeta);
  out->zeta_rule = lw_req_zeta_rule (out->pm_exact_deg);
}

void
lw_req_damping_from_pm (double pm_deg, LwReqDamping *out)
{
  out->zeta = lw_req_zeta_from_pm_deg (pm_deg);
  out->overshoot_pct = lw_req_overshoot_pct_from_zeta (out->zeta);
  out->pm_exact_deg = pm_deg;
  out->pm_rule_deg = lw_req_pm_deg_rule (out->zeta);
  out->zeta_rule = lw_req_zeta_rule (pm_deg);
}

static double
warp_or_inf (double omega, double t)
{
  return omega * t / 2.0 < PI_ / 2.0 ? 2.0 / t * tan (omega * t / 2.0) : INFINITY;
}

LwStatus
lw_req_crossover_from_rise (double rise_time_s, double zeta, double period_s,
                            LwReqCrossover *out, LwError *err)
{
  memset (out, 0, sizeof *out);
  if (!(rise_time_s > 0.0) || !isfinite (rise_time_s))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the rise time must be finite and > 0 s");
  if (!(zeta >= 0.0) || !isfinite (zeta))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the damping must be finite and >= 0");
  if (!(period_s > 0.0) || !isfinite (period_s))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the sample period must be finite and > 0 s");
  out->rise_time_s = rise_time_s;
  out->zeta = zeta;
  out->omega_rule_rad_s = RISE_RULE_CROSSOVER / rise_time_s;
  out->omega_n_rad_s = RISE_RULE_WN / rise_time_s;
  out->omega_second_rad_s = out->omega_n_rad_s * lw_req_crossover_over_wn (zeta);
  out->nu_rule_rad_s = warp_or_inf (out->omega_rule_rad_s, period_s);
  out->nu_second_rad_s = warp_or_inf (out->omega_second_rad_s, period_s);
  out->warp_rule_pct = 100.0 * (out->nu_rule_rad_s - out->omega_rule_rad_s) / out->omega_rule_rad_s;
  out->warp_second_pct =
    100.0 * (out->nu_second_rad_s - out->omega_second_rad_s) / out->omega_second_rad_s;
  return LW_OK;
}

/* ---- achieved figures --------------------------------------------------------------------- */

/* Counts roots at the origin (|r| <= tol) and multiplies the others' −r into *c (or divides). */
static int
origin_roots (const double complex *r, size_t n, double tol, double complex *c, bool zeros)
{
  int k = 0;
  for (size_t i = 0; i < n; i++)
    {
      if (cabs (r[i]) <= tol)
        k++;
      else if (zeros)
        *c *= -r[i];
      else
        *c /= -r[i];
    }
  return k;
}

LwStatus
lw_loop_low_frequency (const LwModel *plant_s, const LwModel *controller_w, int *loop_type,
                       double *coef, LwError *err)
{
  if (plant_s == NULL || controller_w == NULL || plant_s->domain != LW_DOMAIN_S
      || controller_w->domain != LW_DOMAIN_W || !(controller_w->period_s > 0.0))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "need a plant in s and a controller in w with a sample period");
  double tol = 1e-9 * (2.0 / controller_w->period_s);
  double complex c = plant_s->gain * controller_w->gain;
  int k = 0;
  k -= origin_roots (plant_s->zeros, plant_s->n_zeros, tol, &c, true);
  k += origin_roots (plant_s->poles, plant_s->n_poles, tol, &c, false);
  k -= origin_roots (controller_w->zeros, controller_w->n_zeros, tol, &c, true);
  k += origin_roots (controller_w->poles, controller_w->n_poles, tol, &c, false);
  /* conjugate pairs make c real up to rounding */
  *loop_type = k;
  *coef = creal (c);
  return LW_OK;
}

LwStatus
lw_achieved_from_evaluation (const LwEvaluation *ev, const LwModel *plant_s, LwAchieved *out,
                             LwError *err)
{
  memset (out, 0, sizeof *out);
  if (ev == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "missing evaluation");
  const LwMargins *m = &ev->margins;
  out->stable = ev->stable;
  out->has_phase_margin = m->has_phase_margin;
  out->phase_margin_deg = m->phase_margin_deg;
  out->has_crossover = m->has_phase_margin;
  out->crossover_rad_s = m->gain_crossover_rad_s;
  if (m->has_gain_margin)
    {
      out->has_gain_margin = true;
      out->gain_margin_db = m->gain_margin_db;
    }
  else if (m->n_phase_crossovers == 0)
    {
      out->has_gain_margin = true;
      out->gain_margin_db = INFINITY;
    }
  out->has_sensitivity = m->has_sensitivity;
  out->sensitivity_peak = m->sensitivity_peak;
  out->has_overshoot = ev->step.has_overshoot;
  out->overshoot_pct = ev->step.overshoot_pct;
  out->has_rise = ev->step.has_rise;
  out->rise_time_s = ev->step.rise_time_s;
  out->has_settling = ev->step.has_settling;
  out->settling_time_s = ev->step.settling_time_s;

  int k = 0;
  double c = NAN;
  LwStatus st = lw_loop_low_frequency (plant_s, ev->controller_w, &k, &c, err);
  if (st != LW_OK)
    return st;
  out->has_low_frequency = true;
  out->loop_type = k;
  out->low_freq_coef = c;
  out->position_constant = k <= 0 ? (k == 0 ? c : 0.0) : INFINITY;
  out->velocity_constant = k <= 0 ? 0.0 : (k == 1 ? c : INFINITY);
  out->step_error = k >= 1 ? 0.0 : 1.0 / (1.0 + out->position_constant);
  out->ramp_error_s = k >= 2 ? 0.0 : (k == 1 ? 1.0 / c : INFINITY);
  return LW_OK;
}

/* ---- requirements ------------------------------------------------------------------------- */

const char *
lw_req_kind_name (LwReqKind kind)
{
  switch (kind)
    {
    case LW_REQ_MIN_PHASE_MARGIN: return "min-phase-margin";
    case LW_REQ_MIN_GAIN_MARGIN: return "min-gain-margin";
    case LW_REQ_MAX_SENSITIVITY: return "max-sensitivity";
    case LW_REQ_CROSSOVER_RANGE: return "crossover-range";
    case LW_REQ_MAX_STEP_ERROR: return "max-step-error";
    case LW_REQ_MAX_RAMP_ERROR: return "max-ramp-error";
    case LW_REQ_MAX_OVERSHOOT: return "max-overshoot";
    case LW_REQ_MAX_RISE_TIME: return "max-rise-time";
    case LW_REQ_MAX_SETTLING_TIME: return "max-settling-time";
    case LW_REQ_MAX_ACTUATOR: return "max-actuator";
    }
  return NULL;
}

const char *
lw_req_kind_unit (LwReqKind kind)
{
  switch (kind)
    {
    case LW_REQ_MIN_PHASE_MARGIN: return "deg";
    case LW_REQ_MIN_GAIN_MARGIN: return "dB";
    case LW_REQ_MAX_SENSITIVITY: return "ratio";
    case LW_REQ_CROSSOVER_RANGE: return "rad/s";
    case LW_REQ_MAX_STEP_ERROR: return "fraction";
    case LW_REQ_MAX_RAMP_ERROR: return "s";
    case LW_REQ_MAX_OVERSHOOT: return "%";
    case LW_REQ_MAX_RISE_TIME: return "s";
    case LW_REQ_MAX_SETTLING_TIME: return "s";
    case LW_REQ_MAX_ACTUATOR: return "units";
    }
  return NULL;
}

LwStatus
lw_requirement_check (const LwRequirement *r, LwError *err)
{
  if (r == NULL || lw_req_kind_name (r->kind) == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "unknown requirement");
  const char *nm = lw_req_kind_name (r->kind);
  if (!isfinite (r->limit))
    return lw_error_set (err, LW_ERR_INVALID, -1, "requirement %s: the limit must be finite", nm);
  switch (r->kind)
    {
    case LW_REQ_MIN_PHASE_MARGIN:
    case LW_REQ_MIN_GAIN_MARGIN:
      return LW_OK;
    case LW_REQ_CROSSOVER_RANGE:
      if (!(r->limit > 0.0 && isfinite (r->limit_hi) && r->limit < r->limit_hi))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "requirement %s: need 0 < low < high, finite (rad/s)", nm);
      return LW_OK;
    case LW_REQ_MAX_STEP_ERROR:
    case LW_REQ_MAX_RAMP_ERROR:
    case LW_REQ_MAX_OVERSHOOT:
      if (!(r->limit >= 0.0))
        return lw_error_set (err, LW_ERR_INVALID, -1, "requirement %s: the limit must be >= 0",
                             nm);
      return LW_OK;
    case LW_REQ_MAX_SENSITIVITY:
    case LW_REQ_MAX_RISE_TIME:
    case LW_REQ_MAX_SETTLING_TIME:
    case LW_REQ_MAX_ACTUATOR:
      if (!(r->limit > 0.0))
        return lw_error_set (err, LW_ERR_INVALID, -1, "requirement %s: the limit must be > 0",
                             nm);
      return LW_OK;
    }
  return lw_error_set (err, LW_ERR_INVALID, -1, "unknown requirement");
}

static LwReqResult
result (double achieved, double slack, const char *note)
{
  LwReqResult o;
  o.achieved = achieved;
  o.slack = slack;
  o.note = note;
  o.status = slack >= 0.0 ? LW_REQ_PASS : LW_REQ_FAIL;
  return o;
}

static LwReqResult
not_available (const char *note)
{
  LwReqResult o = { LW_REQ_NOT_AVAILABLE, NAN, NAN, note };
  return o;
}

static LwReqResult
unstable (double achieved)
{
  LwReqResult o = { LW_REQ_FAIL, achieved, NAN, "the closed loop is not stable" };
  return o;
}

/* slack of a maximum: limit − achieved, with ∞ − ∞ never arising (limits are finite) */
static LwReqResult
at_most (bool has, bool stable, double achieved, double limit, const char *missing)
{
  if (!has)
    return not_available (missing);
  if (!stable)
    return unstable (achieved);
  return result (achieved, limit - achieved, NULL);
}

LwReqResult
lw_requirement_evaluate (const LwRequirement *r, const LwAchieved *a)
{
  switch (r->kind)
    {
    case LW_REQ_MIN_PHASE_MARGIN:
      if (!a->has_phase_margin)
        return not_available ("no gain crossover, so no phase margin");
      if (!a->stable)
        return unstable (a->phase_margin_deg);
      return result (a->phase_margin_deg, a->phase_margin_deg - r->limit, NULL);
    case LW_REQ_MIN_GAIN_MARGIN:
      if (!a->has_gain_margin)
        return not_available ("no gain margin reported");
      if (!a->stable)
        return unstable (a->gain_margin_db);
      return result (a->gain_margin_db, a->gain_margin_db - r->limit,
                     isinf (a->gain_margin_db) ? "no phase crossover up to pi/T" : NULL);
    case LW_REQ_MAX_SENSITIVITY:
      return at_most (a->has_sensitivity, a->stable, a->sensitivity_peak, r->limit,
                      "no sensitivity peak reported");
    case LW_REQ_CROSSOVER_RANGE:
      if (!a->has_crossover)
        return not_available ("no gain crossover");
      {
        double w = a->crossover_rad_s;
        double s = fmin (w - r->limit, r->limit_hi - w);
        return result (w, s, NULL);
      }
    case LW_REQ_MAX_STEP_ERROR:
      return at_most (a->has_low_frequency, a->stable, a->step_error, r->limit,
                      "no low-frequency gain");
    case LW_REQ_MAX_RAMP_ERROR:
      if (a->has_low_frequency && a->stable && isinf (a->ramp_error_s))
        return result (a->ramp_error_s, -INFINITY, "a type-0 loop cannot follow a ramp");
      return at_most (a->has_low_frequency, a->stable, a->ramp_error_s, r->limit,
                      "no low-frequency gain");
    case LW_REQ_MAX_OVERSHOOT:
      return at_most (a->has_overshoot, a->stable, a->overshoot_pct, r->limit,
                      "no step response");
    case LW_REQ_MAX_RISE_TIME:
      return at_most (a->has_rise, a->stable, a->rise_time_s, r->limit,
                      "the step response does not rise within the simulated time");
    case LW_REQ_MAX_SETTLING_TIME:
      return at_most (a->has_settling, a->stable, a->settling_time_s, r->limit,
                      "the step response does not settle within the simulated time");
    case LW_REQ_MAX_ACTUATOR:
      return at_most (a->has_actuator_peak, a->stable, a->actuator_peak, r->limit,
                      "no simulation of the actuator output");
    }
  return not_available ("unknown requirement");
}

void
lw_achieved_set_actuator (LwAchieved *out, const double *u, size_t n)
{
  double peak = 0.0;
  bool finite = n > 0;
  for (size_t k = 0; k < n; k++)
    {
      if (!isfinite (u[k]))
        finite = false;
      peak = fmax (peak, fabs (u[k]));
    }
  out->has_actuator_peak = finite;
  out->actuator_peak = finite ? peak : 0.0;
}
