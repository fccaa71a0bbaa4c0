/* lw-plot-view.c — the view table (lw-plot-view.h): every view the renderer draws, one row
 * each, with its builder.
 *
 * A new view: a value in LwPlotView (lw-plot-view.h), a row here (in the order it is to be
 * listed), its builder in lw-plot-view-NAME.c (declared in lw-plot-private.h, listed in
 * meson.build). The CLI, the window's panes and the export dialog follow from the row.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-private.h"

#include <string.h>

#include <glib/gi18n.h>

typedef struct {
  LwPlotViewInfo info;
  LwpBuildFunc build;
} ViewRow;

#define FREQ LW_PLOT_VIEW_FREQUENCY_AXIS

static const ViewRow views[LW_PLOT_N_VIEWS] = {
  { { LW_PLOT_VIEW_BODE_Z, "bode-z", N_("Bode, z (up to π/T)"), N_("_Bode, z (up to π/T)"),
      "|L| and phase over omega, up to the Nyquist frequency pi/T",
      LW_PLOT_NEEDS_Z | LW_PLOT_NEEDS_NYQUIST_RATE,
      FREQ | LW_PLOT_VIEW_HANDLES | LW_PLOT_VIEW_IN_WINDOW | LW_PLOT_VIEW_IN_SPLIT },
    lwp_build_bode_z },
  { { LW_PLOT_VIEW_BODE_W, "bode-w", N_("Bode, w-plane"), N_("Bode, w-pla_ne"),
      "|L| and phase over nu in the w-plane, with straight-line asymptotes",
      LW_PLOT_NEEDS_W,
      FREQ | LW_PLOT_VIEW_W_PLANE | LW_PLOT_VIEW_HANDLES | LW_PLOT_VIEW_IN_WINDOW
        | LW_PLOT_VIEW_IN_SPLIT },
    lwp_build_bode_w },
  { { LW_PLOT_VIEW_STEP, "step", N_("Reference step"), N_("_Reference step"),
      "unit step response of the closed loop, samples held",
      LW_PLOT_NEEDS_STEP, LW_PLOT_VIEW_IN_WINDOW | LW_PLOT_VIEW_IN_SPLIT },
    lwp_build_step },
  { { LW_PLOT_VIEW_NYQUIST, "nyquist", N_("Nyquist"), N_("Nyq_uist"),
      "L in the complex plane, unit circle, critical point -1",
      LW_PLOT_NEEDS_NYQUIST, LW_PLOT_VIEW_IN_WINDOW },
    lwp_build_nyquist },
  { { LW_PLOT_VIEW_NICHOLS, "nichols", N_("Nichols"), N_("Ni_chols"),
      "|L| in dB over the phase of L",
      LW_PLOT_NEEDS_Z, 0 },
    lwp_build_nichols },
  { { LW_PLOT_VIEW_POLES, "poles", N_("Poles and zeros, z"), N_("Poles and _zeros, z"),
      "closed-loop poles and the loop's poles and zeros in z",
      LW_PLOT_NEEDS_POLES, 0 },
    lwp_build_poles },
  { { LW_PLOT_VIEW_SENSITIVITY, "sensitivity", N_("Sensitivity |S| and |T|"),
      N_("_Sensitivity |S| and |T|"),
      "|S| = 1/|1+L| and |T| = |L/(1+L)| in dB over omega up to pi/T, the peak Ms marked",
      LW_PLOT_NEEDS_Z | LW_PLOT_NEEDS_NYQUIST_RATE, FREQ },
    lwp_build_sensitivity },
  { { LW_PLOT_VIEW_DISTURBANCE, "disturbance", N_("Disturbance steps"), N_("_Disturbance steps"),
      "the output after a unit step disturbance at the plant input and at its output",
      LW_PLOT_NEEDS_DISTURBANCE, 0 },
    lwp_build_disturbance },
};

const LwPlotViewInfo *
lw_plot_view_info (LwPlotView v)
{
  return (unsigned) v < LW_PLOT_N_VIEWS ? &views[v].info : NULL;
}

const char *
lw_plot_view_name (LwPlotView v)
{
  return (unsigned) v < LW_PLOT_N_VIEWS ? views[v].info.name : "?";
}

int
lw_plot_view_from_name (const char *name)
{
  for (size_t i = 0; name && i < LW_PLOT_N_VIEWS; i++)
    if (strcmp (name, views[i].info.name) == 0)
      return (int) i;
  return -1;
}

bool
lw_plot_view_has (LwPlotView v, unsigned traits)
{
  return (unsigned) v < LW_PLOT_N_VIEWS && (views[v].info.traits & traits) == traits;
}

char *
lw_plot_view_names_joined (const char *last_joiner)
{
  GString *s = g_string_new (NULL);
  for (size_t i = 0; i < LW_PLOT_N_VIEWS; i++)
    {
      if (i > 0)
        g_string_append (s, i + 1 == LW_PLOT_N_VIEWS ? last_joiner : ", ");
      g_string_append (s, views[i].info.name);
    }
  return g_string_free (s, FALSE);
}

LwpBuildFunc
lwp_view_builder (LwPlotView v)
{
  return (unsigned) v < LW_PLOT_N_VIEWS ? views[v].build : NULL;
}

bool
lwp_view_has_data (const LwPlotInput *in)
{
  if ((unsigned) in->view >= LW_PLOT_N_VIEWS)
    return false;
  unsigned needs = views[in->view].info.needs;
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotVariant *x = &in->variants[v];
      if (((needs & LW_PLOT_NEEDS_Z) && x->z.n >= 2)
          || ((needs & LW_PLOT_NEEDS_W) && x->w.n >= 2)
          || ((needs & LW_PLOT_NEEDS_NYQUIST) && x->nyquist.n >= 2)
          || ((needs & LW_PLOT_NEEDS_STEP) && x->step.n >= 2 && x->step.period_s > 0.0)
          || ((needs & LW_PLOT_NEEDS_DISTURBANCE)
              && ((x->dist_in.n >= 2 && x->dist_in.period_s > 0.0)
                  || (x->dist_out.n >= 2 && x->dist_out.period_s > 0.0)))
          || ((needs & LW_PLOT_NEEDS_POLES)
              && x->poles.n_closed_loop + x->poles.n_loop_poles + x->poles.n_loop_zeros > 0))
        return true;
    }
  return false;
}
