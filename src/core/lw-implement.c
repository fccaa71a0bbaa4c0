/* lw-implement.c — difference equation, second-order sections, fixed-point sections.
 * See lw-implement.h and docs/implementation.md.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-implement.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "lw-internal.h"

/* A pole this close to the unit circle (in |z|) counts as on it: the section has no finite
 * peak gain. */
#define ON_CIRCLE_TOL 1e-9

static LwStatus
check_controller (const LwModel *cz, const char *fn, LwError *err)
{
  if (cz == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "%s: NULL controller", fn);
  if (cz->domain != LW_DOMAIN_Z)
    return lw_error_set (err, LW_ERR_INVALID, -1, "%s: the controller must be in z", fn);
  if (cz->n_zeros > cz->n_poles)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "%s: the controller is improper (%zu zeros, %zu poles); it cannot be "
                         "run causally", fn, cz->n_zeros, cz->n_poles);
  if (!lw_model_is_finite (cz) || cz->gain == 0.0)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "%s: the controller must be finite and not zero", fn);
  if (cz->n_poles > LW_MAX_DEGREE)
    return lw_error_set (err, LW_ERR_INVALID, -1, "%s: order %zu exceeds %d", fn, cz->n_poles,
                         LW_MAX_DEGREE);
  return LW_OK;
}

/* ---- difference equation --------------------------------------------------------------- */

void
lw_diffeq_free (LwDiffEq *d)
{
  if (d == NULL)
    return;
  free (d->b);
  free (d->a);
  free (d);
}

LwStatus
lw_diffeq_from_model (const LwModel *cz, LwDiffEq **out, LwError *err)
{
  *out = NULL;
  LwStatus st = check_controller (cz, "difference equation", err);
  if (st != LW_OK)
    return st;
  size_t n = cz->n_poles;
  LwDiffEq *d = calloc (1, sizeof *d);
  double *num = calloc (cz->n_zeros + 1, sizeof *num);
  double *den = calloc (n + 1, sizeof *den);
  if (d != NULL)
    {
      d->b = calloc (n + 1, sizeof *d->b);
      d->a = calloc (n + 1, sizeof *d->a);
    }
  if (d == NULL || num == NULL || den == NULL || d->b == NULL || d->a == NULL)
    {
      free (num);
      free (den);
      lw_diffeq_free (d);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "difference equation: out of memory");
    }
  d->order = n;
  st = lw_model_to_poly (cz, num, den, err);
  if (st == LW_OK)
    {
      /* Divide numerator and denominator by z^n: the coefficient of z^j becomes that of
       * z^−(n−j).  den is monic (a[0] = 1 exactly). */
      for (size_t i = 0; i <= n; i++)
        {
          d->a[i] = den[n - i];
          size_t j = n - i;   /* power of z in the numerator */
          d->b[i] = j <= cz->n_zeros ? num[j] : 0.0;
        }
      d->a[0] = 1.0;
      for (size_t i = 0; i <= n; i++)
        if (!isfinite (d->a[i]) || !isfinite (d->b[i]))
          st = lw_error_set (err, LW_ERR_NUMERIC, -1,
                             "difference equation: a coefficient overflowed");
    }
  free (num);
  free (den);
  if (st != LW_OK)
    {
      lw_diffeq_free (d);
      return st;
    }
  *out = d;
  return LW_OK;
}

void
lw_diffeq_filter (const LwDiffEq *d, const double *x, double *y, size_t n)
{
  size_t m = d->order;
  for (size_t k = 0; k < n; k++)
    {
      /* u = b0 e[k] + Σ (b_i e[k−i] − a_i u[k−i]), the same order as the emitted step. */
      double u = d->b[0] * x[k];
      for (size_t i = 1; i <= m && i <= k; i++)
        u += d->b[i] * x[k - i] - d->a[i] * y[k - i];
      y[k] = u;
    }
}

/* ---- sections -------------------------------------------------------------------------- */

