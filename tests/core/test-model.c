/* test-model.c — factored models: polynomial roots, canonical layout, expansion, text form.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <float.h>
#include <locale.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-model.h"

#define EPS DBL_EPSILON

/* |got − want| <= tol·max(|want|, floor); floor keeps checks of values near 0 meaningful. */
static void
check_close (double got, double want, double tol, double floor_, const char *what, int line)
{
  double scale = fmax (fabs (want), floor_);
  if (!(fabs (got - want) <= tol * scale))
    fail_msg ("line %d: %s = %.17g, expected %.17g (tolerance %.3g relative)", line, what, got,
              want, tol);
}
#define CHECK_REL(got, want, tol) check_close ((got), (want), (tol), 1.0, #got, __LINE__)

static void
test_roots_linear (void **state)
{
  (void) state;
  const double c[2] = { 1.0, 2.0 };   /* 1 + 2x */
  double complex r[1];
  assert_int_equal (lw_poly_roots (c, 1, r, NULL), LW_OK);
  /* −1/2 is exact in binary: no tolerance. */
  assert_true (creal (r[0]) == -0.5 && cimag (r[0]) == 0.0);
}

static void
test_roots_quadratic_stable (void **state)
{
  (void) state;
  /* x² − 1e8 x + 1: the textbook formula loses every digit of the small root (b² − 4ac
   * rounds to b²).  Reference: mpmath.polyroots([1, -1e8, 1], extraprec=200) at 50 digits
   * gives 1.0000000000000001e-8 and 99999999.99999999; tolerance 4 ulp (a handful of
   * roundings in the stable formula). */
  const double c[3] = { 1.0, -1e8, 1.0 };
  double complex r[2];
  assert_int_equal (lw_poly_roots (c, 2, r, NULL), LW_OK);
  CHECK_REL (creal (r[0]), 1.0000000000000001e-8, 4 * EPS);
  CHECK_REL (creal (r[1]), 99999999.99999999, 4 * EPS);
  assert_true (cimag (r[0]) == 0.0 && cimag (r[1]) == 0.0);
}

static void
test_roots_quadratic_complex (void **state)
{
  (void) state;
  /* s² + 1.2 s + 16 = (s + 0.6)² + 15.64: roots −0.6 ± j√15.64 (completing the square).
   * Tolerance 8 ulp: the reference itself is computed from the rounded double 1.2. */
  const double c[3] = { 16.0, 1.2, 1.0 };
  double complex r[2];
  assert_int_equal (lw_poly_roots (c, 2, r, NULL), LW_OK);
  double re = -1.2 / 2, im = sqrt (16.0 - re * re);
  CHECK_REL (creal (r[0]), re, 8 * EPS);
  CHECK_REL (cimag (r[0]), im, 8 * EPS);
  /* Layout (lw-model.h): positive imaginary part first, exact conjugate next. */
  assert_true (cimag (r[0]) > 0.0);
  assert_true (r[1] == conj (r[0]));
}

static void
test_roots_cubic_mixed (void **state)
{
  (void) state;
  /* (x + 1)(x² + 2x + 5) = x³ + 3x² + 7x + 5: roots −1, −1 ± 2j (by construction).  The
   * companion eigenvalue path is backward stable and these roots have condition numbers of
   * order 1, so 100 ulp is generous. */
  const double c[4] = { 5.0, 7.0, 3.0, 1.0 };
  double complex r[3];
  assert_int_equal (lw_poly_roots (c, 3, r, NULL), LW_OK);
  CHECK_REL (creal (r[0]), -1.0, 100 * EPS);
  assert_true (cimag (r[0]) == 0.0);
  CHECK_REL (creal (r[1]), -1.0, 100 * EPS);
  CHECK_REL (cimag (r[1]), 2.0, 100 * EPS);
  assert_true (r[2] == conj (r[1]));
}

