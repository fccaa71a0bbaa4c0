/* test-history.c — LwHistory (src/gui/lw-history.c) on a design model without a window:
 * edits within the merge time are one step, undo and redo restore the document's canonical
 * text byte for byte, a held history (a drag) makes no step until its holder commits, the
 * depth limit drops the oldest steps, "can-undo"/"can-redo" follow.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <string.h>

#include "lw-history.h"

#define MERGE_MS 20

static char *
text_of (LwDesignModel *m)
{
  GError *error = NULL;
  char *t = lw_design_to_text (lw_design_model_get_design (m), NULL, &error);
  assert_non_null (t);
  return t;
}

/* Runs the main loop until the merge timer has fired (three merge times). */
static void
let_merge (void)
{
  gint64 end = g_get_monotonic_time () + 3 * MERGE_MS * 1000;
  while (g_get_monotonic_time () < end)
    g_main_context_iteration (NULL, FALSE);
}

static void
test_merge_and_restore (void **state)
{
  LwDesignModel *m = lw_design_model_new_example ();
  LwHistory *h = lw_history_new (m, 200, MERGE_MS);
  char *t0 = text_of (m);
  assert_false (lw_history_get_can_undo (h));

  /* a burst of edits: one step */
  lw_design_model_set_period_s (m, 0.003);
  lw_design_model_set_period_s (m, 0.004);
  assert_true (lw_history_get_can_undo (h));   /* an edit not yet committed can be undone */
  let_merge ();
  char *t1 = text_of (m);
  lw_design_model_set_dead_time_s (m, 0.001);
  let_merge ();
  char *t2 = text_of (m);
  assert_true (strcmp (t1, t2) != 0 && strcmp (t0, t1) != 0);

  assert_true (lw_history_undo (h));
  char *u1 = text_of (m);
  assert_string_equal (u1, t1);
  assert_true (lw_history_get_can_redo (h));
  assert_true (lw_history_undo (h));   /* the burst was one step: back at the start */
  char *u0 = text_of (m);
  assert_string_equal (u0, t0);
  assert_false (lw_history_undo (h));
  assert_false (lw_history_get_can_undo (h));
  assert_true (lw_history_redo (h));
  assert_true (lw_history_redo (h));
  char *r2 = text_of (m);
  assert_string_equal (r2, t2);
  assert_false (lw_history_get_can_redo (h));
  /* undo and redo are not edits: nothing was merged meanwhile */
  let_merge ();
  assert_true (lw_history_undo (h));
  char *again = text_of (m);
  assert_string_equal (again, t1);

  g_object_unref (h);
  g_object_unref (m);
  g_free (t0); g_free (t1); g_free (t2); g_free (u0); g_free (u1); g_free (r2); g_free (again);
}

static void
test_hold (void **state)
{
  LwDesignModel *m = lw_design_model_new_example ();
  LwHistory *h = lw_history_new (m, 200, MERGE_MS);
  char *t0 = text_of (m);
  lw_history_hold (h, TRUE);
  lw_design_model_set_period_s (m, 0.003);
  let_merge ();
  lw_design_model_set_period_s (m, 0.005);
  let_merge ();
  assert_false (lw_history_has_steps (h));   /* nothing merged while held */
  lw_history_hold (h, FALSE);
  lw_history_commit (h);
  assert_true (lw_history_has_steps (h));
  assert_true (lw_history_undo (h));          /* the whole held stretch is one step */
  char *u = text_of (m);
  assert_string_equal (u, t0);
  g_object_unref (h);
  g_object_unref (m);
  g_free (t0);
  g_free (u);
}

