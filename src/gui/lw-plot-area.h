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
#include "lw-plot-pane.h"

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
 * req (may be NULL), and the drag handles of stages[0 … n_stages−1] (the stages eval was made
 * from) on the two Bode views: each enabled stage's corners at their frequency ν (w-plane)
 * or ω = (2/T)·atan(νT/2) (z), on the magnitude curve; each enabled gain stage at
 * gain_pin_nu_rad_s when it is > 0, else at the gain crossover, on the curve.  The handle of
 * (sel_stage, sel_corner) is drawn active (sel_stage −1: none). */
void lw_plot_area_show_eval (LwPlotArea *self, LwLoopEval *eval, const LwPlotRequirements *req,
                             const LwStage *stages, guint n_stages, double gain_pin_nu_rad_s,
                             int sel_stage, int sel_corner);

/* The pane of a view shown by the area (NULL when the area does not show it). */
LwPlotPane *lw_plot_area_get_pane (LwPlotArea *self, LwPlotView view);

/* A figure of one view of eval, as the CLI's plot builds it (no title unless given, the loop
 * named by variant_name), for export. NULL with a message in err. */
LwPlot *lw_plot_area_build_plot (LwLoopEval *eval, const LwPlotRequirements *req,
                                 LwPlotView view, const char *title, const char *variant_name,
                                 char *err, size_t err_size);

void lw_plot_area_set_theme (LwPlotArea *self, LwPlotTheme theme);

G_END_DECLS
