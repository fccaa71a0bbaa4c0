/* lw-expr.c — recursive-descent parser for rational expressions in one variable.
 *
 * A value is kept as   gain · ∏ f_k(x)^e_k   with every f_k a monic real polynomial of degree
 * >= 1 and e_k a non-zero integer (negative: denominator).  Products, quotients and powers only
 * combine exponents (a factor whose coefficients are bitwise equal to an existing one is merged);
 * a sum keeps the factors the two terms share (to the lower exponent) and expands only the rest:
 *     a + b = ∏ f^min(ea,eb) · [ ga ∏ f^(ea−min) + gb ∏ f^(eb−min) ]
 * so the denominator of 1/(s+1) + 1/(s+2) stays factored and only the new numerator is expanded.
 * When the parse finishes each factor is factored by lw_poly_roots and bitwise-equal zero/pole
 * pairs are cancelled.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-expr-private.h"

#define NUMBER_MAX_CHARS LW_NUMBER_MAX_CHARS
#define NESTING_MAX 200
#define EXPONENT_MAX 999999999L

/* ---------------------------------------------------------------------------------------- */
/* Lexing helpers                                                                           */

static int
peek (const Parser *p)
{
  return p->pos < p->len ? (unsigned char) p->text[p->pos] : -1;
}

static void
skip_ws (Parser *p)
{
  while (p->pos < p->len && (p->text[p->pos] == ' ' || p->text[p->pos] == '\t' ||
                             p->text[p->pos] == '\n' || p->text[p->pos] == '\r'))
    p->pos++;
}

static bool
is_digit (int c)
{
  return c >= '0' && c <= '9';
}

static bool
is_letter (int c)
{
  return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z');
}

/* "'x'" for a printable ASCII character, "end of input", or "byte 0xNN". */
static const char *
describe (int c, char *buf, size_t size)
{
  if (c < 0)
    snprintf (buf, size, "end of input");
  else if (c >= 0x20 && c < 0x7f)
    snprintf (buf, size, "'%c'", c);
  else
    snprintf (buf, size, "byte 0x%02x", (unsigned) c);
  return buf;
}

/* Converts a validated decimal token: the one conversion every typed number goes through
 * (lw-number.h), independent of LC_NUMERIC. */
static double
convert_number (const char *tok)
{
  return lw_number_convert (tok, strlen (tok));
}

/* A character outside ASCII in an expression: the grammar is ASCII only, so the first such
 * character is the error, and look-alikes of an operator are named with the character to
 * type instead (a minus sign pasted from a document reads as ASCII '-' to the eye). Returns
 * LW_OK when text is ASCII. */
