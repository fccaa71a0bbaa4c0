/* lw-plot-pane.c — one view of the loop in a drawing area.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>

#include <glib/gi18n.h>

#include "lw-plot-pane-private.h"

G_DEFINE_FINAL_TYPE (LwPlotPane, lw_plot_pane, GTK_TYPE_DRAWING_AREA)

guint lwpp_signals[LWPP_N_SIGNALS];

void
lwpp_invalidate_cache (LwPlotPane *self)
{
  g_clear_pointer (&self->cache, cairo_surface_destroy);
  gtk_widget_queue_draw (GTK_WIDGET (self));
}

static void
draw_message (LwPlotPane *self, cairo_t *cr, int width, int height)
{
  const char *text = self->message != NULL ? self->message : _("Nothing to draw.");
  g_autoptr (PangoLayout) layout = gtk_widget_create_pango_layout (GTK_WIDGET (self), text);
  pango_layout_set_width (layout, (width - 40) * PANGO_SCALE);
  pango_layout_set_wrap (layout, PANGO_WRAP_WORD_CHAR);
  pango_layout_set_alignment (layout, PANGO_ALIGN_CENTER);
  int tw, th;
  pango_layout_get_pixel_size (layout, &tw, &th);
  GdkRGBA fg;
  gtk_style_context_get_color (gtk_widget_get_style_context (GTK_WIDGET (self)), &fg);
  gdk_cairo_set_source_rgba (cr, &fg);
  cairo_move_to (cr, 20, (height - th) / 2.0);
  pango_cairo_show_layout (cr, layout);
}

/* The drag value beside the pointer, on a plate of the theme's background. */
static void
draw_drag_label (LwPlotPane *self, cairo_t *cr, int width)
{
  g_autoptr (PangoLayout) layout =
    gtk_widget_create_pango_layout (GTK_WIDGET (self), self->drag_label);
  int tw, th;
  pango_layout_get_pixel_size (layout, &tw, &th);
  double x = self->hover_x + 14, y = self->hover_y - th - 10;
  if (x + tw + 8 > width)
    x = self->hover_x - tw - 22;
  if (y < 2)
    y = self->hover_y + 14;
  gboolean dark = self->theme == LW_PLOT_THEME_DARK;
  cairo_rectangle (cr, x - 4, y - 2, tw + 8, th + 4);
  cairo_set_source_rgba (cr, dark ? 0.1 : 1.0, dark ? 0.1 : 1.0, dark ? 0.12 : 1.0, 0.92);
  cairo_fill_preserve (cr);
  cairo_set_source_rgb (cr, 0.5, 0.5, 0.5);
  cairo_set_line_width (cr, 1.0);
  cairo_stroke (cr);
  cairo_set_source_rgb (cr, dark ? 0.92 : 0.08, dark ? 0.92 : 0.08, dark ? 0.92 : 0.08);
  cairo_move_to (cr, x, y);
  pango_cairo_show_layout (cr, layout);
}

