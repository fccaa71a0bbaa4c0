/* test-evaluate — the sampled loop: step response, margins, every crossover, closed loop.
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
#include "lw-internal.h"

/* Evaluates plant (in s) with a controller in w (or z when ctrl_in_z). */
static LwEvaluation *
run (const char *plant, double t, double tau, int n_delay, const char *ctrl, bool ctrl_in_z,
     size_t steps)
{
  LwModel *p = parse (plant, LW_DOMAIN_S, 0);
  LwModel *c = parse (ctrl, ctrl_in_z ? LW_DOMAIN_Z : LW_DOMAIN_W, t);
  LwModel *cz = ctrl_in_z ? lw_model_copy (c) : lw_model_w_to_z (c);
  LwSampledPlant *sp = NULL;
  LwError err;
  if (lw_sampled_plant_new (p, tau, t, &sp, &err) != LW_OK)
    fail_msg ("discretize: %s", err.message);
  LwAnalysisOptions o;
  lw_analysis_options_init (&o);
  o.compute_delay = n_delay;
  o.n_steps = steps;
  LwEvaluation *ev = NULL;
  if (lw_evaluate (sp, cz, &o, &ev, &err) != LW_OK)
    fail_msg ("evaluate: %s", err.message);
  lw_sampled_plant_free (sp);
  lw_model_free (p);
  lw_model_free (c);
  lw_model_free (cz);
  return ev;
}

/* Unity-feedback step of the ZOH of 1/(s(s+1)), T = 1 s, no computation delay:
 * 0, 0.3679, 1.0000, 1.3996, 1.3996, 1.1470, 0.8944, 0.8015 (Ogata, Discrete-Time Control
 * Systems, 2nd ed.; from memory, to 4 decimals) — tolerance 5e-5, half a unit of the 4th
 * decimal. */
static void
test_step_ogata (void **state)
{
  (void) state;
  LwEvaluation *ev = run ("1/(s*(s+1))", 1.0, 0.0, 0, "1", false, 60);
  const double book[] = { 0, 0.3679, 1.0000, 1.3996, 1.3996, 1.1470, 0.8944, 0.8015 };
  for (size_t k = 0; k < 8; k++)
    assert_close (ev->step.samples[k], book[k], 5e-5, "Ogata step sample");
  /* closed-loop poles: z² − z + 0.6321 = 0 (the characteristic equation of the same example:
   * (z−1)(z−e⁻¹) + e⁻¹z + 1 − 2e⁻¹ = z² − z + (1 − e⁻¹)); exact, tolerance 1e-13 */
  assert_true (ev->stable);
  assert_int_equal (ev->n_closed_loop_poles, 2);
  double want_re = 0.5, want_im = sqrt ((1 - exp (-1.0)) - 0.25);
  for (size_t i = 0; i < 2; i++)
    {
      assert_close (creal (ev->closed_loop_poles[i]), want_re, 1e-13, "pole re");
      assert_close (fabs (cimag (ev->closed_loop_poles[i])), want_im, 1e-13, "pole im");
    }
  assert_true (ev->step.has_final);
  assert_close (ev->step.final_value, 1.0, 1e-12, "type-1 loop: final value 1");
  /* the Nyquist point: L(−1) = e⁻¹(−1 + 0.7183)/((−2)(−1.3679)) < 0, a phase crossover exactly
   * at π/T with GM = −20 log10 |L(−1)| (exact expression, tolerance 1e-12 dB) */
  double e1 = exp (-1.0);
  double lnyq = fabs ((-e1 + (1 - 2 * e1)) / (-2.0 * (-1.0 - e1)));
  bool found = false;
  for (size_t i = 0; i < ev->margins.n_phase_crossovers; i++)
    if (ev->margins.phase_crossovers_rad_s[i] == LW_PI)
      {
        found = true;
        assert_close (ev->margins.gain_margins_db[i], -20 * log10 (lnyq), 1e-12, "GM at Nyquist");
      }
  assert_true (found);
  lw_evaluation_free (ev);
}

/* Exact second-order phase margin PM(ζ) = atan(2ζ / sqrt(sqrt(1 + 4ζ⁴) − 2ζ²)) at
 * ν_c = ω_n sqrt(sqrt(1 + 4ζ⁴) − 2ζ²) (Franklin, Powell & Emami-Naeini, Feedback Control of
 * Dynamic Systems): ζ = 0.5 → 51.83°, ζ = 0.7 → 65.16°. The loop ω_n²/(w(w + 2ζω_n)) is put in
 * the w-plane (static plant, no computation delay), where L(jν) is exactly that, so PM is exact
 * and the crossover ω is the unwarped ν. Tolerances: 1e-9° and 1e-12 relative in ω (refined
 * roots); the book's two decimals to 0.005°. */
