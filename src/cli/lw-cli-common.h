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
#include "lw-model.h"

G_BEGIN_DECLS

#define LW_CLI_PROG "loopwright-cli"

enum
{
  LW_EXIT_OK = 0,
  LW_EXIT_INTERNAL = 1,
  LW_EXIT_BAD_INPUT = 2
};

/* "loopwright-cli: PLACE: message" on stderr (PLACE may be NULL). */
void lw_cli_bad_input (const char *place, const char *fmt, ...) G_GNUC_PRINTF (2, 3);

/* A whole, finite decimal number / a whole number in [lo, hi]; on failure prints a message
 * naming `option` and returns false. */
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
} LwCliLoopArgs;

/* GOptionEntry rows for the loop options, writing into `a` (6 entries). */
#define LW_CLI_LOOP_ENTRIES(a)                                                            \
  { "plant", 0, 0, G_OPTION_ARG_STRING, &(a)->plant, NULL, NULL },                         \
  { "period", 0, 0, G_OPTION_ARG_STRING, &(a)->period, NULL, NULL },                       \
  { "compute-delay", 0, 0, G_OPTION_ARG_STRING, &(a)->compute_delay, NULL, NULL },         \
  { "dead-time", 0, 0, G_OPTION_ARG_STRING, &(a)->dead_time, NULL, NULL },                 \
  { "controller", 0, 0, G_OPTION_ARG_STRING, &(a)->controller, NULL, NULL },               \
  { "controller-z", 0, 0, G_OPTION_ARG_STRING, &(a)->controller_z, NULL, NULL }

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
void lw_cli_loop_clear (LwCliLoop *l);

/* Runs the option parser of a command: splits argv with `entries` (GOptionContext, GLib's own
 * help off), prints `help_text` for -h/--help, refuses stray arguments, then calls run(data).
 * The entries must include { "help", 'h', ... } writing to *help. Returns the exit status. */
int lw_cli_run_command (const char *cmd, int argc, char **argv, const GOptionEntry *entries,
                        const gboolean *help, const char *help_text, int (*run) (void *data),
                        void *data);

G_END_DECLS
