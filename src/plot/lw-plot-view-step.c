/* lw-plot-view-step.c — the time responses: the step view (output samples held, the
 * continuous output between samples, the actuator panel) and the disturbance view (the output
 * after a unit step disturbance at the plant's input, and at its output).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-private.h"

#include <math.h>
#include <stdio.h>

/* Staircase of samples s[k] held over [kT, (k+1)T), k = 0 … n−1, ending at (n−1)T. */
static Prim *
add_staircase (LwPlot *pl, Panel *pn, size_t v, size_t n, const double *s, double T)
{
  size_t m = 2 * n - 1;
  Prim *r = lwp_curve_reuse (pl, pn, v, s, s, 2, m);
  if (r != NULL)
    return r;
  double *x = g_new (double, m), *y = g_new (double, m);
  for (size_t k = 0; k < n; k++)
    {
      x[2 * k] = (double) k * T;
      y[2 * k] = s[k];
      if (k + 1 < n)
        {
          x[2 * k + 1] = (double) (k + 1) * T;
          y[2 * k + 1] = s[k];
        }
    }
  Prim *p = lwp_curve_mark (pl, lwp_add_line (pn, m, x, y), v, s, s, 2);
  g_free (x);
  g_free (y);
  return p;
}

/* A family member's output, thin and light: its samples joined by straight lines (not held:
 * a staircase has twice the vertices, and at a pixel or two per sample the light line reads
 * the same), no reuse key (its arrays change from one figure to the next). */
static void
family_output (Panel *pn, size_t v, const LwPlotStepData *s, bool worst)
{
  if (s->n < 2 || s->y == NULL)
    return;
  double *x = g_new (double, s->n);
  for (size_t k = 0; k < s->n; k++)
    x[k] = (double) k * s->period_s;
  lwp_family_line (pn, v, s->n, x, s->y, worst);
  g_free (x);
}

/* Compared variants with very different horizons (their own sample periods, a slow and a
 * fast loop): the time axis ends at TIME_CUT_RATIO times the shortest horizon, so the fast
 * one keeps a quarter of the width instead of a sliver, and each variant cut there says how
 * far it runs. Common practice, no source. */
#define TIME_CUT_RATIO 4.0

/* The end of the time axis for horizons h[0 … n−1] (0: none): the longest, or
 * TIME_CUT_RATIO × the shortest when that is less. */
static double
time_axis_end (const double *h, size_t n)
{
  double lo = INFINITY, hi = 0.0;
  for (size_t v = 0; v < n; v++)
    if (h[v] > 0.0)
      {
        lo = fmin (lo, h[v]);
        hi = fmax (hi, h[v]);
      }
  return hi > TIME_CUT_RATIO * lo ? TIME_CUT_RATIO * lo : hi;
}

/* A note at the top right of pn for each variant whose horizon runs past the axis' end. */
static void
note_cut (Panel *pn, const double *h, size_t n, const LwPlotInput *in)
{
  int row = 0;
  for (size_t v = 0; v < n; v++)
    if (h[v] > pn->x.hi * (1.0 + 1e-9))
      {
        char buf[96];
        snprintf (buf, sizeof buf, "%s%sruns to %.3g s \u2192",
                  in->variants[v].name != NULL ? in->variants[v].name : "",
                  in->variants[v].name != NULL ? ": " : "", h[v]);
        Prim *t = lwp_style_variant (lwp_add_text_uv (pn, 1.0, 0.0, buf, -5, -4 - 15.0 * row,
                                                      1.0, 1.0), v, 1.0);
        t->plate = true;
        row++;
      }
}

