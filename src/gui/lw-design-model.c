/* lw-design-model.c — the design the window edits, and its evaluation through core/.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include <glib/gi18n.h>

#include "lw-design-model.h"
#include "lw-expr.h"
#include "lw-simulate.h"

struct _LwDesignModel
{
  GObject parent_instance;

  LwDesign *doc;                /* the document being edited (owned) */

  /* the sampled plants of the last evaluations, one per sample period (variants may have
   * their own), and the plant and dead time they were built from */
  GArray *sampled;              /* of SampledEntry */
  char *sampled_plant_text;
  double sampled_dead_time_s;
};

/* A sampled plant shared by the cache and the evaluations made with it (reference-counted: an
 * evaluation a view still draws may outlive the cache entry). */
typedef struct
{
  LwSampledPlant *plant;
} SharedPlant;

static void
shared_plant_clear (gpointer data)
{
  SharedPlant *s = data;
  g_clear_pointer (&s->plant, lw_sampled_plant_free);
}

static void
shared_plant_release (gpointer s)
{
  g_rc_box_release_full (s, shared_plant_clear);
}

typedef struct
{
  double period_s;
  SharedPlant *shared;
} SampledEntry;

static void
sampled_entry_clear (gpointer data)
{
  SampledEntry *e = data;
  g_clear_pointer (&e->shared, shared_plant_release);
}

G_DEFINE_FINAL_TYPE (LwDesignModel, lw_design_model, G_TYPE_OBJECT)

enum
{
  SIGNAL_CHANGED,
  SIGNAL_STAGES_CHANGED,
  SIGNAL_REQUIREMENTS_CHANGED,
  SIGNAL_REPLACED,
  SIGNAL_VARIANTS_CHANGED,
  N_SIGNALS
};
static guint signals[N_SIGNALS];

static void
lw_design_model_finalize (GObject *object)
{
  LwDesignModel *self = LW_DESIGN_MODEL (object);

  g_clear_pointer (&self->doc, lw_design_free);
  g_clear_pointer (&self->sampled, g_array_unref);
  g_free (self->sampled_plant_text);
  G_OBJECT_CLASS (lw_design_model_parent_class)->finalize (object);
}

static void
lw_design_model_class_init (LwDesignModelClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);

  object_class->finalize = lw_design_model_finalize;

  /* Any edit: the evaluation and every view are out of date. */
  signals[SIGNAL_CHANGED] = g_signal_new ("changed", G_TYPE_FROM_CLASS (klass),
                                          G_SIGNAL_RUN_LAST, 0, NULL, NULL, NULL,
                                          G_TYPE_NONE, 0);
  /* Stages added, removed or reordered (emitted before "changed"). */
  signals[SIGNAL_STAGES_CHANGED] = g_signal_new ("stages-changed", G_TYPE_FROM_CLASS (klass),
                                                 G_SIGNAL_RUN_LAST, 0, NULL, NULL, NULL,
                                                 G_TYPE_NONE, 0);
  /* A requirement added (emitted before "changed"). */
  signals[SIGNAL_REQUIREMENTS_CHANGED] =
    g_signal_new ("requirements-changed", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST, 0, NULL,
                  NULL, NULL, G_TYPE_NONE, 0);
  /* The whole document replaced (open, undo, redo): every field may differ. Emitted first,
   * then "stages-changed", "requirements-changed" and "changed". */
  signals[SIGNAL_REPLACED] = g_signal_new ("replaced", G_TYPE_FROM_CLASS (klass),
                                           G_SIGNAL_RUN_LAST, 0, NULL, NULL, NULL,
                                           G_TYPE_NONE, 0);
  /* Variants added, removed, renamed, reordered or switched (emitted before
   * "stages-changed" and "changed"). */
  signals[SIGNAL_VARIANTS_CHANGED] =
    g_signal_new ("variants-changed", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST, 0, NULL,
                  NULL, NULL, G_TYPE_NONE, 0);
}

