/* lw-plant-panel.h — plant and sampling: the plant expression (with its error marked at the
 * character), dead time, period and computation delay, the units; the plant's named
 * parameters and their ranges (lw-parameter-rows.h); beneath, the discretized plant in z and
 * in w, and a note when the period is far from the usual range for the closed-loop rise time.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-design-model.h"

G_BEGIN_DECLS

#define LW_TYPE_PLANT_PANEL (lw_plant_panel_get_type ())
G_DECLARE_FINAL_TYPE (LwPlantPanel, lw_plant_panel, LW, PLANT_PANEL, GtkWidget)

/* Shows model's values and writes every edit back to it. */
void lw_plant_panel_set_model (LwPlantPanel *self, LwDesignModel *model);
/* Shows an evaluation of the model: error marks, plant in z and w, the period note. */
void lw_plant_panel_show_eval (LwPlantPanel *self, LwVariantEval *eval);

/* The plant entry (for focus). */
GtkWidget *lw_plant_panel_get_entry (LwPlantPanel *self);

G_END_DECLS
