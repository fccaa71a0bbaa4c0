/* test-number.c — the one number syntax (lw-number.h): what it accepts and refuses, that its
 * values are the C library's correctly rounded conversion in the "C" locale and in a locale
 * with a decimal comma, that an expression accepts a constant exactly when the number reader
 * does, and the ranges of the loop's timing.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <locale.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "lw-expr.h"
#include "lw-number.h"

static const char *const accepted[] = {
  "0", "7", "-7", "+7", "0.002", ".5", "-.5", "1e3", "1E3", "1e+3", "1e-3", "2.5e-7",
  "00012", "1e-400" /* underflows to 0: accepted, ranges refuse it later */,
  "4.9e-324", "1.7976931348623157e308",
};

static const char *const refused[] = {
  "", " ", " 0.002", "0.002 ", "0.002\n", "\t1", "5.", "-", "+", ".", "e3", "1e", "1e+",
  "0x10", "0x1p3", "0X10", "inf", "INF", "-inf", "nan", "NaN", "infinity", "1,5", "1_000",
  "1 000", "--1", "+-1", "1..2", "1.2.3", "1e3.5", "\xe2\x88\x92" "1" /* U+2212 */, "1e3e3",
  "\xef\xbc\x91" /* fullwidth 1 */,
};

/* The expected value from the C library's strtod in the "C" locale (correctly rounded per
 * IEEE 754 / C11 7.22.1.3 with glibc), an implementation independent of lw_number_convert's
 * decimal-point handling. */
static double
c_strtod (const char *text)
{
  locale_t c = newlocale (LC_ALL_MASK, "C", (locale_t) 0);
  assert_non_null (c);
  locale_t old = uselocale (c);
  double v = strtod (text, NULL);
  uselocale (old);
  freelocale (c);
  return v;
}

static void
test_syntax (void **state)
{
  (void) state;
  for (size_t i = 0; i < sizeof accepted / sizeof accepted[0]; i++)
    {
      double v = -12345.0;
      if (lw_number_parse (accepted[i], &v) != LW_NUMBER_OK)
        fail_msg ("'%s' refused", accepted[i]);
      /* exact: the same correctly rounded conversion */
      if (v != c_strtod (accepted[i]))
        fail_msg ("'%s' read as %.17g, strtod gives %.17g", accepted[i], v, c_strtod (accepted[i]));
    }
  for (size_t i = 0; i < sizeof refused / sizeof refused[0]; i++)
    {
      double v = -12345.0;
      if (lw_number_parse (refused[i], &v) == LW_NUMBER_OK)
        fail_msg ("'%s' accepted as %.17g", refused[i], v);
      assert_true (v == -12345.0);   /* untouched */
    }
  double v;
  assert_int_equal (lw_number_parse ("1e999", &v), LW_NUMBER_NOT_FINITE);
  assert_int_equal (lw_number_parse ("-1e309", &v), LW_NUMBER_NOT_FINITE);
  char longer[LW_NUMBER_MAX_CHARS + 2];
  memset (longer, '1', sizeof longer - 1);
  longer[sizeof longer - 1] = '\0';
  assert_int_equal (lw_number_parse (longer, &v), LW_NUMBER_TOO_LONG);
  longer[LW_NUMBER_MAX_CHARS] = '\0';
  assert_int_equal (lw_number_parse (longer, &v), LW_NUMBER_OK);
}

/* An expression made of one unsigned number parses exactly when the number reader accepts
 * it, to the same value: the syntax is one. */
static void
test_same_as_expressions (void **state)
{
  (void) state;
  const char *const *lists[] = { accepted, refused };
  size_t lens[] = { sizeof accepted / sizeof accepted[0], sizeof refused / sizeof refused[0] };
  for (int l = 0; l < 2; l++)
    for (size_t i = 0; i < lens[l]; i++)
      {
        const char *t = lists[l][i];
        if (t[0] == '-' || t[0] == '+' || t[0] == '\0' || t[0] == ' ' || t[0] == '\t')
          continue;   /* a sign is the expression's unary operator; blanks are its spacing */
        size_t n = strlen (t);
        if (n > 0 && (t[n - 1] == ' ' || t[n - 1] == '\n'))
          continue;
        double v = 0.0;
        bool number_ok = lw_number_parse (t, &v) == LW_NUMBER_OK;
        LwModel *m = NULL;
        LwError err;
        bool expr_ok = lw_expr_parse (t, LW_DOMAIN_S, 0.0, &m, &err) == LW_OK;
        if (number_ok != expr_ok)
          fail_msg ("'%s': number reader %s, expression parser %s (%s)", t,
                    number_ok ? "accepts" : "refuses", expr_ok ? "accepts" : "refuses",
                    expr_ok ? "" : err.message);
        if (expr_ok)
          {
            if (m->gain != v)
              fail_msg ("'%s': expression %.17g, number %.17g", t, m->gain, v);
            lw_model_free (m);
          }
      }
}

