/* lw-proposal.c — the formula helpers applied to a design variant; see lw-proposal.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdarg.h>
#include <string.h>

#include "lw-proposal.h"
#include "lw-require.h"
#include "lw-synth.h"

#define N_(s) (s)
#define RAD2DEG (180.0 / G_PI)

/* Common practice, no source: 45° when nothing asks for a phase margin. */
#define DEFAULT_PM_DEG 45.0
/* Common practice, no source: a 10 % reserve on a low-frequency gain that must be reached. */
#define GAIN_RESERVE 1.1
/* Rounds of "meet the requirements", and the steps of each (see lw-proposal.h). */
#define MEET_ROUNDS 8
#define MEET_PM_STEP_DEG 5.0
#define MEET_CROSSOVER_STEP 1.15
/* A PI zero raised by this fraction of ν_c per round where settling fails, up to the maximum
 * (atan(0.4) = 21.8° of phase at ν_c; the lead pays it back). */
#define MEET_PI_STEP 0.1
#define MEET_PI_MAX 0.4
/* The crossover is kept below this fraction of the Nyquist frequency π/T. */
#define MEET_CROSSOVER_NYQUIST 0.5

static const struct
{
  const char *name;
  const char *title;
} helpers[LW_HELPER_COUNT] = {
  [LW_HELPER_CROSSOVER_GAIN] = { "crossover-gain", N_("Crossover gain") },
  [LW_HELPER_LEAD] = { "lead", N_("Lead for the phase margin") },
  [LW_HELPER_LAG] = { "lag", N_("Lag for low-frequency gain") },
  [LW_HELPER_PI] = { "pi", N_("PI below the crossover") },
  [LW_HELPER_NOTCH] = { "notch", N_("Notch on the resonance") },
  [LW_HELPER_MEET] = { "meet", N_("Meet the requirements") },
};

const char *
lw_helper_name (LwHelperKind kind)
{
  return (unsigned) kind < LW_HELPER_COUNT ? helpers[kind].name : "unknown";
}

const char *
lw_helper_title (LwHelperKind kind)
{
  return (unsigned) kind < LW_HELPER_COUNT ? helpers[kind].title : "unknown";
}

gboolean
lw_helper_from_name (const char *name, LwHelperKind *kind)
{
  for (int k = 0; k < LW_HELPER_COUNT; k++)
    if (g_strcmp0 (name, helpers[k].name) == 0)
      {
        *kind = (LwHelperKind) k;
        return TRUE;
      }
  return FALSE;
}

void
lw_helper_options_init (LwHelperOptions *o, LwHelperKind kind)
{
  memset (o, 0, sizeof *o);
  o->kind = kind;
  o->crossover_rad_s = NAN;
  o->rise_time_s = NAN;
  o->phase_margin_deg = NAN;
  o->safety_deg = 5.0;
  o->lag_ratio = NAN;
  o->lag_decades = 1.0;
  o->pi_fraction = 0.1;
  o->notch_zeta_max = 0.2;
  o->notch_zeta = 0.5;
}

void
lw_proposal_free (LwProposal *p)
{
  if (p == NULL)
    return;
  g_free (p->stages);
  if (p->lines != NULL)
    g_ptr_array_unref (p->lines);
  g_clear_pointer (&p->preview, lw_variant_eval_unref);
  for (size_t i = 0; i < p->n_unmet; i++)
    g_free (p->unmet[i].reason);
  g_free (p->unmet);
  g_free (p);
}

LwDesign *
lw_proposal_apply (const LwDesign *d, size_t variant, const LwProposal *p)
{
  LwDesign *c = lw_design_copy (d);
  g_return_val_if_fail (variant < c->n_variants, c);
  LwDesignVariant *v = &c->variants[variant];
  size_t keep = p->replaces ? 0 : v->n_stages;
  LwStage *stages = g_new (LwStage, keep + p->n_stages + 1);
  if (keep > 0)
    memcpy (stages, v->stages, keep * sizeof *stages);
  if (p->n_stages > 0)
    memcpy (stages + keep, p->stages, p->n_stages * sizeof *stages);
  g_free (v->stages);
  v->stages = stages;
  v->n_stages = keep + p->n_stages;
  return c;
}

static const char *req_title (const LwDesign *d, size_t i);

/* ---- in words ------------------------------------------------------------------------------ */

static void
describe_stage (GString *s, size_t k, const LwStage *st)
{
  LwStageParam p[LW_STAGE_MAX_PARAMS];
  size_t np = lw_stage_params (st, p);
  g_string_append_printf (s, "  %zu. %-16s %-9s", k + 1, st->label, lw_stage_kind_name (st->kind));
  for (size_t i = 0; i < np; i++)
    {
      if (p[i].derived)
        continue;
      gboolean unit = p[i].unit[0] != '\0' && strcmp (p[i].unit, "ratio") != 0;
      g_string_append_printf (s, "%s%s %.6g%s%s", i == 0 ? " " : ", ", p[i].name, p[i].value,
                              unit ? " " : "", unit ? p[i].unit : "");
    }
  g_string_append_c (s, '\n');
}

