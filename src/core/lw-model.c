/* lw-model.c — factored rational models: storage, canonical layout, evaluation, expansion,
 * polynomial roots and text form.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-model.h"

#include <float.h>
#include <lapacke.h>
#include <locale.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* ---------------------------------------------------------------------------------------- */
/* Allocation                                                                               */

static double complex *
roots_alloc (size_t n)
{
  if (n == 0)
    return NULL;
  if (n > SIZE_MAX / sizeof (double complex))
    return NULL;
  return calloc (n, sizeof (double complex));
}

LwModel *
lw_model_new (LwDomain domain, double period_s, double gain, size_t n_zeros, size_t n_poles)
{
  LwModel *m = calloc (1, sizeof *m);
  if (m == NULL)
    return NULL;
  m->domain = domain;
  m->period_s = period_s;
  m->gain = gain;
  m->n_zeros = n_zeros;
  m->n_poles = n_poles;
  m->zeros = roots_alloc (n_zeros);
  m->poles = roots_alloc (n_poles);
  if ((n_zeros > 0 && m->zeros == NULL) || (n_poles > 0 && m->poles == NULL)) {
    lw_model_free (m);
    return NULL;
  }
  return m;
}

void
lw_model_free (LwModel *m)
{
  if (m == NULL)
    return;
  free (m->zeros);
  free (m->poles);
  free (m);
}

LwModel *
lw_model_copy (const LwModel *m)
{
  if (m == NULL)
    return NULL;
  LwModel *c = lw_model_new (m->domain, m->period_s, m->gain, m->n_zeros, m->n_poles);
  if (c == NULL)
    return NULL;
  if (m->n_zeros > 0)
    memcpy (c->zeros, m->zeros, m->n_zeros * sizeof *c->zeros);
  if (m->n_poles > 0)
    memcpy (c->poles, m->poles, m->n_poles * sizeof *c->poles);
  return c;
}

LwModel *
lw_model_new_constant (LwDomain domain, double period_s, double gain)
{
  return lw_model_new (domain, period_s, gain, 0, 0);
}

LwModel *
lw_model_mul (const LwModel *a, const LwModel *b)
{
  if (a == NULL || b == NULL || a->domain != b->domain || a->period_s != b->period_s)
    return NULL;
  if (a->n_zeros > SIZE_MAX - b->n_zeros || a->n_poles > SIZE_MAX - b->n_poles)
    return NULL;
  LwModel *m = lw_model_new (a->domain, a->period_s, a->gain * b->gain, a->n_zeros + b->n_zeros,
                         a->n_poles + b->n_poles);
  if (m == NULL)
    return NULL;
  if (a->n_zeros > 0)
    memcpy (m->zeros, a->zeros, a->n_zeros * sizeof *m->zeros);
  if (b->n_zeros > 0)
    memcpy (m->zeros + a->n_zeros, b->zeros, b->n_zeros * sizeof *m->zeros);
  if (a->n_poles > 0)
    memcpy (m->poles, a->poles, a->n_poles * sizeof *m->poles);
  if (b->n_poles > 0)
    memcpy (m->poles + a->n_poles, b->poles, b->n_poles * sizeof *m->poles);
  lw_model_canonicalize (m);
  return m;
}

/* ---------------------------------------------------------------------------------------- */
/* Canonical layout                                                                         */

/* Sort key: real roots first (by value), then pairs by real part then |imag|; roots left
 * without a conjugate partner (not from a real polynomial) go last. */
typedef struct {
  int klass;          /* 0 real, 1 pair, 2 unpaired complex */
  double re, im;      /* im >= 0 for pairs */
  double complex r;   /* the unpaired root itself */
} RootKey;

static int
root_key_cmp (const void *pa, const void *pb)
{
  const RootKey *a = pa, *b = pb;
  if (a->klass != b->klass)
    return a->klass < b->klass ? -1 : 1;
  if (a->re != b->re)
    return a->re < b->re ? -1 : 1;
  if (a->im != b->im)
    return a->im < b->im ? -1 : 1;
  return 0;
}

/* Canonicalizes an array of roots in place (see lw-model.h). Returns false on allocation
 * failure (roots are then left as they were). */