void
lw_sos_free (LwSos *s)
{
  if (s == NULL)
    return;
  free (s->s);
  free (s);
}

static double complex
section_eval (const double *b, const double *a, double complex z)
{
  double complex zi = 1.0 / z;
  double complex num = b[0] + zi * (b[1] + zi * b[2]);
  double complex den = a[0] + zi * (a[1] + zi * a[2]);
  return num / den;
}

double complex
lw_sos_eval (const LwSos *s, double complex z)
{
  double complex h = 1.0;
  for (size_t k = 0; k < s->n; k++)
    h *= section_eval (s->s[k].b, s->s[k].a, z);
  return h;
}

static double
section_mag (const double *b, const double *a, double theta)
{
  return cabs (section_eval (b, a, cexp (I * theta)));
}

double
lw_section_peak_gain (const double *b, const double *a, double *theta_at_peak)
{
  /* Roots of the denominator: a pole on the circle means no finite peak. */
  double complex r[2];
  size_t nr = 0;
  if (a[2] != 0.0)
    {
      double c[3] = { a[2], a[1], a[0] };
      if (lw_poly_roots (c, 2, r, NULL) == LW_OK)
        nr = 2;
    }
  else if (a[1] != 0.0)
    {
      r[0] = -a[1] / a[0];
      nr = 1;
    }
  for (size_t i = 0; i < nr; i++)
    if (fabs (cabs (r[i]) - 1.0) <= ON_CIRCLE_TOL)
      {
        if (theta_at_peak != NULL)
          *theta_at_peak = fabs (carg (r[i]));
        return INFINITY;
      }

  enum { GRID = 4096 };
  double best = -1.0, best_t = 0.0;
  for (int j = 0; j <= GRID; j++)
    {
      double t = LW_PI * j / GRID;
      double m = section_mag (b, a, t);
      if (m > best)
        {
          best = m;
          best_t = t;
        }
    }
  for (size_t i = 0; i < nr; i++)
    {
      double t = fabs (carg (r[i]));
      double m = section_mag (b, a, t);
      if (m > best)
        {
          best = m;
          best_t = t;
        }
    }
  /* Golden-section refinement on [best_t − h, best_t + h] (h = one grid step, or the distance
   * of the nearest pole to the circle when that is smaller: the peak of a lightly damped pole
   * is that narrow). */
  double h = LW_PI / GRID;
  for (size_t i = 0; i < nr; i++)
    {
      double w = fabs (1.0 - cabs (r[i]));
      if (w > 0.0 && w < h && fabs (fabs (carg (r[i])) - best_t) <= h)
        h = fmax (w, 1e-12);
    }
  double lo = fmax (0.0, best_t - h), hi = fmin (LW_PI, best_t + h);
  const double g = 0.6180339887498949;
  double x1 = hi - g * (hi - lo), x2 = lo + g * (hi - lo);
  double f1 = section_mag (b, a, x1), f2 = section_mag (b, a, x2);
  for (int it = 0; it < 80 && hi - lo > 1e-15; it++)
    {
      if (f1 > f2)
        {
          hi = x2;
          x2 = x1;
          f2 = f1;
          x1 = hi - g * (hi - lo);
          f1 = section_mag (b, a, x1);
        }
      else
        {
          lo = x1;
          x1 = x2;
          f1 = f2;
          x2 = lo + g * (hi - lo);
          f2 = section_mag (b, a, x2);
        }
    }
  if (f1 > best)
    {
      best = f1;
      best_t = x1;
    }
  if (f2 > best)
    {
      best = f2;
      best_t = x2;
    }
  if (theta_at_peak != NULL)
    *theta_at_peak = best_t;
  return best;
}