static void
test_second_order_pm (void **state)
{
  (void) state;
  const double zetas[] = { 0.5, 0.7, 0.2, 1.0 };
  const double book[] = { 51.83, 65.16, NAN, NAN };
  const double wn = 10.0, t = 0.01;
  for (size_t k = 0; k < 4; k++)
    {
      double z = zetas[k];
      char ctrl[128];
      snprintf (ctrl, sizeof ctrl, "%.17g/(w*(w+%.17g))", wn * wn, 2 * z * wn);
      LwEvaluation *ev = run ("1", t, 0.0, 0, ctrl, false, 10);
      double r = sqrt (sqrt (1 + 4 * pow (z, 4)) - 2 * z * z);
      double pm = atan (2 * z / r) * 180 / LW_PI, nu = wn * r;
      assert_int_equal (ev->margins.n_gain_crossovers, 1);
      assert_true (ev->margins.has_phase_margin);
      assert_close (ev->margins.phase_margin_deg, pm, 1e-9, "PM(zeta)");
      if (!isnan (book[k]))
        assert_close (ev->margins.phase_margin_deg, book[k], 0.005, "book PM");
      assert_close (ev->margins.gain_crossover_rad_s, lw_warp_nu_to_omega (nu, t),
                    1e-12 * nu, "crossover");
      /* delay margin = PM(rad)/ω_c by definition (docs/conventions.md) */
      assert_close (ev->margins.delay_margin_s,
                    pm * LW_PI / 180 / ev->margins.gain_crossover_rad_s, 1e-12, "delay margin");
      lw_evaluation_free (ev);
    }
}

/* A loop whose resonance lifts |L| above 1 again: three gain crossovers. Each must satisfy
 * |L| = 1 to 1e-12 (refined, not grid values), ascending and distinct; the sensitivity peak must
 * be no lower than the largest |1/(1+L)| on an independent dense scan (1e-12 relative), and the
 * delay margin the minimum over the crossovers of the turn that puts L on −1: PM/ω, or
 * (PM + 360°)/ω where PM < 0 (docs/conventions.md). */
static void
test_every_crossover (void **state)
{
  (void) state;
  const double t = 0.001;
  /* invented: a stiff axis with a lightly damped mode at 300 rad/s */
  const char *plant = "2000*90000/(s*(s+50)*(s^2+6*s+90000))";
  LwEvaluation *ev = run (plant, t, 0.0, 1, "1", false, 10);
  const LwMargins *m = &ev->margins;
  assert_int_equal (m->n_gain_crossovers, 3);
  LwModel *p = parse (plant, LW_DOMAIN_S, 0);
  LwSampledPlant *sp = NULL;
  assert_int_equal (lw_sampled_plant_new (p, 0, t, &sp, NULL), LW_OK);
  double dm = INFINITY;
  for (size_t i = 0; i < m->n_gain_crossovers; i++)
    {
      double w = m->gain_crossovers_rad_s[i];
      double complex l = lw_sampled_plant_response (sp, w) * cexp (-I * w * t);
      assert_close (cabs (l), 1.0, 1e-12, "|L| at a gain crossover");
      if (i > 0)
        assert_true (w > m->gain_crossovers_rad_s[i - 1] * (1 + 1e-9));
      double turn = m->phase_margins_deg[i];
      turn += turn < 0 ? 360 : 0;
      dm = fmin (dm, turn * LW_PI / 180 / w);
      /* PM from the independently computed L, wrapped as documented */
      double pm = 180 + carg (l) * 180 / LW_PI;
      pm -= 360 * ceil ((pm - 180) / 360);
      assert_close (m->phase_margins_deg[i], pm, 1e-9, "PM per crossover");
    }
  double smax = 0;
  for (double w = 0.01; w < LW_PI / t; w *= 1.0002)
    {
      double complex l = lw_sampled_plant_response (sp, w) * cexp (-I * w * t);
      smax = fmax (smax, 1 / cabs (1 + l));
    }
  assert_true (m->has_sensitivity);
  assert_true (m->sensitivity_peak >= smax * (1 - 1e-12));
  assert_true (m->sensitivity_peak <= smax * 1.01);  /* dense scan steps 2e-4: within 1 % */
  assert_true (ev->stable);
  assert_close (m->delay_margin_s, dm, 1e-15, "delay margin = min turn/w");
  lw_sampled_plant_free (sp);
  lw_model_free (p);
  lw_evaluation_free (ev);
}

/* Order 10 with poles clustered near z = 1 (T = 0.01 s, modes 20–80 rad/s) — the standard
 * benchmark plant — against the order-2 plant it reduces to at low frequency: the gain crossover
 * count stays 1 (no spurious crossings from cancellation), |L| = 1 there to 1e-12, and every
 * phase crossover has ∠L = −180° (mod 360) to 1e-9°. Extended-precision agreement is checked by
 * tests/reference/ref_mpmath.py. */
static void
test_high_order_clustered (void **state)
{
  (void) state;
  const double t = 0.01;
  const char *ctrl = "50*(w+0.2)*(w+2)*(w+4)/(w*(w+20)*(w+40))";
  const char *p10 = "3*400*1600*3600*6400/(s*(s^2+12*s+400)*(s^2+24*s+1600)*(s^2+36*s+3600)"
                    "*(s^2+48*s+6400)*(s+3))";
  LwEvaluation *ev = run (p10, t, 0, 1, ctrl, false, 2000);
  LwEvaluation *ev2 = run ("3/(s*(s+3))", t, 0, 1, ctrl, false, 2000);
  assert_int_equal (ev->margins.n_gain_crossovers, 1);
  assert_int_equal (ev2->margins.n_gain_crossovers, 1);
  LwModel *p = parse (p10, LW_DOMAIN_S, 0);
  LwModel *cw = parse (ctrl, LW_DOMAIN_W, t), *cz = lw_model_w_to_z (cw);
  LwSampledPlant *sp = NULL;
  assert_int_equal (lw_sampled_plant_new (p, 0, t, &sp, NULL), LW_OK);
  double w = ev->margins.gain_crossovers_rad_s[0];
  double complex l = lw_sampled_plant_response (sp, w) * lw_model_eval (cz, cexp (I * w * t))
                     * cexp (-I * w * t);
  assert_close (cabs (l), 1.0, 1e-12, "|L| = 1");
  for (size_t i = 0; i < ev->margins.n_phase_crossovers; i++)
    {
      double wp = ev->margins.phase_crossovers_rad_s[i];
      double complex lp = lw_sampled_plant_response (sp, wp) * lw_model_eval (cz, cexp (I * wp * t))
                          * cexp (-I * wp * t);
      double ph = carg (lp) * 180 / LW_PI;
      assert_close (fabs (ph), 180.0, 1e-9, "phase at a phase crossover");
    }
  assert_true (ev->stable == (ev->margins.phase_margin_deg > 0));
  lw_sampled_plant_free (sp);
  lw_model_free (p);
  lw_model_free (cw);
  lw_model_free (cz);
  lw_evaluation_free (ev);
  lw_evaluation_free (ev2);
}