/* LW_DEBUG_HANDLES: handle pixels in window-surface coordinates, printed when they change. */
static void
debug_print_handles (LwPlotPane *self)
{
  GtkNative *native = gtk_widget_get_native (GTK_WIDGET (self));
  if (native == NULL || self->plot == NULL)
    return;
  double tx = 0, ty = 0, ox = 0, oy = 0;
  gtk_native_get_surface_transform (native, &tx, &ty);
  if (!gtk_widget_translate_coordinates (GTK_WIDGET (self), GTK_WIDGET (native), 0, 0, &ox,
                                         &oy))
    return;
  ox += tx;
  oy += ty;

  g_autoptr (GString) s = g_string_new (NULL);
  const char *name = lw_plot_view_name (self->view);
  double px, py, pw, ph;
  const LwPlotAxis *xa = lw_plot_panel_x_axis (self->plot, 0);
  const LwPlotAxis *ya = lw_plot_panel_y_axis (self->plot, 0);
  if (xa != NULL && ya != NULL && lw_plot_panel_rect (self->plot, 0, &px, &py, &pw, &ph))
    g_string_append_printf (s, "LW-PANEL view=%s left=%.3f top=%.3f width=%.3f height=%.3f "
                            "xlo=%.17g xhi=%.17g ylo=%.17g yhi=%.17g\n",
                            name, ox + px, oy + py, pw, ph, lw_plot_axis_unmap (xa, 0.0),
                            lw_plot_axis_unmap (xa, 1.0), lw_plot_axis_unmap (ya, 0.0),
                            lw_plot_axis_unmap (ya, 1.0));
  /* the second panel's y range (the phase of the Bode views), when there is one */
  const LwPlotAxis *y2 = lw_plot_panel_y_axis (self->plot, 1);
  if (y2 != NULL && s->len > 0)
    {
      g_string_truncate (s, s->len - 1);
      g_string_append_printf (s, " y2lo=%.17g y2hi=%.17g\n", lw_plot_axis_unmap (y2, 0.0),
                              lw_plot_axis_unmap (y2, 1.0));
    }
  for (guint i = 0; i < self->handles->len; i++)
    {
      const LwPaneHandle *h = &g_array_index (self->handles, LwPaneHandle, i);
      double hx, hy;
      if (!lw_plot_pixel_of_value (self->plot, 0, h->x, h->y, &hx, &hy))
        continue;
      g_string_append_printf (s, "LW-HANDLE view=%s stage=%u corner=%d x=%.17g y=%.17g "
                              "sx=%.3f sy=%.3f\n", name, h->stage, h->corner, h->x, h->y,
                              ox + hx, oy + hy);
    }
  if (g_strcmp0 (s->str, self->debug_last) == 0)
    return;
  g_free (self->debug_last);
  self->debug_last = g_strdup (s->str);
  fputs (s->str, stdout);
  fflush (stdout);
}

static void
draw (GtkDrawingArea *area, cairo_t *cr, int width, int height, gpointer user_data)
{
  LwPlotPane *self = LW_PLOT_PANE (area);

  if (self->plot == NULL || width < 80 || height < 80)
    {
      draw_message (self, cr, width, height);
      return;
    }

  int scale = gtk_widget_get_scale_factor (GTK_WIDGET (self));
  if (self->cache == NULL || self->cache_width != width || self->cache_height != height
      || self->cache_scale != scale)
    {
      g_clear_pointer (&self->cache, cairo_surface_destroy);
      /* the format of GTK's node surfaces, so the cache is copied into them, not converted */
      self->cache = cairo_image_surface_create (CAIRO_FORMAT_ARGB32, width * scale,
                                                height * scale);
      cairo_surface_set_device_scale (self->cache, scale, scale);
      cairo_t *c = cairo_create (self->cache);
      if (self->moving >= 0)
        lw_plot_draw_base (self->plot, c, width, height, (size_t) self->moving);
      else
        lw_plot_draw_static (self->plot, c, width, height);
      cairo_destroy (c);
      self->cache_width = width;
      self->cache_height = height;
      self->cache_scale = scale;
      self->n_base_draws++;
    }
  LwPlotHandle ph[64];
  guint n = MIN (self->handles->len, G_N_ELEMENTS (ph));
  for (guint i = 0; i < n; i++)
    {
      const LwPaneHandle *h = &g_array_index (self->handles, LwPaneHandle, i);
      ph[i] = (LwPlotHandle) { .panel = 0, .x = h->x, .y = h->y,
                               .active = (self->dragging >= 0 && (guint) self->dragging == i)
                                         || ((int) h->stage == self->sel_stage
                                             && h->corner == self->sel_corner) };
    }
  /* the margin labels, drawn with the moving variant, keep clear of the handles */
  lw_plot_set_keep_clear (self->plot, ph, n);
  /* the cache is opaque and covers the whole pane: a copy, not a blend */
  cairo_save (cr);
  cairo_set_operator (cr, CAIRO_OPERATOR_SOURCE);
  cairo_set_source_surface (cr, self->cache, 0, 0);
  cairo_paint (cr);
  cairo_restore (cr);
  if (self->moving >= 0)
    lw_plot_draw_variant (self->plot, cr, width, height, (size_t) self->moving);

  /* lw_plot_draw_overlay uses the layout of the last draw, which was for this size. */
  LwPlotOverlay ov = { .has_hover = self->has_hover && self->dragging < 0,
                       .hover_x = self->hover_x, .hover_y = self->hover_y,
                       .n_handles = n, .handles = ph,
                       .readout_variant = self->moving >= 0 ? (size_t) self->moving : 0 };
  lw_plot_draw_overlay (self->plot, cr, &ov);
  if (self->debug_handles && ov.has_hover)
    {
      char buf[128];
      if (lw_plot_readout (self->plot, &ov, buf, sizeof buf))
        {
          printf ("LW-READOUT view=%s %s\n", lw_plot_view_name (self->view), buf);
          fflush (stdout);
        }
    }
  if (self->dragging >= 0 && self->drag_label != NULL)
    draw_drag_label (self, cr, width);
  if (self->debug_handles)
    debug_print_handles (self);
}

