/* test-measured — the loop on measured data (lw-measured.c) against the model that generated
 * the data: the sampled plant's exact response (the ZOH state space of lw_sampled_plant_new)
 * and the core's margins of the same loop (lw_evaluate, itself checked against textbook
 * examples and scipy in tests/core/test-evaluate.c and tests/reference).
 *
 * Tolerances (the acceptance, and why they hold): at 50 points per decade the
 * interpolation of ln|L| and of the unwrapped phase linear in ln ω errs by about h²/8 times
 * their curvature, h = ln(10)/50 ≈ 0.046, so by ~3e-4 where the curvature is of order 1 —
 * crossovers within 1e-3 relative, margins within 0.1° / 0.1 dB.
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
#include <stdlib.h>
#include <string.h>

#include "lw-analysis.h"
#include "lw-measured.h"

#define PI 3.14159265358979323846

typedef struct {
  LwModel *plant_s;
  LwModel *controller_z;
  LwSampledPlant *sampled;
  LwEvaluation *ev;
  double period_s, dead_time_s;
  int delay;
} Loop;

static void
loop_make (Loop *lp, const char *plant, const char *ctrl_w, double t, double tau, int delay)
{
  memset (lp, 0, sizeof *lp);
  lp->plant_s = parse (plant, LW_DOMAIN_S, 0);
  LwModel *cw = parse (ctrl_w, LW_DOMAIN_W, t);
  lp->controller_z = lw_model_w_to_z (cw);
  lw_model_free (cw);
  lp->period_s = t;
  lp->dead_time_s = tau;
  lp->delay = delay;
  LwError err;
  if (lw_sampled_plant_new (lp->plant_s, tau, t, &lp->sampled, &err) != LW_OK)
    fail_msg ("discretize: %s", err.message);
  LwAnalysisOptions o;
  lw_analysis_options_init (&o);
  o.compute_delay = delay;
  if (lw_evaluate (lp->sampled, lp->controller_z, &o, &lp->ev, &err) != LW_OK)
    fail_msg ("evaluate: %s", err.message);
}

static void
loop_free (Loop *lp)
{
  lw_evaluation_free (lp->ev);
  lw_sampled_plant_free (lp->sampled);
  lw_model_free (lp->plant_s);
  lw_model_free (lp->controller_z);
}

/* ω at ppd points per decade from lo up to below hi */
static size_t
grid (double lo, double hi, double ppd, double *w, size_t cap)
{
  size_t n = 0;
  for (double x = log10 (lo); n < cap; x += 1.0 / ppd)
    {
      double v = pow (10.0, x);
      if (v >= hi)
        break;
      w[n++] = v;
    }
  return n;
}

/* The data's margins against the model's: every model crossover strictly inside the data's
 * range is found, and nothing else. */
static void
compare (const Loop *lp, const double *w, const double complex *p, size_t n, double up_to)
{
  double complex *l = malloc (n * sizeof *l);
  for (size_t i = 0; i < n; i++)
    {
      double complex z = cexp (I * w[i] * lp->period_s);
      l[i] = cpow (z, -lp->delay) * lw_model_eval (lp->controller_z, z) * p[i];
    }
  LwMeasuredMargins mm;
  LwError err;
  assert_int_equal (lw_measured_margins (w, l, NULL, n, &mm, &err), LW_OK);
  const LwMargins *m = &lp->ev->margins;
  size_t k = 0;
  for (size_t i = 0; i < m->n_gain_crossovers; i++)
    {
      double wc = m->gain_crossovers_rad_s[i];
      if (wc <= w[0] || wc >= fmin (w[n - 1], up_to))
        continue;
      while (k < mm.n_gain && mm.gain[k].omega_rad_s < wc * (1 - 1e-3))
        k++;
      if (k == mm.n_gain)
        fail_msg ("gain crossover %.9g rad/s of the model not found in the data", wc);
      assert_close (mm.gain[k].omega_rad_s / wc, 1.0, 1e-3, "gain crossover (relative)");
      assert_close (mm.gain[k].margin, m->phase_margins_deg[i], 0.1, "phase margin (deg)");
      assert_true (mm.gain[k].lo_rad_s <= mm.gain[k].omega_rad_s
                   && mm.gain[k].omega_rad_s <= mm.gain[k].hi_rad_s);
      print_message ("gain crossover %.6g rad/s: data %.6g, PM %.4f° vs %.4f°\n", wc,
                     mm.gain[k].omega_rad_s, m->phase_margins_deg[i], mm.gain[k].margin);
    }
  k = 0;
  size_t found = 0;
  for (size_t i = 0; i < m->n_phase_crossovers; i++)
    {
      double wc = m->phase_crossovers_rad_s[i];
      if (wc <= w[0] || wc >= fmin (w[n - 1], up_to))
        continue;
      while (k < mm.n_phase && mm.phase[k].omega_rad_s < wc * (1 - 1e-3))
        k++;
      if (k == mm.n_phase)
        fail_msg ("phase crossover %.9g rad/s of the model not found in the data", wc);
      assert_close (mm.phase[k].omega_rad_s / wc, 1.0, 1e-3, "phase crossover (relative)");
      assert_close (mm.phase[k].margin, m->gain_margins_db[i], 0.1, "gain margin (dB)");
      print_message ("phase crossover %.6g rad/s: data %.6g, GM %.4f dB vs %.4f dB\n", wc,
                     mm.phase[k].omega_rad_s, m->gain_margins_db[i], mm.phase[k].margin);
      found++;
    }
  assert_true (found > 0);
  /* and no crossover in the data that the model does not have (within the compared range) */
  size_t in_range = 0;
  for (size_t i = 0; i < mm.n_gain; i++)
    in_range += mm.gain[i].hi_rad_s < up_to;
  size_t model_in = 0;
  for (size_t i = 0; i < m->n_gain_crossovers; i++)
    model_in += m->gain_crossovers_rad_s[i] > w[0] && m->gain_crossovers_rad_s[i] < up_to;
  assert_int_equal (in_range, model_in);
  lw_measured_margins_clear (&mm);
  free (l);
}

