/* lw-evaluate-loop.c — the loop L(e^{jωT}) as a function of ω: the plant core and the
 * controller by their roots, the delay, the error estimate, the unwrapped phase; scalar root
 * finding and maximization on it.
 * Conventions: docs/conventions.md.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-evaluate-private.h"


bool
lw_ev_at_nyquist (const Loop *lp, double w)
{
  return fabs (w - lp->omega_n) <= 4.0 * DBL_EPSILON * lp->omega_n;
}

/* Product ∏(z − r_i) in real arithmetic (C99 complex multiply calls a NaN-checking helper),
 * with z = 1 + zm1 + j·zi and each real part formed as zm1 + (1 − Re r_i) (no cancellation near
 * z = 1). */
void
lw_ev_root_product (const double complex *roots, size_t n, double zm1, double zi, double *pr,
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
double complex
lw_ev_loop_core_eval (const Loop *lp, double w, double *rel, bool *plain_ok)
{
  bool nyq = lw_ev_at_nyquist (lp, w);
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
  lw_ev_root_product (c->zeros, c->n_zeros, zm1, zi, &nr, &ni);
  lw_ev_root_product (c->poles, c->n_poles, zm1, zi, &dr, &di);
  if (rel != NULL)
    *rel = prel + 1.1102230246251565e-16 * (4.0 * (double) (c->n_zeros + c->n_poles) + 8.0);
  /* h · num / den */
  double den = dr * dr + di * di;
  double qr = (nr * dr + ni * di) / den, qi = (ni * dr - nr * di) / den;
  double hr = creal (h), hi = cimag (h);
  return (hr * qr - hi * qi) + (hr * qi + hi * qr) * I;
}

double complex
lw_ev_loop_core_rel (const Loop *lp, double w, double *rel)
{
  return lw_ev_loop_core_eval (lp, w, rel, NULL);
}

static size_t grid_interval (const Loop *lp, double w);


/* C·P_core at any ω, for the refinements: plain where the grid around ω is well resolved, with
 * the error-aware evaluation otherwise (and before the grid exists). */
double complex
lw_ev_loop_core (const Loop *lp, double w)
{
  double r;
  if (lp->plain_ok != NULL && lp->n > 1 && w >= lp->grid[0] && w <= lp->grid[lp->n - 1])
    {
      size_t i = grid_interval (lp, w);
      if (lp->plain_ok[i] && lp->plain_ok[i + 1 < lp->n ? i + 1 : i])
        return lw_ev_loop_core_eval (lp, w, NULL, NULL);
    }
  return lw_ev_loop_core_eval (lp, w, &r, NULL);
}

/* The whole-sample delay's phase, degrees (exact, continuous in ω). */
double
lw_ev_delay_phase_deg (const Loop *lp, double w)
{
  if (lw_ev_at_nyquist (lp, w))
    return -180.0 * lp->delay;
  return -w * lp->t * lp->delay * RAD2DEG;
}

static double complex
loop_full (const Loop *lp, double w)
{
  double complex h = lw_ev_loop_core (lp, w);
  if (lp->delay == 0)
    return h;
  if (lw_ev_at_nyquist (lp, w))
    return (lp->delay % 2) ? -h : h;
  return h * cexp (-I * w * lp->t * lp->delay);
}

/* Branch of an angle (degrees) nearest to ref. */
double
lw_ev_nearest_branch (double ang, double ref)
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
double
lw_ev_loop_phase_deg (const Loop *lp, double w, double complex core)
{
  size_t i = grid_interval (lp, w);
  double w0 = lp->grid[i], w1 = lp->grid[i + 1 < lp->n ? i + 1 : i];
  double p0 = lp->core_phase[i], p1 = lp->core_phase[i + 1 < lp->n ? i + 1 : i];
  double ref = (w1 > w0) ? p0 + (p1 - p0) * (w - w0) / (w1 - w0) : p0;
  return lw_ev_nearest_branch (carg (core) * RAD2DEG, ref) + lw_ev_delay_phase_deg (lp, w);
}

/* ---------------------------------------------------------------------------------------- */
/* Scalar root finding and maximization                                                      */


/* Brent's method (R. P. Brent, Algorithms for Minimization without Derivatives, 1973, ch. 4)
 * for a root of f in [a, b] with f(a)·f(b) <= 0; converges to a few ulps of x. */
double
lw_ev_brent_root (ScalarFn f, void *data, double a, double b, double fa, double fb)
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
double
lw_ev_golden_max (ScalarFn f, void *data, double a, double b, double *fmax_out)
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

double
lw_ev_fn_log_mag (double w, void *data)
{
  return log (cabs (lw_ev_loop_core (data, w)));
}


double
lw_ev_fn_phase (double w, void *data)
{
  const PhaseTarget *pt = data;
  return lw_ev_loop_phase_deg (pt->lp, w, lw_ev_loop_core (pt->lp, w)) - pt->target;
}

double
lw_ev_fn_sens (double w, void *data)
{
  return 1.0 / cabs (1.0 + loop_full (data, w));
}

double
lw_ev_fn_comp_db (double w, void *data)
{
  const PhaseTarget *pt = data;
  double complex l = loop_full (pt->lp, w);
  return 20.0 * log10 (cabs (l / (1.0 + l))) - pt->target;
}
