/* lw-report-private.h — what the parts of the report builder share: one variant's figures
 * (RVar), the block helpers (lw-report-blocks.c), the figures and the comparison
 * (lw-report-compare.c); lw-report-build.c evaluates the variants and writes the sections.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <complex.h>
#include <stdbool.h>

#include "lw-engine.h"
#include "lw-family.h"
#include "lw-figure-data.h"
#include "lw-implement.h"
#include "lw-report.h"

G_BEGIN_DECLS

/* Figure size in points as drawn (the HTML's SVG size); the PDF scales it to its text column
 * (483 pt), so two figures fit a page and the annotations have room at the right edge. */
#define FIG_W 620.0
#define FIG_H 380.0

/* Everything computed for one variant. */
typedef struct
{
  const LwDesignVariant *v;
  LwVariantEval *e;             /* the engine's evaluation; the fields below are borrowed */
  const LwEvaluation *ev;
  const LwSimResponse *ref, *din, *dout;
  const LwReqResult *req;
  size_t failing;
  double actuator_peak;
  LwDiffEq *de;
  LwSos *sos;
} RVar;

void lwr_rvar_clear (RVar *r);

/* A table being filled: header given, rows appended. */
typedef struct
{
  LwReportBlock *b;
  GArray *cells;   /* LwReportCell */
} TableFill;

/* frees one block (the free function of LwReport.blocks) */
void lwr_block_free (gpointer p);
LwReportBlock *lwr_add_block (LwReport *r, LwReportBlockKind kind, const char *text);
void lwr_heading (LwReport *r, int level, const char *id, const char *text);
void lwr_para (LwReport *r, const char *fmt, ...) G_GNUC_PRINTF (2, 3);
/* one line "LABEL<model text>" in a fixed-width font */
void lwr_formula (LwReport *r, const char *label, const LwModel *m);
TableFill lwr_table_begin (LwReport *r, const char *id, const char *variant, size_t n_cols,
                           const char *const *header);
/* appends one cell (text taken) */
void lwr_cell_take (TableFill *t, char *text, bool best);
void lwr_cellf (TableFill *t, const char *fmt, ...) G_GNUC_PRINTF (2, 3);
void lwr_table_end (TableFill *t);
/* a figure value: 6 significant digits, or "n/a" when absent; g_free */
char *lwr_num6 (bool has, double v);
char *lwr_complex_text (double complex z);

/* A design's plant family (lw-report-family.c): evaluated for one reported variant (rv[of])
 * when the design has ranged parameters, else all NULL; its members' loops for the figures. */
typedef struct
{
  LwFamily *family;
  size_t of;
  LwFamilyLoops *loops;
  LwFigureFamily fig;
} RFamily;

gboolean lwr_family_compute (const LwDesign *d, const RVar *rv, size_t n, RFamily *rf,
                             GError **error);
void lwr_family_clear (RFamily *rf);
/* the "Plant family" section (nothing without a family) */
void lwr_section_family (LwReport *r, const LwDesign *d, const RVar *rv, const RFamily *rf);

/* the "Measured family" section (lw-report-family-measured.c; nothing unless the design
 * holds several measured responses): each reported variant's worst margins over them */
void lwr_section_measured_family (LwReport *r, const LwDesign *d, const RVar *rv, size_t n);

/* the figures of the variants overlaid (a family drawn under its variant's curves in the
 * frequency figures), and the comparison table (lw-report-compare.c) */
gboolean lwr_add_figures (LwReport *r, const LwDesign *d, RVar *rv, size_t n,
                          const RFamily *rf, GError **error);
void lwr_add_comparison (LwReport *r, const LwDesign *d, const RVar *rv, size_t n);

/* the measured response (lw-report-measured.c; nothing when the design holds none): its
 * section after the plant's, and each variant's margins on it */
void lwr_section_measured (LwReport *r, const LwDesign *d, const RVar *v0);
void lwr_measured_variant (LwReport *r, const LwDesign *d, const RVar *rv);

G_END_DECLS
