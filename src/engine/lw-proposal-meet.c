/* lw-proposal-meet.c — "meet the requirements": notch, PI or lag, gain and lead,
 * adjusted over a few rounds until the variant meets its requirements or no round helps.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-proposal-private.h"

/* Without a model, the plant's integrators from the data: the slope of ln|P| in ln ω over the
 * lowest decade of the data (or what there is of it), when within 0.25 of −0, −1 or −2 (the
 * slope of k integrators is −k; common practice, no source, for the margin). FALSE (said)
 * when the slope is not that clear. */
static gboolean
type_from_data (Work *w, int *type)
{
  const LwMeasuredLoop *d = w->data;
  double w0 = d->omega_rad_s[0], w1 = fmin (10.0 * w0, d->omega_rad_s[d->n - 1]);
  double m1 = NAN;
  LwError err;
  lw_error_clear (&err);
  if (!(w1 > w0) || lw_measured_loop_at (d->omega_rad_s, d->p, d->n, w1, &m1, NULL, &err) != LW_OK)
    return FALSE;
  double slope = (log (m1) - log (cabs (d->p[0]))) / (log (w1) - log (w0));
  double k = round (-slope);
  if (!(k >= 0.0 && k <= 2.0 && fabs (-slope - k) <= 0.25))
    {
      lw_prop_say (w, "the plant's integrators are not clear from the data (|P| falls %.3g dB a "
                   "decade from %.6g to %.6g rad/s): no PI added; without a model the error "
                   "requirements are not judged", -20.0 * slope, w0, w1);
      return FALSE;
    }
  *type = (int) k;
  lw_prop_say (w, "the plant has %d integrator(s) by the data (|P| falls %.3g dB a decade from "
               "%.6g to %.6g rad/s)", *type, -20.0 * slope, w0, w1);
  return TRUE;
}

