/* lw-synth.c — formula helpers proposing compensator stages; definitions in lw-synth.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-synth.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "lw-internal.h"

#define DEG2RAD (LW_PI / 180.0)
#define RAD2DEG (180.0 / LW_PI)

/* Most stages one response call combines (fixed + proposed). */
#define MAX_STAGES 64

static bool
on_data (const LwSynthLoop *lp)
{
  return lp->data_n > 0;
}

static double
loop_period (const LwSynthLoop *lp)
{
  return on_data (lp) ? lp->data_period_s : lw_sampled_plant_period (lp->plant);
}

static LwStatus
loop_controller (const LwSynthLoop *lp, const LwStage *extra, size_t n_extra, LwModel **cw,
                 LwError *err)
{
  if (lp->n_fixed + n_extra > MAX_STAGES)
    return lw_error_set (err, LW_ERR_INVALID, -1, "more than %d stages", MAX_STAGES);
  LwStage all[MAX_STAGES];
  for (size_t i = 0; i < lp->n_fixed; i++)
    all[i] = lp->fixed[i];
  for (size_t i = 0; i < n_extra; i++)
    all[lp->n_fixed + i] = extra[i];
  return lw_compensator_w (all, lp->n_fixed + n_extra, loop_period (lp), cw, err);
}

static LwStatus
check_loop (const LwSynthLoop *lp, LwError *err)
{
  if (lp == NULL || (lp->n_fixed > 0 && lp->fixed == NULL)
      || (on_data (lp) ? lp->data_omega_rad_s == NULL || lp->data_p == NULL || lp->data_n < 2
                         || !(lp->data_period_s > 0.0) || !isfinite (lp->data_period_s)
                       : lp->plant == NULL))
    return lw_error_set (err, LW_ERR_INVALID, -1, "missing plant, data or stages");
  if (lp->compute_delay < 0 || lp->compute_delay > 100000)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the computation delay must be a whole number of samples from 0 to 100000");
  return LW_OK;
}

static LwStatus
check_nu (double nu, LwError *err)
{
  if (!(nu > 0.0) || !isfinite (nu))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the crossover must be a finite w-plane frequency > 0 rad/s");
  return LW_OK;
}

