/* test-plot-reuse.c — what a window keeps across the figures of a drag (lw-plot.h): curves
 * copied from the figure before (LwPlotVariant.data_key with axes_of) and text layouts kept in
 * an LwPlotTextCache must draw exactly what a figure built and drawn afresh draws.
 *
 * The reference is the renderer's own uncached path (mapping every point, laying out every
 * text anew), which the other plot tests and the CLI's figures check; equality is exact (the
 * same doubles, the same pixels), since a copy must not change a value. The loop data are an
 * invented integrator with one lag, |L| and ∠L by the textbook formulas for K/(s(1 + s/a)).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "lw-plot.h"

#define N 400
#define PI 3.14159265358979323846

typedef struct {
  double f[N], mag[N], ph[N], re[N], im[N];
} Curve;

/* L(jν) = k / (jν (1 + jν/a)) on ν from 0.01 to 1000 rad/s. */
static void
fill (Curve *c, double k, double a)
{
  for (int i = 0; i < N; i++)
    {
      double nu = 0.01 * pow (1e5, (double) i / (N - 1));
      double m = k / (nu * sqrt (1.0 + (nu / a) * (nu / a)));
      double p = -PI / 2 - atan (nu / a);
      c->f[i] = nu;
      c->mag[i] = 20.0 * log10 (m);
      c->ph[i] = p * 180.0 / PI;
      c->re[i] = m * cos (p);
      c->im[i] = m * sin (p);
    }
}

static LwPlotVariant
variant (const Curve *c, const char *name, unsigned long key)
{
  LwPlotVariant v;
  memset (&v, 0, sizeof v);
  v.name = name;
  v.w = (LwPlotFreqCurve) { .n = N, .freq_rad_s = c->f, .mag_db = c->mag, .phase_deg = c->ph };
  v.nyquist = (LwPlotComplexCurve) { .n = N, .re = c->re, .im = c->im };
  v.data_key = key;
  return v;
}

static LwPlot *
build (LwPlotView view, const LwPlotVariant *vs, size_t n, const LwPlot *axes_of)
{
  LwPlotInput in = { .view = view, .title = "reuse", .n_variants = n, .variants = vs,
                     .axes_of = axes_of };
  g_autoptr (GError) error = NULL;
  LwPlot *p = lw_plot_new (&in, &error);
  if (p == NULL)
    fail_msg ("lw_plot_new: %s", error->message);
  return p;
}

/* Pixels of the whole figure at 640 × 480 (with the cache given, or none). */
static cairo_surface_t *
render (LwPlot *p, LwPlotTextCache *cache)
{
  cairo_surface_t *s = cairo_image_surface_create (CAIRO_FORMAT_ARGB32, 640, 480);
  cairo_t *cr = cairo_create (s);
  lw_plot_set_text_cache (p, cache);
  lw_plot_draw_static (p, cr, 640, 480);
  lw_plot_set_text_cache (p, NULL);
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
                    (size_t) stride * 480) == 0;
}

/* A drag: the reference variant keeps its key, the dragged one gets new data and a new key.
 * The rebuilt figure with copied reference curves equals one mapped afresh, value for value
 * and pixel for pixel, in every view that has curves. */
static void
test_copied_curves_equal_mapped (void **state)
{
  (void) state;
  static Curve ref, before, after;
  fill (&ref, 2.0, 5.0);
  fill (&before, 1.0, 3.0);
  fill (&after, 1.3, 3.0);
  const LwPlotView views[] = { LW_PLOT_VIEW_BODE_W, LW_PLOT_VIEW_NYQUIST };
  for (size_t k = 0; k < sizeof views / sizeof views[0]; k++)
    {
      LwPlotVariant v0[2] = { variant (&ref, "reference", 1), variant (&before, "dragged", 2) };
      LwPlot *first = build (views[k], v0, 2, NULL);
      LwPlotVariant v1[2] = { variant (&ref, "reference", 1), variant (&after, "dragged", 3) };
      LwPlot *copied = build (views[k], v1, 2, first);
      LwPlotVariant v2[2] = { variant (&ref, "reference", 0), variant (&after, "dragged", 0) };
      LwPlot *fresh = build (views[k], v2, 2, first);
      assert_true (lw_plot_base_equal (copied, fresh, 1));
      assert_true (lw_plot_base_equal (copied, fresh, 0));
      cairo_surface_t *a = render (copied, NULL), *b = render (fresh, NULL);
      assert_true (same_pixels (a, b));
      cairo_surface_destroy (a);
      cairo_surface_destroy (b);
      lw_plot_free (fresh);
      lw_plot_free (copied);
      lw_plot_free (first);
    }
}

