/* lw-compensator-panel.h — the compensator: stages as rows (lw-stage-row.h), an add-stage
 * menu with every stage kind (action compensator.add-stage, parameter: the kind's name as
 * lw_stage_kind_name spells it), and the compensator in w and in z beneath.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-design-model.h"

G_BEGIN_DECLS

#define LW_TYPE_COMPENSATOR_PANEL (lw_compensator_panel_get_type ())
G_DECLARE_FINAL_TYPE (LwCompensatorPanel, lw_compensator_panel, LW, COMPENSATOR_PANEL,
                      GtkWidget)

void lw_compensator_panel_set_model (LwCompensatorPanel *self, LwDesignModel *model);
/* Shows an evaluation: the compensator's error or its models in w and z; new stages are
 * placed around its gain crossover. */
void lw_compensator_panel_show_eval (LwCompensatorPanel *self, LwLoopEval *eval);
/* Opens the add-stage menu. */
void lw_compensator_panel_popup_add_menu (LwCompensatorPanel *self);

G_END_DECLS
