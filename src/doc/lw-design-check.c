/* lw-design-check.c — the checks of a design before it is saved (lw_design_validate): every
 * rule the schema states and those it cannot, with the place named.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/types.h>
#include <unistd.h>

#include <glib/gstdio.h>

#include "lw-design-private.h"
#include "lw-file-write.h"
#include "lw-number.h"
#include "lw-expr.h"


/* ---- checks before saving ----------------------------------------------------------------- */

static gboolean
check_text (const char *what, const char *s, GError **error)
{
  if (s == NULL)
    return TRUE;
  const char *problem = lw_design_text_problem (s);
  if (problem != NULL)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "%s cannot be saved: %s",
                   what, problem);
      return FALSE;
    }
  return TRUE;
}

gboolean
lw_design_validate (const LwDesign *d, GError **error)
{
  g_return_val_if_fail (d != NULL, FALSE);
  if (d->title == NULL)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "the design has no title");
      return FALSE;
    }
  if (!check_text ("the title", d->title, error) || !check_text ("the author", d->author, error)
      || !check_text ("the notes", d->notes, error) || !check_text ("the plant", d->plant, error))
    return FALSE;
  const char *const unit_names[2] = { "the plant's input unit", "the plant's output unit" };
  const char *const units[2] = { d->input_unit, d->output_unit };
  for (int i = 0; i < 2; i++)
    if (units[i] != NULL && lw_design_unit_problem (units[i]) != NULL)
      {
        g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "%s '%s' cannot be saved: %s",
                     unit_names[i], units[i], lw_design_unit_problem (units[i]));
        return FALSE;
      }
  if (d->plant == NULL)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "the design has no plant");
      return FALSE;
    }
  if (!lw_design_has_model (d))
    {
      if (d->measured == NULL)
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "the design has neither a "
                       "plant model nor a measured response");
          return FALSE;
        }
    }
  char why[512];
  if (lw_design_params_problem (d, why, sizeof why) != NULL && d->n_params > 0)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "the plant's parameters: %s",
                   why);
      return FALSE;
    }
  if (lw_design_points_problem (d, why, sizeof why, NULL) != NULL)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "the operating points: %s",
                   why);
      return FALSE;
    }
  LwModel *m = NULL;
  LwError err;
  lw_error_clear (&err);
  if (lw_design_has_model (d) && lw_design_plant_parse (d, NULL, &m, &err) != LW_OK)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the plant '%s' is not a proper rational expression in s: %s (byte %d)",
                   d->plant, err.message, err.position);
      return FALSE;
    }
  lw_model_free (m);
  if (!lw_doc_rule_ok (LW_NUM_PERIOD, d->period_s))
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the sample period must be %s, got %g", lw_doc_rule_phrase (LW_NUM_PERIOD),
                   d->period_s);
      return FALSE;
    }
  if (!lw_doc_rule_ok (LW_NUM_NONNEGATIVE, d->dead_time_s))
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the dead time must be a finite number >= 0 s, got %g", d->dead_time_s);
      return FALSE;
    }
  if (!lw_dead_time_ok (d->dead_time_s, d->period_s))
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the dead time %g s is %.6g sample periods of %g s, more than the limit of "
                   "%.0f", d->dead_time_s, d->dead_time_s / d->period_s, d->period_s,
                   LW_DEAD_TIME_MAX_SAMPLES);
      return FALSE;
    }
  if (d->hold != LW_HOLD_ZERO_ORDER)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "unknown hold %d",
                   (int) d->hold);
      return FALSE;
    }
  if (d->compute_delay < 0 || d->compute_delay > LW_DESIGN_MAX_COMPUTE_DELAY)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the computation delay must be 0 to %d samples, got %d",
                   LW_DESIGN_MAX_COMPUTE_DELAY, d->compute_delay);
      return FALSE;
    }
  if (!lw_design_check_measured (d, error))
    return FALSE;
  if (d->n_requirements > LW_DESIGN_MAX_REQUIREMENTS)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_LIMIT,
                   "%zu requirements; at most %d", d->n_requirements,
                   LW_DESIGN_MAX_REQUIREMENTS);
      return FALSE;
    }
  for (size_t i = 0; i < d->n_requirements; i++)
    {
      const LwDesignRequirement *r = &d->requirements[i];
      if (lw_doc_req_kind (r->req.kind) == NULL)
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                       "requirement %zu has an unknown kind %d", i + 1, (int) r->req.kind);
          return FALSE;
        }
      if (!check_text ("a requirement name", r->name, error))
        return FALSE;
      if (lw_requirement_check (&r->req, &err) != LW_OK)
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "requirement '%s': %s",
                       lw_design_requirement_title (r), err.message);
          return FALSE;
        }
    }
  if (d->n_variants == 0 || d->n_variants > LW_DESIGN_MAX_VARIANTS)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "a design needs 1 to %d variants, it has %zu", LW_DESIGN_MAX_VARIANTS,
                   d->n_variants);
      return FALSE;
    }
  if (d->active >= d->n_variants)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the active variant %zu does not exist (%zu variants)", d->active,
                   d->n_variants);
      return FALSE;
    }
  for (size_t i = 0; i < d->n_variants; i++)
    {
      const LwDesignVariant *v = &d->variants[i];
      if (v->name == NULL || v->name[0] == '\0')
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                       "variant %zu has no name", i + 1);
          return FALSE;
        }
      if (!check_text ("a variant name", v->name, error)
          || !check_text ("the variant notes", v->notes, error))
        return FALSE;
      for (size_t j = 0; j < i; j++)
        if (strcmp (d->variants[j].name, v->name) == 0)
          {
            g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                         "two variants are named '%s'", v->name);
            return FALSE;
          }
      if (v->has_period && !lw_doc_rule_ok (LW_NUM_PERIOD, v->period_s))
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                       "variant '%s': the sample period must be %s, got %g", v->name,
                       lw_doc_rule_phrase (LW_NUM_PERIOD), v->period_s);
          return FALSE;
        }
      if (v->has_period && !lw_dead_time_ok (d->dead_time_s, v->period_s))
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                       "variant '%s': the dead time %g s is %.6g sample periods of %g s, more "
                       "than the limit of %.0f", v->name, d->dead_time_s,
                       d->dead_time_s / v->period_s, v->period_s, LW_DEAD_TIME_MAX_SAMPLES);
          return FALSE;
        }
      if (v->has_actuator
          && !(isfinite (v->u_low) && isfinite (v->u_high) && v->u_low < v->u_high
               && isfinite (v->reference_step) && v->reference_step >= 0.0))
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                       "variant '%s': the actuator limits must be finite with low < high (got "
                       "%g and %g), and the reference step finite and positive (got %g)",
                       v->name, v->u_low, v->u_high, v->reference_step);
          return FALSE;
        }
      if ((v->responses & ~LW_DESIGN_RESPONSES_ALL) != 0)
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                       "variant '%s': unknown responses to show (flags 0x%x)", v->name,
                       v->responses);
          return FALSE;
        }
      if (v->n_stages > LW_DESIGN_MAX_STAGES)
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_LIMIT,
                       "variant '%s' has %zu stages; at most %d", v->name, v->n_stages,
                       LW_DESIGN_MAX_STAGES);
          return FALSE;
        }
      for (size_t j = 0; j < v->n_stages; j++)
        {
          const LwStage *s = &v->stages[j];
          if (memchr (s->label, '\0', sizeof s->label) == NULL)
            {
              g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                           "stage %zu of variant '%s': the label is not terminated", j + 1,
                           v->name);
              return FALSE;
            }
          if (!check_text ("a stage label", s->label, error))
            return FALSE;
          if (lw_stage_kind_info (s->kind) == NULL || lw_stage_check (s, &err) != LW_OK)
            {
              g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                           "stage %zu of variant '%s': %s", j + 1, v->name,
                           lw_stage_kind_info (s->kind) == NULL ? "unknown kind"
                                                                : err.message);
              return FALSE;
            }
        }
    }
  if (d->has_range
      && !(lw_doc_rule_ok (LW_NUM_POSITIVE, d->range_from_rad_s)
           && lw_doc_rule_ok (LW_NUM_POSITIVE, d->range_to_rad_s)
           && d->range_from_rad_s < d->range_to_rad_s))
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the view range needs finite 0 < from < to rad/s, got %g to %g",
                   d->range_from_rad_s, d->range_to_rad_s);
      return FALSE;
    }
  for (size_t i = 0; d->views != NULL && d->views[i] != NULL; i++)
    {
      const char *problem = lw_design_view_name_problem (d->views[i]);
      if (problem != NULL)
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                       "the view name '%s' cannot be saved: %s", d->views[i], problem);
          return FALSE;
        }
      for (size_t j = 0; j < i; j++)
        if (strcmp (d->views[j], d->views[i]) == 0)
          {
            g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                         "the view '%s' is listed twice", d->views[i]);
            return FALSE;
          }
    }
  return TRUE;
}
