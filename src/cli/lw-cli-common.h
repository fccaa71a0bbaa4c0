/* lw-cli-common.h — what every loopwright-cli command shares: exit codes, messages that name
 * the option and the character position, locale-independent numbers, and the loop given on
 * the command line (--plant, --period, --compute-delay, --dead-time, --controller,
 * --controller-z) turned into a sampled plant and a controller in z.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>

#include <glib.h>

#include "lw-analysis.h"
#include "lw-error.h"
#include "lw-expr.h"
#include "lw-model.h"

G_BEGIN_DECLS

#define LW_CLI_PROG "loopwright-cli"

enum
{
  LW_EXIT_OK = 0,
  LW_EXIT_INTERNAL = 1,
  LW_EXIT_BAD_INPUT = 2
};

/* Work is bounded by what can be shown (docs/cli.md, "Limits"; measured figures there):
 * - frequency points: the widest figure is 20000 px, so 1e5 points already put 5 on each
 *   pixel; crossovers are refined by root finding between grid points, so more points do
 *   not make them more precise;
 * - step-response samples: 1e6 (a settling time of a million periods; the text report of
 *   1e6 samples needs about 100 MB);
 * - continuous points (steps - 1) * substeps: 2e6 (100 per pixel of the widest figure);
 * - numbers in the arrays of one --json analysis: 2e6 (about 30 MB of text and 0.3 GB while
 *   it is built; 1e7 samples took more than 4 GB and GLib aborted);
 * - a PNG: LW_PLOT_MAX_PNG_PIXELS (lw-plot-export.h). */
#define LW_CLI_MAX_POINTS 100000
/* crossovers of each kind listed in a text report (a screenful; --json lists all) */
#define LW_CLI_MAX_LISTED 50
#define LW_CLI_MAX_STEPS 1000000
#define LW_CLI_MAX_CONTINUOUS 2000000.0
#define LW_CLI_MAX_JSON_VALUES 2000000.0

/* "loopwright-cli: PLACE: message" on stderr (PLACE may be NULL). */
void lw_cli_bad_input (const char *place, const char *fmt, ...) G_GNUC_PRINTF (2, 3);

/* A finite number / a whole number in [lo, hi], in the one number syntax of lw-number.h
 * (shared with documents and expressions); on failure prints a message naming `option` and
 * returns false. */
bool lw_cli_parse_double (const char *option, const char *text, double *out);
bool lw_cli_parse_integer (const char *option, const char *text, gint64 lo, gint64 hi,
                           gint64 *out);

/* Reports a failed parse of `text` given to `option` (1-based character, caret line).
 * Returns the exit status. */
int lw_cli_report_expr_error (const char *option, const char *text, const LwError *err);

/* Exit status and message for a failed core call outside parsing. */
int lw_cli_report_core_error (const char *place, const LwError *err);

/* The loop options, as strings until checked (NULL when not given). */
typedef struct
{
  char *plant;
  char *period;
  char *compute_delay;
  char *dead_time;
  char *controller;
  char *controller_z;
  char **params;          /* --param NAME=VALUE, repeated: the plant's named parameters */
} LwCliLoopArgs;

/* GOptionEntry rows for the loop options, writing into `a` (7 entries). Taken as bytes
 * (G_OPTION_ARG_FILENAME) so that text which is not UTF-8 reaches our own checks, which name
 * the option, instead of failing in GLib's conversion without naming it. */
#define LW_CLI_LOOP_ENTRIES(a)                                                            \
  { "plant", 0, 0, G_OPTION_ARG_FILENAME, &(a)->plant, NULL, NULL },                       \
  { "period", 0, 0, G_OPTION_ARG_FILENAME, &(a)->period, NULL, NULL },                     \
  { "compute-delay", 0, 0, G_OPTION_ARG_FILENAME, &(a)->compute_delay, NULL, NULL },       \
  { "dead-time", 0, 0, G_OPTION_ARG_FILENAME, &(a)->dead_time, NULL, NULL },               \
  { "controller", 0, 0, G_OPTION_ARG_FILENAME, &(a)->controller, NULL, NULL },             \
  { "controller-z", 0, 0, G_OPTION_ARG_FILENAME, &(a)->controller_z, NULL, NULL },         \
  { "param", 0, 0, G_OPTION_ARG_FILENAME_ARRAY, &(a)->params, NULL, NULL }

void lw_cli_loop_args_clear (LwCliLoopArgs *a);

/* The checked loop. */
typedef struct
{
  double period_s;
  double dead_time_s;
  int compute_delay;          /* default 1 */
  LwModel *plant_s;
  LwModel *controller_w;        /* NULL when given in z */
  LwModel *controller_z;        /* always set (1 when no controller was given) */
  LwSampledPlant *sampled;
} LwCliLoop;

/* Checks the loop options of command `cmd` in the order of the help texts and builds the
 * loop. Returns LW_EXIT_OK or the exit status after printing the message. */
int lw_cli_loop_build (const char *cmd, const LwCliLoopArgs *a, LwCliLoop *out);

/* The --param options as the expression parser takes them: names point into a->params (each
 * "NAME=VALUE" split at its first '='), at most LW_EXPR_PARAMS_MAX; *n 0 without any. Prints
 * the message naming the option and returns the exit status on a malformed one. */
int lw_cli_loop_params (const LwCliLoopArgs *a, LwExprParam *out, char **names, size_t *n);
void lw_cli_loop_clear (LwCliLoop *l);

/* Runs the option parser of a command: splits argv with `entries` (GOptionContext, GLib's own
 * help off), prints `help_text` for -h/--help, refuses stray arguments, then calls run(data).
 * The entries must include { "help", 'h', ... } writing to *help. Returns the exit status. */
int lw_cli_run_command (const char *cmd, int argc, char **argv, const GOptionEntry *entries,
                        const gboolean *help, const char *help_text, int (*run) (void *data),
                        void *data);

G_END_DECLS
