/* lw-plot-area-views.c — which view each pane of the plot area shows: the pane's menu of
 * every view (secondary button, Menu key, Shift+F10) with the display options above them
 * (phase range, Nyquist scale), one view in one pane at most, the arrangement by name (the
 * document's <view shows>), and the frequency axes that follow each other's zoom.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <stdio.h>

#include <glib/gi18n.h>

#include "lw-plot-area-private.h"

static gboolean
unparent_later (gpointer data)
{
  GtkWidget *popover = data;
  if (gtk_widget_get_parent (popover) != NULL)
    gtk_widget_unparent (popover);
  g_object_unref (popover);
  return G_SOURCE_REMOVE;
}

static void
menu_closed (GtkPopover *popover)
{
  g_idle_add (unparent_later, g_object_ref (popover));
}

/* For the window tests: the menu is on screen and takes the keys (printed when it is mapped,
 * not when it is asked for: a key sent before would reach the window under it) */
static void
menu_mapped (GtkWidget *popover)
{
  printf ("LW-PANE-MENU pane=%u\n",
          GPOINTER_TO_UINT (g_object_get_data (G_OBJECT (popover), "lw-pane-index")));
  fflush (stdout);
}

/* A menu of every view on the pane, to show one of them there. */
static void
pane_menu_open (LwPlotPane *pane, double x)
{
  guint index = GPOINTER_TO_UINT (g_object_get_data (G_OBJECT (pane), "lw-pane-index"));
  g_autoptr (GMenu) menu = g_menu_new ();
  g_autoptr (GMenu) section = g_menu_new ();
  for (int v = 0; v < LW_PLOT_N_VIEWS; v++)
    {
      g_autoptr (GMenuItem) item = g_menu_item_new (_(lw_plot_view_info ((LwPlotView) v)->menu_label),
                                                    NULL);
      g_menu_item_set_action_and_target (item, "area.pane-view", "(us)", index,
                                         lw_plot_view_name ((LwPlotView) v));
      g_menu_append_item (section, item);
    }
  /* the display options, above the views; every item has a mnemonic of its own */
  LwPlotArea *area = LW_PLOT_AREA (gtk_widget_get_ancestor (GTK_WIDGET (pane), LW_TYPE_PLOT_AREA));
  g_autoptr (GMenu) display = g_menu_new ();
  if (area != NULL)
    {
      if (area->phase_mode != 1)
        g_menu_append (display, _("_Whole Phase Range"), "area.display::phase-whole");
      if (area->phase_mode != 2)
        g_menu_append (display, _("Phase in One _Turn"), "area.display::phase-turn");
      if (area->phase_mode != 0)
        g_menu_append (display, _("_Phase around the Crossovers"), "area.display::phase-branch");
      g_menu_append (display, area->nyquist_compressed ? _("Linear N_yquist Scale")
                                                       : _("Compressed N_yquist Scale"),
                     "area.display::nyquist");
      g_menu_append_section (menu, NULL, G_MENU_MODEL (display));
    }
  g_menu_append_section (menu, NULL, G_MENU_MODEL (section));
  GtkWidget *popover = gtk_popover_menu_new_from_model (G_MENU_MODEL (menu));
  gtk_widget_set_parent (popover, GTK_WIDGET (pane));
  /* from the top of the pane, where the whole list has room */
  gtk_popover_set_pointing_to (GTK_POPOVER (popover), &(GdkRectangle) { (int) x, 8, 1, 1 });
  gtk_popover_set_has_arrow (GTK_POPOVER (popover), FALSE);
  g_signal_connect (popover, "closed", G_CALLBACK (menu_closed), NULL);
  if (g_strcmp0 (g_getenv ("LW_DEBUG_HANDLES"), "1") == 0)
    {
      g_object_set_data (G_OBJECT (popover), "lw-pane-index", GUINT_TO_POINTER (index));
      g_signal_connect (popover, "map", G_CALLBACK (menu_mapped), NULL);
    }
  gtk_popover_popup (GTK_POPOVER (popover));
}

/* The secondary button on a pane opens its menu of views */
void
lwpa_pane_menu_pressed (GtkGestureClick *gesture, int n_press, double x, double y, gpointer data)
{
  (void) y;
  gtk_gesture_set_state (GTK_GESTURE (gesture), GTK_EVENT_SEQUENCE_CLAIMED);
  pane_menu_open (LW_PLOT_PANE (data), x);
}

/* … and so do the Menu key and Shift+F10 while the pane has the focus */
gboolean
lwpa_pane_menu_key (GtkEventControllerKey *k, guint keyval, guint keycode, GdkModifierType state,
               gpointer data)
{
  if (keyval == GDK_KEY_Menu || (keyval == GDK_KEY_F10 && (state & GDK_SHIFT_MASK)))
    {
      GtkWidget *pane = GTK_WIDGET (data);
      pane_menu_open (LW_PLOT_PANE (pane), gtk_widget_get_width (pane) / 2.0);
      return TRUE;
    }
  return FALSE;
}

