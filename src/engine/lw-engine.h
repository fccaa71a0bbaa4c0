/* lw-engine.h — the one evaluation of a design variant, shared by the window, the CLI and the
 * report.
 *
 * Given a design document and one of its variants, the engine parses the plant, samples it
 * (exact zero-order hold with dead time; the sampled plant is kept in an LwPlantCache and
 * shared by every evaluation made with it), builds the variant's compensator in w and z,
 * evaluates the loop (lw_evaluate: crossovers, margins, closed loop, step), simulates the
 * reference step (and on request the disturbance steps) with the given actuator limits,
 * derives the achieved figures and judges each of the document's requirements.  A loop given
 * without a document (the CLI's loop options) takes the same path from its sampled plant on
 * (lw_engine_evaluate_loop), so a number is the same wherever it is shown.
 *
 * Layering: the engine sits on doc/ and core/ and knows nothing of plot/, the CLI or GTK.
 * Errors are GErrors; a failure of the core keeps the core's status as its code in
 * LW_ENGINE_ERROR (so callers can tell bad input, LW_ERR_PARSE/LW_ERR_INVALID, from an
 * internal failure) and says which part of the design failed in LwVariantEval.failure.
 *
 * Threads: an evaluation touches no global state; an LwPlantCache may be shared between
 * threads (it locks), and an LwVariantEval, once made, is read-only and reference-counted, so
 * a worker thread can make it and the main thread draw it.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <glib.h>

#include "lw-analysis.h"
#include "lw-design.h"
#include "lw-measured.h"
#include "lw-model.h"
#include "lw-require.h"
#include "lw-simulate.h"

G_BEGIN_DECLS

/* GError domain of the engine; codes are the core's LwStatus values (LW_ERR_PARSE …). */
#define LW_ENGINE_ERROR (lw_engine_error_quark ())
GQuark lw_engine_error_quark (void);

/* Common practice, no source: 10 to 30 samples per closed-loop rise time. */
#define LW_SAMPLES_PER_RISE_MIN 10.0
#define LW_SAMPLES_PER_RISE_MAX 30.0

typedef enum
{
  LW_SAMPLING_ADVICE_NONE = 0,   /* within the usual range, or no rise time to judge by */
  LW_SAMPLING_ADVICE_TOO_FEW,    /* fewer than 10 samples per rise: a shorter period */
  LW_SAMPLING_ADVICE_TOO_MANY    /* more than 30: a longer period would do */
} LwSamplingAdvice;

/* The one rule for the sample period against the closed-loop rise time; *per_rise (may be
 * NULL) is the number of samples per rise time when the step has one. */
LwSamplingAdvice lw_engine_sampling_advice (const LwStep *step, double period_s,
                                            double *per_rise);

/* A controller pole on the negative real axis near z = −1 alternates its sign every sample:
 * the controller rings at half the sample rate (a filter faster than the loop can sample,
 * e.g. a derivative filter with N/Td > 2/T, whose Tustin image lies left of z = 0). TRUE with
 * the pole in *pole when controller_z has a real pole at or left of this (common practice, no
 * source: it then loses less than half its amplitude per sample). */
#define LW_RINGING_POLE_LIMIT (-0.5)
gboolean lw_engine_ringing_pole (const LwModel *controller_z, double *pole);

/* ---- the sampled-plant cache ------------------------------------------------------------ */

/* Sampled plants by (plant text, dead time, period). A new plant or dead time drops the
 * entries of the old one; at most a few periods are kept (variants may have their own).
 * Thread-safe. */
typedef struct _LwPlantCache LwPlantCache;

LwPlantCache *lw_plant_cache_new (void);
LwPlantCache *lw_plant_cache_ref (LwPlantCache *cache);
void lw_plant_cache_unref (LwPlantCache *cache);
G_DEFINE_AUTOPTR_CLEANUP_FUNC (LwPlantCache, lw_plant_cache_unref)

/* ---- options ------------------------------------------------------------------------------ */

/* The longest step the engine chooses by itself (samples): 20 000 samples of a few series are
 * a few hundred kB and a few ms to simulate. */
#define LW_ENGINE_STEP_HORIZON_MAX 20000
/* With the continuous output between samples (substeps M > 0), the horizon chosen keeps
 * (n − 1)·M within this many points, so that every sample written as JSON (6 series of n
 * and (t, y) of the continuous output: at most 6·20 000 + 2·900 001 numbers) stays within
 * the CLI's 2 000 000 (docs/cli.md, Limits). */
