/* lw-implement.h — implementation forms of a controller C(z): the difference equation,
 * second-order sections, and fixed-point sections with their integer arithmetic.
 *
 * The controller is an LwModel in z (domain z, proper: n_zeros <= n_poles).  Polynomials are
 * expanded only here, at the edge, and only as far as each form needs: the difference equation
 * expands the whole controller (order n), a section expands at most two roots.  Prefer the
 * sections above order 2 or 3: an expanded high-order polynomial in z loses its accuracy when
 * poles cluster near z = 1 (docs/implementation.md).
 *
 * The computation delay N of the loop (lw-analysis.h) is never part of these forms: the
 * firmware realizes it by its timing (the output computed from sample k is written N ticks
 * later), so the coefficients describe C(z) alone.
 *
 * Every time index k counts samples of the controller's period; all forms here are
 * dimensionless maps from e[k] to u[k] in whatever units the controller was designed for.
 * Details, choices and their reasons: docs/implementation.md.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <complex.h>
#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "lw-error.h"
#include "lw-model.h"

#ifdef __cplusplus
extern "C" {
#endif

/* ---- difference equation --------------------------------------------------------------- */

/* u[k] = Σ_{i=0..n} b[i]·e[k−i] − Σ_{i=1..n} a[i]·u[k−i],  a[0] = 1,  n = order = n_poles.
 * Leading b[i] are 0 when the controller is strictly proper (one per missing zero). */
typedef struct {
  size_t order;
  double *b;    /* order + 1 entries */
  double *a;    /* order + 1 entries, a[0] = 1 */
} LwDiffEq;

/* Expands the controller cz (domain z, proper, finite, gain != 0) into *out (new; free with
 * lw_diffeq_free). */
LwStatus lw_diffeq_from_model (const LwModel *cz, LwDiffEq **out, LwError *err);
void lw_diffeq_free (LwDiffEq *d);

/* Runs the difference equation from rest on x[0..n-1] into y[0..n-1] (double; x and y may not
 * alias).  Same operation order as the emitted C (lw-emit-c.h). */
void lw_diffeq_filter (const LwDiffEq *d, const double *x, double *y, size_t n);

/* ---- second-order sections ------------------------------------------------------------- */

/* One section  H(z) = (b0 + b1 z^−1 + b2 z^−2) / (1 + a1 z^−1 + a2 z^−2).
 * order 2: two poles; order 1: one pole (b2 = a2 = 0); order 0: a pure gain (b1 = b2 = a1 =
 * a2 = 0, only when the whole controller has no poles). A section with fewer zeros than poles
 * has leading zero b's (a delay inside the section). */
typedef struct {
  int order;
  double b[3];                /* b0 b1 b2 */
  double a[3];                /* a0 = 1, a1, a2 */
  size_t n_zeros, n_poles;    /* the roots this section realizes (n_zeros <= n_poles) */
  double complex zeros[2];    /* in z; a conjugate pair is stored upper first */
  double complex poles[2];
  double scale;               /* the gain factor of this section (b = scale · monic b) */
  double peak_gain;           /* max |H(e^{jωT})| over ω ∈ [0, π/T] after scaling, ratio;
                                 +inf when a pole lies on the unit circle */
} LwSection;

/* The cascade, applied in order s[0], s[1], …: C(z) = ∏ H_k(z). */
typedef struct {
  size_t n;
  LwSection *s;
} LwSos;

/* Splits cz (domain z, proper, finite, gain != 0) into sections (docs/implementation.md):
 *  - poles grouped: each conjugate pair one section; real poles two by two (the one nearest
 *    the unit circle with its nearest real neighbour), an odd one left as a first-order section;
 *  - zeros assigned to the groups, nearest the unit circle first: each group takes the zeros
 *    nearest (distance in z) to its pole, a conjugate pair as a unit, as many as it can hold
 *    while every zero left still fits in the groups left;
 *  - sections ordered by pole radius, ascending (the most lightly damped section last);
 *  - gain: each section but the last scaled to peak gain 1 over the unit circle (a section with
 *    a pole on the unit circle instead so that max|B| = max|A| on the circle); the last section
 *    carries the rest of the controller's gain. */
LwStatus lw_sos_from_model (const LwModel *cz, LwSos **out, LwError *err);
void lw_sos_free (LwSos *s);

