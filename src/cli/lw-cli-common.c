/* lw-cli-common.c — shared by every loopwright-cli command; see lw-cli-common.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "lw-cli-common.h"
#include "lw-design.h"
#include "lw-expr.h"
#include "lw-number.h"

void
lw_cli_bad_input (const char *place, const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  g_autofree char *raw = g_strdup_vprintf (fmt, ap);
  va_end (ap);
  /* quoted user text may hold bytes that are not UTF-8: show them as U+FFFD */
  g_autofree char *msg = g_utf8_make_valid (raw, -1);
  if (place != NULL)
    g_printerr ("%s: %s: %s\n", LW_CLI_PROG, place, msg);
  else
    g_printerr ("%s: %s\n", LW_CLI_PROG, msg);
}

/* ---- numbers ---------------------------------------------------------------------------- */

/* One number in the syntax of lw-number.h (the same as in documents and expressions).
 * Prints the message and returns false on failure. */
bool
lw_cli_parse_double (const char *option, const char *text, double *out)
{
  switch (lw_number_parse (text, out))
    {
    case LW_NUMBER_OK:
      return true;
    case LW_NUMBER_NOT_FINITE:
      lw_cli_bad_input (option, "'%s' is not a finite number (beyond about 1.8e308)", text);
      return false;
    case LW_NUMBER_TOO_LONG:
      lw_cli_bad_input (option, "'%s' is too long for a number (at most %d characters)", text,
                        LW_NUMBER_MAX_CHARS);
      return false;
    case LW_NUMBER_SYNTAX:
    default:
      {
        const char *t = text + (text[0] == '+' || text[0] == '-');
        if (g_ascii_strcasecmp (t, "inf") == 0 || g_ascii_strcasecmp (t, "infinity") == 0
            || g_ascii_strcasecmp (t, "nan") == 0)
          lw_cli_bad_input (option, "'%s' is not a finite number", text);
        else if (g_ascii_strncasecmp (t, "0x", 2) == 0)
          lw_cli_bad_input (option, "'%s' is not a number: hexadecimal is not accepted (write "
                            "decimal digits, e.g. 16)", text);
        else if (text[0] != '\0' && (g_ascii_isspace (text[0])
                                     || g_ascii_isspace (text[strlen (text) - 1])))
          lw_cli_bad_input (option, "'%s' is not a number: remove the spaces around it", text);
        else
          lw_cli_bad_input (option, "'%s' is not a number (decimal digits with an optional "
                            "sign, '.' and exponent, e.g. 0.002 or 2e-3)", text);
        return false;
      }
    }
}

