/* test-plot-axis.c — axis mapping and tick choice of the figure renderer (lw-plot-axis.h).
 *
 * Expected values are worked out by hand from the rules in lw-plot-axis.h (a log axis maps
 * log10 linearly; decades with minor ticks 2…9; natural steps 1, 2, 5 × 10^k, for degrees
 * 15, 30, 45, 90 …) — common engineering-graph practice, no source.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <float.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-plot-axis.h"

#define MINUS "\u2212"

static void
check_close (double got, double want, double tol, const char *what, int line)
{
  if (!(fabs (got - want) <= tol * fmax (fabs (want), 1.0)))
    fail_msg ("line %d: %s = %.17g, expected %.17g (tolerance %.3g)", line, what, got, want,
              tol);
}
/* 4 ulps: log10 and the division each round once, the subtraction once more. */
#define TOL_MAP (4 * DBL_EPSILON)
#define CHECK(got, want) check_close ((got), (want), TOL_MAP, #got, __LINE__)

static void
test_map_linear (void **state)
{
  (void) state;
  LwPlotAxis a;
  assert_true (lw_plot_axis_init (&a, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, -60, 20));
  CHECK (lw_plot_axis_map (&a, -60), 0.0);
  CHECK (lw_plot_axis_map (&a, 20), 1.0);
  CHECK (lw_plot_axis_map (&a, 0), 0.75);
  CHECK (lw_plot_axis_map (&a, 60), 1.5);   /* outside maps outside, not clamped */
  CHECK (lw_plot_axis_unmap (&a, 0.25), -40.0);
  /* bad ranges are refused and leave the axis untouched */
  assert_false (lw_plot_axis_init (&a, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, 1, 1));
  assert_false (lw_plot_axis_init (&a, LW_PLOT_SCALE_LOG, LW_PLOT_TICKS_PLAIN, 0, 10));
  assert_false (lw_plot_axis_init (&a, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, 0, NAN));
  CHECK (a.lo, -60.0);
}

static void
test_map_log (void **state)
{
  (void) state;
  LwPlotAxis a;
  assert_true (lw_plot_axis_init (&a, LW_PLOT_SCALE_LOG, LW_PLOT_TICKS_PLAIN, 0.01, 1000));
  /* five decades: each is 1/5 of the axis */
  CHECK (lw_plot_axis_map (&a, 0.01), 0.0);
  CHECK (lw_plot_axis_map (&a, 1), 0.4);
  CHECK (lw_plot_axis_map (&a, 10), 0.6);
  CHECK (lw_plot_axis_map (&a, 1000), 1.0);
  CHECK (lw_plot_axis_map (&a, sqrt (10.0)), 0.5);
  assert_true (isnan (lw_plot_axis_map (&a, 0.0)));
  assert_true (isnan (lw_plot_axis_map (&a, -1.0)));
  /* round trip; pow and log10 each within an ulp or two */
  for (double v = 0.013; v < 1000; v *= 1.7)
    check_close (lw_plot_axis_unmap (&a, lw_plot_axis_map (&a, v)), v, 16 * DBL_EPSILON,
                 "unmap(map(v))", __LINE__);
}

static size_t
ticks (const LwPlotAxis *a, int max_labels, LwPlotTick *t)
{
  return lw_plot_axis_ticks (a, max_labels, t, 512);
}

static void
test_log_decades (void **state)
{
  (void) state;
  LwPlotAxis a;
  LwPlotTick t[512];
  assert_true (lw_plot_axis_init (&a, LW_PLOT_SCALE_LOG, LW_PLOT_TICKS_PLAIN, 0.01, 1000));
  size_t n = ticks (&a, 10, t);
  /* 0.01 … 900 is 5 decades × 9 ticks, plus 1000 */
  assert_int_equal (n, 46);
  static const char *const want[] = { "0.01", "0.1", "1", "10", "100", "1000" };
  size_t k = 0;
  for (size_t i = 0; i < n; i++)
    {
      if (t[i].major)
        {
          assert_true (k < 6);
          assert_true (t[i].labelled);
          assert_string_equal (t[i].label, want[k]);
          k++;
        }
      else
        assert_false (t[i].labelled);
      if (i > 0)
        assert_true (t[i].value > t[i - 1].value);
    }
  assert_int_equal (k, 6);
  /* minor ticks: 2…9 times the decade, the nearest doubles to the decimals */
  assert_true (t[1].value == 0.02);
  assert_true (t[8].value == 0.09);
  assert_true (t[9].value == 0.1);
  assert_true (t[10].value == 0.2);
  assert_true (t[44].value == 900.0);
}

static void
test_log_nyquist_end (void **state)
{
  (void) state;
  /* a Bode axis in z ends at π/T; T = 0.1 s: 31.4159… rad/s. Last tick 30, not 40. */
  LwPlotAxis a;
  LwPlotTick t[512];
  assert_true (lw_plot_axis_init (&a, LW_PLOT_SCALE_LOG, LW_PLOT_TICKS_PLAIN, 0.1, 3.14159265358979323846 / 0.1));
  size_t n = ticks (&a, 10, t);
  assert_int_equal (n, 9 + 9 + 3);   /* 0.1…0.9, 1…9, 10, 20, 30 */
  assert_true (t[n - 1].value == 30.0);
  assert_false (t[n - 1].labelled);
  assert_string_equal (t[9].label, "1");
  assert_string_equal (t[18].label, "10");
}