#define LW_ENGINE_CONTINUOUS_MAX 900000.0

/* Step samples long enough for a stable loop's slowest closed-loop pole r to settle:
 * 1.5·ln(0.02)/ln r + the closed-loop order + 10, at most LW_ENGINE_STEP_HORIZON_MAX;
 * 0 when the loop is not stable or has no pole to go by. */
size_t lw_engine_step_horizon (const LwEvaluation *ev);

typedef struct
{
  size_t n_points;          /* frequency points up to π/T, >= 16; 0: lw_analysis_options_init */
  size_t n_steps;           /* step samples, >= 2; 0: lw_analysis_options_init's 500, longer
                               (lw_engine_step_horizon) when the step has not settled by then */
  LwSimOptions sim;         /* limits, anti-windup, substeps; compute_delay and n_steps are
                               set from the loop and n_steps above */
  gboolean disturbances;    /* also simulate the input- and output-disturbance steps */
  double reference_step;    /* the reference step's size in the output's units (0: 1); with
                               limits the response depends on it. The simulated y (and the
                               continuous output) are given in units of r, divided by it;
                               u in the actuator's units */
} LwEngineOptions;

/* Default points and steps, no limits, no continuous output (substeps 0), reference step
 * only. */
void lw_engine_options_init (LwEngineOptions *o);

/* ---- the evaluation ----------------------------------------------------------------------- */

/* Which part of the design an evaluation failed on. */
typedef enum
{
  LW_EVAL_OK = 0,
  LW_EVAL_FAILED_PLANT,         /* the plant expression; error_position is its character */
  LW_EVAL_FAILED_SAMPLING,      /* period or dead time */
  LW_EVAL_FAILED_COMPENSATOR,   /* a stage's parameters */
  LW_EVAL_FAILED_LOOP,          /* the loop evaluation itself */
  LW_EVAL_NO_MODEL              /* not a failure of the input: the design has no plant model
                                   (lw_design_has_model), only measured data. The controller,
                                   the loop on the data (measured) and the requirements judged
                                   on it are set; every model figure is absent (ev NULL) and
                                   has_achieved holds the data's figures alone */
} LwEvalFailure;

typedef struct
{
  /* what was evaluated */
  size_t variant;                 /* index in the document (0 for a loop without one) */
  double period_s;                /* the variant's own period, else the design's */
  double dead_time_s;
  int compute_delay;

  /* a failure, or LW_EVAL_OK with everything below that depends on it set */
  LwEvalFailure failure;
  GError *error;                  /* LW_ENGINE_ERROR, the core's message; NULL when OK */
  int error_position;             /* 0-based character of a plant failure, else −1 */

  LwModel *plant_s;               /* NULL when the plant failed to parse */
  LwModel *controller_w;          /* NULL when the compensator failed, or given in z */
  LwModel *controller_z;          /* NULL when the compensator failed */
  const LwSampledPlant *sampled;  /* held by the evaluation; NULL on a plant/sampling failure */
  LwEvaluation *ev;               /* NULL on any failure */
  /* how far the factored forms ev->plant_z and ev->plant_w (for display) are from the plant
   * (lw_sampled_plant_form_error): above LW_FORM_TOLERANCE they are not the plant and are
   * shown as such; NAN when it could not be checked */
  double plant_z_form_error;
  double plant_w_form_error;

  /* the step whose figures are reported: ev->step, or with actuator limits the limited
   * loop's (samples of sim_ref, figures against the linear loop's final value; see
   * docs/simulation.md) */
  LwStep step;

  /* simulations (lw-simulate.h); NULL when not run or failed (sim_error says why) */
  LwSimResponse *sim_ref;         /* reference step of amplitude 1 */
  LwSimResponse *sim_in;          /* input-disturbance step (options.disturbances) */
  LwSimResponse *sim_out;         /* output-disturbance step (options.disturbances) */
  GError *sim_error;
  gboolean has_sim;               /* sim_ref is set */
  LwSimIndices indices;           /* of sim_ref */
  double actuator_peak;           /* max |u(kT)| of sim_ref */

  /* the achieved figures (with the actuator peak of sim_ref) and, for a variant of a
   * document, each requirement's verdict in the document's order */
  gboolean has_achieved;
  LwAchieved achieved;
  GError *achieved_error;         /* why has_achieved is false */
  size_t n_requirements;
  LwReqResult *requirements;      /* n_requirements verdicts; NULL without a document */
  size_t n_not_passing;           /* failed or not available */
  /* the simulations' options as run: the caller's actuator limits, else the variant's
   * (LwDesignVariant.has_actuator) */
  LwSimOptions sim_options;
  double reference_step;          /* the size of the reference step simulated (1: a unit step) */
  /* the time responses the variant shows (LwDesignVariant.responses; all of them for a loop
   * without a document) */
  unsigned responses;
  /* the units of the plant's input and output (LwDesign.input_unit, .output_unit), copies;
   * NULL when not given or without a document */
  char *input_unit;
  char *output_unit;
  /* the design's measured response (<measured>) with this variant's controller, period,
   * computation delay and dead time: the loop closed on the data (lw_measured_loop_close),
   * the table's kind and a copy of the coherence of the points used (NULL when the table has
   * none); measured NULL without a measurement, or when it cannot be used at this period
   * (measured_error says why) */
  LwMeasuredLoop *measured;
  LwMeasuredKind measured_kind;
  double *measured_coherence;
  GError *measured_error;
} LwVariantEval;

