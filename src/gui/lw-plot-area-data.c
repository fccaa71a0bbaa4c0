/* lw-plot-area-data.c — the plot area of a design on measured data alone (no plant model):
 * each variant's loop closed on the data, drawn in the views that show a frequency response,
 * the active variant's with its drag handles (the stages move along the data's curves); the
 * views that need a model (steps, poles) say so instead of drawing nothing.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib/gi18n.h>

#include "lw-plot-area-private.h"

void
lwpa_show_data_alone (LwPlotArea *self, const LwAreaVariant *vs, guint n, guint active,
                      const LwPlotRequirements *req, const LwStage *stages, guint n_stages,
                      double gain_pin_nu_rad_s, int sel_stage, int sel_corner)
{
  LwVariantEval *eval = vs[active].eval;
  LwPlotVariant vars[LW_PLOT_MAX_VARIANTS];
  guint nv = 0, moving = 0;
  LwFigureVariant active_fv;
  memset (&active_fv, 0, sizeof active_fv);
  gboolean have_active = FALSE;
  for (guint i = 0; i < n && nv < LW_PLOT_MAX_VARIANTS; i++)
    {
      if (vs[i].eval == NULL || vs[i].eval->measured == NULL)
        continue;
      LwError err;
      const FigureEntry *entry = lwpa_figure_for (self, vs[i].eval, vs[i].name, &err);
      if (entry == NULL || !entry->has_measured)
        continue;
      vars[nv] = entry->measured.variant;
      vars[nv].name = entry->name;
      vars[nv].style = vs[i].style;
      if (i == active)
        {
          moving = nv;
          /* the handles ride on the data's curves */
          active_fv.v = vars[nv];
          have_active = TRUE;
        }
      nv++;
    }
  if (!have_active)
    {
      lwpa_show_message (self, _("No loop to draw: the measured data could not be used."));
      lwpa_drop_unused_figures (self);
      return;
    }
  double nyq = G_PI / eval->period_s;
  self->period_s = eval->period_s;
  lwpa_set_key (self, vars, nv, moving);
  for (guint i = 0; i < lwpa_n_area_views; i++)
    {
      LwPlotPane *pane = self->panes[i];
      if (!lw_figure_measured_view_ok ((int) self->views[i]))
        {
          lw_plot_pane_set_plot (pane, NULL,
                                 _("This view needs a plant model: the design holds only "
                                   "measured data. Fit a model to the data or type one."));
          lw_plot_pane_set_handles (pane, NULL, 0, -1, -1);
          continue;
        }
      g_autoptr (GError) error = NULL;
      LwPlot *plot = lwpa_build_view (self->views[i], vars, nv, nyq, req, eval, self, NULL,
                                      NULL, &error);
      lw_plot_pane_set_plot_moving (pane, plot, plot == NULL ? error->message : NULL,
                                    (int) moving);
      if (self->debug)
        {
          printf ("LW-SERIES view=%s variants=%u moving=%u data=alone\n",
                  lw_plot_view_name (self->views[i]), nv, moving);
          fflush (stdout);
        }
    }
  for (guint k = 0; k < lwpa_n_split_views; k++)
    lw_plot_pane_set_plot (self->split_panes[k], NULL,
                           _("The split view compares models; the design holds only measured "
                             "data."));
  lwpa_set_handles (self, eval, &active_fv, stages, n_stages, gain_pin_nu_rad_s, sel_stage,
                    sel_corner);
  lwpa_drop_unused_figures (self);
}
