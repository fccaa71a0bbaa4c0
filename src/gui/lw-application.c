/* lw-application.c — the Loopwright application.
 *
 * Dark style: plain GTK 4.8 has no colour-scheme preference of its own, so the application
 * reads the desktop's preference from the settings portal (org.freedesktop.appearance
 * color-scheme: 0 no preference, 1 prefer dark, 2 prefer light), follows its changes, and sets
 * GtkSettings:gtk-application-prefer-dark-theme accordingly.  Without a portal (no session
 * bus, a desktop without one) GTK's own theme setting is left as it is.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib/gi18n.h>

#include "lw-application.h"
#include "lw-window.h"

struct _LwApplication
{
  GtkApplication parent_instance;

  GSettings *settings;
  GDBusProxy *portal;

  guint bench_frames;           /* > 0: benchmark mode */
  char *bench_path;
  LwAutosave *autosave;         /* NULL: none (benchmark mode, or no place to write) */
  gboolean offered_autosave;
};

G_DEFINE_FINAL_TYPE (LwApplication, lw_application, GTK_TYPE_APPLICATION)

#define PORTAL_NAME "org.freedesktop.portal.Desktop"
#define PORTAL_PATH "/org/freedesktop/portal/desktop"
#define PORTAL_SETTINGS "org.freedesktop.portal.Settings"
#define APPEARANCE_NS "org.freedesktop.appearance"
#define AUTOSAVE_INTERVAL_MS 30000

/* ---- dark style from the portal ------------------------------------------------------------ */

static void
apply_color_scheme (GVariant *value)
{
  /* Read wraps the value in one or two variants depending on the portal's version. */
  g_autoptr (GVariant) v = g_variant_ref (value);
  while (g_variant_is_of_type (v, G_VARIANT_TYPE_VARIANT))
    {
      GVariant *inner = g_variant_get_variant (v);
      g_variant_unref (v);
      v = inner;
    }
  if (!g_variant_is_of_type (v, G_VARIANT_TYPE_UINT32))
    return;
  guint32 scheme = g_variant_get_uint32 (v);
  GtkSettings *gs = gtk_settings_get_default ();
  if (gs != NULL)
    g_object_set (gs, "gtk-application-prefer-dark-theme", scheme == 1, NULL);
}

static void
portal_signal (GDBusProxy *proxy, const char *sender, const char *signal, GVariant *params,
               gpointer user_data)
{
  if (g_strcmp0 (signal, "SettingChanged") != 0)
    return;
  const char *ns = NULL, *key = NULL;
  g_autoptr (GVariant) value = NULL;
  g_variant_get (params, "(&s&sv)", &ns, &key, &value);
  if (g_strcmp0 (ns, APPEARANCE_NS) == 0 && g_strcmp0 (key, "color-scheme") == 0)
    apply_color_scheme (value);
}

static void
portal_read_done (GObject *source, GAsyncResult *res, gpointer user_data)
{
  g_autoptr (GError) error = NULL;
  g_autoptr (GVariant) ret = g_dbus_proxy_call_finish (G_DBUS_PROXY (source), res, &error);
  if (ret == NULL)
    {
      g_debug ("no colour scheme from the settings portal: %s", error->message);
      return;
    }
  g_autoptr (GVariant) value = NULL;
  g_variant_get (ret, "(v)", &value);
  apply_color_scheme (value);
}

static void
portal_proxy_ready (GObject *source, GAsyncResult *res, gpointer user_data)
{
  g_autoptr (LwApplication) self = user_data;
  g_autoptr (GError) error = NULL;
  GDBusProxy *proxy = g_dbus_proxy_new_for_bus_finish (res, &error);
  if (proxy == NULL)
    {
      g_debug ("no settings portal: %s", error->message);
      return;
    }
  self->portal = proxy;
  g_signal_connect (proxy, "g-signal", G_CALLBACK (portal_signal), NULL);
  g_dbus_proxy_call (proxy, "Read", g_variant_new ("(ss)", APPEARANCE_NS, "color-scheme"),
                     G_DBUS_CALL_FLAGS_NONE, 2000, NULL, portal_read_done, NULL);
}

