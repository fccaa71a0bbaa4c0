/* lw-measured-fit.c — a rational model in s fitted to a measured continuous frequency response
 * (lw_measured_fit in lw-measured.h).
 *
 * Method: vector fitting,
 *   B. Gustavsen and A. Semlyen, "Rational approximation of frequency domain responses by
 *   vector fitting", IEEE Trans. Power Delivery 14(3), 1999, pp. 1052–1061,
 * with the relaxed non-triviality condition of
 *   B. Gustavsen, "Improving the pole relocating properties of vector fitting", IEEE Trans.
 *   Power Delivery 21(3), 2006, pp. 1587–1592   (page numbers from memory).
 *
 * The steps:
 *  1. Frequencies are divided by ω0 = √(ω_min·ω_max), so every number below is O(1) in the
 *     middle of the data; the model is scaled back at the end.
 *  2. Starting poles: complex pairs −β/100 ± jβ with β log-spaced over the data's range, and
 *     one real pole −ω0 when the order is odd.
 *  3. Pole relocation (repeated `iterations` times): with the current poles a_i, solve in the
 *     least-squares sense, at every point s_k = jω_k,
 *        Σ c_i/(s − a_i) + d  −  (Σ c̃_i/(s − a_i) + d̃)·h(s)  =  0
 *     together with the relaxation row Re Σ_k (Σ c̃_i/(s_k − a_i) + d̃) = n (Gustavsen
 *     2006); every row weighted by w_k and split into real and imaginary parts. The new
 *     poles are the zeros of σ(s) = Σ c̃_i/(s − a_i) + d̃: the eigenvalues of A − b·c̃ᵀ/d̃ for
 *     the real realization (A, b) of the poles. When d̃ comes out (almost) zero the problem is
 *     solved again with d̃ fixed (as the 2006 paper prescribes). Unstable new poles are
 *     reflected into the left half plane.
 *  4. Residue identification with the final poles: h ≈ Σ c_i/(s − a_i) (+ d for relative
 *     degree 0), weighted least squares.
 *  5. Zeros and gain from the pole-residue form (zeros_from_residues).
 *
 * Real formulation: a complex pair a, a* (Im a > 0 first) has the two real basis functions
 * 1/(s − a) + 1/(s − a*) and j/(s − a) − j/(s − a*); real coefficients c′, c″ make
 * (c′ + jc″)/(s − a) + conjugate, so the model has real coefficients.
 *
 * Relative degree k > 1 is imposed inside every linear problem, not by cutting the numerator
 * afterwards: the residues must satisfy Σ c_i·a_i^m = 0 for m = 0 … k − 2 (the coefficients
 * of s^−1 … s^−(k−1) in the expansion of Σ c_i/(s − a_i) at infinity), i.e. C·A^m·b = 0. The
 * residues are written c = Z·y with Z an orthonormal basis of that null space (SVD), and the
 * least-squares problem is solved for y.
 *
 * Least squares: rows compressed block by block by QR (dgeqrf), so memory does not grow
 * with the points; columns scaled to unit norm; minimum-norm solution by the SVD (dgelsd).
 * Core: C11 + LAPACK, no GLib, nothing printed.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-measured.h"

#include <lapacke.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "lw-linalg.h"

#define FIT_MAX_ORDER 40
#define FIT_MAX_ITERATIONS 1000
#define FIT_BLOCK_ROWS 1024       /* rows gathered before a QR compression */
/* |d̃| outside [low, high] re-solves with d̃ fixed at the nearer limit (Gustavsen 2006, and
 * the values of the authors' published implementation, from memory) */
#define FIT_DTILDE_LOW 1e-18
#define FIT_DTILDE_HIGH 1e18

typedef struct {
  size_t n, n_used;    /* points, those of non-zero weight */
  const double complex *h;
  double *x, *w;      /* ω / ω0; the weights */
  size_t order, k;    /* N; the relative degree */
} Fit;

/* ---- Basis, realization, constraints --------------------------------------------------- */