/* Sampled kind: the data are the ZOH plant's exact response (dead time included), the loop
 * through a lead and the one-sample computation delay. An invented belt axis: an integrator,
 * a lag at 12 rad/s and a resonance at 200 rad/s (ζ = 0.1: at 50 points per decade a resonance is resolved when its width 2ζ spans a few point spacings of 4.7 %), T = 2 ms, 1.3 samples of dead
 * time. */
static void
test_sampled_matches_model (void **state)
{
  (void) state;
  Loop lp;
  loop_make (&lp, "180*40000/(s*(s+12)*(s^2+40*s+40000))", "3.4*(1+w/15)/(1+w/110)", 0.002,
             0.0026, 1);
  static double w[4000];
  static double complex p[4000], pp[4000];
  size_t n = grid (0.1, PI / lp.period_s, 50, w, 4000);
  for (size_t i = 0; i < n; i++)
    p[i] = lw_sampled_plant_response (lp.sampled, w[i]);
  LwMeasured m = { n, w, p, NULL };
  size_t used = 0, bad = 0;
  static double wu[4000];
  LwError err;
  assert_int_equal (lw_measured_sampled_response (&m, LW_MEASURED_SAMPLED, lp.period_s, 0.0, wu,
                                                  pp, &used, &bad, &err), LW_OK);
  assert_int_equal (used, n);
  assert_memory_equal (pp, p, n * sizeof *p);   /* sampled data are the plant as they are */
  compare (&lp, wu, pp, used, INFINITY);
  /* a point above π/T: refused, naming it */
  w[n] = 1.01 * PI / lp.period_s;
  p[n] = 1.0;
  m.n = n + 1;
  assert_int_equal (lw_measured_sampled_response (&m, LW_MEASURED_SAMPLED, lp.period_s, 0.0, wu,
                                                  pp, &used, &bad, &err), LW_ERR_INVALID);
  assert_int_equal (bad, n);
  assert_non_null (strstr (err.message, "Nyquist"));
  loop_free (&lp);
}

/* Continuous kind: the data are G(jω) of the continuous plant; the hold's response and the
 * dead time are applied and the aliasing terms neglected, which is good where the plant has
 * rolled off well before the sample rate — compared below π/(5T) as the issue states. */
static void
test_continuous_matches_model_below_a_fifth (void **state)
{
  (void) state;
  Loop lp;
  loop_make (&lp, "180*40000/(s*(s+12)*(s^2+40*s+40000))", "3.4*(1+w/15)/(1+w/110)", 0.002,
             0.0026, 1);
  static double w[4000], wu[4000];
  static double complex g[4000], pp[4000];
  size_t n = grid (0.1, 3 * PI / lp.period_s, 50, w, 4000);
  for (size_t i = 0; i < n; i++)
    g[i] = lw_model_eval (lp.plant_s, I * w[i]);
  LwMeasured m = { n, w, g, NULL };
  size_t used = 0, bad = 0;
  LwError err;
  assert_int_equal (lw_measured_sampled_response (&m, LW_MEASURED_CONTINUOUS, lp.period_s,
                                                  lp.dead_time_s, wu, pp, &used, &bad, &err),
                    LW_OK);
  assert_true (used < n);   /* the points above π/T dropped */
  assert_true (wu[used - 1] < PI / lp.period_s);
  compare (&lp, wu, pp, used, PI / (5 * lp.period_s));
  loop_free (&lp);
}

