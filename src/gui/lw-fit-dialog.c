/* lw-fit-dialog.c — a model in s fitted to the measured continuous response; see
 * lw-fit-dialog.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <complex.h>
#include <math.h>
#include <stdio.h>

#include <glib/gi18n.h>

#include "lw-engine.h"
#include "lw-fit-dialog.h"
#include "lw-number-field.h"
#include "lw-plot-axis.h"
#include "lw-plot.h"

/* The pause after a changed field before the fit is made again. */
#define REFIT_DELAY_MS 200
/* points of the model's magnitude curve over the measured range */
#define CURVE_POINTS 400
/* the error axis spans at most this many decades below the largest error: a fit to
 * noise-free data reaches rounding (1e-13 and less), which would squash the rest */
#define ERROR_DECADES 8

/* One fit, made in a worker thread on its own copy of the inputs. */
typedef struct
{
  size_t n;
  double *omega_rad_s;
  double complex *h;
  int order, relative_degree, iterations;
  /* results */
  LwModel *model;
  double worst;
  double *rel_error;            /* n: |model(jω) − h| / |h| at each point */
  double *curve_db;             /* CURVE_POINTS: |model| in dB on the curve's grid */
  char *refusal;                /* the core's message, or NULL */
} FitJob;

struct _LwFitDialog
{
  GtkWindow parent_instance;

  LwMeasured *data;
  double *data_db;              /* |h| in dB at each point */

  GtkSpinButton *order, *relative_degree, *iterations;
  GtkLabel *problem;            /* a refused field */
  GtkLabel *model_label;
  GtkLabel *error_label;
  GtkLabel *refusal;            /* the fit refused, or running */
  GtkWidget *figure;
  GtkWidget *use;

  FitJob *shown;                /* the fit on show, or NULL */
  gboolean running, again, closed;
  guint pending;
  gboolean debug;
};

G_DEFINE_FINAL_TYPE (LwFitDialog, lw_fit_dialog, GTK_TYPE_WINDOW)

enum { SIGNAL_USE, N_SIGNALS };
static guint signals[N_SIGNALS];

static void
fit_job_free (gpointer data)
{
  FitJob *j = data;
  if (j == NULL)
    return;
  g_free (j->omega_rad_s);
  g_free (j->h);
  lw_model_free (j->model);
  g_free (j->rel_error);
  g_free (j->curve_db);
  g_free (j->refusal);
  g_free (j);
}

/* The frequency of curve point i: log-spaced over the measured range. */
static double
curve_omega (const LwMeasured *m, size_t i)
{
  double lo = log10 (m->omega_rad_s[0]), hi = log10 (m->omega_rad_s[m->n - 1]);
  return pow (10.0, lo + (hi - lo) * (double) i / (CURVE_POINTS - 1));
}

static void
fit_thread (GTask *task, gpointer source, gpointer task_data, GCancellable *cancellable)
{
  (void) source, (void) cancellable;
  FitJob *j = task_data;
  LwError err;
  lw_error_clear (&err);
  if (lw_measured_fit (j->omega_rad_s, j->h, NULL, j->n, j->order, j->relative_degree,
                       j->iterations, &j->model, &j->worst, &err) != LW_OK)
    {
      j->refusal = g_strdup (err.message);
      g_task_return_pointer (task, j, fit_job_free);
      return;
    }
  j->rel_error = g_new (double, j->n);
  for (size_t i = 0; i < j->n; i++)
    j->rel_error[i] = cabs (lw_model_eval (j->model, I * j->omega_rad_s[i]) - j->h[i])
                      / cabs (j->h[i]);
  j->curve_db = g_new (double, CURVE_POINTS);
  LwMeasured range = { .n = j->n, .omega_rad_s = j->omega_rad_s };
  for (size_t i = 0; i < CURVE_POINTS; i++)
    j->curve_db[i] = 20.0 * log10 (cabs (lw_model_eval (j->model,
                                                         I * curve_omega (&range, i))));
  g_task_return_pointer (task, j, fit_job_free);
}

static void start_fit (LwFitDialog *self);

static int
field_int (GtkSpinButton *spin)
{
  return (int) lround (gtk_spin_button_get_value (spin));
}

/* The largest error's point: the index of the largest rel_error. */
static size_t
worst_point (const FitJob *j)
{
  size_t k = 0;
  for (size_t i = 1; i < j->n; i++)
    if (j->rel_error[i] > j->rel_error[k])
      k = i;
  return k;
}

