/* lw-require.h — requirements: translating them between overshoot, damping, phase margin, rise
 * time and crossover, and checking a design against them.
 *
 * Translations (second-order model  ω_n² / (s² + 2ζω_n s + ω_n²)  as the closed loop, loop
 * ω_n² / (s (s + 2ζω_n))):
 *   overshoot   OS = exp(−πζ/√(1 − ζ²))  for 0 <= ζ < 1 (0 for ζ >= 1), and its inverse
 *               ζ = −ln(OS)/√(π² + ln²(OS))  (OS as a fraction)
 *   phase margin (exact)  PM(ζ) = atan(2ζ / √(√(1 + 4ζ⁴) − 2ζ²)), inverse in closed form
 *               ζ = sin PM / (2·√cos PM)  for 0 <= PM < 90° (squaring tan²PM·(√(1+4ζ⁴)−2ζ²)
 *               = 4ζ² gives ζ⁴ = tan⁴PM / (16(1 + tan²PM)))
 *   phase margin (rule of thumb)  PM ≈ 100·ζ degrees (common practice, no source)
 *   crossover of that loop   ω_c = ω_n·√(√(1 + 4ζ⁴) − 2ζ²)
 *   rise time (10 % → 90 %)  ω_c ≈ 1.7 / t_r (common practice, no source), and for the
 *               second-order model t_r ≈ 1.8/ω_n (common practice, no source), giving ω_n =
 *               1.8/t_r and then ω_c from the relation above
 *   warping     ν_c = (2/T)·tan(ω_c T/2) (lw_warp_omega_to_nu)
 *
 * Requirements evaluate on a plain struct of achieved figures (LwAchieved).  Each result has
 * the achieved value and a signed slack in the requirement's own unit, positive when passing:
 *   minimum X:  slack = achieved − limit;     maximum X:  slack = limit − achieved;
 *   range [lo, hi]:  slack = min(achieved − lo, hi − achieved).
 * A requirement passes when slack >= 0.  It is NOT_AVAILABLE when the figure it needs is not
 * in LwAchieved (has_* false), e.g. a time-domain figure no simulation has filled yet; a
 * requirement on a loop that is not closed-loop stable fails (slack NAN) except the
 * NOT_AVAILABLE case.
 *
 * Steady-state error (unity feedback, stable loop) from the loop's low-frequency gain:
 * with k the loop type (integrators of L: plant poles at s = 0 plus controller poles at w = 0,
 * minus zeros there) and c the low-frequency coefficient, L ≈ c/ν^k as ν → 0,
 *   position constant  Kp = lim L      = c (k = 0), ∞ (k >= 1)
 *   velocity constant  Kv = lim ν·L    = 0 (k = 0), c (k = 1), ∞ (k >= 2), in 1/s
 *   unit-step error    e = 1/(1 + Kp)  (a fraction of the step)
 *   unit-ramp error    e = 1/Kv        (in the output's units per unit of ramp slope, i.e. s)
 * The zero-order hold keeps the low-frequency coefficient of the continuous plant, the dead
 * time and computation delay tend to 1, and w → (z − 1)/T near z = 1, so c is computed
 * exactly, factor by factor, from the plant in s and the controller in w (lw_loop_low_frequency).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include "lw-analysis.h"
#include "lw-error.h"
#include "lw-model.h"

#ifdef __cplusplus
extern "C" {
#endif

/* ---- translations (units in the names) ---- */

/* ζ from a percent overshoot 0 < os_pct < 100; NAN outside. */
double lw_req_zeta_from_overshoot (double os_pct);
/* Percent overshoot of the second-order step for ζ >= 0 (0 for ζ >= 1). */
double lw_req_overshoot_pct_from_zeta (double zeta);
/* Exact second-order phase margin (degrees) for ζ >= 0, and its inverse for 0 <= PM < 90°. */
double lw_req_pm_deg_from_zeta (double zeta);
double lw_req_zeta_from_pm_deg (double pm_deg);
/* Rule of thumb PM ≈ 100·ζ degrees (common practice, no source), and ζ ≈ PM/100. */
double lw_req_pm_deg_rule (double zeta);
double lw_req_zeta_rule (double pm_deg);
/* Crossover of the second-order loop relative to its ω_n: √(√(1 + 4ζ⁴) − 2ζ²). */
double lw_req_crossover_over_wn (double zeta);

/* Everything one overshoot or phase margin implies, for display. */
typedef struct {
  double overshoot_pct;
  double zeta;              /* exact, from the overshoot (or from the exact PM) */
  double pm_exact_deg;      /* PM(ζ) */
  double pm_rule_deg;       /* 100·ζ */
  double zeta_rule;         /* PM/100, from pm_exact_deg */
} LwReqDamping;
void lw_req_damping_from_overshoot (double os_pct, LwReqDamping *out);
void lw_req_damping_from_pm (double pm_deg, LwReqDamping *out);

