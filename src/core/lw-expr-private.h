/* lw-expr-private.h — what the files of the expression reader share (lw-expr.c,
 * lw-expr-value.c); not used outside them.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-expr.h"
#include "lw-number.h"
#include <errno.h>
#include <locale.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
  double *c;      /* deg+1 ascending coefficients, c[deg] == 1 */
  size_t deg;     /* >= 1 */
  long exp;       /* != 0 */
} Factor;

typedef struct {
  double gain;    /* 0: the value is identically zero (then n == 0) */
  size_t n;
  Factor *f;
} Value;

typedef struct {
  const char *text;
  size_t len;
  size_t pos;
  char var;
  int depth;
  LwError *err;
  const LwExprParam *params;  /* n_params named parameters; used[i] set when the text names */
  size_t n_params;            /* the i-th */
  bool *used;
} Parser;

void
lw_expr_value_clear (Value *v);

void
lw_expr_value_set_zero (Value *v);

bool
lw_expr_value_add_factor (Value *v, const double *c, size_t deg, long exp);

void
lw_expr_value_degrees (const Value *v, unsigned long long *num, unsigned long long *den);

LwStatus
lw_expr_nomem (Parser *p);

LwStatus
lw_expr_value_check (Parser *p, const Value *v, size_t pos);

bool
lw_expr_value_mul (Value *a, const Value *b, int sign);

bool
lw_expr_value_add (Value *a, const Value *b, int sign);
