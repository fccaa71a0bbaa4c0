/* test-measured-nyquist — closed-loop stability from measured data by the Nyquist criterion
 * (lw-measured-nyquist.c), on loops whose closed-loop poles are known in closed form:
 *
 *  - L = K·T/(z − 1): closed-loop pole 1 − K·T, stable iff 0 < K·T < 2;
 *  - L = K·T/(z(z − 1)) (a computation delay): z² − z + K·T, stable iff 0 < K·T < 1;
 *  - L = K/(z − a), a > 1 (P = 1): closed-loop pole a − K, stable iff a − 1 < K < a + 1;
 *  - L = K(z − b)/(z − 1)²: z² + (K − 2)z + (1 − K·b).
 *
 * For the second-order polynomials z² + a1·z + a0 the Jury conditions say stable iff
 * |a0| < 1, 1 + a1 + a0 > 0 and 1 − a1 + a0 > 0 (Franklin, Powell & Workman, "Digital
 * Control of Dynamic Systems", the Jury test; quoted from memory) and Z (the closed-loop poles
 * outside the unit circle) comes from the quadratic formula. The data are each loop at 50
 * points per decade with π/T as the last point, gains on both sides of each stability
 * boundary (5 % away, or ±0.05 about a boundary at 0). The verdicts are whole numbers: no
 * tolerance.
 *
 * Then a higher-order loop (the belt axis of test-measured.c: integrator, lag, resonance, dead
 * time, computation delay) swept through its stability boundary, against the closed-loop
 * poles of the model that made the data (lw_evaluate; checked against scipy in
 * tests/reference), and data that stop short at either end, whose verdict must be undecided
 * with the flag of that end.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <cmocka.h>

#include "lw-test.h"

#include <complex.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "lw-analysis.h"
#include "lw-measured.h"

#define PI 3.14159265358979323846
#define T 0.01
#define CAP 1000

typedef double complex (*LoopFn) (double complex z, const double *par);

/* ω at 50 points per decade from lo (rad/s) up to below hi, then hi itself when at_end */
static size_t
grid (double lo, double hi, bool at_end, double *w)
{
  size_t n = 0;
  for (double x = log10 (lo); n + 1 < CAP; x += 1.0 / 50)
    {
      double v = pow (10.0, x);
      if (v >= hi * (1 - 1e-9))
        break;
      w[n++] = v;
    }
  if (at_end)
    w[n++] = hi;
  return n;
}

static LwMeasuredStability
judge (LoopFn f, const double *par, double lo, double hi, bool at_end, const double *coh,
       int p_given)
{
  static double w[CAP];
  static double complex l[CAP];
  size_t n = grid (lo, hi, at_end, w);
  for (size_t i = 0; i < n; i++)
    l[i] = f (cexp (I * w[i] * T), par);
  LwMeasuredStability st;
  LwError err;
  if (lw_measured_nyquist (w, l, coh, n, T, p_given, &st, &err) != LW_OK)
    fail_msg ("nyquist: %s", err.message);
  return st;
}

/* the whole band, 1e-3/T (where a type-k loop is on its asymptote) up to π/T */
static LwMeasuredStability
judge_all (LoopFn f, const double *par, int p_given)
{
  return judge (f, par, 1e-3 / T, PI / T, true, NULL, p_given);
}

static void
expect (const LwMeasuredStability *st, int z, const char *what, double k)
{
  print_message ("%-28s K = %-8.4g %-9s N = %d, Z = %d (want %d)  %s\n", what, k,
                 lw_measured_verdict_name (st->verdict), st->encirclements,
                 st->closed_loop_unstable, z, st->note);
  if (st->verdict == LW_MEASURED_UNDECIDED)
    fail_msg ("%s, K = %g: undecided (%s)", what, k, st->note);
  assert_int_equal (st->closed_loop_unstable, z);
  assert_int_equal (st->verdict, z == 0 ? LW_MEASURED_STABLE : LW_MEASURED_UNSTABLE);
}

