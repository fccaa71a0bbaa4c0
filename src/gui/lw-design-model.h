/* lw-design-model.h — the design the window edits, and its evaluation.
 *
 * LwDesignModel holds what the engineer has entered: the plant expression in s, its input
 * dead time, the sample period, the computation delay, the compensator stages (in the
 * w-plane, see lw-stage.h) and the requirements (lw-require.h).  Every edit goes through a setter, which emits "changed"; edits
 * that add, remove or reorder stages also emit "stages-changed" first.  Data flows one way:
 * edit → design model → evaluation (lw_design_model_evaluate, which asks core/ for everything)
 * → views.
 *
 * This is the window's working state; the design document of src/doc/ (its LwDesign, with
 * variants and requirements) will be loaded into it and saved from it.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <glib-object.h>

#include "lw-analysis.h"
#include "lw-error.h"
#include "lw-model.h"
#include "lw-require.h"
#include "lw-stage.h"

G_BEGIN_DECLS

#define LW_TYPE_DESIGN_MODEL (lw_design_model_get_type ())
G_DECLARE_FINAL_TYPE (LwDesignModel, lw_design_model, LW, DESIGN_MODEL, GObject)

/* The camera-slider axis of data/examples/camera-slider.args (invented numbers): plant
 * 180/(s (s + 12)), T = 2 ms, one sample of delay, and the compensator 20 (w + 10)/(w + 80)
 * as a gain of 2.5 and a lead from 10 to 80 rad/s; requirements: phase margin >= 45°, gain
 * margin >= 6 dB, sensitivity peak <= 2, overshoot <= 25 %. */
LwDesignModel *lw_design_model_new_example (void);

const char *lw_design_model_get_plant_text (LwDesignModel *self);
void lw_design_model_set_plant_text (LwDesignModel *self, const char *text);
double lw_design_model_get_dead_time_s (LwDesignModel *self);
void lw_design_model_set_dead_time_s (LwDesignModel *self, double dead_time_s);
double lw_design_model_get_period_s (LwDesignModel *self);
void lw_design_model_set_period_s (LwDesignModel *self, double period_s);
int lw_design_model_get_compute_delay (LwDesignModel *self);
void lw_design_model_set_compute_delay (LwDesignModel *self, int samples);

guint lw_design_model_get_n_stages (LwDesignModel *self);
/* The i-th stage (i < n); the pointer is valid until the next edit. */
const LwStage *lw_design_model_get_stage (LwDesignModel *self, guint i);
void lw_design_model_set_stage (LwDesignModel *self, guint i, const LwStage *stage);
void lw_design_model_append_stage (LwDesignModel *self, const LwStage *stage);
void lw_design_model_remove_stage (LwDesignModel *self, guint i);
/* Swaps stage i with its neighbour i + delta (delta −1 or +1); nothing when out of range. */
void lw_design_model_move_stage (LwDesignModel *self, guint i, int delta);

/* Requirements, in order (limits in the units of lw_req_kind_unit). Setting one emits
 * "changed"; appending one emits "requirements-changed" first. */
guint lw_design_model_get_n_requirements (LwDesignModel *self);
const LwRequirement *lw_design_model_get_requirement (LwDesignModel *self, guint i);
void lw_design_model_set_requirement (LwDesignModel *self, guint i, const LwRequirement *r);
void lw_design_model_append_requirement (LwDesignModel *self, const LwRequirement *r);

/* Which part of the design an evaluation failed on. */
typedef enum
{
  LW_LOOP_OK = 0,
  LW_LOOP_FAILED_PLANT,         /* the plant expression; error.position is the character */
  LW_LOOP_FAILED_SAMPLING,      /* period or dead time */
  LW_LOOP_FAILED_COMPENSATOR,   /* a stage's parameters */
  LW_LOOP_FAILED_LOOP           /* the loop evaluation itself */
} LwLoopFailure;

/* One evaluation of the design, reference-counted so views can keep the one they draw. */
typedef struct
{
  LwLoopFailure failure;
  LwError error;                  /* the failure's message (code LW_OK when none) */
  LwZpk *plant_s;                 /* NULL when the plant failed to parse */
  LwZpk *controller_w;            /* NULL when the compensator failed */
  LwEvaluation *ev;               /* NULL on any failure */
  /* the sampled plant ev was evaluated against, owned by the model: valid only until the
   * model's next evaluation (for the figure adapter, which needs it once per evaluation) */
  const LwSampledPlant *sampled;
  gboolean has_achieved;          /* achieved figures, when ev is set */
  LwAchieved achieved;
} LwLoopEval;

/* Evaluates the design now, on the calling thread. The sampled plant is kept between calls
 * while plant, dead time and period are unchanged, so a compensator edit costs one loop
 * evaluation. Never NULL. */
LwLoopEval *lw_design_model_evaluate (LwDesignModel *self);
LwLoopEval *lw_loop_eval_ref (LwLoopEval *e);
void lw_loop_eval_unref (LwLoopEval *e);
G_DEFINE_AUTOPTR_CLEANUP_FUNC (LwLoopEval, lw_loop_eval_unref)

G_END_DECLS