static void
test_depth (void **state)
{
  LwDesignModel *m = lw_design_model_new_example ();
  LwHistory *h = lw_history_new (m, 3, MERGE_MS);
  for (int i = 1; i <= 5; i++)
    {
      lw_design_model_set_period_s (m, 0.001 * i);
      lw_history_commit (h);
    }
  int undone = 0;
  while (lw_history_undo (h))
    undone++;
  assert_int_equal (undone, 3);
  /* the oldest kept: period 2 ms (steps 0 and 1 ms dropped) */
  assert_true (lw_design_model_get_period_s (m) == 0.002);
  g_object_unref (h);
  g_object_unref (m);
}

static void
count_notify (GObject *o, GParamSpec *p, gpointer data)
{
  (*(int *) data)++;
}

static void
test_notify (void **state)
{
  LwDesignModel *m = lw_design_model_new_example ();
  LwHistory *h = lw_history_new (m, 200, MERGE_MS);
  int undo_n = 0, redo_n = 0;
  g_signal_connect (h, "notify::can-undo", G_CALLBACK (count_notify), &undo_n);
  g_signal_connect (h, "notify::can-redo", G_CALLBACK (count_notify), &redo_n);
  lw_design_model_set_period_s (m, 0.003);
  assert_int_equal (undo_n, 1);   /* false → true on the edit */
  lw_design_model_set_period_s (m, 0.004);
  assert_int_equal (undo_n, 1);   /* no change, no notification */
  lw_history_undo (h);
  assert_int_equal (undo_n, 2);
  assert_int_equal (redo_n, 1);
  lw_history_redo (h);
  assert_int_equal (redo_n, 2);
  g_object_unref (h);
  g_object_unref (m);
}

/* The dead-time field of a design whose dead time is a family's parameter: the parameter's
 * nominal follows, a range that would not hold it is stretched to it, and what is saved
 * still loads (lw_design_validate); one undo gives the document back. */
static void
test_dead_time_parameter (void **state)
{
  (void) state;
  static const char doc[] =
    "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
    "<design xmlns=\"urn:loopwright:design\" version=\"1\">\n"
    "  <title>t</title>\n"
    "  <plant dead_time_s=\"0.01\">K/(s*(s+2))</plant>\n"
    "  <parameters>\n"
    "    <parameter name=\"K\" nominal=\"3\"/>\n"
    "    <parameter name=\"dead_time_s\" nominal=\"0.01\" low=\"0.005\" high=\"0.02\"/>\n"
    "  </parameters>\n"
    "  <sampling period_s=\"0.01\" hold=\"zero-order\" compute_delay_samples=\"1\"/>\n"
    "  <variants active=\"a\">\n    <variant name=\"a\"/>\n  </variants>\n"
    "</design>\n";
  GError *error = NULL;
  LwDesign *d = lw_design_load_data (doc, sizeof doc - 1, "t.lwd", &error);
  assert_non_null (d);
  LwDesignModel *m = lw_design_model_new (d);
  LwHistory *h = lw_history_new (m, 200, MERGE_MS);
  char *t0 = text_of (m);
  lw_design_model_set_dead_time_s (m, 0.03);
  let_merge ();
  const LwDesign *e = lw_design_model_get_design (m);
  const LwDesignParam *p = &e->params[1];
  assert_true (p->nominal == 0.03 && p->ranged && p->low == 0.005 && p->high == 0.03);
  assert_true (lw_design_validate (e, &error));
  lw_design_model_set_dead_time_s (m, 0.007);   /* inside: the range stays */
  let_merge ();
  p = &lw_design_model_get_design (m)->params[1];
  assert_true (p->nominal == 0.007 && p->low == 0.005 && p->high == 0.03);
  assert_true (lw_history_undo (h) && lw_history_undo (h));
  char *t1 = text_of (m);
  assert_string_equal (t1, t0);
  g_free (t0);
  g_free (t1);
  g_object_unref (h);
  g_object_unref (m);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_merge_and_restore),
    cmocka_unit_test (test_hold),
    cmocka_unit_test (test_depth),
    cmocka_unit_test (test_notify),
    cmocka_unit_test (test_dead_time_parameter),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