/* the roots of z² + a1·z + a0 outside the unit circle, and the Jury test's verdict */
static int
quadratic_unstable (double a1, double a0, bool *jury_stable)
{
  *jury_stable = fabs (a0) < 1 && 1 + a1 + a0 > 0 && 1 - a1 + a0 > 0;
  double disc = a1 * a1 - 4 * a0;
  double complex r = csqrt ((double complex) disc);
  double complex z1 = (-a1 + r) / 2, z2 = (-a1 - r) / 2;
  return (cabs (z1) > 1) + (cabs (z2) > 1);
}

static double complex
first_order (double complex z, const double *par)
{
  return par[0] * T / (z - 1);
}

static double complex
first_order_delayed (double complex z, const double *par)
{
  return par[0] * T / (z * (z - 1));
}

static double complex
unstable_plant (double complex z, const double *par)
{
  return par[0] / (z - par[1]);
}

static double complex
type_two (double complex z, const double *par)
{
  return par[0] * (z - par[1]) / ((z - 1) * (z - 1));
}

static void
test_first_order (void **state)
{
  (void) state;
  /* boundaries K·T = 0 and 2; closed-loop pole 1 − K·T */
  const double kt[] = { -0.05, 0.05, 1.0, 1.9, 2.1, 3.0 };
  for (size_t i = 0; i < sizeof kt / sizeof *kt; i++)
    {
      double par[1] = { kt[i] / T };
      LwMeasuredStability st = judge_all (first_order, par, 0);
      expect (&st, fabs (1 - kt[i]) > 1, "K T/(z - 1)", kt[i] / T);
      assert_int_equal (st.loop_type, 1);
      assert_true (st.high_end_at_nyquist);
    }
  /* with one sample of delay: z² − z + K·T, boundaries 0 and 1 */
  const double kd[] = { -0.05, 0.05, 0.95, 1.05, 1.5 };
  for (size_t i = 0; i < sizeof kd / sizeof *kd; i++)
    {
      bool jury;
      int z = quadratic_unstable (-1.0, kd[i], &jury);
      assert_true (jury == (z == 0));
      double par[1] = { kd[i] / T };
      LwMeasuredStability st = judge_all (first_order_delayed, par, 0);
      expect (&st, z, "K T/(z(z - 1))", kd[i] / T);
    }
}

static void
test_open_loop_unstable (void **state)
{
  (void) state;
  /* a = 1.2, P = 1: closed-loop pole a − K, stable iff 0.2 < K < 2.2. The boundary at 0.2
   * is L(1) = −1, at the low end: K = 0.08 keeps |L| = K/(a − 1) = 0.4 there (type 0, small),
   * while 0.19 and 0.21 put |L| ≈ 1 at the lowest point, which the data cannot extend:
   * undecided, flagged at the low end. */
  const double ks[] = { 0.08, 0.5, 1.0, 2.09, 2.31, 3.0 };
  for (size_t i = 0; i < sizeof ks / sizeof *ks; i++)
    {
      double par[2] = { ks[i], 1.2 };
      LwMeasuredStability st = judge_all (unstable_plant, par, 1);
      expect (&st, fabs (1.2 - ks[i]) > 1, "K/(z - 1.2), P = 1", ks[i]);
      assert_int_equal (st.loop_type, 0);
    }
  for (double k = 0.19; k < 0.22; k += 0.02)
    {
      double par[2] = { k, 1.2 };
      LwMeasuredStability st = judge_all (unstable_plant, par, 1);
      assert_int_equal (st.verdict, LW_MEASURED_UNDECIDED);
      assert_int_equal (st.undecided, LW_NYQUIST_LOW_END);
    }
  /* P = 0 given for the stable loop K = 1: N = 1 encirclement, Z would be −1 */
  double par[2] = { 1.0, 1.2 };
  LwMeasuredStability st = judge_all (unstable_plant, par, 0);
  assert_int_equal (st.verdict, LW_MEASURED_UNDECIDED);
  assert_int_equal (st.undecided, LW_NYQUIST_POLE_COUNT);
  print_message ("P = 0 given: %s\n", st.note);
  /* P = 2 given: one more than there is, Z comes out 1 — the data cannot tell P */
  st = judge_all (unstable_plant, par, 2);
  assert_int_equal (st.closed_loop_unstable, 1);
}

