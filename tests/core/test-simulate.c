/* test-simulate — time-domain verification: responses of the sampled loop with actuator limits
 * and anti-windup, the continuous output between samples, performance indices.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <cmocka.h>

#include "lw-test.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "lw-analysis.h"
#include "lw-expr.h"
#include "lw-simulate.h"

typedef struct {
  LwModel *plant_s;
  LwModel *ctrl_z;
  LwSampledPlant *sp;
  LwSimPlan *plan;
} Fixture;

/* plant in s, controller in z (or in w when ctrl_w), options as given */
static void
fixture_open (Fixture *f, const char *plant, double t, double tau, const char *ctrl, bool ctrl_w,
              const LwSimOptions *o)
{
  LwError err;
  f->plant_s = parse (plant, LW_DOMAIN_S, 0);
  if (ctrl_w)
    {
      LwModel *cw = parse (ctrl, LW_DOMAIN_W, t);
      f->ctrl_z = lw_model_w_to_z (cw);
      lw_model_free (cw);
    }
  else
    f->ctrl_z = parse (ctrl, LW_DOMAIN_Z, t);
  if (lw_sampled_plant_new (f->plant_s, tau, t, &f->sp, &err) != LW_OK)
    fail_msg ("discretize: %s", err.message);
  if (lw_sim_plan_new (f->sp, f->ctrl_z, o, &f->plan, &err) != LW_OK)
    fail_msg ("plan: %s", err.message);
}

static void
fixture_close (Fixture *f)
{
  lw_sim_plan_free (f->plan);
  lw_sampled_plant_free (f->sp);
  lw_model_free (f->plant_s);
  lw_model_free (f->ctrl_z);
}

static LwSimResponse *
run (Fixture *f, LwSimInput in, double amp)
{
  LwSimResponse *r = NULL;
  LwError err;
  if (lw_sim_run (f->plan, in, amp, &r, &err) != LW_OK)
    fail_msg ("run: %s", err.message);
  return r;
}

/* Without limits the reference step is the step response of lw_evaluate: the same structure
 * (plant core, delay line, controller sections) in the same order of operations, so equal to
 * rounding; tolerance 1e-14 · max(1, |y|). */
static void
test_matches_evaluate (void **state)
{
  (void) state;
  struct { const char *plant; double t, tau; int n; const char *ctrl; bool w; } cases[] = {
    { "1/(s*(s+1))", 1.0, 0.0, 0, "1", false },
    { "40/(s*(s+8))", 0.01, 0.0, 1, "2*(w+4)/(w+40)", true },
    { "5/(2*s+1)", 0.05, 0.13, 1, "(z-0.9)/(z-1)", false },          /* fractional dead time */
    { "5/(2*s+1)", 0.05, 0.1, 2, "(z-0.9)/(z-1)", false },           /* whole dead time */
    { "(s+3)/(s+1)", 0.1, 0.0, 0, "0.5*(z-0.5)/(z-1)", false },      /* biproper, no delay */
    { "100/(s^2+2*s+100)", 0.02, 0.033, 1, "0.3*(w+5)/w", true },
  };
  for (size_t c = 0; c < sizeof cases / sizeof cases[0]; c++)
    {
      LwSimOptions o;
      lw_sim_options_init (&o);
      o.compute_delay = cases[c].n;
      o.n_steps = 300;
      o.substeps = 0;
      Fixture f;
      fixture_open (&f, cases[c].plant, cases[c].t, cases[c].tau, cases[c].ctrl, cases[c].w, &o);
      LwAnalysisOptions ao;
      lw_analysis_options_init (&ao);
      ao.compute_delay = cases[c].n;
      ao.n_steps = 300;
      LwEvaluation *ev = NULL;
      LwError err;
      if (lw_evaluate (f.sp, f.ctrl_z, &ao, &ev, &err) != LW_OK)
        fail_msg ("evaluate: %s", err.message);
      LwSimResponse *r = run (&f, LW_SIM_REFERENCE_STEP, 1.0);
      assert_int_equal (r->n, ev->step.n);
      assert_false (r->has_continuous);
      for (size_t k = 0; k < r->n; k++)
        {
          assert_close (r->y[k], ev->step.samples[k], 1e-14 * fmax (1.0, fabs (ev->step.samples[k])),
                        cases[c].plant);
          /* e = r − y by definition */
          assert_close (r->e[k], 1.0 - r->y[k], 0.0, "error signal");
        }
      assert_int_equal (r->n_saturated, 0);
      lw_sim_response_free (r);
      lw_evaluation_free (ev);
      fixture_close (&f);
    }
}

