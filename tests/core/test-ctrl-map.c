/* test-ctrl-map.c — continuous controllers mapped to z: Tustin (with prewarp), matched pole-zero,
 * forward and backward Euler.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <float.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-ctrl-map.h"
#include "lw-expr.h"

#define EPS DBL_EPSILON
#define PI 3.14159265358979323846

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
parse_s (const char *text)
{
  LwModel *m = NULL;
  LwError err;
  if (lw_expr_parse (text, LW_DOMAIN_S, 0.0, &m, &err) != LW_OK)
    fail_msg ("'%s': %s", text, err.message);
  return m;
}

static LwModel *
map_ok (const LwModel *ms, LwCtrlMapMethod method, double T, double prewarp)
{
  LwModel *mz = NULL;
  LwError err;
  if (lw_ctrl_map (ms, method, T, prewarp, &mz, &err) != LW_OK)
    fail_msg ("lw_ctrl_map (%s): %s", lw_ctrl_map_method_name (method), err.message);
  assert_true (mz->domain == LW_DOMAIN_Z && mz->period_s == T);
  return mz;
}

static void
test_tustin_integrator (void **state)
{
  (void) state;
  /* 1/s at T = 0.1 → 0.05 (z + 1)/(z − 1): the trapezoidal integrator T/2 (z+1)/(z−1);
   * scipy.signal.bilinear([1], [1, 0], fs=10) gives b = [0.05, 0.05], a = [1, −1].
   * 0.05 is 1/20 rounded once: 2 ulp. */
  LwModel *ms = parse_s ("1/s");
  LwModel *mz = map_ok (ms, LW_CTRL_MAP_TUSTIN, 0.1, 0.0);
  CHECK_REL (mz->gain, 0.05, 2 * EPS);
  assert_int_equal (mz->n_zeros, 1);
  assert_int_equal (mz->n_poles, 1);
  assert_true (mz->zeros[0] == -1.0 && mz->poles[0] == 1.0);
  lw_model_free (mz);
  lw_model_free (ms);
}

static void
test_tustin_prewarped_lowpass (void **state)
{
  (void) state;
  /* 1/(1 + s/ω0), ω0 = 2π·100 rad/s, T = 1 ms, prewarped at ω0.
   * Reference: scipy.signal.bilinear([1], [1/w0, 1], fs=K/2) with K = w0/tan(w0*T/2) (the
   * prewarped map s = K (z−1)/(z+1) is the plain bilinear map at fs = K/2), scipy 1.10.1:
   * b = [0.2452372752527856, 0.2452372752527856], a = [1, −0.5095254494944288].
   * Tolerance 1e-13 relative: both sides round tan and a few products differently (~10 ulp). */
  const double w0 = 2 * PI * 100, T = 1e-3;
  LwModel *ms = lw_model_new (LW_DOMAIN_S, 0.0, w0, 0, 1);   /* ω0 / (s + ω0) */
  ms->poles[0] = -w0;
  LwModel *mz = map_ok (ms, LW_CTRL_MAP_TUSTIN, T, w0);
  assert_int_equal (mz->n_zeros, 1);
  assert_int_equal (mz->n_poles, 1);
  double b[2], a[2];
  assert_int_equal (lw_model_to_poly (mz, b, a, NULL), LW_OK);
  /* ascending: b[0] + b[1] z over a[0] + a[1] z, i.e. descending [b1, b0] / [a1, a0] */
  assert_true (a[1] == 1.0);
  CHECK_REL (b[1], 0.2452372752527856, 1e-13);
  CHECK_REL (b[0], 0.2452372752527856, 1e-13);
  CHECK_REL (a[0], -0.5095254494944288, 1e-13);
  /* At 100 Hz the prewarped map reproduces H(jω0) = 1/(1 + j): −10·log10(2) = −3.0103 dB
   * and −45°.  The response is a ratio of few factors: 1e-12 dB and 1e-10° are ~100 ulp. */
  double complex h = lw_model_eval (mz, cexp (I * w0 * T));
  double db = 20 * log10 (cabs (h)), deg = carg (h) * 180 / PI;
  check_close (db, -10 * log10 (2.0), 1e-12, "|H| dB at 100 Hz", __LINE__);
  check_close (deg, -45.0, 1e-10 / 45, "phase at 100 Hz", __LINE__);
  check_close (db, -3.0103, 1e-4 / 3.0103, "|H| dB (4 decimals)", __LINE__);
  lw_model_free (mz);
  /* without prewarp the corner moves: |H| at 100 Hz differs from −3.0103 dB by more than
   * 0.01 dB (warping ν = (2/T) tan(ωT/2) is 3.3 % above ω at ωT = 0.2π) */
  mz = map_ok (ms, LW_CTRL_MAP_TUSTIN, T, 0.0);
  h = lw_model_eval (mz, cexp (I * w0 * T));
  assert_true (fabs (20 * log10 (cabs (h)) + 10 * log10 (2.0)) > 0.01);
  lw_model_free (mz);
  lw_model_free (ms);
}

