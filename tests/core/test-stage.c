/* test-stage — compensator stages: definitions, lead formulas, corners, the compensator.
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
#include <string.h>

#include "lw-analysis.h"
#include "lw-expr.h"
#include "lw-stage.h"

#define PI_ 3.14159265358979323846
#define DEG (180.0 / PI_)
#define T_ 0.001

static LwModel *
model_of (const LwStage *s)
{
  LwModel *m = NULL;
  LwError err;
  if (lw_stage_to_model (s, T_, &m, &err) != LW_OK)
    fail_msg ("stage to model: %s", err.message);
  return m;
}

static double complex
stage_at (const LwStage *s, double nu)
{
  LwModel *m = model_of (s);
  double complex v = lw_model_eval (m, I * nu);
  lw_model_free (m);
  return v;
}

/* Lead maximum phase φ = asin((α−1)/(α+1)) at √(z·p), gain there 10·log10(α) dB:
 * α = 4 → 36.87°, α = 10 → 54.90° (Ogata, Modern Control Engineering). The book gives two
 * decimals: tolerance 0.005°. The stage's own response must agree with the formula to 1e-12
 * (rounding in a few complex products). */
static void
test_lead_formulas (void **state)
{
  (void) state;
  const double alpha[] = { 4.0, 10.0 }, book[] = { 36.87, 54.90 };
  for (int k = 0; k < 2; k++)
    {
      LwStage s = lw_stage_lead (3.0, 3.0 * alpha[k]);
      double phi = lw_stage_leadlag_max_phase_deg (&s);
      assert_close (phi, book[k], 0.005, "book max phase");
      assert_close (phi, asin ((alpha[k] - 1) / (alpha[k] + 1)) * DEG, 1e-12, "formula");
      double nm = lw_stage_leadlag_centre_rad_s (&s);
      assert_close (nm, 3.0 * sqrt (alpha[k]), 1e-12 * nm, "centre");
      double complex v = stage_at (&s, nm);
      assert_close (carg (v) * DEG, phi, 1e-12, "phase at the centre");
      assert_close (20 * log10 (cabs (v)), 10 * log10 (alpha[k]), 1e-12, "gain at the centre");
      /* a maximum: 1 % either side has less phase */
      assert_true (carg (stage_at (&s, nm * 1.01)) * DEG < phi);
      assert_true (carg (stage_at (&s, nm / 1.01)) * DEG < phi);
      /* DC gain 1 (normalization), high-frequency gain α; 1e-12 relative */
      assert_close (creal (stage_at (&s, 0.0)), 1.0, 1e-15, "DC gain");
      assert_close (cabs (stage_at (&s, 1e9)), alpha[k], 1e-6 * alpha[k], "HF gain");
    }
  /* centred constructors invert the helpers (1e-12: a sqrt and an asin) */
  LwStage c = lw_stage_lead_centred (25.0, 40.0);
  assert_close (lw_stage_leadlag_centre_rad_s (&c), 25.0, 1e-12 * 25, "lead centre");
  assert_close (lw_stage_leadlag_max_phase_deg (&c), 40.0, 1e-12, "lead phase");
  LwStage g = lw_stage_lag_centred (2.0, 30.0);
  assert_int_equal (lw_stage_check (&g, NULL), LW_OK);
  assert_close (lw_stage_leadlag_max_phase_deg (&g), -30.0, 1e-12, "lag phase");
  assert_close (carg (stage_at (&g, 2.0)) * DEG, -30.0, 1e-12, "lag phase at centre");
}

/* Every kind against its defining formula (lw-stage.h), evaluated here independently with
 * complex arithmetic at a few frequencies; 1e-12 relative (rounding). */