static void
motion (GtkEventControllerMotion *c, double x, double y, LwPlotPane *self)
{
  self->has_hover = TRUE;
  self->hover_x = x;
  self->hover_y = y;
  gtk_widget_queue_draw (GTK_WIDGET (self));
}

static void
leave (GtkEventControllerMotion *c, LwPlotPane *self)
{
  self->has_hover = FALSE;
  gtk_widget_queue_draw (GTK_WIDGET (self));
}

/* The handle nearest to (x, y) within the grab distance, or −1. */
static int
handle_at (LwPlotPane *self, double x, double y)
{
  int best = -1;
  double best_d = LW_PLOT_PANE_GRAB_PX;
  if (self->plot == NULL)
    return -1;
  for (guint i = 0; i < self->handles->len; i++)
    {
      const LwPaneHandle *h = &g_array_index (self->handles, LwPaneHandle, i);
      double hx, hy;
      if (!lw_plot_pixel_of_value (self->plot, 0, h->x, h->y, &hx, &hy))
        continue;
      double d = hypot (hx - x, hy - y);
      if (d <= best_d)
        best_d = d, best = (int) i;
    }
  return best;
}

/* Axis values of the magnitude panel at a pixel, also outside the plot area. */
static gboolean
values_at (LwPlotPane *self, double px, double py, double *x, double *y)
{
  double left, top, w, h;
  const LwPlotAxis *xa = lw_plot_panel_x_axis (self->plot, 0);
  const LwPlotAxis *ya = lw_plot_panel_y_axis (self->plot, 0);
  if (xa == NULL || ya == NULL || !lw_plot_panel_rect (self->plot, 0, &left, &top, &w, &h)
      || w <= 0 || h <= 0)
    return FALSE;
  *x = lw_plot_axis_unmap (xa, (px - left) / w);
  *y = lw_plot_axis_unmap (ya, 1.0 - (py - top) / h);
  return isfinite (*x) && isfinite (*y);
}

/* values_at with the mapping kept when the drag began */
static gboolean
drag_values_at (LwPlotPane *self, double px, double py, double *x, double *y)
{
  *x = lw_plot_axis_unmap (&self->drag_xa, (px - self->drag_left) / self->drag_w);
  *y = lw_plot_axis_unmap (&self->drag_ya, 1.0 - (py - self->drag_top) / self->drag_h);
  return isfinite (*x) && isfinite (*y);
}

static void
drag_begin (GtkGestureDrag *g, double x, double y, LwPlotPane *self)
{
  GdkModifierType mods =
    gtk_event_controller_get_current_event_state (GTK_EVENT_CONTROLLER (g));
  if ((mods & GDK_CONTROL_MASK) && lw_plot_view_has (self->view, LW_PLOT_VIEW_FREQUENCY_AXIS))
    {
      gtk_gesture_set_state (GTK_GESTURE (g), GTK_EVENT_SEQUENCE_CLAIMED);
      lwpp_pan_begin_at (self, x);
      return;
    }
  int i = handle_at (self, x, y);
  if (i < 0)
    {
      gtk_gesture_set_state (GTK_GESTURE (g), GTK_EVENT_SEQUENCE_DENIED);
      return;
    }
  double vx, vy;
  if (!values_at (self, x, y, &vx, &vy))
    {
      gtk_gesture_set_state (GTK_GESTURE (g), GTK_EVENT_SEQUENCE_DENIED);
      return;
    }
  gtk_gesture_set_state (GTK_GESTURE (g), GTK_EVENT_SEQUENCE_CLAIMED);
  gtk_widget_grab_focus (GTK_WIDGET (self));
  self->dragging = i;
  self->drag_start_x = x;
  self->drag_start_y = y;
  /* values_at succeeded: the panel has both axes and a rect */
  self->drag_xa = *lw_plot_panel_x_axis (self->plot, 0);
  self->drag_ya = *lw_plot_panel_y_axis (self->plot, 0);
  lw_plot_panel_rect (self->plot, 0, &self->drag_left, &self->drag_top, &self->drag_w,
                      &self->drag_h);
  g_signal_emit (self, lwpp_signals[LWPP_SIGNAL_DRAG_BEGIN], 0, (guint) i, vx, vy);
}