/* Small cases by hand: L = 2/(jω)·e^{−jω} (an integrator and a delay of 1 s: |L| = 1 at
 * ω = 2, PM = 90° − 2 rad = −24.59°; phase −180° at ω = π/2, GM = −20 log10(4/π) dB). Data
 * exactly on the crossover point count once. */
static void
test_by_hand (void **state)
{
  (void) state;
  static double w[400];
  static double complex l[400];
  size_t n = grid (0.01, 10, 100, w, 400);
  for (size_t i = 0; i < n; i++)
    l[i] = 2.0 / (I * w[i]) * cexp (-I * w[i]);
  LwMeasuredMargins mm;
  LwError err;
  assert_int_equal (lw_measured_margins (w, l, NULL, n, &mm, &err), LW_OK);
  assert_int_equal (mm.n_gain, 1);
  /* linear in ln ω is exact for ln|L| here (slope −1), and the phase −π/2 − ω is curved:
   * error h²/8·ω²… ≈ 1e-3 rad at ω = 2 with h = ln(10)/100 — 0.1° tolerance */
  assert_close (mm.gain[0].omega_rad_s, 2.0, 1e-12, "gain crossover (exact: log-linear)");
  assert_close (mm.phase_margin_deg, 90.0 - 2.0 * 180.0 / PI, 0.1, "PM");
  assert_true (mm.n_phase >= 1);
  /* the phase −π/2 − ω crosses −π at ω = π/2; the line through two points of a phase that is
   * linear in ω (not ln ω) errs there by h²/8·ω ≈ 3e-4 rad/s with h = ln(10)/100: 2e-3 rad/s;
   * |L| = 2/ω is exact in ln ω, so the gain margin errs only through that ω: 20·log10 of
   * (1 + 2e-3/(π/2)) ≈ 0.011 dB, tolerance 0.02 dB */
  assert_close (mm.phase[0].omega_rad_s, PI / 2, 2e-3, "first phase crossover");
  assert_close (mm.phase[0].margin, -20.0 * log10 (4.0 / PI), 0.02, "GM");
  assert_false (mm.crossover_above_data);
  assert_false (mm.crossover_below_data);
  lw_measured_margins_clear (&mm);

  /* a point exactly at |L| = 1 */
  double w3[3] = { 1.0, 2.0, 4.0 };
  double complex l3[3] = { 2.0 * cexp (-I * 1.0), 1.0 * cexp (-I * 1.2), 0.5 * cexp (-I * 1.4) };
  assert_int_equal (lw_measured_margins (w3, l3, NULL, 3, &mm, &err), LW_OK);
  assert_int_equal (mm.n_gain, 1);
  assert_close (mm.gain[0].omega_rad_s, 2.0, 1e-15, "crossing on a point");
  lw_measured_margins_clear (&mm);

  /* low coherence next to a crossover flags it; the high end above 1 flags a crossover
   * above the data */
  double coh[3] = { 1.0, 0.5, 1.0 };
  double complex l4[3] = { 4.0, 3.0 * cexp (-I * 0.5), 2.0 * cexp (-I * 1.0) };
  assert_int_equal (lw_measured_margins (w3, l3, coh, 3, &mm, &err), LW_OK);
  assert_true (mm.gain[0].low_coherence);
  lw_measured_margins_clear (&mm);
  assert_int_equal (lw_measured_margins (w3, l4, NULL, 3, &mm, &err), LW_OK);
  assert_int_equal (mm.n_gain, 0);
  assert_true (mm.crossover_above_data);
  assert_true (isnan (mm.phase_margin_deg));
  lw_measured_margins_clear (&mm);

  /* refusals: frequencies not increasing, a zero value */
  double wb[3] = { 1.0, 1.0, 2.0 };
  assert_int_equal (lw_measured_margins (wb, l3, NULL, 3, &mm, &err), LW_ERR_INVALID);
  double complex lz[3] = { 1.0, 0.0, 1.0 };
  assert_int_equal (lw_measured_margins (w3, lz, NULL, 3, &mm, &err), LW_ERR_INVALID);
}

