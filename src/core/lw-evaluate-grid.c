/* lw-evaluate-grid.c — the frequency grid of an evaluation, from the loop's own dynamics
 * (corners of the plant and the controller) and the points a long delay needs.
 * Conventions: docs/conventions.md.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-evaluate-private.h"

/* ---------------------------------------------------------------------------------------- */
/* Frequency grid                                                                             */

int
lw_ev_cmp_double (const void *a, const void *b)
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

int
lw_ev_count_unit_roots (const double complex *r, size_t n)
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
LwStatus
lw_ev_build_grid (const Loop *lp, const LwModel *plant_s, int n_int, size_t n_points, double **grid_out,
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
        double mag = cabs (lw_ev_loop_core (lp, wlo));
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
  qsort (g + n_base, ne, sizeof *g, lw_ev_cmp_double);
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