/* The copy really happens, and only under the key: when a caller breaks the promise (same
 * key and arrays, other values), the copied curve is the old one, so it differs from a fresh
 * mapping — and with the key 0 nothing is copied. */
static void
test_copy_follows_key (void **state)
{
  (void) state;
  static Curve c;
  fill (&c, 2.0, 5.0);
  LwPlotVariant v = variant (&c, NULL, 7);
  LwPlot *first = build (LW_PLOT_VIEW_BODE_W, &v, 1, NULL);
  for (int i = 0; i < N; i++)
    c.mag[i] -= 3.0;   /* inside the kept magnitude axis */
  LwPlot *copied = build (LW_PLOT_VIEW_BODE_W, &v, 1, first);
  v.data_key = 0;
  LwPlot *fresh = build (LW_PLOT_VIEW_BODE_W, &v, 1, first);
  /* the figures without variant 0's own primitives agree; with them, they must not */
  assert_true (lw_plot_base_equal (copied, fresh, 0));
  assert_false (lw_plot_base_equal (copied, fresh, 1));
  cairo_surface_t *a = render (copied, NULL), *b = render (fresh, NULL);
  assert_false (same_pixels (a, b));
  cairo_surface_destroy (a);
  cairo_surface_destroy (b);
  /* another key for the same arrays: mapped afresh */
  v.data_key = 8;
  LwPlot *rekeyed = build (LW_PLOT_VIEW_BODE_W, &v, 1, first);
  a = render (rekeyed, NULL);
  b = render (fresh, NULL);
  assert_true (same_pixels (a, b));
  cairo_surface_destroy (a);
  cairo_surface_destroy (b);
  lw_plot_free (rekeyed);
  lw_plot_free (fresh);
  lw_plot_free (copied);
  lw_plot_free (first);
}

/* Texts drawn through a cache (laid out on first use, reused after, and after the cache has
 * turned over its generations) give the pixels of texts laid out afresh. */
static void
test_text_cache_same_pixels (void **state)
{
  (void) state;
  static Curve c;
  fill (&c, 2.0, 5.0);
  LwPlotVariant v[1] = { variant (&c, "one", 0) };
  LwPlot *p = build (LW_PLOT_VIEW_BODE_W, v, 1, NULL);
  LwPlotTextCache *cache = lw_plot_text_cache_new ();
  cairo_surface_t *plain = render (p, NULL);
  for (int round = 0; round < 3; round++)
    {
      cairo_surface_t *s = render (p, cache);
      assert_true (same_pixels (plain, s));
      cairo_surface_destroy (s);
    }
  /* many other figures through the same cache: its generations turn over */
  for (int i = 0; i < 40; i++)
    {
      static Curve d;
      fill (&d, 0.5 + 0.37 * i, 1.0 + i);
      LwPlotVariant w[1] = { variant (&d, "other", 0) };
      LwPlot *q = build (LW_PLOT_VIEW_BODE_W, w, 1, NULL);
      cairo_surface_destroy (render (q, cache));
      lw_plot_free (q);
    }
  cairo_surface_t *s = render (p, cache);
  assert_true (same_pixels (plain, s));
  cairo_surface_destroy (s);
  cairo_surface_destroy (plain);
  lw_plot_text_cache_free (cache);
  lw_plot_free (p);
}