/* Evaluation of the loop with controller cw (in w). */
static LwStatus
evaluate_w (const LwSynthLoop *lp, const LwModel *cw, size_t n_steps, LwEvaluation **ev,
            LwError *err)
{
  LwModel *cz = lw_model_w_to_z (cw);
  if (cz == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
  LwAnalysisOptions o;
  lw_analysis_options_init (&o);
  o.compute_delay = lp->compute_delay;
  o.n_steps = n_steps;
  LwStatus st = lw_evaluate (lp->plant, cz, &o, ev, err);
  lw_model_free (cz);
  return st;
}

/* L(jν) exactly (see lw-synth.h). */
static double complex
loop_value (const LwSynthLoop *lp, const LwModel *cw, double nu)
{
  double t = lw_sampled_plant_period (lp->plant);
  double w = lw_warp_nu_to_omega (nu, t);
  return lw_model_eval (cw, I * nu) * lw_sampled_plant_response (lp->plant, w)
         * cexp (-I * w * t * lp->compute_delay);
}

/* The loop on the data with controller cw (in w): L = z^−N·C·P at every point (C(z) on the
 * unit circle is C_w(jν) exactly); a new array of lp->data_n values. */
static LwStatus
data_loop (const LwSynthLoop *lp, const LwModel *cw, double complex **out, LwError *err)
{
  double t = lp->data_period_s;
  double complex *l = malloc (lp->data_n * sizeof *l);
  if (l == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
  for (size_t i = 0; i < lp->data_n; i++)
    {
      double w = lp->data_omega_rad_s[i];
      l[i] = lw_model_eval (cw, I * lw_warp_omega_to_nu (w, t)) * lp->data_p[i]
             * cexp (-I * w * t * lp->compute_delay);
    }
  *out = l;
  return LW_OK;
}

/* Unwrapped phase (degrees) at ω: the exact value's principal argument, on the branch nearest
 * the linear interpolation of the evaluation's unwrapped grid phase. */
static double
unwrapped_phase (const LwEvaluation *ev, double omega, double complex l)
{
  size_t n = ev->n_points, lo = 0, hi = n - 1;
  const double *g = ev->omega_rad_s, *ph = ev->loop_phase_deg;
  double ref;
  if (omega <= g[0])
    ref = ph[0];
  else if (omega >= g[hi])
    ref = ph[hi];
  else
    {
      while (hi - lo > 1)
        {
          size_t mid = (lo + hi) / 2;
          if (g[mid] <= omega)
            lo = mid;
          else
            hi = mid;
        }
      ref = ph[lo] + (ph[hi] - ph[lo]) * (omega - g[lo]) / (g[hi] - g[lo]);
    }
  double a = carg (l) * RAD2DEG;
  return a - 360.0 * round ((a - ref) / 360.0);
}

/* |L(jν)| and the unwrapped ∠L(jν) on the plant's model, controller cw (in w). */
static LwStatus
model_loop_at (const LwSynthLoop *lp, const LwModel *cw, double nu_rad_s, double *mag,
               double *phase_deg, LwError *err)
{
  double complex l = loop_value (lp, cw, nu_rad_s);
  if (mag != NULL)
    *mag = cabs (l);
  if (phase_deg == NULL)
    return LW_OK;
  LwEvaluation *ev = NULL;
  LwStatus st = evaluate_w (lp, cw, 2, &ev, err);
  if (st == LW_OK)
    *phase_deg = unwrapped_phase (ev, lw_warp_nu_to_omega (nu_rad_s, loop_period (lp)), l);
  lw_evaluation_free (ev);
  return st;
}

LwStatus
lw_synth_loop_response (const LwSynthLoop *lp, const LwStage *extra, size_t n_extra,
                        double nu_rad_s, double *mag, double *phase_deg, LwError *err)
{
  LwStatus st = check_loop (lp, err);
  if (st == LW_OK)
    st = check_nu (nu_rad_s, err);
  if (st != LW_OK)
    return st;
  LwModel *cw = NULL;
  st = loop_controller (lp, extra, n_extra, &cw, err);
  if (st != LW_OK)
    return st;
  if (on_data (lp))
    {
      double complex *l = NULL;
      st = data_loop (lp, cw, &l, err);
      if (st == LW_OK)
        st = lw_measured_loop_at (lp->data_omega_rad_s, l, lp->data_n,
                                  lw_warp_nu_to_omega (nu_rad_s, lp->data_period_s), mag,
                                  phase_deg, err);
      free (l);
    }
  else
    st = model_loop_at (lp, cw, nu_rad_s, mag, phase_deg, err);
  lw_model_free (cw);
  if (st == LW_OK && mag != NULL && !(isfinite (*mag) && *mag > 0.0))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the loop gain at %.6g rad/s is %g: no gain can put the crossover there",
                         nu_rad_s, *mag);
  return st;
}

LwStatus
lw_synth_crossover_gain (const LwSynthLoop *lp, double nu_c_rad_s, LwStage *gain_out,
                         LwError *err)
{
  double mag = NAN;
  LwStatus st = lw_synth_loop_response (lp, NULL, 0, nu_c_rad_s, &mag, NULL, err);
  if (st != LW_OK)
    return st;
  *gain_out = lw_stage_gain (1.0 / mag);
  lw_stage_set_label (gain_out, "crossover gain");
  return LW_OK;
}

/* ---- lead --------------------------------------------------------------------------------- */

void
lw_lead_options_init (LwLeadOptions *o)
{
  o->safety_deg = 5.0;
  o->split_above_deg = 60.0;
  o->refuse_above_deg = 120.0;
  o->max_passes = 20;
}

/* Re-solves the gain stage s[0] so that |L(jν_c)| = 1 with stages s[1 …]. Returns the old
 * |L(jν_c)|. */
static LwStatus
resolve_gain (const LwSynthLoop *lp, LwStage *s, size_t n, double nu, double *mag_before,
              LwError *err)
{
  double mag = NAN;
  LwStatus st = lw_synth_loop_response (lp, s, n, nu, &mag, NULL, err);
  if (st != LW_OK)
    return st;
  *mag_before = mag;
  s[0].p.gain.ratio /= mag;
  return LW_OK;
}

/* The figures reached on the data: the margins between the points (lw_measured_margins);
 * takes cw. */
static LwStatus
lead_reached_on_data (const LwSynthLoop *lp, LwModel *cw, LwLeadDesign *out, LwError *err)
{
  double complex *l = NULL;
  LwStatus st = data_loop (lp, cw, &l, err);
  lw_model_free (cw);
  if (st != LW_OK)
    return st;
  LwMeasuredMargins m;
  st = lw_measured_margins (lp->data_omega_rad_s, l, NULL, lp->data_n, &m, err);
  free (l);
  if (st != LW_OK)
    return st;
  out->stable = false;
  out->has_phase_margin = m.n_gain > 0;
  out->phase_margin_deg = m.phase_margin_deg;
  out->gain_crossover_rad_s = m.gain_crossover_rad_s;
  out->has_gain_margin = m.n_phase > 0;
  out->gain_margin_db = m.gain_margin_db;
  out->phase_crossover_rad_s = m.phase_crossover_rad_s;
  out->n_gain_crossovers = m.n_gain;
  lw_measured_margins_clear (&m);
  return LW_OK;
}

LwStatus
lw_synth_lead (const LwSynthLoop *lp, double pm_target_deg, double nu_c_rad_s,
               const LwLeadOptions *opts, LwLeadDesign *out, LwError *err)
{
  memset (out, 0, sizeof *out);
  LwLeadOptions def;
  if (opts == NULL)
    {
      lw_lead_options_init (&def);
      opts = &def;
    }
  LwStatus st = check_loop (lp, err);
  if (st == LW_OK)
    st = check_nu (nu_c_rad_s, err);
  if (st != LW_OK)
    return st;
  if (!(pm_target_deg > 0.0 && pm_target_deg < 180.0))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the phase-margin target must be between 0 and 180 degrees");
  if (!(opts->safety_deg >= 0.0 && opts->safety_deg < 90.0))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the safety angle must be 0 to 90 degrees");
  if (!(opts->split_above_deg > 0.0 && opts->split_above_deg < 90.0
        && opts->refuse_above_deg >= opts->split_above_deg && opts->refuse_above_deg < 180.0
        && opts->max_passes >= 2))
    return lw_error_set (err, LW_ERR_INVALID, -1, "invalid lead options");

  double t = loop_period (lp);
  out->nu_c_rad_s = nu_c_rad_s;
  out->omega_c_rad_s = lw_warp_nu_to_omega (nu_c_rad_s, t);
  out->pm_target_deg = pm_target_deg;

  double phase = NAN;
  st = lw_synth_loop_response (lp, NULL, 0, nu_c_rad_s, NULL, &phase, err);
  if (st != LW_OK)
    return st;
  out->pm_before_deg = 180.0 + phase;
  out->required_deg = pm_target_deg - out->pm_before_deg;
  out->lead_total_deg = out->required_deg + opts->safety_deg;
  if (out->lead_total_deg > opts->refuse_above_deg)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the loop needs %.4g degrees of phase lead at %.6g rad/s (w-plane) "
                         "for a %.4g degree phase margin (%.4g required + %.4g safety), more "
                         "than the %.4g degrees leads can give; choose a lower crossover or add "
                         "stages first",
                         out->lead_total_deg, nu_c_rad_s, pm_target_deg, out->required_deg,
                         opts->safety_deg, opts->refuse_above_deg);
  out->n_leads = out->lead_total_deg <= 0.0 ? 0
                 : out->lead_total_deg > opts->split_above_deg ? 2 : 1;

  /* pass 1: K0 alone puts the crossover at ν_c */
  LwStage *s = out->stages;
  st = lw_synth_crossover_gain (lp, nu_c_rad_s, &s[0], err);
  if (st != LW_OK)
    return st;
  out->n_stages = 1 + out->n_leads;
  out->passes = 1;
  if (out->n_leads > 0)
    {
      double lead_phase = out->lead_total_deg;
      for (int pass = 2; pass <= opts->max_passes; pass++)
        {
          /* the lead from the phase still missing at ν_c (its own phase excluded) */
          out->lead_each_deg = lead_phase / (double) out->n_leads;
          for (size_t i = 0; i < out->n_leads; i++)
            {
              s[1 + i] = lw_stage_lead_centred (nu_c_rad_s, out->lead_each_deg);
              lw_stage_set_label (&s[1 + i], out->n_leads == 1 ? "lead" : i == 0 ? "lead 1"
                                                                                    : "lead 2");
            }
          double mag = NAN;
          st = resolve_gain (lp, s, out->n_stages, nu_c_rad_s, &mag, err);
          if (st != LW_OK)
            return st;
          double ph_now = NAN;
          st = lw_synth_loop_response (lp, s, out->n_stages, nu_c_rad_s, NULL, &ph_now, err);
          if (st != LW_OK)
            return st;
          out->passes = pass;
          /* phase the leads must supply: target + safety − (phase without the leads) */
          double without = ph_now - out->lead_each_deg * (double) out->n_leads;
          double need = pm_target_deg + opts->safety_deg - (180.0 + without);
          if (fabs (mag - 1.0) <= 1e-12 && fabs (need - lead_phase) <= 1e-9)
            break;
          lead_phase = need;
        }
      out->alpha = lw_stage_leadlag_alpha (&s[1]);
    }

  /* what the design reaches, by a full evaluation */
  LwModel *cw = NULL;
  st = loop_controller (lp, s, out->n_stages, &cw, err);
  if (st != LW_OK)
    return st;
  if (on_data (lp))
    return lead_reached_on_data (lp, cw, out, err);
  LwEvaluation *ev = NULL;
  st = evaluate_w (lp, cw, 2, &ev, err);
  lw_model_free (cw);
  if (st != LW_OK)
    return st;
  out->stable = ev->stable;
  out->has_phase_margin = ev->margins.has_phase_margin;
  out->phase_margin_deg = ev->margins.phase_margin_deg;
  out->gain_crossover_rad_s = ev->margins.gain_crossover_rad_s;
  out->has_gain_margin = ev->margins.has_gain_margin;
  out->gain_margin_db = ev->margins.gain_margin_db;
  out->phase_crossover_rad_s = ev->margins.phase_crossover_rad_s;
  out->n_gain_crossovers = ev->margins.n_gain_crossovers;
  lw_evaluation_free (ev);
  return LW_OK;
}

