/* lw-analysis.h — the sampled loop analyzed: discretized plant, controller, loop frequency
 * response, every crossover and margin, closed-loop poles, unity-feedback step response.
 *
 * Plan/execute split: an LwSampledPlant is built once per (plant, dead time, period) — the
 * exact ZOH state space — and reused for every controller evaluated against it.
 *
 * The loop is  L(z) = z^−N · C(z) · P(z)   with N the computation delay in whole samples,
 * C the controller mapped to z and P the zero-order-hold equivalent of the continuous plant
 * including its input dead time.  Unity negative feedback: e = r − y, u = C e.
 * Conventions (frequencies, wrapping, which margin governs) are defined in docs/conventions.md.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include "lw-error.h"
#include "lw-model.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct LwSampledPlant LwSampledPlant;

/* Discretizes plant_s (domain s, proper) with a zero-order hold at period_s > 0 and an input
 * dead time dead_time_s >= 0 (any real value: whole samples plus a fraction). */
LwStatus lw_sampled_plant_new (const LwModel *plant_s, double dead_time_s, double period_s,
                               LwSampledPlant **out, LwError *err);
void lw_sampled_plant_free (LwSampledPlant *p);

double lw_sampled_plant_period (const LwSampledPlant *p);

/* Plant in z, factored, for display (zeros from a generalized eigenvalue problem of the state
 * space; nothing is evaluated through them). Includes the dead time (poles at z = 0), not the
 * computation delay. New model; caller frees. */
LwModel *lw_sampled_plant_model (const LwSampledPlant *p);

/* How far a factored form m of the sampled plant (in z, as lw_sampled_plant_model gives it, or
 * in w after lw_model_z_to_w) is from the plant itself: the largest relative difference
 * |m − P| / |P| at 24 frequencies from a decade below the slowest corner to just below π/T,
 * against the plant's own resolved response (state space, or the aliasing sum of the factored
 * continuous plant). The factored forms are for display: their roots are ill-conditioned at
 * high relative degree and fast sampling, and a form off by more than LW_FORM_TOLERANCE is not
 * the plant (docs/conventions.md). NAN when no frequency could be checked. */
#define LW_FORM_TOLERANCE 1e-6
double lw_sampled_plant_form_error (const LwSampledPlant *p, const LwModel *m);

/* P(e^{jωT}) from the state space (one O(n²) back substitution on its real Schur form), times
 * the whole-sample dead time. */
double complex lw_sampled_plant_response (const LwSampledPlant *p, double omega_rad_s);

/* Bilinear map between factored models in z and in w = (2/T)(z−1)/(z+1), factor by factor.
 * A zero or pole at z = −1 maps to w = ∞ (it drops out, into the gain); the difference in
 * degree produces roots at w = 2/T (from z) or at z = −1 (from w). New model or NULL. */
LwModel *lw_model_z_to_w (const LwModel *mz);
LwModel *lw_model_w_to_z (const LwModel *mw);

/* Frequency warping of the bilinear map: ν = (2/T)·tan(ωT/2) and its inverse (rad/s). */
double lw_warp_omega_to_nu (double omega_rad_s, double period_s);
double lw_warp_nu_to_omega (double nu_rad_s, double period_s);

typedef struct {
  int compute_delay;      /* N >= 0, whole samples */
  size_t n_points;        /* frequency points, >= 16; the grid ends exactly at π/T (points for a
                           * long delay come on top, docs/conventions.md) */
  size_t n_steps;         /* step-response samples k = 0 … n_steps−1, >= 2 */
  size_t max_full_order;  /* closed-loop order (plant + controller + N + d) up to which every
                             closed-loop pole is computed (eigenvalues of the closed-loop state
                             space, O(order³)); above it stability comes from the Nyquist
                             count and only the dominant poles are computed. 0 … 2000 */
} LwAnalysisOptions;

/* N = 1, 2000 points, 500 steps, every pole up to closed-loop order 150 */
void lw_analysis_options_init (LwAnalysisOptions *o);