static void
show_fit (LwFitDialog *self)
{
  const FitJob *j = self->shown;
  gtk_widget_queue_draw (self->figure);
  if (j == NULL)
    return;
  if (j->refusal != NULL)
    {
      gtk_label_set_text (self->refusal, j->refusal);
      gtk_widget_add_css_class (GTK_WIDGET (self->refusal), "error");
      gtk_label_set_text (self->model_label, "—");
      gtk_label_set_text (self->error_label, "—");
      gtk_widget_set_sensitive (self->use, FALSE);
      if (self->debug)
        {
          printf ("LW-FIT-REFUSED order=%d relative-degree=%d iterations=%d message=%s\n",
                  j->order, j->relative_degree, j->iterations, j->refusal);
          fflush (stdout);
        }
      return;
    }
  gtk_label_set_text (self->refusal, "");
  gtk_widget_remove_css_class (GTK_WIDGET (self->refusal), "error");
  g_autofree char *text = lw_model_text (j->model);
  g_autofree char *g = g_strdup_printf ("G(s) = %s", text);
  gtk_label_set_text (self->model_label, g);
  size_t k = worst_point (j);
  g_autofree char *err = g_strdup_printf (_("%.3g %% at %.4g rad/s (the largest over the %zu "
                                            "measured points)"),
                                          100.0 * j->worst, j->omega_rad_s[k], j->n);
  gtk_label_set_text (self->error_label, err);
  gtk_widget_set_sensitive (self->use, TRUE);
  if (self->debug)
    {
      printf ("LW-FIT order=%d relative-degree=%d iterations=%d points=%zu "
              "max-rel-error=%.17g\n", j->order, j->relative_degree, j->iterations, j->n,
              j->worst);
      fflush (stdout);
    }
}

static void
fit_done (GObject *source, GAsyncResult *result, gpointer user_data)
{
  (void) user_data;
  LwFitDialog *self = LW_FIT_DIALOG (source);
  FitJob *j = g_task_propagate_pointer (G_TASK (result), NULL);
  self->running = FALSE;
  if (self->closed)
    {
      fit_job_free (j);
      return;
    }
  fit_job_free (self->shown);
  self->shown = j;
  if (self->again)
    {
      self->again = FALSE;
      start_fit (self);   /* the fields changed meanwhile: this result is stale already */
      return;
    }
  show_fit (self);
}

static void
start_fit (LwFitDialog *self)
{
  if (self->running)
    {
      self->again = TRUE;
      return;
    }
  if (lw_number_field_get_problem (self->order) != NULL
      || lw_number_field_get_problem (self->relative_degree) != NULL
      || lw_number_field_get_problem (self->iterations) != NULL)
    return;   /* the field says why; the fit on show is of the last good values */
  FitJob *j = g_new0 (FitJob, 1);
  j->n = self->data->n;
  j->omega_rad_s = g_memdup2 (self->data->omega_rad_s, j->n * sizeof (double));
  j->h = g_memdup2 (self->data->h, j->n * sizeof (double complex));
  j->order = field_int (self->order);
  j->relative_degree = field_int (self->relative_degree);
  j->iterations = field_int (self->iterations);
  j->worst = NAN;
  self->running = TRUE;
  gtk_widget_set_sensitive (self->use, FALSE);
  gtk_label_set_text (self->refusal, _("Fitting…"));
  gtk_widget_remove_css_class (GTK_WIDGET (self->refusal), "error");
  GTask *task = g_task_new (self, NULL, fit_done, NULL);
  g_task_set_task_data (task, j, NULL);   /* returned by the thread (g_task_return_pointer) */
  g_task_run_in_thread (task, fit_thread);
  g_object_unref (task);
}

static gboolean
refit_due (gpointer data)
{
  LwFitDialog *self = data;
  self->pending = 0;
  start_fit (self);
  return G_SOURCE_REMOVE;
}

static void
field_changed (LwFitDialog *self)
{
  /* the relative degree is at most the order */
  GtkAdjustment *adj = gtk_spin_button_get_adjustment (self->relative_degree);
  double order = gtk_spin_button_get_value (self->order);
  if (gtk_adjustment_get_upper (adj) != order)
    {
      gtk_adjustment_set_upper (adj, order);
      if (gtk_adjustment_get_value (adj) > order)
        gtk_adjustment_set_value (adj, order);
    }
  gtk_widget_set_sensitive (self->use, FALSE);
  g_clear_handle_id (&self->pending, g_source_remove);
  self->pending = g_timeout_add (REFIT_DELAY_MS, refit_due, self);
}

