/* lw-response.c — frequency responses of factored models and of the sampled plant.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-response.h"

#include <math.h>

#include "lw-internal.h"

#define RAD2DEG (180.0 / LW_PI)

LwStatus
lw_log_grid (double lo, double hi, size_t n, double *out, LwError *err)
{
  if (n < 2 || !(lo > 0.0) || !(hi > lo) || !isfinite (hi))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "a frequency grid needs 0 < low < high (finite) and at least 2 points");
  double l0 = log (lo), l1 = log (hi);
  for (size_t i = 0; i < n; i++)
    out[i] = exp (l0 + (l1 - l0) * (double) i / (double) (n - 1));
  out[0] = lo;
  out[n - 1] = hi;
  return LW_OK;
}

/* Angle (degrees) of the factor f = e^{jθ} − r, continuous in θ on (0, π]: the principal angle
 * of e^{jθ} − r alone wraps at ±180° whenever the circle passes "behind" a complex root, so it is
 * split into a part that is continuous by construction and one that stays within ±90°:
 *   |r| <= 1:  ∠f = θ + ∠(1 − r e^{−jθ}),          Re(1 − r e^{−jθ}) >= 1 − |r| >= 0;
 *   |r| > 1:   ∠f = ∠(−r) + ∠(1 − e^{jθ}/r),       Re(1 − e^{jθ}/r) >= 1 − 1/|r| > 0. */
static double
z_factor_angle_deg (double complex f, double complex r, double c, double s, double th)
{
  if (cabs (r) <= 1.0)
    {
      double re = creal (f) * c + cimag (f) * s, im = cimag (f) * c - creal (f) * s;  /* f e^{−jθ} */
      return (th + atan2 (im, re)) * RAD2DEG;
    }
  double complex minus_r = -creal (r) + (-cimag (r) + 0.0) * I;   /* no −0 imaginary part */
  return (carg (minus_r) + carg (-f / r)) * RAD2DEG;
}

LwStatus
lw_model_freq_response (const LwModel *m, const double *freq, size_t n, double *mag_db,
                      double *phase_deg, LwError *err)
{
  if (m == NULL || (m->domain == LW_DOMAIN_Z && !(m->period_s > 0.0)))
    return lw_error_set (err, LW_ERR_INVALID, -1, "a model in z needs its sample period");
  double g = m->gain;
  double g_phase = g < 0 ? -180.0 : 0.0;
  double g_db = 20.0 * log10 (fabs (g));
  for (size_t i = 0; i < n; i++)
    {
      /* in z, x − r is formed as (x − 1) + (1 − r) for Re r >= 0 and (x + 1) − (1 + r) otherwise,
       * with x − 1 = −2 sin²(θ/2) + j sin θ and x + 1 = 2 cos²(θ/2) + j sin θ: no cancellation
       * near z = 1 or z = −1 */
      double xm1r = 0.0, xp1r = 0.0, xi = freq[i], xr = 0.0;
      double th = 0.0, cth = 1.0, sth = 0.0;
      bool z = m->domain == LW_DOMAIN_Z;
      if (z)
        {
          th = freq[i] * m->period_s;
          if (fabs (th - LW_PI) <= 1e-15 * LW_PI)
            xm1r = -2.0, xp1r = 0.0, xi = 0.0, th = LW_PI, cth = -1.0, sth = 0.0;
          else
            {
              double sh = sin (th / 2.0), ch = cos (th / 2.0);
              xm1r = -2.0 * sh * sh;
              xp1r = 2.0 * ch * ch;
              xi = sin (th);
              cth = cos (th);
              sth = xi;
            }
        }
#define ANGLE(f, r) (z ? z_factor_angle_deg ((f), (r), cth, sth, th) : carg (f) * RAD2DEG)
#define FACTOR(r)                                                                        \
  (z ? (creal (r) >= 0.0 ? xm1r + (1.0 - creal (r)) : xp1r - (1.0 + creal (r)))          \
           + (xi - cimag (r)) * I                                                        \
     : (xr - creal (r)) + (xi - cimag (r)) * I)
      double db = g_db, ph = g_phase;
      for (size_t k = 0; k < m->n_zeros; k++)
        {
          double complex f = FACTOR (m->zeros[k]);
          db += 20.0 * log10 (cabs (f));
          ph += ANGLE (f, m->zeros[k]);
        }
      for (size_t k = 0; k < m->n_poles; k++)
        {
          double complex f = FACTOR (m->poles[k]);
          db -= 20.0 * log10 (cabs (f));
          ph -= ANGLE (f, m->poles[k]);
        }
#undef FACTOR
#undef ANGLE
      if (mag_db != NULL)
        mag_db[i] = db;
      if (phase_deg != NULL)
        phase_deg[i] = ph;
    }
  return LW_OK;
}

static double
nearest_branch (double ang, double ref)
{
  return ang - 360.0 * round ((ang - ref) / 360.0);
}

LwStatus
lw_sampled_plant_freq_response (const LwSampledPlant *p, const double *omega, size_t n,
                                double *mag_db, double *phase_deg, LwError *err)
{
  if (p == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "no sampled plant");
  double t = p->period_s, prev = 0.0;
  for (size_t i = 0; i < n; i++)
    {
      double wt = omega[i] * t;
      bool nyq = fabs (wt - LW_PI) <= 4.0 * LW_PI * 2.220446049250313e-16;
      if (wt > LW_PI * (1.0 + 1e-15) || !(omega[i] > 0.0))
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "frequency %.17g rad/s is outside (0, π/T] for T = %.17g s",
                             omega[i], t);
      double complex h = nyq ? lw_schur_eval_unit (p->eval, -1.0, 0.0)
                             : lw_schur_eval_unit (p->eval, cos (wt), sin (wt));
      if (mag_db != NULL)
        mag_db[i] = 20.0 * log10 (cabs (h));
      double ph = carg (h) * RAD2DEG;
      if (i == 0)
        {
          double expect = -90.0 * p->n_integrators;
          ph = nearest_branch (ph, expect);
          if (fabs (ph - expect) > 90.0)
            ph = nearest_branch (ph, expect - 180.0);
        }
      else if (cabs (h) > 0.0)
        ph = nearest_branch (ph, prev);
      else
        ph = prev;
      prev = ph;
      if (phase_deg != NULL)
        phase_deg[i] = ph - (nyq ? 180.0 : wt * RAD2DEG) * p->whole_delay;
    }
  return LW_OK;
}
