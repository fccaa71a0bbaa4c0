/* lw-plot-area.h — the plot area: a grid of views of the loop (Bode in z, Bode in the
 * w-plane, step response, Nyquist), each a figure drawn by src/plot/.  The area turns an
 * evaluation into figures (through lw-figure-data.h) and hands them to its panes; it computes
 * nothing itself.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-design-model.h"
#include "lw-plot.h"

G_BEGIN_DECLS

#define LW_TYPE_PLOT_AREA (lw_plot_area_get_type ())
G_DECLARE_FINAL_TYPE (LwPlotArea, lw_plot_area, LW, PLOT_AREA, GtkWidget)

/* Arrangement of the views: two columns, or all in one column. */
typedef enum
{
  LW_PLOT_LAYOUT_GRID = 0,
  LW_PLOT_LAYOUT_COLUMN = 1
} LwPlotLayout;

void lw_plot_area_set_layout (LwPlotArea *self, LwPlotLayout layout);
LwPlotLayout lw_plot_area_get_layout (LwPlotArea *self);

/* Builds every view's figure from eval (eval->sampled must still be valid) with the marks of
 * req (may be NULL). */
void lw_plot_area_show_eval (LwPlotArea *self, LwLoopEval *eval, const LwPlotRequirements *req);

void lw_plot_area_set_theme (LwPlotArea *self, LwPlotTheme theme);

G_END_DECLS
