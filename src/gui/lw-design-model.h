/* lw-design-model.h — the design the window edits, and its evaluation.
 *
 * LwDesignModel holds what the engineer has entered: the plant expression in s, its input
 * dead time, the sample period, the computation delay, the compensator stages (in the
 * w-plane, see lw-stage.h) and the requirements (lw-require.h).  Every edit goes through a setter, which emits "changed"; edits
 * that add, remove or reorder stages also emit "stages-changed" first.  Data flows one way:
 * edit → design model → evaluation (lw_design_model_evaluate, which asks core/ for everything)
 * → views.
 *
 * The model is backed by a design document (LwDesign of src/doc/): every getter reads the
 * document and every setter writes into it, so what is edited is what is saved.  The stages
 * shown and edited are those of the document's active variant; other variants, the title,
 * notes and view settings are kept as loaded.  lw_design_model_replace swaps in a whole
 * document (open, undo, redo) and emits "replaced" so every panel shows it afresh.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <glib-object.h>

#include "lw-analysis.h"
#include "lw-design.h"
#include "lw-engine.h"
#include "lw-error.h"
#include "lw-model.h"
#include "lw-require.h"
#include "lw-simulate.h"
#include "lw-stage.h"

G_BEGIN_DECLS

#define LW_TYPE_DESIGN_MODEL (lw_design_model_get_type ())
G_DECLARE_FINAL_TYPE (LwDesignModel, lw_design_model, LW, DESIGN_MODEL, GObject)

/* A model editing design (taken: freed with the model). design has at least one variant and
 * a valid active index. */
LwDesignModel *lw_design_model_new (LwDesign *design);

/* The document as it stands (owned by the model; valid until the next replace). Copy it
 * (lw_design_copy) to keep a snapshot. */
const LwDesign *lw_design_model_get_design (LwDesignModel *self);

/* Replaces the document by design (taken). Emits "replaced", "stages-changed",
 * "requirements-changed" and "changed", in that order. */
void lw_design_model_replace (LwDesignModel *self, LwDesign *design);

/* A blank design: no plant yet (to be typed), period 1 ms, computation delay 1, one variant
 * without stages, no requirements. */
LwDesignModel *lw_design_model_new_blank (void);

/* The starting design of a new window, as a document (see lw_design_model_new_example). */
LwDesign *lw_design_model_example_design (void);

/* The camera-slider axis of data/examples/camera-slider.args (invented numbers): plant
 * 180/(s (s + 12)), T = 2 ms, one sample of delay, and the compensator 20 (w + 10)/(w + 80)
 * as a gain of 2.5 and a lead from 10 to 80 rad/s; requirements: phase margin >= 45°, gain
 * margin >= 6 dB, sensitivity peak <= 2, overshoot <= 25 %. */
LwDesignModel *lw_design_model_new_example (void);

typedef enum
{
  LW_DESIGN_TEXT_TITLE,
  LW_DESIGN_TEXT_AUTHOR,
  LW_DESIGN_TEXT_NOTES
} LwDesignTextField;

/* The document's title, author and notes (the report shows them). The title is never NULL;
 * an empty author or notes is left out of the document. */
const char *lw_design_model_get_text_field (LwDesignModel *self, LwDesignTextField field);
/* The views the design shows, in pane order (its <view shows="…">; NULL: none given). */
void lw_design_model_set_views (LwDesignModel *self, const char *const *names);
void lw_design_model_set_text_field (LwDesignModel *self, LwDesignTextField field,
                                     const char *text);

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
/* Nothing (no "changed") when stage equals the stored one byte for byte. */
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

/* Variants: the document holds one or more, each with its own stages (and optionally its own
 * sample period); the plant, the hold and the delays are shared. Every getter and setter of stages above works on the active one.
 * Each change emits "variants-changed", then ("stages-changed" when the active variant's
 * stages are others now) "changed". */
guint lw_design_model_get_n_variants (LwDesignModel *self);
guint lw_design_model_get_active (LwDesignModel *self);
const char *lw_design_model_get_variant_name (LwDesignModel *self, guint i);
void lw_design_model_set_active (LwDesignModel *self, guint i);
/* NULL when name can be the name of variant i (G_MAXUINT: a new one), else a sentence
 * saying why not (empty, not storable, taken by another variant). */
const char *lw_design_model_variant_name_problem (LwDesignModel *self, guint i,
                                                  const char *name);
/* base, or "base 2", "base 3" … : the first name no variant has (g_free it). */
char *lw_design_model_unused_variant_name (LwDesignModel *self, const char *base);
/* Appends a variant (no stages, or a copy of the active one's stages and notes) and makes it
 * active; FALSE (nothing changed) for a bad name or too many variants. */
gboolean lw_design_model_add_variant (LwDesignModel *self, const char *name,
                                      gboolean copy_active);
