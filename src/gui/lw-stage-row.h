/* lw-stage-row.h — one compensator stage as a row: its kind, parameters with units in spin
 * buttons, an on/off switch, reorder and remove (actions stage.move-up, stage.move-down,
 * stage.remove).  Every edit goes to the design model.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-design-model.h"

G_BEGIN_DECLS

#define LW_TYPE_STAGE_ROW (lw_stage_row_get_type ())
G_DECLARE_FINAL_TYPE (LwStageRow, lw_stage_row, LW, STAGE_ROW, GtkListBoxRow)

/* The row of stage `index` of model. */
LwStageRow *lw_stage_row_new (LwDesignModel *model, guint index);

/* Title of a stage kind for display ("Lead", …), translated. */
const char *lw_stage_kind_title (LwStageKind kind);

G_END_DECLS
