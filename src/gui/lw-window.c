/* lw-window.c — the designer window: its life cycle, the design model's signals, the
 * evaluation and what is shown of it, the arrangement of the panes.  The other parts of the
 * window are in lw-window-*.c (listed in lw-window-private.h; the report and the notice of
 * what was written in lw-window-export.c).
 *
 * Data flows one way: a panel (or a drag handle) edits the design model, which writes into the
 * design document; the model's "changed" signal schedules one evaluation on the frame clock.
 * In the next frame's update phase (however many edits came before it) a copy of the document
 * goes to a worker thread (GTask), which evaluates the active variant and any compared variant
 * whose inputs changed through the engine (lw-engine.h, the same evaluation as the CLI and
 * the report), so a slow design never stalls a frame. One evaluation runs at a time: edits
 * made meanwhile are evaluated, newest document only, when it ends; a result older than the
 * one on show is dropped. The evaluation goes to every panel and to the plot area, which turn
 * it into text and figures. Opening a document and the drag benchmark evaluate at once, on
 * the main thread, by the same job.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#include <glib/gi18n.h>
#include <glib/gstdio.h>

#include "lw-design.h"
#include "lw-family.h"
#include "lw-figure-data.h"
#include "lw-number-field.h"
#include "lw-window-private.h"

#define DRAG_POINTS 512

G_DEFINE_FINAL_TYPE (LwWindow, lw_window, GTK_TYPE_APPLICATION_WINDOW)

GSettings *
lw_window_get_settings (LwWindow *self)
{
  GtkApplication *app = gtk_window_get_application (GTK_WINDOW (self));
  return LW_IS_APPLICATION (app) ? lw_application_get_settings (LW_APPLICATION (app)) : NULL;
}

/* ---- evaluation ---------------------------------------------------------------------------- */

/* Requirement marks for the Bode views: the first minimum phase margin, gain margin and
 * crossover range of the design (the range drawn at its geometric middle). */
static void
plot_requirements (LwWindow *self, LwPlotRequirements *req)
{
  double period_s = lw_design_model_get_active_period_s (self->model);
  lw_figure_requirements (req, period_s, FALSE, 0.0, FALSE, 0.0);
  guint n = lw_design_model_get_n_requirements (self->model);
  for (guint i = 0; i < n; i++)
    lw_figure_requirements_add (req, period_s, lw_design_model_get_requirement (self->model, i));
}

/* A reference variant's evaluation, kept while what it was evaluated from is unchanged. */
typedef struct
{
  GBytes *key;
  LwVariantEval *eval;
} RefEval;

static void
ref_eval_free (gpointer data)
{
  RefEval *r = data;
  g_bytes_unref (r->key);
  lw_variant_eval_unref (r->eval);
  g_free (r);
}

/* What the evaluation of variant i depends on: the shared plant (with its parameters) and
 * sampling, the measured response, its own period (or the design's), its stages. */
static GBytes *
variant_key (const LwDesign *d, guint i)
{
  GByteArray *b = g_byte_array_new ();
  const LwDesignVariant *v = &d->variants[i];
  double period_s = lw_design_variant_period_s (d, i);
  g_byte_array_append (b, (const guint8 *) d->plant, (guint) strlen (d->plant) + 1);
  g_byte_array_append (b, (const guint8 *) &d->dead_time_s, sizeof d->dead_time_s);
  g_byte_array_append (b, (const guint8 *) &period_s, sizeof period_s);
  g_byte_array_append (b, (const guint8 *) &d->compute_delay, sizeof d->compute_delay);
  /* the plant's parameters (their values make the plant) */
  for (size_t k = 0; k < d->n_params; k++)
    {
      g_byte_array_append (b, (const guint8 *) d->params[k].name,
                           (guint) strlen (d->params[k].name) + 1);
      g_byte_array_append (b, (const guint8 *) &d->params[k].nominal, sizeof (double));
    }
  /* the measurement the loop is also closed on, and how it is judged: its size, kind and
   * choices and a few of its values (a table is never edited in place: each import makes a
   * new one) */
  if (d->measured != NULL && d->measured->n > 0)
    {
      const LwMeasured *m = d->measured;
      const int tag[3] = { (int) d->measured_kind, (int) d->measured_analysis,
                           d->measured_unstable_poles };
      const size_t at[3] = { 0, m->n / 2, m->n - 1 };
      g_byte_array_append (b, (const guint8 *) &m->n, sizeof m->n);
      g_byte_array_append (b, (const guint8 *) tag, sizeof tag);
      for (int k = 0; k < 3; k++)
        {
          g_byte_array_append (b, (const guint8 *) &m->omega_rad_s[at[k]], sizeof (double));
          g_byte_array_append (b, (const guint8 *) &m->h[at[k]], sizeof m->h[0]);
        }
    }
  if (v->n_stages > 0)
    g_byte_array_append (b, (const guint8 *) v->stages, (guint) (v->n_stages * sizeof *v->stages));
  return g_byte_array_free_to_bytes (b);
}

