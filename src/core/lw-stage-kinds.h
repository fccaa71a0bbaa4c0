/* lw-stage-kinds.h — the stage-kind descriptor table: one row per kind of compensator stage
 * (lw-stage.h), from which everything that lists, reads, writes, shows or places stages derives:
 * the document reader and writer, the schema check, the window's stage row and add-stage menu,
 * the CLI's stage text and JSON.
 *
 * A row says, for its kind: the name (the document element, the add-stage action's target, the
 * CLI's word), a title for people, the stored parameters in document order (attribute name,
 * title, unit, the rule every value must keep, the range an editor offers, display digits, and
 * where a new stage puts it relative to the gain crossover ν_c), and the functions for what
 * differs between kinds (relations between parameters, the model in w, corner handles, derived
 * figures).  Each kind lives in its own file under src/core/stages/; a new kind is that file,
 * its enumerator in lw-stage.h and one row in lw-stage-kinds.c (DEVELOPERS.md, "Adding
 * things").
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include "lw-error.h"
#include "lw-model.h"
#include "lw-stage.h"

#ifdef __cplusplus
extern "C" {
#endif

/* What every value of a stored parameter must be (checked by lw_stage_check and by the
 * document reader before the kind's own relations). */
typedef enum {
  LW_PARAM_FINITE = 0,     /* any finite number */
  LW_PARAM_POSITIVE,       /* finite, > 0 */
  LW_PARAM_NONNEGATIVE,    /* finite, >= 0 */
  LW_PARAM_NONZERO,        /* finite, != 0 */
  LW_PARAM_COUNT           /* a whole number 1 … LW_STAGE_MAX_COUNT, stored as int */
} LwParamRule;

/* Where a new stage (the add-stage menu) puts a parameter, relative to the w-plane frequency
 * ν_c of the gain crossover in rad/s: value, value·ν_c (a frequency) or value/ν_c (a time). */
typedef enum {
  LW_PLACE_FIXED = 0,
  LW_PLACE_TIMES_NU,
  LW_PLACE_PER_NU
} LwPlaceBy;

/* One stored parameter of a kind. */
typedef struct {
  const char *name;        /* document attribute, JSON key: "centre_rad_s" */
  const char *title;       /* short label for an editor ("Centre"); English, translatable */
  const char *what;        /* what it is, for messages ("notch centre") */
  const char *unit;        /* "rad/s", "s", "dB", "deg", "ratio" or "" */
  LwParamRule rule;
  double lower, upper;     /* the range an editor offers (inside the rule) */
  int digits;              /* decimals an editor shows */
  LwPlaceBy place_by;      /* default placement of a new stage */
  double place;
  size_t offset;           /* offsetof (LwStage, …) of the double (int for LW_PARAM_COUNT) */
} LwStageParamInfo;

#define LW_STAGE_MAX_STORED 4   /* stored parameters per kind */

typedef struct LwStageKindInfo LwStageKindInfo;
struct LwStageKindInfo {
  LwStageKind kind;
  const char *name;        /* lower case, [a-z-]: "notch" */
  const char *title;       /* "Notch"; English, translatable */
  const char *definition;  /* one line, the transfer function in w (docs, help) */
  size_t n_params;
  LwStageParamInfo params[LW_STAGE_MAX_STORED];

  /* Relations between parameters beyond each one's rule (each has been checked already);
   * name is the stage's label or kind name for the message. NULL: none. */
  LwStatus (*check) (const LwStage *s, const char *name, LwError *err);
  /* The stage (already checked) as a model in w with period_s; *out is not canonicalized yet.
   * LW_ERR_NOMEM or another error with err set. */
  LwStatus (*to_model) (const LwStage *s, double period_s, LwModel **out, LwError *err);
  /* Corner handles: how many (NULL: none), the i-th one's ν in rad/s and kind. */
  size_t (*corner_count) (const LwStage *s);
  double (*corner_get) (const LwStage *s, size_t i, LwHandleKind *kind);
  /* Moves handle i of t (a copy) to nu_rad_s, factor = nu_rad_s / old position, keeping the
   * kind's invariants (lw-stage.h); the result is checked by the caller. */
  LwStatus (*corner_set) (LwStage *t, size_t i, double nu_rad_s, double factor, bool keep_ratio,
                          const char *name, LwError *err);
  /* Derived figures appended after the stored parameters (lw_stage_params). NULL: none. */
  size_t (*derived) (const LwStage *s, LwStageParam *out);
};

/* The row of a kind; NULL for a value that is not a kind. */
const LwStageKindInfo *lw_stage_kind_info (LwStageKind kind);
/* The row whose name is name; NULL when none is. */
const LwStageKindInfo *lw_stage_kind_by_name (const char *name);
/* The number of kinds: the rows are lw_stage_kind_info (0 … count − 1), in menu order. */
size_t lw_stage_kind_count (void);

/* The value of stored parameter i of s (ints as doubles); NAN for a bad i. */
double lw_stage_param_get (const LwStage *s, size_t i);
/* Sets stored parameter i of s (rounded to the nearest whole number for a count). */
void lw_stage_param_set (LwStage *s, size_t i, double value);

/* Whether value keeps rule; the rule in words ("a finite number > 0"). */
bool lw_param_rule_ok (LwParamRule rule, double value);
const char *lw_param_rule_phrase (LwParamRule rule);

/* A new enabled stage of kind, placed around the gain crossover nu_c_rad_s (> 0) by the table.
 * For an unknown kind a gain of 1. */
LwStage lw_stage_placed (LwStageKind kind, double nu_c_rad_s);

#ifdef __cplusplus
}
#endif