void
lwp_build_step (LwPlot *pl, const LwPlotInput *in)
{
  Panel *out = &pl->panels[0], *act = &pl->panels[1];
  bool any_u = false;
  Extent et = { 0 }, ey = { 0 }, eu = { 0 };
  lwp_extent_add (&et, 0.0);
  lwp_extent_add (&ey, 0.0);
  lwp_extent_add (&eu, 0.0);
  double horizon[LW_PLOT_MAX_VARIANTS] = { 0 };
  for (size_t v = 0; v < in->n_variants && v < LW_PLOT_MAX_VARIANTS; v++)
    {
      const LwPlotStepData *s = &in->variants[v].step;
      horizon[v] = s->n >= 2 ? (double) (s->n - 1) * s->period_s : 0.0;
    }
  double t_cut = time_axis_end (horizon, in->n_variants);
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotStepData *s = &in->variants[v].step;
      if (s->n >= 2)
        lwp_extent_add (&et, fmin ((double) (s->n - 1) * s->period_s, t_cut));
      for (size_t k = 0; k < s->n; k++)
        if ((double) k * s->period_s <= t_cut)
          lwp_extent_add (&ey, s->y[k]);
      for (size_t j = 0; j < s->n_fine && s->y_fine; j++)
        if (s->t_fine_s[j] <= t_cut)
          lwp_extent_add (&ey, s->y_fine[j]);
      if (s->has_final)
        lwp_extent_add (&ey, s->final_value);
      if (s->u)
        {
          any_u = true;
          for (size_t k = 0; k < s->n; k++)
            if ((double) k * s->period_s <= t_cut)
              lwp_extent_add (&eu, s->u[k]);
          if (s->has_limits)
            {
              lwp_extent_add (&eu, s->u_low);
              lwp_extent_add (&eu, s->u_high);
            }
        }
    }
  pl->n_panels = any_u ? 2 : 1;
  /* headroom so the final value and the peak are not on the frame */
  ey.hi += 0.06 * (ey.hi - ey.lo);
  eu.hi += 0.06 * (eu.hi - eu.lo);
  eu.lo -= 0.06 * (eu.hi - eu.lo);
  double t_end = et.hi;
  lwp_axis_from_extent (&out->x, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, et, 8);
  if (t_end > 0.0)
    out->x.hi = t_end;   /* the axis ends at the last sample */
  lwp_axis_from_extent (&out->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ey, 6);
  out->x_label = "t (s)";
  out->y_label = "y (units of r)";
  out->x_name = "t";
  out->x_unit = "s";
  out->y_name = "y";
  out->y_unit = "";
  if (any_u)
    {
      out->x_tick_labels = false;
      act->x = out->x;
      lwp_axis_from_extent (&act->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, eu, 5);
      act->x_label = "t (s)";
      act->y_label = in->input_unit != NULL ? lwp_label (pl, "u (%s)", in->input_unit)
                                            : "u (actuator)";
      act->x_name = "t";
      act->x_unit = "s";
      act->y_name = "u";
      act->y_unit = in->input_unit != NULL ? in->input_unit : "";
    }
  lwp_keep_axes (pl, in);
  if (any_u)
    lwp_add_hline (act, 0.0);
  lwp_add_hline (out, 0.0);
  note_cut (out, horizon, in->n_variants, in);
  /* a plant family's members' outputs, under every variant's */
  size_t fv = lwp_family_key (pl, in);
  const LwPlotFamily *fam = fv != SIZE_MAX ? in->variants[fv].family : NULL;
  for (size_t i = 0; fam != NULL && fam->step != NULL && i <= fam->n; i++)
    {
      /* the worst member last, over the others */
      size_t m = i < fam->n ? i : fam->worst_pm;
      if (m >= fam->n || (i < fam->n && i == fam->worst_pm))
        continue;
      family_output (out, fv, &fam->step[m], i == fam->n);
    }
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotStepData *s = &in->variants[v].step;
      if (s->has_final)
        {
          Prim *f = lwp_add_hline (out, s->final_value);
          f->dash = DASH_DASHED;
          f->owner = (long) v;
        }
      if (s->n_fine >= 2 && s->t_fine_s && s->y_fine)
        {
          Prim *c = lwp_add_curve (pl, out, v, s->n_fine, s->t_fine_s, s->y_fine);
          lwp_style_variant (c, v, THIN_WIDTH);
          c->alpha = 0.7;
        }
      if (s->n >= 2)
        {
          Prim *st = add_staircase (pl, out, v, s->n, s->y, s->period_s);
          lwp_style_variant (st, v, LW_PLOT_CURVE_WIDTH);
          st->dash = DASH_VARIANT;
          if (s->n <= 120)
            for (size_t k = 0; k < s->n; k++)
              lwp_style_variant (lwp_add_mark (out, (double) k * s->period_s, s->y[k], MARK_DISC,
                                               3.5),
                                 v, 1.0);
        }
      if (any_u && s->u && s->n >= 2)
        {
          Prim *st = add_staircase (pl, act, v, s->n, s->u, s->period_s);
          lwp_style_variant (st, v, LW_PLOT_CURVE_WIDTH);
          st->dash = DASH_VARIANT;
          if (s->has_limits)
            {
              Prim *lim[4] = {
                lwp_add_hline (act, s->u_high), lwp_add_hline (act, s->u_low),
                lwp_add_text (act, act->x.hi, s->u_high, "u max", -4, -2, 1.0, 1.0),
                lwp_add_text (act, act->x.hi, s->u_low, "u min", -4, 2, 1.0, 0.0) };
              lim[0]->dash = lim[1]->dash = DASH_DOTTED;
              lim[2]->colour = lim[3]->colour = COL_REF;
              for (int k = 0; k < 4; k++)
                lim[k]->owner = (long) v;
            }
        }
    }
}