static void
test_type_two (void **state)
{
  (void) state;
  /* K(z − b)/(z − 1)²: z² + (K − 2)z + (1 − K·b); for 0 < b < 1 Jury gives
   * 0 < K < 4/(1 + b) */
  const double bs[] = { 0.5, 0.9 };
  for (size_t j = 0; j < 2; j++)
    {
      double b = bs[j], top = 4 / (1 + b);
      const double ks[] = { -0.05, 0.05, 0.5 * top, 0.95 * top, 1.05 * top, 2 * top };
      for (size_t i = 0; i < sizeof ks / sizeof *ks; i++)
        {
          bool jury;
          int z = quadratic_unstable (ks[i] - 2, 1 - ks[i] * b, &jury);
          assert_true (jury == (z == 0));
          assert_true (jury == (ks[i] > 0 && ks[i] < top));
          double par[2] = { ks[i], b };
          LwMeasuredStability st = judge_all (type_two, par, 0);
          expect (&st, z, b == 0.5 ? "K(z - 0.5)/(z - 1)^2" : "K(z - 0.9)/(z - 1)^2", ks[i]);
          assert_int_equal (st.loop_type, 2);
        }
    }
}

/* data that stop short: the end that decides is flagged, the verdict undecided */
static void
test_data_short (void **state)
{
  (void) state;
  double par[1] = { 1.0 / T };   /* K·T = 1, stable */
  /* from ω·T = 0.8 up: |L| = K·T/|e^{jωT} − 1| ≈ 1.3 at the lowest point */
  LwMeasuredStability st = judge (first_order, par, 0.8 / T, PI / T, true, NULL, 0);
  assert_int_equal (st.verdict, LW_MEASURED_UNDECIDED);
  assert_int_equal (st.undecided, LW_NYQUIST_LOW_END);
  print_message ("low end short: %s\n", st.note);
  /* up to π/(2T): |L| = 1/√2 > 0.5 at the last point */
  st = judge (first_order, par, 1e-3 / T, PI / (2 * T), false, NULL, 0);
  assert_int_equal (st.verdict, LW_MEASURED_UNDECIDED);
  assert_int_equal (st.undecided, LW_NYQUIST_HIGH_END);
  print_message ("high end short: %s\n", st.note);
  /* the same with K·T = 0.5: |L| = 0.35 there, 6 dB to spare, |L| < 1 assumed above */
  par[0] = 0.5 / T;
  st = judge (first_order, par, 1e-3 / T, PI / (2 * T), false, NULL, 0);
  expect (&st, 0, "K T/(z - 1) to pi/(2T)", par[0]);
  assert_false (st.high_end_at_nyquist);
  /* both ends short */
  par[0] = 1.0 / T;
  st = judge (first_order, par, 0.8 / T, PI / (2 * T), false, NULL, 0);
  assert_int_equal (st.undecided, LW_NYQUIST_LOW_END | LW_NYQUIST_HIGH_END);
  /* type 2 measured from ω·T = 1 (|L| = 1.04 with K = 2, b = 0.5): undecided at the low end */
  double p2[2] = { 2.0, 0.5 };
  st = judge (type_two, p2, 1.0 / T, PI / T, true, NULL, 0);
  assert_int_equal (st.undecided, LW_NYQUIST_LOW_END);
}

/* at π/T the loop is real: data that are not are refused as a high end; a point within its
 * noise of −1 leaves the count undecided */