static bool
roots_canonicalize (double complex *roots, size_t n)
{
  if (n == 0)
    return true;
  RootKey *keys = calloc (n, sizeof *keys);
  bool *used = calloc (n, sizeof *used);
  if (keys == NULL || used == NULL) {
    free (keys);
    free (used);
    return false;
  }
  /* Snap nearly-real roots to the real axis; +0.0 for both zero signs. */
  for (size_t i = 0; i < n; i++) {
    double re = creal (roots[i]), im = cimag (roots[i]);
    double mag = fmax (1.0, cabs (roots[i]));
    if (fabs (im) <= 1e-12 * mag)
      im = 0.0;
    roots[i] = CMPLX (re + 0.0, im + 0.0);
  }
  size_t nk = 0;
  for (size_t i = 0; i < n; i++) {
    if (used[i])
      continue;
    used[i] = true;
    double re = creal (roots[i]), im = cimag (roots[i]);
    if (im == 0.0) {
      keys[nk++] = (RootKey){ .klass = 0, .re = re, .im = 0.0 };
      continue;
    }
    /* Partner: the unused root with opposite-sign imaginary part nearest to conj(root). */
    size_t best = n;
    double best_d = INFINITY;
    for (size_t j = i + 1; j < n; j++) {
      if (used[j] || cimag (roots[j]) == 0.0 || (cimag (roots[j]) > 0) == (im > 0))
        continue;
      double d = cabs (roots[j] - conj (roots[i]));
      if (d < best_d) {
        best_d = d;
        best = j;
      }
    }
    if (best == n) {
      keys[nk++] = (RootKey){ .klass = 2, .re = re, .im = im, .r = roots[i] };
      continue;
    }
    used[best] = true;
    double bre = creal (roots[best]), bim = cimag (roots[best]);
    double pre = re == bre ? re : 0.5 * (re + bre);
    double pim = fabs (im) == fabs (bim) ? fabs (im) : 0.5 * (fabs (im) + fabs (bim));
    keys[nk++] = (RootKey){ .klass = 1, .re = pre, .im = pim };
  }
  qsort (keys, nk, sizeof *keys, root_key_cmp);
  size_t o = 0;
  for (size_t k = 0; k < nk; k++) {
    if (keys[k].klass == 0) {
      roots[o++] = CMPLX (keys[k].re, 0.0);
    } else if (keys[k].klass == 1) {
      roots[o++] = CMPLX (keys[k].re, keys[k].im);
      roots[o++] = CMPLX (keys[k].re, -keys[k].im);
    } else {
      roots[o++] = keys[k].r;
    }
  }
  free (keys);
  free (used);
  return true;
}

void
lw_model_canonicalize (LwModel *m)
{
  if (m == NULL)
    return;
  /* On allocation failure the roots stay valid, only not reordered. */
  (void) roots_canonicalize (m->zeros, m->n_zeros);
  (void) roots_canonicalize (m->poles, m->n_poles);
}

static bool
roots_close (double complex a, double complex b, double rel_tol)
{
  if (a == b)
    return true;
  return cabs (a - b) <= rel_tol * fmax (1.0, cabs (a));
}

/* Removes element i (and the one after it when width is 2) from an array of n roots. */
static void
roots_remove (double complex *r, size_t *n, size_t i, size_t width)
{
  memmove (r + i, r + i + width, (*n - i - width) * sizeof *r);
  *n -= width;
}

size_t
lw_model_cancel (LwModel *m, double rel_tol)
{
  if (m == NULL)
    return 0;
  lw_model_canonicalize (m);
  if (!(rel_tol >= 0.0))
    rel_tol = 0.0;
  size_t removed = 0;
  size_t i = 0;
  /* Real zeros cancel real poles; a conjugate pair cancels a pair (both members), so the
   * layout survives. */
  while (i < m->n_zeros) {
    double complex z = m->zeros[i];
    bool pair = cimag (z) != 0.0 && i + 1 < m->n_zeros && m->zeros[i + 1] == conj (z);
    size_t width = pair ? 2 : 1;
    bool done = false;
    for (size_t j = 0; j < m->n_poles;) {
      double complex p = m->poles[j];
      bool ppair = cimag (p) != 0.0 && j + 1 < m->n_poles && m->poles[j + 1] == conj (p);
      size_t pwidth = ppair ? 2 : 1;
      if (pair == ppair && roots_close (z, p, rel_tol)) {
        roots_remove (m->zeros, &m->n_zeros, i, width);
        roots_remove (m->poles, &m->n_poles, j, pwidth);
        removed += width;
        done = true;
        break;
      }
      j += pwidth;
    }
    if (!done)
      i += width;
  }
  return removed;
}

