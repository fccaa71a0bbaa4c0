/* lw-evaluate.c — the sampled loop analyzed: frequency response on a densified grid, every
 * crossover refined, margins, sensitivity peak, bandwidth, closed-loop poles, step response.
 * Conventions: docs/conventions.md.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-internal.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#define RAD2DEG (180.0 / LW_PI)
#define LW_LN10 2.302585092994045684

void
lw_analysis_options_init (LwAnalysisOptions *o)
{
  o->compute_delay = 1;
  o->n_points = 2000;
  o->n_steps = 500;
  o->max_full_order = 150;
}

/* ---------------------------------------------------------------------------------------- */
/* The loop as a function of ω                                                               */

/* Relative error of L below which a value counts as resolved (a crossover is reported as a
 * number, docs/conventions.md): 1e-6 keeps a phase margin within 6e-5°, a gain margin within
 * 1e-5 dB. */
#define LW_REL_RESOLVED 1e-6
/* Estimated relative error of the state-space evaluation above which the aliasing sum is
 * tried. */
#define LW_REL_ALIAS 1e-9
/* Below this estimated relative error, a point counts as plainly resolved: points between such
 * points are evaluated without an error bound of their own (LW_GRID_STRIDE apart on the grid). */
#define LW_REL_QUIET 1e-10
#define LW_GRID_STRIDE 8
/* A phase crossover whose magnitude is certainly below this (a gain margin above 120 dB) is not
 * counted as unresolved when its phase cannot be resolved. */
#define LW_MAG_IRRELEVANT 1e-6

typedef struct {
  const LwSampledPlant *plant;
  const LwModel *ctrl;        /* in z */
  double t;                 /* sample period, s */
  double omega_n;           /* Nyquist frequency π/T, rad/s */
  int delay;                /* whole samples: plant dead time + computation delay */
  size_t order;             /* state-space order of the plant core */
  /* unwrapped phase of the delay-free part C·P_core on the grid, degrees */
  const double *grid;
  const double *core_phase;
  const double *rel;        /* relative error estimate of L on the grid */
  const bool *plain_ok;     /* the state space alone is plainly resolved there (LW_REL_QUIET) */
  size_t n;
} Loop;

static inline double
cabs_fast (double complex z)
{
  return sqrt (creal (z) * creal (z) + cimag (z) * cimag (z));
}

static bool
at_nyquist (const Loop *lp, double w)
{
  return fabs (w - lp->omega_n) <= 4.0 * DBL_EPSILON * lp->omega_n;
}

/* Product ∏(z − r_i) in real arithmetic (C99 complex multiply calls a NaN-checking helper),
 * with z = 1 + zm1 + j·zi and each real part formed as zm1 + (1 − Re r_i) (no cancellation near
 * z = 1). */
static inline void
root_product (const double complex *roots, size_t n, double zm1, double zi, double *pr,
              double *pi)
{
  double ar = *pr, ai = *pi;
  for (size_t i = 0; i < n; i++)
    {
      double fr = zm1 + (1.0 - creal (roots[i])), fi = zi - cimag (roots[i]);
      double t = ar * fr - ai * fi;
      ai = ar * fi + ai * fr;
      ar = t;
    }
  *pr = ar;
  *pi = ai;
}

/* The plant core at z = e^{jωT}. With rel == NULL: the Schur back substitution alone. Otherwise
 * with an estimate of its relative error in *rel: the back substitution with its running error
 * bound; where that is above LW_REL_ALIAS, the aliasing sum of the factored plant, kept when its
 * own estimate is smaller. Where the plant's own check (realization_rel, lw-sampled.c) found
 * the state space worse than its bound, the aliasing sum first, and the bound scaled by that
 * factor where the sum does not converge (docs/conventions.md, "Resolution"). */
static double complex
plant_core (const Loop *lp, double w, double zr, double zi, double *rel, bool *plain_ok)
{
  if (rel == NULL)
    return lw_schur_eval_unit (lp->plant->eval, zr, zi);
  double kappa = lp->plant->realization_rel, ea;
  if (kappa > 0.0)
    {
      /* the plant's own check found the state space worse than its bound: the aliasing sum
       * first, where it converges */
      double complex ha = lw_sampled_plant_alias_eval (lp->plant, w, 1e-13, &ea);
      double ma = sqrt (creal (ha) * creal (ha) + cimag (ha) * cimag (ha));
      if (isfinite (ea) && ma > 0.0 && isfinite (ma) && ea <= LW_REL_ALIAS * ma)
        {
          if (plain_ok != NULL)
            *plain_ok = false;
          *rel = ea / ma;
          return ha;
        }
    }
  double e;
  double complex h = lw_schur_eval_unit_err (lp->plant->eval, zr, zi, &e);
  double mag = sqrt (creal (h) * creal (h) + cimag (h) * cimag (h));
  double r = e / mag;
  /* where the plant's own check found the state space worse than its bound, the bound is
   * scaled by that factor */
  if (kappa > 0.0)
    r *= fmax (1.0, kappa);
  if (plain_ok != NULL)
    *plain_ok = r <= LW_REL_QUIET && !(kappa > 0.0);
  if (!(r > LW_REL_ALIAS) || kappa > 0.0)
    {
      *rel = isnan (r) ? INFINITY : r;
      return h;
    }
  double complex ha = lw_sampled_plant_alias_eval (lp->plant, w, 1e-13, &ea);
  double ma = hypot (creal (ha), cimag (ha));
  if (isfinite (ea) && isfinite (ma) && (ea < r * ma || !(r < INFINITY)))
    {
      *rel = ea / ma;
      return ha;
    }
  *rel = isnan (r) ? INFINITY : r;
  return h;
}

/* C(z)·P_core(z) at z = e^{jωT}: everything but the whole-sample delays. With rel != NULL, an
 * estimate of its relative error in *rel (and the more accurate formulation where needed); with
 * rel == NULL the plain state-space evaluation. */
static double complex
loop_core_eval (const Loop *lp, double w, double *rel, bool *plain_ok)
{
  bool nyq = at_nyquist (lp, w);
  double zr = -1.0, zi = 0.0;
  if (!nyq)
    {
      zr = cos (w * lp->t);
      zi = sin (w * lp->t);
    }
  double prel = 0.0;
  double complex h = plant_core (lp, w, zr, zi, rel != NULL ? &prel : NULL, plain_ok);
  double zm1 = zr > 0.0 ? -(zi * zi) / (1.0 + zr) : zr - 1.0;   /* cos θ − 1 */
  const LwModel *c = lp->ctrl;
  double nr = c->gain, ni = 0.0, dr = 1.0, di = 0.0;
  root_product (c->zeros, c->n_zeros, zm1, zi, &nr, &ni);
  root_product (c->poles, c->n_poles, zm1, zi, &dr, &di);
  if (rel != NULL)
    *rel = prel + 1.1102230246251565e-16 * (4.0 * (double) (c->n_zeros + c->n_poles) + 8.0);
  /* h · num / den */
  double den = dr * dr + di * di;
  double qr = (nr * dr + ni * di) / den, qi = (ni * dr - nr * di) / den;
  double hr = creal (h), hi = cimag (h);
  return (hr * qr - hi * qi) + (hr * qi + hi * qr) * I;
}

static double complex
loop_core_rel (const Loop *lp, double w, double *rel)
{
  return loop_core_eval (lp, w, rel, NULL);
}

static size_t grid_interval (const Loop *lp, double w);


/* C·P_core at any ω, for the refinements: plain where the grid around ω is well resolved, with
 * the error-aware evaluation otherwise (and before the grid exists). */
static double complex
loop_core (const Loop *lp, double w)
{
  double r;
  if (lp->plain_ok != NULL && lp->n > 1 && w >= lp->grid[0] && w <= lp->grid[lp->n - 1])
    {
      size_t i = grid_interval (lp, w);
      if (lp->plain_ok[i] && lp->plain_ok[i + 1 < lp->n ? i + 1 : i])
        return loop_core_eval (lp, w, NULL, NULL);
    }
  return loop_core_eval (lp, w, &r, NULL);
}

/* The whole-sample delay's phase, degrees (exact, continuous in ω). */
static double
delay_phase_deg (const Loop *lp, double w)
{
  if (at_nyquist (lp, w))
    return -180.0 * lp->delay;
  return -w * lp->t * lp->delay * RAD2DEG;
}

static double complex
loop_full (const Loop *lp, double w)
{
  double complex h = loop_core (lp, w);
  if (lp->delay == 0)
    return h;
  if (at_nyquist (lp, w))
    return (lp->delay % 2) ? -h : h;
  return h * cexp (-I * w * lp->t * lp->delay);
}

/* Branch of an angle (degrees) nearest to ref. */
static double
nearest_branch (double ang, double ref)
{
  return ang - 360.0 * round ((ang - ref) / 360.0);
}

/* Index i with grid[i] <= w <= grid[i+1] (binary search). */
static size_t
grid_interval (const Loop *lp, double w)
{
  size_t lo = 0, hi = lp->n - 1;
  while (hi - lo > 1)
    {
      size_t mid = (lo + hi) / 2;
      if (lp->grid[mid] <= w)
        lo = mid;
      else
        hi = mid;
    }
  return lo;
}

/* Unwrapped loop phase (degrees) at any ω inside the grid: the principal value of the core on the
 * branch nearest to the linear interpolation of its unwrapped grid values, plus the delay. */
static double
loop_phase_deg (const Loop *lp, double w, double complex core)
{
  size_t i = grid_interval (lp, w);
  double w0 = lp->grid[i], w1 = lp->grid[i + 1 < lp->n ? i + 1 : i];
  double p0 = lp->core_phase[i], p1 = lp->core_phase[i + 1 < lp->n ? i + 1 : i];
  double ref = (w1 > w0) ? p0 + (p1 - p0) * (w - w0) / (w1 - w0) : p0;
  return nearest_branch (carg (core) * RAD2DEG, ref) + delay_phase_deg (lp, w);
}