/* A locale with a decimal comma changes nothing. */
static void
test_locale (void **state)
{
  (void) state;
  const char *names[] = { "de_DE.UTF-8", "fr_FR.UTF-8", "de_DE", NULL };
  const char *got = NULL;
  for (size_t i = 0; names[i] != NULL && got == NULL; i++)
    got = setlocale (LC_NUMERIC, names[i]);
  if (got == NULL)
    {
      /* no such locale installed: nothing to check here (the "C" checks above still run) */
      skip ();
      return;
    }
  double v = 0.0;
  assert_int_equal (lw_number_parse ("2.5e-3", &v), LW_NUMBER_OK);
  setlocale (LC_NUMERIC, "C");
  assert_true (v == 2.5e-3);
  setlocale (LC_NUMERIC, got);
  assert_int_not_equal (lw_number_parse ("2,5", &v), LW_NUMBER_OK);
  setlocale (LC_NUMERIC, "C");
}

static void
test_whole (void **state)
{
  (void) state;
  long long n = -1;
  bool whole, in_range;
  assert_int_equal (lw_number_parse_whole ("1000", 0, 10000, &n, &whole, &in_range), LW_NUMBER_OK);
  assert_int_equal (n, 1000);
  assert_int_equal (lw_number_parse_whole ("+7", 0, 10, &n, &whole, &in_range), LW_NUMBER_OK);
  assert_int_equal (n, 7);
  assert_int_equal (lw_number_parse_whole ("-0", 0, 5, &n, &whole, &in_range), LW_NUMBER_OK);
  assert_int_equal (n, 0);
  assert_int_equal (lw_number_parse_whole ("007", 0, 10, &n, &whole, &in_range), LW_NUMBER_OK);
  assert_int_equal (n, 7);
  /* numbers, but not written as whole numbers (xsd:integer refuses them too) */
  const char *not_whole[] = { "1e3", "1.5", "1.0", ".5", "1E1" };
  for (size_t i = 0; i < sizeof not_whole / sizeof not_whole[0]; i++)
    {
      assert_int_not_equal (lw_number_parse_whole (not_whole[i], 0, 5000, &n, &whole, &in_range),
                            LW_NUMBER_OK);
      assert_false (whole);
    }
  /* not numbers at all */
  const char *bad[] = { "", "-", " 3", "3 ", "0x3", "3a", "\xe2\x88\x92" "3", "1,000" };
  for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++)
    {
      assert_int_not_equal (lw_number_parse_whole (bad[i], 0, 5000, &n, &whole, &in_range),
                            LW_NUMBER_OK);
      assert_true (whole);
      assert_true (in_range);
    }
  assert_int_not_equal (lw_number_parse_whole ("6", 0, 5, &n, &whole, &in_range), LW_NUMBER_OK);
  assert_true (whole);
  assert_false (in_range);
  assert_int_not_equal (lw_number_parse_whole ("-1", 0, 5, &n, &whole, &in_range), LW_NUMBER_OK);
  assert_false (in_range);
  assert_int_not_equal (lw_number_parse_whole ("99999999999999999999999", 0, 5, &n, &whole,
                                               &in_range), LW_NUMBER_OK);
  assert_false (in_range);
}

static void
test_timing_ranges (void **state)
{
  (void) state;
  assert_true (lw_period_ok (1e-12));
  assert_true (lw_period_ok (0.002));
  assert_true (lw_period_ok (1e9));
  assert_false (lw_period_ok (1e-300));
  assert_false (lw_period_ok (4.9e-324));
  assert_false (lw_period_ok (1e300));
  assert_false (lw_period_ok (0.0));
  assert_false (lw_period_ok (-1.0));
  assert_false (lw_period_ok (NAN));
  assert_false (lw_period_ok (INFINITY));
  assert_true (lw_dead_time_ok (0.0, 0.002));
  assert_true (lw_dead_time_ok (2000.0, 0.002));       /* exactly 1e6 samples */
  assert_false (lw_dead_time_ok (2000.1, 0.002));
  assert_false (lw_dead_time_ok (1e300, 0.002));
  assert_false (lw_dead_time_ok (-1.0, 0.002));
  assert_false (lw_dead_time_ok (INFINITY, 0.002));
}

int
main (void)
{
  setlocale (LC_ALL, "C");
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_syntax),
    cmocka_unit_test (test_same_as_expressions),
    cmocka_unit_test (test_locale),
    cmocka_unit_test (test_whole),
    cmocka_unit_test (test_timing_ranges),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
