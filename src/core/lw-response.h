/* lw-response.h — frequency responses of factored models (s, z or w) and of the sampled plant,
 * with the phase unwrapped, for Bode, Nyquist and Nichols views of single parts of the loop.
 * (The loop itself is evaluated by lw_evaluate, lw-analysis.h.)
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stddef.h>

#include "lw-analysis.h"
#include "lw-error.h"
#include "lw-model.h"

#ifdef __cplusplus
extern "C" {
#endif

/* n >= 2 points log-spaced from lo to hi (0 < lo < hi, rad/s), both end points exact. */
LwStatus lw_log_grid (double lo, double hi, size_t n, double *out, LwError *err);

/* Response of a factored model at n frequencies freq[] (ascending, > 0):
 *   s-domain: at s = jω (freq = ω, rad/s);   w-plane: at w = jν (freq = ν, rad/s);
 *   z-domain: at z = e^{jωT} (freq = ω, rad/s, up to π/T).
 * mag_db[i] = 20·log10|H|; phase_deg[i] = ∠gain + Σ∠(x − zᵢ) − Σ∠(x − pᵢ), each factor's angle
 * continuous along the axis by construction (in s and w the principal angle of jω − r; in z,
 * where the principal angle of e^{jθ} − r wraps, θ + ∠(1 − r e^{−jθ}) for |r| <= 1 and
 * ∠(−r) + ∠(1 − e^{jθ}/r) for |r| > 1), so the phase is continuous wherever it is defined (a
 * root exactly on the axis or circle makes a genuine jump there); a negative gain counts −180°.
 * Either output may be NULL. */
LwStatus lw_model_freq_response (const LwModel *m, const double *freq, size_t n, double *mag_db,
                               double *phase_deg, LwError *err);

/* Response of the sampled plant (ZOH with dead time, from its state space) at ω[] (ascending,
 * rad/s, up to π/T): mag_db, and phase_deg unwrapped along the given points (nearest branch to
 * the previous point; the first on the branch nearest −90°·k for k integrators, or −90°·k − 180°
 * for a negative low-frequency gain; the whole-sample dead time added exactly as −ωTd). The
 * points must be dense enough that the delay-free phase moves less than 180° between them. */
LwStatus lw_sampled_plant_freq_response (const LwSampledPlant *p, const double *omega, size_t n,
                                         double *mag_db, double *phase_deg, LwError *err);

#ifdef __cplusplus
}
#endif
