/* test-response — frequency responses of factored models and of the sampled plant.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <cmocka.h>

#include "lw-test.h"

#include <math.h>
#include <stdlib.h>

#include "lw-expr.h"
#include "lw-internal.h"
#include "lw-response.h"

/* 1/(s+1) at ω = 1 rad/s: |H| = 1/√2 → −10·log10(2) = −3.0103 dB, ∠H = −45° (closed form).
 * Tolerance 1e-13: a handful of roundings. */
static void
test_first_order (void **state)
{
  (void) state;
  LwModel *m = parse ("1/(s+1)", LW_DOMAIN_S, 0);
  double w = 1.0, db, ph;
  assert_int_equal (lw_model_freq_response (m, &w, 1, &db, &ph, NULL), LW_OK);
  assert_close (db, -10.0 * log10 (2.0), 1e-13, "dB");
  assert_close (ph, -45.0, 1e-13, "deg");
  lw_model_free (m);
}

/* Tustin integrator 0.05 (z+1)/(z−1), T = 0.1: H(e^{jωT}) = (T/2)·(−j)·cot(ωT/2) (closed form:
 * (e^{jθ}+1)/(e^{jθ}−1) = −j cot(θ/2)), so |H| = (T/2) cot(ωT/2) and ∠H = −90° on (0, π/T).
 * Tolerance 1e-12 dB and 1e-12°. */
static void
test_z_domain (void **state)
{
  (void) state;
  const double t = 0.1;
  LwModel *m = parse ("0.05*(z+1)/(z-1)", LW_DOMAIN_Z, t);
  double w[50], db[50], ph[50];
  assert_int_equal (lw_log_grid (0.01, 0.999 * LW_PI / t, 50, w, NULL), LW_OK);
  assert_int_equal (lw_model_freq_response (m, w, 50, db, ph, NULL), LW_OK);
  for (int i = 0; i < 50; i++)
    {
      assert_close (db[i], 20 * log10 (t / 2 / tan (w[i] * t / 2)), 1e-12, "dB");
      assert_close (ph[i], -90.0, 1e-12, "deg");
    }
  lw_model_free (m);
}

/* Phase continuity of a high-order model: the factor-sum phase equals an independent unwrap of
 * arg H (H from lw_model_eval) along a grid 50× denser, anchored at the same first value.
 * Tolerance 1e-9°. */
static void
test_continuity (void **state)
{
  (void) state;
  LwModel *m = parse ("-3*(s-4)*(s^2+0.2*s+100)/(s^2*(s^2+0.1*s+400)*(s+1)*(s^2+30*s+900))",
                    LW_DOMAIN_S, 0);
  enum { N = 400, D = 50 };
  double w[N], ph[N];
  assert_int_equal (lw_log_grid (0.01, 1000, N, w, NULL), LW_OK);
  assert_int_equal (lw_model_freq_response (m, w, N, NULL, ph, NULL), LW_OK);
  double prev = ph[0];
  for (int i = 1; i < N; i++)
    {
      for (int k = 1; k <= D; k++)
        {
          double x = w[i - 1] * pow (w[i] / w[i - 1], (double) k / D);
          double a = carg (lw_model_eval (m, I * x)) * 180 / LW_PI;
          prev = a - 360 * round ((a - prev) / 360);
        }
      assert_close (ph[i], prev, 1e-9, "unwrapped phase");
    }
  lw_model_free (m);
}

/* The same in z, where the principal angle of e^{jθ} − r wraps for complex roots: a controller with
 * complex zeros and poles inside and outside the unit circle (invented), against an independent
 * unwrap of arg H(e^{jθ}) along a 50× denser grid from the same first value. Tolerance 1e-9°. */
static void
test_continuity_z (void **state)
{
  (void) state;
  const double t = 0.002;
  LwModel *m = parse ("20*(z^2-1.835*z+0.9927)*(z+0.5)*(z^2-3*z+4)"
                    "/((z-0.8)*(z^2-1.651*z+0.7933)*(z^2+1.2*z+0.61)*(z-1))",
                    LW_DOMAIN_Z, t);
  enum { N = 400, D = 50 };
  double w[N], ph[N];
  assert_int_equal (lw_log_grid (0.1, LW_PI / t * 0.999, N, w, NULL), LW_OK);
  assert_int_equal (lw_model_freq_response (m, w, N, NULL, ph, NULL), LW_OK);
  double prev = ph[0];
  for (int i = 1; i < N; i++)
    {
      for (int k = 1; k <= D; k++)
        {
          double x = w[i - 1] * pow (w[i] / w[i - 1], (double) k / D);
          double a = carg (lw_model_eval (m, cexp (I * x * t))) * 180 / LW_PI;
          prev = a - 360 * round ((a - prev) / 360);
        }
      assert_close (ph[i], prev, 1e-9, "unwrapped phase in z");
    }
  lw_model_free (m);
}

/* The sampled plant's unwrapped phase against the factor-sum phase of its exact z-domain form:
 * ZOH of 1/(s(s+1)) at T = 1 s is (e⁻¹ z + 1 − 2e⁻¹)/((z − 1)(z − e⁻¹)) (Ogata, Discrete-Time
 * Control Systems; see test-sampled.c), with 2 whole samples of dead time added as z⁻². Tolerance
 * 1e-9 dB and 1e-9°. */
static void
test_sampled_plant (void **state)
{
  (void) state;
  const double t = 1.0, e1 = exp (-1.0);
  LwModel *p = parse ("1/(s*(s+1))", LW_DOMAIN_S, 0);
  LwSampledPlant *sp = NULL;
  assert_int_equal (lw_sampled_plant_new (p, 2.0, t, &sp, NULL), LW_OK);
  LwModel *exact = lw_model_new (LW_DOMAIN_Z, t, e1, 1, 4);
  exact->zeros[0] = -(1 - 2 * e1) / e1;
  exact->poles[0] = 1.0;
  exact->poles[1] = e1;
  exact->poles[2] = 0.0;
  exact->poles[3] = 0.0;
  enum { N = 300 };
  double w[N], db[N], ph[N], db2[N], ph2[N];
  assert_int_equal (lw_log_grid (1e-3, LW_PI / t, N, w, NULL), LW_OK);
  assert_int_equal (lw_sampled_plant_freq_response (sp, w, N, db, ph, NULL), LW_OK);
  assert_int_equal (lw_model_freq_response (exact, w, N, db2, ph2, NULL), LW_OK);
  for (int i = 0; i < N; i++)
    {
      assert_close (db[i], db2[i], 1e-9, "dB");
      assert_close (ph[i], ph2[i], 1e-9, "deg");
    }
  double bad = 4.0;
  LwError err;
  assert_int_equal (lw_sampled_plant_freq_response (sp, &bad, 1, db, ph, &err), LW_ERR_INVALID);
  lw_model_free (exact);
  lw_sampled_plant_free (sp);
  lw_model_free (p);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_first_order),
    cmocka_unit_test (test_z_domain),
    cmocka_unit_test (test_continuity),
    cmocka_unit_test (test_continuity_z),
    cmocka_unit_test (test_sampled_plant),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
