/* lw-plot-view-nichols.c — the Nichols chart: |L| in dB over ∠L, critical points, margin gauges.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-private.h"

#include <stdio.h>

void
lwp_build_nichols (LwPlot *pl, const LwPlotInput *in)
{
  Panel *pn = &pl->panels[0];
  pl->n_panels = 1;
  Extent ex = { 0 }, ey = { 0 };
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotFreqCurve *c = &in->variants[v].z;
      for (size_t i = 0; i < c->n; i++)
        {
          lwp_extent_add (&ex, c->phase_deg[i]);
          lwp_extent_add (&ey, c->mag_db[i]);
        }
    }
  lwp_extent_add (&ex, -180.0);
  lwp_extent_add (&ey, 10.0);
  lwp_extent_add (&ey, -10.0);
  if (ey.lo < ey.hi - MAG_DEPTH_DB)
    ey.lo = ey.hi - MAG_DEPTH_DB;
  lwp_axis_from_extent (&pn->x, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_DEGREES, ex, 7);
  lwp_axis_from_extent (&pn->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ey, 7);
  lwp_keep_axes (pl, in);
  pn->x_label = "\u2220L (\u00b0)";
  pn->y_label = "|L| (dB)";
  pn->x_name = "\u2220L";
  pn->x_unit = "\u00b0";
  pn->y_name = "|L|";
  pn->y_unit = "dB";

  lwp_add_hline (pn, 0.0)->width = 1.2;
  lwp_add_phase_references (pn, &pn->x, true);
  if (in->req.has_min_phase_margin)
    for (int k = -8; k <= 8; k++)
      {
        double ref = 180.0 + 360.0 * k, lim = ref + in->req.min_phase_margin_deg;
        if (ref < pn->x.lo || ref > pn->x.hi)
          continue;
        Prim *l = lwp_add_vline (pn, lim);
        l->dash = DASH_DOTTED;
        char buf[64];
        snprintf (buf, sizeof buf, "required PM \u2265 %.0f\u00b0", in->req.min_phase_margin_deg);
        lwp_add_text_uv (pn, mx (pn, lim), 1.0, buf, 4, 3, 0.0, 0.0)->colour = COL_REF;
      }
  /* a plant family's members, under every variant's curves (the worst member last) */
  size_t fv = lwp_family_key (pl, in);
  const LwPlotFamily *fam = fv != SIZE_MAX ? in->variants[fv].family : NULL;
  for (size_t i = 0; fam != NULL && fam->z != NULL && i < fam->n; i++)
    if (i != fam->worst_pm)
      lwp_family_line (pn, fv, fam->z[i].n, fam->z[i].phase_deg, fam->z[i].mag_db, false);
  if (fam != NULL && fam->z != NULL && fam->worst_pm < fam->n)
    {
      const LwPlotFreqCurve *c = &fam->z[fam->worst_pm];
      lwp_family_line (pn, fv, c->n, c->phase_deg, c->mag_db, true);
    }
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotFreqCurve *c = &in->variants[v].z;
      Prim *l = lwp_add_curve (pl, pn, v, c->n, c->phase_deg, c->mag_db);
      bool *pm_label, *gm_label;
      lwp_choose_margin_labels (c, &pm_label, &gm_label);
      lwp_style_variant (l, v, LW_PLOT_CURVE_WIDTH);
      l->dash = DASH_VARIANT;
      for (size_t i = 0; i < c->n_gain_crossovers; i++)
        {
          const LwPlotCrossover *x = &c->gain_crossovers[i];
          lwp_style_variant (lwp_add_segment (pn, x->phase_deg - x->margin, 0.0, x->phase_deg,
                                             0.0),
                             v, GAUGE_WIDTH)->arrows = true;
          lwp_style_variant (lwp_add_mark (pn, x->phase_deg, 0.0, MARK_DISC, 5), v, 1.0);
          if (pm_label[i])
            {
              char buf[48];
              lwp_format_margin (buf, sizeof buf, "PM", x->margin, "\u00b0");
              lwp_margin_label (pn, x->phase_deg - 0.5 * x->margin, 0.0, buf, 0, -6,
                                  0.5, 1.0, v);
            }
        }
      for (size_t i = 0; i < c->n_phase_crossovers; i++)
        {
          const LwPlotCrossover *x = &c->phase_crossovers[i];
          lwp_style_variant (lwp_add_segment (pn, x->phase_deg, x->mag_db, x->phase_deg, 0.0), v,
                         GAUGE_WIDTH)->arrows = true;
          lwp_style_variant (lwp_add_mark (pn, x->phase_deg, x->mag_db, MARK_DIAMOND, 7), v, 1.3);
          if (gm_label[i])
            {
              char buf[48];
              lwp_format_margin (buf, sizeof buf, "GM", x->margin, " dB");
              lwp_margin_label (pn, x->phase_deg, 0.5 * x->mag_db, buf, 6, 0, 0.0, 0.5, v);
            }
        }
      g_free (pm_label);
      g_free (gm_label);
    }
  for (int k = -8; k <= 8; k++)
    {
      double ref = 180.0 + 360.0 * k;
      if (ref < pn->x.lo || ref > pn->x.hi)
        continue;
      Prim *cp = lwp_add_mark (pn, ref, 0.0, MARK_PLUS, 11);
      cp->colour = COL_TEXT;
      cp->width = 2.0;
    }
}
