/* lw-plot-view-sensitivity.c — the sensitivity functions over ω up to π/T: |S| = 1/|1 + L|
 * (how much of a disturbance at the output remains, and the robustness peak Ms) and
 * |T| = |L/(1 + L)| (the closed loop from reference to output), both in dB from the loop's
 * z-plane curve, with the peak of |S| marked and the requirement's bound on it.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-private.h"

#include <complex.h>
#include <math.h>
#include <stdio.h>

#include <glib.h>

/* |S| and |T| in dB at the curve's points from |L| (dB) and ∠L (°). */
static void
sensitivities (const LwPlotFreqCurve *c, double *s_db, double *t_db)
{
  for (size_t i = 0; i < c->n; i++)
    {
      double complex l = pow (10.0, c->mag_db[i] / 20.0)
                         * cexp (I * c->phase_deg[i] * (G_PI / 180.0));
      double complex d = 1.0 + l;
      s_db[i] = -20.0 * log10 (cabs (d));
      t_db[i] = 20.0 * log10 (cabs (l)) - 20.0 * log10 (cabs (d));
    }
}

void
lwp_build_sensitivity (LwPlot *pl, const LwPlotInput *in)
{
  Panel *pn = &pl->panels[0];
  pl->n_panels = 1;
  double *s_db[LW_PLOT_MAX_VARIANTS] = { NULL }, *t_db[LW_PLOT_MAX_VARIANTS] = { NULL };
  Extent ex = { 0 }, ey = { 0 };
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotFreqCurve *c = &in->variants[v].z;
      s_db[v] = g_new (double, c->n + 1);
      t_db[v] = g_new (double, c->n + 1);
      sensitivities (c, s_db[v], t_db[v]);
      for (size_t i = 0; i < c->n; i++)
        {
          if (c->freq_rad_s[i] > 0.0)
            lwp_extent_add (&ex, c->freq_rad_s[i]);
          lwp_extent_add (&ey, s_db[v][i]);
          lwp_extent_add (&ey, t_db[v][i]);
        }
    }
  /* 0 dB and a little room around the peaks; at most MAG_DEPTH_DB below the top */
  lwp_extent_add (&ey, 10.0);
  lwp_extent_add (&ey, -20.0);
  if (ey.hi > 40.0)
    ey.hi = 40.0;   /* a loop near instability: the peak runs off, its value is labelled */
  /* the region that tells (near 0 dB and the peaks) at a readable scale: down to −60 dB
   * (common practice, no source); the curves continue below the frame */
  if (ey.lo < -60.0)
    ey.lo = -60.0;
  lwp_axis_from_extent (&pn->x, LW_PLOT_SCALE_LOG, LW_PLOT_TICKS_PLAIN, ex, 6);
  if (in->nyquist_rad_s > pn->x.lo)
    pn->x.hi = in->nyquist_rad_s;
  lwp_axis_from_extent (&pn->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ey, 6);
  lwp_keep_axes (pl, in);
  pn->x_label = "\u03c9 (rad/s)";
  pn->y_label = "|S|, |T| (dB)";
  pn->x_name = "\u03c9";
  pn->x_unit = "rad/s";
  pn->y_name = "|S|, |T|";
  pn->y_unit = "dB";

  lwp_add_hline (pn, 0.0)->width = 1.2;
  if (in->req.has_max_sensitivity && in->req.max_sensitivity > 0.0)
    {
      double bound = 20.0 * log10 (in->req.max_sensitivity);
      Prim *l = lwp_add_hline (pn, bound);
      l->dash = DASH_DOTTED;
      char buf[64];
      snprintf (buf, sizeof buf, "required |S| \u2264 %.3g (%.1f dB)", in->req.max_sensitivity,
                bound);
      lwp_add_text_uv (pn, 0.0, my (pn, bound), buf, 4, -2, 0.0, 1.0)->colour = COL_REF;
    }
  /* a plant family's members' |S|, under every variant's curves (the worst member last) */
  size_t fv = lwp_family_key (pl, in);
  const LwPlotFamily *fam = fv != SIZE_MAX ? in->variants[fv].family : NULL;
  for (size_t i = 0; fam != NULL && fam->z != NULL && i <= fam->n; i++)
    {
      size_t m = i < fam->n ? i : fam->worst_pm;
      const LwPlotFreqCurve *c = m < fam->n ? &fam->z[m] : NULL;
      if (c == NULL || c->n < 2 || (i < fam->n && i == fam->worst_pm))
        continue;
      double *s = g_new (double, c->n), *t = g_new (double, c->n);
      sensitivities (c, s, t);
      lwp_family_line (pn, fv, c->n, c->freq_rad_s, s, i == fam->n);
      g_free (s);
      g_free (t);
    }
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotFreqCurve *c = &in->variants[v].z;
      if (c->n < 2)
        continue;
      /* derived arrays: mapped without the reuse key (they live only while building) */
      Prim *ps = lwp_add_line (pn, c->n, c->freq_rad_s, s_db[v]);
      lwp_style_variant (ps, v, LW_PLOT_CURVE_WIDTH);
      ps->dash = DASH_VARIANT;
      Prim *pt = lwp_add_line (pn, c->n, c->freq_rad_s, t_db[v]);
      lwp_style_variant (pt, v, THIN_WIDTH);
      pt->dash = DASH_DASHED;
      /* the peak of |S| (Ms) */
      size_t k = 0;
      for (size_t i = 1; i < c->n; i++)
        if (s_db[v][i] > s_db[v][k])
          k = i;
      double peak = s_db[v][k];
      lwp_style_variant (lwp_add_mark (pn, c->freq_rad_s[k], fmin (peak, pn->y.hi), MARK_DISC, 5),
                         v, 1.0);
      char buf[64];
      snprintf (buf, sizeof buf, "Ms %.3g (%.1f dB)", pow (10.0, peak / 20.0), peak);
      lwp_margin_label (pn, c->freq_rad_s[k], fmin (peak, pn->y.hi), buf, 0, -6, 0.5, 1.0, v);
      if (v == 0)
        {
          /* which curve is which, at the right end of the first variant's */
          lwp_add_text_uv (pn, 1.0, my (pn, fmax (pn->y.lo, fmin (pn->y.hi, s_db[v][c->n - 1]))),
                           "|S|", -4, -2, 1.0, 1.0)->colour = COL_TEXT;
          lwp_add_text_uv (pn, mx (pn, c->freq_rad_s[0]),
                           my (pn, fmax (pn->y.lo, fmin (pn->y.hi, t_db[v][0]))), "|T|", 4, -2,
                           0.0, 1.0)->colour = COL_TEXT;
        }
    }
  for (size_t v = 0; v < in->n_variants; v++)
    {
      g_free (s_db[v]);
      g_free (t_db[v]);
    }
}
