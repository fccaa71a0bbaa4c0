/* lw-measured.c — a measured response as the sampled plant, and the loop's crossovers and
 * margins found between the measured points (lw-measured.h; the method in
 * docs/measured-data.md).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-internal.h"
#include "lw-measured.h"

#include "lw-analysis.h"

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#define PI 3.14159265358979323846

LwStatus
lw_measured_sampled_response (const LwMeasured *m, LwMeasuredKind kind, double period_s,
                              double dead_time_s, double *out_omega, double complex *out_p,
                              size_t *n_out, size_t *bad_index, LwError *err)
{
  if (m == NULL || out_omega == NULL || out_p == NULL || n_out == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "no measured data");
  if (!(period_s > 0.0) || !isfinite (period_s))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the sample period must be positive");
  if (!(dead_time_s >= 0.0) || !isfinite (dead_time_s))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the dead time must be zero or positive");
  double nyq = PI / period_s;
  size_t k = 0;
  for (size_t i = 0; i < m->n; i++)
    {
      double w = m->omega_rad_s[i];
      if (w > nyq * (1.0 + 1e-9))
        {
          if (kind == LW_MEASURED_SAMPLED)
            {
              if (bad_index != NULL)
                *bad_index = i;
              return lw_error_set (err, LW_ERR_INVALID, -1,
                                   "a sampled measurement ends at the Nyquist frequency pi/T = "
                                   "%.6g rad/s (%.6g Hz), but point %zu is at %.6g rad/s (%.6g "
                                   "Hz): was it measured at another sample period?",
                                   nyq, nyq / (2 * PI), i + 1, w, w / (2 * PI));
            }
          continue;   /* continuous: above π/T the sampled loop does not go */
        }
      double complex p = m->h[i];
      if (kind == LW_MEASURED_CONTINUOUS)
        {
          /* the hold: (1 − e^{−jωT})/(jωT) = e^{−jωT/2} · sin(ωT/2)/(ωT/2) */
          double a = 0.5 * w * period_s;
          double sinc = a > 0 ? sin (a) / a : 1.0;
          p *= sinc * cexp (-I * (a + w * dead_time_s));
        }
      out_omega[k] = w;
      out_p[k] = p;
      k++;
    }
  *n_out = k;
  if (k < 2)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "fewer than two measured points lie below the Nyquist frequency pi/T "
                         "= %.6g rad/s", nyq);
  return LW_OK;
}

/* the phase φ (rad) wrapped into (−π, π] */
static double
wrap_pi (double phi)
{
  double r = fmod (phi + PI, 2 * PI);
  if (r <= 0)
    r += 2 * PI;
  return r - PI;
}

void
lw_measured_unwrap_phase (const double complex *l, size_t n, double *phase_rad)
{
  /* each step taken as the one within ±π: the data must be dense enough for that, which 10
   * points per decade of a rational loop is */
  for (size_t i = 0; i < n; i++)
    {
      double a = carg (l[i]);
      phase_rad[i] = i == 0 ? a : phase_rad[i - 1] + wrap_pi (a - phase_rad[i - 1]);
    }
  /* the unwrapped phase starts in (−2π, 0] as the model's does near its low end */
  double shift = n > 0 ? -2 * PI * ceil (phase_rad[0] / (2 * PI)) : 0.0;
  for (size_t i = 0; i < n; i++)
    phase_rad[i] += shift;
}

LwStatus
lw_measured_loop_at (const double *omega_rad_s, const double complex *l, size_t n,
                     double at_rad_s, double *mag, double *phase_deg, LwError *err)
{
  if (omega_rad_s == NULL || l == NULL || n < 2)
    return lw_error_set (err, LW_ERR_INVALID, -1, "fewer than two points of the loop");
  if (!(at_rad_s >= omega_rad_s[0] && at_rad_s <= omega_rad_s[n - 1]))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "%.6g rad/s lies outside the measured data, which cover %.6g … %.6g "
                         "rad/s: the loop on the data is not known there",
                         at_rad_s, omega_rad_s[0], omega_rad_s[n - 1]);
  /* the interval [ω_i, ω_i+1] holding the frequency (the last one for the top point) */
  size_t lo = lw_interval_of (omega_rad_s, n, at_rad_s), hi = lo + 1;
  double complex a = l[lo], b = l[hi];
  if (!(cabs (a) > 0.0 && cabs (b) > 0.0 && isfinite (cabs (a)) && isfinite (cabs (b))))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the loop on the data is zero or not finite next to %.6g rad/s",
                         at_rad_s);
  double x0 = log (omega_rad_s[lo]), x1 = log (omega_rad_s[hi]);
  double t = (log (at_rad_s) - x0) / (x1 - x0);
  if (mag != NULL)
    *mag = exp (log (cabs (a)) + t * (log (cabs (b)) - log (cabs (a))));
  if (phase_deg != NULL)
    {
      /* the branch of the whole table's unwrapping, as lw_measured_margins takes it */
      double *ph = malloc (n * sizeof *ph);
      if (ph == NULL)
        return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
      lw_measured_unwrap_phase (l, n, ph);
      *phase_deg = (ph[lo] + t * (ph[hi] - ph[lo])) * 180.0 / PI;
      free (ph);
    }
  return LW_OK;
}

