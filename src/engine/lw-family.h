/* lw-family.h — a plant family: the margins of one controller over every machine a design's
 * parameter ranges describe (<parameters> with low/high, docs/families.md).
 *
 * Members: the nominal plant first, then the design's operating points (each a named set of
 * parameter values, <point>; they may lie outside the ranges), then every corner of the range box (up to 2^10), then a
 * seeded sample drawn over the ranges (each parameter uniformly, or uniformly in log(value)
 * with spread "log") until the number of members asked for is reached; then, for each of the
 * phase margin, gain margin and sensitivity peak, a search for the worst member starting from
 * the worst one found so far in the box (an operating point outside it is not a start: the
 * search stays in the ranges; a compass search in the box scaled to [0, 1]^k, steps halved
 * from 1/4 down to LW_FAMILY_SEARCH_STEP; the worst is often not a corner, e.g. a resonance
 * moving beside a notch). Each member is evaluated as a single plant would be (lw_evaluate:
 * the sampled plant, every crossover and margin, closed-loop poles, the step), so a member's
 * numbers equal those of `analyze` with its parameter values.
 *
 * The requirements of the design are judged on the family: for each, the worst member's
 * figure; a member whose loop is not stable fails every requirement.
 *
 * Threads: members are evaluated by worker threads (options.threads, 0: the processors
 * there are); the result does not depend on their number (each member is computed alone and
 * the search is sequential in its decisions).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <glib.h>

#include "lw-design.h"
#include "lw-engine.h"

G_BEGIN_DECLS

#define LW_FAMILY_MAX_MEMBERS 100000
#define LW_FAMILY_SEARCH_STEP (1.0 / 1024.0)

typedef struct
{
  size_t members;       /* members evaluated before the search, >= 1 (nominal, corners,
                           sample); 0: LW_FAMILY_DEFAULT_MEMBERS */
  guint64 seed;         /* of the sample */
  gboolean search;      /* search for the worst member of each margin */
  size_t n_points;      /* frequency points per member (0: the engine's default) */
  guint threads;        /* worker threads, 0: g_get_num_processors () */
} LwFamilyOptions;

#define LW_FAMILY_DEFAULT_MEMBERS 100

void lw_family_options_init (LwFamilyOptions *o);
/* The defaults with d's own members and seed when it gives them (<parameters members seed>);
 * d may be NULL. What lw_family_evaluate takes for o NULL. */
void lw_family_options_for (LwFamilyOptions *o, const LwDesign *d);

typedef enum
{
  LW_FAMILY_NOMINAL = 0,
  LW_FAMILY_CORNER,
  LW_FAMILY_SAMPLE,
  LW_FAMILY_SEARCH,
  LW_FAMILY_POINT           /* an operating point of the design (LwFamilyMember.point) */
} LwFamilyOrigin;

/* The figures compared over the family; "worst" is the smallest margin, the largest peak,
 * overshoot and settling time. */
typedef enum
{
  LW_FAMILY_PHASE_MARGIN = 0,
  LW_FAMILY_GAIN_MARGIN,
  LW_FAMILY_DELAY_MARGIN,
  LW_FAMILY_SENSITIVITY,
  LW_FAMILY_OVERSHOOT,
  LW_FAMILY_SETTLING,
  LW_FAMILY_N_FIGURES
} LwFamilyFigure;

typedef struct
{
  double *values;               /* the parameters' values, in the design's order */
  LwFamilyOrigin origin;
  char *point;                  /* the operating point's name (origin LW_FAMILY_POINT), else
                                   NULL */
  gboolean evaluated;           /* FALSE: the plant or the loop failed (error says why) */
  char *error;
  gboolean stable;
  gboolean has[LW_FAMILY_N_FIGURES];
  double figure[LW_FAMILY_N_FIGURES];
  double crossover_rad_s;       /* the governing gain crossover, NAN without one */
  gboolean has_crossover;
} LwFamilyMember;

typedef struct
{
  size_t n_params;
  char **names;                 /* n_params */
  size_t n_members;
  LwFamilyMember *members;      /* [0] the nominal */
  size_t n_points;              /* members 1 … n_points are the operating points */
  size_t n_corners;             /* then n_corners corners (members n_points + 1 …) */
  size_t n_failed;              /* members not evaluated */
  size_t n_unstable;            /* evaluated members whose loop is not stable */
  /* per figure, the member giving the worst value (G_MAXSIZE: none has it) */
  size_t worst[LW_FAMILY_N_FIGURES];
  /* the range of the governing crossover over the members that have one */
  double crossover_min_rad_s, crossover_max_rad_s;
  /* each requirement of the design judged on the worst member (n_requirements) */
  size_t n_requirements;
  LwReqResult *requirements;
  size_t *requirement_member;   /* the member the verdict comes from (G_MAXSIZE: none) */
  size_t n_not_passing;
} LwFamily;

