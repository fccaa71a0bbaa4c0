/* lw-cli-measured.h — a measured frequency response as the plant, from the command line:
 * `--measured FILE.csv --measured-kind sampled|continuous` (docs/measured-data.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <complex.h>

#include <glib.h>

#include <json-glib/json-glib.h>

#include "lw-cli-common.h"
#include "lw-design.h"
#include "lw-engine.h"
#include "lw-measured.h"
#include "lw-plot.h"

G_BEGIN_DECLS

typedef struct
{
  char **files;               /* --measured, repeated: more than one is a measured family */
  char *kind;
  char *unstable_poles;       /* --measured-unstable-poles, where a command takes it */
} LwCliMeasuredArgs;

/* GOptionEntry rows for the two options (bytes, like the loop options). */
#define LW_CLI_MEASURED_ENTRIES(a)                                                        \
  { "measured", 0, 0, G_OPTION_ARG_FILENAME_ARRAY, &(a)->files, NULL, NULL },              \
  { "measured-kind", 0, 0, G_OPTION_ARG_FILENAME, &(a)->kind, NULL, NULL }

/* --measured-unstable-poles N: the loop's open-loop poles outside the unit circle, for the
 * Nyquist criterion on the data (analyze). */
#define LW_CLI_MEASURED_POLES_ENTRY(a)                                                    \
  { "measured-unstable-poles", 0, 0, G_OPTION_ARG_STRING, &(a)->unstable_poles, NULL, NULL }
#define LW_CLI_MEASURED_POLES_HELP                                                        \
  "  --measured-unstable-poles N  the loop's open-loop poles outside the unit circle,\n"  \
  "                           0 to 1000 (default 0), for the stability on the data\n"

/* The help lines of the two options. */
#define LW_CLI_MEASURED_HELP                                                              \
  "  --measured FILE.csv      a measured frequency response as the plant, in place of\n" \
  "                           (or beside) --plant (docs/measured-data.md)\n"             \
  "  --measured-kind KIND     sampled (through the digital loop at --period, dead time\n" \
  "                           and hold included) or continuous (the analog plant's\n"    \
  "                           G(jw); the hold and --dead-time applied); required with\n" \
  "                           --measured\n"

void lw_cli_measured_args_clear (LwCliMeasuredArgs *a);

/* The first --measured FILE, or NULL. */
static inline const char *
lw_cli_measured_file (const LwCliMeasuredArgs *a)
{
  return a->files != NULL ? a->files[0] : NULL;
}

/* Refuses a second --measured where a command takes one table (what: why, e.g. "a fit is
 * made to one table"). Returns the exit status (the message printed). */
int lw_cli_measured_one (const LwCliMeasuredArgs *a, const char *what);

/* --measured-kind checked (required with --measured): its kind, or the exit status after the
 * message. */
int lw_cli_measured_kind (const LwCliMeasuredArgs *m, LwMeasuredKind *kind);

/* Reads and checks the table in FILE (mapped, not read whole: the parser stops at its line
 * limit); a refusal is printed as FILE:LINE:COLUMN: message. Returns the exit status. */
int lw_cli_measured_read (const char *file, LwMeasured **out, char *note, size_t note_size);

/* The loop on the data: the sampled plant at the points below pi/T (n of them), L there, its
 * margins; with a model, the largest relative difference of the model's sampled response from
 * the data's. */
typedef struct
{
  LwCliLoop lp;               /* the loop options (lw_cli_measured_loop_build); else unused */
  double period_s;            /* the loop the data were closed by */
  int compute_delay;
  gboolean has_model;
  LwMeasuredKind kind;
  LwMeasured *data;
  char note[256];
  LwMeasuredLoop loop;        /* the loop closed on the data (lw_measured_loop_close) */
} LwCliMeasuredLoop;

/* From the command line: the loop options checked (a plant of 1 standing in when --plant is
 * not given), the table read, the loop closed on it (lw_measured_loop_close). Returns the
 * exit status (the message printed). */
int lw_cli_measured_loop_build (const char *cmd, const LwCliLoopArgs *loop,
                                const LwCliMeasuredArgs *m, LwCliMeasuredLoop *out);
void lw_cli_measured_loop_clear (LwCliMeasuredLoop *ml);

/* The text section of the loop on the data, label naming the data; closing: end with the
 * line on what needs a model (when there is none). */
void lw_cli_measured_print (const LwCliMeasuredLoop *ml, const char *label, gboolean closing);

/* The cautions where the data may hide a gain crossover (above or below them), each line
 * after indent. */
void lw_cli_measured_print_cautions (const LwMeasuredMargins *mm, const char *indent);

/* The JSON "measured" object (file: where the table was read) and the loop block with the
 * keys of a model's (lw_cli_json_add_loop), each as one value of b. */
void lw_cli_measured_json (JsonBuilder *b, const LwCliMeasuredLoop *ml, const char *file);
void lw_cli_measured_json_loop (JsonBuilder *b, const LwCliMeasuredLoop *ml);


/* `analyze` on the data: reads and checks the file, builds the loop from the loop options
 * (--plant optional: when given, the model's sampled response at the measured points is
 * compared with the data's), prints text or JSON. Returns the exit status. */
int lw_cli_measured_analyze (const char *cmd, const LwCliLoopArgs *loop,
                             const LwCliMeasuredArgs *m, gboolean json);

/* `--measured FILE.csv --measured-kind KIND` with a document: the table read and put into d
 * in place of the measurement it holds (the file's name as the source, `analysis` as the
 * design's choice; the stated count of open-loop unstable poles kept, as it is the plant's):
 * `new` keeps it in the new document (analysis "model"); `check`, `plot` and `report` judge
 * and draw the run on it (analysis "data"), the document's file unchanged. Nothing when
 * neither option is given. Returns the exit status (the message printed). */
int lw_cli_measured_doc_set (LwDesign *d, const LwCliMeasuredArgs *m,
                             LwDesignAnalysis analysis);

/* `check` with a document holding a measurement: where the data are and, with
 * analysis="data", the margins of the variant's loop on them (e->measured), with their
 * intervals, low-coherence and outside-the-data flags; why the data could not be used at the
 * variant's period. Nothing without a measurement. */
void lw_cli_measured_doc_check_lines (const LwDesign *d, const LwVariantEval *e);

/* The line on what the data decided, for the header of `check` (nothing without a
 * measurement): "measured response: SOURCE (KIND, N points …); requirements … judged on …". */
void lw_cli_measured_doc_header (const LwDesign *d, const char *given);

/* `analyze FILE.lwd` of variant evaluation e: when d holds a measurement, the loop of e
 * (period, dead time, computation delay, controller in z) closed on the data, the model's
 * sampled plant compared with them; added to the JSON object root as its "measured" member
 * (the keys of analyze --measured, plus source, analysis, open_loop_unstable_poles; with
 * analysis="data" the "loop" member becomes the data's), or (root NULL) printed as a section
 * of the text report. Returns the exit status. */
/* ml borrowing the loop on the document's data that the engine closed in e (e->measured set):
 * nothing of ml is its own (do not clear it). */
void lw_cli_measured_loop_borrow (LwCliMeasuredLoop *ml, const LwDesign *d,
                                  const LwVariantEval *e);

int lw_cli_measured_doc_analyze (const char *file, const LwDesign *d, const LwVariantEval *e,
                                 JsonObject *root);

G_END_DECLS
