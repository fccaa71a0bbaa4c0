/* lw-window-measured-family.c — the designer window's measured family: the active variant's
 * loop closed on each of the design's measured responses (lw_measured_family_evaluate, the
 * function `analyze`, `check` and the report use) on a task of its own after the evaluation
 * is on show, one at a time with only the newest waiting, and its worst cases shown under the
 * loop figures (docs/families.md, "Measured families"; docs/window.md).
 *
 * The evaluation on show is shared with the worker (it is not changed once made; its
 * reference count is atomic). A result is dropped when a newer evaluation is on show (its own
 * family follows it). During a drag nothing is evaluated: the last summary stays, dimmed, and
 * the family is evaluated again when the drag ends.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>

#include "lw-family-measured.h"
#include "lw-window-private.h"

/* A measured family evaluated for the evaluation of one generation. */
typedef struct
{
  LwDesign *doc;
  LwVariantEval *eval;
  guint64 generation;
  LwMeasuredFamily *family;
  GError *error;
} MeasuredJob;

static void
job_free (gpointer data)
{
  MeasuredJob *mj = data;
  lw_design_free (mj->doc);
  g_clear_pointer (&mj->eval, lw_variant_eval_unref);
  g_clear_pointer (&mj->family, lw_measured_family_free);
  g_clear_error (&mj->error);
  g_free (mj);
}

static void
job_thread (GTask *task, gpointer source, gpointer task_data, GCancellable *cancellable)
{
  MeasuredJob *mj = task_data;
  mj->family = lw_measured_family_evaluate (mj->doc, mj->eval, &mj->error);
  g_task_return_boolean (task, TRUE);
}

static void run_job (LwWindow *self, MeasuredJob *mj);

/* Shows a family unless a newer evaluation is on show (its own family follows it). */
static void
job_done (GObject *source, GAsyncResult *result, gpointer user_data)
{
  GTask *task = G_TASK (result);
  if (g_cancellable_is_cancelled (g_task_get_cancellable (task)))
    return;   /* the window went meanwhile */
  LwWindow *self = LW_WINDOW (source);
  MeasuredJob *mj = g_task_get_task_data (task);
  self->measured_family_running = FALSE;
  if (self->measured_family_pending != NULL)
    run_job (self, g_steal_pointer (&self->measured_family_pending));
  if (mj->generation != self->shown_generation)
    return;
  lw_requirements_panel_show_measured_family (self->requirements_panel, mj->family, mj->error,
                                              FALSE);
  if (self->debug && mj->family != NULL)
    {
      const LwMeasuredFamily *f = mj->family;
      size_t w = f->worst[LW_MEASURED_FAMILY_PHASE_MARGIN];
      printf ("LW-MEASURED-FAMILY sets=%zu worst_pm=%.17g worst_set=%s failing=%zu judged=%d "
              "unstable=%zu undecided=%zu\n", f->n_sets,
              w < f->n_sets ? f->worst_value[LW_MEASURED_FAMILY_PHASE_MARGIN] : NAN,
              w < f->n_sets ? f->sets[w].name : "-", f->n_not_passing, f->judged ? 1 : 0,
              f->n_unstable, f->n_undecided);
      fflush (stdout);
    }
}

static void
run_job (LwWindow *self, MeasuredJob *mj)
{
  self->measured_family_running = TRUE;
  g_autoptr (GTask) task = g_task_new (self, self->eval_cancel, job_done, NULL);
  g_task_set_source_tag (task, lw_window_show_measured_family);
  g_task_set_task_data (task, mj, job_free);
  g_task_run_in_thread (task, job_thread);
}

void
lw_window_show_measured_family (LwWindow *self, const LwDesign *doc, LwVariantEval *eval,
                                guint64 generation, gboolean dragging)
{
  if (!lw_measured_family_wanted (doc) || eval == NULL)
    {
      g_clear_pointer (&self->measured_family_pending, job_free);
      lw_requirements_panel_show_measured_family (self->requirements_panel, NULL, NULL, FALSE);
      return;
    }
  if (dragging)
    {
      lw_requirements_panel_show_measured_family (self->requirements_panel, NULL, NULL, TRUE);
      return;
    }
  MeasuredJob *mj = g_new0 (MeasuredJob, 1);
  mj->doc = lw_design_copy (doc);
  mj->eval = lw_variant_eval_ref (eval);
  mj->generation = generation;
  if (self->measured_family_running)
    {
      /* one at a time: the newest waits, older waiting ones are dropped */
      g_clear_pointer (&self->measured_family_pending, job_free);
      self->measured_family_pending = mj;
      return;
    }
  run_job (self, mj);
}

void
lw_window_drop_measured_family (LwWindow *self)
{
  g_clear_pointer (&self->measured_family_pending, job_free);
}
