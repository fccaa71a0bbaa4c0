/* lw-window-drag.c — the drag handles on the Bode views and their keyboard moves.
 *
 * Dragging (Bode views, magnitude panel): a corner handle moves its corner horizontally, by
 * the ratio of the pointer's frequency to the frequency where the drag started (so grabbing
 * beside a handle does not make it jump); with Shift the whole stage moves keeping its ratios
 * (lw_stage_corner_set keep_ratio: a lead's or lag's pair keeps α).  On the Bode view in z
 * the pointer's ω is warped to ν = (2/T)·tan(ωT/2) first.  A gain handle moves vertically:
 * the gain is multiplied by the pointer's change in dB.  Escape cancels a drag (the stage as
 * it was before).  One drag is one undo step: the history is held from its start to its end.
 * Keyboard: F7 / Shift+F7 select the next / previous handle (and focus the w-plane Bode
 * view); with a Bode view focused, Right/Up move the selected corner or gain up by a factor
 * of 1.02 and Left/Down down (1.2 with Ctrl).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>

#include <glib/gi18n.h>

#include "lw-window-private.h"

#define KEY_STEP 1.02
#define KEY_STEP_BIG 1.2

static double
pane_x_to_nu (LwWindow *self, LwPlotPane *pane, double x)
{
  double period = lw_design_model_get_active_period_s (self->model);
  if (lw_plot_view_has (lw_plot_pane_get_view (pane), LW_PLOT_VIEW_W_PLANE))
    return x;
  double omax = G_PI / period * (1.0 - 1e-9);
  return lw_warp_omega_to_nu (CLAMP (x, 1e-12, omax), period);
}

static void
set_drag_label (LwWindow *self, const LwStage *s)
{
  g_autofree char *text = NULL;
  double period = lw_design_model_get_active_period_s (self->model);
  if (self->drag_corner < 0)
    text = g_strdup_printf (_("gain %.4g (%+.2f dB)"), s->p.gain.ratio,
                            20.0 * log10 (fabs (s->p.gain.ratio)));
  else
    {
      double nu = 0;
      LwHandleKind kind;
      lw_stage_corner_get (s, (size_t) self->drag_corner, &nu, &kind, NULL);
      if (lw_plot_view_has (lw_plot_pane_get_view (self->drag_pane), LW_PLOT_VIEW_W_PLANE))
        text = g_strdup_printf (_("ν = %.4g rad/s"), nu);
      else
        text = g_strdup_printf (_("ω = %.4g rad/s (ν = %.4g rad/s)"),
                                lw_warp_nu_to_omega (nu, period), nu);
    }
  lw_plot_pane_set_drag_label (self->drag_pane, text);
}

void
lw_window_begin_drag (LwWindow *self, LwPlotPane *pane, guint stage, int corner, double x,
                      double y_db)
{
  lw_history_commit (self->history);
  self->dragging = TRUE;
  lw_history_hold (self->history, TRUE);
  self->drag_pane = pane;
  self->drag_stage = stage;
  self->drag_corner = corner;
  self->drag_start_stage = *lw_design_model_get_stage (self->model, stage);
  self->drag_start_x = x;
  self->drag_start_y_db = y_db;
  self->sel_stage = (int) stage;
  self->sel_corner = corner;
  if (corner < 0)
    self->gain_pin_nu = pane_x_to_nu (self, pane, x);
  set_drag_label (self, &self->drag_start_stage);
}

/* The pointer is at (x, y_db) of the drag pane's magnitude panel. */
void
lw_window_update_drag (LwWindow *self, double x, double y_db, gboolean keep_ratio)
{
  LwStage s = self->drag_start_stage;
  if (self->drag_corner < 0)
    {
      if (s.kind != LW_STAGE_GAIN)
        return;
      s.p.gain.ratio = self->drag_start_stage.p.gain.ratio
                       * pow (10.0, (y_db - self->drag_start_y_db) / 20.0);
    }
  else
    {
      double nu0 = 0;
      LwHandleKind kind;
      if (lw_stage_corner_get (&s, (size_t) self->drag_corner, &nu0, &kind, NULL) != LW_OK)
        return;
      double nu;
      if (lw_plot_view_has (lw_plot_pane_get_view (self->drag_pane), LW_PLOT_VIEW_W_PLANE))
        nu = nu0 * x / self->drag_start_x;
      else
        {
          double period = lw_design_model_get_active_period_s (self->model);
          double w0 = lw_warp_nu_to_omega (nu0, period);
          nu = pane_x_to_nu (self, self->drag_pane, w0 * x / self->drag_start_x);
        }
      if (lw_stage_corner_set (&s, (size_t) self->drag_corner, nu, keep_ratio, NULL) != LW_OK)
        return;   /* refused (a lead would stop being a lead): stay where it was */
    }
  lw_design_model_set_stage (self->model, self->drag_stage, &s);
  set_drag_label (self, &s);
}

