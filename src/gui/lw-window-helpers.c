/* lw-window-helpers.c — the formula helpers in the window: window.helper("NAME") opens the
 * helper's dialog (lw-helper-dialog.h) on the active variant, and its Apply puts the proposal
 * into the design as one undo step; window.details opens the design's title, author and notes
 * (lw-details-dialog.h); window.implementation (Ctrl+I) the active variant's C code and
 * coefficients (lw-implementation-dialog.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib/gi18n.h>

#include "lw-details-dialog.h"
#include "lw-helper-dialog.h"
#include "lw-implementation-dialog.h"
#include "lw-window-private.h"

static void
proposal_applied (LwWindow *self, const LwProposal *p)
{
  const LwDesign *d = lw_design_model_get_design (self->model);
  guint active = lw_design_model_get_active (self->model);
  /* what was typed before stays a step of its own; the proposal is one step */
  lw_history_commit (self->history);
  lw_design_model_replace (self->model, lw_proposal_apply (d, active, p));
  lw_history_commit (self->history);
  if (self->debug)
    g_printerr ("helper-applied %s stages=%zu replaces=%d\n", lw_helper_name (p->kind),
                p->n_stages, p->replaces);
}

static void
helper_activated (GtkWidget *widget, const char *action_name, GVariant *parameter)
{
  (void) action_name;
  LwWindow *self = LW_WINDOW (widget);
  LwHelperKind kind;
  if (self->dragging || !lw_helper_from_name (g_variant_get_string (parameter, NULL), &kind))
    return;
  lw_history_commit (self->history);
  LwHelperDialog *dialog
    = lw_helper_dialog_new (GTK_WINDOW (self), kind, lw_design_model_get_design (self->model),
                            lw_design_model_get_active (self->model),
                            lw_design_model_get_plant_cache (self->model));
  g_signal_connect_object (dialog, "apply", G_CALLBACK (proposal_applied), self,
                           G_CONNECT_SWAPPED);
  if (self->debug)
    {
      const LwProposal *p = lw_helper_dialog_get_proposal (dialog);
      g_printerr ("helper-open %s proposal=%d\n", lw_helper_name (kind), p != NULL);
    }
  gtk_window_present (GTK_WINDOW (dialog));
}

static void
details_activated (GtkWidget *widget, const char *action_name, GVariant *parameter)
{
  (void) action_name, (void) parameter;
  LwWindow *self = LW_WINDOW (widget);
  lw_history_commit (self->history);
  gtk_window_present (GTK_WINDOW (lw_details_dialog_new (GTK_WINDOW (self), self->model)));
}

static void
implementation_activated (GtkWidget *widget, const char *action_name, GVariant *parameter)
{
  (void) action_name, (void) parameter;
  LwWindow *self = LW_WINDOW (widget);
  g_autoptr (GError) error = NULL;
  if (self->eval == NULL || !lw_variant_eval_ok (self->eval, &error))
    {
      GtkWidget *d = gtk_message_dialog_new (GTK_WINDOW (self), GTK_DIALOG_MODAL,
                                             GTK_MESSAGE_INFO, GTK_BUTTONS_CLOSE, "%s",
                                             _("The active variant has no evaluated loop yet"));
      gtk_message_dialog_format_secondary_text (GTK_MESSAGE_DIALOG (d), "%s",
                                                error != NULL ? error->message
                                                : _("Wait for the evaluation to finish."));
      g_signal_connect (d, "response", G_CALLBACK (gtk_window_destroy), NULL);
      gtk_window_present (GTK_WINDOW (d));
      return;
    }
  guint active = lw_design_model_get_active (self->model);
  LwImplementationDialog *dialog
    = lw_implementation_dialog_new (GTK_WINDOW (self), self->eval,
                                    lw_design_model_get_variant_name (self->model, active),
                                    lw_window_get_settings (self));
  if (self->debug)
    g_printerr ("implementation-open\n");
  gtk_window_present (GTK_WINDOW (dialog));
}

void
lw_window_class_init_helpers (GtkWidgetClass *widget_class)
{
  gtk_widget_class_install_action (widget_class, "window.helper", "s", helper_activated);
  gtk_widget_class_install_action (widget_class, "window.details", NULL, details_activated);
  gtk_widget_class_install_action (widget_class, "window.implementation", NULL,
                                   implementation_activated);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_i, GDK_CONTROL_MASK,
                                       "window.implementation", NULL);
  /* Alt+Return, the usual key for the properties of what is open (Ctrl+Shift+D is GTK's
   * inspector) */
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_Return, GDK_ALT_MASK,
                                       "window.details", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_m, GDK_CONTROL_MASK, "window.helper",
                                       "s", "meet");
}
