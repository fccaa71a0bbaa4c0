/* lw-linalg-hess.c — balancing a state space, its Hessenberg form, and the O(n²)
 * evaluator of C (xI − A)⁻¹ B + D on it (lw-linalg.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */

#include "lw-linalg-private.h"

/* A ← D⁻¹ A D by LAPACK dgebal (scaling only), B ← D⁻¹ B, C ← C D. */
LwStatus
lw_la_balance_scaling (LwSs *s, LwError *err)
{
  size_t n = s->n;
  if (n == 0)
    return LW_OK;
  lapack_int ilo, ihi;
  double *scale = lw_la_alloc_doubles (n);
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
  return lw_la_balance_scaling (s, err);
}

/* After A ← Qᵀ A Q (done by the caller): B ← Qᵀ B, C ← C Q, and the entries below the first
 * subdiagonal of A set to exactly 0. q is n×n column-major orthogonal. */
LwStatus
lw_la_apply_orthogonal (LwSs *s, const double *q, LwError *err)
{
  size_t n = s->n;
  double *tmp = lw_la_alloc_doubles (n);
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
  LwStatus st = lw_la_balance_scaling (s, err);
  if (st != LW_OK)
    return st;
  double *tau = lw_la_alloc_doubles (n), *q = lw_la_alloc_doubles (n * n);
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
    st = lw_la_apply_orthogonal (s, q, err);
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
  h->a_rows = lw_la_alloc_doubles (nn);
  h->b = lw_la_alloc_doubles (n);
  h->c = lw_la_alloc_doubles (n);
  h->mr = lw_la_alloc_doubles (nn);
  h->mi = lw_la_alloc_doubles (nn);
  h->xr = lw_la_alloc_doubles (n);
  h->xi = lw_la_alloc_doubles (n);
  h->pr_inv = lw_la_alloc_doubles (n);
  h->pi_inv = lw_la_alloc_doubles (n);
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
