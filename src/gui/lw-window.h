/* lw-window.h — the designer window: the panels on the left (plant and sampling, compensator,
 * requirements), the plot area on the right, all showing one design document.
 *
 * The window owns the document's life: its file (open, save, save as, recent files, drag and
 * drop), its unsaved state (shown in the title, asked about on close, kept in the
 * application's autosave, lw-autosave.h), its undo history (LwHistory, snapshots of the whole
 * document), and the drag handles on the Bode views.  Its parts are listed in
 * lw-window-private.h.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-application.h"
#include "lw-autosave.h"

G_BEGIN_DECLS

#define LW_TYPE_WINDOW (lw_window_get_type ())
G_DECLARE_FINAL_TYPE (LwWindow, lw_window, LW, WINDOW, GtkApplicationWindow)

/* A window on a new, unsaved design (lw_design_model_example_design). */
LwWindow *lw_window_new (LwApplication *app);

/* Opens file in this window. On failure a dialog shows the loader's message (NAME:LINE: …)
 * and the design on show stays as it was. Returns whether it was opened. */
gboolean lw_window_open_file (LwWindow *self, GFile *file);

/* Shows the bundled example NAME ("camera-slider", "kiln", "pump-pressure") as a new design
 * that has no file yet. FALSE (with a dialog) when there is no such example. */
gboolean lw_window_show_example (LwWindow *self, const char *name);

/* Whether the window shows an untouched new design (no file, no edit): then opening a file
 * replaces it instead of opening another window. */
gboolean lw_window_is_pristine (LwWindow *self);

/* Shows the autosaved document of a process that ended (lw_autosave_find_stale) as unsaved
 * work; the file it came from, if any, becomes the window's file.  The work becomes this
 * window's autosave (lw_autosave_adopt).  On failure a dialog explains, stale stays as it is,
 * and FALSE is returned. */
gboolean lw_window_restore_autosave (LwWindow *self, LwAutosaveStale *stale);

/* Benchmark: once the window is shown, drags the first corner of the first stage that has one
 * through n_frames frames on the frame clock, then prints one line
 *   drag frames: N, paint median X ms, p95 Y ms
 * and quits the application.  Paint: "before-paint" to "after-paint" of the GdkFrameClock,
 * which spans the update phase (the drag step and the evaluation), layout and paint. */
void lw_window_start_bench_drag (LwWindow *self, guint n_frames);

G_END_DECLS