double
lw_measured_noise_sigma (double coherence)
{
  if (!(coherence < 1.0))
    return 0.0;
  if (!(coherence > 0.0))
    return INFINITY;
  /* √(1 − γ²) / (γ·√(2 n_d)) with γ² the coherence (lw-measured.h) */
  return sqrt ((1.0 - coherence) / (coherence * 2.0 * LW_MEASURED_NOISE_AVERAGES));
}

/* A sign change between points i and i + 1 before merging: the crossing, and for a phase
 * crossing the odd multiple of π it is at. */
typedef struct {
  LwMeasuredCrossing c;
  size_t i;
  double target;
} Raw;

typedef struct {
  Raw *a;
  size_t n, cap;
} RawList;

static bool
push (RawList *l, Raw r)
{
  if (l->n == l->cap)
    {
      size_t nc = l->cap ? 2 * l->cap : 8;
      if (nc > SIZE_MAX / sizeof *l->a)
        return false;
      Raw *b = realloc (l->a, nc * sizeof *l->a);
      if (b == NULL)
        return false;
      l->a = b;
      l->cap = nc;
    }
  l->a[l->n++] = r;
  return true;
}

void
lw_measured_margins_clear (LwMeasuredMargins *m)
{
  if (m == NULL)
    return;
  free (m->gain);
  free (m->phase);
  memset (m, 0, sizeof *m);
}

/* point j within the noise of the crossing: its distance x from it below its noise band */
static bool
uncertain (const double *x, const double *band, size_t j, double target)
{
  return fabs (x[j] - target) < band[j];
}

/* The raw sign changes merged (docs/measured-data.md, "Noise"): each one's interval reaches
 * past the neighbouring points within the noise of the crossing (x: ln|L| with target 0, or
 * the unwrapped phase with its odd multiple of π); sign changes whose widened intervals
 * overlap (of the same target) make one crossing, the middle one's frequency and margin with
 * the union interval. Without noise (band 0) every raw crossing comes out as it was. */
static LwMeasuredCrossing *
merge (const RawList *raw, const double *x, const double *band, const double *omega,
       const double *coherence, size_t n, size_t *n_out)
{
  *n_out = 0;
  if (raw->n == 0)
    return NULL;
  LwMeasuredCrossing *out = malloc (raw->n * sizeof *out);
  if (out == NULL)
    return NULL;
  size_t k = 0;
  while (k < raw->n)
    {
      const Raw *first = &raw->a[k];
      size_t lo = first->i, hi = first->i + 1, m = 0;
      while (lo > 0 && uncertain (x, band, lo, first->target))
        lo--;
      while (hi + 1 < n && uncertain (x, band, hi, first->target))
        hi++;
      size_t g = k;
      for (; g < raw->n && raw->a[g].target == first->target && raw->a[g].i < hi; g++)
        {
          /* a later sign change within the widened interval: its own widening joins */
          size_t b = raw->a[g].i + 1;
          while (b + 1 < n && uncertain (x, band, b, first->target))
            b++;
          if (b > hi)
            hi = b;
          m++;
        }
      const Raw *mid = &raw->a[k + m / 2];
      LwMeasuredCrossing c = mid->c;
      c.lo_rad_s = omega[lo];
      c.hi_rad_s = omega[hi];
      c.sign_changes = (unsigned) m;
      c.within_noise = m > 1 || lo < first->i || hi > raw->a[g - 1].i + 1;
      c.low_coherence = false;
      for (size_t j = lo; coherence != NULL && j <= hi; j++)
        c.low_coherence |= coherence[j] < LW_MEASURED_LOW_COHERENCE;
      out[(*n_out)++] = c;
      k = g;
    }
  return out;
}