static void
follow_system_style (LwApplication *self)
{
  if (g_getenv ("DBUS_SESSION_BUS_ADDRESS") == NULL)
    return;   /* no session bus: do not try to autolaunch one */
  g_dbus_proxy_new_for_bus (G_BUS_TYPE_SESSION,
                            G_DBUS_PROXY_FLAGS_DO_NOT_LOAD_PROPERTIES
                              | G_DBUS_PROXY_FLAGS_DO_NOT_AUTO_START,
                            NULL, PORTAL_NAME, PORTAL_PATH, PORTAL_SETTINGS, NULL,
                            portal_proxy_ready, g_object_ref (self));
}

/* ---- autosave ------------------------------------------------------------------------------ */

/* The offer of stale autosaves: over win, restored into win while it is untouched. */
typedef struct
{
  LwApplication *app;
  LwWindow *win;
  GPtrArray *stale;             /* of LwAutosaveStale * */
  GPtrArray *checks;            /* a GtkCheckButton per stale autosave; empty when just one */
} Offer;

/* With the dialog, however it goes: the stale sessions are unlocked. */
static void
offer_free (gpointer data)
{
  Offer *o = data;
  lw_autosave_release_stale (o->app->autosave);
  g_object_unref (o->app);
  g_object_unref (o->win);
  g_ptr_array_unref (o->stale);
  g_ptr_array_unref (o->checks);
  g_free (o);
}

static char *
autosave_time (const LwAutosaveStale *s)
{
  g_autoptr (GDateTime) when = g_date_time_new_from_unix_local (s->mtime_s);
  return g_date_time_format (when, "%x %X");
}

static char *
source_name (const LwAutosaveStale *s)
{
  if (s->source_uri == NULL)
    return NULL;
  g_autoptr (GFile) source = g_file_new_for_uri (s->source_uri);
  return g_file_get_parse_name (source);
}

/* The sentence describing one stale autosave alone. */
static char *
describe_one (const LwAutosaveStale *s)
{
  g_autofree char *when = autosave_time (s);
  g_autofree char *name = source_name (s);
  if (name == NULL)
    return g_strdup_printf (_("A design that was never saved was autosaved on %s."), when);
  if (s->source_newer)
    return g_strdup_printf (_("Unsaved changes to “%s” were autosaved on %s; the file was "
                              "saved again after that."), name, when);
  return g_strdup_printf (_("Unsaved changes to “%s” were autosaved on %s and not saved "
                            "since."), name, when);
}

/* The label of one stale autosave in a list of them. */
static char *
describe_item (const LwAutosaveStale *s)
{
  g_autofree char *when = autosave_time (s);
  g_autofree char *name = source_name (s);
  if (name == NULL)
    return g_strdup_printf (_("A design never saved, autosaved on %s"), when);
  if (s->source_newer)
    return g_strdup_printf (_("“%s”, autosaved on %s (the file was saved after that)"), name,
                            when);
  return g_strdup_printf (_("“%s”, autosaved on %s"), name, when);
}

static gboolean
offer_chosen (Offer *o, guint i)
{
  return o->checks->len == 0
         || gtk_check_button_get_active (GTK_CHECK_BUTTON (o->checks->pdata[i]));
}

/* Restore: each ticked autosave in a window (the one the offer was over while untouched, then
 * new ones); Discard: each ticked one removed; Later: all kept. What is not ticked stays for
 * the next start. */
static void
autosave_response (GtkDialog *dialog, int response, gpointer user_data)
{
  Offer *o = user_data;
  LwAutosave *autosave = o->app->autosave;
  for (guint i = 0; i < o->stale->len; i++)
    {
      LwAutosaveStale *s = o->stale->pdata[i];
      if (!offer_chosen (o, i))
        continue;
      if (response == GTK_RESPONSE_ACCEPT)
        {
          LwWindow *win = o->win;
          if (gtk_window_get_application (GTK_WINDOW (win)) == NULL
              || !lw_window_is_pristine (win))
            {
              win = lw_window_new (o->app);
              gtk_window_present (GTK_WINDOW (win));
            }
          lw_window_restore_autosave (win, s);
        }
      else if (response == GTK_RESPONSE_REJECT)
        lw_autosave_discard (autosave, s);
    }
  gtk_window_destroy (GTK_WINDOW (dialog));
}

