/* lw-simulate.h — time-domain verification of the sampled loop: reference step, input- and
 * output-disturbance steps with actuator limits and optional anti-windup, the continuous plant
 * output between samples, and performance indices.  Every convention is in docs/simulation.md.
 *
 * The loop is the one of lw-analysis.h, L(z) = z^−N C(z) P(z), unity negative feedback, laid
 * out as signals sampled at t = kT (T the plant's period, seconds):
 *
 *     e[k]   = r[k] − y[k]                       error
 *     v[k]   = C(e)[k]                           controller output, unlimited
 *     s[k]   = min(max(v[k], LOW), HIGH)         limited controller output (when limits are set)
 *     u[k]   = s[k − N]                          actuator signal applied on [kT, (k+1)T)
 *     p[k]   = u[k] + d_i[k]                     plant input (input disturbance added here)
 *     y[k]   = P(p)[k] + d_o[k]                  measured output (output disturbance added here)
 *
 * The limit sits right after the controller, before the computation delay line, so the delay
 * line carries limited values and u[k] never leaves [LOW, HIGH].  P includes the plant's input
 * dead time, so an input disturbance passes through the dead time as the actuator signal does.
 * Everything is simulated structurally — the sampled plant's state space, delay lines, the
 * controller as a series of first- and second-order sections (lw_model_realize) — never through
 * an expanded polynomial.
 *
 * Plan/execute: an LwSimPlan is built once per (sampled plant, controller, options) and run for
 * each response. The plan refers to the sampled plant, which must outlive it. A plan is not
 * thread-safe (one per thread); there is no global state.
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

typedef struct {
  int compute_delay;        /* N >= 0, whole samples (0 … 100000) */
  size_t n_steps;           /* samples k = 0 … n_steps−1, 2 … 1e8 */
  bool has_limits;          /* actuator limits on the controller output */
  double u_low, u_high;     /* actuator units; finite, u_low < u_high (when has_limits) */
  bool anti_windup;         /* clamping of the integrating states; no effect without limits */
  size_t substeps;          /* M: continuous output at t = jT/M; 0 = no continuous output.
                               0 … 10000, and (n_steps − 1)·M <= 1e8 */
} LwSimOptions;

/* N = 1, 500 steps, no limits, no anti-windup, M = 20. */
void lw_sim_options_init (LwSimOptions *o);

typedef enum {
  LW_SIM_REFERENCE_STEP = 0,       /* r[k] = a for k >= 0, no disturbance */
  LW_SIM_INPUT_DISTURBANCE_STEP,   /* d_i[k] = a for k >= 0, r = 0 */
  LW_SIM_OUTPUT_DISTURBANCE_STEP   /* d_o[k] = a for k >= 0, r = 0 */
} LwSimInput;

/* Sums over the samples k = 0 … n−1 times T (exact integrals of the held signals):
 * iae = T Σ|e|, ise = T Σe², itae = T Σ (kT)|e| (s²·units), control_effort = T Σu². */
typedef struct {
  double iae;               /* error units · s */
  double ise;               /* error units² · s */
  double itae;              /* error units · s² */
  double control_effort;    /* actuator units² · s */
} LwSimIndices;

typedef struct {
  LwSimInput input;
  double amplitude;
  double period_s;
  size_t n;                 /* samples */
  double *y;                /* y(kT), measured output (plant output + output disturbance) */
  double *u;                /* u(kT), actuator signal after the limit, as applied on [kT,(k+1)T) */
  double *e;                /* e(kT) = r − y */
  size_t n_saturated;       /* samples k at which the controller output v[k] was clipped */
  size_t n_held;            /* samples k at which anti-windup held the integrating states */
  double peak;              /* the sample of y with the largest magnitude (signed) */
  double peak_time_s;       /* its time kT (the first such sample) */
  LwSimIndices indices;
  /* continuous output between samples (substeps M > 0): t_j = jT/M, j = 0 … (n−1)M */
  bool has_continuous;
  size_t n_fine;
  double *t_fine_s;         /* n_fine times, s */
  double *y_fine;           /* n_fine values of the continuous plant output + d_o */
  double intersample_ripple;   /* max_j |y_fine[j] − (straight line between the samples)| */
  double continuous_peak;      /* the value of y_fine with the largest magnitude (signed) */
  double continuous_peak_time_s;
} LwSimResponse;

typedef struct LwSimPlan LwSimPlan;

/* Builds the plan: controller_z in z with the plant's period, proper, finite. Fails with
 * LW_ERR_INVALID for bad options, an algebraic loop with 1 + C(∞)P(∞) = 0 (N = 0 and no whole
 * dead time), or, with limits, 1 + C(∞)P(∞) < 0 (the limited algebraic loop has no unique
 * solution). */
LwStatus lw_sim_plan_new (const LwSampledPlant *plant, const LwModel *controller_z,
                          const LwSimOptions *opts, LwSimPlan **out, LwError *err);
void lw_sim_plan_free (LwSimPlan *plan);

/* Number of controller states that anti-windup holds (real poles at z = 1, |z − 1| <= 1e-12). */
size_t lw_sim_plan_n_integrating (const LwSimPlan *plan);

/* Runs one response with step amplitude `amplitude` (units of r, d_i or d_o; finite).
 * *out is new; free with lw_sim_response_free. */
LwStatus lw_sim_run (LwSimPlan *plan, LwSimInput input, double amplitude, LwSimResponse **out,
                     LwError *err);
void lw_sim_response_free (LwSimResponse *r);

#ifdef __cplusplus
}
#endif