gboolean lw_design_model_rename_variant (LwDesignModel *self, guint i, const char *name);
/* The sample period (s) variant i is evaluated at: its own when it overrides the design's
 * (*overrides, may be NULL, says whether), else the design's. */
double lw_design_model_get_variant_period_s (LwDesignModel *self, guint i,
                                             gboolean *overrides);
/* The same for the active variant: the period its loop, its plots and its drag handles use. */
double lw_design_model_get_active_period_s (LwDesignModel *self);
/* Sets (overrides TRUE, period_s > 0 finite) or clears variant i's own sample period; FALSE
 * (nothing changed) for a bad period. */
gboolean lw_design_model_set_variant_period (LwDesignModel *self, guint i, gboolean overrides,
                                             double period_s);
/* Variant i's actuator: TRUE when it has limits, with them in *low, *high and whether the
 * integrators are held (*anti_windup); each pointer may be NULL. */
gboolean lw_design_model_get_variant_actuator (LwDesignModel *self, guint i, double *low,
                                               double *high, gboolean *anti_windup);
/* Sets (has TRUE: finite, low < high) or clears variant i's actuator limits; FALSE (nothing
 * changed) for limits that hold nothing. */
gboolean lw_design_model_set_variant_actuator (LwDesignModel *self, guint i, gboolean has,
                                               double low, double high, gboolean anti_windup);
/* The reference step variant i's limits are checked with (output units; 1 when not given),
 * and setting it (> 0, finite; only with limits; FALSE: nothing changed). */
double lw_design_model_get_variant_reference_step (LwDesignModel *self, guint i);
gboolean lw_design_model_set_variant_reference_step (LwDesignModel *self, guint i, double r);
/* Variant i's time responses shown (LW_DESIGN_RESPONSE_* flags) and whether it is compared
 * with the active one (both kept in the document); FALSE (nothing changed) for unknown flags. */
gboolean lw_design_model_set_variant_shown (LwDesignModel *self, guint i, unsigned responses,
                                            gboolean compared);
/* The units of the plant's input and output (NULL or empty: none); FALSE (nothing changed)
 * when one cannot be a unit (lw_design_unit_problem). */
/* The design's measured response: m (taken; NULL removes it) of kind, with where it came from
 * (source, may be NULL) — one "changed", so one undo step. The analysis choice stays. */
void lw_design_model_set_measured (LwDesignModel *self, LwMeasured *m, LwMeasuredKind kind,
                                   const char *source);
/* Judge the frequency-response requirements on the measured data (TRUE) or the model. */
void lw_design_model_set_measured_analysis (LwDesignModel *self, gboolean on_data);
/* Whether the design holds a measured response and is judged on it. */
gboolean lw_design_model_judged_on_data (LwDesignModel *self);
gboolean lw_design_model_set_units (LwDesignModel *self, const char *input_unit,
                                    const char *output_unit);
/* The plant's named parameters (the document's <parameters>, in order; docs/families.md).
 * The pointer is valid until the next edit. */
guint lw_design_model_get_n_params (LwDesignModel *self);
const LwDesignParam *lw_design_model_get_param (LwDesignModel *self, guint i);
/* Whether the plant's text uses name as a parameter. */
gboolean lw_design_model_plant_uses (LwDesignModel *self, const char *name);
/* The names the plant's text uses that no parameter gives, in order of first use (NULL-
 * terminated; g_strfreev). The dead time's name is never among them (it is not written in
 * the plant). */
char **lw_design_model_missing_params (LwDesignModel *self);
/* NULL when p can be set (replacing the parameter of its name, or added after the others),
 * else what lw_design_params_problem says of the design with it (g_free): a value not finite,
 * an empty or backward range, a nominal outside it, a log spread reaching zero, the dead
 * time's nominal not the plant's dead time, a corner of the ranges where the plant is
 * improper or zero. A plant that does not parse at the nominals (a name still to be given)
 * is the plant's error, shown at the plant, not p's. */
char *lw_design_model_param_problem (LwDesignModel *self, const LwDesignParam *p);
/* Sets p as lw_design_model_param_problem allows it: one "changed" (one undo step); a fixed
 * parameter keeps no range. FALSE with *why (may be NULL; g_free) and nothing changed when
 * refused. */
gboolean lw_design_model_set_param (LwDesignModel *self, const LwDesignParam *p, char **why);
/* Removes the parameter called name (one "changed"); FALSE when there is none. The points'
 * values of it go with it, and the points themselves with the last parameter, and the
 * family's members and seed (a document writes them inside <parameters>). */
gboolean lw_design_model_remove_param (LwDesignModel *self, const char *name);
/* The operating points of the plant family (the document's <point> elements, in order;
 * docs/families.md), found by their names (unique). The pointer is valid until the next edit.
 * lw-design-model-points.c. */