/* Shows view in pane index; a pane that showed it already takes the pane's old view, so
 * every view is in one pane at most. */
static gboolean
set_pane_view (LwPlotArea *self, guint index, LwPlotView view)
{
  if (index >= lwpa_n_area_views || lw_plot_view_info (view) == NULL || self->views[index] == view)
    return FALSE;
  LwPlotView old = self->views[index];
  for (guint i = 0; i < lwpa_n_area_views; i++)
    if (i != index && self->views[i] == view)
      {
        self->views[i] = old;
        lw_plot_pane_set_view (self->panes[i], old);
      }
  self->views[index] = view;
  lw_plot_pane_set_view (self->panes[index], view);
  lwpa_arrange (self);
  return TRUE;
}

void
lwpa_pane_view_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwPlotArea *self = LW_PLOT_AREA (widget);
  guint index = 0;
  const char *name = NULL;
  g_variant_get (param, "(u&s)", &index, &name);
  int view = lw_plot_view_from_name (name);
  if (view >= 0 && set_pane_view (self, index, (LwPlotView) view))
    g_signal_emit (self, lwpa_signals[LWPA_SIGNAL_VIEWS_CHANGED], 0);
}

/* A display option toggled from a pane's menu: every pane is drawn again by the window
 * ("display-changed"). */
void
lwpa_display_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwPlotArea *self = LW_PLOT_AREA (widget);
  const char *which = g_variant_get_string (param, NULL);
  if (g_strcmp0 (which, "phase-branch") == 0)
    self->phase_mode = 0;
  else if (g_strcmp0 (which, "phase-whole") == 0)
    self->phase_mode = 1;
  else if (g_strcmp0 (which, "phase-turn") == 0)
    self->phase_mode = 2;
  else if (g_strcmp0 (which, "nyquist") == 0)
    self->nyquist_compressed = !self->nyquist_compressed;
  else
    return;
  g_signal_emit (self, lwpa_signals[LWPA_SIGNAL_DISPLAY_CHANGED], 0);
}

guint
lw_plot_area_get_n_panes (LwPlotArea *self)
{
  g_return_val_if_fail (LW_IS_PLOT_AREA (self), 0);
  return lwpa_n_area_views;
}

LwPlotPane *
lw_plot_area_get_nth_pane (LwPlotArea *self, guint i)
{
  g_return_val_if_fail (LW_IS_PLOT_AREA (self), NULL);
  return i < lwpa_n_area_views ? self->panes[i] : NULL;
}

char **
lw_plot_area_get_views (LwPlotArea *self)
{
  g_return_val_if_fail (LW_IS_PLOT_AREA (self), NULL);
  char **names = g_new0 (char *, lwpa_n_area_views + 1);
  for (guint i = 0; i < lwpa_n_area_views; i++)
    names[i] = g_strdup (lw_plot_view_name (self->views[i]));
  return names;
}

gboolean
lw_plot_area_set_views (LwPlotArea *self, const char *const *names)
{
  g_return_val_if_fail (LW_IS_PLOT_AREA (self), FALSE);
  /* the panes in order take the known names in order (each once); the panes left take the
   * default views not named, in the default order */
  LwPlotView target[LW_PLOT_N_VIEWS];
  gboolean used[LW_PLOT_N_VIEWS] = { FALSE };
  guint k = 0;
  for (guint i = 0; names != NULL && names[i] != NULL && k < lwpa_n_area_views; i++)
    {
      int view = lw_plot_view_from_name (names[i]);
      if (view < 0 || used[view])
        continue;   /* a view of another version: kept in the document, not shown */
      target[k++] = (LwPlotView) view;
      used[view] = TRUE;
    }
  for (guint i = 0; i < lwpa_n_area_views && k < lwpa_n_area_views; i++)
    if (!used[lwpa_area_views[i]])
      {
        target[k++] = lwpa_area_views[i];
        used[lwpa_area_views[i]] = TRUE;
      }
  for (LwPlotView v = 0; v < LW_PLOT_N_VIEWS && k < lwpa_n_area_views; v++)
    if (!used[v])
      {
        target[k++] = v;
        used[v] = TRUE;
      }
  gboolean changed = FALSE;
  for (guint i = 0; i < lwpa_n_area_views; i++)
    if (self->views[i] != target[i])
      {
        self->views[i] = target[i];
        lw_plot_pane_set_view (self->panes[i], target[i]);
        changed = TRUE;
      }
  if (changed)
    lwpa_arrange (self);
  return changed;
}

/* The frequency range [lo, hi] of a pane of view `from` on the axis of view `to`: the same
 * on the same kind of axis, through ν = (2/T)·tan(ωT/2) from ω (z) to ν (w-plane) and back
 * (ω at most π/T); FALSE when either view has no frequency axis. */