/* ---------------------------------------------------------------------------------------- */
/* Evaluation and queries                                                                   */

double complex
lw_model_eval (const LwModel *m, double complex x)
{
  if (m == NULL)
    return CMPLX (NAN, NAN);
  /* Alternate numerator and denominator factors to keep intermediates in range. */
  double complex h = m->gain;
  size_t nz = m->n_zeros, np = m->n_poles;
  size_t n = nz > np ? nz : np;
  for (size_t i = 0; i < n; i++) {
    if (i < nz)
      h *= x - m->zeros[i];
    if (i < np)
      h /= x - m->poles[i];
  }
  return h;
}

long
lw_model_relative_degree (const LwModel *m)
{
  if (m == NULL)
    return 0;
  return (long) m->n_poles - (long) m->n_zeros;
}

bool
lw_model_is_finite (const LwModel *m)
{
  if (m == NULL || !isfinite (m->gain))
    return false;
  for (size_t i = 0; i < m->n_zeros; i++)
    if (!isfinite (creal (m->zeros[i])) || !isfinite (cimag (m->zeros[i])))
      return false;
  for (size_t i = 0; i < m->n_poles; i++)
    if (!isfinite (creal (m->poles[i])) || !isfinite (cimag (m->poles[i])))
      return false;
  return true;
}

char
lw_domain_var (LwDomain d)
{
  switch (d) {
  case LW_DOMAIN_Z:
    return 'z';
  case LW_DOMAIN_W:
    return 'w';
  case LW_DOMAIN_S:
  default:
    return 's';
  }
}

/* ---------------------------------------------------------------------------------------- */
/* Expansion                                                                                */

/* Multiplies p (ascending, *deg+1 entries, room for deg+3) by (x^2 + b x + c) or (x + c). */
static void
poly_mul_factor (double *p, size_t *deg, int order, double b, double c)
{
  size_t d = *deg;
  if (order == 1) {
    p[d + 1] = 0.0;
    for (size_t k = d + 1; k > 0; k--)
      p[k] = p[k - 1] + c * p[k];
    p[0] *= c;
    *deg = d + 1;
  } else {
    p[d + 1] = 0.0;
    p[d + 2] = 0.0;
    for (size_t k = d + 2; k > 1; k--)
      p[k] = p[k - 2] + b * p[k - 1] + c * p[k];
    p[1] = b * p[0] + c * p[1];
    p[0] *= c;
    *deg = d + 2;
  }
}

static LwStatus
roots_to_poly (const double complex *r, size_t n, double *out, const char *what, LwError *err)
{
  size_t deg = 0;
  out[0] = 1.0;
  for (size_t i = 0; i < n;) {
    double re = creal (r[i]), im = cimag (r[i]);
    if (im == 0.0) {
      poly_mul_factor (out, &deg, 1, 0.0, -re);
      i++;
    } else if (i + 1 < n && r[i + 1] == conj (r[i])) {
      /* (x − r)(x − r̄) = x² − 2 Re r x + |r|²; |r|² as re² + im² (no cabs rounding). */
      poly_mul_factor (out, &deg, 2, -2.0 * re, re * re + im * im);
      i += 2;
    } else {
      return lw_error_set (err, LW_ERR_INVALID, -1,
                           "%s %zu (%g%+gj) has no adjacent conjugate partner", what, i, re, im);
    }
  }
  return LW_OK;
}

