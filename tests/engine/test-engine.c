/* test-engine.c — the one evaluation of a design variant (src/engine/lw-engine.h).
 *
 * The engine composes the core (parsing, sampling, stages, w → z, evaluation, simulation,
 * requirements). These tests check the composition against a loop computed here
 * independently from textbook formulas, and the engine's own duties: which part a failure is
 * in, the shared sampled plant, thread safety and the verdicts.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <complex.h>
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>
#include <glib.h>

#include "lw-engine.h"

#define T_S 0.002
#define K_PLANT 180.0
#define A_PLANT 12.0

/* The camera-slider design of data/examples (invented numbers): P(s) = 180/(s (s + 12)),
 * T = 2 ms, one sample of computation delay, C(w) = 2.5 (1 + w/10)/(1 + w/80). */
static LwDesign *
slider_design (void)
{
  LwDesign *d = lw_design_new ("180/(s*(s+12))", T_S);
  d->compute_delay = 1;
  LwStage gain = lw_stage_gain (2.5);
  LwStage lead = lw_stage_lead (10.0, 80.0);
  lw_design_variant_add_stage (&d->variants[0], &gain);
  lw_design_variant_add_stage (&d->variants[0], &lead);
  return d;
}

/* L(e^{jωT}) computed here, without the engine or the core: the zero-order-hold equivalent
 * of K/(s (s + a)) in closed form (Franklin, Powell & Workman, Digital Control of Dynamic
 * Systems, 3rd ed., table of ZOH equivalents, from memory; rederived as
 * (1 − z⁻¹)·Z{K/(s²(s + a))}):
 *   G(z) = (K/a²) · [(aT − 1 + e^{−aT}) z + (1 − e^{−aT} − aT e^{−aT})] / ((z − 1)(z − e^{−aT})),
 * the compensator in w at w = (2/T)(z − 1)/(z + 1), and z⁻¹ for the computation delay. */
static double complex
loop_here (double omega)
{
  double complex z = cexp (I * omega * T_S);
  double aT = A_PLANT * T_S, e = exp (-aT);
  double complex g = K_PLANT / (A_PLANT * A_PLANT)
                     * ((aT - 1.0 + e) * z + (1.0 - e - aT * e)) / ((z - 1.0) * (z - e));
  double complex w = (2.0 / T_S) * (z - 1.0) / (z + 1.0);
  double complex c = 2.5 * (1.0 + w / 10.0) / (1.0 + w / 80.0);
  return g * c / z;
}

static void
test_pipeline_against_closed_form (void **state)
{
  g_autoptr (LwDesign) d = slider_design ();
  g_autoptr (LwVariantEval) e = lw_engine_evaluate_variant (d, 0, NULL, NULL);
  assert_int_equal (e->failure, LW_EVAL_OK);
  assert_non_null (e->ev);
  assert_true (e->ev->margins.has_phase_margin);

  /* |L| = 1 by bisection on ln ω in [1, 300] rad/s (|L| falls through 1 once there) */
  double lo = log (1.0), hi = log (300.0);
  for (int i = 0; i < 200; i++)
    {
      double mid = 0.5 * (lo + hi);
      if (cabs (loop_here (exp (mid))) > 1.0)
        lo = mid;
      else
        hi = mid;
    }
  double wc = exp (0.5 * (lo + hi));
  double pm = 180.0 + carg (loop_here (wc)) * 180.0 / G_PI;
  /* both are refined to full precision: 1e-9 relative in ω and 1e-6° leave room for the
   * rounding of two different formulations (state space vs closed form) */
  if (fabs (e->ev->margins.gain_crossover_rad_s / wc - 1.0) > 1e-9)
    fail_msg ("crossover %.17g, here %.17g", e->ev->margins.gain_crossover_rad_s, wc);
  if (fabs (e->ev->margins.phase_margin_deg - pm) > 1e-6)
    fail_msg ("phase margin %.17g, here %.17g", e->ev->margins.phase_margin_deg, pm);

  /* the simulated reference step is there, and its peak actuator is the achieved one */
  assert_true (e->has_sim);
  assert_true (e->has_achieved);
  assert_true (e->achieved.has_actuator_peak);
  assert_true (e->achieved.actuator_peak == e->actuator_peak);
  /* the controller's first output to the unit step is its direct feedthrough C(z → ∞), which
   * is C(w) at w = 2/T: 2.5·(1 + 1000/10)/(1 + 1000/80) = 18.7037…; the peak is at least that
   * (1e-12 relative: rounding of the mapped coefficients) */
  double u0 = 2.5 * (1.0 + 1000.0 / 10.0) / (1.0 + 1000.0 / 80.0);
  if (!(e->actuator_peak >= u0 * (1.0 - 1e-12)))
    fail_msg ("actuator peak %.17g below C(z→∞) = %.17g", e->actuator_peak, u0);
}

