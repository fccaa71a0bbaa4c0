/* lw-window.c — the designer window.
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
 * Undo: the history is a stack of whole-document snapshots (lw_design_copy).  `committed` is
 * the document as of the last undo step; an edit schedules a commit UNDO_MERGE_MS later
 * (restarted by each further edit, so a burst of spin-button steps or of typing is one step),
 * a finished drag commits at once, and a commit pushes `committed` only when the document
 * differs from it (lw_design_equal).  Undo and redo put a copy of a snapshot back with
 * lw_design_model_replace, so the document is restored byte for byte.
 *
 * Dragging (Bode views, magnitude panel): a corner handle moves its corner horizontally, by
 * the ratio of the pointer's frequency to the frequency where the drag started (so grabbing
 * beside a handle does not make it jump); with Shift the whole stage moves keeping its ratios
 * (lw_stage_corner_set keep_ratio: a lead's or lag's pair keeps α).  On the Bode view in z
 * the pointer's ω is warped to ν = (2/T)·tan(ωT/2) first.  A gain handle moves vertically:
 * the gain is multiplied by the pointer's change in dB.  Escape cancels a drag (the stage as
 * it was before).  Keyboard: F7 / Shift+F7 select the next / previous handle (and focus the
 * w-plane Bode view); with a Bode view focused, Right/Up move the selected corner or gain up
 * by a factor of 1.02 and Left/Down down (1.2 with Ctrl).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#include <glib/gi18n.h>
#include <glib/gstdio.h>

#include "lw-compare-table.h"
#include "lw-compensator-panel.h"
#include "lw-design-model.h"
#include "lw-design.h"
#include "lw-export-dialog.h"
#include "lw-report.h"
#include "lw-figure-data.h"
#include "lw-plant-panel.h"
#include "lw-plot-area.h"
#include "lw-plot-export.h"
#include "lw-requirements-panel.h"
#include "lw-window.h"

#define UNDO_MERGE_MS 700
#define UNDO_DEPTH 200
#define AUTOSAVE_INTERVAL_S 30
#define DRAG_POINTS 512
#define KEY_STEP 1.02
#define KEY_STEP_BIG 1.2

struct _LwWindow
{
  GtkApplicationWindow parent_instance;

  LwPlantPanel *plant_panel;
  LwCompensatorPanel *compensator_panel;
  LwRequirementsPanel *requirements_panel;
  LwPlotArea *plot_area;
  LwCompareTable *compare_table;
  GMenu *recent_menu;

  /* variants shown beside the active one (names; the active one is always shown) */
  GPtrArray *compared;
  gboolean split;
  GHashTable *ref_evals;        /* variant name → RefEval: references, evaluated once */

  LwDesignModel *model;
  LwVariantEval *eval;          /* the evaluation on show */
  guint eval_tick;              /* pending evaluation on the frame clock, or 0 */
  guint64 eval_generation;      /* of the newest evaluation started */
  guint64 shown_generation;     /* of the evaluation on show */
  gboolean eval_running;        /* a worker is evaluating */
  gboolean eval_again;          /* an edit came meanwhile: evaluate again when it ends */
  GCancellable *eval_cancel;    /* cancelled when the window goes */
  gboolean one_column;

  /* file and unsaved state */
  GFile *file;                  /* NULL: never saved */
  LwDesign *saved;              /* the document as last opened or saved; NULL: none */
  gboolean dirty;
  gboolean close_confirmed;
  gboolean wrote_autosave;
  guint autosave_id;

  /* undo */
  GPtrArray *undo, *redo;       /* of LwDesign *, oldest first */
  LwDesign *committed;
  guint commit_id;
  gboolean restoring;

  /* drag */
  gboolean dragging;
  LwPlotPane *drag_pane;
  guint drag_stage;
  int drag_corner;              /* −1: gain */
  LwStage drag_start_stage;
  double drag_start_x, drag_start_y_db;
  double gain_pin_nu;           /* where the gain handle stays during a gain drag, or 0 */
  int sel_stage, sel_corner;    /* the selected handle (sel_stage −1: none) */

  gboolean debug;               /* LW_DEBUG_HANDLES=1 */

  /* benchmark */
  guint bench_frames, bench_done, bench_tick;
  gboolean bench_pending;       /* an edit was made in this frame's update */
  gint64 paint_start;
  GArray *bench_paint;
  double bench_nu0;
  gulong before_paint_id, after_paint_id;
};

G_DEFINE_FINAL_TYPE (LwWindow, lw_window, GTK_TYPE_APPLICATION_WINDOW)

enum
{
  PROP_0,
  PROP_ONE_COLUMN,
  PROP_SPLIT,
  N_PROPS
};
static GParamSpec *props[N_PROPS];

static GSettings *
window_settings (LwWindow *self)
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

/* What the evaluation of variant i depends on: the shared plant and sampling, its own period
 * (or the design's), its stages. */
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
  if (v->n_stages > 0)
    g_byte_array_append (b, (const guint8 *) v->stages, (guint) (v->n_stages * sizeof *v->stages));
  return g_byte_array_free_to_bytes (b);
}

static gboolean
is_compared (LwWindow *self, const char *name)
{
  for (guint i = 0; i < self->compared->len; i++)
    if (g_strcmp0 (self->compared->pdata[i], name) == 0)
      return TRUE;
  return FALSE;
}

static void
show_handles_and_plots (LwWindow *self)
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
                                .style = i % LW_PLOT_MAX_VARIANTS + 1 };
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

  lw_plot_area_show_variants (self->plot_area, vs, n, active, &req, v->stages,
                              (guint) v->n_stages, self->gain_pin_nu, self->sel_stage,
                              self->sel_corner, self->dragging);
  guint styles[LW_PLOT_MAX_VARIANTS];
  for (guint i = 0; i < n; i++)
    styles[i] = vs[i].style;
  lw_compare_table_show (self->compare_table, names, evals, styles, n, active, d->requirements,
                         (guint) d->n_requirements);
}

/* Shows an evaluation of the active variant everywhere. */
static void
show_eval (LwWindow *self, LwVariantEval *eval)
{
  g_clear_pointer (&self->eval, lw_variant_eval_unref);
  self->eval = eval;
  lw_plant_panel_show_eval (self->plant_panel, self->eval);
  lw_compensator_panel_show_eval (self->compensator_panel, self->eval);
  lw_requirements_panel_show_eval (self->requirements_panel, self->eval);
  show_handles_and_plots (self);

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

/* ---- title and unsaved state --------------------------------------------------------------- */

static char *
document_name (LwWindow *self)
{
  if (self->file != NULL)
    return g_file_get_basename (self->file);
  return g_strdup (_("New design"));
}

static void
update_title (LwWindow *self)
{
  g_autofree char *name = document_name (self);
  /* TRANSLATORS: the window title; the first %s is "• " when there are unsaved changes */
  g_autofree char *title = g_strdup_printf (_("%s%s — Loopwright"), self->dirty ? "• " : "",
                                            name);
  gtk_window_set_title (GTK_WINDOW (self), title);
}

static void
update_dirty (LwWindow *self)
{
  gboolean dirty = self->saved == NULL
                   || !lw_design_equal (self->saved, lw_design_model_get_design (self->model));
  if (self->saved == NULL && self->file == NULL && self->undo->len == 0
      && self->committed != NULL
      && lw_design_equal (self->committed, lw_design_model_get_design (self->model)))
    dirty = FALSE;   /* a new design nobody has touched */
  if (dirty != self->dirty)
    {
      self->dirty = dirty;
      update_title (self);
    }
}

/* ---- undo ---------------------------------------------------------------------------------- */

static void
update_undo_actions (LwWindow *self)
{
  gtk_widget_action_set_enabled (GTK_WIDGET (self), "window.undo", self->undo->len > 0
                                 || (self->committed != NULL
                                     && !lw_design_equal (self->committed,
                                                          lw_design_model_get_design (self->model))));
  gtk_widget_action_set_enabled (GTK_WIDGET (self), "window.redo", self->redo->len > 0);
}

static void
commit_now (LwWindow *self)
{
  g_clear_handle_id (&self->commit_id, g_source_remove);
  const LwDesign *cur = lw_design_model_get_design (self->model);
  if (self->committed != NULL && lw_design_equal (cur, self->committed))
    return;
  if (self->committed != NULL)
    {
      g_ptr_array_add (self->undo, self->committed);
      if (self->undo->len > UNDO_DEPTH)
        g_ptr_array_remove_index (self->undo, 0);
    }
  self->committed = lw_design_copy (cur);
  g_ptr_array_set_size (self->redo, 0);
  update_undo_actions (self);
}

static gboolean
commit_timeout (gpointer user_data)
{
  LwWindow *self = user_data;
  self->commit_id = 0;
  commit_now (self);
  return G_SOURCE_REMOVE;
}

static void
reset_history (LwWindow *self)
{
  g_clear_handle_id (&self->commit_id, g_source_remove);
  g_ptr_array_set_size (self->undo, 0);
  g_ptr_array_set_size (self->redo, 0);
  g_clear_pointer (&self->committed, lw_design_free);
  self->committed = lw_design_copy (lw_design_model_get_design (self->model));
  update_undo_actions (self);
}

static void
restore_snapshot (LwWindow *self, const LwDesign *snapshot)
{
  self->restoring = TRUE;
  self->sel_stage = -1;
  lw_design_model_replace (self->model, lw_design_copy (snapshot));
  self->restoring = FALSE;
}

static void
undo_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (self->dragging)
    return;
  commit_now (self);
  if (self->undo->len == 0)
    return;
  g_ptr_array_add (self->redo, self->committed);
  self->committed = g_ptr_array_steal_index (self->undo, self->undo->len - 1);
  restore_snapshot (self, self->committed);
  update_undo_actions (self);
}

