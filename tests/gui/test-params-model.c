/* test-params-model.c — the plant's parameters in the window's design model
 * (src/gui/lw-design-model-params.c) without a window: the names the plant's text uses and
 * those no parameter gives; setting, ranging, fixing and removing a parameter, each one
 * "changed" (so one undo step, undone byte for byte); every refusal of docs/families.md
 * leaving the document and its signals untouched; the dead time as a parameter; the
 * family's members and seed.
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
count (guint *n)
{
  (*n)++;
}

/* A model on plant (T = 10 ms) counting its "changed" signals into *changes. */
static LwDesignModel *
model_on (const char *plant, guint *changes)
{
  LwDesignModel *m = lw_design_model_new (lw_design_new (plant, 0.01));
  g_signal_connect_swapped (m, "changed", G_CALLBACK (count), changes);
  return m;
}

static void
assert_names (char **got, const char *const *want)
{
  assert_int_equal (g_strv_length (got), g_strv_length ((char **) want));
  for (guint i = 0; want[i] != NULL; i++)
    assert_string_equal (got[i], want[i]);
  g_strfreev (got);
}

/* The names as the parser reads them: the exponent of a number is no name, s is the variable,
 * each name once in order of first use; those a parameter gives are not missing. */
static void
test_names (void **state)
{
  (void) state;
  guint changes = 0;
  LwDesignModel *m = model_on ("2.5e-3*K*wn^2/(s*(s+a_1)*(s^2+2*zeta*wn*s+wn^2))+1E+2*K",
                               &changes);
  const char *const all[] = { "K", "wn", "a_1", "zeta", NULL };
  assert_names (lw_design_model_missing_params (m), all);
  assert_true (lw_design_model_plant_uses (m, "zeta"));
  assert_false (lw_design_model_plant_uses (m, "e"));
  assert_false (lw_design_model_plant_uses (m, "s"));
  LwDesignParam k = { .name = (char *) "wn", .nominal = 200.0 };
  assert_true (lw_design_model_set_param (m, &k, NULL));
  const char *const rest[] = { "K", "a_1", "zeta", NULL };
  assert_names (lw_design_model_missing_params (m), rest);
  g_object_unref (m);
}

/* Each change is one "changed" and one undo step, undone byte for byte; setting what is
 * there already changes nothing; a fixed parameter keeps no range in the document. */
static void
test_set_range_fix_remove (void **state)
{
  (void) state;
  guint changes = 0;
  LwDesignModel *m = model_on ("K/(s*(s+a))", &changes);
  LwHistory *h = lw_history_new (m, 200, 1000000);
  LwDesignParam k = { .name = (char *) "K", .nominal = 180.0 };
  /* a still missing: the plant's error, not K's */
  assert_true (lw_design_model_set_param (m, &k, NULL));
  assert_int_equal (changes, 1);
  assert_true (lw_design_model_set_param (m, &k, NULL));
  assert_int_equal (changes, 1);
  LwDesignParam a = { .name = (char *) "a", .nominal = 12.0 };
  assert_true (lw_design_model_set_param (m, &a, NULL));
  lw_history_commit (h);
  char *t_fixed = text_of (m);
  assert_non_null (strstr (t_fixed, "<parameter name=\"K\" nominal=\"180\"/>"));

  k.ranged = true;
  k.low = 150.0;
  k.high = 220.0;
  k.spread = LW_SPREAD_LOG;
  assert_true (lw_design_model_set_param (m, &k, NULL));
  assert_int_equal (changes, 3);
  lw_history_commit (h);
  char *t_ranged = text_of (m);
  assert_non_null (strstr (t_ranged, "<parameter name=\"K\" nominal=\"180\" low=\"150\" "
                                     "high=\"220\" spread=\"log\"/>"));
  GError *error = NULL;
  assert_true (lw_design_validate (lw_design_model_get_design (m), &error));

  k.ranged = false;   /* back to a fixed value: the range is not kept */
  assert_true (lw_design_model_set_param (m, &k, NULL));
  lw_history_commit (h);
  char *t_back = text_of (m);
  assert_string_equal (t_back, t_fixed);

  assert_true (lw_history_undo (h));
  char *u = text_of (m);
  assert_string_equal (u, t_ranged);

  assert_true (lw_design_model_remove_param (m, "a"));
  assert_false (lw_design_model_remove_param (m, "a"));
  assert_int_equal (lw_design_model_get_n_params (m), 1);
  const char *const missing[] = { "a", NULL };
  assert_names (lw_design_model_missing_params (m), missing);
  assert_true (lw_history_undo (h));
  char *u2 = text_of (m);
  assert_string_equal (u2, t_ranged);

  g_free (t_fixed); g_free (t_ranged); g_free (t_back); g_free (u); g_free (u2);
  g_object_unref (h);
  g_object_unref (m);
}

