/* test-expr.c — the expression parser: factored values, sums, cancellation, error messages.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <complex.h>
#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "lw-expr.h"

#define EPS DBL_EPSILON

static void
check_close (double got, double want, double tol, const char *what, int line)
{
  double scale = fmax (fabs (want), 1.0);
  if (!(fabs (got - want) <= tol * scale))
    fail_msg ("line %d: %s = %.17g, expected %.17g (tolerance %.3g relative)", line, what, got,
              want, tol);
}
#define CHECK_REL(got, want, tol) check_close ((got), (want), (tol), #got, __LINE__)

static LwModel *
parse_ok (const char *text)
{
  LwModel *m = NULL;
  LwError err;
  LwStatus st = lw_expr_parse (text, LW_DOMAIN_S, 0.0, &m, &err);
  if (st != LW_OK)
    fail_msg ("'%s' did not parse: %s (position %d)", text, err.message, err.position);
  assert_non_null (m);
  return m;
}

static void
test_example_plant (void **state)
{
  (void) state;
  LwModel *m = parse_ok ("8*(s+2)/(s*(s^2+1.2*s+16))");
  /* gain 8, zero −2, poles 0 and −0.6 ± j√(16 − 0.36) (completing the square).  Tolerance
   * 1e-14 relative: the pair comes from the closed-form quadratic, whose discriminant and
   * square root round a few times; 1e-14 is about 45 ulp, well above that and far below any
   * real error (a wrong sign or factor would be off by O(1)). */
  assert_true (m->domain == LW_DOMAIN_S && m->period_s == 0.0);
  assert_true (m->gain == 8.0);
  assert_int_equal (m->n_zeros, 1);
  assert_int_equal (m->n_poles, 3);
  assert_true (m->zeros[0] == -2.0);
  assert_true (m->poles[0] == 0.0);
  double im = sqrt (16.0 - 0.36);
  CHECK_REL (creal (m->poles[1]), -0.6, 1e-14);
  CHECK_REL (cimag (m->poles[1]), im, 1e-14);
  assert_true (m->poles[2] == conj (m->poles[1]));
  char buf[128];
  lw_model_format (m, 6, buf, sizeof buf);
  assert_string_equal (buf, "8 (s + 2) / (s (s^2 + 1.2 s + 16))");
  lw_model_free (m);
}

static void
test_triple_root_exact (void **state)
{
  (void) state;
  /* Powers only multiply exponents: the factor s + 1 is factored once, so all three poles
   * are exactly −1 (an expanded cubic would scatter them by ~1e-5). */
  LwModel *m = parse_ok ("2/(s+1)^3");
  assert_true (m->gain == 2.0);
  assert_int_equal (m->n_zeros, 0);
  assert_int_equal (m->n_poles, 3);
  for (int i = 0; i < 3; i++)
    assert_true (m->poles[i] == -1.0);
  lw_model_free (m);
  /* the same from a product */
  m = parse_ok ("(s+1)*(s+1)^2");
  assert_int_equal (m->n_zeros, 3);
  for (int i = 0; i < 3; i++)
    assert_true (m->zeros[i] == -1.0);
  lw_model_free (m);
}

static void
test_sums (void **state)
{
  (void) state;
  /* 1/(s+1) + 1/(s+2) = (2s + 3)/((s+1)(s+2)) (partial fractions, by hand): gain 2, zero
   * −1.5, poles −2 and −1, all exact in binary. */
  LwModel *m = parse_ok ("1/(s+1)+1/(s+2)");
  assert_true (m->gain == 2.0);
  assert_int_equal (m->n_zeros, 1);
  assert_true (m->zeros[0] == -1.5);
  assert_int_equal (m->n_poles, 2);
  assert_true (m->poles[0] == -2.0 && m->poles[1] == -1.0);
  lw_model_free (m);

  /* (s+1)^2 − 1 = s (s + 2): roots 0 and −2 exactly (the root at 0 deflated exactly) */
  m = parse_ok ("(s+1)^2 - 1");
  assert_true (m->gain == 1.0);
  assert_int_equal (m->n_zeros, 2);
  assert_true (m->zeros[0] == -2.0 && m->zeros[1] == 0.0);
  lw_model_free (m);

  /* shared factors stay factored: s/(s+1) − 1/(s+1) = (s − 1)/(s + 1) */
  m = parse_ok ("s/(s+1) - 1/(s+1)");
  assert_int_equal (m->n_zeros, 1);
  assert_int_equal (m->n_poles, 1);
  assert_true (m->zeros[0] == 1.0 && m->poles[0] == -1.0);
  lw_model_free (m);

  /* PID-like sum: 2 + 3/s + 0.5*s = (0.5 s² + 2 s + 3)/s; roots of s² + 4s + 6: −2 ± j√2.
   * Closed-form quadratic: 8 ulp. */
  m = parse_ok ("2 + 3/s + 0.5*s");
  assert_true (m->gain == 0.5);
  assert_int_equal (m->n_zeros, 2);
  assert_int_equal (m->n_poles, 1);
  assert_true (m->poles[0] == 0.0);
  CHECK_REL (creal (m->zeros[0]), -2.0, 8 * EPS);
  CHECK_REL (cimag (m->zeros[0]), sqrt (2.0), 8 * EPS);
  lw_model_free (m);

  /* s − s is identically zero: gain 0, no roots */
  m = parse_ok ("s - s");
  assert_true (m->gain == 0.0);
  assert_int_equal (m->n_zeros + m->n_poles, 0);
  lw_model_free (m);
}