static void
redo_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (self->dragging)
    return;
  commit_now (self);
  if (self->redo->len == 0)
    return;
  g_ptr_array_add (self->undo, self->committed);
  self->committed = g_ptr_array_steal_index (self->redo, self->redo->len - 1);
  restore_snapshot (self, self->committed);
  update_undo_actions (self);
}

/* ---- the model ----------------------------------------------------------------------------- */

static void
model_changed (LwWindow *self)
{
  schedule_eval (self);
  update_dirty (self);
  if (!self->restoring && !self->dragging)
    {
      g_clear_handle_id (&self->commit_id, g_source_remove);
      self->commit_id = g_timeout_add (UNDO_MERGE_MS, commit_timeout, self);
    }
  update_undo_actions (self);
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
  if (self->model != NULL)
    g_signal_handlers_disconnect_by_data (self->model, self);
  g_set_object (&self->model, model);
  lw_plant_panel_set_model (self->plant_panel, model);
  lw_compensator_panel_set_model (self->compensator_panel, model);
  lw_requirements_panel_set_model (self->requirements_panel, model);
  g_signal_connect_swapped (model, "changed", G_CALLBACK (model_changed), self);
  g_signal_connect_swapped (model, "replaced", G_CALLBACK (model_replaced), self);
  reevaluate (self);
}

/* ---- variants ------------------------------------------------------------------------------ */

static void
refresh_compared (LwWindow *self)
{
  lw_compensator_panel_set_compared (self->compensator_panel,
                                     (const char *const *) self->compared->pdata,
                                     self->compared->len);
}

static void
set_compared (LwWindow *self, const char *name, gboolean shown)
{
  for (guint i = 0; i < self->compared->len; i++)
    if (g_strcmp0 (self->compared->pdata[i], name) == 0)
      {
        if (shown)
          return;
        g_ptr_array_remove_index (self->compared, i);
        return;
      }
  if (shown)
    g_ptr_array_add (self->compared, g_strdup (name));
}

/* Before and after each variant action: it is one undo step of its own. */
static gboolean
variant_action_begin (LwWindow *self)
{
  if (self->dragging)
    return FALSE;
  commit_now (self);
  self->sel_stage = -1;
  return TRUE;
}

static void
variant_action_end (LwWindow *self)
{
  commit_now (self);
  refresh_compared (self);
  update_undo_actions (self);
}

static void
variant_add (LwWindow *self, gboolean copy)
{
  if (!variant_action_begin (self))
    return;
  guint active = lw_design_model_get_active (self->model);
  g_autofree char *from = g_strdup (lw_design_model_get_variant_name (self->model, active));
  g_autofree char *base = copy ? g_strdup_printf (_("%s copy"), from) : g_strdup (_("variant"));
  g_autofree char *name = lw_design_model_unused_variant_name (self->model, base);
  if (lw_design_model_add_variant (self->model, name, copy) && copy)
    set_compared (self, from, TRUE);   /* the original stays in view as the reference */
  variant_action_end (self);
}

static void
variant_copy_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  variant_add (LW_WINDOW (widget), TRUE);
}

static void
variant_new_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  variant_add (LW_WINDOW (widget), FALSE);
}

static void
variant_delete_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (!variant_action_begin (self))
    return;
  guint active = lw_design_model_get_active (self->model);
  g_autofree char *name = g_strdup (lw_design_model_get_variant_name (self->model, active));
  if (lw_design_model_remove_variant (self->model, active))
    set_compared (self, name, FALSE);
  variant_action_end (self);
}

static void
variant_move (LwWindow *self, int delta)
{
  if (!variant_action_begin (self))
    return;
  lw_design_model_move_variant (self->model, lw_design_model_get_active (self->model), delta);
  variant_action_end (self);
}

static void
variant_up_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  variant_move (LW_WINDOW (widget), -1);
}

static void
variant_down_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  variant_move (LW_WINDOW (widget), +1);
}

static void
variant_rename_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (!variant_action_begin (self))
    return;
  lw_design_model_rename_variant (self->model, lw_design_model_get_active (self->model),
                                  g_variant_get_string (param, NULL));
  variant_action_end (self);
}

/* The active variant's own sample period, set ((true, T)) or cleared ((false, _)): one undo
 * step. The spin's value when cleared is ignored. */
static void
variant_period_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  gboolean own = FALSE;
  double period_s = 0.0;
  g_variant_get (param, "(bd)", &own, &period_s);
  if (!variant_action_begin (self))
    return;
  lw_design_model_set_variant_period (self->model, lw_design_model_get_active (self->model),
                                      own, period_s);
  variant_action_end (self);
}

static void
variant_switch_to (LwWindow *self, guint i)
{
  if (i >= lw_design_model_get_n_variants (self->model) || !variant_action_begin (self))
    return;
  lw_design_model_set_active (self->model, i);
  variant_action_end (self);
}

static void
variant_switch_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  variant_switch_to (LW_WINDOW (widget), g_variant_get_uint32 (param));
}

static void
variant_step (LwWindow *self, int delta)
{
  guint n = lw_design_model_get_n_variants (self->model);
  guint a = lw_design_model_get_active (self->model);
  variant_switch_to (self, (a + n + (guint) (delta + (int) n)) % n);
}

static void
variant_next_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  variant_step (LW_WINDOW (widget), +1);
}

static void
variant_previous_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  variant_step (LW_WINDOW (widget), -1);
}

/* Which variants are compared is a choice of the window, not of the document: no undo step. */
static void
variant_compare_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  const char *name = NULL;
  gboolean shown = FALSE;
  g_variant_get (param, "(&sb)", &name, &shown);
  set_compared (self, name, shown);
  refresh_compared (self);
  show_handles_and_plots (self);
}

static void
compare_all_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  const LwDesign *d = lw_design_model_get_design (self->model);
  gboolean all = TRUE;
  for (size_t i = 0; i < d->n_variants; i++)
    if (i != d->active && !is_compared (self, d->variants[i].name))
      all = FALSE;
  g_ptr_array_set_size (self->compared, 0);
  for (size_t i = 0; !all && i < d->n_variants; i++)
    if (i != d->active)
      g_ptr_array_add (self->compared, g_strdup (d->variants[i].name));
  refresh_compared (self);
  show_handles_and_plots (self);
}