static void
test_definitions (void **state)
{
  (void) state;
  const double nus[] = { 0.3, 2.0, 17.0, 400.0 };
  for (size_t i = 0; i < 4; i++)
    {
      double nu = nus[i];
      double complex w = I * nu, want, got;
      LwStage s;

      s = lw_stage_gain_db (-6.0);
      want = pow (10.0, -6.0 / 20.0);
      got = stage_at (&s, nu);
      assert_close (cabs (got - want), 0, 1e-12 * cabs (want), "gain dB");

      s = lw_stage_integrator (2);
      want = 1.0 / (w * w);
      got = stage_at (&s, nu);
      assert_close (cabs (got - want), 0, 1e-12 * cabs (want), "integrator");

      s = lw_stage_real_zero (5.0);
      want = 1.0 + w / 5.0;
      got = stage_at (&s, nu);
      assert_close (cabs (got - want), 0, 1e-12 * cabs (want), "real zero");

      s = lw_stage_real_pole (5.0);
      want = 1.0 / (1.0 + w / 5.0);
      got = stage_at (&s, nu);
      assert_close (cabs (got - want), 0, 1e-12 * cabs (want), "real pole");

      s = lw_stage_pi (2.5, 1.5);
      want = 2.5 * (1.0 + 1.5 / w);
      got = stage_at (&s, nu);
      assert_close (cabs (got - want), 0, 1e-12 * cabs (want), "PI");

      s = lw_stage_pid (1.8, 0.7, 0.05, 8.0);
      want = 1.8 * (1.0 + 1.0 / (0.7 * w) + 0.05 * w / (1.0 + 0.05 * w / 8.0));
      got = stage_at (&s, nu);
      assert_close (cabs (got - want), 0, 1e-12 * cabs (want), "PID");

      s = lw_stage_pid (1.8, 0.7, 0.0, 8.0);
      want = 1.8 * (1.0 + 1.0 / (0.7 * w));
      got = stage_at (&s, nu);
      assert_close (cabs (got - want), 0, 1e-12 * cabs (want), "PID without D");

      /* ν0 = 10, depth 20 dB, width 4 → ζp = 0.2, ζz = 0.02 */
      s = lw_stage_notch (10.0, 20.0, 4.0);
      want = (w * w + 2 * 0.02 * 10 * w + 100) / (w * w + 2 * 0.2 * 10 * w + 100);
      got = stage_at (&s, nu);
      assert_close (cabs (got - want), 0, 1e-12 * cabs (want), "notch");

      s = lw_stage_zero_pair (8.0, 0.3);
      want = (w * w + 2 * 0.3 * 8 * w + 64) / 64;
      got = stage_at (&s, nu);
      assert_close (cabs (got - want), 0, 1e-12 * cabs (want), "zero pair");

      s = lw_stage_pole_pair (8.0, 1.7);   /* overdamped: two real poles */
      want = 64 / (w * w + 2 * 1.7 * 8 * w + 64);
      got = stage_at (&s, nu);
      assert_close (cabs (got - want), 0, 1e-12 * cabs (want), "pole pair, real roots");
    }
  /* notch: the depth at the centre, and for a very deep notch (ζz → 0) the −3 dB points are
   * exactly 2ζp·ν0 apart: ν1,2 = √(ν0² + (ζp ν0)²) ∓ ζp ν0 (roots of ν² ± 2ζp ν0 ν − ν0²) */
  LwStage n = lw_stage_notch (10.0, 20.0, 4.0);
  assert_close (20 * log10 (cabs (stage_at (&n, 10.0))), -20.0, 1e-12, "notch depth");
  LwStage d = lw_stage_notch (10.0, 240.0, 4.0);
  double zp = 0.2, r = sqrt (100 + (zp * 10) * (zp * 10));
  assert_close (cabs (stage_at (&d, r - zp * 10)), sqrt (0.5), 1e-9, "notch -3 dB, low side");
  assert_close (cabs (stage_at (&d, r + zp * 10)), sqrt (0.5), 1e-9, "notch -3 dB, high side");
  assert_close ((r + zp * 10) - (r - zp * 10), 4.0, 1e-12, "notch width");
}

/* Resonant stage (lw-stage.h): ν0 = 12, peak 20 dB (G = 10), width 4 → ζz = 4/24 = 1/6,
 * ζp = 1/60, i.e. C = (w² + 4w + 144)/(w² + 0.4w + 144).  Closed forms derived from the
 * definition: with x = (ν0² − ν²)/(ν0·ν), |C|² = (x² + 4ζz²)/(x² + 4ζp²), so |C(jν0)| = ζz/ζp
 * = G and |C| = √2 (3 dB above unity) at x² = 4(ζz² − 2ζp²), two points with ν1·ν2 = ν0² and
 * ν2 − ν1 = 2ν0·√(ζz² − 2ζp²) → 2ζz·ν0 = width as G → ∞.  Tolerances 1e-12 (rounding in a few
 * complex products); 1e-9 for the 240 dB peak, whose closed-form points hold in the limit
 * (the finite peak moves |C| there by ~1e-24) and whose poles lie 4e-12 from the axis. */