static void
test_tustin_first_order_and_infinity (void **state)
{
  (void) state;
  /* 1/(s + 3), T = 0.1, K = 20: (z + 1)/(23 z − 17) = (1/23)(z + 1)/(z − 17/23)
   * (substitution by hand; scipy.signal.cont2discrete(([1], [1, 3]), 0.1, 'bilinear') gives
   * b = [0.04347826, 0.04347826], a = [1, −0.73913043]).  A few roundings: 4 ulp. */
  LwModel *ms = parse_s ("1/(s+3)");
  LwModel *mz = map_ok (ms, LW_CTRL_MAP_TUSTIN, 0.1, 0.0);
  CHECK_REL (mz->gain, 1.0 / 23, 4 * EPS);
  CHECK_REL (creal (mz->poles[0]), 17.0 / 23, 4 * EPS);
  assert_true (mz->zeros[0] == -1.0);
  lw_model_free (mz);
  lw_model_free (ms);
  /* (s − 20)/(s + 1) at T = 0.1: the zero sits at s = 2/T and goes to z = ∞:
   * (20(z−1) − 20(z+1)) / (20(z−1) + (z+1)) = −40/(21 z − 19) → gain −40/21, pole 19/21,
   * no zeros (by hand).  4 ulp. */
  ms = parse_s ("(s-20)/(s+1)");
  mz = map_ok (ms, LW_CTRL_MAP_TUSTIN, 0.1, 0.0);
  assert_int_equal (mz->n_zeros, 0);
  assert_int_equal (mz->n_poles, 1);
  CHECK_REL (mz->gain, -40.0 / 21, 4 * EPS);
  CHECK_REL (creal (mz->poles[0]), 19.0 / 21, 4 * EPS);
  lw_model_free (mz);
  lw_model_free (ms);
  /* improper PD s + 1: 21 (z − 19/21)/(z + 1), a pole at z = −1 (by hand) */
  ms = parse_s ("s+1");
  mz = map_ok (ms, LW_CTRL_MAP_TUSTIN, 0.1, 0.0);
  assert_int_equal (mz->n_poles, 1);
  assert_true (mz->poles[0] == -1.0);
  CHECK_REL (mz->gain, 21.0, 4 * EPS);
  CHECK_REL (creal (mz->zeros[0]), 19.0 / 21, 4 * EPS);
  lw_model_free (mz);
  lw_model_free (ms);
}

/* The maps are substitutions, so H_z(z0) = H_s(s(z0)) at any point: checked at a few points
 * for a model with an integrator, a real zero, complex zeros and poles.  Tolerance 1e-12
 * relative: each side is a product of about ten factors, each a few roundings. */
