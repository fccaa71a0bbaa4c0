/* lw-measured-nyquist.c — closed-loop stability from a measured loop by the Nyquist criterion
 * (lw-measured.h; the method, its assumptions and their basis in docs/measured-data.md).
 *
 * The contour is the unit circle, indented outward around the k poles of L at z = 1 (so they
 * count as inside, not among the P poles strictly outside). Traversed counter-clockwise, the
 * argument principle applied to 1 + L outside the contour gives Z = P − N, N the
 * counter-clockwise encirclements of −1 by L. By the symmetry L(e^{−jωT}) = conj L(e^{jωT}),
 * the half from ω = 0+ to π/T turns 1 + L by Δ, the mirrored half by Δ again, and the
 * indentation (L ≈ c/(z − 1)^k, z − 1 = ε·e^{jθ}, θ from −90° to 90°) by −kπ:
 *   N = (2Δ − kπ) / (2π).
 * Δ is summed in three parts: from ω = 0+ to the lowest point (an asymptote assumed), along
 * the data (the curve interpolated as for the margins: ln|L| and the unwrapped phase linear in
 * ln ω), and from the highest point to π/T (the data reach it, or |L| < 1 assumed there).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-measured.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define PI 3.14159265358979323846
#define DEG (PI / 180.0)

/* The thresholds of the assumptions (docs/measured-data.md): 6 dB to spare either side of
 * |L| = 1 at the ends (common practice, no source), a phase within 30° of the asymptote's
 * and a slope within half a decade per decade of it (our choice: the phase of a type-k
 * loop is −k·90° only where its other poles and zeros are far), L real at π/T within 10°
 * (our allowance for measurement error; plus the noise of the point). */
#define END_LARGE 2.0
#define END_SMALL 0.5
#define LOW_PHASE_TOL (30.0 * DEG)
#define LOW_SLOPE_TOL 0.5
#define MAX_TYPE 4
#define REAL_TOL (10.0 * DEG)
#define NYQUIST_REACH 1e-3     /* the last point counts as at π/T within this, relative */
#define MAX_HALVINGS 40        /* ~1e-12 of an interval: closer is through −1 */

const char *
lw_measured_verdict_name (LwMeasuredVerdict v)
{
  switch (v)
    {
    case LW_MEASURED_STABLE:
      return "stable";
    case LW_MEASURED_UNSTABLE:
      return "unstable";
    case LW_MEASURED_UNDECIDED:
    default:
      return "undecided";
    }
}

/* The loop between points i and i + 1 as the margins take it: ln|L| and the unwrapped phase
 * linear in ln ω, at the fraction t of the interval. */
typedef struct {
  const double *lg, *ph;
} Curve;

static double complex
curve_at (const Curve *c, size_t i, double t)
{
  double m = c->lg[i] + t * (c->lg[i + 1] - c->lg[i]);
  double p = c->ph[i] + t * (c->ph[i + 1] - c->ph[i]);
  return cexp (m + I * p);
}

/* Adds to *acc the change of arg(1 + L) along interval i from t0 to t1 (a0, a1: its
 * principal values there), halving until every step is within ±45°. On this curve the
 * phase of L moves one way by less than 180° per interval, so a step within ±45° cannot hide
 * a turn around −1. False when MAX_HALVINGS do not get there: the curve passes through −1. */
static bool
turn (const Curve *c, size_t i, double t0, double t1, double a0, double a1, int depth,
      double *acc)
{
  double d = remainder (a1 - a0, 2 * PI);
  if (fabs (d) <= PI / 4)
    {
      *acc += d;
      return true;
    }
  if (depth == 0)
    return false;
  double tm = 0.5 * (t0 + t1);
  double am = carg (1.0 + curve_at (c, i, tm));
  return turn (c, i, t0, tm, a0, am, depth - 1, acc)
         && turn (c, i, tm, t1, am, a1, depth - 1, acc);
}

/* The least-squares slope of ln|L| against ln ω over the points within half a decade of the
 * lowest (at least two): −k for a type-k asymptote. */
