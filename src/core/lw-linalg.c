/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "lw-linalg-private.h"

size_t
lw_mul_size (size_t a, size_t b)
{
  if (a != 0 && b > SIZE_MAX / a)
    return 0;
  return a * b;
}

double *
lw_la_alloc_doubles (size_t count)
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

  double *w = lw_la_alloc_doubles (8 * nn);
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
  s->a = lw_la_alloc_doubles (nn);
  s->b = lw_la_alloc_doubles (n);
  s->c = lw_la_alloc_doubles (n);
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
lw_eigenvalues (size_t n, const double *a, double complex *ev, LwError *err)
{
  if (n == 0)
    return LW_OK;
  double *w = lw_la_alloc_doubles (n * n + 2 * n);
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
  double *w = lw_la_alloc_doubles (2 * m * m + 3 * m);
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
      double mag = lw_la_cabs_fast (ar[i], ai[i]);
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
  double *ac = lw_la_alloc_doubles (n * n);
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