static void
test_substitution_identity (void **state)
{
  (void) state;
  LwModel *ms = parse_s ("3*(s+2)*(s^2+0.4*s+4)/(s*(s+10)*(s^2+2*s+50))");
  const double T = 0.02;
  const double complex pts[3] = { CMPLX (0.3, 0.4), CMPLX (-0.7, 0.1), CMPLX (1.5, -2.0) };
  const double wp = 12.0;
  const double Kp = wp / tan (wp * T / 2);
  struct { LwCtrlMapMethod m; double prewarp; } cases[] = {
    { LW_CTRL_MAP_TUSTIN, 0.0 }, { LW_CTRL_MAP_TUSTIN, wp },
    { LW_CTRL_MAP_FORWARD_EULER, 0.0 }, { LW_CTRL_MAP_BACKWARD_EULER, 0.0 },
  };
  for (size_t c = 0; c < sizeof cases / sizeof cases[0]; c++) {
    LwModel *mz = map_ok (ms, cases[c].m, T, cases[c].prewarp);
    for (int i = 0; i < 3; i++) {
      double complex z = pts[i], s;
      switch (cases[c].m) {
      case LW_CTRL_MAP_TUSTIN:
        s = (cases[c].prewarp > 0 ? Kp : 2 / T) * (z - 1) / (z + 1);
        break;
      case LW_CTRL_MAP_FORWARD_EULER:
        s = (z - 1) / T;
        break;
      default:
        s = (z - 1) / (T * z);
        break;
      }
      double complex want = lw_model_eval (ms, s), got = lw_model_eval (mz, z);
      if (!(cabs (got - want) <= 1e-12 * cabs (want)))
        fail_msg ("%s: H_z(%g%+gj) = %.17g%+.17gj, H_s(s(z)) = %.17g%+.17gj",
                  lw_ctrl_map_method_name (cases[c].m), creal (z), cimag (z), creal (got),
                  cimag (got), creal (want), cimag (want));
    }
    /* complex roots stay exact conjugate pairs */
    for (size_t k = 0; k < mz->n_poles; k++)
      if (cimag (mz->poles[k]) > 0)
        assert_true (mz->poles[k + 1] == conj (mz->poles[k]));
    lw_model_free (mz);
  }
  lw_model_free (ms);
}

static void
test_matched_first_order_lag (void **state)
{
  (void) state;
  /* a/(s + a), a = 5, T = 0.1: matched pole-zero (Franklin, Powell & Workman, Digital
   * Control of Dynamic Systems, 3rd ed., §6.3.2; from memory): pole e^{−aT}; the one zero at
   * infinity stays there (our LW_CTRL_MAP_MATCHED), DC gain 1 → (1 − e^{−aT})/(z − e^{−aT}).
   * LW_CTRL_MAP_MATCHED_BIPROPER puts it at z = −1: (1 − e^{−aT})/2 · (z + 1)/(z − e^{−aT}).
   * exp and expm1 are correctly rounded to within an ulp or so: 4 ulp. */
  const double a = 5.0, T = 0.1;
  LwModel *ms = parse_s ("5/(s+5)");
  LwModel *mz = map_ok (ms, LW_CTRL_MAP_MATCHED, T, 0.0);
  assert_int_equal (mz->n_zeros, 0);
  assert_int_equal (mz->n_poles, 1);
  CHECK_REL (creal (mz->poles[0]), exp (-a * T), 4 * EPS);
  CHECK_REL (mz->gain, 1 - exp (-a * T), 4 * EPS);
  /* DC gain; evaluating at z = 1 forms 1 − e^{−0.5} by subtraction: 1e-14 */
  CHECK_REL (creal (lw_model_eval (mz, 1.0)), 1.0, 1e-14);
  lw_model_free (mz);
  mz = map_ok (ms, LW_CTRL_MAP_MATCHED_BIPROPER, T, 0.0);
  assert_int_equal (mz->n_zeros, 1);
  assert_true (mz->zeros[0] == -1.0);
  CHECK_REL (mz->gain, (1 - exp (-a * T)) / 2, 4 * EPS);
  lw_model_free (mz);
  lw_model_free (ms);

  /* lag compensator (s + 1)/(s + 0.1), T = 0.1: zero e^{−0.1}, pole e^{−0.01}, DC gain 10
   * → gain 10 (1 − e^{−0.01})/(1 − e^{−0.1}) (same source). 8 ulp. */
  ms = parse_s ("(s+1)/(s+0.1)");
  mz = map_ok (ms, LW_CTRL_MAP_MATCHED, T, 0.0);
  assert_int_equal (mz->n_zeros, 1);
  assert_int_equal (mz->n_poles, 1);
  CHECK_REL (creal (mz->zeros[0]), exp (-0.1), 4 * EPS);
  CHECK_REL (creal (mz->poles[0]), exp (-0.01), 4 * EPS);
  CHECK_REL (mz->gain, 10 * expm1 (-0.01) / expm1 (-0.1), 8 * EPS);
  /* evaluating at z = 1 forms 1 − e^{−0.01} by subtraction and loses two digits: 1e-13 */
  CHECK_REL (creal (lw_model_eval (mz, 1.0)), 10.0, 1e-13);
  lw_model_free (mz);
  lw_model_free (ms);
}

