/* lw-window-family.c — the designer window's plant family: evaluated on a task of its own
 * after the nominal evaluation is on show, one at a time with only the newest waiting; its
 * worst cases shown under the loop figures and its members drawn in the loop views
 * (docs/families.md, "In the window").
 *
 * A family's picture (LwFamilyPicture) is the members' loops drawn with the active variant:
 * after an edit, the whole family is evaluated and up to LW_FAMILY_LOOPS_OTHERS members
 * besides the worst of each figure are drawn on LW_FAMILY_LOOPS_POINTS points. During a drag
 * the same members' loops follow the dragged controller on DRAG_FAMILY_POINTS points, on a
 * worker thread, their sampled plants taken from the last whole picture (the plants do not
 * change with the controller); one such job at a time, the newest waiting, an older result
 * than the one on show dropped. The whole family is evaluated again when the drag ends.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>

#include "lw-family.h"
#include "lw-family-summary.h"
#include "lw-figure-data.h"
#include "lw-window-private.h"

/* Points per member's loop during a drag (the whole picture has LW_FAMILY_LOOPS_POINTS). */
#define DRAG_FAMILY_POINTS 120
/* Points of the band of the members drawn during a drag. */
#define DRAG_BAND_POINTS 200
/* A drag's member jobs start at most this often (µs): every other frame at 60 Hz, so the
 * worker leaves a processor to the display while the figures follow at 30 Hz. */
#define DRAG_JOB_INTERVAL_US 33000

/* ---- the picture ------------------------------------------------------------------------- */

struct _LwFamilyPicture
{
  gatomicrefcount ref;
  guint64 generation;           /* of the evaluation it was made for */
  char *variant;                /* the variant's name */
  LwFamilyLoops *loops;
  LwFigureFamily ff;            /* points into loops' evaluations */
  LwFamilyPicture *plants_of;   /* the picture whose loops own the plants, or NULL: its own */
};

static LwFamilyPicture *
picture_ref (LwFamilyPicture *p)
{
  g_atomic_ref_count_inc (&p->ref);
  return p;
}

void
lw_family_picture_unref (LwFamilyPicture *p)
{
  if (p == NULL || !g_atomic_ref_count_dec (&p->ref))
    return;
  lw_figure_family_clear (&p->ff);
  lw_family_loops_free (p->loops);
  g_clear_pointer (&p->plants_of, lw_family_picture_unref);
  g_free (p->variant);
  g_free (p);
}

/* A picture of loops (taken): its figure data filled (on the worker thread). */
static LwFamilyPicture *
picture_new (LwFamilyLoops *loops, const char *variant, guint64 generation, double worst_pm_deg)
{
  LwFamilyPicture *p = g_new0 (LwFamilyPicture, 1);
  g_atomic_ref_count_init (&p->ref);
  p->generation = generation;
  p->variant = g_strdup (variant);
  p->loops = loops;
  lw_figure_family_fill (&p->ff, loops->n_members, loops->n, loops->plant, loops->ev,
                         loops->worst_pm != G_MAXSIZE ? loops->worst_pm : SIZE_MAX,
                         worst_pm_deg);
  return p;
}

const LwPlotFamily *
lw_window_family_drawn (LwWindow *self)
{
  LwFamilyPicture *p = self->family_picture;
  if (p == NULL || p->ff.f.n == 0)
    return NULL;
  const LwDesign *d = lw_design_model_get_design (self->model);
  if (!lw_family_wanted (d) || g_strcmp0 (p->variant, d->variants[d->active].name) != 0)
    return NULL;
  return &p->ff.f;
}

/* The figures drawn again with the picture on show, unless an evaluation showed them first. */
static gboolean
redraw_tick (GtkWidget *widget, GdkFrameClock *clock, gpointer user_data)
{
  LwWindow *self = LW_WINDOW (widget);
  self->family_tick = 0;
  if (self->family_redraw)
    lw_window_show_plots (self);
  return G_SOURCE_REMOVE;
}

/* The picture on show replaced by p (taken), the figures drawn again at the next frame. */
static void
show_picture (LwWindow *self, LwFamilyPicture *p)
{
  g_clear_pointer (&self->family_picture, lw_family_picture_unref);
  self->family_picture = p;
  self->family_redraw = TRUE;
  /* the drag benchmark shows every frame itself */
  if (self->family_tick == 0 && self->bench_frames == 0)
    self->family_tick = gtk_widget_add_tick_callback (GTK_WIDGET (self), redraw_tick, NULL,
                                                      NULL);
}

void
lw_window_clear_family_picture (LwWindow *self)
{
  lw_compare_table_set_family (self->compare_table, NULL, NULL, 0);
  if (self->family_picture == NULL)
    return;
  g_clear_pointer (&self->family_picture, lw_family_picture_unref);
  self->family_redraw = TRUE;
  if (self->family_tick == 0)
    self->family_tick = gtk_widget_add_tick_callback (GTK_WIDGET (self), redraw_tick, NULL,
                                                      NULL);
}

