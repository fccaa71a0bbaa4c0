/* lw-helper-dialog.h — one formula helper (lw-proposal.h) on the active variant: its targets
 * (empty fields take them from the requirements), a preview of what it proposes and what the
 * variant would reach with it, and Apply.
 *
 * The dialog works on a copy of the document made when it opens; the proposal is made again
 * (after a short pause) whenever a field changes. Apply emits "apply" with the proposal and
 * closes; the window puts it into the design as one undo step.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-design.h"
#include "lw-engine.h"
#include "lw-proposal.h"

G_BEGIN_DECLS

#define LW_TYPE_HELPER_DIALOG (lw_helper_dialog_get_type ())
G_DECLARE_FINAL_TYPE (LwHelperDialog, lw_helper_dialog, LW, HELPER_DIALOG, GtkWindow)

/* A dialog for helper kind on variant `variant` of a copy of d, over parent. cache may be
 * NULL. */
LwHelperDialog *lw_helper_dialog_new (GtkWindow *parent, LwHelperKind kind, const LwDesign *d,
                                      size_t variant, LwPlantCache *cache);

/* The proposal on show, or NULL when none could be made (the preview says why). */
const LwProposal *lw_helper_dialog_get_proposal (LwHelperDialog *self);

/* The preview's text, for tests. */
const char *lw_helper_dialog_get_preview (LwHelperDialog *self);

G_END_DECLS