/* Largest |A(e^{jθ})| (or |B|) of a polynomial in z^−1 with 3 coefficients, on the grid. */
static double
poly_peak_on_circle (const double *c)
{
  double best = 0.0;
  for (int j = 0; j <= 4096; j++)
    {
      double complex zi = cexp (-I * LW_PI * j / 4096.0);
      double m = cabs (c[0] + zi * (c[1] + zi * c[2]));
      best = fmax (best, m);
    }
  return best;
}

/* Monic coefficients of ∏(1 − r_i z^−1) for up to two roots (a pair is conjugate), placed after
 * `delay` leading zeros: out[0..2]. */
static void
monic_coeffs (const double complex *r, size_t n, size_t delay, double *out)
{
  double c[3] = { 1.0, 0.0, 0.0 };
  if (n == 1)
    c[1] = -creal (r[0]);
  else if (n == 2)
    {
      if (cimag (r[0]) != 0.0)
        {
          c[1] = -2.0 * creal (r[0]);
          c[2] = creal (r[0]) * creal (r[0]) + cimag (r[0]) * cimag (r[0]);
        }
      else
        {
          c[1] = -(creal (r[0]) + creal (r[1]));
          c[2] = creal (r[0]) * creal (r[1]);
        }
    }
  out[0] = out[1] = out[2] = 0.0;
  for (size_t i = 0; i + delay < 3; i++)
    out[i + delay] = c[i];
}

typedef struct {
  double complex r[2];
  size_t n;
} Group;

/* Feasibility of the zeros left (pairs P, reals R) in the groups left (second-order S2,
 * first-order S1): P <= S2 and 2P + R <= 2 S2 + S1 (pairs need a second-order section). */
static bool
fits (size_t P, size_t R, size_t S2, size_t S1)
{
  return P <= S2 && 2 * P + R <= 2 * S2 + S1;
}

typedef struct {
  double radius;
  size_t index;
} Order;

static int
cmp_order (const void *pa, const void *pb)
{
  const Order *a = pa, *b = pb;
  if (a->radius < b->radius)
    return -1;
  if (a->radius > b->radius)
    return 1;
  return a->index < b->index ? -1 : a->index > b->index ? 1 : 0;
}

static double
group_radius (const Group *g)
{
  double r = 0.0;
  for (size_t i = 0; i < g->n; i++)
    r = fmax (r, cabs (g->r[i]));
  return r;
}

