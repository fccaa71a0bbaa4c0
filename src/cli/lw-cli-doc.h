/* lw-cli-doc.h — what the loopwright-cli commands over design documents share: loading a
 * document with its message, picking a variant, building the sampled loop of a variant (the
 * same LwCliLoop the loop options build), and evaluating and printing its requirements.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>

#include <glib.h>
#include <json-glib/json-glib.h>

#include "lw-cli-common.h"
#include "lw-design.h"
#include "lw-engine.h"
#include "lw-require.h"
#include "lw-simulate.h"

G_BEGIN_DECLS

/* Exit status of `check` when a requirement is not met, and of `tidy --check` when a file is
 * not canonical (docs/cli.md). */
#define LW_EXIT_CHECK_FAILED 3

/* The one design document among the remaining arguments of command `cmd` (files, from
 * G_OPTION_REMAINING; may be NULL): *path on success, else a message and LW_EXIT_BAD_INPUT
 * (none given, or more than one). */
int lw_cli_doc_one_file (const char *cmd, char **files, const char **path);

/* Loads path; on failure prints "loopwright-cli: MESSAGE" (the message names the file and the
 * line) and returns LW_EXIT_BAD_INPUT. */
int lw_cli_doc_load (const char *path, LwDesign **out);

/* The variant called name (the active one when name is NULL); prints a message naming
 * `option` and the variants there are, and returns LW_EXIT_BAD_INPUT, when there is none. */
int lw_cli_doc_variant (const LwDesign *d, const char *option, const char *name, size_t *index);

/* Evaluates variant `index` of d through the engine (lw-engine.h; opts NULL: its defaults).
 * `place` names the file in messages: a plant or sampling failure is reported at
 * "PLACE: <plant>", the others at "PLACE: variant 'NAME'". With strict, a failed simulation or
 * failed achieved figures are errors too (the commands that report them). Returns LW_EXIT_OK
 * with *out set, or the exit status after printing the message (*out NULL). */
int lw_cli_doc_evaluate (const char *place, const LwDesign *d, size_t index,
                         const LwEngineOptions *opts, gboolean strict, LwVariantEval **out);

/* lw_cli_doc_evaluate for the commands that work on measured data alone (analyze, check): a
 * design without a plant model (LW_EVAL_NO_MODEL: e->ev NULL, e->measured and the
 * requirements set) is returned as evaluated, not refused. */
int lw_cli_doc_evaluate_data (const char *place, const LwDesign *d, size_t index,
                              const LwEngineOptions *opts, gboolean strict,
                              LwVariantEval **out);

/* The same for a loop given by the loop options (lp must outlive *out); failures are
 * reported at `place`; strict covers the simulation only (no requirements to judge). */
int lw_cli_loop_evaluate (const char *place, const LwCliLoop *lp, const LwEngineOptions *opts,
                          gboolean strict, LwVariantEval **out);

/* Reports an engine error at place: exit 2 for bad input (parse, invalid), else 1. */
int lw_cli_report_gerror (const char *place, const GError *error);

/* A JSON array value: one object per requirement with name, kind, unit, target (a number, or
 * [low, high] for a range), achieved (null when not available), slack, pass (bool) and status
 * ("pass", "fail", "not-available"); with a measurement in the document also judged_on
 * ("data" or "model"). */
void lw_cli_doc_json_requirements (JsonBuilder *b, const LwDesign *d, const LwReqResult *res);

/* Whether the document judges requirements of this kind on its measured data (it holds one,
 * analysis="data", lw_req_kind_from_frequency_response). */
gboolean lw_cli_doc_on_data (const LwDesign *d, LwReqKind kind);

/* The requirements as a table on stdout (indented two spaces); one judged on the measured
 * data is marked "(on data)". */
void lw_cli_doc_print_requirements (const LwDesign *d, const LwReqResult *res);

/* With a design document (file) the loop options are refused: prints "unexpected argument
 * FILE … cannot be combined with --OPTION" naming the first one given and returns
 * LW_EXIT_BAD_INPUT; LW_EXIT_OK when none is given. */
int lw_cli_doc_refuse_loop_options (const char *cmd, const char *file, const LwCliLoopArgs *a);

/* The variants a command works on: --variant NAME (one), --all-variants (every one, in the
 * document's order) or, with neither, the active one. `all_option` names the option in the
 * message when both are given. *indices is new (g_free), *n >= 1. Returns LW_EXIT_OK or
 * LW_EXIT_BAD_INPUT after printing the message. */
/* What the window shows of the document: the active variant and those marked compared, in the
 * document's order (--compared). *indices is new (g_free), *n >= 1. */
void lw_cli_doc_shown (const LwDesign *d, size_t **indices, size_t *n);

int lw_cli_doc_select (const LwDesign *d, const char *name, bool all, const char *all_option,
                       size_t **indices, size_t *n);

/* The loop options as text that lw_cli_loop_build reads back to the very loop of the
 * document (the period of the active variant) (numbers in their shortest round-trip form), for commands that rebuild a loop with
 * another controller. Strings are new; free with lw_cli_loop_args_clear. */
void lw_cli_doc_loop_args (const LwDesign *d, LwCliLoopArgs *out);
G_DEFINE_AUTO_CLEANUP_CLEAR_FUNC (LwCliLoopArgs, lw_cli_loop_args_clear)

G_END_DECLS
