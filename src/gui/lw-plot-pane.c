/* lw-plot-pane.c — one view of the loop in a drawing area.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib/gi18n.h>

#include "lw-plot-pane.h"

struct _LwPlotPane
{
  GtkDrawingArea parent_instance;

  LwPlotView view;
  LwPlotTheme theme;
  LwPlot *plot;
  char *message;

  /* the static layer, at device resolution, valid for cache_width × cache_height */
  cairo_surface_t *cache;
  int cache_width, cache_height, cache_scale;

  gboolean has_hover;
  double hover_x, hover_y;
};

G_DEFINE_FINAL_TYPE (LwPlotPane, lw_plot_pane, GTK_TYPE_DRAWING_AREA)

static void
invalidate_cache (LwPlotPane *self)
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
      self->cache = cairo_image_surface_create (CAIRO_FORMAT_ARGB32, width * scale,
                                                height * scale);
      cairo_surface_set_device_scale (self->cache, scale, scale);
      cairo_t *c = cairo_create (self->cache);
      lw_plot_draw_static (self->plot, c, width, height);
      cairo_destroy (c);
      self->cache_width = width;
      self->cache_height = height;
      self->cache_scale = scale;
    }
  cairo_set_source_surface (cr, self->cache, 0, 0);
  cairo_paint (cr);

  /* lw_plot_draw_overlay uses the layout of the last draw, which was for this size. */
  LwPlotOverlay ov = { .has_hover = self->has_hover, .hover_x = self->hover_x,
                       .hover_y = self->hover_y };
  lw_plot_draw_overlay (self->plot, cr, &ov);
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

static void
lw_plot_pane_finalize (GObject *object)
{
  LwPlotPane *self = LW_PLOT_PANE (object);

  g_clear_pointer (&self->plot, lw_plot_free);
  g_clear_pointer (&self->cache, cairo_surface_destroy);
  g_free (self->message);
  G_OBJECT_CLASS (lw_plot_pane_parent_class)->finalize (object);
}

static void
lw_plot_pane_class_init (LwPlotPaneClass *klass)
{
  G_OBJECT_CLASS (klass)->finalize = lw_plot_pane_finalize;
  gtk_widget_class_set_css_name (GTK_WIDGET_CLASS (klass), "plotpane");
}

static void
lw_plot_pane_init (LwPlotPane *self)
{
  gtk_drawing_area_set_draw_func (GTK_DRAWING_AREA (self), draw, NULL, NULL);
  gtk_widget_set_hexpand (GTK_WIDGET (self), TRUE);
  gtk_widget_set_vexpand (GTK_WIDGET (self), TRUE);
  gtk_drawing_area_set_content_width (GTK_DRAWING_AREA (self), 320);
  gtk_drawing_area_set_content_height (GTK_DRAWING_AREA (self), 240);

  GtkEventController *m = gtk_event_controller_motion_new ();
  g_signal_connect (m, "motion", G_CALLBACK (motion), self);
  g_signal_connect (m, "leave", G_CALLBACK (leave), self);
  gtk_widget_add_controller (GTK_WIDGET (self), m);
}

LwPlotPane *
lw_plot_pane_new (LwPlotView view)
{
  LwPlotPane *self = g_object_new (LW_TYPE_PLOT_PANE, NULL);
  self->view = view;
  return self;
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
  g_return_if_fail (LW_IS_PLOT_PANE (self));

  g_clear_pointer (&self->plot, lw_plot_free);
  self->plot = plot;
  if (plot != NULL)
    lw_plot_set_theme (plot, self->theme);
  g_free (self->message);
  self->message = g_strdup (message);
  invalidate_cache (self);
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
  invalidate_cache (self);
}