/* The compared set is the document's (LwDesignVariant.compared): saved with it, one undo
 * step when changed. */
static gboolean
is_compared (LwWindow *self, const char *name)
{
  const LwDesign *d = lw_design_model_get_design (self->model);
  gssize i = lw_design_find_variant (d, name);
  return i >= 0 && d->variants[i].compared;
}

static void
show_handles_and_plots (LwWindow *self, gboolean panels)
{
  LwPlotRequirements req = { 0 };
  plot_requirements (self, &req);
  const LwDesign *d = lw_design_model_get_design (self->model);
  const LwDesignVariant *v = &d->variants[d->active];

  /* the variants shown, in document order: the active one and those compared with it */
  LwAreaVariant vs[LW_PLOT_MAX_VARIANTS];
  const char *names[LW_PLOT_MAX_VARIANTS];
  LwVariantEval *evals[LW_PLOT_MAX_VARIANTS];
  guint n = 0, active = 0;
  GHashTable *kept = g_hash_table_new_full (g_str_hash, g_str_equal, g_free, ref_eval_free);
  for (guint i = 0; i < d->n_variants && n < LW_PLOT_MAX_VARIANTS; i++)
    {
      const char *name = d->variants[i].name;
      LwVariantEval *e = NULL;
      if (i == d->active)
        {
          active = n;
          e = self->eval;
        }
      else if (is_compared (self, name))
        {
          /* the newest evaluation the worker brought; a variant compared for the first time
           * is evaluated here, once */
          RefEval *r = NULL;
          char *old_key = NULL;
          if (g_hash_table_steal_extended (self->ref_evals, name, (gpointer *) &old_key,
                                           (gpointer *) &r))
            g_free (old_key);
          if (r == NULL)
            {
              r = g_new0 (RefEval, 1);
              r->key = variant_key (d, i);
              r->eval = lw_design_model_evaluate_variant (self->model, i, 0);
            }
          g_hash_table_insert (kept, g_strdup (name), r);
          e = r->eval;
        }
      else
        continue;
      /* a variant keeps the colour of its place in the document, whichever are compared */
      vs[n] = (LwAreaVariant) { .eval = e, .name = name,
                                .style = i % LW_PLOT_MAX_VARIANTS + 1,
                                .family = i == d->active ? lw_window_family_drawn (self)
                                                         : NULL };
      names[n] = name;
      evals[n] = e;
      n++;
    }
  g_hash_table_unref (self->ref_evals);
  self->ref_evals = kept;
  if (n == 1)
    {
      vs[0].name = NULL;   /* one variant: no legend, and the first colour */
      vs[0].style = 0;
    }

  self->family_redraw = FALSE;
  /* the document's arrangement of the panes (its <view shows="…">) */
  lw_plot_area_set_views (self->plot_area, (const char *const *) d->views);
  lw_plot_area_show_variants (self->plot_area, vs, n, active, &req, v->stages,
                              (guint) v->n_stages, self->gain_pin_nu, self->sel_stage,
                              self->sel_corner, self->dragging);
  if (!panels)
    return;
  guint styles[LW_PLOT_MAX_VARIANTS];
  for (guint i = 0; i < n; i++)
    styles[i] = vs[i].style;
  lw_compare_table_show (self->compare_table, names, evals, styles, n, active, d->requirements,
                         (guint) d->n_requirements, lw_design_model_judged_on_data (self->model));
}

/* During a drag the panels beside the plots (the plant's forms, the stage fields, the
 * requirements' achieved values, the metrics table) follow at most this often: each new
 * text in them makes GTK measure and lay out the panel again, which took about a sixth of a
 * dragged frame. The plots follow every frame; when the drag ends, everything shows the
 * final evaluation. */
#define LW_DRAG_PANEL_INTERVAL_US 100000