static void
drag_update (GtkGestureDrag *g, double dx, double dy, LwPlotPane *self)
{
  if (self->panning)
    {
      lwpp_pan_to (self, self->pan_start_x + dx);
      return;
    }
  if (self->dragging < 0 || self->plot == NULL)
    return;
  double px = self->drag_start_x + dx, py = self->drag_start_y + dy;
  self->has_hover = TRUE;
  self->hover_x = px;
  self->hover_y = py;
  double x, y;
  if (drag_values_at (self, px, py, &x, &y))
    {
      GdkModifierType mods =
        gtk_event_controller_get_current_event_state (GTK_EVENT_CONTROLLER (g));
      g_signal_emit (self, lwpp_signals[LWPP_SIGNAL_DRAG_UPDATE], 0, (guint) self->dragging, x, y,
                     (guint) mods);
    }
  gtk_widget_queue_draw (GTK_WIDGET (self));
}

static void
drag_end (GtkGestureDrag *g, double dx, double dy, LwPlotPane *self)
{
  self->panning = FALSE;
  if (self->dragging < 0)
    return;
  self->dragging = -1;
  g_signal_emit (self, lwpp_signals[LWPP_SIGNAL_DRAG_END], 0);
  gtk_widget_queue_draw (GTK_WIDGET (self));
}

static void
lw_plot_pane_finalize (GObject *object)
{
  LwPlotPane *self = LW_PLOT_PANE (object);

  g_clear_pointer (&self->plot, lw_plot_free);
  g_clear_pointer (&self->text_cache, lw_plot_text_cache_free);
  g_clear_pointer (&self->cache, cairo_surface_destroy);
  g_free (self->message);
  g_array_unref (self->handles);
  g_free (self->drag_label);
  g_free (self->debug_last);
  G_OBJECT_CLASS (lw_plot_pane_parent_class)->finalize (object);
}

static void
lw_plot_pane_class_init (LwPlotPaneClass *klass)
{
  G_OBJECT_CLASS (klass)->finalize = lw_plot_pane_finalize;
  gtk_widget_class_set_css_name (GTK_WIDGET_CLASS (klass), "plotpane");

  /* (guint handle, double x, double y_db): the axis values where the button went down */
  lwpp_signals[LWPP_SIGNAL_DRAG_BEGIN] = g_signal_new ("handle-drag-begin", G_TYPE_FROM_CLASS (klass),
                                             G_SIGNAL_RUN_LAST, 0, NULL, NULL, NULL,
                                             G_TYPE_NONE, 3, G_TYPE_UINT, G_TYPE_DOUBLE,
                                             G_TYPE_DOUBLE);
  /* (guint handle, double x, double y_db, guint GdkModifierType) */
  lwpp_signals[LWPP_SIGNAL_DRAG_UPDATE] = g_signal_new ("handle-drag-update", G_TYPE_FROM_CLASS (klass),
                                              G_SIGNAL_RUN_LAST, 0, NULL, NULL, NULL,
                                              G_TYPE_NONE, 4, G_TYPE_UINT, G_TYPE_DOUBLE,
                                              G_TYPE_DOUBLE, G_TYPE_UINT);
  lwpp_signals[LWPP_SIGNAL_DRAG_END] = g_signal_new ("handle-drag-end", G_TYPE_FROM_CLASS (klass),
                                           G_SIGNAL_RUN_LAST, 0, NULL, NULL, NULL,
                                           G_TYPE_NONE, 0);
  /* (double lo, double hi): the visible frequency range (rad/s), zoomed or panned by the
   * user */
  lwpp_signals[LWPP_SIGNAL_VIEW_CHANGED] = g_signal_new ("x-view-changed", G_TYPE_FROM_CLASS (klass),
                                               G_SIGNAL_RUN_LAST, 0, NULL, NULL, NULL,
                                               G_TYPE_NONE, 2, G_TYPE_DOUBLE, G_TYPE_DOUBLE);
}

