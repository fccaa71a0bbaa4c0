/* loopwright-cli — the headless command-line tool.
 *
 *   loopwright-cli analyze --plant EXPR --period T [options]
 *
 * Exit status: 0 success, 2 bad input (message on stderr naming the option and, for an
 * expression, the character position), 1 internal failure (a numerical method failed, out of
 * memory, output could not be written).  Documented in docs/cli.md.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <errno.h>
#include <locale.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <glib.h>

#include "lw-analysis.h"
#include "lw-cli-json.h"
#include "lw-expr.h"
#include "lw-model.h"

#define PROG "loopwright-cli"

enum
{
  EXIT_OK = 0,
  EXIT_INTERNAL = 1,
  EXIT_BAD_INPUT = 2
};

/* Common practice, no source: 10 to 30 samples per closed-loop rise time. */
#define SAMPLES_PER_RISE_MIN 10.0
#define SAMPLES_PER_RISE_MAX 30.0

static void bad_input (const char *place, const char *fmt, ...) G_GNUC_PRINTF (2, 3);

static void
bad_input (const char *place, const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  g_autofree char *msg = g_strdup_vprintf (fmt, ap);
  va_end (ap);
  if (place != NULL)
    g_printerr ("%s: %s: %s\n", PROG, place, msg);
  else
    g_printerr ("%s: %s\n", PROG, msg);
}

/* ---- numbers ---------------------------------------------------------------------------- */

/* Parses a whole, finite decimal number (locale-independent). Prints the message and returns
 * false on failure. */
static bool
parse_double (const char *option, const char *text, double *out)
{
  char *end = NULL;
  errno = 0;
  double v = g_ascii_strtod (text, &end);
  if (end == text || *end != '\0')
    {
      bad_input (option, "'%s' is not a number", text);
      return false;
    }
  if (!isfinite (v))
    {
      bad_input (option, "'%s' is not a finite number", text);
      return false;
    }
  *out = v;
  return true;
}

/* Parses a whole decimal integer in [lo, hi]. */
static bool
parse_integer (const char *option, const char *text, gint64 lo, gint64 hi, gint64 *out)
{
  char *end = NULL;
  errno = 0;
  gint64 v = g_ascii_strtoll (text, &end, 10);
  if (end == text || *end != '\0')
    {
      bad_input (option, "'%s' is not a whole number", text);
      return false;
    }
  if (errno == ERANGE || v < lo || v > hi)
    {
      bad_input (option, "%s is out of range: must be from %" G_GINT64_FORMAT
                 " to %" G_GINT64_FORMAT, text, lo, hi);
      return false;
    }
  *out = v;
  return true;
}

/* ---- expressions ------------------------------------------------------------------------ */

/* Number of characters (UTF-8 code points when the text is valid UTF-8, else bytes) in the
 * first `byte_pos` bytes of text. */
static long
chars_before (const char *text, size_t byte_pos)
{
  if (g_utf8_validate (text, (gssize) byte_pos, NULL))
    return g_utf8_strlen (text, (gssize) byte_pos);
  return (long) byte_pos;
}

/* Core messages name 0-based offsets as " at position N" or " at N" (lw-expr.c, lw-expr.h).
 * The command line speaks of 1-based characters only, so each becomes " at character N+1"
 * (N is a byte offset into text; characters are counted as UTF-8 code points). Returns true
 * when the message names the error's own position, so nothing needs to be appended. */
static bool
rewrite_positions (const char *msg, const char *text, int position, GString *out)
{
  size_t len = strlen (text);
  bool names_own = false;
  const char *p = msg;
  while (*p != '\0')
    {
      size_t skip = 0;
      if (g_str_has_prefix (p, " at position "))
        skip = strlen (" at position ");
      else if (g_str_has_prefix (p, " at "))
        skip = strlen (" at ");
      if (skip > 0 && g_ascii_isdigit (p[skip]))
        {
          char *end = NULL;
          gint64 n = g_ascii_strtoll (p + skip, &end, 10);
          if (*end != '.' && !g_ascii_isalnum (*end) && n >= 0 && (guint64) n <= len)
            {
              g_string_append_printf (out, " at character %ld",
                                      chars_before (text, (size_t) n) + 1);
              names_own = names_own || n == position;
              p = end;
              continue;
            }
        }
      g_string_append_c (out, *p++);
    }
  return names_own;
}