/* Dead time. Whole samples: z^−d exactly, so the gain crossover stays and the phase margin drops
 * by ω_c·τ (|e^{−jωτ}| = 1; 1e-9°); the closed-loop step stays exactly 0 until sample
 * N + d + 1 (the ZOH plant is strictly proper: one sample, plus d, plus the computation delay N),
 * and the closed loop has d more poles. A fraction of a sample is not exactly e^{−jωθ} on the sampled loop: the ZOH's
 * aliased images turn with θ differently from the baseband term (modified z-transform), so the
 * same relations hold only to the size of the images, ~1e-5 of the baseband at ωT = 0.07 for this
 * plant (|G(j2π/T)|/|G(jω_c)| · ωT/2π); tolerances 1e-4 relative and 0.01°. */
static void
test_dead_time (void **state)
{
  (void) state;
  const double t = 0.05;
  LwEvaluation *a = run ("4/(s*(s+2))", t, 0.0, 1, "0.8", false, 80);
  LwEvaluation *b = run ("4/(s*(s+2))", t, 3 * t, 1, "0.8", false, 80);
  LwEvaluation *c = run ("4/(s*(s+2))", t, 1.37 * t, 1, "0.8", false, 80);
  assert_int_equal (a->margins.n_gain_crossovers, 1);
  double wc = a->margins.gain_crossovers_rad_s[0];
  assert_close (b->margins.gain_crossovers_rad_s[0], wc, 1e-12 * wc, "same crossover (3T)");
  assert_close (c->margins.gain_crossovers_rad_s[0], wc, 1e-4 * wc, "about the same crossover (1.37T)");
  assert_close (b->margins.phase_margin_deg, a->margins.phase_margin_deg - wc * 3 * t * 180 / LW_PI,
                1e-9, "PM minus w*tau (3T)");
  assert_close (c->margins.phase_margin_deg,
                a->margins.phase_margin_deg - wc * 1.37 * t * 180 / LW_PI, 0.01,
                "PM minus w*tau (1.37T)");
  for (size_t k = 0; k < 5; k++)
    assert_true (b->step.samples[k] == 0.0);
  assert_true (b->step.samples[5] > 0.0);
  assert_true (a->step.samples[1] == 0.0 && a->step.samples[2] > 0.0);
  assert_int_equal (b->n_closed_loop_poles, a->n_closed_loop_poles + 3);
  /* plant_z carries the three whole samples as poles at 0 */
  assert_int_equal (b->plant_z->n_poles, a->plant_z->n_poles + 3);
  lw_evaluation_free (a);
  lw_evaluation_free (b);
  lw_evaluation_free (c);
}

/* Step figures on a known second-order response: the closed loop of the w-plane loop
 * ω_n²/(w(w+2ζω_n)) sampled fast approximates the continuous standard second-order system, whose
 * overshoot is 100·exp(−πζ/√(1−ζ²)) = 16.30 % at ζ = 0.5 (standard formula, e.g. Ogata, Modern
 * Control Engineering). The Tustin image of the standard system differs from it by O((ω_n T)²) at
 * tolerance 0.05 percentage points. */
static void
test_step_figures (void **state)
{
  (void) state;
  const double t = 0.001, wn = 10.0, zeta = 0.5;
  char ctrl[128];
  snprintf (ctrl, sizeof ctrl, "%.17g/(w*(w+%.17g))", wn * wn, 2 * zeta * wn);
  LwEvaluation *ev = run ("1", t, 0, 0, ctrl, false, 3000);
  assert_true (ev->step.has_final);
  assert_close (ev->step.final_value, 1.0, 1e-12, "final");
  assert_true (ev->step.has_overshoot);
  double os = 100 * exp (-LW_PI * zeta / sqrt (1 - zeta * zeta));
  assert_close (ev->step.overshoot_pct, os, 0.05, "overshoot");
  /* rise (10–90 %) and 2 % settling of the continuous standard system, from its closed-form step
   * y(t) = 1 − e^{−ζω_n t}(cos ω_d t + ζ/√(1−ζ²) sin ω_d t) (same textbook), scanned at 1e-5 s.
   * Tolerance: 2 ms (two samples: interpolation between samples plus the warping) */
  double wd = wn * sqrt (1 - zeta * zeta), t10 = -1, t90 = -1, ts = 0;
  for (double tt = 0; tt < 3.0; tt += 1e-5)
    {
      double y = 1 - exp (-zeta * wn * tt) * (cos (wd * tt) + zeta / sqrt (1 - zeta * zeta)
                                                * sin (wd * tt));
      if (t10 < 0 && y >= 0.1)
        t10 = tt;
      if (t90 < 0 && y >= 0.9)
        t90 = tt;
      if (fabs (y - 1) > 0.02)
        ts = tt;
    }
  assert_true (ev->step.has_rise);
  assert_close (ev->step.rise_time_s, t90 - t10, 0.002, "rise");
  assert_true (ev->step.has_settling);
  assert_close (ev->step.settling_time_s, ts, 0.002, "settling");
  lw_evaluation_free (ev);
}