/* The window's decimated drawing (lw_plot_set_decimate: at most four vertices per pixel
 * column, then vertices a straight segment passes within 0.2 px of left out) against the
 * full polyline, on 20 000 points of a loop with a lightly damped resonance (ζ = 0.02, so the
 * curves turn sharply within a few columns): an edge moved by 0.2 px changes a pixel's
 * coverage by about a fifth (common practice, no source), so at most 0.2 % of the pixels may
 * differ by a fifth of full scale or more, and at most 8 by half or more (the resonance's
 * tips, where the column's extreme point turns sharply enough for a bevelled join where the
 * full curve's tiny mitres round it: 1 such pixel here). A control: drawing a different loop
 * (the resonance moved by 3 %) breaks the second bound fiftyfold. */
#define DENSE 20000
static void
dense (double *f, double *mag, double *ph, double wr)
{
  for (int i = 0; i < DENSE; i++)
    {
      double nu = 0.01 * pow (1e5, (double) i / (DENSE - 1)), r = nu / wr;
      double re = 1.0 - r * r, im = 2.0 * 0.02 * r;
      f[i] = nu;
      /* 1 / (jν (1 − r² + j 2ζ r)) */
      mag[i] = -20.0 * log10 (nu * hypot (re, im));
      ph[i] = (-PI / 2 - atan2 (im, re)) * 180.0 / PI;
    }
}

static size_t
pixels_apart (cairo_surface_t *a, cairo_surface_t *b, int by)
{
  cairo_surface_flush (a);
  cairo_surface_flush (b);
  const unsigned char *pa = cairo_image_surface_get_data (a), *pb = cairo_image_surface_get_data (b);
  int stride = cairo_image_surface_get_stride (a);
  size_t n = 0;
  for (int y = 0; y < cairo_image_surface_get_height (a); y++)
    for (int x = 0; x < cairo_image_surface_get_width (a); x++)
      {
        int worst = 0;
        for (int ch = 0; ch < 4; ch++)
          worst = MAX (worst, abs (pa[y * stride + 4 * x + ch] - pb[y * stride + 4 * x + ch]));
        n += worst >= by;
      }
  return n;
}

static void
test_decimated_within_antialiasing (void **state)
{
  (void) state;
  static double f[DENSE], mag[DENSE], ph[DENSE], f2[DENSE], mag2[DENSE], ph2[DENSE];
  dense (f, mag, ph, 3.0);
  dense (f2, mag2, ph2, 3.09);
  LwPlotVariant v;
  memset (&v, 0, sizeof v);
  v.name = "dense";
  v.w = (LwPlotFreqCurve) { .n = DENSE, .freq_rad_s = f, .mag_db = mag, .phase_deg = ph };
  LwPlotVariant v2 = v;
  v2.w = (LwPlotFreqCurve) { .n = DENSE, .freq_rad_s = f2, .mag_db = mag2, .phase_deg = ph2 };
  LwPlot *full = build (LW_PLOT_VIEW_BODE_W, &v, 1, NULL);
  LwPlot *dec = build (LW_PLOT_VIEW_BODE_W, &v, 1, NULL);
  LwPlot *other = build (LW_PLOT_VIEW_BODE_W, &v2, 1, NULL);
  lw_plot_set_decimate (dec, true);
  lw_plot_set_decimate (other, true);
  cairo_surface_t *a = render (full, NULL), *b = render (dec, NULL), *c = render (other, NULL);
  size_t half = pixels_apart (a, b, 128), fifth = pixels_apart (a, b, 51);
  print_message ("decimated: %zu pixels apart by half, %zu by a fifth; the other loop: %zu\n",
                 half, fifth, pixels_apart (a, c, 128));
  assert_true (half <= 8);
  assert_true (fifth <= 640 * 480 / 500);
  assert_true (pixels_apart (a, c, 128) > 50 * 8);
  cairo_surface_destroy (a);
  cairo_surface_destroy (b);
  cairo_surface_destroy (c);
  lw_plot_free (full);
  lw_plot_free (dec);
  lw_plot_free (other);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_copied_curves_equal_mapped),
    cmocka_unit_test (test_copy_follows_key),
    cmocka_unit_test (test_text_cache_same_pixels),
    cmocka_unit_test (test_decimated_within_antialiasing),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
