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
};

G_DEFINE_FINAL_TYPE (LwApplication, lw_application, GTK_TYPE_APPLICATION)

#define PORTAL_NAME "org.freedesktop.portal.Desktop"
#define PORTAL_PATH "/org/freedesktop/portal/desktop"
#define PORTAL_SETTINGS "org.freedesktop.portal.Settings"
#define APPEARANCE_NS "org.freedesktop.appearance"

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

static const GActionEntry app_actions[] = {
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
}

static void
lw_application_activate (GApplication *app)
{
  GtkWindow *win = gtk_application_get_active_window (GTK_APPLICATION (app));
  if (win == NULL)
    win = GTK_WINDOW (lw_window_new (LW_APPLICATION (app)));
  gtk_window_present (win);
}

static void
lw_application_dispose (GObject *object)
{
  LwApplication *self = LW_APPLICATION (object);

  g_clear_object (&self->settings);
  g_clear_object (&self->portal);
  G_OBJECT_CLASS (lw_application_parent_class)->dispose (object);
}

static void
lw_application_class_init (LwApplicationClass *klass)
{
  G_OBJECT_CLASS (klass)->dispose = lw_application_dispose;
  G_APPLICATION_CLASS (klass)->startup = lw_application_startup;
  G_APPLICATION_CLASS (klass)->activate = lw_application_activate;
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
                       "flags", G_APPLICATION_DEFAULT_FLAGS,
                       "resource-base-path", "/org/loopwright/Designer",
                       NULL);
}

GSettings *
lw_application_get_settings (LwApplication *self)
{
  g_return_val_if_fail (LW_IS_APPLICATION (self), NULL);
  return self->settings;
}