LwStatus
lw_model_to_poly (const LwModel *m, double *num, double *den, LwError *err)
{
  if (m == NULL || num == NULL || den == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "lw_model_to_poly: NULL argument");
  LwStatus st = roots_to_poly (m->zeros, m->n_zeros, num, "zero", err);
  if (st != LW_OK)
    return st;
  st = roots_to_poly (m->poles, m->n_poles, den, "pole", err);
  if (st != LW_OK)
    return st;
  for (size_t i = 0; i <= m->n_zeros; i++)
    num[i] *= m->gain;
  return LW_OK;
}

/* ---------------------------------------------------------------------------------------- */
/* Polynomial roots                                                                         */

/* Real roots of a x² + b x + c (a != 0), numerically stable: the larger root from
 * q = −(b + sign(b)·√disc)/2, the smaller as c/q; the discriminant with Kahan's fma-corrected
 * difference so near-double roots keep their accuracy.  Coefficients are scaled by a power of
 * two first (exact) to avoid overflow in b². */
static void
quadratic_roots (double a, double b, double c, double complex *roots)
{
  double big = fmax (fabs (a), fmax (fabs (b), fabs (c)));
  int e;
  (void) frexp (big, &e);
  a = ldexp (a, -e);
  b = ldexp (b, -e);
  c = ldexp (c, -e);

  double p = b * b;
  double dp = fma (b, b, -p);
  double q4 = 4.0 * a * c;
  double dq = fma (4.0 * a, c, -q4);
  double disc = (p - q4) + (dp - dq);

  if (disc >= 0.0) {
    double sq = sqrt (disc);
    double q = -0.5 * (b + copysign (sq, b));
    if (q == 0.0) {
      /* b = 0 and disc = 0, hence c = 0: double root at 0. */
      roots[0] = 0.0;
      roots[1] = 0.0;
      return;
    }
    double r1 = q / a, r2 = c / q;
    roots[0] = CMPLX (fmin (r1, r2), 0.0);
    roots[1] = CMPLX (fmax (r1, r2), 0.0);
  } else {
    double re = -b / (2.0 * a);
    double im = fabs (sqrt (-disc) / (2.0 * a));
    roots[0] = CMPLX (re, im);
    roots[1] = CMPLX (re, -im);
  }
}

LwStatus
lw_poly_roots (const double *c, size_t degree, double complex *roots, LwError *err)
{
  if (c == NULL || (degree > 0 && roots == NULL))
    return lw_error_set (err, LW_ERR_INVALID, -1, "lw_poly_roots: NULL argument");
  if (degree > LW_MAX_DEGREE)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "polynomial degree %zu exceeds the limit of %d", degree, LW_MAX_DEGREE);
  for (size_t i = 0; i <= degree; i++)
    if (!isfinite (c[i]))
      return lw_error_set (err, LW_ERR_INVALID, -1, "polynomial coefficient %zu is not finite",
                           i);
  if (c[degree] == 0.0)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "leading coefficient (power %zu) of the polynomial is zero", degree);

  /* Exact roots at 0: trailing zero coefficients of the ascending list. */
  size_t nzero = 0;
  while (nzero < degree && c[nzero] == 0.0)
    roots[nzero++] = 0.0;
  const double *cc = c + nzero;
  size_t n = degree - nzero;
  double complex *r = roots + nzero;

  if (n == 1) {
    r[0] = CMPLX (-cc[0] / cc[1] + 0.0, 0.0);
  } else if (n == 2) {
    quadratic_roots (cc[2], cc[1], cc[0], r);
  } else if (n > 2) {
    /* Companion matrix of the monic polynomial, column-major: first row −a_{n−1} … −a_0,
     * ones on the subdiagonal.  LAPACK balances it (permutation and diagonal scaling, 'B')
     * before the Hessenberg QR iteration. */
    size_t nn = n * n;
    double *A = calloc (nn, sizeof *A);
    double *wr = calloc (n, sizeof *wr);
    double *wi = calloc (n, sizeof *wi);
    double *scale = calloc (n, sizeof *scale);
    double *rce = calloc (n, sizeof *rce);
    double *rcv = calloc (n, sizeof *rcv);
    if (A == NULL || wr == NULL || wi == NULL || scale == NULL || rce == NULL || rcv == NULL) {
      free (A); free (wr); free (wi); free (scale); free (rce); free (rcv);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory in lw_poly_roots");
    }
    double lead = cc[n];
    for (size_t j = 0; j < n; j++)
      A[j * n + 0] = -cc[n - 1 - j] / lead;   /* row 0, column j */
    for (size_t i = 1; i < n; i++)
      A[(i - 1) * n + i] = 1.0;               /* row i, column i−1 */
    lapack_int ilo = 0, ihi = 0;
    double abnrm = 0.0;
    double dummy = 0.0;
    lapack_int info = LAPACKE_dgeevx (LAPACK_COL_MAJOR, 'B', 'N', 'N', 'N', (lapack_int) n, A,
                                      (lapack_int) n, wr, wi, &dummy, 1, &dummy, 1, &ilo, &ihi,
                                      scale, &abnrm, rce, rcv);
    if (info == 0) {
      for (size_t i = 0; i < n; i++)
        r[i] = CMPLX (wr[i], wi[i]);
    }
    free (A); free (wr); free (wi); free (scale); free (rce); free (rcv);
    if (info != 0)
      return lw_error_set (err, LW_ERR_NUMERIC, -1,
                           "eigenvalue iteration for polynomial roots failed (LAPACK dgeevx "
                           "info %d)", (int) info);
  }
  if (!roots_canonicalize (roots, degree))
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory in lw_poly_roots");
  for (size_t i = 0; i < degree; i++)
    if (!isfinite (creal (roots[i])) || !isfinite (cimag (roots[i])))
      return lw_error_set (err, LW_ERR_NUMERIC, -1, "polynomial root %zu is not finite", i);
  return LW_OK;
}

