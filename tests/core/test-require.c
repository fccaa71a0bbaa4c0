/* test-require — requirement translations (overshoot, damping, phase margin, rise time,
 * warping) and pass/fail checks with signed slack.
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
#include "lw-require.h"
#include "lw-simulate.h"

#define PI_ 3.14159265358979323846

/* Crossover of ω_n²/(jω(jω + 2ζω_n)) relative to ω_n, by bisection on |L| = 1 written out
 * here (independent of the closed form in the core). */
static double
crossover_bisect (double zeta)
{
  double lo = 1e-6, hi = 10.0;
  for (int i = 0; i < 200; i++)
    {
      double m = 0.5 * (lo + hi);
      double complex l = 1.0 / (I * m * (I * m + 2 * zeta));
      if (cabs (l) > 1)
        lo = m;
      else
        hi = m;
    }
  return 0.5 * (lo + hi);
}

/* ζ = 0.5 → 16.3 % overshoot and PM 51.83°; ζ = 0.7 → 4.6 % and 65.16° (textbook tables of the
 * second-order system, e.g. Ogata, Modern Control Engineering; from memory). Tolerances: half a
 * unit of the last digit the table gives (0.05 %, 0.005°). */
static void
test_damping_tables (void **state)
{
  (void) state;
  assert_close (lw_req_overshoot_pct_from_zeta (0.5), 16.3, 0.05, "OS(0.5)");
  assert_close (lw_req_overshoot_pct_from_zeta (0.7), 4.6, 0.05, "OS(0.7)");
  assert_close (lw_req_pm_deg_from_zeta (0.5), 51.83, 0.005, "PM(0.5)");
  assert_close (lw_req_pm_deg_from_zeta (0.7), 65.16, 0.005, "PM(0.7)");
  /* PM = 180° + ∠L at the bisected crossover, written out here: 1e-9 (bisection to 1e-15) */
  const double zetas[] = { 0.05, 0.2, 0.5, 0.7, 1.0, 2.0 };
  for (size_t i = 0; i < 6; i++)
    {
      double z = zetas[i], x = crossover_bisect (z);
      assert_close (lw_req_crossover_over_wn (z), x, 1e-12, "crossover / wn");
      double pm = 180.0 + carg (1.0 / (I * x * (I * x + 2 * z))) * 180.0 / PI_;
      assert_close (lw_req_pm_deg_from_zeta (z), pm, 1e-9, "PM(zeta) vs bisection");
      /* inverses round-trip to 1e-12 */
      assert_close (lw_req_zeta_from_pm_deg (lw_req_pm_deg_from_zeta (z)), z, 1e-12, "zeta(PM)");
      if (z < 1.0)
        assert_close (lw_req_zeta_from_overshoot (lw_req_overshoot_pct_from_zeta (z)), z, 1e-12,
                      "zeta(OS)");
    }
  /* rule of thumb PM ≈ 100ζ (common practice, no source): exact definition, no tolerance */
  assert_true (lw_req_pm_deg_rule (0.5) == 50.0);
  assert_true (lw_req_zeta_rule (45.0) == 0.45);
  /* the bundle: 16.3 % → ζ ≈ 0.5 (0.001: the overshoot rounded to 3 digits) */
  LwReqDamping d;
  lw_req_damping_from_overshoot (16.3, &d);
  assert_close (d.zeta, 0.5, 0.001, "zeta from 16.3 %");
  assert_close (d.pm_exact_deg, 51.83, 0.1, "PM from 16.3 %");
  assert_close (d.pm_rule_deg, 100 * d.zeta, 1e-12, "rule PM");
  lw_req_damping_from_pm (51.83, &d);
  assert_close (d.overshoot_pct, 16.3, 0.05, "OS from PM 51.83");
  assert_true (isnan (lw_req_zeta_from_overshoot (0.0)) && isnan (lw_req_zeta_from_pm_deg (95)));
}

