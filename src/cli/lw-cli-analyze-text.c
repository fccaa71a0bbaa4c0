/* lw-cli-analyze-text.c — the text report of `loopwright-cli analyze` for a model's loop:
 * the plant in s, z and w, the controller, every crossover and margin, the closed loop, the
 * step and the simulated responses (docs/cli.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-cli-analyze-text.h"
#include "lw-cli-common.h"
#include "lw-engine.h"

static void
print_model (const char *label, const LwModel *m, const char *remark)
{
  g_autofree char *text = lw_model_text (m);
  printf ("  %-14s %s%s%s\n", label, text, remark ? "    " : "", remark ? remark : "");
}

static double
db_of_ratio (double r)
{
  return 20.0 * log10 (r);
}

static void
print_margins (const LwEvaluation *ev)
{
  const LwMargins *m = &ev->margins;
  double T = ev->period_s;

  if (ev->compute_delay == 0)
    printf ("\nMargins of the loop L(z) = C(z) P(z), up to pi/T = %.6g rad/s\n", G_PI / T);
  else
    printf ("\nMargins of the loop L(z) = z^-%d C(z) P(z), up to pi/T = %.6g rad/s\n",
            ev->compute_delay, G_PI / T);
  printf ("  %-26s %s\n", "gain crossover (rad/s)", "phase margin (deg)");
  if (m->n_gain_crossovers == 0)
    printf ("  none\n");
  /* the text report lists at most LW_CLI_MAX_LISTED crossovers of each kind (a loop whose
   * |L| stays at 1 over a band listed every grid point); --json has them all */
  for (size_t i = 0; i < m->n_gain_crossovers && i < LW_CLI_MAX_LISTED; i++)
    printf ("  %-26.6g %.4g\n", m->gain_crossovers_rad_s[i], m->phase_margins_deg[i]);
  if (m->n_gain_crossovers > LW_CLI_MAX_LISTED)
    printf ("  ... and %zu more gain crossovers (all of them with --json)\n",
            m->n_gain_crossovers - LW_CLI_MAX_LISTED);
  printf ("  %-26s %s\n", "phase crossover (rad/s)", "gain margin (dB)");
  if (m->n_phase_crossovers == 0)
    printf ("  none\n");
  for (size_t i = 0; i < m->n_phase_crossovers && i < LW_CLI_MAX_LISTED; i++)
    printf ("  %-26.6g %.4g\n", m->phase_crossovers_rad_s[i], m->gain_margins_db[i]);
  if (m->n_phase_crossovers > LW_CLI_MAX_LISTED)
    printf ("  ... and %zu more phase crossovers (all of them with --json)\n",
            m->n_phase_crossovers - LW_CLI_MAX_LISTED);
  if (m->n_unresolved_bands > 0)
    {
      /* docs/conventions.md: where the error of L is above 1e-6 of |L| */
      printf ("  not resolved in double precision: %zu band(s) of frequency", m->n_unresolved_bands);
      if (m->n_unresolved_gain_crossovers + m->n_unresolved_phase_crossovers > 0)
        printf (", with %zu possible gain and %zu possible phase crossover(s) not listed",
                m->n_unresolved_gain_crossovers, m->n_unresolved_phase_crossovers);
      printf ("\n");
      for (size_t i = 0; i < m->n_unresolved_bands && i < 8; i++)
        printf ("    %.6g to %.6g rad/s\n", m->unresolved_bands_rad_s[2 * i],
                m->unresolved_bands_rad_s[2 * i + 1]);
      if (m->n_unresolved_bands > 8)
        printf ("    ... (%zu more in --json)\n", m->n_unresolved_bands - 8);
    }

  printf ("\n");
  if (m->has_phase_margin)
    printf ("  %-24s %.4g deg at %.6g rad/s\n", "phase margin", m->phase_margin_deg,
            m->gain_crossover_rad_s);
  else
    printf ("  %-24s none (no gain crossover)\n", "phase margin");
  if (m->has_gain_margin)
    printf ("  %-24s %.4g dB at %.6g rad/s\n", "gain margin", m->gain_margin_db,
            m->phase_crossover_rad_s);
  else
    printf ("  %-24s none (no phase crossover)\n", "gain margin");
  if (m->has_delay_margin)
    printf ("  %-24s %.6g s = %.4g samples\n", "delay margin", m->delay_margin_s,
            m->delay_margin_samples);
  else
    printf ("  %-24s none\n", "delay margin");
  if (m->has_sensitivity)
    printf ("  %-24s %.4g (%.3g dB) at %.6g rad/s\n", "sensitivity peak |S|",
            m->sensitivity_peak, db_of_ratio (m->sensitivity_peak), m->sensitivity_peak_rad_s);
  else
    printf ("  %-24s none\n", "sensitivity peak |S|");
  if (m->has_bandwidth)
    printf ("  %-24s %.6g rad/s (-3 dB)\n", "closed-loop bandwidth", m->bandwidth_rad_s);
  else
    printf ("  %-24s none found up to pi/T\n", "closed-loop bandwidth");
}