/* ---- lag ---------------------------------------------------------------------------------- */

LwStatus
lw_synth_lag (double ratio, double nu_c_rad_s, double decades_below, LwLagDesign *out,
              LwError *err)
{
  memset (out, 0, sizeof *out);
  if (!(ratio > 1.0) || !isfinite (ratio))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the lag's gain ratio must be finite and > 1");
  LwStatus st = check_nu (nu_c_rad_s, err);
  if (st != LW_OK)
    return st;
  if (!(decades_below > 0.0) || !isfinite (decades_below))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the lag must sit a finite number of decades > 0 below the crossover");
  double z = nu_c_rad_s / pow (10.0, decades_below), p = z / ratio;
  out->ratio = ratio;
  out->stages[0] = lw_stage_gain (ratio);
  lw_stage_set_label (&out->stages[0], "lag gain");
  out->stages[1] = lw_stage_lag (z, p);
  lw_stage_set_label (&out->stages[1], "lag");
  double x = nu_c_rad_s;
  out->phase_at_crossover_deg = (atan (x / z) - atan (x / p)) * RAD2DEG;
  /* |β (1 + jx/z)/(1 + jx/p)| */
  double mag = ratio * sqrt ((1.0 + (x / z) * (x / z)) / (1.0 + (x / p) * (x / p)));
  out->gain_at_crossover_db = 20.0 * log10 (mag);
  return LW_OK;
}