static void
variants_menu_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  lw_compensator_panel_popup_variants (LW_WINDOW (widget)->compensator_panel);
}

static void
reset_view_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  lw_plot_area_reset_view (LW_WINDOW (widget)->plot_area);
}

/* ---- dialogs ------------------------------------------------------------------------------- */

static void
message_response (GtkDialog *dialog, int response, gpointer user_data)
{
  gtk_window_destroy (GTK_WINDOW (dialog));
}

static void
show_error (LwWindow *self, const char *primary, const char *secondary)
{
  g_message ("%s %s", primary, secondary);
  GtkWidget *d = gtk_message_dialog_new (GTK_WINDOW (self), GTK_DIALOG_MODAL
                                           | GTK_DIALOG_DESTROY_WITH_PARENT,
                                         GTK_MESSAGE_ERROR, GTK_BUTTONS_CLOSE, "%s", primary);
  gtk_message_dialog_format_secondary_text (GTK_MESSAGE_DIALOG (d), "%s", secondary);
  gtk_window_set_title (GTK_WINDOW (d), primary);
  g_signal_connect (d, "response", G_CALLBACK (message_response), NULL);
  gtk_window_present (GTK_WINDOW (d));
}

/* ---- files --------------------------------------------------------------------------------- */

/* The autosave this window wrote is no longer needed (saved, or discarded on close). */
static void
drop_autosave (LwWindow *self)
{
  if (!self->wrote_autosave)
    return;
  g_autofree char *p = lw_autosave_path ();
  g_autofree char *s = lw_autosave_source_path ();
  g_unlink (p);
  g_unlink (s);
  self->wrote_autosave = FALSE;
}

static void
remember_folder (LwWindow *self, GFile *file)
{
  GSettings *settings = window_settings (self);
  g_autoptr (GFile) parent = g_file_get_parent (file);
  if (settings != NULL && parent != NULL && g_file_peek_path (parent) != NULL)
    g_settings_set_string (settings, "last-folder", g_file_peek_path (parent));
}

static void refresh_recent (LwWindow *self);

static void
add_recent (LwWindow *self, GFile *file)
{
  g_autofree char *uri = g_file_get_uri (file);
  gtk_recent_manager_add_item (gtk_recent_manager_get_default (), uri);
  refresh_recent (self);
}

static void
set_file (LwWindow *self, GFile *file)
{
  if (file != NULL)
    g_object_ref (file);
  g_clear_object (&self->file);
  self->file = file;
  update_title (self);
}

/* Loads file; on failure shows the loader's message over self and returns NULL. */
static LwDesign *
load_or_explain (LwWindow *self, GFile *file)
{
  g_autoptr (GError) error = NULL;
  g_autofree char *name = g_file_get_parse_name (file);
  const char *path = g_file_peek_path (file);
  LwDesign *d = path != NULL ? lw_design_load_file (path, &error) : NULL;
  if (d == NULL)
    {
      g_autofree char *primary = g_strdup_printf (_("Could not open “%s”"), name);
      show_error (self, primary, error != NULL ? error->message
                                               : _("Only local files can be opened."));
    }
  return d;
}

/* Shows d (taken), opened from file. */
static void
install_design (LwWindow *self, GFile *file, LwDesign *d)
{
  if (self->dragging)
    {
      lw_plot_pane_cancel_drag (self->drag_pane);
      self->dragging = FALSE;
    }
  g_clear_pointer (&self->saved, lw_design_free);
  self->saved = lw_design_copy (d);
  set_file (self, file);
  self->sel_stage = -1;
  self->restoring = TRUE;
  lw_design_model_replace (self->model, d);
  self->restoring = FALSE;
  reset_history (self);
  update_dirty (self);
  update_title (self);
  add_recent (self, file);
  remember_folder (self, file);
}

gboolean
lw_window_open_file (LwWindow *self, GFile *file)
{
  g_return_val_if_fail (LW_IS_WINDOW (self), FALSE);
  g_return_val_if_fail (G_IS_FILE (file), FALSE);

  LwDesign *d = load_or_explain (self, file);
  if (d == NULL)
    return FALSE;
  install_design (self, file, d);
  return TRUE;
}

gboolean
lw_window_is_pristine (LwWindow *self)
{
  g_return_val_if_fail (LW_IS_WINDOW (self), FALSE);
  return self->file == NULL && !self->dirty && self->undo->len == 0 && self->redo->len == 0;
}

gboolean
lw_window_restore_autosave (LwWindow *self, const char *path, GFile *source)
{
  g_return_val_if_fail (LW_IS_WINDOW (self), FALSE);
  g_autoptr (GError) error = NULL;
  LwDesign *d = lw_design_load_file (path, &error);
  if (d == NULL)
    {
      show_error (self, _("Could not restore the autosaved design"), error->message);
      return FALSE;
    }
  g_clear_pointer (&self->saved, lw_design_free);
  if (source != NULL)
    {
      /* what the file holds now, so the title shows whether the restored work differs */
      g_autoptr (GError) ignored = NULL;
      const char *sp = g_file_peek_path (source);
      self->saved = sp != NULL ? lw_design_load_file (sp, &ignored) : NULL;
    }
  set_file (self, source);
  self->restoring = TRUE;
  lw_design_model_replace (self->model, d);
  self->restoring = FALSE;
  reset_history (self);
  self->dirty = FALSE;
  update_dirty (self);
  if (self->saved == NULL && !self->dirty)
    {
      self->dirty = TRUE;   /* restored work that was never saved */
      update_title (self);
    }
  self->wrote_autosave = TRUE;   /* it is this window's now: dropped once saved */
  return TRUE;
}

static gboolean
save_to (LwWindow *self, GFile *file)
{
  g_autoptr (GError) error = NULL;
  g_autofree char *name = g_file_get_parse_name (file);
  const char *path = g_file_peek_path (file);
  commit_now (self);
  if (path == NULL)
    {
      g_autofree char *primary = g_strdup_printf (_("Could not save “%s”"), name);
      show_error (self, primary, _("Only local files can be written."));
      return FALSE;
    }
  const LwDesign *d = lw_design_model_get_design (self->model);
  if (!lw_design_save_file (d, path, &error))
    {
      g_autofree char *primary = g_strdup_printf (_("Could not save “%s”"), name);
      show_error (self, primary, error->message);
      return FALSE;
    }
  g_clear_pointer (&self->saved, lw_design_free);
  self->saved = lw_design_copy (d);
  set_file (self, file);
  update_dirty (self);
  update_title (self);
  add_recent (self, file);
  remember_folder (self, file);
  drop_autosave (self);
  return TRUE;
}

static void
set_chooser_folder (LwWindow *self, GtkFileChooser *chooser)
{
  GSettings *settings = window_settings (self);
  g_autofree char *folder = settings != NULL ? g_settings_get_string (settings, "last-folder")
                                             : NULL;
  if (self->file != NULL)
    {
      g_autoptr (GFile) parent = g_file_get_parent (self->file);
      if (parent != NULL)
        gtk_file_chooser_set_current_folder (chooser, parent, NULL);
    }
  else if (folder != NULL && folder[0] != '\0')
    {
      g_autoptr (GFile) f = g_file_new_for_path (folder);
      gtk_file_chooser_set_current_folder (chooser, f, NULL);
    }
}

static void
add_design_filter (GtkFileChooser *chooser)
{
  g_autoptr (GtkFileFilter) filter = gtk_file_filter_new ();
  gtk_file_filter_set_name (filter, _("Loopwright designs"));
  gtk_file_filter_add_pattern (filter, "*" LW_DESIGN_EXTENSION);
  gtk_file_chooser_add_filter (chooser, filter);
  g_autoptr (GtkFileFilter) all = gtk_file_filter_new ();
  gtk_file_filter_set_name (all, _("All files"));
  gtk_file_filter_add_pattern (all, "*");
  gtk_file_chooser_add_filter (chooser, all);
}

