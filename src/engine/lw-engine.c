/* lw-engine.c — the one evaluation of a design variant; see lw-engine.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <complex.h>
#include <math.h>
#include <string.h>

#include "lw-engine.h"
#include "lw-expr.h"
#include "lw-stage.h"

G_DEFINE_QUARK (lw-engine-error-quark, lw_engine_error)

/* ---- the sampled-plant cache ------------------------------------------------------------ */

/* At most this many sampled plants (periods) are kept for one plant and dead time. */
#define CACHE_MAX_ENTRIES 8

/* A sampled plant shared by the cache and the evaluations made with it. */
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
  g_atomic_rc_box_release_full (s, shared_plant_clear);
}

typedef struct
{
  double period_s;
  SharedPlant *shared;
  guint64 used;                 /* for dropping the least recently used */
} CacheEntry;

struct _LwPlantCache
{
  gatomicrefcount ref;
  GMutex lock;
  char *plant_text;             /* the plant and dead time the entries are for */
  double dead_time_s;
  GArray *entries;              /* of CacheEntry */
  guint64 clock;
};

static void
cache_entry_clear (gpointer data)
{
  CacheEntry *e = data;
  g_clear_pointer (&e->shared, shared_plant_release);
}

LwPlantCache *
lw_plant_cache_new (void)
{
  LwPlantCache *c = g_new0 (LwPlantCache, 1);
  g_atomic_ref_count_init (&c->ref);
  g_mutex_init (&c->lock);
  c->entries = g_array_new (FALSE, FALSE, sizeof (CacheEntry));
  g_array_set_clear_func (c->entries, cache_entry_clear);
  return c;
}

LwPlantCache *
lw_plant_cache_ref (LwPlantCache *cache)
{
  g_return_val_if_fail (cache != NULL, NULL);
  g_atomic_ref_count_inc (&cache->ref);
  return cache;
}

void
lw_plant_cache_unref (LwPlantCache *cache)
{
  if (cache == NULL || !g_atomic_ref_count_dec (&cache->ref))
    return;
  g_array_unref (cache->entries);
  g_free (cache->plant_text);
  g_mutex_clear (&cache->lock);
  g_free (cache);
}

/* A new reference to the shared sampled plant of (plant_text, dead time, period): from the
 * cache when there, else built (outside the lock: sampling a large plant takes a while) and
 * kept. NULL with err set on failure. */
static SharedPlant *
cache_lookup (LwPlantCache *c, const char *plant_text, const LwModel *plant_s,
              double dead_time_s, double period_s, LwError *err)
{
  if (c != NULL)
    {
      g_mutex_lock (&c->lock);
      if (g_strcmp0 (c->plant_text, plant_text) == 0 && c->dead_time_s == dead_time_s)
        for (guint k = 0; k < c->entries->len; k++)
          {
            CacheEntry *e = &g_array_index (c->entries, CacheEntry, k);
            if (e->period_s == period_s)
              {
                e->used = ++c->clock;
                SharedPlant *s = g_atomic_rc_box_acquire (e->shared);
                g_mutex_unlock (&c->lock);
                return s;
              }
          }
      g_mutex_unlock (&c->lock);
    }

  LwSampledPlant *plant = NULL;
  if (lw_sampled_plant_new (plant_s, dead_time_s, period_s, &plant, err) != LW_OK)
    return NULL;
  SharedPlant *s = g_atomic_rc_box_new0 (SharedPlant);
  s->plant = plant;
  if (c == NULL)
    return s;

  g_mutex_lock (&c->lock);
  if (g_strcmp0 (c->plant_text, plant_text) != 0 || c->dead_time_s != dead_time_s)
    {
      /* another plant: the old entries' evaluations are stale */
      g_array_set_size (c->entries, 0);
      g_free (c->plant_text);
      c->plant_text = g_strdup (plant_text);
      c->dead_time_s = dead_time_s;
    }
  for (guint k = 0; k < c->entries->len; k++)
    if (g_array_index (c->entries, CacheEntry, k).period_s == period_s)
      {
        /* another thread built the same one meanwhile */
        g_array_remove_index_fast (c->entries, k);
        break;
      }
  if (c->entries->len >= CACHE_MAX_ENTRIES)
    {
      guint oldest = 0;
      for (guint k = 1; k < c->entries->len; k++)
        if (g_array_index (c->entries, CacheEntry, k).used
            < g_array_index (c->entries, CacheEntry, oldest).used)
          oldest = k;
      g_array_remove_index_fast (c->entries, oldest);
    }
  CacheEntry e = { period_s, g_atomic_rc_box_acquire (s), ++c->clock };
  g_array_append_val (c->entries, e);
  g_mutex_unlock (&c->lock);
  return s;
}

