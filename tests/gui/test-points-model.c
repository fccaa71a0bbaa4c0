/* test-points-model.c — the operating points in the window's design model
 * (src/gui/lw-design-model-points.c) without a window: adding ("point N"), renaming, giving
 * and taking away values, removing a point, each one "changed" (so one undo step, undone
 * byte for byte) and the document still valid; every refusal of docs/families.md (a name
 * empty, with ':', over 64 bytes, with a space at an end, given twice; a value not finite; a
 * negative dead time; a plant improper or zero at the point) leaving the document and its
 * signals untouched; a parameter removed taking its values in the points with it, and a
 * parameter change refused where it would spoil a point.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <math.h>
#include <string.h>

#include "lw-history.h"

static char *
text_of (LwDesignModel *m)
{
  GError *error = NULL;
  char *t = lw_design_to_text (lw_design_model_get_design (m), NULL, &error);
  assert_non_null (t);
  return t;
}

static void
assert_valid (LwDesignModel *m)
{
  GError *error = NULL;
  if (!lw_design_validate (lw_design_model_get_design (m), &error))
    fail_msg ("the document is not valid: %s", error->message);
}

static void
count (guint *n)
{
  (*n)++;
}

/* A model on plant (T = 10 ms) with parameters K = 180 and a = 12, counting its "changed"
 * signals into *changes (from 0, after the parameters). */
static LwDesignModel *
model_on (const char *plant, guint *changes)
{
  LwDesignModel *m = lw_design_model_new (lw_design_new (plant, 0.01));
  LwDesignParam k = { .name = (char *) "K", .nominal = 180.0 };
  LwDesignParam a = { .name = (char *) "a", .nominal = 12.0 };
  assert_true (lw_design_model_set_param (m, &k, NULL));
  assert_true (lw_design_model_set_param (m, &a, NULL));
  g_signal_connect_swapped (m, "changed", G_CALLBACK (count), changes);
  return m;
}

/* Adding, naming, giving values: each one "changed", saved as the document says, one undo
 * step each, byte for byte. */
static void
test_add_name_values (void **state)
{
  (void) state;
  guint changes = 0;
  LwDesignModel *m = model_on ("K/(s*(s+a))", &changes);
  LwHistory *h = lw_history_new (m, 200, 1000000);
  char *t0 = text_of (m);

  assert_true (lw_design_model_add_point (m, NULL));
  assert_true (lw_design_model_add_point (m, NULL));
  assert_int_equal (changes, 2);
  assert_int_equal (lw_design_model_get_n_points (m), 2);
  assert_string_equal (lw_design_model_get_point (m, 0)->name, "point 1");
  assert_string_equal (lw_design_model_get_point (m, 1)->name, "point 2");
  lw_history_commit (h);
  char *t_two = text_of (m);
  assert_non_null (strstr (t_two, "<point name=\"point 1\"/>\n    <point name=\"point 2\"/>"));
  assert_valid (m);

  assert_true (lw_design_model_rename_point (m, "point 1", "full", NULL));
  assert_int_equal (changes, 3);
  assert_true (lw_design_model_rename_point (m, "full", "full", NULL));   /* no change */
  assert_int_equal (changes, 3);
  /* "point 1" is free again, but the next is named from the count: "point 3" */
  assert_true (lw_design_model_add_point (m, NULL));
  assert_string_equal (lw_design_model_get_point (m, 2)->name, "point 3");
  assert_true (lw_design_model_remove_point (m, "point 3"));
  assert_false (lw_design_model_remove_point (m, "point 3"));
  lw_history_commit (h);
  char *t_named = text_of (m);

  /* values in the parameters' order, whatever the order they are given in */
  double a = 9.5, k = 2.5e2;
  assert_true (lw_design_model_set_point_value (m, "full", "a", &a, NULL));
  lw_history_commit (h);
  char *t_a = text_of (m);
  assert_true (lw_design_model_set_point_value (m, "full", "K", &k, NULL));
  guint before = changes;
  assert_true (lw_design_model_set_point_value (m, "full", "K", &k, NULL));   /* no change */
  assert_int_equal (changes, before);
  lw_history_commit (h);
  char *t_ka = text_of (m);
  assert_non_null (strstr (t_ka, "<point name=\"full\">\n"
                                 "      <value parameter=\"K\" value=\"250\"/>\n"
                                 "      <value parameter=\"a\" value=\"9.5\"/>\n"
                                 "    </point>"));
  double got = 0.0;
  assert_true (lw_design_model_get_point_value (m, "full", "K", &got));
  assert_true (got == 250.0);
  assert_false (lw_design_model_get_point_value (m, "point 2", "K", &got));
  assert_valid (m);

  /* taken away: the point takes the nominal again */
  assert_true (lw_design_model_set_point_value (m, "full", "K", NULL, NULL));
  assert_false (lw_design_model_get_point_value (m, "full", "K", NULL));
  before = changes;
  assert_true (lw_design_model_set_point_value (m, "full", "K", NULL, NULL));   /* none */
  assert_int_equal (changes, before);
  lw_history_commit (h);
  char *t_back = text_of (m);
  assert_string_equal (t_back, t_a);

  /* every step undone byte for byte */
  const char *steps[] = { t_ka, t_a, t_named, t_two, t0 };
  for (size_t i = 0; i < G_N_ELEMENTS (steps); i++)
    {
      assert_true (lw_history_undo (h));
      char *u = text_of (m);
      assert_string_equal (u, steps[i]);
      g_free (u);
    }
  g_free (t0); g_free (t_two); g_free (t_named); g_free (t_a); g_free (t_ka); g_free (t_back);
  g_object_unref (h);
  g_object_unref (m);
}