/* Rise time → crossover and warping. The rules ω_c ≈ 1.7/t_r and t_r ≈ 1.8/ω_n are common
 * practice, no source.  Warping check: ω = π/(2T) must give ν = 2/T exactly (tan(π/4) = 1),
 * i.e. a difference of 4/π − 1 = 27.32 %; 1e-9 (one tan). */
static void
test_rise_and_warping (void **state)
{
  (void) state;
  double t = 0.01, om = PI_ / (2 * t), tr = 1.7 / om;
  LwReqCrossover c;
  assert_int_equal (lw_req_crossover_from_rise (tr, 0.5, t, &c, NULL), LW_OK);
  assert_close (c.omega_rule_rad_s, om, 1e-12 * om, "1.7/t_r");
  assert_close (c.nu_rule_rad_s, 2 / t, 1e-9 * (2 / t), "nu at pi/(2T)");
  assert_close (c.warp_rule_pct, 100 * (4 / PI_ - 1), 1e-9, "warp %");
  assert_close (c.omega_n_rad_s, 1.8 / tr, 1e-12 * om, "1.8/t_r");
  assert_close (c.omega_second_rad_s, 1.8 / tr * crossover_bisect (0.5), 1e-9 * om,
                "second-order crossover");
  /* slow sampling against the rise: a crossover at or past π/T has no w-plane image */
  assert_int_equal (lw_req_crossover_from_rise (0.01, 0.5, 0.1, &c, NULL), LW_OK);
  assert_true (isinf (c.nu_rule_rad_s));
  LwError err;
  assert_int_equal (lw_req_crossover_from_rise (0.0, 0.5, t, &c, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "rise time"));
}

static LwEvaluation *
evaluate (const char *plant, const char *ctrl_w, double t, int n, LwModel **plant_out)
{
  LwModel *p = NULL, *c = NULL;
  assert_int_equal (lw_expr_parse (plant, LW_DOMAIN_S, 0, &p, NULL), LW_OK);
  assert_int_equal (lw_expr_parse (ctrl_w, LW_DOMAIN_W, t, &c, NULL), LW_OK);
  LwModel *cz = lw_model_w_to_z (c);
  LwSampledPlant *sp = NULL;
  assert_int_equal (lw_sampled_plant_new (p, 0, t, &sp, NULL), LW_OK);
  LwAnalysisOptions o;
  lw_analysis_options_init (&o);
  o.compute_delay = n;
  o.n_steps = 3000;
  LwEvaluation *ev = NULL;
  assert_int_equal (lw_evaluate (sp, cz, &o, &ev, NULL), LW_OK);
  lw_sampled_plant_free (sp);
  lw_model_free (c);
  lw_model_free (cz);
  *plant_out = p;
  return ev;
}

/* Steady-state errors from the low-frequency gain. Independent checks:
 * type 0 — the step's final value from the closed-loop simulation: e = 1 − y(∞) (1e-9: the
 *   core's final value is a DC gain of the closed loop);
 * type 1 — Kv = lim ν·|L|, compared with ω·|L(e^{jωT})| from the exact sampled plant at
 *   ω = 1e-4 rad/s, where the neglected terms are O((ω/8)²) ≈ 1e-10 relative: tolerance 1e-7. */