/* ---- options and the evaluation object -------------------------------------------------- */

void
lw_engine_options_init (LwEngineOptions *o)
{
  memset (o, 0, sizeof *o);
  lw_sim_options_init (&o->sim);
  o->sim.substeps = 0;
}

typedef struct
{
  LwVariantEval pub;
  SharedPlant *shared;          /* the reference behind pub.sampled, or NULL */
} EvalPrivate;

static void
eval_clear (gpointer data)
{
  EvalPrivate *p = data;
  LwVariantEval *e = &p->pub;
  g_clear_error (&e->error);
  g_clear_error (&e->sim_error);
  g_clear_error (&e->achieved_error);
  g_clear_pointer (&e->plant_s, lw_model_free);
  g_clear_pointer (&e->controller_w, lw_model_free);
  g_clear_pointer (&e->controller_z, lw_model_free);
  g_clear_pointer (&e->ev, lw_evaluation_free);
  g_clear_pointer (&e->sim_ref, lw_sim_response_free);
  g_clear_pointer (&e->sim_in, lw_sim_response_free);
  g_clear_pointer (&e->sim_out, lw_sim_response_free);
  g_clear_pointer (&e->requirements, g_free);
  g_clear_pointer (&e->input_unit, g_free);
  g_clear_pointer (&e->output_unit, g_free);
  g_clear_error (&e->measured_error);
  g_clear_pointer (&e->measured_coherence, g_free);
  if (e->measured != NULL)
    {
      lw_measured_loop_clear (e->measured);
      g_clear_pointer (&e->measured, g_free);
    }
  e->sampled = NULL;
  g_clear_pointer (&p->shared, shared_plant_release);
}

LwVariantEval *
lw_variant_eval_ref (LwVariantEval *e)
{
  g_return_val_if_fail (e != NULL, NULL);
  return &((EvalPrivate *) g_atomic_rc_box_acquire ((EvalPrivate *) (void *) e))->pub;
}

void
lw_variant_eval_unref (LwVariantEval *e)
{
  if (e != NULL)
    g_atomic_rc_box_release_full ((EvalPrivate *) (void *) e, eval_clear);
}

static EvalPrivate *
eval_new (void)
{
  EvalPrivate *p = g_atomic_rc_box_new0 (EvalPrivate);
  p->pub.error_position = -1;
  p->pub.responses = LW_DESIGN_RESPONSES_ALL;
  p->pub.plant_z_form_error = NAN;
  p->pub.plant_w_form_error = NAN;
  return p;
}

static LwVariantEval *
eval_fail (EvalPrivate *p, LwEvalFailure failure, const LwError *err)
{
  LwVariantEval *e = &p->pub;
  e->failure = failure;
  e->error = g_error_new_literal (LW_ENGINE_ERROR, err->code != LW_OK ? err->code : LW_ERR_INVALID,
                                  err->message[0] ? err->message : "unknown error");
  if (failure == LW_EVAL_FAILED_PLANT)
    e->error_position = err->position;
  g_clear_pointer (&e->ev, lw_evaluation_free);
  return e;
}

gboolean
lw_variant_eval_ok (const LwVariantEval *e, GError **error)
{
  g_return_val_if_fail (e != NULL, FALSE);
  if (e->failure == LW_EVAL_OK)
    return TRUE;
  if (error != NULL)
    *error = g_error_copy (e->error);
  return FALSE;
}

gboolean
lw_engine_ringing_pole (const LwModel *controller_z, double *pole)
{
  gboolean found = FALSE;
  double worst = 0.0;
  if (controller_z == NULL)
    return FALSE;
  for (size_t i = 0; i < controller_z->n_poles; i++)
    {
      double complex p = controller_z->poles[i];
      /* real: exactly, or within rounding of a real root of a polynomial */
      if (fabs (cimag (p)) <= 1e-9 * fmax (1.0, cabs (p)) && creal (p) <= LW_RINGING_POLE_LIMIT
          && creal (p) < worst)
        worst = creal (p), found = TRUE;
    }
  if (found && pole != NULL)
    *pole = worst;
  return found;
}