/* The real basis at s = jx (see the top of the file); poles p: pairs adjacent, Im > 0 first. */
static void
basis (const double complex *p, size_t N, double x, double *re, double *im)
{
  for (size_t i = 0; i < N; i++)
    {
      double al = creal (p[i]), be = cimag (p[i]);
      if (be == 0.0 || i + 1 == N)
        {
          double den = al * al + x * x;
          re[i] = -al / den;
          im[i] = -x / den;
          continue;
        }
      /* u = 1/(jx − a), v = 1/(jx − a*) */
      double d1 = al * al + (x - be) * (x - be), d2 = al * al + (x + be) * (x + be);
      double ur = -al / d1, ui = -(x - be) / d1, vr = -al / d2, vi = -(x + be) / d2;
      re[i] = ur + vr;
      im[i] = ui + vi;
      re[i + 1] = -(ui - vi);   /* j(u − v) */
      im[i + 1] = ur - vr;
      i++;
    }
}

/* The real realization of Σ c_i/(s − a_i): A block diagonal (a real pole: [a]; a pair
 * α ± jβ: [[α, β], [−β, α]]), b = 1 for a real pole and (2, 0) for a pair; then C = the
 * coefficients of the real basis. A is N×N column-major, zeroed here. */
static void
realize (const double complex *p, size_t N, double *A, double *b)
{
  memset (A, 0, N * N * sizeof *A);
  for (size_t i = 0; i < N; i++)
    {
      double al = creal (p[i]), be = cimag (p[i]);
      A[i + i * N] = al;
      b[i] = 1.0;
      if (be != 0.0 && i + 1 < N)
        {
          A[(i + 1) + (i + 1) * N] = al;
          A[i + (i + 1) * N] = be;
          A[(i + 1) + i * N] = -be;
          b[i] = 2.0;
          b[i + 1] = 0.0;
          i++;
        }
    }
}

/* The zeros of Σ c_i/(s − a_i) + d (d ≠ 0): the eigenvalues of A − b·cᵀ/d. A, b: scratch. */
static LwStatus
zeros_with_d (const double complex *p, size_t N, const double *c, double d, double *A,
              double *b, double complex *zeros, LwError *err)
{
  realize (p, N, A, b);
  for (size_t j = 0; j < N; j++)
    for (size_t i = 0; i < N; i++)
      A[i + j * N] -= b[i] * c[j] / d;
  return lw_eigenvalues (N, A, zeros, err);
}

/* c = op(a)·b with op(a) m×kk (a itself, lda its leading dimension, or its transpose when
 * ta), b kk×n; all column-major. */
static void
gemm (bool ta, size_t m, size_t n, size_t kk, const double *a, size_t lda, const double *b,
      size_t ldb, double *c, size_t ldc)
{
  for (size_t j = 0; j < n; j++)
    for (size_t i = 0; i < m; i++)
      {
        double s = 0.0;
        for (size_t l = 0; l < kk; l++)
          s += (ta ? a[l + i * lda] : a[i + l * lda]) * b[l + j * ldb];
        c[i + j * ldc] = s;
      }
}

/* An orthonormal basis z (N × (N − r), column-major) of the null space of the r×N matrix
 * rows (column-major, leading dimension r), by the SVD: the last N − r right singular
 * vectors. rows is overwritten. r < N. */
static LwStatus
null_space (double *rows, size_t r, size_t N, double *z, LwError *err)
{
  double *vt = calloc (N * N + 2 * N + 2, sizeof *vt);
  if (vt == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "model fit: out of memory");
  double *sv = vt + N * N, *superb = sv + N + 1;
  double dummy = 0.0;
  lapack_int info = LAPACKE_dgesvd (LAPACK_COL_MAJOR, 'N', 'A', (lapack_int) r, (lapack_int) N,
                                    rows, (lapack_int) r, sv, &dummy, 1, vt, (lapack_int) N,
                                    superb);
  if (info != 0)
    {
      free (vt);
      return lw_error_set (err, LW_ERR_NUMERIC, -1,
                           "model fit: singular value decomposition failed (dgesvd info %d)",
                           (int) info);
    }
  for (size_t j = 0; j < N - r; j++)
    for (size_t i = 0; i < N; i++)
      z[i + j * N] = vt[(r + j) + i * N];
  free (vt);
  return LW_OK;
}

