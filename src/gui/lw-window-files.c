/* lw-window-files.c — the window's document on disk: open (here when the window is
 * untouched, else in a new window), save, save as, the recent files, files dropped on the
 * window, the title with the unsaved state, asking before a window with unsaved changes
 * closes, error messages, and the window's place in the application's autosave
 * (lw-autosave.h) and restoring from it.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib/gi18n.h>

#include "lw-design.h"
#include "lw-window-private.h"

/* ---- title and unsaved state --------------------------------------------------------------- */

char *
lw_window_document_name (LwWindow *self)
{
  if (self->file != NULL)
    return g_file_get_basename (self->file);
  /* never saved: its title, as the report names it */
  const char *title = lw_design_model_get_text_field (self->model, LW_DESIGN_TEXT_TITLE);
  if (title != NULL && title[0] != '\0')
    return g_strdup (title);
  return g_strdup (_("Untitled design"));
}

void
lw_window_update_title (LwWindow *self)
{
  g_autofree char *name = lw_window_document_name (self);
  /* TRANSLATORS: the window title; the first %s is "• " when there are unsaved changes */
  g_autofree char *title = g_strdup_printf (_("%s%s — Loopwright"), self->dirty ? "• " : "",
                                            name);
  gtk_window_set_title (GTK_WINDOW (self), title);
}

void
lw_window_update_dirty (LwWindow *self)
{
  gboolean dirty = self->saved == NULL
                   || !lw_design_equal (self->saved, lw_design_model_get_design (self->model));
  if (self->saved == NULL && self->file == NULL && !lw_history_get_can_undo (self->history))
    dirty = FALSE;   /* a new design nobody has touched (or every touch undone) */
  if (dirty != self->dirty)
    {
      self->dirty = dirty;
      lw_window_update_title (self);
    }
}

/* ---- dialogs ------------------------------------------------------------------------------- */

static void
message_response (GtkDialog *dialog, int response, gpointer user_data)
{
  gtk_window_destroy (GTK_WINDOW (dialog));
}

void
lw_window_show_error (LwWindow *self, const char *primary, const char *secondary)
{
  g_message ("%s %s", primary, secondary);
  GtkWidget *d = gtk_message_dialog_new (GTK_WINDOW (self), GTK_DIALOG_MODAL
                                           | GTK_DIALOG_DESTROY_WITH_PARENT,
                                         GTK_MESSAGE_ERROR, GTK_BUTTONS_CLOSE, "%s", primary);
  gtk_message_dialog_format_secondary_text (GTK_MESSAGE_DIALOG (d), "%s", secondary);
  gtk_window_set_title (GTK_WINDOW (d), primary);
  g_signal_connect (d, "response", G_CALLBACK (message_response), NULL);
  gtk_window_present (GTK_WINDOW (d));
}

/* ---- autosave ------------------------------------------------------------------------------ */

/* The unsaved work of the window, for the autosave (LwAutosaveAskFunc). */
static const LwDesign *
unsaved_work (gpointer owner, GFile **source, gboolean *later)
{
  LwWindow *self = LW_WINDOW (owner);
  *later = self->dragging;
  *source = self->file;
  return self->dirty ? lw_design_model_get_design (self->model) : NULL;
}

void
lw_window_start_autosave (LwWindow *self)
{
  GtkApplication *app = gtk_window_get_application (GTK_WINDOW (self));
  LwAutosave *autosave = LW_IS_APPLICATION (app)
                           ? lw_application_get_autosave (LW_APPLICATION (app)) : NULL;
  if (autosave == NULL || self->autosave != NULL)
    return;
  self->autosave = g_object_ref (autosave);
  self->autosave_slot = lw_autosave_add (autosave, self, unsaved_work);
}

/* The window's autosave is no longer needed (saved, or given up on close). */
void
lw_window_clear_autosave (LwWindow *self)
{
  if (self->autosave != NULL)
    lw_autosave_clear (self->autosave, self->autosave_slot);
}

/* ---- files --------------------------------------------------------------------------------- */

static void
remember_folder (LwWindow *self, GFile *file)
{
  GSettings *settings = lw_window_get_settings (self);
  g_autoptr (GFile) parent = g_file_get_parent (file);
  if (settings != NULL && parent != NULL && g_file_peek_path (parent) != NULL)
    g_settings_set_string (settings, "last-folder", g_file_peek_path (parent));
}

