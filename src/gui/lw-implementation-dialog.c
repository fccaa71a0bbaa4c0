/* lw-implementation-dialog.c — the controller as firmware takes it (lw-implementation-dialog.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib/gi18n.h>

#include "lw-gui-util.h"
#include "lw-implementation-dialog.h"
#include "lw-implementation.h"

struct _LwImplementationDialog
{
  GtkWindow parent_instance;

  LwVariantEval *eval;
  GSettings *settings;
  LwImplementation *im;          /* what the fields ask for, or NULL */

  GtkDropDown *form;
  GtkCheckButton *fixed;
  GtkEntry *qformat;
  GtkEntry *prefix;
  GtkLabel *problem;
  GtkTextView *text;
  GtkLabel *status;
  GtkWidget *copy;
  GtkWidget *save;
  GtkFileChooserNative *chooser;
};

G_DEFINE_FINAL_TYPE (LwImplementationDialog, lw_implementation_dialog, GTK_TYPE_WINDOW)

static gboolean
debugging (void)
{
  return g_strcmp0 (g_getenv ("LW_DEBUG_HANDLES"), "1") == 0;
}

static void
set_problem (LwImplementationDialog *self, const char *text)
{
  gtk_label_set_text (self->problem, text != NULL ? text : "");
  gtk_widget_set_visible (GTK_WIDGET (self->problem), text != NULL);
}

/* A field's text with its refused character marked: "Q2.x (character 4): message". */
static char *
field_problem (const char *field, const char *text, const LwError *err)
{
  if (err->position >= 0)
    /* TRANSLATORS: field name, its text, the 1-based character position, the message */
    return g_strdup_printf (_("%s “%s”, character %d: %s"), field, text, err->position + 1,
                            err->message);
  return g_strdup_printf (_("%s “%s”: %s"), field, text, err->message);
}

static void
refresh (LwImplementationDialog *self)
{
  g_clear_pointer (&self->im, lw_implementation_free);
  gboolean sections = gtk_drop_down_get_selected (self->form) == 1;
  gtk_widget_set_sensitive (GTK_WIDGET (self->fixed), sections);
  gboolean fixed = sections && gtk_check_button_get_active (self->fixed);
  gtk_widget_set_sensitive (GTK_WIDGET (self->qformat), fixed);
  gtk_widget_set_sensitive (self->copy, FALSE);
  gtk_widget_set_sensitive (self->save, FALSE);

  LwImplOptions o = { .form = sections ? LW_FORM_SECTIONS : LW_FORM_DIFFERENCE, .fixed = fixed };
  LwError err;
  lw_error_clear (&err);
  const char *qtext = gtk_editable_get_text (GTK_EDITABLE (self->qformat));
  const char *ptext = gtk_editable_get_text (GTK_EDITABLE (self->prefix));
  if (fixed && lw_qformat_parse (qtext, &o.q, &err) != LW_OK)
    {
      g_autofree char *msg = field_problem (_("Fixed-point format"), qtext, &err);
      set_problem (self, msg);
      return;
    }
  lw_error_clear (&err);
  if (lw_emit_prefix_check (ptext, &err) != LW_OK)
    {
      g_autofree char *msg = field_problem (_("Name prefix"), ptext, &err);
      set_problem (self, msg);
      return;
    }
  o.prefix = ptext;
  g_autoptr (GError) error = NULL;
  self->im = lw_implementation_make (self->eval, &o, NULL, &error);
  if (self->im == NULL)
    {
      set_problem (self, error->message);
      gtk_text_buffer_set_text (gtk_text_view_get_buffer (self->text), "", -1);
      return;
    }
  set_problem (self, NULL);
  g_autofree char *words = lw_implementation_describe (self->im);
  gtk_text_buffer_set_text (gtk_text_view_get_buffer (self->text),
                            words[0] == '\n' ? words + 1 : words, -1);
  gtk_widget_set_sensitive (self->copy, TRUE);
  gtk_widget_set_sensitive (self->save, TRUE);
}

static void
copy_clicked (LwImplementationDialog *self)
{
  if (self->im == NULL)
    return;
  g_autofree char *words = lw_implementation_describe (self->im);
  gdk_clipboard_set_text (gtk_widget_get_clipboard (GTK_WIDGET (self)),
                          words[0] == '\n' ? words + 1 : words);
  gtk_label_set_text (self->status, _("Copied the coefficients and sections."));
}