static void
test_roots_wilkinson10 (void **state)
{
  (void) state;
  /* ∏_{k=1}^{10} (x − k), coefficients from numpy.poly(range(1, 11)) (exact integers).
   * Tolerance per root: 100·κ_k·u with Wilkinson's condition number of a root under relative
   * coefficient perturbations, κ_k = Σ|c_i| k^i / (k |p'(k)|) (Higham, Accuracy and Stability
   * of Numerical Algorithms, 2nd ed., §26.1; from memory).  κ ranges 110 … 2.3e6 here, so the
   * relative tolerance is 1.2e-12 for k = 1 and 2.6e-8 for k = 7; the factor 100 covers the
   * companion matrix being backward stable in the matrix rather than in the coefficients
   * (observed: about 4·κ·u at worst). */
  const double desc[11] = { 1, -55, 1320, -18150, 157773, -902055, 3416930, -8409500,
                            12753576, -10628640, 3628800 };
  double c[11];
  for (int i = 0; i <= 10; i++)
    c[i] = desc[10 - i];
  double complex r[10];
  assert_int_equal (lw_poly_roots (c, 10, r, NULL), LW_OK);
  double worst = 0.0;
  for (int k = 1; k <= 10; k++) {
    double num = 0.0, dp = 0.0;
    for (int i = 0; i <= 10; i++)
      num += fabs (c[i]) * pow (k, i);
    for (int i = 1; i <= 10; i++)
      dp += i * c[i] * pow (k, i - 1);
    double kappa = num / (k * fabs (dp));
    double complex x = r[k - 1];   /* canonical order: real roots ascending */
    assert_true (cimag (x) == 0.0);
    check_close (creal (x), k, 100 * kappa * EPS / 2, 1.0, "Wilkinson root", __LINE__);
    worst = fmax (worst, fabs (creal (x) - k) / (kappa * EPS / 2 * k));
  }
  print_message ("Wilkinson-10: worst error %.2f x (kappa*u)\n", worst);
}

static void
test_roots_exact_zeros (void **state)
{
  (void) state;
  /* x³ − x² = x²(x − 1): the two roots at 0 are taken off exactly before anything else. */
  const double c[4] = { 0.0, 0.0, -1.0, 1.0 };
  double complex r[3];
  assert_int_equal (lw_poly_roots (c, 3, r, NULL), LW_OK);
  assert_true (r[0] == 0.0 && r[1] == 0.0 && r[2] == 1.0);
}

static void
test_roots_pairs_layout (void **state)
{
  (void) state;
  /* (x² + 1)(x² + 2x + 2)(x² + 0.5x + 3) expanded by hand (ascending):
   * (x² + 1)(x² + 2x + 2) = x⁴ + 2x³ + 3x² + 2x + 2; times (x² + 0.5x + 3):
   * x⁶ + 2.5x⁵ + 7x⁴ + 9.5x³ + 12x² + 7x + 6.
   * Roots ±j, −1 ± j, −0.25 ± j√2.9375; well conditioned, 1e-13 relative to max(1,|root|). */
  const double c[7] = { 6.0, 7.0, 12.0, 9.5, 7.0, 2.5, 1.0 };
  double complex r[6];
  assert_int_equal (lw_poly_roots (c, 6, r, NULL), LW_OK);
  const double want_re[3] = { -1.0, -0.25, 0.0 };
  const double want_im[3] = { 1.0, sqrt (2.9375), 1.0 };
  for (int k = 0; k < 3; k++) {
    double complex a = r[2 * k], b = r[2 * k + 1];
    assert_true (cimag (a) > 0.0);
    assert_true (b == conj (a));   /* exactly opposite imaginary parts, same real part */
    check_close (creal (a), want_re[k], 1e-13, 1.0, "pair real part", __LINE__);
    check_close (cimag (a), want_im[k], 1e-13, 1.0, "pair imag part", __LINE__);
  }
}

static void
test_roots_errors (void **state)
{
  (void) state;
  double complex r[4];
  LwError err;
  const double lead0[3] = { 1.0, 2.0, 0.0 };
  assert_int_equal (lw_poly_roots (lead0, 2, r, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "leading coefficient"));
  const double nan_c[3] = { 1.0, NAN, 1.0 };
  assert_int_equal (lw_poly_roots (nan_c, 2, r, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "not finite"));
  double big[LW_MAX_DEGREE + 2];
  for (int i = 0; i < LW_MAX_DEGREE + 2; i++)
    big[i] = 1.0;
  assert_int_equal (lw_poly_roots (big, LW_MAX_DEGREE + 1, r, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "exceeds the limit"));
}