/* the largest slope of y against ln ω between consecutive points in [lo, hi] */
static double
max_slope (const double *w, const double *y, size_t n, double lo, double hi)
{
  double s = 0;
  for (size_t i = 0; i + 1 < n; i++)
    if (w[i] >= lo && w[i + 1] <= hi)
      s = fmax (s, fabs (y[i + 1] - y[i]) / log (w[i + 1] / w[i]));
  return s;
}

/* Noise: the belt axis's sampled data (as above, up to π/T) times e^{u + jv}, u and v normal
 * with standard deviation s, truncated at 3 s (normal_truncated, lw-test.h: the rule of
 * docs/measured-data.md widens an interval past the points within 3 deviations of their
 * noise, so with noise inside that bound a true crossover must lie in its interval — the test
 * checks the rule, not luck), and a coherence γ² = 1/(1 + 2·n_d·s²) — the
 * one whose random error by Bendat & Piersol's formula (lw-measured.h) is s. 20 seeds at
 * s = 0.02 (γ² = 0.997) and s = 0.2 (γ² = 0.76, below the 0.8 flag). Each crossover of the
 * noise-free model inside the data lies in the interval of a reported crossing of its kind,
 * flagged at s = 0.2, and its margin agrees with the model's within
 *   3 s (the noise of the interpolated phase, or of ln|L| in dB: a convex combination of two
 *   points' errors, each within 3 s) + S·W (the reported and the true frequency both lie in
 *   the interval, W = ln(hi/lo) wide, where the model's phase or dB slope against ln ω is at
 *   most S — measured between the grid's points, 20 % added for the slope between them) +
 *   0.1° / 0.1 dB (the interpolation at 50 points per decade, as above).
 * The verdict on stability is never "unstable" (the loop is stable) and is "stable" at
 * s = 0.02. Data with coherence 1 give what data without coherence give. */