LwStatus
lw_measured_margins (const double *omega, const double complex *l, const double *coherence,
                     size_t n, LwMeasuredMargins *out, LwError *err)
{
  if (out == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "no result");
  memset (out, 0, sizeof *out);
  out->phase_margin_deg = out->gain_crossover_rad_s = NAN;
  out->gain_margin_db = out->phase_crossover_rad_s = NAN;
  out->delay_margin_s = NAN;
  out->sensitivity_peak = out->sensitivity_peak_rad_s = NAN;
  if (omega == NULL || l == NULL || n < 2)
    return lw_error_set (err, LW_ERR_INVALID, -1, "fewer than two points of the loop");
  for (size_t i = 0; i < n; i++)
    if (!(omega[i] > 0) || !isfinite (omega[i]) || (i > 0 && !(omega[i] > omega[i - 1]))
        || !isfinite (creal (l[i])) || !isfinite (cimag (l[i])) || cabs (l[i]) == 0.0)
      return lw_error_set (err, LW_ERR_INVALID, -1,
                           "point %zu of the loop is not usable (frequencies must increase, "
                           "values be finite and non-zero)", i + 1);

  double *lg = malloc (n * sizeof *lg), *ph = malloc (n * sizeof *ph);
  double *band = malloc (n * sizeof *band);
  RawList rg = { NULL, 0, 0 }, rp = { NULL, 0, 0 };
  if (lg == NULL || ph == NULL || band == NULL)
    {
      free (lg);
      free (ph);
      free (band);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
    }
  for (size_t i = 0; i < n; i++)
    {
      lg[i] = log (cabs (l[i]));
      band[i] = coherence != NULL
                ? LW_MEASURED_NOISE_SIGMAS * lw_measured_noise_sigma (coherence[i]) : 0.0;
    }
  lw_measured_unwrap_phase (l, n, ph);

  LwStatus st = LW_OK;
  for (size_t i = 0; i + 1 < n && st == LW_OK; i++)
    {
      double x0 = log (omega[i]), x1 = log (omega[i + 1]);
      /* gain crossover: ln|L| changes sign (a point exactly on |L| = 1 counts once) */
      if ((lg[i] >= 0) != (lg[i + 1] >= 0))
        {
          double t = lg[i] == lg[i + 1] ? 0.0 : lg[i] / (lg[i] - lg[i + 1]);
          double w = exp (x0 + t * (x1 - x0));
          double phi = ph[i] + t * (ph[i + 1] - ph[i]);
          double pm = wrap_pi (phi + PI) * 180.0 / PI;
          if (pm == -180.0)
            pm = 180.0;
          Raw r = { { w, omega[i], omega[i + 1], pm, false, false, 1 }, i, 0.0 };
          if (!push (&rg, r))
            st = LW_ERR_NOMEM;
        }
      /* phase crossovers: every odd multiple of π the unwrapped phase passes on (ph[i],
       * ph[i+1]] or [ph[i+1], ph[i]) */
      double a = ph[i], b = ph[i + 1];
      double lo = fmin (a, b), hi = fmax (a, b);
      /* odd multiples (2k+1)π in [lo, hi], the end at ph[i+1] excluded unless it is the last
       * point (so a crossing exactly on a point counts once) */
      double kmin = ceil ((lo - PI) / (2 * PI)), kmax = floor ((hi - PI) / (2 * PI));
      for (double k = kmin; k <= kmax && st == LW_OK; k++)
        {
          double target = (2 * k + 1) * PI;
          if (target == b && i + 2 < n)
            continue;
          if (a == b)
            continue;
          double t = (target - a) / (b - a);
          double w = exp (x0 + t * (x1 - x0));
          double gdb = -20.0 / log (10.0) * (lg[i] + t * (lg[i + 1] - lg[i]));
          Raw r = { { w, omega[i], omega[i + 1], gdb, false, false, 1 }, i, target };
          if (!push (&rp, r))
            st = LW_ERR_NOMEM;
        }
    }
  if (st == LW_OK)
    {
      out->gain = merge (&rg, lg, band, omega, coherence, n, &out->n_gain);
      out->phase = merge (&rp, ph, band, omega, coherence, n, &out->n_phase);
      if ((rg.n > 0 && out->gain == NULL) || (rp.n > 0 && out->phase == NULL))
        st = LW_ERR_NOMEM;
    }
  if (st == LW_OK)
    {
      /* the governing margins over the (merged) crossings, in ascending frequency */
      double best_pm = INFINITY, best_gm = INFINITY, dm = INFINITY;
      for (size_t i = 0; i < out->n_gain; i++)
        {
          double pm = out->gain[i].margin, w = out->gain[i].omega_rad_s;
          if (fabs (pm) < fabs (best_pm) || (fabs (pm) == fabs (best_pm) && pm < best_pm))
            {
              best_pm = pm;
              out->phase_margin_deg = pm;
              out->gain_crossover_rad_s = w;
            }
          double turn = (pm < 0 ? pm + 360.0 : pm) * PI / 180.0;
          if (turn / w < dm)
            dm = turn / w;
        }
      for (size_t i = 0; i < out->n_phase; i++)
        if (fabs (out->phase[i].margin) < fabs (best_gm))
          {
            best_gm = out->phase[i].margin;
            out->gain_margin_db = best_gm;
            out->phase_crossover_rad_s = out->phase[i].omega_rad_s;
          }
      for (size_t i = 0; i < n; i++)
        {
          double s = 1.0 / cabs (1.0 + l[i]);
          if (isnan (out->sensitivity_peak) || s > out->sensitivity_peak)
            {
              out->sensitivity_peak = s;
              out->sensitivity_peak_rad_s = omega[i];
            }
        }
      if (isfinite (dm))
        out->delay_margin_s = dm;
      out->crossover_above_data = lg[n - 1] >= 0 || fabs (lg[n - 1]) < band[n - 1];
      out->crossover_below_data = lg[0] < 0 || fabs (lg[0]) < band[0];
    }
  free (lg);
  free (ph);
  free (band);
  free (rg.a);
  free (rp.a);
  if (st != LW_OK)
    {
      lw_measured_margins_clear (out);
      return lw_error_set (err, st, -1, "out of memory");
    }
  return LW_OK;
}