/* ∏ H_k(z) at a complex point z. */
double complex lw_sos_eval (const LwSos *s, double complex z);

/* Runs the cascade from rest, direct form II transposed per section, on x[0..n-1] into
 * y[0..n-1] (no aliasing).  Same operation order as the emitted C. */
void lw_sos_filter (const LwSos *s, const double *x, double *y, size_t n);

/* Peak of |H(e^{jθ})| over θ ∈ [0, π] (θ = ωT, radians per sample) of one real section given
 * by b[3], a[3]: a grid of 4097 angles plus the angles of its roots, then refined by golden
 * section around the largest. +inf when a pole lies within 1e-9 of the unit circle. */
double lw_section_peak_gain (const double *b, const double *a, double *theta_at_peak);

/* ---- fixed point ----------------------------------------------------------------------- */

/* Qm.n: a two's-complement word of m + n bits; m integer bits including the sign bit, n
 * fraction bits.  The stored integer q stands for q / 2^n, q ∈ [−2^(m+n−1), 2^(m+n−1) − 1],
 * so the range is [−2^(m−1), 2^(m−1) − 2^−n].  Example: Q2.14 is 16 bits, range [−2, 2 − 2^−14],
 * step 2^−14.  Here 1 <= m, 0 <= n <= 15, m + n <= 16 (coefficients are held in int16_t). */
typedef struct {
  int int_bits;    /* m */
  int frac_bits;   /* n */
} LwQFormat;

/* Parses "Qm.n" (or "qm.n", or "m.n"), e.g. "Q2.14". LW_ERR_PARSE / LW_ERR_INVALID with the
 * 0-based character position of the offending character. */
LwStatus lw_qformat_parse (const char *text, LwQFormat *q, LwError *err);

/* Smallest and largest representable values of q (dimensionless). */
double lw_qformat_min (LwQFormat q);
double lw_qformat_max (LwQFormat q);

/* A quantized section: coefficient integers (value = integer / 2^n), a0 implied 1. */
typedef struct {
  int order;
  int32_t b[3];                   /* b0 b1 b2 (each fits the Q format) */
  int32_t a[3];                   /* a[0] unused (0), a1 a2 */
  size_t n_poles;
  double complex poles_exact[2];  /* the section's poles before quantization */
  double complex poles_quant[2];  /* roots of z^2 + a1q z + a2q, matched to poles_exact */
} LwSectionQ;

typedef struct {
  LwQFormat q;
  size_t n;
  LwSectionQ *s;
} LwSosFixed;

/* Rounds each coefficient to the nearest multiple of 2^−n (ties away from zero, C round()).
 * A coefficient outside the range of q fails with LW_ERR_INVALID naming the section (1-based,
 * in cascade order) and the coefficient, e.g. "section 2: a1 = -2.0004 does not fit Q2.14
 * (range -2 to 1.99994)". A section whose numerator quantizes to all zeros fails likewise. */
LwStatus lw_sos_quantize (const LwSos *sos, LwQFormat q, LwSosFixed **out, LwError *err);
void lw_sos_fixed_free (LwSosFixed *f);

/* The quantized controller as a factored model in z (period_s the sample period, > 0); the
 * zeros and poles are the roots of each quantized section. New model in *out. */
LwStatus lw_sos_fixed_model (const LwSosFixed *f, double period_s, LwModel **out, LwError *err);

/* The quantized coefficients as doubles (value = integer / 2^n), for analysis. New LwSos. */
LwStatus lw_sos_fixed_to_sos (const LwSosFixed *f, LwSos **out, LwError *err);

/* The fixed-point arithmetic of the emitted C, run from rest on x[0..n-1] into y[0..n-1]
 * (integer counts). Per section, with n the fraction bits, s1/s2 int32 states (reset to 0):
 *   acc = sat32(b0·x + s1)
 *   y   = sat16(round(acc / 2^n))           round half up: floor(acc / 2^n + 1/2)
 *   s1  = sat32(sat32(b1·x − a1·y) + s2)
 *   s2  = sat32(b2·x − a2·y)
 * where every product is int16 × int16 → int32 (exact), sat32/sat16 clamp to the int32/int16
 * range, and y feeds the next section as its x.  docs/implementation.md has the reasoning. */
void lw_sos_fixed_filter (const LwSosFixed *f, const int16_t *x, int16_t *y, size_t n);

#ifdef __cplusplus
}
#endif
