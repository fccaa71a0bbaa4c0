/* lw-compare-table.h — the variants side by side: one column per variant compared, one row
 * per figure (margins, crossover, delay margin, sensitivity peak, step figures, performance
 * indices of the simulated reference step, peak actuator output) and one row per
 * requirement with its pass or fail.  In each figure's row the better value is marked (★:
 * the larger margin, the smaller peak, overshoot, time, index or actuator output, the higher
 * crossover) and every other variant's value carries its difference to the active one's.
 *
 * When the design is judged on its measured data (on_data), the margins, the crossover, the
 * delay margin and the sensitivity peak are those of the loop closed on the data, and every
 * figure's title says "data" or "model" (with the reason in its tooltip): the step figures,
 * the indices and the actuator peak need a model and stay the model's.
 *
 * With LW_DEBUG_HANDLES=1 the table prints each row it shows, once per change, as
 *   LW-METRIC row=KEY source=design|data|model active=V values=V1,V2,…
 * (values in column order, NaN when none).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-design-model.h"
#include "lw-family.h"
#include "lw-plot.h"

G_BEGIN_DECLS

#define LW_TYPE_COMPARE_TABLE (lw_compare_table_get_type ())
G_DECLARE_FINAL_TYPE (LwCompareTable, lw_compare_table, LW, COMPARE_TABLE, GtkWidget)

LwCompareTable *lw_compare_table_new (void);

/* Shows n variants (names[i], evals[i]; an evaluation may have failed; styles[i] the
 * variant's colour as LwPlotVariant.style, shown as a sample before its name, or NULL) with
 * the active one at index active, and the design's requirements (n_req, labels and limits);
 * on_data: the design is judged on its measured data (see the top). */
void lw_compare_table_show (LwCompareTable *self, const char *const *names,
                            LwVariantEval *const *evals, const guint *styles, guint n,
                            guint active, const LwDesignRequirement *reqs, guint n_req,
                            gboolean on_data);

/* The plant family of variant `variant` of d (lw-family.h), shown by the next
 * lw_compare_table_show as one more column while that variant is the active one: the worst
 * phase, gain and delay margin, sensitivity peak, overshoot and settling time over the
 * members (the member giving each in its tooltip), the crossover's range, and each
 * requirement judged on every member. NULL: no family column. With LW_DEBUG_HANDLES=1 each
 * LW-METRIC line ends with family=VALUE (the crossover's low end; a requirement's verdict).
 * _stale: the column is from before a drag (dimmed). */
void lw_compare_table_set_family (LwCompareTable *self, const LwFamily *f, const LwDesign *d,
                                  size_t variant);
void lw_compare_table_family_stale (LwCompareTable *self, gboolean stale);

/* The theme of the colour samples (as the plots'). */
void lw_compare_table_set_theme (LwCompareTable *self, LwPlotTheme theme);

G_END_DECLS
