/* lw-expr.h — rational expressions in one variable, typed by the user.
 *
 * Grammar (whitespace allowed between tokens):
 *   expr    := term (('+' | '-') term)*
 *   term    := unary (('*' | '/') unary)*
 *   unary   := '-' unary | '+' unary | power
 *   power   := primary ('^' INTEGER)?          INTEGER: non-negative decimal digits
 *   primary := NUMBER | VAR | NAME | '(' expr ')'
 *   NUMBER  := digits ['.' digits] [('e'|'E') ['+'|'-'] digits]  (also ".5")
 *   VAR     := the one variable letter of the domain (s, z or w)
 *   NAME    := a named parameter (lw_expr_parse_params): a letter or '_', then letters,
 *              digits and '_', at most LW_EXPR_NAME_MAX characters, not s, w or z;
 *              its value is substituted where it stands
 * Implicit multiplication is not accepted ("2s" is an error pointing at 's').
 *
 * The value is kept factored: products, quotients and integer powers combine factors without
 * expanding; only a sum expands the polynomials it adds (and is then re-factored by
 * lw_poly_roots when the parse finishes). Identical zero/pole pairs are cancelled exactly
 * (bitwise-equal roots only), so (s+1)/(s+1) is 1 but nothing is cancelled by tolerance.
 *
 * Errors (LW_ERR_PARSE / LW_ERR_INVALID) carry the 0-based character position and say what was
 * expected, e.g. "expected ')' to close '(' at 3".  Rejected: non-finite numbers (1e999), a
 * numerator or denominator degree above LW_MAX_DEGREE, a denominator that is identically zero,
 * a zero raised to a power that leaves nothing, any other variable letter.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-model.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Parses `text` as a rational function of the variable of `domain`. On success *out is a new
 * canonicalized model (caller frees with lw_model_free) with the given period_s. Properness is
 * not checked here; see lw_expr_parse_plant. */
LwStatus lw_expr_parse (const char *text, LwDomain domain, double period_s, LwModel **out,
                        LwError *err);

/* A named parameter and its value (e.g. the nominal of a plant family's parameter). */
#define LW_EXPR_NAME_MAX 32
#define LW_EXPR_PARAMS_MAX 64
typedef struct {
  const char *name;
  double value;
} LwExprParam;

/* NULL when name can name a parameter (see NAME above), else a sentence saying why not (a
 * static string). */
const char *lw_expr_param_name_problem (const char *name);

/* As lw_expr_parse with the n named parameters substituted by their values (n may be 0).
 * Refused, each naming the parameter: a bad name or a name given twice (LW_ERR_INVALID,
 * position −1), a value that is not finite (position −1), a name in the text that is not a
 * parameter (LW_ERR_PARSE at its position), a parameter the text does not use (position −1:
 * a typo in the text would otherwise pass silently). At most LW_EXPR_PARAMS_MAX. */
LwStatus lw_expr_parse_params (const char *text, LwDomain domain, double period_s,
                               const LwExprParam *params, size_t n, LwModel **out,
                               LwError *err);

/* lw_expr_parse_params with the checks of lw_expr_parse_proper. */
LwStatus lw_expr_parse_params_proper (const char *text, LwDomain domain, double period_s,
                                      const LwExprParam *params, size_t n, LwModel **out,
                                      LwError *err);

/* As lw_expr_parse, and also rejects an improper model (more zeros than poles) with
 * LW_ERR_INVALID at position 0, and a model that is identically zero. */
LwStatus lw_expr_parse_proper (const char *text, LwDomain domain, double period_s,
                               LwModel **out, LwError *err);

#ifdef __cplusplus
}
#endif