void
lw_window_end_drag (LwWindow *self, gboolean cancel)
{
  if (!self->dragging)
    return;
  if (cancel)
    {
      lw_design_model_set_stage (self->model, self->drag_stage, &self->drag_start_stage);
      lw_plot_pane_cancel_drag (self->drag_pane);
    }
  self->dragging = FALSE;
  self->gain_pin_nu = 0;
  lw_plot_pane_set_drag_label (self->drag_pane, NULL);
  self->drag_pane = NULL;
  lw_history_hold (self->history, FALSE);
  lw_history_commit (self->history);
  lw_window_schedule_eval (self);
}

static void
pane_drag_begin (LwPlotPane *pane, guint index, double x, double y_db, LwWindow *self)
{
  const LwPaneHandle *h = lw_plot_pane_get_handle (pane, index);
  if (h == NULL || h->stage >= lw_design_model_get_n_stages (self->model))
    return;
  lw_window_begin_drag (self, pane, h->stage, h->corner, x, y_db);
}

static void
pane_drag_update (LwPlotPane *pane, guint index, double x, double y_db, guint mods,
                  LwWindow *self)
{
  if (!self->dragging || pane != self->drag_pane)
    return;
  lw_window_update_drag (self, x, y_db, (mods & GDK_SHIFT_MASK) != 0);
}

static void
pane_drag_end (LwPlotPane *pane, LwWindow *self)
{
  if (self->dragging && pane == self->drag_pane)
    lw_window_end_drag (self, FALSE);
}

static gboolean
window_key_pressed (GtkEventControllerKey *c, guint keyval, guint keycode,
                    GdkModifierType state, LwWindow *self)
{
  if (keyval == GDK_KEY_Escape && self->dragging)
    {
      lw_window_end_drag (self, TRUE);
      return TRUE;
    }
  return FALSE;
}

/* The first pane of the window with handles over ν (the w-plane): its order of the handles
 * is the one the keyboard walks. */
static LwPlotPane *
handle_pane (LwWindow *self)
{
  for (int v = 0; v < LW_PLOT_N_VIEWS; v++)
    if (lw_plot_view_has ((LwPlotView) v, LW_PLOT_VIEW_HANDLES | LW_PLOT_VIEW_W_PLANE
                                          | LW_PLOT_VIEW_IN_WINDOW))
      return lw_plot_area_get_pane (self->plot_area, (LwPlotView) v);
  return NULL;
}

/* Handles in the order the w-plane view lists them. */
static void
select_handle (LwWindow *self, int delta)
{
  LwPlotPane *pane = handle_pane (self);
  guint n = pane != NULL ? lw_plot_pane_get_n_handles (pane) : 0;
  if (n == 0 || self->dragging)
    return;
  int cur = -1;
  for (guint i = 0; i < n; i++)
    {
      const LwPaneHandle *h = lw_plot_pane_get_handle (pane, i);
      if ((int) h->stage == self->sel_stage && h->corner == self->sel_corner)
        cur = (int) i;
    }
  int next = cur < 0 ? (delta > 0 ? 0 : (int) n - 1) : ((cur + delta) % (int) n + (int) n) % (int) n;
  const LwPaneHandle *h = lw_plot_pane_get_handle (pane, (guint) next);
  self->sel_stage = (int) h->stage;
  self->sel_corner = h->corner;
  gtk_widget_grab_focus (GTK_WIDGET (pane));
  lw_window_show_variants (self);
}

