/* lw-family.c — a plant family evaluated: members, worst cases, the search for the worst
 * member of each margin, and the requirements judged on the worst (lw-family.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include "lw-family.h"
#include "lw-family-private.h"

#include "lw-analysis.h"
#include "lw-expr.h"
#include "lw-require.h"
#include "lw-stage.h"

/* At most this many compass moves per search (each tries 2k neighbours). */
#define SEARCH_MAX_MOVES 400

void
lw_family_options_init (LwFamilyOptions *o)
{
  memset (o, 0, sizeof *o);
  o->members = LW_FAMILY_DEFAULT_MEMBERS;
  o->seed = 1;
  o->search = TRUE;
}

void
lw_family_options_for (LwFamilyOptions *o, const LwDesign *d)
{
  lw_family_options_init (o);
  if (d != NULL && d->has_family_members)
    o->members = d->family_members;
  if (d != NULL && d->has_family_seed)
    o->seed = d->family_seed;
}

const char *
lw_family_figure_name (LwFamilyFigure f)
{
  static const char *const names[LW_FAMILY_N_FIGURES] = {
    "phase margin", "gain margin", "delay margin", "sensitivity peak", "overshoot",
    "settling time"
  };
  return (unsigned) f < LW_FAMILY_N_FIGURES ? names[f] : "?";
}

const char *
lw_family_figure_unit (LwFamilyFigure f)
{
  static const char *const units[LW_FAMILY_N_FIGURES] = { "deg", "dB", "s", "", "%", "s" };
  return (unsigned) f < LW_FAMILY_N_FIGURES ? units[f] : "";
}

gboolean
lw_family_worse (LwFamilyFigure f, double a, double b)
{
  switch (f)
    {
    case LW_FAMILY_PHASE_MARGIN:
    case LW_FAMILY_GAIN_MARGIN:
    case LW_FAMILY_DELAY_MARGIN:
      return a < b;
    case LW_FAMILY_SENSITIVITY:
    case LW_FAMILY_OVERSHOOT:
    case LW_FAMILY_SETTLING:
    case LW_FAMILY_N_FIGURES:
      break;
    }
  return a > b;
}

/* ---- one member ------------------------------------------------------------------------- */

typedef struct
{
  const LwDesign *d;
  double period_s;
  const LwModel *controller_z;
  size_t n_points;
  size_t n_ranged;
  size_t ranged[LW_DESIGN_MAX_PARAMS];   /* indices of the ranged parameters */
} Ctx;

/* A member evaluated, with what the requirements need (kept beside the public record). */
typedef struct
{
  LwFamilyMember m;
  gboolean has_achieved;
  LwAchieved achieved;
} Member;

static void
member_fail (Member *mb, const char *what, const LwError *err)
{
  mb->m.evaluated = FALSE;
  mb->m.error = g_strdup_printf ("%s: %s", what, err->message[0] ? err->message : "failed");
}

/* A member's plant in s and sampled (with the dead time at its parameter values); the step
 * that failed is named in *what. */
static LwStatus
member_plant (const LwDesign *d, double period_s, const double *values, LwModel **plant,
              LwSampledPlant **sp, const char **what, LwError *err)
{
  *plant = NULL;
  *sp = NULL;
  *what = "the plant";
  if (lw_design_plant_parse (d, values, plant, err) != LW_OK)
    return err->code;
  *what = "the sampled plant";
  if (lw_sampled_plant_new (*plant, lw_design_dead_time_at (d, values), period_s, sp, err)
      != LW_OK)
    {
      g_clear_pointer (plant, lw_model_free);
      return err->code;
    }
  return LW_OK;
}

/* Evaluates one member as lw_engine_evaluate_variant evaluates a plant (the same grid, the
 * same step horizon rule), linear: the actuator limits of the variant are not simulated. */