/* What to do once Save As has written the file. */
typedef enum { AFTER_SAVE_NOTHING, AFTER_SAVE_CLOSE } AfterSave;

static void
save_as_response (GtkNativeDialog *native, int response, gpointer user_data)
{
  LwWindow *self = LW_WINDOW (user_data);
  AfterSave after = GPOINTER_TO_INT (g_object_get_data (G_OBJECT (native), "lw-after-save"));
  if (response == GTK_RESPONSE_ACCEPT)
    {
      g_autoptr (GFile) file = gtk_file_chooser_get_file (GTK_FILE_CHOOSER (native));
      if (file != NULL && save_to (self, file) && after == AFTER_SAVE_CLOSE)
        {
          self->close_confirmed = TRUE;
          gtk_window_close (GTK_WINDOW (self));
        }
    }
  g_object_unref (native);
  g_object_unref (self);
}

static void
save_as (LwWindow *self, AfterSave after)
{
  GtkFileChooserNative *native =
    gtk_file_chooser_native_new (_("Save Design"), GTK_WINDOW (self),
                                 GTK_FILE_CHOOSER_ACTION_SAVE, _("_Save"), _("_Cancel"));
  gtk_native_dialog_set_modal (GTK_NATIVE_DIALOG (native), TRUE);
  add_design_filter (GTK_FILE_CHOOSER (native));
  set_chooser_folder (self, GTK_FILE_CHOOSER (native));
  g_autofree char *name = self->file != NULL ? g_file_get_basename (self->file)
                                             : g_strdup (_("design.lwd"));
  gtk_file_chooser_set_current_name (GTK_FILE_CHOOSER (native), name);
  g_object_set_data (G_OBJECT (native), "lw-after-save", GINT_TO_POINTER (after));
  g_signal_connect (native, "response", G_CALLBACK (save_as_response), g_object_ref (self));
  gtk_native_dialog_show (GTK_NATIVE_DIALOG (native));
}

static void
save_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (self->file != NULL)
    save_to (self, self->file);
  else
    save_as (self, AFTER_SAVE_NOTHING);
}

static void
save_as_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  save_as (LW_WINDOW (widget), AFTER_SAVE_NOTHING);
}

/* Opens file here when this window is untouched, else in a new window; a document that does
 * not load is explained over this window and changes nothing. */
static void
open_here_or_new (LwWindow *self, GFile *file)
{
  LwDesign *d = load_or_explain (self, file);
  if (d == NULL)
    return;
  if (lw_window_is_pristine (self))
    {
      install_design (self, file, d);
      return;
    }
  GtkApplication *app = gtk_window_get_application (GTK_WINDOW (self));
  LwWindow *win = lw_window_new (LW_APPLICATION (app));
  gtk_window_present (GTK_WINDOW (win));
  install_design (win, file, d);
}

static void
open_response (GtkNativeDialog *native, int response, gpointer user_data)
{
  LwWindow *self = LW_WINDOW (user_data);
  if (response == GTK_RESPONSE_ACCEPT)
    {
      g_autoptr (GFile) file = gtk_file_chooser_get_file (GTK_FILE_CHOOSER (native));
      if (file != NULL)
        open_here_or_new (self, file);
    }
  g_object_unref (native);
  g_object_unref (self);
}

static void
open_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  GtkFileChooserNative *native =
    gtk_file_chooser_native_new (_("Open Design"), GTK_WINDOW (self),
                                 GTK_FILE_CHOOSER_ACTION_OPEN, _("_Open"), _("_Cancel"));
  gtk_native_dialog_set_modal (GTK_NATIVE_DIALOG (native), TRUE);
  add_design_filter (GTK_FILE_CHOOSER (native));
  set_chooser_folder (self, GTK_FILE_CHOOSER (native));
  g_signal_connect (native, "response", G_CALLBACK (open_response), g_object_ref (self));
  gtk_native_dialog_show (GTK_NATIVE_DIALOG (native));
}

static void
open_recent_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  g_autoptr (GFile) file = g_file_new_for_uri (g_variant_get_string (param, NULL));
  open_here_or_new (self, file);
}

static gboolean
file_dropped (GtkDropTarget *target, const GValue *value, double x, double y, gpointer data)
{
  LwWindow *self = LW_WINDOW (data);
  if (!G_VALUE_HOLDS (value, GDK_TYPE_FILE_LIST))
    return FALSE;
  GSList *files = g_value_get_boxed (value);
  for (GSList *l = files; l != NULL; l = l->next)
    open_here_or_new (self, G_FILE (l->data));
  return files != NULL;
}

/* ---- recent files menu --------------------------------------------------------------------- */

static GMenuModel *
recent_menu (void)
{
  GMenu *menu = g_menu_new ();
  GList *items = gtk_recent_manager_get_items (gtk_recent_manager_get_default ());
  guint n = 0;
  for (GList *l = items; l != NULL && n < 10; l = l->next)
    {
      GtkRecentInfo *info = l->data;
      const char *uri = gtk_recent_info_get_uri (info);
      if (!g_str_has_suffix (uri, LW_DESIGN_EXTENSION) || !gtk_recent_info_exists (info))
        continue;
      g_autoptr (GMenuItem) item = g_menu_item_new (gtk_recent_info_get_display_name (info),
                                                    NULL);
      g_menu_item_set_action_and_target (item, "window.open-recent", "s", uri);
      g_menu_append_item (menu, item);
      n++;
    }
  g_list_free_full (items, (GDestroyNotify) gtk_recent_info_unref);
  return G_MENU_MODEL (menu);
}

/* Fills the Open Recent submenu from the recent manager. */
static void
refresh_recent (LwWindow *self)
{
  if (self->recent_menu == NULL)
    return;
  g_menu_remove_all (self->recent_menu);
  g_autoptr (GMenuModel) fresh = recent_menu ();
  for (int i = 0; i < g_menu_model_get_n_items (fresh); i++)
    {
      g_autoptr (GMenuItem) item = g_menu_item_new_from_model (fresh, i);
      g_menu_append_item (self->recent_menu, item);
    }
}

/* ---- closing ------------------------------------------------------------------------------- */

static void
close_response (GtkDialog *dialog, int response, gpointer user_data)
{
  LwWindow *self = LW_WINDOW (user_data);
  gtk_window_destroy (GTK_WINDOW (dialog));
  if (response == GTK_RESPONSE_ACCEPT)
    {
      if (self->file != NULL)
        {
          if (save_to (self, self->file))
            {
              self->close_confirmed = TRUE;
              gtk_window_close (GTK_WINDOW (self));
            }
        }
      else
        save_as (self, AFTER_SAVE_CLOSE);
    }
  else if (response == GTK_RESPONSE_REJECT)
    {
      drop_autosave (self);
      self->close_confirmed = TRUE;
      gtk_window_close (GTK_WINDOW (self));
    }
  g_object_unref (self);
}

static void
ask_before_close (LwWindow *self)
{
  g_autofree char *name = document_name (self);
  GtkWidget *d = gtk_message_dialog_new (GTK_WINDOW (self), GTK_DIALOG_MODAL
                                           | GTK_DIALOG_DESTROY_WITH_PARENT,
                                         GTK_MESSAGE_QUESTION, GTK_BUTTONS_NONE,
                                         _("Save the changes to “%s” before closing?"), name);
  gtk_message_dialog_format_secondary_text (GTK_MESSAGE_DIALOG (d), "%s",
                                            _("Unsaved changes are lost when the window closes "
                                              "without saving."));
  gtk_window_set_title (GTK_WINDOW (d), _("Unsaved changes"));
  gtk_dialog_add_buttons (GTK_DIALOG (d), _("Close _without Saving"), GTK_RESPONSE_REJECT,
                          _("_Cancel"), GTK_RESPONSE_CANCEL, _("_Save"), GTK_RESPONSE_ACCEPT,
                          NULL);
  gtk_dialog_set_default_response (GTK_DIALOG (d), GTK_RESPONSE_ACCEPT);
  g_signal_connect (d, "response", G_CALLBACK (close_response), g_object_ref (self));
  gtk_window_present (GTK_WINDOW (d));
}

