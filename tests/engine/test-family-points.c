/* test-family-points.c — operating points in a plant family (lw-family.h, docs/families.md):
 * their place among the members, their names, a family of points alone, and the search for
 * the worst staying in the ranges when a point outside them is the worst.
 *
 * The loop: K/(s+a) at T = 2 ms with C(z) = 0.5 (z − 0.95)/(z − 1), K 8 … 64 and a 9 … 14
 * (invented numbers); a point "stiff" far outside the ranges (K = 200), which is the worst
 * gain margin of the family (the gain margin falls as K rises: 23.9 dB at K = 64, a = 10, and
 * 14.1 dB at K = 200, from `analyze`).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include <cmocka.h>
#include <glib.h>

#include "lw-expr.h"
#include "lw-family.h"

static LwDesign *
design (gboolean ranged)
{
  LwDesign *d = lw_design_new ("K/(s+a)", 0.002);
  d->n_params = 2;
  d->params = g_new0 (LwDesignParam, 2);
  d->params[0] = (LwDesignParam) { g_strdup ("K"), 20.0, ranged, 8.0, 64.0,
                                   LW_SPREAD_UNIFORM };
  d->params[1] = (LwDesignParam) { g_strdup ("a"), 10.0, ranged, 9.0, 14.0, LW_SPREAD_UNIFORM };
  d->n_points = 2;
  d->points = g_new0 (LwDesignPoint, 2);
  d->points[0].name = g_strdup ("stiff");
  d->points[0].n_values = 1;
  d->points[0].values = g_new0 (LwDesignPointValue, 1);
  d->points[0].values[0] = (LwDesignPointValue) { g_strdup ("K"), 200.0 };
  d->points[1].name = g_strdup ("light");
  d->points[1].n_values = 2;
  d->points[1].values = g_new0 (LwDesignPointValue, 2);
  d->points[1].values[0] = (LwDesignPointValue) { g_strdup ("a"), 12.0 };
  d->points[1].values[1] = (LwDesignPointValue) { g_strdup ("K"), 10.0 };
  char why[256];
  assert_null (lw_design_params_problem (d, why, sizeof why));
  assert_null (lw_design_points_problem (d, why, sizeof why, NULL));
  return d;
}

static LwModel *
controller (void)
{
  LwModel *cz = NULL;
  LwError err;
  lw_error_clear (&err);
  assert_int_equal (lw_expr_parse_proper ("0.5*(z-0.95)/(z-1)", LW_DOMAIN_Z, 0.002, &cz, &err),
                    LW_OK);
  return cz;
}

/* With ranges: nominal, the two points (named, their values), then the corners; the worst
 * gain margin is "stiff"; every searched member lies in the ranges. */
static void
test_points_with_ranges (void **state)
{
  (void) state;
  g_autoptr (LwDesign) d = design (TRUE);
  LwModel *cz = controller ();
  LwFamilyOptions o;
  lw_family_options_init (&o);
  o.members = 20;
  GError *error = NULL;
  g_autoptr (LwFamily) f = lw_family_evaluate_controller (d, 0.002, cz, &o, &error);
  assert_non_null (f);
  assert_true (lw_family_wanted (d));
  assert_int_equal (f->n_points, 2);
  assert_int_equal (f->n_corners, 4);
  assert_int_equal (f->members[0].origin, LW_FAMILY_NOMINAL);
  assert_null (f->members[0].point);
  assert_int_equal (f->members[1].origin, LW_FAMILY_POINT);
  assert_string_equal (f->members[1].point, "stiff");
  assert_true (f->members[1].values[0] == 200.0 && f->members[1].values[1] == 10.0);
  assert_string_equal (f->members[2].point, "light");
  assert_true (f->members[2].values[0] == 10.0 && f->members[2].values[1] == 12.0);
  for (size_t i = 3; i < 3 + 4; i++)
    assert_int_equal (f->members[i].origin, LW_FAMILY_CORNER);
  /* "stiff" (3 × the highest gain of the ranges) is the worst gain margin */
  assert_int_equal (f->worst[LW_FAMILY_GAIN_MARGIN], 1);
  size_t searched = 0;
  for (size_t i = 0; i < f->n_members; i++)
    {
      const LwFamilyMember *m = &f->members[i];
      if (m->origin != LW_FAMILY_POINT)
        assert_null (m->point);
      if (m->origin != LW_FAMILY_SEARCH)
        continue;
      searched++;
      assert_true (m->values[0] >= 8.0 && m->values[0] <= 64.0);
      assert_true (m->values[1] >= 9.0 && m->values[1] <= 14.0);
    }
  assert_true (searched > 0);
  printf ("members %zu, searched %zu, worst GM %.6g dB at '%s'\n", f->n_members, searched,
          f->members[1].figure[LW_FAMILY_GAIN_MARGIN], f->members[1].point);
  lw_model_free (cz);
}

/* Points alone: the nominal and the points, nothing drawn, nothing searched; every member
 * drawn for the figures (the nominal is the loop's own curve). */
static void
test_points_alone (void **state)
{
  (void) state;
  g_autoptr (LwDesign) d = design (FALSE);
  LwModel *cz = controller ();
  GError *error = NULL;
  g_autoptr (LwFamily) f = lw_family_evaluate_controller (d, 0.002, cz, NULL, &error);
  assert_non_null (f);
  assert_true (lw_family_wanted (d));
  assert_int_equal (f->n_members, 3);
  assert_int_equal (f->n_corners, 0);
  g_autoptr (LwFamilyLoops) l = lw_family_loops_controller (d, 0.002, cz, f, 0, 0);
  /* no others asked for: the distinct worst members only (never the nominal) */
  for (size_t i = 0; i < l->n; i++)
    assert_true (l->member[i] == 1 || l->member[i] == 2);
  g_autoptr (LwFamilyLoops) all = lw_family_loops_controller (d, 0.002, cz, f, 40, 0);
  assert_int_equal (all->n, 2);
  lw_design_clear_points (d);
  assert_false (lw_family_wanted (d));
  lw_model_free (cz);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_points_with_ranges),
    cmocka_unit_test (test_points_alone),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