guint lw_design_model_get_n_points (LwDesignModel *self);
const LwDesignPoint *lw_design_model_get_point (LwDesignModel *self, guint i);
/* Whether point gives a value for parameter param (*value), or takes its nominal. */
gboolean lw_design_model_get_point_value (LwDesignModel *self, const char *point,
                                          const char *param, double *value);
/* Appends a point with no values (the nominal plant until values are given), named "point N"
 * (the first N from the number of points + 1 that no point has): one "changed". FALSE with
 * *why (may be NULL; g_free) when the design would refuse it (no parameters, a parameter
 * called "point", LW_DESIGN_MAX_POINTS reached). */
gboolean lw_design_model_add_point (LwDesignModel *self, char **why);
/* Renames point `point` to name: one "changed" (none when it has that name already). FALSE
 * with *why, nothing changed, when lw_design_points_problem would refuse it (a name empty,
 * over 64 bytes, with ':' or a tab, a space at either end, or another point's). */
gboolean lw_design_model_rename_point (LwDesignModel *self, const char *point,
                                       const char *name, char **why);
/* Gives point `point` the value *value of parameter param, or (value NULL) takes the value
 * away so that the point takes the nominal: one "changed" (none when nothing changes). The
 * values stay in the order of the parameters. FALSE with *why, nothing changed, when the
 * design would refuse it: a value not finite, a parameter the design does not have, a dead
 * time negative or over 1e6 sample periods, a plant improper or zero at the point. A plant
 * that does not parse at the nominals (a name still to be given) is the plant's error, not
 * the point's. */
gboolean lw_design_model_set_point_value (LwDesignModel *self, const char *point,
                                          const char *param, const double *value, char **why);
/* What is wrong with the design's operating points as they are (a plant typed since that is
 * improper or zero at one), or NULL (g_free); a plant failing at a point as at the nominals
 * is the plant's error, not the point's. */
char *lw_design_model_get_points_problem (LwDesignModel *self);
/* What the parameter and point rows show, as text: the plant, its dead time and period, the
 * parameters and the points with every number to 17 digits. Equal texts: nothing they show
 * changed (a stage dragged), so they need not be touched. g_free it. */
char *lw_design_model_params_key (LwDesignModel *self);
/* The plant family's drawn members and their seed as the engine takes them
 * (lw_family_options_for): the document's <parameters members seed>, else the defaults. */
void lw_design_model_get_family_sampling (LwDesignModel *self, gsize *members, guint64 *seed);
/* Sets them: one "changed" (one undo step), none when both are as they are; a value as it is
 * stays as the document gives it (written or left out), one that changes is written. FALSE
 * with *why (may be NULL; g_free), nothing changed, for a design without parameters (a
 * document writes them in <parameters>), members over LW_DESIGN_MAX_FAMILY_MEMBERS or a seed
 * over G_MAXINT64. lw-design-model-params.c. */
gboolean lw_design_model_set_family_sampling (LwDesignModel *self, gsize members, guint64 seed,
                                              char **why);
/* Removes point `point` (one "changed"); FALSE when there is none. */
gboolean lw_design_model_remove_point (LwDesignModel *self, const char *point);

/* Removes variant i; FALSE for the last one left. The active index follows its variant, or
 * moves to the neighbour when the active one goes. */
gboolean lw_design_model_remove_variant (LwDesignModel *self, guint i);
/* Swaps variant i with its neighbour i + delta (−1 or +1); nothing when out of range. */
void lw_design_model_move_variant (LwDesignModel *self, guint i, int delta);

/* Evaluates the design now, on the calling thread, through the engine (lw-engine.h: the same
 * evaluation as the CLI and the report). The sampled plant is kept in the model's cache
 * between calls while plant, dead time and period are unchanged, so a compensator edit costs
 * one loop evaluation. Never NULL. */
LwVariantEval *lw_design_model_evaluate (LwDesignModel *self);
/* The same on a grid of n_points frequency points up to π/T (>= 16) instead of the default
 * 2000 of lw_analysis_options_init: the window's draft evaluation during a drag, with about
 * as many points as the plots have pixels across. Crossovers and margins are refined to full
 * precision either way; only the drawn curves are coarser. */
LwVariantEval *lw_design_model_evaluate_points (LwDesignModel *self, size_t n_points);
/* The same for variant `variant` of the document (not necessarily the active one): plant,
 * sampling and delay are shared by every variant, the stages are the variant's. */
LwVariantEval *lw_design_model_evaluate_variant (LwDesignModel *self, guint variant,
                                                 size_t n_points);

/* The model's cache of sampled plants (for evaluations made elsewhere, e.g. in a worker
 * thread, with lw_engine_evaluate_variant on a copy of the document). */
LwPlantCache *lw_design_model_get_plant_cache (LwDesignModel *self);

G_END_DECLS
