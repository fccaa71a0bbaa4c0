/* lw-proposal.c — the formula helpers applied to a design variant; see lw-proposal.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-proposal-private.h"

#define N_(s) (s)
#define RAD2DEG (180.0 / G_PI)

/* Common practice, no source: 45° when nothing asks for a phase margin. */
#define DEFAULT_PM_DEG 45.0

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

/* ---- working state ------------------------------------------------------------------------ */

void
lw_prop_say (Work *w, const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  g_ptr_array_add (w->lines, g_strdup_vprintf (fmt, ap));
  va_end (ap);
}

gboolean
lw_prop_fail_core (const LwError *err, GError **error)
{
  g_set_error_literal (error, LW_ENGINE_ERROR, err->code != LW_OK ? err->code : LW_ERR_INVALID,
                       err->message[0] ? err->message : "the helper failed");
  return FALSE;
}

const char *
lw_prop_req_title (const LwDesign *d, size_t i)
{
  return lw_design_requirement_title (&d->requirements[i]);
}

/* The crossover aimed at (physical ω), from the options or the requirements; NAN with *error
 * when there is none. */
double
lw_prop_target_crossover (Work *w, GError **error)
{
  const LwHelperOptions *o = w->o;
  if (isfinite (o->crossover_rad_s))
    {
      lw_prop_say (w, "crossover %.6g rad/s (given)", o->crossover_rad_s);
      return o->crossover_rad_s;
    }
  if (isfinite (o->rise_time_s))
    {
      double wc = 1.7 / o->rise_time_s;
      lw_prop_say (w, "crossover 1.7/t_r = %.6g rad/s for a rise time of %.6g s (given; common practice)",
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
      lw_prop_say (w, "crossover %.6g rad/s: the faster of the middle of %.6g … %.6g rad/s "
           "(requirement %zu, %s) and 1.7/t_r (requirement %zu, %s), within the range",
           wc, lo, hi, REQ_NO (i_range), lw_prop_req_title (w->d, i_range), REQ_NO (i_rise),
           lw_prop_req_title (w->d, i_rise));
      return wc;
    }
  if (isfinite (lo))
    {
      double wc = sqrt (lo * hi);
      lw_prop_say (w, "crossover %.6g rad/s: the geometric middle of %.6g … %.6g rad/s (requirement "
           "%zu, %s)", wc, lo, hi, REQ_NO (i_range), lw_prop_req_title (w->d, i_range));
      return wc;
    }
  if (isfinite (from_rise))
    {
      lw_prop_say (w, "crossover 1.7/t_r = %.6g rad/s from the rise time of requirement %zu (%s; "
           "common practice)", from_rise, REQ_NO (i_rise), lw_prop_req_title (w->d, i_rise));
      return from_rise;
    }
  g_set_error_literal (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                       "no crossover to aim at: give one, or add a crossover-range or "
                       "rise-time requirement (the crossover sets the speed of the loop)");
  return NAN;
}

/* The phase margin aimed at, from the options or the requirements (or the default). */
double
lw_prop_target_phase_margin (Work *w)
{
  const LwHelperOptions *o = w->o;
  if (isfinite (o->phase_margin_deg))
    {
      lw_prop_say (w, "phase margin %.4g deg (given)", o->phase_margin_deg);
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
          g_string_printf (why, "requirement %zu, %s: %s", REQ_NO (i), lw_prop_req_title (w->d, i), how);
        }
    }
  if (isfinite (pm))
    lw_prop_say (w, "phase margin %.4g deg (%s)", pm, why->str);
  else
    {
      pm = DEFAULT_PM_DEG;
      lw_prop_say (w, "phase margin %.4g deg: no requirement asks for one (common practice)", pm);
    }
  g_string_free (why, TRUE);
  return pm;
}

/* The loop type and the low-frequency constant an error requirement needs: *need_type (0, 1
 * or 2) and *need_kp / *need_kv (NAN when not asked). FALSE when no error requirement. */
