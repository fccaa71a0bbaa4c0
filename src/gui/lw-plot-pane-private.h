/* lw-plot-pane-private.h — what the files of a plot pane share (lw-plot-pane.c: drawing,
 * handles and their drag; lw-plot-pane-zoom.c: zoom and pan); not used elsewhere.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-plot-pane.h"

struct _LwPlotPane
{
  GtkDrawingArea parent_instance;

  LwPlotView view;
  LwPlotTheme theme;
  LwPlot *plot;
  char *message;
  LwPlotTextCache *text_cache;  /* layouts of the figures' texts, kept across figures */

  /* the static layer (or, with a moving variant, the base layer without it), at device
   * resolution, valid for cache_width × cache_height */
  cairo_surface_t *cache;
  int cache_width, cache_height, cache_scale;
  int moving;                   /* variant drawn per frame over the cached base, or −1 */

  /* zoom and pan of the frequency axis (Bode views), kept across figures */
  gboolean has_view;
  double view_lo, view_hi;
  gboolean panning;
  double pan_lo, pan_hi, pan_start_x;
  GtkGesture *pan;

  guint64 n_base_draws;         /* LW_DEBUG_HANDLES: how often the base layer was drawn */

  gboolean has_hover;
  double hover_x, hover_y;

  GArray *handles;              /* of LwPaneHandle */
  int sel_stage, sel_corner;
  int dragging;                 /* handle index under drag, or −1 */
  double drag_start_x, drag_start_y;
  /* the pixel ↔ value mapping as the drag began, kept for the whole drag: figures arrive
   * while it goes on (from the evaluation worker, whenever it finishes) and may lay their
   * panel out a little differently (tick labels of another width), which must not move the
   * corner under a pointer that stands still */
  LwPlotAxis drag_xa, drag_ya;
  double drag_left, drag_top, drag_w, drag_h;
  char *drag_label;
  GtkGesture *drag;

  gboolean debug_handles;
  char *debug_last;
};

enum
{
  LWPP_SIGNAL_DRAG_BEGIN,
  LWPP_SIGNAL_DRAG_UPDATE,
  LWPP_SIGNAL_DRAG_END,
  LWPP_SIGNAL_VIEW_CHANGED,
  LWPP_N_SIGNALS
};
extern guint lwpp_signals[LWPP_N_SIGNALS];

/* lw-plot-pane.c: the cached layers must be drawn again */
void lwpp_invalidate_cache (LwPlotPane *self);

/* lw-plot-pane-zoom.c: zoom and pan */
void lwpp_pan_begin_at (LwPlotPane *self, double x);
void lwpp_pan_to (LwPlotPane *self, double x);
gboolean lwpp_scrolled (GtkEventControllerScroll *c, double dx, double dy, LwPlotPane *self);
void lwpp_pan_gesture_begin (GtkGestureDrag *g, double x, double y, LwPlotPane *self);
void lwpp_pan_gesture_update (GtkGestureDrag *g, double dx, double dy, LwPlotPane *self);
void lwpp_pan_gesture_end (GtkGestureDrag *g, double dx, double dy, LwPlotPane *self);

