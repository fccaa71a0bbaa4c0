/* lw-window-family.c — the designer window's plant family: evaluated on a task of its own
 * after the nominal evaluation is on show, one at a time with only the newest waiting, shown
 * under the loop figures unless a newer evaluation is on show (docs/families.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>

#include "lw-family.h"
#include "lw-window-private.h"

gboolean
lw_window_has_ranges (const LwDesign *d)
{
  for (size_t k = 0; k < d->n_params; k++)
    if (d->params[k].ranged)
      return TRUE;
  return FALSE;
}

/* A plant family evaluated for the evaluation of one generation. */
typedef struct
{
  LwDesign *doc;
  size_t variant;
  guint64 generation;
  LwFamily *family;
  GError *error;
} FamilyJob;

static void
family_job_free (gpointer data)
{
  FamilyJob *fj = data;
  lw_design_free (fj->doc);
  g_clear_pointer (&fj->family, lw_family_free);
  g_clear_error (&fj->error);
  g_free (fj);
}

static void
family_thread (GTask *task, gpointer source, gpointer task_data, GCancellable *cancellable)
{
  FamilyJob *fj = task_data;
  fj->family = lw_family_evaluate (fj->doc, fj->variant, NULL, &fj->error);
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
  if (self->debug && fj->family != NULL)
    {
      const LwFamily *f = fj->family;
      size_t w = f->worst[LW_FAMILY_PHASE_MARGIN];
      printf ("LW-FAMILY members=%zu failing=%zu worst_pm=%.17g\n", f->n_members,
              f->n_not_passing,
              w != G_MAXSIZE ? f->members[w].figure[LW_FAMILY_PHASE_MARGIN] : NAN);
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

void
lw_window_drop_family (LwWindow *self)
{
  g_clear_pointer (&self->family_pending, family_job_free);
}
