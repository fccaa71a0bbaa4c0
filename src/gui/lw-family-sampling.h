/* lw-family-sampling.h — how many members the plant family draws and their seed, in the plant
 * panel under the operating points (docs/families.md): "Family: [members] members drawn,
 * seed [seed]", two strict whole-number fields (lw-number-field.h), shown only while the
 * design has a family (lw_family_wanted: a ranged parameter or an operating point).
 *
 * Every edit is one call of lw_design_model_set_family_sampling and one undo step
 * (window.history-commit before and after). A fraction, a negative number or one over the
 * limit is refused at its field with the reason, the text kept there and marked, and the
 * design keeps what it had.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-design-model.h"

G_BEGIN_DECLS

#define LW_TYPE_FAMILY_SAMPLING (lw_family_sampling_get_type ())
G_DECLARE_FINAL_TYPE (LwFamilySampling, lw_family_sampling, LW, FAMILY_SAMPLING, GtkWidget)

/* Shows model's members and seed and follows its edits ("changed"); writes every edit back
 * to it. */
void lw_family_sampling_set_model (LwFamilySampling *self, LwDesignModel *model);

G_END_DECLS
