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

/* |L| in dB at frequency f on a curve (ascending frequencies), linear in log f between grid
 * points, the end value beyond the ends: where a handle sits on the drawn curve. */
static double
curve_db_at (const LwPlotFreqCurve *c, double f)
{
  if (c->n == 0)
    return 0.0;
  if (f <= c->freq_rad_s[0])
    return c->mag_db[0];
  if (f >= c->freq_rad_s[c->n - 1])
    return c->mag_db[c->n - 1];
  size_t lo = 0, hi = c->n - 1;
  while (hi - lo > 1)
    {
      size_t mid = (lo + hi) / 2;
      if (c->freq_rad_s[mid] <= f)
        lo = mid;
      else
        hi = mid;
    }
  double t = log (f / c->freq_rad_s[lo]) / log (c->freq_rad_s[hi] / c->freq_rad_s[lo]);
  return c->mag_db[lo] + t * (c->mag_db[hi] - c->mag_db[lo]);
}

static void
set_handles (LwPlotArea *self, LwLoopEval *eval, const LwFigureVariant *fv,
             const LwStage *stages, guint n_stages, double gain_pin_nu, int sel_stage,
             int sel_corner)
{
  double period_s = eval->ev->period_s;
  double gain_nu = gain_pin_nu;
  if (!(gain_nu > 0))
    gain_nu = eval->ev->margins.has_phase_margin
                ? lw_warp_omega_to_nu (eval->ev->margins.gain_crossover_rad_s, period_s)
                : (fv->v.w.n > 0 ? fv->v.w.freq_rad_s[fv->v.w.n / 2] : 1.0);

  for (guint k = 0; k < N_VIEWS; k++)
    {
      LwPlotView view = area_views[k];
      if (view != LW_PLOT_VIEW_BODE_W && view != LW_PLOT_VIEW_BODE_Z)
        continue;
      gboolean in_w = view == LW_PLOT_VIEW_BODE_W;
      const LwPlotFreqCurve *curve = in_w ? &fv->v.w : &fv->v.z;
      g_autoptr (GArray) hs = g_array_new (FALSE, FALSE, sizeof (LwPaneHandle));
      for (guint i = 0; i < n_stages; i++)
        {
          const LwStage *st = &stages[i];
          if (!st->enabled)
            continue;
          if (st->kind == LW_STAGE_GAIN)
            {
              double f = in_w ? gain_nu : lw_warp_nu_to_omega (gain_nu, period_s);
              LwPaneHandle h = { .stage = i, .corner = -1, .x = f, .y = curve_db_at (curve, f) };
              g_array_append_val (hs, h);
              continue;
            }
          size_t nc = lw_stage_corner_count (st);
          for (size_t c = 0; c < nc; c++)
            {
              double nu;
              LwHandleKind kind;
              if (lw_stage_corner_get (st, c, &nu, &kind, NULL) != LW_OK)
                continue;
              double f = in_w ? nu : lw_warp_nu_to_omega (nu, period_s);
              LwPaneHandle h = { .stage = i, .corner = (int) c, .x = f,
                                 .y = curve_db_at (curve, f) };
              g_array_append_val (hs, h);
            }
        }
      lw_plot_pane_set_handles (self->panes[k], (const LwPaneHandle *) (void *) hs->data,
                                hs->len, sel_stage, sel_corner);
    }
}

void
lw_plot_area_show_eval (LwPlotArea *self, LwLoopEval *eval, const LwPlotRequirements *req,
                        const LwStage *stages, guint n_stages, double gain_pin_nu_rad_s,
                        int sel_stage, int sel_corner)
{
  g_return_if_fail (LW_IS_PLOT_AREA (self));
  g_return_if_fail (eval != NULL);

  if (eval->ev == NULL)
    {
      g_autofree char *msg = g_strdup_printf (_("No loop to draw: %s"), eval->error.message);
      for (guint i = 0; i < N_VIEWS; i++)
        {
          lw_plot_pane_set_plot (self->panes[i], NULL, msg);
          lw_plot_pane_set_handles (self->panes[i], NULL, 0, -1, -1);
        }
      return;
    }

  LwFigureVariant fv;
  LwError err;
  if (lw_figure_variant_fill (&fv, NULL, eval->sampled, eval->ev, &err) != LW_OK)
    {
      g_autofree char *msg = g_strdup_printf (_("No loop to draw: %s"), err.message);
      lw_figure_variant_clear (&fv);
      for (guint i = 0; i < N_VIEWS; i++)
        {
          lw_plot_pane_set_plot (self->panes[i], NULL, msg);
          lw_plot_pane_set_handles (self->panes[i], NULL, 0, -1, -1);
        }
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
  set_handles (self, eval, &fv, stages, n_stages, gain_pin_nu_rad_s, sel_stage, sel_corner);
  lw_figure_variant_clear (&fv);
}

LwPlotPane *
lw_plot_area_get_pane (LwPlotArea *self, LwPlotView view)
{
  g_return_val_if_fail (LW_IS_PLOT_AREA (self), NULL);
  for (guint i = 0; i < N_VIEWS; i++)
    if (area_views[i] == view)
      return self->panes[i];
  return NULL;
}

LwPlot *
lw_plot_area_build_plot (LwLoopEval *eval, const LwPlotRequirements *req, LwPlotView view,
                         const char *title, const char *variant_name, char *err,
                         size_t err_size)
{
  g_return_val_if_fail (eval != NULL, NULL);
  if (eval->ev == NULL)
    {
      g_snprintf (err, err_size, "%s", eval->error.message);
      return NULL;
    }
  LwFigureVariant fv;
  LwError e;
  if (lw_figure_variant_fill (&fv, variant_name, eval->sampled, eval->ev, &e) != LW_OK)
    {
      g_snprintf (err, err_size, "%s", e.message);
      lw_figure_variant_clear (&fv);
      return NULL;
    }
  LwPlotInput in = {
    .view = view,
    .nyquist_rad_s = G_PI / eval->ev->period_s,
    .title = title,
    .n_variants = 1,
    .variants = &fv.v,
  };
  if (req != NULL)
    in.req = *req;
  LwPlot *plot = lw_plot_new (&in, err, err_size);
  lw_figure_variant_clear (&fv);
  return plot;
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