/* ---- the whole family -------------------------------------------------------------------- */

/* A plant family evaluated for the evaluation of one generation. */
typedef struct
{
  LwDesign *doc;
  size_t variant;
  guint64 generation;
  LwFamily *family;
  LwFamilyPicture *picture;
  GError *error;
} FamilyJob;

static void
family_job_free (gpointer data)
{
  FamilyJob *fj = data;
  lw_design_free (fj->doc);
  g_clear_pointer (&fj->family, lw_family_free);
  g_clear_pointer (&fj->picture, lw_family_picture_unref);
  g_clear_error (&fj->error);
  g_free (fj);
}

static void
family_thread (GTask *task, gpointer source, gpointer task_data, GCancellable *cancellable)
{
  FamilyJob *fj = task_data;
  fj->family = lw_family_evaluate (fj->doc, fj->variant, NULL, &fj->error);
  if (fj->family != NULL)
    {
      const LwFamily *f = fj->family;
      size_t w = f->worst[LW_FAMILY_PHASE_MARGIN];
      LwFamilyLoops *l = lw_family_loops (fj->doc, fj->variant, f, LW_FAMILY_LOOPS_OTHERS, 0);
      fj->picture = picture_new (l, fj->doc->variants[fj->variant].name, fj->generation,
                                 w != G_MAXSIZE ? f->members[w].figure[LW_FAMILY_PHASE_MARGIN]
                                                : NAN);
    }
  g_task_return_boolean (task, TRUE);
}

/* Shows a family unless a newer evaluation is on show (its own family follows it). */
static void run_family (LwWindow *self, FamilyJob *fj);

static void
family_done (GObject *source, GAsyncResult *result, gpointer user_data)
{
  GTask *task = G_TASK (result);
  if (g_cancellable_is_cancelled (g_task_get_cancellable (task)))
    return;   /* the window went meanwhile */
  LwWindow *self = LW_WINDOW (source);
  FamilyJob *fj = g_task_get_task_data (task);
  self->family_running = FALSE;
  if (self->family_pending != NULL)
    run_family (self, g_steal_pointer (&self->family_pending));
  if (fj->generation != self->shown_generation)
    return;
  lw_requirements_panel_show_family (self->requirements_panel, fj->family, fj->doc, fj->error,
                                     FALSE);
  lw_compare_table_set_family (self->compare_table, fj->family, fj->doc, fj->variant);
  g_clear_pointer (&self->family_picture, lw_family_picture_unref);
  self->family_picture = g_steal_pointer (&fj->picture);
  /* the figures and the metrics table with it */
  lw_window_show_variants (self);
  if (self->debug && fj->family != NULL)
    {
      const LwFamily *f = fj->family;
      size_t w = f->worst[LW_FAMILY_PHASE_MARGIN];
      const LwPlotFamily *pf = lw_window_family_drawn (self);
      printf ("LW-FAMILY members=%zu failing=%zu worst_pm=%.17g drawn=%zu\n", f->n_members,
              f->n_not_passing,
              w != G_MAXSIZE ? f->members[w].figure[LW_FAMILY_PHASE_MARGIN] : NAN,
              pf != NULL ? pf->n : 0);
      if (lw_design_analysis_on_data (fj->doc))
        printf ("LW-FAMILY-NOTE %s\n", lw_family_on_model_note ());
      fflush (stdout);
    }
}

void
lw_window_start_family (LwWindow *self, const LwDesign *doc, size_t variant,
                        guint64 generation)
{
  FamilyJob *fj = g_new0 (FamilyJob, 1);
  fj->doc = lw_design_copy (doc);
  fj->variant = variant;
  fj->generation = generation;
  if (self->family_running)
    {
      /* one at a time: the newest waits, older waiting ones are dropped */
      g_clear_pointer (&self->family_pending, family_job_free);
      self->family_pending = fj;
      return;
    }
  run_family (self, fj);
}

static void
run_family (LwWindow *self, FamilyJob *fj)
{
  self->family_running = TRUE;
  g_autoptr (GTask) task = g_task_new (self, self->eval_cancel, family_done, NULL);
  g_task_set_source_tag (task, lw_window_start_family);
  g_task_set_task_data (task, fj, family_job_free);
  g_task_run_in_thread (task, family_thread);
}

/* ---- during a drag ----------------------------------------------------------------------- */

typedef struct
{
  LwDesign *doc;
  size_t variant;
  guint64 generation;
  LwFamilyPicture *base;        /* owns the plants */
  LwFamilyPicture *picture;     /* the result */
  double ms;                    /* the worker's time on it */
} DragJob;

static void
drag_job_free (gpointer data)
{
  DragJob *dj = data;
  lw_design_free (dj->doc);
  g_clear_pointer (&dj->base, lw_family_picture_unref);
  g_clear_pointer (&dj->picture, lw_family_picture_unref);
  g_free (dj);
}