/* Shows an evaluation of the active variant everywhere. */
static void
show_eval (LwWindow *self, LwVariantEval *eval)
{
  g_clear_pointer (&self->eval, lw_variant_eval_unref);
  self->eval = eval;
  /* the drag benchmark stands for a user at 60 frames a second (its frames run slower under
   * a profiler, which would otherwise update the panels every frame) */
  gint64 now = self->bench_frames > 0 ? (gint64) self->bench_done * 16667
                                      : g_get_monotonic_time ();
  gboolean panels = !self->dragging || now - self->panels_shown_us >= LW_DRAG_PANEL_INTERVAL_US;
  if (panels)
    {
      self->panels_shown_us = now;
      lw_plant_panel_show_eval (self->plant_panel, self->eval);
      lw_compensator_panel_show_eval (self->compensator_panel, self->eval);
      lw_requirements_panel_show_eval (self->requirements_panel, self->eval);
    }
  show_handles_and_plots (self, panels);
  if (self->debug)
    lw_number_field_watch_positions ();   /* labels above the fields may have changed */

  if (self->debug && self->eval->ev != NULL)
    {
      const LwMargins *m = &self->eval->ev->margins;
      printf ("LW-SHOWN phase_margin_deg=%.17g gain_crossover_rad_s=%.17g "
              "gain_margin_db=%.17g\n", m->has_phase_margin ? m->phase_margin_deg : NAN,
              m->has_phase_margin ? m->gain_crossover_rad_s : NAN,
              m->has_gain_margin ? m->gain_margin_db : NAN);
      fflush (stdout);
    }
}

/* One evaluation job: a copy of the document and the variants to evaluate in it (the active
 * one first, then compared ones whose inputs changed). */
typedef struct
{
  LwDesign *doc;
  LwPlantCache *cache;
  guint64 generation;
  size_t n_points;              /* of the active variant: fewer during a drag */
  guint n;
  guint index[LW_PLOT_MAX_VARIANTS];
  char *name[LW_PLOT_MAX_VARIANTS];
  GBytes *key[LW_PLOT_MAX_VARIANTS];
  LwVariantEval *result[LW_PLOT_MAX_VARIANTS];
  /* the active variant's plant family is wanted (the design's ranged parameters), not
   * during a drag: evaluated after the job is shown (start_family) */
  gboolean want_family;
} EvalJob;

static void
eval_job_free (gpointer data)
{
  EvalJob *job = data;
  for (guint k = 0; k < job->n; k++)
    {
      g_free (job->name[k]);
      g_clear_pointer (&job->key[k], g_bytes_unref);
      g_clear_pointer (&job->result[k], lw_variant_eval_unref);
    }
  lw_plant_cache_unref (job->cache);
  lw_design_free (job->doc);
  g_free (job);
}

static EvalJob *
eval_job_new (LwWindow *self)
{
  const LwDesign *d = lw_design_model_get_design (self->model);
  EvalJob *job = g_new0 (EvalJob, 1);
  job->doc = lw_design_copy (d);
  job->cache = lw_plant_cache_ref (lw_design_model_get_plant_cache (self->model));
  job->generation = ++self->eval_generation;
  /* during a drag: about as many frequency points as a plot has pixels across */
  job->n_points = self->dragging ? DRAG_POINTS : 0;
  job->want_family = !self->dragging && lw_family_wanted (d);
  job->index[job->n++] = (guint) d->active;
  for (guint i = 0; i < d->n_variants && job->n < LW_PLOT_MAX_VARIANTS; i++)
    {
      if (i == d->active || !is_compared (self, d->variants[i].name))
        continue;
      g_autoptr (GBytes) key = variant_key (d, i);
      RefEval *r = g_hash_table_lookup (self->ref_evals, d->variants[i].name);
      if (r != NULL && g_bytes_equal (r->key, key))
        continue;
      job->index[job->n] = i;
      job->name[job->n] = g_strdup (d->variants[i].name);
      job->key[job->n] = g_bytes_ref (key);
      job->n++;
    }
  return job;
}

/* Runs a job: on the worker thread, or on the main thread for an evaluation needed at once. */
static void
eval_job_run (EvalJob *job)
{
  for (guint k = 0; k < job->n; k++)
    {
      LwEngineOptions opts;
      lw_engine_options_init (&opts);
      opts.n_points = k == 0 ? job->n_points : 0;
      opts.disturbances = TRUE;   /* for the disturbance view, wherever a pane shows it */
      job->result[k] = lw_engine_evaluate_variant (job->doc, job->index[k], &opts, job->cache);
    }
}