static void
test_matched_integrator_and_pair (void **state)
{
  (void) state;
  /* PI (s + 2)/s, T = 0.1: zero e^{−0.2}, pole 1.  With an integrator the DC gain is
   * infinite; the low-frequency asymptotes are matched instead: 2/s ≈ k (1 − e^{−0.2})/(z−1)
   * with z − 1 ≈ sT, so k = 2T/(1 − e^{−0.2}) (derivation in lw-ctrl-map.h).  4 ulp. */
  const double T = 0.1;
  LwModel *ms = parse_s ("(s+2)/s");
  LwModel *mz = map_ok (ms, LW_CTRL_MAP_MATCHED, T, 0.0);
  assert_true (mz->poles[0] == 1.0);
  CHECK_REL (creal (mz->zeros[0]), exp (-0.2), 4 * EPS);
  CHECK_REL (mz->gain, 2 * T / -expm1 (-0.2), 4 * EPS);
  /* and the asymptote: |H_z(e^{jωT})| / |H_s(jω)| → 1 as ω → 0; at ω = 1e-4 rad/s the
   * ratio differs from 1 by O(ωT) = 1e-5 (first-order expansion), so 1e-4 is the bound. */
  double w = 1e-4;
  double ratio = cabs (lw_model_eval (mz, cexp (I * w * T))) / cabs (lw_model_eval (ms, I * w));
  check_close (ratio, 1.0, 1e-4, "low-frequency gain ratio", __LINE__);
  lw_model_free (mz);
  lw_model_free (ms);

  /* ω² / (s² + 2ζω s + ω²), ω = 10, ζ = 0.5, T = 0.01: poles e^{(−5 ± j√75) T}, DC gain 1;
   * the two zeros at infinity: one at z = −1 (LW_CTRL_MAP_MATCHED), one left at ∞.  4 ulp for the
   * roots (exp, cos, sin), 1e-14 for the DC gain (a ratio of a few such factors). */
  ms = parse_s ("100/(s^2+10*s+100)");
  mz = map_ok (ms, LW_CTRL_MAP_MATCHED, 0.01, 0.0);
  assert_int_equal (mz->n_zeros, 1);
  assert_true (mz->zeros[0] == -1.0);
  assert_int_equal (mz->n_poles, 2);
  double complex want = cexp (CMPLX (-5.0, sqrt (75.0)) * 0.01);
  CHECK_REL (creal (mz->poles[0]), creal (want), 4 * EPS);
  CHECK_REL (cimag (mz->poles[0]), cimag (want), 4 * EPS);
  assert_true (mz->poles[1] == conj (mz->poles[0]));
  CHECK_REL (creal (lw_model_eval (mz, 1.0)), 1.0, 1e-14);
  lw_model_free (mz);
  lw_model_free (ms);
}