static void
test_log_short_and_long (void **state)
{
  (void) state;
  LwPlotAxis a;
  LwPlotTick t[512];
  /* less than a decade: 1, 2, 5 multiples are labelled */
  assert_true (lw_plot_axis_init (&a, LW_PLOT_SCALE_LOG, LW_PLOT_TICKS_PLAIN, 0.5, 3));
  size_t n = ticks (&a, 8, t);
  assert_int_equal (n, 8);   /* 0.5 … 0.9, 1, 2, 3 */
  size_t labelled = 0;
  for (size_t i = 0; i < n; i++)
    labelled += t[i].labelled;
  assert_int_equal (labelled, 3);
  assert_string_equal (t[0].label, "0.5");
  assert_string_equal (t[6].label, "2");
  /* 12 decades, at most 6 labels: every 5th decade is labelled (10⁻⁵, 1, 10⁵) */
  assert_true (lw_plot_axis_init (&a, LW_PLOT_SCALE_LOG, LW_PLOT_TICKS_PLAIN, 1e-6, 1e6));
  n = ticks (&a, 6, t);
  assert_int_equal (n, 12 * 9 + 1);
  const char *got[8];
  size_t m = 0;
  for (size_t i = 0; i < n; i++)
    if (t[i].labelled && m < 8)
      got[m++] = t[i].label;
  assert_int_equal (m, 3);
  assert_string_equal (got[0], "10\u207b\u2075");
  assert_string_equal (got[1], "1");
  assert_string_equal (got[2], "10\u2075");
}

static void
test_linear_db (void **state)
{
  (void) state;
  LwPlotAxis a;
  LwPlotTick t[512];
  assert_true (lw_plot_axis_init (&a, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, -60, 20));
  /* span 80 dB, at most 6 labels: step 20 dB (16 would not be natural), minors every 5 dB */
  size_t n = ticks (&a, 6, t);
  assert_int_equal (n, 17);
  static const char *const want[] = { MINUS "60", MINUS "40", MINUS "20", "0", "20" };
  size_t k = 0;
  for (size_t i = 0; i < n; i++)
    if (t[i].labelled)
      {
        assert_true (k < 5);
        assert_string_equal (t[i].label, want[k]);
        k++;
      }
  assert_int_equal (k, 5);
  assert_true (t[1].value == -55.0);
  /* small steps keep their decimals */
  assert_true (lw_plot_axis_init (&a, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, -0.3, 0.3));
  n = ticks (&a, 4, t);
  k = 0;
  static const char *const want2[] = { MINUS "0.2", "0.0", "0.2" };
  for (size_t i = 0; i < n; i++)
    if (t[i].labelled)
      assert_string_equal (t[i].label, want2[k++]);
  assert_int_equal (k, 3);
}

static void
test_degrees (void **state)
{
  (void) state;
  LwPlotAxis a;
  LwPlotTick t[512];
  /* −270 … 0 with about 6 labels: 45° steps, 15° minors */
  assert_true (lw_plot_axis_init (&a, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_DEGREES, -270, 0));
  size_t n = ticks (&a, 6, t);
  assert_int_equal (n, 19);
  size_t k = 0;
  for (size_t i = 0; i < n; i++)
    if (t[i].major)
      {
        assert_true (fmod (t[i].value, 45.0) == 0.0);
        k++;
      }
  assert_int_equal (k, 7);
  /* −540 … 0: 90° steps */
  assert_true (lw_plot_axis_init (&a, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_DEGREES, -540, 0));
  n = ticks (&a, 6, t);
  for (size_t i = 0; i < n; i++)
    if (t[i].labelled)
      assert_true (fmod (t[i].value, 90.0) == 0.0);
  assert_true (lw_plot_nice_step (LW_PLOT_TICKS_DEGREES, 540, 6) == 90.0);
  assert_true (lw_plot_nice_step (LW_PLOT_TICKS_DEGREES, 1080, 6) == 180.0);
  assert_true (lw_plot_nice_step (LW_PLOT_TICKS_DEGREES, 100, 6) == 30.0);
  /* nice ranges: phase extent −190 … −20 → −210 … 0 in 30° steps */
  double lo, hi;
  lw_plot_nice_range (LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_DEGREES, -190, -20, 6, &lo, &hi);
  assert_true (lo == -210.0 && hi == 0.0);
  /* log ranges to whole decades: 0.0314 … 31.4 → 0.01 … 100 */
  lw_plot_nice_range (LW_PLOT_SCALE_LOG, LW_PLOT_TICKS_PLAIN, 0.0314, 31.4, 6, &lo, &hi);
  assert_true (lo == 0.01 && hi == 100.0);
  lw_plot_nice_range (LW_PLOT_SCALE_LOG, LW_PLOT_TICKS_PLAIN, 0.01, 100, 6, &lo, &hi);
  assert_true (lo == 0.01 && hi == 100.0);
}

static void
test_format (void **state)
{
  (void) state;
  char b[LW_PLOT_TICK_LABEL_MAX];
  lw_plot_format_tick (0.001, 0, true, b, sizeof b);
  assert_string_equal (b, "0.001");
  lw_plot_format_tick (2e6, 0, true, b, sizeof b);
  assert_string_equal (b, "2\u00b710\u2076");
  lw_plot_format_tick (-1e-12, 5, false, b, sizeof b);   /* −0 is written 0 */
  assert_string_equal (b, "0");
  lw_plot_format_tick (-135, 45, false, b, sizeof b);
  assert_string_equal (b, MINUS "135");
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_map_linear),      cmocka_unit_test (test_map_log),
    cmocka_unit_test (test_log_decades),     cmocka_unit_test (test_log_nyquist_end),
    cmocka_unit_test (test_log_short_and_long), cmocka_unit_test (test_linear_db),
    cmocka_unit_test (test_degrees),         cmocka_unit_test (test_format),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