static LwStatus
check_ascii (const char *text, size_t len, LwError *err)
{
  static const struct { unsigned cp; const char *name; const char *use; } lookalike[] = {
    { 0x2212, "minus sign", "'-' (U+002D)" },
    { 0x2010, "hyphen", "'-' (U+002D)" },
    { 0x2011, "non-breaking hyphen", "'-' (U+002D)" },
    { 0x2012, "figure dash", "'-' (U+002D)" },
    { 0x2013, "en dash", "'-' (U+002D)" },
    { 0x2014, "em dash", "'-' (U+002D)" },
    { 0xFE63, "small hyphen-minus", "'-' (U+002D)" },
    { 0xFF0D, "fullwidth hyphen-minus", "'-' (U+002D)" },
    { 0x00D7, "multiplication sign", "'*' (U+002A)" },
    { 0x00B7, "middle dot", "'*' (U+002A)" },
    { 0x22C5, "dot operator", "'*' (U+002A)" },
    { 0x2217, "asterisk operator", "'*' (U+002A)" },
    { 0x00F7, "division sign", "'/' (U+002F)" },
    { 0x2215, "division slash", "'/' (U+002F)" },
    { 0x2044, "fraction slash", "'/' (U+002F)" },
    { 0xFF0B, "fullwidth plus sign", "'+' (U+002B)" },
    { 0x00A0, "no-break space", "a plain space (U+0020)" },
    { 0x202F, "narrow no-break space", "a plain space (U+0020)" },
    { 0x2009, "thin space", "a plain space (U+0020)" },
  };
  for (size_t i = 0; i < len; i++) {
    unsigned char c = (unsigned char) text[i];
    if (c < 0x80)
      continue;
    /* decode one UTF-8 sequence (shortest form, no surrogates) */
    unsigned cp = 0;
    size_t n = c >= 0xF0 && c <= 0xF4 ? 4 : c >= 0xE0 ? (c <= 0xEF ? 3 : 0) : c >= 0xC2 ? 2 : 0;
    bool ok = n > 0 && i + n <= len;
    if (ok) {
      cp = c & (n == 2 ? 0x1F : n == 3 ? 0x0F : 0x07);
      for (size_t k = 1; k < n && ok; k++) {
        unsigned char d = (unsigned char) text[i + k];
        ok = (d & 0xC0) == 0x80;
        cp = (cp << 6) | (d & 0x3F);
      }
      ok = ok && !(n == 3 && cp < 0x800) && !(n == 4 && (cp < 0x10000 || cp > 0x10FFFF))
           && !(cp >= 0xD800 && cp <= 0xDFFF);
    }
    if (!ok)
      return lw_error_set (err, LW_ERR_PARSE, (int) i,
                           "byte 0x%02x at position %zu is not valid UTF-8 text", (unsigned) c, i);
    for (size_t k = 0; k < sizeof lookalike / sizeof lookalike[0]; k++)
      if (lookalike[k].cp == cp)
        return lw_error_set (err, LW_ERR_PARSE, (int) i,
                             "'%.*s' (U+%04X, %s) at position %zu is not an operator of "
                             "expressions: use %s", (int) n, text + i, cp, lookalike[k].name, i,
                             lookalike[k].use);
    return lw_error_set (err, LW_ERR_PARSE, (int) i,
                         "'%.*s' (U+%04X) at position %zu: expressions are written in ASCII "
                         "(digits, the variable, + - * / ^ ( ) and spaces)", (int) n, text + i,
                         cp, i);
  }
  return LW_OK;
}

/* ---------------------------------------------------------------------------------------- */
/* Grammar                                                                                  */

static LwStatus parse_expr (Parser *p, Value *out);

static LwStatus
parse_number (Parser *p, Value *out)
{
  size_t start = p->pos;
  while (is_digit (peek (p)))
    p->pos++;
  bool had_int = p->pos > start;
  if (peek (p) == '.') {
    p->pos++;
    if (!is_digit (peek (p))) {
      char d[32];
      return lw_error_set (p->err, LW_ERR_PARSE, (int) p->pos,
                           "expected a digit after the decimal point at position %zu, found %s",
                           p->pos, describe (peek (p), d, sizeof d));
    }
    while (is_digit (peek (p)))
      p->pos++;
  } else if (!had_int) {
    char d[32];
    return lw_error_set (p->err, LW_ERR_PARSE, (int) p->pos,
                         "expected a number at position %zu, found %s", p->pos,
                         describe (peek (p), d, sizeof d));
  }
  if (peek (p) == 'e' || peek (p) == 'E') {
    p->pos++;
    if (peek (p) == '+' || peek (p) == '-')
      p->pos++;
    if (!is_digit (peek (p))) {
      char d[32];
      return lw_error_set (p->err, LW_ERR_PARSE, (int) p->pos,
                           "expected the digits of the number's exponent at position %zu, "
                           "found %s", p->pos, describe (peek (p), d, sizeof d));
    }
    while (is_digit (peek (p)))
      p->pos++;
  }
  size_t n = p->pos - start;
  if (n > NUMBER_MAX_CHARS)
    return lw_error_set (p->err, LW_ERR_PARSE, (int) start,
                         "the number at position %zu is too long (%zu characters, at most %d)",
                         start, n, NUMBER_MAX_CHARS);
  char tok[NUMBER_MAX_CHARS + 1];
  memcpy (tok, p->text + start, n);
  tok[n] = '\0';
  double v = convert_number (tok);
  if (!isfinite (v))
    return lw_error_set (p->err, LW_ERR_INVALID, (int) start,
                         "the number '%s' at position %zu is out of range (not finite)", tok,
                         start);
  lw_expr_value_clear (out);
  out->gain = v;
  return LW_OK;
}

static bool
is_name_char (int c)
{
  return is_letter (c) || is_digit (c) || c == '_';
}

/* A name where a primary stands: a named parameter's value, else an error that says which
 * names there are. The domain's variable is handled before (a lone letter). */
