/* lw-requirements-panel.h — the requirements (kind, editable target, achieved value, pass or
 * fail, by lw_requirement_evaluate), an add-requirement menu (action requirements.add,
 * parameter: lw_req_kind_name of the kind), and beneath them the loop's figures: margins,
 * crossovers, sensitivity peak, bandwidth, stability, step figures.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-family.h"
#include "lw-family-measured.h"

#include "lw-design-model.h"

G_BEGIN_DECLS

#define LW_TYPE_REQUIREMENTS_PANEL (lw_requirements_panel_get_type ())
G_DECLARE_FINAL_TYPE (LwRequirementsPanel, lw_requirements_panel, LW, REQUIREMENTS_PANEL,
                      GtkWidget)

void lw_requirements_panel_set_model (LwRequirementsPanel *self, LwDesignModel *model);
void lw_requirements_panel_show_eval (LwRequirementsPanel *self, LwVariantEval *eval);

/* The plant family of the active variant (lw-family.h) under the loop figures: its members,
 * the worst phase and gain margin and sensitivity peak with the members giving them, and how
 * many requirements pass on every member. family NULL with error: it could not be evaluated;
 * NULL without error and stale FALSE: the design has no family (nothing shown); stale TRUE:
 * a drag is on, the last family shown stays, marked as from before it. d is the document the
 * family was evaluated from. */
void lw_requirements_panel_show_family (LwRequirementsPanel *self, const LwFamily *family,
                                        const LwDesign *d, const GError *error,
                                        gboolean stale);
/* The measured family of the active variant (lw-family-measured.h: the design holds more than
 * one measured response) under the plant family's summary, the same way: its responses, the
 * worst margins and sensitivity peak with the responses giving them, the requirements judged
 * on the data passing on every response (or that it is not judged: analysis="model"). */
void lw_requirements_panel_show_measured_family (LwRequirementsPanel *self,
                                                 const LwMeasuredFamily *family,
                                                 const GError *error, gboolean stale);

G_END_DECLS
