/* lw-proposal-private.h — what the files of the formula helpers share (lw-proposal.c,
 * lw-proposal-describe.c, lw-proposal-meet.c); not used outside them.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <math.h>
#include <stdarg.h>
#include <string.h>
#include "lw-proposal.h"
#include "lw-require.h"
#include "lw-synth.h"

/* Common practice, no source: a 10 % reserve on a low-frequency gain that must be reached. */
#define GAIN_RESERVE 1.1

/* Rounds of "meet the requirements", and the steps of each (see lw-proposal.h). */
#define MEET_ROUNDS 8

#define MEET_PM_STEP_DEG 5.0

#define MEET_CROSSOVER_STEP 1.15

/* A PI zero raised by this fraction of ν_c per round where settling fails, up to the maximum
 * (atan(0.4) = 21.8° of phase at ν_c; the lead pays it back). */
#define MEET_PI_STEP 0.1

#define MEET_PI_MAX 0.4

/* The crossover is kept below this fraction of the Nyquist frequency π/T. */
#define MEET_CROSSOVER_NYQUIST 0.5

typedef struct
{
  const LwDesign *d;
  size_t variant;
  LwPlantCache *cache;
  const LwHelperOptions *o;
  double T;
  GPtrArray *lines;
  LwVariantEval *base;          /* the variant as it is (its stages, none for MEET) */
  const LwStage *fixed;         /* the stages kept */
  size_t n_fixed;
  /* the design's analysis is on its measured data (<measured analysis="data">): the loop
   * closed on the data by base (its omega and p, the sampled plant at the points); NULL
   * when the analysis is on the model */
  const LwMeasuredLoop *data;
} Work;

/* The variant evaluated: on the model, or (a design with data alone, LW_EVAL_NO_MODEL) on its
 * measured data, with the requirements judged on them. */
static inline gboolean
lw_prop_evaluated (const LwVariantEval *e)
{
  return e->failure == LW_EVAL_OK || (e->failure == LW_EVAL_NO_MODEL && e->measured != NULL);
}

/* 1-based number of a requirement, for messages. */
#define REQ_NO(i) ((i) + 1)

G_GNUC_PRINTF (2, 3) void
lw_prop_say (Work *w, const char *fmt, ...);

gboolean
lw_prop_fail_core (const LwError *err, GError **error);

const char *
lw_prop_req_title (const LwDesign *d, size_t i);

double
lw_prop_target_crossover (Work *w, GError **error);

double
lw_prop_target_phase_margin (Work *w);

gboolean
lw_prop_error_needs (const LwDesign *d, int *need_type, double *need_kp, double *need_kv, size_t *which);

double
lw_prop_gain_shortfall (const LwAchieved *a, int need_type, double need_kp, double need_kv);

LwVariantEval *
lw_prop_evaluate_with (Work *w, const LwStage *stages, size_t n, gboolean replaces);

gboolean
lw_prop_check_crossover (Work *w, double wc, GError **error);

double
lw_prop_warp (Work *w, double wc);

void
lw_prop_say_lead (Work *w, const LwLeadDesign *ld);

gboolean
lw_prop_propose_meet (Work *w, LwProposal *p, GError **error);

LwSynthLoop
lw_prop_synth_loop (Work *w, const LwStage *fixed, size_t n_fixed);

gboolean
lw_prop_notch (Work *w, LwNotchDesign *nd, GError **error);
