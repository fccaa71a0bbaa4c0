/* lw-plot-view-bode.c — the Bode views: |L| and ∠L over ω in z (up to π/T) or over ν in the
 * w-plane, with margin gauges and requirement marks.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-private.h"

#include <math.h>
#include <stdio.h>

/* The largest 1, 2 or 5 × 10^k not above v > 0: where a frequency axis starts. */
static double
floor_125 (double v)
{
  double d = pow (10.0, floor (log10 (v) + 1e-12));
  static const double m[] = { 5, 2, 1 };
  for (int i = 0; i < 3; i++)
    if (m[i] * d <= v * (1.0 + 1e-12))
      return m[i] * d;
  return d;
}

/* Where the phase branch the eye needs ends: PHASE_BRANCH_SPAN above the highest gain
 * crossover of any variant; +∞ (the whole curve) when there is none. */
static double
branch_end (const LwPlotInput *in, bool w_plane)
{
  double top = 0.0;
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotFreqCurve *c = w_plane ? &in->variants[v].w : &in->variants[v].z;
      for (size_t i = 0; i < c->n_gain_crossovers; i++)
        top = fmax (top, c->gain_crossovers[i].freq_rad_s);
    }
  return top > 0.0 ? PHASE_BRANCH_SPAN * top : INFINITY;
}

/* The −180° + k·360° levels the phase margins are measured from (one per branch holding a
 * gain crossover of some variant), at most n of them, distinct; −180° when no variant
 * crosses 0 dB. Returns how many. */
static size_t
margin_branches (const LwPlotInput *in, bool w_plane, double *refs, size_t n)
{
  size_t k = 0;
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotFreqCurve *c = w_plane ? &in->variants[v].w : &in->variants[v].z;
      for (size_t i = 0; i < c->n_gain_crossovers; i++)
        {
          const LwPlotCrossover *x = &c->gain_crossovers[i];
          double ref = 180.0 + 360.0 * round ((x->phase_deg - x->margin - 180.0) / 360.0);
          bool seen = false;
          for (size_t j = 0; j < k; j++)
            seen = seen || refs[j] == ref;
          if (!seen && k < n && isfinite (ref))
            refs[k++] = ref;
        }
    }
  if (k == 0 && n > 0)
    refs[k++] = -180.0;
  return k;
}

/* A phase wrapped into (−360°, 0°] (LwPlotInput.phase_wrapped). */
static double
wrap_deg (double p)
{
  return p - 360.0 * ceil (p / 360.0);
}

/* The phase curve wrapped into one turn: a new array of *n_out ≤ 2n points (frequency and
 * phase), NAN inserted where consecutive points wrap (a jump of more than 180°). */
/* The stretches of curve c (values y) whose points are trusted (confidence at or above
 * LW_PLOT_LOW_CONFIDENCE), as a line of its own broken where they are not */
static void
trusted_over (LwPlot *pl, Panel *pn, size_t v, const LwPlotFreqCurve *c, const double *y)
{
  double *ty = g_new (double, c->n);
  for (size_t i = 0; i < c->n; i++)
    ty[i] = c->confidence[i] >= LW_PLOT_LOW_CONFIDENCE ? y[i] : NAN;
  Prim *p = lwp_add_line (pn, c->n, c->freq_rad_s, ty);
  g_free (ty);
  lwp_style_variant (p, v, LW_PLOT_CURVE_WIDTH);
  p->dash = DASH_VARIANT;
  (void) pl;
}

static void
wrap_curve (const LwPlotFreqCurve *c, double **f_out, double **p_out, size_t *n_out)
{
  double *f = g_new (double, 2 * c->n + 1), *p = g_new (double, 2 * c->n + 1);
  size_t k = 0;
  for (size_t i = 0; i < c->n; i++)
    {
      double w = wrap_deg (c->phase_deg[i]);
      if (k > 0 && isfinite (p[k - 1]) && fabs (w - p[k - 1]) > 180.0)
        {
          f[k] = c->freq_rad_s[i];
          p[k++] = NAN;
        }
      f[k] = c->freq_rad_s[i];
      p[k++] = w;
    }
  *f_out = f;
  *p_out = p;
  *n_out = k;
}