LwStatus
lw_sos_from_model (const LwModel *cz, LwSos **out, LwError *err)
{
  *out = NULL;
  LwStatus st = check_controller (cz, "sections", err);
  if (st != LW_OK)
    return st;
  LwModel *m = lw_model_copy (cz);
  if (m == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "sections: out of memory");
  lw_model_canonicalize (m);

  size_t np = m->n_poles, nz = m->n_zeros;
  size_t cap = np / 2 + 2;
  Group *pg = calloc (cap, sizeof *pg);      /* pole groups */
  Group *zg = calloc (cap, sizeof *zg);      /* zeros given to each pole group */
  bool *pused = calloc (np + 1, sizeof *pused);
  bool *zused = calloc (nz + 1, sizeof *zused);
  Order *ord = calloc (cap, sizeof *ord);
  LwSos *sos = calloc (1, sizeof *sos);
  if (pg == NULL || zg == NULL || pused == NULL || zused == NULL || ord == NULL || sos == NULL)
    {
      st = lw_error_set (err, LW_ERR_NOMEM, -1, "sections: out of memory");
      goto done;
    }

  /* 1. Pole groups: conjugate pairs; real poles two by two, nearest the circle first, each
   *    with its nearest remaining real neighbour. */
  size_t ng = 0;
  for (size_t i = 0; i < np; i++)
    if (cimag (m->poles[i]) > 0.0)
      {
        pg[ng].r[0] = m->poles[i];
        pg[ng].r[1] = conj (m->poles[i]);
        pg[ng].n = 2;
        ng++;
        pused[i] = pused[i + 1] = true;
      }
    else if (cimag (m->poles[i]) < 0.0)
      pused[i] = true;   /* the lower member of a pair, already taken */
  for (;;)
    {
      size_t best = np;
      for (size_t i = 0; i < np; i++)
        if (!pused[i] && (best == np || fabs (creal (m->poles[i])) > fabs (creal (m->poles[best]))))
          best = i;
      if (best == np)
        break;
      pused[best] = true;
      size_t near = np;
      for (size_t i = 0; i < np; i++)
        if (!pused[i] && (near == np || fabs (creal (m->poles[i]) - creal (m->poles[best]))
                                          < fabs (creal (m->poles[near]) - creal (m->poles[best]))))
          near = i;
      pg[ng].r[0] = m->poles[best];
      pg[ng].n = 1;
      if (near != np)
        {
          pused[near] = true;
          pg[ng].r[1] = m->poles[near];
          pg[ng].n = 2;
        }
      ng++;
    }

  /* 2. Zeros to groups, groups nearest the unit circle first. */
  size_t zp = 0, zr = 0;   /* zero pairs and real zeros left */
  for (size_t i = 0; i < nz; i++)
    {
      if (cimag (m->zeros[i]) > 0.0)
        zp++;
      else if (cimag (m->zeros[i]) == 0.0)
        zr++;
    }
  size_t s2 = 0, s1 = 0;
  for (size_t g = 0; g < ng; g++)
    {
      if (pg[g].n == 2)
        s2++;
      else
        s1++;
      ord[g].radius = -group_radius (&pg[g]);   /* descending radius */
      ord[g].index = g;
    }
  qsort (ord, ng, sizeof *ord, cmp_order);
  for (size_t k = 0; k < ng; k++)
    {
      size_t g = ord[k].index;
      size_t capacity = pg[g].n;
      if (capacity == 2)
        s2--;
      else
        s1--;
      double complex target = pg[g].r[0];
      /* candidates: the nearest unused zero (upper member of a pair stands for the pair) */
      while (zg[g].n < capacity)
        {
          size_t best = nz;
          double bestd = INFINITY;
          for (size_t i = 0; i < nz; i++)
            {
              if (zused[i] || cimag (m->zeros[i]) < 0.0)
                continue;
              bool pair = cimag (m->zeros[i]) > 0.0;
              size_t take = pair ? 2 : 1;
              if (zg[g].n + take > capacity)
                continue;
              size_t P = zp - (pair ? 1 : 0), R = zr - (pair ? 0 : 1);
              size_t room = capacity - zg[g].n - take;   /* left in this group */
              /* what is left must fit in the remaining groups plus this group's room
               * (room holds reals only) */
              if (!fits (P, R > room ? R - room : 0, s2, s1))
                continue;
              double d = fmin (cabs (m->zeros[i] - target),
                               pg[g].n == 2 ? cabs (m->zeros[i] - pg[g].r[1]) : INFINITY);
              if (d < bestd)
                {
                  bestd = d;
                  best = i;
                }
            }
          if (best == nz)
            break;
          if (cimag (m->zeros[best]) > 0.0)
            {
              zg[g].r[zg[g].n++] = m->zeros[best];
              zg[g].r[zg[g].n++] = conj (m->zeros[best]);
              zused[best] = zused[best + 1] = true;
              zp--;
            }
          else
            {
              zg[g].r[zg[g].n++] = m->zeros[best];
              zused[best] = true;
              zr--;
            }
        }
    }
  if (zp != 0 || zr != 0)
    {
      st = lw_error_set (err, LW_ERR_NUMERIC, -1, "sections: could not place every zero");
      goto done;
    }

  /* 3. Order: ascending pole radius (most lightly damped last). */
  size_t nsec = ng > 0 ? ng : 1;
  sos->s = calloc (nsec, sizeof *sos->s);
  if (sos->s == NULL)
    {
      st = lw_error_set (err, LW_ERR_NOMEM, -1, "sections: out of memory");
      goto done;
    }
  sos->n = nsec;
  if (ng == 0)
    {
      LwSection *s = &sos->s[0];
      s->order = 0;
      s->b[0] = m->gain;
      s->a[0] = 1.0;
      s->scale = m->gain;
      s->peak_gain = fabs (m->gain);
      *out = sos;
      sos = NULL;
      goto done;
    }
  for (size_t g = 0; g < ng; g++)
    {
      ord[g].radius = group_radius (&pg[g]);
      ord[g].index = g;
    }
  qsort (ord, ng, sizeof *ord, cmp_order);

  /* 4. Monic sections, then the gain: every section but the last to peak 1. */
  double rest = m->gain;
  for (size_t k = 0; k < ng; k++)
    {
      size_t g = ord[k].index;
      LwSection *s = &sos->s[k];
      s->order = (int) pg[g].n;
      s->n_poles = pg[g].n;
      s->n_zeros = zg[g].n;
      memcpy (s->poles, pg[g].r, sizeof s->poles);
      memcpy (s->zeros, zg[g].r, sizeof s->zeros);
      monic_coeffs (pg[g].r, pg[g].n, 0, s->a);
      if (s->order == 1)
        s->a[2] = 0.0;
      monic_coeffs (zg[g].r, zg[g].n, pg[g].n - zg[g].n, s->b);
      s->a[0] = 1.0;
      double scale = 1.0;
      if (k + 1 < ng)
        {
          double peak = lw_section_peak_gain (s->b, s->a, NULL);
          if (isfinite (peak) && peak > 0.0)
            scale = 1.0 / peak;
          else
            {
              double pb = poly_peak_on_circle (s->b), pa = poly_peak_on_circle (s->a);
              if (pb > 0.0 && pa > 0.0)
                scale = pa / pb;
            }
          rest /= scale;
        }
      else
        scale = rest;
      s->scale = scale;
      for (int i = 0; i < 3; i++)
        s->b[i] *= scale;
    }
  for (size_t k = 0; k < ng; k++)
    {
      LwSection *s = &sos->s[k];
      s->peak_gain = lw_section_peak_gain (s->b, s->a, NULL);
      for (int i = 0; i < 3; i++)
        if (!isfinite (s->b[i]) || !isfinite (s->a[i]))
          {
            st = lw_error_set (err, LW_ERR_NUMERIC, -1,
                               "sections: a coefficient of section %zu overflowed", k + 1);
            goto done;
          }
    }
  *out = sos;
  sos = NULL;

done:
  lw_sos_free (sos);
  free (pg);
  free (zg);
  free (pused);
  free (zused);
  free (ord);
  lw_model_free (m);
  return st;
}