static void
test_failure_places (void **state)
{
  g_autoptr (LwDesign) d = slider_design ();
  lw_design_set_string (&d->plant, "180/(s*(s+12)");
  g_autoptr (LwVariantEval) e1 = lw_engine_evaluate_variant (d, 0, NULL, NULL);
  assert_int_equal (e1->failure, LW_EVAL_FAILED_PLANT);
  assert_true (g_error_matches (e1->error, LW_ENGINE_ERROR, LW_ERR_PARSE));
  assert_true (e1->error_position >= 0);
  assert_null (e1->ev);
  GError *copy = NULL;
  assert_false (lw_variant_eval_ok (e1, &copy));
  assert_true (g_error_matches (copy, LW_ENGINE_ERROR, LW_ERR_PARSE));
  g_error_free (copy);

  lw_design_set_string (&d->plant, "180/(s*(s+12))");
  d->dead_time_s = -1.0;
  g_autoptr (LwVariantEval) e2 = lw_engine_evaluate_variant (d, 0, NULL, NULL);
  assert_int_equal (e2->failure, LW_EVAL_FAILED_SAMPLING);
  assert_int_equal (e2->error_position, -1);

  d->dead_time_s = 0.0;
  d->variants[0].stages[1].p.leadlag.zero_rad_s = -10.0;   /* not a lead any more */
  g_autoptr (LwVariantEval) e3 = lw_engine_evaluate_variant (d, 0, NULL, NULL);
  assert_int_equal (e3->failure, LW_EVAL_FAILED_COMPENSATOR);
  assert_non_null (e3->plant_s);
  assert_null (e3->ev);
}

static void
test_cache_shares_sampled_plant (void **state)
{
  g_autoptr (LwDesign) d = slider_design ();
  LwDesignVariant *v = lw_design_add_variant (d, "other");
  LwStage g = lw_stage_gain (1.0);
  lw_design_variant_add_stage (v, &g);
  LwDesignVariant *f = lw_design_add_variant (d, "faster");
  f->has_period = true;
  f->period_s = T_S / 2;
  lw_design_variant_add_stage (f, &g);

  g_autoptr (LwPlantCache) cache = lw_plant_cache_new ();
  g_autoptr (LwVariantEval) a = lw_engine_evaluate_variant (d, 0, NULL, cache);
  g_autoptr (LwVariantEval) b = lw_engine_evaluate_variant (d, 1, NULL, cache);
  g_autoptr (LwVariantEval) c = lw_engine_evaluate_variant (d, 2, NULL, cache);
  assert_int_equal (c->failure, LW_EVAL_OK);
  assert_ptr_equal (a->sampled, b->sampled);        /* same plant, dead time and period */
  assert_ptr_not_equal (a->sampled, c->sampled);    /* its own period */
  assert_true (c->period_s == T_S / 2);

  /* another plant: a new sampled plant; the old one lives on in the evaluations holding it */
  lw_design_set_string (&d->plant, "180/(s*(s+13))");
  g_autoptr (LwVariantEval) a2 = lw_engine_evaluate_variant (d, 0, NULL, cache);
  assert_ptr_not_equal (a2->sampled, a->sampled);
  assert_true (a->ev->margins.phase_margin_deg != a2->ev->margins.phase_margin_deg);
  assert_true (lw_sampled_plant_period (a->sampled) == T_S);
}

