/* lw-bilinear.c — the w-plane: w = (2/T)(z−1)/(z+1) on factored models, and its warping.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-analysis.h"

#include <math.h>
#include <stdlib.h>

double
lw_warp_omega_to_nu (double omega_rad_s, double period_s)
{
  return 2.0 / period_s * tan (omega_rad_s * period_s / 2.0);
}

double
lw_warp_nu_to_omega (double nu_rad_s, double period_s)
{
  return 2.0 / period_s * atan (nu_rad_s * period_s / 2.0);
}

/* Maps each root r of a model in variable x to the other variable, where the map of one
 * factor is   (x − r) = c(r) · (y − r') / q(y)   with q(y) the same first-order factor for every
 * root (so the q's of numerator and denominator cancel down to (deg den − deg num) copies).
 * A root with c(r) = 0 in the y-domain has no y-factor (it went to infinity): `infinite(r)`.
 *   z → w:  z − a = (T/2)(1 + a)(w − (2/T)(a−1)/(a+1)) / (1 − wT/2),  a = −1: 2/(1 − wT/2)
 *           1 − wT/2 = −(T/2)(w − 2/T)
 *   w → z:  w − b = (2/T − b)(z − (2/T + b)/(2/T − b)) / (z + 1),    b = 2/T: −(4/T)/(z + 1)
 */
typedef struct {
  bool to_w;
  double t;
} Map;

/* A root within 1e-9 (relative) of z = −1 or w = 2/T is taken as exactly there: the computed
 * zeros of a sampled plant land near z = −1 only to rounding, and their w images would be
 * meaningless numbers of order 1e9/T. */
static bool
root_at_infinity (const Map *mp, double complex r)
{
  if (mp->to_w)
    return cabs (r + 1.0) <= 1e-9;
  return cabs (r - 2.0 / mp->t) <= 1e-9 * (2.0 / mp->t);
}

static double complex
factor_coef (const Map *mp, double complex r)
{
  double t = mp->t;
  if (mp->to_w)
    return root_at_infinity (mp, r) ? 2.0 : (t / 2.0) * (1.0 + r);
  return root_at_infinity (mp, r) ? -4.0 / t : (2.0 / t - r);
}

static double complex
map_root (const Map *mp, double complex r)
{
  double t = mp->t;
  if (mp->to_w)
    return (2.0 / t) * (r - 1.0) / (r + 1.0);
  return (2.0 / t + r) / (2.0 / t - r);
}

static LwModel *
map_model (const LwModel *m, const Map *mp)
{
  size_t nz_fin = 0, np_fin = 0;
  for (size_t i = 0; i < m->n_zeros; i++)
    nz_fin += !root_at_infinity (mp, m->zeros[i]);
  for (size_t i = 0; i < m->n_poles; i++)
    np_fin += !root_at_infinity (mp, m->poles[i]);
  long excess = (long) m->n_poles - (long) m->n_zeros;   /* copies of q(y) left over */
  size_t nz = nz_fin + (excess > 0 ? (size_t) excess : 0);
  size_t np = np_fin + (excess < 0 ? (size_t) -excess : 0);
  LwModel *o = lw_model_new (mp->to_w ? LW_DOMAIN_W : LW_DOMAIN_Z, m->period_s, 1.0, nz, np);
  if (o == NULL)
    return NULL;
  double complex g = m->gain;
  size_t k = 0;
  for (size_t i = 0; i < m->n_zeros; i++)
    {
      double complex r = m->zeros[i];
      g *= factor_coef (mp, r);
      if (!root_at_infinity (mp, r))
        o->zeros[k++] = map_root (mp, r);
    }
  size_t kp = 0;
  for (size_t i = 0; i < m->n_poles; i++)
    {
      double complex r = m->poles[i];
      g /= factor_coef (mp, r);
      if (!root_at_infinity (mp, r))
        o->poles[kp++] = map_root (mp, r);
    }
  /* q(y) = 1 − wT/2 = −(T/2)(w − 2/T)   or   q(z) = z + 1 */
  double complex qc = mp->to_w ? -(mp->t / 2.0) : 1.0;
  double complex qr = mp->to_w ? 2.0 / mp->t : -1.0;
  for (long e = 0; e < excess; e++)
    {
      g *= qc;
      o->zeros[k++] = qr;
    }
  for (long e = 0; e < -excess; e++)
    {
      g /= qc;
      o->poles[kp++] = qr;
    }
  o->gain = creal (g);
  lw_model_canonicalize (o);
  return o;
}

LwModel *
lw_model_z_to_w (const LwModel *mz)
{
  if (mz == NULL || mz->domain != LW_DOMAIN_Z || !(mz->period_s > 0))
    return NULL;
  Map mp = { true, mz->period_s };
  return map_model (mz, &mp);
}

LwModel *
lw_model_w_to_z (const LwModel *mw)
{
  if (mw == NULL || mw->domain != LW_DOMAIN_W || !(mw->period_s > 0))
    return NULL;
  Map mp = { false, mw->period_s };
  return map_model (mw, &mp);
}
