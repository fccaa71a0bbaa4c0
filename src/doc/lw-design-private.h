/* lw-design-private.h — the vocabulary tables shared by the loader and the writer of design
 * documents (lw-design-load.c, lw-design.c); not public API.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stddef.h>

#include "lw-design.h"

/* What a number attribute must be. */
typedef enum
{
  LW_NUM_FINITE = 0,     /* any finite number */
  LW_NUM_POSITIVE,       /* finite, > 0 */
  LW_NUM_NONNEGATIVE,    /* finite, >= 0 */
  LW_NUM_NONZERO,        /* finite, != 0 */
  LW_NUM_COUNT,          /* a whole number 1 … LW_STAGE_MAX_COUNT (stored as int) */
  LW_NUM_PERIOD          /* a sample period, LW_PERIOD_MIN_S … LW_PERIOD_MAX_S (lw-number.h) */
} LwNumRule;

#define LW_DOC_MAX_ATTRS 4

typedef struct
{
  const char *name;      /* attribute name */
  size_t offset;         /* offset of the double (or int for LW_NUM_COUNT) in LwStage */
  LwNumRule rule;
} LwDocAttr;

/* One stage kind: its element (lw_stage_kind_name of the kind) and its parameter attributes,
 * in the order they are written. */
typedef struct
{
  LwStageKind kind;
  const char *element;
  size_t n_attrs;
  LwDocAttr attrs[LW_DOC_MAX_ATTRS];
} LwDocStageKind;

extern const LwDocStageKind lw_doc_stage_kinds[];
extern const size_t lw_doc_n_stage_kinds;

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

/* The phrase for a rule in messages ("a finite number > 0"). */
const char *lw_doc_rule_phrase (LwNumRule rule);
/* Whether v satisfies rule (for LW_NUM_COUNT: a whole number in range). */
gboolean lw_doc_rule_ok (LwNumRule rule, double v);

/* The schema text (NUL-terminated) compiled into the program. */
const char *lw_doc_schema_text (size_t *len);
