/* lw-autosave.h — unsaved work kept on disk, one file per window, restored after a crash.
 *
 * One LwAutosave per application (process).  It owns a session directory
 *   STATE/loopwright/autosave/SESSION/     (STATE: g_get_user_state_dir (); SESSION: the
 *                                           process id and a random UUID)
 * holding `lock` (an flock(2) held while the process lives) and, per window that has unsaved
 * work, SLOT.lwd (the document, written atomically by lw_design_save_file) and SLOT.source
 * (the URI of the file the work came from, empty for a design never saved; written first,
 * atomically).  A window registers as a slot (lw_autosave_add); every interval the autosave
 * asks each slot for its unsaved work and writes it when it changed since the last write, or
 * removes the slot's files when there is none.  A slot's files go only when its window says
 * so (lw_autosave_clear: saved, discarded, closed), never because of another window.
 *
 * Stale work: a session directory whose lock can be taken belongs to a process that ended
 * without cleaning up (a crash, kill -9); its documents are offered for restore
 * (lw_autosave_find_stale).  The lock of a live process cannot be taken, so a second
 * process never offers the work of a running one, and two processes starting at once do not
 * both offer the same work: the finder holds the dead sessions' locks until
 * lw_autosave_release_stale.  The single autosave.lwd/autosave.source of earlier versions, if
 * present, is offered too.
 *
 * With LW_DEBUG_HANDLES=1 it prints what it does, for the tests:
 *   LW-AUTOSAVE event=wrote slot=N path=P source=URI|-
 *   LW-AUTOSAVE event=removed slot=N path=P
 *   LW-AUTOSAVE event=stale n=N [paths=P1,P2,…]     (oldest first)
 *   LW-AUTOSAVE event=adopted slot=N from=P
 *   LW-AUTOSAVE event=discarded path=P
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gio/gio.h>

#include "lw-design.h"

G_BEGIN_DECLS

#define LW_TYPE_AUTOSAVE (lw_autosave_get_type ())
G_DECLARE_FINAL_TYPE (LwAutosave, lw_autosave, LW, AUTOSAVE, GObject)

/* The unsaved work of a slot's owner, asked each round: the document to keep (read at once,
 * not kept) and in *source the file it came from (or NULL); NULL when there is nothing
 * unsaved (the slot's files are removed).  *later = TRUE: not now (a drag in progress),
 * nothing is written or removed this round. */
typedef const LwDesign *(*LwAutosaveAskFunc) (gpointer owner, GFile **source, gboolean *later);

/* Opens a new session under dir (created 0700 when missing), writing every interval_ms.
 * NULL with an error when the session cannot be made or locked. */
LwAutosave *lw_autosave_new (const char *dir, guint interval_ms, GError **error);

/* The default directory: g_get_user_state_dir ()/loopwright/autosave. g_free it. */
char *lw_autosave_default_dir (void);

/* A slot for owner (a number > 0), asked every round through ask until removed. */
guint lw_autosave_add (LwAutosave *self, gpointer owner, LwAutosaveAskFunc ask);
/* Forgets the slot's owner (its window is going); its files stay when it has any. */
void lw_autosave_remove (LwAutosave *self, guint slot);
/* The slot's work is saved or given up: its files are removed. */
void lw_autosave_clear (LwAutosave *self, guint slot);
/* Asks every slot now, as a round of the timer does. */
void lw_autosave_write_all (LwAutosave *self);

/* One autosaved document of a process that ended without cleaning up. */
typedef struct
{
  char *path;                   /* the document */
  char *source_uri;             /* the file the work came from, or NULL: never saved */
  gint64 mtime_s;               /* when it was written, Unix time in s */
  gboolean source_newer;        /* the source file was modified after it */
  /*< private >*/
  char *meta_path;
  gpointer session;
} LwAutosaveStale;

/* The stale autosaves (LwAutosaveStale *, oldest first; empty when none).  Their sessions
 * stay locked by this process, and the entries valid, until lw_autosave_release_stale. */
GPtrArray *lw_autosave_find_stale (LwAutosave *self);

/* stale, loaded as design, becomes the work of slot: written as the slot's files, then the
 * stale files removed.  FALSE with an error (the stale files untouched) when the write
 * fails. */
gboolean lw_autosave_adopt (LwAutosave *self, LwAutosaveStale *stale, guint slot,
                            const LwDesign *design, GError **error);
/* Removes stale's files. */
void lw_autosave_discard (LwAutosave *self, LwAutosaveStale *stale);
/* Unlocks the sessions lw_autosave_find_stale found, removing those left without work;
 * what was neither adopted nor discarded is offered again by the next process. */
void lw_autosave_release_stale (LwAutosave *self);

G_END_DECLS