/* ---------------------------------------------------------------------------------------- */
/* Scalar root finding and maximization                                                      */

typedef double (*ScalarFn) (double x, void *data);

/* Brent's method (R. P. Brent, Algorithms for Minimization without Derivatives, 1973, ch. 4)
 * for a root of f in [a, b] with f(a)·f(b) <= 0; converges to a few ulps of x. */
static double
brent_root (ScalarFn f, void *data, double a, double b, double fa, double fb)
{
  if (fa == 0.0)
    return a;
  if (fb == 0.0)
    return b;
  double c = a, fc = fa, d = b - a, e = d;
  for (int iter = 0; iter < 200; iter++)
    {
      if ((fb > 0) == (fc > 0))
        {
          c = a; fc = fa;
          d = b - a; e = d;
        }
      if (fabs (fc) < fabs (fb))
        {
          a = b; b = c; c = a;
          fa = fb; fb = fc; fc = fa;
        }
      double tol = 2.0 * DBL_EPSILON * fabs (b);
      double m = 0.5 * (c - b);
      if (fabs (m) <= tol || fb == 0.0)
        return b;
      if (fabs (e) < tol || fabs (fa) <= fabs (fb))
        {
          d = m; e = m;
        }
      else
        {
          double s = fb / fa, p, q;
          if (a == c)
            {
              p = 2.0 * m * s;
              q = 1.0 - s;
            }
          else
            {
              double qq = fa / fc, r = fb / fc;
              p = s * (2.0 * m * qq * (qq - r) - (b - a) * (r - 1.0));
              q = (qq - 1.0) * (r - 1.0) * (s - 1.0);
            }
          if (p > 0)
            q = -q;
          else
            p = -p;
          if (2.0 * p < fmin (3.0 * m * q - fabs (tol * q), fabs (e * q)))
            {
              e = d;
              d = p / q;
            }
          else
            {
              d = m; e = m;
            }
        }
      a = b; fa = fb;
      b += (fabs (d) > tol) ? d : (m > 0 ? tol : -tol);
      fb = f (b, data);
    }
  return b;
}

/* Golden-section search for a maximum of f on [a, b], to a relative width of ~1e-10 (a maximum
 * is flat: its value is then exact to ~1e-20 relative, its location to ~1e-10). */
static double
golden_max (ScalarFn f, void *data, double a, double b, double *fmax_out)
{
  const double g = 0.6180339887498949;
  double x1 = b - g * (b - a), x2 = a + g * (b - a);
  double f1 = f (x1, data), f2 = f (x2, data);
  for (int iter = 0; iter < 200 && (b - a) > 1e-10 * fabs (b); iter++)
    {
      if (f1 < f2)
        {
          a = x1; x1 = x2; f1 = f2;
          x2 = a + g * (b - a);
          f2 = f (x2, data);
        }
      else
        {
          b = x2; x2 = x1; f2 = f1;
          x1 = b - g * (b - a);
          f1 = f (x1, data);
        }
    }
  if (f1 > f2)
    {
      *fmax_out = f1;
      return x1;
    }
  *fmax_out = f2;
  return x2;
}

static double
fn_log_mag (double w, void *data)
{
  return log (cabs (loop_core (data, w)));
}

typedef struct {
  const Loop *lp;
  double target;
} PhaseTarget;

static double
fn_phase (double w, void *data)
{
  const PhaseTarget *pt = data;
  return loop_phase_deg (pt->lp, w, loop_core (pt->lp, w)) - pt->target;
}

static double
fn_sens (double w, void *data)
{
  return 1.0 / cabs (1.0 + loop_full (data, w));
}

static double
fn_comp_db (double w, void *data)
{
  const PhaseTarget *pt = data;
  double complex l = loop_full (pt->lp, w);
  return 20.0 * log10 (cabs (l / (1.0 + l))) - pt->target;
}

/* ---------------------------------------------------------------------------------------- */
/* Frequency grid                                                                             */

static int
cmp_double (const void *a, const void *b)
{
  double x = *(const double *) a, y = *(const double *) b;
  return (x > y) - (x < y);
}

typedef struct {
  double wn;     /* natural frequency, rad/s */
  double zeta;   /* damping */
} Corner;

/* Corners of the continuous plant (s-plane roots) and of the controller (z roots taken to the
 * s-plane by s = ln(z)/T). Returns the count written (at most cap). */
static size_t
collect_corners (const LwModel *plant_s, const LwModel *ctrl, double t, Corner *out, size_t cap)
{
  size_t k = 0;
  const double complex *lists[4] = { plant_s->zeros, plant_s->poles, ctrl->zeros, ctrl->poles };
  size_t counts[4] = { plant_s->n_zeros, plant_s->n_poles, ctrl->n_zeros, ctrl->n_poles };
  for (int l = 0; l < 4; l++)
    for (size_t i = 0; i < counts[l] && k < cap; i++)
      {
        double complex r = lists[l][i];
        if (l >= 2)
          {
            if (cabs (r) < 1e-300)
              continue;
            r = clog (r) / t;
          }
        double wn = cabs (r);
        if (!(wn > 0) || !isfinite (wn))
          continue;
        out[k].wn = wn;
        out[k].zeta = -creal (r) / wn;
        k++;
      }
  return k;
}

static int
count_unit_roots (const double complex *r, size_t n)
{
  int k = 0;
  for (size_t i = 0; i < n; i++)
    k += cabs (r[i] - 1.0) <= 1e-12;
  return k;
}

/* Merges two ascending arrays into out (strictly ascending, duplicates dropped); returns the
 * count written. */
static size_t
merge_sorted (const double *a, size_t na, const double *b, size_t nb, double *out)
{
  size_t ia = 0, ib = 0, m = 0;
  while (ia < na || ib < nb)
    {
      double v = (ib >= nb || (ia < na && a[ia] <= b[ib])) ? a[ia++] : b[ib++];
      if (m == 0 || v > out[m - 1])
        out[m++] = v;
    }
  return m;
}

/* The most points added to resolve the phase of a long whole-sample delay. */
#define LW_DELAY_POINTS_MAX 200000
/* The delay's phase moves at most this much (rad) between grid points where they are added. */
#define LW_DELAY_STEP_RAD 0.25

/* Builds the grid: log-spaced from ω_lo to π/T (the end point exact), plus points clustered
 * around every lightly damped corner (ζ < 0.3) below the Nyquist frequency, plus linearly
 * spaced points where a long whole-sample delay would turn the phase by more than
 * LW_DELAY_STEP_RAD between log-spaced points. ω_lo lies below the slowest corner of plant and
 * controller (on the low-frequency asymptote), and with integrators (or zeros at s = 0) low
 * enough that |L| is at least 10 (at most 0.1) there, so no crossover lies below the grid. */
