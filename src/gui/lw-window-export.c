/* lw-window-export.c — Export Figure: one view as PNG, SVG or PDF, with the variants on
 * show, through the export dialog (lw-export-dialog.h).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <string.h>

#include <glib/gi18n.h>

#include "lw-export-dialog.h"
#include "lw-window-private.h"

LwPlot *
lw_window_build_export_plot (LwPlotView view, gpointer user_data, GError **error)
{
  LwWindow *self = LW_WINDOW (user_data);
  if (self->eval == NULL)
    {
      g_set_error_literal (error, LW_PLOT_ERROR, LW_PLOT_ERROR_INPUT, _("Nothing evaluated yet."));
      return NULL;
    }
  LwPlotRequirements req = { 0 };
  lw_window_plot_requirements (self, &req);
  const LwDesign *d = lw_design_model_get_design (self->model);
  /* what the window shows: the active variant and those compared with it, document order */
  LwAreaVariant vs[LW_PLOT_MAX_VARIANTS];
  guint n = 0;
  for (guint i = 0; i < d->n_variants && n < LW_PLOT_MAX_VARIANTS; i++)
    {
      const char *name = d->variants[i].name;
      LwVariantEval *e = NULL;
      if (i == d->active)
        e = self->eval;
      else if (lw_window_is_compared (self, name))
        e = lw_window_get_reference_eval (self, name);
      if (e == NULL || e->ev == NULL)
        continue;
      vs[n++] = (LwAreaVariant) { .eval = e, .name = name,
                                  .style = i % LW_PLOT_MAX_VARIANTS + 1 };
    }
  if (n == 0)
    {
      g_set_error_literal (error, LW_PLOT_ERROR, LW_PLOT_ERROR_INPUT, _("Nothing evaluated yet."));
      return NULL;
    }
  return lw_plot_area_build_plot (vs, n, &req, view, NULL, error);
}

static void
export_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (lw_window_export_figure_for_test (self))
    return;
  g_autofree char *name = lw_window_document_name (self);
  char *dot = strrchr (name, '.');
  if (dot != NULL && self->file != NULL)
    *dot = '\0';
  lw_export_dialog_show (GTK_WINDOW (self), lw_window_get_settings (self), name,
                         lw_window_build_export_plot,
                         self);
}

void
lw_window_class_init_export (GtkWidgetClass *widget_class)
{
  gtk_widget_class_install_action (widget_class, "window.export", NULL, export_activated);
}
