/* lw-plot-pane-zoom.c — zoom and pan of a pane's frequency axis (the wheel zooms about the
 * pointer; a middle-button or Ctrl+left drag pans), kept across figures and announced to the
 * other panes ("x-view-changed").
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>

#include "lw-plot-pane-private.h"

static void
apply_view (LwPlotPane *self, double lo, double hi, gboolean notify)
{
  if (self->plot == NULL || !lw_plot_set_x_view (self->plot, lo, hi))
    return;
  self->has_view = TRUE;
  self->view_lo = lo;
  self->view_hi = hi;
  lwpp_invalidate_cache (self);
  if (notify)
    g_signal_emit (self, lwpp_signals[LWPP_SIGNAL_VIEW_CHANGED], 0, lo, hi);
}

void
lw_plot_pane_set_x_view (LwPlotPane *self, double lo, double hi)
{
  g_return_if_fail (LW_IS_PLOT_PANE (self));
  apply_view (self, lo, hi, FALSE);
}

void
lw_plot_pane_reset_view (LwPlotPane *self)
{
  g_return_if_fail (LW_IS_PLOT_PANE (self));
  if (!self->has_view)
    return;
  self->has_view = FALSE;
  if (self->plot != NULL)
    {
      double lo, hi;
      lw_plot_full_x_range (self->plot, &lo, &hi);
      lw_plot_set_x_view (self->plot, lo, hi);
    }
  lwpp_invalidate_cache (self);
}

gboolean
lw_plot_pane_get_x_view (LwPlotPane *self, double *lo, double *hi)
{
  g_return_val_if_fail (LW_IS_PLOT_PANE (self), FALSE);
  return self->plot != NULL && lw_plot_get_x_view (self->plot, lo, hi);
}

/* Pixel x → log10 of the frequency under it, on the visible axis of the magnitude panel. */
static gboolean
pixel_log_f (LwPlotPane *self, double px, double *log_f, double *left, double *width)
{
  double top, h, lo, hi;
  if (self->plot == NULL || !lw_plot_panel_rect (self->plot, 0, left, &top, width, &h)
      || *width <= 0 || !lw_plot_get_x_view (self->plot, &lo, &hi))
    return FALSE;
  double t = (px - *left) / *width;
  *log_f = log10 (lo) + t * (log10 (hi) - log10 (lo));
  return TRUE;
}

gboolean
lwpp_scrolled (GtkEventControllerScroll *c, double dx, double dy, LwPlotPane *self)
{
  double lf, left, width, lo, hi;
  if (dy == 0 || !self->has_hover || !pixel_log_f (self, self->hover_x, &lf, &left, &width)
      || !lw_plot_get_x_view (self->plot, &lo, &hi))
    return FALSE;
  /* zoom about the frequency under the pointer: 1.25× per scroll step */
  double k = pow (1.25, dy);
  double a = log10 (lo), b = log10 (hi);
  double na = lf + (a - lf) * k, nb = lf + (b - lf) * k;
  if (nb - na < 0.05 || nb - na > 12)
    return TRUE;
  apply_view (self, pow (10.0, na), pow (10.0, nb), TRUE);
  return TRUE;
}

void
lwpp_pan_begin_at (LwPlotPane *self, double x)
{
  double lo, hi;
  if (self->plot == NULL || !lw_plot_get_x_view (self->plot, &lo, &hi))
    return;
  self->panning = TRUE;
  self->pan_lo = lo;
  self->pan_hi = hi;
  self->pan_start_x = x;
}

void
lwpp_pan_to (LwPlotPane *self, double x)
{
  double left, top, w, h;
  if (!self->panning || !lw_plot_panel_rect (self->plot, 0, &left, &top, &w, &h) || w <= 0)
    return;
  double decades = log10 (self->pan_hi / self->pan_lo);
  double shift = -(x - self->pan_start_x) / w * decades;
  double f = pow (10.0, shift);
  apply_view (self, self->pan_lo * f, self->pan_hi * f, TRUE);
}

void
lwpp_pan_gesture_begin (GtkGestureDrag *g, double x, double y, LwPlotPane *self)
{
  if (!lw_plot_view_has (self->view, LW_PLOT_VIEW_FREQUENCY_AXIS))
    {
      gtk_gesture_set_state (GTK_GESTURE (g), GTK_EVENT_SEQUENCE_DENIED);
      return;
    }
  gtk_gesture_set_state (GTK_GESTURE (g), GTK_EVENT_SEQUENCE_CLAIMED);
  lwpp_pan_begin_at (self, x);
}

void
lwpp_pan_gesture_update (GtkGestureDrag *g, double dx, double dy, LwPlotPane *self)
{
  lwpp_pan_to (self, self->pan_start_x + dx);
}

void
lwpp_pan_gesture_end (GtkGestureDrag *g, double dx, double dy, LwPlotPane *self)
{
  self->panning = FALSE;
}