static LwStatus
build_grid (const Loop *lp, const LwModel *plant_s, int n_int, size_t n_points, double **grid_out,
            size_t *n_out, LwError *err)
{
  double wn_top = lp->omega_n;
  size_t ncap = plant_s->n_zeros + plant_s->n_poles + lp->ctrl->n_zeros + lp->ctrl->n_poles;
  Corner *corners = calloc (ncap + 1, sizeof *corners);
  if (corners == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the frequency grid");
  size_t nc = collect_corners (plant_s, lp->ctrl, lp->t, corners, ncap);

  double wmin_corner = INFINITY;
  size_t n_res = 0;
  for (size_t i = 0; i < nc; i++)
    {
      if (corners[i].wn < wn_top)
        wmin_corner = fmin (wmin_corner, corners[i].wn);
      if (fabs (corners[i].zeta) < 0.3 && corners[i].wn < wn_top)
        n_res++;
    }
  /* the floor keeps ωT far above the range where sin²(ωT) underflows */
  double wfloor = wn_top * 1e-140;
  double wlo = isfinite (wmin_corner) ? wmin_corner / 50.0 : wn_top * 1e-4;
  wlo = fmax (fmin (wlo, wn_top * 1e-2), wfloor);
  /* With integrators the gain crossover can lie below every corner: lower ω_lo until the
   * low-frequency asymptote |L| ∝ ω^−k is well above 0 dB there (|L| >= 10); with zeros at
   * s = 0 (k < 0) until it is well below (|L| <= 0.1). */
  if (n_int != 0)
    for (int it = 0; it < 40 && wlo > wfloor; it++)
      {
        double mag = cabs (loop_core (lp, wlo));
        if (!isfinite (mag))
          break;
        double f;
        if (n_int > 0)
          {
            if (mag >= 10.0)
              break;
            f = 2.0 * pow (10.0 / fmax (mag, 1e-300), 1.0 / n_int);
          }
        else
          {
            if (mag <= 0.1)
              break;
            f = 2.0 * pow (mag / 0.1, 1.0 / -n_int);
          }
        wlo = fmax (wlo / fmin (f, 1e30), wfloor);
      }

  size_t per_res = 0;
  if (n_res > 0)
    {
      per_res = n_points / 4 / n_res;
      if (per_res > 64)
        per_res = 64;
      if (per_res < 8)
        per_res = n_points >= 64 ? 8 : 0;
    }
  size_t n_extra = per_res * n_res;
  if (n_extra > n_points / 2)
    n_extra = 0, per_res = 0;
  size_t n_base = n_points - n_extra;
  double l0 = log (wlo), l1 = log (wn_top);

  /* the delay's phase ωTD moves by ωTD·Δ(ln ω) between log-spaced points: above ω_d, where
   * that exceeds LW_DELAY_STEP_RAD, add points every LW_DELAY_STEP_RAD/(TD) rad/s (at most
   * LW_DELAY_POINTS_MAX; beyond that the spacing widens) */
  size_t n_dly = 0;
  double wd0 = 0.0, dwd = 0.0;
  if (lp->delay > 0)
    {
      double td = lp->t * (double) lp->delay, dl = (l1 - l0) / (double) (n_base - 1);
      wd0 = LW_DELAY_STEP_RAD / (td * dl);
      if (wd0 < wn_top)
        {
          wd0 = fmax (wd0, wlo);
          dwd = LW_DELAY_STEP_RAD / td;
          double cnt = ceil ((wn_top - wd0) / dwd);
          if (cnt > LW_DELAY_POINTS_MAX)
            {
              cnt = LW_DELAY_POINTS_MAX;
              dwd = (wn_top - wd0) / cnt;
            }
          n_dly = cnt > 1 ? (size_t) cnt - 1 : 0;
        }
    }

  size_t total = n_points + n_dly;
  double *g = calloc (total, sizeof *g), *merged = malloc (total * sizeof *merged);
  if (g == NULL || merged == NULL)
    {
      free (corners);
      free (g);
      free (merged);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the frequency grid");
    }
  for (size_t i = 0; i < n_base; i++)
    g[i] = exp (l0 + (l1 - l0) * (double) i / (double) (n_base - 1));
  g[0] = wlo;
  g[n_base - 1] = wn_top;
  size_t k = n_base;
  for (size_t i = 0; i < nc && per_res > 0; i++)
    {
      if (!(fabs (corners[i].zeta) < 0.3 && corners[i].wn < wn_top))
        continue;
      double wn = corners[i].wn, zt = fmax (fabs (corners[i].zeta), 1e-6);
      for (size_t j = 0; j < per_res && k < n_points; j++)
        {
          double tt = -6.0 + 12.0 * ((double) j + 0.5) / (double) per_res;
          double w = wn * (1.0 + zt * tt);
          if (w > wlo && w < wn_top)
            g[k++] = w;
        }
    }
  free (corners);
  /* the base grid is sorted; sort the clustered points (few) and merge them in */
  size_t ne = k - n_base;
  qsort (g + n_base, ne, sizeof *g, cmp_double);
  size_t m = merge_sorted (g, n_base, g + n_base, ne, merged);
  if (n_dly > 0)
    {
      /* the delay points (ascending) go after the merged ones in g, then one more merge */
      for (size_t i = 0; i < n_dly; i++)
        g[i] = fmin (wd0 + dwd * (double) (i + 1), wn_top);
      memcpy (g + n_dly, merged, m * sizeof *g);
      m = merge_sorted (g + n_dly, m, g, n_dly, merged);
    }
  free (g);
  *grid_out = merged;
  *n_out = m;
  return LW_OK;
}

/* ---------------------------------------------------------------------------------------- */
/* Closed loop                                                                                */

typedef struct {
  size_t np, nd, nc, n;   /* plant core, delay line, controller, total */
  double *a;              /* n×n column-major */
  double *b;              /* n */
  double *c;              /* n: y = C x + D r */
  double d;
} ClosedLoop;

static void
closed_loop_free (ClosedLoop *cl)
{
  free (cl->a);
  free (cl->b);
  free (cl->c);
  cl->a = cl->b = cl->c = NULL;   /* the error paths free here and lw_evaluate frees again */
}

/* Unity negative feedback of  z^-delay · C(z) · P_core(z). State [x_p; q_1…q_D; x_c] where
 * q_i holds u_c delayed by i samples. */
static LwStatus
closed_loop_build (const LwSs *p, const LwSs *c, int delay, ClosedLoop *cl, LwError *err)
{
  size_t np = p->n, nc = c->n, nd = (size_t) delay, n = np + nd + nc;
  memset (cl, 0, sizeof *cl);
  cl->np = np; cl->nd = nd; cl->nc = nc; cl->n = n;
  size_t nn = lw_mul_size (n, n);
  if (n > 0 && nn == 0)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "closed loop too large");
  cl->a = calloc (nn + 1, sizeof (double));
  cl->b = calloc (n + 1, sizeof (double));
  cl->c = calloc (n + 1, sizeof (double));
  double *f = calloc (n + 1, sizeof (double));   /* u_c = F x + G r */
  if (cl->a == NULL || cl->b == NULL || cl->c == NULL || f == NULL)
    {
      free (f);
      closed_loop_free (cl);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the closed loop");
    }
  double gr;
  size_t iq = np + nd - 1;      /* q_D, valid when nd > 0 */
  size_t oc = np + nd;          /* controller offset */
  if (nd > 0)
    {
      /* y = Cp x_p + Dp q_D; u_c = Cc x_c + Dc (r − y) */
      for (size_t j = 0; j < np; j++)
        {
          cl->c[j] = p->c[j];
          f[j] = -c->d * p->c[j];
        }
      cl->c[iq] += p->d;
      f[iq] += -c->d * p->d;
      for (size_t j = 0; j < nc; j++)
        f[oc + j] = c->c[j];
      gr = c->d;
      cl->d = 0.0;
    }
  else
    {
      double den = 1.0 + c->d * p->d;
      if (fabs (den) < 1e-14)
        {
          free (f);
          closed_loop_free (cl);
          return lw_error_set (err, LW_ERR_INVALID, -1,
                               "the loop has an algebraic loop with 1 + C·P = 0 at z = ∞; "
                               "add a computation delay");
        }
      for (size_t j = 0; j < np; j++)
        f[j] = -c->d * p->c[j] / den;
      for (size_t j = 0; j < nc; j++)
        f[oc + j] = c->c[j] / den;
      gr = c->d / den;
      /* y = Cp x_p + Dp u_c */
      for (size_t j = 0; j < n; j++)
        cl->c[j] = p->d * f[j];
      for (size_t j = 0; j < np; j++)
        cl->c[j] += p->c[j];
      cl->d = p->d * gr;
    }
  /* x_p+ = Ap x_p + Bp u_d */
  for (size_t j = 0; j < np; j++)
    for (size_t i = 0; i < np; i++)
      cl->a[i + j * n] = p->a[i + j * np];
  if (nd > 0)
    for (size_t i = 0; i < np; i++)
      cl->a[i + iq * n] += p->b[i];
  else
    {
      for (size_t j = 0; j < n; j++)
        for (size_t i = 0; i < np; i++)
          cl->a[i + j * n] += p->b[i] * f[j];
      for (size_t i = 0; i < np; i++)
        cl->b[i] += p->b[i] * gr;
    }
  /* q_1+ = u_c, q_{i+1}+ = q_i */
  if (nd > 0)
    {
      for (size_t j = 0; j < n; j++)
        cl->a[np + j * n] = f[j];
      cl->b[np] = gr;
      for (size_t i = 1; i < nd; i++)
        cl->a[(np + i) + (np + i - 1) * n] = 1.0;
    }
  /* x_c+ = Ac x_c + Bc (r − y) */
  for (size_t i = 0; i < nc; i++)
    {
      for (size_t j = 0; j < nc; j++)
        cl->a[(oc + i) + (oc + j) * n] = c->a[i + j * nc];
      for (size_t j = 0; j < n; j++)
        cl->a[(oc + i) + j * n] -= c->b[i] * cl->c[j];
      cl->b[oc + i] = c->b[i] * (1.0 - cl->d);
    }
  free (f);
  return LW_OK;
}

/* Unity-feedback step response, simulated structurally: plant state space, delay line,
 * controller sections — never through an expanded polynomial. */
static LwStatus
simulate_step (const LwSs *p, const LwSs *c, int delay, size_t n_steps, double *y_out,
               LwError *err)
{
  size_t np = p->n, nc = c->n, nd = (size_t) delay;
  double *xp = calloc (np + 1, sizeof (double)), *xp2 = calloc (np + 1, sizeof (double));
  double *xc = calloc (nc + 1, sizeof (double)), *xc2 = calloc (nc + 1, sizeof (double));
  double *line = calloc (nd + 1, sizeof (double));
  /* row-major copies: the inner loops run along rows */
  double *pa = calloc (np * np + 1, sizeof (double)), *ca = calloc (nc * nc + 1, sizeof (double));
  if (xp == NULL || xp2 == NULL || xc == NULL || xc2 == NULL || line == NULL || pa == NULL
      || ca == NULL)
    {
      free (xp); free (xp2); free (xc); free (xc2); free (line); free (pa); free (ca);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the step response");
    }
  for (size_t i = 0; i < np; i++)
    for (size_t j = 0; j < np; j++)
      pa[i * np + j] = p->a[i + j * np];
  for (size_t i = 0; i < nc; i++)
    for (size_t j = 0; j < nc; j++)
      ca[i * nc + j] = c->a[i + j * nc];
  const double r = 1.0;
  double den = 1.0 + c->d * p->d;
  for (size_t k = 0; k < n_steps; k++)
    {
      double cpx = 0.0, ccx = 0.0;
      for (size_t j = 0; j < np; j++)
        cpx += p->c[j] * xp[j];
      for (size_t j = 0; j < nc; j++)
        ccx += c->c[j] * xc[j];
      double y, e, uc, ud;
      if (nd > 0)
        {
          ud = line[k % nd];            /* u_c[k − D] */
          y = cpx + p->d * ud;
          e = r - y;
          uc = ccx + c->d * e;
          line[k % nd] = uc;
        }
      else
        {
          uc = (ccx + c->d * (r - cpx)) / den;
          ud = uc;
          y = cpx + p->d * uc;
          e = r - y;
        }
      y_out[k] = y;
      /* plant: quasi-triangular (real Schur) A, row i uses columns i−1 … n−1 */
      for (size_t i = 0; i < np; i++)
        {
          double acc = p->b[i] * ud;
          const double *row = pa + i * np;
          for (size_t j = i == 0 ? 0 : i - 1; j < np; j++)
            acc += row[j] * xp[j];
          xp2[i] = acc;
        }
      for (size_t i = 0; i < nc; i++)
        {
          double acc = c->b[i] * e;
          const double *row = ca + i * nc;
          for (size_t j = 0; j < nc; j++)
            acc += row[j] * xc[j];
          xc2[i] = acc;
        }
      double *t = xp; xp = xp2; xp2 = t;
      t = xc; xc = xc2; xc2 = t;
    }
  free (xp); free (xp2); free (xc); free (xc2); free (line); free (pa); free (ca);
  return LW_OK;
}

