/* lw-figure-data.c — an evaluation turned into the plain figure structs (lw-figure-data.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-figure-data.h"

#include <complex.h>
#include <math.h>
#include <stdlib.h>
#include <stdint.h>
#include <string.h>

#include <glib.h>

#include "lw-response.h"

/* Value of a curve y over ascending x at x0, linear in log10 x between neighbours (for the
 * position of annotations only; the figures themselves come from the core). */
static double
interp_log (const double *x, const double *y, size_t n, double x0)
{
  if (n == 0)
    return NAN;
  if (x0 <= x[0])
    return y[0];
  if (x0 >= x[n - 1])
    return y[n - 1];
  size_t lo = 0, hi = n - 1;
  while (hi - lo > 1)
    {
      size_t mid = lo + (hi - lo) / 2;
      if (x[mid] <= x0)
        lo = mid;
      else
        hi = mid;
    }
  double t = (log10 (x0) - log10 (x[lo])) / (log10 (x[hi]) - log10 (x[lo]));
  return y[lo] + t * (y[hi] - y[lo]);
}

/* The phase of the curve at a crossover put on the branch of the figure: phase crossovers sit
 * exactly on an odd multiple of 180°. */
static void
fill_crossovers (LwFigureVariant *fv, const LwEvaluation *ev)
{
  const LwMargins *m = &ev->margins;
  size_t n = ev->n_points;
  fv->z_gc = g_new0 (LwPlotCrossover, m->n_gain_crossovers + 1);
  fv->w_gc = g_new0 (LwPlotCrossover, m->n_gain_crossovers + 1);
  fv->z_pc = g_new0 (LwPlotCrossover, m->n_phase_crossovers + 1);
  fv->w_pc = g_new0 (LwPlotCrossover, m->n_phase_crossovers + 1);
  for (size_t i = 0; i < m->n_gain_crossovers; i++)
    {
      LwPlotCrossover *c = &fv->z_gc[i];
      c->freq_rad_s = m->gain_crossovers_rad_s[i];
      c->margin = m->phase_margins_deg[i];
      c->mag_db = 0.0;
      double ph = interp_log (ev->omega_rad_s, ev->loop_phase_deg, n, c->freq_rad_s);
      /* the reference −180° line nearest the curve: ph − PM is an odd multiple of 180° */
      double ref = 180.0 * (2.0 * round (((ph - c->margin) / 180.0 - 1.0) / 2.0) + 1.0);
      c->phase_deg = ref + c->margin;
      c->re = cos (c->phase_deg * G_PI / 180.0);
      c->im = sin (c->phase_deg * G_PI / 180.0);
      fv->w_gc[i] = *c;
      fv->w_gc[i].freq_rad_s = lw_warp_omega_to_nu (c->freq_rad_s, ev->period_s);
    }
  for (size_t i = 0; i < m->n_phase_crossovers; i++)
    {
      LwPlotCrossover *c = &fv->z_pc[i];
      c->freq_rad_s = m->phase_crossovers_rad_s[i];
      c->margin = m->gain_margins_db[i];
      c->mag_db = -c->margin;
      double ph = interp_log (ev->omega_rad_s, ev->loop_phase_deg, n, c->freq_rad_s);
      c->phase_deg = 180.0 * (2.0 * round ((ph / 180.0 - 1.0) / 2.0) + 1.0);
      c->re = -pow (10.0, c->mag_db / 20.0);
      c->im = 0.0;
      fv->w_pc[i] = *c;
      /* a phase crossover exactly at π/T maps to ν = ∞: leave it out of the w-plane view */
      fv->w_pc[i].freq_rad_s = lw_warp_omega_to_nu (c->freq_rad_s, ev->period_s);
    }
  fv->v.z.gain_crossovers = fv->z_gc;
  fv->v.z.n_gain_crossovers = m->n_gain_crossovers;
  fv->v.z.phase_crossovers = fv->z_pc;
  fv->v.z.n_phase_crossovers = m->n_phase_crossovers;
  fv->v.w.gain_crossovers = fv->w_gc;
  fv->v.w.n_gain_crossovers = m->n_gain_crossovers;
  fv->v.w.phase_crossovers = fv->w_pc;
  size_t nw = 0;
  for (size_t i = 0; i < m->n_phase_crossovers; i++)
    if (isfinite (fv->w_pc[i].freq_rad_s) && fv->w_pc[i].freq_rad_s > 0.0)
      fv->w_pc[nw++] = fv->w_pc[i];
  fv->v.w.n_phase_crossovers = nw;
}