static double
low_slope (const double *omega, const double *lg, size_t n)
{
  double x0 = log (omega[0]);
  size_t m = 2;
  while (m < n && log (omega[m]) - x0 <= 0.5 * log (10.0))
    m++;
  double sx = 0, sy = 0;
  for (size_t j = 0; j < m; j++)
    {
      sx += log (omega[j]);
      sy += lg[j];
    }
  sx /= (double) m;
  sy /= (double) m;
  double sxy = 0, sxx = 0;
  for (size_t j = 0; j < m; j++)
    {
      double dx = log (omega[j]) - sx;
      sxy += dx * (lg[j] - sy);
      sxx += dx * dx;
    }
  return sxy / sxx;
}

void
lw_measured_stability_refuse_count (LwMeasuredStability *s, int ctrl)
{
  s->verdict = LW_MEASURED_UNDECIDED;
  s->undecided |= LW_NYQUIST_POLE_COUNT;
  s->encirclements = 0;
  s->closed_loop_unstable = -1;
  snprintf (s->note, sizeof s->note,
            "undecided: the controller alone has %d pole%s outside the unit circle, more than "
            "the %d open-loop unstable pole%s given for the whole loop", ctrl,
            ctrl == 1 ? "" : "s", s->open_loop_unstable, s->open_loop_unstable == 1 ? "" : "s");
}

/* The low end: the start angle θ0 = arg(1 + L(0+)) and the type k, with the change of
 * arg(1 + L) from 0+ to the lowest point; false (and the note) when no asymptote fits. */
static bool
low_end (const double *omega, const double complex *l, const double *lg, size_t n,
         double band0, LwMeasuredStability *out, double *inc)
{
  double mag = cabs (l[0]), phi = carg (l[0]);
  double slope = low_slope (omega, lg, n);
  long q = lround (phi / (PI / 2));
  double dev = fabs (phi - (double) q * PI / 2);
  if (mag >= END_LARGE)
    {
      /* c/(jωT)^k: phase −k·90° (+180° for c < 0), so k has the parity of q; the slope
       * tells k from k ± 2 */
      long k = lround (-slope);
      if ((k - q) % 2 != 0)
        k += (-slope > (double) k) ? 1 : -1;
      if (k >= 0 && k <= MAX_TYPE && fabs (-slope - (double) k) <= LOW_SLOPE_TOL
          && dev <= LOW_PHASE_TOL + band0)
        {
          out->loop_type = (int) k;
          *inc = remainder (carg (1.0 + l[0]) - (double) q * PI / 2, 2 * PI);
          return true;
        }
      snprintf (out->note, sizeof out->note,
                "undecided: at the lowest point (%.4g rad/s) |L| = %.3g and the phase %.1f° "
                "with a slope of %.2f decades per decade fit no asymptote c/(jwT)^k of a "
                "type-k loop: measure lower", omega[0], mag, phi / DEG, slope);
      return false;
    }
  if (mag <= END_SMALL)
    {
      /* type 0 below the data: L(1) real with |L| < 1, so 1 + L starts at angle 0 and
       * stays in the right half plane */
      if (fabs (slope) <= LOW_SLOPE_TOL && q % 2 == 0 && dev <= LOW_PHASE_TOL + band0)
        {
          out->loop_type = 0;
          out->low_end_small = true;
          *inc = carg (1.0 + l[0]);
          return true;
        }
      snprintf (out->note, sizeof out->note,
                "undecided: at the lowest point (%.4g rad/s) |L| = %.3g is small but the loop "
                "is not flat there (phase %.1f°, slope %.2f): measure lower", omega[0], mag,
                phi / DEG, slope);
      return false;
    }
  snprintf (out->note, sizeof out->note,
            "undecided: at the lowest point (%.4g rad/s) |L| = %.3g is near 1 (neither above "
            "2 nor below 0.5): what the loop does below the data decides; measure lower",
            omega[0], mag);
  return false;
}

/* appends to the note (cut at its size) */
static void note_add (LwMeasuredStability *out, const char *fmt, ...)
  __attribute__ ((format (printf, 2, 3)));

