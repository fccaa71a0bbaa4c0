/* test-family-loops.c — a plant family's drawn members following a new controller
 * (lw_family_loops_again: the window's drag, src/engine/lw-family-loops.c).
 *
 * Checked: the members' loops with their sampled plants reused equal those sampled afresh
 * (lw_family_loops with the new controller: the same members, the same numbers), the member
 * marked worst has the smallest phase margin among them, and that margin agrees with the loop
 * computed here in closed form for that member's parameters.
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

#include "lw-family.h"

#define T_S 0.002

/* The camera slider (invented numbers) K/(s (s + a)), K in [150, 220], a in [10, 14],
 * T = 2 ms, one sample of computation delay, C(w) = 2.5 (1 + w/10)/(1 + w/pole). */
static LwDesign *
slider_family (double lead_pole)
{
  LwDesign *d = lw_design_new ("K/(s*(s+a))", T_S);
  d->compute_delay = 1;
  d->n_params = 2;
  d->params = g_new0 (LwDesignParam, 2);
  d->params[0] = (LwDesignParam) { .name = g_strdup ("K"), .nominal = 180, .ranged = true,
                                   .low = 150, .high = 220 };
  d->params[1] = (LwDesignParam) { .name = g_strdup ("a"), .nominal = 12, .ranged = true,
                                   .low = 10, .high = 14 };
  LwStage gain = lw_stage_gain (2.5);
  LwStage lead = lw_stage_lead (10.0, lead_pole);
  lw_design_variant_add_stage (&d->variants[0], &gain);
  lw_design_variant_add_stage (&d->variants[0], &lead);
  return d;
}

/* L(e^{jωT}) in closed form: the ZOH equivalent of K/(s (s + a)) (Franklin, Powell & Workman,
 * Digital Control of Dynamic Systems, 3rd ed., table of ZOH equivalents, from memory;
 * rederived as (1 − z⁻¹)·Z{K/(s²(s + a))}), the compensator in w at w = (2/T)(z−1)/(z+1) and
 * z⁻¹ for the computation delay. */
static double complex
loop_here (double k, double a, double lead_pole, double omega)
{
  double complex z = cexp (I * omega * T_S);
  double aT = a * T_S, e = exp (-aT);
  double complex g = k / (a * a) * ((aT - 1.0 + e) * z + (1.0 - e - aT * e))
                     / ((z - 1.0) * (z - e));
  double complex w = (2.0 / T_S) * (z - 1.0) / (z + 1.0);
  return g * 2.5 * (1.0 + w / 10.0) / (1.0 + w / lead_pole) / z;
}

/* Its phase margin: |L| = 1 found by bisection (|L| falls through 1 once for these loops
 * between 1 rad/s and π/T). */
static double
pm_here (double k, double a, double lead_pole)
{
  double lo = 1.0, hi = G_PI / T_S * 0.999;
  for (int i = 0; i < 200; i++)
    {
      double mid = sqrt (lo * hi);
      if (cabs (loop_here (k, a, lead_pole, mid)) > 1.0)
        lo = mid;
      else
        hi = mid;
    }
  return 180.0 + carg (loop_here (k, a, lead_pole, sqrt (lo * hi))) * 180.0 / G_PI;
}

static void
test_again_equals_afresh (void **state)
{
  LwDesign *d = slider_family (80.0);
  LwFamilyOptions o;
  lw_family_options_init (&o);
  o.members = 24;
  o.seed = 5;
  GError *error = NULL;
  LwFamily *f = lw_family_evaluate (d, 0, &o, &error);
  assert_non_null (f);
  LwFamilyLoops *l = lw_family_loops (d, 0, f, 40, 120);
  assert_true (l->n >= 20 && l->n_worst >= 1 && l->n_worst <= l->n);

  /* the lead's pole dragged from 80 to 45 rad/s */
  LwDesign *d2 = slider_family (45.0);
  LwFamilyLoops *again = lw_family_loops_again (l, d2, 0, 120);
  LwFamilyLoops *afresh = lw_family_loops (d2, 0, f, 40, 120);
  assert_int_equal (again->n, afresh->n);
  assert_int_equal (again->n_worst, l->n_worst);
  assert_true (again->plants_borrowed);
  double worst = INFINITY;
  size_t worst_i = G_MAXSIZE;
  for (size_t i = 0; i < again->n; i++)
    {
      assert_int_equal (again->member[i], afresh->member[i]);
      assert_true (again->plant[i] == l->plant[i]);   /* borrowed, not sampled again */
      assert_non_null (again->ev[i]);
      assert_non_null (afresh->ev[i]);
      const LwMargins *a = &again->ev[i]->margins, *b = &afresh->ev[i]->margins;
      assert_true (a->has_phase_margin && b->has_phase_margin);
      /* the same computation on the same numbers: equal to rounding (1e-9°) */
      assert_true (fabs (a->phase_margin_deg - b->phase_margin_deg) < 1e-9);
      assert_true (fabs (a->gain_crossover_rad_s - b->gain_crossover_rad_s)
                   < 1e-9 * b->gain_crossover_rad_s);
      if (a->phase_margin_deg < worst)
        {
          worst = a->phase_margin_deg;
          worst_i = i;
        }
      /* against the closed form, member by member: the engine refines the crossover to
       * |L| = 1 within 1e-10 relative, well inside 1e-6° */
      const double *v = f->members[again->member[i]].values;
      assert_true (fabs (a->phase_margin_deg - pm_here (v[0], v[1], 45.0)) < 1e-6);
    }
  assert_int_equal (again->worst_pm, worst_i);
  assert_true (fabs (lw_family_loops_worst_pm_deg (again) - worst) == 0.0);
  /* the smaller lead pole gives less phase: every member's margin dropped */
  for (size_t i = 0; i < again->n; i++)
    assert_true (again->ev[i]->margins.phase_margin_deg
                 < l->ev[i]->margins.phase_margin_deg);

  lw_family_loops_free (afresh);
  lw_family_loops_free (again);   /* before l: it borrows l's plants */
  lw_family_loops_free (l);
  lw_family_free (f);
  lw_design_free (d2);
  lw_design_free (d);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_again_equals_afresh),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
