/* lw-point-rows.h — the operating points of the plant family in the plant panel
 * (docs/families.md): under the parameters, one row per point with its name (a text field),
 * a value field per parameter (empty: the point takes the nominal, shown as the field's
 * placeholder) and a button that removes the point; a button that adds a point named
 * "point N" with no values. Shown only while the design has parameters.
 *
 * Every edit is one call of an LwDesignModel setter (lw_design_model_add_point,
 * _rename_point, _set_point_value, _remove_point) and one undo step (window.history-commit
 * before and after). What the design would refuse (a value not finite, a name given twice or
 * not a point's name, a plant improper or zero at the point: lw_design_points_problem) is
 * refused at its field with the reason, the text kept there and marked, and the design keeps
 * what it had.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-design-model.h"

G_BEGIN_DECLS

#define LW_TYPE_POINT_ROWS (lw_point_rows_get_type ())
G_DECLARE_FINAL_TYPE (LwPointRows, lw_point_rows, LW, POINT_ROWS, GtkWidget)

/* Shows model's operating points and follows its edits ("changed"); writes every edit back
 * to it. */
void lw_point_rows_set_model (LwPointRows *self, LwDesignModel *model);

G_END_DECLS