/* ---- autosave ------------------------------------------------------------------------------ */

static gboolean
autosave_tick (gpointer user_data)
{
  LwWindow *self = user_data;
  if (!self->dirty || self->dragging)
    return G_SOURCE_CONTINUE;
  g_autofree char *path = lw_autosave_path ();
  g_autofree char *dir = g_path_get_dirname (path);
  g_autofree char *source = lw_autosave_source_path ();
  g_autoptr (GError) error = NULL;
  if (g_mkdir_with_parents (dir, 0700) != 0
      || !lw_design_save_file (lw_design_model_get_design (self->model), path, &error))
    {
      g_warning ("autosave to %s failed: %s", path, error != NULL ? error->message
                                                                   : g_strerror (errno));
      return G_SOURCE_CONTINUE;
    }
  g_autofree char *uri = self->file != NULL ? g_file_get_uri (self->file) : g_strdup ("");
  if (!g_file_set_contents (source, uri, -1, &error))
    g_warning ("autosave: %s", error->message);
  self->wrote_autosave = TRUE;
  return G_SOURCE_CONTINUE;
}

/* ---- drag handles -------------------------------------------------------------------------- */

static double
pane_x_to_nu (LwWindow *self, LwPlotPane *pane, double x)
{
  double period = lw_design_model_get_active_period_s (self->model);
  if (lw_plot_pane_get_view (pane) == LW_PLOT_VIEW_BODE_W)
    return x;
  double omax = G_PI / period * (1.0 - 1e-9);
  return lw_warp_omega_to_nu (CLAMP (x, 1e-12, omax), period);
}

static void
set_drag_label (LwWindow *self, const LwStage *s)
{
  g_autofree char *text = NULL;
  double period = lw_design_model_get_active_period_s (self->model);
  if (self->drag_corner < 0)
    text = g_strdup_printf (_("gain %.4g (%+.2f dB)"), s->p.gain.ratio,
                            20.0 * log10 (fabs (s->p.gain.ratio)));
  else
    {
      double nu = 0;
      LwHandleKind kind;
      lw_stage_corner_get (s, (size_t) self->drag_corner, &nu, &kind, NULL);
      if (lw_plot_pane_get_view (self->drag_pane) == LW_PLOT_VIEW_BODE_W)
        text = g_strdup_printf (_("ν = %.4g rad/s"), nu);
      else
        text = g_strdup_printf (_("ω = %.4g rad/s (ν = %.4g rad/s)"),
                                lw_warp_nu_to_omega (nu, period), nu);
    }
  lw_plot_pane_set_drag_label (self->drag_pane, text);
}

static void
begin_drag (LwWindow *self, LwPlotPane *pane, guint stage, int corner, double x, double y_db)
{
  commit_now (self);
  self->dragging = TRUE;
  self->drag_pane = pane;
  self->drag_stage = stage;
  self->drag_corner = corner;
  self->drag_start_stage = *lw_design_model_get_stage (self->model, stage);
  self->drag_start_x = x;
  self->drag_start_y_db = y_db;
  self->sel_stage = (int) stage;
  self->sel_corner = corner;
  if (corner < 0)
    self->gain_pin_nu = pane_x_to_nu (self, pane, x);
  set_drag_label (self, &self->drag_start_stage);
}

/* The pointer is at (x, y_db) of the drag pane's magnitude panel. */
static void
update_drag (LwWindow *self, double x, double y_db, gboolean keep_ratio)
{
  LwStage s = self->drag_start_stage;
  if (self->drag_corner < 0)
    {
      if (s.kind != LW_STAGE_GAIN)
        return;
      s.p.gain.ratio = self->drag_start_stage.p.gain.ratio
                       * pow (10.0, (y_db - self->drag_start_y_db) / 20.0);
    }
  else
    {
      double nu0 = 0;
      LwHandleKind kind;
      if (lw_stage_corner_get (&s, (size_t) self->drag_corner, &nu0, &kind, NULL) != LW_OK)
        return;
      double nu;
      if (lw_plot_pane_get_view (self->drag_pane) == LW_PLOT_VIEW_BODE_W)
        nu = nu0 * x / self->drag_start_x;
      else
        {
          double period = lw_design_model_get_active_period_s (self->model);
          double w0 = lw_warp_nu_to_omega (nu0, period);
          nu = pane_x_to_nu (self, self->drag_pane, w0 * x / self->drag_start_x);
        }
      if (lw_stage_corner_set (&s, (size_t) self->drag_corner, nu, keep_ratio, NULL) != LW_OK)
        return;   /* refused (a lead would stop being a lead): stay where it was */
    }
  lw_design_model_set_stage (self->model, self->drag_stage, &s);
  set_drag_label (self, &s);
}

static void
end_drag (LwWindow *self, gboolean cancel)
{
  if (!self->dragging)
    return;
  if (cancel)
    {
      lw_design_model_set_stage (self->model, self->drag_stage, &self->drag_start_stage);
      lw_plot_pane_cancel_drag (self->drag_pane);
    }
  self->dragging = FALSE;
  self->gain_pin_nu = 0;
  lw_plot_pane_set_drag_label (self->drag_pane, NULL);
  self->drag_pane = NULL;
  commit_now (self);
  schedule_eval (self);
}

static void
pane_drag_begin (LwPlotPane *pane, guint index, double x, double y_db, LwWindow *self)
{
  const LwPaneHandle *h = lw_plot_pane_get_handle (pane, index);
  if (h == NULL || h->stage >= lw_design_model_get_n_stages (self->model))
    return;
  begin_drag (self, pane, h->stage, h->corner, x, y_db);
}

static void
pane_drag_update (LwPlotPane *pane, guint index, double x, double y_db, guint mods,
                  LwWindow *self)
{
  if (!self->dragging || pane != self->drag_pane)
    return;
  update_drag (self, x, y_db, (mods & GDK_SHIFT_MASK) != 0);
}

static void
pane_drag_end (LwPlotPane *pane, LwWindow *self)
{
  if (self->dragging && pane == self->drag_pane)
    end_drag (self, FALSE);
}

static gboolean
window_key_pressed (GtkEventControllerKey *c, guint keyval, guint keycode,
                    GdkModifierType state, LwWindow *self)
{
  if (keyval == GDK_KEY_Escape && self->dragging)
    {
      end_drag (self, TRUE);
      return TRUE;
    }
  return FALSE;
}

/* Handles in the order the w-plane view lists them. */
static void
select_handle (LwWindow *self, int delta)
{
  LwPlotPane *pane = lw_plot_area_get_pane (self->plot_area, LW_PLOT_VIEW_BODE_W);
  guint n = pane != NULL ? lw_plot_pane_get_n_handles (pane) : 0;
  if (n == 0 || self->dragging)
    return;
  int cur = -1;
  for (guint i = 0; i < n; i++)
    {
      const LwPaneHandle *h = lw_plot_pane_get_handle (pane, i);
      if ((int) h->stage == self->sel_stage && h->corner == self->sel_corner)
        cur = (int) i;
    }
  int next = cur < 0 ? (delta > 0 ? 0 : (int) n - 1) : ((cur + delta) % (int) n + (int) n) % (int) n;
  const LwPaneHandle *h = lw_plot_pane_get_handle (pane, (guint) next);
  self->sel_stage = (int) h->stage;
  self->sel_corner = h->corner;
  gtk_widget_grab_focus (GTK_WIDGET (pane));
  show_handles_and_plots (self);
}

static void
next_handle_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  select_handle (LW_WINDOW (widget), +1);
}

static void
previous_handle_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  select_handle (LW_WINDOW (widget), -1);
}

