/* lw-application.h — the Loopwright application: one window per design, app-wide actions
 * (quit, about), settings, and the dark style following the system.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

G_BEGIN_DECLS

#define LW_TYPE_APPLICATION (lw_application_get_type ())
G_DECLARE_FINAL_TYPE (LwApplication, lw_application, LW, APPLICATION, GtkApplication)

LwApplication *lw_application_new (void);

/* The application's settings (org.loopwright.Designer), or NULL when the schema is not
 * installed (running from the build tree without GSETTINGS_SCHEMA_DIR): then nothing is
 * remembered between runs. */
GSettings *lw_application_get_settings (LwApplication *self);

/* Benchmark mode (loopwright --bench-drag N FILE): the application opens FILE in one window,
 * runs lw_window_start_bench_drag (N) and quits; no autosave offer. */
void lw_application_set_bench_drag (LwApplication *self, guint n_frames, const char *path);

/* Where windows autosave unsaved work: g_get_user_state_dir ()/loopwright/autosave.lwd (the
 * most recent autosave of any window), and beside it autosave.source holding the URI of the
 * file that work came from (empty for a design never saved). */
char *lw_autosave_path (void);
char *lw_autosave_source_path (void);

/* Shows the About dialog over parent (may be NULL). */
void lw_application_show_about (LwApplication *self, GtkWindow *parent);

G_END_DECLS