/* The continuous output at the sample instants t = kT is the sampled output: two exact
 * discretizations (the sampled plant's Φ(T) in balanced Schur coordinates vs M products of
 * Φ(T/M) of the continuous realization) that differ by rounding only; tolerance
 * 1e-12 · max(1, max|y|). Whole and fractional dead time, a switch inside a sub-step, a
 * biproper plant, all three inputs. */
static void
test_continuous_at_samples (void **state)
{
  (void) state;
  struct { const char *plant; double t, tau; int n; size_t m; const char *ctrl; } cases[] = {
    { "5/(2*s+1)", 0.05, 0.0, 1, 20, "(z-0.9)/(z-1)" },
    { "5/(2*s+1)", 0.05, 0.1, 1, 20, "(z-0.9)/(z-1)" },
    { "5/(2*s+1)", 0.05, 0.13, 1, 20, "(z-0.9)/(z-1)" },       /* θ = 0.03 = 12 h exactly */
    { "5/(2*s+1)", 0.05, 0.1337, 0, 7, "(z-0.9)/(z-1)" },      /* θ inside a sub-step */
    { "(s+3)/(s+1)", 0.1, 0.04, 1, 10, "0.5*(z-0.5)/(z-1)" },  /* biproper: output jumps */
    { "100/(s^2+2*s+100)", 0.02, 0.033, 1, 16, "0.2*(z-0.8)/(z-1)" },
  };
  const LwSimInput inputs[] = { LW_SIM_REFERENCE_STEP, LW_SIM_INPUT_DISTURBANCE_STEP,
                                LW_SIM_OUTPUT_DISTURBANCE_STEP };
  for (size_t c = 0; c < sizeof cases / sizeof cases[0]; c++)
    {
      LwSimOptions o;
      lw_sim_options_init (&o);
      o.compute_delay = cases[c].n;
      o.n_steps = 200;
      o.substeps = cases[c].m;
      Fixture f;
      fixture_open (&f, cases[c].plant, cases[c].t, cases[c].tau, cases[c].ctrl, false, &o);
      for (size_t i = 0; i < 3; i++)
        {
          LwSimResponse *r = run (&f, inputs[i], 1.0);
          assert_true (r->has_continuous);
          assert_int_equal (r->n_fine, (r->n - 1) * cases[c].m + 1);
          double ymax = 1.0;
          for (size_t k = 0; k < r->n; k++)
            ymax = fmax (ymax, fabs (r->y[k]));
          for (size_t k = 0; k < r->n; k++)
            {
              size_t j = k * cases[c].m;
              assert_close (r->y_fine[j], r->y[k], 1e-12 * ymax, cases[c].plant);
              /* times j·T/M exactly as documented: 1 ulp-level agreement, 1e-15 relative */
              assert_close (r->t_fine_s[j], (double) k * cases[c].t, 1e-15 * r->t_fine_s[j],
                            "sample time");
            }
          assert_true (r->intersample_ripple >= 0.0);
          assert_true (fabs (r->continuous_peak) >= fabs (r->peak) - 1e-12 * ymax);
          lw_sim_response_free (r);
        }
      fixture_close (&f);
    }
}

/* P(s) = K/s held by a ZOH ramps linearly between samples, so the continuous output is the
 * straight line between samples and the ripple (defined against that line) is 0: rounding
 * only, 1e-13 absolute for outputs of order 1. A lightly damped plant shows real ripple. */
static void
test_ripple (void **state)
{
  (void) state;
  LwSimOptions o;
  lw_sim_options_init (&o);
  o.compute_delay = 0;
  o.n_steps = 100;
  o.substeps = 25;
  Fixture f;
  fixture_open (&f, "2/s", 0.1, 0.0, "1", false, &o);
  LwSimResponse *r = run (&f, LW_SIM_REFERENCE_STEP, 1.0);
  assert_close (r->intersample_ripple, 0.0, 1e-13, "ripple of an integrator plant");
  lw_sim_response_free (r);
  fixture_close (&f);

  /* resonance at 10 rad/s, ζ = 0.02, sampled at T = 0.3 s (about 2 samples per period): a
   * deadbeat-like loop that looks calm at the samples oscillates between them. A ripple of
   * more than 1 % of the step is asserted (common practice, no source: sampling a resonance
   * this coarsely hides it) */
  lw_sim_options_init (&o);
  o.n_steps = 100;
  o.substeps = 40;
  fixture_open (&f, "100/(s^2+0.4*s+100)", 0.3, 0.0, "0.2*z/(z-1)", false, &o);
  r = run (&f, LW_SIM_REFERENCE_STEP, 1.0);
  assert_true (r->intersample_ripple > 0.01);
  lw_sim_response_free (r);
  fixture_close (&f);
}