gboolean
lw_prop_error_needs (const LwDesign *d, int *need_type, double *need_kp, double *need_kv, size_t *which)
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
double
lw_prop_gain_shortfall (const LwAchieved *a, int need_type, double need_kp, double need_kv)
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

LwVariantEval *
lw_prop_evaluate_with (Work *w, const LwStage *stages, size_t n, gboolean replaces)
{
  LwProposal p = { .replaces = replaces, .n_stages = n, .stages = (LwStage *) stages };
  LwDesign *c = lw_proposal_apply (w->d, w->variant, &p);
  LwVariantEval *e = lw_engine_evaluate_variant (c, w->variant, NULL, w->cache);
  lw_design_free (c);
  return e;
}

/* ---- the helpers ------------------------------------------------------------------------- */

gboolean
lw_prop_check_crossover (Work *w, double wc, GError **error)
{
  if (!(wc > 0.0 && wc < G_PI / w->T))
    {
      g_set_error (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                   "the crossover %.6g rad/s must lie above 0 and below the Nyquist frequency "
                   "pi/T = %.6g rad/s", wc, G_PI / w->T);
      return FALSE;
    }
  if (w->data != NULL
      && !(wc >= w->data->omega_rad_s[0] && wc <= w->data->omega_rad_s[w->data->n - 1]))
    {
      g_set_error (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                   "the crossover %.6g rad/s lies outside the measured data, which cover "
                   "%.6g … %.6g rad/s: the loop on the data is not known there (the design's "
                   "analysis is on the data)", wc, w->data->omega_rad_s[0],
                   w->data->omega_rad_s[w->data->n - 1]);
      return FALSE;
    }
  return TRUE;
}

/* The loop the formulas work on: the sampled plant's model, or with the analysis on data the
 * sampled plant's response at the measured points (lw-synth.h). */
LwSynthLoop
lw_prop_synth_loop (Work *w, const LwStage *fixed, size_t n_fixed)
{
  LwSynthLoop sl = { .plant = w->base->sampled, .compute_delay = w->base->compute_delay,
                     .fixed = fixed, .n_fixed = n_fixed };
  if (w->data != NULL)
    {
      sl.data_omega_rad_s = w->data->omega_rad_s;
      sl.data_p = w->data->p;
      sl.data_n = w->data->n;
      sl.data_period_s = w->T;
    }
  return sl;
}

/* The notch on the plant's most lightly damped resonance: the model's pole pair, or with the
 * analysis on data the resonance found in the measured response (said in a line). FALSE with
 * *error when there is none or it cannot be found. */
gboolean
lw_prop_notch (Work *w, LwNotchDesign *nd, GError **error)
{
  const LwHelperOptions *o = w->o;
  LwError err;
  lw_error_clear (&err);
  memset (nd, 0, sizeof *nd);
  if (w->data != NULL)
    {
      LwMeasuredResonance res;
      if (lw_synth_notch_data (w->data->omega_rad_s, w->data->p, w->data->n, w->T,
                               o->notch_zeta_max, o->notch_zeta, &res, nd, &err) != LW_OK)
        return lw_prop_fail_core (&err, error);
      if (res.found)
        lw_prop_say (w, "resonance in the measured data: the point at %.6g rad/s stands %.3g dB "
                     "above the trend of the half decade either side; a second-order fit to the "
                     "%zu points from %.6g to %.6g rad/s gives omega_n = %.6g rad/s, damping "
                     "%.4g", res.peak_rad_s, res.height_db, res.n_fit, res.fit_lo_rad_s,
                     res.fit_hi_rad_s, res.omega_n_rad_s, res.zeta);
      if (!nd->found)
        {
          GString *why = g_string_new (NULL);
          if (res.found)
            g_string_printf (why, "the resonance found in the measured data at %.6g rad/s lies "
                             "beyond the Nyquist frequency", res.omega_n_rad_s);
          else
            {
              g_string_printf (why, "the measured data (%.6g … %.6g rad/s) show no resonance: "
                               "no peak of |P| stands %.3g dB above the trend of the half "
                               "decade either side with a fitted damping below %.3g",
                               w->data->omega_rad_s[0], w->data->omega_rad_s[w->data->n - 1],
                               LW_RESONANCE_HEIGHT_DB, o->notch_zeta_max);
              if (res.n_peaks > 0)
                g_string_append_printf (why, " (%zu peak(s) stand that high but are damped "
                                        "more or do not fit a resonance)", res.n_peaks);
              if (res.n_near_end > 0)
                g_string_append_printf (why, "; %zu peak(s) lie within a quarter decade of an "
                                        "end of the data, too near it to judge",
                                        res.n_near_end);
            }
          g_string_append (why, ": nothing to notch");
          g_set_error_literal (error, LW_ENGINE_ERROR, LW_ERR_INVALID, why->str);
          g_string_free (why, TRUE);
          return FALSE;
        }
      return TRUE;
    }
  if (w->base->plant_s == NULL)
    {
      g_set_error_literal (error, LW_ENGINE_ERROR, LW_ERR_INVALID, "the plant does not parse");
      return FALSE;
    }
  if (lw_synth_notch (w->base->plant_s, w->T, o->notch_zeta_max, o->notch_zeta, nd, &err)
      != LW_OK)
    return lw_prop_fail_core (&err, error);
  if (!nd->found)
    {
      g_set_error (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                   "the plant has no pole pair with damping below %.3g under the Nyquist "
                   "frequency: nothing to notch", o->notch_zeta_max);
      return FALSE;
    }
  return TRUE;
}