/* Rows m = 0 … r − 1 of the matrix whose row m is (A^m b)ᵀ (so that row m · c = C·A^m·b)
 * when `observe` is false, or C·A^m (row vectors) when it is true; each row scaled to unit
 * norm. out is r×N column-major. */
static void
power_rows (const double *A, const double *b, const double *c, size_t N, size_t r, bool observe,
            double *v, double *tmp, double *out)
{
  memcpy (v, observe ? c : b, N * sizeof *v);
  for (size_t m = 0; m < r; m++)
    {
      double nrm = 0.0;
      for (size_t j = 0; j < N; j++)
        nrm = hypot (nrm, v[j]);
      for (size_t j = 0; j < N; j++)
        out[m + j * r] = nrm > 0.0 ? v[j] / nrm : v[j];
      gemm (observe, N, 1, N, A, N, v, N, tmp, N);   /* Aᵀ·v is the row v·A */
      /* a rescaled vector keeps the same null space; rescaling keeps high powers finite */
      for (size_t i = 0; i < N; i++)
        v[i] = nrm > 0.0 ? tmp[i] / nrm : tmp[i];
    }
}

/* For relative degree k > 1: the basis Z (N × (N − k + 1)) of the residues c with
 * C·A^m·b = 0, m = 0 … k − 2. *z NULL (no constraint) when k <= 1. */
static LwStatus
residue_constraint (const double complex *p, size_t N, size_t k, double **z, size_t *nz,
                    LwError *err)
{
  *z = NULL;
  *nz = N;
  if (k <= 1)
    return LW_OK;
  size_t r = k - 1;
  double *w = calloc (N * N + 4 * N + r * N, sizeof *w);
  double *out = malloc (N * (N - r) * sizeof *out);
  LwStatus st = LW_ERR_NOMEM;
  if (w == NULL || out == NULL)
    lw_error_set (err, LW_ERR_NOMEM, -1, "model fit: out of memory");
  else
    {
      double *A = w, *b = A + N * N, *v = b + N, *tmp = v + N, *rows = tmp + 2 * N;
      realize (p, N, A, b);
      power_rows (A, b, NULL, N, r, false, v, tmp, rows);
      st = null_space (rows, r, N, out, err);
    }
  free (w);
  if (st != LW_OK)
    free (out);
  else
    {
      *z = out;
      *nz = N - r;
    }
  return st;
}

/* ---- Least squares --------------------------------------------------------------------- */

/* Rows of [M | rhs] gathered and, when the buffer is full, replaced by the R of their QR. */
typedef struct {
  size_t nu;          /* unknowns; the buffer has nu + 1 columns (the last: right-hand side) */
  size_t cap, rows;
  double *a;          /* cap × (nu + 1), column-major, then tau (nu + 1): one block to free */
  double *tau;
  lapack_int info;
} Acc;

static bool
acc_init (Acc *q, size_t nu)
{
  size_t cap = FIT_BLOCK_ROWS + nu + 1;
  *q = (Acc) { .nu = nu, .cap = cap, .a = malloc ((cap + 1) * (nu + 1) * sizeof (double)) };
  if (q->a == NULL)
    return false;
  q->tau = q->a + cap * (nu + 1);
  return true;
}

static void
acc_add (Acc *q, const double *row)
{
  size_t nc = q->nu + 1;
  if (q->rows == q->cap && q->info == 0)
    {
      q->info = LAPACKE_dgeqrf (LAPACK_COL_MAJOR, (lapack_int) q->rows, (lapack_int) nc, q->a,
                                (lapack_int) q->cap, q->tau);
      for (size_t j = 0; j < nc; j++)
        for (size_t i = j + 1; i < q->rows; i++)
          q->a[i + j * q->cap] = 0.0;
      q->rows = nc;
    }
  if (q->info != 0)
    return;
  for (size_t j = 0; j < nc; j++)
    q->a[q->rows + j * q->cap] = row[j];
  q->rows++;
}