/* Pump pressure loop (invented): pressure responds to the pump command u as
 * P(s) = 5/(2s + 1) bar per unit; the pump command is limited to 0 … 1; T = 0.05 s, one
 * sample of computation delay; a PI C(z) = (z − 0.9)/(z − 1) (Kp = 1, Kp·T/Ti = 0.1, Ti =
 * 0.5 s); a 3 bar setpoint step, which needs u = 0.6 in steady state but saturates the pump
 * at the start. Measured here (and by a plain re-simulation in Python while writing this
 * test): overshoot 43.2 % with windup, 2.8 % with clamping. Asserted: more than 30 % without,
 * less than 10 % with anti-windup — the drop of 30 points and more is the claim tested. */
static void
test_windup (void **state)
{
  (void) state;
  double os[2], lin_os;
  for (int aw = 0; aw < 3; aw++)
    {
      LwSimOptions o;
      lw_sim_options_init (&o);
      o.compute_delay = 1;
      o.n_steps = 400;
      o.substeps = 0;
      o.has_limits = aw < 2;
      o.u_low = 0.0;
      o.u_high = 1.0;
      o.anti_windup = aw == 1;
      Fixture f;
      fixture_open (&f, "5/(2*s+1)", 0.05, 0.0, "(z-0.9)/(z-1)", false, &o);
      assert_int_equal (lw_sim_plan_n_integrating (f.plan), 1);
      LwSimResponse *r = run (&f, LW_SIM_REFERENCE_STEP, 3.0);
      double ymax = -INFINITY;
      for (size_t k = 0; k < r->n; k++)
        {
          ymax = fmax (ymax, r->y[k]);
          if (o.has_limits)
            assert_true (r->u[k] >= 0.0 && r->u[k] <= 1.0);
        }
      double ov = (ymax - 3.0) / 3.0 * 100.0;
      /* type-1 loop: settles at the setpoint (1e-9 after 400 samples, the loop is stable) */
      assert_close (r->y[r->n - 1], 3.0, 1e-9, "final pressure");
      if (aw < 2)
        {
          os[aw] = ov;
          assert_true (r->n_saturated > 0);
          if (aw == 1)
            assert_true (r->n_held > 0);
          else
            assert_int_equal (r->n_held, 0);
        }
      else
        {
          lin_os = ov;
          assert_int_equal (r->n_saturated, 0);
        }
      lw_sim_response_free (r);
      fixture_close (&f);
    }
  if (!(os[0] > 30.0 && os[1] < 10.0 && os[0] - os[1] > 30.0))
    fail_msg ("overshoot with windup %.3f %%, with clamping %.3f %% (linear %.3f %%)", os[0],
              os[1], lin_os);
  /* the measured values quoted above, to 0.1 percentage point */
  assert_close (os[0], 43.2, 0.1, "overshoot with windup");
  assert_close (os[1], 2.8, 0.1, "overshoot with clamping");
}

/* Final values by the final-value theorem (exact rules): an output disturbance settles at
 * 1/(1 + L(1)), which is 0 for a type-1 loop; an input disturbance at P(1)/(1 + L(1)), 0 with
 * an integrating controller. Stable loops with closed-loop poles well inside the unit circle
 * reach their final values to rounding within 600 samples: tolerance 1e-12. */