static void
lw_design_model_init (LwDesignModel *self)
{
  self->sampled = g_array_new (FALSE, FALSE, sizeof (SampledEntry));
  g_array_set_clear_func (self->sampled, sampled_entry_clear);
}

LwDesignModel *
lw_design_model_new (LwDesign *design)
{
  g_return_val_if_fail (design != NULL, NULL);
  g_return_val_if_fail (design->n_variants >= 1 && design->active < design->n_variants, NULL);

  LwDesignModel *self = g_object_new (LW_TYPE_DESIGN_MODEL, NULL);
  self->doc = design;
  return self;
}

LwDesign *
lw_design_model_example_design (void)
{
  LwDesign *d = lw_design_new ("180/(s*(s+12))", 0.002);
  LwStage gain = lw_stage_gain (2.5);
  LwStage lead = lw_stage_lead (10.0, 80.0);

  d->dead_time_s = 0.0;
  d->compute_delay = 1;
  lw_design_variant_add_stage (&d->variants[0], &gain);
  lw_design_variant_add_stage (&d->variants[0], &lead);
  const LwRequirement reqs[] = {
    { .kind = LW_REQ_MIN_PHASE_MARGIN, .limit = 45.0 },
    { .kind = LW_REQ_MIN_GAIN_MARGIN, .limit = 6.0 },
    { .kind = LW_REQ_MAX_SENSITIVITY, .limit = 2.0 },
    { .kind = LW_REQ_MAX_OVERSHOOT, .limit = 25.0 },
  };
  for (size_t i = 0; i < G_N_ELEMENTS (reqs); i++)
    lw_design_add_requirement (d, NULL, &reqs[i]);
  return d;
}

LwDesignModel *
lw_design_model_new_example (void)
{
  return lw_design_model_new (lw_design_model_example_design ());
}

const LwDesign *
lw_design_model_get_design (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  return self->doc;
}

void
lw_design_model_replace (LwDesignModel *self, LwDesign *design)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  g_return_if_fail (design != NULL);
  g_return_if_fail (design->n_variants >= 1 && design->active < design->n_variants);

  lw_design_free (self->doc);
  self->doc = design;
  g_signal_emit (self, signals[SIGNAL_REPLACED], 0);
  g_signal_emit (self, signals[SIGNAL_VARIANTS_CHANGED], 0);
  g_signal_emit (self, signals[SIGNAL_STAGES_CHANGED], 0);
  g_signal_emit (self, signals[SIGNAL_REQUIREMENTS_CHANGED], 0);
  g_signal_emit (self, signals[SIGNAL_CHANGED], 0);
}

static LwDesignVariant *
active_variant (LwDesignModel *self)
{
  return &self->doc->variants[self->doc->active];
}

static void
emit_changed (LwDesignModel *self)
{
  g_signal_emit (self, signals[SIGNAL_CHANGED], 0);
}

const char *
lw_design_model_get_plant_text (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  return self->doc->plant;
}

void
lw_design_model_set_plant_text (LwDesignModel *self, const char *text)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  g_return_if_fail (text != NULL);
  if (g_strcmp0 (self->doc->plant, text) == 0)
    return;
  lw_design_set_string (&self->doc->plant, text);
  emit_changed (self);
}

double
lw_design_model_get_dead_time_s (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NAN);
  return self->doc->dead_time_s;
}

void
lw_design_model_set_dead_time_s (LwDesignModel *self, double dead_time_s)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  if (self->doc->dead_time_s == dead_time_s)
    return;
  self->doc->dead_time_s = dead_time_s;
  emit_changed (self);
}

double
lw_design_model_get_period_s (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NAN);
  return self->doc->period_s;
}

void
lw_design_model_set_period_s (LwDesignModel *self, double period_s)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  if (self->doc->period_s == period_s)
    return;
  self->doc->period_s = period_s;
  emit_changed (self);
}

int
lw_design_model_get_compute_delay (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), 0);
  return self->doc->compute_delay;
}

