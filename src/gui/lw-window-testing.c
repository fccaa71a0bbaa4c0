/* lw-window-testing.c — the window's benchmark and test hooks: the drag benchmark
 * (loopwright --bench-drag, lw_window_start_bench_drag) and Export Figure without its dialog
 * (LW_TEST_FIGURE_PATH).  The other hooks are where what they show is made: the LW-… lines
 * of LW_DEBUG_HANDLES=1 (each part), LW_TEST_REPORT_PATH (the report, lw-window.c) and
 * LW_TEST_AUTOSAVE_INTERVAL_MS (the application, lw-application.c).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>

#include "lw-plot-export.h"
#include "lw-window-private.h"

/* ---- Export Figure without the dialogs ----------------------------------------------------- */

/* Test hook: with LW_TEST_FIGURE_PATH set, Export Figure writes the view LW_TEST_FIGURE_VIEW
 * (a view name, default bode-w) there at once, 800 × 600 in the light theme, in the format of
 * the path's extension, without the dialogs (tests/gui/test-compare.py). */
gboolean
lw_window_export_figure_for_test (LwWindow *self)
{
  const char *path = g_getenv ("LW_TEST_FIGURE_PATH");
  if (path == NULL || *path == '\0')
    return FALSE;
  const char *vname = g_getenv ("LW_TEST_FIGURE_VIEW");
  int view = lw_plot_view_from_name (vname != NULL ? vname : "bode-w");
  int format = lw_plot_format_from_path (path);
  g_autoptr (GError) error = NULL;
  LwPlot *plot = view >= 0 && format >= 0
                   ? lw_window_build_export_plot ((LwPlotView) view, self, &error) : NULL;
  LwPlotExportOptions eo = { .pdf_creator = "loopwright " PACKAGE_VERSION };
  if (plot == NULL || !lw_plot_export (plot, (LwPlotFormat) format, path, 800, 600, &eo, &error))
    g_printerr ("LW-TEST export of %s failed: %s\n", path,
                error != NULL ? error->message : "bad view or format");
  lw_plot_free (plot);
  return TRUE;
}

/* ---- benchmark ----------------------------------------------------------------------------- */

static int
compare_double (const void *a, const void *b)
{
  double x = *(const double *) a, y = *(const double *) b;
  return x < y ? -1 : x > y;
}

/* Nearest-rank percentile of sorted values, p in (0, 100]. */
static double
percentile (const GArray *sorted, double p)
{
  if (sorted->len == 0)
    return NAN;
  size_t rank = (size_t) ceil (p / 100.0 * sorted->len);
  rank = CLAMP (rank, 1, sorted->len);
  return g_array_index (sorted, double, rank - 1);
}

static void
bench_before_paint (GdkFrameClock *clock, LwWindow *self)
{
  self->paint_start = g_get_monotonic_time ();
}

static void
bench_after_paint (GdkFrameClock *clock, LwWindow *self)
{
  if (!self->bench_pending)
    return;
  gint64 now = g_get_monotonic_time ();
  double paint = (now - self->paint_start) / 1000.0;
  g_array_append_val (self->bench_paint, paint);
  self->bench_pending = FALSE;
  if (self->bench_paint->len < self->bench_frames)
    return;

  g_array_sort (self->bench_paint, compare_double);
  printf ("drag frames: %u, paint median %.2f ms, p95 %.2f ms\n", self->bench_frames,
          percentile (self->bench_paint, 50), percentile (self->bench_paint, 95));
  fflush (stdout);
  /* how often each pane drew its cached layer, over the whole run (to stderr: the figure line
   * above stays the only output) */
  static const LwPlotView views[] = { LW_PLOT_VIEW_BODE_Z, LW_PLOT_VIEW_BODE_W,
                                      LW_PLOT_VIEW_STEP, LW_PLOT_VIEW_NYQUIST };
  for (guint i = 0; i < G_N_ELEMENTS (views); i++)
    {
      LwPlotPane *pane = lw_plot_area_get_pane (self->plot_area, views[i]);
      if (pane != NULL)
        g_printerr ("bench-drag: %s pane drew its cached layer %" G_GUINT64_FORMAT " times\n",
                    lw_plot_view_name (views[i]), lw_plot_pane_get_n_base_draws (pane));
    }
  g_signal_handler_disconnect (clock, self->before_paint_id);
  g_signal_handler_disconnect (clock, self->after_paint_id);
  self->before_paint_id = self->after_paint_id = 0;
  lw_window_end_drag (self, TRUE);
  self->bench_frames = 0;
  self->close_confirmed = TRUE;
  g_application_quit (G_APPLICATION (gtk_window_get_application (GTK_WINDOW (self))));
}

/* One synthetic drag step per frame: the corner swept over half a decade each way. */
static gboolean
bench_tick (GtkWidget *widget, GdkFrameClock *clock, gpointer user_data)
{
  LwWindow *self = LW_WINDOW (widget);
  if (self->bench_frames == 0)
    {
      self->bench_tick = 0;
      return G_SOURCE_REMOVE;
    }
  self->bench_done++;
  if (self->bench_done < 30)
    return G_SOURCE_CONTINUE;   /* let the window settle at its size first */
  if (!self->dragging)
    {
      LwPlotPane *pane = lw_plot_area_get_pane (self->plot_area, LW_PLOT_VIEW_BODE_W);
      guint n = lw_plot_pane_get_n_handles (pane);
      for (guint i = 0; i < n; i++)
        {
          const LwPaneHandle *h = lw_plot_pane_get_handle (pane, i);
          if (h->corner >= 0)
            {
              lw_window_begin_drag (self, pane, h->stage, h->corner, h->x, h->y);
              self->bench_nu0 = h->x;
              break;
            }
        }
      if (!self->dragging)
        {
          g_printerr ("bench-drag: the design has no corner handle to drag\n");
          self->bench_frames = 0;
          g_application_quit (G_APPLICATION (gtk_window_get_application (GTK_WINDOW (self))));
          return G_SOURCE_REMOVE;
        }
      self->before_paint_id = g_signal_connect (clock, "before-paint",
                                                G_CALLBACK (bench_before_paint), self);
      self->after_paint_id = g_signal_connect (clock, "after-paint",
                                               G_CALLBACK (bench_after_paint), self);
      return G_SOURCE_CONTINUE;
    }
  double k = self->bench_done - 30.0;
  double ratio = pow (10.0, 0.5 * sin (2.0 * G_PI * k / 120.0));
  lw_window_update_drag (self, self->bench_nu0 * ratio, 0.0, TRUE);
  lw_window_reevaluate (self);   /* this frame's evaluation, in the update phase like eval_tick */
  self->bench_pending = TRUE;
  return G_SOURCE_CONTINUE;
}

void
lw_window_start_bench_drag (LwWindow *self, guint n_frames)
{
  g_return_if_fail (LW_IS_WINDOW (self));
  g_return_if_fail (n_frames > 0);
  self->bench_frames = n_frames;
  self->bench_done = 0;
  /* every variant of the document shown (compare), the first corner of the active one
   * dragged */
  const LwDesign *d = lw_design_model_get_design (self->model);
  for (size_t i = 0; i < d->n_variants; i++)
    if (i != d->active)
      lw_design_model_set_variant_shown (self->model, (guint) i, d->variants[i].responses, TRUE);
  lw_window_show_variants (self);
  g_array_set_size (self->bench_paint, 0);
  gtk_window_set_default_size (GTK_WINDOW (self), 1600, 1000);
  self->bench_tick = gtk_widget_add_tick_callback (GTK_WIDGET (self), bench_tick, NULL, NULL);
}
