/* lw-gui-util.c — small helpers the panels share.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib/gi18n.h>

#include "lw-engine.h"
#include "lw-gui-util.h"
#include "lw-number-field.h"

void
lw_gui_label_show_model (GtkLabel *label, const char *prefix, const LwModel *m)
{
  g_return_if_fail (GTK_IS_LABEL (label));
  if (m == NULL)
    {
      gtk_label_set_text (label, "");
      return;
    }
  g_autofree char *text = lw_model_text (m);
  g_autofree char *line = g_strdup_printf ("%s = %s", prefix, text);
  gtk_label_set_text (label, line);
}

void
lw_gui_set_tooltip (GtkWidget *widget, const char *text)
{
  g_return_if_fail (GTK_IS_WIDGET (widget));
  if (g_strcmp0 (gtk_widget_get_tooltip_text (widget), text) != 0)
    gtk_widget_set_tooltip_text (widget, text);
}

void
lw_gui_spin_wheel_off (GtkSpinButton *spin)
{
  g_return_if_fail (GTK_IS_SPIN_BUTTON (spin));
  GListModel *cs = gtk_widget_observe_controllers (GTK_WIDGET (spin));
  for (guint i = 0; i < g_list_model_get_n_items (cs); i++)
    {
      GObject *c = g_list_model_get_item (cs, i);
      /* a scroll controller with no direction passes every scroll event on (to the
       * scrolled window around the panels) */
      if (GTK_IS_EVENT_CONTROLLER_SCROLL (c))
        gtk_event_controller_scroll_set_flags (GTK_EVENT_CONTROLLER_SCROLL (c),
                                               GTK_EVENT_CONTROLLER_SCROLL_NONE);
      g_object_unref (c);
    }
  g_object_unref (cs);
}

static const char *
requirement_kind_words (LwReqKind kind)
{
  switch (kind)
    {
    case LW_REQ_MIN_PHASE_MARGIN: return _("Phase margin");
    case LW_REQ_MIN_GAIN_MARGIN: return _("Gain margin");
    case LW_REQ_MAX_SENSITIVITY: return _("Sensitivity peak");
    case LW_REQ_CROSSOVER_RANGE: return _("Crossover");
    case LW_REQ_MAX_STEP_ERROR: return _("Step error");
    case LW_REQ_MAX_RAMP_ERROR: return _("Ramp error");
    case LW_REQ_MAX_OVERSHOOT: return _("Overshoot");
    case LW_REQ_MAX_RISE_TIME: return _("Rise time");
    case LW_REQ_MAX_SETTLING_TIME: return _("Settling time");
    case LW_REQ_MAX_ACTUATOR: return _("Actuator peak");
    }
  return _("Requirement");
}

char *
lw_gui_requirement_title (const LwDesignRequirement *r)
{
  if (r->name != NULL && r->name[0] != '\0')
    return g_strdup (r->name);
  g_autofree char *target = lw_requirement_target_text (&r->req);
  return g_strdup_printf ("%s %s", requirement_kind_words (r->req.kind), target);
}

GtkWidget *
lw_gui_dialog_grid (void)
{
  GtkWidget *grid = gtk_grid_new ();
  gtk_grid_set_row_spacing (GTK_GRID (grid), 8);
  gtk_grid_set_column_spacing (GTK_GRID (grid), 12);
  gtk_widget_set_margin_start (grid, 18);
  gtk_widget_set_margin_end (grid, 18);
  gtk_widget_set_margin_top (grid, 18);
  gtk_widget_set_margin_bottom (grid, 18);
  return grid;
}

GtkWidget *
lw_gui_row_label (float xalign, float yalign, const char *mnemonic, GtkWidget *target)
{
  GtkWidget *l = gtk_label_new_with_mnemonic (mnemonic);
  gtk_label_set_xalign (GTK_LABEL (l), xalign);
  gtk_label_set_yalign (GTK_LABEL (l), yalign);
  gtk_label_set_mnemonic_widget (GTK_LABEL (l), target);
  return l;
}

GtkLabel *
lw_gui_problem_label_new (void)
{
  GtkLabel *l = GTK_LABEL (gtk_label_new (NULL));
  gtk_label_set_xalign (l, 0.0f);
  gtk_label_set_wrap (l, TRUE);
  gtk_label_set_wrap_mode (l, PANGO_WRAP_WORD_CHAR);
  gtk_label_set_width_chars (l, 20);
  gtk_label_set_max_width_chars (l, 40);
  gtk_widget_add_css_class (GTK_WIDGET (l), "error");
  gtk_widget_set_visible (GTK_WIDGET (l), FALSE);
  return l;
}

void
lw_gui_show_refusal (GtkLabel *problem, const char *field, const char *why)
{
  if (why == NULL)
    {
      gtk_widget_set_visible (GTK_WIDGET (problem), FALSE);
      return;
    }
  /* TRANSLATORS: the field (e.g. "K range"), then why its value is refused */
  g_autofree char *msg = g_strdup_printf (_("%s: %s; not taken."), field, why);
  gtk_label_set_text (problem, msg);
  gtk_widget_set_visible (GTK_WIDGET (problem), TRUE);
  lw_number_field_debug_refusal (field, why);
}

gboolean
lw_gui_take_if_changed (char **last, char *now)
{
  if (g_strcmp0 (now, *last) == 0)
    {
      g_free (now);
      return FALSE;
    }
  g_free (*last);
  *last = now;
  return TRUE;
}

void
lw_gui_history_step (GtkWidget *widget)
{
  gtk_widget_activate_action (widget, "window.history-commit", NULL);
}