/* Every refusal of docs/families.md: FALSE with the reason, the document and its signals
 * untouched. */
static void
test_refusals (void **state)
{
  (void) state;
  guint changes = 0;
  LwDesignModel *m = model_on ("(K-1)/(s*(s+a))", &changes);
  LwDesignParam a = { .name = (char *) "a", .nominal = 12.0 };
  LwDesignParam k = { .name = (char *) "K", .nominal = 3.0 };
  assert_true (lw_design_model_set_param (m, &a, NULL) && lw_design_model_set_param (m, &k, NULL));
  char *t0 = text_of (m);
  guint changes0 = changes;
  const struct { double nominal, low, high; LwParamSpread spread; const char *words; } bad[] = {
    { 3.0, 2.0, 2.0, LW_SPREAD_UNIFORM, "empty" },
    { 3.0, 4.0, 2.0, LW_SPREAD_UNIFORM, "backwards" },
    { 5.0, 2.0, 4.0, LW_SPREAD_UNIFORM, "outside its range" },
    { NAN, 2.0, 4.0, LW_SPREAD_UNIFORM, "not finite" },
    { 3.0, 2.0, INFINITY, LW_SPREAD_UNIFORM, "not finite" },
    { 0.5, -1.0, 2.0, LW_SPREAD_LOG, "log spread" },
    { 0.5, 0.0, 2.0, LW_SPREAD_LOG, "log spread" },
    /* K − 1 is zero at the corner K = 1: the plant is zero there */
    { 3.0, 1.0, 4.0, LW_SPREAD_UNIFORM, "corner" },
  };
  for (size_t i = 0; i < G_N_ELEMENTS (bad); i++)
    {
      LwDesignParam p = { .name = (char *) "K", .nominal = bad[i].nominal, .ranged = true,
                          .low = bad[i].low, .high = bad[i].high, .spread = bad[i].spread };
      char *why = NULL;
      assert_false (lw_design_model_set_param (m, &p, &why));
      assert_non_null (why);
      if (strstr (why, bad[i].words) == NULL)
        fail_msg ("case %zu: \"%s\" does not say \"%s\"", i, why, bad[i].words);
      char *problem = lw_design_model_param_problem (m, &p);
      assert_string_equal (problem, why);
      g_free (problem);
      g_free (why);
    }
  char *t1 = text_of (m);
  assert_string_equal (t1, t0);
  assert_int_equal (changes, changes0);
  /* a plant that does not parse at the nominals lets a parameter through (its own error is
   * the plant's), but not a parameter refused on its own */
  lw_design_model_set_plant_text (m, "(K-1)/(s*(s+a+b))");
  LwDesignParam empty = { .name = (char *) "K", .nominal = 3.0, .ranged = true, .low = 3.0,
                          .high = 3.0 };
  char *why = NULL;
  assert_false (lw_design_model_set_param (m, &empty, &why));
  assert_non_null (strstr (why, "empty"));
  g_free (why);
  k.nominal = 4.0;
  assert_true (lw_design_model_set_param (m, &k, NULL));
  g_free (t0);
  g_free (t1);
  g_object_unref (m);
}

/* The dead time as a parameter: its nominal must be the plant's dead time, its range 0 or
 * more; the dead-time field then moves its nominal (lw_design_model_set_dead_time_s). */