static const char *
achieved_unit_sep (const char *unit)
{
  return unit[0] == '\0' || strcmp (unit, "ratio") == 0 || strcmp (unit, "%") == 0 ? "" : " ";
}

char *
lw_proposal_describe (const LwDesign *d, size_t variant, const LwProposal *p)
{
  GString *s = g_string_new (NULL);
  for (guint i = 0; i < p->lines->len; i++)
    g_string_append_printf (s, "  %s\n", (const char *) g_ptr_array_index (p->lines, i));
  size_t kept = p->replaces ? 0 : d->variants[variant].n_stages;
  if (p->replaces)
    g_string_append (s, "\nStages replacing the variant's (w-plane; frequencies are nu in "
                        "rad/s)\n");
  else
    g_string_append_printf (s, "\nStages added after the variant's %zu (w-plane; frequencies "
                               "are nu in rad/s)\n", kept);
  for (size_t k = 0; k < p->n_stages; k++)
    describe_stage (s, kept + k, &p->stages[k]);

  const LwVariantEval *e = p->preview;
  if (e->failure != LW_EVAL_OK)
    {
      g_string_append_printf (s, "\nThe variant with these stages does not evaluate: %s\n",
                              e->error->message);
      return g_string_free (s, FALSE);
    }
  if (e->controller_w != NULL)
    {
      char *cw = lw_model_text (e->controller_w);
      g_string_append_printf (s, "\nController in w, with the proposal:\n  C(w) = %s\n", cw);
      g_free (cw);
    }
  const LwMargins *m = &e->ev->margins;
  g_string_append_printf (s, "\nReached, loop L(z) = z^-%d C(z) P(z)\n", e->compute_delay);
  if (m->has_phase_margin)
    g_string_append_printf (s, "  %-24s %.4g deg at %.6g rad/s\n", "phase margin",
                            m->phase_margin_deg, m->gain_crossover_rad_s);
  else
    g_string_append_printf (s, "  %-24s none (no gain crossover)\n", "phase margin");
  if (m->has_gain_margin)
    g_string_append_printf (s, "  %-24s %.4g dB at %.6g rad/s\n", "gain margin",
                            m->gain_margin_db, m->phase_crossover_rad_s);
  else
    g_string_append_printf (s, "  %-24s none (no phase crossover)\n", "gain margin");
  if (m->has_sensitivity)
    g_string_append_printf (s, "  %-24s %.4g (%.3g dB) at %.6g rad/s\n", "sensitivity peak |S|",
                            m->sensitivity_peak, 20.0 * log10 (m->sensitivity_peak),
                            m->sensitivity_peak_rad_s);
  g_string_append_printf (s, "  %-24s %s\n", "closed loop",
                          e->ev->stable ? "stable" : "UNSTABLE");

  if (e->requirements != NULL && d->n_requirements > 0)
    {
      g_string_append (s, "\nRequirements\n");
      for (size_t i = 0; i < d->n_requirements; i++)
        {
          const LwReqResult *r = &e->requirements[i];
          char *target = lw_requirement_target_text (&d->requirements[i].req);
          const char *unit = lw_req_kind_unit (d->requirements[i].req.kind);
          const char *word = r->status == LW_REQ_PASS ? "pass"
                             : r->status == LW_REQ_FAIL ? "FAIL" : "n/a ";
          if (isfinite (r->achieved))
            g_string_append_printf (s, "  %s  %s: %.4g%s%s (%s)\n", word, req_title (d, i),
                                    r->achieved, achieved_unit_sep (unit),
                                    achieved_unit_sep (unit)[0] ? unit : "", target);
          else
            g_string_append_printf (s, "  %s  %s (%s)\n", word, req_title (d, i), target);
          g_free (target);
        }
      if (p->n_unmet == 0)
        g_string_append (s, "\nEvery requirement passes.\n");
      else
        {
          g_string_append (s, "\nNot met:\n");
          for (size_t i = 0; i < p->n_unmet; i++)
            g_string_append_printf (s, "  %s\n", p->unmet[i].reason);
        }
    }
  return g_string_free (s, FALSE);
}

/* ---- working state ------------------------------------------------------------------------ */

typedef struct
{
  const LwDesign *d;
  size_t variant;
  LwPlantCache *cache;
  const LwHelperOptions *o;
  double T;
  GPtrArray *lines;
  LwVariantEval *base;          /* the variant as it is (its stages, none for MEET) */
  const LwStage *fixed;         /* the stages kept */
  size_t n_fixed;
} Work;

G_GNUC_PRINTF (2, 3) static void
say (Work *w, const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  g_ptr_array_add (w->lines, g_strdup_vprintf (fmt, ap));
  va_end (ap);
}