/* The output after a unit disturbance step at the plant input (upper panel) and at the plant
 * output (lower panel), samples held, 0 as the reference each returns to. */
void
lwp_build_disturbance (LwPlot *pl, const LwPlotInput *in)
{
  Panel *pi = &pl->panels[0], *po = &pl->panels[1];
  pl->n_panels = 2;
  Extent et = { 0 }, ei = { 0 }, eo = { 0 };
  lwp_extent_add (&et, 0.0);
  lwp_extent_add (&ei, 0.0);
  lwp_extent_add (&eo, 0.0);
  double horizon[LW_PLOT_MAX_VARIANTS] = { 0 };
  for (size_t v = 0; v < in->n_variants && v < LW_PLOT_MAX_VARIANTS; v++)
    {
      const LwPlotStepData *a = &in->variants[v].dist_in, *b = &in->variants[v].dist_out;
      horizon[v] = fmax (a->n >= 2 ? (double) (a->n - 1) * a->period_s : 0.0,
                         b->n >= 2 ? (double) (b->n - 1) * b->period_s : 0.0);
    }
  double t_cut = time_axis_end (horizon, in->n_variants);
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotStepData *a = &in->variants[v].dist_in, *b = &in->variants[v].dist_out;
      if (horizon[v] > 0.0)
        lwp_extent_add (&et, fmin (horizon[v], t_cut));
      for (size_t k = 0; k < a->n; k++)
        if ((double) k * a->period_s <= t_cut)
          lwp_extent_add (&ei, a->y[k]);
      for (size_t k = 0; k < b->n; k++)
        if ((double) k * b->period_s <= t_cut)
          lwp_extent_add (&eo, b->y[k]);
    }
  ei.hi += 0.06 * (ei.hi - ei.lo);
  ei.lo -= 0.06 * (ei.hi - ei.lo);
  eo.hi += 0.06 * (eo.hi - eo.lo);
  eo.lo -= 0.06 * (eo.hi - eo.lo);
  lwp_axis_from_extent (&pi->x, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, et, 8);
  if (et.hi > 0.0)
    pi->x.hi = et.hi;
  po->x = pi->x;
  lwp_axis_from_extent (&pi->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ei, 5);
  lwp_axis_from_extent (&po->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, eo, 5);
  pi->x_tick_labels = false;
  if (in->output_unit != NULL)
    {
      pi->y_label = lwp_label (pl, "y (%s), input dist.", in->output_unit);
      po->y_label = lwp_label (pl, "y (%s), output dist.", in->output_unit);
    }
  else
    {
      pi->y_label = "y, input dist.";
      po->y_label = "y, output dist.";
    }
  po->x_label = "t (s)";
  pi->x_name = po->x_name = "t";
  pi->x_unit = po->x_unit = "s";
  pi->y_name = po->y_name = "y";
  pi->y_unit = po->y_unit = in->output_unit != NULL ? in->output_unit : "";
  lwp_keep_axes (pl, in);
  lwp_add_hline (pi, 0.0);
  lwp_add_hline (po, 0.0);
  note_cut (pi, horizon, in->n_variants, in);
  for (size_t v = 0; v < in->n_variants; v++)
    for (int k = 0; k < 2; k++)
      {
        const LwPlotStepData *s = k == 0 ? &in->variants[v].dist_in : &in->variants[v].dist_out;
        if (s->n < 2)
          continue;
        Prim *st = add_staircase (pl, k == 0 ? pi : po, v, s->n, s->y, s->period_s);
        lwp_style_variant (st, v, LW_PLOT_CURVE_WIDTH);
        st->dash = DASH_VARIANT;
      }
}