void
lw_sos_filter (const LwSos *s, const double *x, double *y, size_t n)
{
  double *s1 = calloc (s->n, sizeof *s1);
  double *s2 = calloc (s->n, sizeof *s2);
  if (s1 == NULL || s2 == NULL)
    {
      for (size_t k = 0; k < n; k++)
        y[k] = NAN;
      free (s1);
      free (s2);
      return;
    }
  for (size_t k = 0; k < n; k++)
    {
      double v = x[k];
      for (size_t j = 0; j < s->n; j++)
        {
          const LwSection *c = &s->s[j];
          double out = c->b[0] * v + s1[j];
          s1[j] = c->b[1] * v - c->a[1] * out + s2[j];
          s2[j] = c->b[2] * v - c->a[2] * out;
          v = out;
        }
      y[k] = v;
    }
  free (s1);
  free (s2);
}

/* ---- fixed point ----------------------------------------------------------------------- */

LwStatus
lw_qformat_parse (const char *text, LwQFormat *q, LwError *err)
{
  if (text == NULL)
    return lw_error_set (err, LW_ERR_PARSE, 0, "expected a Q format such as Q2.14");
  const char *p = text;
  if (*p == 'Q' || *p == 'q')
    p++;
  long v[2] = { 0, 0 };
  for (int part = 0; part < 2; part++)
    {
      if (*p < '0' || *p > '9')
        return lw_error_set (err, LW_ERR_PARSE, (int) (p - text),
                             "expected %s at %d in a Q format such as Q2.14",
                             part == 0 ? "the number of integer bits" : "the number of fraction bits",
                             (int) (p - text));
      while (*p >= '0' && *p <= '9')
        {
          if (v[part] < 1000)
            v[part] = v[part] * 10 + (*p - '0');
          p++;
        }
      if (part == 0)
        {
          if (*p != '.')
            return lw_error_set (err, LW_ERR_PARSE, (int) (p - text),
                                 "expected '.' at %d between integer and fraction bits (Q2.14)",
                                 (int) (p - text));
          p++;
        }
    }
  if (*p != '\0')
    return lw_error_set (err, LW_ERR_PARSE, (int) (p - text),
                         "unexpected character at %d after the Q format", (int) (p - text));
  if (v[0] < 1)
    return lw_error_set (err, LW_ERR_INVALID, 0,
                         "at least 1 integer bit is needed (it includes the sign bit)");
  if (v[1] > 15 || v[0] + v[1] > 16)
    return lw_error_set (err, LW_ERR_INVALID, 0,
                         "word length %ld + %ld bits: at most 16 bits in all (coefficients are "
                         "int16_t) and at most 15 fraction bits", v[0], v[1]);
  q->int_bits = (int) v[0];
  q->frac_bits = (int) v[1];
  return LW_OK;
}

