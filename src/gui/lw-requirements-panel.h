/* lw-requirements-panel.h — the requirements (kind, editable target, achieved value, pass or
 * fail, by lw_requirement_evaluate), an add-requirement menu (action requirements.add,
 * parameter: lw_req_kind_name of the kind), and beneath them the loop's figures: margins,
 * crossovers, sensitivity peak, bandwidth, stability, step figures.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-design-model.h"

G_BEGIN_DECLS

#define LW_TYPE_REQUIREMENTS_PANEL (lw_requirements_panel_get_type ())
G_DECLARE_FINAL_TYPE (LwRequirementsPanel, lw_requirements_panel, LW, REQUIREMENTS_PANEL,
                      GtkWidget)

void lw_requirements_panel_set_model (LwRequirementsPanel *self, LwDesignModel *model);
void lw_requirements_panel_show_eval (LwRequirementsPanel *self, LwVariantEval *eval);

G_END_DECLS