static void
use_clicked (LwFitDialog *self)
{
  /* a number typed but not yet taken (the focus still in its field, the button pressed by
   * its mnemonic) is taken now: when it changes a value, the fit is made again first */
  gtk_spin_button_update (self->order);
  gtk_spin_button_update (self->relative_degree);
  gtk_spin_button_update (self->iterations);
  if (self->shown == NULL || self->shown->model == NULL || self->running
      || self->pending != 0)
    return;
  g_autofree char *expr = lw_model_expression (self->shown->model);
  g_signal_emit (self, signals[SIGNAL_USE], 0, expr);
  gtk_window_destroy (GTK_WINDOW (self));
}

/* ---- the figure: |h| and |model| in dB above, the relative fit error below ------------------- */

static void
text_at (GtkWidget *w, cairo_t *cr, const char *text, double x, double y, double ax, double ay)
{
  PangoLayout *l = gtk_widget_create_pango_layout (w, text);
  PangoFontDescription *fd = pango_font_description_from_string ("Sans 8");
  pango_layout_set_font_description (l, fd);
  pango_font_description_free (fd);
  int tw, th;
  pango_layout_get_pixel_size (l, &tw, &th);
  cairo_move_to (cr, round (x - ax * tw), round (y - ay * th));
  pango_cairo_show_layout (cr, l);
  g_object_unref (l);
}

typedef struct
{
  double x0, y0, w, h;          /* the plot rectangle in pixels */
  LwPlotAxis xa, ya;
} Panel;

static double
px (const Panel *p, double omega)
{
  return p->x0 + p->w * lw_plot_axis_map (&p->xa, omega);
}

static double
py (const Panel *p, double v)
{
  return p->y0 + p->h * (1.0 - lw_plot_axis_map (&p->ya, v));
}

/* The frame, the grid and the tick labels of a panel (x labels only when x_labels). */
static void
draw_frame (GtkWidget *w, cairo_t *cr, const Panel *p, const GdkRGBA *fg, gboolean x_labels,
            const char *y_unit)
{
  LwPlotTick ticks[128];
  cairo_set_line_width (cr, 1.0);
  size_t nx = lw_plot_axis_ticks (&p->xa, 8, ticks, G_N_ELEMENTS (ticks));
  for (size_t i = 0; i < nx; i++)
    {
      double x = round (px (p, ticks[i].value)) + 0.5;
      cairo_set_source_rgba (cr, fg->red, fg->green, fg->blue, ticks[i].major ? 0.22 : 0.08);
      cairo_move_to (cr, x, p->y0);
      cairo_line_to (cr, x, p->y0 + p->h);
      cairo_stroke (cr);
      if (x_labels && ticks[i].labelled)
        {
          cairo_set_source_rgba (cr, fg->red, fg->green, fg->blue, 0.8);
          text_at (w, cr, ticks[i].label, x, p->y0 + p->h + 3, 0.5, 0.0);
        }
    }
  size_t ny = lw_plot_axis_ticks (&p->ya, 5, ticks, G_N_ELEMENTS (ticks));
  for (size_t i = 0; i < ny; i++)
    {
      double y = round (py (p, ticks[i].value)) + 0.5;
      cairo_set_source_rgba (cr, fg->red, fg->green, fg->blue, ticks[i].major ? 0.22 : 0.08);
      cairo_move_to (cr, p->x0, y);
      cairo_line_to (cr, p->x0 + p->w, y);
      cairo_stroke (cr);
      if (ticks[i].labelled)
        {
          char label[LW_PLOT_TICK_LABEL_MAX + 8];
          if (p->ya.scale == LW_PLOT_SCALE_LOG)   /* a ratio, labelled in % */
            {
              lw_plot_format_tick (100.0 * ticks[i].value, 0.0, true, label, sizeof label);
              g_strlcat (label, " %", sizeof label);
            }
          else
            g_strlcpy (label, ticks[i].label, sizeof label);
          cairo_set_source_rgba (cr, fg->red, fg->green, fg->blue, 0.8);
          text_at (w, cr, label, p->x0 - 4, y, 1.0, 0.5);
        }
    }
  cairo_set_source_rgba (cr, fg->red, fg->green, fg->blue, 0.6);
  cairo_rectangle (cr, p->x0 + 0.5, p->y0 + 0.5, p->w - 1, p->h - 1);
  cairo_stroke (cr);
  cairo_set_source_rgba (cr, fg->red, fg->green, fg->blue, 0.8);
  text_at (w, cr, y_unit, p->x0 + 4, p->y0 + 3, 0.0, 0.0);
}