static void
drag_thread (GTask *task, gpointer source, gpointer task_data, GCancellable *cancellable)
{
  DragJob *dj = task_data;
  gint64 t0 = g_get_monotonic_time ();
  LwFamilyLoops *l = lw_family_loops_again (dj->base->loops, dj->doc, dj->variant,
                                            DRAG_FAMILY_POINTS);
  LwFamilyPicture *p = g_new0 (LwFamilyPicture, 1);
  g_atomic_ref_count_init (&p->ref);
  p->generation = dj->generation;
  p->variant = g_strdup (dj->doc->variants[dj->variant].name);
  p->loops = l;
  p->plants_of = picture_ref (dj->base);
  /* drawn: the band of every member and the lines of the worst ones */
  lw_figure_family_fill_lines (&p->ff, l->n_members, l->n, l->plant, l->ev, l->n_worst,
                               l->worst_pm != G_MAXSIZE ? l->worst_pm : SIZE_MAX,
                               lw_family_loops_worst_pm_deg (l), DRAG_BAND_POINTS);
  dj->picture = p;
  dj->ms = (double) (g_get_monotonic_time () - t0) / 1e3;
  g_task_return_boolean (task, TRUE);
}

static void run_drag (LwWindow *self, DragJob *dj);

static gboolean
pending_drag_due (gpointer data)
{
  LwWindow *self = data;
  self->family_drag_timer = 0;
  if (!self->family_drag_running && self->family_drag_pending != NULL)
    run_drag (self, g_steal_pointer (&self->family_drag_pending));
  return G_SOURCE_REMOVE;
}

/* The waiting drag step, now or when DRAG_JOB_INTERVAL_US have passed since the last one
 * started. */
static void
start_pending_drag (LwWindow *self)
{
  if (self->family_drag_pending == NULL || self->family_drag_running
      || self->family_drag_timer != 0)
    return;
  gint64 wait = self->family_drag_started + DRAG_JOB_INTERVAL_US - g_get_monotonic_time ();
  if (wait <= 0)
    run_drag (self, g_steal_pointer (&self->family_drag_pending));
  else
    self->family_drag_timer = g_timeout_add ((guint) (wait / 1000) + 1, pending_drag_due, self);
}

static void
drag_done (GObject *source, GAsyncResult *result, gpointer user_data)
{
  GTask *task = G_TASK (result);
  if (g_cancellable_is_cancelled (g_task_get_cancellable (task)))
    return;
  LwWindow *self = LW_WINDOW (source);
  DragJob *dj = g_task_get_task_data (task);
  self->family_drag_running = FALSE;
  start_pending_drag (self);
  /* stale: a newer picture (a later drag step, or the whole family after the drag) is on
   * show, or the family went */
  if (self->family_picture == NULL || dj->generation <= self->family_picture->generation)
    return;
  if (self->debug)
    {
      const LwPlotFamily *pf = &dj->picture->ff.f;
      printf ("LW-FAMILY-DRAG generation=%" G_GUINT64_FORMAT " lines=%zu band=%d "
              "worst_pm=%.17g ms=%.2f\n", dj->generation, pf->n, pf->band_z != NULL,
              pf->worst_pm_deg, dj->ms);
      fflush (stdout);
    }
  show_picture (self, g_steal_pointer (&dj->picture));
}

static void
run_drag (LwWindow *self, DragJob *dj)
{
  self->family_drag_running = TRUE;
  self->family_drag_started = g_get_monotonic_time ();
  g_autoptr (GTask) task = g_task_new (self, self->eval_cancel, drag_done, NULL);
  g_task_set_source_tag (task, lw_window_follow_family);
  g_task_set_task_data (task, dj, drag_job_free);
  g_task_run_in_thread (task, drag_thread);
}

void
lw_window_follow_family (LwWindow *self, const LwDesign *doc, size_t variant,
                         guint64 generation)
{
  LwFamilyPicture *p = self->family_picture;
  if (p == NULL || g_strcmp0 (p->variant, doc->variants[variant].name) != 0)
    return;
  DragJob *dj = g_new0 (DragJob, 1);
  dj->doc = lw_design_copy (doc);
  dj->variant = variant;
  dj->generation = generation;
  dj->base = picture_ref (p->plants_of != NULL ? p->plants_of : p);
  /* one at a time and at most every DRAG_JOB_INTERVAL_US: the newest waits */
  g_clear_pointer (&self->family_drag_pending, drag_job_free);
  self->family_drag_pending = dj;
  start_pending_drag (self);
}

void
lw_window_drop_family (LwWindow *self)
{
  g_clear_pointer (&self->family_pending, family_job_free);
  g_clear_pointer (&self->family_drag_pending, drag_job_free);
  g_clear_handle_id (&self->family_drag_timer, g_source_remove);
  g_clear_pointer (&self->family_picture, lw_family_picture_unref);
}
