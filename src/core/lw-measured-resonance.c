/* lw-measured-resonance.c — the dominant lightly damped resonance in a measured plant
 * response, for the notch helper on data (lw-measured.h; docs/measured-data.md).
 *
 * Why the fit is exact for a resonance on a power-law background: with
 * R(ω) = ω_n²/(ω_n² − ω² + 2jζω_nω), ln(ω·|R(ω)|) is an even function of ln(ω/ω_n), so a
 * chord in (ln ω, ln|R|) symmetric about ω_n has the slope −1 whatever its width and ζ; on a
 * background B = b·ω^s the chord's slope is s − 1. Taking ω^s out (the chord's slope + 1)
 * leaves b·|R|, and 1/|b·R|² = ((ω_n² − ω²)² + (2ζω_nω)²)/(b·ω_n²)² is a quadratic in ω²:
 * three points or more give ω_n and ζ whatever their spacing, so a resonance narrower than
 * the spacing of the points is still placed (the half-power bandwidth read off the points,
 * ζ ≈ Δω/(2ω_n), needs several points inside the band). The centre is first the peak's point
 * (ω_n·√(1 − 2ζ²) or near it), then the ω_n found.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-internal.h"
#include "lw-measured.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define LN10 2.30258509299404568402

/* half a decade either side for the trend; a quarter at least */
#define TREND_HALF_DECADES 0.5
#define TREND_MIN_DECADES 0.25
/* the fit's points: down to this far (ln of the ratio of |p|², 6 dB) below the peak's, at
 * least FIT_MIN either side, at most FIT_MAX */
#define FIT_DROP_LN (2.0 * 6.0 / 20.0 * LN10)
#define FIT_MIN 2
#define FIT_MAX 64
/* refits with the background's local slope, taken across this many decades either side */
#define FIT_ROUNDS 3
#define BG_DECADES 0.1

typedef struct {
  size_t k;
  double height_ln;
} Peak;

/* ln|p| at ln ω = x, linear in ln ω between the points (x inside the data) */
static double
ln_mag_at (const double *lw, const double *y, size_t n, double x)
{
  size_t lo = lw_interval_of (lw, n, x), hi = lo + 1;
  double t = (x - lw[lo]) / (lw[hi] - lw[lo]);
  return y[lo] + t * (y[hi] - y[lo]);
}

/* The trend around ln ω = xc: its value at xc and slope; false when too near an end. */
static bool
trend (const double *lw, const double *y, size_t n, double xc, double *mid, double *slope)
{
  double h = fmin (TREND_HALF_DECADES * LN10, fmin (xc - lw[0], lw[n - 1] - xc));
  if (!(h >= TREND_MIN_DECADES * LN10))
    return false;
  double a = ln_mag_at (lw, y, n, xc - h), b = ln_mag_at (lw, y, n, xc + h);
  *mid = 0.5 * (a + b);
  *slope = (b - a) / (2.0 * h);
  return isfinite (*mid) && isfinite (*slope);
}

/* 3×3 linear system m·c = r by elimination with partial pivoting; false when singular. */
static bool
solve3 (double m[3][3], double r[3], double c[3])
{
  for (int col = 0; col < 3; col++)
    {
      int piv = col;
      for (int i = col + 1; i < 3; i++)
        if (fabs (m[i][col]) > fabs (m[piv][col]))
          piv = i;
      if (!(fabs (m[piv][col]) > 0.0))
        return false;
      if (piv != col)
        {
          for (int j = 0; j < 3; j++)
            {
              double t = m[col][j];
              m[col][j] = m[piv][j];
              m[piv][j] = t;
            }
          double t = r[col];
          r[col] = r[piv];
          r[piv] = t;
        }
      for (int i = col + 1; i < 3; i++)
        {
          double f = m[i][col] / m[col][col];
          for (int j = col; j < 3; j++)
            m[i][j] -= f * m[col][j];
          r[i] -= f * r[col];
        }
    }
  for (int i = 2; i >= 0; i--)
    {
      double s = r[i];
      for (int j = i + 1; j < 3; j++)
        s -= m[i][j] * c[j];
      c[i] = s / m[i][i];
    }
  return isfinite (c[0]) && isfinite (c[1]) && isfinite (c[2]);
}