static void
build_bode (LwPlot *pl, const LwPlotInput *in, bool w_plane)
{
  const bool wrapped = in->phase_wrapped;
#define PH(deg) (wrapped ? wrap_deg (deg) : (deg))
  Panel *mag = &pl->panels[0], *ph = &pl->panels[1];
  pl->n_panels = 2;
  Extent ex = { 0 }, em = { 0 }, ep = { 0 }, ep_all = { 0 };
  double f_end = in->phase_full_range ? INFINITY : branch_end (in, w_plane);
  double refs[16];
  size_t n_refs = margin_branches (in, w_plane, refs, G_N_ELEMENTS (refs));
  /* the data's extents choose the axes, unless those of axes_of are kept (lwp_keep_axes) */
  size_t n_extent = lwp_axes_kept (pl, in) ? 0 : in->n_variants;
  for (size_t v = 0; v < n_extent; v++)
    {
      const LwPlotFreqCurve *c = w_plane ? &in->variants[v].w : &in->variants[v].z;
      for (size_t i = 0; i < c->n; i++)
        if (c->freq_rad_s[i] > 0.0)
          lwp_extent_add (&ex, c->freq_rad_s[i]);
    }
  for (size_t v = 0; v < n_extent; v++)
    {
      const LwPlotFreqCurve *c = w_plane ? &in->variants[v].w : &in->variants[v].z;
      for (size_t i = 0; i < c->n; i++)
        {
          lwp_extent_add (&em, c->mag_db[i]);
          lwp_extent_add (&ep_all, c->phase_deg[i]);
          if (c->freq_rad_s[i] <= f_end)
            lwp_extent_add (&ep, c->phase_deg[i]);
        }
    }
  /* the magnitude axis keeps 0 dB in view and at most MAG_DEPTH_DB below the top */
  lwp_extent_add (&em, 10.0);
  lwp_extent_add (&em, -10.0);
  if (em.lo < em.hi - MAG_DEPTH_DB)
    em.lo = em.hi - MAG_DEPTH_DB;
  /* the phase axis: the branch from the low end to a decade past the last gain crossover,
   * with the levels the margins are measured from; the whole curve when it goes little
   * further (less than 90° more) */
  for (size_t k = 0; k < n_refs; k++)
    lwp_extent_add (&ep, refs[k]);
  if (ep_all.any && ep.any && ep_all.lo >= ep.lo - 90.0 && ep_all.hi <= ep.hi + 90.0)
    ep = ep_all;
  bool phase_cut = ep_all.any && ep.any && (ep_all.lo < ep.lo || ep_all.hi > ep.hi);
  if (wrapped)
    {
      /* one turn: the axis is (−360°, 0°], the margins measured from −180° */
      ep = (Extent) { .lo = -360.0, .hi = 0.0, .any = true };
      phase_cut = false;
      n_refs = 1;
      refs[0] = -180.0;
    }

  lwp_axis_from_extent (&mag->x, LW_PLOT_SCALE_LOG, LW_PLOT_TICKS_PLAIN, ex, 6);
  if (ex.any && ex.lo > 0.0)
    mag->x.lo = floor_125 (ex.lo);   /* start at the data, on a 1-2-5 value */
  if (!w_plane && in->nyquist_rad_s > mag->x.lo)
    mag->x.hi = in->nyquist_rad_s;   /* the z-plane axis ends at π/T exactly */
  lwp_axis_from_extent (&mag->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, em, 6);
  ph->x = mag->x;
  lwp_axis_from_extent (&ph->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_DEGREES, ep, 6);
  if (wrapped)
    {
      ph->y.lo = -360.0;
      ph->y.hi = 0.0;
    }
  lwp_keep_axes (pl, in);

  const char *fname = w_plane ? "\u03bd" : "\u03c9";
  mag->x_tick_labels = false;
  mag->x_name = ph->x_name = fname;
  mag->x_unit = ph->x_unit = "rad/s";
  ph->x_label = w_plane ? "\u03bd (rad/s), w-plane" : "\u03c9 (rad/s)";
  mag->y_label = "|L| (dB)";
  mag->y_name = "|L|";
  mag->y_unit = "dB";
  ph->y_label = "\u2220L (\u00b0)";
  ph->y_name = "\u2220L";
  ph->y_unit = "\u00b0";

  /* references */
  Prim *p = lwp_add_hline (mag, 0.0);
  p->width = 1.2;
  lwp_add_phase_references (ph, &ph->y, false);

  /* the curve goes on past the axis: say where to */
  if (phase_cut && lwp_axes_kept (pl, in) == false)
    {
      char buf[64];
      double to = ep_all.lo < ep.lo ? ep_all.lo : ep_all.hi;
      snprintf (buf, sizeof buf, "\u2220L continues to %s%.0f\u00b0 %s", to < 0 ? "\u2212" : "",
                fabs (to), ep_all.lo < ep.lo ? "\u2193" : "\u2191");
      /* bottom (top) left: the phase falls (rises) with frequency, so the curve leaves the
       * axis on the right, where a note would lie across it */
      Prim *t = lwp_add_text_uv (ph, 0.0, ep_all.lo < ep.lo ? 0.0 : 1.0, buf, 5,
                                 ep_all.lo < ep.lo ? -3 : 3, 0.0, ep_all.lo < ep.lo ? 1.0 : 0.0);
      t->plate = true;
      t->colour = COL_REF;
    }

  /* requirement marks: at the branches the margins are measured from */
  const LwPlotRequirements *rq = &in->req;
  if (rq->has_min_phase_margin)
    for (size_t k = 0; k < n_refs; k++)
      {
        double ref = refs[k];
        double top = ref + rq->min_phase_margin_deg;
        if (ref < ph->y.lo || ref > ph->y.hi)
          continue;
        Prim *b = lwp_prim_add (ph, PRIM_HBAND, 2);
        b->v[0] = my (ph, ref);
        b->v[1] = my (ph, fmin (top, ph->y.hi));
        b->alpha = 0.10;
        b->colour = COL_TEXT;
        Prim *l = lwp_add_hline (ph, top);
        l->dash = DASH_DOTTED;
        char buf[64];
        snprintf (buf, sizeof buf, "required PM \u2265 %.0f\u00b0", rq->min_phase_margin_deg);
        lwp_add_text_uv (ph, 0.0, my (ph, top), buf, 4, -2, 0.0, 1.0)->colour = COL_REF;
      }
  double target = w_plane ? rq->target_crossover_nu_rad_s : rq->target_crossover_rad_s;
  if (rq->has_target_crossover && target >= mag->x.lo && target <= mag->x.hi)
    {
      for (int k = 0; k < 2; k++)
        {
          Prim *l = lwp_add_vline (&pl->panels[k], target);
          l->dash = DASH_DASHED;
          l->width = 1.2;
        }
      lwp_add_mark (mag, target, NAN, MARK_DIAMOND, 7)->v[0] = 1.0;
      char buf[64];
      snprintf (buf, sizeof buf, "target crossover %.3g rad/s", target);
      lwp_add_text_uv (mag, mx (mag, target), 1.0, buf, 5, 3, 0.0, 0.0)->colour = COL_REF;
    }
  if (!w_plane)
    {
      for (int k = 0; k < 2; k++)
        {
          Prim *l = lwp_add_vline (&pl->panels[k], mag->x.hi);
          l->colour = COL_NYQUIST;
          l->width = 2.0;
          l->dash = DASH_DASHDOT;
        }
      char buf[64];
      snprintf (buf, sizeof buf, "Nyquist \u03c0/T = %.4g rad/s", in->nyquist_rad_s);
      Prim *t = lwp_add_text_uv (mag, 1.0, 1.0, buf, -5, 3, 1.0, 0.0);
      t->plate = true;
    }

  /* a plant family's members, under every variant's curves */
  size_t fv = lwp_family_key (pl, in);
  if (fv != SIZE_MAX)
    {
      const LwPlotFamily *fam = in->variants[fv].family;
      const LwPlotFreqCurve *curves = w_plane ? fam->w : fam->z;
      const LwPlotBand *band = w_plane ? fam->band_w : fam->band_z;
      if (band != NULL && band->n >= 2)
        {
          lwp_family_band (mag, fv, band->n, band->freq_rad_s, band->mag_lo_db, band->mag_hi_db);
          if (!wrapped)
            lwp_family_band (ph, fv, band->n, band->freq_rad_s, band->phase_lo_deg,
                             band->phase_hi_deg);
        }
      for (size_t i = 0; curves != NULL && i < fam->n; i++)
        {
          const LwPlotFreqCurve *c = &curves[i];
          if (i == fam->worst_pm)
            continue;
          lwp_family_line (mag, fv, c->n, c->freq_rad_s, c->mag_db, false);
          if (wrapped)
            {
              double *wf, *wp;
              size_t wn;
              wrap_curve (c, &wf, &wp, &wn);
              lwp_family_line (ph, fv, wn, wf, wp, false);
              g_free (wf);
              g_free (wp);
            }
          else
            lwp_family_line (ph, fv, c->n, c->freq_rad_s, c->phase_deg, false);
        }
      if (curves != NULL && fam->worst_pm < fam->n)
        {
          const LwPlotFreqCurve *c = &curves[fam->worst_pm];
          lwp_family_line (mag, fv, c->n, c->freq_rad_s, c->mag_db, true);
          double *wf = NULL, *wp = NULL;
          size_t wn = c->n;
          if (wrapped)
            wrap_curve (c, &wf, &wp, &wn);
          lwp_family_line (ph, fv, wn, wrapped ? wf : c->freq_rad_s,
                           wrapped ? wp : c->phase_deg, true);
          g_free (wf);
          g_free (wp);
          /* labelled at its governing gain crossover (the smallest margin) */
          const LwPlotCrossover *g = NULL;
          for (size_t i = 0; i < c->n_gain_crossovers; i++)
            if (g == NULL || fabs (c->gain_crossovers[i].margin) < fabs (g->margin))
              g = &c->gain_crossovers[i];
          if (g != NULL)
            lwp_family_worst_label (ph, fv, g->freq_rad_s, PH (g->phase_deg), fam->worst_pm_deg);
        }
    }

  /* curves, asymptotes */
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotFreqCurve *c = w_plane ? &in->variants[v].w : &in->variants[v].z;
      if (c->n_asymptote >= 2)
        {
          Prim *a = lwp_add_curve (pl, mag, v, c->n_asymptote, c->asymptote_freq_rad_s,
                               c->asymptote_db);
          lwp_style_variant (a, v, THIN_WIDTH);
          a->dash = DASH_DASHED;
          a->alpha = 0.8;
        }
      Prim *pm = lwp_add_curve (pl, mag, v, c->n, c->freq_rad_s, c->mag_db);
      lwp_style_variant (pm, v, LW_PLOT_CURVE_WIDTH);
      pm->dash = DASH_VARIANT;
      Prim *pc = NULL;
      if (wrapped)
        {
          /* a tag of its own: a figure reuses only a wrapped curve's mapped points */
          double *wf, *wp;
          size_t wn;
          wrap_curve (c, &wf, &wp, &wn);
          pc = lwp_curve_reuse (pl, ph, v, c->freq_rad_s, c->phase_deg, 5, wn);
          if (pc == NULL)
            pc = lwp_curve_mark (pl, lwp_add_line (ph, wn, wf, wp), v, c->freq_rad_s,
                                 c->phase_deg, 5);
          g_free (wf);
          g_free (wp);
        }
      else
        pc = lwp_add_curve (pl, ph, v, c->n, c->freq_rad_s, c->phase_deg);
      lwp_style_variant (pc, v, LW_PLOT_CURVE_WIDTH);
      pc->dash = DASH_VARIANT;
      if (c->confidence != NULL && !wrapped)
        {
          /* the whole curve faded, the trusted stretches over it at full strength */
          pm->alpha = pc->alpha = 0.3;
          trusted_over (pl, mag, v, c, c->mag_db);
          trusted_over (pl, ph, v, c, c->phase_deg);
        }
    }

  /* margin annotations: drop line, gauge bar, label on a plate (the governing margins and
   * those near them: lwp_choose_labels) */
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotFreqCurve *c = w_plane ? &in->variants[v].w : &in->variants[v].z;
      bool *pm_label, *gm_label;
      lwp_choose_margin_labels (c, &pm_label, &gm_label);
      for (size_t i = 0; i < c->n_gain_crossovers; i++)
        {
          const LwPlotCrossover *x = &c->gain_crossovers[i];
          double f = x->freq_rad_s, xp = PH (x->phase_deg), ref = xp - x->margin;
          lwp_style_variant (lwp_add_segment (mag, f, 0.0, f, mag->y.lo), v,
                             DROP_WIDTH)->dash = DASH_DOTTED;
          lwp_style_variant (lwp_add_segment (ph, f, ph->y.hi, f, xp), v,
                             DROP_WIDTH)->dash = DASH_DOTTED;
          lwp_style_variant (lwp_add_segment (ph, f, ref, f, xp), v, GAUGE_WIDTH)->arrows = true;
          lwp_style_variant (lwp_add_mark (mag, f, 0.0, MARK_CIRCLE, 7), v, 1.3);
          lwp_style_variant (lwp_add_mark (ph, f, xp, MARK_DISC, 5), v, 1.0);
          if (pm_label[i])
            {
              char buf[48];
              lwp_format_margin (buf, sizeof buf, "PM", x->margin, "\u00b0");
              lwp_margin_label (ph, f, 0.5 * (ref + xp), buf, 6, 0, 0.0, 0.5, v);
            }
        }
      for (size_t i = 0; i < c->n_phase_crossovers; i++)
        {
          const LwPlotCrossover *x = &c->phase_crossovers[i];
          double f = x->freq_rad_s, xp = PH (x->phase_deg);
          /* a crossing beyond the phase axis (the curve continues off it) is not marked:
           * with long dead times there are hundreds; the hover and the table have them */
          if (xp < ph->y.lo || xp > ph->y.hi)
            continue;
          lwp_style_variant (lwp_add_segment (ph, f, xp, f, ph->y.hi), v,
                             DROP_WIDTH)->dash = DASH_DOTTED;
          lwp_style_variant (lwp_add_segment (mag, f, mag->y.lo, f, x->mag_db), v,
                             DROP_WIDTH)->dash = DASH_DOTTED;
          lwp_style_variant (lwp_add_segment (mag, f, x->mag_db, f, 0.0), v, GAUGE_WIDTH)->arrows = true;
          lwp_style_variant (lwp_add_mark (ph, f, xp, MARK_DIAMOND, 7), v, 1.3);
          if (gm_label[i])
            {
              char buf[48];
              lwp_format_margin (buf, sizeof buf, "GM", x->margin, " dB");
              lwp_margin_label (mag, f, 0.5 * x->mag_db, buf, 6, 0, 0.0, 0.5, v);
            }
        }
      g_free (pm_label);
      g_free (gm_label);
    }
}

#undef PH

void
lwp_build_bode_z (LwPlot *pl, const LwPlotInput *in)
{
  build_bode (pl, in, false);
}

void
lwp_build_bode_w (LwPlot *pl, const LwPlotInput *in)
{
  build_bode (pl, in, true);
}