static gboolean
map_range (LwPlotView from, LwPlotView to, double period_s, double *lo, double *hi)
{
  if (!lw_plot_view_has (from, LW_PLOT_VIEW_FREQUENCY_AXIS)
      || !lw_plot_view_has (to, LW_PLOT_VIEW_FREQUENCY_AXIS))
    return FALSE;
  gboolean w_from = lw_plot_view_has (from, LW_PLOT_VIEW_W_PLANE);
  gboolean w_to = lw_plot_view_has (to, LW_PLOT_VIEW_W_PLANE);
  if (w_from == w_to)
    return TRUE;
  if (!(period_s > 0.0))
    return FALSE;
  if (w_to)
    {
      double top = 0.999999 * G_PI / period_s;   /* tan(π/2) is the end of the ν axis */
      *lo = lw_warp_omega_to_nu (fmin (*lo, top), period_s);
      *hi = lw_warp_omega_to_nu (fmin (*hi, top), period_s);
    }
  else
    {
      *lo = lw_warp_nu_to_omega (*lo, period_s);
      *hi = lw_warp_nu_to_omega (*hi, period_s);
    }
  return *lo > 0.0 && *hi > *lo;
}

/* Zoom and pan: every pane with a frequency axis follows the one the user moved — the same
 * range on an axis of the same kind, mapped through the warping between ω and ν (so the z
 * and w views show the same stretch of the loop). */
void
lwpa_pane_view_changed (LwPlotPane *pane, double lo, double hi, LwPlotArea *self)
{
  if (self->linking)
    return;
  self->linking = TRUE;
  LwPlotView v = lw_plot_pane_get_view (pane);
  for (guint i = 0; i < lwpa_n_area_views + lwpa_n_split_views; i++)
    {
      gboolean split = i >= lwpa_n_area_views;
      LwPlotPane *other = split ? self->split_panes[i - lwpa_n_area_views] : self->panes[i];
      LwPlotView ov = split ? lwpa_split_views[i - lwpa_n_area_views] : self->views[i];
      double a = lo, b = hi;
      if (other != pane && other != NULL && map_range (v, ov, self->period_s, &a, &b))
        lw_plot_pane_set_x_view (other, a, b);
    }
  self->linking = FALSE;
}

guint
lwpa_with_measured (const LwPlotVariant *vars, guint n, const LwPlotVariant *measured, int view,
                    LwPlotVariant *out)
{
  n = MIN (n, LW_PLOT_MAX_VARIANTS);
  memcpy (out, vars, n * sizeof *vars);
  if (measured == NULL || n >= LW_PLOT_MAX_VARIANTS
      || (view >= 0 && !lw_figure_measured_view_ok (view)))
    return n;
  out[n] = *measured;
  /* the key then names the model's line too, when its variant goes unnamed */
  for (guint i = 0; i < n; i++)
    if (out[i].name == NULL)
      out[i].name = _("model");
  /* the first style none of the variants drawn has (they go by place in the document) */
  out[n].style = lw_figure_measured_style (vars, n);
  return n + 1;
}

/* The key's height for the variants it names at width, from a scratch surface. */
void
lwpa_key_measure (LwPlotArea *self, int width)
{
  if (self->key_n < 2 || width <= 0)
    return;
  cairo_surface_t *surf = cairo_image_surface_create (CAIRO_FORMAT_RGB24, 1, 1);
  cairo_t *cr = cairo_create (surf);
  double h = lw_plot_draw_key_strip (cr, self->theme, (const char *const *) self->key_names,
                                     self->key_styles, self->key_n, self->key_active, width);
  cairo_destroy (cr);
  cairo_surface_destroy (surf);
  int hi = (int) ceil (h);
  if (gtk_drawing_area_get_content_height (self->key) != hi)
    gtk_drawing_area_set_content_height (self->key, hi);
}

void
lwpa_key_resized (GtkDrawingArea *area, int width, int height, LwPlotArea *self)
{
  lwpa_key_measure (self, width);
}

void
lwpa_key_draw (GtkDrawingArea *area, cairo_t *cr, int width, int height, gpointer user_data)
{
  LwPlotArea *self = user_data;
  lw_plot_draw_key_strip (cr, self->theme, (const char *const *) self->key_names,
                          self->key_styles, self->key_n, self->key_active, width);
}

/* The key names the variants drawn (shown for two and more). */
void
lwpa_set_key (LwPlotArea *self, const LwPlotVariant *vars, guint n, guint active)
{
  gboolean same = n == self->key_n && active == self->key_active;
  for (guint i = 0; i < n && same; i++)
    same = g_strcmp0 (vars[i].name, self->key_names[i]) == 0
           && vars[i].style == self->key_styles[i];
  if (same)
    return;
  for (guint i = 0; i < LW_PLOT_MAX_VARIANTS; i++)
    g_clear_pointer (&self->key_names[i], g_free);
  for (guint i = 0; i < n; i++)
    {
      self->key_names[i] = g_strdup (vars[i].name);
      self->key_styles[i] = vars[i].style;
    }
  self->key_n = n;
  self->key_active = active;
  gtk_widget_set_visible (GTK_WIDGET (self->key), n >= 2);
  lwpa_key_measure (self, gtk_widget_get_width (GTK_WIDGET (self->key)));
  gtk_widget_queue_draw (GTK_WIDGET (self->key));
}