static void
test_resonant (void **state)
{
  (void) state;
  const double nus[] = { 0.3, 2.0, 11.9, 12.0, 17.0, 400.0 };
  LwStage s = lw_stage_resonant (12.0, 20.0, 4.0);
  assert_int_equal (lw_stage_check (&s, NULL), LW_OK);
  for (size_t i = 0; i < 6; i++)
    {
      double complex w = I * nus[i];
      double complex want = (w * w + 4.0 * w + 144.0) / (w * w + 0.4 * w + 144.0);
      double complex got = stage_at (&s, nus[i]);
      assert_close (cabs (got - want), 0, 1e-12 * cabs (want), "resonant definition");
    }
  assert_close (20 * log10 (cabs (stage_at (&s, 12.0))), 20.0, 1e-12, "peak at the centre");
  assert_close (carg (stage_at (&s, 12.0)), 0.0, 1e-12, "no phase at the centre");
  assert_close (creal (stage_at (&s, 0.0)), 1.0, 1e-15, "unit gain at DC");
  assert_close (cabs (stage_at (&s, 1e9)), 1.0, 1e-9, "unit gain at high frequency");
  /* geometric symmetry about ν0: |C(jν)| = |C(jν0²/ν)| */
  assert_close (cabs (stage_at (&s, 9.0)), cabs (stage_at (&s, 16.0)), 1e-12, "symmetry");

  /* the points 3 dB above unity for the finite peak */
  const double zz = 1.0 / 6.0, zp = 1.0 / 60.0, nu0 = 12.0;
  double half = nu0 * sqrt (zz * zz - 2.0 * zp * zp), mid = sqrt (nu0 * nu0 + half * half);
  assert_close (cabs (stage_at (&s, mid - half)), sqrt (2.0), 1e-12, "+3 dB, low side");
  assert_close (cabs (stage_at (&s, mid + half)), sqrt (2.0), 1e-12, "+3 dB, high side");
  /* a very high peak: the +3 dB points are `width` apart, ν1,2 = √(ν0² + (ζz ν0)²) ∓ ζz ν0 */
  LwStage h = lw_stage_resonant (12.0, 240.0, 4.0);
  double r = sqrt (144.0 + 4.0);
  assert_close (cabs (stage_at (&h, r - 2.0)), sqrt (2.0), 1e-9, "high peak +3 dB, low side");
  assert_close (cabs (stage_at (&h, r + 2.0)), sqrt (2.0), 1e-9, "high peak +3 dB, high side");

  /* the counterpart of the notch: with the same centre, dB figure and width it is exactly
   * the notch's inverse (its zeros are the notch's poles and the other way round) */
  LwStage n = lw_stage_notch (12.0, 20.0, 4.0);
  for (size_t i = 0; i < 6; i++)
    assert_close (cabs (stage_at (&s, nus[i]) * stage_at (&n, nus[i]) - 1.0), 0, 1e-12,
                  "resonant · notch = 1");

  /* refused: each parameter's rule, and a pole damping that underflows */
  LwError err;
  LwStage bad = lw_stage_resonant (12.0, -3.0, 4.0);
  assert_int_equal (lw_stage_check (&bad, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "resonant peak"));
  bad = lw_stage_resonant (12.0, 20.0, 0.0);
  assert_int_equal (lw_stage_check (&bad, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "resonant width"));
  bad = lw_stage_resonant (12.0, 1e4, 4.0);
  assert_int_equal (lw_stage_check (&bad, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "pole damping"));

  /* one handle at ν0; keep_ratio keeps the damping, otherwise the width in rad/s */
  double nu;
  LwHandleKind k;
  assert_int_equal (lw_stage_corner_count (&s), 1);
  assert_int_equal (lw_stage_corner_get (&s, 0, &nu, &k, NULL), LW_OK);
  assert_true (nu == 12.0 && k == LW_HANDLE_PEAK);
  assert_int_equal (lw_stage_corner_set (&s, 0, 24.0, true, NULL), LW_OK);
  assert_close (s.p.resonant.width_rad_s, 8.0, 1e-12 * 8, "relative width kept");
  assert_int_equal (lw_stage_corner_set (&s, 0, 6.0, false, NULL), LW_OK);
  assert_close (s.p.resonant.width_rad_s, 8.0, 0, "absolute width kept");
  assert_int_equal (lw_stage_corner_set (&s, 0, 3.0, false, &err), LW_ERR_INVALID);
  assert_close (s.p.resonant.centre_rad_s, 6.0, 0, "refused move leaves the stage");
}