static gboolean
fail_core (const LwError *err, GError **error)
{
  g_set_error_literal (error, LW_ENGINE_ERROR, err->code != LW_OK ? err->code : LW_ERR_INVALID,
                       err->message[0] ? err->message : "the helper failed");
  return FALSE;
}

/* 1-based number of a requirement, for messages. */
#define REQ_NO(i) ((i) + 1)

static const char *
req_title (const LwDesign *d, size_t i)
{
  return lw_design_requirement_title (&d->requirements[i]);
}

/* The crossover aimed at (physical ω), from the options or the requirements; NAN with *error
 * when there is none. */
static double
target_crossover (Work *w, GError **error)
{
  const LwHelperOptions *o = w->o;
  if (isfinite (o->crossover_rad_s))
    {
      say (w, "crossover %.6g rad/s (given)", o->crossover_rad_s);
      return o->crossover_rad_s;
    }
  if (isfinite (o->rise_time_s))
    {
      double wc = 1.7 / o->rise_time_s;
      say (w, "crossover 1.7/t_r = %.6g rad/s for a rise time of %.6g s (given; common practice)",
           wc, o->rise_time_s);
      return wc;
    }
  double lo = NAN, hi = NAN, from_rise = NAN;
  size_t i_range = 0, i_rise = 0;
  for (size_t i = 0; i < w->d->n_requirements; i++)
    {
      const LwRequirement *r = &w->d->requirements[i].req;
      if (r->kind == LW_REQ_CROSSOVER_RANGE && !isfinite (lo))
        lo = r->limit, hi = r->limit_hi, i_range = i;
      else if (r->kind == LW_REQ_MAX_RISE_TIME && r->limit > 0.0
               && !(1.7 / r->limit <= from_rise))
        from_rise = 1.7 / r->limit, i_rise = i;
    }
  if (isfinite (lo) && isfinite (from_rise))
    {
      double wc = fmin (fmax (sqrt (lo * hi), from_rise), hi);
      say (w, "crossover %.6g rad/s: the faster of the middle of %.6g … %.6g rad/s "
           "(requirement %zu, %s) and 1.7/t_r (requirement %zu, %s), within the range",
           wc, lo, hi, REQ_NO (i_range), req_title (w->d, i_range), REQ_NO (i_rise),
           req_title (w->d, i_rise));
      return wc;
    }
  if (isfinite (lo))
    {
      double wc = sqrt (lo * hi);
      say (w, "crossover %.6g rad/s: the geometric middle of %.6g … %.6g rad/s (requirement "
           "%zu, %s)", wc, lo, hi, REQ_NO (i_range), req_title (w->d, i_range));
      return wc;
    }
  if (isfinite (from_rise))
    {
      say (w, "crossover 1.7/t_r = %.6g rad/s from the rise time of requirement %zu (%s; "
           "common practice)", from_rise, REQ_NO (i_rise), req_title (w->d, i_rise));
      return from_rise;
    }
  g_set_error_literal (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                       "no crossover to aim at: give one, or add a crossover-range or "
                       "rise-time requirement (the crossover sets the speed of the loop)");
  return NAN;
}

/* The phase margin aimed at, from the options or the requirements (or the default). */
static double
target_phase_margin (Work *w)
{
  const LwHelperOptions *o = w->o;
  if (isfinite (o->phase_margin_deg))
    {
      say (w, "phase margin %.4g deg (given)", o->phase_margin_deg);
      return o->phase_margin_deg;
    }
  double pm = NAN;
  GString *why = g_string_new (NULL);
  for (size_t i = 0; i < w->d->n_requirements; i++)
    {
      const LwRequirement *r = &w->d->requirements[i].req;
      double p = NAN;
      const char *how = NULL;
      if (r->kind == LW_REQ_MIN_PHASE_MARGIN)
        p = r->limit, how = "its limit";
      else if (r->kind == LW_REQ_MAX_OVERSHOOT && r->limit > 0.0 && r->limit < 100.0)
        p = lw_req_pm_deg_from_zeta (lw_req_zeta_from_overshoot (r->limit)),
        how = "the second-order margin of the damping that overshoot implies";
      else if (r->kind == LW_REQ_MAX_SENSITIVITY && r->limit > 0.5)
        p = 2.0 * asin (1.0 / (2.0 * r->limit)) * RAD2DEG,
        how = "2 asin(1/(2 Ms))";
      if (isfinite (p) && !(p <= pm))
        {
          pm = p;
          g_string_printf (why, "requirement %zu, %s: %s", REQ_NO (i), req_title (w->d, i), how);
        }
    }
  if (isfinite (pm))
    say (w, "phase margin %.4g deg (%s)", pm, why->str);
  else
    {
      pm = DEFAULT_PM_DEG;
      say (w, "phase margin %.4g deg: no requirement asks for one (common practice)", pm);
    }
  g_string_free (why, TRUE);
  return pm;
}