/* Once per run: the autosaves of processes that ended without cleaning up (a crash) are
 * offered for restore, in one dialog; several are listed, each with a tick. */
static void
offer_autosave (LwApplication *self, LwWindow *win)
{
  if (self->offered_autosave || self->autosave == NULL)
    return;
  self->offered_autosave = TRUE;

  GPtrArray *stale = lw_autosave_find_stale (self->autosave);
  if (stale->len == 0)
    {
      g_ptr_array_unref (stale);
      lw_autosave_release_stale (self->autosave);
      return;
    }
  Offer *o = g_new0 (Offer, 1);
  o->app = g_object_ref (self);
  o->win = g_object_ref (win);
  o->stale = stale;
  o->checks = g_ptr_array_new ();

  GtkWidget *d = gtk_message_dialog_new (GTK_WINDOW (win), GTK_DIALOG_MODAL
                                           | GTK_DIALOG_DESTROY_WITH_PARENT,
                                         GTK_MESSAGE_QUESTION, GTK_BUTTONS_NONE, "%s",
                                         _("Restore unsaved work?"));
  if (stale->len == 1)
    {
      g_autofree char *text = describe_one (stale->pdata[0]);
      gtk_message_dialog_format_secondary_text (GTK_MESSAGE_DIALOG (d), "%s", text);
    }
  else
    {
      gtk_message_dialog_format_secondary_text (
        GTK_MESSAGE_DIALOG (d),
        g_dngettext (GETTEXT_PACKAGE,
                     "Loopwright ended before %u design was saved. Each one restored opens in "
                     "a window of its own; those not ticked are offered again next time.",
                     "Loopwright ended before %u designs were saved. Each one restored opens "
                     "in a window of its own; those not ticked are offered again next time.",
                     stale->len), stale->len);
      GtkWidget *area = gtk_message_dialog_get_message_area (GTK_MESSAGE_DIALOG (d));
      for (guint i = 0; i < stale->len; i++)
        {
          g_autofree char *label = describe_item (stale->pdata[i]);
          GtkWidget *check = gtk_check_button_new_with_label (label);
          gtk_check_button_set_active (GTK_CHECK_BUTTON (check), TRUE);
          gtk_widget_set_tooltip_text (check, ((LwAutosaveStale *) stale->pdata[i])->path);
          gtk_box_append (GTK_BOX (area), check);
          g_ptr_array_add (o->checks, check);
        }
    }
  gtk_window_set_title (GTK_WINDOW (d), _("Restore unsaved work?"));
  gtk_dialog_add_buttons (GTK_DIALOG (d), _("_Discard"), GTK_RESPONSE_REJECT, _("_Later"),
                          GTK_RESPONSE_CANCEL, _("_Restore"), GTK_RESPONSE_ACCEPT, NULL);
  gtk_dialog_set_default_response (GTK_DIALOG (d), GTK_RESPONSE_ACCEPT);
  /* Return restores (a focused tick would take it for itself) */
  gtk_window_set_focus (GTK_WINDOW (d),
                        gtk_dialog_get_widget_for_response (GTK_DIALOG (d), GTK_RESPONSE_ACCEPT));
  g_object_set_data_full (G_OBJECT (d), "lw-offer", o, offer_free);
  g_signal_connect (d, "response", G_CALLBACK (autosave_response), o);
  gtk_window_present (GTK_WINDOW (d));
}

void
lw_application_set_bench_drag (LwApplication *self, guint n_frames, const char *path)
{
  g_return_if_fail (LW_IS_APPLICATION (self));
  self->bench_frames = n_frames;
  g_free (self->bench_path);
  self->bench_path = g_strdup (path);
  g_application_set_flags (G_APPLICATION (self), G_APPLICATION_NON_UNIQUE);
}

/* ---- actions ------------------------------------------------------------------------------- */

