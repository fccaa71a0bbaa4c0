/* lw-export-dialog.h — Export Figure: choose a view, a size, a format (PNG, SVG, PDF) and a
 * theme, then a file; the figure is written by lw_plot_export (src/plot/), the same renderer
 * and the same figure data as `loopwright-cli plot`, so the file is the figure the CLI draws
 * for the same loop and options.  The folder chosen is remembered (GSettings last-folder).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-plot.h"

G_BEGIN_DECLS

/* Builds the figure of view for export (NULL with an error). */
typedef LwPlot *(*LwExportBuildFunc) (LwPlotView view, gpointer user_data, GError **error);

/* Shows the dialog over parent; base_name suggests the file name ("NAME-VIEW.EXT"). settings
 * may be NULL. user_data must live as long as parent. */
void lw_export_dialog_show (GtkWindow *parent, GSettings *settings, const char *base_name,
                            LwExportBuildFunc build, gpointer user_data);

G_END_DECLS