static void
evaluate_member (const Ctx *c, Member *mb)
{
  LwModel *plant = NULL;
  LwSampledPlant *sp = NULL;
  LwEvaluation *ev = NULL;
  LwError err;
  const char *what;
  lw_error_clear (&err);
  if (member_plant (c->d, c->period_s, mb->m.values, &plant, &sp, &what, &err) != LW_OK)
    {
      member_fail (mb, what, &err);
      return;
    }
  LwAnalysisOptions ao;
  lw_analysis_options_init (&ao);
  ao.compute_delay = c->d->compute_delay;
  if (c->n_points > 0)
    ao.n_points = c->n_points;
  if (lw_evaluate (sp, c->controller_z, &ao, &ev, &err) == LW_OK && ev->stable
      && !ev->step.has_settling)
    {
      size_t want = lw_engine_step_horizon (ev);
      if (want > ao.n_steps)
        {
          ao.n_steps = want;
          g_clear_pointer (&ev, lw_evaluation_free);
          lw_error_clear (&err);
          lw_evaluate (sp, c->controller_z, &ao, &ev, &err);
        }
    }
  if (ev == NULL)
    {
      member_fail (mb, "the loop", &err);
      lw_sampled_plant_free (sp);
      lw_model_free (plant);
      return;
    }
  LwFamilyMember *m = &mb->m;
  const LwMargins *g = &ev->margins;
  m->evaluated = TRUE;
  m->stable = ev->stable;
  m->has[LW_FAMILY_PHASE_MARGIN] = g->has_phase_margin;
  m->figure[LW_FAMILY_PHASE_MARGIN] = g->phase_margin_deg;
  m->has[LW_FAMILY_GAIN_MARGIN] = g->has_gain_margin;
  m->figure[LW_FAMILY_GAIN_MARGIN] = g->gain_margin_db;
  m->has[LW_FAMILY_DELAY_MARGIN] = g->has_delay_margin;
  m->figure[LW_FAMILY_DELAY_MARGIN] = g->delay_margin_s;
  m->has[LW_FAMILY_SENSITIVITY] = g->has_sensitivity;
  m->figure[LW_FAMILY_SENSITIVITY] = g->sensitivity_peak;
  m->has[LW_FAMILY_OVERSHOOT] = ev->step.has_overshoot;
  m->figure[LW_FAMILY_OVERSHOOT] = ev->step.overshoot_pct;
  m->has[LW_FAMILY_SETTLING] = ev->step.has_settling;
  m->figure[LW_FAMILY_SETTLING] = ev->step.settling_time_s;
  m->has_crossover = g->has_phase_margin;
  m->crossover_rad_s = g->has_phase_margin ? g->gain_crossover_rad_s : NAN;
  lw_error_clear (&err);
  mb->has_achieved = lw_achieved_from_evaluation (ev, plant, &mb->achieved, &err) == LW_OK;
  lw_evaluation_free (ev);
  lw_sampled_plant_free (sp);
  lw_model_free (plant);
}

/* ---- members evaluated in worker threads ------------------------------------------------ */

typedef struct
{
  const Ctx *c;
  Member **todo;
  size_t n;
  gint next;
} Work;

static gpointer
worker (gpointer data)
{
  Work *w = data;
  for (;;)
    {
      gint i = g_atomic_int_add (&w->next, 1);
      if (i < 0 || (size_t) i >= w->n)
        break;
      evaluate_member (w->c, w->todo[i]);
    }
  return NULL;
}

static void
evaluate_all (const Ctx *c, Member **todo, size_t n, guint threads)
{
  Work w = { .c = c, .todo = todo, .n = n, .next = 0 };
  guint extra = threads > 1 ? MIN (threads, (guint) n) - 1 : 0;
  GThread *t[64];
  extra = MIN (extra, (guint) G_N_ELEMENTS (t));
  for (guint i = 0; i < extra; i++)
    t[i] = g_thread_new ("lw-family", worker, &w);
  worker (&w);
  for (guint i = 0; i < extra; i++)
    g_thread_join (t[i]);
}

/* ---- the family ------------------------------------------------------------------------- */

static Member *
member_new (const LwDesign *d, LwFamilyOrigin origin)
{
  Member *mb = g_new0 (Member, 1);
  mb->m.origin = origin;
  mb->m.values = g_new (double, MAX (d->n_params, 1));
  for (size_t i = 0; i < d->n_params; i++)
    mb->m.values[i] = d->params[i].nominal;
  return mb;
}

static void
member_free (gpointer data)
{
  Member *mb = data;
  g_free (mb->m.values);
  g_free (mb->m.error);
  g_free (mb->m.point);
  g_free (mb);
}

/* The value of ranged parameter p at x in [0, 1] of its range (in log for a log spread). */
static double
at_fraction (const LwDesignParam *p, double x)
{
  if (x <= 0.0)
    return p->low;
  if (x >= 1.0)
    return p->high;
  if (p->spread == LW_SPREAD_LOG)
    return exp (log (p->low) + x * (log (p->high) - log (p->low)));
  return p->low + x * (p->high - p->low);
}