static void
test_canonicalize (void **state)
{
  (void) state;
  LwModel *m = lw_model_new (LW_DOMAIN_S, 0.0, 2.0, 0, 6);
  assert_non_null (m);
  m->poles[0] = CMPLX (-1.0, -3.0);
  m->poles[1] = 4.0;
  m->poles[2] = CMPLX (-1.0, 3.0);
  m->poles[3] = CMPLX (-7.0, 1e-15);   /* nearly real: snapped to the axis */
  m->poles[4] = CMPLX (-0.0, 0.0);     /* negative zero becomes +0 */
  m->poles[5] = -2.0;
  lw_model_canonicalize (m);
  /* real roots ascending, then the pair, positive imaginary part first */
  assert_true (m->poles[0] == -7.0 && cimag (m->poles[0]) == 0.0);
  assert_true (m->poles[1] == -2.0);
  assert_true (m->poles[2] == 0.0 && !signbit (creal (m->poles[2])));
  assert_true (m->poles[3] == 4.0);
  assert_true (m->poles[4] == CMPLX (-1.0, 3.0));
  assert_true (m->poles[5] == CMPLX (-1.0, -3.0));
  lw_model_free (m);
}

static void
test_cancel_mul_degree (void **state)
{
  (void) state;
  LwModel *a = lw_model_new (LW_DOMAIN_S, 0.0, 3.0, 1, 1);
  LwModel *b = lw_model_new (LW_DOMAIN_S, 0.0, 0.5, 2, 1);
  assert_non_null (a);
  assert_non_null (b);
  a->zeros[0] = -1.0;
  a->poles[0] = -2.0;
  b->zeros[0] = CMPLX (-1.0, 1.0);
  b->zeros[1] = CMPLX (-1.0, -1.0);
  b->poles[0] = -1.0 + 1e-9;
  LwModel *p = lw_model_mul (a, b);
  assert_non_null (p);
  assert_true (p->gain == 1.5);
  assert_int_equal (p->n_zeros, 3);
  assert_int_equal (p->n_poles, 2);
  assert_int_equal (lw_model_relative_degree (p), -1);
  /* tolerance 0: −1 and −1 + 1e-9 differ, nothing cancels */
  assert_int_equal (lw_model_cancel (p, 0.0), 0);
  /* 1e-8 relative: the real pair cancels; the complex pair has no partner among the poles */
  assert_int_equal (lw_model_cancel (p, 1e-8), 1);
  assert_int_equal (p->n_zeros, 2);
  assert_int_equal (p->n_poles, 1);
  assert_true (p->poles[0] == -2.0);
  /* different domains do not multiply */
  LwModel *cz = lw_model_new_constant (LW_DOMAIN_Z, 0.1, 1.0);
  assert_null (lw_model_mul (a, cz));
  assert_true (lw_model_is_finite (p));
  p->gain = INFINITY;
  assert_false (lw_model_is_finite (p));
  lw_model_free (cz);
  lw_model_free (p);
  lw_model_free (a);
  lw_model_free (b);
}

/* 8 (s + 2) / (s (s² + 1.2 s + 16)) built from its roots. */
static LwModel *
example_model (void)
{
  LwModel *m = lw_model_new (LW_DOMAIN_S, 0.0, 8.0, 1, 3);
  double re = -0.6, im = sqrt (16.0 - 0.36);
  m->zeros[0] = -2.0;
  m->poles[0] = 0.0;
  m->poles[1] = CMPLX (re, im);
  m->poles[2] = CMPLX (re, -im);
  return m;
}

static void
test_eval_and_poly (void **state)
{
  (void) state;
  LwModel *m = example_model ();
  assert_non_null (m);
  /* Against the expanded form (8s + 16)/(s³ + 1.2 s² + 16 s) written out by hand, at
   * s = j and s = 3 − 2j: a few roundings either way, 1e-14 relative. */
  const double complex pts[2] = { CMPLX (0.0, 1.0), CMPLX (3.0, -2.0) };
  for (int i = 0; i < 2; i++) {
    double complex s = pts[i];
    double complex want = (8.0 * s + 16.0) / (s * s * s + 1.2 * s * s + 16.0 * s);
    double complex got = lw_model_eval (m, s);
    check_close (cabs (got - want), 0.0, 1e-14, cabs (want), "|eval - expanded|", __LINE__);
  }
  double num[2], den[4];
  assert_int_equal (lw_model_to_poly (m, num, den, NULL), LW_OK);
  /* num = 16 + 8 s exactly; den = 0 + 16 s + 1.2 s² + s³, |r|² = 0.36 + 15.64 rounds: 4 ulp */
  assert_true (num[0] == 16.0 && num[1] == 8.0);
  assert_true (den[0] == 0.0 && den[3] == 1.0);
  CHECK_REL (den[1], 16.0, 4 * EPS);
  CHECK_REL (den[2], 1.2, 4 * EPS);
  /* a complex root without its partner is refused */
  m->poles[2] = CMPLX (-0.6, -1.0);
  LwError err;
  assert_int_equal (lw_model_to_poly (m, num, den, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "conjugate"));
  lw_model_free (m);
}