static void
add_recent (LwWindow *self, GFile *file)
{
  g_autofree char *uri = g_file_get_uri (file);
  gtk_recent_manager_add_item (gtk_recent_manager_get_default (), uri);
  lw_window_refresh_recent (self);
}

static void
set_file (LwWindow *self, GFile *file)
{
  if (file != NULL)
    g_object_ref (file);
  g_clear_object (&self->file);
  self->file = file;
  lw_window_update_title (self);
}

/* Loads file; on failure shows the loader's message over self and returns NULL. */
static LwDesign *
load_or_explain (LwWindow *self, GFile *file)
{
  g_autoptr (GError) error = NULL;
  g_autofree char *name = g_file_get_parse_name (file);
  const char *path = g_file_peek_path (file);
  LwDesign *d = path != NULL ? lw_design_load_file (path, &error) : NULL;
  if (d == NULL)
    {
      g_autofree char *primary = g_strdup_printf (_("Could not open “%s”"), name);
      lw_window_show_error (self, primary, error != NULL ? error->message
                                               : _("Only local files can be opened."));
    }
  return d;
}

/* Shows d (taken), opened from file. */
static void
install_design (LwWindow *self, GFile *file, LwDesign *d)
{
  if (self->dragging)
    {
      lw_plot_pane_cancel_drag (self->drag_pane);
      self->dragging = FALSE;
      lw_history_hold (self->history, FALSE);
    }
  g_clear_pointer (&self->saved, lw_design_free);
  self->saved = lw_design_copy (d);
  set_file (self, file);
  self->sel_stage = -1;
  lw_design_model_replace (self->model, d);
  lw_history_reset (self->history);
  lw_window_update_dirty (self);
  lw_window_update_title (self);
  add_recent (self, file);
  remember_folder (self, file);
}

gboolean
lw_window_open_file (LwWindow *self, GFile *file)
{
  g_return_val_if_fail (LW_IS_WINDOW (self), FALSE);
  g_return_val_if_fail (G_IS_FILE (file), FALSE);

  LwDesign *d = load_or_explain (self, file);
  if (d == NULL)
    return FALSE;
  install_design (self, file, d);
  return TRUE;
}

gboolean
lw_window_is_pristine (LwWindow *self)
{
  g_return_val_if_fail (LW_IS_WINDOW (self), FALSE);
  return self->file == NULL && !self->dirty && !lw_history_has_steps (self->history);
}

gboolean
lw_window_show_example (LwWindow *self, const char *name)
{
  g_return_val_if_fail (LW_IS_WINDOW (self), FALSE);
  g_autofree char *path = g_strdup_printf ("/org/loopwright/Designer/examples/%s.lwd", name);
  g_autoptr (GError) error = NULL;
  g_autoptr (GBytes) bytes = g_resources_lookup_data (path, G_RESOURCE_LOOKUP_FLAGS_NONE,
                                                      &error);
  LwDesign *d = NULL;
  if (bytes != NULL)
    {
      gsize len = 0;
      const char *data = g_bytes_get_data (bytes, &len);
      g_autofree char *label = g_strdup_printf ("%s.lwd", name);
      d = lw_design_load_data (data, len, label, &error);
    }
  if (d == NULL)
    {
      lw_window_show_error (self, _("Could not open the example"), error->message);
      return FALSE;
    }
  set_file (self, NULL);
  g_clear_pointer (&self->saved, lw_design_free);
  lw_design_model_replace (self->model, d);
  lw_history_reset (self->history);
  self->dirty = FALSE;
  lw_window_update_dirty (self);
  lw_window_update_title (self);
  return TRUE;
}