size_t
lw_engine_step_horizon (const LwEvaluation *ev)
{
  if (ev == NULL || !ev->stable || ev->n_closed_loop_poles == 0)
    return 0;
  double r = 0.0;
  for (size_t i = 0; i < ev->n_closed_loop_poles; i++)
    r = fmax (r, cabs (ev->closed_loop_poles[i]));
  if (!(r > 0.0 && r < 1.0))
    return 0;
  /* the slowest mode decays to 2 % in ln(0.02)/ln(r) samples; half as much again for what
   * a slow mode's amplitude and a repeated pole add (common practice, no source), and the
   * delays before anything moves */
  double k = 1.5 * log (0.02) / log (r) + ev->closed_loop_order + 10.0;
  if (!(k < (double) LW_ENGINE_STEP_HORIZON_MAX))
    return LW_ENGINE_STEP_HORIZON_MAX;
  return (size_t) ceil (k);
}

/* Evaluation, simulation and achieved figures of a loop whose plant, sampled plant and
 * controllers are in e (the common path of both entry points). */
static LwVariantEval *
eval_loop (EvalPrivate *p, const LwEngineOptions *opts)
{
  LwVariantEval *e = &p->pub;
  LwEngineOptions defaults;
  if (opts == NULL)
    {
      lw_engine_options_init (&defaults);
      opts = &defaults;
    }

  LwAnalysisOptions ao;
  lw_analysis_options_init (&ao);
  ao.compute_delay = e->compute_delay;
  if (opts->n_points > 0)
    ao.n_points = opts->n_points;
  if (opts->n_steps > 0)
    ao.n_steps = opts->n_steps;
  LwError err;
  lw_error_clear (&err);
  if (lw_evaluate (e->sampled, e->controller_z, &ao, &e->ev, &err) != LW_OK)
    return eval_fail (p, LW_EVAL_FAILED_LOOP, &err);
  if (opts->n_steps == 0 && e->ev->stable && !e->ev->step.has_settling)
    {
      /* the horizon follows the loop: long enough for its slowest pole to settle */
      size_t want = lw_engine_step_horizon (e->ev);
      /* and the continuous output between samples stays within its bound */
      if (opts->sim.substeps > 0)
        want = MIN (want, 1 + (size_t) (LW_ENGINE_CONTINUOUS_MAX / (double) opts->sim.substeps));
      if (want > ao.n_steps)
        {
          ao.n_steps = want;
          g_clear_pointer (&e->ev, lw_evaluation_free);
          if (lw_evaluate (e->sampled, e->controller_z, &ao, &e->ev, &err) != LW_OK)
            return eval_fail (p, LW_EVAL_FAILED_LOOP, &err);
        }
    }
  e->step = e->ev->step;
  e->plant_z_form_error = lw_sampled_plant_form_error (e->sampled, e->ev->plant_z);
  e->plant_w_form_error = lw_sampled_plant_form_error (e->sampled, e->ev->plant_w);

  /* the simulated steps; a failure leaves them out, not the loop */
  LwSimOptions so = opts->sim;
  so.compute_delay = e->compute_delay;
  so.n_steps = ao.n_steps;
  e->sim_options = so;
  e->reference_step = opts->reference_step > 0.0 && isfinite (opts->reference_step)
                        ? opts->reference_step : 1.0;
  LwSimPlan *plan = NULL;
  if (lw_sim_plan_new (e->sampled, e->controller_z, &so, &plan, &err) != LW_OK
      || lw_sim_run (plan, LW_SIM_REFERENCE_STEP, e->reference_step, &e->sim_ref, &err) != LW_OK
      || (opts->disturbances
          && (lw_sim_run (plan, LW_SIM_INPUT_DISTURBANCE_STEP, 1.0, &e->sim_in, &err) != LW_OK
              || lw_sim_run (plan, LW_SIM_OUTPUT_DISTURBANCE_STEP, 1.0, &e->sim_out, &err)
                   != LW_OK)))
    {
      e->sim_error = g_error_new_literal (LW_ENGINE_ERROR, err.code != LW_OK ? err.code
                                                                             : LW_ERR_NUMERIC,
                                          err.message[0] ? err.message : "unknown error");
      g_clear_pointer (&e->sim_ref, lw_sim_response_free);
      g_clear_pointer (&e->sim_in, lw_sim_response_free);
      g_clear_pointer (&e->sim_out, lw_sim_response_free);
    }
  lw_sim_plan_free (plan);
  if (e->sim_ref != NULL && e->reference_step != 1.0)
    {
      /* the output in units of r: a step of size r0 drove the loop (it matters with limits) */
      LwSimResponse *r = e->sim_ref;
      for (size_t k = 0; k < r->n; k++)
        {
          r->y[k] /= e->reference_step;
          r->e[k] /= e->reference_step;
        }
      for (size_t j = 0; r->has_continuous && j < r->n_fine; j++)
        r->y_fine[j] /= e->reference_step;
      r->peak /= e->reference_step;
      r->continuous_peak /= e->reference_step;
      r->intersample_ripple /= e->reference_step;
    }
  if (e->sim_ref != NULL)
    {
      e->has_sim = TRUE;
      e->indices = e->sim_ref->indices;
      e->actuator_peak = 0.0;
      for (size_t k = 0; k < e->sim_ref->n; k++)
        e->actuator_peak = fmax (e->actuator_peak, fabs (e->sim_ref->u[k]));
      if (so.has_limits)
        {
          /* the limited loop's step, its figures against the linear loop's final value */
          e->step.samples = e->sim_ref->y;
          e->step.n = e->sim_ref->n;
          lw_step_figures (&e->step, e->ev->period_s);
        }
    }

  /* achieved figures; a failure leaves them (and the verdicts) out, not the loop */
  lw_error_clear (&err);
  e->has_achieved = lw_achieved_from_evaluation (e->ev, e->plant_s, &e->achieved, &err) == LW_OK;
  if (!e->has_achieved)
    e->achieved_error = g_error_new_literal (LW_ENGINE_ERROR, err.code != LW_OK ? err.code
                                                                                : LW_ERR_NUMERIC,
                                             err.message[0] ? err.message : "unknown error");
  else if (e->has_sim)
    {
      e->achieved.has_actuator_peak = true;
      e->achieved.actuator_peak = e->actuator_peak;
    }
  e->failure = LW_EVAL_OK;
  return e;
}

