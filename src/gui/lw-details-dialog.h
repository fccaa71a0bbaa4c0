/* lw-details-dialog.h — the document's own words: title, author and notes, edited in place
 * (each change an edit of the design model, so undo and the unsaved mark follow it). The
 * report shows them.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-design-model.h"

G_BEGIN_DECLS

#define LW_TYPE_DETAILS_DIALOG (lw_details_dialog_get_type ())
G_DECLARE_FINAL_TYPE (LwDetailsDialog, lw_details_dialog, LW, DETAILS_DIALOG, GtkWindow)

LwDetailsDialog *lw_details_dialog_new (GtkWindow *parent, LwDesignModel *model);

G_END_DECLS