static void
test_dead_time (void **state)
{
  (void) state;
  guint changes = 0;
  LwDesignModel *m = model_on ("180/(s*(s+12))", &changes);
  lw_design_model_set_dead_time_s (m, 0.02);
  LwDesignParam d = { .name = (char *) LW_DESIGN_DEAD_TIME_PARAM, .nominal = 0.01,
                      .ranged = true, .low = 0.0, .high = 0.03 };
  char *why = NULL;
  assert_false (lw_design_model_set_param (m, &d, &why));
  assert_non_null (strstr (why, "dead time"));
  g_clear_pointer (&why, g_free);
  d.nominal = 0.02;
  d.low = -0.01;
  assert_false (lw_design_model_set_param (m, &d, &why));
  assert_non_null (strstr (why, "negative"));
  g_clear_pointer (&why, g_free);
  d.low = 0.01;
  assert_true (lw_design_model_set_param (m, &d, NULL));
  char **missing = lw_design_model_missing_params (m);
  assert_null (missing[0]);
  g_strfreev (missing);
  GError *error = NULL;
  assert_true (lw_design_validate (lw_design_model_get_design (m), &error));
  lw_design_model_set_dead_time_s (m, 0.025);
  const LwDesignParam *p = lw_design_model_get_param (m, 0);
  assert_true (p->nominal == 0.025 && p->ranged && p->low == 0.01 && p->high == 0.03);
  g_object_unref (m);
}

/* The family's members and seed: the defaults (100 and 1, lw_family_options_init) until set;
 * a change is one "changed" and one undo step, undone byte for byte; a value left as it is
 * stays out of the document; over the limits or without parameters refused, nothing changed;
 * the last parameter removed takes them with it. */
static void
test_family_sampling (void **state)
{
  (void) state;
  guint changes = 0;
  LwDesignModel *m = model_on ("K/(s*(s+12))", &changes);
  gsize members = 0;
  guint64 seed = 0;
  assert_false (lw_design_model_set_family_sampling (m, 20, 4, NULL));   /* no parameters */
  assert_int_equal (changes, 0);
  LwDesignParam k = { .name = (char *) "K", .nominal = 180.0, .ranged = true, .low = 150.0,
                      .high = 220.0 };
  assert_true (lw_design_model_set_param (m, &k, NULL));
  LwHistory *h = lw_history_new (m, 200, 1000000);
  lw_history_commit (h);
  char *t0 = text_of (m);
  lw_design_model_get_family_sampling (m, &members, &seed);
  assert_int_equal (members, 100);
  assert_int_equal (seed, 1);
  changes = 0;
  assert_true (lw_design_model_set_family_sampling (m, 100, 1, NULL));   /* as it is */
  assert_int_equal (changes, 0);

  assert_true (lw_design_model_set_family_sampling (m, 20, 1, NULL));
  assert_int_equal (changes, 1);
  lw_history_commit (h);
  char *t1 = text_of (m);
  assert_non_null (strstr (t1, "<parameters members=\"20\">"));   /* the seed left out */
  assert_true (lw_design_model_set_family_sampling (m, 20, 4, NULL));
  assert_int_equal (changes, 2);
  lw_history_commit (h);
  char *t2 = text_of (m);
  assert_non_null (strstr (t2, "<parameters members=\"20\" seed=\"4\">"));
  lw_design_model_get_family_sampling (m, &members, &seed);
  assert_int_equal (members, 20);
  assert_int_equal (seed, 4);

  char *why = NULL;
  assert_false (lw_design_model_set_family_sampling (m, LW_DESIGN_MAX_FAMILY_MEMBERS + 1, 4,
                                                     &why));
  assert_non_null (why);
  g_clear_pointer (&why, g_free);
  assert_false (lw_design_model_set_family_sampling (m, 20, (guint64) G_MAXINT64 + 1, &why));
  assert_non_null (why);
  g_clear_pointer (&why, g_free);
  assert_int_equal (changes, 2);
  char *t_refused = text_of (m);
  assert_string_equal (t_refused, t2);

  assert_true (lw_history_undo (h));
  char *u1 = text_of (m);
  assert_string_equal (u1, t1);
  assert_true (lw_history_undo (h));
  char *u0 = text_of (m);
  assert_string_equal (u0, t0);

  assert_true (lw_design_model_set_family_sampling (m, 0, (guint64) G_MAXINT64, NULL));
  assert_true (lw_design_model_remove_param (m, "K"));
  lw_design_model_get_family_sampling (m, &members, &seed);
  assert_int_equal (members, 100);
  assert_int_equal (seed, 1);

  g_free (t0); g_free (t1); g_free (t2); g_free (t_refused); g_free (u1); g_free (u0);
  g_object_unref (h);
  g_object_unref (m);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_names),
    cmocka_unit_test (test_set_range_fix_remove),
    cmocka_unit_test (test_refusals),
    cmocka_unit_test (test_dead_time),
    cmocka_unit_test (test_family_sampling),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