static void
test_check_messages (void **state)
{
  (void) state;
  LwError err;
  LwStage s = lw_stage_lead (10.0, 2.0);
  lw_stage_set_label (&s, "phase boost");
  assert_int_equal (lw_stage_check (&s, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "phase boost"));
  assert_non_null (strstr (err.message, "zero corner below its pole corner"));
  s = lw_stage_integrator (0);
  assert_int_equal (lw_stage_check (&s, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "integrator"));
  s = lw_stage_notch (10.0, -3.0, 1.0);
  assert_int_equal (lw_stage_check (&s, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "depth"));
  s = lw_stage_pid (1.0, 0.0, 0.1, 10.0);
  assert_int_equal (lw_stage_check (&s, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "integral time"));
  s = lw_stage_gain (0.0);
  LwModel *m = NULL;
  assert_int_equal (lw_stage_to_model (&s, T_, &m, &err), LW_ERR_INVALID);
  assert_null (m);
}

static void
test_corners (void **state)
{
  (void) state;
  LwError err;
  double nu;
  LwHandleKind k;
  LwStage s = lw_stage_lead (2.0, 20.0);
  assert_int_equal (lw_stage_corner_count (&s), 2);
  assert_int_equal (lw_stage_corner_get (&s, 1, &nu, &k, NULL), LW_OK);
  assert_true (nu == 20.0 && k == LW_HANDLE_POLE);
  assert_int_equal (lw_stage_corner_get (&s, 2, &nu, &k, &err), LW_ERR_INVALID);
  /* moved as a pair: α kept (1e-12 relative) and the handle lands exactly where put */
  assert_int_equal (lw_stage_corner_set (&s, 0, 5.0, true, NULL), LW_OK);
  assert_true (s.p.leadlag.zero_rad_s == 5.0);
  assert_close (s.p.leadlag.pole_rad_s, 50.0, 1e-12 * 50, "pole follows");
  assert_close (lw_stage_leadlag_alpha (&s), 10.0, 1e-12 * 10, "alpha kept");
  /* alone: the zero may not pass the pole; refused, stage unchanged */
  LwStage before = s;
  assert_int_equal (lw_stage_corner_set (&s, 0, 60.0, false, &err), LW_ERR_INVALID);
  assert_memory_equal (&s, &before, sizeof s);
  assert_int_equal (lw_stage_corner_set (&s, 0, -1.0, false, &err), LW_ERR_INVALID);
  assert_int_equal (lw_stage_corner_set (&s, 1, 80.0, false, NULL), LW_OK);
  assert_true (s.p.leadlag.zero_rad_s == 5.0 && s.p.leadlag.pole_rad_s == 80.0);

  /* PID: 1/Ti, 1/Td, N/Td */
  LwStage p = lw_stage_pid (2.0, 0.5, 0.02, 10.0);
  assert_int_equal (lw_stage_corner_count (&p), 3);
  assert_int_equal (lw_stage_corner_get (&p, 2, &nu, &k, NULL), LW_OK);
  assert_close (nu, 500.0, 1e-12 * 500, "filter pole");
  assert_true (k == LW_HANDLE_POLE);
  assert_int_equal (lw_stage_corner_set (&p, 1, 100.0, false, NULL), LW_OK);
  assert_close (p.p.pid.td_s, 0.01, 1e-15, "Td from its corner");
  assert_close (p.p.pid.filter_n, 10.0, 0, "N kept");
  assert_int_equal (lw_stage_corner_set (&p, 0, 4.0, true, NULL), LW_OK);   /* factor 2 */
  assert_close (p.p.pid.ti_s, 0.25, 1e-15, "Ti scaled");
  assert_close (p.p.pid.td_s, 0.005, 1e-15, "Td scaled");
  assert_int_equal (lw_stage_corner_set (&p, 2, 1000.0, false, NULL), LW_OK);
  assert_close (p.p.pid.filter_n, 5.0, 1e-12, "N from the filter pole");
  LwStage pi_like = lw_stage_pid (2.0, 0.5, 0.0, 10.0);
  assert_int_equal (lw_stage_corner_count (&pi_like), 1);

  /* notch: keep_ratio keeps the damping (width/centre), otherwise the width */
  LwStage n = lw_stage_notch (100.0, 30.0, 20.0);
  assert_int_equal (lw_stage_corner_set (&n, 0, 200.0, true, NULL), LW_OK);
  assert_close (n.p.notch.width_rad_s, 40.0, 1e-12 * 40, "relative width kept");
  assert_int_equal (lw_stage_corner_set (&n, 0, 50.0, false, NULL), LW_OK);
  assert_close (n.p.notch.width_rad_s, 40.0, 0, "absolute width kept");
  assert_int_equal (lw_stage_corner_set (&n, 0, 10.0, false, &err), LW_ERR_INVALID);
  assert_close (n.p.notch.centre_rad_s, 50.0, 0, "refused move leaves the notch");

  LwStage g = lw_stage_gain (3.0);
  assert_int_equal (lw_stage_corner_count (&g), 0);
}

