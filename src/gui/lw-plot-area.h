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
void lw_plot_area_show_eval (LwPlotArea *self, LwVariantEval *eval, const LwPlotRequirements *req,
                             const LwStage *stages, guint n_stages, double gain_pin_nu_rad_s,
                             int sel_stage, int sel_corner);

/* One variant to show: its evaluation (eval->sampled valid when the area has not shown this
 * evaluation before), its legend name (NULL: none), its colour and dash (LwPlotVariant.style:
 * 1 … LW_PLOT_MAX_VARIANTS, 0 its position in the list) and its plant family (NULL: none). */
typedef struct
{
  LwVariantEval *eval;
  const char *name;
  guint style;
  /* a plant family's members drawn with it (borrowed until the call returns), or NULL */
  const LwPlotFamily *family;
} LwAreaVariant;

/* Shows several variants overlaid in every view (compare), in the order given (their styles set
 * their colours and dashes), with the handles of the active one vs[active] (its stages as in
 * lw_plot_area_show_eval). A variant whose evaluation failed is left out; the figure data of
 * an evaluation shown before is kept, not filled again (so references cost nothing during a
 * drag). Each pane draws the active variant over a cached layer of everything else, redrawn
 * only when that changed. keep_axes: keep every pane's axes (during a drag). In the split
 * view the left column shows the active variant alone and the right one the first other
 * variant, with the same axes. With LW_DEBUG_HANDLES=1 prints one line per view,
 * "LW-SERIES view=NAME variants=N moving=I". */
void lw_plot_area_show_variants (LwPlotArea *self, const LwAreaVariant *vs, guint n,
                                 guint active, const LwPlotRequirements *req,
                                 const LwStage *stages, guint n_stages,
                                 double gain_pin_nu_rad_s, int sel_stage, int sel_corner,
                                 gboolean keep_axes);

/* Split view: Bode in z, Bode in w and the step response of the active variant (left) and of
 * the first other variant shown (right), with linked frequency axes. */
void lw_plot_area_set_split (LwPlotArea *self, gboolean split);
gboolean lw_plot_area_get_split (LwPlotArea *self);
/* The right-column pane of a view in the split view (NULL: that view is not split). */
LwPlotPane *lw_plot_area_get_split_pane (LwPlotArea *self, LwPlotView view);

/* Every pane back to its figure's own frequency range (zoom and pan are linked: every Bode
 * pane of a view follows the one the user zoomed or panned). */
void lw_plot_area_reset_view (LwPlotArea *self);

/* The panes of the grid, in their places (row by row), whatever view each shows. */
guint lw_plot_area_get_n_panes (LwPlotArea *self);
LwPlotPane *lw_plot_area_get_nth_pane (LwPlotArea *self, guint i);
/* Each pane's view by name, in pane order (g_strfreev). */
char **lw_plot_area_get_views (LwPlotArea *self);
/* Shows the named views in the panes in order (unknown names skipped; NULL or empty: the
 * default arrangement). TRUE when a pane changed. The user picks a pane's view from its
 * context menu (secondary button), which emits "views-changed". */
gboolean lw_plot_area_set_views (LwPlotArea *self, const char *const *names);

/* The pane of a view shown by the area (NULL when the area does not show it). */
LwPlotPane *lw_plot_area_get_pane (LwPlotArea *self, LwPlotView view);

/* A figure of one view of the variants vs (in this order, each named for the legend and in
 * its style; one variant alone in the first style), as the CLI's plot builds it (no title
 * unless given), for export, with area's display options (phase range, Nyquist scale; area
 * may be NULL for the defaults, as `plot` without --phase-range and --nyquist-scale). The Nyquist line is the first variant's. NULL with an error
 * (LW_PLOT_ERROR). */
LwPlot *lw_plot_area_build_plot (LwPlotArea *area, const LwAreaVariant *vs, guint n,
                                 const LwPlotRequirements *req, LwPlotView view,
                                 const char *title, GError **error);

void lw_plot_area_set_theme (LwPlotArea *self, LwPlotTheme theme);

G_END_DECLS