typedef struct
{
  const LwDesign *d;
  LwPlantCache *cache;
  double pm, wc, peak;
} ThreadArgs;

static gpointer
thread_eval (gpointer data)
{
  ThreadArgs *t = data;
  for (int i = 0; i < 20; i++)
    {
      LwVariantEval *e = lw_engine_evaluate_variant (t->d, 0, NULL, t->cache);
      t->pm = e->ev->margins.phase_margin_deg;
      t->wc = e->ev->margins.gain_crossover_rad_s;
      t->peak = e->actuator_peak;
      lw_variant_eval_unref (e);
    }
  return NULL;
}

static void
test_threads_agree (void **state)
{
  g_autoptr (LwDesign) d = slider_design ();
  g_autoptr (LwVariantEval) ref = lw_engine_evaluate_variant (d, 0, NULL, NULL);
  g_autoptr (LwPlantCache) cache = lw_plant_cache_new ();
  ThreadArgs args[4];
  GThread *threads[4];
  for (int i = 0; i < 4; i++)
    {
      args[i] = (ThreadArgs) { d, cache, 0, 0, 0 };
      threads[i] = g_thread_new ("eval", thread_eval, &args[i]);
    }
  for (int i = 0; i < 4; i++)
    {
      g_thread_join (threads[i]);
      /* the same arithmetic on every thread: identical to the last bit */
      assert_true (args[i].pm == ref->ev->margins.phase_margin_deg);
      assert_true (args[i].wc == ref->ev->margins.gain_crossover_rad_s);
      assert_true (args[i].peak == ref->actuator_peak);
    }
}

/* The horizon follows the loop. P(s) = a/(s + a) with a = 0.5 rad/s, T = 1 ms, no
 * computation delay, unity gain: the ZOH equivalent is b/(z − e) with e = e^{−aT}, b = 1 − e
 * (first-order ZOH equivalent, Franklin, Powell & Workman, from memory, and rederived as
 * (1 − z⁻¹) Z{a/(s(s + a))}); the closed loop b/(z − p), p = 2e − 1, steps as
 * y_k = ½ (1 − p^k). It enters the ±2 % band of ½ for good at the first k with p^k <= 0.02,
 * k = ⌈ln 0.02 / ln p⌉ = 3912, far beyond the 500 samples of the default; the settling time
 * must be found, within one sample (the figures interpolate between samples). */
static void
test_horizon_follows_loop (void **state)
{
  (void) state;
  const double a = 0.5, T = 0.001;
  LwDesign *d = lw_design_new ("0.5/(s+0.5)", T);
  d->compute_delay = 0;
  g_autoptr (LwVariantEval) e = lw_engine_evaluate_variant (d, 0, NULL, NULL);
  assert_int_equal (e->failure, LW_EVAL_OK);
  double p = 2.0 * exp (-a * T) - 1.0;
  double k_settle = ceil (log (0.02) / log (p));
  assert_true (e->ev->step.n > (size_t) k_settle);
  assert_true (e->step.has_settling);
  assert_true (fabs (e->step.settling_time_s - k_settle * T) <= T);
  /* the last sample against the closed form, to 1e-9 (the state-space step against the
   * formula: rounding only) */
  double k_last = (double) (e->step.n - 1);
  assert_true (fabs (e->step.samples[e->step.n - 1] - 0.5 * (1.0 - pow (p, k_last))) < 1e-9);
  /* a horizon given is kept as given */
  LwEngineOptions o;
  lw_engine_options_init (&o);
  o.n_steps = 600;
  g_autoptr (LwVariantEval) e2 = lw_engine_evaluate_variant (d, 0, &o, NULL);
  assert_int_equal (e2->ev->step.n, 600);
  assert_false (e2->step.has_settling);
  lw_design_free (d);
}