static void
test_cancellation (void **state)
{
  (void) state;
  LwModel *m = parse_ok ("(s+1)/(s+1)");
  assert_true (m->gain == 1.0);
  assert_int_equal (m->n_zeros + m->n_poles, 0);
  lw_model_free (m);
  /* (s² + 3s + 2)/(s + 1): the stable quadratic gives −2 and exactly −1, which cancels */
  m = parse_ok ("(s^2+3*s+2)/(s+1)");
  assert_int_equal (m->n_zeros, 1);
  assert_int_equal (m->n_poles, 0);
  assert_true (m->zeros[0] == -2.0);
  lw_model_free (m);
  /* nothing is cancelled by closeness */
  m = parse_ok ("(s+1)/(s+1.0000001)");
  assert_int_equal (m->n_zeros, 1);
  assert_int_equal (m->n_poles, 1);
  lw_model_free (m);
}

static void
test_numbers_unary_spaces (void **state)
{
  (void) state;
  LwModel *m = parse_ok ("  -.5 * ( s - 2.5E-1 ) / -(1e1 + s)\t");
  /* −0.5 (s − 0.25) / (−(s + 10)) = 0.5 (s − 0.25)/(s + 10); all exact in binary */
  assert_true (m->gain == 0.5);
  assert_true (m->zeros[0] == 0.25 && m->poles[0] == -10.0);
  lw_model_free (m);
  m = parse_ok ("--+3");
  assert_true (m->gain == 3.0 && m->n_zeros == 0 && m->n_poles == 0);
  lw_model_free (m);
  m = parse_ok ("2*s/4");
  assert_true (m->gain == 0.5 && m->n_zeros == 1 && m->zeros[0] == 0.0);
  lw_model_free (m);
  m = parse_ok ("(s+3)^0");
  assert_true (m->gain == 1.0 && m->n_zeros == 0);
  lw_model_free (m);
  /* the degree limit is inclusive */
  m = parse_ok ("1/s^60");
  assert_int_equal (m->n_poles, LW_MAX_DEGREE);
  lw_model_free (m);
}

static void
test_other_domains (void **state)
{
  (void) state;
  LwModel *m = NULL;
  assert_int_equal (lw_expr_parse ("0.2*z/(z-0.8)", LW_DOMAIN_Z, 0.01, &m, NULL), LW_OK);
  assert_true (m->domain == LW_DOMAIN_Z && m->period_s == 0.01);
  assert_true (m->gain == 0.2 && m->zeros[0] == 0.0 && m->poles[0] == 0.8);
  lw_model_free (m);
  LwError err;
  assert_int_equal (lw_expr_parse ("s+1", LW_DOMAIN_W, 0.01, &m, &err), LW_ERR_PARSE);
  assert_null (m);
  assert_int_equal (err.position, 0);
  assert_string_equal (err.message, "unexpected 's' at position 0: the variable here is 'w'");
}

typedef struct {
  const char *text;
  LwStatus code;
  int position;
  const char *message_part;
} BadCase;