/* One fit about the centre ln ω = xc around the peak at point k, the background's slope in
 * (ln ω, ln|p|) taken as s; false when the points do not give a lightly damped pair. */
static bool
fit_once (const double *lw, const double *y, size_t n, size_t k, double xc, double s,
          LwMeasuredResonance *r)
{
  /* ln of the detrended |p|² at point i, relative to the centre */
#define LQ(i) (2.0 * (y[i] - s * (lw[i] - xc)))
  double top = LQ (k);
  size_t lo = k, hi = k;
  while (lo > 0 && k - lo < FIT_MAX && (k - lo < FIT_MIN || LQ (lo - 1) >= top - FIT_DROP_LN))
    lo--;
  while (hi + 1 < n && hi - k < FIT_MAX && (hi - k < FIT_MIN || LQ (hi + 1) >= top - FIT_DROP_LN))
    hi++;
  if (hi - lo + 1 < 3)
    return false;
  /* minimise Σ (q_i·(c0 + c1·x_i + c2·x_i²) − 1)², x = (ω/ω_c)², q = |p_d|²/|p_d(peak)|² */
  double m[3][3] = { { 0 } }, rhs[3] = { 0 }, c[3];
  for (size_t i = lo; i <= hi; i++)
    {
      double q = exp (LQ (i) - top), x = exp (2.0 * (lw[i] - xc));
      double a[3] = { q, q * x, q * x * x };
      for (int u = 0; u < 3; u++)
        {
          rhs[u] += a[u];
          for (int v = 0; v < 3; v++)
            m[u][v] += a[u] * a[v];
        }
    }
#undef LQ
  if (!solve3 (m, rhs, c) || !(c[0] > 0.0) || !(c[2] > 0.0))
    return false;
  double xn = sqrt (c[0] / c[2]);               /* (ω_n/ω_c)² */
  double z2 = (c[1] / (c[2] * xn) + 2.0) / 4.0; /* ζ² */
  if (!(z2 > 0.0 && z2 < 0.5))
    return false;
  double wn = exp (xc) * sqrt (xn);
  if (!(wn >= exp (lw[lo]) && wn <= exp (lw[hi])))
    return false;
  r->omega_n_rad_s = wn;
  r->zeta = sqrt (z2);
  r->fit_lo_rad_s = exp (lw[lo]);
  r->fit_hi_rad_s = exp (lw[hi]);
  r->n_fit = hi - lo + 1;
  return true;
}

/* ln|R(ω)| of the second-order resonance (ω_n, ζ), unit gain at low frequency */
static double
ln_resonance (double wn, double zeta, double w)
{
  double r = w / wn;
  return -0.5 * log ((1.0 - r * r) * (1.0 - r * r) + 4.0 * zeta * zeta * r * r);
}

/* The resonance about the peak at point k: first with the background's slope from the
 * neighbourhood's chord (its slope + 1: a chord centred on a resonance has the slope −1 from
 * it), then FIT_ROUNDS times with the slope of ln|p| − ln|R| (the data without the resonance
 * fitted) across ±BG_DECADES about ω_n, so that dynamics within the half decade (an
 * anti-resonance below a resonance) do not bend the background. */