static void
quit_activated (GSimpleAction *action, GVariant *param, gpointer user_data)
{
  GApplication *app = G_APPLICATION (user_data);
  /* Close each window, so every one saves its settings on the way out. */
  GList *windows = gtk_application_get_windows (GTK_APPLICATION (app));
  while (windows != NULL)
    {
      GList *next = windows->next;
      gtk_window_close (GTK_WINDOW (windows->data));
      windows = next;
    }
}

static void
about_activated (GSimpleAction *action, GVariant *param, gpointer user_data)
{
  LwApplication *self = LW_APPLICATION (user_data);
  lw_application_show_about (self, gtk_application_get_active_window (GTK_APPLICATION (self)));
}

static void
new_window_activated (GSimpleAction *action, GVariant *param, gpointer user_data)
{
  LwWindow *win = lw_window_new (LW_APPLICATION (user_data));
  gtk_window_present (GTK_WINDOW (win));
}

/* A bundled example: in the active window when it shows an untouched new design, else in a
 * new window. */
static void
open_example_activated (GSimpleAction *action, GVariant *param, gpointer user_data)
{
  GtkWindow *active = gtk_application_get_active_window (GTK_APPLICATION (user_data));
  LwWindow *win = LW_IS_WINDOW (active) && lw_window_is_pristine (LW_WINDOW (active))
                    ? LW_WINDOW (active) : lw_window_new (LW_APPLICATION (user_data));
  lw_window_show_example (win, g_variant_get_string (param, NULL));
  gtk_window_present (GTK_WINDOW (win));
}

static const GActionEntry app_actions[] = {
  { .name = "open-example", .activate = open_example_activated, .parameter_type = "s" },
  { .name = "quit", .activate = quit_activated },
  { .name = "about", .activate = about_activated },
  { .name = "new-window", .activate = new_window_activated },
};

void
lw_application_show_about (LwApplication *self, GtkWindow *parent)
{
  static const char *authors[] = { N_("The Loopwright developers"), NULL };
  const char *translated_authors[] = { _(authors[0]), NULL };

  g_return_if_fail (LW_IS_APPLICATION (self));
  gtk_show_about_dialog (parent,
                         "program-name", "Loopwright",
                         "logo-icon-name", LW_APP_ID,
                         "version", PACKAGE_VERSION,
                         "comments",
                         _("Design digital feedback controllers by frequency-response loop "
                           "shaping.\n\n"
                           "Caution: simulation is not validation. Commission with safe "
                           "limits, follow the applicable functional-safety standards and "
                           "qualified review; local codes prevail."),
                         "license-type", GTK_LICENSE_GPL_3_0,
                         "authors", translated_authors,
                         /* TRANSLATORS: put your name here, one per line */
                         "translator-credits", _("translator-credits"),
                         "modal", TRUE,
                         NULL);
}

/* ---- life cycle ---------------------------------------------------------------------------- */

static void
lw_application_startup (GApplication *app)
{
  LwApplication *self = LW_APPLICATION (app);

  G_APPLICATION_CLASS (lw_application_parent_class)->startup (app);

  g_action_map_add_action_entries (G_ACTION_MAP (self), app_actions, G_N_ELEMENTS (app_actions),
                                   self);
  static const char *quit_accels[] = { "<Control>q", NULL };
  static const char *new_window_accels[] = { "<Control>n", NULL };
  static const char *about_accels[] = { "F1", NULL };
  gtk_application_set_accels_for_action (GTK_APPLICATION (self), "app.quit", quit_accels);
  gtk_application_set_accels_for_action (GTK_APPLICATION (self), "app.new-window",
                                         new_window_accels);
  gtk_application_set_accels_for_action (GTK_APPLICATION (self), "app.about", about_accels);

  GSettingsSchemaSource *source = g_settings_schema_source_get_default ();
  g_autoptr (GSettingsSchema) schema =
    source != NULL ? g_settings_schema_source_lookup (source, LW_APP_ID, TRUE) : NULL;
  if (schema != NULL)
    self->settings = g_settings_new_full (schema, NULL, NULL);
  else
    g_message ("settings schema %s not installed; window size and layout are not remembered "
               "(from the build tree, set GSETTINGS_SCHEMA_DIR to build/data)", LW_APP_ID);

  follow_system_style (self);

  /* unsaved work of every window, kept on disk (not in benchmark mode); test hook:
   * LW_TEST_AUTOSAVE_INTERVAL_MS (tests/gui/test-autosave.py) */
  if (self->bench_frames == 0)
    {
      guint64 interval_ms = AUTOSAVE_INTERVAL_MS;
      const char *t = g_getenv ("LW_TEST_AUTOSAVE_INTERVAL_MS");
      if (t != NULL && *t != '\0'
          && !g_ascii_string_to_unsigned (t, 10, 1, 3600000, &interval_ms, NULL))
        g_warning ("LW_TEST_AUTOSAVE_INTERVAL_MS=%s is not a whole number of ms from 1 to "
                   "3600000; ignored", t);
      g_autofree char *dir = lw_autosave_default_dir ();
      g_autoptr (GError) error = NULL;
      self->autosave = lw_autosave_new (dir, (guint) interval_ms, &error);
      if (self->autosave == NULL)
        g_warning ("unsaved work is not autosaved: %s", error->message);
    }
}

