/* lw-design-private.h — the vocabulary tables shared by the loader and the writer of design
 * documents (lw-design-load.c, lw-design.c); not public API.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stddef.h>

#include "lw-design.h"
#include "lw-stage-kinds.h"

/* What a number attribute must be: the rules of stage parameters (lw-stage-kinds.h), which
 * the other attributes (dead time, ranges) use too, and the sample period's range. */
typedef enum
{
  LW_NUM_FINITE = LW_PARAM_FINITE,           /* any finite number */
  LW_NUM_POSITIVE = LW_PARAM_POSITIVE,       /* finite, > 0 */
  LW_NUM_NONNEGATIVE = LW_PARAM_NONNEGATIVE, /* finite, >= 0 */
  LW_NUM_NONZERO = LW_PARAM_NONZERO,         /* finite, != 0 */
  LW_NUM_COUNT = LW_PARAM_COUNT,             /* a whole number 1 … LW_STAGE_MAX_COUNT (int) */
  LW_NUM_PERIOD          /* a sample period, LW_PERIOD_MIN_S … LW_PERIOD_MAX_S (lw-number.h) */
} LwNumRule;

/* Stage elements are the rows of the stage-kind table (lw-stage-kinds.h): element = the kind's
 * name, attributes = its stored parameters in table order (the schema agrees:
 * tests/doc/test-stage-doc.c). */

/* One requirement kind: its element and the attribute of its limit (and of the upper limit of
 * a range, else NULL). */
typedef struct
{
  LwReqKind kind;
  const char *element;
  const char *limit_attr;
  const char *limit_hi_attr;
} LwDocReqKind;

extern const LwDocReqKind lw_doc_req_kinds[];
extern const size_t lw_doc_n_req_kinds;
/* The row of a requirement kind, or NULL. */
const LwDocReqKind *lw_doc_req_kind (LwReqKind kind);

/* The phrase for a rule in messages ("a finite number > 0"). */
const char *lw_doc_rule_phrase (LwNumRule rule);
/* Whether v satisfies rule (for LW_NUM_COUNT: a whole number in range). */
gboolean lw_doc_rule_ok (LwNumRule rule, double v);

/* The schema text (NUL-terminated) compiled into the program. */
const char *lw_doc_schema_text (size_t *len);

/* <measured> (lw-design-measured.c): the checks before a save, and the element written in its
 * canonical form (nothing when the design holds no measurement; attr_text writes one escaped
 * attribute). */
gboolean lw_design_check_measured (const LwDesign *d, GError **error);
/* the further responses of a measured family (lw-design-measured.c): freed, copied (a copy of
 * n sets; NULL for none), compared (numbers with ==) */
void lw_design_measured_sets_free (LwDesignMeasuredSet *s, size_t n);
LwDesignMeasuredSet *lw_design_measured_sets_copy (const LwDesignMeasuredSet *s, size_t n);
bool lw_design_measured_sets_equal (const LwDesignMeasuredSet *a, size_t na,
                                    const LwDesignMeasuredSet *b, size_t nb);
/* two measured tables equal point for point (NULL equal only to NULL) */
bool lw_design_table_equal (const LwMeasured *x, const LwMeasured *y);
void lw_design_write_measured (GString *o, const LwDesign *d,
                               void (*attr_text) (GString *, const char *, const char *));

/* The operating points copied from `from` into `to` (whose own are not freed) / compared
 * (lw-design-points.c). */
void lw_design_copy_points (LwDesign *to, const LwDesign *from);
bool lw_design_points_equal (const LwDesign *a, const LwDesign *b);
