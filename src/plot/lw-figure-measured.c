/* lw-figure-measured.c — a loop on measured data as a figure variant (lw-figure-measured.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-figure-measured.h"

#include <complex.h>
#include <math.h>
#include <string.h>

#include <glib.h>

#include "lw-analysis.h"
#include "lw-plot-view.h"

void
lw_figure_measured_clear (LwFigureMeasured *f)
{
  g_free (f->mag_db);
  g_free (f->phase_deg);
  g_free (f->nu);
  g_free (f->re);
  g_free (f->im);
  g_free (f->cross);
  g_free (f->cross_w);
  g_free (f->name);
  g_free (f->legend);
  memset (f, 0, sizeof *f);
}

/* L at a crossing, interpolated as the margins were (ln|L| and the unwrapped phase linear in
 * ln ω between the points bracketing it) */
static LwPlotCrossover
crossing_point (const LwFigureMeasured *f, const double *omega, size_t n,
                const LwMeasuredCrossing *c)
{
  size_t i = 0;
  while (i + 2 < n && omega[i + 1] < c->omega_rad_s)
    i++;
  double t = log (c->omega_rad_s / omega[i]) / log (omega[i + 1] / omega[i]);
  double db = f->mag_db[i] + t * (f->mag_db[i + 1] - f->mag_db[i]);
  double ph = f->phase_deg[i] + t * (f->phase_deg[i + 1] - f->phase_deg[i]);
  double r = pow (10.0, db / 20.0), a = ph * G_PI / 180.0;
  return (LwPlotCrossover) { c->omega_rad_s, c->margin, db, ph, r * cos (a), r * sin (a) };
}

void
lw_figure_measured_fill (LwFigureMeasured *f, const LwMeasuredLoop *ml, LwMeasuredKind kind,
                         const double *coherence, double period_s)
{
  memset (f, 0, sizeof *f);
  size_t n = ml->n;
  f->mag_db = g_new (double, n);
  f->phase_deg = g_new (double, n);
  f->nu = g_new (double, n);
  f->re = g_new (double, n);
  f->im = g_new (double, n);
  for (size_t i = 0; i < n; i++)
    {
      double a = carg (ml->l[i]) * 180.0 / G_PI;
      f->mag_db[i] = 20.0 * log10 (cabs (ml->l[i]));
      /* unwrapped along the points as the margins are; the start in (−360°, 0] */
      f->phase_deg[i] = i == 0 ? a - 360.0 * ceil (a / 360.0)
                               : f->phase_deg[i - 1]
                                 + remainder (a - f->phase_deg[i - 1], 360.0);
      f->nu[i] = lw_warp_omega_to_nu (ml->omega_rad_s[i], period_s);
      f->re[i] = creal (ml->l[i]);
      f->im[i] = cimag (ml->l[i]);
    }
  const LwMeasuredMargins *mm = &ml->margins;
  size_t ng = mm->n_gain, np = mm->n_phase;
  f->cross = g_new (LwPlotCrossover, ng + np + 1);
  f->cross_w = g_new (LwPlotCrossover, ng + np + 1);
  for (size_t i = 0; i < ng + np; i++)
    {
      f->cross[i] = crossing_point (f, ml->omega_rad_s, n,
                                    i < ng ? &mm->gain[i] : &mm->phase[i - ng]);
      f->cross_w[i] = f->cross[i];
      f->cross_w[i].freq_rad_s = lw_warp_omega_to_nu (f->cross[i].freq_rad_s, period_s);
    }
  const char *kind_name = kind == LW_MEASURED_SAMPLED ? "sampled" : "continuous";
  f->name = g_strdup_printf ("measured (%s%s)", kind_name,
                             coherence != NULL ? "; faded: coherence < 0.8" : "");
  f->legend = g_strdup_printf ("measured (%s)", kind_name);
  LwPlotVariant *v = &f->variant;
  v->name = f->name;
  v->z = (LwPlotFreqCurve) { .n = n, .freq_rad_s = ml->omega_rad_s, .mag_db = f->mag_db,
                             .phase_deg = f->phase_deg, .n_gain_crossovers = ng,
                             .gain_crossovers = f->cross, .n_phase_crossovers = np,
                             .phase_crossovers = f->cross + ng, .confidence = coherence };
  v->w = v->z;
  v->w.freq_rad_s = f->nu;
  v->w.gain_crossovers = f->cross_w;
  v->w.phase_crossovers = f->cross_w + ng;
  while (v->w.n > 0 && !isfinite (f->nu[v->w.n - 1]))   /* a point at π/T: ν = ∞ */
    v->w.n--;
  v->nyquist = (LwPlotComplexCurve) { .n = n, .re = f->re, .im = f->im };
}

unsigned
lw_figure_measured_style (const LwPlotVariant *vars, size_t n)
{
  unsigned style = 1;
  for (bool taken = true; taken && style < LW_PLOT_MAX_VARIANTS; )
    {
      taken = false;
      for (size_t i = 0; i < n; i++)
        if (vars[i].style == style || (vars[i].style == 0 && i + 1 == style))
          {
            taken = true;
            style++;
            break;
          }
    }
  return style;
}

bool
lw_figure_measured_view_ok (int view)
{
  const LwPlotViewInfo *info = lw_plot_view_info ((LwPlotView) view);
  return info != NULL
         && (info->needs & ~(unsigned) (LW_PLOT_NEEDS_Z | LW_PLOT_NEEDS_W | LW_PLOT_NEEDS_NYQUIST
                                        | LW_PLOT_NEEDS_NYQUIST_RATE)) == 0;
}