static void
test_malformed_table (void **state)
{
  (void) state;
  static char long_number[80];
  memset (long_number, '1', 70);
  long_number[70] = '\0';
  static char deep[400];
  memset (deep, '(', 300);
  strcpy (deep + 300, "s");
  const BadCase cases[] = {
    { "", LW_ERR_PARSE, 0, "empty expression" },
    { "   ", LW_ERR_PARSE, 3, "empty expression" },
    { "s+", LW_ERR_PARSE, 2, "expected a number, 's' or '(' at position 2" },
    { "1+ *2", LW_ERR_PARSE, 3, "expected a number, 's' or '(' at position 3" },
    { "(s+1", LW_ERR_PARSE, 4, "expected ')' at position 4 to close '(' at position 0" },
    { "((s+1)*2", LW_ERR_PARSE, 8, "to close '(' at position 0" },
    { "s+1)", LW_ERR_PARSE, 3, "unexpected ')' at position 3" },
    { "2s", LW_ERR_PARSE, 1, "expected an operator before 's' at position 1" },
    { "(s+1)(s+2)", LW_ERR_PARSE, 5, "expected an operator before '(' at position 5" },
    { "s 2", LW_ERR_PARSE, 2, "expected an operator before '2' at position 2" },
    { "1 + z", LW_ERR_PARSE, 4, "unexpected 'z' at position 4: the variable here is 's'" },
    { "s*x", LW_ERR_PARSE, 2, "unexpected 'x' at position 2: the variable here is 's'" },
    { "s^-1", LW_ERR_PARSE, 2, "expected a non-negative integer exponent after '^' at position 2" },
    { "s^1.5", LW_ERR_PARSE, 2, "the exponent at position 2 must be a non-negative integer" },
    { "s^s", LW_ERR_PARSE, 2, "non-negative integer exponent" },
    { "s^2^3", LW_ERR_PARSE, 3, "unexpected '^' at position 3" },
    { "1/(s-s)", LW_ERR_INVALID, 1, "identically zero" },
    { "1/0", LW_ERR_INVALID, 1, "identically zero" },
    { "(s+1)/(0*s)", LW_ERR_INVALID, 5, "identically zero" },
    { "0^0", LW_ERR_INVALID, 1, "power 0" },
    { "1e999", LW_ERR_INVALID, 0, "out of range" },
    { "s - 2e400*s", LW_ERR_INVALID, 4, "out of range" },
    { "1e300*1e300", LW_ERR_INVALID, 5, "not finite" },
    { "s^61", LW_ERR_INVALID, 1, "raises the degree to 61, above the limit of 60" },
    { "1/s^61", LW_ERR_INVALID, 3, "raises the degree to 61" },
    { "s^40*s^21", LW_ERR_INVALID, 4, "numerator degree 61" },
    { "1/(s^40*s^30)", LW_ERR_INVALID, 7, "degree 70 exceeds the limit of 60 at position 7" },
    { "1/s^40/s^30", LW_ERR_INVALID, 6, "denominator degree 70" },
    { "(s+1)^100000000", LW_ERR_INVALID, 5, "degree to 100000000" },
    { "s^30*(s+1)^31", LW_ERR_INVALID, 4, "numerator degree 61" },
    { "(s^31+1)/(s^30+2) + s^31", LW_ERR_INVALID, 18, "numerator degree 61" },
    { "s^99999999999999999999", LW_ERR_INVALID, 2, "too large" },
    { long_number, LW_ERR_PARSE, 0, "too long" },
    { "1.", LW_ERR_PARSE, 2, "expected a digit after the decimal point at position 2" },
    { "2e+", LW_ERR_PARSE, 3, "exponent at position 3" },
    { "s $", LW_ERR_PARSE, 2, "unexpected '$' at position 2" },
    /* Non-ASCII: the first such character is named before any grammar error it would cause
     * (UTF-8 encodings per RFC 3629; code points from the Unicode charts). */
    { "s+\xc3\xa4", LW_ERR_PARSE, 2, "'\xc3\xa4' (U+00E4) at position 2: expressions are written in ASCII" },
    { "1/(s\xe2\x88\x92" "1)", LW_ERR_PARSE, 4, "(U+2212, minus sign) at position 4 is not an operator of expressions: use '-' (U+002D)" },
    { "s\xe2\x80\x93" "1", LW_ERR_PARSE, 1, "(U+2013, en dash) at position 1 is not an operator of expressions: use '-' (U+002D)" },
    { "2\xc3\x97s", LW_ERR_PARSE, 1, "use '*' (U+002A)" },
    { "1/(s+\xff)", LW_ERR_PARSE, 5, "byte 0xff at position 5 is not valid UTF-8" },
    { "s+\xe2\x88", LW_ERR_PARSE, 2, "byte 0xe2 at position 2 is not valid UTF-8" },
    { "s+\xc0\xad", LW_ERR_PARSE, 2, "byte 0xc0 at position 2 is not valid UTF-8" },   /* overlong '-' */
    { "s+\xed\xa0\x80", LW_ERR_PARSE, 2, "not valid UTF-8" },   /* a surrogate */
    { deep, LW_ERR_PARSE, 200, "nested too deeply" },
  };
  for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
    const BadCase *c = &cases[i];
    LwModel *m = (LwModel *) (uintptr_t) 1;   /* must be reset to NULL */
    LwError err;
    LwStatus st = lw_expr_parse (c->text, LW_DOMAIN_S, 0.0, &m, &err);
    if (st != c->code || err.position != c->position || strstr (err.message, c->message_part)
        == NULL || m != NULL)
      fail_msg ("case %zu '%.40s': status %d position %d message '%s'; expected status %d "
                "position %d containing '%s'", i, c->text, (int) st, err.position,
                err.message, (int) c->code, c->position, c->message_part);
  }
}

