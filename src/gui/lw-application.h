/* lw-application.h — the Loopwright application: one window per design, app-wide actions
 * (quit, about), settings, the dark style following the system, and the autosave of every
 * window's unsaved work (restore offered once per run, after a crash).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-autosave.h"

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

/* Where the windows keep their unsaved work (one file each, lw-autosave.h), or NULL: no
 * autosave (benchmark mode, or its directory could not be made). */
LwAutosave *lw_application_get_autosave (LwApplication *self);

/* Shows the About dialog over parent (may be NULL). */
void lw_application_show_about (LwApplication *self, GtkWindow *parent);

G_END_DECLS