static void
lw_plot_pane_init (LwPlotPane *self)
{
  gtk_drawing_area_set_draw_func (GTK_DRAWING_AREA (self), draw, NULL, NULL);
  gtk_widget_set_hexpand (GTK_WIDGET (self), TRUE);
  gtk_widget_set_vexpand (GTK_WIDGET (self), TRUE);
  gtk_widget_set_focusable (GTK_WIDGET (self), TRUE);
  gtk_drawing_area_set_content_width (GTK_DRAWING_AREA (self), 320);
  gtk_drawing_area_set_content_height (GTK_DRAWING_AREA (self), 240);
  self->handles = g_array_new (FALSE, FALSE, sizeof (LwPaneHandle));
  self->text_cache = lw_plot_text_cache_new ();
  self->sel_stage = -1;
  self->dragging = -1;
  self->debug_handles = g_strcmp0 (g_getenv ("LW_DEBUG_HANDLES"), "1") == 0;

  GtkEventController *m = gtk_event_controller_motion_new ();
  g_signal_connect (m, "motion", G_CALLBACK (motion), self);
  g_signal_connect (m, "leave", G_CALLBACK (leave), self);
  gtk_widget_add_controller (GTK_WIDGET (self), m);

  self->drag = gtk_gesture_drag_new ();
  gtk_gesture_single_set_button (GTK_GESTURE_SINGLE (self->drag), GDK_BUTTON_PRIMARY);
  g_signal_connect (self->drag, "drag-begin", G_CALLBACK (drag_begin), self);
  g_signal_connect (self->drag, "drag-update", G_CALLBACK (drag_update), self);
  g_signal_connect (self->drag, "drag-end", G_CALLBACK (drag_end), self);
  gtk_widget_add_controller (GTK_WIDGET (self), GTK_EVENT_CONTROLLER (self->drag));

  GtkEventController *sc = gtk_event_controller_scroll_new (GTK_EVENT_CONTROLLER_SCROLL_VERTICAL
                                                            | GTK_EVENT_CONTROLLER_SCROLL_DISCRETE);
  g_signal_connect (sc, "scroll", G_CALLBACK (lwpp_scrolled), self);
  gtk_widget_add_controller (GTK_WIDGET (self), sc);

  self->pan = gtk_gesture_drag_new ();
  gtk_gesture_single_set_button (GTK_GESTURE_SINGLE (self->pan), GDK_BUTTON_MIDDLE);
  g_signal_connect (self->pan, "drag-begin", G_CALLBACK (lwpp_pan_gesture_begin), self);
  g_signal_connect (self->pan, "drag-update", G_CALLBACK (lwpp_pan_gesture_update), self);
  g_signal_connect (self->pan, "drag-end", G_CALLBACK (lwpp_pan_gesture_end), self);
  gtk_widget_add_controller (GTK_WIDGET (self), GTK_EVENT_CONTROLLER (self->pan));
  self->moving = -1;
}

LwPlotPane *
lw_plot_pane_new (LwPlotView view)
{
  LwPlotPane *self = g_object_new (LW_TYPE_PLOT_PANE, NULL);
  self->view = view;
  return self;
}

void
lw_plot_pane_set_view (LwPlotPane *self, LwPlotView view)
{
  g_return_if_fail (LW_IS_PLOT_PANE (self));
  g_return_if_fail (lw_plot_view_info (view) != NULL);
  if (self->view == view)
    return;
  /* another view: nothing of the old figure (its zoom, handles) carries over */
  lw_plot_pane_set_handles (self, NULL, 0, -1, -1);
  lw_plot_pane_set_plot (self, NULL, "");
  self->has_view = FALSE;
  self->view = view;
}

