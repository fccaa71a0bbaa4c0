/* lw-details-dialog.c — title, author and notes of the design; see lw-details-dialog.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib/gi18n.h>

#include "lw-details-dialog.h"
#include "lw-gui-util.h"

struct _LwDetailsDialog
{
  GtkWindow parent_instance;

  LwDesignModel *model;
  GSignalGroup *model_signals;   /* the model's signals, following self->model */
  GtkEntry *title;
  GtkEntry *author;
  GtkTextView *notes;
  GtkLabel *problem;
  gboolean filling;
};

G_DEFINE_FINAL_TYPE (LwDetailsDialog, lw_details_dialog, GTK_TYPE_WINDOW)

/* Writes text into field unless it cannot be saved (then says why and keeps the last good
 * text in the design). */
static void
store (LwDetailsDialog *self, GtkWidget *widget, LwDesignTextField field, const char *text)
{
  const char *why = lw_design_text_problem (text);
  if (why != NULL)
    {
      gtk_widget_add_css_class (widget, "error");
      gtk_label_set_text (self->problem, why);
      gtk_widget_set_visible (GTK_WIDGET (self->problem), TRUE);
      return;
    }
  gtk_widget_remove_css_class (widget, "error");
  gtk_widget_set_visible (GTK_WIDGET (self->problem), FALSE);
  lw_design_model_set_text_field (self->model, field, text);
}

static void
title_changed (LwDetailsDialog *self)
{
  if (!self->filling)
    store (self, GTK_WIDGET (self->title), LW_DESIGN_TEXT_TITLE,
           gtk_editable_get_text (GTK_EDITABLE (self->title)));
}

static void
author_changed (LwDetailsDialog *self)
{
  if (!self->filling)
    store (self, GTK_WIDGET (self->author), LW_DESIGN_TEXT_AUTHOR,
           gtk_editable_get_text (GTK_EDITABLE (self->author)));
}

static void
notes_changed (LwDetailsDialog *self)
{
  if (self->filling)
    return;
  GtkTextBuffer *b = gtk_text_view_get_buffer (self->notes);
  GtkTextIter start, end;
  gtk_text_buffer_get_bounds (b, &start, &end);
  g_autofree char *text = gtk_text_buffer_get_text (b, &start, &end, FALSE);
  store (self, GTK_WIDGET (self->notes), LW_DESIGN_TEXT_NOTES, text);
}

/* Shows the model's words (on open, and when undo or open replaces the document). */
static void
fill (LwDetailsDialog *self)
{
  self->filling = TRUE;
  const char *t = lw_design_model_get_text_field (self->model, LW_DESIGN_TEXT_TITLE);
  const char *a = lw_design_model_get_text_field (self->model, LW_DESIGN_TEXT_AUTHOR);
  const char *n = lw_design_model_get_text_field (self->model, LW_DESIGN_TEXT_NOTES);
  if (g_strcmp0 (gtk_editable_get_text (GTK_EDITABLE (self->title)), t ? t : "") != 0)
    gtk_editable_set_text (GTK_EDITABLE (self->title), t ? t : "");
  if (g_strcmp0 (gtk_editable_get_text (GTK_EDITABLE (self->author)), a ? a : "") != 0)
    gtk_editable_set_text (GTK_EDITABLE (self->author), a ? a : "");
  GtkTextBuffer *b = gtk_text_view_get_buffer (self->notes);
  GtkTextIter start, end;
  gtk_text_buffer_get_bounds (b, &start, &end);
  g_autofree char *shown = gtk_text_buffer_get_text (b, &start, &end, FALSE);
  if (g_strcmp0 (shown, n ? n : "") != 0)
    gtk_text_buffer_set_text (b, n ? n : "", -1);
  self->filling = FALSE;
}

static void
lw_details_dialog_dispose (GObject *object)
{
  LwDetailsDialog *self = LW_DETAILS_DIALOG (object);
  g_clear_object (&self->model_signals);
  g_clear_object (&self->model);
  G_OBJECT_CLASS (lw_details_dialog_parent_class)->dispose (object);
}

static void
lw_details_dialog_class_init (LwDetailsDialogClass *klass)
{
  G_OBJECT_CLASS (klass)->dispose = lw_details_dialog_dispose;
  gtk_widget_class_add_binding_action (GTK_WIDGET_CLASS (klass), GDK_KEY_Escape, 0,
                                       "window.close", NULL);
}

