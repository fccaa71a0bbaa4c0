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
void lw_compensator_panel_show_eval (LwCompensatorPanel *self, LwVariantEval *eval);
/* Variants: a drop-down switches the active one (action window.variant-switch, u); the
 * Variants popover renames it (window.variant-rename, s), makes a copy or an empty one,
 * deletes and reorders it (window.variant-copy, -new, -delete, -up, -down), chooses the
 * variants compared with it (check boxes, window.variant-compare (sb): name, shown) and the
 * split view (window.split); which are compared is read from the document. Under the
 * actuator, the time responses the active variant shows (window.variant-responses, u: the
 * LW_DESIGN_RESPONSE_* flags). */
void lw_compensator_panel_popup_variants (LwCompensatorPanel *self);
/* Opens the add-stage menu. */
void lw_compensator_panel_popup_add_menu (LwCompensatorPanel *self);

G_END_DECLS