LwModel *
lw_figure_loop_w (const LwEvaluation *ev)
{
  LwModel *cp = lw_model_mul (ev->controller_w, ev->plant_w);
  if (cp == NULL || ev->compute_delay <= 0)
    return cp;
  /* z^−1 = (1 − wT/2)/(1 + wT/2) = −(w − 2/T)/(w + 2/T) */
  size_t N = (size_t) ev->compute_delay;
  LwModel *d = lw_model_new (LW_DOMAIN_W, ev->period_s, (N % 2) ? -1.0 : 1.0, N, N);
  if (d == NULL)
    {
      lw_model_free (cp);
      return NULL;
    }
  for (size_t i = 0; i < N; i++)
    {
      d->zeros[i] = 2.0 / ev->period_s;
      d->poles[i] = -2.0 / ev->period_s;
    }
  LwModel *l = lw_model_mul (cp, d);
  lw_model_free (cp);
  lw_model_free (d);
  return l;
}

double
lw_figure_w_end_rad_s (const LwModel *loop_w, double period_s)
{
  double top = 2.0 / period_s;
  for (size_t i = 0; loop_w && i < loop_w->n_zeros + loop_w->n_poles; i++)
    {
      double complex r = i < loop_w->n_zeros ? loop_w->zeros[i]
                                             : loop_w->poles[i - loop_w->n_zeros];
      double a = cabs (r);
      if (isfinite (a) && a > top)
        top = a;
    }
  top = fmin (top, 1e4 * 2.0 / period_s);
  return pow (10.0, ceil (log10 (top) + 1.0 - 1e-9));
}

static int
cmp_double (const void *a, const void *b)
{
  double x = *(const double *) a, y = *(const double *) b;
  return (x > y) - (x < y);
}

static double
asymptote_db_at (const LwModel *h, double nu)
{
  double db = 20.0 * log10 (fabs (h->gain));
  for (size_t i = 0; i < h->n_zeros; i++)
    db += 20.0 * log10 (fmax (cabs (h->zeros[i]), nu));
  for (size_t i = 0; i < h->n_poles; i++)
    db -= 20.0 * log10 (fmax (cabs (h->poles[i]), nu));
  return db;
}

size_t
lw_figure_asymptote (const LwModel *h, double nu_lo, double nu_hi, double *nu, double *db)
{
  size_t n = 0;
  nu[n++] = nu_lo;
  for (size_t i = 0; i < h->n_zeros + h->n_poles; i++)
    {
      double a = cabs (i < h->n_zeros ? h->zeros[i] : h->poles[i - h->n_zeros]);
      if (a > nu_lo && a < nu_hi)
        nu[n++] = a;
    }
  qsort (nu + 1, n - 1, sizeof (double), cmp_double);
  /* equal corners (a conjugate pair) are one vertex */
  size_t m = 1;
  for (size_t i = 1; i < n; i++)
    if (nu[i] != nu[m - 1])
      nu[m++] = nu[i];
  nu[m++] = nu_hi;
  for (size_t i = 0; i < m; i++)
    db[i] = asymptote_db_at (h, nu[i]);
  return m;
}

/* The loop over ν: the evaluation's grid below π/T warped to ν, then extra points to the end
 * of the axis; evaluated at ω = warp⁻¹(ν) from the state space. */