static LwStatus
parse_name (Parser *p, Value *out)
{
  size_t start = p->pos;
  while (is_name_char (peek (p)))
    p->pos++;
  size_t n = p->pos - start;
  for (size_t i = 0; i < p->n_params; i++)
    if (strlen (p->params[i].name) == n && memcmp (p->params[i].name, p->text + start, n) == 0)
      {
        p->used[i] = true;
        lw_expr_value_clear (out);
        out->gain = p->params[i].value;
        if (out->gain == 0.0)
          lw_expr_value_set_zero (out);
        return LW_OK;
      }
  if (p->n_params == 0 && n == 1)
    return lw_error_set (p->err, LW_ERR_PARSE, (int) start,
                         "unexpected '%c' at position %zu: the variable here is '%c'",
                         p->text[start], start, p->var);
  int shown = n > LW_EXPR_NAME_MAX ? LW_EXPR_NAME_MAX : (int) n;
  if (p->n_params == 0)
    return lw_error_set (p->err, LW_ERR_PARSE, (int) start,
                         "unknown name '%.*s%s' at position %zu: the variable here is '%c' and "
                         "no parameters are given", shown, p->text + start,
                         n > (size_t) shown ? "..." : "", start, p->var);
  char names[256];
  size_t used = 0;
  names[0] = '\0';
  for (size_t i = 0; i < p->n_params && used + 2 < sizeof names; i++)
    {
      int k = snprintf (names + used, sizeof names - used, "%s%s", i > 0 ? ", " : "",
                        p->params[i].name);
      if (k < 0 || (size_t) k >= sizeof names - used)
        break;
      used += (size_t) k;
    }
  return lw_error_set (p->err, LW_ERR_PARSE, (int) start,
                       "unknown parameter '%.*s%s' at position %zu: the variable here is '%c', "
                       "the parameters are %s", shown, p->text + start,
                       n > (size_t) shown ? "..." : "", start, p->var, names);
}

static LwStatus
parse_primary (Parser *p, Value *out)
{
  skip_ws (p);
  int c = peek (p);
  char d[32];
  if (is_digit (c) || c == '.')
    return parse_number (p, out);
  if (c == p->var && !is_name_char (p->pos + 1 < p->len ? (unsigned char) p->text[p->pos + 1]
                                                          : -1)) {
    p->pos++;
    lw_expr_value_clear (out);
    out->gain = 1.0;
    const double x[2] = { 0.0, 1.0 };
    if (!lw_expr_value_add_factor (out, x, 1, 1))
      return lw_expr_nomem (p);
    return LW_OK;
  }
  if (c == '(') {
    size_t open = p->pos;
    if (p->depth >= NESTING_MAX)
      return lw_error_set (p->err, LW_ERR_PARSE, (int) open,
                           "the expression is nested too deeply at position %zu (more than %d "
                           "levels)", open, NESTING_MAX);
    p->pos++;
    p->depth++;
    LwStatus st = parse_expr (p, out);
    p->depth--;
    if (st != LW_OK)
      return st;
    skip_ws (p);
    if (peek (p) != ')')
      return lw_error_set (p->err, LW_ERR_PARSE, (int) p->pos,
                           "expected ')' at position %zu to close '(' at position %zu, found %s",
                           p->pos, open, describe (peek (p), d, sizeof d));
    p->pos++;
    return LW_OK;
  }
  if (is_letter (c) || c == '_')
    return parse_name (p, out);
  return lw_error_set (p->err, LW_ERR_PARSE, (int) p->pos,
                       "expected a number, '%c' or '(' at position %zu, found %s", p->var, p->pos,
                       describe (c, d, sizeof d));
}