/* Moves the selected handle by factor (corner frequency or gain ratio). */
static void
nudge_selected (LwWindow *self, double factor)
{
  if (self->sel_stage < 0 || (guint) self->sel_stage >= lw_design_model_get_n_stages (self->model))
    return;
  LwStage s = *lw_design_model_get_stage (self->model, (guint) self->sel_stage);
  if (self->sel_corner < 0)
    {
      if (s.kind != LW_STAGE_GAIN)
        return;
      s.p.gain.ratio *= factor;
    }
  else
    {
      double nu;
      LwHandleKind kind;
      if (lw_stage_corner_get (&s, (size_t) self->sel_corner, &nu, &kind, NULL) != LW_OK
          || lw_stage_corner_set (&s, (size_t) self->sel_corner, nu * factor, FALSE, NULL)
               != LW_OK)
        return;
    }
  lw_design_model_set_stage (self->model, (guint) self->sel_stage, &s);
}

static gboolean
pane_key_pressed (GtkEventControllerKey *c, guint keyval, guint keycode, GdkModifierType state,
                  LwWindow *self)
{
  double step = (state & GDK_CONTROL_MASK) ? KEY_STEP_BIG : KEY_STEP;
  switch (keyval)
    {
    case GDK_KEY_Right:
    case GDK_KEY_Up:
    case GDK_KEY_KP_Right:
    case GDK_KEY_KP_Up:
      nudge_selected (self, step);
      return self->sel_stage >= 0;
    case GDK_KEY_Left:
    case GDK_KEY_Down:
    case GDK_KEY_KP_Left:
    case GDK_KEY_KP_Down:
      nudge_selected (self, 1.0 / step);
      return self->sel_stage >= 0;
    default:
      return FALSE;
    }
}

static void
connect_pane (LwWindow *self, LwPlotView view)
{
  LwPlotPane *pane = lw_plot_area_get_pane (self->plot_area, view);
  if (pane == NULL)
    return;
  g_signal_connect (pane, "handle-drag-begin", G_CALLBACK (pane_drag_begin), self);
  g_signal_connect (pane, "handle-drag-update", G_CALLBACK (pane_drag_update), self);
  g_signal_connect (pane, "handle-drag-end", G_CALLBACK (pane_drag_end), self);
  GtkEventController *k = gtk_event_controller_key_new ();
  g_signal_connect (k, "key-pressed", G_CALLBACK (pane_key_pressed), self);
  gtk_widget_add_controller (GTK_WIDGET (pane), k);
}

/* ---- export -------------------------------------------------------------------------------- */

static LwPlot *
build_export_plot (LwPlotView view, gpointer user_data, char *err, size_t err_size)
{
  LwWindow *self = LW_WINDOW (user_data);
  if (self->eval == NULL)
    {
      g_snprintf (err, err_size, "%s", _("Nothing evaluated yet."));
      return NULL;
    }
  LwPlotRequirements req = { 0 };
  plot_requirements (self, &req);
  const LwDesign *d = lw_design_model_get_design (self->model);
  /* what the window shows: the active variant and those compared with it, document order */
  LwAreaVariant vs[LW_PLOT_MAX_VARIANTS];
  guint n = 0;
  for (guint i = 0; i < d->n_variants && n < LW_PLOT_MAX_VARIANTS; i++)
    {
      const char *name = d->variants[i].name;
      LwVariantEval *e = NULL;
      if (i == d->active)
        e = self->eval;
      else if (is_compared (self, name))
        {
          RefEval *r = g_hash_table_lookup (self->ref_evals, name);
          e = r != NULL ? r->eval : NULL;
        }
      if (e == NULL || e->ev == NULL)
        continue;
      vs[n++] = (LwAreaVariant) { .eval = e, .name = name,
                                  .style = i % LW_PLOT_MAX_VARIANTS + 1 };
    }
  if (n == 0)
    {
      g_snprintf (err, err_size, "%s", _("Nothing evaluated yet."));
      return NULL;
    }
  return lw_plot_area_build_plot (vs, n, &req, view, NULL, err, err_size);
}

/* Test hook: with LW_TEST_FIGURE_PATH set, Export Figure writes the view LW_TEST_FIGURE_VIEW
 * (a view name, default bode-w) there at once, 800 × 600 in the light theme, in the format of
 * the path's extension, without the dialogs (tests/gui/test-split.py). */
static gboolean
export_figure_for_test (LwWindow *self)
{
  const char *path = g_getenv ("LW_TEST_FIGURE_PATH");
  if (path == NULL || *path == '\0')
    return FALSE;
  const char *vname = g_getenv ("LW_TEST_FIGURE_VIEW");
  int view = lw_plot_view_from_name (vname != NULL ? vname : "bode-w");
  int format = lw_plot_format_from_path (path);
  char err[256] = "";
  LwPlot *plot = view >= 0 && format >= 0
                   ? build_export_plot ((LwPlotView) view, self, err, sizeof err) : NULL;
  LwPlotExportOptions eo = { .pdf_creator = "loopwright " PACKAGE_VERSION };
  if (plot == NULL || !lw_plot_export (plot, (LwPlotFormat) format, path, 800, 600, &eo, err,
                                       sizeof err))
    g_printerr ("LW-TEST export of %s failed: %s\n", path, err[0] ? err : "bad view or format");
  lw_plot_free (plot);
  return TRUE;
}

static void
export_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (export_figure_for_test (self))
    return;
  g_autofree char *name = document_name (self);
  char *dot = strrchr (name, '.');
  if (dot != NULL && self->file != NULL)
    *dot = '\0';
  lw_export_dialog_show (GTK_WINDOW (self), window_settings (self), name, build_export_plot,
                         self);
}

/* ---- design report ------------------------------------------------------------------------ */

/* Writes the design report of the variants shown (the active one and those compared with it,
 * in the document's order) to path, .pdf or else .html: the report of
 * `loopwright-cli report FILE --variants … --date …` built by the same library (src/report/),
 * FILE being the document's file name. The date: SOURCE_DATE_EPOCH when set (the
 * reproducible-builds convention), else today. Explains a failure over the window. */
static void
write_report (LwWindow *self, const char *path)
{
  const LwDesign *d = lw_design_model_get_design (self->model);
  size_t which[LW_PLOT_MAX_VARIANTS];
  size_t n = 0;
  for (size_t i = 0; i < d->n_variants && n < LW_PLOT_MAX_VARIANTS; i++)
    if (i == d->active || is_compared (self, d->variants[i].name))
      which[n++] = i;
  g_autofree char *name = document_name (self);
  g_autofree char *shown = g_filename_display_name (path);
  g_autofree char *primary = g_strdup_printf (_("Could not write the report “%s”"), shown);
  g_autoptr (GError) error = NULL;
  g_autofree char *date = NULL;
  if (!lw_report_date_from_environment (&date, &error))
    {
      show_error (self, primary, error->message);
      return;
    }
  if (date == NULL)
    {
      g_autoptr (GDateTime) now = g_date_time_new_now_local ();
      date = g_date_time_format (now, "%Y-%m-%d");
    }
  g_autoptr (LwReport) r = lw_report_build (name, d, which, n, date, &error);
  size_t len = 0;
  if (r == NULL || !lw_report_write_file (r, path, &len, &error))
    show_error (self, primary, error->message);
  else if (self->debug)
    g_print ("LW-REPORT path=%s bytes=%zu variants=%zu\n", path, len, n);
}

static void
report_response (GtkNativeDialog *native, int response, gpointer user_data)
{
  LwWindow *self = LW_WINDOW (user_data);
  if (response == GTK_RESPONSE_ACCEPT)
    {
      g_autoptr (GFile) file = gtk_file_chooser_get_file (GTK_FILE_CHOOSER (native));
      const char *path = file != NULL ? g_file_peek_path (file) : NULL;
      if (path != NULL)
        {
          g_autofree char *lower = g_ascii_strdown (path, -1);
          if (g_str_has_suffix (lower, ".pdf") || g_str_has_suffix (lower, ".html")
              || g_str_has_suffix (lower, ".htm"))
            write_report (self, path);
          else
            {
              /* no known extension: the format of the chosen filter */
              GtkFileFilter *f = gtk_file_chooser_get_filter (GTK_FILE_CHOOSER (native));
              gboolean pdf = f != NULL && g_object_get_data (G_OBJECT (f), "lw-pdf") != NULL;
              g_autofree char *full = g_strconcat (path, pdf ? ".pdf" : ".html", NULL);
              write_report (self, full);
            }
        }
    }
  g_object_unref (native);
  g_object_unref (self);
}