static void
lw_details_dialog_init (LwDetailsDialog *self)
{
  (void) self;
}


LwDetailsDialog *
lw_details_dialog_new (GtkWindow *parent, LwDesignModel *model)
{
  LwDetailsDialog *self = g_object_new (LW_TYPE_DETAILS_DIALOG, "transient-for", parent,
                                        "modal", TRUE, "destroy-with-parent", TRUE,
                                        "default-width", 560, "default-height", 420,
                                        "title", _("Design Details"), NULL);
  self->model = g_object_ref (model);

  GtkWidget *grid = lw_gui_dialog_grid ();

  self->title = GTK_ENTRY (gtk_entry_new ());
  gtk_entry_set_placeholder_text (self->title, _("What the loop controls"));
  gtk_widget_set_hexpand (GTK_WIDGET (self->title), TRUE);
  self->author = GTK_ENTRY (gtk_entry_new ());
  self->notes = GTK_TEXT_VIEW (gtk_text_view_new ());
  gtk_text_view_set_wrap_mode (self->notes, GTK_WRAP_WORD_CHAR);
  GtkWidget *scroll = gtk_scrolled_window_new ();
  gtk_scrolled_window_set_child (GTK_SCROLLED_WINDOW (scroll), GTK_WIDGET (self->notes));
  gtk_widget_set_vexpand (scroll, TRUE);
  gtk_widget_add_css_class (scroll, "frame");

  gtk_grid_attach (GTK_GRID (grid), lw_gui_row_label (0.0f, 0.0f, _("_Title"), GTK_WIDGET (self->title)), 0, 0, 1, 1);
  gtk_grid_attach (GTK_GRID (grid), GTK_WIDGET (self->title), 1, 0, 1, 1);
  gtk_grid_attach (GTK_GRID (grid), lw_gui_row_label (0.0f, 0.0f, _("_Author"), GTK_WIDGET (self->author)), 0, 1, 1,
                   1);
  gtk_grid_attach (GTK_GRID (grid), GTK_WIDGET (self->author), 1, 1, 1, 1);
  gtk_grid_attach (GTK_GRID (grid), lw_gui_row_label (0.0f, 0.0f, _("_Notes"), GTK_WIDGET (self->notes)), 0, 2, 1, 1);
  gtk_grid_attach (GTK_GRID (grid), scroll, 1, 2, 1, 1);

  self->problem = GTK_LABEL (gtk_label_new (NULL));
  gtk_label_set_xalign (self->problem, 0.0);
  gtk_label_set_wrap (self->problem, TRUE);
  gtk_widget_add_css_class (GTK_WIDGET (self->problem), "error");
  gtk_widget_set_visible (GTK_WIDGET (self->problem), FALSE);
  gtk_grid_attach (GTK_GRID (grid), GTK_WIDGET (self->problem), 1, 3, 1, 1);

  GtkWidget *hint = gtk_label_new (_("Saved with the design and shown at the top of its "
                                     "report."));
  gtk_label_set_xalign (GTK_LABEL (hint), 0.0);
  gtk_label_set_wrap (GTK_LABEL (hint), TRUE);
  gtk_widget_add_css_class (hint, "dim-label");
  gtk_grid_attach (GTK_GRID (grid), hint, 1, 4, 1, 1);

  GtkWidget *close = gtk_button_new_with_mnemonic (_("_Close"));
  gtk_actionable_set_action_name (GTK_ACTIONABLE (close), "window.close");
  gtk_widget_set_halign (close, GTK_ALIGN_END);
  gtk_grid_attach (GTK_GRID (grid), close, 1, 5, 1, 1);
  gtk_window_set_child (GTK_WINDOW (self), grid);

  fill (self);
  g_signal_connect_swapped (self->title, "changed", G_CALLBACK (title_changed), self);
  g_signal_connect_swapped (self->author, "changed", G_CALLBACK (author_changed), self);
  g_signal_connect_swapped (gtk_text_view_get_buffer (self->notes), "changed",
                            G_CALLBACK (notes_changed), self);
  self->model_signals = g_signal_group_new (LW_TYPE_DESIGN_MODEL);
  g_signal_group_connect_swapped (self->model_signals, "replaced", G_CALLBACK (fill), self);
  g_signal_group_set_target (self->model_signals, model);
  return self;
}