/* min ‖M x − rhs‖ over the gathered rows, the first nc unknowns written c = Z·y (Z nc × nz;
 * NULL: c itself). Columns scaled to unit norm; minimum-norm solution (dgelsd). x: nu. */
static LwStatus
acc_solve (const Acc *q, size_t nc, const double *Z, size_t nz, double *x, LwError *err)
{
  if (q->info != 0)
    return lw_error_set (err, LW_ERR_NUMERIC, -1, "model fit: QR factorization failed "
                         "(dgeqrf info %d)", (int) q->info);
  size_t m = q->rows, nu = q->nu, nv = nu - nc + nz, ldb = m > nv ? m : nv;
  double *M = calloc (m * nv + ldb + 3 * nv + 1, sizeof *M);
  if (M == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "model fit: out of memory");
  double *rhs = M + m * nv, *sv = rhs + ldb, *scale = sv + nv + 1;
  if (Z == NULL)
    for (size_t j = 0; j < nz; j++)
      memcpy (M + j * m, q->a + j * q->cap, m * sizeof *M);
  else
    gemm (false, m, nz, nc, q->a, q->cap, Z, nc, M, m);
  for (size_t j = nc; j < nu; j++)
    for (size_t i = 0; i < m; i++)
      M[i + (nz + j - nc) * m] = q->a[i + j * q->cap];
  for (size_t i = 0; i < m; i++)
    rhs[i] = q->a[i + nu * q->cap];
  for (size_t j = 0; j < nv; j++)
    {
      double nrm = 0.0;
      for (size_t i = 0; i < m; i++)
        nrm = hypot (nrm, M[i + j * m]);
      scale[j] = nrm > 0.0 && isfinite (nrm) ? nrm : 1.0;
      for (size_t i = 0; i < m; i++)
        M[i + j * m] /= scale[j];
    }
  lapack_int rank = 0;
  lapack_int info = LAPACKE_dgelsd (LAPACK_COL_MAJOR, (lapack_int) m, (lapack_int) nv, 1, M,
                                    (lapack_int) m, rhs, (lapack_int) ldb, sv, -1.0, &rank);
  if (info != 0)
    {
      free (M);
      return lw_error_set (err, LW_ERR_NUMERIC, -1, "model fit: least squares failed "
                           "(dgelsd info %d)", (int) info);
    }
  for (size_t j = 0; j < nv; j++)
    rhs[j] /= scale[j];
  if (Z == NULL)
    memcpy (x, rhs, nc * sizeof *x);
  else
    gemm (false, nc, 1, nz, Z, nc, rhs, nz, x, nc);
  for (size_t j = nc; j < nu; j++)
    x[j] = rhs[nz + j - nc];
  free (M);
  for (size_t j = 0; j < nu; j++)
    if (!isfinite (x[j]))
      return lw_error_set (err, LW_ERR_NUMERIC, -1, "model fit: the least-squares solution is "
                           "not finite");
  return LW_OK;
}

/* The point rows of one linear problem into q. Columns: c (N), d (relative degree 0 only),
 * then with `sigma`: c̃ (N) and, with `free_dt`, d̃. Right-hand side rhs_factor·w·h. Returns
 * Σ_k Re of the basis (N values) in sum_re when non-NULL (for the relaxation row). */