/* Reports a failed parse of `text` given to `option`: the message, the 1-based character
 * position, and the expression with a caret under that position. Returns the exit status. */
static int
report_expr_error (const char *option, const char *text, const LwError *err)
{
  if (err->code == LW_ERR_NOMEM || err->code == LW_ERR_NUMERIC)
    {
      bad_input (option, "internal failure while reading the expression: %s", err->message);
      return EXIT_INTERNAL;
    }
  char msg[LW_ERROR_MESSAGE_MAX];
  g_strlcpy (msg, err->message[0] != '\0' ? err->message : "invalid expression", sizeof msg);
  size_t len = strlen (text);
  if (err->position < 0)
    {
      bad_input (option, "%s", msg);
      return EXIT_BAD_INPUT;
    }
  size_t pos = (size_t) err->position <= len ? (size_t) err->position : len;
  long column = chars_before (text, pos);   /* 0-based characters before the position */
  GString *rewritten = g_string_new (NULL);
  bool has_own = rewrite_positions (msg, text, err->position, rewritten);
  bool has_other = strstr (rewritten->str, " at character ") != NULL;
  if (has_own)
    bad_input (option, "%s", rewritten->str);
  else if (has_other)
    bad_input (option, "%s (error at character %ld)", rewritten->str, column + 1);
  else
    bad_input (option, "%s at character %ld", rewritten->str, column + 1);
  g_string_free (rewritten, TRUE);

  /* The expression on one line (control characters shown as spaces), then the caret. Tabs
   * are kept in both lines so the caret stays aligned. */
  GString *shown = g_string_new ("    ");
  GString *caret = g_string_new ("    ");
  for (size_t i = 0; i < len; i++)
    {
      unsigned char c = (unsigned char) text[i];
      g_string_append_c (shown, (c < 0x20 && c != '\t') || c == 0x7f ? ' ' : (char) c);
      /* one caret column per character: skip UTF-8 continuation bytes */
      if (i < pos && (c & 0xC0) != 0x80)
        g_string_append_c (caret, c == '\t' ? '\t' : ' ');
    }
  g_string_append_c (caret, '^');
  g_printerr ("%s\n%s\n", shown->str, caret->str);
  g_string_free (shown, TRUE);
  g_string_free (caret, TRUE);
  return EXIT_BAD_INPUT;
}

/* Exit status for a failed core call outside parsing. */
static int
report_core_error (const char *place, const LwError *err)
{
  if (err->code == LW_ERR_PARSE || err->code == LW_ERR_INVALID)
    {
      bad_input (place, "%s", err->message);
      return EXIT_BAD_INPUT;
    }
  bad_input (place, "internal failure: %s", err->message[0] ? err->message : "unknown error");
  return EXIT_INTERNAL;
}

/* ---- text report ------------------------------------------------------------------------ */

static char *
format_zpk (const LwZpk *m)
{
  char small[256];
  size_t need = lw_zpk_format (m, 6, small, sizeof small);
  if (need < sizeof small)
    return g_strdup (small);
  char *big = g_malloc (need + 1);
  lw_zpk_format (m, 6, big, need + 1);
  return big;
}

static void
print_model (const char *label, const LwZpk *m, const char *remark)
{
  g_autofree char *text = format_zpk (m);
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
  "Usage: " PROG " analyze --plant EXPR --period SECONDS [options]\n"
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
  char *plant;
  char *period;
  char *compute_delay;
  char *dead_time;
  char *controller;
  char *controller_z;
  char *points;
  char *steps;
  gboolean json;
  gboolean help;
} AnalyzeArgs;

static void
analyze_args_clear (AnalyzeArgs *a)
{
  g_free (a->plant);
  g_free (a->period);
  g_free (a->compute_delay);
  g_free (a->dead_time);
  g_free (a->controller);
  g_free (a->controller_z);
  g_free (a->points);
  g_free (a->steps);
}