static void
print_closed_loop (const LwEvaluation *ev)
{
  if (ev->closed_loop_poles_complete)
    printf ("\nClosed-loop poles (z-plane)\n");
  else
    printf ("\nClosed-loop poles (z-plane): the %zu dominant (largest |z|) of %zu; stability "
            "from the Nyquist count\n", ev->n_closed_loop_poles, ev->closed_loop_order);
  printf ("  %-34s %s\n", "pole", "|z|");
  for (size_t i = 0; i < ev->n_closed_loop_poles; i++)
    {
      double complex p = ev->closed_loop_poles[i];
      double r = cabs (p);
      char buf[64];
      if (cimag (p) == 0.0)
        g_snprintf (buf, sizeof buf, "%.8g", creal (p));
      else
        g_snprintf (buf, sizeof buf, "%.8g %c %.8gj", creal (p), cimag (p) < 0 ? '-' : '+',
                    fabs (cimag (p)));
      printf ("  %-34s %.8g\n", buf, r);
    }
  if (ev->n_closed_loop_poles == 0)
    printf ("  none\n");
  if (ev->stable)
    printf ("  stable: every pole strictly inside the unit circle\n");
  else
    printf ("  UNSTABLE: %zu pole(s) on or outside the unit circle\n",
            ev->n_closed_loop_unstable);
}

static void
print_step (const LwEvaluation *ev, const LwStep *s, double dead_time_s)
{
  double T = ev->period_s;
  printf ("\nUnit step response, unity feedback (%zu samples, %.6g s)\n", s->n,
          s->n > 0 ? (double) (s->n - 1) * T : 0.0);
  if (s->has_final)
    printf ("  %-24s %.6g\n", "final value", s->final_value);
  else
    printf ("  %-24s none (the loop is not stable)\n", "final value");
  if (s->has_overshoot)
    printf ("  %-24s %.4g %%\n", "overshoot", s->overshoot_pct);
  else
    printf ("  %-24s none\n", "overshoot");
  if (s->has_rise)
    printf ("  %-24s %.6g s (10 %% to 90 %%) = %.4g samples\n", "rise time", s->rise_time_s,
            s->rise_time_s / T);
  else
    printf ("  %-24s none within the simulated samples\n", "rise time");
  if (s->has_settling)
    printf ("  %-24s %.6g s (within 2 %%)\n", "settling time", s->settling_time_s);
  else
    printf ("  %-24s none within the simulated samples\n", "settling time");
  /* the output first moves at sample N + d (+ 1 with a fractional dead time and no
   * feedthrough); say so when the horizon ends before that */
  double delay = (double) ev->compute_delay + floor (dead_time_s / T + 1e-9);
  if (s->n > 0 && delay >= (double) (s->n - 1))
    printf ("  note: the loop's delay is %.0f samples, the response %zu samples: the output has "
            "not moved yet (use --steps greater than %.0f)\n", delay, s->n, delay);
}

static void
print_indices (const LwSimIndices *ix)
{
  printf ("    %-22s IAE %.6g, ISE %.6g, ITAE %.6g, effort %.6g\n", "indices", ix->iae, ix->ise,
          ix->itae, ix->control_effort);
}

static void
print_disturbance (const char *title, const LwSimResponse *r)
{
  printf ("  %s\n", title);
  printf ("    %-22s %.6g at %.6g s\n", "peak output", r->peak, r->peak_time_s);
  printf ("    %-22s %.6g\n", "last sample", r->y[r->n - 1]);
  if (r->n_saturated > 0)
    printf ("    %-22s %zu\n", "samples at the limit", r->n_saturated);
  print_indices (&r->indices);
}

