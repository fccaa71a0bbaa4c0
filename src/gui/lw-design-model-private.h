/* lw-design-model-private.h — what the parts of LwDesignModel share (lw-design-model.c,
 * lw-design-model-variants.c).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-design-model.h"

struct _LwDesignModel
{
  GObject parent_instance;

  LwDesign *doc;                /* the document being edited (owned) */

  /* the sampled plants of the last evaluations, one per sample period (variants may have
   * their own) */
  LwPlantCache *cache;
};

/* "changed": any edit; the evaluation and every view are out of date. */
void lw_design_model_emit_changed (LwDesignModel *self);
/* "variants-changed" (and "stages-changed" when stages_too), then "changed". */
void lw_design_model_emit_variants_changed (LwDesignModel *self, gboolean stages_too);

/* What would be wrong with the operating points of d (a view of the document with some
 * parameters or points in place of its own), or NULL (g_free): lw_design_points_problem's
 * rules, except that a plant failing at a point as it fails at the nominals (a name still to
 * be given) is the plant's error, not the point's. lw-design-model-points.c. */
char *lw_design_model_points_problem (const LwDesign *d);
