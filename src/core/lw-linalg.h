/* lw-linalg.h — small dense linear algebra for the core (column-major, LAPACK underneath).
 *
 * Internal to core/: not part of the public numerics API, but documented and tested.
 * Matrices are column-major double arrays: element (i, j) of an n×m matrix is a[i + j·n].
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <complex.h>
#include <stddef.h>

#include "lw-error.h"

#ifdef __cplusplus
extern "C" {
#endif

/* e^A for an n×n matrix by scaling and squaring with the [13/13] Padé approximant
 * (Higham, "The scaling and squaring method for the matrix exponential revisited",
 * SIAM J. Matrix Anal. Appl. 26(4), 2005). a and out may not alias. */
LwStatus lw_expm (size_t n, const double *a, double *out, LwError *err);

/* c = a·b for n×n column-major matrices (no aliasing). */
void lw_matmul (size_t n, const double *a, const double *b, double *c);

/* A real state-space system x+ = A x + B u, y = C x + D u (single input, single output). */
typedef struct {
  size_t n;
  double *a;   /* n×n column-major */
  double *b;   /* n */
  double *c;   /* n */
  double d;
} LwSs;

LwSs *lw_ss_new (size_t n);
void lw_ss_free (LwSs *s);
LwSs *lw_ss_copy (const LwSs *s);

/* Balances A by a diagonal similarity (LAPACK dgebal, scaling only); B and C are scaled with
 * it, so the transfer function is unchanged. */
LwStatus lw_ss_balance (LwSs *s, LwError *err);

/* Balances A by a diagonal similarity (LAPACK dgebal, scaling only) and reduces it to upper
 * Hessenberg form by an orthogonal similarity (dgehrd/dorghr); B and C are transformed with it,
 * so the transfer function is unchanged. Entries below the first subdiagonal are set to 0. */
LwStatus lw_ss_balance_hessenberg (LwSs *s, LwError *err);

/* Balances A (dgebal, scaling only) and reduces it to real Schur form T = Zᵀ A Z by an
 * orthogonal similarity (dgees): T is quasi-upper-triangular, 1×1 blocks for real eigenvalues
 * and 2×2 blocks for complex pairs. B ← Zᵀ B, C ← C Z; entries below the blocks are exactly 0. */
LwStatus lw_ss_balance_schur (LwSs *s, LwError *err);

/* Workspace for repeated evaluations of a quasi-upper-triangular (real Schur) system. */
/* Read-only once made: evaluations may run on one evaluator from several threads at once. */
typedef struct LwSchurEval LwSchurEval;
LwSchurEval *lw_schur_eval_new (const LwSs *s);  /* s must already be in real Schur form */
void lw_schur_eval_free (LwSchurEval *h);
/* C (xI − T)^{−1} B + D at a complex point x by block back substitution: about 2n² real
 * multiply-adds and n divisions. NaN+NaN·i if xI − T is singular. */
double complex lw_schur_eval (const LwSchurEval *h, double complex x);
/* The same at x = cos ωT + j sin ωT on the unit circle, given cos and sin: the real part of
 * x − 1 is formed without cancellation, which keeps full relative accuracy near z = 1. */
double complex lw_schur_eval_unit (const LwSchurEval *h, double cos_wt, double sin_wt);
/* lw_schur_eval_unit, with a running (componentwise) bound on its absolute rounding error in
 * *err_abs: the back substitution repeated on absolute values, every stored entry of T, B, C, D
 * perturbed by u·(n + 4) relative (u = 2⁻⁵³; the diagonal by that of T_ii, not of the exactly
 * stored 1 − T_ii) and every error already made carried along. It
 * treats the realization's entries as exact to their own rounding; it is an estimate, a few
 * times above the error seen against 50-digit arithmetic (tests/core/test-evaluate.c). About one
 * and a half back substitutions; NaN value and INFINITY bound where xI − T is singular. */
double complex lw_schur_eval_unit_err (const LwSchurEval *h, double cos_wt, double sin_wt,
                                       double *err_abs);
/* The same value, and its derivative d/dx in *deriv (two back substitutions). */
double complex lw_schur_eval_deriv (const LwSchurEval *h, double complex x, double complex *deriv);

/* Workspace for repeated evaluations of an upper-Hessenberg system (plan/execute). */
typedef struct LwHessEval LwHessEval;
LwHessEval *lw_hess_eval_new (const LwSs *s);   /* s must already be upper Hessenberg */
void lw_hess_eval_free (LwHessEval *h);
/* C (xI − A)^{−1} B + D at a complex point x, by Gaussian elimination with adjacent-row
 * partial pivoting on the Hessenberg matrix: O(n²). Returns NaN+NaN·i if xI − A is singular. */
double complex lw_hess_eval (LwHessEval *h, double complex x);

/* Eigenvalues of an n×n real matrix (LAPACK dgeev). ev holds n entries. */
LwStatus lw_eigenvalues (size_t n, const double *a, double complex *ev, LwError *err);

/* Finite zeros of the SISO system: generalized eigenvalues of the pencil
 * ([A B; C D], [I 0; 0 0]) (LAPACK dggev). zeros holds at least n entries; *n_zeros is set. */
LwStatus lw_ss_zeros (const LwSs *s, double complex *zeros, size_t *n_zeros, LwError *err);

/* Solves the n×n system A x = b in place of b (dgesv on a copy of A). */
LwStatus lw_solve (size_t n, const double *a, double *b, LwError *err);

/* Multiplies sizes with overflow check: returns 0 on overflow. */
size_t lw_mul_size (size_t a, size_t b);

#ifdef __cplusplus
}
#endif