/* Test hook: with LW_TEST_REPORT_PATH set, Export Report writes there at once, without the
 * file chooser (tests/gui/test-report.py). */
static void
export_report_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  const char *test_path = g_getenv ("LW_TEST_REPORT_PATH");
  if (test_path != NULL && *test_path != '\0')
    {
      write_report (self, test_path);
      return;
    }
  GtkFileChooserNative *native =
    gtk_file_chooser_native_new (_("Export Report"), GTK_WINDOW (self),
                                 GTK_FILE_CHOOSER_ACTION_SAVE, _("_Export"), _("_Cancel"));
  gtk_native_dialog_set_modal (GTK_NATIVE_DIALOG (native), TRUE);
  GtkFileFilter *pdf = gtk_file_filter_new ();
  gtk_file_filter_set_name (pdf, _("PDF report (*.pdf)"));
  gtk_file_filter_add_suffix (pdf, "pdf");
  g_object_set_data (G_OBJECT (pdf), "lw-pdf", GINT_TO_POINTER (1));
  GtkFileFilter *html = gtk_file_filter_new ();
  gtk_file_filter_set_name (html, _("HTML report (*.html)"));
  gtk_file_filter_add_suffix (html, "html");
  gtk_file_filter_add_suffix (html, "htm");
  gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (native), pdf);
  gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (native), html);
  g_object_unref (pdf);
  g_object_unref (html);
  set_chooser_folder (self, GTK_FILE_CHOOSER (native));
  g_autofree char *name = document_name (self);
  char *dot = strrchr (name, '.');
  if (dot != NULL && self->file != NULL)
    *dot = '\0';
  /* TRANSLATORS: the suggested file name of a design report; %s is the design's file name */
  g_autofree char *suggested = g_strdup_printf (_("%s report.pdf"), name);
  gtk_file_chooser_set_current_name (GTK_FILE_CHOOSER (native), suggested);
  g_signal_connect (native, "response", G_CALLBACK (report_response), g_object_ref (self));
  gtk_native_dialog_show (GTK_NATIVE_DIALOG (native));
}

/* ---- dark style ---------------------------------------------------------------------------- */

static void
follow_theme (LwWindow *self)
{
  gboolean dark = FALSE;
  g_object_get (gtk_settings_get_default (), "gtk-application-prefer-dark-theme", &dark, NULL);
  lw_plot_area_set_theme (self->plot_area, dark ? LW_PLOT_THEME_DARK : LW_PLOT_THEME_LIGHT);
  lw_compare_table_set_theme (self->compare_table,
                              dark ? LW_PLOT_THEME_DARK : LW_PLOT_THEME_LIGHT);
}

/* ---- actions ------------------------------------------------------------------------------- */

static void
focus_plant_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  gtk_widget_grab_focus (lw_plant_panel_get_entry (self->plant_panel));
}

static void
add_stage_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  lw_compensator_panel_popup_add_menu (self->compensator_panel);
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
  end_drag (self, TRUE);
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
              begin_drag (self, pane, h->stage, h->corner, h->x, h->y);
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
  update_drag (self, self->bench_nu0 * ratio, 0.0, TRUE);
  reevaluate (self);   /* this frame's evaluation, in the update phase like eval_tick */
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
  g_ptr_array_set_size (self->compared, 0);
  for (size_t i = 0; i < d->n_variants; i++)
    if (i != d->active)
      g_ptr_array_add (self->compared, g_strdup (d->variants[i].name));
  refresh_compared (self);
  show_handles_and_plots (self);
  g_array_set_size (self->bench_paint, 0);
  gtk_window_set_default_size (GTK_WINDOW (self), 1600, 1000);
  self->bench_tick = gtk_widget_add_tick_callback (GTK_WIDGET (self), bench_tick, NULL, NULL);
}

/* ---- life cycle ---------------------------------------------------------------------------- */