void
lw_design_model_set_compute_delay (LwDesignModel *self, int samples)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  g_return_if_fail (samples >= 0);
  if (self->doc->compute_delay == samples)
    return;
  self->doc->compute_delay = samples;
  emit_changed (self);
}

guint
lw_design_model_get_n_stages (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), 0);
  return (guint) active_variant (self)->n_stages;
}

const LwStage *
lw_design_model_get_stage (LwDesignModel *self, guint i)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  g_return_val_if_fail (i < active_variant (self)->n_stages, NULL);
  return &active_variant (self)->stages[i];
}

void
lw_design_model_set_stage (LwDesignModel *self, guint i, const LwStage *stage)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  g_return_if_fail (i < active_variant (self)->n_stages);
  g_return_if_fail (stage != NULL);
  LwStage *s = &active_variant (self)->stages[i];
  if (memcmp (s, stage, sizeof *s) == 0)
    return;
  *s = *stage;
  emit_changed (self);
}

void
lw_design_model_append_stage (LwDesignModel *self, const LwStage *stage)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  g_return_if_fail (stage != NULL);
  lw_design_variant_add_stage (active_variant (self), stage);
  g_signal_emit (self, signals[SIGNAL_STAGES_CHANGED], 0);
  emit_changed (self);
}

void
lw_design_model_remove_stage (LwDesignModel *self, guint i)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  LwDesignVariant *v = active_variant (self);
  g_return_if_fail (i < v->n_stages);
  memmove (&v->stages[i], &v->stages[i + 1], (v->n_stages - i - 1) * sizeof *v->stages);
  v->n_stages--;
  g_signal_emit (self, signals[SIGNAL_STAGES_CHANGED], 0);
  emit_changed (self);
}

void
lw_design_model_move_stage (LwDesignModel *self, guint i, int delta)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  g_return_if_fail (delta == -1 || delta == 1);
  LwDesignVariant *v = active_variant (self);
  if (i >= v->n_stages || (delta < 0 && i == 0) || (delta > 0 && i + 1 >= v->n_stages))
    return;
  guint j = delta < 0 ? i - 1 : i + 1;
  LwStage tmp = v->stages[i];
  v->stages[i] = v->stages[j];
  v->stages[j] = tmp;
  g_signal_emit (self, signals[SIGNAL_STAGES_CHANGED], 0);
  emit_changed (self);
}

guint
lw_design_model_get_n_requirements (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), 0);
  return (guint) self->doc->n_requirements;
}

const LwRequirement *
lw_design_model_get_requirement (LwDesignModel *self, guint i)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  g_return_val_if_fail (i < self->doc->n_requirements, NULL);
  return &self->doc->requirements[i].req;
}

void
lw_design_model_set_requirement (LwDesignModel *self, guint i, const LwRequirement *r)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  g_return_if_fail (i < self->doc->n_requirements);
  g_return_if_fail (r != NULL);
  LwRequirement *t = &self->doc->requirements[i].req;
  if (memcmp (t, r, sizeof *t) == 0)
    return;
  *t = *r;
  emit_changed (self);
}

void
lw_design_model_append_requirement (LwDesignModel *self, const LwRequirement *r)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  g_return_if_fail (r != NULL);
  lw_design_add_requirement (self->doc, NULL, r);
  g_signal_emit (self, signals[SIGNAL_REQUIREMENTS_CHANGED], 0);
  emit_changed (self);
}

/* ---- variants ------------------------------------------------------------------------------ */

static void
emit_variants_changed (LwDesignModel *self, gboolean stages_too)
{
  g_signal_emit (self, signals[SIGNAL_VARIANTS_CHANGED], 0);
  if (stages_too)
    g_signal_emit (self, signals[SIGNAL_STAGES_CHANGED], 0);
  emit_changed (self);
}

guint
lw_design_model_get_n_variants (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), 0);
  return (guint) self->doc->n_variants;
}

guint
lw_design_model_get_active (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), 0);
  return (guint) self->doc->active;
}