/* <measured analysis="data">: the figures of the frequency response are the data's, so the
 * requirements on them (phase and gain margin, crossover, sensitivity peak) are judged on the
 * measured loop; the time-domain figures stay the model's. What the data cannot tell is not
 * available (never a guess): no loop on the data at this period; no gain crossover in the
 * data, or |L| >= 1 at its highest point (the governing crossover may lie above it); no phase
 * crossover in the data (the gain margin is not known to be infinite, as a model's would be). */
static void
achieved_from_data (LwAchieved *a, const LwMeasuredLoop *ml)
{
  if (ml == NULL)
    {
      a->has_phase_margin = a->has_gain_margin = a->has_crossover = a->has_sensitivity = false;
      return;
    }
  const LwMeasuredMargins *m = &ml->margins;
  /* stability on the data (the Nyquist criterion, lw_measured_nyquist): a loop the data call
   * unstable is not stable whatever a model says; with a model an undecided verdict leaves
   * the model's */
  if (ml->stability.verdict == LW_MEASURED_UNSTABLE)
    a->stable = false;
  bool crossover = m->n_gain > 0 && !m->crossover_above_data;
  a->has_phase_margin = crossover;
  a->phase_margin_deg = crossover ? m->phase_margin_deg : NAN;
  a->has_crossover = crossover;
  a->crossover_rad_s = crossover ? m->gain_crossover_rad_s : NAN;
  a->has_gain_margin = m->n_phase > 0;
  a->gain_margin_db = m->n_phase > 0 ? m->gain_margin_db : NAN;
  a->has_sensitivity = isfinite (m->sensitivity_peak);
  a->sensitivity_peak = m->sensitivity_peak;
}

void
lw_engine_achieved_on_data (LwAchieved *a, const LwMeasuredLoop *ml, gboolean has_model)
{
  if (has_model)
    {
      achieved_from_data (a, ml);
      return;
    }
  /* without a model, stability is the data's alone: undecided leaves every figure out */
  memset (a, 0, sizeof *a);
  a->stable = ml != NULL && ml->stability.verdict == LW_MEASURED_STABLE;
  if (ml != NULL && ml->stability.verdict != LW_MEASURED_UNDECIDED)
    achieved_from_data (a, ml);
}

/* The plant's text with its parameters' nominal values (exactly, as hexadecimal doubles):
 * what the sampled-plant cache knows a plant by. */
static char *
plant_key (const LwDesign *d)
{
  GString *k = g_string_new (d->plant);
  for (size_t i = 0; i < d->n_params; i++)
    g_string_append_printf (k, "\n%s=%a", d->params[i].name, d->params[i].nominal);
  return g_string_free (k, FALSE);
}