static void
test_not_real_and_noise (void **state)
{
  (void) state;
  static double w[CAP];
  static double complex l[CAP];
  static double coh[CAP];
  size_t n = grid (1e-3 / T, PI / T, true, w);
  for (size_t i = 0; i < n; i++)
    {
      l[i] = 2.1 / (cexp (I * w[i] * T) - 1);   /* K·T = 2.1: L(π/T) = −1.05 */
      coh[i] = 1.0;
    }
  l[n - 1] *= cexp (I * 0.5);                   /* 29° off the real axis at π/T */
  LwMeasuredStability st;
  LwError err;
  assert_int_equal (lw_measured_nyquist (w, l, NULL, n, T, 0, &st, &err), LW_OK);
  assert_int_equal (st.undecided, LW_NYQUIST_NOT_REAL);
  l[n - 1] *= cexp (-I * 0.5);
  assert_int_equal (lw_measured_nyquist (w, l, coh, n, T, 0, &st, &err), LW_OK);
  assert_int_equal (st.verdict, LW_MEASURED_UNSTABLE);
  /* coherence 0.99 at π/T: σ = √(0.01/(0.99·8)) = 0.036, the noise reaches 3·√2·σ·|L| = 0.16
   * from L, beyond −1 (0.05 away) */
  coh[n - 1] = 0.99;
  assert_int_equal (lw_measured_nyquist (w, l, coh, n, T, 0, &st, &err), LW_OK);
  assert_int_equal (st.undecided, LW_NYQUIST_NEAR_MINUS_ONE);
  print_message ("within noise: %s\n", st.note);
  /* refusals: P out of range, a point above π/T */
  assert_int_equal (lw_measured_nyquist (w, l, NULL, n, T, -1, &st, &err), LW_ERR_INVALID);
  assert_int_equal (lw_measured_nyquist (w, l, NULL, n, T, 1001, &st, &err), LW_ERR_INVALID);
  w[n - 1] = 1.01 * PI / T;
  assert_int_equal (lw_measured_nyquist (w, l, NULL, n, T, 0, &st, &err), LW_ERR_INVALID);
}

/* Noise near the boundary: K·T/(z − 1) with K·T = 1.8, 1.9, 2.1, 2.2 (L(π/T) = −K·T/2, 0.05
 * to 0.1 from −1) times e^{u + jv}, u, v normal with deviation s (truncated at 3 s), the
 * coherence whose random error is s (lw-measured.h), 20 seeds each: the verdict is the true
 * one or undecided — never the wrong one; at s = 0.005 (noise 0.02 at most, below the
 * distance from −1) always decided, at s = 0.05 (up to 0.2) undecided where −1 is within the
 * noise. */
static void
test_noise_never_wrong (void **state)
{
  (void) state;
  static double w[CAP], coh[CAP];
  static double complex l[CAP];
  size_t n = grid (1e-3 / T, PI / T, true, w);
  const double kts[] = { 1.8, 1.9, 2.1, 2.2 }, levels[] = { 0.005, 0.02, 0.05 };
  for (size_t j = 0; j < 3; j++)
    {
      double s = levels[j];
      double gamma2 = 1.0 / (1.0 + 2.0 * LW_MEASURED_NOISE_AVERAGES * s * s);
      size_t decided = 0, undecided = 0;
      for (size_t i = 0; i < 4; i++)
        for (uint64_t seed = 1; seed <= 20; seed++)
          {
            uint64_t st = 0x9E3779B97F4A7C15ull * (seed + 100 * i + 1000 * j);
            for (size_t k = 0; k < n; k++)
              {
                double u = s * normal_truncated (&st, LW_MEASURED_NOISE_SIGMAS);
                double v = s * normal_truncated (&st, LW_MEASURED_NOISE_SIGMAS);
                l[k] = kts[i] / (cexp (I * w[k] * T) - 1) * cexp (u + I * v);
                coh[k] = gamma2;
              }
            LwMeasuredStability r;
            LwError err;
            assert_int_equal (lw_measured_nyquist (w, l, coh, n, T, 0, &r, &err), LW_OK);
            if (r.verdict == LW_MEASURED_UNDECIDED)
              {
                assert_int_equal (r.undecided, LW_NYQUIST_NEAR_MINUS_ONE);
                undecided++;
                continue;
              }
            assert_int_equal (r.closed_loop_unstable, kts[i] > 2);
            decided++;
          }
      print_message ("noise s = %g near |K T| = 2: %zu decided (all right), %zu undecided\n", s,
                     decided, undecided);
      if (j == 0)
        assert_int_equal (undecided, 0);
      if (j == 2)
        assert_true (undecided > 0);
    }
}