const char *
lw_design_model_get_variant_name (LwDesignModel *self, guint i)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  g_return_val_if_fail (i < self->doc->n_variants, NULL);
  return self->doc->variants[i].name;
}

void
lw_design_model_set_active (LwDesignModel *self, guint i)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  g_return_if_fail (i < self->doc->n_variants);
  if (self->doc->active == i)
    return;
  self->doc->active = i;
  emit_variants_changed (self, TRUE);
}

char *
lw_design_model_unused_variant_name (LwDesignModel *self, const char *base)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  g_return_val_if_fail (base != NULL && base[0] != '\0', NULL);
  if (lw_design_find_variant (self->doc, base) < 0)
    return g_strdup (base);
  for (guint k = 2;; k++)
    {
      char *name = g_strdup_printf ("%s %u", base, k);
      if (lw_design_find_variant (self->doc, name) < 0)
        return name;
      g_free (name);
    }
}

const char *
lw_design_model_variant_name_problem (LwDesignModel *self, guint i, const char *name)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  if (name == NULL || name[0] == '\0')
    return _("A variant needs a name.");
  if (lw_design_text_problem (name) != NULL)
    return lw_design_text_problem (name);
  gssize j = lw_design_find_variant (self->doc, name);
  if (j >= 0 && (guint) j != i)
    return _("Another variant has this name.");
  return NULL;
}

gboolean
lw_design_model_add_variant (LwDesignModel *self, const char *name, gboolean copy_active)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  if (lw_design_model_variant_name_problem (self, G_MAXUINT, name) != NULL
      || self->doc->n_variants >= LW_DESIGN_MAX_VARIANTS)
    return FALSE;
  size_t from = self->doc->active;
  LwDesignVariant *v = lw_design_add_variant (self->doc, name);
  if (copy_active)
    {
      const LwDesignVariant *src = &self->doc->variants[from];
      lw_design_set_string (&v->notes, src->notes);
      v->has_period = src->has_period;
      v->period_s = src->period_s;
      for (size_t k = 0; k < src->n_stages; k++)
        lw_design_variant_add_stage (v, &src->stages[k]);
    }
  self->doc->active = self->doc->n_variants - 1;
  emit_variants_changed (self, TRUE);
  return TRUE;
}

double
lw_design_model_get_variant_period_s (LwDesignModel *self, guint i, gboolean *overrides)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NAN);
  g_return_val_if_fail (i < self->doc->n_variants, NAN);
  if (overrides != NULL)
    *overrides = self->doc->variants[i].has_period;
  return lw_design_variant_period_s (self->doc, i);
}

double
lw_design_model_get_active_period_s (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NAN);
  return lw_design_variant_period_s (self->doc, self->doc->active);
}

gboolean
lw_design_model_set_variant_period (LwDesignModel *self, guint i, gboolean overrides,
                                    double period_s)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  g_return_val_if_fail (i < self->doc->n_variants, FALSE);
  if (overrides && !(period_s > 0.0 && isfinite (period_s)))
    return FALSE;
  LwDesignVariant *v = &self->doc->variants[i];
  if (v->has_period == overrides && (!overrides || v->period_s == period_s))
    return TRUE;
  v->has_period = overrides;
  v->period_s = overrides ? period_s : 0.0;
  emit_variants_changed (self, FALSE);
  return TRUE;
}

gboolean
lw_design_model_rename_variant (LwDesignModel *self, guint i, const char *name)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  g_return_val_if_fail (i < self->doc->n_variants, FALSE);
  if (lw_design_model_variant_name_problem (self, i, name) != NULL)
    return FALSE;
  if (g_strcmp0 (self->doc->variants[i].name, name) == 0)
    return TRUE;
  lw_design_set_string (&self->doc->variants[i].name, name);
  emit_variants_changed (self, FALSE);
  return TRUE;
}

