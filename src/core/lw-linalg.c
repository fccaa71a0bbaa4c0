/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "lw-linalg.h"

#include <lapacke.h>
#include <math.h>
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

LwStatus
lw_ss_balance_hessenberg (LwSs *s, LwError *err)
{
  size_t n = s->n;
  if (n <= 1)
    return LW_OK;
  lapack_int ilo, ihi;
  double *scale = alloc_doubles (n);
  double *tau = alloc_doubles (n);
  double *q = alloc_doubles (n * n);
  double *tmp = alloc_doubles (n);
  if (scale == NULL || tau == NULL || q == NULL || tmp == NULL)
    {
      free (scale); free (tau); free (q); free (tmp);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory while balancing");
    }
  LwStatus st = LW_OK;
  lapack_int info = LAPACKE_dgebal (LAPACK_COL_MAJOR, 'S', (lapack_int) n, s->a,
                                    (lapack_int) n, &ilo, &ihi, scale);
  if (info != 0)
    {
      st = lw_error_set (err, LW_ERR_NUMERIC, -1, "balancing failed (dgebal info %d)", (int) info);
      goto out;
    }
  /* A ← D⁻¹ A D was applied by dgebal; apply the same to B (D⁻¹ B) and C (C D). */
  for (size_t i = 0; i < n; i++)
    {
      s->b[i] /= scale[i];
      s->c[i] *= scale[i];
    }
  info = LAPACKE_dgehrd (LAPACK_COL_MAJOR, (lapack_int) n, 1, (lapack_int) n, s->a,
                         (lapack_int) n, tau);
  if (info != 0)
    {
      st = lw_error_set (err, LW_ERR_NUMERIC, -1, "Hessenberg reduction failed (dgehrd info %d)",
                         (int) info);
      goto out;
    }
  memcpy (q, s->a, n * n * sizeof (double));
  info = LAPACKE_dorghr (LAPACK_COL_MAJOR, (lapack_int) n, 1, (lapack_int) n, q, (lapack_int) n,
                         tau);
  if (info != 0)
    {
      st = lw_error_set (err, LW_ERR_NUMERIC, -1, "forming Q failed (dorghr info %d)", (int) info);
      goto out;
    }
  for (size_t j = 0; j < n; j++)
    for (size_t i = j + 2; i < n; i++)
      s->a[i + j * n] = 0.0;
  /* B ← Qᵀ B, C ← C Q */
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
out:
  free (scale); free (tau); free (q); free (tmp);
  return st;
}

struct LwHessEval {
  size_t n;
  double *a_rows;           /* A row-major, Hessenberg: row i holds columns i−1 … n−1 */
  double *b;
  double *c;
  double d;
  double complex *m;        /* workspace n×n row-major */
  double complex *x;        /* workspace n */
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
  h->m = calloc (nn == 0 ? 1 : nn, sizeof (double complex));
  h->x = calloc (n == 0 ? 1 : n, sizeof (double complex));
  if (h->a_rows == NULL || h->b == NULL || h->c == NULL || h->m == NULL || h->x == NULL)
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
  free (h->m);
  free (h->x);
  free (h);
}

double complex
lw_hess_eval (LwHessEval *h, double complex xpt)
{
  size_t n = h->n;
  if (n == 0)
    return h->d;
  double complex *m = h->m, *x = h->x;
  const double *a = h->a_rows;
  /* M = xI − A, rows stored from column max(i−1, 0). */
  for (size_t i = 0; i < n; i++)
    {
      size_t j0 = i == 0 ? 0 : i - 1;
      for (size_t j = j0; j < n; j++)
        m[i * n + j] = -a[i * n + j];
      m[i * n + i] += xpt;
      x[i] = h->b[i];
    }
  /* Forward elimination: only row k+1 has an entry below the diagonal of column k. */
  for (size_t k = 0; k + 1 < n; k++)
    {
      double complex *rk = m + k * n, *rk1 = m + (k + 1) * n;
      if (cabs (rk1[k]) > cabs (rk[k]))
        {
          for (size_t j = k; j < n; j++)
            {
              double complex t = rk[j];
              rk[j] = rk1[j];
              rk1[j] = t;
            }
          double complex t = x[k];
          x[k] = x[k + 1];
          x[k + 1] = t;
        }
      if (rk[k] == 0.0)
        return NAN + NAN * I;
      double complex f = rk1[k] / rk[k];
      if (f != 0.0)
        {
          for (size_t j = k + 1; j < n; j++)
            rk1[j] -= f * rk[j];
          x[k + 1] -= f * x[k];
        }
    }
  /* Back substitution, accumulating C·x on the way. */
  double complex y = h->d;
  for (size_t ii = n; ii-- > 0;)
    {
      double complex *ri = m + ii * n;
      double complex acc = x[ii];
      for (size_t j = ii + 1; j < n; j++)
        acc -= ri[j] * x[j];
      if (ri[ii] == 0.0)
        return NAN + NAN * I;
      x[ii] = acc / ri[ii];
      y += h->c[ii] * x[ii];
    }
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
      double mag = hypot (ar[i], ai[i]);
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