static void
test_disturbance_final (void **state)
{
  (void) state;
  LwSimOptions o;
  lw_sim_options_init (&o);
  o.n_steps = 600;
  o.substeps = 0;
  Fixture f;
  /* type 1 through the controller */
  fixture_open (&f, "5/(2*s+1)", 0.05, 0.07, "(z-0.9)/(z-1)", false, &o);
  LwSimResponse *r = run (&f, LW_SIM_OUTPUT_DISTURBANCE_STEP, 1.0);
  assert_close (r->y[0], 1.0, 0.0, "the output disturbance appears at once");
  assert_close (r->y[r->n - 1], 0.0, 1e-12, "output disturbance, type 1");
  lw_sim_response_free (r);
  r = run (&f, LW_SIM_INPUT_DISTURBANCE_STEP, 1.0);
  assert_close (r->y[r->n - 1], 0.0, 1e-12, "input disturbance, integrating controller");
  /* the actuator cancels the disturbance: u → −1 */
  assert_close (r->u[r->n - 1], -1.0, 1e-12, "actuator against the input disturbance");
  lw_sim_response_free (r);
  fixture_close (&f);

  /* type 1 through the plant, proportional controller: output disturbance → 0 */
  fixture_open (&f, "2/(s*(s+4))", 0.05, 0.0, "3", false, &o);
  r = run (&f, LW_SIM_OUTPUT_DISTURBANCE_STEP, 1.0);
  assert_close (r->y[r->n - 1], 0.0, 1e-12, "output disturbance, integrating plant");
  /* input disturbance with an integrating plant and no integrating controller:
   * P/(1 + CP) → 1/C(1) = 1/3 */
  lw_sim_response_free (r);
  r = run (&f, LW_SIM_INPUT_DISTURBANCE_STEP, 1.0);
  assert_close (r->y[r->n - 1], 1.0 / 3.0, 1e-12, "input disturbance, integrating plant");
  lw_sim_response_free (r);
  fixture_close (&f);

  /* type 0: P(1) = 5, C = 0.4 → L(1) = 2, output disturbance → 1/3 (closed-loop poles
   * about 0.92 and 0.05: 0.92^600 ≈ 1e-22) */
  fixture_open (&f, "5/(2*s+1)", 0.05, 0.0, "0.4", false, &o);
  r = run (&f, LW_SIM_OUTPUT_DISTURBANCE_STEP, 1.0);
  assert_close (r->y[r->n - 1], 1.0 / 3.0, 1e-12, "output disturbance, type 0");
  lw_sim_response_free (r);
  fixture_close (&f);
}

/* Indices against closed forms: P(s) = K/s with ZOH is KT/(z − 1); with C = Kc and N = 0,
 * y[k+1] = y[k] + KT·Kc·(1 − y[k]), so e[k] = λ^k with λ = 1 − K·T·Kc and u[k] = Kc·λ^k.
 * Geometric series (any calculus text): Σ_{k<n} λ^k = (1 − λ^n)/(1 − λ),
 * Σ_{k<n} k λ^k = λ (1 − n λ^{n−1} + (n−1) λ^n)/(1 − λ)². With the sums-over-samples
 * definitions of docs/simulation.md: IAE = T Σ|e|, ISE = T Σe², ITAE = T Σ kT|e|,
 * effort = T Σu². Sums of n = 200 terms in double precision: 1e-12 relative. */
static void
test_indices_closed_form (void **state)
{
  (void) state;
  const double K = 2.0, T = 0.1, Kc = 1.0;
  const size_t n = 200;
  LwSimOptions o;
  lw_sim_options_init (&o);
  o.compute_delay = 0;
  o.n_steps = n;
  o.substeps = 0;
  Fixture f;
  fixture_open (&f, "2/s", T, 0.0, "1", false, &o);
  LwSimResponse *r = run (&f, LW_SIM_REFERENCE_STEP, 1.0);
  double l = 1.0 - K * T * Kc, dn = (double) n;
  double iae = T * (1.0 - pow (l, dn)) / (1.0 - l);
  double ise = T * (1.0 - pow (l, 2.0 * dn)) / (1.0 - l * l);
  double itae = T * T * l * (1.0 - dn * pow (l, dn - 1.0) + (dn - 1.0) * pow (l, dn))
                / ((1.0 - l) * (1.0 - l));
  double eff = T * Kc * Kc * (1.0 - pow (l, 2.0 * dn)) / (1.0 - l * l);
  assert_close (r->indices.iae, iae, 1e-12 * iae, "IAE");
  assert_close (r->indices.ise, ise, 1e-12 * ise, "ISE");
  assert_close (r->indices.itae, itae, 1e-12 * itae, "ITAE");
  assert_close (r->indices.control_effort, eff, 1e-12 * eff, "control effort");
  /* the error sequence itself: λ^k to 1e-14 relative (one multiply-add per sample) */
  for (size_t k = 0; k < 20; k++)
    assert_close (r->e[k], pow (l, (double) k), 1e-14, "e[k] = λ^k");
  lw_sim_response_free (r);
  fixture_close (&f);
}