gboolean
lw_prop_propose_meet (Work *w, LwProposal *p, GError **error)
{
  const LwHelperOptions *o = w->o;
  double wc = lw_prop_target_crossover (w, error);
  if (!isfinite (wc) || !lw_prop_check_crossover (w, wc, error))
    return FALSE;
  double wc_cap = MEET_CROSSOVER_NYQUIST * G_PI / w->T;
  if (w->data != NULL)
    wc_cap = fmin (wc_cap, w->data->omega_rad_s[w->data->n - 1]);   /* not past the data */
  if (wc > wc_cap)
    {
      lw_prop_say (w, wc_cap < MEET_CROSSOVER_NYQUIST * G_PI / w->T
                      ? "crossover lowered to %.6g rad/s, the highest measured frequency"
                      : "crossover lowered to %.6g rad/s, half the Nyquist frequency (common "
                        "practice)", wc_cap);
      wc = wc_cap;
    }
  double pm = lw_prop_target_phase_margin (w);

  int need_type = 0;
  double need_kp = NAN, need_kv = NAN;
  size_t which = 0;
  gboolean errors = lw_prop_error_needs (w->d, &need_type, &need_kp, &need_kv, &which);
  int plant_type = w->base->has_achieved && w->base->achieved.has_low_frequency
                   ? w->base->achieved.loop_type : 0;
  gboolean type_known = TRUE;
  if (w->base->ev == NULL && w->data != NULL && errors)
    type_known = type_from_data (w, &plant_type);
  gboolean use_pi = errors && type_known && plant_type < need_type;
  if (use_pi)
    lw_prop_say (w, "requirement %zu (%s) needs %d integrator(s); the plant has %d: a PI at %.3g nu_c",
         REQ_NO (which), lw_prop_req_title (w->d, which), need_type, plant_type, o->pi_fraction);
  if (use_pi && need_type - plant_type > 1)
    lw_prop_say (w, "one PI adds one integrator only: requirement %zu will not be met",
         REQ_NO (which));
  double lag_ratio = 1.0;
  double pi_fraction = o->pi_fraction;

  /* a lightly damped resonance above the crossover is notched first: the lead's gain would
   * lift its peak through 0 dB (gain stabilization, common practice, no source) */
  LwNotchDesign nd = { 0 };
  GError *nerr = NULL;
  if (!lw_prop_notch (w, &nd, &nerr))
    {
      if (w->data != NULL)
        lw_prop_say (w, "no notch: %s", nerr->message);
      g_clear_error (&nerr);
      nd.found = false;
    }
  else
    {
      double wn = hypot (nd.plant_pole_re, nd.plant_pole_im);
      if (wn > wc)
        lw_prop_say (w, "the plant's resonance at %.6g rad/s (damping below %.3g) lies above the "
             "crossover: a notch at %.6g rad/s, %.3g dB deep", wn, o->notch_zeta_max,
             nd.notch.p.notch.centre_rad_s, nd.notch.p.notch.depth_db);
      else
        {
          lw_prop_say (w, "the plant's resonance at %.6g rad/s lies below the crossover: not notched",
               wn);
          nd.found = false;
        }
    }

  LwStage *best = NULL;
  size_t n_best = 0, best_failing = G_MAXSIZE;
  double best_wc = wc, best_pm = pm;
  LwError err;
  lw_error_clear (&err);
  LwSynthLoop sl = lw_prop_synth_loop (w, NULL, 0);

  for (int round = 0; round < MEET_ROUNDS; round++)
    {
      double nu = lw_warp_omega_to_nu (wc, w->T);
      if (round == 0)
        lw_prop_warp (w, wc);
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
              return lw_prop_fail_core (&err, error);
            }
          lw_prop_say (w, "round %d: %s; the previous round is kept", round + 1, err.message);
          break;
        }
      if (round == 0)
        lw_prop_say_lead (w, &ld);
      size_t n = nf + ld.n_stages;
      LwStage *stages = g_new (LwStage, n);
      memcpy (stages, fixed, nf * sizeof *stages);
      memcpy (stages + nf, ld.stages, ld.n_stages * sizeof *stages);
      LwVariantEval *e = lw_prop_evaluate_with (w, stages, n, TRUE);
      size_t failing = lw_prop_evaluated (e) ? e->n_not_passing : G_MAXSIZE - 1;
      if (failing < best_failing)
        {
          g_free (best);
          best = stages, n_best = n, best_failing = failing, best_wc = wc, best_pm = pm;
        }
      else
        g_free (stages);
      if (!lw_prop_evaluated (e) || failing == 0)
        {
          lw_variant_eval_unref (e);
          break;
        }

      /* what to change for the next round, in order of what the others depend on */
      double r = e->has_achieved ? lw_prop_gain_shortfall (&e->achieved, need_type, need_kp, need_kv)
                                 : 1.0;
      gboolean changed = FALSE;
      if (errors && isfinite (r) && r > 1.0)
        {
          lag_ratio *= GAIN_RESERVE * r;
          lw_prop_say (w, "round %d: low-frequency gain short by %.4g (requirement %zu): lag ratio "
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
                lw_prop_say (w, "round %d: requirement %zu (%s) fails: phase margin aimed at %.4g deg",
                     round + 1, REQ_NO (i), lw_prop_req_title (w->d, i), pm);
                changed = TRUE;
              }
            else if (q->kind == LW_REQ_MAX_SETTLING_TIME && use_pi
                     && pi_fraction + MEET_PI_STEP <= MEET_PI_MAX)
              {
                /* the PI zero's slow closed-loop pole is the long tail: move it up */
                pi_fraction += MEET_PI_STEP;
                lw_prop_say (w, "round %d: requirement %zu (%s) fails: the PI zero moved up to %.3g nu_c",
                     round + 1, REQ_NO (i), lw_prop_req_title (w->d, i), pi_fraction);
                changed = TRUE;
              }
            else if ((q->kind == LW_REQ_MAX_RISE_TIME || q->kind == LW_REQ_MAX_SETTLING_TIME)
                     && wc * MEET_CROSSOVER_STEP <= wc_cap)
              {
                wc *= MEET_CROSSOVER_STEP;
                lw_prop_say (w, "round %d: requirement %zu (%s) fails: crossover aimed at %.6g rad/s",
                     round + 1, REQ_NO (i), lw_prop_req_title (w->d, i), wc);
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
