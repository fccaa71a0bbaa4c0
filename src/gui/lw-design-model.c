/* lw-design-model.c — the design the window edits, and its evaluation through core/.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include <glib/gi18n.h>

#include "lw-design-model-private.h"
#include "lw-expr.h"


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
  g_clear_pointer (&self->cache, lw_plant_cache_unref);
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
  self->cache = lw_plant_cache_new ();
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
lw_design_model_new_blank (void)
{
  /* the plant to fill; 1 ms, a common loop rate to start from (common practice, no source) */
  return lw_design_model_new (lw_design_new ("", 0.001));
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

void
lw_design_model_emit_changed (LwDesignModel *self)
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
  lw_design_model_emit_changed (self);
}

/* The document's own words: title (never NULL), author and notes (NULL or empty: none). */
const char *
lw_design_model_get_text_field (LwDesignModel *self, LwDesignTextField field)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  switch (field)
    {
    case LW_DESIGN_TEXT_TITLE: return self->doc->title;
    case LW_DESIGN_TEXT_AUTHOR: return self->doc->author;
    case LW_DESIGN_TEXT_NOTES: return self->doc->notes;
    }
  return NULL;
}

void
lw_design_model_set_views (LwDesignModel *self, const char *const *names)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  gboolean empty = names == NULL || names[0] == NULL;
  if ((empty && self->doc->views == NULL)
      || (!empty && self->doc->views != NULL
          && g_strv_equal ((const char *const *) self->doc->views, names)))
    return;
  g_strfreev (self->doc->views);
  self->doc->views = empty ? NULL : g_strdupv ((char **) names);
  lw_design_model_emit_changed (self);
}

void
lw_design_model_set_text_field (LwDesignModel *self, LwDesignTextField field, const char *text)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  char **slot = field == LW_DESIGN_TEXT_TITLE ? &self->doc->title
                : field == LW_DESIGN_TEXT_AUTHOR ? &self->doc->author : &self->doc->notes;
  /* the title is required (may be empty); author and notes are left out when empty */
  const char *value = field == LW_DESIGN_TEXT_TITLE ? (text != NULL ? text : "")
                      : (text != NULL && text[0] != '\0' ? text : NULL);
  if (g_strcmp0 (*slot, value) == 0)
    return;
  lw_design_set_string (slot, value);
  lw_design_model_emit_changed (self);
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
  /* a family's dead-time parameter has the plant's dead time as its nominal; its range is
   * stretched to hold a nominal moved beyond it (docs/families.md) */
  for (size_t i = 0; i < self->doc->n_params; i++)
    {
      LwDesignParam *p = &self->doc->params[i];
      if (strcmp (p->name, LW_DESIGN_DEAD_TIME_PARAM) != 0)
        continue;
      p->nominal = dead_time_s;
      if (p->ranged)
        {
          p->low = MIN (p->low, dead_time_s);
          p->high = MAX (p->high, dead_time_s);
          if (p->low == p->high)
            p->ranged = false;   /* a range of one value is no range */
        }
    }
  lw_design_model_emit_changed (self);
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
  lw_design_model_emit_changed (self);
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
  lw_design_model_emit_changed (self);
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
  lw_design_model_emit_changed (self);
}

void
lw_design_model_append_stage (LwDesignModel *self, const LwStage *stage)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  g_return_if_fail (stage != NULL);
  lw_design_variant_add_stage (active_variant (self), stage);
  g_signal_emit (self, signals[SIGNAL_STAGES_CHANGED], 0);
  lw_design_model_emit_changed (self);
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
  lw_design_model_emit_changed (self);
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
  lw_design_model_emit_changed (self);
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
  lw_design_model_emit_changed (self);
}

void
lw_design_model_append_requirement (LwDesignModel *self, const LwRequirement *r)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  g_return_if_fail (r != NULL);
  lw_design_add_requirement (self->doc, NULL, r);
  g_signal_emit (self, signals[SIGNAL_REQUIREMENTS_CHANGED], 0);
  lw_design_model_emit_changed (self);
}

void
lw_design_model_emit_variants_changed (LwDesignModel *self, gboolean stages_too)
{
  g_signal_emit (self, signals[SIGNAL_VARIANTS_CHANGED], 0);
  if (stages_too)
    g_signal_emit (self, signals[SIGNAL_STAGES_CHANGED], 0);
  lw_design_model_emit_changed (self);
}


/* ---- evaluation --------------------------------------------------------------------------- */

LwPlantCache *
lw_design_model_get_plant_cache (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  return self->cache;
}

LwVariantEval *
lw_design_model_evaluate (LwDesignModel *self)
{
  return lw_design_model_evaluate_points (self, 0);
}

LwVariantEval *
lw_design_model_evaluate_points (LwDesignModel *self, size_t n_points)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  return lw_design_model_evaluate_variant (self, (guint) self->doc->active, n_points);
}

LwVariantEval *
lw_design_model_evaluate_variant (LwDesignModel *self, guint variant, size_t n_points)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  g_return_val_if_fail (n_points == 0 || n_points >= 16, NULL);
  g_return_val_if_fail (variant < self->doc->n_variants, NULL);

  /* the reference step without limits and without the continuous output, as `check` */
  LwEngineOptions opts;
  lw_engine_options_init (&opts);
  opts.n_points = n_points;
  return lw_engine_evaluate_variant (self->doc, variant, &opts, self->cache);
}