/* A long dead time rides in a ring buffer (issue 11). Plant 1 (a pure gain) with d = 200 000
 * samples of dead time, C = 0.5 with actuator limits ±0.4, no computation delay: the loop is
 * y[k] = u[k − d], u[k] = sat(0.5 (1 − y[k])). Exact by hand: y = 0 for k < d, then
 * u[0…d−1] = 0.4 (clipped from 0.5), so y = 0.4 for d <= k < 2d; the continuous output (plant
 * without dynamics) is the held input: 0 before t = dT, 0.4 from there on. Exact comparisons. */
static void
test_long_dead_time (void **state)
{
  (void) state;
  const size_t d = 200000;
  LwSimOptions o;
  lw_sim_options_init (&o);
  o.compute_delay = 0;
  o.n_steps = d + 50;
  o.has_limits = true;
  o.u_low = -0.4;
  o.u_high = 0.4;
  o.substeps = 2;
  Fixture f;
  fixture_open (&f, "1", 0.01, 0.01 * (double) d, "0.5", false, &o);
  LwSimResponse *r = run (&f, LW_SIM_REFERENCE_STEP, 1.0);
  for (size_t k = 0; k < o.n_steps; k++)
    if (r->y[k] != (k < d ? 0.0 : 0.4))
      fail_msg ("y[%zu] = %.17g", k, r->y[k]);
  assert_int_equal (r->n_saturated, d);   /* from k = d on, v = 0.5·0.6 = 0.3 is inside */
  for (size_t j = 0; j < r->n_fine; j++)
    if (r->y_fine[j] != (j < 2 * d ? 0.0 : 0.4))
      fail_msg ("y_fine[%zu] = %.17g", j, r->y_fine[j]);
  lw_sim_response_free (r);
  fixture_close (&f);
}

static void
test_bad_options (void **state)
{
  (void) state;
  LwModel *p = parse ("1/(s+1)", LW_DOMAIN_S, 0), *c = parse ("1", LW_DOMAIN_Z, 0.1);
  LwSampledPlant *sp = NULL;
  LwError err;
  assert_int_equal (lw_sampled_plant_new (p, 0.0, 0.1, &sp, &err), LW_OK);
  LwSimOptions o;
  LwSimPlan *plan = NULL;
  lw_sim_options_init (&o);
  o.has_limits = true;
  o.u_low = 1.0;
  o.u_high = 1.0;
  assert_int_equal (lw_sim_plan_new (sp, c, &o, &plan, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "low < high"));
  o.u_low = -INFINITY;
  assert_int_equal (lw_sim_plan_new (sp, c, &o, &plan, &err), LW_ERR_INVALID);
  lw_sim_options_init (&o);
  o.n_steps = 1;
  assert_int_equal (lw_sim_plan_new (sp, c, &o, &plan, &err), LW_ERR_INVALID);
  lw_sim_options_init (&o);
  o.n_steps = 100000000;
  o.substeps = 20;
  assert_int_equal (lw_sim_plan_new (sp, c, &o, &plan, &err), LW_ERR_INVALID);
  assert_null (plan);
  /* a controller with the wrong period */
  LwModel *c2 = parse ("1", LW_DOMAIN_Z, 0.2);
  lw_sim_options_init (&o);
  assert_int_equal (lw_sim_plan_new (sp, c2, &o, &plan, &err), LW_ERR_INVALID);
  /* a good plan refuses a non-finite amplitude */
  assert_int_equal (lw_sim_plan_new (sp, c, &o, &plan, &err), LW_OK);
  LwSimResponse *r = NULL;
  assert_int_equal (lw_sim_run (plan, LW_SIM_REFERENCE_STEP, NAN, &r, &err), LW_ERR_INVALID);
  assert_null (r);
  lw_sim_plan_free (plan);
  lw_model_free (c2);
  lw_sampled_plant_free (sp);
  lw_model_free (p);
  lw_model_free (c);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_matches_evaluate),
    cmocka_unit_test (test_continuous_at_samples),
    cmocka_unit_test (test_ripple),
    cmocka_unit_test (test_windup),
    cmocka_unit_test (test_disturbance_final),
    cmocka_unit_test (test_indices_closed_form),
    cmocka_unit_test (test_long_dead_time),
    cmocka_unit_test (test_bad_options),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