static LwStatus
parse_power (Parser *p, Value *out)
{
  LwStatus st = parse_primary (p, out);
  if (st != LW_OK)
    return st;
  skip_ws (p);
  if (peek (p) != '^')
    return LW_OK;
  size_t caret = p->pos;
  p->pos++;
  skip_ws (p);
  size_t start = p->pos;
  if (!is_digit (peek (p))) {
    char d[32];
    return lw_error_set (p->err, LW_ERR_PARSE, (int) p->pos,
                         "expected a non-negative integer exponent after '^' at position %zu, "
                         "found %s", p->pos, describe (peek (p), d, sizeof d));
  }
  long k = 0;
  bool too_big = false;
  while (is_digit (peek (p))) {
    if (!too_big) {
      k = k * 10 + (peek (p) - '0');
      if (k > EXPONENT_MAX)
        too_big = true;
    }
    p->pos++;
  }
  if (peek (p) == '.' || peek (p) == 'e' || peek (p) == 'E')
    return lw_error_set (p->err, LW_ERR_PARSE, (int) start,
                         "the exponent at position %zu must be a non-negative integer "
                         "(digits only)", start);
  if (too_big)
    return lw_error_set (p->err, LW_ERR_INVALID, (int) start,
                         "the exponent at position %zu is too large (at most %ld)", start,
                         EXPONENT_MAX);
  if (k == 0) {
    if (out->gain == 0.0)
      return lw_error_set (p->err, LW_ERR_INVALID, (int) caret,
                           "a zero raised to the power 0 at position %zu has no value", caret);
    lw_expr_value_clear (out);
    out->gain = 1.0;
    return LW_OK;
  }
  /* Degree limit checked before anything is computed. */
  unsigned long long nd, dd;
  lw_expr_value_degrees (out, &nd, &dd);
  unsigned long long uk = (unsigned long long) k;
  unsigned long long deg = nd * uk > dd * uk ? nd * uk : dd * uk;
  if (deg > LW_MAX_DEGREE)
    return lw_error_set (p->err, LW_ERR_INVALID, (int) caret,
                         "the power at position %zu raises the degree to %llu, above the "
                         "limit of %d", caret, deg, LW_MAX_DEGREE);
  out->gain = pow (out->gain, (double) k);
  for (size_t i = 0; i < out->n; i++)
    out->f[i].exp *= k;
  if (out->gain == 0.0)
    lw_expr_value_set_zero (out);   /* underflow of a tiny constant */
  return lw_expr_value_check (p, out, caret);
}

static LwStatus
parse_unary (Parser *p, Value *out)
{
  skip_ws (p);
  int c = peek (p);
  if (c == '-' || c == '+') {
    size_t at = p->pos;
    if (p->depth >= NESTING_MAX)
      return lw_error_set (p->err, LW_ERR_PARSE, (int) at,
                           "the expression is nested too deeply at position %zu (more than %d "
                           "levels)", at, NESTING_MAX);
    p->pos++;
    p->depth++;
    LwStatus st = parse_unary (p, out);
    p->depth--;
    if (st != LW_OK)
      return st;
    if (c == '-')
      out->gain = -out->gain;
    return LW_OK;
  }
  return parse_power (p, out);
}

static LwStatus
parse_term (Parser *p, Value *out)
{
  LwStatus st = parse_unary (p, out);
  if (st != LW_OK)
    return st;
  for (;;) {
    skip_ws (p);
    int c = peek (p);
    if (c == '*' || c == '/') {
      size_t at = p->pos;
      p->pos++;
      Value rhs = { 0 };
      st = parse_unary (p, &rhs);
      if (st != LW_OK) {
        lw_expr_value_clear (&rhs);
        return st;
      }
      if (c == '/' && rhs.gain == 0.0) {
        lw_expr_value_clear (&rhs);
        return lw_error_set (p->err, LW_ERR_INVALID, (int) at,
                             "the denominator after '/' at position %zu is identically zero",
                             at);
      }
      bool ok = lw_expr_value_mul (out, &rhs, c == '*' ? 1 : -1);
      lw_expr_value_clear (&rhs);
      if (!ok)
        return lw_expr_nomem (p);
      st = lw_expr_value_check (p, out, at);
      if (st != LW_OK)
        return st;
      continue;
    }
    if (c == p->var || is_digit (c) || c == '.' || c == '(')
      return lw_error_set (p->err, LW_ERR_PARSE, (int) p->pos,
                           "expected an operator before '%c' at position %zu (write '*' for "
                           "multiplication)", c, p->pos);
    if (is_letter (c))
      return lw_error_set (p->err, LW_ERR_PARSE, (int) p->pos,
                           "unexpected '%c' at position %zu: the variable here is '%c'", c,
                           p->pos, p->var);
    return LW_OK;
  }
}

