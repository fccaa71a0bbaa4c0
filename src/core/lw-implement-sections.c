/* lw-implement-sections.c — the controller as cascaded second-order sections: pairing
 * and ordering of poles and zeros, peak gain of a section, evaluation and filtering
 * (lw-implement.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */

#include "lw-implement-private.h"

/* A pole this close to the unit circle (in |z|) counts as on it: the section has no finite
 * peak gain. */
#define ON_CIRCLE_TOL 1e-9

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
  LwStatus st = lw_impl_check_controller (cz, "sections", err);
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