/* The loop type and the low-frequency constant an error requirement needs: *need_type (0, 1
 * or 2) and *need_kp / *need_kv (NAN when not asked). FALSE when no error requirement. */
static gboolean
error_needs (const LwDesign *d, int *need_type, double *need_kp, double *need_kv, size_t *which)
{
  gboolean any = FALSE;
  *need_type = 0;
  *need_kp = *need_kv = NAN;
  for (size_t i = 0; i < d->n_requirements; i++)
    {
      const LwRequirement *r = &d->requirements[i].req;
      if (r->kind == LW_REQ_MAX_STEP_ERROR)
        {
          any = TRUE, *which = i;
          if (r->limit <= 0.0)
            *need_type = MAX (*need_type, 1);
          else if (r->limit < 1.0)
            *need_kp = fmax (isfinite (*need_kp) ? *need_kp : 0.0, 1.0 / r->limit - 1.0);
        }
      else if (r->kind == LW_REQ_MAX_RAMP_ERROR)
        {
          any = TRUE, *which = i;
          if (r->limit <= 0.0)
            *need_type = MAX (*need_type, 2);
          else
            {
              *need_type = MAX (*need_type, 1);
              *need_kv = fmax (isfinite (*need_kv) ? *need_kv : 0.0, 1.0 / r->limit);
            }
        }
    }
  return any;
}

/* How far short the loop's low-frequency gain is (a ratio > 1), 1 when enough, NAN when the
 * loop type itself is short (an integrator is needed). */
static double
gain_shortfall (const LwAchieved *a, int need_type, double need_kp, double need_kv)
{
  if (!a->has_low_frequency)
    return 1.0;
  if (a->loop_type < need_type)
    return NAN;
  double r = 1.0;
  if (isfinite (need_kp) && a->loop_type == 0 && a->position_constant < need_kp)
    r = fmax (r, need_kp / a->position_constant);
  if (isfinite (need_kv) && a->loop_type == 1 && a->velocity_constant < need_kv)
    r = fmax (r, need_kv / a->velocity_constant);
  return r;
}

static LwVariantEval *
evaluate_with (Work *w, const LwStage *stages, size_t n, gboolean replaces)
{
  LwProposal p = { .replaces = replaces, .n_stages = n, .stages = (LwStage *) stages };
  LwDesign *c = lw_proposal_apply (w->d, w->variant, &p);
  LwVariantEval *e = lw_engine_evaluate_variant (c, w->variant, NULL, w->cache);
  lw_design_free (c);
  return e;
}

/* ---- the helpers ------------------------------------------------------------------------- */

static gboolean
check_crossover (Work *w, double wc, GError **error)
{
  if (!(wc > 0.0 && wc < G_PI / w->T))
    {
      g_set_error (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                   "the crossover %.6g rad/s must lie above 0 and below the Nyquist frequency "
                   "pi/T = %.6g rad/s", wc, G_PI / w->T);
      return FALSE;
    }
  return TRUE;
}

static double
warp (Work *w, double wc)
{
  double nu = lw_warp_omega_to_nu (wc, w->T);
  say (w, "w-plane crossover nu_c = (2/T) tan(omega_c T/2) = %.6g rad/s (%+.3g %% from warping)",
       nu, 100.0 * (nu - wc) / wc);
  return nu;
}

static void
say_lead (Work *w, const LwLeadDesign *ld)
{
  say (w, "phase margin at nu_c before the lead %.4g deg; lead needed %.4g deg with %.4g deg "
       "safety", ld->pm_before_deg, ld->lead_total_deg, w->o->safety_deg);
  if (ld->n_leads == 0)
    say (w, "no lead needed: the loop already has the phase");
  else
    say (w, "%s of %.4g deg (alpha %.6g) centred at nu_c", ld->n_leads == 1 ? "one lead"
         : "two equal leads", ld->lead_each_deg, ld->alpha);
  say (w, "crossover gain %.6g (%.4g dB)", ld->stages[0].p.gain.ratio,
       20.0 * log10 (ld->stages[0].p.gain.ratio));
}