/* A real w-plane pole at a maps by Tustin to z = (1 − aT/2)/(1 + aT/2) (the bilinear map,
 * Franklin, Powell & Workman): a = 3000 rad/s at T = 2 ms gives z = −0.5, at the limit, so
 * it is flagged with that pole (1e-12: the map is exact up to rounding); a = 3500 gives
 * z = −0.5556, flagged; a = 500 gives z = 1/3, not flagged. */
static void
test_ringing_pole (void **state)
{
  (void) state;
  const double T = 0.002;
  const double cases[][2] = { { 3000.0, -0.5 }, { 3500.0, -2.5 / 4.5 }, { 500.0, NAN } };
  for (size_t i = 0; i < G_N_ELEMENTS (cases); i++)
    {
      LwStage st = lw_stage_real_pole (cases[i][0]);
      LwModel *cz = NULL;
      assert_int_equal (lw_compensator_z (&st, 1, T, &cz, NULL), LW_OK);
      double pole = 0.0;
      gboolean rings = lw_engine_ringing_pole (cz, &pole);
      assert_int_equal (rings, !isnan (cases[i][1]));
      if (rings)
        assert_true (fabs (pole - cases[i][1]) < 1e-12);
      lw_model_free (cz);
    }
}

static void
test_verdicts (void **state)
{
  g_autoptr (LwDesign) d = slider_design ();
  g_autoptr (LwVariantEval) probe = lw_engine_evaluate_variant (d, 0, NULL, NULL);
  double pm = probe->ev->margins.phase_margin_deg;
  /* one requirement just below the achieved margin, one just above it */
  LwRequirement below = { .kind = LW_REQ_MIN_PHASE_MARGIN, .limit = pm - 0.5 };
  LwRequirement above = { .kind = LW_REQ_MIN_PHASE_MARGIN, .limit = pm + 0.5 };
  lw_design_add_requirement (d, NULL, &below);
  lw_design_add_requirement (d, NULL, &above);
  g_autoptr (LwVariantEval) e = lw_engine_evaluate_variant (d, 0, NULL, NULL);
  assert_int_equal (e->n_requirements, 2);
  assert_int_equal (e->requirements[0].status, LW_REQ_PASS);
  assert_int_equal (e->requirements[1].status, LW_REQ_FAIL);
  assert_int_equal (e->n_not_passing, 1);
  assert_string_equal (lw_req_status_word (e->requirements[1].status), "fail");

  /* the sampling advice: the rule of 10 to 30 samples per rise time */
  LwStep s = { .has_rise = true, .rise_time_s = 5 * T_S };
  double per_rise;
  assert_int_equal (lw_engine_sampling_advice (&s, T_S, &per_rise), LW_SAMPLING_ADVICE_TOO_FEW);
  assert_true (fabs (per_rise - 5.0) < 1e-12);
  s.rise_time_s = 20 * T_S;
  assert_int_equal (lw_engine_sampling_advice (&s, T_S, NULL), LW_SAMPLING_ADVICE_NONE);
  s.rise_time_s = 40 * T_S;
  assert_int_equal (lw_engine_sampling_advice (&s, T_S, NULL), LW_SAMPLING_ADVICE_TOO_MANY);
}

/* A variant's actuator (its <actuator> element) limits every simulation of it: the applied
 * u never leaves [low, high] (clipping is exact, so no tolerance) and some samples sit at the
 * limit, where the unlimited loop's first sample is far above it: u[0] = C(z → ∞)·e[0] with
 * e[0] = 1, and z → ∞ is w = 2/T = 1000 rad/s, so C = 2.5 (1 + 100)/(1 + 12.5) = 18.7037…
 * (Tustin's map, worked by hand; 1e-9 relative for the rounding of the realization). Limits
 * the caller gives take the place of the variant's. */
