/* lw-parameter-rows.h — the plant's named parameters in the plant panel (docs/families.md):
 * one row per parameter with its nominal value and whether it is fixed, a range or a range
 * spread in log; a range's low and high end on a row beneath; a row with an empty value for
 * each name the plant uses that no parameter gives yet (typing a value adds it); a button
 * that removes a parameter; the dead time as a parameter (its nominal the dead-time field's)
 * with a range of its own. A design without parameters and without a name to give shows
 * nothing here.
 *
 * Every edit is one call of an LwDesignModel setter (lw_design_model_set_param, _remove_param)
 * and one undo step (window.history-commit before and after). A value the design would refuse
 * (lw_design_model_param_problem: an empty or backward range, a nominal outside it, a log
 * spread reaching zero, a corner where the plant is improper or zero) is refused at its field
 * with the reason, and the design keeps what it had.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-design-model.h"

G_BEGIN_DECLS

#define LW_TYPE_PARAMETER_ROWS (lw_parameter_rows_get_type ())
G_DECLARE_FINAL_TYPE (LwParameterRows, lw_parameter_rows, LW, PARAMETER_ROWS, GtkWidget)

/* Shows model's parameters and follows its edits ("changed"); writes every edit back to it. */
void lw_parameter_rows_set_model (LwParameterRows *self, LwDesignModel *model);

/* The names of the rows go into group (the panel's column of field names), so that they line
 * up with the fields above. */
void lw_parameter_rows_set_label_group (LwParameterRows *self, GtkSizeGroup *group);

/* button (the panel's, beside the dead-time field) makes the dead time a parameter with a
 * range; shown while the design has a plant model and no such parameter. */
void lw_parameter_rows_set_dead_time_button (LwParameterRows *self, GtkWidget *button);

G_END_DECLS