static gboolean
lw_window_close_request (GtkWindow *window)
{
  LwWindow *self = LW_WINDOW (window);
  GSettings *settings = window_settings (self);

  if (self->dragging)
    end_drag (self, TRUE);
  commit_now (self);
  if (self->dirty && !self->close_confirmed)
    {
      ask_before_close (self);
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
    drop_autosave (self);
  return GTK_WINDOW_CLASS (lw_window_parent_class)->close_request (window);
}

static void
lw_window_get_property (GObject *object, guint id, GValue *value, GParamSpec *pspec)
{
  LwWindow *self = LW_WINDOW (object);

  switch (id)
    {
    case PROP_ONE_COLUMN:
      g_value_set_boolean (value, self->one_column);
      break;
    case PROP_SPLIT:
      g_value_set_boolean (value, self->split);
      break;
    default:
      G_OBJECT_WARN_INVALID_PROPERTY_ID (object, id, pspec);
    }
}

static void
lw_window_set_property (GObject *object, guint id, const GValue *value, GParamSpec *pspec)
{
  LwWindow *self = LW_WINDOW (object);

  switch (id)
    {
    case PROP_ONE_COLUMN:
      {
        gboolean v = g_value_get_boolean (value);
        if (v == self->one_column)
          break;
        self->one_column = v;
        lw_plot_area_set_layout (self->plot_area, v ? LW_PLOT_LAYOUT_COLUMN
                                                    : LW_PLOT_LAYOUT_GRID);
        GSettings *settings = window_settings (self);
        if (settings != NULL)
          g_settings_set_enum (settings, "layout", v ? LW_PLOT_LAYOUT_COLUMN
                                                     : LW_PLOT_LAYOUT_GRID);
        g_object_notify_by_pspec (object, pspec);
      }
      break;
    case PROP_SPLIT:
      {
        gboolean v = g_value_get_boolean (value);
        if (v == self->split)
          break;
        self->split = v;
        lw_plot_area_set_split (self->plot_area, v);
        if (self->eval != NULL)
          show_handles_and_plots (self);
        g_object_notify_by_pspec (object, pspec);
      }
      break;
    default:
      G_OBJECT_WARN_INVALID_PROPERTY_ID (object, id, pspec);
    }
}

/* Once the window belongs to the application: restore its size and layout, show a new
 * design. */
static void
start (LwWindow *self)
{
  GSettings *settings = window_settings (self);
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

  g_autoptr (LwDesignModel) model = lw_design_model_new_example ();
  set_model (self, model);
  reset_history (self);
  update_dirty (self);
  update_title (self);
  refresh_recent (self);
}

static void
lw_window_dispose (GObject *object)
{
  LwWindow *self = LW_WINDOW (object);

  g_signal_handlers_disconnect_by_data (gtk_settings_get_default (), self);
  if (self->model != NULL)
    g_signal_handlers_disconnect_by_data (self->model, self);
  g_clear_handle_id (&self->commit_id, g_source_remove);
  g_clear_handle_id (&self->autosave_id, g_source_remove);
  g_clear_object (&self->model);
  g_clear_object (&self->file);
  g_clear_pointer (&self->eval, lw_variant_eval_unref);
  g_clear_pointer (&self->saved, lw_design_free);
  g_clear_pointer (&self->committed, lw_design_free);
  g_clear_pointer (&self->undo, g_ptr_array_unref);
  g_clear_pointer (&self->redo, g_ptr_array_unref);
  g_clear_pointer (&self->bench_paint, g_array_unref);
  g_clear_pointer (&self->compared, g_ptr_array_unref);
  g_clear_pointer (&self->ref_evals, g_hash_table_unref);
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
  object_class->get_property = lw_window_get_property;
  object_class->set_property = lw_window_set_property;
  GTK_WINDOW_CLASS (klass)->close_request = lw_window_close_request;

  props[PROP_ONE_COLUMN] =
    g_param_spec_boolean ("one-column", NULL, NULL, FALSE,
                          G_PARAM_READWRITE | G_PARAM_EXPLICIT_NOTIFY | G_PARAM_STATIC_STRINGS);
  props[PROP_SPLIT] =
    g_param_spec_boolean ("split", NULL, NULL, FALSE,
                          G_PARAM_READWRITE | G_PARAM_EXPLICIT_NOTIFY | G_PARAM_STATIC_STRINGS);
  g_object_class_install_properties (object_class, N_PROPS, props);

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
  gtk_widget_class_bind_template_child (widget_class, LwWindow, recent_menu);

  gtk_widget_class_install_action (widget_class, "window.focus-plant", NULL,
                                   focus_plant_activated);
  gtk_widget_class_install_action (widget_class, "window.add-stage", NULL, add_stage_activated);
  gtk_widget_class_install_action (widget_class, "window.open", NULL, open_activated);
  gtk_widget_class_install_action (widget_class, "window.open-recent", "s",
                                   open_recent_activated);
  gtk_widget_class_install_action (widget_class, "window.save", NULL, save_activated);
  gtk_widget_class_install_action (widget_class, "window.save-as", NULL, save_as_activated);
  gtk_widget_class_install_action (widget_class, "window.export", NULL, export_activated);
  gtk_widget_class_install_action (widget_class, "window.export-report", NULL,
                                   export_report_activated);
  gtk_widget_class_install_action (widget_class, "window.undo", NULL, undo_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-period", "(bd)",
                                   variant_period_activated);
  gtk_widget_class_install_action (widget_class, "window.redo", NULL, redo_activated);
  gtk_widget_class_install_action (widget_class, "window.next-handle", NULL,
                                   next_handle_activated);
  gtk_widget_class_install_action (widget_class, "window.previous-handle", NULL,
                                   previous_handle_activated);
  gtk_widget_class_install_property_action (widget_class, "window.one-column", "one-column");
  gtk_widget_class_install_property_action (widget_class, "window.split", "split");
  gtk_widget_class_install_action (widget_class, "window.variant-copy", NULL,
                                   variant_copy_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-new", NULL,
                                   variant_new_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-delete", NULL,
                                   variant_delete_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-up", NULL, variant_up_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-down", NULL,
                                   variant_down_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-rename", "s",
                                   variant_rename_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-switch", "u",
                                   variant_switch_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-next", NULL,
                                   variant_next_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-previous", NULL,
                                   variant_previous_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-compare", "(sb)",
                                   variant_compare_activated);
  gtk_widget_class_install_action (widget_class, "window.compare-all", NULL,
                                   compare_all_activated);
  gtk_widget_class_install_action (widget_class, "window.variants", NULL,
                                   variants_menu_activated);
  gtk_widget_class_install_action (widget_class, "window.reset-view", NULL,
                                   reset_view_activated);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_n, GDK_CONTROL_MASK | GDK_SHIFT_MASK,
                                       "window.variant-copy", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_N, GDK_CONTROL_MASK | GDK_SHIFT_MASK,
                                       "window.variant-copy", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_Page_Down, GDK_CONTROL_MASK,
                                       "window.variant-next", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_Page_Up, GDK_CONTROL_MASK,
                                       "window.variant-previous", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_k, GDK_CONTROL_MASK | GDK_SHIFT_MASK,
                                       "window.compare-all", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_K, GDK_CONTROL_MASK | GDK_SHIFT_MASK,
                                       "window.compare-all", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_0, GDK_CONTROL_MASK,
                                       "window.reset-view", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_l, GDK_CONTROL_MASK,
                                       "window.focus-plant", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_a, GDK_CONTROL_MASK | GDK_SHIFT_MASK,
                                       "window.add-stage", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_F9, 0, "window.one-column", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_w, GDK_CONTROL_MASK,
                                       "window.close", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_o, GDK_CONTROL_MASK,
                                       "window.open", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_s, GDK_CONTROL_MASK,
                                       "window.save", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_s, GDK_CONTROL_MASK | GDK_SHIFT_MASK,
                                       "window.save-as", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_e, GDK_CONTROL_MASK,
                                       "window.export", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_e, GDK_CONTROL_MASK | GDK_SHIFT_MASK,
                                       "window.export-report", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_E, GDK_CONTROL_MASK | GDK_SHIFT_MASK,
                                       "window.export-report", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_z, GDK_CONTROL_MASK,
                                       "window.undo", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_z, GDK_CONTROL_MASK | GDK_SHIFT_MASK,
                                       "window.redo", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_Z, GDK_CONTROL_MASK | GDK_SHIFT_MASK,
                                       "window.redo", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_F7, 0, "window.next-handle", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_F7, GDK_SHIFT_MASK,
                                       "window.previous-handle", NULL);
}

static void
lw_window_init (LwWindow *self)
{
  gtk_widget_init_template (GTK_WIDGET (self));
  self->undo = g_ptr_array_new_with_free_func ((GDestroyNotify) lw_design_free);
  self->redo = g_ptr_array_new_with_free_func ((GDestroyNotify) lw_design_free);
  self->bench_paint = g_array_new (FALSE, FALSE, sizeof (double));
  self->compared = g_ptr_array_new_with_free_func (g_free);
  self->ref_evals = g_hash_table_new_full (g_str_hash, g_str_equal, g_free, ref_eval_free);
  self->eval_cancel = g_cancellable_new ();
  self->sel_stage = -1;
  self->debug = g_strcmp0 (g_getenv ("LW_DEBUG_HANDLES"), "1") == 0;
  g_signal_connect_swapped (gtk_settings_get_default (), "notify::gtk-application-prefer-dark-theme",
                            G_CALLBACK (follow_theme), self);
  follow_theme (self);

  connect_pane (self, LW_PLOT_VIEW_BODE_W);
  connect_pane (self, LW_PLOT_VIEW_BODE_Z);

  GtkEventController *k = gtk_event_controller_key_new ();
  gtk_event_controller_set_propagation_phase (k, GTK_PHASE_CAPTURE);
  g_signal_connect (k, "key-pressed", G_CALLBACK (window_key_pressed), self);
  gtk_widget_add_controller (GTK_WIDGET (self), k);

  /* Shortcuts that must win over the focused widget: a GtkPaned takes F6 and F8 and a text
   * field its own keys before a binding of the window's class is asked, so these are taken
   * in the capture phase. */
  static const struct { guint key; GdkModifierType mods; const char *action; } early[] = {
    { GDK_KEY_b, GDK_CONTROL_MASK | GDK_SHIFT_MASK, "window.split" },
    { GDK_KEY_v, GDK_CONTROL_MASK | GDK_SHIFT_MASK, "window.variants" },
  };
  GtkEventController *sc = gtk_shortcut_controller_new ();
  gtk_event_controller_set_propagation_phase (sc, GTK_PHASE_CAPTURE);
  for (guint i = 0; i < G_N_ELEMENTS (early); i++)
    gtk_shortcut_controller_add_shortcut (GTK_SHORTCUT_CONTROLLER (sc),
                                          gtk_shortcut_new (gtk_keyval_trigger_new (early[i].key,
                                                                                    early[i].mods),
                                                            gtk_named_action_new (early[i].action)));
  gtk_widget_add_controller (GTK_WIDGET (self), sc);


  GtkDropTarget *drop = gtk_drop_target_new (GDK_TYPE_FILE_LIST, GDK_ACTION_COPY);
  g_signal_connect (drop, "drop", G_CALLBACK (file_dropped), self);
  gtk_widget_add_controller (GTK_WIDGET (self), GTK_EVENT_CONTROLLER (drop));

  self->autosave_id = g_timeout_add_seconds (AUTOSAVE_INTERVAL_S, autosave_tick, self);
}

LwWindow *
lw_window_new (LwApplication *app)
{
  LwWindow *self = g_object_new (LW_TYPE_WINDOW, "application", app, NULL);
  start (self);
  return self;
}