static void
next_handle_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  select_handle (LW_WINDOW (widget), +1);
}

static void
previous_handle_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  select_handle (LW_WINDOW (widget), -1);
}

/* Moves the selected handle by factor (corner frequency or gain ratio). */
static void
nudge_selected (LwWindow *self, double factor)
{
  if (self->sel_stage < 0 || (guint) self->sel_stage >= lw_design_model_get_n_stages (self->model))
    return;
  LwStage s = *lw_design_model_get_stage (self->model, (guint) self->sel_stage);
  if (self->sel_corner < 0)
    {
      if (s.kind != LW_STAGE_GAIN)
        return;
      s.p.gain.ratio *= factor;
    }
  else
    {
      double nu;
      LwHandleKind kind;
      if (lw_stage_corner_get (&s, (size_t) self->sel_corner, &nu, &kind, NULL) != LW_OK
          || lw_stage_corner_set (&s, (size_t) self->sel_corner, nu * factor, FALSE, NULL)
               != LW_OK)
        return;
    }
  lw_design_model_set_stage (self->model, (guint) self->sel_stage, &s);
}

static gboolean
pane_key_pressed (GtkEventControllerKey *c, guint keyval, guint keycode, GdkModifierType state,
                  LwWindow *self)
{
  double step = (state & GDK_CONTROL_MASK) ? KEY_STEP_BIG : KEY_STEP;
  switch (keyval)
    {
    case GDK_KEY_Right:
    case GDK_KEY_Up:
    case GDK_KEY_KP_Right:
    case GDK_KEY_KP_Up:
      nudge_selected (self, step);
      return self->sel_stage >= 0;
    case GDK_KEY_Left:
    case GDK_KEY_Down:
    case GDK_KEY_KP_Left:
    case GDK_KEY_KP_Down:
      nudge_selected (self, 1.0 / step);
      return self->sel_stage >= 0;
    default:
      return FALSE;
    }
}

static void
connect_pane (LwWindow *self, LwPlotPane *pane)
{
  g_signal_connect (pane, "handle-drag-begin", G_CALLBACK (pane_drag_begin), self);
  g_signal_connect (pane, "handle-drag-update", G_CALLBACK (pane_drag_update), self);
  g_signal_connect (pane, "handle-drag-end", G_CALLBACK (pane_drag_end), self);
  GtkEventController *k = gtk_event_controller_key_new ();
  g_signal_connect (k, "key-pressed", G_CALLBACK (pane_key_pressed), self);
  gtk_widget_add_controller (GTK_WIDGET (pane), k);
}

void
lw_window_class_init_drag (GtkWidgetClass *widget_class)
{
  gtk_widget_class_install_action (widget_class, "window.next-handle", NULL,
                                   next_handle_activated);
  gtk_widget_class_install_action (widget_class, "window.previous-handle", NULL,
                                   previous_handle_activated);
}

void
lw_window_init_drag (LwWindow *self)
{
  /* every pane of the grid: whichever shows a view with handles carries them */
  for (guint i = 0; i < lw_plot_area_get_n_panes (self->plot_area); i++)
    connect_pane (self, lw_plot_area_get_nth_pane (self->plot_area, i));

  GtkEventController *k = gtk_event_controller_key_new ();
  gtk_event_controller_set_propagation_phase (k, GTK_PHASE_CAPTURE);
  g_signal_connect (k, "key-pressed", G_CALLBACK (window_key_pressed), self);
  gtk_widget_add_controller (GTK_WIDGET (self), k);
}