static LwStatus
parse_expr (Parser *p, Value *out)
{
  LwStatus st = parse_term (p, out);
  if (st != LW_OK)
    return st;
  for (;;) {
    skip_ws (p);
    int c = peek (p);
    if (c != '+' && c != '-')
      return LW_OK;
    size_t at = p->pos;
    p->pos++;
    Value rhs = { 0 };
    st = parse_term (p, &rhs);
    if (st != LW_OK) {
      lw_expr_value_clear (&rhs);
      return st;
    }
    bool ok = lw_expr_value_add (out, &rhs, c == '+' ? 1 : -1);
    lw_expr_value_clear (&rhs);
    if (!ok)
      return lw_expr_nomem (p);
    st = lw_expr_value_check (p, out, at);
    if (st != LW_OK)
      return st;
  }
}

/* ---------------------------------------------------------------------------------------- */
/* Entry points                                                                             */

static LwStatus
value_to_model (const Value *v, LwDomain domain, double period_s, LwModel **out, LwError *err)
{
  unsigned long long nd, dd;
  lw_expr_value_degrees (v, &nd, &dd);
  LwModel *m = lw_model_new (domain, period_s, v->gain, (size_t) nd, (size_t) dd);
  if (m == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory while building the model");
  size_t iz = 0, ip = 0;
  double complex r[LW_MAX_DEGREE];
  for (size_t i = 0; i < v->n; i++) {
    const Factor *f = &v->f[i];
    LwStatus st = lw_poly_roots (f->c, f->deg, r, err);
    if (st != LW_OK) {
      lw_model_free (m);
      return st;
    }
    long reps = f->exp > 0 ? f->exp : -f->exp;
    for (long k = 0; k < reps; k++)
      for (size_t j = 0; j < f->deg; j++) {
        if (f->exp > 0)
          m->zeros[iz++] = r[j];
        else
          m->poles[ip++] = r[j];
      }
  }
  lw_model_canonicalize (m);
  /* Bitwise-equal pairs only (tolerance 0): nothing is cancelled by closeness. */
  lw_model_cancel (m, 0.0);
  *out = m;
  return LW_OK;
}

static LwStatus parse_with (const char *text, LwDomain domain, double period_s,
                            const LwExprParam *params, size_t n_params, bool *used,
                            LwModel **out, LwError *err);

const char *
lw_expr_param_name_problem (const char *name)
{
  if (name == NULL || name[0] == '\0')
    return "a parameter's name is empty";
  if (!is_letter ((unsigned char) name[0]) && name[0] != '_')
    return "a parameter's name starts with a letter or '_'";
  size_t n = 0;
  for (; name[n] != '\0'; n++)
    if (!is_name_char ((unsigned char) name[n]))
      return "a parameter's name holds only letters, digits and '_'";
  if (n > LW_EXPR_NAME_MAX)
    return "a parameter's name is longer than 32 characters";
  if (n == 1 && (name[0] == 's' || name[0] == 'w' || name[0] == 'z'))
    return "s, w and z are the variables of expressions, not parameter names";
  return NULL;
}

LwStatus
lw_expr_parse_params (const char *text, LwDomain domain, double period_s,
                      const LwExprParam *params, size_t n, LwModel **out, LwError *err)
{
  lw_error_clear (err);
  if (out != NULL)
    *out = NULL;
  if (n > 0 && params == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "lw_expr_parse_params: NULL parameters");
  if (n > LW_EXPR_PARAMS_MAX)
    return lw_error_set (err, LW_ERR_INVALID, -1, "%zu parameters, more than the %d an "
                         "expression takes", n, LW_EXPR_PARAMS_MAX);
  for (size_t i = 0; i < n; i++)
    {
      const char *problem = lw_expr_param_name_problem (params[i].name);
      if (problem != NULL)
        return lw_error_set (err, LW_ERR_INVALID, -1, "parameter %zu ('%.*s'): %s", i + 1,
                             LW_EXPR_NAME_MAX, params[i].name != NULL ? params[i].name : "",
                             problem);
      for (size_t j = 0; j < i; j++)
        if (strcmp (params[j].name, params[i].name) == 0)
          return lw_error_set (err, LW_ERR_INVALID, -1, "parameter '%s' is given twice",
                               params[i].name);
      if (!isfinite (params[i].value))
        return lw_error_set (err, LW_ERR_INVALID, -1, "parameter '%s' has no finite value",
                             params[i].name);
    }
  bool used[LW_EXPR_PARAMS_MAX] = { false };
  LwStatus st = parse_with (text, domain, period_s, params, n, used, out, err);
  if (st != LW_OK)
    return st;
  for (size_t i = 0; i < n; i++)
    if (!used[i])
      {
        lw_model_free (*out);
        *out = NULL;
        return lw_error_set (err, LW_ERR_INVALID, -1, "parameter '%s' is given but the "
                             "expression does not use it", params[i].name);
      }
  return LW_OK;
}

LwStatus
lw_expr_parse (const char *text, LwDomain domain, double period_s, LwModel **out, LwError *err)
{
  lw_error_clear (err);
  return parse_with (text, domain, period_s, NULL, 0, NULL, out, err);
}

static LwStatus
parse_with (const char *text, LwDomain domain, double period_s, const LwExprParam *params,
            size_t n_params, bool *used, LwModel **out, LwError *err)
{
  if (out == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "lw_expr_parse: NULL output");
  *out = NULL;
  if (text == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "lw_expr_parse: NULL text");
  if (!isfinite (period_s) || period_s < 0.0)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "sample period %g s is not a finite non-negative number", period_s);
  size_t len = strlen (text);
  if (len > INT32_MAX)
    return lw_error_set (err, LW_ERR_INVALID, -1, "expression text is too long");
  LwStatus ascii = check_ascii (text, len, err);
  if (ascii != LW_OK)
    return ascii;
  Parser p = { .text = text, .len = len, .pos = 0, .var = lw_domain_var (domain), .err = err,
               .params = params, .n_params = n_params, .used = used };
  skip_ws (&p);
  if (p.pos == p.len)
    return lw_error_set (err, LW_ERR_PARSE, (int) p.pos, "empty expression at position %zu",
                         p.pos);
  Value v = { 0 };
  LwStatus st = parse_expr (&p, &v);
  if (st == LW_OK) {
    skip_ws (&p);
    if (p.pos < p.len) {
      int c = peek (&p);
      char d[32];
      if (c == ')')
        st = lw_error_set (err, LW_ERR_PARSE, (int) p.pos,
                           "unexpected ')' at position %zu: no '(' to close", p.pos);
      else
        st = lw_error_set (err, LW_ERR_PARSE, (int) p.pos,
                           "unexpected %s at position %zu: expected an operator or the end of "
                           "the expression", describe (c, d, sizeof d), p.pos);
    }
  }
  if (st == LW_OK)
    st = value_to_model (&v, domain, period_s, out, err);
  lw_expr_value_clear (&v);
  return st;
}