static void
test_low_frequency (void **state)
{
  (void) state;
  LwModel *p = NULL;
  /* an invented heater: DC gain 5, two lags; controller 2 → Kp = 10, e = 1/11 */
  LwEvaluation *ev = evaluate ("50/((s+1)*(s+10))", "2", 0.01, 1, &p);
  LwAchieved a;
  assert_int_equal (lw_achieved_from_evaluation (ev, p, &a, NULL), LW_OK);
  assert_int_equal (a.loop_type, 0);
  assert_close (a.position_constant, 10.0, 1e-12, "Kp");
  assert_true (ev->step.has_final);
  assert_close (a.step_error, 1.0 - ev->step.final_value, 1e-9, "step error vs final value");
  assert_true (isinf (a.ramp_error_s));
  LwRequirement r = { LW_REQ_MAX_RAMP_ERROR, 0.1, 0 };
  LwReqResult res = lw_requirement_evaluate (&r, &a);
  assert_int_equal (res.status, LW_REQ_FAIL);
  r = (LwRequirement){ LW_REQ_MAX_STEP_ERROR, 0.1, 0 };
  res = lw_requirement_evaluate (&r, &a);
  assert_int_equal (res.status, LW_REQ_PASS);
  assert_close (res.slack, 0.1 - 1.0 / 11.0, 1e-12, "step error slack");
  lw_evaluation_free (ev);
  lw_model_free (p);

  /* the camera slider axis of docs/cli.md: 40/(s(s+8)) with C = 3: Kv = 40·3/8 = 15 1/s */
  ev = evaluate ("40/(s*(s+8))", "3", 0.002, 1, &p);
  assert_int_equal (lw_achieved_from_evaluation (ev, p, &a, NULL), LW_OK);
  assert_int_equal (a.loop_type, 1);
  assert_close (a.velocity_constant, 15.0, 1e-12 * 15, "Kv");
  assert_true (a.step_error == 0.0);
  assert_close (a.ramp_error_s, 1.0 / 15.0, 1e-12, "ramp error");
  LwSampledPlant *sp = NULL;
  assert_int_equal (lw_sampled_plant_new (p, 0, 0.002, &sp, NULL), LW_OK);
  double om = 1e-4;
  double kv_num = om * cabs (3.0 * lw_sampled_plant_response (sp, om));
  assert_close (a.velocity_constant, kv_num, 1e-7 * 15, "Kv vs the sampled plant");
  lw_sampled_plant_free (sp);
  lw_evaluation_free (ev);
  lw_model_free (p);
}

/* Pass/fail and signed slack on hand-made figures (exact arithmetic on the given numbers). */
static void
test_requirements (void **state)
{
  (void) state;
  LwAchieved a;
  memset (&a, 0, sizeof a);
  a.stable = true;
  a.has_phase_margin = true;  a.phase_margin_deg = 48.0;
  a.has_gain_margin = true;   a.gain_margin_db = INFINITY;
  a.has_sensitivity = true;   a.sensitivity_peak = 1.4;
  a.has_crossover = true;     a.crossover_rad_s = 20.0;
  a.has_overshoot = true;     a.overshoot_pct = 12.0;
  a.has_rise = true;          a.rise_time_s = 0.08;

  struct { LwRequirement r; LwReqStatus st; double slack; } rows[] = {
    { { LW_REQ_MIN_PHASE_MARGIN, 45.0, 0 }, LW_REQ_PASS, 3.0 },
    { { LW_REQ_MIN_PHASE_MARGIN, 50.0, 0 }, LW_REQ_FAIL, -2.0 },
    { { LW_REQ_MIN_GAIN_MARGIN, 6.0, 0 }, LW_REQ_PASS, INFINITY },
    { { LW_REQ_MAX_SENSITIVITY, 2.0, 0 }, LW_REQ_PASS, 0.6 },
    { { LW_REQ_CROSSOVER_RANGE, 15.0, 30.0 }, LW_REQ_PASS, 5.0 },
    { { LW_REQ_CROSSOVER_RANGE, 22.0, 30.0 }, LW_REQ_FAIL, -2.0 },
    { { LW_REQ_MAX_OVERSHOOT, 10.0, 0 }, LW_REQ_FAIL, -2.0 },
    { { LW_REQ_MAX_RISE_TIME, 0.1, 0 }, LW_REQ_PASS, 0.02 },
    { { LW_REQ_MAX_SETTLING_TIME, 0.5, 0 }, LW_REQ_NOT_AVAILABLE, NAN },
    { { LW_REQ_MAX_ACTUATOR, 10.0, 0 }, LW_REQ_NOT_AVAILABLE, NAN },
  };
  for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++)
    {
      assert_int_equal (lw_requirement_check (&rows[i].r, NULL), LW_OK);
      LwReqResult res = lw_requirement_evaluate (&rows[i].r, &a);
      if (res.status != rows[i].st)
        fail_msg ("row %zu (%s): status %d, want %d", i, lw_req_kind_name (rows[i].r.kind),
                  (int) res.status, (int) rows[i].st);
      if (isnan (rows[i].slack))
        assert_true (isnan (res.slack));
      else if (isinf (rows[i].slack))
        assert_true (isinf (res.slack) && res.slack > 0);
      else
        assert_close (res.slack, rows[i].slack, 1e-12, lw_req_kind_name (rows[i].r.kind));
    }
  /* a simulation fills the actuator peak later */
  a.has_actuator_peak = true;
  a.actuator_peak = 12.5;
  LwRequirement r = { LW_REQ_MAX_ACTUATOR, 10.0, 0 };
  LwReqResult res = lw_requirement_evaluate (&r, &a);
  assert_int_equal (res.status, LW_REQ_FAIL);
  assert_close (res.slack, -2.5, 1e-12, "actuator slack");
  /* an unstable loop fails its margins whatever the numbers say */
  a.stable = false;
  r = (LwRequirement){ LW_REQ_MIN_PHASE_MARGIN, 45.0, 0 };
  res = lw_requirement_evaluate (&r, &a);
  assert_int_equal (res.status, LW_REQ_FAIL);
  assert_non_null (res.note);
  /* bad limits */
  LwError err;
  r = (LwRequirement){ LW_REQ_CROSSOVER_RANGE, 30.0, 10.0 };
  assert_int_equal (lw_requirement_check (&r, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "crossover-range"));
  r = (LwRequirement){ LW_REQ_MAX_RISE_TIME, -1.0, 0 };
  assert_int_equal (lw_requirement_check (&r, &err), LW_ERR_INVALID);
}