static gboolean
propose_single (Work *w, LwProposal *p, GError **error)
{
  const LwHelperOptions *o = w->o;
  LwSynthLoop sl = { w->base->sampled, w->base->compute_delay, w->fixed, w->n_fixed };
  LwError err;
  lw_error_clear (&err);
  GArray *out = g_array_new (FALSE, FALSE, sizeof (LwStage));
  gboolean ok = FALSE;

  /* the crossover of the variant as it is, for the helpers that work below it */
  double wc_now = NAN;
  if (w->base->ev != NULL && w->base->ev->margins.has_phase_margin)
    wc_now = w->base->ev->margins.gain_crossover_rad_s;

  switch (o->kind)
    {
    case LW_HELPER_CROSSOVER_GAIN:
    case LW_HELPER_LEAD:
      {
        double wc = target_crossover (w, error);
        if (!isfinite (wc) || !check_crossover (w, wc, error))
          goto out;
        p->crossover_rad_s = wc;
        double nu = warp (w, wc);
        if (o->kind == LW_HELPER_CROSSOVER_GAIN)
          {
            LwStage g;
            if (lw_synth_crossover_gain (&sl, nu, &g, &err) != LW_OK)
              {
                fail_core (&err, error);
                goto out;
              }
            say (w, "gain %.6g (%.4g dB) makes |L| = 1 at nu_c", g.p.gain.ratio,
                 20.0 * log10 (g.p.gain.ratio));
            g_array_append_val (out, g);
          }
        else
          {
            double pm = target_phase_margin (w);
            p->phase_margin_deg = pm;
            LwLeadOptions lo;
            lw_lead_options_init (&lo);
            lo.safety_deg = o->safety_deg;
            LwLeadDesign ld;
            if (lw_synth_lead (&sl, pm, nu, &lo, &ld, &err) != LW_OK)
              {
                fail_core (&err, error);
                goto out;
              }
            say_lead (w, &ld);
            g_array_append_vals (out, ld.stages, ld.n_stages);
          }
        break;
      }
    case LW_HELPER_LAG:
      {
        double wc = isfinite (o->crossover_rad_s) ? o->crossover_rad_s : wc_now;
        if (!isfinite (wc))
          {
            g_set_error_literal (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                                 "the loop has no gain crossover to place the lag below: "
                                 "give the crossover, or shape the loop first");
            goto out;
          }
        if (!check_crossover (w, wc, error))
          goto out;
        p->crossover_rad_s = wc;
        double ratio = o->lag_ratio;
        if (!isfinite (ratio))
          {
            int need_type;
            double need_kp, need_kv;
            size_t which = 0;
            if (!error_needs (w->d, &need_type, &need_kp, &need_kv, &which))
              {
                g_set_error_literal (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                                     "no ratio given and no step- or ramp-error requirement "
                                     "to take one from");
                goto out;
              }
            if (!w->base->has_achieved)
              {
                g_set_error_literal (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                                     "the variant's low-frequency gain is not known (it does "
                                     "not evaluate): give the ratio");
                goto out;
              }
            double r = gain_shortfall (&w->base->achieved, need_type, need_kp, need_kv);
            if (isnan (r))
              {
                g_set_error (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                             "requirement %zu (%s) needs %d integrator(s) in the loop and it has "
                             "%d: a lag cannot give that; use the PI helper", REQ_NO (which),
                             req_title (w->d, which), need_type, w->base->achieved.loop_type);
                goto out;
              }
            if (r <= 1.0)
              {
                g_set_error (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                             "requirement %zu (%s) is already met by the low-frequency gain: "
                             "no lag needed", REQ_NO (which), req_title (w->d, which));
                goto out;
              }
            ratio = GAIN_RESERVE * r;
            say (w, "low-frequency gain short by %.4g for requirement %zu (%s): ratio %.4g "
                 "with a 10 %% reserve", r, REQ_NO (which), req_title (w->d, which), ratio);
          }
        double nu = warp (w, wc);
        LwLagDesign lg;
        if (lw_synth_lag (ratio, nu, o->lag_decades, &lg, &err) != LW_OK)
          {
            fail_core (&err, error);
            goto out;
          }
        say (w, "lag zero %.4g decade(s) below nu_c; its phase there %.3g deg, gain %.3g dB",
             o->lag_decades, lg.phase_at_crossover_deg, lg.gain_at_crossover_db);
        g_array_append_vals (out, lg.stages, 2);
        break;
      }
    case LW_HELPER_PI:
      {
        double wc = isfinite (o->crossover_rad_s) ? o->crossover_rad_s : wc_now;
        if (!isfinite (wc))
          {
            g_set_error_literal (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                                 "the loop has no gain crossover to place the PI below: give "
                                 "the crossover, or shape the loop first");
            goto out;
          }
        if (!check_crossover (w, wc, error))
          goto out;
        p->crossover_rad_s = wc;
        double nu = warp (w, wc);
        LwPiDesign pd;
        if (lw_synth_pi (&sl, nu, o->pi_fraction, &pd, &err) != LW_OK)
          {
            fail_core (&err, error);
            goto out;
          }
        say (w, "PI zero at %.4g nu_c = %.6g rad/s, its gain keeping |L| = 1 at nu_c; "
             "its phase there %.3g deg", o->pi_fraction, pd.pi.p.pi.zero_rad_s,
             pd.phase_at_crossover_deg);
        g_array_append_val (out, pd.pi);
        break;
      }
    case LW_HELPER_NOTCH:
      {
        LwNotchDesign nd;
        if (w->base->plant_s == NULL
            || lw_synth_notch (w->base->plant_s, w->T, o->notch_zeta_max, o->notch_zeta, &nd,
                               &err) != LW_OK)
          {
            if (w->base->plant_s == NULL)
              lw_error_set (&err, LW_ERR_INVALID, -1, "the plant does not parse");
            fail_core (&err, error);
            goto out;
          }
        if (!nd.found)
          {
            g_set_error (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                         "the plant has no pole pair with damping below %.3g under the Nyquist "
                         "frequency: nothing to notch", o->notch_zeta_max);
            goto out;
          }
        say (w, "resonance of the plant at %.6g%+.6gj rad/s (w-plane damping %.4g)",
             nd.plant_pole_re, nd.plant_pole_im, nd.plant_damping_w);
        say (w, "notch at %.6g rad/s, %.3g dB deep, %.4g rad/s wide", nd.notch.p.notch.centre_rad_s,
             nd.notch.p.notch.depth_db, nd.notch.p.notch.width_rad_s);
        g_array_append_val (out, nd.notch);
        break;
      }
    default:
      g_assert_not_reached ();
    }
  p->n_stages = out->len;
  p->stages = (LwStage *) g_array_free (out, FALSE);
  out = NULL;
  ok = TRUE;
out:
  if (out != NULL)
    g_array_free (out, TRUE);
  return ok;
}