/* Unstable loop: reported unstable, no final value and no delay margin (it is the delay that
 * destabilizes a stable loop), phase margin still found and negative. */
/* An algebraic loop (no delay, 1 + C(∞)·P(∞) = 0) is refused with LW_ERR_INVALID and a message;
 * its error path once freed the closed-loop matrices twice (issue 11; ASan would report it). */
static void
test_algebraic_loop (void **state)
{
  (void) state;
  LwModel *p = parse ("1", LW_DOMAIN_S, 0);
  LwModel *cz = parse ("-1", LW_DOMAIN_Z, 0.002);
  LwSampledPlant *sp = NULL;
  LwError err;
  assert_int_equal (lw_sampled_plant_new (p, 0.0, 0.002, &sp, &err), LW_OK);
  LwAnalysisOptions o;
  lw_analysis_options_init (&o);
  o.compute_delay = 0;
  LwEvaluation *ev = NULL;
  assert_int_equal (lw_evaluate (sp, cz, &o, &ev, &err), LW_ERR_INVALID);
  assert_null (ev);
  assert_non_null (strstr (err.message, "algebraic loop"));
  /* the same loop with one sample of computation delay is fine: L = −z⁻¹, closed-loop pole
   * z = −1 → on the unit circle, so not stable (exact) */
  o.compute_delay = 1;
  assert_int_equal (lw_evaluate (sp, cz, &o, &ev, &err), LW_OK);
  assert_false (ev->stable);
  lw_evaluation_free (ev);
  lw_sampled_plant_free (sp);
  lw_model_free (p);
  lw_model_free (cz);
}

/* The two ways to decide stability agree: eigenvalues of the closed-loop state space (every
 * pole) and the Nyquist count with the dominant poles (used above max_full_order), forced here on
 * loops small enough for both. Seeded random loops: plants of order 1–4 (real poles, lightly
 * damped and undamped pairs, one and two integrators, an unstable pole, a right-half-plane
 * zero), dead time 0–60 samples with a fraction, computation delay 0–2, a PI, a lead, a gain,
 * a resonant controller (poles on the unit circle) or one with poles at z = 1 and z = −1, with
 * a random gain — more than half of them unstable. (A run of 3000 such loops passed.) Checks (an independent method each time, no reference values):
 * - the count of poles with |z| >= 1 − 1e-10 is the same, except where an eigenvalue lies within
 *   1e-7 of that bound (either answer is right to the eigenvalues' accuracy);
 * - every dominant pole is an eigenvalue to 1e-8 relative (dgeev's backward error on these
 *   well-separated simple roots is ~1e-14·‖A‖; 1e-8 leaves room for their conditioning);
 * - the eigenvalue of largest modulus is among the dominant poles (1e-8);
 *   where a pole lies within 1e-7 of the bound — in these loops a pole beside a controller
 *   pole at z = ±1 that a plant zero nearly cancels, whose position is ill-conditioned
 *   (sensitivity ~ 1/separation; the eigenvalues and Newton then agree to ~1e-8 only) — 1e-6,
 *   and the largest one need not be found;
 * - the final value agrees to 1e-9 (one- vs N-sample delay in the DC solve: rounding only). */