/* Shows a finished job's results, unless a newer one is on show already. */
static void
eval_job_show (LwWindow *self, EvalJob *job)
{
  if (job->generation < self->shown_generation)
    return;
  self->shown_generation = job->generation;
  for (guint k = 1; k < job->n; k++)
    {
      RefEval *r = g_new0 (RefEval, 1);
      r->key = g_steal_pointer (&job->key[k]);
      r->eval = g_steal_pointer (&job->result[k]);
      g_hash_table_replace (self->ref_evals, g_strdup (job->name[k]), r);
    }
  show_eval (self, g_steal_pointer (&job->result[0]));
  gboolean nominal_ok = self->eval != NULL && self->eval->ev != NULL;
  /* the family, after the nominal is on show: on a worker thread of its own (docs/
   * families.md: the default members); during a drag its drawn members follow the
   * controller (lw_window_follow_family) and its summary stays, dimmed */
  gboolean ranges = lw_family_wanted (lw_design_model_get_design (self->model));   /* or points */
  if (!ranges)
    lw_window_clear_family_picture (self);
  if (job->want_family && nominal_ok)
    lw_window_start_family (self, job->doc, job->index[0], job->generation);
  else if (job->want_family || !ranges)
    lw_requirements_panel_show_family (self->requirements_panel, NULL, NULL, NULL, FALSE);
  else
    {
      lw_requirements_panel_show_family (self->requirements_panel, NULL, NULL, NULL, TRUE);
      lw_compare_table_family_stale (self->compare_table, TRUE);
      if (job->n_points == DRAG_POINTS && nominal_ok)
        lw_window_follow_family (self, job->doc, job->index[0], job->generation);
    }
  /* several measured responses: the measured family, the same way (not during a drag) */
  lw_window_show_measured_family (self, job->doc, self->eval, job->generation,
                                  job->n_points == DRAG_POINTS);
}

static void
eval_thread (GTask *task, gpointer source, gpointer task_data, GCancellable *cancellable)
{
  eval_job_run (task_data);
  g_task_return_boolean (task, TRUE);
}

static void start_eval (LwWindow *self);

static void
eval_done (GObject *source, GAsyncResult *result, gpointer user_data)
{
  LwWindow *self = LW_WINDOW (source);
  GTask *task = G_TASK (result);
  if (g_cancellable_is_cancelled (g_task_get_cancellable (task)))
    return;   /* the window went meanwhile */
  self->eval_running = FALSE;
  eval_job_show (self, g_task_get_task_data (task));
  if (self->eval_again)
    {
      self->eval_again = FALSE;
      start_eval (self);
    }
}

/* Evaluates the newest document on a worker thread; while one runs, notes that another is
 * wanted when it ends (so the newest edit is always evaluated, and no queue builds up). */
static void
start_eval (LwWindow *self)
{
  if (self->eval_running)
    {
      self->eval_again = TRUE;
      return;
    }
  self->eval_running = TRUE;
  g_autoptr (GTask) task = g_task_new (self, self->eval_cancel, eval_done, NULL);
  g_task_set_source_tag (task, start_eval);
  g_task_set_task_data (task, eval_job_new (self), eval_job_free);
  g_task_run_in_thread (task, eval_thread);
}

/* Evaluates the design now, on the main thread, and shows the result (opening a document, the
 * drag benchmark's frames); a worker still running for an older document is overtaken. */
static void
reevaluate (LwWindow *self)
{
  if (self->eval_tick != 0)
    {
      gtk_widget_remove_tick_callback (GTK_WIDGET (self), self->eval_tick);
      self->eval_tick = 0;
    }
  EvalJob *job = eval_job_new (self);
  eval_job_run (job);
  eval_job_show (self, job);
  eval_job_free (job);
}

static gboolean
eval_tick (GtkWidget *widget, GdkFrameClock *clock, gpointer user_data)
{
  LwWindow *self = LW_WINDOW (widget);
  self->eval_tick = 0;
  start_eval (self);
  return G_SOURCE_REMOVE;
}

static void
schedule_eval (LwWindow *self)
{
  if (self->eval_tick == 0)
    self->eval_tick = gtk_widget_add_tick_callback (GTK_WIDGET (self), eval_tick, NULL, NULL);
}

/* What the other parts of the window call of the evaluation above (kept as it is, under the
 * names it has). */

void
lw_window_show_plots (LwWindow *self)
{
  if (self->eval != NULL)
    show_handles_and_plots (self, FALSE);
}