void
lw_measured_loop_clear (LwMeasuredLoop *l)
{
  if (l == NULL)
    return;
  lw_measured_margins_clear (&l->margins);
  free (l->omega_rad_s);
  free (l->p);
  free (l->l);
  memset (l, 0, sizeof *l);
  l->model_diff = NAN;
}

LwStatus
lw_measured_loop_close (const LwMeasured *m, LwMeasuredKind kind, double period_s,
                        double dead_time_s, int compute_delay, const LwModel *controller_z,
                        const struct LwSampledPlant *model, int open_loop_unstable,
                        LwMeasuredLoop *out, LwError *err)
{
  memset (out, 0, sizeof *out);
  out->model_diff = NAN;
  if (m == NULL || controller_z == NULL || compute_delay < 0)
    return lw_error_set (err, LW_ERR_INVALID, -1, "no data or no controller");
  if (open_loop_unstable < 0 || open_loop_unstable > LW_MEASURED_MAX_UNSTABLE_POLES)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the count of open-loop unstable poles must be 0 to %d (got %d)",
                         LW_MEASURED_MAX_UNSTABLE_POLES, open_loop_unstable);
  size_t n = m->n, bad = 0;
  if (n == 0 || n > SIZE_MAX / sizeof (double complex))
    return lw_error_set (err, LW_ERR_INVALID, -1, "no measured points");
  out->omega_rad_s = malloc (n * sizeof *out->omega_rad_s);
  out->p = malloc (n * sizeof *out->p);
  out->l = malloc (n * sizeof *out->l);
  if (out->omega_rad_s == NULL || out->p == NULL || out->l == NULL)
    {
      lw_measured_loop_clear (out);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
    }
  LwStatus st = lw_measured_sampled_response (m, kind, period_s, dead_time_s, out->omega_rad_s,
                                              out->p, &out->n, &bad, err);
  if (st != LW_OK)
    {
      lw_measured_loop_clear (out);
      return st;
    }
  for (size_t i = 0; i < out->n; i++)
    {
      double wt = out->omega_rad_s[i] * period_s;
      /* z^−N = e^{−jNωT}, one exponential (no complex power per point) */
      out->l[i] = cexp (-I * ((double) compute_delay * wt)) * lw_model_eval (controller_z,
                                                                             cexp (I * wt))
                  * out->p[i];
    }
  if (model != NULL)
    {
      out->model_diff = 0.0;
      for (size_t i = 0; i < out->n; i++)
        {
          double complex pm = lw_sampled_plant_response (model, out->omega_rad_s[i]);
          out->model_diff = fmax (out->model_diff, cabs (pm - out->p[i]) / cabs (out->p[i]));
        }
    }
  /* the points kept are the table's first n (frequencies increase): its coherence lines up */
  st = lw_measured_margins (out->omega_rad_s, out->l, m->coherence, out->n, &out->margins, err);
  if (st == LW_OK)
    st = lw_measured_nyquist (out->omega_rad_s, out->l, m->coherence, out->n, period_s,
                              open_loop_unstable, &out->stability, err);
  if (st != LW_OK)
    {
      lw_measured_loop_clear (out);
      return st;
    }
  /* P counts the loop's poles outside the unit circle: the controller's own are among them
   * (a plant zero cannot cancel one without an unstable hidden mode) */
  int ctrl = 0;
  for (size_t i = 0; i < controller_z->n_poles; i++)
    ctrl += cabs (controller_z->poles[i]) > 1.0 + 1e-10;
  if (ctrl > open_loop_unstable)
    lw_measured_stability_refuse_count (&out->stability, ctrl);
  return LW_OK;
}

size_t
lw_interval_of (const double *x, size_t n, double v)
{
  size_t lo = 0, hi = n - 1;
  while (hi - lo > 1)
    {
      size_t mid = lo + (hi - lo) / 2;
      if (x[mid] <= v)
        lo = mid;
      else
        hi = mid;
    }
  return lo;
}