LwPlotView
lw_plot_pane_get_view (LwPlotPane *self)
{
  g_return_val_if_fail (LW_IS_PLOT_PANE (self), LW_PLOT_VIEW_BODE_Z);
  return self->view;
}

void
lw_plot_pane_set_plot (LwPlotPane *self, LwPlot *plot, const char *message)
{
  lw_plot_pane_set_plot_moving (self, plot, message, -1);
}

void
lw_plot_pane_set_plot_moving (LwPlotPane *self, LwPlot *plot, const char *message, int moving)
{
  g_return_if_fail (LW_IS_PLOT_PANE (self));

  if (plot != NULL)
    {
      lw_plot_set_theme (plot, self->theme);
      lw_plot_set_decimate (plot, true);
      lw_plot_set_text_cache (plot, self->text_cache);
      if (self->has_view && !lw_plot_set_x_view (plot, self->view_lo, self->view_hi))
        self->has_view = FALSE;
    }
  /* the cached base stays when only the moving variant differs */
  gboolean keep = plot != NULL && self->plot != NULL && self->cache != NULL && moving >= 0
                  && moving == self->moving
                  && lw_plot_base_equal (self->plot, plot, (size_t) moving);
  g_clear_pointer (&self->plot, lw_plot_free);
  self->plot = plot;
  self->moving = moving;
  g_free (self->message);
  self->message = g_strdup (message);
  if (keep)
    gtk_widget_queue_draw (GTK_WIDGET (self));
  else
    lwpp_invalidate_cache (self);
}

guint64
lw_plot_pane_get_n_base_draws (LwPlotPane *self)
{
  g_return_val_if_fail (LW_IS_PLOT_PANE (self), 0);
  return self->n_base_draws;
}

LwPlot *
lw_plot_pane_get_plot (LwPlotPane *self)
{
  g_return_val_if_fail (LW_IS_PLOT_PANE (self), NULL);
  return self->plot;
}

void
lw_plot_pane_set_theme (LwPlotPane *self, LwPlotTheme theme)
{
  g_return_if_fail (LW_IS_PLOT_PANE (self));
  if (self->theme == theme)
    return;
  self->theme = theme;
  if (self->plot != NULL)
    lw_plot_set_theme (self->plot, theme);
  lwpp_invalidate_cache (self);
}

void
lw_plot_pane_set_handles (LwPlotPane *self, const LwPaneHandle *handles, guint n,
                          int sel_stage, int sel_corner)
{
  g_return_if_fail (LW_IS_PLOT_PANE (self));
  g_return_if_fail (n == 0 || handles != NULL);
  g_array_set_size (self->handles, 0);
  g_array_append_vals (self->handles, handles, n);
  self->sel_stage = sel_stage;
  self->sel_corner = sel_corner;
  if (self->dragging >= 0 && (guint) self->dragging >= n)
    self->dragging = -1;
  gtk_widget_queue_draw (GTK_WIDGET (self));
}

guint
lw_plot_pane_get_n_handles (LwPlotPane *self)
{
  g_return_val_if_fail (LW_IS_PLOT_PANE (self), 0);
  return self->handles->len;
}

const LwPaneHandle *
lw_plot_pane_get_handle (LwPlotPane *self, guint i)
{
  g_return_val_if_fail (LW_IS_PLOT_PANE (self), NULL);
  g_return_val_if_fail (i < self->handles->len, NULL);
  return &g_array_index (self->handles, LwPaneHandle, i);
}

void
lw_plot_pane_set_drag_label (LwPlotPane *self, const char *text)
{
  g_return_if_fail (LW_IS_PLOT_PANE (self));
  g_free (self->drag_label);
  self->drag_label = g_strdup (text);
  gtk_widget_queue_draw (GTK_WIDGET (self));
}

void
lw_plot_pane_cancel_drag (LwPlotPane *self)
{
  g_return_if_fail (LW_IS_PLOT_PANE (self));
  if (self->dragging < 0)
    return;
  self->dragging = -1;
  gtk_event_controller_reset (GTK_EVENT_CONTROLLER (self->drag));
  gtk_widget_queue_draw (GTK_WIDGET (self));
}
