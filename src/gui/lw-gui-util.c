/* lw-gui-util.c — small helpers the panels share.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-gui-util.h"

static char *
format_model (const LwModel *m)
{
  g_return_val_if_fail (m != NULL, NULL);
  size_t need = lw_model_format (m, 6, NULL, 0);
  char *text = g_malloc (need + 1);
  lw_model_format (m, 6, text, need + 1);
  return text;
}

void
lw_gui_label_show_model (GtkLabel *label, const char *prefix, const LwModel *m)
{
  g_return_if_fail (GTK_IS_LABEL (label));
  if (m == NULL)
    {
      gtk_label_set_text (label, "");
      return;
    }
  g_autofree char *text = format_model (m);
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