static void
write_to (LwImplementationDialog *self, const char *dir)
{
  g_autoptr (GError) error = NULL;
  g_autofree char *hpath = NULL, *cpath = NULL;
  if (self->im == NULL)
    return;
  if (!lw_implementation_write (self->im, dir, &hpath, &cpath, &error))
    {
      /* TRANSLATORS: the reason; both files are written or neither */
      g_autofree char *msg = g_strdup_printf (_("Not saved: %s. Neither file was changed."),
                                              error->message);
      set_problem (self, msg);
      gtk_label_set_text (self->status, "");
      if (debugging ())
        g_printerr ("implementation-save-failed %s\n", error->message);
      return;
    }
  set_problem (self, NULL);
  g_autofree char *msg = g_strdup_printf (_("Wrote %s and %s."), hpath, cpath);
  gtk_label_set_text (self->status, msg);
  GtkWindow *parent = gtk_window_get_transient_for (GTK_WINDOW (self));
  if (parent != NULL)
    gtk_widget_activate_action (GTK_WIDGET (parent), "window.notify", "s", msg);
  if (self->settings != NULL)
    g_settings_set_string (self->settings, "last-folder", dir);
  if (debugging ())
    g_printerr ("implementation-saved %s %s\n", hpath, cpath);
}

static void
chooser_response (LwImplementationDialog *self, int response, GtkNativeDialog *native)
{
  if (response == GTK_RESPONSE_ACCEPT)
    {
      g_autoptr (GFile) dir = gtk_file_chooser_get_file (GTK_FILE_CHOOSER (native));
      const char *path = dir != NULL ? g_file_peek_path (dir) : NULL;
      if (path != NULL)
        write_to (self, path);
      else
        set_problem (self, _("Only local folders can be written."));
    }
  g_clear_object (&self->chooser);
}

static void
save_clicked (LwImplementationDialog *self)
{
  const char *test_dir = g_getenv ("LW_TEST_CODE_DIR");
  if (test_dir != NULL && *test_dir != '\0')
    {
      write_to (self, test_dir);
      return;
    }
  if (self->chooser != NULL)
    return;
  self->chooser = gtk_file_chooser_native_new (_("Save C Code into a Folder"), GTK_WINDOW (self),
                                               GTK_FILE_CHOOSER_ACTION_SELECT_FOLDER, _("_Save"),
                                               _("_Cancel"));
  gtk_native_dialog_set_modal (GTK_NATIVE_DIALOG (self->chooser), TRUE);
  if (self->settings != NULL)
    {
      g_autofree char *last = g_settings_get_string (self->settings, "last-folder");
      if (last != NULL && *last != '\0' && g_file_test (last, G_FILE_TEST_IS_DIR))
        {
          g_autoptr (GFile) f = g_file_new_for_path (last);
          gtk_file_chooser_set_current_folder (GTK_FILE_CHOOSER (self->chooser), f, NULL);
        }
    }
  g_signal_connect_swapped (self->chooser, "response", G_CALLBACK (chooser_response), self);
  gtk_native_dialog_show (GTK_NATIVE_DIALOG (self->chooser));
}

static void
lw_implementation_dialog_dispose (GObject *object)
{
  LwImplementationDialog *self = LW_IMPLEMENTATION_DIALOG (object);
  if (self->chooser != NULL)
    gtk_native_dialog_destroy (GTK_NATIVE_DIALOG (self->chooser));
  g_clear_object (&self->chooser);
  g_clear_pointer (&self->im, lw_implementation_free);
  g_clear_pointer (&self->eval, lw_variant_eval_unref);
  g_clear_object (&self->settings);
  G_OBJECT_CLASS (lw_implementation_dialog_parent_class)->dispose (object);
}

static void
lw_implementation_dialog_class_init (LwImplementationDialogClass *klass)
{
  G_OBJECT_CLASS (klass)->dispose = lw_implementation_dialog_dispose;
  gtk_widget_class_add_binding_action (GTK_WIDGET_CLASS (klass), GDK_KEY_Escape, 0,
                                       "window.close", NULL);
}

static void
lw_implementation_dialog_init (LwImplementationDialog *self)
{
  (void) self;
}


