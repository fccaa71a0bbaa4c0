/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "lw-linalg.h"

#include <lapacke.h>
#include <math.h>
#include <stdbool.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

size_t
lw_mul_size (size_t a, size_t b)
{
  if (a != 0 && b > SIZE_MAX / a)
    return 0;
  return a * b;
}

static double *
alloc_doubles (size_t count)
{
  size_t bytes = lw_mul_size (count == 0 ? 1 : count, sizeof (double));
  if (bytes == 0)
    return NULL;
  return calloc (1, bytes);
}

void
lw_matmul (size_t n, const double *a, const double *b, double *c)
{
  for (size_t j = 0; j < n; j++)
    {
      double *cj = c + j * n;
      for (size_t i = 0; i < n; i++)
        cj[i] = 0.0;
      for (size_t k = 0; k < n; k++)
        {
          double bkj = b[k + j * n];
          if (bkj == 0.0)
            continue;
          const double *ak = a + k * n;
          for (size_t i = 0; i < n; i++)
            cj[i] += ak[i] * bkj;
        }
    }
}

static double
norm1 (size_t n, const double *a)
{
  double best = 0.0;
  for (size_t j = 0; j < n; j++)
    {
      double s = 0.0;
      for (size_t i = 0; i < n; i++)
        s += fabs (a[i + j * n]);
      if (s > best)
        best = s;
    }
  return best;
}

LwStatus
lw_expm (size_t n, const double *a, double *out, LwError *err)
{
  /* Padé [13/13] coefficients and θ13 from Higham (2005), Table 2.3 / eq. (2.1). */
  static const double b[14] = {
    64764752532480000.0, 32382376266240000.0, 7771770303897600.0, 1187353796428800.0,
    129060195264000.0, 10559470521600.0, 670442572800.0, 33522128640.0, 1323241920.0,
    40840800.0, 960960.0, 16380.0, 182.0, 1.0 };
  const double theta13 = 5.371920351148152;

  if (n == 0)
    return LW_OK;
  size_t nn = lw_mul_size (n, n);
  if (nn == 0 || nn > SIZE_MAX / 8 / sizeof (double))
    return lw_error_set (err, LW_ERR_NOMEM, -1, "matrix of order %zu is too large", n);
  for (size_t i = 0; i < nn; i++)
    if (!isfinite (a[i]))
      return lw_error_set (err, LW_ERR_NUMERIC, -1, "matrix exponential of a non-finite matrix");

  double *w = alloc_doubles (8 * nn);
  int *ipiv = calloc (n, sizeof (int));
  if (w == NULL || ipiv == NULL)
    {
      free (w);
      free (ipiv);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory in the matrix exponential");
    }
  double *as = w, *a2 = w + nn, *a4 = w + 2 * nn, *a6 = w + 3 * nn;
  double *u = w + 4 * nn, *v = w + 5 * nn, *t1 = w + 6 * nn, *t2 = w + 7 * nn;

  double nrm = norm1 (n, a);
  int s = 0;
  if (nrm > theta13)
    s = (int) ceil (log2 (nrm / theta13));
  double scale = ldexp (1.0, -s);
  for (size_t i = 0; i < nn; i++)
    as[i] = a[i] * scale;

  lw_matmul (n, as, as, a2);
  lw_matmul (n, a2, a2, a4);
  lw_matmul (n, a4, a2, a6);

  /* U = A [A6 (b13 A6 + b11 A4 + b9 A2) + b7 A6 + b5 A4 + b3 A2 + b1 I] */
  for (size_t i = 0; i < nn; i++)
    t1[i] = b[13] * a6[i] + b[11] * a4[i] + b[9] * a2[i];
  lw_matmul (n, a6, t1, t2);
  for (size_t i = 0; i < nn; i++)
    t2[i] += b[7] * a6[i] + b[5] * a4[i] + b[3] * a2[i];
  for (size_t i = 0; i < n; i++)
    t2[i + i * n] += b[1];
  lw_matmul (n, as, t2, u);

  /* V = A6 (b12 A6 + b10 A4 + b8 A2) + b6 A6 + b4 A4 + b2 A2 + b0 I */
  for (size_t i = 0; i < nn; i++)
    t1[i] = b[12] * a6[i] + b[10] * a4[i] + b[8] * a2[i];
  lw_matmul (n, a6, t1, v);
  for (size_t i = 0; i < nn; i++)
    v[i] += b[6] * a6[i] + b[4] * a4[i] + b[2] * a2[i];
  for (size_t i = 0; i < n; i++)
    v[i + i * n] += b[0];

  /* (V − U) X = (V + U) */
  for (size_t i = 0; i < nn; i++)
    {
      t1[i] = v[i] - u[i];
      out[i] = v[i] + u[i];
    }
  lapack_int info = LAPACKE_dgesv (LAPACK_COL_MAJOR, (lapack_int) n, (lapack_int) n, t1,
                                   (lapack_int) n, ipiv, out, (lapack_int) n);
  if (info != 0)
    {
      free (w);
      free (ipiv);
      return lw_error_set (err, LW_ERR_NUMERIC, -1,
                           "matrix exponential: Padé denominator is singular (dgesv info %d)",
                           (int) info);
    }
  for (int k = 0; k < s; k++)
    {
      memcpy (t1, out, nn * sizeof (double));
      lw_matmul (n, t1, t1, out);
    }
  free (w);
  free (ipiv);
  for (size_t i = 0; i < nn; i++)
    if (!isfinite (out[i]))
      return lw_error_set (err, LW_ERR_NUMERIC, -1, "matrix exponential overflowed");
  return LW_OK;
}