/* Evaluates variant `variant` of d. cache (may be NULL) keeps the sampled plant between
 * calls; opts NULL means lw_engine_options_init. The simulations use the actuator limits of
 * opts->sim when it has some, else the variant's own (its <actuator> element). Never NULL: a failure is in ->failure and
 * ->error. */
LwVariantEval *lw_engine_evaluate_variant (const LwDesign *d, size_t variant,
                                           const LwEngineOptions *opts, LwPlantCache *cache);

/* A loop without a document: the plant in s, its sampled form (not taken; must outlive the
 * evaluation), the controller in z (and in w when known; both copied) and the computation
 * delay. No requirements are judged. Never NULL. */
typedef struct
{
  const LwModel *plant_s;
  const LwSampledPlant *sampled;
  const LwModel *controller_w;    /* may be NULL */
  const LwModel *controller_z;
  double dead_time_s;
  int compute_delay;
} LwEngineLoop;

LwVariantEval *lw_engine_evaluate_loop (const LwEngineLoop *loop, const LwEngineOptions *opts);

/* The crossing that governs the phase margin (gain: TRUE; the gain crossover of
 * m->gain_crossover_rad_s) or the gain margin (FALSE) of the loop on the data, so its interval
 * and coherence can be shown with it; NULL when the data hold none. */
const LwMeasuredCrossing *lw_engine_measured_governing (const LwMeasuredMargins *m,
                                                        gboolean gain);

/* The figures requirements are judged on when the analysis is on measured data, as the
 * engine judges a variant's loop on the design's first measured response (and a measured
 * family each of its responses, lw-family-measured.h): with a model (has_model), a holds the
 * model's achieved figures and its phase margin, gain margin, crossover and sensitivity peak
 * are replaced by the data's (not available where the data cannot tell them), stability
 * cleared when the data call the loop unstable; without one, a is the data's alone and empty
 * when the data leave stability undecided. ml NULL: the loop could not be closed. */
void lw_engine_achieved_on_data (LwAchieved *a, const LwMeasuredLoop *ml, gboolean has_model);

/* TRUE when e evaluated, else FALSE with a copy of its error in *error. */
gboolean lw_variant_eval_ok (const LwVariantEval *e, GError **error);

LwVariantEval *lw_variant_eval_ref (LwVariantEval *e);
void lw_variant_eval_unref (LwVariantEval *e);
G_DEFINE_AUTOPTR_CLEANUP_FUNC (LwVariantEval, lw_variant_eval_unref)

/* Factored text of a model, 6 significant digits (lw_model_format); g_free the result. */
char *lw_model_text (const LwModel *m);

/* A model in s as an expression the plant parser takes (what `fit` prints and the window's
 * "Use as Plant" stores): gain*(s+a)*(s^2+b*s+c)/(…), every number to 17 significant digits
 * so the parse gives the model back to rounding, a conjugate pair of roots as one real
 * quadratic; g_free the result. */
char *lw_model_expression (const LwModel *m);

/* A requirement's target in words: "at least 45 deg", "20 to 60 rad/s" …; g_free it. */
char *lw_requirement_target_text (const LwRequirement *r);

/* TRUE for the requirements judged on the loop's frequency response (phase and gain margin,
 * sensitivity peak, crossover): those a measured response can judge (analysis "data"). */
gboolean lw_req_kind_from_frequency_response (LwReqKind kind);

/* "pass", "fail", "not-available": the words of a verdict in JSON and reports. */
const char *lw_req_status_word (LwReqStatus s);

G_END_DECLS
