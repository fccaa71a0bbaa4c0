/* test-plot-view.c — the view table (lw-plot-view.h) holds together: one row per view in
 * enum order, names that are unique words usable in a file name and a document, a title and a
 * summary for each; every view draws from exactly the data its row says it needs, and is
 * refused, naming itself, without them.
 *
 * The names are checked against the list the CLI has always accepted (docs/plot.md), written
 * out here, so a renamed view fails this test. The loop data are an invented integrator with
 * one lag, K/(s(1 + s/a)), by the textbook formulas for |L| and ∠L; a step response and a pole
 * map of a few invented points (their values do not matter here, only their presence).
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

#include <glib.h>

#include "lw-plot.h"

#define N 200
#define PI 3.14159265358979323846

static double f[N], mag[N], ph[N], re[N], im[N], y[N];
static const double pole_re[2] = { 0.9, 0.5 }, pole_im[2] = { 0.1, 0.0 };

/* L(jν) = 2 / (jν (1 + jν/5)) on ν from 0.01 to 1000 rad/s; a first-order step. */
static void
fill (void)
{
  for (int i = 0; i < N; i++)
    {
      double nu = 0.01 * pow (1e5, (double) i / (N - 1));
      double m = 2.0 / (nu * sqrt (1.0 + (nu / 5.0) * (nu / 5.0)));
      double p = -PI / 2 - atan (nu / 5.0);
      f[i] = nu;
      mag[i] = 20.0 * log10 (m);
      ph[i] = p * 180.0 / PI;
      re[i] = m * cos (p);
      im[i] = m * sin (p);
      y[i] = 1.0 - exp (-0.05 * i);
    }
}

/* A variant with only the series of `needs` (LwPlotNeeds) filled. */
static LwPlotVariant
variant_with (unsigned needs)
{
  LwPlotVariant v;
  memset (&v, 0, sizeof v);
  LwPlotFreqCurve c = { .n = N, .freq_rad_s = f, .mag_db = mag, .phase_deg = ph };
  if (needs & LW_PLOT_NEEDS_Z)
    v.z = c;
  if (needs & LW_PLOT_NEEDS_W)
    v.w = c;
  if (needs & LW_PLOT_NEEDS_NYQUIST)
    v.nyquist = (LwPlotComplexCurve) { .n = N, .re = re, .im = im };
  if (needs & LW_PLOT_NEEDS_STEP)
    v.step = (LwPlotStepData) { .period_s = 0.1, .n = N, .y = y };
  if (needs & LW_PLOT_NEEDS_DISTURBANCE)
    {
      v.dist_in = (LwPlotStepData) { .period_s = 0.1, .n = N, .y = y };
      v.dist_out = (LwPlotStepData) { .period_s = 0.1, .n = N, .y = re };
    }
  if (needs & LW_PLOT_NEEDS_POLES)
    v.poles = (LwPlotPoleData) { .n_closed_loop = 2, .cl_re = pole_re, .cl_im = pole_im };
  return v;
}

static LwPlot *
build (LwPlotView view, unsigned needs, char *msg, size_t size)
{
  LwPlotVariant v = variant_with (needs);
  LwPlotInput in = { .view = view, .n_variants = 1, .variants = &v };
  if (needs & LW_PLOT_NEEDS_NYQUIST_RATE)
    in.nyquist_rad_s = 1000.0;
  msg[0] = '\0';
  g_autoptr (GError) error = NULL;
  LwPlot *p = lw_plot_new (&in, &error);
  if (p == NULL)
    {
      assert_true (error != NULL && error->domain == LW_PLOT_ERROR
                   && error->code == LW_PLOT_ERROR_INPUT);
      g_strlcpy (msg, error->message, size);
    }
  return p;
}

/* The figure at 320 × 240 (light theme). */
static cairo_surface_t *
render (LwPlot *p)
{
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_ARGB32, 320, 240);
  cairo_t *cr = cairo_create (s);
  lw_plot_draw_static (p, cr, 320, 240);
  cairo_destroy (cr);
  cairo_surface_flush (s);
  return s;
}

static bool
same_pixels (cairo_surface_t *a, cairo_surface_t *b)
{
  int stride = cairo_image_surface_get_stride (a);
  return stride == cairo_image_surface_get_stride (b)
         && memcmp (cairo_image_surface_get_data (a), cairo_image_surface_get_data (b),
                    (size_t) stride * 240) == 0;
}

/* The names `loopwright-cli plot --view` accepts (docs/plot.md), in the order listed. */
static const char *const cli_names[] = { "bode-z", "bode-w", "step", "nyquist", "nichols",
                                         "poles", "sensitivity", "disturbance" };

