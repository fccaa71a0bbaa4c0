/* lw-history.h — undo and redo of a design model, as whole-document snapshots.
 *
 * The history watches its model's "changed" signal.  `committed` is the document as of the
 * last undo step; an edit (re)starts a timer of merge_ms, and when it fires the edits since
 * become one step (so a burst of spin-button steps or of typing is one step).  A step is
 * pushed only when the document differs from `committed` (lw_design_equal).  While held
 * (lw_history_hold: a drag in progress), edits start no timer; the holder commits once at
 * the end, so one drag is one step.  Undo and redo put a copy of a snapshot back with
 * lw_design_model_replace, so the document is restored byte for byte; those replacements are
 * not edits.  At most `depth` steps are kept (the oldest go first).
 *
 * "can-undo" and "can-redo" are notified when they change: undo is possible when there is a
 * step to go back to or an edit not yet committed.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <glib-object.h>

#include "lw-design-model.h"

G_BEGIN_DECLS

#define LW_TYPE_HISTORY (lw_history_get_type ())
G_DECLARE_FINAL_TYPE (LwHistory, lw_history, LW, HISTORY, GObject)

/* A history of model (a reference is kept) starting at its current document. depth >= 1. */
LwHistory *lw_history_new (LwDesignModel *model, guint depth, guint merge_ms);

/* Forgets every step: the current document is where undo stops. */
void lw_history_reset (LwHistory *self);

/* Makes the edits since the last step one step now (nothing when there are none). */
void lw_history_commit (LwHistory *self);

/* While held, edits are not merged on a timer (the holder commits when it lets go). */
void lw_history_hold (LwHistory *self, gboolean hold);

/* Commits what is pending, then steps back / forward; FALSE when there was nothing to do. */
gboolean lw_history_undo (LwHistory *self);
gboolean lw_history_redo (LwHistory *self);

gboolean lw_history_get_can_undo (LwHistory *self);
gboolean lw_history_get_can_redo (LwHistory *self);

/* Whether there are undo or redo steps (an edit not yet committed is not a step). */
gboolean lw_history_has_steps (LwHistory *self);

G_END_DECLS