static void
test_euler_one_pole (void **state)
{
  (void) state;
  /* 1/(s + 3), T = 0.1.  Forward Euler s = (z−1)/T: T/(z − (1 − 3T)) = 0.1/(z − 0.7);
   * scipy.signal.cont2discrete(([1], [1, 3]), 0.1, method='euler') gives b = [0, 0.1],
   * a = [1, −0.7].  Backward Euler s = (z−1)/(Tz): (T/(1 + 3T)) z/(z − 1/(1 + 3T));
   * method='backward_diff' gives b = [0.07692307692307687, 0], a = [1, −0.7692307692307692].
   * 4 ulp. */
  LwModel *ms = parse_s ("1/(s+3)");
  LwModel *mz = map_ok (ms, LW_CTRL_MAP_FORWARD_EULER, 0.1, 0.0);
  assert_int_equal (mz->n_zeros, 0);
  CHECK_REL (mz->gain, 0.1, 4 * EPS);
  CHECK_REL (creal (mz->poles[0]), 0.7, 4 * EPS);
  lw_model_free (mz);
  mz = map_ok (ms, LW_CTRL_MAP_BACKWARD_EULER, 0.1, 0.0);
  assert_int_equal (mz->n_zeros, 1);
  assert_true (mz->zeros[0] == 0.0);
  CHECK_REL (mz->gain, 0.07692307692307687, 4 * EPS);
  CHECK_REL (creal (mz->poles[0]), 0.7692307692307692, 4 * EPS);
  lw_model_free (mz);
  lw_model_free (ms);
  /* backward Euler of an improper PD 2 (s + 5) is causal: 2 (1.5 z − 1)/(0.1 z) →
   * gain 30, zero 1/1.5, pole 0 (by hand, T = 0.1). */
  ms = parse_s ("2*(s+5)");
  mz = map_ok (ms, LW_CTRL_MAP_BACKWARD_EULER, 0.1, 0.0);
  assert_int_equal (mz->n_poles, 1);
  assert_true (mz->poles[0] == 0.0);
  CHECK_REL (mz->gain, 30.0, 4 * EPS);
  CHECK_REL (creal (mz->zeros[0]), 1 / 1.5, 4 * EPS);
  lw_model_free (mz);
  lw_model_free (ms);
}

static void
test_errors (void **state)
{
  (void) state;
  LwModel *ms = parse_s ("1/(s+1)");
  LwModel *mz = NULL;
  LwError err;
  assert_int_equal (lw_ctrl_map (ms, LW_CTRL_MAP_TUSTIN, 0.0, 0.0, &mz, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "sample period"));
  assert_int_equal (lw_ctrl_map (ms, LW_CTRL_MAP_TUSTIN, NAN, 0.0, &mz, &err), LW_ERR_INVALID);
  /* prewarp at or above Nyquist π/T = 31.4 rad/s for T = 0.1 */
  assert_int_equal (lw_ctrl_map (ms, LW_CTRL_MAP_TUSTIN, 0.1, 40.0, &mz, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "Nyquist"));
  assert_int_equal (lw_ctrl_map (ms, LW_CTRL_MAP_TUSTIN, 0.1, -1.0, &mz, &err), LW_ERR_INVALID);
  assert_int_equal (lw_ctrl_map (ms, LW_CTRL_MAP_MATCHED, 0.1, 5.0, &mz, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "Tustin only"));
  assert_int_equal (lw_ctrl_map (ms, (LwCtrlMapMethod) 99, 0.1, 0.0, &mz, &err), LW_ERR_INVALID);
  assert_null (mz);
  lw_model_free (ms);
  ms = parse_s ("s+1");
  assert_int_equal (lw_ctrl_map (ms, LW_CTRL_MAP_MATCHED, 0.1, 0.0, &mz, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "improper"));
  assert_int_equal (lw_ctrl_map (ms, LW_CTRL_MAP_FORWARD_EULER, 0.1, 0.0, &mz, &err), LW_ERR_INVALID);
  lw_model_free (ms);
  ms = lw_model_new_constant (LW_DOMAIN_Z, 0.1, 1.0);
  assert_int_equal (lw_ctrl_map (ms, LW_CTRL_MAP_TUSTIN, 0.1, 0.0, &mz, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "must be in s"));
  lw_model_free (ms);
  assert_null (mz);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_tustin_integrator),
    cmocka_unit_test (test_tustin_prewarped_lowpass),
    cmocka_unit_test (test_tustin_first_order_and_infinity),
    cmocka_unit_test (test_substitution_identity),
    cmocka_unit_test (test_matched_first_order_lag),
    cmocka_unit_test (test_matched_integrator_and_pair),
    cmocka_unit_test (test_euler_one_pole),
    cmocka_unit_test (test_errors),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