static double
fraction_of (const LwDesignParam *p, double v)
{
  if (p->spread == LW_SPREAD_LOG)
    return (log (v) - log (p->low)) / (log (p->high) - log (p->low));
  return (v - p->low) / (p->high - p->low);
}

/* The operating points of d as members (origin LW_FAMILY_POINT, named), appended to ms. */
static void
add_points (const LwDesign *d, GPtrArray *ms)
{
  for (size_t i = 0; i < d->n_points; i++)
    {
      Member *mb = member_new (d, LW_FAMILY_POINT);
      lw_design_point_values (d, i, mb->m.values);
      mb->m.point = g_strdup (d->points[i].name);
      g_ptr_array_add (ms, mb);
    }
}

gboolean
lw_family_wanted (const LwDesign *d)
{
  for (size_t i = 0; d != NULL && i < d->n_params; i++)
    if (d->params[i].ranged)
      return TRUE;
  return d != NULL && d->n_points > 0;
}

/* The worst evaluated member of figure f among n, or G_MAXSIZE; with in_box, operating points
 * are left out (a search starts in the ranges). */
static size_t
worst_among (Member *const *ms, size_t n, LwFamilyFigure f, gboolean in_box)
{
  size_t w = G_MAXSIZE;
  for (size_t i = 0; i < n; i++)
    {
      const LwFamilyMember *m = &ms[i]->m;
      if (in_box && m->origin == LW_FAMILY_POINT)
        continue;
      if (!m->evaluated || !m->has[f] || isnan (m->figure[f]))
        continue;
      if (w == G_MAXSIZE || lw_family_worse (f, m->figure[f], ms[w]->m.figure[f]))
        w = i;
    }
  return w;
}

static size_t
worst_of (Member *const *ms, size_t n, LwFamilyFigure f)
{
  return worst_among (ms, n, f, FALSE);
}

/* A compass search for the worst member of figure f from `start`: all 2k neighbours at the
 * step h are evaluated (in the worker threads), the worst taken when it is worse than the
 * point; else h is halved, down to LW_FAMILY_SEARCH_STEP. Returns the final point (a new
 * member, origin SEARCH) or NULL when no neighbour was ever worse. */
static Member *
search_worst (const Ctx *c, const Member *start, LwFamilyFigure f, guint threads)
{
  const LwDesign *d = c->d;
  size_t k = c->n_ranged;
  double x[LW_DESIGN_MAX_PARAMS];
  for (size_t j = 0; j < k; j++)
    x[j] = CLAMP (fraction_of (&d->params[c->ranged[j]], start->m.values[c->ranged[j]]), 0.0,
                  1.0);
  Member *best = NULL;
  double value = start->m.figure[f];
  Member *cand[2 * LW_DESIGN_MAX_PARAMS];
  int moves = 0;
  for (double h = 0.25; h >= LW_FAMILY_SEARCH_STEP && moves < SEARCH_MAX_MOVES;)
    {
      size_t nc = 0;
      for (size_t j = 0; j < k; j++)
        for (int s = -1; s <= 1; s += 2)
          {
            double xj = CLAMP (x[j] + s * h, 0.0, 1.0);
            if (xj == x[j])
              continue;
            Member *mb = member_new (d, LW_FAMILY_SEARCH);
            const Member *from = best != NULL ? best : start;
            memcpy (mb->m.values, from->m.values, d->n_params * sizeof (double));
            mb->m.values[c->ranged[j]] = at_fraction (&d->params[c->ranged[j]], xj);
            cand[nc++] = mb;
          }
      evaluate_all (c, cand, nc, threads);
      size_t w = worst_of (cand, nc, f);
      gboolean moved = w != G_MAXSIZE && lw_family_worse (f, cand[w]->m.figure[f], value);
      if (moved)
        {
          if (best != NULL)
            member_free (best);
          best = cand[w];
          cand[w] = NULL;
          value = best->m.figure[f];
          for (size_t j = 0; j < k; j++)
            x[j] = CLAMP (fraction_of (&d->params[c->ranged[j]], best->m.values[c->ranged[j]]),
                          0.0, 1.0);
          moves++;
        }
      else
        h /= 2.0;
      for (size_t i = 0; i < nc; i++)
        if (cand[i] != NULL)
          member_free (cand[i]);
    }
  return best;
}