static void
cross_check_loops (unsigned seed, int trials, int max_dead)
{
  srand (seed);
  const char *plants[] = { "1/(s+1)", "2/((s+1)*(0.2*s+1))", "1/(s*(s+1))",
                           "4/(s^2+0.4*s+4)", "1/((s-0.5)*(s+3))", "3/((s+0.5)*(s^2+s+9))",
                           "1/(s^2+1)", "0.1/s^2", "(s+2)/(s*(s^2+0.01*s+25))",
                           "(s-1)/((s+1)*(s+2))" };
  const char *ctrl_tail[] = { "*(z-0.95)/(z-1)", "*(z-0.9)/(z-0.6)", "",
                              "*(z^2-1.9*z+0.95)/(z^2-1.96*z+1)", "*(z-0.9)^2/((z-1)*(z+1))" };
  int n_loops = 0, n_unstable = 0, n_near = 0;
  for (int trial = 0; trial < trials; trial++)
    {
      double t = 0.02 + 0.1 * (rand () / (double) RAND_MAX);
      int ip = rand () % 10, ic = rand () % 5;
      double gain = exp (-3.0 + 4.0 * (rand () / (double) RAND_MAX));
      double tau = t * ((double) (rand () % (max_dead + 1)) + 0.5 * (rand () % 2));
      int n_delay = rand () % 3;
      char ctrl[64];
      snprintf (ctrl, sizeof ctrl, "%g%s", gain, ctrl_tail[ic]);
      LwModel *p = parse (plants[ip], LW_DOMAIN_S, 0);
      LwModel *cz = parse (ctrl, LW_DOMAIN_Z, t);
      LwSampledPlant *sp = NULL;
      LwError err;
      assert_int_equal (lw_sampled_plant_new (p, tau, t, &sp, &err), LW_OK);
      LwAnalysisOptions o;
      lw_analysis_options_init (&o);
      o.compute_delay = n_delay;
      o.n_steps = 50;
      LwEvaluation *full = NULL, *nyq = NULL;
      o.max_full_order = 2000;
      if (lw_evaluate (sp, cz, &o, &full, &err) != LW_OK)
        fail_msg ("full: %s", err.message);
      o.max_full_order = 0;
      if (lw_evaluate (sp, cz, &o, &nyq, &err) != LW_OK)
        fail_msg ("Nyquist (%s, %s, tau %g, T %g): %s", plants[ip], ctrl, tau, t, err.message);
      assert_true (full->closed_loop_poles_complete);
      assert_int_equal (full->n_closed_loop_poles, full->closed_loop_order);
      assert_int_equal (nyq->closed_loop_order, full->closed_loop_order);
      if (nyq->closed_loop_order == full->n_closed_loop_poles && sp->whole_delay + n_delay == 0)
        {
          /* no delay: the full path is always taken */
          lw_evaluation_free (full);
          lw_evaluation_free (nyq);
          lw_sampled_plant_free (sp);
          lw_model_free (p);
          lw_model_free (cz);
          continue;
        }
      assert_false (nyq->closed_loop_poles_complete);
      n_loops++;
      bool near = false;
      double rmax = 0.0;
      double complex zmax = 0.0;
      for (size_t i = 0; i < full->n_closed_loop_poles; i++)
        {
          double complex z = full->closed_loop_poles[i];
          near |= fabs (cabs (z) - (1.0 - 1e-10)) < 1e-7;
          if (cabs (z) > rmax)
            rmax = cabs (z), zmax = z;
        }
      n_near += near;
      n_unstable += !full->stable;
      if (!near)
        {
          if (nyq->n_closed_loop_unstable != full->n_closed_loop_unstable)
            fail_msg ("%s, C = %s, tau %g, T %g, N %d: Nyquist %zu unstable poles, eigenvalues %zu",
                      plants[ip], ctrl, tau, t, n_delay, nyq->n_closed_loop_unstable,
                      full->n_closed_loop_unstable);
          assert_true (nyq->stable == full->stable);
        }
      assert_true (nyq->n_closed_loop_poles > 0);
      bool have_max = false;
      for (size_t k = 0; k < nyq->n_closed_loop_poles; k++)
        {
          double complex z = nyq->closed_loop_poles[k];
          double best = INFINITY;
          for (size_t i = 0; i < full->n_closed_loop_poles; i++)
            best = fmin (best, cabs (full->closed_loop_poles[i] - z));
          if (!(best <= (near ? 1e-6 : 1e-8) * fmax (1.0, cabs (z))))
            fail_msg ("%s, C = %s, tau %g, T %g: dominant pole %.17g%+.17gj is no eigenvalue "
                      "(nearest %g away)", plants[ip], ctrl, tau, t, creal (z), cimag (z), best);
          have_max |= cabs (z - zmax) <= 1e-8 || cabs (z - conj (zmax)) <= 1e-8;
        }
      if (!have_max && !near)
        fail_msg ("%s, C = %s, tau %g, T %g: the largest pole %.17g%+.17gj is not among the "
                  "dominant ones", plants[ip], ctrl, tau, t, creal (zmax), cimag (zmax));
      assert_true (nyq->step.has_final == full->step.has_final);
      if (full->step.has_final)
        assert_close (nyq->step.final_value, full->step.final_value, 1e-9, "final value");
      for (size_t k = 0; k < 50; k++)
        assert_true (nyq->step.samples[k] == full->step.samples[k]);
      lw_evaluation_free (full);
      lw_evaluation_free (nyq);
      lw_sampled_plant_free (sp);
      lw_model_free (p);
      lw_model_free (cz);
    }
  /* the sample must exercise both verdicts */
  print_message ("%d loops, %d unstable, %d with a pole within 1e-7 of the bound\n", n_loops,
                 n_unstable, n_near);
  assert_true (n_loops >= trials / 2 && n_unstable >= trials / 10
               && n_loops - n_unstable >= trials / 10);
}

static void
test_nyquist_matches_eigenvalues (void **state)
{
  (void) state;
  cross_check_loops (20261203, 400, 60);
  /* longer delays (up to 400 samples, orders to ~410): where the unstable plant pole's
   * closed-loop pole sits within 1e-13 of it (z^-D tiny there) and the poles crowd the
   * circle; fewer loops, each eigenvalue problem costs O(order³). (300 loops up to 500
   * samples passed once.) */
  cross_check_loops (5, 16, 400);
}

/* Long delays, beyond every-pole reach (order 20 001), against closed forms.
 * 1. L = b·z^−D (plant 1, dead time D samples): the closed-loop poles solve z^D = −b, all D of
 *    them on |z| = |b|^{1/D}: stable for |b| < 1, and for |b| > 1 all D outside (exact). Each
 *    dominant pole reported must satisfy |z| = b^{1/D} (1e-12) and D·arg z ≡ π mod 2π (1e-6 rad:
 *    D·arg z carries D times the rounding of arg z).
 * 2. The integrator with delay, P = ZOH of 1/s at T = 1 s (1/(z − 1)), gain b, D samples:
 *    z^{D+1} − z^D + b = 0 is stable iff 0 < b < 2 cos(Dπ/(2D + 1)) (S. A. Kuruklis, "The
 *    asymptotic stability of x_{n+1} − a x_n + b x_{n−k} = 0", J. Math. Anal. Appl. 188, 1994;
 *    from memory, and cross-checked against the eigenvalues at D = 50). At 2 % on either side
 *    of the bound: stable, then exactly one pair outside. */
