/* fuzz-eval.c — libFuzzer target for the evaluation of a design (build-aux/fuzz).
 *
 * The input is a design document. When it loads, every variant is evaluated by the engine
 * (lw-engine.h) as the CLI and the window evaluate it: plant, sampling, compensator, loop,
 * reference step, achieved figures, verdicts. An evaluation either fails with a message and
 * the part of the design it failed in, or gives figures that keep the promises of
 * docs/conventions.md: crossover lists in ascending order within (0, π/T], phase margins in
 * (−180, 180], no NaN margin, a sensitivity peak that is a number >= 0, a stable loop's
 * simulated step finite. Anything else — a crash, a sanitizer report, an evaluation beyond
 * the fuzzer's time or memory limit — stops the fuzzer.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <math.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>

#include <glib.h>

#include "lw-design.h"
#include "lw-engine.h"
#include "lw-family.h"
#include "lw-family-measured.h"

int LLVMFuzzerTestOneInput (const uint8_t *data, size_t size);

static void
bad (const char *what, double a, double b)
{
  fprintf (stderr, "fuzz-eval: %s (%.17g, %.17g)\n", what, a, b);
  abort ();
}

static void
check_list (const double *w, size_t n, double nyquist)
{
  for (size_t i = 0; i < n; i++)
    {
      if (!(w[i] > 0.0) || !(w[i] <= nyquist * (1.0 + 1e-12)))
        bad ("crossover outside (0, pi/T]", w[i], nyquist);
      if (i > 0 && !(w[i] >= w[i - 1]))
        bad ("crossovers not in ascending order", w[i - 1], w[i]);
    }
}

static void
check_eval (const LwVariantEval *e)
{
  if (e->failure != LW_EVAL_OK)
    {
      if (e->error == NULL || e->error->message[0] == '\0' || e->ev != NULL)
        bad ("a failure without its message, or with an evaluation", e->failure, 0);
      return;
    }
  const LwEvaluation *ev = e->ev;
  if (ev == NULL)
    bad ("no evaluation and no failure", 0, 0);
  const LwMargins *m = &ev->margins;
  double nyquist = G_PI / ev->period_s;
  check_list (m->gain_crossovers_rad_s, m->n_gain_crossovers, nyquist);
  check_list (m->phase_crossovers_rad_s, m->n_phase_crossovers, nyquist);
  for (size_t i = 0; i < m->n_gain_crossovers; i++)
    if (!(m->phase_margins_deg[i] > -180.0 - 1e-9 && m->phase_margins_deg[i] <= 180.0 + 1e-9))
      bad ("phase margin outside (-180, 180]", m->phase_margins_deg[i], 0);
  for (size_t i = 0; i < m->n_phase_crossovers; i++)
    if (isnan (m->gain_margins_db[i]))
      bad ("gain margin NaN", 0, 0);
  if (m->has_phase_margin && !isfinite (m->phase_margin_deg))
    bad ("governing phase margin not finite", m->phase_margin_deg, 0);
  if (m->has_sensitivity && !(m->sensitivity_peak >= 0.0))
    bad ("sensitivity peak negative or NaN", m->sensitivity_peak, 0);
  /* a stable loop's step stays finite; an unstable one may grow past the double range within
   * the simulated samples (its indices are then not available: null in JSON) */
  if (e->has_sim && ev->stable)
    for (size_t k = 0; k < e->sim_ref->n; k++)
      if (!isfinite (e->sim_ref->y[k]))
        bad ("a stable loop's simulated step not finite", (double) k, e->sim_ref->y[k]);
}

/* A design with ranged parameters or operating points: a small family (the nominal, the
 * points, the corners, 3 drawn, the search on) evaluates without a crash, its worst figures
 * are figures of its members, and the nominal is its first member; the loops drawn for its
 * figures are made, and again with the variant's controller from their plants (the window's
 * drag). */
static void
check_family (const LwDesign *d)
{
  if (!lw_family_wanted (d) || !lw_design_has_model (d))
    return;
  LwFamilyOptions o;
  lw_family_options_init (&o);
  o.members = 3;
  o.threads = 1;
  o.n_points = 200;
  GError *error = NULL;
  LwFamily *f = lw_family_evaluate (d, d->active, &o, &error);
  if (f == NULL)
    {
      if (error == NULL || error->message[0] == '\0')
        bad ("a family refused without a message", 0, 0);
      g_clear_error (&error);
      return;
    }
  if (f->n_members < 1 || f->members[0].origin != LW_FAMILY_NOMINAL)
    bad ("the nominal is not the family's first member", (double) f->n_members, 0);
  for (int k = 0; k < LW_FAMILY_N_FIGURES; k++)
    {
      size_t w = f->worst[k];
      if (w == G_MAXSIZE)
        continue;
      if (w >= f->n_members || !f->members[w].evaluated || !f->members[w].has[k])
        bad ("a worst figure from no evaluated member", (double) w, k);
      for (size_t i = 0; i < f->n_members; i++)
        if (f->members[i].evaluated && f->members[i].has[k]
            && lw_family_worse ((LwFamilyFigure) k, f->members[i].figure[k],
                                f->members[w].figure[k]))
          bad ("a member worse than the worst", f->members[i].figure[k],
               f->members[w].figure[k]);
    }
  LwFamilyLoops *l = lw_family_loops (d, d->active, f, 4, 64);
  LwFamilyLoops *again = lw_family_loops_again (l, d, d->active, 32);
  if (again->n != l->n || again->n_worst > again->n)
    bad ("the drag's loops are not the drawn members", (double) again->n, (double) l->n);
  lw_family_loops_free (again);
  lw_family_loops_free (l);
  lw_family_free (f);
}

/* A design holding several measured responses: each closed with the variant's loop, the
 * worst figures those of a response. */
static void
check_measured_family (const LwDesign *d, const LwVariantEval *e)
{
  if (!lw_measured_family_wanted (d))
    return;
  GError *error = NULL;
  LwMeasuredFamily *f = lw_measured_family_evaluate (d, e, &error);
  if (f == NULL)
    {
      if (error == NULL || error->message[0] == '\0')
        bad ("a measured family refused without a message", 0, 0);
      g_clear_error (&error);
      return;
    }
  for (int k = 0; k < LW_MEASURED_FAMILY_N_FIGURES; k++)
    if (f->worst[k] != G_MAXSIZE && f->worst[k] >= f->n_sets)
      bad ("a measured family's worst from no response", (double) f->worst[k], k);
  lw_measured_family_free (f);
}

int
LLVMFuzzerTestOneInput (const uint8_t *data, size_t size)
{
  if (size > 65536)
    return 0;
  GError *error = NULL;
  LwDesign *d = lw_design_load_data ((const char *) data, size, "fuzz.lwd", &error);
  if (d == NULL)
    {
      g_clear_error (&error);
      return 0;
    }
  LwPlantCache *cache = lw_plant_cache_new ();
  for (size_t i = 0; i < d->n_variants && i < 4; i++)
    {
      LwVariantEval *e = lw_engine_evaluate_variant (d, i, NULL, cache);
      check_eval (e);
      if (i == d->active)
        check_measured_family (d, e);
      lw_variant_eval_unref (e);
    }
  lw_plant_cache_unref (cache);
  check_family (d);
  lw_design_free (d);
  return 0;
}