gboolean
lw_window_restore_autosave (LwWindow *self, LwAutosaveStale *stale)
{
  g_return_val_if_fail (LW_IS_WINDOW (self), FALSE);
  g_return_val_if_fail (stale != NULL, FALSE);
  g_autoptr (GError) error = NULL;
  LwDesign *d = lw_design_load_file (stale->path, &error);
  if (d == NULL)
    {
      lw_window_show_error (self, _("Could not restore the autosaved design"), error->message);
      return FALSE;
    }
  g_autoptr (GFile) source = stale->source_uri != NULL ? g_file_new_for_uri (stale->source_uri)
                                                       : NULL;
  g_clear_pointer (&self->saved, lw_design_free);
  if (source != NULL)
    {
      /* what the file holds now, so the title shows whether the restored work differs */
      g_autoptr (GError) ignored = NULL;
      const char *sp = g_file_peek_path (source);
      self->saved = sp != NULL ? lw_design_load_file (sp, &ignored) : NULL;
    }
  set_file (self, source);
  lw_design_model_replace (self->model, d);
  lw_history_reset (self->history);
  self->dirty = FALSE;
  lw_window_update_dirty (self);
  if (self->saved == NULL && !self->dirty)
    {
      self->dirty = TRUE;   /* restored work that was never saved */
      lw_window_update_title (self);
    }
  /* the work is this window's now: kept in its own autosave until saved or closed */
  if (self->autosave != NULL
      && !lw_autosave_adopt (self->autosave, stale, self->autosave_slot,
                             lw_design_model_get_design (self->model), &error))
    g_warning ("autosave: %s", error->message);
  return TRUE;
}

static gboolean
save_to (LwWindow *self, GFile *file)
{
  g_autoptr (GError) error = NULL;
  g_autofree char *name = g_file_get_parse_name (file);
  const char *path = g_file_peek_path (file);
  lw_history_commit (self->history);
  if (path == NULL)
    {
      g_autofree char *primary = g_strdup_printf (_("Could not save “%s”"), name);
      lw_window_show_error (self, primary, _("Only local files can be written."));
      return FALSE;
    }
  const LwDesign *d = lw_design_model_get_design (self->model);
  if (!lw_design_save_file (d, path, &error))
    {
      g_autofree char *primary = g_strdup_printf (_("Could not save “%s”"), name);
      lw_window_show_error (self, primary, error->message);
      return FALSE;
    }
  g_clear_pointer (&self->saved, lw_design_free);
  self->saved = lw_design_copy (d);
  set_file (self, file);
  lw_window_update_dirty (self);
  lw_window_update_title (self);
  add_recent (self, file);
  remember_folder (self, file);
  lw_window_clear_autosave (self);
  return TRUE;
}

void
lw_window_set_chooser_folder (LwWindow *self, GtkFileChooser *chooser)
{
  GSettings *settings = lw_window_get_settings (self);
  g_autofree char *folder = settings != NULL ? g_settings_get_string (settings, "last-folder")
                                             : NULL;
  if (self->file != NULL)
    {
      g_autoptr (GFile) parent = g_file_get_parent (self->file);
      if (parent != NULL)
        gtk_file_chooser_set_current_folder (chooser, parent, NULL);
    }
  else if (folder != NULL && folder[0] != '\0')
    {
      g_autoptr (GFile) f = g_file_new_for_path (folder);
      gtk_file_chooser_set_current_folder (chooser, f, NULL);
    }
}

static void
add_design_filter (GtkFileChooser *chooser)
{
  g_autoptr (GtkFileFilter) filter = gtk_file_filter_new ();
  gtk_file_filter_set_name (filter, _("Loopwright designs"));
  gtk_file_filter_add_pattern (filter, "*" LW_DESIGN_EXTENSION);
  gtk_file_chooser_add_filter (chooser, filter);
  g_autoptr (GtkFileFilter) all = gtk_file_filter_new ();
  gtk_file_filter_set_name (all, _("All files"));
  gtk_file_filter_add_pattern (all, "*");
  gtk_file_chooser_add_filter (chooser, all);
}

/* What to do once Save As has written the file. */
typedef enum { AFTER_SAVE_NOTHING, AFTER_SAVE_CLOSE } AfterSave;

static void
save_as_response (GtkNativeDialog *native, int response, gpointer user_data)
{
  LwWindow *self = LW_WINDOW (user_data);
  AfterSave after = GPOINTER_TO_INT (g_object_get_data (G_OBJECT (native), "lw-after-save"));
  if (response == GTK_RESPONSE_ACCEPT)
    {
      g_autoptr (GFile) file = gtk_file_chooser_get_file (GTK_FILE_CHOOSER (native));
      if (file != NULL && save_to (self, file) && after == AFTER_SAVE_CLOSE)
        {
          self->close_confirmed = TRUE;
          gtk_window_close (GTK_WINDOW (self));
        }
    }
  g_object_unref (native);
  g_object_unref (self);
}