/* ---- PI ----------------------------------------------------------------------------------- */

LwStatus
lw_synth_pi (const LwSynthLoop *lp, double nu_c_rad_s, double fraction, LwPiDesign *out,
             LwError *err)
{
  memset (out, 0, sizeof *out);
  if (!(fraction > 0.0 && fraction < 1.0))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the PI zero must sit at a fraction between 0 and 1 of the crossover");
  LwStage pi = lw_stage_pi (1.0, fraction * nu_c_rad_s);
  double mag = NAN;
  LwStatus st = lw_synth_loop_response (lp, &pi, 1, nu_c_rad_s, &mag, NULL, err);
  if (st != LW_OK)
    return st;
  pi.p.pi.gain = 1.0 / mag;
  lw_stage_set_label (&pi, "PI");
  out->pi = pi;
  out->phase_at_crossover_deg = -atan (fraction) * RAD2DEG;
  return LW_OK;
}

/* ---- notch -------------------------------------------------------------------------------- */

/* Common practice, no source: a notch deeper than 80 dB is of no use against a model's
 * uncertainty and only makes the zeros ill-placed. */
#define NOTCH_MAX_DEPTH_DB 80.0

static LwStatus
check_notch_limits (double period_s, double zeta_max, double zeta_notch, LwError *err)
{
  if (!(period_s > 0.0) || !isfinite (period_s))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the sample period must be finite and > 0 s");
  if (!(zeta_max > 0.0 && zeta_max < 1.0 && zeta_notch > zeta_max && zeta_notch <= 1.0))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "need 0 < zeta_max < 1 and zeta_max < zeta_notch <= 1");
  return LW_OK;
}