static void
test_long_delay_closed_forms (void **state)
{
  (void) state;
  const int d = 20000;
  const double bs[] = { 0.5, 1.5 };
  for (int i = 0; i < 2; i++)
    {
      char c[32];
      snprintf (c, sizeof c, "%.17g", bs[i]);
      LwEvaluation *ev = run ("1", 1.0, (double) d, 0, c, true, 50);
      assert_int_equal (ev->closed_loop_order, d);
      assert_false (ev->closed_loop_poles_complete);
      assert_true (ev->stable == (bs[i] < 1.0));
      assert_int_equal (ev->n_closed_loop_unstable, bs[i] < 1.0 ? 0 : d);
      assert_true (ev->n_closed_loop_poles > 0 && ev->n_closed_loop_poles <= 32);
      for (size_t k = 0; k < ev->n_closed_loop_poles; k++)
        {
          double complex z = ev->closed_loop_poles[k];
          assert_close (cabs (z), pow (bs[i], 1.0 / d), 1e-12, "|z| = b^(1/D)");
          double a = d * carg (z) - LW_PI;
          assert_close (a - 2.0 * LW_PI * round (a / (2.0 * LW_PI)), 0.0, 1e-6, "D arg z = pi");
        }
      /* the step: nothing reaches the output before the D samples have passed (exact) */
      for (size_t k = 0; k < ev->step.n; k++)
        assert_true (ev->step.samples[k] == 0.0);
      lw_evaluation_free (ev);
    }
  double bound = 2.0 * cos (d * LW_PI / (2.0 * d + 1.0));
  for (int i = 0; i < 2; i++)
    {
      char c[32];
      snprintf (c, sizeof c, "%.17g", (i == 0 ? 0.98 : 1.02) * bound);
      LwEvaluation *ev = run ("1/s", 1.0, (double) d, 0, c, true, 50);
      assert_int_equal (ev->closed_loop_order, d + 1);
      assert_true (ev->stable == (i == 0));
      assert_int_equal (ev->n_closed_loop_unstable, i == 0 ? 0 : 2);
      if (i == 0)
        {
          assert_true (ev->step.has_final);
          assert_close (ev->step.final_value, 1.0, 1e-12, "type-1 loop: final value 1");
        }
      else
        {
          /* the pair outside is the dominant pair */
          assert_true (cabs (ev->closed_loop_poles[0]) > 1.0);
          assert_true (cabs (ev->closed_loop_poles[1]) > 1.0);
        }
      lw_evaluation_free (ev);
    }
}

static void
test_unstable (void **state)
{
  (void) state;
  LwEvaluation *ev = run ("1/(s*(s+1))", 1.0, 0.0, 0, "5", false, 20);
  assert_false (ev->stable);
  assert_false (ev->step.has_final);
  assert_true (ev->margins.has_phase_margin);
  assert_true (ev->margins.phase_margin_deg < 0);
  assert_false (ev->margins.has_delay_margin);
  lw_evaluation_free (ev);
}

/* ---- the frequency-domain figures at the extremes (docs/conventions.md) -------------------- */

/* Reference values below come from tests/reference/lwzoh.py: the ZOH loop by partial fractions
 * in mpmath (50 digits plus those the residues cost, checked against 20 digits more), each
 * crossover by mp.findroot, a sensitivity peak by golden-section search in mpmath. */

/* true when some unresolved band of m contains w */
static bool
in_unresolved_band (const LwMargins *m, double w)
{
  for (size_t i = 0; i < m->n_unresolved_bands; i++)
    if (w >= m->unresolved_bands_rad_s[2 * i] && w <= m->unresolved_bands_rad_s[2 * i + 1])
      return true;
  return false;
}

/* A gain crossover far below the fixed fraction of π/T the grid used to start at: a slow vessel
 * 50/((1000s+1)(100s+1)) sampled at T = 1e-4 s (π/T = 31416 rad/s, crossover 6.8e-7 of it).
 * mpmath: ω_gc = 0.02125898105547635 rad/s, PM = 27.884762471805573°, Ms = 2.29619590729566
 * at 0.02380185058 rad/s. Tolerances: ω_gc 1e-10 relative and PM 1e-7° (the evaluation is good
 * to ~1e-13 here; the crossover's slope is ~1), Ms 1e-9 relative (golden section to 1e-10 in ω
 * on a flat maximum). */
static void
test_low_crossover (void **state)
{
  (void) state;
  LwEvaluation *ev = run ("50/((1000*s+1)*(100*s+1))", 1e-4, 0.0, 1, "1", false, 10);
  const LwMargins *m = &ev->margins;
  assert_int_equal (m->n_gain_crossovers, 1);
  assert_close (m->gain_crossovers_rad_s[0] / 0.02125898105547635, 1.0, 1e-10, "w_gc");
  assert_close (m->phase_margins_deg[0], 27.884762471805573, 1e-7, "PM");
  assert_true (m->has_sensitivity);
  assert_close (m->sensitivity_peak / 2.29619590729566, 1.0, 1e-9, "Ms");
  assert_close (m->sensitivity_peak_rad_s / 0.02380185058, 1.0, 1e-6, "Ms frequency");
  /* the grid starts on the low-frequency asymptote, below the slowest corner 0.001 rad/s */
  assert_true (ev->omega_rad_s[0] <= 0.001 / 10);
  assert_int_equal (m->n_unresolved_bands, 0);
  lw_evaluation_free (ev);
}

