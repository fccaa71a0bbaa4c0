/* lw-synth.h — formula helpers that propose compensator stages (lw-stage.h) for a sampled loop.
 *
 * Each helper returns plain stages and the figures it used; nothing is kept or hidden, and the
 * caller decides what to add to the design.  All frequencies given to and returned by the
 * helpers are w-plane frequencies ν in rad/s (warp a physical ω with lw_warp_omega_to_nu);
 * the figures reached are also reported as physical ω from a full evaluation (lw_evaluate).
 *
 * The loop is that of lw-analysis.h, L = z^−N · C · P, with C = (fixed stages) · (proposed
 * stages).  On the unit circle C(z = e^{jωT}) = C(w = jν) exactly, so
 *   L(jν) = C_w(jν) · P(e^{jωT}) · e^{−jωTN},   ω = (2/T)·atan(νT/2),
 * with P from the exact sampled plant (lw_sampled_plant_response); nothing is approximated.
 * Phases are unwrapped continuously from low frequency (the branch of lw_evaluate's grid).
 *
 * Formulas (derivations in docs/design-helpers.md):
 *   crossover gain   K0 = 1 / |L(jν_c)|  (a gain stage; the sign of the loop is not changed)
 *   lead             φ = (PM_target − PM_now(ν_c)) + safety,  PM_now = 180° + ∠L(jν_c);
 *                    φ <= 0: no lead (the loop already has the phase; only K0);
 *                    0 < φ <= 60°: one lead;  60° < φ <= 120°: two equal leads of φ/2;
 *                    φ > 120°: refused.  Each lead: α = (1 + sin φ_i)/(1 − sin φ_i),
 *                    corners ν_c/√α and ν_c·√α (geometric centre at ν_c: its maximum phase is
 *                    exactly there, Ogata, Modern Control Engineering), DC gain 1.
 *                    Iteration: K0 first puts the crossover at ν_c without the lead; the lead
 *                    lifts |L(jν_c)| by √α per lead and so moves the crossover up; K0 is
 *                    re-solved with the lead in place, and the lead re-solved from the phase at
 *                    ν_c, until |L(jν_c)| = 1 within 1e-12 and the lead is unchanged.  Because the
 *                    lead's centre is fixed at ν_c and K0 does not change phases, this settles on
 *                    the second pass; a third confirms it (passes = 3).  The phase margin reached at ν_c is then PM_target +
 *                    safety: the safety angle is kept as a deliberate reserve, not consumed
 *                    (give 0 to land on the target).
 *   lag              a ratio β > 1 of low-frequency gain: lag zero at ν_c / 10^d (d decades
 *                    below the crossover, default 1), pole at zero/β, plus a gain stage β so
 *                    the low-frequency gain rises by β and the high-frequency gain is kept.
 *                    Reported: its phase at ν_c, atan(ν_c/z) − atan(ν_c/p) (negative), and its
 *                    gain there, β·|lag(jν_c)| in dB.
 *   PI               zero at fraction·ν_c (default 0.1), gain k so that |L·PI(jν_c)| = 1;
 *                    reported: its phase at ν_c, −atan(fraction).
 *   notch            on the plant's most lightly damped pole pair (smallest damping, hence the
 *                    largest resonance peak, about 1/(2ζ)) among those with damping below
 *                    zeta_max: the pole's w-plane image w = (2/T)·tanh(pT/2) gives centre ν0 =
 *                    |w| and damping ζ = −Re w/|w|; notch zeros cancel it (ζz = ζ), its poles
 *                    take damping zeta_notch: depth 20·log10(zeta_notch/ζ) (at most 80 dB),
 *                    width 2·zeta_notch·ν0.  Poles beyond the Nyquist frequency are skipped.
 *                    On data (lw_synth_notch_data) the pole pair is the resonance found in
 *                    the measured response (lw_measured_resonance), notched the same way.
 * On measured data (LwSynthLoop.data_n > 0) the same formulas take L from the data between
 * the points (lw_measured_loop_at), not from the model: see LwSynthLoop.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include "lw-analysis.h"
#include "lw-error.h"
#include "lw-measured.h"
#include "lw-model.h"
#include "lw-stage.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct {
  const LwSampledPlant *plant;
  int compute_delay;          /* N >= 0, whole samples */
  const LwStage *fixed;       /* stages already in the controller (may be NULL when n_fixed 0) */
  size_t n_fixed;
  /* On measured data (data_n > 0) in place of the plant (which may then be NULL): the sampled
   * plant's response P at data_n points (ω ascending, below π/T: LwMeasuredLoop's omega_rad_s
   * and p) and the loop's sample period.  The loop is then L = z^−N·C(z)·P at the points and
   * between them lw_measured_loop_at's interpolation, the one the crossovers on data are
   * found by, so what a helper aims at is what the margins on the data then show; a frequency
   * outside the points is refused.  The "reached" figures of lw_synth_lead are the data's
   * (lw_measured_margins; stable false: the data alone do not tell). */
  const double *data_omega_rad_s;
  const double complex *data_p;
  size_t data_n;
  double data_period_s;
} LwSynthLoop;

