/* lw-family-loops.c — a plant family's drawn members again with another controller, their
 * sampled plants reused (the window's drag: lw-family.h, lw_family_loops_again).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>

#include "lw-family-private.h"

LwFamilyLoops *
lw_family_loops_again (const LwFamilyLoops *from, const LwDesign *d, size_t variant,
                       size_t n_points)
{
  g_return_val_if_fail (from != NULL && d != NULL && variant < d->n_variants, NULL);
  LwFamilyLoops *l = g_new0 (LwFamilyLoops, 1);
  l->n_members = from->n_members;
  l->worst_pm = G_MAXSIZE;
  l->plants_borrowed = TRUE;
  l->n = from->n;
  l->n_worst = from->n_worst;
  l->member = g_memdup2 (from->member, (from->n + 1) * sizeof *from->member);
  l->plant = g_memdup2 (from->plant, (from->n + 1) * sizeof *from->plant);
  l->ev = g_new0 (LwEvaluation *, from->n + 1);
  LwModel *cz = lw_family_variant_controller (d, variant, NULL);
  if (cz == NULL)
    return l;   /* no loop for anyone: the nominal's own evaluation says why */
  LwAnalysisOptions ao;
  lw_analysis_options_init (&ao);
  ao.compute_delay = d->compute_delay;
  ao.n_points = n_points > 0 ? MAX (n_points, 16) : LW_FAMILY_LOOPS_POINTS;
  ao.n_steps = LW_FAMILY_LOOPS_STEPS;
  double worst = INFINITY;
  for (size_t i = 0; i < l->n; i++)
    {
      LwError err;
      lw_error_clear (&err);
      if (l->plant[i] == NULL || lw_evaluate (l->plant[i], cz, &ao, &l->ev[i], &err) != LW_OK)
        {
          l->ev[i] = NULL;
          continue;
        }
      const LwMargins *m = &l->ev[i]->margins;
      if (m->has_phase_margin && m->phase_margin_deg < worst)
        {
          worst = m->phase_margin_deg;
          l->worst_pm = i;
        }
    }
  lw_model_free (cz);
  return l;
}

double
lw_family_loops_worst_pm_deg (const LwFamilyLoops *l)
{
  if (l == NULL || l->worst_pm >= l->n || l->ev[l->worst_pm] == NULL
      || !l->ev[l->worst_pm]->margins.has_phase_margin)
    return NAN;
  return l->ev[l->worst_pm]->margins.phase_margin_deg;
}