/* ---------------------------------------------------------------------------------------- */
/* Closed loop of a long delay: stability by the Nyquist criterion, the dominant poles        */
/*
 * The closed-loop order is n = np + nc + D (D whole samples of delay). Beyond
 * LwAnalysisOptions.max_full_order its state space is not formed: the count of closed-loop
 * poles on or outside the circle |z| = ρ = 1 − 1e-10 (the eigenvalue path's stability bound)
 * comes from the argument principle, and only the dominant poles are computed.
 *
 * Argument principle for F = 1 + L on the contour z = ρe^{jθ}, θ: 0 → 2π (counter-clockwise):
 * Z_out = P_out − W, with P_out the open-loop poles (controller poles, plant eigenvalues; the D
 * poles at z = 0 lie inside) with |p| > ρ and W the counter-clockwise winding of L about −1.
 * L is real at θ = 0 and π and L(ρe^{−jθ}) = conj L(ρe^{jθ}), so W is twice the signed count
 * of crossings of the ray (−∞, −1) on the upper half, a crossing on the real axis counting one
 * half. A crossing needs |L| > 1, and over an arc where |L| > 1 throughout the signed count
 * depends only on the continuous phase Φ = arg L at the two ends: that is why the cost does not
 * grow with D. Φ is continued along the arc factor by factor: z^{−D} exactly (−Dθ); each
 * controller root and plant eigenvalue r by the principal arg of (z_b − r)/(z_a − r) (the arc is
 * bisected until every one of them turns by at most π/2, which makes the principal value the
 * continuous one); the rest, Q = P·∏(z − λ_i) (a polynomial), by its principal increment,
 * bisecting until it turns by at most π/4.
 */

#define CL_RHO (1.0 - 1e-10)
/* when the Nyquist count does not resolve, every pole is computed up to this order */
#define LW_CL_FALLBACK_ORDER 2000
#define CL_MAX_DEPTH 64
#define CL_DOMINANT 32            /* dominant closed-loop poles reported beyond max_full_order */

typedef struct {
  double th;
  double complex z;
  double lnmag;                   /* ln|L(z)| on the contour */
  double complex q;               /* Q(z)/|Q(z)|, direction of the polynomial part */
} NyqPoint;

typedef struct {
  const Loop *lp;
  LwSchurEval *eval;
  double complex *roots;          /* controller zeros, controller poles, plant eigenvalues */
  int *sign;                      /* +1 for a zero, −1 for a pole */
  size_t n_roots, n_ctrl_roots;   /* the plant eigenvalues follow the controller roots */
  double d;                       /* D, whole samples */
  double ln_rho;
  long twice_cross;               /* W: signed crossings of (−∞, −1), in half units */
  bool marginal;                  /* |L| = 1 near L = −1: a pole on the contour */
  bool failed;                    /* non-finite values or unresolved phase */
  /* where |L| is largest on the upper half (seeds for the dominant poles) */
  double best_lnmag, best_th, best_phi;
} Nyq;

static bool
nyq_eval (Nyq *q, double th, NyqPoint *pt)
{
  double complex z;
  if (th == 0.0)
    z = CL_RHO;
  else if (th == LW_PI)
    z = -CL_RHO;
  else
    z = CL_RHO * cos (th) + CL_RHO * sin (th) * I;
  pt->th = th;
  pt->z = z;
  double complex p = lw_schur_eval (q->eval, z);
  double ap = cabs (p);
  double lm = log (fabs (q->lp->ctrl->gain)) + log (ap) - q->d * q->ln_rho;
  double complex dir = ap > 0.0 ? p / ap : 1.0;   /* |L| = 0 there: outside |L| >= 1 */
  for (size_t i = 0; i < q->n_roots; i++)
    {
      double complex f = z - q->roots[i];
      double a = cabs (f);
      if (i < q->n_ctrl_roots)
        lm += q->sign[i] * log (a);   /* |C| (P is already whole) */
      else
        dir *= f / a;                 /* Q = P·∏(z − λ_i) */
    }
  pt->lnmag = lm;
  pt->q = dir;
  return isfinite (creal (dir)) && isfinite (cimag (dir)) && !isnan (lm);
}

/* H(x) = twice the number of levels π + 2πm below x, plus one for a level at x. */
static long
nyq_levels2 (double x)
{
  double u = (x - LW_PI) / (2.0 * LW_PI);
  double c = ceil (u);
  return (u == c) ? 2 * (long) c + 1 : 2 * (long) c;
}

/* Phase increment of L from a to b along the contour; *ok false when the arc must be split. */
static double
nyq_increment (const Nyq *q, const NyqPoint *a, const NyqPoint *b, bool *ok)
{
  *ok = true;
  double dq = carg (b->q * conj (a->q));
  if (fabs (dq) > LW_PI / 4)
    *ok = false;
  double inc = dq - q->d * (b->th - a->th);
  for (size_t i = 0; i < q->n_roots; i++)
    {
      double complex fa = a->z - q->roots[i], fb = b->z - q->roots[i];
      double dr = carg (fb * conj (fa));
      if (fabs (dr) > LW_PI / 2)
        *ok = false;
      inc += q->sign[i] * dr;
    }
  return inc;
}

/* Walks the arc a → b with Φ(a) = *phi; on return *phi = Φ(b). */
static void
nyq_walk (Nyq *q, const NyqPoint *a, const NyqPoint *b, double *phi, int depth)
{
  if (q->failed)
    return;
  bool ok;
  double inc = nyq_increment (q, a, b, &ok);
  if (!isfinite (inc) || !isfinite (*phi))
    {
      q->failed = true;
      return;
    }
  bool in_a = a->lnmag >= 0.0, in_b = b->lnmag >= 0.0;
  /* between two points with |L| < 1 nothing is counted and Φ is needed only modulo 2π, which
   * the sum of principal values gives */
  if (!in_a && !in_b)
    ok = true;
  /* an arc that leaves or enters |L| >= 1 is narrowed until Φ barely moves along it and no
   * level lies in between: where a level stays in an arc at the limit of resolution, L = −1 on
   * the contour (a closed-loop pole on |z| = ρ, to rounding) */
  if (ok && in_a != in_b
      && (fabs (inc) > 1e-3 || nyq_levels2 (*phi + inc) != nyq_levels2 (*phi)))
    ok = false;
  double width = b->th - a->th;
  if (!ok && (depth >= CL_MAX_DEPTH || width <= 4.0 * DBL_EPSILON * fmax (b->th, 1e-300)))
    {
      if (in_a != in_b)
        ok = true;                     /* an edge of |L| >= 1 located to rounding */
      else
        {
          q->failed = true;
          return;
        }
    }
  if (!ok)
    {
      NyqPoint m;
      if (!nyq_eval (q, 0.5 * (a->th + b->th), &m))
        {
          q->failed = true;
          return;
        }
      nyq_walk (q, a, &m, phi, depth + 1);
      nyq_walk (q, &m, b, phi, depth + 1);
      return;
    }
  double pa = *phi, pb = pa + inc;
  if (in_a || in_b)
    {
      long dh = nyq_levels2 (pb) - nyq_levels2 (pa);
      q->twice_cross += dh;
      if (in_a != in_b && dh != 0)
        q->marginal = true;
    }
  if (b->lnmag > q->best_lnmag)
    {
      q->best_lnmag = b->lnmag;
      q->best_th = b->th;
      q->best_phi = pb;
    }
  *phi = pb;
}

/* Closed-loop poles with |z| >= ρ by the Nyquist count. *resolved false when the count could
 * not be made (non-finite values, a phase that would not resolve). */