static LwStatus check_proper (LwStatus st, LwModel *m, LwModel **out, LwError *err);

LwStatus
lw_expr_parse_proper (const char *text, LwDomain domain, double period_s, LwModel **out,
                      LwError *err)
{
  LwModel *m = NULL;
  LwStatus st = lw_expr_parse (text, domain, period_s, &m, err);
  return check_proper (st, m, out, err);
}

LwStatus
lw_expr_parse_params_proper (const char *text, LwDomain domain, double period_s,
                             const LwExprParam *params, size_t n, LwModel **out, LwError *err)
{
  LwModel *m = NULL;
  LwStatus st = lw_expr_parse_params (text, domain, period_s, params, n, &m, err);
  return check_proper (st, m, out, err);
}

/* The model m parsed with status st, refused when improper or identically zero. */
static LwStatus
check_proper (LwStatus st, LwModel *m, LwModel **out, LwError *err)
{
  if (st != LW_OK || m == NULL) {
    if (out != NULL)
      *out = NULL;
    return st;
  }
  if (m->gain == 0.0) {
    lw_model_free (m);
    *out = NULL;
    return lw_error_set (err, LW_ERR_INVALID, 0, "the expression is identically zero");
  }
  if (m->n_zeros > m->n_poles) {
    size_t nz = m->n_zeros, np = m->n_poles;
    lw_model_free (m);
    *out = NULL;
    return lw_error_set (err, LW_ERR_INVALID, 0,
                         "the model is improper: numerator degree %zu exceeds denominator "
                         "degree %zu", nz, np);
  }
  *out = m;
  return LW_OK;
}
