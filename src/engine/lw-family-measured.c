/* lw-family-measured.c — a measured family: the margins of one controller over several
 * measured responses; see lw-family-measured.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include "lw-family-measured.h"
#include "lw-family.h"

gboolean
lw_measured_family_wanted (const LwDesign *d)
{
  return lw_design_n_measured (d) > 1;
}

const char *
lw_measured_family_figure_name (LwMeasuredFamilyFigure f)
{
  static const char *const names[] = { "phase margin", "gain margin", "sensitivity peak" };
  return (unsigned) f < G_N_ELEMENTS (names) ? names[f] : "";
}

const char *
lw_measured_family_figure_unit (LwMeasuredFamilyFigure f)
{
  static const char *const units[] = { "deg", "dB", "" };
  return (unsigned) f < G_N_ELEMENTS (units) ? units[f] : "";
}

/* Response i of d's measured family as (table, kind, count of unstable poles). */
static void
set_of (const LwDesign *d, size_t i, const LwMeasured **m, LwMeasuredKind *kind, int *poles)
{
  if (i == 0)
    {
      *m = d->measured;
      *kind = d->measured_kind;
      *poles = d->measured_unstable_poles;
      return;
    }
  const LwDesignMeasuredSet *s = &d->more_measured[i - 1];
  *m = s->data;
  *kind = s->kind;
  *poles = s->unstable_poles;
}

/* The figure f of a loop on the data; FALSE when the data hold no crossing for it. */
static gboolean
figure_of (const LwMeasuredLoop *l, LwMeasuredFamilyFigure f, double *value)
{
  const LwMeasuredMargins *m = &l->margins;
  switch (f)
    {
    case LW_MEASURED_FAMILY_PHASE_MARGIN:
      *value = m->phase_margin_deg;
      return m->n_gain > 0 && isfinite (*value);
    case LW_MEASURED_FAMILY_GAIN_MARGIN:
      *value = m->gain_margin_db;
      return m->n_phase > 0 && isfinite (*value);
    case LW_MEASURED_FAMILY_SENSITIVITY:
      *value = m->sensitivity_peak;
      return isfinite (*value);
    default:
      return FALSE;
    }
}

/* One response closed with e's loop, its figures and each requirement's verdict on it. */
static void
evaluate_set (const LwDesign *d, const LwVariantEval *e, size_t i, LwMeasuredFamilySet *s)
{
  const LwMeasured *m;
  int poles;
  set_of (d, i, &m, &s->kind, &poles);
  s->name = g_strdup (lw_design_measured_set_name (d, i));
  s->points = m->n;
  s->requirements = g_new0 (LwReqResult, d->n_requirements + 1);
  LwError err;
  lw_error_clear (&err);
  /* the loop on the data exactly as the engine closes the first response (close_on_data) */
  s->closed = lw_measured_loop_close (m, s->kind, e->period_s, e->dead_time_s, e->compute_delay,
                                      e->controller_z, e->sampled, poles, &s->loop, &err)
              == LW_OK;
  if (!s->closed)
    {
      memset (&s->loop, 0, sizeof s->loop);
      s->error = g_strdup (err.message[0] ? err.message : "the loop could not be closed");
    }
  gboolean has_model = e->ev != NULL;
  if (has_model && e->has_achieved)
    s->achieved = e->achieved;   /* the model's time-domain figures stay */
  else
    memset (&s->achieved, 0, sizeof s->achieved);
  if (has_model && !e->has_achieved)
    {
      /* no achieved figures from the model: nothing to judge on (as the engine does) */
      for (size_t r = 0; r < d->n_requirements; r++)
        s->requirements[r] = (LwReqResult) { LW_REQ_NOT_AVAILABLE, NAN, NAN, NULL };
      return;
    }
  if (has_model)
    {
      /* the model's stability, then the data's verdict (the model's figures may have been
       * replaced by the first response's in e->achieved: start from the model's loop) */
      s->achieved.stable = e->ev->stable;
    }
  lw_engine_achieved_on_data (&s->achieved, s->closed ? &s->loop : NULL, has_model);
  for (size_t r = 0; r < d->n_requirements; r++)
    s->requirements[r] = lw_requirement_evaluate (&d->requirements[r].req, &s->achieved);
}