static void
save_as (LwWindow *self, AfterSave after)
{
  GtkFileChooserNative *native =
    gtk_file_chooser_native_new (_("Save Design"), GTK_WINDOW (self),
                                 GTK_FILE_CHOOSER_ACTION_SAVE, _("_Save"), _("_Cancel"));
  gtk_native_dialog_set_modal (GTK_NATIVE_DIALOG (native), TRUE);
  add_design_filter (GTK_FILE_CHOOSER (native));
  lw_window_set_chooser_folder (self, GTK_FILE_CHOOSER (native));
  g_autofree char *name = self->file != NULL ? g_file_get_basename (self->file)
                                             : g_strdup (_("design.lwd"));
  gtk_file_chooser_set_current_name (GTK_FILE_CHOOSER (native), name);
  g_object_set_data (G_OBJECT (native), "lw-after-save", GINT_TO_POINTER (after));
  g_signal_connect (native, "response", G_CALLBACK (save_as_response), g_object_ref (self));
  gtk_native_dialog_show (GTK_NATIVE_DIALOG (native));
}

static void
save_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (self->file != NULL)
    save_to (self, self->file);
  else
    save_as (self, AFTER_SAVE_NOTHING);
}

static void
save_as_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  save_as (LW_WINDOW (widget), AFTER_SAVE_NOTHING);
}

/* Opens file here when this window is untouched, else in a new window; a document that does
 * not load is explained over this window and changes nothing. */
static void
open_here_or_new (LwWindow *self, GFile *file)
{
  LwDesign *d = load_or_explain (self, file);
  if (d == NULL)
    return;
  if (lw_window_is_pristine (self))
    {
      install_design (self, file, d);
      return;
    }
  GtkApplication *app = gtk_window_get_application (GTK_WINDOW (self));
  LwWindow *win = lw_window_new (LW_APPLICATION (app));
  gtk_window_present (GTK_WINDOW (win));
  install_design (win, file, d);
}

static void
open_response (GtkNativeDialog *native, int response, gpointer user_data)
{
  LwWindow *self = LW_WINDOW (user_data);
  if (response == GTK_RESPONSE_ACCEPT)
    {
      g_autoptr (GFile) file = gtk_file_chooser_get_file (GTK_FILE_CHOOSER (native));
      if (file != NULL)
        open_here_or_new (self, file);
    }
  g_object_unref (native);
  g_object_unref (self);
}

static void
open_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  GtkFileChooserNative *native =
    gtk_file_chooser_native_new (_("Open Design"), GTK_WINDOW (self),
                                 GTK_FILE_CHOOSER_ACTION_OPEN, _("_Open"), _("_Cancel"));
  gtk_native_dialog_set_modal (GTK_NATIVE_DIALOG (native), TRUE);
  add_design_filter (GTK_FILE_CHOOSER (native));
  lw_window_set_chooser_folder (self, GTK_FILE_CHOOSER (native));
  g_signal_connect (native, "response", G_CALLBACK (open_response), g_object_ref (self));
  gtk_native_dialog_show (GTK_NATIVE_DIALOG (native));
}

static void
open_recent_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  g_autoptr (GFile) file = g_file_new_for_uri (g_variant_get_string (param, NULL));
  open_here_or_new (self, file);
}

static gboolean
file_dropped (GtkDropTarget *target, const GValue *value, double x, double y, gpointer data)
{
  LwWindow *self = LW_WINDOW (data);
  if (!G_VALUE_HOLDS (value, GDK_TYPE_FILE_LIST))
    return FALSE;
  GSList *files = g_value_get_boxed (value);
  for (GSList *l = files; l != NULL; l = l->next)
    open_here_or_new (self, G_FILE (l->data));
  return files != NULL;
}

/* ---- recent files menu --------------------------------------------------------------------- */