static void
note_add (LwMeasuredStability *out, const char *fmt, ...)
{
  size_t used = strlen (out->note);
  va_list ap;
  va_start (ap, fmt);
  vsnprintf (out->note + used, sizeof out->note - used, fmt, ap);
  va_end (ap);
}

/* the note of a decided verdict: the count and the assumptions made */
static void
note_decided (LwMeasuredStability *out, const double *omega, const double complex *l, size_t n)
{
  out->note[0] = '\0';
  note_add (out, "%s: P = %d open-loop unstable, N = %d counter-clockwise encirclement%s of "
            "-1, Z = P - N = %d closed-loop pole%s outside the unit circle; assumed: ",
            lw_measured_verdict_name (out->verdict), out->open_loop_unstable,
            out->encirclements, abs (out->encirclements) == 1 ? "" : "s",
            out->closed_loop_unstable, out->closed_loop_unstable == 1 ? "" : "s");
  if (out->low_end_small)
    note_add (out, "|L| < 1 below %.4g rad/s (type 0); ", omega[0]);
  else
    note_add (out, "the asymptote c/(jwT)^%d below %.4g rad/s; ", out->loop_type, omega[0]);
  if (out->high_end_at_nyquist)
    note_add (out, "the data reach pi/T");
  else
    note_add (out, "|L| < 1 above %.4g rad/s (%.3g there)", omega[n - 1], cabs (l[n - 1]));
}