static void
test_rows (void **state)
{
  (void) state;
  assert_int_equal (LW_PLOT_N_VIEWS, G_N_ELEMENTS (cli_names));
  for (int v = 0; v < LW_PLOT_N_VIEWS; v++)
    {
      const LwPlotViewInfo *info = lw_plot_view_info ((LwPlotView) v);
      assert_non_null (info);
      assert_int_equal (info->view, v);
      assert_string_equal (info->name, cli_names[v]);
      assert_string_equal (lw_plot_view_name ((LwPlotView) v), info->name);
      assert_int_equal (lw_plot_view_from_name (info->name), v);
      /* a word of a–z, 0–9 and '-': a file name part and a document word */
      assert_int_equal (strspn (info->name, "abcdefghijklmnopqrstuvwxyz0123456789-"),
                        strlen (info->name));
      assert_true (info->title != NULL && info->title[0] != '\0');
      assert_true (info->summary != NULL && info->summary[0] != '\0');
      assert_true (info->needs != 0);
      /* handles and the w-plane only on a frequency axis */
      if (info->traits & (LW_PLOT_VIEW_HANDLES | LW_PLOT_VIEW_W_PLANE))
        assert_true (info->traits & LW_PLOT_VIEW_FREQUENCY_AXIS);
      if (info->traits & LW_PLOT_VIEW_IN_SPLIT)
        assert_true (info->traits & LW_PLOT_VIEW_IN_WINDOW);
      for (int u = 0; u < v; u++)
        assert_string_not_equal (lw_plot_view_name ((LwPlotView) u), info->name);
    }
  assert_null (lw_plot_view_info (LW_PLOT_N_VIEWS));
  assert_string_equal (lw_plot_view_name (LW_PLOT_N_VIEWS), "?");
  assert_int_equal (lw_plot_view_from_name ("bode"), -1);
  assert_int_equal (lw_plot_view_from_name (NULL), -1);
  assert_false (lw_plot_view_has (LW_PLOT_N_VIEWS, 0));
  g_autofree char *joined = lw_plot_view_names_joined (" or ");
  assert_string_equal (joined, "bode-z, bode-w, step, nyquist, nichols, poles, sensitivity or disturbance");
}

/* Each view draws from what its row needs, and nothing less: given only those series it draws
 * the same pixels as given every series; without them (or without the Nyquist rate) it is
 * refused, naming itself. */
static void
test_needs (void **state)
{
  (void) state;
  fill ();
  for (int v = 0; v < LW_PLOT_N_VIEWS; v++)
    {
      const LwPlotViewInfo *info = lw_plot_view_info ((LwPlotView) v);
      char msg[256];
      LwPlot *p = build ((LwPlotView) v, info->needs, msg, sizeof msg);
      if (p == NULL)
        fail_msg ("%s: %s", info->name, msg);
      assert_true (lw_plot_n_panels (p) >= 1);
      unsigned all = LW_PLOT_NEEDS_Z | LW_PLOT_NEEDS_W | LW_PLOT_NEEDS_NYQUIST
                     | LW_PLOT_NEEDS_STEP | LW_PLOT_NEEDS_POLES | LW_PLOT_NEEDS_NYQUIST_RATE
                     | LW_PLOT_NEEDS_DISTURBANCE;
      LwPlot *full = build ((LwPlotView) v, all, msg, sizeof msg);
      assert_non_null (full);
      cairo_surface_t *a = render (p), *b = render (full);
      if (!same_pixels (a, b))
        fail_msg ("%s: its own data draw another figure than every series", info->name);
      cairo_surface_destroy (a);
      cairo_surface_destroy (b);
      lw_plot_free (full);
      /* a frequency axis zooms; others refuse */
      assert_int_equal (lw_plot_set_x_view (p, 0.1, 10.0),
                        (info->traits & LW_PLOT_VIEW_FREQUENCY_AXIS) != 0);
      lw_plot_free (p);
      /* everything but what it needs: refused */
      unsigned data = info->needs & ~LW_PLOT_NEEDS_NYQUIST_RATE;
      unsigned others = (all & ~data) | (info->needs & LW_PLOT_NEEDS_NYQUIST_RATE);
      assert_null (build ((LwPlotView) v, others, msg, sizeof msg));
      assert_non_null (strstr (msg, info->name));
      if (info->needs & LW_PLOT_NEEDS_NYQUIST_RATE)
        {
          assert_null (build ((LwPlotView) v, data, msg, sizeof msg));
          assert_non_null (strstr (msg, "Nyquist frequency"));
        }
    }
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_rows),
    cmocka_unit_test (test_needs),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