static int
analyze_run (const AnalyzeArgs *a)
{
  /* numbers first, in the order of the help text */
  if (a->plant == NULL)
    {
      bad_input ("analyze", "--plant is required (see '" PROG " analyze --help')");
      return EXIT_BAD_INPUT;
    }
  if (a->period == NULL)
    {
      bad_input ("analyze", "--period is required (see '" PROG " analyze --help')");
      return EXIT_BAD_INPUT;
    }
  double period_s;
  if (!parse_double ("--period", a->period, &period_s))
    return EXIT_BAD_INPUT;
  if (!(period_s > 0.0))
    {
      bad_input ("--period", "must be greater than 0 seconds, got %s", a->period);
      return EXIT_BAD_INPUT;
    }
  LwAnalysisOptions opts;
  lw_analysis_options_init (&opts);
  gint64 v;
  if (a->compute_delay != NULL)
    {
      if (!parse_integer ("--compute-delay", a->compute_delay, 0, 1000, &v))
        return EXIT_BAD_INPUT;
      opts.compute_delay = (int) v;
    }
  double dead_time_s = 0.0;
  if (a->dead_time != NULL)
    {
      if (!parse_double ("--dead-time", a->dead_time, &dead_time_s))
        return EXIT_BAD_INPUT;
      if (!(dead_time_s >= 0.0))
        {
          bad_input ("--dead-time", "must be 0 or more seconds, got %s", a->dead_time);
          return EXIT_BAD_INPUT;
        }
      dead_time_s += 0.0;   /* -0 becomes +0 */
    }
  if (a->controller != NULL && a->controller_z != NULL)
    {
      bad_input ("--controller-z", "cannot be combined with --controller; give one of them");
      return EXIT_BAD_INPUT;
    }
  if (a->points != NULL)
    {
      if (!parse_integer ("--points", a->points, 16, 1000000, &v))
        return EXIT_BAD_INPUT;
      opts.n_points = (size_t) v;
    }
  if (a->steps != NULL)
    {
      if (!parse_integer ("--steps", a->steps, 2, 10000000, &v))
        return EXIT_BAD_INPUT;
      opts.n_steps = (size_t) v;
    }

  int status = EXIT_OK;
  LwError err;
  lw_error_clear (&err);
  LwZpk *plant_s = NULL, *controller_w = NULL, *controller_z = NULL;
  LwSampledPlant *sampled = NULL;
  LwEvaluation *ev = NULL;

  if (lw_expr_parse_proper (a->plant, LW_DOMAIN_S, 0.0, &plant_s, &err) != LW_OK)
    {
      status = report_expr_error ("--plant", a->plant, &err);
      goto out;
    }

  if (a->controller_z != NULL)
    {
      if (lw_expr_parse_proper (a->controller_z, LW_DOMAIN_Z, period_s, &controller_z, &err)
          != LW_OK)
        {
          status = report_expr_error ("--controller-z", a->controller_z, &err);
          goto out;
        }
    }
  else
    {
      const char *text = a->controller != NULL ? a->controller : "1";
      if (lw_expr_parse_proper (text, LW_DOMAIN_W, period_s, &controller_w, &err) != LW_OK)
        {
          status = report_expr_error ("--controller", text, &err);
          goto out;
        }
      /* A root at w = 2/T maps to z = infinity: refuse it here with a clear message. */
      double w_edge = 2.0 / period_s;
      for (size_t i = 0; i < controller_w->n_zeros + controller_w->n_poles; i++)
        {
          double complex r = i < controller_w->n_zeros
                               ? controller_w->zeros[i]
                               : controller_w->poles[i - controller_w->n_zeros];
          if (cabs (r - w_edge) <= 1e-12 * w_edge)
            {
              bad_input ("--controller", "a %s at w = 2/T = %.6g rad/s has no image in z",
                         i < controller_w->n_zeros ? "zero" : "pole", w_edge);
              status = EXIT_BAD_INPUT;
              goto out;
            }
        }
      controller_z = lw_zpk_w_to_z (controller_w);
      if (controller_z == NULL)
        {
          bad_input ("--controller", "internal failure: cannot map the controller to z");
          status = EXIT_INTERNAL;
          goto out;
        }
    }

  if (lw_sampled_plant_new (plant_s, dead_time_s, period_s, &sampled, &err) != LW_OK)
    {
      status = report_core_error ("--plant", &err);
      goto out;
    }
  if (lw_evaluate (sampled, controller_z, &opts, &ev, &err) != LW_OK)
    {
      status = report_core_error ("analyze", &err);
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
    print_report (plant_s, dead_time_s, ev);

out:
  lw_evaluation_free (ev);
  lw_sampled_plant_free (sampled);
  lw_zpk_free (controller_z);
  lw_zpk_free (controller_w);
  lw_zpk_free (plant_s);
  return status;
}

static int
cmd_analyze (int argc, char **argv)
{
  AnalyzeArgs a = { 0 };
  const GOptionEntry entries[] = {
    { "plant", 0, 0, G_OPTION_ARG_STRING, &a.plant, NULL, NULL },
    { "period", 0, 0, G_OPTION_ARG_STRING, &a.period, NULL, NULL },
    { "compute-delay", 0, 0, G_OPTION_ARG_STRING, &a.compute_delay, NULL, NULL },
    { "dead-time", 0, 0, G_OPTION_ARG_STRING, &a.dead_time, NULL, NULL },
    { "controller", 0, 0, G_OPTION_ARG_STRING, &a.controller, NULL, NULL },
    { "controller-z", 0, 0, G_OPTION_ARG_STRING, &a.controller_z, NULL, NULL },
    { "points", 0, 0, G_OPTION_ARG_STRING, &a.points, NULL, NULL },
    { "steps", 0, 0, G_OPTION_ARG_STRING, &a.steps, NULL, NULL },
    { "json", 0, 0, G_OPTION_ARG_NONE, &a.json, NULL, NULL },
    { "help", 'h', 0, G_OPTION_ARG_NONE, &a.help, NULL, NULL },
    { NULL, 0, 0, 0, NULL, NULL, NULL }
  };
  /* GOptionContext does the splitting (--opt value, --opt=value); our own help text and our
   * own number parsing, so every message names its option. */
  GOptionContext *ctx = g_option_context_new (NULL);
  g_option_context_set_help_enabled (ctx, FALSE);
  g_option_context_set_ignore_unknown_options (ctx, FALSE);
  g_option_context_add_main_entries (ctx, entries, NULL);
  GError *gerr = NULL;
  int status;
  if (!g_option_context_parse (ctx, &argc, &argv, &gerr))
    {
      bad_input ("analyze", "%s (see '" PROG " analyze --help')", gerr->message);
      g_error_free (gerr);
      status = EXIT_BAD_INPUT;
    }
  else if (a.help)
    {
      fputs (analyze_help, stdout);
      status = EXIT_OK;
    }
  else if (argc > 1)
    {
      bad_input ("analyze", "unexpected argument '%s' (see '" PROG " analyze --help')",
                 argv[1]);
      status = EXIT_BAD_INPUT;
    }
  else
    status = analyze_run (&a);
  g_option_context_free (ctx);
  analyze_args_clear (&a);
  return status;
}

/* ---- main ------------------------------------------------------------------------------- */

static const char main_help[] =
  "Usage: " PROG " COMMAND [options]\n"
  "\n"
  "Headless loop analysis for digital feedback controllers.\n"
  "\n"
  "Commands:\n"
  "  analyze      analyze a sampled loop given on the command line\n"
  "\n"
  "Options:\n"
  "  -h, --help   show this help\n"
  "  --version    show the version\n"
  "\n"
  "'" PROG " COMMAND --help' describes a command.\n";

int
main (int argc, char **argv)
{
  setlocale (LC_ALL, "");
  setlocale (LC_NUMERIC, "C");   /* numbers in and out are always written with a '.' */
  g_set_prgname (PROG);

  int status;
  if (argc < 2)
    {
      g_printerr ("%s", main_help);
      status = EXIT_BAD_INPUT;
    }
  else if (strcmp (argv[1], "--help") == 0 || strcmp (argv[1], "-h") == 0)
    {
      fputs (main_help, stdout);
      status = EXIT_OK;
    }
  else if (strcmp (argv[1], "--version") == 0)
    {
      printf ("%s %s\n", PROG, PACKAGE_VERSION);
      status = EXIT_OK;
    }
  else if (strcmp (argv[1], "analyze") == 0)
    status = cmd_analyze (argc - 1, argv + 1);
  else
    {
      bad_input (NULL, "unknown command or option '%s' (see '" PROG " --help')", argv[1]);
      status = EXIT_BAD_INPUT;
    }

  if (fflush (stdout) != 0 || ferror (stdout))
    {
      g_printerr ("%s: cannot write the output\n", PROG);
      if (status == EXIT_OK)
        status = EXIT_INTERNAL;
    }
  return status;
}