double
lw_qformat_min (LwQFormat q)
{
  return -ldexp (1.0, q.int_bits - 1);
}

double
lw_qformat_max (LwQFormat q)
{
  return ldexp (1.0, q.int_bits - 1) - ldexp (1.0, -q.frac_bits);
}

void
lw_sos_fixed_free (LwSosFixed *f)
{
  if (f == NULL)
    return;
  free (f->s);
  free (f);
}

/* Roots of a real monic section denominator 1 + a1 z^−1 + a2 z^−2 of the given order. */
static size_t
section_poles (int order, double a1, double a2, double complex *r)
{
  if (order == 2)
    {
      double c[3] = { a2, a1, 1.0 };
      if (lw_poly_roots (c, 2, r, NULL) != LW_OK)
        return 0;
      return 2;
    }
  if (order == 1)
    {
      r[0] = -a1;
      return 1;
    }
  return 0;
}

LwStatus
lw_sos_quantize (const LwSos *sos, LwQFormat q, LwSosFixed **out, LwError *err)
{
  *out = NULL;
  if (sos == NULL || sos->n == 0)
    return lw_error_set (err, LW_ERR_INVALID, -1, "quantize: no sections");
  if (q.int_bits < 1 || q.frac_bits < 0 || q.frac_bits > 15 || q.int_bits + q.frac_bits > 16)
    return lw_error_set (err, LW_ERR_INVALID, -1, "quantize: unsupported Q%d.%d", q.int_bits,
                         q.frac_bits);
  LwSosFixed *f = calloc (1, sizeof *f);
  if (f != NULL)
    f->s = calloc (sos->n, sizeof *f->s);
  if (f == NULL || f->s == NULL)
    {
      lw_sos_fixed_free (f);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "quantize: out of memory");
    }
  f->q = q;
  f->n = sos->n;
  int wl = q.int_bits + q.frac_bits;
  double qmin = -ldexp (1.0, wl - 1), qmax = ldexp (1.0, wl - 1) - 1.0;
  static const char *const names[2][3] = { { "b0", "b1", "b2" }, { "a0", "a1", "a2" } };
  for (size_t k = 0; k < sos->n; k++)
    {
      const LwSection *s = &sos->s[k];
      LwSectionQ *t = &f->s[k];
      t->order = s->order;
      for (int which = 0; which < 2; which++)
        for (int i = which; i < 3; i++)   /* a0 = 1 is implied, never stored */
          {
            double c = which == 0 ? s->b[i] : s->a[i];
            double v = round (ldexp (c, q.frac_bits));
            if (!(v >= qmin && v <= qmax))
              {
                lw_sos_fixed_free (f);
                return lw_error_set (err, LW_ERR_INVALID, -1,
                                     "section %zu: %s = %.17g does not fit Q%d.%d (range %.6g "
                                     "to %.6g)", k + 1, names[which][i], c, q.int_bits,
                                     q.frac_bits, lw_qformat_min (q), lw_qformat_max (q));
              }
            if (which == 0)
              t->b[i] = (int32_t) v;
            else
              t->a[i] = (int32_t) v;
          }
      t->a[0] = 0;
      if (t->b[0] == 0 && t->b[1] == 0 && t->b[2] == 0)
        {
          lw_sos_fixed_free (f);
          return lw_error_set (err, LW_ERR_INVALID, -1,
                               "section %zu: every numerator coefficient (b0 %.6g, b1 %.6g, "
                               "b2 %.6g) rounds to 0 in Q%d.%d; use more fraction bits",
                               k + 1, s->b[0], s->b[1], s->b[2], q.int_bits, q.frac_bits);
        }
      /* poles exact (as stored in the section) and quantized, matched: for two, the
       * assignment with the smaller largest distance */
      double complex pq[2] = { 0, 0 };
      size_t nq = section_poles (t->order, ldexp ((double) t->a[1], -q.frac_bits),
                                 ldexp ((double) t->a[2], -q.frac_bits), pq);
      t->n_poles = s->n_poles < nq ? s->n_poles : nq;
      t->poles_exact[0] = s->poles[0];
      t->poles_exact[1] = s->poles[1];
      t->poles_quant[0] = pq[0];
      t->poles_quant[1] = pq[1];
      if (t->n_poles == 2
          && fmax (cabs (s->poles[0] - pq[1]), cabs (s->poles[1] - pq[0]))
               < fmax (cabs (s->poles[0] - pq[0]), cabs (s->poles[1] - pq[1])))
        {
          t->poles_quant[0] = pq[1];
          t->poles_quant[1] = pq[0];
        }
    }
  *out = f;
  return LW_OK;
}