static void
test_parse_proper (void **state)
{
  (void) state;
  LwModel *m = NULL;
  LwError err;
  assert_int_equal (lw_expr_parse_proper ("s^2/(s+1)", LW_DOMAIN_S, 0.0, &m, &err),
                    LW_ERR_INVALID);
  assert_null (m);
  assert_int_equal (err.position, 0);
  assert_non_null (strstr (err.message, "improper"));
  assert_int_equal (lw_expr_parse_proper ("s/(s+1) - s/(s+1)", LW_DOMAIN_S, 0.0, &m, &err),
                    LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "identically zero"));
  assert_int_equal (lw_expr_parse_proper ("(s+4)/(s+1)", LW_DOMAIN_S, 0.0, &m, &err), LW_OK);
  assert_non_null (m);
  lw_model_free (m);
  /* parse errors pass through unchanged */
  assert_int_equal (lw_expr_parse_proper ("(s", LW_DOMAIN_S, 0.0, &m, &err), LW_ERR_PARSE);
  assert_int_equal (err.position, 2);
}

static bool
same_model (const LwModel *a, const LwModel *b)
{
  if (a->gain != b->gain || a->n_zeros != b->n_zeros || a->n_poles != b->n_poles)
    return false;
  for (size_t i = 0; i < a->n_zeros; i++)
    if (memcmp (&a->zeros[i], &b->zeros[i], sizeof a->zeros[i]) != 0)
      return false;
  for (size_t i = 0; i < a->n_poles; i++)
    if (memcmp (&a->poles[i], &b->poles[i], sizeof a->poles[i]) != 0)
      return false;
  return true;
}

/* ---- named parameters ---------------------------------------------------------------------- */

static void
test_params (void **state)
{
  (void) state;
  const LwExprParam pr[] = { { "K", 2.0 }, { "wn", 10.0 }, { "zeta_1", 0.3 } };
  LwModel *m = NULL;
  LwError err;
  assert_int_equal (lw_expr_parse_params_proper ("K*wn^2/(s*(s^2+2*zeta_1*wn*s+wn^2))",
                                                 LW_DOMAIN_S, 0.0, pr, 3, &m, &err), LW_OK);
  /* the textbook second-order pair −ζωn ± jωn√(1−ζ²) (any control text, e.g. Franklin,
   * Powell & Emami-Naeini, "Feedback Control of Dynamic Systems", §3.3; from memory), gain
   * K·ωn² = 200, a pole at the origin; the factored form is kept. 1e-14 relative as in
   * test_example_plant: the pair comes from the closed-form quadratic. */
  assert_true (m->gain == 200.0);
  assert_int_equal (m->n_zeros, 0);
  assert_int_equal (m->n_poles, 3);
  assert_true (m->poles[0] == 0.0);
  CHECK_REL (creal (m->poles[1]), -3.0, 1e-14);
  CHECK_REL (fabs (cimag (m->poles[1])), 10.0 * sqrt (1.0 - 0.09), 1e-14);
  CHECK_REL (cimag (m->poles[1]), -cimag (m->poles[2]), 1e-14);
  lw_model_free (m);

  /* the same text with the numbers typed in gives the same model, bit for bit */
  LwModel *typed = parse_ok ("2*10^2/(s*(s^2+2*0.3*10*s+10^2))");
  assert_int_equal (lw_expr_parse_params ("K*wn^2/(s*(s^2+2*zeta_1*wn*s+wn^2))", LW_DOMAIN_S,
                                          0.0, pr, 3, &m, &err), LW_OK);
  assert_true (same_model (m, typed));
  lw_model_free (m);
  lw_model_free (typed);

  /* a parameter of zero makes its term vanish; a name may start with '_' and hold digits */
  const LwExprParam z[] = { { "_a2", 0.0 } };
  assert_int_equal (lw_expr_parse_params ("1/(s+1) + _a2*s", LW_DOMAIN_S, 0.0, z, 1, &m, &err),
                    LW_OK);
  assert_int_equal (m->n_zeros, 0);
  assert_int_equal (m->n_poles, 1);
  lw_model_free (m);
  /* the variable next to a name: "s" alone is the variable, "s2" is a name */
  const LwExprParam s2[] = { { "s2", 3.0 } };
  assert_int_equal (lw_expr_parse_params ("s2/(s+s2)", LW_DOMAIN_S, 0.0, s2, 1, &m, &err),
                    LW_OK);
  assert_true (m->gain == 3.0 && m->n_poles == 1 && m->poles[0] == -3.0);
  lw_model_free (m);
}