/* A requirement's verdict on one member: an unstable loop fails it. */
static LwReqResult
judge_member (const LwRequirement *r, const Member *mb)
{
  if (!mb->m.evaluated || !mb->has_achieved)
    {
      LwReqResult o = { LW_REQ_NOT_AVAILABLE, NAN, NAN, "the member could not be evaluated" };
      return o;
    }
  return lw_requirement_evaluate (r, &mb->achieved);
}

/* a is a worse verdict than b: fail < not available < pass, then the smaller slack */
gboolean
lw_family_verdict_worse (const LwReqResult *a, const LwReqResult *b)
{
  static const int rank[] = { [LW_REQ_PASS] = 2, [LW_REQ_FAIL] = 0, [LW_REQ_NOT_AVAILABLE] = 1 };
  if (rank[a->status] != rank[b->status])
    return rank[a->status] < rank[b->status];
  return isfinite (a->slack) && (!isfinite (b->slack) || a->slack < b->slack);
}

LwModel *
lw_family_variant_controller (const LwDesign *d, size_t variant, GError **error)
{
  const LwDesignVariant *v = &d->variants[variant];
  LwModel *cz = NULL;
  LwError err;
  lw_error_clear (&err);
  if (lw_compensator_z (v->stages, v->n_stages, lw_design_variant_period_s (d, variant), &cz,
                        &err) == LW_OK)
    return cz;
  g_set_error (error, LW_ENGINE_ERROR, err.code, "variant '%s': %s", v->name, err.message);
  return NULL;
}

LwFamily *
lw_family_evaluate (const LwDesign *d, size_t variant, const LwFamilyOptions *o, GError **error)
{
  g_return_val_if_fail (d != NULL && variant < d->n_variants, NULL);
  double period_s = lw_design_variant_period_s (d, variant);
  LwModel *cz = lw_family_variant_controller (d, variant, error);
  if (cz == NULL)
    return NULL;
  LwFamily *f = lw_family_evaluate_controller (d, period_s, cz, o, error);
  lw_model_free (cz);
  return f;
}