/* Dots of a series, left out where one would land within a pixel of the last one drawn: a
 * table of 100 000 points then costs about as many dots as the figure has pixels across. */
typedef struct
{
  double x, y;
} Dots;
#define DOTS_INIT { -INFINITY, -INFINITY }

static void
dot (cairo_t *cr, Dots *d, double x, double y, double r)
{
  if (fabs (x - d->x) < 1.0 && fabs (y - d->y) < 1.0)
    return;
  d->x = x, d->y = y;
  cairo_new_sub_path (cr);
  cairo_arc (cr, x, y, r, 0, 2 * G_PI);
  cairo_fill (cr);
}

static void
draw_figure (GtkDrawingArea *area, cairo_t *cr, int width, int height, gpointer data)
{
  LwFitDialog *self = data;
  GtkWidget *w = GTK_WIDGET (area);
  GdkRGBA fg;
  G_GNUC_BEGIN_IGNORE_DEPRECATIONS
  gtk_style_context_get_color (gtk_widget_get_style_context (w), &fg);
  G_GNUC_END_IGNORE_DEPRECATIONS
  LwPlotTheme theme = 0.299 * fg.red + 0.587 * fg.green + 0.114 * fg.blue > 0.5
                        ? LW_PLOT_THEME_DARK : LW_PLOT_THEME_LIGHT;
  double model_rgb[3];
  lw_plot_variant_colour (theme, 0, model_rgb);

  const LwMeasured *m = self->data;
  const FitJob *j = self->shown != NULL && self->shown->model != NULL ? self->shown : NULL;
  double left = 64, right = 12, top = 8, gap = 10, bottom = 36;
  double plot_h = height - top - gap - bottom;
  if (width < left + right + 40 || plot_h < 60)
    return;
  Panel mag = { .x0 = left, .y0 = top, .w = width - left - right, .h = 0.6 * plot_h };
  Panel err = { .x0 = left, .y0 = top + mag.h + gap, .w = mag.w, .h = plot_h - mag.h };
  /* x: exactly the measured range */
  lw_plot_axis_init (&mag.xa, LW_PLOT_SCALE_LOG, LW_PLOT_TICKS_PLAIN, m->omega_rad_s[0],
                     m->omega_rad_s[m->n - 1]);
  err.xa = mag.xa;

  double lo = INFINITY, hi = -INFINITY;
  for (size_t i = 0; i < m->n; i++)
    if (isfinite (self->data_db[i]))
      lo = fmin (lo, self->data_db[i]), hi = fmax (hi, self->data_db[i]);
  if (j != NULL)
    for (size_t i = 0; i < CURVE_POINTS; i++)
      if (isfinite (j->curve_db[i]))
        lo = fmin (lo, j->curve_db[i]), hi = fmax (hi, j->curve_db[i]);
  double ylo, yhi;
  lw_plot_nice_range (LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, isfinite (lo) ? lo : -1,
                      isfinite (hi) ? hi : 1, 5, &ylo, &yhi);
  lw_plot_axis_init (&mag.ya, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ylo, yhi);

  double emax = 1e-12, emin = INFINITY;
  if (j != NULL)
    for (size_t i = 0; i < j->n; i++)
      if (isfinite (j->rel_error[i]) && j->rel_error[i] > 0)
        emax = fmax (emax, j->rel_error[i]), emin = fmin (emin, j->rel_error[i]);
  emin = isfinite (emin) ? fmax (emin, emax * pow (10.0, -ERROR_DECADES)) : emax / 100;
  lw_plot_nice_range (LW_PLOT_SCALE_LOG, LW_PLOT_TICKS_PLAIN, emin, emax, 4, &ylo, &yhi);
  if (yhi <= ylo * 10)
    ylo = yhi / 100;
  lw_plot_axis_init (&err.ya, LW_PLOT_SCALE_LOG, LW_PLOT_TICKS_PLAIN, ylo, yhi);

  draw_frame (w, cr, &mag, &fg, FALSE, _("magnitude (dB)"));
  draw_frame (w, cr, &err, &fg, TRUE, _("relative fit error"));
  cairo_set_source_rgba (cr, fg.red, fg.green, fg.blue, 0.8);
  g_autofree char *xlabel = g_strdup_printf (_("ω (rad/s) over the measured range, %.4g to "
                                               "%.4g"), m->omega_rad_s[0],
                                             m->omega_rad_s[m->n - 1]);
  text_at (w, cr, xlabel, err.x0 + err.w / 2, height - 2, 0.5, 1.0);

  /* the measured points */
  cairo_save (cr);
  cairo_rectangle (cr, mag.x0, mag.y0, mag.w, mag.h);
  cairo_clip (cr);
  cairo_set_source_rgba (cr, fg.red, fg.green, fg.blue, 0.75);
  Dots dots = DOTS_INIT;
  for (size_t i = 0; i < m->n; i++)
    if (isfinite (self->data_db[i]))
      dot (cr, &dots, px (&mag, m->omega_rad_s[i]), py (&mag, self->data_db[i]), 1.8);
  /* the model */
  if (j != NULL)
    {
      cairo_set_source_rgb (cr, model_rgb[0], model_rgb[1], model_rgb[2]);
      cairo_set_line_width (cr, LW_PLOT_CURVE_WIDTH);
      gboolean pen = FALSE;
      for (size_t i = 0; i < CURVE_POINTS; i++)
        {
          if (!isfinite (j->curve_db[i]))
            {
              pen = FALSE;
              continue;
            }
          double x = px (&mag, curve_omega (m, i)), y = py (&mag, j->curve_db[i]);
          if (pen)
            cairo_line_to (cr, x, y);
          else
            cairo_move_to (cr, x, y);
          pen = TRUE;
        }
      cairo_stroke (cr);
    }
  cairo_restore (cr);

  /* the key */
  double kx = mag.x0 + mag.w - 8, ky = mag.y0 + 6;
  PangoLayout *probe = gtk_widget_create_pango_layout (w, _("fitted model"));
  int tw, th;
  pango_layout_get_pixel_size (probe, &tw, &th);
  g_object_unref (probe);
  cairo_set_source_rgba (cr, fg.red, fg.green, fg.blue, 0.9);
  text_at (w, cr, _("measured"), kx, ky, 1.0, 0.0);
  text_at (w, cr, _("fitted model"), kx, ky + th + 2, 1.0, 0.0);
  double sx = kx - tw - 30;
  cairo_arc (cr, sx + 10, ky + th / 2.0, 2.0, 0, 2 * G_PI);
  cairo_fill (cr);
  cairo_set_source_rgb (cr, model_rgb[0], model_rgb[1], model_rgb[2]);
  cairo_set_line_width (cr, LW_PLOT_CURVE_WIDTH);
  cairo_move_to (cr, sx, ky + th + 2 + th / 2.0);
  cairo_line_to (cr, sx + 20, ky + th + 2 + th / 2.0);
  cairo_stroke (cr);

  /* the error at every point, joined */
  if (j != NULL)
    {
      cairo_save (cr);
      cairo_rectangle (cr, err.x0, err.y0, err.w, err.h);
      cairo_clip (cr);
      cairo_set_source_rgb (cr, model_rgb[0], model_rgb[1], model_rgb[2]);
      cairo_set_line_width (cr, 1.0);
      for (size_t i = 0; i < j->n; i++)
        {
          double e = fmax (j->rel_error[i], ylo);
          double x = px (&err, j->omega_rad_s[i]), y = py (&err, e);
          if (i == 0)
            cairo_move_to (cr, x, y);
          else
            cairo_line_to (cr, x, y);
        }
      cairo_stroke (cr);
      Dots edots = DOTS_INIT;
      for (size_t i = 0; i < j->n; i++)
        dot (cr, &edots, px (&err, j->omega_rad_s[i]), py (&err, fmax (j->rel_error[i], ylo)),
             1.5);
      cairo_restore (cr);
    }
}

