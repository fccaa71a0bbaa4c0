/* lw-cmd-analyze.c — `loopwright-cli analyze`: a sampled loop given on the command line,
 * reported as text or JSON (docs/cli.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-cli-commands.h"
#include "lw-cli-common.h"
#include "lw-cli-json.h"

/* Common practice, no source: 10 to 30 samples per closed-loop rise time. */
#define SAMPLES_PER_RISE_MIN 10.0
#define SAMPLES_PER_RISE_MAX 30.0

static void
print_model (const char *label, const LwZpk *m, const char *remark)
{
  g_autofree char *text = lw_cli_format_zpk (m);
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
  for (size_t i = 0; i < m->n_gain_crossovers; i++)
    printf ("  %-26.6g %.4g\n", m->gain_crossovers_rad_s[i], m->phase_margins_deg[i]);
  printf ("  %-26s %s\n", "phase crossover (rad/s)", "gain margin (dB)");
  if (m->n_phase_crossovers == 0)
    printf ("  none\n");
  for (size_t i = 0; i < m->n_phase_crossovers; i++)
    printf ("  %-26.6g %.4g\n", m->phase_crossovers_rad_s[i], m->gain_margins_db[i]);

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
  printf ("\nClosed-loop poles (z-plane)\n");
  printf ("  %-34s %s\n", "pole", "|z|");
  size_t outside = 0;
  for (size_t i = 0; i < ev->n_closed_loop_poles; i++)
    {
      double complex p = ev->closed_loop_poles[i];
      double r = cabs (p);
      if (!(r < 1.0))
        outside++;
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
    printf ("  UNSTABLE: %zu pole(s) on or outside the unit circle\n", outside);
}

static void
print_step (const LwEvaluation *ev)
{
  const LwStep *s = &ev->step;
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
}

static void
print_report (const LwZpk *plant_s, double dead_time_s, const LwEvaluation *ev)
{
  double T = ev->period_s;
  printf ("Sampled loop: period T = %.6g s (%.6g Hz), computation delay %d sample(s), "
          "dead time %.6g s\n", T, 1.0 / T, ev->compute_delay, dead_time_s);

  printf ("\nPlant\n");
  print_model ("in s:", plant_s, NULL);
  print_model ("in z:", ev->plant_z, "(zero-order hold, with dead time)");
  print_model ("in w:", ev->plant_w, NULL);
  printf ("\nController\n");
  print_model ("in w:", ev->controller_w, NULL);
  print_model ("in z:", ev->controller_z, NULL);

  print_margins (ev);
  print_closed_loop (ev);
  print_step (ev);

  printf ("\n");
  if (ev->step.has_rise && ev->step.rise_time_s > 0.0)
    {
      double per_rise = ev->step.rise_time_s / T;
      if (per_rise < SAMPLES_PER_RISE_MIN)
        printf ("note: %.3g samples per closed-loop rise time, fewer than the usual 10 to 30 "
                "(common practice); consider a shorter period\n", per_rise);
      else if (per_rise > SAMPLES_PER_RISE_MAX)
        printf ("note: %.3g samples per closed-loop rise time, more than the usual 10 to 30 "
                "(common practice); a longer period would do\n", per_rise);
    }
  printf ("caution: simulation is not validation; commission with safe limits.\n");
}

/* ---- analyze ---------------------------------------------------------------------------- */

static const char analyze_help[] =
  "Usage: " LW_CLI_PROG " analyze --plant EXPR --period SECONDS [options]\n"
  "\n"
  "Discretizes a continuous plant with a zero-order hold, closes the loop through a\n"
  "controller and reports crossovers, margins, closed-loop poles and the step response.\n"
  "\n"
  "Options:\n"
  "  --plant EXPR             plant P(s), a proper rational expression in s (required)\n"
  "  --period SECONDS         sample period T in seconds, > 0 (required)\n"
  "  --compute-delay N        computation delay in whole samples, 0 to 1000 (default 1)\n"
  "  --dead-time SECONDS      plant input dead time in seconds, >= 0 (default 0)\n"
  "  --controller EXPR        controller C(w), proper, in the w-plane variable w (default 1)\n"
  "  --controller-z EXPR      controller C(z), proper, in z (instead of --controller)\n"
  "  --points N               frequency points up to pi/T, 16 to 1000000 (default 2000)\n"
  "  --steps N                step-response samples, 2 to 10000000 (default 500)\n"
  "  --json                   print the results as JSON instead of a report\n"
  "  -h, --help               show this help\n"
  "\n"
  "Expressions: numbers, the variable, + - * / ( ) and ^ with a whole exponent;\n"
  "write every product with '*', e.g. '40/(s*(s+8))'.\n"
  "Exit status: 0 success, 2 bad input, 1 internal failure.\n";

typedef struct
{
  LwCliLoopArgs loop;
  char *points;
  char *steps;
  gboolean json;
  gboolean help;
} AnalyzeArgs;

static int
analyze_run (void *data)
{
  const AnalyzeArgs *a = data;
  LwCliLoop lp;
  int status = lw_cli_loop_build ("analyze", &a->loop, &lp);
  if (status != LW_EXIT_OK)
    return status;
  LwAnalysisOptions opts;
  lw_analysis_options_init (&opts);
  opts.compute_delay = lp.compute_delay;
  gint64 v;
  LwEvaluation *ev = NULL;
  LwError err;
  lw_error_clear (&err);
  if (a->points != NULL)
    {
      if (!lw_cli_parse_integer ("--points", a->points, 16, 1000000, &v))
        {
          status = LW_EXIT_BAD_INPUT;
          goto out;
        }
      opts.n_points = (size_t) v;
    }
  if (a->steps != NULL)
    {
      if (!lw_cli_parse_integer ("--steps", a->steps, 2, 10000000, &v))
        {
          status = LW_EXIT_BAD_INPUT;
          goto out;
        }
      opts.n_steps = (size_t) v;
    }
  if (lw_evaluate (lp.sampled, lp.controller_z, &opts, &ev, &err) != LW_OK)
    {
      status = lw_cli_report_core_error ("analyze", &err);
      goto out;
    }
  if (a->json)
    {
      JsonNode *root = lw_cli_json_evaluation (ev);
      char *text = lw_cli_json_to_text (root);
      fputs (text, stdout);
      g_free (text);
      json_node_unref (root);
    }
  else
    print_report (lp.plant_s, lp.dead_time_s, ev);
out:
  lw_evaluation_free (ev);
  lw_cli_loop_clear (&lp);
  return status;
}

int
lw_cmd_analyze (int argc, char **argv)
{
  AnalyzeArgs a = { 0 };
  const GOptionEntry entries[] = {
    LW_CLI_LOOP_ENTRIES (&a.loop),
    { "points", 0, 0, G_OPTION_ARG_STRING, &a.points, NULL, NULL },
    { "steps", 0, 0, G_OPTION_ARG_STRING, &a.steps, NULL, NULL },
    { "json", 0, 0, G_OPTION_ARG_NONE, &a.json, NULL, NULL },
    { "help", 'h', 0, G_OPTION_ARG_NONE, &a.help, NULL, NULL },
    { NULL, 0, 0, 0, NULL, NULL, NULL }
  };
  int status = lw_cli_run_command ("analyze", argc, argv, entries, &a.help, analyze_help,
                                   analyze_run, &a);
  lw_cli_loop_args_clear (&a.loop);
  g_free (a.points);
  g_free (a.steps);
  return status;
}