static LwStatus
fill_w_curve (LwFigureVariant *fv, const LwSampledPlant *plant, const LwEvaluation *ev,
              LwError *err)
{
  double T = ev->period_s;
  size_t nz = ev->n_points;
  while (nz > 0 && !(ev->omega_rad_s[nz - 1] < G_PI / T * (1.0 - 1e-12)))
    nz--;   /* the Nyquist end point maps to ν = ∞ */
  if (nz < 2)
    return lw_error_set (err, LW_ERR_INVALID, -1, "the frequency grid is too short for a figure");
  LwModel *lw = lw_figure_loop_w (ev);
  if (lw == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the w-plane loop");
  double nu_first = lw_warp_omega_to_nu (ev->omega_rad_s[0], T);
  double nu_last = lw_warp_omega_to_nu (ev->omega_rad_s[nz - 1], T);
  double nu_end = lw_figure_w_end_rad_s (lw, T);
  size_t n_extra = nu_end > nu_last * 1.0001 ? LW_FIGURE_W_EXTRA_POINTS : 0;
  size_t n = nz + n_extra;
  double *omega = g_new (double, n);
  fv->w_nu = g_new (double, n);
  fv->w_mag = g_new (double, n);
  fv->w_phase = g_new (double, n);
  double *cm = g_new (double, n), *cph = g_new (double, n);
  for (size_t i = 0; i < nz; i++)
    {
      omega[i] = ev->omega_rad_s[i];
      fv->w_nu[i] = lw_warp_omega_to_nu (omega[i], T);
    }
  for (size_t j = 1; j <= n_extra; j++)
    {
      double t = (double) j / (double) n_extra;
      double nu = pow (10.0, log10 (nu_last) + t * (log10 (nu_end) - log10 (nu_last)));
      fv->w_nu[nz + j - 1] = nu;
      omega[nz + j - 1] = lw_warp_nu_to_omega (nu, T);
    }
  LwStatus st = lw_sampled_plant_freq_response (plant, omega, n, fv->w_mag, fv->w_phase, err);
  if (st == LW_OK)
    st = lw_model_freq_response (ev->controller_z, omega, n, cm, cph, err);
  if (st == LW_OK)
    {
      for (size_t i = 0; i < n; i++)
        {
          fv->w_mag[i] += cm[i];
          fv->w_phase[i] += cph[i] - omega[i] * T * ev->compute_delay * 180.0 / G_PI;
        }
      /* the same branch as the evaluation's unwrapped phase */
      double shift = 360.0 * round ((ev->loop_phase_deg[0] - fv->w_phase[0]) / 360.0);
      for (size_t i = 0; i < n; i++)
        fv->w_phase[i] += shift;
      fv->v.w.n = n;
      fv->v.w.freq_rad_s = fv->w_nu;
      fv->v.w.mag_db = fv->w_mag;
      fv->v.w.phase_deg = fv->w_phase;
      size_t cap = lw->n_zeros + lw->n_poles + 2;
      fv->asym_nu = g_new (double, cap);
      fv->asym_db = g_new (double, cap);
      fv->v.w.n_asymptote = lw_figure_asymptote (lw, nu_first, nu_end, fv->asym_nu, fv->asym_db);
      fv->v.w.asymptote_freq_rad_s = fv->asym_nu;
      fv->v.w.asymptote_db = fv->asym_db;
    }
  g_free (omega);
  g_free (cm);
  g_free (cph);
  lw_model_free (lw);
  return st;
}

static void
split (const double complex *r, size_t n, double **re, double **im, size_t offset, size_t total)
{
  if (*re == NULL)
    {
      *re = g_new0 (double, total + 1);
      *im = g_new0 (double, total + 1);
    }
  for (size_t i = 0; i < n; i++)
    {
      (*re)[offset + i] = creal (r[i]);
      (*im)[offset + i] = cimag (r[i]);
    }
}

static void
fill_poles (LwFigureVariant *fv, const LwEvaluation *ev)
{
  LwPlotPoleData *d = &fv->v.poles;
  split (ev->closed_loop_poles, ev->n_closed_loop_poles, &fv->cl_re, &fv->cl_im, 0,
         ev->n_closed_loop_poles);
  d->n_closed_loop = ev->n_closed_loop_poles;
  d->cl_re = fv->cl_re;
  d->cl_im = fv->cl_im;
  /* loop L(z) = z^−N C(z) P(z): N poles at z = 0 (they start zero-filled) */
  size_t N = ev->compute_delay > 0 ? (size_t) ev->compute_delay : 0;
  size_t np = ev->plant_z->n_poles + ev->controller_z->n_poles + N;
  split (ev->plant_z->poles, ev->plant_z->n_poles, &fv->pole_re, &fv->pole_im, 0, np);
  split (ev->controller_z->poles, ev->controller_z->n_poles, &fv->pole_re, &fv->pole_im,
         ev->plant_z->n_poles, np);
  d->n_loop_poles = np;
  d->pole_re = fv->pole_re;
  d->pole_im = fv->pole_im;
  size_t nz = ev->plant_z->n_zeros + ev->controller_z->n_zeros;
  split (ev->plant_z->zeros, ev->plant_z->n_zeros, &fv->zero_re, &fv->zero_im, 0, nz);
  split (ev->controller_z->zeros, ev->controller_z->n_zeros, &fv->zero_re, &fv->zero_im,
         ev->plant_z->n_zeros, nz);
  d->n_loop_zeros = nz;
  d->zero_re = fv->zero_re;
  d->zero_im = fv->zero_im;
}

LwStatus
lw_figure_variant_fill (LwFigureVariant *fv, const char *name, const LwSampledPlant *plant,
                        const LwEvaluation *ev, LwError *err)
{
  memset (fv, 0, sizeof *fv);
  fv->v.name = name;
  fv->v.z.n = ev->n_points;
  fv->v.z.freq_rad_s = ev->omega_rad_s;
  fv->v.z.mag_db = ev->loop_mag_db;
  fv->v.z.phase_deg = ev->loop_phase_deg;
  fill_crossovers (fv, ev);

  fv->ny_re = g_new (double, ev->n_points + 1);
  fv->ny_im = g_new (double, ev->n_points + 1);
  for (size_t i = 0; i < ev->n_points; i++)
    {
      double r = pow (10.0, ev->loop_mag_db[i] / 20.0), a = ev->loop_phase_deg[i] * G_PI / 180.0;
      fv->ny_re[i] = r * cos (a);
      fv->ny_im[i] = r * sin (a);
    }
  fv->v.nyquist.n = ev->n_points;
  fv->v.nyquist.re = fv->ny_re;
  fv->v.nyquist.im = fv->ny_im;

  fv->v.step.period_s = ev->period_s;
  fv->v.step.n = ev->step.n;
  fv->v.step.y = ev->step.samples;
  fv->v.step.has_final = ev->step.has_final;
  fv->v.step.final_value = ev->step.final_value;

  fill_poles (fv, ev);
  LwStatus st = fill_w_curve (fv, plant, ev, err);
  if (st != LW_OK)
    lw_figure_variant_clear (fv);
  return st;
}

void
lw_figure_variant_clear (LwFigureVariant *fv)
{
  if (fv == NULL)
    return;
  g_free (fv->z_gc);
  g_free (fv->z_pc);
  g_free (fv->w_gc);
  g_free (fv->w_pc);
  g_free (fv->w_nu);
  g_free (fv->w_mag);
  g_free (fv->w_phase);
  g_free (fv->asym_nu);
  g_free (fv->asym_db);
  g_free (fv->ny_re);
  g_free (fv->ny_im);
  g_free (fv->cl_re);
  g_free (fv->cl_im);
  g_free (fv->pole_re);
  g_free (fv->pole_im);
  g_free (fv->zero_re);
  g_free (fv->zero_im);
  memset (fv, 0, sizeof *fv);
}

void
lw_figure_requirements (LwPlotRequirements *r, double period_s, bool has_target_crossover,
                        double target_crossover_rad_s, bool has_min_phase_margin,
                        double min_phase_margin_deg)
{
  memset (r, 0, sizeof *r);
  if (has_target_crossover && target_crossover_rad_s > 0.0
      && target_crossover_rad_s < G_PI / period_s)
    {
      r->has_target_crossover = true;
      r->target_crossover_rad_s = target_crossover_rad_s;
      r->target_crossover_nu_rad_s = lw_warp_omega_to_nu (target_crossover_rad_s, period_s);
    }
  r->has_min_phase_margin = has_min_phase_margin;
  r->min_phase_margin_deg = min_phase_margin_deg;
}

void
lw_figure_requirements_add (LwPlotRequirements *r, double period_s, const LwRequirement *req)
{
  if (r == NULL || req == NULL || lw_requirement_check (req, NULL) != LW_OK)
    return;
  switch (req->kind)
    {
    case LW_REQ_MIN_PHASE_MARGIN:
      if (!r->has_min_phase_margin || req->limit > r->min_phase_margin_deg)
        r->min_phase_margin_deg = req->limit;
      r->has_min_phase_margin = true;
      break;
    case LW_REQ_MIN_GAIN_MARGIN:
      if (!r->has_min_gain_margin || req->limit > r->min_gain_margin_db)
        r->min_gain_margin_db = req->limit;
      r->has_min_gain_margin = true;
      break;
    case LW_REQ_CROSSOVER_RANGE:
      if (!r->has_target_crossover)
        {
          bool pm = r->has_min_phase_margin;
          double pm_deg = r->min_phase_margin_deg;
          bool gm = r->has_min_gain_margin;
          double gm_db = r->min_gain_margin_db;
          bool ms = r->has_max_sensitivity;
          double ms_bound = r->max_sensitivity;
          lw_figure_requirements (r, period_s, true, sqrt (req->limit * req->limit_hi), pm, pm_deg);
          r->has_min_gain_margin = gm;
          r->min_gain_margin_db = gm_db;
          r->has_max_sensitivity = ms;
          r->max_sensitivity = ms_bound;
        }
      break;
    case LW_REQ_MAX_SENSITIVITY:
      if (!r->has_max_sensitivity || req->limit < r->max_sensitivity)
        r->max_sensitivity = req->limit;
      r->has_max_sensitivity = true;
      break;
    default:
      break;
    }
}

static void
set_reference (LwFigureVariant *fv, const LwSimResponse *ref, const LwSimOptions *so,
               bool show_actuator)
{
  if (ref == NULL || ref->n < 2)
    return;
  LwPlotStepData *st = &fv->v.step;
  bool limited = so != NULL && so->has_limits;
  if (limited)
    {
      st->y = ref->y;
      st->n = ref->n;
      st->has_limits = true;
      st->u_low = so->u_low;
      st->u_high = so->u_high;
    }
  if (ref->has_continuous && ref->n == st->n)
    {
      st->n_fine = ref->n_fine;
      st->t_fine_s = ref->t_fine_s;
      st->y_fine = ref->y_fine;
    }
  if (show_actuator && ref->n == st->n)
    st->u = ref->u;
}

void
lw_figure_variant_set_responses (LwFigureVariant *fv, const LwSimResponse *ref,
                                 const LwSimOptions *so, const LwSimResponse *in,
                                 const LwSimResponse *out, unsigned shows)
{
  if (fv == NULL)
    return;
  if (shows & LW_FIGURE_SHOW_REFERENCE)
    set_reference (fv, ref, so, (shows & LW_FIGURE_SHOW_ACTUATOR) != 0);
  else
    fv->v.step = (LwPlotStepData) { .period_s = fv->v.step.period_s };
  if ((shows & LW_FIGURE_SHOW_INPUT_DISTURBANCE) && in != NULL && in->n >= 2)
    fv->v.dist_in = (LwPlotStepData) { .period_s = in->period_s, .n = in->n, .y = in->y };
  if ((shows & LW_FIGURE_SHOW_OUTPUT_DISTURBANCE) && out != NULL && out->n >= 2)
    fv->v.dist_out = (LwPlotStepData) { .period_s = out->period_s, .n = out->n, .y = out->y };
}

void
lw_figure_family_fill (LwFigureFamily *ff, size_t n_members, size_t n,
                       LwSampledPlant *const *plants, LwEvaluation *const *evs,
                       size_t worst_pm, double worst_pm_deg)
{
  memset (ff, 0, sizeof *ff);
  ff->members = g_new0 (LwFigureVariant, n + 1);
  ff->z = g_new0 (LwPlotFreqCurve, n + 1);
  ff->w = g_new0 (LwPlotFreqCurve, n + 1);
  ff->nyquist = g_new0 (LwPlotComplexCurve, n + 1);
  ff->step = g_new0 (LwPlotStepData, n + 1);
  ff->poles = g_new0 (LwPlotPoleData, n + 1);
  for (size_t i = 0; i < n; i++)
    {
      LwError err;
      lw_error_clear (&err);
      if (evs[i] == NULL || plants[i] == NULL
          || lw_figure_variant_fill (&ff->members[i], NULL, plants[i], evs[i], &err) != LW_OK)
        continue;
      ff->z[i] = ff->members[i].v.z;
      ff->w[i] = ff->members[i].v.w;
      ff->nyquist[i] = ff->members[i].v.nyquist;
      ff->step[i] = ff->members[i].v.step;
      ff->poles[i] = ff->members[i].v.poles;
    }
  ff->f.n_members = n_members;
  ff->f.n = n;
  ff->n_filled = n;
  ff->f.z = ff->z;
  ff->f.w = ff->w;
  ff->f.nyquist = ff->nyquist;
  ff->f.step = ff->step;
  ff->f.poles = ff->poles;
  ff->f.worst_pm = worst_pm < n ? worst_pm : SIZE_MAX;
  ff->f.worst_pm_deg = worst_pm_deg;
}

/* The envelope of curves[0 … n−1] on the grid g (m points) into lo/hi arrays. */
static void
band_of (const LwPlotFreqCurve *curves, size_t n, const double *g, size_t m, double *mag_lo,
         double *mag_hi, double *ph_lo, double *ph_hi)
{
  for (size_t j = 0; j < m; j++)
    mag_lo[j] = mag_hi[j] = ph_lo[j] = ph_hi[j] = NAN;
  for (size_t i = 0; i < n; i++)
    {
      const LwPlotFreqCurve *c = &curves[i];
      size_t k = 0;
      for (size_t j = 0; j < m && c->n >= 2; j++)
        {
          while (k + 1 < c->n && c->freq_rad_s[k + 1] < g[j])
            k++;
          if (k + 1 >= c->n || g[j] < c->freq_rad_s[k] || !(c->freq_rad_s[k] > 0.0))
            continue;
          double f0 = c->freq_rad_s[k], f1 = c->freq_rad_s[k + 1];
          double t = f1 > f0 ? log (g[j] / f0) / log (f1 / f0) : 0.0;
          double mg = c->mag_db[k] + t * (c->mag_db[k + 1] - c->mag_db[k]);
          double ph = c->phase_deg[k] + t * (c->phase_deg[k + 1] - c->phase_deg[k]);
          if (!isfinite (mg) || !isfinite (ph))
            continue;
          if (!(mg >= mag_lo[j]))
            mag_lo[j] = mg;
          if (!(mg <= mag_hi[j]))
            mag_hi[j] = mg;
          if (!(ph >= ph_lo[j]))
            ph_lo[j] = ph;
          if (!(ph <= ph_hi[j]))
            ph_hi[j] = ph;
        }
    }
}

/* One band: the grid over the members' frequencies, then the envelope. */
static void
fill_band (LwPlotBand *b, const LwPlotFreqCurve *curves, size_t n, size_t m, double *data)
{
  double lo = INFINITY, hi = 0.0;
  for (size_t i = 0; i < n; i++)
    for (size_t k = 0; k < curves[i].n; k++)
      {
        double f = curves[i].freq_rad_s[k];
        if (f > 0.0 && isfinite (f))
          {
            lo = fmin (lo, f);
            hi = fmax (hi, f);
          }
      }
  *b = (LwPlotBand) { 0 };
  if (!(hi > lo))
    return;
  double *g = data, *mlo = data + m, *mhi = data + 2 * m, *plo = data + 3 * m,
         *phi = data + 4 * m;
  for (size_t j = 0; j < m; j++)
    g[j] = j + 1 == m ? hi : lo * pow (hi / lo, (double) j / (double) (m - 1));
  band_of (curves, n, g, m, mlo, mhi, plo, phi);
  *b = (LwPlotBand) { .n = m, .freq_rad_s = g, .mag_lo_db = mlo, .mag_hi_db = mhi,
                      .phase_lo_deg = plo, .phase_hi_deg = phi };
}

void
lw_figure_family_fill_lines (LwFigureFamily *ff, size_t n_members, size_t n,
                             LwSampledPlant *const *plants, LwEvaluation *const *evs,
                             size_t n_lines, size_t worst_pm, double worst_pm_deg,
                             size_t n_grid)
{
  /* the members drawn as lines: the first n_lines, and the worst one when it is not */
  size_t nl = MIN (n_lines, n);
  LwSampledPlant **lp = g_new0 (LwSampledPlant *, nl + 2);
  LwEvaluation **le = g_new0 (LwEvaluation *, nl + 2);
  for (size_t i = 0; i < nl; i++)
    lp[i] = plants[i], le[i] = evs[i];
  size_t w = worst_pm < n ? worst_pm : SIZE_MAX;
  if (w != SIZE_MAX && w >= nl)
    {
      lp[nl] = plants[w], le[nl] = evs[w];
      w = nl++;
    }
  lw_figure_family_fill (ff, n_members, nl, lp, le, w, worst_pm_deg);
  g_free (lp);
  g_free (le);

  /* the band over every member, from their loops on the evaluation grid: in z as evaluated,
   * in w at ν = (2/T)·tan(ωT/2) (the same values: L on the w-plane's axis is L(e^{jωT})),
   * below π/T only */
  size_t m = MAX (n_grid, 2);
  LwPlotFreqCurve *cz = g_new0 (LwPlotFreqCurve, n + 1), *cw = g_new0 (LwPlotFreqCurve, n + 1);
  for (size_t i = 0; i < n; i++)
    {
      const LwEvaluation *ev = evs[i];
      if (ev == NULL || ev->n_points < 2)
        continue;
      cz[i] = (LwPlotFreqCurve) { .n = ev->n_points, .freq_rad_s = ev->omega_rad_s,
                                  .mag_db = ev->loop_mag_db, .phase_deg = ev->loop_phase_deg };
      double t = ev->period_s, *nu = g_new (double, ev->n_points);
      size_t k = 0;
      while (k < ev->n_points && ev->omega_rad_s[k] * t < 0.999 * G_PI)
        {
          nu[k] = 2.0 / t * tan (0.5 * ev->omega_rad_s[k] * t);
          k++;
        }
      cw[i] = (LwPlotFreqCurve) { .n = k, .freq_rad_s = nu, .mag_db = ev->loop_mag_db,
                                  .phase_deg = ev->loop_phase_deg };
    }
  ff->band_data = g_new (double, 10 * m);
  fill_band (&ff->band_z, cz, n, m, ff->band_data);
  fill_band (&ff->band_w, cw, n, m, ff->band_data + 5 * m);
  ff->f.band_z = ff->band_z.n > 0 ? &ff->band_z : NULL;
  ff->f.band_w = ff->band_w.n > 0 ? &ff->band_w : NULL;
  for (size_t i = 0; i < n; i++)
    g_free ((double *) cw[i].freq_rad_s);
  g_free (cz);
  g_free (cw);
}

void
lw_figure_family_clear (LwFigureFamily *ff)
{
  if (ff == NULL)
    return;
  for (size_t i = 0; i < ff->n_filled; i++)
    lw_figure_variant_clear (&ff->members[i]);
  g_free (ff->band_data);
  g_free (ff->members);
  g_free (ff->z);
  g_free (ff->w);
  g_free (ff->nyquist);
  g_free (ff->step);
  g_free (ff->poles);
  memset (ff, 0, sizeof *ff);
}