/* ---- life cycle ---------------------------------------------------------------------------- */

static void
lw_fit_dialog_dispose (GObject *object)
{
  LwFitDialog *self = LW_FIT_DIALOG (object);
  self->closed = TRUE;
  g_clear_handle_id (&self->pending, g_source_remove);
  g_clear_pointer (&self->shown, fit_job_free);
  g_clear_pointer (&self->data, lw_measured_free);
  g_clear_pointer (&self->data_db, g_free);
  G_OBJECT_CLASS (lw_fit_dialog_parent_class)->dispose (object);
}

static void
lw_fit_dialog_class_init (LwFitDialogClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);
  object_class->dispose = lw_fit_dialog_dispose;
  /* "use" (const char *expression): the fit on show taken as the plant */
  signals[SIGNAL_USE] = g_signal_new ("use", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST, 0,
                                      NULL, NULL, NULL, G_TYPE_NONE, 1, G_TYPE_STRING);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_Escape, 0, "window.close", NULL);
}

static void
lw_fit_dialog_init (LwFitDialog *self)
{
  self->debug = g_strcmp0 (g_getenv ("LW_DEBUG_HANDLES"), "1") == 0;
}

static GtkSpinButton *
add_field (LwFitDialog *self, GtkGrid *grid, int row, const char *title, const char *hint,
           double lo, double hi, double value)
{
  GtkWidget *label = gtk_label_new (title);
  gtk_label_set_xalign (GTK_LABEL (label), 0.0);
  GtkAdjustment *adj = gtk_adjustment_new (value, lo, hi, 1, 5, 0);
  GtkWidget *spin = gtk_spin_button_new (adj, 1, 0);
  gtk_widget_set_hexpand (spin, FALSE);
  lw_number_field_setup (GTK_SPIN_BUTTON (spin), title, self->problem);
  gtk_accessible_update_relation (GTK_ACCESSIBLE (spin), GTK_ACCESSIBLE_RELATION_LABELLED_BY,
                                  label, NULL, -1);
  GtkWidget *note = gtk_label_new (hint);
  gtk_label_set_xalign (GTK_LABEL (note), 0.0);
  gtk_widget_add_css_class (note, "dim-label");
  gtk_grid_attach (grid, label, 0, row, 1, 1);
  gtk_grid_attach (grid, spin, 1, row, 1, 1);
  gtk_grid_attach (grid, note, 2, row, 1, 1);
  g_signal_connect_swapped (spin, "value-changed", G_CALLBACK (field_changed), self);
  return GTK_SPIN_BUTTON (spin);
}