/* The notch on the s-plane pole p (positive imaginary part, below the Nyquist frequency):
 * see lw-synth.h. */
static void
notch_on_pole (double complex p, double period_s, double zeta_notch, LwNotchDesign *out)
{
  double complex w = (2.0 / period_s) * ctanh (p * period_s / 2.0);
  double nu0 = cabs (w), zeta = -creal (w) / nu0;
  out->found = true;
  out->plant_pole_re = creal (p);
  out->plant_pole_im = cimag (p);
  out->plant_damping_w = zeta;
  double depth = zeta > 0.0 ? 20.0 * log10 (zeta_notch / zeta) : NOTCH_MAX_DEPTH_DB;
  if (depth > NOTCH_MAX_DEPTH_DB)
    depth = NOTCH_MAX_DEPTH_DB;
  out->notch = lw_stage_notch (nu0, depth, 2.0 * zeta_notch * nu0);
  lw_stage_set_label (&out->notch, "notch");
}

LwStatus
lw_synth_notch_data (const double *omega_rad_s, const double complex *p, size_t n,
                     double period_s, double zeta_max, double zeta_notch,
                     LwMeasuredResonance *res, LwNotchDesign *out, LwError *err)
{
  memset (out, 0, sizeof *out);
  LwStatus st = check_notch_limits (period_s, zeta_max, zeta_notch, err);
  if (st == LW_OK)
    st = lw_measured_resonance (omega_rad_s, p, n, zeta_max, res, err);
  if (st != LW_OK || !res->found)
    return st;
  double wn = res->omega_n_rad_s, z = res->zeta;
  if (wn * sqrt (1.0 - z * z) * period_s >= LW_PI)
    return LW_OK;                      /* beyond the Nyquist frequency, as for a model */
  notch_on_pole (wn * (-z + I * sqrt (1.0 - z * z)), period_s, zeta_notch, out);
  return LW_OK;
}

LwStatus
lw_synth_notch (const LwModel *plant_s, double period_s, double zeta_max, double zeta_notch,
                LwNotchDesign *out, LwError *err)
{
  memset (out, 0, sizeof *out);
  if (plant_s == NULL || plant_s->domain != LW_DOMAIN_S)
    return lw_error_set (err, LW_ERR_INVALID, -1, "need a plant in s");
  LwStatus st = check_notch_limits (period_s, zeta_max, zeta_notch, err);
  if (st != LW_OK)
    return st;
  double best = INFINITY;
  for (size_t i = 0; i < plant_s->n_poles; i++)
    {
      double complex p = plant_s->poles[i];
      if (!(cimag (p) > 0.0))
        continue;
      if (cimag (p) * period_s >= LW_PI)
        continue;                      /* beyond the Nyquist frequency: aliased */
      double complex w = (2.0 / period_s) * ctanh (p * period_s / 2.0);
      double nu0 = cabs (w), zeta = -creal (w) / nu0;
      if (!(zeta < zeta_max) || !(zeta < best))
        continue;
      best = zeta;
      notch_on_pole (p, period_s, zeta_notch, out);
    }
  return LW_OK;
}
