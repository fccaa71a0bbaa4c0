/* lw-family-measured.h — a measured family: one controller's margins over several measured
 * frequency responses (one sweep per machine: the document's <measured> responses, or the
 * tables given by `--measured` repeated; docs/families.md, "Measured families").
 *
 * Each response is closed with the variant's controller exactly as the engine closes the
 * design's first one (lw_measured_loop_close: the variant's period, computation delay and
 * dead time, the model's sampled plant for the comparison when there is one; crossovers and
 * margins found between the points; the Nyquist criterion on the data with the response's
 * own count of open-loop unstable poles). Then:
 *   - the worst phase margin, gain margin (the smallest) and sensitivity peak (the largest)
 *     over the responses, each with the response giving it;
 *   - each requirement judged on the loop on the data (phase and gain margin, crossover,
 *     sensitivity peak: lw_req_kind_from_frequency_response) judged on every response as the
 *     engine judges the first one (lw_engine_achieved_on_data), the worst verdict with its
 *     response (a fail before "not available" before a pass, then the smallest slack); the
 *     other requirements are the model's and are not part of it;
 *   - the responses whose loop the data call unstable, or whose verdict is undecided.
 * The verdicts count (`check` fails on them) when the design's analysis is on the data
 * (lw_design_analysis_on_data); with analysis="model" the figures are shown and marked as not
 * judged.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <glib.h>

#include "lw-design.h"
#include "lw-engine.h"

G_BEGIN_DECLS

typedef struct
{
  char *name;                     /* lw_design_measured_set_name */
  LwMeasuredKind kind;
  size_t points;                  /* of the table */
  gboolean closed;                /* FALSE: the loop could not be closed (error says why) */
  char *error;
  LwMeasuredLoop loop;            /* when closed */
  /* the figures the requirements are judged on (the model's time-domain figures with the
   * data's frequency-response ones, as the engine's LwVariantEval.achieved on data) */
  LwAchieved achieved;
  LwReqResult *requirements;      /* n_requirements of the family; NOT_AVAILABLE for those
                                     not judged on data */
} LwMeasuredFamilySet;

typedef enum
{
  LW_MEASURED_FAMILY_PHASE_MARGIN = 0,
  LW_MEASURED_FAMILY_GAIN_MARGIN,
  LW_MEASURED_FAMILY_SENSITIVITY,
  LW_MEASURED_FAMILY_N_FIGURES
} LwMeasuredFamilyFigure;

typedef struct
{
  size_t n_sets;
  LwMeasuredFamilySet *sets;      /* in the document's order: [0] is the first <measured> */
  gboolean judged;                /* the design's analysis is on the data */
  size_t n_failed;                /* responses whose loop could not be closed */
  size_t n_unstable;              /* the data's Nyquist verdict: unstable */
  size_t n_undecided;             /* … undecided */
  /* per figure, the response giving the worst value (G_MAXSIZE: none has it) and the value */
  size_t worst[LW_MEASURED_FAMILY_N_FIGURES];
  double worst_value[LW_MEASURED_FAMILY_N_FIGURES];
  /* each requirement of the design (n_requirements, the document's order); judged[r]: it is
   * one judged on the data; requirement_set[r] the response of the worst verdict (G_MAXSIZE:
   * none) */
  size_t n_requirements;
  gboolean *judged_requirement;
  LwReqResult *requirements;
  size_t *requirement_set;
  size_t n_not_passing;           /* judged requirements that fail or are not available on
                                     some response (0 when !judged) */
} LwMeasuredFamily;

/* Whether d is a measured family: it holds more than one measured response. */
gboolean lw_measured_family_wanted (const LwDesign *d);

/* The measured family of d with the loop of variant evaluation e (lw_engine_evaluate_variant
 * of d: its controller, period, computation delay, dead time, model and achieved figures).
 * NULL with an error (LW_ENGINE_ERROR) when e has no controller (its compensator failed). */
LwMeasuredFamily *lw_measured_family_evaluate (const LwDesign *d, const LwVariantEval *e,
                                               GError **error);
void lw_measured_family_free (LwMeasuredFamily *f);
G_DEFINE_AUTOPTR_CLEANUP_FUNC (LwMeasuredFamily, lw_measured_family_free)

/* The words of a figure ("phase margin", "gain margin", "sensitivity peak") and its unit. */
const char *lw_measured_family_figure_name (LwMeasuredFamilyFigure f);
const char *lw_measured_family_figure_unit (LwMeasuredFamilyFigure f);

G_END_DECLS