static void
test_variant_actuator (void **state)
{
  (void) state;
  g_autoptr (LwDesign) d = slider_design ();
  g_autoptr (LwVariantEval) free_run = lw_engine_evaluate_variant (d, 0, NULL, NULL);
  assert_false (free_run->sim_options.has_limits);
  const double u0 = 2.5 * 101.0 / 13.5;
  if (!(fabs (free_run->actuator_peak - u0) < 1e-9 * u0))
    fail_msg ("unlimited peak %.17g, expected %.17g", free_run->actuator_peak, u0);

  d->variants[0].has_actuator = true;
  d->variants[0].u_low = -5.0;
  d->variants[0].u_high = 5.0;
  d->variants[0].anti_windup = true;
  g_autoptr (LwVariantEval) e = lw_engine_evaluate_variant (d, 0, NULL, NULL);
  assert_true (e->sim_options.has_limits && e->sim_options.anti_windup);
  assert_true (e->sim_options.u_low == -5.0 && e->sim_options.u_high == 5.0);
  assert_non_null (e->sim_ref);
  for (size_t k = 0; k < e->sim_ref->n; k++)
    assert_true (e->sim_ref->u[k] >= -5.0 && e->sim_ref->u[k] <= 5.0);
  assert_true (e->sim_ref->n_saturated > 0);
  assert_true (e->actuator_peak == 5.0);

  LwEngineOptions o;
  lw_engine_options_init (&o);
  o.sim.has_limits = true;
  o.sim.u_low = -100.0;
  o.sim.u_high = 100.0;
  g_autoptr (LwVariantEval) wide = lw_engine_evaluate_variant (d, 0, &o, NULL);
  assert_true (wide->sim_options.u_high == 100.0 && !wide->sim_options.anti_windup);
  assert_int_equal (wide->sim_ref->n_saturated, 0);
  assert_true (fabs (wide->actuator_peak - u0) < 1e-9 * u0);

  /* a reference step of 0.1 (output units) with the same ±5 limits: u peaks at 0.1·u0 = 1.87,
   * inside the limits, so the loop stays linear and y in units of r is the unit step's
   * (superposition; 1e-12 absolute for rounding in the simulation), u one tenth of it */
  d->variants[0].reference_step = 0.1;
  g_autoptr (LwVariantEval) small = lw_engine_evaluate_variant (d, 0, NULL, NULL);
  assert_true (small->reference_step == 0.1);
  assert_int_equal (small->sim_ref->n_saturated, 0);
  assert_true (fabs (small->actuator_peak - 0.1 * u0) < 1e-9 * u0);
  assert_int_equal (small->sim_ref->n, free_run->sim_ref->n);
  for (size_t k = 0; k < small->sim_ref->n; k++)
    if (!(fabs (small->sim_ref->y[k] - free_run->sim_ref->y[k]) < 1e-12))
      fail_msg ("y[%zu] in units of r: %.17g with a step of 0.1, %.17g with a unit step", k,
                small->sim_ref->y[k], free_run->sim_ref->y[k]);
  /* the figures are the linear loop's, as without limits (1e-9 percentage points: the two
   * responses differ only by the rounding above) */
  assert_true (fabs (small->step.overshoot_pct - free_run->step.overshoot_pct) < 1e-9);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_pipeline_against_closed_form),
    cmocka_unit_test (test_failure_places),
    cmocka_unit_test (test_cache_shares_sampled_plant),
    cmocka_unit_test (test_threads_agree),
    cmocka_unit_test (test_verdicts),
    cmocka_unit_test (test_horizon_follows_loop),
    cmocka_unit_test (test_ringing_pole),
    cmocka_unit_test (test_variant_actuator),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