LwFamily *
lw_family_evaluate_controller (const LwDesign *d, double period_s, const LwModel *cz,
                               const LwFamilyOptions *o, GError **error)
{
  g_return_val_if_fail (d != NULL && cz != NULL, NULL);
  LwFamilyOptions defaults;
  if (o == NULL)
    {
      lw_family_options_for (&defaults, d);
      o = &defaults;
    }
  if (o->members > LW_FAMILY_MAX_MEMBERS || (o->n_points != 0 && o->n_points < 16))
    {
      g_set_error (error, LW_ENGINE_ERROR, LW_ERR_INVALID, "a family of %zu members (at most "
                   "%d) or %zu points (at least 16) is out of range", o->members,
                   LW_FAMILY_MAX_MEMBERS, o->n_points);
      return NULL;
    }
  if (!lw_design_has_model (d))
    {
      g_set_error (error, LW_ENGINE_ERROR, LW_ERR_INVALID, "a plant family needs a plant model");
      return NULL;
    }
  Ctx c = { .d = d, .period_s = period_s, .n_points = o->n_points, .controller_z = cz };
  for (size_t i = 0; i < d->n_params; i++)
    if (d->params[i].ranged)
      c.ranged[c.n_ranged++] = i;
  guint threads = o->threads > 0 ? o->threads : MAX (g_get_num_processors (), 1);

  /* nominal, operating points, corners, sample */
  GPtrArray *ms = g_ptr_array_new_with_free_func (member_free);
  g_ptr_array_add (ms, member_new (d, LW_FAMILY_NOMINAL));
  add_points (d, ms);
  size_t n_corners = 0;
  if (c.n_ranged > 0 && c.n_ranged <= LW_DESIGN_MAX_CORNER_PARAMS)
    {
      n_corners = (size_t) 1 << c.n_ranged;
      for (size_t k = 0; k < n_corners; k++)
        {
          Member *mb = member_new (d, LW_FAMILY_CORNER);
          for (size_t b = 0; b < c.n_ranged; b++)
            {
              const LwDesignParam *p = &d->params[c.ranged[b]];
              mb->m.values[c.ranged[b]] = (k >> b) & 1 ? p->high : p->low;
            }
          g_ptr_array_add (ms, mb);
        }
    }
  if (c.n_ranged > 0)
    {
      GRand *rng = g_rand_new_with_seed_array ((const guint32[]) { (guint32) o->seed,
                                                                   (guint32) (o->seed >> 32) },
                                               2);
      for (size_t k = 0; k < o->members; k++)
        {
          Member *mb = member_new (d, LW_FAMILY_SAMPLE);
          for (size_t b = 0; b < c.n_ranged; b++)
            mb->m.values[c.ranged[b]] = at_fraction (&d->params[c.ranged[b]],
                                                     g_rand_double (rng));
          g_ptr_array_add (ms, mb);
        }
      g_rand_free (rng);
    }
  evaluate_all (&c, (Member **) ms->pdata, ms->len, threads);
  Member *nominal = ms->pdata[0];
  if (!nominal->m.evaluated)
    {
      g_set_error (error, LW_ENGINE_ERROR, LW_ERR_INVALID, "the nominal plant: %s",
                   nominal->m.error);
      g_ptr_array_unref (ms);
      return NULL;
    }

  /* the search for the worst of each margin, from the worst found so far */
  if (o->search && c.n_ranged > 0)
    {
      const LwFamilyFigure searched[] = { LW_FAMILY_PHASE_MARGIN, LW_FAMILY_GAIN_MARGIN,
                                          LW_FAMILY_SENSITIVITY };
      for (size_t s = 0; s < G_N_ELEMENTS (searched); s++)
        {
          size_t w = worst_among ((Member **) ms->pdata, ms->len, searched[s], TRUE);
          if (w == G_MAXSIZE)
            continue;
          Member *found = search_worst (&c, ms->pdata[w], searched[s], threads);
          if (found != NULL)
            g_ptr_array_add (ms, found);
        }
    }

  /* the result */
  LwFamily *f = g_new0 (LwFamily, 1);
  f->n_params = d->n_params;
  f->names = g_new0 (char *, d->n_params + 1);
  for (size_t i = 0; i < d->n_params; i++)
    f->names[i] = g_strdup (d->params[i].name);
  f->n_points = d->n_points;
  f->n_corners = n_corners;
  f->n_members = ms->len;
  f->members = g_new0 (LwFamilyMember, ms->len);
  f->crossover_min_rad_s = f->crossover_max_rad_s = NAN;
  for (size_t i = 0; i < ms->len; i++)
    {
      const LwFamilyMember *m = &((Member *) ms->pdata[i])->m;
      if (!m->evaluated)
        f->n_failed++;
      else if (!m->stable)
        f->n_unstable++;
      if (m->evaluated && m->has_crossover)
        {
          f->crossover_min_rad_s = isnan (f->crossover_min_rad_s)
                                     ? m->crossover_rad_s
                                     : fmin (f->crossover_min_rad_s, m->crossover_rad_s);
          f->crossover_max_rad_s = isnan (f->crossover_max_rad_s)
                                     ? m->crossover_rad_s
                                     : fmax (f->crossover_max_rad_s, m->crossover_rad_s);
        }
    }
  for (int k = 0; k < LW_FAMILY_N_FIGURES; k++)
    f->worst[k] = worst_of ((Member **) ms->pdata, ms->len, (LwFamilyFigure) k);
  f->n_requirements = d->n_requirements;
  f->requirements = g_new0 (LwReqResult, d->n_requirements + 1);
  f->requirement_member = g_new0 (size_t, d->n_requirements + 1);
  for (size_t r = 0; r < d->n_requirements; r++)
    {
      f->requirement_member[r] = G_MAXSIZE;
      for (size_t i = 0; i < ms->len; i++)
        {
          LwReqResult v1 = judge_member (&d->requirements[r].req, ms->pdata[i]);
          if (f->requirement_member[r] == G_MAXSIZE || lw_family_verdict_worse (&v1, &f->requirements[r]))
            {
              f->requirements[r] = v1;
              f->requirement_member[r] = i;
            }
        }
      if (f->requirements[r].status != LW_REQ_PASS)
        f->n_not_passing++;
    }
  /* the members move into the result (their arrays are taken) */
  for (size_t i = 0; i < ms->len; i++)
    {
      Member *mb = ms->pdata[i];
      f->members[i] = mb->m;
      mb->m.values = NULL;
      mb->m.error = NULL;
      mb->m.point = NULL;
    }
  g_ptr_array_unref (ms);
  return f;
}

/* ---- members' loops for figures --------------------------------------------------------- */