static void
add_points (const Fit *f, const double complex *p, bool sigma, bool free_dt, double rhs_factor,
            Acc *q, double *row, double *re, double *im, double *sum_re)
{
  size_t N = f->order, dk = f->k == 0, ns = N + dk;
  size_t nu = q->nu;
  if (sum_re != NULL)
    memset (sum_re, 0, N * sizeof *sum_re);
  for (size_t kk = 0; kk < f->n; kk++)
    {
      double w = f->w[kk];
      if (w == 0.0)
        continue;
      double hr = creal (f->h[kk]), hi = cimag (f->h[kk]);
      basis (p, N, f->x[kk], re, im);
      for (int part = 0; part < 2; part++)
        {
          const double *ph = part == 0 ? re : im;
          for (size_t j = 0; j < N; j++)
            row[j] = w * ph[j];
          if (dk)
            row[N] = part == 0 ? w : 0.0;
          if (sigma)
            {
              for (size_t j = 0; j < N; j++)
                row[ns + j] = part == 0 ? -w * (re[j] * hr - im[j] * hi)
                                        : -w * (re[j] * hi + im[j] * hr);
              if (free_dt)
                row[ns + N] = -w * (part == 0 ? hr : hi);
            }
          row[nu] = rhs_factor * w * (part == 0 ? hr : hi);
          acc_add (q, row);
        }
      if (sum_re != NULL)
        for (size_t j = 0; j < N; j++)
          sum_re[j] += re[j];
    }
}

/* A linear problem of nu unknowns with the current poles: the constraint basis Z of the
 * residues (NULL when none; nz columns), an empty accumulator, and `scratch` doubles of work
 * space. Everything is freed on failure. */
static LwStatus
problem_init (const Fit *f, const double complex *p, size_t nu, size_t scratch, Acc *q,
              double **Z, size_t *nz, double **work, LwError *err)
{
  *q = (Acc) { 0 };
  *work = NULL;
  LwStatus st = residue_constraint (p, f->order, f->k, Z, nz, err);
  if (st != LW_OK)
    return st;
  *work = calloc (scratch, sizeof (double));
  if (*work != NULL && acc_init (q, nu))
    return LW_OK;
  free (*work);
  free (*Z);
  free (q->a);
  return lw_error_set (err, LW_ERR_NOMEM, -1, "model fit: out of memory");
}

/* ---- Pole relocation ------------------------------------------------------------------- */

static LwStatus
relocate (const Fit *f, double complex *p, LwError *err)
{
  size_t N = f->order, ns = N + (f->k == 0), nu = ns + N + 1;
  double *Z, *w;
  size_t nz;
  Acc q;
  LwStatus st = problem_init (f, p, nu, nu + 1 + 4 * N + N * N + nu, &q, &Z, &nz, &w, err);
  if (st != LW_OK)
    return st;
  double *row = w, *re = row + nu + 1, *im = re + N, *sum_re = im + N, *b = sum_re + N;
  double *A = b + N, *x = A + N * N;

  /* the relaxed problem: d̃ free, one row Re Σ_k σ(s_k) = n scaled like the weighted data
   * (Gustavsen 2006: scale = ‖w·h‖ / n) */
  double scale = 0.0, n_used = (double) f->n_used;
  for (size_t kk = 0; kk < f->n; kk++)
    scale = hypot (scale, f->w[kk] * cabs (f->h[kk]));
  scale /= n_used;
  add_points (f, p, true, true, 0.0, &q, row, re, im, sum_re);
  memset (row, 0, (nu + 1) * sizeof *row);
  for (size_t j = 0; j < N; j++)
    row[ns + j] = scale * sum_re[j];
  row[ns + N] = scale * n_used;
  row[nu] = scale * n_used;
  acc_add (&q, row);
  st = acc_solve (&q, N, Z, nz, x, err);
  double dt = x[nu - 1];
  if (st == LW_OK && !(fabs (dt) >= FIT_DTILDE_LOW && fabs (dt) <= FIT_DTILDE_HIGH))
    {
      /* d̃ fixed: Σ c φ (+ d) − Σ c̃ φ·h = d̃·h */
      dt = dt == 0.0 ? 1.0 : copysign (fabs (dt) < FIT_DTILDE_LOW ? FIT_DTILDE_LOW
                                                                  : FIT_DTILDE_HIGH, dt);
      free (q.a);
      if (!acc_init (&q, nu - 1))
        st = lw_error_set (err, LW_ERR_NOMEM, -1, "model fit: out of memory");
      else
        {
          add_points (f, p, true, false, dt, &q, row, re, im, NULL);
          st = acc_solve (&q, N, Z, nz, x, err);
        }
    }
  free (q.a);
  free (Z);
  if (st == LW_OK)
    {
      /* the new poles: zeros of σ */
      st = zeros_with_d (p, N, x + ns, dt, A, b, p, err);
      for (size_t i = 0; st == LW_OK && i < N; i++)
        {
          if (!isfinite (creal (p[i])) || !isfinite (cimag (p[i])))
            st = lw_error_set (err, LW_ERR_NUMERIC, -1,
                               "model fit: a relocated pole is not finite");
          else if (creal (p[i]) > 0.0)
            p[i] = CMPLX (-creal (p[i]), cimag (p[i]));   /* reflected into the left half */
        }
    }
  free (w);
  return st;
}