/* "Meet the requirements": see lw-proposal.h. */
static gboolean
propose_meet (Work *w, LwProposal *p, GError **error)
{
  const LwHelperOptions *o = w->o;
  double wc = target_crossover (w, error);
  if (!isfinite (wc) || !check_crossover (w, wc, error))
    return FALSE;
  double wc_cap = MEET_CROSSOVER_NYQUIST * G_PI / w->T;
  if (wc > wc_cap)
    {
      say (w, "crossover lowered to %.6g rad/s, half the Nyquist frequency (common practice)",
           wc_cap);
      wc = wc_cap;
    }
  double pm = target_phase_margin (w);

  int need_type = 0;
  double need_kp = NAN, need_kv = NAN;
  size_t which = 0;
  gboolean errors = error_needs (w->d, &need_type, &need_kp, &need_kv, &which);
  int plant_type = w->base->has_achieved && w->base->achieved.has_low_frequency
                   ? w->base->achieved.loop_type : 0;
  gboolean use_pi = errors && plant_type < need_type;
  if (use_pi)
    say (w, "requirement %zu (%s) needs %d integrator(s); the plant has %d: a PI at %.3g nu_c",
         REQ_NO (which), req_title (w->d, which), need_type, plant_type, o->pi_fraction);
  if (use_pi && need_type - plant_type > 1)
    say (w, "one PI adds one integrator only: requirement %zu will not be met",
         REQ_NO (which));
  double lag_ratio = 1.0;
  double pi_fraction = o->pi_fraction;

  /* a lightly damped resonance above the crossover is notched first: the lead's gain would
   * lift its peak through 0 dB (gain stabilization, common practice, no source) */
  LwNotchDesign nd = { 0 };
  LwError nerr;
  lw_error_clear (&nerr);
  if (w->base->plant_s != NULL
      && lw_synth_notch (w->base->plant_s, w->T, o->notch_zeta_max, o->notch_zeta, &nd,
                         &nerr) == LW_OK && nd.found)
    {
      double wn = hypot (nd.plant_pole_re, nd.plant_pole_im);
      if (wn > wc)
        say (w, "the plant's resonance at %.6g rad/s (damping below %.3g) lies above the "
             "crossover: a notch at %.6g rad/s, %.3g dB deep", wn, o->notch_zeta_max,
             nd.notch.p.notch.centre_rad_s, nd.notch.p.notch.depth_db);
      else
        {
          say (w, "the plant's resonance at %.6g rad/s lies below the crossover: not notched",
               wn);
          nd.found = false;
        }
    }

  LwStage *best = NULL;
  size_t n_best = 0, best_failing = G_MAXSIZE;
  double best_wc = wc, best_pm = pm;
  LwError err;
  lw_error_clear (&err);
  LwSynthLoop sl = { w->base->sampled, w->base->compute_delay, NULL, 0 };

  for (int round = 0; round < MEET_ROUNDS; round++)
    {
      double nu = lw_warp_omega_to_nu (wc, w->T);
      if (round == 0)
        warp (w, wc);
      LwStage fixed[4];
      size_t nf = 0;
      if (nd.found)
        fixed[nf++] = nd.notch;
      if (use_pi)
        {
          fixed[nf] = lw_stage_pi (1.0, pi_fraction * nu);
          lw_stage_set_label (&fixed[nf], "PI");
          nf++;
        }
      if (lag_ratio > 1.0)
        {
          LwLagDesign lg;
          if (lw_synth_lag (lag_ratio, nu, o->lag_decades, &lg, &err) != LW_OK)
            break;
          fixed[nf++] = lg.stages[0];
          fixed[nf++] = lg.stages[1];
        }
      sl.fixed = fixed;
      sl.n_fixed = nf;
      LwLeadOptions lo;
      lw_lead_options_init (&lo);
      lo.safety_deg = o->safety_deg;
      LwLeadDesign ld;
      if (lw_synth_lead (&sl, pm, nu, &lo, &ld, &err) != LW_OK)
        {
          if (best == NULL)
            {
              g_free (best);
              return fail_core (&err, error);
            }
          say (w, "round %d: %s; the previous round is kept", round + 1, err.message);
          break;
        }
      if (round == 0)
        say_lead (w, &ld);
      size_t n = nf + ld.n_stages;
      LwStage *stages = g_new (LwStage, n);
      memcpy (stages, fixed, nf * sizeof *stages);
      memcpy (stages + nf, ld.stages, ld.n_stages * sizeof *stages);
      LwVariantEval *e = evaluate_with (w, stages, n, TRUE);
      size_t failing = e->failure == LW_EVAL_OK ? e->n_not_passing : G_MAXSIZE - 1;
      if (failing < best_failing)
        {
          g_free (best);
          best = stages, n_best = n, best_failing = failing, best_wc = wc, best_pm = pm;
        }
      else
        g_free (stages);
      if (e->failure != LW_EVAL_OK || failing == 0)
        {
          lw_variant_eval_unref (e);
          break;
        }

      /* what to change for the next round, in order of what the others depend on */
      double r = e->has_achieved ? gain_shortfall (&e->achieved, need_type, need_kp, need_kv)
                                 : 1.0;
      gboolean changed = FALSE;
      if (errors && isfinite (r) && r > 1.0)
        {
          lag_ratio *= GAIN_RESERVE * r;
          say (w, "round %d: low-frequency gain short by %.4g (requirement %zu): lag ratio "
               "%.4g, a decade below the crossover", round + 1, r, REQ_NO (which), lag_ratio);
          changed = TRUE;
        }
      else
        for (size_t i = 0; i < w->d->n_requirements && !changed; i++)
          {
            const LwRequirement *q = &w->d->requirements[i].req;
            if (e->requirements[i].status != LW_REQ_FAIL)
              continue;
            if ((q->kind == LW_REQ_MAX_OVERSHOOT || q->kind == LW_REQ_MIN_PHASE_MARGIN
                 || q->kind == LW_REQ_MAX_SENSITIVITY)
                && pm + MEET_PM_STEP_DEG < 175.0)
              {
                pm += MEET_PM_STEP_DEG;
                say (w, "round %d: requirement %zu (%s) fails: phase margin aimed at %.4g deg",
                     round + 1, REQ_NO (i), req_title (w->d, i), pm);
                changed = TRUE;
              }
            else if (q->kind == LW_REQ_MAX_SETTLING_TIME && use_pi
                     && pi_fraction + MEET_PI_STEP <= MEET_PI_MAX)
              {
                /* the PI zero's slow closed-loop pole is the long tail: move it up */
                pi_fraction += MEET_PI_STEP;
                say (w, "round %d: requirement %zu (%s) fails: the PI zero moved up to %.3g nu_c",
                     round + 1, REQ_NO (i), req_title (w->d, i), pi_fraction);
                changed = TRUE;
              }
            else if ((q->kind == LW_REQ_MAX_RISE_TIME || q->kind == LW_REQ_MAX_SETTLING_TIME)
                     && wc * MEET_CROSSOVER_STEP <= wc_cap)
              {
                wc *= MEET_CROSSOVER_STEP;
                say (w, "round %d: requirement %zu (%s) fails: crossover aimed at %.6g rad/s",
                     round + 1, REQ_NO (i), req_title (w->d, i), wc);
                changed = TRUE;
              }
          }
      lw_variant_eval_unref (e);
      if (!changed)
        break;
    }
  p->replaces = TRUE;
  p->stages = best;
  p->n_stages = n_best;
  p->crossover_rad_s = best_wc;
  p->phase_margin_deg = best_pm;
  return TRUE;
}