/* A long computation delay (200 samples): the delay turns the phase by 0.2 rad per rad/s, and
 * a crossover just below π/T must not fall between grid points. 2/((s+1)(0.1s+1)), T = 1 ms,
 * C(w) = 0.3(w + 0.5)/w. mpmath: phase crossovers at 3102.8922598447003 rad/s (GM
 * 150.70302860663425 dB) and 3137.262825066295 rad/s (GM 167.4213650533038 dB), and L(π/T) =
 * −2.75e-9 (a phase crossover exactly at π/T). Tolerances 1e-9 relative in ω, 1e-7 dB. With
 * 1000 samples the lists stay ascending (docs/cli.md). */
static void
test_long_delay_crossovers (void **state)
{
  (void) state;
  LwEvaluation *ev = run ("2/((s+1)*(0.1*s+1))", 1e-3, 0.0, 200, "0.3*(w+0.5)/w", false, 10);
  const LwMargins *m = &ev->margins;
  size_t np = m->n_phase_crossovers;
  assert_true (np >= 3);
  assert_close (m->phase_crossovers_rad_s[np - 1], LW_PI / 1e-3, 0.0, "pi/T");
  assert_close (m->phase_crossovers_rad_s[np - 2] / 3137.262825066295, 1.0, 1e-9, "w_pc[-2]");
  assert_close (m->gain_margins_db[np - 2], 167.4213650533038, 1e-7, "GM[-2]");
  assert_close (m->phase_crossovers_rad_s[np - 3] / 3102.8922598447003, 1.0, 1e-9, "w_pc[-3]");
  assert_close (m->gain_margins_db[np - 3], 150.70302860663425, 1e-7, "GM[-3]");
  /* one phase crossover per turn of the delay: the phase falls by 0.2·ω rad in total up to
   * π/T, about 200·π/2π = 100 turns, so about 100 crossovers (common practice, no source) */
  assert_true (np > 90 && np < 110);
  lw_evaluation_free (ev);

  ev = run ("2/((s+1)*(0.1*s+1))", 1e-3, 0.0, 1000, "0.3*(w+0.5)/w", false, 10);
  m = &ev->margins;
  for (size_t i = 1; i < m->n_phase_crossovers; i++)
    assert_true (m->phase_crossovers_rad_s[i] > m->phase_crossovers_rad_s[i - 1]);
  for (size_t i = 1; i < m->n_gain_crossovers; i++)
    assert_true (m->gain_crossovers_rad_s[i] > m->gain_crossovers_rad_s[i - 1]);
  assert_true (m->n_phase_crossovers > 450 && m->n_phase_crossovers < 550);
  lw_evaluation_free (ev);
}

/* A zero of L exactly at z = −1: the ZOH of 1/s^4 is T⁴/24·(z³ + 11z² + 11z + 1)/(z − 1)⁴ and
 * z³ + 11z² + 11z + 1 = (z + 1)(z² + 10z + 1) (the Euler–Frobenius polynomial; Åström &
 * Wittenmark, Computer-Controlled Systems, sampling zeros; from memory, checked by expanding).
 * No phase crossover where L is zero (docs/conventions.md), so no gain margin at all; the
 * Nyquist point is marked unresolved. Gain crossover by mpmath on that closed form:
 * 0.17781329874469248 rad/s, PM 177.45301211015757° (tolerances 1e-10 relative, 1e-7°). The
 * same for 1/s^10 (a zero at −1 for every even power): no phase crossover at π/T. */
static void
test_zero_at_nyquist (void **state)
{
  (void) state;
  LwEvaluation *ev = run ("1/s^4", 0.5, 0.0, 0, "0.001", true, 10);
  const LwMargins *m = &ev->margins;
  assert_int_equal (m->n_phase_crossovers, 0);
  assert_false (m->has_gain_margin);
  assert_int_equal (m->n_gain_crossovers, 1);
  assert_close (m->gain_crossovers_rad_s[0] / 0.17781329874469248, 1.0, 1e-10, "w_gc");
  assert_close (m->phase_margins_deg[0], 177.45301211015757, 1e-7, "PM");
  assert_true (in_unresolved_band (m, LW_PI / 0.5));
  /* |L| there is far below −120 dB: no unresolved crossover is counted for it */
  assert_int_equal (m->n_unresolved_phase_crossovers, 0);
  assert_int_equal (m->n_unresolved_gain_crossovers, 0);
  lw_evaluation_free (ev);

  ev = run ("1/s^10", 0.5, 0.0, 0, "0.001", true, 10);
  m = &ev->margins;
  for (size_t i = 0; i < m->n_phase_crossovers; i++)
    assert_true (m->phase_crossovers_rad_s[i] < LW_PI / 0.5 * (1 - 1e-6));
  assert_true (in_unresolved_band (m, LW_PI / 0.5));
  lw_evaluation_free (ev);
}

/* Large dynamic range: 1e30·(s+3)/(eight lightly to well damped pairs), T = 1 ms, |L| spans
 * ~330 dB between ω → 0 and π/T. The state space alone is good to only ~1e-3 at the crossover;
 * the aliasing sum of the factored plant keeps full relative accuracy. mpmath: ω_gc =
 * 105.05104840842944 rad/s, PM −52.388133316451974°; phase crossovers 2.1397807285528778,
 * 9.6118320524419185, 36.391783260761702, 72.59788774126593 rad/s (GM −265.85391036347973,
 * −223.27357762874414, −139.91237921753493, −55.826470058848865 dB) and π/T, where L =
 * −4.4452e-23 (GM 447.04207685632409 dB); the true phase at 2467.55 rad/s is −120.53°, no
 * crossover there. Tolerances: ω 1e-10 relative, PM 1e-7°, GM 1e-7 dB. */
