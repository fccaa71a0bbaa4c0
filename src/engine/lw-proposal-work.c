/* lw-proposal-work.c — the working state the formula helpers share (lw-proposal.c,
 * lw-proposal-meet.c): targets read from the requirements, the loop evaluated with stages,
 * the checks and the core formulas applied on the model or on the measured data.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-proposal-private.h"

#define RAD2DEG (180.0 / G_PI)

/* Common practice, no source: 45° when nothing asks for a phase margin. */
#define DEFAULT_PM_DEG 45.0

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