static LwStatus
nyq_count (Nyq *q, const double *grid, size_t n_grid, long n_order, long *n_out, bool *resolved,
           LwError *err)
{
  const Loop *lp = q->lp;
  size_t cap = n_grid + q->n_roots + 2 + 15;   /* ends, grid, root angles, π/16 steps */
  double *th = malloc (cap * sizeof *th);
  if (th == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the Nyquist count");
  size_t k = 0;
  th[k++] = 0.0;
  th[k++] = LW_PI;
  for (size_t i = 0; i < n_grid; i++)
    {
      double v = grid[i] * lp->t;
      if (v > 0.0 && v < LW_PI)
        th[k++] = v;
    }
  /* roots near the contour: their angle, where |L| peaks or dips */
  for (size_t i = 0; i < q->n_roots; i++)
    {
      double a = carg (q->roots[i]);
      if (fabs (cabs (q->roots[i]) - 1.0) < 1e-2 && a > 0.0 && a < LW_PI)
        th[k++] = a;
    }
  /* no arc longer than π/16 (roots far from the contour then turn by less than π/2) */
  for (int i = 1; i < 16; i++)
    th[k++] = LW_PI * i / 16.0;
  qsort (th, k, sizeof *th, cmp_double);

  q->twice_cross = 0;
  q->marginal = q->failed = false;
  q->best_lnmag = -INFINITY;
  NyqPoint a, b;
  double phi = 0.0;
  if (!nyq_eval (q, 0.0, &a))
    q->failed = true;
  else
    {
      /* L(ρ) is real: Φ(0) is 0 or π exactly */
      double complex c0 = lw_model_eval (lp->ctrl, a.z) * lw_schur_eval (q->eval, a.z);
      phi = creal (c0) < 0.0 ? LW_PI : 0.0;
      q->best_lnmag = a.lnmag;
      q->best_th = 0.0;
      q->best_phi = phi;
    }
  for (size_t i = 1; i < k && !q->failed; i++)
    {
      if (th[i] == th[i - 1])
        continue;
      if (!nyq_eval (q, th[i], &b))
        {
          q->failed = true;
          break;
        }
      nyq_walk (q, &a, &b, &phi, 0);
      a = b;
    }
  free (th);
  if (!q->failed)
    {
      /* L(−ρ) is real: Φ(π) must be a multiple of π of the right parity; snap it there and
       * correct the count of the last arc by the snap */
      double complex cpi = lw_model_eval (lp->ctrl, -CL_RHO) * lw_schur_eval (q->eval, -CL_RHO);
      double delay_sign = (lp->delay % 2) ? -1.0 : 1.0;
      bool neg = creal (cpi) * delay_sign < 0.0;
      double m = round (phi / LW_PI);
      bool odd = fmod (fabs (m), 2.0) == 1.0;
      if (odd != neg || fabs (phi - m * LW_PI) > 1e-6 * fmax (1.0, fabs (phi)))
        q->failed = true;
      else if (a.lnmag >= 0.0)
        /* a level exactly at θ = π counts one half (the mirror arc brings the other);
         * nyq_walk counted it whole or not at all. H(mπ) = m exactly (m·π in floating point
         * need not land on the level) */
        q->twice_cross += (long) m - nyq_levels2 (phi);
    }
  *resolved = !q->failed;
  if (q->failed)
    return LW_OK;
  long p_out = 0;
  for (size_t i = 0; i < q->n_roots; i++)
    if (q->sign[i] < 0 && cabs (q->roots[i]) > CL_RHO)
      p_out++;
  long z_out = p_out - q->twice_cross;
  if (z_out < 0 || z_out > n_order)
    {
      *resolved = false;
      return LW_OK;
    }
  *n_out = z_out;
  return LW_OK;
}

/* ln(−z^{−D} C(z) P(z)) with its imaginary part wrapped into [−π, π] (zero at a closed-loop
 * pole), and its derivative; false where it is not finite. */
static bool
cl_log_char (const Nyq *q, double complex z, double complex *g, double complex *dg)
{
  const LwModel *c = q->lp->ctrl;
  if (!(cabs (z) > 0.0) || !isfinite (cabs (z)))
    return false;
  double complex dp, p = lw_schur_eval_deriv (q->eval, z, &dp);
  double complex cz = lw_model_eval (c, z);
  if (!(cabs (p) > 0.0) || !(cabs (cz) > 0.0) || !isfinite (cabs (p)) || !isfinite (cabs (cz)))
    return false;
  double complex dlc = 0.0;
  for (size_t i = 0; i < c->n_zeros; i++)
    dlc += 1.0 / (z - c->zeros[i]);
  for (size_t i = 0; i < c->n_poles; i++)
    dlc -= 1.0 / (z - c->poles[i]);
  double complex lw = -q->d * clog (z) + clog (cz) + clog (p);
  *g = creal (lw) + remainder (cimag (lw) + LW_PI, 2.0 * LW_PI) * I;
  *dg = -q->d / z + dlc + dp / p;
  return isfinite (creal (*g)) && isfinite (cabs (*dg));
}

/* Newton's method on ln(−z^{−D} C(z) P(z)) = 0 (nearly linear in ln z for a long delay, where
 * 1 + z^{−D} C P is not) from *z; true when it converged to a closed-loop pole. */
static bool
cl_newton (const Nyq *q, double complex *zio)
{
  double complex z = *zio, g, dg;
  bool conv = false;
  for (int it = 0; it < 100; it++)
    {
      if (!cl_log_char (q, z, &g, &dg) || !(cabs (dg) > 0.0))
        return false;
      double complex step = g / dg;
      /* at most a tenth of |z| per step */
      double a = cabs (step);
      if (a > 0.1 * cabs (z))
        step *= 0.1 * cabs (z) / a;
      z -= step;
      if (a <= 8.0 * DBL_EPSILON * cabs (z))
        {
          conv = true;
          break;
        }
    }
  /* accept a root only: |ln(−w)| small (it is the relative residual of 1 + w) */
  if (!conv || !cl_log_char (q, z, &g, &dg) || !(cabs (g) <= 1e-8))
    return false;
  *zio = z;
  return true;
}

static int
cmp_modulus_desc (const void *a, const void *b)
{
  double x = cabs (*(const double complex *) a), y = cabs (*(const double complex *) b);
  return (x < y) - (x > y);
}

/* The dominant closed-loop poles (largest |z|, up to CL_DOMINANT, conjugates together): Newton
 * from the points spaced 2π/D around where |L| is largest on the contour (the roots near the
 * circle, |z|^D ≈ |C P|), from the open-loop poles outside the contour and from the controller
 * zeros and the sampled plant's zeros. Sorted by |z|, largest first. */
static LwStatus
cl_dominant (const Nyq *q, const LwModel *plant_z, double complex **out, size_t *n_out,
             LwError *err)
{
  size_t cap = 2 * (2 * CL_DOMINANT + 1) + 6 * (q->n_roots + plant_z->n_zeros) + 2;
  double complex *r = malloc (cap * sizeof *r);
  if (r == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the closed-loop poles");
  size_t k = 0;
  double rad = exp ((q->best_lnmag + q->d * q->ln_rho) / q->d);
  if (!isfinite (rad))
    rad = 1.0;
  rad = fmin (fmax (rad, 0.5), 2.0);
  /* where arg L = π (mod 2π) near θ_best: Φ falls with slope ≈ D */
  double off = remainder (q->best_phi - LW_PI, 2.0 * LW_PI) / q->d;
  for (int j = -CL_DOMINANT; j <= CL_DOMINANT; j++)
    {
      double th = q->best_th + off + 2.0 * LW_PI * j / q->d;
      if (th < 0.0 || th > LW_PI)
        continue;
      double complex z = rad * cexp (I * th);
      if (cl_newton (q, &z))
        r[k++] = z;
    }
  for (size_t i = 0; i < q->n_roots + plant_z->n_zeros; i++)
    {
      double complex s = i < q->n_roots ? q->roots[i] : plant_z->zeros[i - q->n_roots];
      if (cabs (s) == 0.0 || cimag (s) < 0.0)
        continue;
      /* both sides, near and farther: a root beside a pole–zero dipole lies between them */
      const double eps[4] = { 1e-7, -1e-7, 1e-9, -1e-9 };
      for (int e = 0; e < 4; e++)
        {
          double complex z = s * (1.0 + eps[e]) + fabs (eps[e]) * I * (cimag (s) != 0.0);
          if (cl_newton (q, &z))
            r[k++] = z;
        }
    }
  /* beside an open-loop pole p outside the circle z^−D is tiny and the closed-loop pole sits
   * at p − p^−D·R (R the residue of C P at p, from (z − p)·C P a little beside it), closer
   * than Newton on the logarithm resolves: taken from that first-order formula when the shift
   * is below 1e-6·|p| (its error is then of the order of the shift squared) */
  for (size_t i = 0; i < q->n_roots; i++)
    {
      double complex pz = q->roots[i];
      if (q->sign[i] > 0 || !(cabs (pz) > CL_RHO) || cimag (pz) < 0.0)
        continue;
      double dl = 1e-7 * cabs (pz);
      double complex z1 = pz + dl;
      double complex res = dl * lw_model_eval (q->lp->ctrl, z1) * lw_schur_eval (q->eval, z1);
      double complex shift = cexp (-q->d * clog (pz)) * res;
      if (isfinite (cabs (shift)) && cabs (shift) <= 1e-6 * cabs (pz))
        {
          double complex z = pz - shift;
          if (cimag (pz) == 0.0)
            z = creal (z);
          r[k++] = z;
        }
    }
  /* an open-loop pole that a zero of the other factor cancels (a controller pole on a plant
   * zero, e.g. at z = −1) is a closed-loop pole that 1 + L does not show: taken as it is when
   * |C P| does not grow towards it (at a pole of L it grows like 1/δ: ×10 from 10δ to δ) */
  for (size_t i = 0; i < q->n_roots; i++)
    {
      double complex pz = q->roots[i];
      if (q->sign[i] > 0 || cabs (pz) == 0.0 || cimag (pz) < 0.0)
        continue;
      double dl = 1e-6 * fmax (1.0, cabs (pz));
      double complex z1 = pz + dl, z10 = pz + 10.0 * dl;
      double a1 = cabs (lw_model_eval (q->lp->ctrl, z1) * lw_schur_eval (q->eval, z1));
      double a10 = cabs (lw_model_eval (q->lp->ctrl, z10) * lw_schur_eval (q->eval, z10));
      if (a1 < 3.0 * a10)
        r[k++] = pz;
    }
  /* one of each conjugate pair (upper half), real roots exactly real, duplicates dropped */
  size_t m = 0;
  for (size_t i = 0; i < k; i++)
    {
      double complex z = r[i];
      if (fabs (cimag (z)) <= 1e-12 * cabs (z))
        z = creal (z);
      else if (cimag (z) < 0.0)
        z = conj (z);
      bool dup = false;
      for (size_t j = 0; j < m && !dup; j++)
        dup = cabs (r[j] - z) <= 1e-9 * fmax (cabs (z), 1e-300);
      if (!dup)
        r[m++] = z;
    }
  qsort (r, m, sizeof *r, cmp_modulus_desc);
  size_t n = 0;
  double complex *o = malloc ((2 * CL_DOMINANT + 1) * sizeof *o);
  if (o == NULL)
    {
      free (r);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the closed-loop poles");
    }
  for (size_t i = 0; i < m && n < CL_DOMINANT; i++)
    {
      o[n++] = r[i];
      if (cimag (r[i]) != 0.0)
        {
          if (n == CL_DOMINANT)
            {
              n--;                      /* keep pairs whole */
              break;
            }
          o[n++] = conj (r[i]);
        }
    }
  free (r);
  *out = o;
  *n_out = n;
  return LW_OK;
}

/* Step figures from the samples: see docs/conventions.md. */
static void
step_figures (LwStep *st, double t)
{
  if (!st->has_final || fabs (st->final_value) < 1e-12)
    return;
  double yf = st->final_value;
  size_t n = st->n;
  double peak = -INFINITY;
  for (size_t k = 0; k < n; k++)
    peak = fmax (peak, st->samples[k] / yf);
  /* rise 10 % → 90 %, linear interpolation between samples */
  double t10 = NAN, t90 = NAN;
  for (size_t k = 0; k < n; k++)
    {
      double v = st->samples[k] / yf, vp = k > 0 ? st->samples[k - 1] / yf : 0.0;
      if (isnan (t10) && v >= 0.1)
        t10 = k == 0 ? 0.0 : t * ((double) (k - 1) + (0.1 - vp) / (v - vp));
      if (!isnan (t10) && v >= 0.9)
        {
          t90 = k == 0 ? 0.0 : t * ((double) (k - 1) + (0.9 - vp) / (v - vp));
          break;
        }
    }
  if (!isnan (t10) && !isnan (t90))
    {
      st->has_rise = true;
      st->rise_time_s = t90 - t10;
    }
  /* no overshoot figure of a response that has not started (a long dead time, a short
   * horizon: it has not reached 10 % of its final value) — 0 % would be a figure of nothing */
  if (!isnan (t10) || peak > 1.0)
    {
      st->has_overshoot = true;
      st->overshoot_pct = peak > 1.0 ? (peak - 1.0) * 100.0 : 0.0;
    }
  /* settling: last sample outside ±2 %; the time is where the straight line between it and the
   * next sample enters the band. Not settled if the last sample is outside. */
  size_t last = n;
  for (size_t k = n; k-- > 0;)
    if (fabs (st->samples[k] / yf - 1.0) > 0.02)
      {
        last = k;
        break;
      }
  if (last == n)
    {
      st->has_settling = true;
      st->settling_time_s = 0.0;
    }
  else if (last + 1 < n)
    {
      double a = st->samples[last] / yf - 1.0, b = st->samples[last + 1] / yf - 1.0;
      double edge = a > 0 ? 0.02 : -0.02;
      double frac = (b != a) ? (edge - a) / (b - a) : 0.0;
      st->has_settling = true;
      st->settling_time_s = t * ((double) last + fmin (fmax (frac, 0.0), 1.0));
    }
}

void
lw_step_figures (LwStep *s, double period_s)
{
  s->has_overshoot = s->has_rise = s->has_settling = false;
  s->overshoot_pct = s->rise_time_s = s->settling_time_s = 0.0;
  step_figures (s, period_s);
}

/* ---------------------------------------------------------------------------------------- */
/* Margins                                                                                    */

/* Sorts crossover frequencies ascending and drops exact duplicates; returns the new count. */
static size_t
sort_unique (double *v, size_t n)
{
  qsort (v, n, sizeof *v, cmp_double);
  size_t m = 0;
  for (size_t i = 0; i < n; i++)
    if (m == 0 || v[i] > v[m - 1])
      v[m++] = v[i];
  return m;
}

static LwStatus
find_margins (const Loop *lp, const double *mag_db, const double complex *full, int n_int,
              LwMargins *mg, LwError *err)
{
  size_t n = lp->n;
  const double *w = lp->grid;
  const double *rel = lp->rel;
  size_t cap = 16, ngc = 0, npc = 0, nb = 0;
  double *gc = malloc (cap * sizeof *gc), *pc = malloc (cap * sizeof *pc);
  double *bands = malloc (cap * sizeof *bands);
  size_t capg = cap, capp = cap, capb = cap;
  if (gc == NULL || pc == NULL || bands == NULL)
    {
      free (gc); free (pc); free (bands);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the margins");
    }
#define PUSH(arr, cnt, capv, val)                                             \
  do {                                                                        \
    if ((cnt) == (capv))                                                      \
      {                                                                       \
        double *nw = realloc ((arr), 2 * (capv) * sizeof *(arr));             \
        if (nw == NULL) { free (gc); free (pc); free (bands);                 \
          return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory"); }     \
        (arr) = nw; (capv) *= 2;                                              \
      }                                                                       \
    (arr)[(cnt)++] = (val);                                                   \
  } while (0)
#define OK(i) (rel[(i)] <= LW_REL_RESOLVED && isfinite (mag_db[(i)]))

  /* gain crossovers: sign changes of ln|L| between resolved grid points (a grid value of
   * exactly 0 dB counts once, at that point), each refined and kept when resolved there */
  for (size_t i = 0; i + 1 < n; i++)
    {
      if (!OK (i) || !OK (i + 1))
        continue;
      double f0 = mag_db[i], f1 = mag_db[i + 1];
      if (f0 == 0.0)
        PUSH (gc, ngc, capg, w[i]);
      else if ((f0 > 0) != (f1 > 0) && f1 != 0.0)
        {
          double a = log (10.0) / 20.0, r;
          double x = brent_root (fn_log_mag, (void *) lp, w[i], w[i + 1], f0 * a, f1 * a);
          loop_core_rel (lp, x, &r);
          if (r <= LW_REL_RESOLVED)
            PUSH (gc, ngc, capg, x);
          else
            mg->n_unresolved_gain_crossovers++;
        }
    }
  if (n > 0 && OK (n - 1) && mag_db[n - 1] == 0.0)
    PUSH (gc, ngc, capg, w[n - 1]);

  /* phase crossovers: the unwrapped phase passes an odd multiple of 180° strictly inside an
   * interval between resolved points; the Nyquist end point is handled on its own below */
  double nyq_phase = lp->core_phase[n - 1] + delay_phase_deg (lp, w[n - 1]);
  for (size_t i = 0; i + 1 < n; i++)
    {
      if (!OK (i) || !OK (i + 1))
        continue;
      double p0 = lp->core_phase[i] + delay_phase_deg (lp, w[i]);
      double p1 = lp->core_phase[i + 1] + delay_phase_deg (lp, w[i + 1]);
      double lo = fmin (p0, p1), hi = fmax (p0, p1);
      /* odd multiples c = 180 (2m + 1) with lo <= c <= hi */
      double mlo = ceil ((lo - 180.0) / 360.0), mhi = floor ((hi - 180.0) / 360.0);
      for (double m = mlo; m <= mhi; m += 1.0)
        {
          double c = 180.0 + 360.0 * m;
          if (i + 2 == n && fabs (p1 - c) <= 1e-9)
            continue;                        /* at the Nyquist point: below */
          if (p0 == c && i > 0)
            continue;                        /* counted at the end of the previous interval */
          PhaseTarget pt = { lp, c };
          double r, x = brent_root (fn_phase, &pt, w[i], w[i + 1], p0 - c, p1 - c);
          loop_core_rel (lp, x, &r);
          if (r <= LW_REL_RESOLVED)
            PUSH (pc, npc, capp, x);
          else
            mg->n_unresolved_phase_crossovers++;
        }
    }
  /* at π/T, where L is real: a phase crossover when L is negative there and resolved — not where
   * L is zero within its error (e.g. a zero at z = −1) */
  {
    double m = round ((nyq_phase - 180.0) / 360.0);
    if (OK (n - 1) && fabs (nyq_phase - (180.0 + 360.0 * m)) <= 1e-9)
      PUSH (pc, npc, capp, w[n - 1]);
  }

  /* runs of grid points where L is not resolved: each is a band; it counts one unresolved gain
   * crossover when |L| = 1 is possible in it (within the error, or between its resolved
   * neighbours), and one unresolved phase crossover when its phase is unknown (relative error
   * >= 0.5) or passes an odd multiple of 180° — unless |L| is certainly below
   * LW_MAG_IRRELEVANT there (a gain margin above 120 dB) */
  for (size_t i = 0; i < n;)
    {
      if (OK (i))
        {
          i++;
          continue;
        }
      size_t a = i, b = i;
      while (b + 1 < n && !OK (b + 1))
        b++;
      i = b + 1;
      double lo_mag = INFINITY, hi_mag = 0.0;
      bool phase_unknown = false, phase_passes = false;
      size_t from = a > 0 ? a - 1 : a, to = b + 1 < n ? b + 1 : b;
      double pprev = 0.0;
      for (size_t j = from; j <= to; j++)
        {
          double mag = pow (10.0, mag_db[j] / 20.0), r = rel[j];
          if (!isfinite (mag_db[j]))
            mag = mag_db[j] > 0 ? INFINITY : 0.0, r = INFINITY;
          double e = isfinite (r) ? r * mag : INFINITY;
          lo_mag = fmin (lo_mag, fmax (mag - e, 0.0));
          hi_mag = fmax (hi_mag, mag + e);
          if (j >= a && j <= b && !(r < 0.5))
            phase_unknown = true;
          double p = lp->core_phase[j] + delay_phase_deg (lp, w[j]);
          if (j > from
              && floor ((fmax (p, pprev) - 180.0) / 360.0) != floor ((fmin (p, pprev) - 180.0) / 360.0))
            phase_passes = true;
          pprev = p;
        }
      bool any = false;
      if (lo_mag <= 1.0 && hi_mag >= 1.0)
        {
          mg->n_unresolved_gain_crossovers++;
          any = true;
        }
      if (hi_mag >= LW_MAG_IRRELEVANT && (phase_unknown || phase_passes))
        {
          mg->n_unresolved_phase_crossovers++;
          any = true;
        }
      (void) any;
      PUSH (bands, nb, capb, w[a]);
      PUSH (bands, nb, capb, w[b]);
    }
#undef OK
#undef PUSH

  /* a crossover refined from a neighbouring interval can land in another's place; keep the
   * lists ascending (docs/cli.md) */
  ngc = sort_unique (gc, ngc);
  npc = sort_unique (pc, npc);
  mg->n_unresolved_bands = nb / 2;
  mg->unresolved_bands_rad_s = bands;

  mg->n_gain_crossovers = ngc;
  mg->gain_crossovers_rad_s = gc;
  mg->phase_margins_deg = calloc (ngc + 1, sizeof (double));
  mg->n_phase_crossovers = npc;
  mg->phase_crossovers_rad_s = pc;
  mg->gain_margins_db = calloc (npc + 1, sizeof (double));
  if (mg->phase_margins_deg == NULL || mg->gain_margins_db == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the margins");

  /* delay margin: the smallest extra delay that turns some crossover point onto −1; the point
   * at ω_c must turn clockwise by PM, or by PM + 360° when PM < 0 (lw_evaluate drops it when
   * the closed loop is unstable) */
  double dm = INFINITY;
  for (size_t i = 0; i < ngc; i++)
    {
      double ph = loop_phase_deg (lp, gc[i], loop_core (lp, gc[i]));
      double pm = 180.0 + ph;
      pm -= 360.0 * ceil ((pm - 180.0) / 360.0);      /* into (−180, 180] */
      mg->phase_margins_deg[i] = pm;
      if (!mg->has_phase_margin || pm < mg->phase_margin_deg)
        {
          mg->has_phase_margin = true;
          mg->phase_margin_deg = pm;
          mg->gain_crossover_rad_s = gc[i];
        }
      double turn = pm >= 0 ? pm : pm + 360.0;
      dm = fmin (dm, turn / RAD2DEG / gc[i]);
    }
  if (ngc > 0)
    {
      mg->has_delay_margin = true;
      mg->delay_margin_s = dm;
      mg->delay_margin_samples = dm / lp->t;
    }
  for (size_t i = 0; i < npc; i++)
    {
      double gm = -20.0 * log10 (cabs (loop_core (lp, pc[i])));
      mg->gain_margins_db[i] = gm;
      if (!mg->has_gain_margin || fabs (gm) < fabs (mg->gain_margin_db))
        {
          mg->has_gain_margin = true;
          mg->gain_margin_db = gm;
          mg->phase_crossover_rad_s = pc[i];
        }
    }

  /* sensitivity peak: largest |1/(1+L)| on the grid, refined between its neighbours */
  {
    size_t imax = 0;
    double smax = -1.0;
    for (size_t i = 0; i < n; i++)
      {
        double re = 1.0 + creal (full[i]), im = cimag (full[i]);
        double s = 1.0 / sqrt (re * re + im * im);
        if (s > smax)
          {
            smax = s;
            imax = i;
          }
      }
    if (smax > 0 && isfinite (smax))
      {
        double a = w[imax > 0 ? imax - 1 : 0], b = w[imax + 1 < n ? imax + 1 : n - 1];
        double fbest;
        double wbest = golden_max (fn_sens, (void *) lp, a, b, &fbest);
        if (!(fbest >= smax))
          {
            wbest = w[imax];
            fbest = smax;
          }
        /* the supremum may lie at ω → 0, below the grid (an unstable plant: |S| rises to
         * 1/|1 + L(1)|): the limit is L at z = 1 when the loop has no integrator or
         * differentiator (with k > 0 integrators S → 0, with k < 0, S → 1) */
        double s0 = -1.0;
        if (n_int > 0)
          s0 = 0.0;
        else if (n_int < 0)
          s0 = 1.0;
        else if (lp->plant->n_integrators == 0)
          {
            const LwModel *c = lp->ctrl;
            double nr = c->gain, ni = 0.0, dr = 1.0, di = 0.0;
            root_product (c->zeros, c->n_zeros, 0.0, 0.0, &nr, &ni);
            root_product (c->poles, c->n_poles, 0.0, 0.0, &dr, &di);
            double complex h = lw_schur_eval_unit (lp->plant->eval, 1.0, 0.0);
            double cr = nr / dr;   /* C(1) is real */
            if (dr != 0.0 && isfinite (cr) && isfinite (creal (h)))
              {
                double l0 = cr * creal (h);   /* z^-d is 1 at z = 1 */
                s0 = 1.0 / fabs (1.0 + l0);
              }
          }
        if (s0 > fbest && isfinite (s0))
          {
            fbest = s0;
            wbest = 0.0;
          }
        mg->has_sensitivity = true;
        mg->sensitivity_peak = fbest;
        mg->sensitivity_peak_rad_s = wbest;
      }
  }
  /* bandwidth: first frequency where |T| falls 3 dB below its value at the grid start */
  {
    /* |T|² = |L|² / |1 + L|², compared against |T(ω_0)|²/2 without logarithms */
#define T2(l) ((creal (l) * creal (l) + cimag (l) * cimag (l))                                 \
               / ((1.0 + creal (l)) * (1.0 + creal (l)) + cimag (l) * cimag (l)))
    double t0 = T2 (full[0]);
    if (isfinite (t0) && t0 > 0)
      {
        double lim = t0 * pow (10.0, -0.3);
        PhaseTarget pt = { lp, 10.0 * log10 (t0) - 3.0 };
        for (size_t i = 1; i < n; i++)
          if (T2 (full[i]) < lim)
            {
              double prev = 10.0 * log10 (T2 (full[i - 1])) - pt.target;
              double f = 10.0 * log10 (T2 (full[i])) - pt.target;
              mg->has_bandwidth = true;
              mg->bandwidth_rad_s = brent_root (fn_comp_db, &pt, w[i - 1], w[i], prev, f);
              break;
            }
      }
#undef T2
  }
  return LW_OK;
}

/* Stability and the dominant poles of a closed loop too large to form (see above). */
static LwStatus
closed_loop_long_delay (const Loop *lp, const LwSampledPlant *plant, LwEvaluation *ev,
                        bool *resolved_out, LwError *err)
{
  const LwModel *c = lp->ctrl;
  size_t np = plant->core->n, nr = c->n_zeros + c->n_poles + np;
  Nyq q = { .lp = lp, .eval = plant->eval, .n_roots = nr,
            .n_ctrl_roots = c->n_zeros + c->n_poles, .d = (double) lp->delay,
            .ln_rho = log (CL_RHO) };
  q.roots = calloc (nr + 1, sizeof *q.roots);
  q.sign = calloc (nr + 1, sizeof *q.sign);
  if (q.roots == NULL || q.sign == NULL)
    {
      free (q.roots);
      free (q.sign);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the closed loop");
    }
  size_t k = 0;
  for (size_t i = 0; i < c->n_zeros; i++, k++)
    q.roots[k] = c->zeros[i], q.sign[k] = 1;
  for (size_t i = 0; i < c->n_poles; i++, k++)
    q.roots[k] = c->poles[i], q.sign[k] = -1;
  LwStatus st = lw_eigenvalues (np, plant->core->a, q.roots + k, err);
  for (size_t i = 0; i < np; i++)
    q.sign[k + i] = -1;
  long z_out = 0;
  bool resolved = false;
  if (st == LW_OK)
    st = nyq_count (&q, ev->omega_rad_s, ev->n_points, (long) ev->closed_loop_order, &z_out,
                    &resolved, err);
  *resolved_out = resolved;
  if (st == LW_OK && !resolved && ev->closed_loop_order > LW_CL_FALLBACK_ORDER)
    st = lw_error_set (err, LW_ERR_NUMERIC, -1,
                       "could not decide the stability of the closed loop (order %zu) by the "
                       "Nyquist count", ev->closed_loop_order);
  if (st == LW_OK && resolved)
    {
      ev->n_closed_loop_unstable = (size_t) z_out + (q.marginal && z_out == 0);
      ev->stable = ev->n_closed_loop_unstable == 0;
      ev->closed_loop_poles_complete = false;
      st = cl_dominant (&q, plant->model, &ev->closed_loop_poles, &ev->n_closed_loop_poles, err);
    }
  free (q.roots);
  free (q.sign);
  return st;
}

/* ---------------------------------------------------------------------------------------- */

void
lw_evaluation_free (LwEvaluation *ev)
{
  if (ev == NULL)
    return;
  lw_model_free (ev->plant_z);
  lw_model_free (ev->plant_w);
  lw_model_free (ev->controller_z);
  lw_model_free (ev->controller_w);
  free (ev->omega_rad_s);
  free (ev->loop_mag_db);
  free (ev->loop_phase_deg);
  free (ev->margins.gain_crossovers_rad_s);
  free (ev->margins.phase_margins_deg);
  free (ev->margins.phase_crossovers_rad_s);
  free (ev->margins.gain_margins_db);
  free (ev->margins.unresolved_bands_rad_s);
  free (ev->closed_loop_poles);
  free (ev->step.samples);
  free (ev);
}

LwStatus
lw_evaluate (const LwSampledPlant *plant, const LwModel *controller_z,
             const LwAnalysisOptions *opts, LwEvaluation **out, LwError *err)
{
  *out = NULL;
  if (plant == NULL || controller_z == NULL || opts == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "missing plant, controller or options");
  double t = plant->period_s;
  LwStatus cst = lw_check_loop_controller (plant, controller_z, opts->compute_delay, err);
  if (cst != LW_OK)
    return cst;
  if (opts->n_points < 16 || opts->n_points > 10000000)
    return lw_error_set (err, LW_ERR_INVALID, -1, "the number of frequency points must be 16 … 1e7");
  if (opts->n_steps < 2 || opts->n_steps > 100000000)
    return lw_error_set (err, LW_ERR_INVALID, -1, "the number of step samples must be 2 … 1e8");
  if ((long) plant->whole_delay + opts->compute_delay > 1000000)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the dead time (%d whole samples) plus the computation delay (%d) is "
                         "more than a million samples", plant->whole_delay, opts->compute_delay);
  if (opts->max_full_order > 2000)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the closed-loop order for every pole must be at most 2000");

  LwEvaluation *ev = calloc (1, sizeof *ev);
  if (ev == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
  LwStatus st = LW_OK;
  LwSs *css = NULL;
  ClosedLoop cl = { 0 };
  double complex *core = NULL;
  double *core_phase = NULL, *rel = NULL;
  bool *plain_ok = NULL;

  ev->period_s = t;
  ev->compute_delay = opts->compute_delay;
  ev->plant_z = lw_model_copy (plant->model);
  ev->controller_z = lw_model_copy (controller_z);
  if (ev->plant_z == NULL || ev->controller_z == NULL)
    {
      st = lw_error_set (err, LW_ERR_NUMERIC, -1, "could not factor the sampled plant");
      goto fail;
    }
  ev->plant_w = lw_model_z_to_w (ev->plant_z);
  ev->controller_w = lw_model_z_to_w (ev->controller_z);
  if (ev->plant_w == NULL || ev->controller_w == NULL)
    {
      st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
      goto fail;
    }

  Loop lp = { .plant = plant, .ctrl = ev->controller_z, .t = t, .omega_n = LW_PI / t,
              .delay = plant->whole_delay + opts->compute_delay, .order = plant->core->n };
  int n_int = plant->n_integrators
              + count_unit_roots (controller_z->poles, controller_z->n_poles)
              - count_unit_roots (controller_z->zeros, controller_z->n_zeros);

  /* grid and response */
  st = build_grid (&lp, plant->plant_s, n_int, opts->n_points, &ev->omega_rad_s, &ev->n_points,
                   err);
  if (st != LW_OK)
    goto fail;
  size_t n = ev->n_points;
  ev->loop_mag_db = calloc (n, sizeof (double));
  ev->loop_phase_deg = calloc (n, sizeof (double));
  core = calloc (n, sizeof *core);
  core_phase = calloc (n, sizeof (double));
  rel = calloc (n, sizeof (double));
  plain_ok = calloc (n, sizeof (bool));
  if (plain_ok == NULL || ev->loop_mag_db == NULL || ev->loop_phase_deg == NULL || core == NULL || core_phase == NULL
      || rel == NULL)
    {
      st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the frequency response");
      goto fail;
    }
  /* the response with an estimate of its relative error at every point: the error-aware
   * evaluation (running bound, and the aliasing sum where the state space is not accurate
   * enough) on every LW_GRID_STRIDE-th point and at π/T; between them the absolute error, which
   * varies slowly with ω, is taken as the larger of theirs and divided by the local |L|, and a
   * point whose estimate so found is above LW_REL_QUIET (or whose neighbours were not plainly
   * resolved) gets the error-aware evaluation of its own */
  for (size_t i = 0; i < n; i++)
    {
      bool full = i % LW_GRID_STRIDE == 0 || i + 1 == n;
      plain_ok[i] = false;
      core[i] = loop_core_eval (&lp, ev->omega_rad_s[i], full ? &rel[i] : NULL,
                                full ? &plain_ok[i] : NULL);
      if (!full)
        rel[i] = NAN;
      else if (!(rel[i] <= INFINITY))
        rel[i] = INFINITY;
    }
  for (size_t i = 0; i < n; i++)
    {
      if (!isnan (rel[i]))
        continue;
      size_t a = i - i % LW_GRID_STRIDE, b = a + LW_GRID_STRIDE < n ? a + LW_GRID_STRIDE : n - 1;
      bool need = !(plain_ok[a] && plain_ok[b]);
      if (!need)
        {
          double ea = rel[a] * cabs_fast (core[a]), eb = rel[b] * cabs_fast (core[b]);
          double ri = fmax (ea, eb) / cabs_fast (core[i]);
          need = !(ri <= LW_REL_QUIET);
          if (!need)
            {
              rel[i] = ri;
              plain_ok[i] = true;
            }
        }
      if (need)
        {
          core[i] = loop_core_eval (&lp, ev->omega_rad_s[i], &rel[i], &plain_ok[i]);
          if (!(rel[i] <= INFINITY))
            rel[i] = INFINITY;
        }
    }
  for (size_t i = 0; i < n; i++)
    {
      double re = creal (core[i]), im = cimag (core[i]);
      ev->loop_mag_db[i] = (10.0 / LW_LN10) * log (re * re + im * im);
    }
  /* unwrap the delay-free part continuously; anchor the first point at the branch nearest the
   * integrator asymptote −90°·k (or −90°·k − 180° for a negative low-frequency gain) */
  {
    double ph = carg (core[0]) * RAD2DEG, expect = -90.0 * n_int;
    ph = nearest_branch (ph, expect);
    if (fabs (ph - expect) > 90.0)
      ph = nearest_branch (ph, expect - 180.0);
    core_phase[0] = ph;
    /* at a zero of L on the unit circle (e.g. z = −1 from a controller that is strictly proper
     * in w) the phase is undefined, and where the error of L is half its size or more it is
     * unknown: hold the previous value there; no crossover is placed at such a point */
    for (size_t i = 1; i < n; i++)
      core_phase[i] = (ev->loop_mag_db[i] > -HUGE_VAL && isfinite (ev->loop_mag_db[i])
                       && rel[i] < 0.5)
                        ? nearest_branch (carg (core[i]) * RAD2DEG, core_phase[i - 1])
                        : core_phase[i - 1];
    for (size_t i = 0; i < n; i++)
      ev->loop_phase_deg[i] = core_phase[i] + delay_phase_deg (&lp, ev->omega_rad_s[i]);
  }
  lp.grid = ev->omega_rad_s;
  lp.core_phase = core_phase;
  lp.rel = rel;
  lp.plain_ok = plain_ok;
  lp.n = n;
  /* the full loop on the grid, for the sensitivity and bandwidth scans (reuses core[]) */
  for (size_t i = 0; i < n; i++)
    {
      double w = ev->omega_rad_s[i];
      if (lp.delay != 0)
        {
          double c, sn;
          if (at_nyquist (&lp, w))
            c = (lp.delay % 2) ? -1.0 : 1.0, sn = 0.0;
          else if (lp.delay == 1)
            c = cos (w * t), sn = -sin (w * t);
          else
            c = cos (w * t * lp.delay), sn = -sin (w * t * lp.delay);
          double re = creal (core[i]), im = cimag (core[i]);
          core[i] = (re * c - im * sn) + (re * sn + im * c) * I;
        }
    }
  st = find_margins (&lp, ev->loop_mag_db, core, n_int, &ev->margins, err);
  if (st != LW_OK)
    goto fail;

  /* closed loop */
  st = lw_model_realize (ev->controller_z, &css, err);
  if (st != LW_OK)
    goto fail;
  ev->closed_loop_order = plant->core->n + css->n + (size_t) lp.delay;
  bool long_path = ev->closed_loop_order > opts->max_full_order && lp.delay > 0;
  if (long_path)
    {
      bool resolved = false;
      st = closed_loop_long_delay (&lp, plant, ev, &resolved, err);
      if (st != LW_OK)
        goto fail;
      long_path = resolved;      /* else every pole after all (order <= 2000 here) */
    }
  if (!long_path)
    {
      /* every pole: eigenvalues of the closed-loop state space */
      st = closed_loop_build (plant->core, css, lp.delay, &cl, err);
      if (st != LW_OK)
        goto fail;
      ev->n_closed_loop_poles = cl.n;
      ev->closed_loop_poles = calloc (cl.n + 1, sizeof (double complex));
      if (ev->closed_loop_poles == NULL)
        {
          st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
          goto fail;
        }
      st = lw_eigenvalues (cl.n, cl.a, ev->closed_loop_poles, err);
      if (st != LW_OK)
        goto fail;
      double rmax = 0.0;
      for (size_t i = 0; i < cl.n; i++)
        {
          double r = cabs (ev->closed_loop_poles[i]);
          rmax = fmax (rmax, r);
          ev->n_closed_loop_unstable += !(r < 1.0 - 1e-10);
        }
      ev->stable = rmax < 1.0 - 1e-10;
      ev->closed_loop_poles_complete = true;
    }
  else
    {
      /* the final value needs only the loop at z = 1, where z^−D = z^−1: the closed loop with
       * one sample of delay has the same DC gain (its order stays small) */
      st = closed_loop_build (plant->core, css, 1, &cl, err);
      if (st != LW_OK)
        goto fail;
    }
  /* a delay margin is the delay that destabilizes a stable loop: none for an unstable one */
  if (!ev->stable && ev->margins.has_delay_margin)
    {
      ev->margins.has_delay_margin = false;
      ev->margins.delay_margin_s = 0.0;
      ev->margins.delay_margin_samples = 0.0;
    }

  /* step */
  ev->step.n = opts->n_steps;
  ev->step.samples = calloc (opts->n_steps, sizeof (double));
  if (ev->step.samples == NULL)
    {
      st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the step response");
      goto fail;
    }
  st = simulate_step (plant->core, css, lp.delay, opts->n_steps, ev->step.samples, err);
  if (st != LW_OK)
    goto fail;
  if (ev->stable)
    {
      /* final value = C_cl (I − A_cl)⁻¹ B_cl + D_cl */
      size_t m = cl.n;
      double *ia = calloc (m * m + 1, sizeof (double)), *x = calloc (m + 1, sizeof (double));
      if (ia == NULL || x == NULL)
        {
          free (ia);
          free (x);
          st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
          goto fail;
        }
      for (size_t i = 0; i < m * m; i++)
        ia[i] = -cl.a[i];
      for (size_t i = 0; i < m; i++)
        {
          ia[i + i * m] += 1.0;
          x[i] = cl.b[i];
        }
      if (lw_solve (m, ia, x, NULL) == LW_OK)
        {
          double yf = cl.d;
          for (size_t i = 0; i < m; i++)
            yf += cl.c[i] * x[i];
          ev->step.has_final = isfinite (yf);
          ev->step.final_value = yf;
        }
      free (ia);
      free (x);
    }
  step_figures (&ev->step, t);

  free (core);
  free (core_phase);
  free (rel);
  free (plain_ok);
  lw_ss_free (css);
  closed_loop_free (&cl);
  *out = ev;
  return LW_OK;

fail:
  free (core);
  free (core_phase);
  free (rel);
  free (plain_ok);
  lw_ss_free (css);
  closed_loop_free (&cl);
  lw_evaluation_free (ev);
  return st;
}