static void
lw_application_activate (GApplication *app)
{
  LwApplication *self = LW_APPLICATION (app);
  GtkWindow *win = gtk_application_get_active_window (GTK_APPLICATION (app));
  if (win == NULL)
    win = GTK_WINDOW (lw_window_new (self));
  gtk_window_present (win);
  if (self->bench_frames > 0)
    {
      g_autoptr (GFile) file = g_file_new_for_commandline_arg (self->bench_path);
      if (!lw_window_open_file (LW_WINDOW (win), file))
        {
          g_printerr ("loopwright: --bench-drag: could not open %s\n", self->bench_path);
          g_application_quit (app);
          return;
        }
      lw_window_start_bench_drag (LW_WINDOW (win), self->bench_frames);
      return;
    }
  offer_autosave (self, LW_WINDOW (win));
}

/* loopwright FILE…: each file in a window (the active one while it is untouched). */
static void
lw_application_open (GApplication *app, GFile **files, int n_files, const char *hint)
{
  LwApplication *self = LW_APPLICATION (app);
  LwWindow *first = NULL;
  for (int i = 0; i < n_files; i++)
    {
      GtkWindow *active = gtk_application_get_active_window (GTK_APPLICATION (app));
      LwWindow *win = active != NULL && LW_IS_WINDOW (active)
                        && lw_window_is_pristine (LW_WINDOW (active))
                        ? LW_WINDOW (active) : lw_window_new (self);
      gtk_window_present (GTK_WINDOW (win));
      lw_window_open_file (win, files[i]);
      if (first == NULL)
        first = win;
    }
  if (first != NULL)
    offer_autosave (self, first);
}

static void
lw_application_dispose (GObject *object)
{
  LwApplication *self = LW_APPLICATION (object);

  g_clear_object (&self->settings);
  g_clear_object (&self->portal);
  g_clear_object (&self->autosave);
  g_clear_pointer (&self->bench_path, g_free);
  G_OBJECT_CLASS (lw_application_parent_class)->dispose (object);
}

static void
lw_application_class_init (LwApplicationClass *klass)
{
  G_OBJECT_CLASS (klass)->dispose = lw_application_dispose;
  G_APPLICATION_CLASS (klass)->startup = lw_application_startup;
  G_APPLICATION_CLASS (klass)->activate = lw_application_activate;
  G_APPLICATION_CLASS (klass)->open = lw_application_open;
}

static void
lw_application_init (LwApplication *self)
{
}

LwApplication *
lw_application_new (void)
{
  return g_object_new (LW_TYPE_APPLICATION,
                       "application-id", LW_APP_ID,
                       "flags", G_APPLICATION_HANDLES_OPEN,
                       "resource-base-path", "/org/loopwright/Designer",
                       NULL);
}

LwAutosave *
lw_application_get_autosave (LwApplication *self)
{
  g_return_val_if_fail (LW_IS_APPLICATION (self), NULL);
  return self->autosave;
}

GSettings *
lw_application_get_settings (LwApplication *self)
{
  g_return_val_if_fail (LW_IS_APPLICATION (self), NULL);
  return self->settings;
}
