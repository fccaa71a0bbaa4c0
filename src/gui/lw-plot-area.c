/* lw-plot-area.c — the grid of loop views.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>

#include <glib/gi18n.h>

#include "lw-figure-data.h"
#include "lw-plot-area.h"
#include "lw-plot-pane.h"

static const LwPlotView area_views[] = {
  LW_PLOT_VIEW_BODE_Z, LW_PLOT_VIEW_BODE_W, LW_PLOT_VIEW_STEP, LW_PLOT_VIEW_NYQUIST,
};
#define N_VIEWS G_N_ELEMENTS (area_views)

struct _LwPlotArea
{
  GtkWidget parent_instance;

  GtkGrid *grid;
  LwPlotPane *panes[N_VIEWS];
  LwPlotLayout layout;
};

G_DEFINE_FINAL_TYPE (LwPlotArea, lw_plot_area, GTK_TYPE_WIDGET)

static const char *
view_title (LwPlotView v)
{
  switch (v)
    {
    case LW_PLOT_VIEW_BODE_Z: return _("Bode, z (up to the Nyquist frequency)");
    case LW_PLOT_VIEW_BODE_W: return _("Bode, w-plane");
    case LW_PLOT_VIEW_NYQUIST: return _("Nyquist");
    case LW_PLOT_VIEW_NICHOLS: return _("Nichols");
    case LW_PLOT_VIEW_STEP: return _("Reference step");
    case LW_PLOT_VIEW_POLES: return _("Closed-loop poles, z");
    }
  return NULL;
}

static void
arrange (LwPlotArea *self)
{
  for (guint i = 0; i < N_VIEWS; i++)
    {
      GtkWidget *p = GTK_WIDGET (self->panes[i]);
      g_object_ref (p);
      if (gtk_widget_get_parent (p) != NULL)
        gtk_grid_remove (self->grid, p);
      int col = self->layout == LW_PLOT_LAYOUT_GRID ? (int) (i % 2) : 0;
      int row = self->layout == LW_PLOT_LAYOUT_GRID ? (int) (i / 2) : (int) i;
      gtk_grid_attach (self->grid, p, col, row, 1, 1);
      g_object_unref (p);
    }
}

void
lw_plot_area_set_layout (LwPlotArea *self, LwPlotLayout layout)
{
  g_return_if_fail (LW_IS_PLOT_AREA (self));
  if (self->layout == layout)
    return;
  self->layout = layout;
  arrange (self);
}

LwPlotLayout
lw_plot_area_get_layout (LwPlotArea *self)
{
  g_return_val_if_fail (LW_IS_PLOT_AREA (self), LW_PLOT_LAYOUT_GRID);
  return self->layout;
}

void
lw_plot_area_show_eval (LwPlotArea *self, LwLoopEval *eval, const LwPlotRequirements *req)
{
  g_return_if_fail (LW_IS_PLOT_AREA (self));
  g_return_if_fail (eval != NULL);

  if (eval->ev == NULL)
    {
      g_autofree char *msg = g_strdup_printf (_("No loop to draw: %s"), eval->error.message);
      for (guint i = 0; i < N_VIEWS; i++)
        lw_plot_pane_set_plot (self->panes[i], NULL, msg);
      return;
    }

  LwFigureVariant fv;
  LwError err;
  if (lw_figure_variant_fill (&fv, NULL, eval->sampled, eval->ev, &err) != LW_OK)
    {
      g_autofree char *msg = g_strdup_printf (_("No loop to draw: %s"), err.message);
      lw_figure_variant_clear (&fv);
      for (guint i = 0; i < N_VIEWS; i++)
        lw_plot_pane_set_plot (self->panes[i], NULL, msg);
      return;
    }

  for (guint i = 0; i < N_VIEWS; i++)
    {
      LwPlotInput in = {
        .view = area_views[i],
        .nyquist_rad_s = G_PI / eval->ev->period_s,
        .title = view_title (area_views[i]),
        .n_variants = 1,
        .variants = &fv.v,
      };
      if (req != NULL)
        in.req = *req;
      char msg[256] = "";
      LwPlot *plot = lw_plot_new (&in, msg, sizeof msg);
      lw_plot_pane_set_plot (self->panes[i], plot, plot == NULL ? msg : NULL);
    }
  lw_figure_variant_clear (&fv);
}

void
lw_plot_area_set_theme (LwPlotArea *self, LwPlotTheme theme)
{
  g_return_if_fail (LW_IS_PLOT_AREA (self));
  for (guint i = 0; i < N_VIEWS; i++)
    lw_plot_pane_set_theme (self->panes[i], theme);
}

static void
lw_plot_area_dispose (GObject *object)
{
  LwPlotArea *self = LW_PLOT_AREA (object);

  if (self->grid != NULL)
    {
      gtk_widget_unparent (GTK_WIDGET (self->grid));
      self->grid = NULL;
    }
  G_OBJECT_CLASS (lw_plot_area_parent_class)->dispose (object);
}

static void
lw_plot_area_class_init (LwPlotAreaClass *klass)
{
  G_OBJECT_CLASS (klass)->dispose = lw_plot_area_dispose;
  gtk_widget_class_set_layout_manager_type (GTK_WIDGET_CLASS (klass), GTK_TYPE_BIN_LAYOUT);
  gtk_widget_class_set_css_name (GTK_WIDGET_CLASS (klass), "plotarea");
}

static void
lw_plot_area_init (LwPlotArea *self)
{
  self->grid = GTK_GRID (gtk_grid_new ());
  gtk_grid_set_row_homogeneous (self->grid, TRUE);
  gtk_grid_set_column_homogeneous (self->grid, TRUE);
  gtk_grid_set_row_spacing (self->grid, 4);
  gtk_grid_set_column_spacing (self->grid, 4);
  gtk_widget_set_parent (GTK_WIDGET (self->grid), GTK_WIDGET (self));
  for (guint i = 0; i < N_VIEWS; i++)
    self->panes[i] = lw_plot_pane_new (area_views[i]);
  self->layout = LW_PLOT_LAYOUT_GRID;
  arrange (self);
}
