/* lw-ctrl-map.h — mapping a continuous controller (factored, in s) to the z-plane, factor by factor.
 *
 * For compensators designed in s and run at sample period T.  Plants are discretized exactly
 * with a zero-order hold elsewhere (lw-analysis.h); these maps are approximations meant for
 * controllers.  Every map works on the roots and the gain of the factored model; no polynomial
 * is expanded, and the z-domain gain is computed analytically, factor by factor.
 *
 * Methods (x is a root of the s-model, T the period in seconds):
 *
 *   LW_CTRL_MAP_TUSTIN            s = K (z−1)/(z+1), K = 2/T, or K = ω_p / tan(ω_p T/2) when a
 *                            prewarp frequency ω_p (rad/s, 0 < ω_p < π/T) is given, so the
 *                            response at ω_p is reproduced exactly.  Root x ↦ (K+x)/(K−x);
 *                            each root contributes (K−x) to the gain and a root at z = −1 on the
 *                            other side; a root at x = K maps to z = ∞ (it leaves the factor
 *                            −2K in the gain).  Improper models are accepted (poles at z = −1).
 *
 *   LW_CTRL_MAP_MATCHED           matched pole-zero: every finite root x ↦ e^{xT}.  Of the d = n_p −
 *                            n_z zeros at s = ∞, d − 1 are placed at z = −1 and one is left at
 *                            z = ∞, so the result is strictly proper (a one-sample lag in its
 *                            response, leaving the sample time for computation).
 *   LW_CTRL_MAP_MATCHED_BIPROPER  as LW_CTRL_MAP_MATCHED but all d zeros at infinity go to z = −1.  Use
 *                            this one when the computation delay is already modelled separately
 *                            (the loop of lw-analysis.h has its own z^−N), to avoid counting the
 *                            one-sample lag twice.
 *                            Gain (both matched variants): the low-frequency asymptotes agree.
 *                            With k the number of zeros minus poles at s = 0 (integrators count
 *                            −1), H(s) ≈ c·s^k as ω → 0 and H(z) ≈ c'·((z−1)/T)^k near z = 1;
 *                            the gain is chosen so that c' = c.  For k = 0 this is the DC gain;
 *                            with integrators it is the limit ω → 0 of matching |H| at ω, so
 *                            no pole is ever evaluated.  Per factor: a root x ≠ 0 contributes
 *                            −x / (1 − e^{xT}) (computed with expm1) if a zero, its inverse if
 *                            a pole; a zero at s = 0 contributes 1/T, a pole at s = 0 T; each
 *                            zero at z = −1 contributes 1/2.
 *                            Improper models are rejected (the result would not be causal).
 *
 *   LW_CTRL_MAP_FORWARD_EULER     s = (z−1)/T:      x ↦ 1 + xT, gain factor T per pole, 1/T per zero.
 *                            Improper models are rejected (not causal).
 *   LW_CTRL_MAP_BACKWARD_EULER    s = (z−1)/(T z):  x ↦ 1/(1 − xT), gain factor (1 − xT)/T per zero,
 *                            T/(1 − xT) per pole; each root adds one at z = 0 on the other side;
 *                            a root at x = 1/T maps to z = ∞ (factor −1/T per zero, −T per pole).
 *
 * Roots of a conjugate pair map to exact conjugates; the output is canonicalized (lw-model.h),
 * domain z, period_s = T.  Roots near x = 0 land near z = 1, where a factored z model keeps its
 * accuracy and an expanded polynomial would not.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-error.h"
#include "lw-model.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
  LW_CTRL_MAP_TUSTIN = 0,
  LW_CTRL_MAP_MATCHED,
  LW_CTRL_MAP_MATCHED_BIPROPER,
  LW_CTRL_MAP_FORWARD_EULER,
  LW_CTRL_MAP_BACKWARD_EULER
} LwCtrlMapMethod;

/* Maps the continuous model ms (domain s) to z at sample period period_s (seconds, > 0).
 * prewarp_rad_s: Tustin prewarp frequency in rad/s, 0 for none (must be 0 for the other
 * methods).  On success *out is a new model (caller frees with lw_model_free). */
LwStatus lw_ctrl_map (const LwModel *ms, LwCtrlMapMethod method, double period_s, double prewarp_rad_s,
                 LwModel **out, LwError *err);

/* Short lower-case name of a method ("tustin", "matched", "matched-biproper",
 * "forward-euler", "backward-euler"); NULL for an unknown value. */
const char *lw_ctrl_map_method_name (LwCtrlMapMethod method);

#ifdef __cplusplus
}
#endif
