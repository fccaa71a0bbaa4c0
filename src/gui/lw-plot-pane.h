/* lw-plot-pane.h — one view of the loop (a figure of src/plot/) in a drawing area.
 *
 * The pane keeps the figure built from the last evaluation (lw_plot_new maps every series
 * once) and a cached image of its static layer, redrawn only when the figure, the size or the
 * theme change; the pointer's read-out (lw_plot_draw_overlay) is drawn on top each frame.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-plot.h"

G_BEGIN_DECLS

#define LW_TYPE_PLOT_PANE (lw_plot_pane_get_type ())
G_DECLARE_FINAL_TYPE (LwPlotPane, lw_plot_pane, LW, PLOT_PANE, GtkDrawingArea)

LwPlotPane *lw_plot_pane_new (LwPlotView view);
LwPlotView lw_plot_pane_get_view (LwPlotPane *self);

/* Takes the figure (may be NULL: then `message` is shown instead, may be NULL). */
void lw_plot_pane_set_plot (LwPlotPane *self, LwPlot *plot, const char *message);
void lw_plot_pane_set_theme (LwPlotPane *self, LwPlotTheme theme);

G_END_DECLS
