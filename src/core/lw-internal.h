/* lw-internal.h — declarations shared between core/ source files; not public API.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-analysis.h"
#include "lw-linalg.h"
#include "lw-model.h"

/* π to double precision (M_PI is not C11). */
#define LW_PI 3.14159265358979323846

/* A realization of a proper factored model as a series of real first- and second-order
 * sections (modal form for complex pairs), in the model's own variable (s or z).
 * The overall gain sits in the last section. Fails (LW_ERR_INVALID) for improper models. */
LwStatus lw_model_realize (const LwModel *m, LwSs **out, LwError *err);

/* e^{[[A, B], [0, 0]]·h} of a continuous realization: Φ(h) = e^{Ah} (n×n, column-major) and
 * Γ(h) = ∫₀ʰ e^{Aσ} dσ B (n) — the zero-order-hold maps over a hold of h seconds. */
LwStatus lw_zoh_blocks (const LwSs *c, double h, double *phi, double *gam, LwError *err);

/* Checks a controller for a loop with this plant: domain z, the plant's period, proper, finite;
 * and the computation delay N in 0 … 100000. */
LwStatus lw_check_loop_controller (const LwSampledPlant *plant, const LwModel *controller_z,
                                   int compute_delay, LwError *err);

/* P_core(e^{jωT}) — the sampled plant with its fractional dead time θ, without the whole-sample
 * delay — from the factored continuous plant through the aliasing (Poisson) sum
 *   P_core(e^{jωT}) = (1 − e^{−jωT})/T · Σ_k P(jΩ_k)·e^{−jΩ_kθ}/(jΩ_k),  Ω_k = ω + 2πk/T,
 * each term to full relative accuracy from the factors, summed until the tail (terms fall like
 * |k|^−(r+1), r the relative degree, once |Ω| > 4·max|root|) is below rel_target/10 of the sum;
 * NaN where that needs more than 2048 pairs of terms.
 * *err_abs: an estimate of the absolute error (the terms' roundings, the summation and the
 * tail). Needs relative degree >= 2 (the tail converges too slowly otherwise): NaN and
 * *err_abs = ∞ where it does not apply. ω in rad/s. */
double complex lw_sampled_plant_alias_eval (const LwSampledPlant *p, double omega_rad_s,
                                            double rel_target, double *err_abs);

struct LwSampledPlant {
  double period_s;
  double dead_time_s;
  int whole_delay;          /* d: whole samples of dead time, as z^-d */
  double frac_delay_s;      /* θ in [0, T): the fractional part, inside core */
  LwModel *plant_s;           /* the continuous model as typed */
  LwSs *core;               /* ZOH of plant with θ, balanced, real Schur form; order n or n+1 */
  LwSchurEval *eval;        /* evaluator for core (read-only: thread-safe) */
  int n_integrators;        /* plant poles at s = 0 minus zeros at s = 0 */
  double realization_rel;   /* factor by which the state space's error exceeds its back
                               substitution's running bound, measured against the aliasing sum
                               (0: never, or not measurable); docs/conventions.md */
  LwModel *model;               /* the sampled plant factored, for display (computed once) */
};

/* The index i of the interval [x[i], x[i+1]] holding v in the ascending x (n >= 2): the first
 * interval for v below x[0], the last one for v at or above x[n−1]. */
size_t lw_interval_of (const double *x, size_t n, double v);