void
lw_window_show_variants (LwWindow *self)
{
  show_handles_and_plots (self, TRUE);
}

void
lw_window_reevaluate (LwWindow *self)
{
  reevaluate (self);
}

void
lw_window_schedule_eval (LwWindow *self)
{
  schedule_eval (self);
}

gboolean
lw_window_is_compared (LwWindow *self, const char *name)
{
  return is_compared (self, name);
}

LwVariantEval *
lw_window_get_reference_eval (LwWindow *self, const char *name)
{
  RefEval *r = g_hash_table_lookup (self->ref_evals, name);
  return r != NULL ? r->eval : NULL;
}

void
lw_window_plot_requirements (LwWindow *self, LwPlotRequirements *req)
{
  plot_requirements (self, req);
}

/* ---- the model ----------------------------------------------------------------------------- */

static void
model_changed (LwWindow *self)
{
  schedule_eval (self);
  lw_window_update_dirty (self);
  if (self->file == NULL)
    lw_window_update_title (self);   /* a design never saved is named by its title */
}

static void
model_replaced (LwWindow *self)
{
  /* the plant panel shows its fields once per model: show the new document's */
  lw_plant_panel_set_model (self->plant_panel, self->model);
}

static void
set_model (LwWindow *self, LwDesignModel *model)
{
  g_set_object (&self->model, model);
  lw_plant_panel_set_model (self->plant_panel, model);
  lw_compensator_panel_set_model (self->compensator_panel, model);
  lw_requirements_panel_set_model (self->requirements_panel, model);
  g_signal_group_set_target (self->model_signals, model);
  lw_window_start_history (self);
  reevaluate (self);
}

/* ---- life cycle ---------------------------------------------------------------------------- */

static gboolean
lw_window_close_request (GtkWindow *window)
{
  LwWindow *self = LW_WINDOW (window);
  GSettings *settings = lw_window_get_settings (self);

  if (self->dragging)
    lw_window_end_drag (self, TRUE);
  lw_history_commit (self->history);
  if (self->dirty && !self->close_confirmed)
    {
      lw_window_ask_before_close (self);
      return TRUE;
    }
  if (settings != NULL && self->bench_paint->len == 0)
    {
      int width = 0, height = 0;
      gtk_window_get_default_size (window, &width, &height);
      gboolean maximized = gtk_window_is_maximized (window);
      g_settings_delay (settings);
      if (!maximized && width > 0 && height > 0)
        {
          g_settings_set_int (settings, "window-width", width);
          g_settings_set_int (settings, "window-height", height);
        }
      g_settings_set_boolean (settings, "window-maximized", maximized);
      g_settings_apply (settings);
    }
  if (!self->dirty)
    lw_window_clear_autosave (self);
  return GTK_WINDOW_CLASS (lw_window_parent_class)->close_request (window);
}

/* Once the window belongs to the application: restore its size and layout, show a new
 * design, keep its unsaved work with the application's autosave. */
static void
start (LwWindow *self)
{
  GSettings *settings = lw_window_get_settings (self);
  if (settings != NULL)
    {
      gtk_window_set_default_size (GTK_WINDOW (self), g_settings_get_int (settings, "window-width"),
                                   g_settings_get_int (settings, "window-height"));
      if (g_settings_get_boolean (settings, "window-maximized"))
        gtk_window_maximize (GTK_WINDOW (self));
      self->one_column = g_settings_get_enum (settings, "layout") == LW_PLOT_LAYOUT_COLUMN;
      lw_plot_area_set_layout (self->plot_area, self->one_column ? LW_PLOT_LAYOUT_COLUMN
                                                                 : LW_PLOT_LAYOUT_GRID);
    }

  g_autoptr (LwDesignModel) model = lw_design_model_new_blank ();
  set_model (self, model);
  lw_window_update_dirty (self);
  lw_window_update_title (self);
  lw_window_refresh_recent (self);
  lw_window_start_autosave (self);
}