/* The variant's compensator in w and in z at e->period_s; FALSE (both cleared) with err. */
static gboolean
build_controller (LwVariantEval *e, const LwDesignVariant *v, LwError *err)
{
  if (lw_compensator_w (v->stages, v->n_stages, e->period_s, &e->controller_w, err) == LW_OK
      && lw_compensator_z (v->stages, v->n_stages, e->period_s, &e->controller_z, err) == LW_OK)
    return TRUE;
  g_clear_pointer (&e->controller_w, lw_model_free);
  g_clear_pointer (&e->controller_z, lw_model_free);
  return FALSE;
}

static LwVariantEval *evaluate_on_data_alone (EvalPrivate *p, const LwDesign *d,
                                              const LwDesignVariant *v);
static void close_on_data (LwVariantEval *e, const LwDesign *d);
static void judge (LwVariantEval *e, const LwDesign *d);

const LwMeasuredCrossing *
lw_engine_measured_governing (const LwMeasuredMargins *m, gboolean gain)
{
  const LwMeasuredCrossing *c = gain ? m->gain : m->phase;
  size_t n = gain ? m->n_gain : m->n_phase;
  double omega = gain ? m->gain_crossover_rad_s : m->phase_crossover_rad_s;
  for (size_t i = 0; i < n; i++)
    if (c[i].omega_rad_s == omega)
      return &c[i];
  return NULL;
}

LwVariantEval *
lw_engine_evaluate_variant (const LwDesign *d, size_t variant, const LwEngineOptions *opts,
                            LwPlantCache *cache)
{
  g_return_val_if_fail (d != NULL, NULL);
  g_return_val_if_fail (variant < d->n_variants, NULL);
  g_return_val_if_fail (opts == NULL || opts->n_points == 0 || opts->n_points >= 16, NULL);

  EvalPrivate *p = eval_new ();
  LwVariantEval *e = &p->pub;
  const LwDesignVariant *v = &d->variants[variant];
  e->variant = variant;
  e->responses = d->variants[variant].responses;
  e->input_unit = g_strdup (d->input_unit);
  e->output_unit = g_strdup (d->output_unit);
  e->period_s = lw_design_variant_period_s (d, variant);   /* its own, or the design's */
  e->dead_time_s = d->dead_time_s;
  e->compute_delay = d->compute_delay;

  LwError err;
  lw_error_clear (&err);
  if (!lw_design_has_model (d) && d->measured != NULL)
    return evaluate_on_data_alone (p, d, v);
  if (lw_design_plant_parse (d, NULL, &e->plant_s, &err) != LW_OK)
    return eval_fail (p, LW_EVAL_FAILED_PLANT, &err);
  /* the cache knows a plant by its text and the parameters' values */
  g_autofree char *key = plant_key (d);
  p->shared = cache_lookup (cache, key, e->plant_s, d->dead_time_s, e->period_s, &err);
  if (p->shared == NULL)
    return eval_fail (p, LW_EVAL_FAILED_SAMPLING, &err);
  e->sampled = p->shared->plant;
  if (!build_controller (e, v, &err))
    return eval_fail (p, LW_EVAL_FAILED_COMPENSATOR, &err);
  /* the variant's actuator, unless the caller gives limits of its own */
  LwEngineOptions vo;
  if (opts != NULL)
    vo = *opts;
  else
    lw_engine_options_init (&vo);
  if (v->has_actuator && !vo.sim.has_limits)
    {
      vo.sim.has_limits = true;
      vo.sim.u_low = v->u_low;
      vo.sim.u_high = v->u_high;
      vo.sim.anti_windup = v->anti_windup;
      vo.reference_step = v->reference_step;
    }
  eval_loop (p, &vo);
  if (e->failure != LW_EVAL_OK)
    return e;
  if (d->measured != NULL)
    {
      /* the loop on the data, beside the model's */
      close_on_data (e, d);
      if (d->measured_analysis == LW_DESIGN_ANALYSIS_DATA && e->has_achieved)
        achieved_from_data (&e->achieved, e->measured);
    }
  judge (e, d);
  return e;
}

/* The design without a model: the controller and the loop on the data alone; the achieved
 * figures are the data's (achieved_from_data), every time-domain figure not available. */