/* TRUE when d describes a family: a ranged parameter or an operating point. */
gboolean lw_family_wanted (const LwDesign *d);

/* The family of variant `variant` of d (its ranged parameters and operating points; a design
 * without any gives a family of the nominal alone). NULL with an error (LW_ENGINE_ERROR) when the nominal
 * itself cannot be evaluated or the options are out of range. */
LwFamily *lw_family_evaluate (const LwDesign *d, size_t variant, const LwFamilyOptions *o,
                              GError **error);
/* The same for a controller given in z (domain z, at period_s): the plant, its parameters,
 * dead time, computation delay and requirements from d, its variants unused (the CLI's loop
 * options). */
LwFamily *lw_family_evaluate_controller (const LwDesign *d, double period_s,
                                         const LwModel *controller_z, const LwFamilyOptions *o,
                                         GError **error);
void lw_family_free (LwFamily *f);
G_DEFINE_AUTOPTR_CLEANUP_FUNC (LwFamily, lw_family_free)

/* The loops of some members of a family, for figures: each member's sampled plant and its
 * loop evaluated with the controller (lw_evaluate on a grid of n_points up to π/T, the step
 * over LW_FAMILY_LOOPS_STEPS samples, for the figures).
 * Members: the worst of each figure (distinct), then up to max_others more: the operating
 * points first, then spread evenly over the rest; the nominal left out (the variant's own
 * curve is it). */
typedef struct
{
  size_t n;                     /* members drawn */
  size_t *member;               /* n: their index in the family */
  LwSampledPlant **plant;       /* n */
  LwEvaluation **ev;            /* n; NULL where the member could not be evaluated */
  size_t worst_pm;              /* which of the n gives the family's worst phase margin, or
                                   G_MAXSIZE */
  size_t n_worst;               /* the first n_worst are the worst of some figure */
  size_t n_members;             /* members of the family */
  gboolean plants_borrowed;     /* plant[] belongs to another LwFamilyLoops
                                   (lw_family_loops_again) */
} LwFamilyLoops;

#define LW_FAMILY_LOOPS_POINTS 300
#define LW_FAMILY_LOOPS_STEPS 500   /* samples of each drawn member's step */
#define LW_FAMILY_LOOPS_OTHERS 40

/* The loops of f's members for variant `variant` of d (the design f was evaluated from),
 * n_points (0: LW_FAMILY_LOOPS_POINTS, else >= 16) and max_others (members besides the
 * worst). Never NULL for a valid f; members that fail are left without a loop. */
LwFamilyLoops *lw_family_loops (const LwDesign *d, size_t variant, const LwFamily *f,
                                size_t max_others, size_t n_points);
LwFamilyLoops *lw_family_loops_controller (const LwDesign *d, double period_s,
                                           const LwModel *controller_z, const LwFamily *f,
                                           size_t max_others, size_t n_points);
/* The same members' loops again with another controller — the variant `variant` of d as it
 * stands now (a dragged stage) — on n_points (0: LW_FAMILY_LOOPS_POINTS, else >= 16), their
 * sampled plants borrowed from `from` (not sampled again: the plants of a family do not change
 * when its controller does), so `from` must outlive the result. worst_pm is the drawn member
 * of the smallest phase margin among those drawn (the family's own worst is known only after
 * a whole evaluation). Never NULL; a member whose loop fails is left without one. */
LwFamilyLoops *lw_family_loops_again (const LwFamilyLoops *from, const LwDesign *d,
                                      size_t variant, size_t n_points);
/* The phase margin of the drawn member worst_pm (NAN without one). */
double lw_family_loops_worst_pm_deg (const LwFamilyLoops *l);
void lw_family_loops_free (LwFamilyLoops *l);
G_DEFINE_AUTOPTR_CLEANUP_FUNC (LwFamilyLoops, lw_family_loops_free)

/* The words of a figure ("phase margin" …) and its unit ("deg", "dB", "s", "", "%", "s"). */
const char *lw_family_figure_name (LwFamilyFigure f);
const char *lw_family_figure_unit (LwFamilyFigure f);

/* TRUE when verdict a is worse than b (the one reported over a family of plants or of
 * measured responses): a fail before "not available" before a pass, then the smaller
 * slack. */
gboolean lw_family_verdict_worse (const LwReqResult *a, const LwReqResult *b);

/* TRUE when a is worse than b for figure f (smaller margins, larger peak/overshoot/time). */
gboolean lw_family_worse (LwFamilyFigure f, double a, double b);

G_END_DECLS