/* A whole number in [lo, hi]: an optional sign and digits (as in documents, xsd:integer). */
bool
lw_cli_parse_integer (const char *option, const char *text, gint64 lo, gint64 hi, gint64 *out)
{
  long long v = 0;
  bool whole = true, in_range = true;
  LwNumberResult r = lw_number_parse_whole (text, lo, hi, &v, &whole, &in_range);
  if (r == LW_NUMBER_OK)
    {
      *out = (gint64) v;
      return true;
    }
  if (!in_range)
    lw_cli_bad_input (option, "%s is out of range: must be from %" G_GINT64_FORMAT
                      " to %" G_GINT64_FORMAT, text, lo, hi);
  else if (!whole)
    lw_cli_bad_input (option, "'%s' is not a whole number: write it in digits, from %"
                      G_GINT64_FORMAT " to %" G_GINT64_FORMAT, text, lo, hi);
  else
    lw_cli_bad_input (option, "'%s' is not a whole number", text);
  return false;
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
int
lw_cli_report_expr_error (const char *option, const char *text, const LwError *err)
{
  if (err->code == LW_ERR_NOMEM || err->code == LW_ERR_NUMERIC)
    {
      lw_cli_bad_input (option, "internal failure while reading the expression: %s", err->message);
      return LW_EXIT_INTERNAL;
    }
  char msg[LW_ERROR_MESSAGE_MAX];
  g_strlcpy (msg, err->message[0] != '\0' ? err->message : "invalid expression", sizeof msg);
  size_t len = strlen (text);
  if (err->position < 0)
    {
      lw_cli_bad_input (option, "%s", msg);
      return LW_EXIT_BAD_INPUT;
    }
  size_t pos = (size_t) err->position <= len ? (size_t) err->position : len;
  long column = chars_before (text, pos);   /* 0-based characters before the position */
  GString *rewritten = g_string_new (NULL);
  bool has_own = rewrite_positions (msg, text, err->position, rewritten);
  bool has_other = strstr (rewritten->str, " at character ") != NULL;
  if (has_own)
    lw_cli_bad_input (option, "%s", rewritten->str);
  else if (has_other)
    lw_cli_bad_input (option, "%s (error at character %ld)", rewritten->str, column + 1);
  else
    lw_cli_bad_input (option, "%s at character %ld", rewritten->str, column + 1);
  g_string_free (rewritten, TRUE);

  /* The expression on one line (control characters shown as spaces), then the caret. Tabs
   * are kept in both lines so the caret stays aligned. */
  GString *shown = g_string_new ("    ");
  GString *caret = g_string_new ("    ");
  bool valid = g_utf8_validate (text, (gssize) len, NULL);
  for (size_t i = 0; i < len; i++)
    {
      unsigned char c = (unsigned char) text[i];
      /* text that is not UTF-8 is counted in bytes (chars_before): one '?' per byte >= 0x80 */
      if (!valid && c >= 0x80)
        c = '?';
      g_string_append_c (shown, (c < 0x20 && c != '\t') || c == 0x7f ? ' ' : (char) c);
      /* one caret column per character: skip UTF-8 continuation bytes */
      if (i < pos && (c & 0xC0) != 0x80)
        g_string_append_c (caret, c == '\t' ? '\t' : ' ');
    }
  g_string_append_c (caret, '^');
  g_printerr ("%s\n%s\n", shown->str, caret->str);
  g_string_free (shown, TRUE);
  g_string_free (caret, TRUE);
  return LW_EXIT_BAD_INPUT;
}

/* Exit status for a failed core call outside parsing. */
int
lw_cli_report_core_error (const char *place, const LwError *err)
{
  if (err->code == LW_ERR_PARSE || err->code == LW_ERR_INVALID)
    {
      lw_cli_bad_input (place, "%s", err->message);
      return LW_EXIT_BAD_INPUT;
    }
  lw_cli_bad_input (place, "internal failure: %s", err->message[0] ? err->message : "unknown error");
  return LW_EXIT_INTERNAL;
}



void
lw_cli_loop_args_clear (LwCliLoopArgs *a)
{
  g_free (a->plant);
  g_free (a->period);
  g_free (a->compute_delay);
  g_free (a->dead_time);
  g_free (a->controller);
  g_free (a->controller_z);
  g_strfreev (a->params);
  memset (a, 0, sizeof *a);
}

int
lw_cli_loop_params (const LwCliLoopArgs *a, LwExprParam *out, char **names, size_t *n)
{
  *n = 0;
  for (size_t i = 0; a->params != NULL && a->params[i] != NULL; i++)
    {
      const char *text = a->params[i];
      if (i >= LW_EXPR_PARAMS_MAX)
        {
          lw_cli_bad_input ("--param", "more than %d parameters", LW_EXPR_PARAMS_MAX);
          goto fail;
        }
      const char *eq = strchr (text, '=');
      if (eq == NULL || eq == text)
        {
          g_autofree char *shown = g_utf8_make_valid (text, -1);
          lw_cli_bad_input ("--param", "'%s' is not NAME=VALUE (e.g. --param wn=120)", shown);
          goto fail;
        }
      names[i] = g_strndup (text, (gsize) (eq - text));
      *n = i + 1;
      const char *bad = lw_expr_param_name_problem (names[i]);
      if (strcmp (names[i], LW_DESIGN_DEAD_TIME_PARAM) == 0)
        bad = "the plant's dead time is given with --dead-time (and a range on it with "
              "--range dead_time_s=LOW:HIGH)";
      if (bad != NULL)
        {
          g_autofree char *shown = g_utf8_make_valid (names[i], -1);
          lw_cli_bad_input ("--param", "'%s': %s", shown, bad);
          goto fail;
        }
      g_autofree char *option = g_strdup_printf ("--param %s", names[i]);
      if (!lw_cli_parse_double (option, eq + 1, &out[i].value))
        goto fail;
      out[i].name = names[i];
    }
  return LW_EXIT_OK;
fail:
  for (size_t i = 0; i < *n; i++)
    g_free (names[i]);
  *n = 0;
  return LW_EXIT_BAD_INPUT;
}

void
lw_cli_loop_clear (LwCliLoop *l)
{
  lw_sampled_plant_free (l->sampled);
  lw_model_free (l->controller_z);
  lw_model_free (l->controller_w);
  lw_model_free (l->plant_s);
  memset (l, 0, sizeof *l);
}

int
lw_cli_loop_build (const char *cmd, const LwCliLoopArgs *a, LwCliLoop *out)
{
  memset (out, 0, sizeof *out);
  out->compute_delay = 1;
  if (a->plant == NULL)
    {
      lw_cli_bad_input (cmd, "--plant is required (see '" LW_CLI_PROG " %s --help')", cmd);
      return LW_EXIT_BAD_INPUT;
    }
  if (a->period == NULL)
    {
      lw_cli_bad_input (cmd, "--period is required (see '" LW_CLI_PROG " %s --help')", cmd);
      return LW_EXIT_BAD_INPUT;
    }
  if (!lw_cli_parse_double ("--period", a->period, &out->period_s))
    return LW_EXIT_BAD_INPUT;
  if (!(out->period_s > 0.0))
    {
      lw_cli_bad_input ("--period", "must be greater than 0 seconds, got %s", a->period);
      return LW_EXIT_BAD_INPUT;
    }
  if (!lw_period_ok (out->period_s))
    {
      lw_cli_bad_input ("--period", "%s s is outside the sample periods the numerics represent "
                        "(%g to %g s; docs/cli.md)", a->period, LW_PERIOD_MIN_S, LW_PERIOD_MAX_S);
      return LW_EXIT_BAD_INPUT;
    }
  gint64 v;
  if (a->compute_delay != NULL)
    {
      if (!lw_cli_parse_integer ("--compute-delay", a->compute_delay, 0, 1000, &v))
        return LW_EXIT_BAD_INPUT;
      out->compute_delay = (int) v;
    }
  if (a->dead_time != NULL)
    {
      if (!lw_cli_parse_double ("--dead-time", a->dead_time, &out->dead_time_s))
        return LW_EXIT_BAD_INPUT;
      if (!(out->dead_time_s >= 0.0))
        {
          lw_cli_bad_input ("--dead-time", "must be 0 or more seconds, got %s", a->dead_time);
          return LW_EXIT_BAD_INPUT;
        }
      out->dead_time_s += 0.0;   /* -0 becomes +0 */
      if (!lw_dead_time_ok (out->dead_time_s, out->period_s))
        {
          lw_cli_bad_input ("--dead-time", "%s s is %.6g sample periods of %g s, more than the "
                            "limit of %.0f (docs/cli.md)", a->dead_time,
                            out->dead_time_s / out->period_s, out->period_s,
                            LW_DEAD_TIME_MAX_SAMPLES);
          return LW_EXIT_BAD_INPUT;
        }
    }
  if (a->controller != NULL && a->controller_z != NULL)
    {
      lw_cli_bad_input ("--controller-z", "cannot be combined with --controller; give one of them");
      return LW_EXIT_BAD_INPUT;
    }

  /* The options are taken as bytes (G_OPTION_ARG_FILENAME: no conversion that could fail
   * without naming the option); the expression parser names a byte that is not UTF-8. */
  int status = LW_EXIT_OK;
  LwError err;
  lw_error_clear (&err);
  double period_s = out->period_s;
  LwExprParam params[LW_EXPR_PARAMS_MAX];
  char *names[LW_EXPR_PARAMS_MAX];
  size_t n_params = 0;
  status = lw_cli_loop_params (a, params, names, &n_params);
  if (status != LW_EXIT_OK)
    goto fail;
  LwStatus st = lw_expr_parse_params_proper (a->plant, LW_DOMAIN_S, 0.0, params, n_params,
                                             &out->plant_s, &err);
  for (size_t i = 0; i < n_params; i++)
    g_free (names[i]);
  if (st != LW_OK)
    {
      /* a parameter given but not used, twice, or misnamed is the --param's fault */
      status = lw_cli_report_expr_error (err.position < 0 && n_params > 0 ? "--param"
                                                                           : "--plant",
                                         a->plant, &err);
      goto fail;
    }

  if (a->controller_z != NULL)
    {
      if (lw_expr_parse_proper (a->controller_z, LW_DOMAIN_Z, period_s, &out->controller_z, &err)
          != LW_OK)
        {
          status = lw_cli_report_expr_error ("--controller-z", a->controller_z, &err);
          goto fail;
        }
    }
  else
    {
      const char *text = a->controller != NULL ? a->controller : "1";
      if (lw_expr_parse_proper (text, LW_DOMAIN_W, period_s, &out->controller_w, &err) != LW_OK)
        {
          status = lw_cli_report_expr_error ("--controller", text, &err);
          goto fail;
        }
      /* A root at w = 2/T maps to z = infinity: refuse it here with a clear message. */
      double w_edge = 2.0 / period_s;
      for (size_t i = 0; i < out->controller_w->n_zeros + out->controller_w->n_poles; i++)
        {
          double complex r = i < out->controller_w->n_zeros
                               ? out->controller_w->zeros[i]
                               : out->controller_w->poles[i - out->controller_w->n_zeros];
          if (cabs (r - w_edge) <= 1e-12 * w_edge)
            {
              lw_cli_bad_input ("--controller", "a %s at w = 2/T = %.6g rad/s has no image in z",
                         i < out->controller_w->n_zeros ? "zero" : "pole", w_edge);
              status = LW_EXIT_BAD_INPUT;
              goto fail;
            }
        }
      out->controller_z = lw_model_w_to_z (out->controller_w);
      if (out->controller_z == NULL)
        {
          lw_cli_bad_input ("--controller", "internal failure: cannot map the controller to z");
          status = LW_EXIT_INTERNAL;
          goto fail;
        }
    }

  if (lw_sampled_plant_new (out->plant_s, out->dead_time_s, period_s, &out->sampled, &err) != LW_OK)
    {
      /* the period and the dead time were checked above, so what is left is the plant's */
      status = lw_cli_report_core_error ("--plant", &err);
      goto fail;
    }
  return LW_EXIT_OK;

fail:
  lw_cli_loop_clear (out);
  return status;
}

int
lw_cli_run_command (const char *cmd, int argc, char **argv, const GOptionEntry *entries,
                    const gboolean *help, const char *help_text, int (*run) (void *data),
                    void *data)
{
  /* GOptionContext does the splitting (--opt value, --opt=value); our own help text and our
   * own number parsing, so every message names its option. */
  GOptionContext *ctx = g_option_context_new (NULL);
  g_option_context_set_help_enabled (ctx, FALSE);
  g_option_context_set_ignore_unknown_options (ctx, FALSE);
  g_option_context_add_main_entries (ctx, entries, NULL);
  GError *gerr = NULL;
  int status;
  /* GOptionContext rearranges argv; keep the original to name an option whose text it could
   * not convert */
  g_auto (GStrv) orig = g_new0 (char *, (gsize) argc + 1);
  for (int i = 0; i < argc; i++)
    orig[i] = g_strdup (argv[i]);
  if (!g_option_context_parse (ctx, &argc, &argv, &gerr))
    {
      const char *place = NULL;
      long bad_byte = -1;
      if (gerr->domain == G_CONVERT_ERROR)
        for (int i = 1; orig[i] != NULL && place == NULL; i++)
          {
            const char *end = NULL;
            if (g_utf8_validate (orig[i], -1, &end))
              continue;
            bad_byte = (long) (end - orig[i]);
            const char *eq = g_str_has_prefix (orig[i], "--") ? strchr (orig[i], '=') : NULL;
            if (eq != NULL && end > eq)
              {
                place = g_strndup (orig[i], (gsize) (eq - orig[i]));
                bad_byte -= (long) (eq + 1 - orig[i]);
              }
            else if (i > 1 && g_str_has_prefix (orig[i - 1], "-"))
              place = g_strdup (orig[i - 1]);
            else
              place = g_strdup (cmd);
          }
      if (place != NULL)
        {
          lw_cli_bad_input (place, "the text is not valid UTF-8 (byte %ld)", bad_byte + 1);
          g_free ((char *) place);
        }
      else
        lw_cli_bad_input (cmd, "%s (see '" LW_CLI_PROG " %s --help')", gerr->message, cmd);
      g_error_free (gerr);
      status = LW_EXIT_BAD_INPUT;
    }
  else if (*help)
    {
      fputs (help_text, stdout);
      status = LW_EXIT_OK;
    }
  else if (argc > 1)
    {
      lw_cli_bad_input (cmd, "unexpected argument '%s' (see '" LW_CLI_PROG " %s --help')",
                        argv[1], cmd);
      status = LW_EXIT_BAD_INPUT;
    }
  else
    status = run (data);
  g_option_context_free (ctx);
  return status;
}