/* The compensator: product of enabled stages in w; in z it must equal C_w(jν) at z = e^{jωT}
 * with ν = (2/T)·tan(ωT/2) (the bilinear map; 1e-10 relative: the z roots are computed). */
static void
test_compensator (void **state)
{
  (void) state;
  LwStage st[4] = { lw_stage_gain (4.0), lw_stage_pi (1.0, 3.0), lw_stage_lead (10.0, 40.0),
                    lw_stage_real_pole (300.0) };
  st[3].enabled = false;
  LwModel *cw = NULL, *cz = NULL;
  assert_int_equal (lw_compensator_w (st, 4, T_, &cw, NULL), LW_OK);
  assert_int_equal (lw_compensator_z (st, 4, T_, &cz, NULL), LW_OK);
  assert_int_equal (cw->n_zeros, 2);
  assert_int_equal (cw->n_poles, 2);
  const double omegas[] = { 0.5, 7.0, 60.0, 900.0, 3000.0 };
  for (size_t i = 0; i < 5; i++)
    {
      double om = omegas[i], nu = 2 / T_ * tan (om * T_ / 2);
      double complex w = I * nu;
      double complex want = 4.0 * (1 + 3.0 / w) * (1 + w / 10.0) / (1 + w / 40.0);
      double complex gw = lw_model_eval (cw, w);
      double complex gz = lw_model_eval (cz, cexp (I * om * T_));
      assert_close (cabs (gw - want), 0, 1e-12 * cabs (want), "product in w");
      assert_close (cabs (gz - want), 0, 1e-10 * cabs (want), "mapped to z");
    }
  lw_model_free (cw);
  lw_model_free (cz);
  /* none enabled: the constant 1 */
  st[0].enabled = st[1].enabled = st[2].enabled = false;
  assert_int_equal (lw_compensator_w (st, 4, T_, &cw, NULL), LW_OK);
  assert_true (cw->gain == 1.0 && cw->n_zeros == 0 && cw->n_poles == 0);
  lw_model_free (cw);
  /* a bad stage is named even among others */
  LwError err;
  LwStage bad[2] = { lw_stage_gain (2.0), lw_stage_real_zero (-4.0) };
  assert_int_equal (lw_compensator_w (bad, 2, T_, &cw, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "real-zero"));
  /* parameters listed for display */
  LwStageParam prm[LW_STAGE_MAX_PARAMS];
  size_t np = lw_stage_params (&st[2], prm);
  assert_int_equal (np, 4);
  assert_string_equal (prm[3].name, "max_phase_deg");
  assert_true (prm[3].derived);
  assert_string_equal (lw_stage_kind_name (LW_STAGE_POLE_PAIR), "pole-pair");
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_lead_formulas),
    cmocka_unit_test (test_definitions),
    cmocka_unit_test (test_resonant),
    cmocka_unit_test (test_check_messages),
    cmocka_unit_test (test_corners),
    cmocka_unit_test (test_compensator),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