/* Every refusal: FALSE with the reason, the document and its signals untouched. */
static void
test_refusals (void **state)
{
  (void) state;
  guint changes = 0;
  /* zero where K = a; improper where a = 0 (second order over first) */
  LwDesignModel *m = model_on ("(K-a)*(s^2+s+1)/(s*(a*s+1))", &changes);
  LwDesignParam d = { .name = (char *) LW_DESIGN_DEAD_TIME_PARAM, .nominal = 0.0 };
  assert_true (lw_design_model_set_param (m, &d, NULL));
  assert_true (lw_design_model_add_point (m, NULL));
  assert_true (lw_design_model_add_point (m, NULL));
  assert_true (lw_design_model_rename_point (m, "point 2", "half", NULL));
  char *t0 = text_of (m);
  guint changes0 = changes;

  char long_name[80];
  memset (long_name, 'x', 65);
  long_name[65] = '\0';
  const struct { const char *name, *words; } names[] = {
    { "", "empty" },
    { "a:b", "':'" },
    { "full ", "space" },
    { " full", "space" },
    { "tab\there", "tab" },
    { long_name, "64 bytes" },
    { "half", "given twice" },
  };
  for (size_t i = 0; i < G_N_ELEMENTS (names); i++)
    {
      char *why = NULL;
      assert_false (lw_design_model_rename_point (m, "point 1", names[i].name, &why));
      assert_non_null (why);
      if (strstr (why, names[i].words) == NULL)
        fail_msg ("name %zu: \"%s\" does not say \"%s\"", i, why, names[i].words);
      g_free (why);
    }

  const struct { const char *param; double value; const char *words; } values[] = {
    { "K", NAN, "not finite" },
    { "K", INFINITY, "not finite" },
    { "a", -INFINITY, "not finite" },
    { "K", 12.0, "at operating point 'point 1': the expression is identically zero" },
    { "a", 0.0, "at operating point 'point 1': the model is improper" },
    { "b", 3.0, "unknown parameter 'b'" },
    { LW_DESIGN_DEAD_TIME_PARAM, -0.01, "negative" },
    { LW_DESIGN_DEAD_TIME_PARAM, 1e6, "1e6 sample periods" },
  };
  for (size_t i = 0; i < G_N_ELEMENTS (values); i++)
    {
      char *why = NULL;
      assert_false (lw_design_model_set_point_value (m, "point 1", values[i].param,
                                                     &values[i].value, &why));
      assert_non_null (why);
      if (strstr (why, values[i].words) == NULL)
        fail_msg ("value %zu: \"%s\" does not say \"%s\"", i, why, values[i].words);
      g_free (why);
    }
  char *why = NULL;
  assert_false (lw_design_model_rename_point (m, "nowhere", "x", &why));
  g_clear_pointer (&why, g_free);
  double v = 2.0;
  assert_false (lw_design_model_set_point_value (m, "nowhere", "K", &v, &why));
  g_clear_pointer (&why, g_free);

  /* a nominal that would spoil a point (K = 2 is fine with the nominal a = 12, zero with
   * half's a = 2): refused with the point named */
  assert_true (lw_design_model_set_point_value (m, "half", "a", &v, NULL));
  char *t1 = text_of (m);
  changes0 = changes;
  LwDesignParam k2 = { .name = (char *) "K", .nominal = 2.0 };
  char *problem = lw_design_model_param_problem (m, &k2);
  assert_non_null (problem);
  assert_string_equal (problem, "at operating point 'half': the expression is identically zero");
  assert_false (lw_design_model_set_param (m, &k2, &why));
  assert_string_equal (why, problem);
  g_clear_pointer (&why, g_free);
  g_free (problem);
  LwDesignParam pt = { .name = (char *) "point", .nominal = 1.0 };
  assert_false (lw_design_model_set_param (m, &pt, &why));
  assert_non_null (strstr (why, "'point'"));
  g_clear_pointer (&why, g_free);

  char *t2 = text_of (m);
  assert_string_equal (t2, t1);
  assert_int_equal (changes, changes0);
  assert_non_null (t0);
  assert_valid (m);
  g_free (t0); g_free (t1); g_free (t2);
  g_object_unref (m);
}