LwFamilyLoops *
lw_family_loops (const LwDesign *d, size_t variant, const LwFamily *f, size_t max_others,
                 size_t n_points)
{
  g_return_val_if_fail (d != NULL && variant < d->n_variants && f != NULL, NULL);
  double period_s = lw_design_variant_period_s (d, variant);
  LwModel *cz = lw_family_variant_controller (d, variant, NULL);
  if (cz == NULL)
    return g_new0 (LwFamilyLoops, 1);   /* the family itself could not have been evaluated */
  LwFamilyLoops *l = lw_family_loops_controller (d, period_s, cz, f, max_others, n_points);
  lw_model_free (cz);
  return l;
}

LwFamilyLoops *
lw_family_loops_controller (const LwDesign *d, double period_s, const LwModel *cz,
                            const LwFamily *f, size_t max_others, size_t n_points)
{
  g_return_val_if_fail (d != NULL && cz != NULL && f != NULL, NULL);
  LwFamilyLoops *l = g_new0 (LwFamilyLoops, 1);
  l->n_members = f->n_members;
  l->worst_pm = G_MAXSIZE;
  /* the worst of each figure, each once, then others evenly over the rest */
  gboolean *taken = g_new0 (gboolean, f->n_members + 1);
  size_t *pick = g_new (size_t, LW_FAMILY_N_FIGURES + max_others + 1);
  size_t n = 0;
  taken[0] = TRUE;   /* the nominal: the variant's own curve */
  for (int k = 0; k < LW_FAMILY_N_FIGURES; k++)
    {
      size_t w = f->worst[k];
      if (w == G_MAXSIZE || w >= f->n_members)
        continue;
      if (!taken[w])
        {
          taken[w] = TRUE;
          pick[n++] = w;
        }
      if (k == LW_FAMILY_PHASE_MARGIN)
        for (size_t i = 0; i < n; i++)
          if (pick[i] == w)
            l->worst_pm = i;
    }
  l->n_worst = n;
  /* the operating points, each (named machines), as far as max_others goes */
  for (size_t i = 1; i <= f->n_points && i < f->n_members && max_others > 0; i++)
    if (!taken[i])
      {
        taken[i] = TRUE;
        pick[n++] = i;
        max_others--;
      }
  size_t rest = 0;
  for (size_t i = 0; i < f->n_members; i++)
    rest += !taken[i];
  size_t want = MIN (rest, max_others);
  for (size_t j = 0, seen = 0; j < f->n_members && want > 0; j++)
    {
      if (taken[j])
        continue;
      /* the j-th free member is taken when it is the next of `want` evenly spaced ones */
      if (seen * want / rest != (seen + 1) * want / rest || rest == want)
        pick[n++] = j;
      seen++;
    }
  g_free (taken);
  l->n = n;
  l->member = pick;
  l->plant = g_new0 (LwSampledPlant *, n + 1);
  l->ev = g_new0 (LwEvaluation *, n + 1);
  LwAnalysisOptions ao;
  lw_analysis_options_init (&ao);
  ao.compute_delay = d->compute_delay;
  ao.n_points = n_points > 0 ? MAX (n_points, 16) : LW_FAMILY_LOOPS_POINTS;
  ao.n_steps = LW_FAMILY_LOOPS_STEPS;
  for (size_t i = 0; i < n; i++)
    {
      const LwFamilyMember *m = &f->members[pick[i]];
      LwModel *plant = NULL;
      const char *what;
      LwError err;
      lw_error_clear (&err);
      if (!m->evaluated
          || member_plant (d, period_s, m->values, &plant, &l->plant[i], &what, &err) != LW_OK)
        continue;
      lw_model_free (plant);
      if (lw_evaluate (l->plant[i], cz, &ao, &l->ev[i], &err) != LW_OK)
        l->ev[i] = NULL;
    }
  return l;
}

void
lw_family_loops_free (LwFamilyLoops *l)
{
  if (l == NULL)
    return;
  for (size_t i = 0; i < l->n; i++)
    {
      if (!l->plants_borrowed)
        lw_sampled_plant_free (l->plant[i]);
      if (l->ev[i] != NULL)
        lw_evaluation_free (l->ev[i]);
    }
  g_free (l->member);
  g_free (l->plant);
  g_free (l->ev);
  g_free (l);
}

void
lw_family_free (LwFamily *f)
{
  if (f == NULL)
    return;
  for (size_t i = 0; i < f->n_members; i++)
    {
      g_free (f->members[i].values);
      g_free (f->members[i].error);
      g_free (f->members[i].point);
    }
  g_free (f->members);
  g_strfreev (f->names);
  g_free (f->requirements);
  g_free (f->requirement_member);
  g_free (f);
}