/* ---- the proposal ------------------------------------------------------------------------- */

static gboolean
check_options (const LwHelperOptions *o, GError **error)
{
  const char *bad = NULL;
  if ((unsigned) o->kind >= LW_HELPER_COUNT)
    bad = "unknown helper";
  else if (!isnan (o->crossover_rad_s) && !(o->crossover_rad_s > 0.0 && isfinite (o->crossover_rad_s)))
    bad = "the crossover must be a finite number of rad/s above 0";
  else if (!isnan (o->rise_time_s) && !(o->rise_time_s > 0.0 && isfinite (o->rise_time_s)))
    bad = "the rise time must be a finite number of seconds above 0";
  else if (!isnan (o->phase_margin_deg) && !(o->phase_margin_deg > 0.0
                                             && o->phase_margin_deg < 180.0))
    bad = "the phase margin must be more than 0 and less than 180 degrees";
  else if (!(o->safety_deg >= 0.0 && o->safety_deg < 90.0))
    bad = "the safety angle must be from 0 to less than 90 degrees";
  else if (!isnan (o->lag_ratio) && !(o->lag_ratio > 1.0 && o->lag_ratio <= 1e6))
    bad = "the lag ratio must be more than 1 and at most 1e6";
  else if (!(o->lag_decades > 0.0 && o->lag_decades <= 6.0))
    bad = "the lag must sit more than 0 and at most 6 decades below the crossover";
  else if (!(o->pi_fraction > 0.0 && o->pi_fraction < 1.0))
    bad = "the PI zero must sit at a fraction between 0 and 1 of the crossover";
  if (bad != NULL)
    {
      g_set_error_literal (error, LW_ENGINE_ERROR, LW_ERR_INVALID, bad);
      return FALSE;
    }
  return TRUE;
}