/* The belt axis (test-measured.c): 180·40000/(s(s + 12)(s² + 40s + 40000)), T = 2 ms, 1.3
 * samples of dead time, one sample of computation delay, controller gain g·(1 + w/15)/(1 +
 * w/110); the data are the ZOH plant's exact response at 50 points per decade up to π/T,
 * closed by lw_measured_loop_close; the verdict against the model's closed-loop poles. */
static void
test_belt_axis_against_model (void **state)
{
  (void) state;
  const double t = 0.002;
  LwModel *plant = parse ("180*40000/(s*(s+12)*(s^2+40*s+40000))", LW_DOMAIN_S, 0);
  LwSampledPlant *sp = NULL;
  LwError err;
  if (lw_sampled_plant_new (plant, 0.0026, t, &sp, &err) != LW_OK)
    fail_msg ("discretize: %s", err.message);
  static double w[4000];
  static double complex p[4000];
  size_t n = 0;
  for (double x = -1; n + 1 < 4000; x += 1.0 / 50)
    {
      if (pow (10.0, x) >= PI / t)
        break;
      w[n++] = pow (10.0, x);
    }
  w[n++] = PI / t;
  for (size_t i = 0; i < n; i++)
    p[i] = lw_sampled_plant_response (sp, w[i]);
  LwMeasured m = { n, w, p, NULL };
  size_t seen_stable = 0, seen_unstable = 0;
  const double gains[] = { 0.3, 1.0, 3.4, 8.0, 12.0, 20.0, 40.0 };
  for (size_t g = 0; g < sizeof gains / sizeof *gains; g++)
    {
      char text[96];
      snprintf (text, sizeof text, "%.17g*(1+w/15)/(1+w/110)", gains[g]);
      LwModel *cw = parse (text, LW_DOMAIN_W, t);
      LwModel *cz = lw_model_w_to_z (cw);
      LwAnalysisOptions o;
      lw_analysis_options_init (&o);
      o.compute_delay = 1;
      LwEvaluation *ev = NULL;
      if (lw_evaluate (sp, cz, &o, &ev, &err) != LW_OK)
        fail_msg ("evaluate: %s", err.message);
      LwMeasuredLoop ml;
      assert_int_equal (lw_measured_loop_close (&m, LW_MEASURED_SAMPLED, t, 0.0, 1, cz, NULL, 0,
                                                &ml, &err), LW_OK);
      expect (&ml.stability, (int) ev->n_closed_loop_unstable, "belt axis, gain", gains[g]);
      seen_stable += ev->n_closed_loop_unstable == 0;
      seen_unstable += ev->n_closed_loop_unstable > 0;
      lw_measured_loop_clear (&ml);
      lw_evaluation_free (ev);
      lw_model_free (cz);
      lw_model_free (cw);
    }
  assert_true (seen_stable > 0 && seen_unstable > 0);   /* the sweep crosses the boundary */
  /* an unstable controller pole with P = 0 given: the count does not fit */
  LwModel *cz = parse ("0.5*(z-0.9)/(z-1.2)", LW_DOMAIN_Z, t);
  LwMeasuredLoop ml;
  assert_int_equal (lw_measured_loop_close (&m, LW_MEASURED_SAMPLED, t, 0.0, 1, cz, NULL, 0, &ml,
                                            &err), LW_OK);
  assert_int_equal (ml.stability.verdict, LW_MEASURED_UNDECIDED);
  assert_true (ml.stability.undecided & LW_NYQUIST_POLE_COUNT);
  lw_measured_loop_clear (&ml);
  assert_int_equal (lw_measured_loop_close (&m, LW_MEASURED_SAMPLED, t, 0.0, 1, cz, NULL, 1001,
                                            &ml, &err), LW_ERR_INVALID);
  lw_model_free (cz);
  lw_sampled_plant_free (sp);
  lw_model_free (plant);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_first_order),
    cmocka_unit_test (test_open_loop_unstable),
    cmocka_unit_test (test_type_two),
    cmocka_unit_test (test_data_short),
    cmocka_unit_test (test_not_real_and_noise),
    cmocka_unit_test (test_noise_never_wrong),
    cmocka_unit_test (test_belt_axis_against_model),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