static void
test_noise_intervals (void **state)
{
  (void) state;
  Loop lp;
  loop_make (&lp, "180*40000/(s*(s+12)*(s^2+40*s+40000))", "3.4*(1+w/15)/(1+w/110)", 0.002,
             0.0026, 1);
  static double w[4000], coh[4000], ph[4000], db[4000];
  static double complex p[4000], pn[4000];
  size_t n = grid (0.1, PI / lp.period_s, 50, w, 3999);
  w[n++] = PI / lp.period_s;
  for (size_t i = 0; i < n; i++)
    {
      p[i] = lw_sampled_plant_response (lp.sampled, w[i]);
      double complex z = cexp (I * w[i] * lp.period_s);
      double complex l = lw_model_eval (lp.controller_z, z) * p[i] / z;
      ph[i] = i == 0 ? carg (l) : ph[i - 1] + remainder (carg (l) - ph[i - 1], 2 * PI);
      db[i] = 20 * log10 (cabs (l));
      coh[i] = 1.0;
    }
  for (size_t i = 0; i < n; i++)
    ph[i] *= 180.0 / PI;
  LwError err;
  /* coherence 1: the same as none */
  LwMeasured m1 = { n, w, p, coh }, m0 = { n, w, p, NULL };
  LwMeasuredLoop a, b;
  assert_int_equal (lw_measured_loop_close (&m1, LW_MEASURED_SAMPLED, lp.period_s, 0, 1,
                                            lp.controller_z, NULL, 0, &a, &err), LW_OK);
  assert_int_equal (lw_measured_loop_close (&m0, LW_MEASURED_SAMPLED, lp.period_s, 0, 1,
                                            lp.controller_z, NULL, 0, &b, &err), LW_OK);
  assert_int_equal (a.margins.n_gain, b.margins.n_gain);
  assert_int_equal (a.margins.n_phase, b.margins.n_phase);
  for (size_t i = 0; i < a.margins.n_gain + a.margins.n_phase; i++)
    {
      const LwMeasuredCrossing *x = i < a.margins.n_gain ? &a.margins.gain[i]
                                    : &a.margins.phase[i - a.margins.n_gain];
      const LwMeasuredCrossing *y = i < a.margins.n_gain ? &b.margins.gain[i]
                                    : &b.margins.phase[i - a.margins.n_gain];
      assert_true (x->omega_rad_s == y->omega_rad_s && x->margin == y->margin
                   && x->lo_rad_s == y->lo_rad_s && x->hi_rad_s == y->hi_rad_s
                   && !x->within_noise && !y->within_noise && !x->low_coherence
                   && x->sign_changes == 1 && y->sign_changes == 1);
    }
  assert_int_equal (a.stability.verdict, LW_MEASURED_STABLE);
  lw_measured_loop_clear (&a);
  lw_measured_loop_clear (&b);

  const LwMargins *mod = &lp.ev->margins;
  const double levels[2] = { 0.02, 0.2 };
  for (int lv = 0; lv < 2; lv++)
    {
      double s = levels[lv];
      double gamma2 = 1.0 / (1.0 + 2.0 * LW_MEASURED_NOISE_AVERAGES * s * s);
      assert_close (lw_measured_noise_sigma (gamma2), s, 1e-12, "the coherence of noise s");
      size_t merged = 0, widened = 0, checked = 0;
      double worst_pm = 0, worst_gm = 0;
      for (uint64_t seed = 1; seed <= 20; seed++)
        {
          uint64_t st = 0x9E3779B97F4A7C15ull * seed;
          for (size_t i = 0; i < n; i++)
            {
              double u = s * normal_truncated (&st, LW_MEASURED_NOISE_SIGMAS);
              double v = s * normal_truncated (&st, LW_MEASURED_NOISE_SIGMAS);
              pn[i] = p[i] * cexp (u + I * v);
              coh[i] = gamma2;
            }
          LwMeasured m = { n, w, pn, coh };
          LwMeasuredLoop ml;
          assert_int_equal (lw_measured_loop_close (&m, LW_MEASURED_SAMPLED, lp.period_s, 0, 1,
                                                    lp.controller_z, NULL, 0, &ml, &err), LW_OK);
          assert_true (ml.stability.verdict != LW_MEASURED_UNSTABLE);
          if (lv == 0)
            assert_int_equal (ml.stability.verdict, LW_MEASURED_STABLE);
          for (int kind = 0; kind < 2; kind++)
            {
              size_t nt = kind == 0 ? mod->n_gain_crossovers : mod->n_phase_crossovers;
              const LwMeasuredCrossing *c = kind == 0 ? ml.margins.gain : ml.margins.phase;
              size_t nc = kind == 0 ? ml.margins.n_gain : ml.margins.n_phase;
              for (size_t j = 0; j < nt; j++)
                {
                  double wt = kind == 0 ? mod->gain_crossovers_rad_s[j]
                                        : mod->phase_crossovers_rad_s[j];
                  double mt = kind == 0 ? mod->phase_margins_deg[j] : mod->gain_margins_db[j];
                  if (wt <= w[0] || wt >= w[n - 1])
                    continue;
                  size_t k = 0;
                  while (k < nc && !(c[k].lo_rad_s <= wt && wt <= c[k].hi_rad_s))
                    k++;
                  if (k == nc)
                    fail_msg ("s = %g, seed %d: the %s crossover %.6g rad/s of the model is in "
                              "no reported interval", s, (int) seed, kind ? "phase" : "gain",
                              wt);
                  if (lv == 1)
                    assert_true (c[k].low_coherence);
                  double slope = 1.2 * max_slope (w, kind == 0 ? ph : db, n, c[k].lo_rad_s,
                                                  c[k].hi_rad_s);
                  double noise = 3 * s * (kind == 0 ? 180.0 / PI : 20.0 / log (10.0));
                  double tol = noise + slope * log (c[k].hi_rad_s / c[k].lo_rad_s) + 0.1;
                  double e = fabs (c[k].margin - mt);
                  if (kind == 0 && e > 180)
                    e = 360 - e;
                  if (!(e <= tol))
                    fail_msg ("s = %g, seed %d: margin %.6g vs the model's %.6g at %.6g rad/s "
                              "(tolerance %.3g)", s, (int) seed, c[k].margin, mt, wt, tol);
                  if (kind == 0)
                    worst_pm = fmax (worst_pm, e);
                  else
                    worst_gm = fmax (worst_gm, e);
                  merged += c[k].sign_changes > 1;
                  widened += c[k].within_noise;
                  checked++;
                }
            }
          lw_measured_loop_clear (&ml);
        }
      print_message ("noise s = %g (coherence %.4f): %zu crossovers inside their intervals, %zu "
                     "widened, %zu merged; margins off by up to %.3g deg / %.3g dB\n", s,
                     gamma2, checked, widened, merged, worst_pm, worst_gm);
      assert_true (checked >= 20 * 3);
      if (lv == 1)
        assert_true (merged > 0);   /* 20 % noise makes spurious sign changes here */
    }
  loop_free (&lp);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_sampled_matches_model),
    cmocka_unit_test (test_continuous_matches_model_below_a_fifth),
    cmocka_unit_test (test_by_hand),
    cmocka_unit_test (test_noise_intervals),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