gboolean
lw_design_model_remove_variant (LwDesignModel *self, guint i)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  LwDesign *d = self->doc;
  if (i >= d->n_variants || d->n_variants <= 1)
    return FALSE;
  LwDesignVariant *v = &d->variants[i];
  g_free (v->name);
  g_free (v->notes);
  g_free (v->stages);
  memmove (&d->variants[i], &d->variants[i + 1], (d->n_variants - i - 1) * sizeof *v);
  d->n_variants--;
  gboolean was_active = d->active == i;
  if (d->active > i || d->active >= d->n_variants)
    d->active--;
  emit_variants_changed (self, was_active);
  return TRUE;
}

void
lw_design_model_move_variant (LwDesignModel *self, guint i, int delta)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  g_return_if_fail (delta == -1 || delta == 1);
  LwDesign *d = self->doc;
  if (i >= d->n_variants || (delta < 0 && i == 0) || (delta > 0 && i + 1 >= d->n_variants))
    return;
  guint j = delta < 0 ? i - 1 : i + 1;
  LwDesignVariant tmp = d->variants[i];
  d->variants[i] = d->variants[j];
  d->variants[j] = tmp;
  if (d->active == i)
    d->active = j;
  else if (d->active == j)
    d->active = i;
  emit_variants_changed (self, FALSE);
}

/* ---- evaluation --------------------------------------------------------------------------- */

static void
design_eval_clear (LwLoopEval *e)
{
  g_clear_pointer (&e->plant_s, lw_model_free);
  g_clear_pointer (&e->controller_w, lw_model_free);
  g_clear_pointer (&e->ev, lw_evaluation_free);
  e->sampled = NULL;
  g_clear_pointer (&e->sampled_ref, shared_plant_release);
}

LwLoopEval *
lw_loop_eval_ref (LwLoopEval *e)
{
  return g_rc_box_acquire (e);
}

void
lw_loop_eval_unref (LwLoopEval *e)
{
  g_rc_box_release_full (e, (GDestroyNotify) design_eval_clear);
}

static LwLoopEval *
fail (LwLoopEval *e, LwLoopFailure failure)
{
  e->failure = failure;
  g_clear_pointer (&e->ev, lw_evaluation_free);
  return e;
}

/* Whether some variant of d is sampled at period_s. */
static gboolean
period_in_use (const LwDesign *d, double period_s)
{
  for (size_t i = 0; i < d->n_variants; i++)
    if (lw_design_variant_period_s (d, i) == period_s)
      return TRUE;
  return FALSE;
}

/* The sampled plant for the current plant and dead time at period_s: kept from earlier calls
 * while the plant and dead time are unchanged (the plan/execute split of lw-analysis.h). One
 * is kept per period some variant uses, so reference variants at other rates keep theirs;
 * those of periods no variant uses any more are dropped (their evaluations are stale). */
static SharedPlant *
sampled_plant (LwDesignModel *self, const LwModel *plant_s, double period_s, LwError *err)
{
  const LwDesign *d = self->doc;
  if (g_strcmp0 (self->sampled_plant_text, d->plant) != 0
      || self->sampled_dead_time_s != d->dead_time_s)
    {
      g_array_set_size (self->sampled, 0);
      g_free (self->sampled_plant_text);
      self->sampled_plant_text = g_strdup (d->plant);
      self->sampled_dead_time_s = d->dead_time_s;
    }
  for (guint k = 0; k < self->sampled->len;)
    {
      SampledEntry *e = &g_array_index (self->sampled, SampledEntry, k);
      if (e->period_s == period_s)
        return e->shared;
      if (!period_in_use (d, e->period_s))
        g_array_remove_index_fast (self->sampled, k);
      else
        k++;
    }
  LwSampledPlant *plant = NULL;
  if (lw_sampled_plant_new (plant_s, d->dead_time_s, period_s, &plant, err) != LW_OK)
    return NULL;
  SampledEntry e = { period_s, g_rc_box_new0 (SharedPlant) };
  e.shared->plant = plant;
  g_array_append_val (self->sampled, e);
  return e.shared;
}

