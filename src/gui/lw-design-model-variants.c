/* lw-design-model-variants.c — the variants of the design the window edits: which one is
 * active, adding, copying, renaming, removing and moving them, and each one's own period,
 * actuator, reference step, shown responses and place in the compared set.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include <glib/gi18n.h>

#include "lw-design-model-private.h"

/* ---- variants ------------------------------------------------------------------------------ */


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
  lw_design_model_emit_variants_changed (self, TRUE);
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
      v->has_actuator = src->has_actuator;
      v->u_low = src->u_low;
      v->u_high = src->u_high;
      v->anti_windup = src->anti_windup;
      v->reference_step = src->reference_step;
      v->responses = src->responses;
      for (size_t k = 0; k < src->n_stages; k++)
        lw_design_variant_add_stage (v, &src->stages[k]);
    }
  self->doc->active = self->doc->n_variants - 1;
  lw_design_model_emit_variants_changed (self, TRUE);
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
  lw_design_model_emit_variants_changed (self, FALSE);
  return TRUE;
}

gboolean
lw_design_model_get_variant_actuator (LwDesignModel *self, guint i, double *low, double *high,
                                      gboolean *anti_windup)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  g_return_val_if_fail (i < self->doc->n_variants, FALSE);
  const LwDesignVariant *v = &self->doc->variants[i];
  if (low != NULL)
    *low = v->u_low;
  if (high != NULL)
    *high = v->u_high;
  if (anti_windup != NULL)
    *anti_windup = v->anti_windup;
  return v->has_actuator;
}

gboolean
lw_design_model_set_variant_actuator (LwDesignModel *self, guint i, gboolean has, double low,
                                      double high, gboolean anti_windup)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  g_return_val_if_fail (i < self->doc->n_variants, FALSE);
  if (has && !(isfinite (low) && isfinite (high) && low < high))
    return FALSE;
  LwDesignVariant *v = &self->doc->variants[i];
  if (!has && !v->has_actuator)
    return TRUE;
  if (has && v->has_actuator && v->u_low == low && v->u_high == high
      && v->anti_windup == (bool) anti_windup)
    return TRUE;
  if (!has)
    v->reference_step = 0.0;
  v->has_actuator = has;
  v->u_low = has ? low : 0.0;
  v->u_high = has ? high : 0.0;
  v->anti_windup = has && anti_windup;
  lw_design_model_emit_variants_changed (self, FALSE);
  return TRUE;
}

double
lw_design_model_get_variant_reference_step (LwDesignModel *self, guint i)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), 1.0);
  g_return_val_if_fail (i < self->doc->n_variants, 1.0);
  double r = self->doc->variants[i].reference_step;
  return r > 0.0 ? r : 1.0;
}

gboolean
lw_design_model_set_variant_reference_step (LwDesignModel *self, guint i, double r)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  g_return_val_if_fail (i < self->doc->n_variants, FALSE);
  LwDesignVariant *v = &self->doc->variants[i];
  if (!v->has_actuator || !(r > 0.0 && isfinite (r)))
    return FALSE;
  double stored = r == 1.0 ? 0.0 : r;   /* a unit step is the default: not written */
  if (v->reference_step == stored)
    return TRUE;
  v->reference_step = stored;
  lw_design_model_emit_variants_changed (self, FALSE);
  return TRUE;
}

gboolean
lw_design_model_set_variant_shown (LwDesignModel *self, guint i, unsigned responses,
                                   gboolean compared)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  g_return_val_if_fail (i < self->doc->n_variants, FALSE);
  LwDesignVariant *v = &self->doc->variants[i];
  if ((responses & ~LW_DESIGN_RESPONSES_ALL) != 0)
    return FALSE;
  if (v->responses == responses && v->compared == (compared != FALSE))
    return TRUE;
  v->responses = responses;
  v->compared = compared != FALSE;
  lw_design_model_emit_variants_changed (self, FALSE);
  return TRUE;
}

gboolean
lw_design_model_set_units (LwDesignModel *self, const char *input_unit, const char *output_unit)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  const char *units[2] = { input_unit != NULL && input_unit[0] != '\0' ? input_unit : NULL,
                           output_unit != NULL && output_unit[0] != '\0' ? output_unit : NULL };
  for (int k = 0; k < 2; k++)
    if (units[k] != NULL && lw_design_unit_problem (units[k]) != NULL)
      return FALSE;
  if (g_strcmp0 (self->doc->input_unit, units[0]) == 0
      && g_strcmp0 (self->doc->output_unit, units[1]) == 0)
    return TRUE;
  lw_design_set_string (&self->doc->input_unit, units[0]);
  lw_design_set_string (&self->doc->output_unit, units[1]);
  lw_design_model_emit_changed (self);
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
  lw_design_model_emit_variants_changed (self, FALSE);
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
  lw_design_model_emit_variants_changed (self, was_active);
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
  lw_design_model_emit_variants_changed (self, FALSE);
}

void
lw_design_model_set_measured (LwDesignModel *self, LwMeasured *m, LwMeasuredKind kind,
                              const char *source)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  LwDesign *d = self->doc;
  lw_measured_free (d->measured);
  d->measured = m;
  d->measured_kind = kind;
  /* a source the document could not save (too long, odd characters) is left out */
  lw_design_set_string (&d->measured_source,
                        m != NULL && source != NULL && lw_design_source_problem (source) == NULL
                        ? source : NULL);
  if (m == NULL)
    d->measured_analysis = LW_DESIGN_ANALYSIS_MODEL;
  lw_design_model_emit_changed (self);
}

void
lw_design_model_set_measured_analysis (LwDesignModel *self, gboolean on_data)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  LwDesignAnalysis a = on_data ? LW_DESIGN_ANALYSIS_DATA : LW_DESIGN_ANALYSIS_MODEL;
  if (self->doc->measured == NULL || self->doc->measured_analysis == a)
    return;
  self->doc->measured_analysis = a;
  lw_design_model_emit_changed (self);
}

gboolean
lw_design_model_judged_on_data (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  return self->doc->measured != NULL && self->doc->measured_analysis == LW_DESIGN_ANALYSIS_DATA;
}