LwImplementationDialog *
lw_implementation_dialog_new (GtkWindow *parent, LwVariantEval *eval, const char *variant_name,
                              GSettings *settings)
{
  g_return_val_if_fail (eval != NULL, NULL);
  /* TRANSLATORS: the variant's name */
  g_autofree char *title = g_strdup_printf (_("C Code and Coefficients — %s"),
                                            variant_name != NULL ? variant_name : "");
  LwImplementationDialog *self = g_object_new (LW_TYPE_IMPLEMENTATION_DIALOG,
                                               "transient-for", parent,
                                               "destroy-with-parent", TRUE,
                                               "default-width", 900, "default-height", 640,
                                               "title", title, NULL);
  self->eval = lw_variant_eval_ref (eval);
  self->settings = settings != NULL ? g_object_ref (settings) : NULL;

  GtkWidget *grid = lw_gui_dialog_grid ();

  const char *forms[] = { N_("Difference equation (direct form I)"),
                          N_("Second-order sections (cascade)"), NULL };
  const char *translated[] = { _(forms[0]), _(forms[1]), NULL };
  self->form = GTK_DROP_DOWN (gtk_drop_down_new_from_strings (translated));
  gtk_drop_down_set_selected (self->form, 1);
  self->fixed = GTK_CHECK_BUTTON (gtk_check_button_new_with_mnemonic (_("_Fixed point, format")));
  self->qformat = GTK_ENTRY (gtk_entry_new ());
  gtk_editable_set_text (GTK_EDITABLE (self->qformat), "Q2.13");
  gtk_editable_set_width_chars (GTK_EDITABLE (self->qformat), 8);
  self->prefix = GTK_ENTRY (gtk_entry_new ());
  gtk_editable_set_text (GTK_EDITABLE (self->prefix), LW_EMIT_DEFAULT_PREFIX);
  gtk_editable_set_width_chars (GTK_EDITABLE (self->prefix), 16);

  gtk_grid_attach (GTK_GRID (grid), lw_gui_row_label (1.0f, 0.5f, _("F_orm"), GTK_WIDGET (self->form)), 0, 0, 1, 1);
  gtk_grid_attach (GTK_GRID (grid), GTK_WIDGET (self->form), 1, 0, 2, 1);
  gtk_grid_attach (GTK_GRID (grid), GTK_WIDGET (self->fixed), 1, 1, 1, 1);
  gtk_grid_attach (GTK_GRID (grid), GTK_WIDGET (self->qformat), 2, 1, 1, 1);
  gtk_grid_attach (GTK_GRID (grid), lw_gui_row_label (1.0f, 0.5f, _("Name _prefix"), GTK_WIDGET (self->prefix)), 0,
                   2, 1, 1);
  gtk_grid_attach (GTK_GRID (grid), GTK_WIDGET (self->prefix), 1, 2, 2, 1);

  self->problem = GTK_LABEL (gtk_label_new (NULL));
  gtk_label_set_xalign (self->problem, 0.0);
  gtk_label_set_wrap (self->problem, TRUE);
  gtk_widget_add_css_class (GTK_WIDGET (self->problem), "error");
  gtk_widget_set_visible (GTK_WIDGET (self->problem), FALSE);
  gtk_grid_attach (GTK_GRID (grid), GTK_WIDGET (self->problem), 0, 3, 4, 1);

  self->text = GTK_TEXT_VIEW (gtk_text_view_new ());
  gtk_text_view_set_editable (self->text, FALSE);
  gtk_text_view_set_monospace (self->text, TRUE);
  gtk_text_view_set_wrap_mode (self->text, GTK_WRAP_WORD_CHAR);
  gtk_text_view_set_left_margin (self->text, 6);
  gtk_text_view_set_top_margin (self->text, 6);
  GtkWidget *scroll = gtk_scrolled_window_new ();
  gtk_scrolled_window_set_child (GTK_SCROLLED_WINDOW (scroll), GTK_WIDGET (self->text));
  gtk_widget_set_vexpand (scroll, TRUE);
  gtk_widget_set_hexpand (scroll, TRUE);
  gtk_widget_add_css_class (scroll, "frame");
  gtk_grid_attach (GTK_GRID (grid), scroll, 0, 4, 4, 1);

  self->status = GTK_LABEL (gtk_label_new (NULL));
  gtk_label_set_xalign (self->status, 0.0);
  gtk_label_set_wrap (self->status, TRUE);
  gtk_label_set_selectable (self->status, TRUE);
  gtk_widget_set_hexpand (GTK_WIDGET (self->status), TRUE);
  GtkWidget *buttons = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 6);
  self->copy = gtk_button_new_with_mnemonic (_("_Copy"));
  gtk_widget_set_tooltip_text (self->copy, _("Copy the coefficients and sections shown"));
  self->save = gtk_button_new_with_mnemonic (_("_Save C Code…"));
  gtk_widget_add_css_class (self->save, "suggested-action");
  GtkWidget *close = gtk_button_new_with_mnemonic (_("C_lose"));
  gtk_actionable_set_action_name (GTK_ACTIONABLE (close), "window.close");
  gtk_box_append (GTK_BOX (buttons), GTK_WIDGET (self->status));
  gtk_box_append (GTK_BOX (buttons), self->copy);
  gtk_box_append (GTK_BOX (buttons), self->save);
  gtk_box_append (GTK_BOX (buttons), close);
  gtk_grid_attach (GTK_GRID (grid), buttons, 0, 5, 4, 1);
  gtk_window_set_child (GTK_WINDOW (self), grid);
  gtk_window_set_default_widget (GTK_WINDOW (self), self->save);

  g_signal_connect_swapped (self->form, "notify::selected", G_CALLBACK (refresh), self);
  g_signal_connect_swapped (self->fixed, "toggled", G_CALLBACK (refresh), self);
  g_signal_connect_swapped (self->qformat, "changed", G_CALLBACK (refresh), self);
  g_signal_connect_swapped (self->prefix, "changed", G_CALLBACK (refresh), self);
  g_signal_connect_swapped (self->copy, "clicked", G_CALLBACK (copy_clicked), self);
  g_signal_connect_swapped (self->save, "clicked", G_CALLBACK (save_clicked), self);
  refresh (self);
  gtk_widget_grab_focus (self->save);
  return self;
}
