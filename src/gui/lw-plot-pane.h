/* lw-plot-pane.h — one view of the loop (a figure of src/plot/) in a drawing area.
 *
 * The pane keeps the figure built from the last evaluation (lw_plot_new maps every series
 * once) and a cached image of its static layer, redrawn only when the figure, the size or the
 * theme change; the pointer's read-out and the drag handles (lw_plot_draw_overlay) are drawn
 * on top each frame.
 *
 * Handles (Bode views): points on the magnitude panel (panel 0) that stand for a stage's
 * corner or gain.  A press within LW_PLOT_PANE_GRAB_PX of a handle starts a drag: the pane
 * emits "handle-drag-begin" (handle index), then "handle-drag-update" (handle index, the axis
 * values under the pointer in the magnitude panel — frequency in rad/s of the view's axis
 * and dB — and the modifier state), and "handle-drag-end" when the button is released.
 * The pane changes no design: its owner turns these signals into edits.  While a drag is
 * under way the owner's label (lw_plot_pane_set_drag_label) is drawn beside the pointer.
 *
 * With the environment variable LW_DEBUG_HANDLES=1 the pane prints, whenever they change, the
 * position of every handle in window-surface pixels and its magnitude panel's layout (for
 * tests driving the pointer; see tests/gui/).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-plot.h"

G_BEGIN_DECLS

#define LW_TYPE_PLOT_PANE (lw_plot_pane_get_type ())
G_DECLARE_FINAL_TYPE (LwPlotPane, lw_plot_pane, LW, PLOT_PANE, GtkDrawingArea)

#define LW_PLOT_PANE_GRAB_PX 10.0

/* A drag handle on a pane's magnitude panel. */
typedef struct
{
  guint stage;        /* index of the stage in the active variant */
  int corner;         /* corner index of lw_stage_corner_get, or -1: the stage's gain */
  double x, y;        /* frequency of the view's axis (rad/s) and |L| (dB) */
} LwPaneHandle;

LwPlotPane *lw_plot_pane_new (LwPlotView view);
/* Shows another view: the figure, its zoom and its handles are dropped until the next one. */
void lw_plot_pane_set_view (LwPlotPane *self, LwPlotView view);
LwPlotView lw_plot_pane_get_view (LwPlotPane *self);

/* Takes the figure (may be NULL: then `message` is shown instead, may be NULL). */
void lw_plot_pane_set_plot (LwPlotPane *self, LwPlot *plot, const char *message);
/* The same, with variant `moving` of the figure (−1: none) drawn each frame over a cached
 * base layer of everything else (lw_plot_draw_base): the base is redrawn only when
 * lw_plot_base_equal says the new figure's differs from the last one's. */
void lw_plot_pane_set_plot_moving (LwPlotPane *self, LwPlot *plot, const char *message,
                                   int moving);
/* How many times the cached static or base layer has been drawn (for tests and the
 * benchmark). */
guint64 lw_plot_pane_get_n_base_draws (LwPlotPane *self);

/* Zoom and pan of the frequency axis (Bode views): scrolling zooms by 1.25× per step about
 * the frequency under the pointer; dragging with the middle button, or with Ctrl and the
 * primary button, pans. Each user change emits "x-view-changed" (double lo, double hi, rad/s).
 * The range is kept for later figures; set_x_view sets it without the signal (linked panes),
 * reset_view returns to the figure's own range. */
void lw_plot_pane_set_x_view (LwPlotPane *self, double lo, double hi);
void lw_plot_pane_reset_view (LwPlotPane *self);
gboolean lw_plot_pane_get_x_view (LwPlotPane *self, double *lo, double *hi);
void lw_plot_pane_set_theme (LwPlotPane *self, LwPlotTheme theme);

/* Replaces the handles (copied); the one of (sel_stage, sel_corner) is drawn active
 * (sel_stage −1: none). */
void lw_plot_pane_set_handles (LwPlotPane *self, const LwPaneHandle *handles, guint n,
                               int sel_stage, int sel_corner);
guint lw_plot_pane_get_n_handles (LwPlotPane *self);
const LwPaneHandle *lw_plot_pane_get_handle (LwPlotPane *self, guint i);

/* Text drawn beside the pointer during a drag (NULL: none). */
void lw_plot_pane_set_drag_label (LwPlotPane *self, const char *text);

/* Stops a drag under way without "handle-drag-end" (the owner cancelled it). */
void lw_plot_pane_cancel_drag (LwPlotPane *self);

/* The figure on show (NULL when none); owned by the pane. */
LwPlot *lw_plot_pane_get_plot (LwPlotPane *self);

G_END_DECLS