/* The time-domain verification section (docs/simulation.md). */
static void
print_verification (const LwSimOptions *so, double reference_step, const LwSimResponse *ref,
                    const LwSimResponse *din, const LwSimResponse *dout)
{
  printf ("\nTime-domain verification (docs/simulation.md)\n");
  if (so->has_limits)
    printf ("  %-24s %.6g to %.6g, %s\n", "actuator limits", so->u_low, so->u_high,
            so->anti_windup ? "anti-windup by clamping" : "no anti-windup");
  else
    printf ("  %-24s none\n", "actuator limits");
  double umax = 0.0;
  for (size_t k = 0; k < ref->n; k++)
    if (fabs (ref->u[k]) > fabs (umax))
      umax = ref->u[k];
  if (reference_step == 1.0)
    printf ("  unit reference step\n");
  else
    printf ("  reference step of %.6g (output in units of r)\n", reference_step);
  printf ("    %-22s %.6g\n", "peak actuator", umax);
  if (so->has_limits)
    printf ("    %-22s %zu (integrators held at %zu)\n", "samples at the limit",
            ref->n_saturated, ref->n_held);
  if (ref->has_continuous)
    {
      printf ("    %-22s %.6g at %.6g s (sampled peak %.6g)\n", "continuous peak",
              ref->continuous_peak, ref->continuous_peak_time_s, ref->peak);
      printf ("    %-22s %.6g (%zu sub-steps per sample)\n", "intersample ripple",
              ref->intersample_ripple, so->substeps);
    }
  print_indices (&ref->indices);
  print_disturbance ("unit input-disturbance step (at the plant input)", din);
  print_disturbance ("unit output-disturbance step (at the plant output)", dout);
}

/* The remark on a factored form of the plant that is not the plant (lw_sampled_plant_form_error
 * above LW_FORM_TOLERANCE) or could not be checked (NAN); `otherwise` when it is. g_free. */
static char *
form_remark (double form_error, const char *otherwise)
{
  if (isnan (form_error))
    return g_strdup ("(NOT VERIFIED: the plant's own response could not be resolved to check "
                     "this factored form against; every figure comes from that response)");
  if (!(form_error > LW_FORM_TOLERANCE))
    return g_strdup (otherwise);
  return g_strdup_printf ("(ILL-CONDITIONED: this factored form differs from the plant by up "
                          "to %.2g relative; every figure comes from the plant's own "
                          "response)", form_error);
}

void
lw_cli_analyze_print_report (const LwModel *plant_s, double dead_time_s, const LwEvaluation *ev,
              const LwStep *step, const LwSimOptions *so, double reference_step,
              const LwSimResponse *ref, const LwSimResponse *din, const LwSimResponse *dout,
              double z_form_error, double w_form_error)
{
  double T = ev->period_s;
  printf ("Sampled loop: period T = %.6g s (%.6g Hz), computation delay %d sample(s), "
          "dead time %.6g s\n", T, 1.0 / T, ev->compute_delay, dead_time_s);

  printf ("\nPlant\n");
  print_model ("in s:", plant_s, NULL);
  g_autofree char *rz = form_remark (z_form_error, "(zero-order hold, with dead time)");
  g_autofree char *rw = form_remark (w_form_error, NULL);
  print_model ("in z:", ev->plant_z, rz);
  print_model ("in w:", ev->plant_w, rw);
  printf ("\nController\n");
  print_model ("in w:", ev->controller_w, NULL);
  print_model ("in z:", ev->controller_z, NULL);

  print_margins (ev);
  print_closed_loop (ev);
  print_step (ev, step, dead_time_s);
  print_verification (so, reference_step, ref, din, dout);

  printf ("\n");
  double per_rise;
  switch (lw_engine_sampling_advice (step, T, &per_rise))
    {
    case LW_SAMPLING_ADVICE_TOO_FEW:
      printf ("note: %.3g samples per closed-loop rise time, fewer than the usual 10 to 30 "
              "(common practice); consider a shorter period\n", per_rise);
      break;
    case LW_SAMPLING_ADVICE_TOO_MANY:
      printf ("note: %.3g samples per closed-loop rise time, more than the usual 10 to 30 "
              "(common practice); a longer period would do\n", per_rise);
      break;
    case LW_SAMPLING_ADVICE_NONE:
      break;
    }
  double ring;
  if (lw_engine_ringing_pole (ev->controller_z, &ring))
    printf ("note: the controller has a pole at z = %.6g on the negative real axis: it rings "
            "at half the sample rate (pi/T = %.6g rad/s); a filter faster than the loop can "
            "sample (e.g. N/Td > 2/T) belongs at a lower frequency\n", ring, G_PI / T);
  printf ("caution: simulation is not validation; commission with safe limits.\n");
}