LwSs *
lw_ss_new (size_t n)
{
  LwSs *s = calloc (1, sizeof *s);
  if (s == NULL)
    return NULL;
  s->n = n;
  size_t nn = lw_mul_size (n, n);
  if (n > 0 && nn == 0)
    {
      free (s);
      return NULL;
    }
  s->a = alloc_doubles (nn);
  s->b = alloc_doubles (n);
  s->c = alloc_doubles (n);
  if (s->a == NULL || s->b == NULL || s->c == NULL)
    {
      lw_ss_free (s);
      return NULL;
    }
  return s;
}

void
lw_ss_free (LwSs *s)
{
  if (s == NULL)
    return;
  free (s->a);
  free (s->b);
  free (s->c);
  free (s);
}

LwSs *
lw_ss_copy (const LwSs *s)
{
  LwSs *c = lw_ss_new (s->n);
  if (c == NULL)
    return NULL;
  memcpy (c->a, s->a, s->n * s->n * sizeof (double));
  memcpy (c->b, s->b, s->n * sizeof (double));
  memcpy (c->c, s->c, s->n * sizeof (double));
  c->d = s->d;
  return c;
}

/* A ← D⁻¹ A D by LAPACK dgebal (scaling only), B ← D⁻¹ B, C ← C D. */
static LwStatus
balance_scaling (LwSs *s, LwError *err)
{
  size_t n = s->n;
  if (n == 0)
    return LW_OK;
  lapack_int ilo, ihi;
  double *scale = alloc_doubles (n);
  if (scale == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory while balancing");
  lapack_int info = LAPACKE_dgebal (LAPACK_COL_MAJOR, 'S', (lapack_int) n, s->a,
                                    (lapack_int) n, &ilo, &ihi, scale);
  if (info != 0)
    {
      free (scale);
      return lw_error_set (err, LW_ERR_NUMERIC, -1, "balancing failed (dgebal info %d)",
                           (int) info);
    }
  for (size_t i = 0; i < n; i++)
    {
      s->b[i] /= scale[i];
      s->c[i] *= scale[i];
    }
  free (scale);
  return LW_OK;
}

LwStatus
lw_ss_balance (LwSs *s, LwError *err)
{
  return balance_scaling (s, err);
}

/* After A ← Qᵀ A Q (done by the caller): B ← Qᵀ B, C ← C Q, and the entries below the first
 * subdiagonal of A set to exactly 0. q is n×n column-major orthogonal. */
static LwStatus
apply_orthogonal (LwSs *s, const double *q, LwError *err)
{
  size_t n = s->n;
  double *tmp = alloc_doubles (n);
  if (tmp == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory in a similarity transform");
  for (size_t j = 0; j < n; j++)
    for (size_t i = j + 2; i < n; i++)
      s->a[i + j * n] = 0.0;
  for (size_t i = 0; i < n; i++)
    {
      double acc = 0.0;
      for (size_t k = 0; k < n; k++)
        acc += q[k + i * n] * s->b[k];
      tmp[i] = acc;
    }
  memcpy (s->b, tmp, n * sizeof (double));
  for (size_t j = 0; j < n; j++)
    {
      double acc = 0.0;
      for (size_t k = 0; k < n; k++)
        acc += s->c[k] * q[k + j * n];
      tmp[j] = acc;
    }
  memcpy (s->c, tmp, n * sizeof (double));
  free (tmp);
  return LW_OK;
}

LwStatus
lw_ss_balance_hessenberg (LwSs *s, LwError *err)
{
  size_t n = s->n;
  if (n <= 1)
    return LW_OK;
  LwStatus st = balance_scaling (s, err);
  if (st != LW_OK)
    return st;
  double *tau = alloc_doubles (n), *q = alloc_doubles (n * n);
  if (tau == NULL || q == NULL)
    {
      free (tau);
      free (q);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory in the Hessenberg reduction");
    }
  lapack_int info = LAPACKE_dgehrd (LAPACK_COL_MAJOR, (lapack_int) n, 1, (lapack_int) n, s->a,
                                    (lapack_int) n, tau);
  if (info == 0)
    {
      memcpy (q, s->a, n * n * sizeof (double));
      info = LAPACKE_dorghr (LAPACK_COL_MAJOR, (lapack_int) n, 1, (lapack_int) n, q,
                             (lapack_int) n, tau);
    }
  if (info != 0)
    st = lw_error_set (err, LW_ERR_NUMERIC, -1, "Hessenberg reduction failed (LAPACK info %d)",
                       (int) info);
  else
    st = apply_orthogonal (s, q, err);
  free (tau);
  free (q);
  return st;
}

struct LwHessEval {
  size_t n;
  double *a_rows;           /* A row-major, Hessenberg: row i holds columns i−1 … n−1 */
  double *b;
  double *c;
  double d;
  double *mr, *mi;          /* workspace n×n row-major, real and imaginary parts */
  double *xr, *xi;          /* workspace n */
  double *pr_inv, *pi_inv;  /* reciprocals of U's diagonal */
};

LwHessEval *
lw_hess_eval_new (const LwSs *s)
{
  LwHessEval *h = calloc (1, sizeof *h);
  if (h == NULL)
    return NULL;
  size_t n = s->n;
  h->n = n;
  h->d = s->d;
  size_t nn = n * n;
  h->a_rows = alloc_doubles (nn);
  h->b = alloc_doubles (n);
  h->c = alloc_doubles (n);
  h->mr = alloc_doubles (nn);
  h->mi = alloc_doubles (nn);
  h->xr = alloc_doubles (n);
  h->xi = alloc_doubles (n);
  h->pr_inv = alloc_doubles (n);
  h->pi_inv = alloc_doubles (n);
  if (h->a_rows == NULL || h->b == NULL || h->c == NULL || h->mr == NULL || h->mi == NULL
      || h->xr == NULL || h->xi == NULL || h->pr_inv == NULL || h->pi_inv == NULL)
    {
      lw_hess_eval_free (h);
      return NULL;
    }
  for (size_t i = 0; i < n; i++)
    for (size_t j = 0; j < n; j++)
      h->a_rows[i * n + j] = s->a[i + j * n];
  memcpy (h->b, s->b, n * sizeof (double));
  memcpy (h->c, s->c, n * sizeof (double));
  return h;
}

void
lw_hess_eval_free (LwHessEval *h)
{
  if (h == NULL)
    return;
  free (h->a_rows);
  free (h->b);
  free (h->c);
  free (h->mr);
  free (h->mi);
  free (h->xr);
  free (h->xi);
  free (h->pr_inv);
  free (h->pi_inv);
  free (h);
}

/* Written in real arithmetic on split real/imaginary arrays: C99 complex multiply and divide
 * go through NaN/overflow-checking library calls (__muldc3/__divdc3) that cost more than the
 * solve itself. The matrix is balanced, so the textbook reciprocal 1/(a+ib) = (a−ib)/(a²+b²)
 * is safe from overflow. Pivoting compares |re| + |im|, which is all the choice needs.
 *
 * Elimination streams the rows of xI − A: at step k one "carried" row (the survivor of the
 * previous steps, complex) meets row k+1 read straight from A (real but for its diagonal). The
 * larger pivot of the two becomes row k of U and is stored; the other, with the pivot column
 * eliminated, is carried on. U then goes through back substitution. */
double complex
lw_hess_eval (LwHessEval *h, double complex xpt)
{
  size_t n = h->n;
  if (n == 0)
    return h->d;
  double *ur = h->mr, *ui = h->mi;          /* U, row-major; row k holds columns k … n−1 */
  double *xr = h->xr, *xi = h->xi;          /* right-hand side after elimination */
  const double *a = h->a_rows;
  const double zr = creal (xpt), zi = cimag (xpt);
  /* carried row, kept in the last row of the workspace (row n−1 of U is written last) */
  double *cr = ur + (n - 1) * n, *ci = ui + (n - 1) * n;
  for (size_t j = 0; j < n; j++)
    {
      cr[j] = -a[j];
      ci[j] = 0.0;
    }
  cr[0] += zr;
  ci[0] = zi;
  double cbr = h->b[0], cbi = 0.0;
  for (size_t k = 0; k + 1 < n; k++)
    {
      const double *an = a + (k + 1) * n;   /* row k+1 of A */
      double *dr = ur + k * n, *di = ui + k * n;
      /* new row entries: column j of row k+1 of xI − A */
      double sr_k = -an[k];                 /* its entry in the pivot column k (real) */
      double pr = cr[k], pi = ci[k];
      double nb = h->b[k + 1];
      if (fabs (sr_k) > fabs (pr) + fabs (pi))
        {
          /* the fresh row is the pivot: store it as U row k, carry the old one eliminated */
          double inv = 1.0 / sr_k;
          double fr = pr * inv, fi = pi * inv;   /* f = carried[k] / fresh[k] (fresh is real) */
          dr[k] = sr_k;
          di[k] = 0.0;
          h->pr_inv[k] = inv;
          h->pi_inv[k] = 0.0;
          for (size_t j = k + 1; j < n; j++)
            {
              double vr = -an[j], vi = 0.0;
              if (j == k + 1)
                {
                  vr += zr;
                  vi = zi;
                }
              double or_ = cr[j], oi = ci[j];
              dr[j] = vr;
              di[j] = vi;
              cr[j] = or_ - (fr * vr - fi * vi);
              ci[j] = oi - (fr * vi + fi * vr);
            }
          xr[k] = nb;
          xi[k] = 0.0;
          double obr = cbr, obi = cbi;
          cbr = obr - fr * nb;
          cbi = obi - fi * nb;
        }
      else
        {
          double den = pr * pr + pi * pi;
          if (den == 0.0)
            return NAN + NAN * I;
          double ir = pr / den, ii = -pi / den;  /* 1 / carried[k] */
          h->pr_inv[k] = ir;
          h->pi_inv[k] = ii;
          /* f = fresh[k] / carried[k] */
          double fr = sr_k * ir, fi = sr_k * ii;
          dr[k] = pr;
          di[k] = pi;
          for (size_t j = k + 1; j < n; j++)
            {
              double vr = -an[j], vi = 0.0;
              if (j == k + 1)
                {
                  vr += zr;
                  vi = zi;
                }
              double or_ = cr[j], oi = ci[j];
              dr[j] = or_;
              di[j] = oi;
              cr[j] = vr - (fr * or_ - fi * oi);
              ci[j] = vi - (fr * oi + fi * or_);
            }
          double obr = cbr, obi = cbi;
          xr[k] = obr;
          xi[k] = obi;
          cbr = nb - (fr * obr - fi * obi);
          cbi = -(fr * obi + fi * obr);
        }
    }
  /* the carried row is U row n−1 (already in place) */
  xr[n - 1] = cbr;
  xi[n - 1] = cbi;
  {
    double pr = cr[n - 1], pi = ci[n - 1], den = pr * pr + pi * pi;
    if (den == 0.0)
      return NAN + NAN * I;
    h->pr_inv[n - 1] = pr / den;
    h->pi_inv[n - 1] = -pi / den;
  }
  double yr = h->d, yi = 0.0;
  for (size_t ii = n; ii-- > 0;)
    {
      const double *rir = ur + ii * n, *rii = ui + ii * n;
      double accr = xr[ii], acci = xi[ii];
      for (size_t j = ii + 1; j < n; j++)
        {
          accr -= rir[j] * xr[j] - rii[j] * xi[j];
          acci -= rir[j] * xi[j] + rii[j] * xr[j];
        }
      double ir = h->pr_inv[ii], ii_ = h->pi_inv[ii];
      xr[ii] = accr * ir - acci * ii_;
      xi[ii] = accr * ii_ + acci * ir;
      yr += h->c[ii] * xr[ii];
      yi += h->c[ii] * xi[ii];
    }
  return yr + yi * I;
}

LwStatus
lw_ss_balance_schur (LwSs *s, LwError *err)
{
  size_t n = s->n;
  if (n == 0)
    return LW_OK;
  LwStatus st = balance_scaling (s, err);
  if (st != LW_OK)
    return st;
  lapack_int sdim = 0;
  double *wr = alloc_doubles (n), *wi = alloc_doubles (n), *z = alloc_doubles (n * n);
  if (wr == NULL || wi == NULL || z == NULL)
    {
      free (wr); free (wi); free (z);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory while reducing to Schur form");
    }
  lapack_int info = LAPACKE_dgees (LAPACK_COL_MAJOR, 'V', 'N', NULL, (lapack_int) n, s->a,
                                   (lapack_int) n, &sdim, wr, wi, z, (lapack_int) n);
  if (info != 0)
    st = lw_error_set (err, LW_ERR_NUMERIC, -1, "Schur reduction failed (dgees info %d)",
                       (int) info);
  else
    st = apply_orthogonal (s, z, err);
  free (wr); free (wi); free (z);
  return st;
}

struct LwSchurEval {
  size_t n;
  double *t_rows;           /* T row-major */
  double *b, *c, d;
  unsigned char *block;     /* block[i] = 2 when rows i, i+1 form a 2×2 block, 1 for 1×1, 0 for the
                               second row of a 2×2 block */
  double *one_minus_diag;   /* 1 − T_ii, exact for T_ii in [0.5, 2] (Sterbenz) */
  double *t_abs;            /* |T| row-major, for the running error bound */
};

LwSchurEval *
lw_schur_eval_new (const LwSs *s)
{
  LwSchurEval *h = calloc (1, sizeof *h);
  if (h == NULL)
    return NULL;
  size_t n = s->n;
  h->n = n;
  h->d = s->d;
  h->t_rows = alloc_doubles (n * n);
  h->b = alloc_doubles (n);
  h->c = alloc_doubles (n);
  h->block = calloc (n + 1, 1);
  h->one_minus_diag = alloc_doubles (n);
  h->t_abs = alloc_doubles (n * n);
  if (h->t_abs == NULL || h->one_minus_diag == NULL || h->t_rows == NULL || h->b == NULL
      || h->c == NULL || h->block == NULL)
    {
      lw_schur_eval_free (h);
      return NULL;
    }
  for (size_t i = 0; i < n; i++)
    for (size_t j = 0; j < n; j++)
      {
        h->t_rows[i * n + j] = s->a[i + j * n];
        h->t_abs[i * n + j] = fabs (s->a[i + j * n]);
      }
  memcpy (h->b, s->b, n * sizeof (double));
  memcpy (h->c, s->c, n * sizeof (double));
  for (size_t i = 0; i < n; i++)
    h->one_minus_diag[i] = 1.0 - s->a[i + i * n];
  for (size_t i = 0; i < n;)
    {
      if (i + 1 < n && s->a[(i + 1) + i * n] != 0.0)
        {
          h->block[i] = 2;
          h->block[i + 1] = 0;
          i += 2;
        }
      else
        h->block[i++] = 1;
    }
  return h;
}

void
lw_schur_eval_free (LwSchurEval *h)
{
  if (h == NULL)
    return;
  free (h->t_rows);
  free (h->b);
  free (h->c);
  free (h->block);
  free (h->one_minus_diag);
  free (h->t_abs);
  free (h);
}

/* Solves (xI − T) v = r by block back substitution; r given as (rr, ri) (ri may be NULL for a
 * real right-hand side), v written to (vr, vi). The point is passed as x = 1 + zm1 + j·zi and each
 * diagonal term x − t_ii as zm1 + (1 − t_ii), with 1 − t_ii stored exactly: near z = 1 (fast
 * sampling, poles clustered there) this avoids the cancellation of cos ωT − t_ii. Returns false if
 * xI − T is singular. */
static bool
schur_solve (const LwSchurEval *h, double zm1, double zi, const double *rr, const double *ri,
             double *vr, double *vi)
{
  const double *omt = h->one_minus_diag;
  size_t n = h->n;
  const double *t = h->t_rows;
  for (size_t ii = n; ii-- > 0;)
    {
      if (h->block[ii] == 0)
        continue;               /* second row of a 2×2 block: solved with its first row */
      size_t i = ii;
      size_t j0 = i + h->block[i];
      /* s = r_i + Σ_{j ≥ j0} T_ij v_j  (the off-diagonal part of xI − T is −T) */
      const double *ti = t + i * n;
      double s1r = rr[i], s1i = ri ? ri[i] : 0.0;
      for (size_t j = j0; j < n; j++)
        {
          s1r += ti[j] * vr[j];
          s1i += ti[j] * vi[j];
        }
      if (h->block[i] == 1)
        {
          double pr = zm1 + omt[i], pi = zi, den = pr * pr + pi * pi;
          if (den == 0.0)
            return false;
          vr[i] = (s1r * pr + s1i * pi) / den;
          vi[i] = (s1i * pr - s1r * pi) / den;
        }
      else
        {
          const double *tn = t + (i + 1) * n;
          double s2r = rr[i + 1], s2i = ri ? ri[i + 1] : 0.0;
          for (size_t j = j0; j < n; j++)
            {
              s2r += tn[j] * vr[j];
              s2i += tn[j] * vi[j];
            }
          /* [[x − t11, −t12], [−t21, x − t22]] */
          double ar = zm1 + omt[i], ai = zi, dr = zm1 + omt[i + 1], di = zi;
          double t12 = ti[i + 1], t21 = tn[i];
          double detr = ar * dr - ai * di - t12 * t21, deti = ar * di + ai * dr;
          double den = detr * detr + deti * deti;
          if (den == 0.0)
            return false;
          double ir = detr / den, iim = -deti / den;
          /* v1 = ((x − t22) s1 + t12 s2)/det, v2 = (t21 s1 + (x − t11) s2)/det */
          double n1r = dr * s1r - di * s1i + t12 * s2r, n1i = dr * s1i + di * s1r + t12 * s2i;
          double n2r = t21 * s1r + ar * s2r - ai * s2i, n2i = t21 * s1i + ar * s2i + ai * s2r;
          vr[i] = n1r * ir - n1i * iim;
          vi[i] = n1r * iim + n1i * ir;
          vr[i + 1] = n2r * ir - n2i * iim;
          vi[i + 1] = n2r * iim + n2i * ir;
        }
    }
  return true;
}

/* The solves' vectors, per call: the evaluator itself is read-only once made, so one sampled
 * plant can be evaluated from several threads at once (the window's worker and its main
 * thread). Up to WORK_STACK states on the stack, beyond that on the heap. */
#define WORK_STACK 96

typedef struct
{
  double *xr, *xi, *wr, *wi;
  double *heap;
  double stack[4 * WORK_STACK];
} Work;

static bool
work_init (Work *w, size_t n)
{
  w->heap = NULL;
  double *base = w->stack;
  if (n > WORK_STACK)
    {
      size_t nn = lw_mul_size (n, 4);
      w->heap = nn != 0 ? malloc (nn * sizeof (double)) : NULL;
      if (w->heap == NULL)
        return false;
      base = w->heap;
    }
  w->xr = base;
  w->xi = base + n;
  w->wr = base + 2 * n;
  w->wi = base + 3 * n;
  return true;
}

static void
work_clear (Work *w)
{
  free (w->heap);
  w->heap = NULL;
}

/* C v + D with v in w->xr, w->xi */
static double complex
output (const LwSchurEval *h, const Work *w)
{
  double yr = h->d, yi = 0.0;
  for (size_t i = 0; i < h->n; i++)
    {
      yr += h->c[i] * w->xr[i];
      yi += h->c[i] * w->xi[i];
    }
  return yr + yi * I;
}

double complex
lw_schur_eval (const LwSchurEval *h, double complex xpt)
{
  size_t n = h->n;
  if (n == 0)
    return h->d;
  Work w;
  if (!work_init (&w, n))
    return NAN + NAN * I;
  double complex y = NAN + NAN * I;
  if (schur_solve (h, creal (xpt) - 1.0, cimag (xpt), h->b, NULL, w.xr, w.xi))
    y = output (h, &w);
  work_clear (&w);
  return y;
}

double complex
lw_schur_eval_unit (const LwSchurEval *h, double cos_wt, double sin_wt)
{
  size_t n = h->n;
  if (n == 0)
    return h->d;
  /* cos θ − 1 = −sin²θ / (1 + cos θ) without cancellation when cos θ > 0 */
  double zm1 = cos_wt > 0.0 ? -(sin_wt * sin_wt) / (1.0 + cos_wt) : cos_wt - 1.0;
  Work w;
  if (!work_init (&w, n))
    return NAN + NAN * I;
  double complex y = NAN + NAN * I;
  if (schur_solve (h, zm1, sin_wt, h->b, NULL, w.xr, w.xi))
    y = output (h, &w);
  work_clear (&w);
  return y;
}

/* cos θ − 1 = −sin²θ / (1 + cos θ) without cancellation when cos θ > 0 */
static double
unit_zm1 (double cos_wt, double sin_wt)
{
  return cos_wt > 0.0 ? -(sin_wt * sin_wt) / (1.0 + cos_wt) : cos_wt - 1.0;
}

/* |a + jb| without the overflow guard of hypot (a libm call per element); the magnitudes here
 * stay far inside the double range or the bound is meaningless anyway */
static inline double
cabs_fast (double a, double b)
{
  return sqrt (a * a + b * b);
}

double complex
lw_schur_eval_unit_err (const LwSchurEval *h, double cos_wt, double sin_wt, double *err_abs)
{
  size_t n = h->n;
  const double u = 1.1102230246251565e-16;
  if (n == 0)
    {
      *err_abs = u * fabs (h->d);
      return h->d;
    }
  double zm1 = unit_zm1 (cos_wt, sin_wt);
  Work w;
  if (!work_init (&w, n) || !schur_solve (h, zm1, sin_wt, h->b, NULL, w.xr, w.xi))
    {
      work_clear (&w);
      *err_abs = INFINITY;
      return NAN + NAN * I;
    }
  const double *omt = h->one_minus_diag, *ta = h->t_abs;
  double *av = w.wr, *q = w.wi;        /* |v_j|, and γ|v_j| + (bound on |δv_j|) */
  double gam = u * (double) (n + 4);
  double dp = u * fabs (zm1);          /* rounding of x − t_ii = zm1 + (1 − t_ii) */
  double s2 = sin_wt * sin_wt;
  for (size_t ii = n; ii-- > 0;)
    {
      if (h->block[ii] == 0)
        continue;
      size_t i = ii, j0 = i + h->block[i];
      const double *ti = ta + i * n;
      /* bound on the error of s_i = b_i + Σ T_ij v_j: the sum's rounding, each entry of T and B
       * perturbed by γ relative, and the errors of the v_j already solved */
      double g1 = gam * fabs (h->b[i]);
      for (size_t j = j0; j < n; j++)
        g1 += ti[j] * q[j];
      if (h->block[i] == 1)
        {
          double pr = zm1 + omt[i], pm = cabs_fast (pr, sin_wt);
          /* the stored T_ii (e^{λT} near 1 when sampling fast) carries a rounding of u·|T_ii|,
           * which is large against 1 − T_ii: perturb the diagonal by that, not by u·|1 − T_ii| */
          double dpi = dp + gam * (fabs (1.0 - omt[i]) + fabs (omt[i])) + gam * pm;
          av[i] = cabs_fast (w.xr[i], w.xi[i]);
          q[i] = gam * av[i] + (g1 + dpi * av[i]) / pm;
        }
      else
        {
          const double *tn = ta + (i + 1) * n;
          double g2 = gam * fabs (h->b[i + 1]);
          for (size_t j = j0; j < n; j++)
            g2 += tn[j] * q[j];
          double ar = zm1 + omt[i], dr = zm1 + omt[i + 1];
          double am = sqrt (ar * ar + s2), dm = sqrt (dr * dr + s2);
          const double *tr = h->t_rows;
          double t12 = ti[i + 1], t21 = tn[i];
          double detr = ar * dr - s2 - tr[i * n + i + 1] * tr[(i + 1) * n + i];
          double deti = sin_wt * (ar + dr);
          double det = cabs_fast (detr, deti);
          double a1 = cabs_fast (w.xr[i], w.xi[i]), a2 = cabs_fast (w.xr[i + 1], w.xi[i + 1]);
          /* the determinant's own rounding and that of the block's entries */
          double ddet = gam * (am * dm + t12 * t21)
                        + (dp + gam * (fabs (1.0 - omt[i]) + fabs (omt[i]))) * dm
                        + (dp + gam * (fabs (1.0 - omt[i + 1]) + fabs (omt[i + 1]))) * am;
          double r1 = g1 + gam * (am * a1 + t12 * a2);
          double r2 = g2 + gam * (t21 * a1 + dm * a2);
          av[i] = a1;
          av[i + 1] = a2;
          q[i] = gam * a1 + (dm * r1 + t12 * r2 + ddet * a1) / det;
          q[i + 1] = gam * a2 + (t21 * r1 + am * r2 + ddet * a2) / det;
        }
    }
  double err = gam * fabs (h->d), yr = h->d, yi = 0.0;
  for (size_t i = 0; i < n; i++)
    {
      err += fabs (h->c[i]) * q[i];
      yr += h->c[i] * w.xr[i];
      yi += h->c[i] * w.xi[i];
    }
  work_clear (&w);
  *err_abs = err;
  return yr + yi * I;
}

double complex
lw_schur_eval_deriv (const LwSchurEval *h, double complex xpt, double complex *deriv)
{
  size_t n = h->n;
  *deriv = 0.0;
  if (n == 0)
    return h->d;
  Work w;
  if (!work_init (&w, n))
    return NAN + NAN * I;
  double complex y = NAN + NAN * I;
  /* v = (xI − T)⁻¹ B, then d/dx C (xI − T)⁻¹ B = −C (xI − T)⁻² B = −C (xI − T)⁻¹ v */
  if (schur_solve (h, creal (xpt) - 1.0, cimag (xpt), h->b, NULL, w.xr, w.xi)
      && schur_solve (h, creal (xpt) - 1.0, cimag (xpt), w.xr, w.xi, w.wr, w.wi))
    {
      y = output (h, &w);
      double dr = 0.0, di = 0.0;
      for (size_t i = 0; i < n; i++)
        {
          dr -= h->c[i] * w.wr[i];
          di -= h->c[i] * w.wi[i];
        }
      *deriv = dr + di * I;
    }
  work_clear (&w);
  return y;
}

LwStatus
lw_eigenvalues (size_t n, const double *a, double complex *ev, LwError *err)
{
  if (n == 0)
    return LW_OK;
  double *w = alloc_doubles (n * n + 2 * n);
  if (w == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for eigenvalues");
  double *ac = w, *wr = w + n * n, *wi = wr + n;
  memcpy (ac, a, n * n * sizeof (double));
  lapack_int info = LAPACKE_dgeev (LAPACK_COL_MAJOR, 'N', 'N', (lapack_int) n, ac,
                                   (lapack_int) n, wr, wi, NULL, 1, NULL, 1);
  if (info != 0)
    {
      free (w);
      return lw_error_set (err, LW_ERR_NUMERIC, -1, "eigenvalue computation failed (dgeev info %d)",
                           (int) info);
    }
  for (size_t i = 0; i < n; i++)
    ev[i] = wr[i] + wi[i] * I;
  free (w);
  return LW_OK;
}

LwStatus
lw_ss_zeros (const LwSs *s, double complex *zeros, size_t *n_zeros, LwError *err)
{
  size_t n = s->n, m = n + 1;
  *n_zeros = 0;
  if (n == 0)
    return LW_OK;
  double *w = alloc_doubles (2 * m * m + 3 * m);
  if (w == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for zeros");
  double *pa = w, *pb = w + m * m, *ar = pb + m * m, *ai = ar + m, *be = ai + m;
  for (size_t j = 0; j < n; j++)
    {
      for (size_t i = 0; i < n; i++)
        pa[i + j * m] = s->a[i + j * n];
      pa[n + j * m] = s->c[j];
      pb[j + j * m] = 1.0;
    }
  for (size_t i = 0; i < n; i++)
    pa[i + n * m] = s->b[i];
  pa[n + n * m] = s->d;
  lapack_int info = LAPACKE_dggev (LAPACK_COL_MAJOR, 'N', 'N', (lapack_int) m, pa,
                                   (lapack_int) m, pb, (lapack_int) m, ar, ai, be, NULL, 1,
                                   NULL, 1);
  if (info != 0)
    {
      free (w);
      return lw_error_set (err, LW_ERR_NUMERIC, -1, "zero computation failed (dggev info %d)",
                           (int) info);
    }
  /* Finite generalized eigenvalues: |β| not negligible against |α|. */
  double anorm = 0.0;
  for (size_t i = 0; i < n; i++)
    for (size_t j = 0; j < n; j++)
      anorm = fmax (anorm, fabs (s->a[i + j * n]));
  anorm = fmax (anorm, 1.0);
  size_t k = 0;
  for (size_t i = 0; i < m; i++)
    {
      double mag = cabs_fast (ar[i], ai[i]);
      if (fabs (be[i]) > 1e-10 * mag / anorm && fabs (be[i]) > 0.0 && k < n)
        zeros[k++] = (ar[i] + ai[i] * I) / be[i];
    }
  *n_zeros = k;
  free (w);
  return LW_OK;
}

LwStatus
lw_solve (size_t n, const double *a, double *b, LwError *err)
{
  if (n == 0)
    return LW_OK;
  double *ac = alloc_doubles (n * n);
  int *ipiv = calloc (n, sizeof (int));
  if (ac == NULL || ipiv == NULL)
    {
      free (ac);
      free (ipiv);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory in a linear solve");
    }
  memcpy (ac, a, n * n * sizeof (double));
  lapack_int info = LAPACKE_dgesv (LAPACK_COL_MAJOR, (lapack_int) n, 1, ac, (lapack_int) n, ipiv,
                                   b, (lapack_int) n);
  free (ac);
  free (ipiv);
  if (info != 0)
    return lw_error_set (err, LW_ERR_NUMERIC, -1, "singular linear system (dgesv info %d)",
                         (int) info);
  return LW_OK;
}
