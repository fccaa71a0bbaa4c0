/* lw-report.h — the design report of a document's variants (docs/report.md): a library of
 * its own on the engine (lw-engine.h) and the renderer (src/plot/), used by
 * `loopwright-cli report` and the window's Export Report alike.
 *
 * The report is built once as a list of blocks (headings, paragraphs, tables, figures, the
 * caution), with every number already formatted, and then written by one of two writers: HTML
 * (figures as SVG inline) or PDF (cairo-pdf pages, text by pango). Both writers walk the same
 * blocks, so the two forms hold the same sections and the same figures to the digit.
 *
 * Reproducible: nothing in the blocks depends on the clock, the locale or the machine; the
 * date is the one given (or "not stated"), so the same document gives the same bytes.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include <glib.h>

#include "lw-design.h"
#include "lw-plot.h"

G_BEGIN_DECLS

/* GError domain of the report. */
#define LW_REPORT_ERROR (lw_report_error_quark ())
GQuark lw_report_error_quark (void);

typedef enum
{
  LW_REPORT_ERROR_BAD_INPUT,    /* the design (or the date) cannot be reported as it stands */
  LW_REPORT_ERROR_FAILED        /* an internal failure: a figure, the PDF writer */
} LwReportError;

/* What names the report's maker in the HTML head and the PDF's metadata. */
#define LW_REPORT_GENERATOR "loopwright-cli " PACKAGE_VERSION

typedef enum
{
  LW_REPORT_HEADING,      /* level 1 (the title), 2 (a section), 3 (a part of a section) */
  LW_REPORT_PARAGRAPH,
  LW_REPORT_FORMULA,      /* one line of model text, set in a fixed-width font */
  LW_REPORT_TABLE,
  LW_REPORT_FIGURE,
  LW_REPORT_CAUTION
} LwReportBlockKind;

typedef struct
{
  char *text;             /* UTF-8; '\n' breaks the line inside the cell */
  bool best;              /* the better value of a comparison row */
} LwReportCell;

typedef struct
{
  LwReportBlockKind kind;
  int level;              /* headings */
  char *text;             /* heading, paragraph, formula, caution text; a figure's caption */
  char *id;               /* section id (headings) or table name (tables), ASCII; may be NULL */
  char *variant;          /* the variant a table belongs to, or NULL */
  size_t n_cols, n_rows;
  char **header;          /* n_cols column titles */
  LwReportCell *cells;    /* n_rows × n_cols, row by row */
  LwPlot *plot;           /* figures: owned */
  double fig_width, fig_height;   /* points */
} LwReportBlock;

typedef struct
{
  char *title;
  char *author;           /* may be NULL */
  char *date;             /* "YYYY-MM-DD", or NULL: not stated */
  GPtrArray *blocks;      /* of LwReportBlock *, in reading order */
} LwReport;

/* The date of a report from the environment's SOURCE_DATE_EPOCH (the reproducible-builds
 * convention: whole seconds since 1970, UTC) as "YYYY-MM-DD" (g_free), or NULL when it is not
 * set. A set but malformed value is an error (LW_REPORT_ERROR_BAD_INPUT) naming it. Where the
 * date comes from, in order: the caller's own (the CLI's --date), else this, else the
 * caller's default (the CLI: not stated; the window: today). */
gboolean lw_report_date_from_environment (char **out, GError **error);

/* Builds the report of the variants `which` (n of them, 1 … LW_PLOT_MAX_VARIANTS) of design
 * d loaded from path (its file name is printed). date: "YYYY-MM-DD" or NULL. NULL with
 * *error set (its message names the place: the file and the variant) on failure. */
LwReport *lw_report_build (const char *path, const LwDesign *d, const size_t *which, size_t n,
                           const char *date, GError **error);
void lw_report_free (LwReport *r);
G_DEFINE_AUTOPTR_CLEANUP_FUNC (LwReport, lw_report_free)

/* The report as one HTML file (UTF-8, no external resources). g_free the result. */
char *lw_report_html (const LwReport *r, size_t *len);

/* The report as PDF bytes, A4 portrait; the creation date is the report's date (midnight UTC)
 * or, when not stated, the fixed 2000-01-01T00:00:00Z. false with *error set. */
bool lw_report_pdf (const LwReport *r, unsigned char **out, size_t *len, GError **error);

/* Writes the report to path: PDF when it ends in ".pdf" (any case), else HTML; the file is
 * replaced atomically (the old one stays on a failure). *len (may be NULL) is the size
 * written. false with *error set, its message naming path. */
bool lw_report_write_file (const LwReport *r, const char *path, size_t *len, GError **error);

/* The caution every report ends with. */
#define LW_REPORT_CAUTION_TEXT                                                              \
  "Simulation is not validation: these figures come from models and simulation only. "     \
  "Commission the controller with safe limits; follow the applicable functional-safety "   \
  "standards and qualified review; local codes prevail."

G_END_DECLS