/* ---------------------------------------------------------------------------------------- */
/* Text form                                                                                */

typedef struct {
  char *buf;
  size_t size;
  size_t len;   /* length needed so far */
} Out;

static void
out_str (Out *o, const char *s)
{
  size_t n = strlen (s);
  if (o->size > 0 && o->len < o->size - 1) {
    size_t room = o->size - 1 - o->len;
    size_t k = n < room ? n : room;
    memcpy (o->buf + o->len, s, k);
    o->buf[o->len + k] = '\0';
  }
  o->len += n;
}

/* A number with %.*g, made locale-independent: core never calls setlocale(), but a program
 * that embeds it (the GTK shell does) may run under a locale whose decimal point is not '.',
 * so the locale's decimal-point string is replaced by '.' after formatting. */
static void
out_num (Out *o, double v, int digits)
{
  char tmp[64];
  snprintf (tmp, sizeof tmp, "%.*g", digits, v);
  const char *dp = localeconv ()->decimal_point;
  if (dp != NULL && dp[0] != '\0' && strcmp (dp, ".") != 0) {
    char *hit = strstr (tmp, dp);
    if (hit != NULL) {
      size_t dl = strlen (dp);
      *hit = '.';
      memmove (hit + 1, hit + dl, strlen (hit + dl) + 1);
    }
  }
  out_str (o, tmp);
}

typedef struct {
  int order;          /* 1: x − r, 2: x² + b x + c */
  double r;           /* order 1 */
  double b, c;        /* order 2 */
  size_t power;
  double complex unpaired;
  bool is_unpaired;
} Factor;

/* Groups roots into factors with multiplicities; returns the count (fac has room for n). */
static size_t
roots_factors (const double complex *r, size_t n, Factor *fac)
{
  size_t nf = 0;
  for (size_t i = 0; i < n;) {
    Factor f = { 0 };
    if (cimag (r[i]) == 0.0) {
      f.order = 1;
      f.r = creal (r[i]);
      i += 1;
    } else if (i + 1 < n && r[i + 1] == conj (r[i])) {
      double re = creal (r[i]), im = cimag (r[i]);
      f.order = 2;
      f.b = -2.0 * re;
      f.c = re * re + im * im;
      i += 2;
    } else {
      f.order = 1;
      f.is_unpaired = true;
      f.unpaired = r[i];
      i += 1;
    }
    f.power = 1;
    if (nf > 0) {
      Factor *p = &fac[nf - 1];
      if (!f.is_unpaired && !p->is_unpaired && p->order == f.order && p->r == f.r &&
          p->b == f.b && p->c == f.c) {
        p->power++;
        continue;
      }
    }
    fac[nf++] = f;
  }
  return nf;
}