/* ---- Residues, zeros and the model ----------------------------------------------------- */

/* Zeros and leading-coefficient gain of Σ c_i/(s − a_i) + d in normalized frequency.
 *   k = 0: the zeros are the eigenvalues of A − b·cᵀ/d, the gain d.
 *   k ≥ 1 (d = 0): the gain is the first non-vanishing Markov parameter g = C·A^(k−1)·b; the
 *     zeros are the eigenvalues of M = A − b·(C·A^k)/g on the null space of the rows
 *     C, C·A, …, C·A^(k−1), which M leaves invariant when C·A^m·b = 0 for m < k − 1 (the
 *     constraint of the fit): Zᵀ·M·Z with Z an orthonormal basis of that null space. The
 *     numerator therefore has degree N − k exactly; no leading coefficients are cut. */
static LwStatus
zeros_from_residues (const double complex *p, size_t N, size_t k, const double *c, double d,
                     double complex *zeros, double *gain, LwError *err)
{
  size_t nz = N - k;
  double *w = calloc (3 * N * N + 4 * N + k * N + nz * nz + 1, sizeof *w);
  if (w == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "model fit: out of memory");
  double *A = w, *b = A + N * N, *v = b + N, *tmp = v + N, *ca = tmp + N, *rows = ca + N;
  double *Zb = rows + k * N, *MZ = Zb + N * N, *T = MZ + N * N;
  LwStatus st = LW_OK;
  if (k == 0)
    {
      *gain = d;
      st = zeros_with_d (p, N, c, d, A, b, zeros, err);
      free (w);
      return st;
    }
  realize (p, N, A, b);
  /* C·A^(k−1) and C·A^k, unscaled */
  memcpy (v, c, N * sizeof *v);
  for (size_t m = 0; m < k; m++)
    {
      if (m == k - 1)
        memcpy (ca, v, N * sizeof *ca);
      gemm (true, N, 1, N, A, N, v, N, tmp, N);
      memcpy (v, tmp, N * sizeof *v);
    }
  double g = 0.0;
  for (size_t j = 0; j < N; j++)
    g += ca[j] * b[j];
  if (g == 0.0 || !isfinite (g))
    {
      free (w);
      return lw_error_set (err, LW_ERR_NUMERIC, -1, "model fit: the fitted response has no "
                           "term of the requested relative degree %zu", k);
    }
  *gain = g;
  /* M = A − b·(C·A^k)/g, in place of A (power_rows below needs A: copy first) */
  double *M = MZ;
  for (size_t j = 0; j < N; j++)
    for (size_t i = 0; i < N; i++)
      M[i + j * N] = A[i + j * N] - b[i] * v[j] / g;
  power_rows (A, b, c, N, k, true, v, tmp, rows);
  st = nz == 0 ? LW_OK : null_space (rows, k, N, Zb, err);
  if (st == LW_OK && nz > 0)
    {
      /* T = Zᵀ·M·Z: first A ← M·Z (N × nz), then T */
      gemm (false, N, nz, N, M, N, Zb, N, A, N);
      gemm (true, nz, nz, N, Zb, N, A, N, T, nz);
      st = lw_eigenvalues (nz, T, zeros, err);
    }
  free (w);
  return st;
}