static void
test_large_dynamic_range (void **state)
{
  (void) state;
  LwEvaluation *ev = run ("1e30*(s+3)/((s^2+0.5*s+0.3)*(s^2+2*s+20)*(s^2+5*s+400)*(s^2+8*s+1600)"
                          "*(s^2+20*s+2500)*(s^2+1*s+9)*(s^2+3*s+100)*(s^2+30*s+3600))",
                          1e-3, 0.0, 1, "1", false, 10);
  const LwMargins *m = &ev->margins;
  assert_int_equal (m->n_gain_crossovers, 1);
  assert_close (m->gain_crossovers_rad_s[0] / 105.05104840842944, 1.0, 1e-10, "w_gc");
  assert_close (m->phase_margins_deg[0], -52.388133316451974, 1e-7, "PM");
  const double pc[] = { 2.1397807285528778, 9.6118320524419185, 36.391783260761702,
                        72.59788774126593, LW_PI / 1e-3 };
  const double gm[] = { -265.85391036347973, -223.27357762874414, -139.91237921753493,
                        -55.826470058848865, 447.04207685632409 };
  assert_int_equal (m->n_phase_crossovers, 5);
  for (size_t i = 0; i < 5; i++)
    {
      assert_close (m->phase_crossovers_rad_s[i] / pc[i], 1.0, 1e-10, "w_pc");
      assert_close (m->gain_margins_db[i], gm[i], 1e-7, "GM");
    }
  assert_int_equal (m->n_unresolved_bands, 0);
  lw_evaluation_free (ev);
}

/* The running error bound of the state-space evaluation covers its actual error: at the
 * 50-digit gain crossover of the case above |L| = 1 exactly, and the back substitution's
 * |P(e^{jωT})| misses 1 by ~6.5e-4 (measured); the bound must be at least that and not absurdly
 * larger (at most 100 times: a running bound is a few times pessimistic). */
static void
test_error_bound_covers (void **state)
{
  (void) state;
  LwModel *p = parse ("1e30*(s+3)/((s^2+0.5*s+0.3)*(s^2+2*s+20)*(s^2+5*s+400)*(s^2+8*s+1600)"
                      "*(s^2+20*s+2500)*(s^2+1*s+9)*(s^2+3*s+100)*(s^2+30*s+3600))",
                      LW_DOMAIN_S, 0);
  LwSampledPlant *sp = NULL;
  LwError err;
  assert_int_equal (lw_sampled_plant_new (p, 0.0, 1e-3, &sp, &err), LW_OK);
  double w = 105.05104840842944, e;
  double complex h = lw_schur_eval_unit_err (sp->eval, cos (w * 1e-3), sin (w * 1e-3), &e);
  double actual = fabs (cabs (h) - 1.0);
  assert_true (actual > 1e-5);           /* the case does lose digits in the state space */
  assert_true (e >= actual);
  assert_true (e <= 100.0 * actual);
  /* the aliasing sum: within its own estimate of 1, and that estimate near rounding */
  double ea;
  double complex ha = lw_sampled_plant_alias_eval (sp, w, 1e-13, &ea);
  assert_true (ea < 1e-12);
  assert_close (cabs (ha), 1.0, 1e-12, "|P| at the crossover by the aliasing sum");
  lw_sampled_plant_free (sp);
  lw_model_free (p);
}

/* The sensitivity peak at the end of the range: an unstable plant 2/(s − 1) with C = 5/6, T =
 * 10 ms. The ZOH keeps the DC gain, L(1) = −5/3, so |S| → 1/|1 − 5/3| = 1.5 as ω → 0, and a
 * 3000-point mpmath scan finds nothing larger (max 1.499999999999146 at 1e-6 rad/s). Reported:
 * 1.5 at 0 rad/s, tolerance 1e-12 (one evaluation at z = 1). */
static void
test_sensitivity_at_dc (void **state)
{
  (void) state;
  LwEvaluation *ev = run ("2/(s-1)", 0.01, 0.0, 1, "5/6", true, 10);
  assert_true (ev->stable);
  assert_true (ev->margins.has_sensitivity);
  assert_close (ev->margins.sensitivity_peak, 1.5, 1e-12, "Ms at omega -> 0");
  assert_close (ev->margins.sensitivity_peak_rad_s, 0.0, 0.0, "Ms frequency");
  lw_evaluation_free (ev);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_step_ogata),
    cmocka_unit_test (test_second_order_pm),
    cmocka_unit_test (test_every_crossover),
    cmocka_unit_test (test_high_order_clustered),
    cmocka_unit_test (test_dead_time),
    cmocka_unit_test (test_step_figures),
    cmocka_unit_test (test_unstable),
    cmocka_unit_test (test_algebraic_loop),
    cmocka_unit_test (test_nyquist_matches_eigenvalues),
    cmocka_unit_test (test_long_delay_closed_forms),
    cmocka_unit_test (test_low_crossover),
    cmocka_unit_test (test_long_delay_crossovers),
    cmocka_unit_test (test_zero_at_nyquist),
    cmocka_unit_test (test_large_dynamic_range),
    cmocka_unit_test (test_error_bound_covers),
    cmocka_unit_test (test_sensitivity_at_dc),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