static LwVariantEval *
evaluate_on_data_alone (EvalPrivate *p, const LwDesign *d, const LwDesignVariant *v)
{
  LwVariantEval *e = &p->pub;
  LwError err;
  lw_error_clear (&err);
  if (!build_controller (e, v, &err))
    return eval_fail (p, LW_EVAL_FAILED_COMPENSATOR, &err);
  e->failure = LW_EVAL_NO_MODEL;
  e->error = g_error_new_literal (LW_ENGINE_ERROR, LW_ERR_INVALID,
                                  "the design has no plant model, only the measured response: "
                                  "what needs a model (steps, closed-loop poles, the code's "
                                  "margins after quantization) is not available; fit a model "
                                  "to the data or type one");
  close_on_data (e, d);
  e->has_achieved = TRUE;
  lw_engine_achieved_on_data (&e->achieved, e->measured, FALSE);
  gboolean decided = e->measured != NULL
                     && e->measured->stability.verdict != LW_MEASURED_UNDECIDED;
  judge (e, d);
  for (size_t i = 0; i < e->n_requirements; i++)
    if (e->requirements[i].status == LW_REQ_NOT_AVAILABLE)
      e->requirements[i].note
        = !lw_req_kind_from_frequency_response (d->requirements[i].req.kind)
            ? "needs a plant model: the design holds only measured data"
            : !decided ? "the data do not decide the closed loop's stability (see the "
                         "measured response's stability note)"
                       : e->requirements[i].note;
  return e;
}

/* e->measured: the design's measurement closed with the variant's controller (and the
 * model's sampled plant when there is one, for the comparison); a failure in
 * e->measured_error. */
static void
close_on_data (LwVariantEval *e, const LwDesign *d)
{
  LwError err;
  lw_error_clear (&err);
  e->measured_kind = d->measured_kind;
  e->measured = g_new0 (LwMeasuredLoop, 1);
  if (lw_measured_loop_close (d->measured, d->measured_kind, e->period_s, e->dead_time_s,
                              e->compute_delay, e->controller_z, e->sampled,
                              d->measured_unstable_poles, e->measured, &err) != LW_OK)
    {
      g_clear_pointer (&e->measured, g_free);
      e->measured_error = g_error_new_literal (LW_ENGINE_ERROR, err.code, err.message);
    }
  else if (d->measured->coherence != NULL)
    e->measured_coherence = g_memdup2 (d->measured->coherence,
                                       e->measured->n * sizeof (double));
}

/* Each requirement's verdict; without achieved figures every one is not available. */
static void
judge (LwVariantEval *e, const LwDesign *d)
{
  e->n_requirements = d->n_requirements;
  e->requirements = g_new0 (LwReqResult, d->n_requirements + 1);
  for (size_t i = 0; i < d->n_requirements; i++)
    {
      if (e->has_achieved)
        e->requirements[i] = lw_requirement_evaluate (&d->requirements[i].req, &e->achieved);
      else
        {
          e->requirements[i].status = LW_REQ_NOT_AVAILABLE;
          e->requirements[i].achieved = NAN;
          e->requirements[i].slack = NAN;
        }
      if (e->requirements[i].status != LW_REQ_PASS)
        e->n_not_passing++;
    }
}

LwVariantEval *
lw_engine_evaluate_loop (const LwEngineLoop *loop, const LwEngineOptions *opts)
{
  g_return_val_if_fail (loop != NULL && loop->plant_s != NULL && loop->sampled != NULL
                        && loop->controller_z != NULL, NULL);
  g_return_val_if_fail (opts == NULL || opts->n_points == 0 || opts->n_points >= 16, NULL);

  EvalPrivate *p = eval_new ();
  LwVariantEval *e = &p->pub;
  e->period_s = lw_sampled_plant_period (loop->sampled);
  e->dead_time_s = loop->dead_time_s;
  e->compute_delay = loop->compute_delay;
  e->plant_s = lw_model_copy (loop->plant_s);
  e->controller_z = lw_model_copy (loop->controller_z);
  e->controller_w = loop->controller_w != NULL ? lw_model_copy (loop->controller_w) : NULL;
  e->sampled = loop->sampled;
  if (e->plant_s == NULL || e->controller_z == NULL
      || (loop->controller_w != NULL && e->controller_w == NULL))
    {
      LwError err;
      lw_error_set (&err, LW_ERR_NOMEM, -1, "out of memory for the loop");
      return eval_fail (p, LW_EVAL_FAILED_LOOP, &err);
    }
  return eval_loop (p, opts);
}