LwProposal *
lw_proposal_make (const LwDesign *d, size_t variant, const LwHelperOptions *o,
                  LwPlantCache *cache, GError **error)
{
  g_return_val_if_fail (d != NULL && o != NULL, NULL);
  if (!check_options (o, error))
    return NULL;
  if (variant >= d->n_variants)
    {
      g_set_error (error, LW_ENGINE_ERROR, LW_ERR_INVALID, "no variant %zu", variant);
      return NULL;
    }
  Work w = { d, variant, cache, o, lw_design_variant_period_s (d, variant),
             g_ptr_array_new_with_free_func (g_free), NULL, NULL, 0 };
  gboolean meet = o->kind == LW_HELPER_MEET;
  LwProposal *p = g_new0 (LwProposal, 1);
  p->kind = o->kind;
  p->crossover_rad_s = NAN;
  p->phase_margin_deg = NAN;

  w.base = meet ? evaluate_with (&w, NULL, 0, TRUE)
                : lw_engine_evaluate_variant (d, variant, NULL, cache);
  if (w.base->sampled == NULL || (!meet && w.base->failure == LW_EVAL_FAILED_COMPENSATOR))
    {
      g_set_error (error, LW_ENGINE_ERROR, w.base->error != NULL ? w.base->error->code
                                                                : LW_ERR_INVALID,
                   "variant '%s' does not evaluate: %s", d->variants[variant].name,
                   w.base->error != NULL ? w.base->error->message : "unknown error");
      goto fail;
    }
  if (!meet)
    {
      w.fixed = d->variants[variant].stages;
      w.n_fixed = d->variants[variant].n_stages;
    }
  if (!(meet ? propose_meet (&w, p, error) : propose_single (&w, p, error)))
    goto fail;

  p->preview = evaluate_with (&w, p->stages, p->n_stages, p->replaces);
  if (p->preview->failure == LW_EVAL_OK && p->preview->requirements != NULL)
    {
      p->unmet = g_new0 (LwProposalUnmet, p->preview->n_not_passing + 1);
      for (size_t i = 0; i < p->preview->n_requirements; i++)
        {
          const LwReqResult *r = &p->preview->requirements[i];
          if (r->status == LW_REQ_PASS)
            continue;
          char *target = lw_requirement_target_text (&d->requirements[i].req);
          const char *unit = lw_req_kind_unit (d->requirements[i].req.kind);
          char *reason;
          if (r->status == LW_REQ_NOT_AVAILABLE)
            reason = g_strdup_printf ("requirement %zu (%s): not available%s%s", REQ_NO (i),
                                      req_title (d, i), r->note ? ": " : "",
                                      r->note ? r->note : "");
          else if (!p->preview->ev->stable)
            reason = g_strdup_printf ("requirement %zu (%s): the closed loop is unstable",
                                      REQ_NO (i), req_title (d, i));
          else
            {
              gboolean plain = unit[0] == '\0' || strcmp (unit, "ratio") == 0;
              reason = g_strdup_printf ("requirement %zu (%s): %.4g%s%s reached, %s asked",
                                        REQ_NO (i), req_title (d, i), r->achieved,
                                        plain || strcmp (unit, "%") == 0 ? "" : " ",
                                        plain ? "" : unit, target);
            }
          g_free (target);
          p->unmet[p->n_unmet].index = i;
          p->unmet[p->n_unmet].reason = reason;
          p->n_unmet++;
        }
    }
  else if (p->preview->failure != LW_EVAL_OK)
    say (&w, "the variant with the proposal does not evaluate: %s",
         p->preview->error->message);
  p->lines = g_steal_pointer (&w.lines);
  lw_variant_eval_unref (w.base);
  return p;

fail:
  g_ptr_array_unref (w.lines);
  lw_variant_eval_unref (w.base);
  lw_proposal_free (p);
  return NULL;
}
