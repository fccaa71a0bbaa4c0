/* lw-proposal.c — the formula helpers applied to a design variant; see lw-proposal.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-proposal-private.h"

#define N_(s) (s)

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