static void
lw_window_dispose (GObject *object)
{
  LwWindow *self = LW_WINDOW (object);

  lw_window_finish_theme (self);
  g_clear_handle_id (&self->notice_timeout, g_source_remove);
  g_clear_object (&self->model_signals);
  if (self->autosave != NULL)
    lw_autosave_remove (self->autosave, self->autosave_slot);
  g_clear_object (&self->autosave);
  g_clear_object (&self->history);
  g_clear_object (&self->model);
  g_clear_object (&self->file);
  g_clear_pointer (&self->eval, lw_variant_eval_unref);
  g_clear_pointer (&self->saved, lw_design_free);
  g_clear_pointer (&self->bench_paint, g_array_unref);
  g_clear_pointer (&self->ref_evals, g_hash_table_unref);
  lw_window_drop_family (self);
  lw_window_drop_measured_family (self);
  if (self->eval_cancel != NULL)
    g_cancellable_cancel (self->eval_cancel);
  g_clear_object (&self->eval_cancel);
  gtk_widget_dispose_template (GTK_WIDGET (self), LW_TYPE_WINDOW);
  G_OBJECT_CLASS (lw_window_parent_class)->dispose (object);
}

static void
lw_window_class_init (LwWindowClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  object_class->dispose = lw_window_dispose;
  GTK_WINDOW_CLASS (klass)->close_request = lw_window_close_request;

  lw_window_class_init_properties (object_class);

  g_type_ensure (LW_TYPE_PLANT_PANEL);
  g_type_ensure (LW_TYPE_COMPENSATOR_PANEL);
  g_type_ensure (LW_TYPE_REQUIREMENTS_PANEL);
  g_type_ensure (LW_TYPE_PLOT_AREA);
  g_type_ensure (LW_TYPE_COMPARE_TABLE);
  gtk_widget_class_set_template_from_resource (widget_class,
                                               "/org/loopwright/Designer/ui/lw-window.ui");
  gtk_widget_class_bind_template_child (widget_class, LwWindow, plant_panel);
  gtk_widget_class_bind_template_child (widget_class, LwWindow, compensator_panel);
  gtk_widget_class_bind_template_child (widget_class, LwWindow, requirements_panel);
  gtk_widget_class_bind_template_child (widget_class, LwWindow, plot_area);
  gtk_widget_class_bind_template_child (widget_class, LwWindow, compare_table);
  gtk_widget_class_bind_template_child (widget_class, LwWindow, notice);
  gtk_widget_class_bind_template_child (widget_class, LwWindow, notice_label);
  gtk_widget_class_bind_template_child (widget_class, LwWindow, recent_menu);

  lw_window_class_init_files (widget_class);
  lw_window_class_init_export (widget_class);
  lw_window_class_init_variants (widget_class);
  lw_window_class_init_drag (widget_class);
  lw_window_class_init_helpers (widget_class);
  lw_window_class_init_measured (widget_class);
  lw_window_class_init_actions (widget_class);   /* the keyboard shortcuts of them all */
}

/* A pane given another view from its menu: the design's arrangement, one undo step. */
static void
pane_views_changed (LwWindow *self)
{
  if (self->dragging)
    return;
  g_auto (GStrv) names = lw_plot_area_get_views (self->plot_area);
  lw_history_commit (self->history);
  lw_design_model_set_views (self->model, (const char *const *) names);
  lw_history_commit (self->history);
}

static void
lw_window_init (LwWindow *self)
{
  gtk_widget_init_template (GTK_WIDGET (self));
  self->bench_paint = g_array_new (FALSE, FALSE, sizeof (double));
  self->ref_evals = g_hash_table_new_full (g_str_hash, g_str_equal, g_free, ref_eval_free);
  self->eval_cancel = g_cancellable_new ();
  self->sel_stage = -1;
  self->debug = g_strcmp0 (g_getenv ("LW_DEBUG_HANDLES"), "1") == 0;

  self->model_signals = g_signal_group_new (LW_TYPE_DESIGN_MODEL);
  g_signal_group_connect_swapped (self->model_signals, "changed", G_CALLBACK (model_changed),
                                  self);
  g_signal_group_connect_swapped (self->model_signals, "replaced", G_CALLBACK (model_replaced),
                                  self);

  g_signal_connect_object (self->plot_area, "display-changed",
                           G_CALLBACK (lw_window_show_variants), self, G_CONNECT_SWAPPED);
  g_signal_connect_object (self->plot_area, "views-changed", G_CALLBACK (pane_views_changed),
                           self, G_CONNECT_SWAPPED);
  lw_window_init_theme (self);
  lw_window_init_drag (self);
  lw_window_init_actions (self);
  lw_window_init_files (self);
}

LwWindow *
lw_window_new (LwApplication *app)
{
  LwWindow *self = g_object_new (LW_TYPE_WINDOW, "application", app, NULL);
  start (self);
  return self;
}