LwStatus
lw_sos_fixed_to_sos (const LwSosFixed *f, LwSos **out, LwError *err)
{
  *out = NULL;
  LwSos *s = calloc (1, sizeof *s);
  if (s != NULL)
    s->s = calloc (f->n, sizeof *s->s);
  if (s == NULL || s->s == NULL)
    {
      lw_sos_free (s);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "quantized sections: out of memory");
    }
  s->n = f->n;
  for (size_t k = 0; k < f->n; k++)
    {
      LwSection *c = &s->s[k];
      const LwSectionQ *t = &f->s[k];
      c->order = t->order;
      for (int i = 0; i < 3; i++)
        {
          c->b[i] = ldexp ((double) t->b[i], -f->q.frac_bits);
          c->a[i] = i == 0 ? 1.0 : ldexp ((double) t->a[i], -f->q.frac_bits);
        }
      c->n_poles = t->n_poles;
      memcpy (c->poles, t->poles_quant, sizeof c->poles);
      c->scale = 1.0;
      c->peak_gain = lw_section_peak_gain (c->b, c->a, NULL);
    }
  *out = s;
  return LW_OK;
}

LwStatus
lw_sos_fixed_model (const LwSosFixed *f, double period_s, LwModel **out, LwError *err)
{
  *out = NULL;
  LwSos *s = NULL;
  LwStatus st = lw_sos_fixed_to_sos (f, &s, err);
  if (st != LW_OK)
    return st;
  LwModel *acc = lw_model_new_constant (LW_DOMAIN_Z, period_s, 1.0);
  for (size_t k = 0; k < s->n && acc != NULL && st == LW_OK; k++)
    {
      const LwSection *c = &s->s[k];
      int order = c->order;
      /* numerator b0 z^order + b1 z^(order−1) + …: its leading nonzero coefficient gives the
       * gain, the rest its roots (a leading zero coefficient is a zero at infinity). */
      size_t lead = 0;
      while (lead < (size_t) order && c->b[lead] == 0.0)
        lead++;
      size_t nzr = (size_t) order - lead;
      LwModel *sec = lw_model_new (LW_DOMAIN_Z, period_s, c->b[lead], nzr, (size_t) order);
      if (sec == NULL)
        break;
      if (nzr > 0)
        {
          double asc[3];
          for (size_t i = 0; i <= nzr; i++)
            asc[i] = c->b[lead + nzr - i];   /* ascending powers */
          st = lw_poly_roots (asc, nzr, sec->zeros, err);
        }
      if (st == LW_OK && order > 0)
        {
          double asc[3] = { order == 2 ? c->a[2] : c->a[1], order == 2 ? c->a[1] : 1.0, 1.0 };
          st = lw_poly_roots (asc, (size_t) order, sec->poles, err);
        }
      if (st == LW_OK)
        {
          LwModel *prod = lw_model_mul (acc, sec);
          lw_model_free (acc);
          acc = prod;
        }
      lw_model_free (sec);
    }
  lw_sos_free (s);
  if (st != LW_OK)
    {
      lw_model_free (acc);
      return st;
    }
  if (acc == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "quantized controller: out of memory");
  *out = acc;
  return LW_OK;
}