/* Residues with the final poles (weighted least squares), then the model in rad/s. */
static LwStatus
model_from_poles (const Fit *f, const double complex *p, double omega0, LwModel **out,
                  LwError *err)
{
  size_t N = f->order, ns = N + (f->k == 0);
  double *Z, *w;
  size_t nzc;
  Acc q;
  LwStatus st = problem_init (f, p, ns, ns + 1 + 2 * N + ns, &q, &Z, &nzc, &w, err);
  if (st != LW_OK)
    return st;
  double complex *zeros = calloc (N + 1, sizeof *zeros);
  if (zeros == NULL)
    st = lw_error_set (err, LW_ERR_NOMEM, -1, "model fit: out of memory");
  double *row = w, *re = row + ns + 1, *im = re + N, *x = im + N;
  if (st == LW_OK)
    {
      add_points (f, p, false, false, 1.0, &q, row, re, im, NULL);
      st = acc_solve (&q, N, Z, nzc, x, err);
    }
  free (q.a);
  free (Z);
  double gain = 0.0;
  if (st == LW_OK)
    st = zeros_from_residues (p, N, f->k, x, f->k == 0 ? x[N] : 0.0, zeros, &gain, err);
  free (w);
  /* back to rad/s: H(s) = H_n(s/ω0) has the roots times ω0 and the gain times ω0^k */
  size_t nz = N - f->k;
  LwModel *m = NULL;
  if (st == LW_OK
      && (m = lw_model_new (LW_DOMAIN_S, 0.0, gain * pow (omega0, (double) f->k), nz, N)) == NULL)
    st = lw_error_set (err, LW_ERR_NOMEM, -1, "model fit: out of memory");
  for (size_t i = 0; m != NULL && i < N; i++)
    {
      m->poles[i] = omega0 * p[i];
      if (i < nz)
        m->zeros[i] = omega0 * zeros[i];
    }
  free (zeros);
  if (m != NULL)
    lw_model_canonicalize (m);
  if (m != NULL && !lw_model_is_finite (m))
    {
      lw_model_free (m);
      m = NULL;
      st = lw_error_set (err, LW_ERR_NUMERIC, -1, "model fit: the fitted model is not finite");
    }
  *out = m;
  return st;
}

static LwStatus
check_input (const double *omega_rad_s, const double complex *h, const double *weight,
             size_t n, int order, int relative_degree, int iterations, size_t *n_used,
             LwError *err)
{
  if (omega_rad_s == NULL || h == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "model fit: no data");
  if (order < 1 || order > FIT_MAX_ORDER)
    return lw_error_set (err, LW_ERR_INVALID, -1, "model fit: the order %d is outside 1 … %d",
                         order, FIT_MAX_ORDER);
  if (relative_degree < 0 || relative_degree > order)
    return lw_error_set (err, LW_ERR_INVALID, -1, "model fit: the relative degree %d is "
                         "outside 0 … %d (the order)", relative_degree, order);
  if (iterations < 0 || iterations > FIT_MAX_ITERATIONS)
    return lw_error_set (err, LW_ERR_INVALID, -1, "model fit: the number of iterations %d is "
                         "outside 0 … %d", iterations, FIT_MAX_ITERATIONS);
  size_t used = 0;
  for (size_t i = 0; i < n; i++)
    {
      if (!isfinite (omega_rad_s[i]) || omega_rad_s[i] <= 0.0)
        return lw_error_set (err, LW_ERR_INVALID, -1, "model fit: the frequency at point %zu "
                             "is not a finite positive number", i + 1);
      if (i > 0 && !(omega_rad_s[i] > omega_rad_s[i - 1]))
        return lw_error_set (err, LW_ERR_INVALID, -1, "model fit: the frequencies are not "
                             "strictly increasing at point %zu", i + 1);
      if (!isfinite (creal (h[i])) || !isfinite (cimag (h[i])))
        return lw_error_set (err, LW_ERR_INVALID, -1, "model fit: the response at point %zu "
                             "is not finite", i + 1);
      if (weight != NULL && (!isfinite (weight[i]) || weight[i] < 0.0))
        return lw_error_set (err, LW_ERR_INVALID, -1, "model fit: the weight at point %zu is "
                             "negative or not finite", i + 1);
      if (weight == NULL && h[i] == 0.0)
        return lw_error_set (err, LW_ERR_INVALID, -1, "model fit: the response at point %zu "
                             "is zero, where the relative weight 1/|h| is undefined", i + 1);
      if (weight == NULL || weight[i] > 0.0)
        used++;
    }
  size_t need = 2 * (size_t) order + 2;
  *n_used = used;
  if (used < need)
    return lw_error_set (err, LW_ERR_INVALID, -1, "model fit: %zu points (of non-zero weight) "
                         "are too few for order %d; at least %zu are needed", used, order, need);
  return LW_OK;
}

