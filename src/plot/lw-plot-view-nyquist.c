/* lw-plot-view-nyquist.c — the Nyquist diagram: L over ω and its mirror, the unit circle, the
 * critical point −1, phase margin arcs.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-private.h"

#include <math.h>
#include <stdio.h>

/* How far the compressed view reaches: |L| up to 10^NYQ_DECADES (radius 1 + NYQ_DECADES). */
#define NYQ_DECADES 3.0

/* The compressed radial scale (LwPlotInput.nyquist_compressed): radius r ≤ 1 as it is,
 * beyond it 1 + log10 r, the angle kept. */
static void
compress (double re, double im, double *cre, double *cim)
{
  double r = hypot (re, im);
  if (!(r > 1.0) || !isfinite (r))
    {
      *cre = re;
      *cim = im;
      return;
    }
  double k = (1.0 + log10 (r)) / r;
  *cre = re * k;
  *cim = im * k;
}

/* One member's curve of a plant family (on the compressed scale when cz). */
static void
family_member (Panel *pn, size_t v, const LwPlotComplexCurve *c, bool cz, bool worst)
{
  double *re = g_new (double, c->n > 0 ? c->n : 1), *im = g_new (double, c->n > 0 ? c->n : 1);
  for (size_t j = 0; j < c->n; j++)
    {
      re[j] = c->re[j];
      im[j] = c->im[j];
      if (cz)
        compress (c->re[j], c->im[j], &re[j], &im[j]);
    }
  lwp_family_line (pn, v, c->n, re, im, worst);
  g_free (re);
  g_free (im);
}