/* A result line: its title (in titles, so the values line up) and its value, which wraps; a
 * horizontal box, as a grid would ask the height of a wrapped label at its narrowest. */
static GtkLabel *
add_result (GtkBox *box, GtkSizeGroup *titles, const char *title)
{
  GtkWidget *row = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 12);
  GtkWidget *label = gtk_label_new (title);
  gtk_label_set_xalign (GTK_LABEL (label), 0.0);
  gtk_label_set_yalign (GTK_LABEL (label), 0.0);
  gtk_widget_add_css_class (label, "dim-label");
  gtk_size_group_add_widget (titles, label);
  GtkWidget *value = gtk_label_new ("—");
  gtk_label_set_xalign (GTK_LABEL (value), 0.0);
  gtk_label_set_wrap (GTK_LABEL (value), TRUE);
  gtk_label_set_wrap_mode (GTK_LABEL (value), PANGO_WRAP_WORD_CHAR);
  gtk_label_set_selectable (GTK_LABEL (value), TRUE);
  gtk_widget_set_hexpand (value, TRUE);
  gtk_box_append (GTK_BOX (row), label);
  gtk_box_append (GTK_BOX (row), value);
  gtk_box_append (box, row);
  return GTK_LABEL (value);
}

LwFitDialog *
lw_fit_dialog_new (GtkWindow *parent, const LwMeasured *data, const char *source)
{
  g_return_val_if_fail (data != NULL && data->n > 0, NULL);
  LwFitDialog *self = g_object_new (LW_TYPE_FIT_DIALOG, "transient-for", parent, "modal", TRUE,
                                    "destroy-with-parent", TRUE, "default-width", 720,
                                    "default-height", 760, NULL);
  gtk_window_set_title (GTK_WINDOW (self), _("Fit a Model to the Measured Response"));
  self->data = lw_measured_copy (data);
  self->data_db = g_new (double, data->n);
  for (size_t i = 0; i < data->n; i++)
    self->data_db[i] = 20.0 * log10 (cabs (data->h[i]));

  GtkWidget *box = gtk_box_new (GTK_ORIENTATION_VERTICAL, 12);
  gtk_widget_set_margin_start (box, 18);
  gtk_widget_set_margin_end (box, 18);
  gtk_widget_set_margin_top (box, 18);
  gtk_widget_set_margin_bottom (box, 18);
  gtk_window_set_child (GTK_WINDOW (self), box);

  g_autofree char *intro
    = g_strdup_printf (_("A rational model G(s) fitted to the %zu points of the measured "
                         "continuous response%s%s%s by vector fitting, every point weighted by "
                         "its relative error. Check the error before using it as the plant: "
                         "too high an order fits the noise, too low a one misses a resonance."),
                       data->n, source != NULL ? " (" : "", source != NULL ? source : "",
                       source != NULL ? ")" : "");
  GtkWidget *intro_label = gtk_label_new (intro);
  gtk_label_set_wrap (GTK_LABEL (intro_label), TRUE);
  gtk_label_set_xalign (GTK_LABEL (intro_label), 0.0);
  gtk_box_append (GTK_BOX (box), intro_label);

  self->problem = GTK_LABEL (gtk_label_new (NULL));
  gtk_label_set_wrap (self->problem, TRUE);
  gtk_label_set_xalign (self->problem, 0.0);
  gtk_widget_add_css_class (GTK_WIDGET (self->problem), "error");
  gtk_widget_set_visible (GTK_WIDGET (self->problem), FALSE);

  GtkGrid *grid = GTK_GRID (gtk_grid_new ());
  gtk_grid_set_row_spacing (grid, 6);
  gtk_grid_set_column_spacing (grid, 12);
  /* the limits of lw_measured_fit and of `fit` (docs/measured-data.md) */
  self->order = add_field (self, grid, 0, _("Order"), _("poles of the model, 1 to 40"), 1, 40,
                           2);
  self->relative_degree = add_field (self, grid, 1, _("Relative degree"),
                                     _("poles minus zeros, 0 to the order"), 0, 2, 1);
  self->iterations = add_field (self, grid, 2, _("Iterations"),
                                _("pole relocations, 1 to 200"), 1, 200, 20);
  gtk_box_append (GTK_BOX (box), GTK_WIDGET (grid));
  gtk_box_append (GTK_BOX (box), GTK_WIDGET (self->problem));

  GtkWidget *results = gtk_box_new (GTK_ORIENTATION_VERTICAL, 6);
  g_autoptr (GtkSizeGroup) titles = gtk_size_group_new (GTK_SIZE_GROUP_HORIZONTAL);
  self->model_label = add_result (GTK_BOX (results), titles, _("Fitted model"));
  gtk_widget_add_css_class (GTK_WIDGET (self->model_label), "monospace");
  self->error_label = add_result (GTK_BOX (results), titles, _("Largest relative error"));
  gtk_box_append (GTK_BOX (box), results);

  self->refusal = GTK_LABEL (gtk_label_new (NULL));
  gtk_label_set_wrap (self->refusal, TRUE);
  gtk_label_set_xalign (self->refusal, 0.0);
  gtk_box_append (GTK_BOX (box), GTK_WIDGET (self->refusal));

  self->figure = gtk_drawing_area_new ();
  gtk_widget_set_vexpand (self->figure, TRUE);
  gtk_widget_set_size_request (self->figure, 400, 300);
  gtk_drawing_area_set_draw_func (GTK_DRAWING_AREA (self->figure), draw_figure, self, NULL);
  gtk_box_append (GTK_BOX (box), self->figure);

  GtkWidget *buttons = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 6);
  gtk_widget_set_halign (buttons, GTK_ALIGN_END);
  GtkWidget *close = gtk_button_new_with_mnemonic (_("_Close"));
  gtk_actionable_set_action_name (GTK_ACTIONABLE (close), "window.close");
  self->use = gtk_button_new_with_mnemonic (_("_Use as Plant"));
  gtk_widget_add_css_class (self->use, "suggested-action");
  gtk_widget_set_tooltip_text (self->use, _("The fitted model becomes the design's plant (one "
                                            "undo step); the measured response stays."));
  gtk_widget_set_sensitive (self->use, FALSE);
  g_signal_connect_swapped (self->use, "clicked", G_CALLBACK (use_clicked), self);
  gtk_box_append (GTK_BOX (buttons), close);
  gtk_box_append (GTK_BOX (buttons), self->use);
  gtk_box_append (GTK_BOX (box), buttons);
  gtk_window_set_default_widget (GTK_WINDOW (self), self->use);

  start_fit (self);
  return self;
}