static void
check_format (const LwModel *m, int digits, const char *want)
{
  char buf[256];
  size_t n = lw_model_format (m, digits, buf, sizeof buf);
  assert_string_equal (buf, want);
  assert_int_equal (n, strlen (want));
}

static void
test_format (void **state)
{
  (void) state;
  LwModel *m = example_model ();
  check_format (m, 6, "8 (s + 2) / (s (s^2 + 1.2 s + 16))");
  lw_model_free (m);

  m = lw_model_new (LW_DOMAIN_S, 0.0, 1.0, 1, 1);
  m->zeros[0] = -2.0;
  m->poles[0] = 0.5;
  check_format (m, 6, "(s + 2) / (s - 0.5)");
  m->gain = -1.0;
  check_format (m, 6, "-(s + 2) / (s - 0.5)");
  /* truncation behaves like snprintf: NUL-terminated, returns the length needed */
  char small[8];
  size_t need = lw_model_format (m, 6, small, sizeof small);
  assert_int_equal (need, strlen ("-(s + 2) / (s - 0.5)"));
  assert_string_equal (small, "-(s + 2");
  lw_model_free (m);

  /* repeated factors with ^k, the gain alone over a single factor */
  m = lw_model_new (LW_DOMAIN_Z, 0.01, 2.5, 3, 2);
  for (int i = 0; i < 3; i++)
    m->zeros[i] = -1.0;
  m->poles[0] = 0.0;
  m->poles[1] = 0.0;
  check_format (m, 6, "2.5 (z + 1)^3 / z^2");
  lw_model_free (m);

  m = lw_model_new (LW_DOMAIN_W, 0.01, 0.125, 0, 2);
  m->poles[0] = CMPLX (0.0, 2.0);   /* w² + 4: no linear term */
  m->poles[1] = CMPLX (0.0, -2.0);
  check_format (m, 6, "0.125 / (w^2 + 4)");
  lw_model_free (m);

  m = lw_model_new_constant (LW_DOMAIN_S, 0.0, 1.0 / 3.0);
  check_format (m, 4, "0.3333");
  lw_model_free (m);
}

static void
test_format_comma_locale (void **state)
{
  (void) state;
  /* Under a locale whose decimal point is ',' the text must still use '.'. */
  const char *names[] = { "de_DE.UTF-8", "de_DE.utf8", "fr_FR.UTF-8", "fr_FR.utf8" };
  const char *got = NULL;
  for (size_t i = 0; i < sizeof names / sizeof names[0] && got == NULL; i++)
    got = setlocale (LC_NUMERIC, names[i]);
  if (got == NULL || strcmp (localeconv ()->decimal_point, ",") != 0) {
    setlocale (LC_NUMERIC, "C");
    skip ();
  }
  LwModel *m = lw_model_new (LW_DOMAIN_S, 0.0, 1.5, 0, 1);
  m->poles[0] = -0.25;
  char buf[64];
  lw_model_format (m, 6, buf, sizeof buf);
  setlocale (LC_NUMERIC, "C");
  assert_string_equal (buf, "1.5 / (s + 0.25)");
  lw_model_free (m);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_roots_linear),
    cmocka_unit_test (test_roots_quadratic_stable),
    cmocka_unit_test (test_roots_quadratic_complex),
    cmocka_unit_test (test_roots_cubic_mixed),
    cmocka_unit_test (test_roots_wilkinson10),
    cmocka_unit_test (test_roots_exact_zeros),
    cmocka_unit_test (test_roots_pairs_layout),
    cmocka_unit_test (test_roots_errors),
    cmocka_unit_test (test_canonicalize),
    cmocka_unit_test (test_cancel_mul_degree),
    cmocka_unit_test (test_eval_and_poly),
    cmocka_unit_test (test_format),
    cmocka_unit_test (test_format_comma_locale),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