/* A rise time (s) turned into a crossover, both ways, and warped to the w-plane. */
typedef struct {
  double rise_time_s;
  double zeta;                  /* damping used for the second-order model */
  double omega_rule_rad_s;      /* 1.7 / t_r */
  double omega_n_rad_s;         /* 1.8 / t_r */
  double omega_second_rad_s;    /* ω_n · lw_req_crossover_over_wn (ζ) */
  double nu_rule_rad_s;         /* warped: (2/T) tan(ω T/2); INFINITY when ω >= π/T */
  double nu_second_rad_s;
  double warp_rule_pct;         /* 100·(ν − ω)/ω for the rule */
  double warp_second_pct;
} LwReqCrossover;
/* rise_time_s > 0, 0 <= zeta, period_s > 0. LW_ERR_INVALID for bad arguments. */
LwStatus lw_req_crossover_from_rise (double rise_time_s, double zeta, double period_s,
                                     LwReqCrossover *out, LwError *err);

/* ---- achieved figures ---- */

typedef struct {
  bool stable;
  bool has_phase_margin;    double phase_margin_deg;
  bool has_gain_margin;     double gain_margin_db;        /* +INFINITY: no phase crossover */
  bool has_sensitivity;     double sensitivity_peak;      /* ratio */
  bool has_crossover;       double crossover_rad_s;       /* governing gain crossover ω */
  bool has_low_frequency;   int loop_type;  double low_freq_coef;   /* k and c (see top) */
  double position_constant;   /* Kp (may be INFINITY) */
  double velocity_constant;   /* Kv in 1/s (0, finite or INFINITY) */
  double step_error;          /* 1/(1 + Kp), fraction */
  double ramp_error_s;        /* 1/Kv (may be INFINITY) */
  /* time domain: from the evaluation's unit step, or filled later by a simulation */
  bool has_overshoot;       double overshoot_pct;
  bool has_rise;            double rise_time_s;
  bool has_settling;        double settling_time_s;
  bool has_actuator_peak;   double actuator_peak;         /* max |u|, actuator units */
} LwAchieved;

/* Loop type k and low-frequency coefficient c of L = z^−N C P (see the top), from the plant in
 * s and the controller in w. A root counts as at the origin when |r| <= 1e-9·(2/T). */
LwStatus lw_loop_low_frequency (const LwModel *plant_s, const LwModel *controller_w,
                                int *loop_type, double *coef, LwError *err);

/* Fills *out from an evaluation (margins, crossover, stability, step figures) and the plant in
 * s (for the low-frequency gain). has_actuator_peak is left false. */
LwStatus lw_achieved_from_evaluation (const LwEvaluation *ev, const LwModel *plant_s,
                                      LwAchieved *out, LwError *err);

/* Fills the actuator peak max|u(kT)| of *out from a simulated reference step (lw-simulate.h:
 * pass its u[] and n), so the peak-actuator requirement can be checked. */
void lw_achieved_set_actuator (LwAchieved *out, const double *u, size_t n);

/* ---- requirements ---- */

typedef enum {
  LW_REQ_MIN_PHASE_MARGIN = 0,  /* limit in degrees */
  LW_REQ_MIN_GAIN_MARGIN,       /* dB */
  LW_REQ_MAX_SENSITIVITY,       /* ratio (max |S|) */
  LW_REQ_CROSSOVER_RANGE,       /* [limit, limit_hi] in rad/s (physical ω) */
  LW_REQ_MAX_STEP_ERROR,        /* fraction of a unit step */
  LW_REQ_MAX_RAMP_ERROR,        /* s (error per unit of ramp slope) */
  LW_REQ_MAX_OVERSHOOT,         /* % */
  LW_REQ_MAX_RISE_TIME,         /* s */
  LW_REQ_MAX_SETTLING_TIME,     /* s */
  LW_REQ_MAX_ACTUATOR           /* peak |u|, actuator units */
} LwReqKind;

typedef struct {
  LwReqKind kind;
  double limit;
  double limit_hi;              /* CROSSOVER_RANGE only */
} LwRequirement;

typedef enum {
  LW_REQ_PASS = 0,
  LW_REQ_FAIL,
  LW_REQ_NOT_AVAILABLE
} LwReqStatus;

typedef struct {
  LwReqStatus status;
  double achieved;              /* NAN when not available */
  double slack;                 /* signed, the requirement's unit; NAN when unknown */
  const char *note;             /* a static sentence, or NULL */
} LwReqResult;

/* Checks the limits of a requirement (finite, positive where a maximum of a positive figure,
 * lo < hi for a range). */
LwStatus lw_requirement_check (const LwRequirement *r, LwError *err);

/* Evaluates one requirement. The requirement must pass lw_requirement_check. */
LwReqResult lw_requirement_evaluate (const LwRequirement *r, const LwAchieved *a);

/* Short name ("min-phase-margin", …) and the unit of the limit ("deg", "dB", "ratio", "rad/s",
 * "fraction", "s", "%", "units"). NULL for an unknown kind. */
const char *lw_req_kind_name (LwReqKind kind);
const char *lw_req_kind_unit (LwReqKind kind);

#ifdef __cplusplus
}
#endif