/* |L(jν)| (ratio) and ∠L(jν) (degrees, unwrapped from low frequency) of the loop with the fixed
 * stages and `extra` stages (n_extra may be 0), at 0 < ν_rad_s < ∞. The fixed and extra stages
 * together must be proper. */
LwStatus lw_synth_loop_response (const LwSynthLoop *lp, const LwStage *extra, size_t n_extra,
                                 double nu_rad_s, double *mag, double *phase_deg, LwError *err);

/* The gain stage K0 = 1/|L(jν_c)| (label "crossover gain"). */
LwStatus lw_synth_crossover_gain (const LwSynthLoop *lp, double nu_c_rad_s, LwStage *gain_out,
                                  LwError *err);

typedef struct {
  double safety_deg;          /* added to the required phase, default 5 */
  double split_above_deg;     /* two leads above this total phase, default 60 */
  double refuse_above_deg;    /* refused above this, default 120 */
  int max_passes;             /* iteration limit, default 20 */
} LwLeadOptions;
void lw_lead_options_init (LwLeadOptions *o);

typedef struct {
  size_t n_stages;            /* 1 (gain only), 2 or 3 */
  LwStage stages[3];          /* stages[0]: crossover gain K0; then zero, one or two leads */
  double nu_c_rad_s;          /* the crossover aimed at, w-plane */
  double omega_c_rad_s;       /* the same as physical ω */
  double pm_target_deg;
  double pm_before_deg;       /* 180° + ∠L(jν_c) before the lead (fixed stages only) */
  double required_deg;        /* pm_target − pm_before */
  double lead_total_deg;      /* required + safety; <= 0: no lead */
  size_t n_leads;             /* 0, 1 or 2 */
  double lead_each_deg;       /* φ per lead */
  double alpha;               /* per lead, p/z */
  int passes;                 /* iteration passes until the crossover settled at ν_c */
  /* reached, from lw_evaluate of fixed · proposed stages */
  bool stable;
  bool has_phase_margin;  double phase_margin_deg;  double gain_crossover_rad_s;
  bool has_gain_margin;   double gain_margin_db;    double phase_crossover_rad_s;
  size_t n_gain_crossovers;
} LwLeadDesign;

/* Gain and lead(s) for a phase-margin target pm_target_deg (0 < PM < 180) at the crossover
 * ν_c (rad/s, w-plane, below the warped Nyquist frequency: any finite ν). Refuses (LW_ERR_INVALID,
 * message with the phase needed) when the lead needed exceeds opts->refuse_above_deg. */
LwStatus lw_synth_lead (const LwSynthLoop *lp, double pm_target_deg, double nu_c_rad_s,
                        const LwLeadOptions *opts, LwLeadDesign *out, LwError *err);

typedef struct {
  LwStage stages[2];          /* gain β ("lag gain"), then the lag */
  double ratio;               /* β */
  double phase_at_crossover_deg;   /* of the lag at ν_c, negative */
  double gain_at_crossover_db;     /* of β·lag at ν_c */
} LwLagDesign;

/* ratio > 1, nu_c_rad_s > 0, decades_below > 0 (1 puts the lag zero a decade below ν_c). */
LwStatus lw_synth_lag (double ratio, double nu_c_rad_s, double decades_below, LwLagDesign *out,
                       LwError *err);

typedef struct {
  LwStage pi;                 /* gain k, zero fraction·ν_c */
  double phase_at_crossover_deg;   /* −atan(fraction) in degrees */
} LwPiDesign;

/* 0 < fraction < 1 (0.1 is usual). */
LwStatus lw_synth_pi (const LwSynthLoop *lp, double nu_c_rad_s, double fraction, LwPiDesign *out,
                      LwError *err);

typedef struct {
  bool found;                 /* false: no pole pair with damping below zeta_max */
  LwStage notch;
  double plant_pole_re, plant_pole_im;   /* the s-plane pole notched (positive imaginary) */
  double plant_damping_w;     /* ζ of its w-plane image */
} LwNotchDesign;

/* plant_s: the continuous plant; 0 < zeta_max < 1 (e.g. 0.2); zeta_max < zeta_notch <= 1
 * (e.g. 0.5). */
LwStatus lw_synth_notch (const LwModel *plant_s, double period_s, double zeta_max,
                         double zeta_notch, LwNotchDesign *out, LwError *err);

/* The notch on measured data: the resonance found in the sampled plant's response p at n
 * points (lw_measured_resonance, *res) is taken as the s-plane pole pair
 * ω_n·(−ζ ± j√(1 − ζ²)) and notched as lw_synth_notch notches a model's (out->found false
 * when the data show no resonance). Same limits on zeta_max and zeta_notch. */
LwStatus lw_synth_notch_data (const double *omega_rad_s, const double complex *p, size_t n,
                              double period_s, double zeta_max, double zeta_notch,
                              LwMeasuredResonance *res, LwNotchDesign *out, LwError *err);

#ifdef __cplusplus
}
#endif