static GMenuModel *
recent_menu (void)
{
  GMenu *menu = g_menu_new ();
  GList *items = gtk_recent_manager_get_items (gtk_recent_manager_get_default ());
  guint n = 0;
  for (GList *l = items; l != NULL && n < 10; l = l->next)
    {
      GtkRecentInfo *info = l->data;
      const char *uri = gtk_recent_info_get_uri (info);
      if (!g_str_has_suffix (uri, LW_DESIGN_EXTENSION) || !gtk_recent_info_exists (info))
        continue;
      g_autoptr (GMenuItem) item = g_menu_item_new (gtk_recent_info_get_display_name (info),
                                                    NULL);
      g_menu_item_set_action_and_target (item, "window.open-recent", "s", uri);
      g_menu_append_item (menu, item);
      n++;
    }
  g_list_free_full (items, (GDestroyNotify) gtk_recent_info_unref);
  return G_MENU_MODEL (menu);
}

/* Fills the Open Recent submenu from the recent manager. */
void
lw_window_refresh_recent (LwWindow *self)
{
  if (self->recent_menu == NULL)
    return;
  g_menu_remove_all (self->recent_menu);
  g_autoptr (GMenuModel) fresh = recent_menu ();
  for (int i = 0; i < g_menu_model_get_n_items (fresh); i++)
    {
      g_autoptr (GMenuItem) item = g_menu_item_new_from_model (fresh, i);
      g_menu_append_item (self->recent_menu, item);
    }
}

/* ---- closing ------------------------------------------------------------------------------- */

static void
close_response (GtkDialog *dialog, int response, gpointer user_data)
{
  LwWindow *self = LW_WINDOW (user_data);
  gtk_window_destroy (GTK_WINDOW (dialog));
  if (response == GTK_RESPONSE_ACCEPT)
    {
      if (self->file != NULL)
        {
          if (save_to (self, self->file))
            {
              self->close_confirmed = TRUE;
              gtk_window_close (GTK_WINDOW (self));
            }
        }
      else
        save_as (self, AFTER_SAVE_CLOSE);
    }
  else if (response == GTK_RESPONSE_REJECT)
    {
      lw_window_clear_autosave (self);
      self->close_confirmed = TRUE;
      gtk_window_close (GTK_WINDOW (self));
    }
  g_object_unref (self);
}

void
lw_window_ask_before_close (LwWindow *self)
{
  g_autofree char *name = lw_window_document_name (self);
  GtkWidget *d = gtk_message_dialog_new (GTK_WINDOW (self), GTK_DIALOG_MODAL
                                           | GTK_DIALOG_DESTROY_WITH_PARENT,
                                         GTK_MESSAGE_QUESTION, GTK_BUTTONS_NONE,
                                         _("Save the changes to “%s” before closing?"), name);
  gtk_message_dialog_format_secondary_text (GTK_MESSAGE_DIALOG (d), "%s",
                                            _("Unsaved changes are lost when the window closes "
                                              "without saving."));
  gtk_window_set_title (GTK_WINDOW (d), _("Unsaved changes"));
  gtk_dialog_add_buttons (GTK_DIALOG (d), _("Close _without Saving"), GTK_RESPONSE_REJECT,
                          _("_Cancel"), GTK_RESPONSE_CANCEL, _("_Save"), GTK_RESPONSE_ACCEPT,
                          NULL);
  gtk_dialog_set_default_response (GTK_DIALOG (d), GTK_RESPONSE_ACCEPT);
  g_signal_connect (d, "response", G_CALLBACK (close_response), g_object_ref (self));
  gtk_window_present (GTK_WINDOW (d));
}

void
lw_window_class_init_files (GtkWidgetClass *widget_class)
{
  gtk_widget_class_install_action (widget_class, "window.open", NULL, open_activated);
  gtk_widget_class_install_action (widget_class, "window.open-recent", "s",
                                   open_recent_activated);
  gtk_widget_class_install_action (widget_class, "window.save", NULL, save_activated);
  gtk_widget_class_install_action (widget_class, "window.save-as", NULL, save_as_activated);
}

void
lw_window_init_files (LwWindow *self)
{
  GtkDropTarget *drop = gtk_drop_target_new (GDK_TYPE_FILE_LIST, GDK_ACTION_COPY);
  g_signal_connect (drop, "drop", G_CALLBACK (file_dropped), self);
  gtk_widget_add_controller (GTK_WIDGET (self), GTK_EVENT_CONTROLLER (drop));
}
