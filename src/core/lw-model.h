/* lw-model.h — factored rational models (gain, zeros, poles) in s, z or w.
 *
 * A model is   H(x) = gain · ∏(x − zeros[i]) / ∏(x − poles[i])   where x is s, z or w.
 * `gain` is therefore the ratio of the leading coefficients of numerator and denominator
 * (the "root-locus" gain), not the DC gain.
 *
 * Roots are stored as double complex.  Complex roots always come as adjacent conjugate
 * pairs, the one with positive imaginary part first, and their imaginary parts are exactly
 * opposite; real roots have an imaginary part of exactly 0.  lw_model_canonicalize() enforces
 * this and sorts roots (real roots first by value, then pairs by real part, then imag part),
 * so equal models print and compare equal.
 *
 * Units: s-domain roots in rad/s; w-plane roots in rad/s (ν units); z-domain roots are
 * dimensionless.  period_s is the sample period in seconds for z and w, 0 for s.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <complex.h>
#include <stdbool.h>
#include <stddef.h>

#include "lw-error.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
  LW_DOMAIN_S = 0,
  LW_DOMAIN_Z = 1,
  LW_DOMAIN_W = 2
} LwDomain;

/* Highest total degree of numerator or denominator accepted anywhere in the core. */
#define LW_MAX_DEGREE 60

typedef struct {
  LwDomain domain;
  double period_s;          /* sample period (s) for z and w; 0 for s */
  double gain;              /* leading-coefficient gain */
  size_t n_zeros;
  size_t n_poles;
  double complex *zeros;    /* n_zeros entries (NULL when 0) */
  double complex *poles;    /* n_poles entries (NULL when 0) */
} LwModel;

/* Allocates a model with room for the given counts; roots are zero-filled. NULL on overflow
 * or allocation failure. */
LwModel *lw_model_new (LwDomain domain, double period_s, double gain, size_t n_zeros,
                   size_t n_poles);
void lw_model_free (LwModel *m);
LwModel *lw_model_copy (const LwModel *m);

/* A constant (no roots). */
LwModel *lw_model_new_constant (LwDomain domain, double period_s, double gain);

/* Product a·b (same domain and period required; NULL otherwise). Roots are concatenated,
 * then canonicalized; identical zero/pole pairs are not cancelled (use lw_model_cancel). */
LwModel *lw_model_mul (const LwModel *a, const LwModel *b);

/* Removes zero/pole pairs that coincide to within rel_tol·max(1,|root|). Returns the number of
 * pairs removed. */
size_t lw_model_cancel (LwModel *m, double rel_tol);

/* Enforces the conjugate-pair layout and the canonical order (see top of file). Roots with
 * |imag| <= 1e-12·max(1,|root|) become real. */
void lw_model_canonicalize (LwModel *m);

/* H(x) at a complex point, evaluated factor by factor. */
double complex lw_model_eval (const LwModel *m, double complex x);

/* n_poles − n_zeros (negative when improper). */
long lw_model_relative_degree (const LwModel *m);

/* True when the model is finite everywhere checked: gain and every root finite. */
bool lw_model_is_finite (const LwModel *m);

/* Expanded polynomials, ascending powers: num has n_zeros+1 entries, den n_poles+1.
 * num includes the gain. For display and difference equations only. */
LwStatus lw_model_to_poly (const LwModel *m, double *num, double *den, LwError *err);

/* Roots of the real polynomial c[0] + c[1] x + … + c[degree] x^degree (c[degree] != 0) by the
 * eigenvalues of its balanced companion matrix (LAPACK dgeev). degree 1 and 2 in closed form.
 * roots must hold `degree` entries; output is conjugate-paired as described above. */
LwStatus lw_poly_roots (const double *c, size_t degree, double complex *roots, LwError *err);

/* Writes a factored, human-readable form, e.g. "3.2 (s + 2) / (s (s^2 + 1.2 s + 16))", into
 * buf (always NUL-terminated). Returns the length it needed (like snprintf). `digits` is the
 * number of significant digits (e.g. 6). */
size_t lw_model_format (const LwModel *m, int digits, char *buf, size_t size);

/* The variable letter of a domain: 's', 'z' or 'w'. */
char lw_domain_var (LwDomain d);

#ifdef __cplusplus
}
#endif
