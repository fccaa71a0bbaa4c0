/* test-stage-kinds — the stage-kind table (lw-stage-kinds.h): every row complete and
 * consistent, parameter access, the placement of new stages, handles through the table.
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
#include <string.h>

#include "lw-stage-kinds.h"

#define PI_ 3.14159265358979323846

static bool
word_ok (const char *s, const char *extra)
{
  if (s == NULL || s[0] == '\0')
    return false;
  for (const char *p = s; *p != '\0'; p++)
    if (!((*p >= 'a' && *p <= 'z') || strchr (extra, *p) != NULL))
      return false;
  return true;
}

/* Row i is kind i; names are unique words that can be an XML element ([a-z-]) and parameter
 * names unique attribute words ([a-z_]); every row has what the readers of the table use. */
static void
test_rows (void **state)
{
  (void) state;
  size_t n = lw_stage_kind_count ();
  assert_true (n >= 11);
  for (size_t i = 0; i < n; i++)
    {
      const LwStageKindInfo *k = lw_stage_kind_info ((LwStageKind) i);
      assert_non_null (k);
      assert_int_equal (k->kind, (int) i);
      if (!word_ok (k->name, "-"))
        fail_msg ("kind %zu: name '%s' is not [a-z-]+", i, k->name);
      assert_ptr_equal (lw_stage_kind_by_name (k->name), k);
      assert_string_equal (lw_stage_kind_name (k->kind), k->name);
      assert_true (k->title != NULL && k->title[0] != '\0');
      assert_true (k->definition != NULL && strstr (k->definition, "C = ") == k->definition);
      assert_true (k->n_params >= 1 && k->n_params <= LW_STAGE_MAX_STORED);
      assert_non_null (k->to_model);
      /* handles: all three functions or none */
      bool c = k->corner_count != NULL;
      assert_true (c == (k->corner_get != NULL) && c == (k->corner_set != NULL));
      for (size_t j = 0; j < i; j++)
        assert_true (strcmp (lw_stage_kind_info ((LwStageKind) j)->name, k->name) != 0);
      for (size_t p = 0; p < k->n_params; p++)
        {
          const LwStageParamInfo *q = &k->params[p];
          if (!word_ok (q->name, "_"))
            fail_msg ("%s: parameter name '%s' is not [a-z_]+", k->name, q->name);
          for (size_t r = 0; r < p; r++)
            assert_true (strcmp (k->params[r].name, q->name) != 0);
          assert_true (strcmp (q->name, "label") != 0 && strcmp (q->name, "enabled") != 0);
          assert_true (q->title != NULL && q->title[0] != '\0');
          assert_true (q->what != NULL && q->what[0] != '\0');
          const char *units[] = { "rad/s", "s", "dB", "deg", "ratio", "" };
          bool unit_ok = false;
          for (size_t u = 0; u < 6; u++)
            unit_ok = unit_ok || strcmp (q->unit, units[u]) == 0;
          if (!unit_ok)
            fail_msg ("%s.%s: unit '%s' is not one of lw-stage.h's", k->name, q->name, q->unit);
          /* the editor's range lies inside the rule */
          if (!(q->lower < q->upper && lw_param_rule_ok (q->rule, q->lower)
                && lw_param_rule_ok (q->rule, q->upper)))
            fail_msg ("%s.%s: editor range [%g, %g] outside its rule", k->name, q->name,
                      q->lower, q->upper);
          assert_true (q->digits >= 0 && q->digits <= 9);
          assert_true (q->offset + sizeof (double) <= sizeof (LwStage));
        }
    }
  assert_null (lw_stage_kind_info ((LwStageKind) n));
  assert_null (lw_stage_kind_info ((LwStageKind) -1));
  assert_null (lw_stage_kind_name ((LwStageKind) n));
  assert_null (lw_stage_kind_by_name ("wobble"));
  assert_null (lw_stage_kind_by_name (NULL));
}

/* A stage placed by the table around any crossover is valid, its parameters read back through
 * lw_stage_params in table order, set/get round-trips, and its handles lie within two decades
 * of ν_c (common practice, no source: a new stage acts near the crossover). */
