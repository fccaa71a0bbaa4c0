/* lw-cli-measured.h — a measured frequency response as the plant, from the command line:
 * `--measured FILE.csv --measured-kind sampled|continuous` (docs/measured-data.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <complex.h>

#include <glib.h>

#include "lw-cli-common.h"
#include "lw-measured.h"
#include "lw-plot.h"

G_BEGIN_DECLS

typedef struct
{
  char *file;
  char *kind;
} LwCliMeasuredArgs;

/* GOptionEntry rows for the two options (bytes, like the loop options). */
#define LW_CLI_MEASURED_ENTRIES(a)                                                        \
  { "measured", 0, 0, G_OPTION_ARG_FILENAME, &(a)->file, NULL, NULL },                     \
  { "measured-kind", 0, 0, G_OPTION_ARG_FILENAME, &(a)->kind, NULL, NULL }

/* The help lines of the two options. */
#define LW_CLI_MEASURED_HELP                                                              \
  "  --measured FILE.csv      a measured frequency response as the plant, in place of\n" \
  "                           (or beside) --plant (docs/measured-data.md)\n"             \
  "  --measured-kind KIND     sampled (through the digital loop at --period, dead time\n" \
  "                           and hold included) or continuous (the analog plant's\n"    \
  "                           G(jw); the hold and --dead-time applied); required with\n" \
  "                           --measured\n"

void lw_cli_measured_args_clear (LwCliMeasuredArgs *a);

/* Reads and checks the table in FILE (mapped, not read whole: the parser stops at its line
 * limit); a refusal is printed as FILE:LINE:COLUMN: message. Returns the exit status. */
int lw_cli_measured_read (const char *file, LwMeasured **out, char *note, size_t note_size);

/* The loop on the data: the loop options checked (a plant of 1 standing in when --plant is
 * not given), the table read, the sampled plant at the points below pi/T (n of them), L there,
 * its margins; with --plant, the largest relative difference of the model's sampled response
 * from the data's. Returns the exit status (the message printed). */
typedef struct
{
  LwCliLoop lp;
  gboolean has_model;
  LwMeasuredKind kind;
  LwMeasured *data;
  char note[256];
  size_t n;
  double *omega;
  double complex *p, *l;
  LwMeasuredMargins mm;
  double model_diff;
} LwCliMeasuredLoop;

int lw_cli_measured_loop_build (const char *cmd, const LwCliLoopArgs *loop,
                                const LwCliMeasuredArgs *m, LwCliMeasuredLoop *out);
void lw_cli_measured_loop_clear (LwCliMeasuredLoop *ml);

/* The data's loop as a variant of a figure (Bode in z and w, Nyquist, Nichols; no time
 * responses or poles): its arrays are owned here. */
typedef struct
{
  LwPlotVariant variant;
  char *name;
  double *mag_db, *phase_deg, *nu, *re, *im;
  LwPlotCrossover *cross, *cross_w;
} LwCliMeasuredFigure;

void lw_cli_measured_figure (const LwCliMeasuredLoop *ml, LwCliMeasuredFigure *f);
void lw_cli_measured_figure_clear (LwCliMeasuredFigure *f);

/* `analyze` on the data: reads and checks the file, builds the loop from the loop options
 * (--plant optional: when given, the model's sampled response at the measured points is
 * compared with the data's), prints text or JSON. Returns the exit status. */
int lw_cli_measured_analyze (const char *cmd, const LwCliLoopArgs *loop,
                             const LwCliMeasuredArgs *m, gboolean json);

G_END_DECLS