LwStatus
lw_measured_fit (const double *omega_rad_s, const double complex *h, const double *weight,
                 size_t n, int order, int relative_degree, int iterations, LwModel **out,
                 double *max_rel_error, LwError *err)
{
  lw_error_clear (err);
  if (out == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "model fit: no place for the result");
  *out = NULL;
  size_t n_used = 0;
  LwStatus st = check_input (omega_rad_s, h, weight, n, order, relative_degree, iterations,
                             &n_used, err);
  if (st != LW_OK)
    return st;

  size_t N = (size_t) order;
  double omega0 = sqrt (omega_rad_s[0] * omega_rad_s[n - 1]);
  Fit f = { .n = n, .n_used = n_used, .h = h, .order = N, .k = (size_t) relative_degree };
  f.x = malloc (2 * n * sizeof *f.x);
  double complex *p = calloc (N, sizeof *p);
  if (f.x == NULL || p == NULL)
    {
      free (f.x);
      free (p);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "model fit: out of memory");
    }
  f.w = f.x + n;
  for (size_t i = 0; i < n; i++)
    {
      f.x[i] = omega_rad_s[i] / omega0;
      f.w[i] = weight != NULL ? weight[i] : 1.0 / cabs (h[i]);
    }

  /* starting poles: pairs −β/100 ± jβ, β log-spaced over the data; a real one for odd N */
  double x_lo = f.x[0], x_hi = f.x[n - 1];
  size_t npairs = N / 2;
  for (size_t i = 0; i < npairs; i++)
    {
      double t = npairs > 1 ? (double) i / (double) (npairs - 1) : 0.5;
      double be = x_lo * pow (x_hi / x_lo, t);
      p[2 * i] = CMPLX (-be / 100.0, be);
      p[2 * i + 1] = CMPLX (-be / 100.0, -be);
    }
  if (N % 2 == 1)
    p[N - 1] = CMPLX (-1.0, 0.0);

  for (int it = 0; st == LW_OK && it < iterations; it++)
    st = relocate (&f, p, err);
  LwModel *m = NULL;
  if (st == LW_OK)
    st = model_from_poles (&f, p, omega0, &m, err);
  free (f.x);
  free (p);
  if (st != LW_OK)
    return st;

  if (max_rel_error != NULL)
    {
      /* points where h = 0 (possible only with given weights) have no relative error */
      double worst = 0.0;
      for (size_t i = 0; i < n; i++)
        if (h[i] != 0.0)
          {
            double e = cabs (lw_model_eval (m, CMPLX (0.0, omega_rad_s[i])) - h[i]) / cabs (h[i]);
            if (!(e <= worst))
              worst = e;
          }
      if (!isfinite (worst))
        {
          lw_model_free (m);
          return lw_error_set (err, LW_ERR_NUMERIC, -1, "model fit: the fitted model's response "
                               "is not finite at a measured point");
        }
      *max_rel_error = worst;
    }
  *out = m;
  return LW_OK;
}