static bool
factor_is_bare_var (const Factor *f)
{
  return f->order == 1 && !f->is_unpaired && f->r == 0.0;
}

static void
out_factor (Out *o, const Factor *f, char var, int digits)
{
  char v[2] = { var, '\0' };
  bool bare = factor_is_bare_var (f);
  if (!bare)
    out_str (o, "(");
  if (f->is_unpaired) {
    /* Not from a real polynomial; shown as (x − (a+bj)). */
    out_str (o, v);
    out_str (o, " - (");
    out_num (o, creal (f->unpaired), digits);
    out_str (o, cimag (f->unpaired) < 0 ? " - " : " + ");
    out_num (o, fabs (cimag (f->unpaired)), digits);
    out_str (o, "j)");
  } else if (f->order == 1) {
    out_str (o, v);
    if (f->r != 0.0) {
      out_str (o, f->r < 0 ? " + " : " - ");
      out_num (o, fabs (f->r), digits);
    }
  } else {
    out_str (o, v);
    out_str (o, "^2");
    if (f->b != 0.0) {
      out_str (o, f->b < 0 ? " - " : " + ");
      out_num (o, fabs (f->b), digits);
      out_str (o, " ");
      out_str (o, v);
    }
    if (f->c != 0.0) {
      out_str (o, f->c < 0 ? " - " : " + ");
      out_num (o, fabs (f->c), digits);
    }
  }
  if (!bare)
    out_str (o, ")");
  if (f->power > 1) {
    char p[32];
    snprintf (p, sizeof p, "^%zu", f->power);
    out_str (o, p);
  }
}

static void
out_factors (Out *o, const Factor *f, size_t nf, char var, int digits)
{
  for (size_t i = 0; i < nf; i++) {
    if (i > 0)
      out_str (o, " ");
    out_factor (o, &f[i], var, digits);
  }
}

size_t
lw_model_format (const LwModel *m, int digits, char *buf, size_t size)
{
  Out o = { buf, size, 0 };
  if (buf != NULL && size > 0)
    buf[0] = '\0';
  if (m == NULL) {
    out_str (&o, "(null)");
    return o.len;
  }
  if (digits < 1)
    digits = 1;
  if (digits > 17)
    digits = 17;
  char var = lw_domain_var (m->domain);

  size_t nmax = m->n_zeros > m->n_poles ? m->n_zeros : m->n_poles;
  Factor *fz = nmax > 0 ? calloc (nmax, sizeof *fz) : NULL;
  Factor *fp = nmax > 0 ? calloc (nmax, sizeof *fp) : NULL;
  if (nmax > 0 && (fz == NULL || fp == NULL)) {
    free (fz);
    free (fp);
    out_str (&o, "(out of memory)");
    return o.len;
  }
  size_t nfz = roots_factors (m->zeros, m->n_zeros, fz);
  size_t nfp = roots_factors (m->poles, m->n_poles, fp);

  if (m->gain == 0.0 || (nfz == 0 && nfp == 0)) {
    out_num (&o, m->gain, digits);
  } else {
    /* Gain: omitted when 1 (and there is a numerator factor), a bare '-' when −1. */
    if (nfz > 0 && m->gain == 1.0) {
      /* nothing */
    } else if (nfz > 0 && m->gain == -1.0) {
      out_str (&o, "-");
    } else {
      out_num (&o, m->gain, digits);
      if (nfz > 0)
        out_str (&o, " ");
    }
    out_factors (&o, fz, nfz, var, digits);
    if (nfp > 0) {
      out_str (&o, " / ");
      bool wrap = nfp > 1;
      if (wrap)
        out_str (&o, "(");
      out_factors (&o, fp, nfp, var, digits);
      if (wrap)
        out_str (&o, ")");
    }
  }
  free (fz);
  free (fp);
  return o.len;
}