double
lw_prop_warp (Work *w, double wc)
{
  double nu = lw_warp_omega_to_nu (wc, w->T);
  lw_prop_say (w, "w-plane crossover nu_c = (2/T) tan(omega_c T/2) = %.6g rad/s (%+.3g %% from warping)",
       nu, 100.0 * (nu - wc) / wc);
  return nu;
}

void
lw_prop_say_lead (Work *w, const LwLeadDesign *ld)
{
  lw_prop_say (w, "phase margin at nu_c before the lead %.4g deg; lead needed %.4g deg with %.4g deg "
       "safety", ld->pm_before_deg, ld->lead_total_deg, w->o->safety_deg);
  if (ld->n_leads == 0)
    lw_prop_say (w, "no lead needed: the loop already has the phase");
  else
    lw_prop_say (w, "%s of %.4g deg (alpha %.6g) centred at nu_c", ld->n_leads == 1 ? "one lead"
         : "two equal leads", ld->lead_each_deg, ld->alpha);
  lw_prop_say (w, "crossover gain %.6g (%.4g dB)", ld->stages[0].p.gain.ratio,
       20.0 * log10 (ld->stages[0].p.gain.ratio));
}

static gboolean
propose_single (Work *w, LwProposal *p, GError **error)
{
  const LwHelperOptions *o = w->o;
  LwSynthLoop sl = lw_prop_synth_loop (w, w->fixed, w->n_fixed);
  LwError err;
  lw_error_clear (&err);
  GArray *out = g_array_new (FALSE, FALSE, sizeof (LwStage));
  gboolean ok = FALSE;

  /* the crossover of the variant as it is, for the helpers that work below it */
  double wc_now = NAN;
  if (w->data != NULL)
    {
      if (w->data->margins.n_gain > 0)
        wc_now = w->data->margins.gain_crossover_rad_s;
    }
  else if (w->base->ev != NULL && w->base->ev->margins.has_phase_margin)
    wc_now = w->base->ev->margins.gain_crossover_rad_s;

  switch (o->kind)
    {
    case LW_HELPER_CROSSOVER_GAIN:
    case LW_HELPER_LEAD:
      {
        double wc = lw_prop_target_crossover (w, error);
        if (!isfinite (wc) || !lw_prop_check_crossover (w, wc, error))
          goto out;
        p->crossover_rad_s = wc;
        double nu = lw_prop_warp (w, wc);
        if (o->kind == LW_HELPER_CROSSOVER_GAIN)
          {
            LwStage g;
            if (lw_synth_crossover_gain (&sl, nu, &g, &err) != LW_OK)
              {
                lw_prop_fail_core (&err, error);
                goto out;
              }
            lw_prop_say (w, "gain %.6g (%.4g dB) makes |L| = 1 at nu_c", g.p.gain.ratio,
                 20.0 * log10 (g.p.gain.ratio));
            g_array_append_val (out, g);
          }
        else
          {
            double pm = lw_prop_target_phase_margin (w);
            p->phase_margin_deg = pm;
            LwLeadOptions lo;
            lw_lead_options_init (&lo);
            lo.safety_deg = o->safety_deg;
            LwLeadDesign ld;
            if (lw_synth_lead (&sl, pm, nu, &lo, &ld, &err) != LW_OK)
              {
                lw_prop_fail_core (&err, error);
                goto out;
              }
            lw_prop_say_lead (w, &ld);
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
        if (!lw_prop_check_crossover (w, wc, error))
          goto out;
        p->crossover_rad_s = wc;
        double ratio = o->lag_ratio;
        if (!isfinite (ratio))
          {
            int need_type;
            double need_kp, need_kv;
            size_t which = 0;
            if (!lw_prop_error_needs (w->d, &need_type, &need_kp, &need_kv, &which))
              {
                g_set_error_literal (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                                     "no ratio given and no step- or ramp-error requirement "
                                     "to take one from");
                goto out;
              }
            if (w->base->ev == NULL && w->data != NULL)
              {
                g_set_error_literal (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                                     "the design has no model: its low-frequency gain (and what "
                                     "an error requirement is short of) is not known from the "
                                     "data; give the ratio");
                goto out;
              }
            if (!w->base->has_achieved)
              {
                g_set_error_literal (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                                     "the variant's low-frequency gain is not known (it does "
                                     "not evaluate): give the ratio");
                goto out;
              }
            double r = lw_prop_gain_shortfall (&w->base->achieved, need_type, need_kp, need_kv);
            if (isnan (r))
              {
                g_set_error (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                             "requirement %zu (%s) needs %d integrator(s) in the loop and it has "
                             "%d: a lag cannot give that; use the PI helper", REQ_NO (which),
                             lw_prop_req_title (w->d, which), need_type, w->base->achieved.loop_type);
                goto out;
              }
            if (r <= 1.0)
              {
                g_set_error (error, LW_ENGINE_ERROR, LW_ERR_INVALID,
                             "requirement %zu (%s) is already met by the low-frequency gain: "
                             "no lag needed", REQ_NO (which), lw_prop_req_title (w->d, which));
                goto out;
              }
            ratio = GAIN_RESERVE * r;
            lw_prop_say (w, "low-frequency gain short by %.4g for requirement %zu (%s): ratio %.4g "
                 "with a 10 %% reserve", r, REQ_NO (which), lw_prop_req_title (w->d, which), ratio);
          }
        double nu = lw_prop_warp (w, wc);
        LwLagDesign lg;
        if (lw_synth_lag (ratio, nu, o->lag_decades, &lg, &err) != LW_OK)
          {
            lw_prop_fail_core (&err, error);
            goto out;
          }
        lw_prop_say (w, "lag zero %.4g decade(s) below nu_c; its phase there %.3g deg, gain %.3g dB",
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
        if (!lw_prop_check_crossover (w, wc, error))
          goto out;
        p->crossover_rad_s = wc;
        double nu = lw_prop_warp (w, wc);
        LwPiDesign pd;
        if (lw_synth_pi (&sl, nu, o->pi_fraction, &pd, &err) != LW_OK)
          {
            lw_prop_fail_core (&err, error);
            goto out;
          }
        lw_prop_say (w, "PI zero at %.4g nu_c = %.6g rad/s, its gain keeping |L| = 1 at nu_c; "
             "its phase there %.3g deg", o->pi_fraction, pd.pi.p.pi.zero_rad_s,
             pd.phase_at_crossover_deg);
        g_array_append_val (out, pd.pi);
        break;
      }
    case LW_HELPER_NOTCH:
      {
        LwNotchDesign nd;
        if (!lw_prop_notch (w, &nd, error))
          goto out;
        lw_prop_say (w, "resonance of the plant%s at %.6g%+.6gj rad/s (w-plane damping %.4g)",
             w->data != NULL ? " (the pole pair of that fit)" : "", nd.plant_pole_re,
             nd.plant_pole_im, nd.plant_damping_w);
        lw_prop_say (w, "notch at %.6g rad/s, %.3g dB deep, %.4g rad/s wide", nd.notch.p.notch.centre_rad_s,
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
             g_ptr_array_new_with_free_func (g_free), NULL, NULL, 0, NULL };
  gboolean meet = o->kind == LW_HELPER_MEET;
  LwProposal *p = g_new0 (LwProposal, 1);
  p->kind = o->kind;
  p->crossover_rad_s = NAN;
  p->phase_margin_deg = NAN;

  w.base = meet ? lw_prop_evaluate_with (&w, NULL, 0, TRUE)
                : lw_engine_evaluate_variant (d, variant, NULL, cache);
  gboolean on_data = d->measured != NULL && d->measured_analysis == LW_DESIGN_ANALYSIS_DATA;
  if (on_data && w.base->measured == NULL && w.base->measured_error != NULL
      && !(!meet && w.base->failure == LW_EVAL_FAILED_COMPENSATOR))
    {
      g_set_error (error, LW_ENGINE_ERROR, w.base->measured_error->code,
                   "the design's analysis is on its measured data, but variant '%s' cannot be "
                   "closed on them: %s", d->variants[variant].name,
                   w.base->measured_error->message);
      goto fail;
    }
  if (on_data && w.base->measured != NULL)
    {
      w.data = w.base->measured;
      lw_prop_say (&w, "on the measured data (%s kind, %zu points, %.6g … %.6g rad/s): L between "
                   "the points as the margins on the data take it (ln|L| and the unwrapped "
                   "phase linear in ln omega)",
                   lw_design_measured_kind_name (d->measured_kind), w.data->n,
                   w.data->omega_rad_s[0], w.data->omega_rad_s[w.data->n - 1]);
    }
  if ((w.data == NULL && w.base->sampled == NULL)
      || (!meet && w.base->failure == LW_EVAL_FAILED_COMPENSATOR))
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
  if (!(meet ? lw_prop_propose_meet (&w, p, error) : propose_single (&w, p, error)))
    goto fail;

  p->preview = lw_prop_evaluate_with (&w, p->stages, p->n_stages, p->replaces);
  if (lw_prop_evaluated (p->preview) && p->preview->requirements != NULL)
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
                                      lw_prop_req_title (d, i), r->note ? ": " : "",
                                      r->note ? r->note : "");
          else if ((p->preview->ev != NULL && !p->preview->ev->stable)
                   || (p->preview->has_achieved && !p->preview->achieved.stable))
            reason = g_strdup_printf ("requirement %zu (%s): the closed loop is unstable%s",
                                      REQ_NO (i), lw_prop_req_title (d, i),
                                      p->preview->measured != NULL
                                      && p->preview->measured->stability.verdict
                                           == LW_MEASURED_UNSTABLE
                                      ? " on the measured data (Nyquist criterion)" : "");
          else
            {
              gboolean plain = unit[0] == '\0' || strcmp (unit, "ratio") == 0;
              reason = g_strdup_printf ("requirement %zu (%s): %.4g%s%s reached, %s asked",
                                        REQ_NO (i), lw_prop_req_title (d, i), r->achieved,
                                        plain || strcmp (unit, "%") == 0 ? "" : " ",
                                        plain ? "" : unit, target);
            }
          g_free (target);
          p->unmet[p->n_unmet].index = i;
          p->unmet[p->n_unmet].reason = reason;
          p->n_unmet++;
        }
    }
  else if (!lw_prop_evaluated (p->preview))
    lw_prop_say (&w, "the variant with the proposal does not evaluate: %s",
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