/* A parameter removed takes its values in the points with it (the document stays valid);
 * the last one takes the points; without parameters no point can be added. */
static void
test_remove_param (void **state)
{
  (void) state;
  guint changes = 0;
  LwDesignModel *m = model_on ("K/(s*(s+a))", &changes);
  LwHistory *h = lw_history_new (m, 200, 1000000);
  double k = 200.0, a = 10.0;
  assert_true (lw_design_model_add_point (m, NULL));
  assert_true (lw_design_model_set_point_value (m, "point 1", "K", &k, NULL));
  assert_true (lw_design_model_set_point_value (m, "point 1", "a", &a, NULL));
  lw_history_commit (h);
  char *t_both = text_of (m);

  assert_true (lw_design_model_remove_param (m, "a"));
  lw_history_commit (h);
  assert_int_equal (lw_design_model_get_point (m, 0)->n_values, 1);
  assert_false (lw_design_model_get_point_value (m, "point 1", "a", NULL));
  /* the plant still names a: the plant's error, the document not savable for that alone;
   * with a given again (no point value) it is valid */
  LwDesignParam pa = { .name = (char *) "a", .nominal = 12.0 };
  assert_true (lw_design_model_set_param (m, &pa, NULL));
  assert_valid (m);
  lw_history_commit (h);

  /* a plant that does not parse at the nominals: a point is not blamed for it */
  lw_design_model_set_plant_text (m, "K/(s*(s+a+b))");
  assert_null (lw_design_model_get_points_problem (m));
  assert_true (lw_design_model_add_point (m, NULL));
  assert_true (lw_design_model_set_point_value (m, "point 2", "K", &k, NULL));
  /* a plant typed that is zero at a point (K = 200 there): said, not hidden */
  lw_design_model_set_plant_text (m, "(K-200)/(s*(s+a))");
  char *now = lw_design_model_get_points_problem (m);
  assert_non_null (now);
  assert_string_equal (now, "at operating point 'point 1': the expression is identically zero");
  g_free (now);
  lw_design_model_set_plant_text (m, "K/(s*(s+a))");
  assert_null (lw_design_model_get_points_problem (m));
  assert_valid (m);
  lw_history_commit (h);

  assert_true (lw_design_model_remove_param (m, "a"));
  assert_true (lw_design_model_remove_param (m, "K"));
  assert_int_equal (lw_design_model_get_n_points (m), 0);
  char *why = NULL;
  assert_false (lw_design_model_add_point (m, &why));
  assert_non_null (strstr (why, "none"));
  g_free (why);
  lw_design_model_set_plant_text (m, "180/(s*(s+12))");
  assert_valid (m);
  lw_history_commit (h);

  assert_true (lw_history_undo (h));   /* both parameters back, and both points */
  assert_int_equal (lw_design_model_get_n_points (m), 2);
  assert_true (lw_history_undo (h));   /* a given again */
  assert_true (lw_history_undo (h));   /* a removed */
  assert_true (lw_history_undo (h));
  char *u = text_of (m);
  assert_string_equal (u, t_both);
  g_free (u);
  g_free (t_both);
  g_object_unref (h);
  g_object_unref (m);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_add_name_values),
    cmocka_unit_test (test_refusals),
    cmocka_unit_test (test_remove_param),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