LwMeasuredFamily *
lw_measured_family_evaluate (const LwDesign *d, const LwVariantEval *e, GError **error)
{
  g_return_val_if_fail (d != NULL && e != NULL, NULL);
  if (e->controller_z == NULL)
    {
      g_set_error (error, LW_ENGINE_ERROR, LW_ERR_INVALID, "the measured family needs the "
                   "variant's controller: %s",
                   e->error != NULL ? e->error->message : "it was not built");
      return NULL;
    }
  LwMeasuredFamily *f = g_new0 (LwMeasuredFamily, 1);
  f->n_sets = lw_design_n_measured (d);
  f->sets = g_new0 (LwMeasuredFamilySet, f->n_sets + 1);
  f->judged = lw_design_analysis_on_data (d);
  for (int k = 0; k < LW_MEASURED_FAMILY_N_FIGURES; k++)
    {
      f->worst[k] = G_MAXSIZE;
      f->worst_value[k] = NAN;
    }
  for (size_t i = 0; i < f->n_sets; i++)
    {
      LwMeasuredFamilySet *s = &f->sets[i];
      evaluate_set (d, e, i, s);
      if (!s->closed)
        {
          f->n_failed++;
          continue;
        }
      f->n_unstable += s->loop.stability.verdict == LW_MEASURED_UNSTABLE;
      f->n_undecided += s->loop.stability.verdict == LW_MEASURED_UNDECIDED;
      for (int k = 0; k < LW_MEASURED_FAMILY_N_FIGURES; k++)
        {
          double v;
          if (!figure_of (&s->loop, (LwMeasuredFamilyFigure) k, &v))
            continue;
          gboolean worse = k == LW_MEASURED_FAMILY_SENSITIVITY ? v > f->worst_value[k]
                                                               : v < f->worst_value[k];
          if (f->worst[k] == G_MAXSIZE || worse)
            {
              f->worst[k] = i;
              f->worst_value[k] = v;
            }
        }
    }
  f->n_requirements = d->n_requirements;
  f->judged_requirement = g_new0 (gboolean, d->n_requirements + 1);
  f->requirements = g_new0 (LwReqResult, d->n_requirements + 1);
  f->requirement_set = g_new0 (size_t, d->n_requirements + 1);
  for (size_t r = 0; r < d->n_requirements; r++)
    {
      f->requirement_set[r] = G_MAXSIZE;
      f->requirements[r] = (LwReqResult) { LW_REQ_NOT_AVAILABLE, NAN, NAN, NULL };
      f->judged_requirement[r] = lw_req_kind_from_frequency_response (d->requirements[r].req.kind);
      if (!f->judged_requirement[r])
        continue;
      for (size_t i = 0; i < f->n_sets; i++)
        {
          const LwReqResult *v = &f->sets[i].requirements[r];
          if (f->requirement_set[r] == G_MAXSIZE || lw_family_verdict_worse (v, &f->requirements[r]))
            {
              f->requirements[r] = *v;
              f->requirement_set[r] = i;
            }
        }
      if (f->judged && f->requirements[r].status != LW_REQ_PASS)
        f->n_not_passing++;
    }
  return f;
}

void
lw_measured_family_free (LwMeasuredFamily *f)
{
  if (f == NULL)
    return;
  for (size_t i = 0; i < f->n_sets; i++)
    {
      g_free (f->sets[i].name);
      g_free (f->sets[i].error);
      g_free (f->sets[i].requirements);
      if (f->sets[i].closed)
        lw_measured_loop_clear (&f->sets[i].loop);
    }
  g_free (f->sets);
  g_free (f->judged_requirement);
  g_free (f->requirements);
  g_free (f->requirement_set);
  g_free (f);
}