static void
test_placed_and_params (void **state)
{
  (void) state;
  const double nus[] = { 1e-3, 0.7, 350.0 };
  for (size_t i = 0; i < lw_stage_kind_count (); i++)
    for (size_t m = 0; m < 3; m++)
      {
        const LwStageKindInfo *k = lw_stage_kind_info ((LwStageKind) i);
        double nu_c = nus[m];
        LwStage s = lw_stage_placed (k->kind, nu_c);
        LwError err;
        if (lw_stage_check (&s, &err) != LW_OK)
          fail_msg ("%s placed at %g: %s", k->name, nu_c, err.message);
        LwModel *model = NULL;
        assert_int_equal (lw_stage_to_model (&s, 1e-3, &model, NULL), LW_OK);
        lw_model_free (model);

        LwStageParam out[LW_STAGE_MAX_PARAMS];
        size_t np = lw_stage_params (&s, out);
        assert_true (np >= k->n_params && np <= LW_STAGE_MAX_PARAMS);
        for (size_t p = 0; p < np; p++)
          {
            assert_true (out[p].derived == (p >= k->n_params));
            assert_non_null (out[p].title);
            if (p < k->n_params)
              {
                assert_string_equal (out[p].name, k->params[p].name);
                assert_true (out[p].value == lw_stage_param_get (&s, p));
              }
          }
        for (size_t p = 0; p < k->n_params; p++)
          {
            LwStage t = s;
            double v = k->params[p].rule == LW_PARAM_COUNT ? 3.0 : 1.25 * lw_stage_param_get (&s, p);
            lw_stage_param_set (&t, p, v);
            assert_true (lw_stage_param_get (&t, p) == v);
            for (size_t q = 0; q < k->n_params; q++)
              if (q != p)
                assert_true (lw_stage_param_get (&t, q) == lw_stage_param_get (&s, q));
          }
        assert_true (isnan (lw_stage_param_get (&s, k->n_params)));

        size_t nc = lw_stage_corner_count (&s);
        for (size_t c = 0; c < nc; c++)
          {
            double nu;
            LwHandleKind hk;
            assert_int_equal (lw_stage_corner_get (&s, c, &nu, &hk, NULL), LW_OK);
            if (!(nu >= nu_c / 100.0 && nu <= nu_c * 100.0))
              fail_msg ("%s placed at %g: handle %zu at %g", k->name, nu_c, c, nu);
            /* moving a handle by 10 % with the ratio kept lands it there (1e-12: a
             * reciprocal for the PID's times) */
            LwStage t = s;
            assert_int_equal (lw_stage_corner_set (&t, c, 1.1 * nu, true, NULL), LW_OK);
            double got;
            assert_int_equal (lw_stage_corner_get (&t, c, &got, NULL, NULL), LW_OK);
            assert_close (got, 1.1 * nu, 1e-12 * nu, "handle moved");
          }
      }
}

/* The add-stage menu's placements (formerly a switch in the window; kept as they were): a lead
 * of 30° maximum phase centred at ν_c, a lag of 10° a decade below, checked against the
 * lead/lag formulas φ_m = asin((α − 1)/(α + 1)) at √(z·p) (Ogata, Modern Control Engineering,
 * lead compensation; quoted from memory). Tolerance 1e-12 (literal factors to 17 digits). */
static void
test_placement_values (void **state)
{
  (void) state;
  const double nu = 4.0;
  LwStage s = lw_stage_placed (LW_STAGE_LEAD, nu);
  assert_close (lw_stage_leadlag_centre_rad_s (&s), nu, 1e-12 * nu, "lead centre");
  assert_close (lw_stage_leadlag_max_phase_deg (&s), 30.0, 1e-12, "lead phase");
  s = lw_stage_placed (LW_STAGE_LAG, nu);
  assert_close (lw_stage_leadlag_centre_rad_s (&s), 0.1 * nu, 1e-12 * nu, "lag centre");
  assert_close (lw_stage_leadlag_max_phase_deg (&s), -10.0, 1e-12, "lag phase");
  s = lw_stage_placed (LW_STAGE_PID, nu);
  assert_true (s.p.pid.kp == 1.0 && s.p.pid.ti_s == 10.0 / nu && s.p.pid.td_s == 0.5 / nu
               && s.p.pid.filter_n == 10.0);
  s = lw_stage_placed (LW_STAGE_NOTCH, nu);
  assert_true (s.p.notch.centre_rad_s == 3.0 * nu && s.p.notch.depth_db == 20.0
               && s.p.notch.width_rad_s == nu);
  s = lw_stage_placed (LW_STAGE_INTEGRATOR, nu);
  assert_int_equal (s.p.integrator.count, 1);
  s = lw_stage_placed (LW_STAGE_REAL_POLE, nu);
  assert_true (s.p.real.corner_rad_s == 5.0 * nu && s.enabled && s.label[0] == '\0');
  /* an unknown kind gives a gain of 1, never garbage */
  s = lw_stage_placed ((LwStageKind) 999, nu);
  assert_true (s.kind == LW_STAGE_GAIN && s.p.gain.ratio == 1.0);
}

/* Rules and messages: a value outside its rule is refused naming the parameter and the rule. */
static void
test_rules (void **state)
{
  (void) state;
  assert_true (lw_param_rule_ok (LW_PARAM_COUNT, 1) && lw_param_rule_ok (LW_PARAM_COUNT, 8));
  assert_false (lw_param_rule_ok (LW_PARAM_COUNT, 1.5) || lw_param_rule_ok (LW_PARAM_COUNT, 9));
  assert_false (lw_param_rule_ok (LW_PARAM_FINITE, NAN));
  assert_false (lw_param_rule_ok (LW_PARAM_NONZERO, 0.0));
  assert_true (lw_param_rule_ok (LW_PARAM_NONNEGATIVE, 0.0));
  assert_false (lw_param_rule_ok (LW_PARAM_POSITIVE, 0.0));
  LwStage s = lw_stage_notch (10.0, 20.0, -1.0);
  LwError err;
  assert_int_equal (lw_stage_check (&s, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "notch width must be a finite number > 0 (rad/s)"));
  assert_non_null (strstr (err.message, "got -1"));
  /* a count far out of int range is refused, not converted */
  s = lw_stage_integrator (1);
  lw_stage_param_set (&s, 0, 1e300);
  assert_int_equal (lw_stage_check (&s, NULL), LW_ERR_INVALID);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_rows),
    cmocka_unit_test (test_placed_and_params),
    cmocka_unit_test (test_placement_values),
    cmocka_unit_test (test_rules),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
