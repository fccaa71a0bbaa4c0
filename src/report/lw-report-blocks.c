/* lw-report-blocks.c — the report's blocks: headings, paragraphs, formulas, tables, and the
 * number texts they hold. See lw-report-private.h.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-report-private.h"

/* ---- blocks ----------------------------------------------------------------------------- */

void
lwr_block_free (gpointer p)
{
  LwReportBlock *b = p;
  g_free (b->text);
  g_free (b->id);
  g_free (b->variant);
  for (size_t i = 0; i < b->n_cols && b->header; i++)
    g_free (b->header[i]);
  g_free (b->header);
  for (size_t i = 0; i < b->n_rows * b->n_cols; i++)
    g_free (b->cells[i].text);
  g_free (b->cells);
  lw_plot_free (b->plot);
  g_free (b);
}

void
lw_report_free (LwReport *r)
{
  if (r == NULL)
    return;
  g_free (r->title);
  g_free (r->author);
  g_free (r->date);
  g_ptr_array_unref (r->blocks);
  g_free (r);
}

LwReportBlock *
lwr_add_block (LwReport *r, LwReportBlockKind kind, const char *text)
{
  LwReportBlock *b = g_new0 (LwReportBlock, 1);
  b->kind = kind;
  b->text = g_strdup (text);
  g_ptr_array_add (r->blocks, b);
  return b;
}

void
lwr_heading (LwReport *r, int level, const char *id, const char *text)
{
  LwReportBlock *b = lwr_add_block (r, LW_REPORT_HEADING, text);
  b->level = level;
  b->id = g_strdup (id);
}

void G_GNUC_PRINTF (2, 3)
lwr_para (LwReport *r, const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  char *t = g_strdup_vprintf (fmt, ap);
  va_end (ap);
  lwr_add_block (r, LW_REPORT_PARAGRAPH, t);
  g_free (t);
}

void
lwr_formula (LwReport *r, const char *label, const LwModel *m)
{
  g_autofree char *text = lw_model_text (m);
  g_autofree char *line = g_strdup_printf ("%s%s", label, text);
  lwr_add_block (r, LW_REPORT_FORMULA, line);
}


TableFill
lwr_table_begin (LwReport *r, const char *id, const char *variant, size_t n_cols,
             const char *const *header)
{
  LwReportBlock *b = lwr_add_block (r, LW_REPORT_TABLE, NULL);
  b->id = g_strdup (id);
  b->variant = g_strdup (variant);
  b->n_cols = n_cols;
  b->header = g_new0 (char *, n_cols);
  for (size_t i = 0; i < n_cols; i++)
    b->header[i] = g_strdup (header[i]);
  return (TableFill) { b, g_array_new (FALSE, TRUE, sizeof (LwReportCell)) };
}

/* Appends one cell (text taken). */
void
lwr_cell_take (TableFill *t, char *text, bool best)
{
  LwReportCell c = { text, best };
  g_array_append_val (t->cells, c);
}

void G_GNUC_PRINTF (2, 3)
lwr_cellf (TableFill *t, const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  char *s = g_strdup_vprintf (fmt, ap);
  va_end (ap);
  lwr_cell_take (t, s, false);
}

void
lwr_table_end (TableFill *t)
{
  g_assert (t->cells->len % t->b->n_cols == 0);
  t->b->n_rows = t->cells->len / t->b->n_cols;
  t->b->cells = (LwReportCell *) (void *) g_array_free (t->cells, FALSE);
}

/* A figure value: 6 significant digits, or "n/a" when absent. */
char *
lwr_num6 (bool has, double v)
{
  if (!has || isnan (v))
    return g_strdup ("n/a");
  if (isinf (v))
    return g_strdup (v > 0 ? "infinite" : "-infinite");
  return g_strdup_printf ("%.6g", v);
}

char *
lwr_complex_text (double complex z)
{
  if (cimag (z) == 0.0)
    return g_strdup_printf ("%.8g", creal (z));
  return g_strdup_printf ("%.8g %c %.8gj", creal (z), cimag (z) < 0 ? '-' : '+',
                          fabs (cimag (z)));
}