static bool
fit (const double *lw, const double *y, size_t n, size_t k, LwMeasuredResonance *r)
{
  double mid, slope;
  if (!trend (lw, y, n, lw[k], &mid, &slope) || !fit_once (lw, y, n, k, lw[k], slope + 1.0, r))
    return false;
  for (int round = 0; round < FIT_ROUNDS; round++)
    {
      double xc = log (r->omega_n_rad_s), h = BG_DECADES * LN10;
      if (xc - h < lw[0] || xc + h > lw[n - 1])
        return false;
      double a = ln_mag_at (lw, y, n, xc - h) - ln_resonance (r->omega_n_rad_s, r->zeta,
                                                                exp (xc - h));
      double b = ln_mag_at (lw, y, n, xc + h) - ln_resonance (r->omega_n_rad_s, r->zeta,
                                                                exp (xc + h));
      if (!isfinite (a) || !isfinite (b) || !fit_once (lw, y, n, k, xc, (b - a) / (2.0 * h), r))
        return false;
    }
  return true;
}

LwStatus
lw_measured_resonance (const double *omega, const double complex *p, size_t n, double zeta_max,
                       LwMeasuredResonance *out, LwError *err)
{
  memset (out, 0, sizeof *out);
  out->omega_n_rad_s = out->zeta = out->peak_rad_s = out->height_db = NAN;
  if (omega == NULL || p == NULL || n < 3)
    return lw_error_set (err, LW_ERR_INVALID, -1, "fewer than three measured points");
  if (!(zeta_max > 0.0 && zeta_max < 1.0))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the damping limit must be between 0 and 1");
  for (size_t i = 0; i < n; i++)
    if (!(omega[i] > 0.0) || !isfinite (omega[i]) || (i > 0 && !(omega[i] > omega[i - 1])))
      return lw_error_set (err, LW_ERR_INVALID, -1,
                           "point %zu: the frequencies must be > 0 and increase", i + 1);
  double *lw = malloc (n * sizeof *lw), *y = malloc (n * sizeof *y);
  if (lw == NULL || y == NULL)
    {
      free (lw);
      free (y);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
    }
  for (size_t i = 0; i < n; i++)
    {
      lw[i] = log (omega[i]);
      y[i] = log (cabs (p[i]));   /* −inf at a zero: no peak there, no trend through it */
    }
  /* the peaks standing clearly above their trend, the highest LW_RESONANCE_MAX_PEAKS kept */
  Peak peaks[LW_RESONANCE_MAX_PEAKS];
  size_t np = 0;
  double min_ln = LW_RESONANCE_HEIGHT_DB / 20.0 * LN10;
  for (size_t k = 1; k + 1 < n; k++)
    {
      if (!(y[k] > y[k - 1] && y[k] >= y[k + 1]) || !isfinite (y[k]))
        continue;
      double mid, slope;
      if (!trend (lw, y, n, lw[k], &mid, &slope))
        {
          out->n_near_end++;
          continue;
        }
      double h = y[k] - mid;
      if (!(h >= min_ln))
        continue;
      out->n_peaks++;
      /* insert by height, dropping the lowest when full */
      size_t at = np < LW_RESONANCE_MAX_PEAKS ? np : LW_RESONANCE_MAX_PEAKS;
      while (at > 0 && peaks[at - 1].height_ln < h)
        at--;
      if (at >= LW_RESONANCE_MAX_PEAKS)
        continue;
      size_t last = np < LW_RESONANCE_MAX_PEAKS ? np : LW_RESONANCE_MAX_PEAKS - 1;
      memmove (peaks + at + 1, peaks + at, (last - at) * sizeof *peaks);
      peaks[at] = (Peak) { k, h };
      if (np < LW_RESONANCE_MAX_PEAKS)
        np++;
    }
  for (size_t j = 0; j < np; j++)
    {
      LwMeasuredResonance r = *out;
      size_t k = peaks[j].k;
      if (!fit (lw, y, n, k, &r))
        continue;
      if (!(r.zeta < zeta_max) || (out->found && !(r.zeta < out->zeta)))
        continue;
      r.found = true;
      r.peak_rad_s = omega[k];
      r.height_db = 20.0 / LN10 * peaks[j].height_ln;
      *out = r;
    }
  free (lw);
  free (y);
  return LW_OK;
}