LwLoopEval *
lw_design_model_evaluate (LwDesignModel *self)
{
  return lw_design_model_evaluate_points (self, 0);
}

LwLoopEval *
lw_design_model_evaluate_points (LwDesignModel *self, size_t n_points)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  return lw_design_model_evaluate_variant (self, (guint) self->doc->active, n_points);
}

LwLoopEval *
lw_design_model_evaluate_variant (LwDesignModel *self, guint variant, size_t n_points)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  g_return_val_if_fail (n_points == 0 || n_points >= 16, NULL);
  g_return_val_if_fail (variant < self->doc->n_variants, NULL);

  LwLoopEval *e = g_rc_box_new0 (LwLoopEval);
  lw_error_clear (&e->error);

  const LwDesign *d = self->doc;
  const LwDesignVariant *v = &d->variants[variant];
  if (lw_expr_parse_proper (d->plant, LW_DOMAIN_S, 0.0, &e->plant_s, &e->error)
      != LW_OK)
    return fail (e, LW_LOOP_FAILED_PLANT);

  double period_s = lw_design_variant_period_s (d, variant);   /* its own, or the design's */
  SharedPlant *shared = sampled_plant (self, e->plant_s, period_s, &e->error);
  if (shared == NULL)
    return fail (e, LW_LOOP_FAILED_SAMPLING);
  LwSampledPlant *plant = shared->plant;

  LwModel *controller_z = NULL;
  if (lw_compensator_w (v->stages, v->n_stages, period_s, &e->controller_w, &e->error)
        != LW_OK
      || lw_compensator_z (v->stages, v->n_stages, period_s, &controller_z, &e->error)
           != LW_OK)
    return fail (e, LW_LOOP_FAILED_COMPENSATOR);

  LwAnalysisOptions opts;
  lw_analysis_options_init (&opts);
  opts.compute_delay = d->compute_delay;
  if (n_points > 0)
    opts.n_points = n_points;
  LwStatus st = lw_evaluate (plant, controller_z, &opts, &e->ev, &e->error);
  if (st != LW_OK)
    {
      lw_model_free (controller_z);
      return fail (e, LW_LOOP_FAILED_LOOP);
    }
  e->sampled = plant;
  e->sampled_ref = g_rc_box_acquire (shared);

  /* the simulated reference step (no limits, no continuous output): performance indices and
   * the peak actuator output; a failure leaves them out, not the loop */
  LwSimOptions so;
  lw_sim_options_init (&so);
  so.compute_delay = d->compute_delay;
  so.n_steps = opts.n_steps;
  so.substeps = 0;
  LwSimPlan *plan = NULL;
  LwSimResponse *sim = NULL;
  LwError sim_err;
  if (lw_sim_plan_new (plant, controller_z, &so, &plan, &sim_err) == LW_OK
      && lw_sim_run (plan, LW_SIM_REFERENCE_STEP, 1.0, &sim, &sim_err) == LW_OK)
    {
      e->has_sim = TRUE;
      e->indices = sim->indices;
      e->actuator_peak = 0.0;
      for (size_t k = 0; k < sim->n; k++)
        e->actuator_peak = fmax (e->actuator_peak, fabs (sim->u[k]));
    }
  else
    g_debug ("no simulated step: %s", sim_err.message);
  lw_sim_response_free (sim);
  lw_sim_plan_free (plan);
  lw_model_free (controller_z);

  /* Achieved figures for the requirements; a failure here leaves them out, not the loop. */
  LwError req_err;
  e->has_achieved = lw_achieved_from_evaluation (e->ev, e->plant_s, &e->achieved, &req_err)
                    == LW_OK;
  if (!e->has_achieved)
    g_debug ("no achieved figures: %s", req_err.message);
  else if (e->has_sim)
    {
      e->achieved.has_actuator_peak = true;
      e->achieved.actuator_peak = e->actuator_peak;
    }

  e->failure = LW_LOOP_OK;
  return e;
}