typedef struct {
  /* every gain crossover |L| = 1 (ascending ω, rad/s) and its phase margin, degrees in
   * (−180, 180] */
  size_t n_gain_crossovers;
  double *gain_crossovers_rad_s;
  double *phase_margins_deg;
  /* every phase crossover ∠L = −180° (mod 360°) and its gain margin −20·log10|L|, dB */
  size_t n_phase_crossovers;
  double *phase_crossovers_rad_s;
  double *gain_margins_db;
  /* where L is not resolved (its estimated relative error above 1e-6, docs/conventions.md):
   * crossovers that may lie there are not listed above but counted here, and the bands of ω
   * (rad/s) where that is so, as n pairs [lo, hi] (ascending) */
  size_t n_unresolved_gain_crossovers;
  size_t n_unresolved_phase_crossovers;
  size_t n_unresolved_bands;
  double *unresolved_bands_rad_s;     /* 2·n_unresolved_bands entries */
  /* governing values (from the listed, resolved crossovers); has_* false where none exists */
  bool has_phase_margin;  double phase_margin_deg;  double gain_crossover_rad_s;
  bool has_gain_margin;   double gain_margin_db;    double phase_crossover_rad_s;
  bool has_delay_margin;  double delay_margin_s;    double delay_margin_samples;
  /* ratio; at 0 rad/s when the supremum is the limit ω → 0 */
  bool has_sensitivity;   double sensitivity_peak;  double sensitivity_peak_rad_s;
  bool has_bandwidth;     double bandwidth_rad_s;   /* |T| first below |T(0)|−3 dB */
} LwMargins;

typedef struct {
  size_t n;
  double *samples;        /* y(kT), k = 0 … n−1 */
  bool has_final;  double final_value;     /* closed-loop DC gain, when stable */
  bool has_overshoot;  double overshoot_pct;
  bool has_rise;   double rise_time_s;     /* 10 % → 90 % of final, linear between samples */
  bool has_settling;  double settling_time_s;  /* enters and stays within ±2 % of final */
} LwStep;

typedef struct {
  double period_s;
  int compute_delay;
  LwModel *plant_z;         /* ZOH plant with dead time, without computation delay */
  LwModel *plant_w;         /* the same in the w-plane */
  LwModel *controller_z;    /* controller in z (without the computation delay) */
  LwModel *controller_w;
  /* loop frequency response on the grid: ω (rad/s), |L| in dB, ∠L in degrees unwrapped */
  size_t n_points;
  double *omega_rad_s;
  double *loop_mag_db;
  double *loop_phase_deg;
  LwMargins margins;
  bool stable;            /* all closed-loop poles strictly inside the unit circle:
                             |z| < 1 − 1e-10 */
  size_t closed_loop_order;        /* plant states + controller states + N + d */
  size_t n_closed_loop_unstable;   /* closed-loop poles with |z| >= 1 − 1e-10 (of all of them) */
  /* true: closed_loop_poles holds every pole (closed_loop_order of them). false (order above
   * max_full_order): only the dominant ones, those of largest |z| (at most 32, conjugate pairs
   * whole), and stable / n_closed_loop_unstable come from the Nyquist count */
  bool closed_loop_poles_complete;
  size_t n_closed_loop_poles;
  double complex *closed_loop_poles;   /* z-plane */
  LwStep step;
} LwEvaluation;

/* Fills the figures of s (overshoot, rise, settling) from s->samples, s->n, s->has_final and
 * s->final_value, by the rules lw_evaluate uses (docs/conventions.md); period_s in seconds. */
void lw_step_figures (LwStep *s, double period_s);

/* Evaluates the loop for a controller given in z (domain z, same period as the plant, proper).
 * *out is a new evaluation; free with lw_evaluation_free. */
LwStatus lw_evaluate (const LwSampledPlant *plant, const LwModel *controller_z,
                      const LwAnalysisOptions *opts, LwEvaluation **out, LwError *err);
void lw_evaluation_free (LwEvaluation *ev);

#ifdef __cplusplus
}
#endif
