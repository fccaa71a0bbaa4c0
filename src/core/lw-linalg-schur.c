/* lw-linalg-schur.c — the real Schur form of a state space and its read-only O(n²)
 * evaluator, with the error bound and the derivative (lw-linalg.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */

#include "lw-linalg-private.h"

LwStatus
lw_ss_balance_schur (LwSs *s, LwError *err)
{
  size_t n = s->n;
  if (n == 0)
    return LW_OK;
  LwStatus st = lw_la_balance_scaling (s, err);
  if (st != LW_OK)
    return st;
  lapack_int sdim = 0;
  double *wr = lw_la_alloc_doubles (n), *wi = lw_la_alloc_doubles (n), *z = lw_la_alloc_doubles (n * n);
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
    st = lw_la_apply_orthogonal (s, z, err);
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
  h->t_rows = lw_la_alloc_doubles (n * n);
  h->b = lw_la_alloc_doubles (n);
  h->c = lw_la_alloc_doubles (n);
  h->block = calloc (n + 1, 1);
  h->one_minus_diag = lw_la_alloc_doubles (n);
  h->t_abs = lw_la_alloc_doubles (n * n);
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
double
lw_la_cabs_fast (double a, double b)
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
          double pr = zm1 + omt[i], pm = lw_la_cabs_fast (pr, sin_wt);
          /* the stored T_ii (e^{λT} near 1 when sampling fast) carries a rounding of u·|T_ii|,
           * which is large against 1 − T_ii: perturb the diagonal by that, not by u·|1 − T_ii| */
          double dpi = dp + gam * (fabs (1.0 - omt[i]) + fabs (omt[i])) + gam * pm;
          av[i] = lw_la_cabs_fast (w.xr[i], w.xi[i]);
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
          double det = lw_la_cabs_fast (detr, deti);
          double a1 = lw_la_cabs_fast (w.xr[i], w.xi[i]), a2 = lw_la_cabs_fast (w.xr[i + 1], w.xi[i + 1]);
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