static void
param_refused (const char *text, const LwExprParam *pr, size_t n, LwStatus code, int position,
               const char *substring)
{
  LwModel *m = (LwModel *) 1;
  LwError err;
  LwStatus st = lw_expr_parse_params (text, LW_DOMAIN_S, 0.0, pr, n, &m, &err);
  if (st != code || err.position != position || strstr (err.message, substring) == NULL)
    fail_msg ("'%s': status %d at %d '%s'; expected %d at %d containing '%s'", text, st,
              err.position, err.message, code, position, substring);
  assert_null (m);
}

static void
test_params_refused (void **state)
{
  (void) state;
  const LwExprParam kw[] = { { "K", 2.0 }, { "wn", 10.0 } };
  param_refused ("K/(s+wm)", kw, 2, LW_ERR_PARSE, 5, "unknown parameter 'wm' at position 5: the "
                 "variable here is 's', the parameters are K, wn");
  param_refused ("K/(s+1)", kw, 2, LW_ERR_INVALID, -1, "parameter 'wn' is given but the "
                 "expression does not use it");
  const LwExprParam twice[] = { { "K", 2.0 }, { "K", 3.0 } };
  param_refused ("K/s", twice, 2, LW_ERR_INVALID, -1, "parameter 'K' is given twice");
  const LwExprParam nan_value[] = { { "K", NAN } };
  param_refused ("K/s", nan_value, 1, LW_ERR_INVALID, -1, "parameter 'K' has no finite value");
  const LwExprParam inf_value[] = { { "K", INFINITY } };
  param_refused ("K/s", inf_value, 1, LW_ERR_INVALID, -1, "no finite value");
  const char *bad_names[] = { "s", "w", "z", "2a", "a-b", "", "k\xc3\xa4",
                              "a234567890123456789012345678901234" };
  const char *why[] = { "variables of expressions", "variables", "variables", "starts with",
                        "only letters", "empty", "only letters", "longer than 32" };
  for (size_t i = 0; i < sizeof bad_names / sizeof bad_names[0]; i++)
    {
      const LwExprParam b[] = { { bad_names[i], 1.0 } };
      param_refused ("1/s", b, 1, LW_ERR_INVALID, -1, why[i]);
    }
  /* without parameters: a longer name is unknown, a lone other letter keeps its message */
  param_refused ("K/(s+1)", NULL, 0, LW_ERR_PARSE, 0, "unexpected 'K' at position 0: the "
                 "variable here is 's'");
  param_refused ("gain/(s+1)", NULL, 0, LW_ERR_PARSE, 0, "unknown name 'gain' at position 0: "
                 "the variable here is 's' and no parameters are given");
  /* a parameter's value making the plant zero or improper is the proper parse's refusal */
  const LwExprParam k0[] = { { "K", 0.0 } };
  LwModel *m = NULL;
  LwError err;
  assert_int_equal (lw_expr_parse_params_proper ("K/(s+1)", LW_DOMAIN_S, 0.0, k0, 1, &m, &err),
                    LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "identically zero"));
  const LwExprParam a0[] = { { "a", 0.0 } };
  assert_int_equal (lw_expr_parse_params_proper ("(s^2+1)/(a*s^2+s+1)", LW_DOMAIN_S, 0.0, a0, 1,
                                                 &m, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "improper"));
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_example_plant),
    cmocka_unit_test (test_triple_root_exact),
    cmocka_unit_test (test_sums),
    cmocka_unit_test (test_cancellation),
    cmocka_unit_test (test_numbers_unary_spaces),
    cmocka_unit_test (test_other_domains),
    cmocka_unit_test (test_malformed_table),
    cmocka_unit_test (test_parse_proper),
    cmocka_unit_test (test_params),
    cmocka_unit_test (test_params_refused),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