void
lwp_build_nyquist (LwPlot *pl, const LwPlotInput *in)
{
  bool cz = in->nyquist_compressed;
  Panel *pn = &pl->panels[0];
  pl->n_panels = 1;
  pn->equal_aspect = true;
  Extent ex = { 0 }, ey = { 0 };
  lwp_extent_add (&ex, -1.5);
  lwp_extent_add (&ex, 1.0);
  lwp_extent_add (&ey, -1.2);
  lwp_extent_add (&ey, 1.2);
  /* the data's extents choose the axes, unless those of axes_of are kept (lwp_keep_axes) */
  size_t n_extent = lwp_axes_kept (pl, in) ? 0 : in->n_variants;
  for (size_t v = 0; v < n_extent; v++)
    {
      const LwPlotComplexCurve *c = &in->variants[v].nyquist;
      for (size_t i = 0; i < c->n; i++)
        {
          double re = c->re[i], im = c->im[i];
          if (cz)
            compress (c->re[i], c->im[i], &re, &im);
          if (hypot (re, im) <= (cz ? 1.0 + NYQ_DECADES : NYQUIST_RANGE_CAP))
            {
              lwp_extent_add (&ex, re);
              lwp_extent_add (&ey, im);
              lwp_extent_add (&ey, -im);
            }
        }
    }
  lwp_widen_to_aspect (&ex, &ey);
  lwp_axis_from_extent (&pn->x, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ex, 6);
  lwp_axis_from_extent (&pn->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ey, 6);
  lwp_keep_axes (pl, in);
  pn->x_label = cz ? "Re L (compressed beyond |L| = 1)" : "Re L";
  pn->y_label = cz ? "Im L (compressed)" : "Im L";
  pn->x_name = "Re";
  pn->y_name = "Im";
  pn->x_unit = pn->y_unit = "";

  lwp_add_hline (pn, 0.0);
  lwp_add_vline (pn, 0.0);
  Prim *uc = lwp_prim_add (pn, PRIM_CIRCLE, 1);
  uc->u[0] = mx (pn, 0.0);
  uc->v[0] = my (pn, 0.0);
  uc->r_units = 1.0;
  uc->dash = DASH_DASHED;
  uc->width = 1.2;
  lwp_add_text (pn, 0.7071, 0.7071, "|L| = 1", 4, -2, 0.0, 1.0)->colour = COL_REF;
  /* compressed: the circles |L| = 10, 100, … where they fall */
  for (int d = 1; cz && d <= (int) NYQ_DECADES; d++)
    {
      Prim *c = lwp_prim_add (pn, PRIM_CIRCLE, 1);
      c->u[0] = mx (pn, 0.0);
      c->v[0] = my (pn, 0.0);
      c->r_units = 1.0 + d;
      c->dash = DASH_DOTTED;
      c->width = 0.8;
      c->colour = COL_REF;
      char buf[32];
      snprintf (buf, sizeof buf, "|L| = %g", pow (10.0, d));
      Prim *t = lwp_add_text (pn, 0.7071 * (1.0 + d), 0.7071 * (1.0 + d), buf, 4, -2, 0.0, 1.0);
      t->colour = COL_REF;
      t->optional = true;
    }

  /* a plant family's members (positive ω only), under every variant's curves, the worst
   * member last */
  size_t fv = lwp_family_key (pl, in);
  const LwPlotFamily *fam = fv != SIZE_MAX ? in->variants[fv].family : NULL;
  for (size_t i = 0; fam != NULL && fam->nyquist != NULL && i < fam->n; i++)
    if (i != fam->worst_pm)
      family_member (pn, fv, &fam->nyquist[i], cz, false);
  if (fam != NULL && fam->nyquist != NULL && fam->worst_pm < fam->n)
    family_member (pn, fv, &fam->nyquist[fam->worst_pm], cz, true);

  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotComplexCurve *c = &in->variants[v].nyquist;
      /* compressed: copies of the points on the compressed scale (a tag of their own, so a
       * figure reuses only a compressed curve) */
      double *cre = NULL, *cim = NULL;
      if (cz)
        {
          cre = g_new (double, c->n > 0 ? c->n : 1);
          cim = g_new (double, c->n > 0 ? c->n : 1);
          for (size_t i = 0; i < c->n; i++)
            compress (c->re[i], c->im[i], &cre[i], &cim[i]);
        }
      const double *xr = cz ? cre : c->re, *xi = cz ? cim : c->im;
      int tag = cz ? 3 : 1;
      Prim *m = lwp_curve_reuse (pl, pn, v, c->re, c->im, tag, c->n);
      if (m == NULL)
        {
          double *mirror = g_new (double, c->n > 0 ? c->n : 1);
          for (size_t i = 0; i < c->n; i++)
            mirror[i] = -xi[i];
          m = lwp_curve_mark (pl, lwp_add_line (pn, c->n, xr, mirror), v, c->re, c->im, tag);
          g_free (mirror);
        }
      lwp_style_variant (m, v, THIN_WIDTH);
      m->alpha = 0.45;
      m->dash = DASH_VARIANT;
      Prim *l = lwp_curve_reuse (pl, pn, v, c->re, c->im, cz ? 4 : 0, c->n);
      if (l == NULL)
        l = lwp_curve_mark (pl, lwp_add_line (pn, c->n, xr, xi), v, c->re, c->im, cz ? 4 : 0);
      g_free (cre);
      g_free (cim);
      lwp_style_variant (l, v, LW_PLOT_CURVE_WIDTH);
      l->dash = DASH_VARIANT;

      const LwPlotFreqCurve *z = &in->variants[v].z;
      bool *pm_label, *gm_label;
      lwp_choose_margin_labels (z, &pm_label, &gm_label);
      for (size_t i = 0; i < z->n_gain_crossovers; i++)
        {
          const LwPlotCrossover *x = &z->gain_crossovers[i];
          /* angle of the crossover point, in (−180°, 180°]; the arc turns by −PM to −1 */
          double a0 = fmod (x->phase_deg, 360.0);
          if (a0 > 180.0)
            a0 -= 360.0;
          if (a0 <= -180.0)
            a0 += 360.0;
          Prim *arc = lwp_prim_add (pn, PRIM_ARC, 1);
          arc->u[0] = mx (pn, 0.0);
          arc->v[0] = my (pn, 0.0);
          arc->r_units = 1.0;
          arc->a0 = a0;
          arc->a1 = a0 - x->margin;
          lwp_style_variant (arc, v, GAUGE_WIDTH);
          arc->arrows = true;
          double gre, gim;
          compress (x->re, x->im, &gre, &gim);   /* on the unit circle: unchanged */
          lwp_style_variant (lwp_add_mark (pn, gre, gim, MARK_DISC, 5), v, 1.0);
          if (pm_label[i])
            {
              char buf[48];
              lwp_format_margin (buf, sizeof buf, "PM", x->margin, "\u00b0");
              double am = (a0 - 0.5 * x->margin) * G_PI / 180.0;
              lwp_margin_label (pn, 1.12 * cos (am), 1.12 * sin (am), buf, 0, 0,
                                  cos (am) < 0 ? 1.0 : 0.0, 0.5, v);
            }
        }
      for (size_t i = 0; i < z->n_phase_crossovers; i++)
        {
          const LwPlotCrossover *x = &z->phase_crossovers[i];
          double pre = x->re, pim = x->im;
          if (cz)
            compress (x->re, x->im, &pre, &pim);
          lwp_style_variant (lwp_add_mark (pn, pre, pim, MARK_DIAMOND, 7), v, 1.3);
          if (gm_label[i])
            {
              char buf[48];
              lwp_format_margin (buf, sizeof buf, "GM", x->margin, " dB");
              lwp_margin_label (pn, pre, pim, buf, 0, 8, 0.5, 0.0, v);
            }
        }
      g_free (pm_label);
      g_free (gm_label);
    }
  Prim *cp = lwp_add_mark (pn, -1.0, 0.0, MARK_PLUS, 11);
  cp->colour = COL_TEXT;
  cp->width = 2.0;
  lwp_add_text (pn, -1.0, 0.0, "\u22121", -4, 4, 1.0, 0.0);
}