LwStatus
lw_measured_nyquist (const double *omega, const double complex *l, const double *coherence,
                     size_t n, double period_s, int open_loop_unstable,
                     LwMeasuredStability *out, LwError *err)
{
  if (out == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "no result");
  memset (out, 0, sizeof *out);
  out->verdict = LW_MEASURED_UNDECIDED;
  out->open_loop_unstable = open_loop_unstable;
  out->loop_type = -1;
  out->closed_loop_unstable = -1;
  out->nearest_minus_one = NAN;
  if (omega == NULL || l == NULL || n < 2)
    return lw_error_set (err, LW_ERR_INVALID, -1, "fewer than two points of the loop");
  if (!(period_s > 0) || !isfinite (period_s))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the sample period must be positive");
  if (open_loop_unstable < 0 || open_loop_unstable > LW_MEASURED_MAX_UNSTABLE_POLES)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the count of open-loop unstable poles must be 0 to %d (got %d)",
                         LW_MEASURED_MAX_UNSTABLE_POLES, open_loop_unstable);
  double nyq = PI / period_s;
  for (size_t i = 0; i < n; i++)
    if (!(omega[i] > 0) || !(omega[i] <= nyq * (1 + 1e-9)) || (i > 0 && !(omega[i] > omega[i - 1]))
        || !isfinite (creal (l[i])) || !isfinite (cimag (l[i])) || cabs (l[i]) == 0.0)
      return lw_error_set (err, LW_ERR_INVALID, -1,
                           "point %zu of the loop is not usable (frequencies must increase up "
                           "to pi/T, values be finite and non-zero)", i + 1);
  double *lg = malloc (n * sizeof *lg), *ph = malloc (n * sizeof *ph);
  if (lg == NULL || ph == NULL)
    {
      free (lg);
      free (ph);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
    }
  size_t near = n;
  for (size_t i = 0; i < n; i++)
    {
      lg[i] = log (cabs (l[i]));
      ph[i] = i == 0 ? carg (l[0]) : ph[i - 1] + remainder (carg (l[i]) - ph[i - 1], 2 * PI);
      double d = cabs (1.0 + l[i]);
      if (isnan (out->nearest_minus_one) || d < out->nearest_minus_one)
        out->nearest_minus_one = d;
      /* the point's noise (LW_MEASURED_NOISE_SIGMAS deviations of ln|L| and of the phase)
       * moves L by up to √2·band·|L|: −1 within that is within the noise */
      double band = coherence != NULL
                    ? LW_MEASURED_NOISE_SIGMAS * lw_measured_noise_sigma (coherence[i]) : 0.0;
      if (near == n && d <= sqrt (2.0) * band * cabs (l[i]))
        near = i;
    }

  double low_inc = 0, data_inc = 0, high_inc = 0;
  double band0 = coherence != NULL
                 ? LW_MEASURED_NOISE_SIGMAS * lw_measured_noise_sigma (coherence[0]) : 0.0;
  double bandn = coherence != NULL
                 ? LW_MEASURED_NOISE_SIGMAS * lw_measured_noise_sigma (coherence[n - 1]) : 0.0;
  bool ok = low_end (omega, l, lg, n, band0, out, &low_inc);
  if (!ok)
    out->undecided |= LW_NYQUIST_LOW_END;

  /* along the data */
  Curve c = { lg, ph };
  size_t through = n;
  for (size_t i = 0; i + 1 < n && through == n; i++)
    if (!turn (&c, i, 0.0, 1.0, carg (1.0 + l[i]), carg (1.0 + l[i + 1]), MAX_HALVINGS,
               &data_inc))
      through = i;
  if (near < n || through < n)
    {
      out->undecided |= LW_NYQUIST_NEAR_MINUS_ONE;
      size_t at = near < n ? near : through;
      if (near < n)
        snprintf (out->note, sizeof out->note,
                  "undecided: at %.4g rad/s the loop is within the noise of -1 (|1 + L| = "
                  "%.3g): the count of encirclements cannot be told", omega[at],
                  cabs (1.0 + l[at]));
      else
        snprintf (out->note, sizeof out->note,
                  "undecided: the loop passes through -1 between %.4g and %.4g rad/s (a "
                  "closed-loop pole on the unit circle)", omega[at], omega[at + 1]);
      ok = false;
    }

  /* the high end: up to π/T, where L is real */
  double theta_last = carg (1.0 + l[0]) + data_inc;
  double dev_real = fabs (remainder (carg (l[n - 1]), PI));
  bool at_nyq = omega[n - 1] >= nyq * (1 - NYQUIST_REACH);
  if (at_nyq && dev_real <= REAL_TOL + bandn)
    {
      out->high_end_at_nyquist = true;
      high_inc = round (theta_last / PI) * PI - theta_last;
    }
  else if (cabs (l[n - 1]) <= END_SMALL)
    high_inc = -carg (1.0 + l[n - 1]);   /* 1 + L stays in the right half plane */
  else
    {
      out->undecided |= at_nyq ? LW_NYQUIST_NOT_REAL : LW_NYQUIST_HIGH_END;
      /* after a reason given above, this one follows it */
      note_add (out, "%s", ok ? "undecided: " : "; and ");
      if (at_nyq)
        note_add (out, "the data reach pi/T, where the loop is real, but their phase there is "
                  "%.1f° from the real axis (more than 10° and the noise)", dev_real / DEG);
      else
        note_add (out, "the data stop at %.4g rad/s, short of pi/T = %.4g rad/s, with |L| = "
                  "%.3g there (above 0.5: less than 6 dB to spare): measure up to pi/T",
                  omega[n - 1], nyq, cabs (l[n - 1]));
      ok = false;
    }
  free (lg);
  free (ph);
  if (!ok)
    return LW_OK;

  double delta = low_inc + data_inc + high_inc;
  double x = (2 * delta - out->loop_type * PI) / (2 * PI);
  long nn = lround (x);
  /* by construction x is whole (θ0 a multiple of 90° of the parity of k, the end a multiple
   * of 180°): anything else is rounding */
  out->encirclements = (int) nn;
  long z = (long) open_loop_unstable - nn;
  if (z < 0)
    {
      out->undecided |= LW_NYQUIST_POLE_COUNT;
      snprintf (out->note, sizeof out->note,
                "undecided: the data encircle -1 %ld time%s counter-clockwise, more than the "
                "%d open-loop unstable pole%s given: the count given does not fit the data",
                nn, nn == 1 ? "" : "s", open_loop_unstable, open_loop_unstable == 1 ? "" : "s");
      return LW_OK;
    }
  out->closed_loop_unstable = (int) z;
  out->verdict = z == 0 ? LW_MEASURED_STABLE : LW_MEASURED_UNSTABLE;
  note_decided (out, omega, l, n);
  return LW_OK;
}