/* Saturating int32 addition without a wider type: the exact sum when it fits, else the bound. */
static int32_t
sat_add32 (int32_t a, int32_t b)
{
  if (b > 0 && a > INT32_MAX - b)
    return INT32_MAX;
  if (b < 0 && a < INT32_MIN - b)
    return INT32_MIN;
  return a + b;
}

/* round(v / 2^n) with ties toward +∞, i.e. floor(v / 2^n + 1/2), for 0 <= n <= 15, without
 * right-shifting a negative number (implementation-defined in C). */
static int32_t
round_shift (int32_t v, int n)
{
  if (n == 0)
    return v;
  int32_t q;
  if (v >= 0)
    q = v >> n;
  else
    q = -1 - ((-(v + 1)) >> n);   /* floor(v / 2^n) */
  uint32_t r = (uint32_t) v & (((uint32_t) 1 << n) - 1u);   /* v mod 2^n, in [0, 2^n) */
  return q + (r >= ((uint32_t) 1 << (n - 1)) ? 1 : 0);
}

static int16_t
sat16 (int32_t v)
{
  return v > INT16_MAX ? INT16_MAX : v < INT16_MIN ? INT16_MIN : (int16_t) v;
}

void
lw_sos_fixed_filter (const LwSosFixed *f, const int16_t *x, int16_t *y, size_t n)
{
  int32_t *s1 = calloc (f->n, sizeof *s1);
  int32_t *s2 = calloc (f->n, sizeof *s2);
  if (s1 == NULL || s2 == NULL)
    {
      memset (y, 0, n * sizeof *y);
      free (s1);
      free (s2);
      return;
    }
  int fb = f->q.frac_bits;
  for (size_t k = 0; k < n; k++)
    {
      int16_t v = x[k];
      for (size_t j = 0; j < f->n; j++)
        {
          const LwSectionQ *c = &f->s[j];
          int32_t acc = sat_add32 ((int32_t) c->b[0] * v, s1[j]);
          int16_t out = sat16 (round_shift (acc, fb));
          s1[j] = sat_add32 (sat_add32 ((int32_t) c->b[1] * v, -((int32_t) c->a[1] * out)),
                             s2[j]);
          s2[j] = sat_add32 ((int32_t) c->b[2] * v, -((int32_t) c->a[2] * out));
          v = out;
        }
      y[k] = v;
    }
  free (s1);
  free (s2);
}
