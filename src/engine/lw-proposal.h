/* lw-proposal.h — the formula helpers applied to a design variant: stages proposed from the
 * document's requirements (or from targets given), with the variant evaluated as it would be
 * with them, before anything is changed.  The window's helper commands and the CLI's
 * `suggest` both call lw_proposal_make, so a proposal is the same wherever it is asked for.
 *
 * The formulas are core's (lw-synth.h, docs/design-helpers.md); this layer chooses the
 * targets and composes them:
 *   crossover   the target given; else from the requirements: a crossover range [lo, hi]
 *               gives its geometric middle √(lo·hi); a rise time t_r gives 1.7/t_r (common
 *               practice, no source, as `suggest --rise-time`); with both, the faster of the
 *               two capped at hi.  Warped to the w-plane, ν_c = (2/T)·tan(ω_c T/2).
 *   phase margin  the target given; else the largest of: a phase-margin requirement; the
 *               exact second-order margin of the damping a maximum overshoot implies
 *               (lw_req_pm_deg_from_zeta (lw_req_zeta_from_overshoot)); the margin a
 *               sensitivity-peak limit M_s implies, 2·asin(1/(2·M_s)) (from memory: Åström and
 *               Murray, Feedback Systems, 2008, the circle |1 + L| >= 1/M_s meets the unit
 *               circle there).  Without any, 45° (common practice, no source), said so.
 *   low-frequency gain  a step-error limit e needs K_p >= 1/e − 1 (an integrator when e = 0),
 *               a ramp-error limit e needs K_v >= 1/e (lw-require.h); short by a ratio r with
 *               the loop type already enough: a lag of ratio 1.1·r (10 % reserve, common
 *               practice, no source) a decade below the crossover; a loop type short: PI.
 * "Meet the requirements" composes gain + lead(s) (+ PI, + lag) on the plant alone (it
 * replaces the variant's stages), evaluates, and where overshoot or rise time still fail
 * raises the phase-margin target by 5° or the crossover by 15 % and tries again (at most 8
 * rounds, never past the lead's refusal or 0.5·π/T); it says which requirements it could not
 * meet and why.  The single helpers append their stages to the variant's, which stay fixed.
 * With <measured analysis="data"> every helper works on the variant's loop closed on the data
 * (LwVariantEval.measured; its model loop is not needed): |L| and ∠L between the measured
 * points as the margins on data interpolate them, a target outside the data refused, the notch
 * on the resonance found in the data (lw_measured_resonance); the first line says so and the
 * description gives the margins reached on the data (docs/measured-data.md).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <glib.h>

#include "lw-design.h"
#include "lw-engine.h"
#include "lw-stage.h"

G_BEGIN_DECLS

typedef enum
{
  LW_HELPER_CROSSOVER_GAIN = 0,  /* a gain putting the crossover at the target */
  LW_HELPER_LEAD,                /* gain and lead(s) for the phase margin at the crossover */
  LW_HELPER_LAG,                 /* low-frequency gain raised by a ratio, a decade below */
  LW_HELPER_PI,                  /* an integrator with its zero below the crossover */
  LW_HELPER_NOTCH,               /* a notch on the plant's most lightly damped resonance */
  LW_HELPER_MEET,                /* gain + lead (+ PI/lag) from the requirement list */
  LW_HELPER_COUNT
} LwHelperKind;

/* "crossover-gain", "lead", "lag", "pi", "notch", "meet" (the CLI's --helper words). */
const char *lw_helper_name (LwHelperKind kind);
/* Translatable title for menus ("Crossover gain", "Meet the requirements", …). */
const char *lw_helper_title (LwHelperKind kind);
/* The kind called name; FALSE when there is none. */
gboolean lw_helper_from_name (const char *name, LwHelperKind *kind);

typedef struct
{
  LwHelperKind kind;
  /* targets; NAN: from the document's requirements (see the top) */
  double crossover_rad_s;     /* physical ω_c, 0 < ω_c < π/T */
  double rise_time_s;         /* > 0: crossover 1.7/t_r (when crossover_rad_s is NAN) */
  double phase_margin_deg;    /* 0 < PM < 180 */
  double safety_deg;          /* lead reserve, 0 … 90, default 5 */
  double lag_ratio;           /* > 1; NAN: from the error requirements */
  double lag_decades;         /* > 0, default 1: the lag's zero this far below ν_c */
  double pi_fraction;         /* 0 < f < 1, default 0.1: the PI zero at f·ν_c */
  double notch_zeta_max;      /* resonances with damping below this, default 0.2 */
  double notch_zeta;          /* the notch poles' damping, default 0.5 */
} LwHelperOptions;

void lw_helper_options_init (LwHelperOptions *o, LwHelperKind kind);

typedef struct
{
  size_t index;               /* in the document's requirement list */
  char *reason;               /* in words: achieved against the target, and why */
} LwProposalUnmet;

typedef struct
{
  LwHelperKind kind;
  gboolean replaces;          /* the stages replace the variant's (MEET), else are appended */
  size_t n_stages;
  LwStage *stages;
  GPtrArray *lines;           /* char*: how the proposal was made, one step per line */
  double crossover_rad_s;     /* the crossover aimed at (physical ω), NAN when none */
  double phase_margin_deg;    /* the phase margin aimed at, NAN when none */
  LwVariantEval *preview;     /* the variant evaluated with the proposal applied */
  size_t n_unmet;             /* requirements that do not pass in the preview */
  LwProposalUnmet *unmet;
} LwProposal;

/* A proposal for variant `variant` of d. cache may be NULL. NULL with *error (LW_ENGINE_ERROR,
 * codes as lw-engine.h; the message says what is missing or refused, naming the requirement
 * or option) when no proposal can be made. */
LwProposal *lw_proposal_make (const LwDesign *d, size_t variant, const LwHelperOptions *o,
                              LwPlantCache *cache, GError **error);

/* The proposal in words, as the CLI prints it and the window previews it: how the targets
 * were found, the stages, the controller in w, the margins reached and each requirement's
 * verdict with those not met. g_free it. */
char *lw_proposal_describe (const LwDesign *d, size_t variant, const LwProposal *p);

/* A copy of d with the proposal applied to variant `variant`. */
LwDesign *lw_proposal_apply (const LwDesign *d, size_t variant, const LwProposal *p);

void lw_proposal_free (LwProposal *p);
G_DEFINE_AUTOPTR_CLEANUP_FUNC (LwProposal, lw_proposal_free)

G_END_DECLS