/* Peak actuator output from a simulated reference step: P control K = 4 of 1/(s + 1) with one
 * sample of computation delay. The first applied sample is u[1] = K·e[0] = K·1 (y[0] = 0), and
 * the error only falls afterwards (both closed-loop poles are real and positive, the step
 * rises monotonically to 0.8, so 0.2 <= e <= 1), so max|u| = K exactly. */
static void
test_actuator_peak (void **state)
{
  (void) state;
  LwModel *p = NULL, *c = NULL;
  assert_int_equal (lw_expr_parse ("1/(s+1)", LW_DOMAIN_S, 0, &p, NULL), LW_OK);
  assert_int_equal (lw_expr_parse ("4", LW_DOMAIN_Z, 0.05, &c, NULL), LW_OK);
  LwSampledPlant *sp = NULL;
  assert_int_equal (lw_sampled_plant_new (p, 0.0, 0.05, &sp, NULL), LW_OK);
  LwSimOptions o;
  lw_sim_options_init (&o);
  o.n_steps = 200;
  LwSimPlan *plan = NULL;
  assert_int_equal (lw_sim_plan_new (sp, c, &o, &plan, NULL), LW_OK);
  LwSimResponse *r = NULL;
  assert_int_equal (lw_sim_run (plan, LW_SIM_REFERENCE_STEP, 1.0, &r, NULL), LW_OK);
  LwAchieved a;
  memset (&a, 0, sizeof a);
  a.stable = true;   /* closed-loop poles 0.65 and 0.30: z² − 0.951 z + 0.195 */
  lw_achieved_set_actuator (&a, r->u, r->n);
  assert_true (a.has_actuator_peak);
  assert_close (a.actuator_peak, 4.0, 1e-15, "max |u|");
  LwRequirement req = { .kind = LW_REQ_MAX_ACTUATOR, .limit = 3.5 };
  LwReqResult res = lw_requirement_evaluate (&req, &a);
  assert_int_equal (res.status, LW_REQ_FAIL);
  assert_close (res.slack, -0.5, 1e-15, "slack");
  lw_sim_response_free (r);
  lw_sim_plan_free (plan);
  lw_sampled_plant_free (sp);
  lw_model_free (c);
  lw_model_free (p);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_damping_tables),
    cmocka_unit_test (test_rise_and_warping),
    cmocka_unit_test (test_low_frequency),
    cmocka_unit_test (test_requirements),
    cmocka_unit_test (test_actuator_peak),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
