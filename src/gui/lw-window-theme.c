/* lw-window-theme.c — the plots and the metrics table follow the dark style
 * (GtkSettings:gtk-application-prefer-dark-theme, which the application keeps in step with
 * the desktop's preference).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-window-private.h"

static void
follow_theme (LwWindow *self)
{
  gboolean dark = FALSE;
  g_object_get (gtk_settings_get_default (), "gtk-application-prefer-dark-theme", &dark, NULL);
  lw_plot_area_set_theme (self->plot_area, dark ? LW_PLOT_THEME_DARK : LW_PLOT_THEME_LIGHT);
  lw_compare_table_set_theme (self->compare_table,
                              dark ? LW_PLOT_THEME_DARK : LW_PLOT_THEME_LIGHT);
}

void
lw_window_init_theme (LwWindow *self)
{
  g_signal_connect_swapped (gtk_settings_get_default (), "notify::gtk-application-prefer-dark-theme",
                            G_CALLBACK (follow_theme), self);
  follow_theme (self);
}

void
lw_window_finish_theme (LwWindow *self)
{
  g_signal_handlers_disconnect_by_data (gtk_settings_get_default (), self);
}
