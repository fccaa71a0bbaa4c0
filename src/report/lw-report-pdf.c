/* lw-report-pdf.c — the design report as PDF: A4 pages drawn with cairo-pdf, text set by pango,
 * figures drawn by the shared renderer straight into the page (vector, same as the SVG).
 *
 * Layout of our own: a single text column with 56 pt margins; each variant, the figures and
 * the comparison begin on a new page; a heading is never left alone at the foot of a page; a
 * table row never splits and a table's header is repeated on the next page; every page has a
 * footer with the title and the page number.
 *
 * Reproducible: the creation date is the report's date (or a fixed "not stated" date); cairo
 * 1.16 writes nothing else that changes between runs (checked by tests/cli/test-cli-report.py,
 * see docs/report.md).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include <cairo-pdf.h>
#include <pango/pangocairo.h>

#include "lw-report.h"

#define PAGE_W 595.276   /* A4, points */
#define PAGE_H 841.89
#define MARGIN 56.0
#define FOOT 40.0        /* footer band above the bottom margin edge */
#define COL_W (PAGE_W - 2 * MARGIN)
#define BOTTOM (PAGE_H - MARGIN - 8.0)
#define CELL_PAD_X 7.0
#define CELL_PAD_Y 2.5

typedef struct
{
  cairo_t *cr;
  const LwReport *r;
  double y;
  int page;
  PangoFontDescription *body, *bold, *small, *small_bold, *mono, *h1, *h2, *h3;
} Pdf;

static PangoLayout *
layout_new (Pdf *p, const PangoFontDescription *font, const char *text, double width)
{
  PangoLayout *l = pango_cairo_create_layout (p->cr);
  pango_layout_set_font_description (l, font);
  if (width > 0)
    {
      pango_layout_set_width (l, (int) (width * PANGO_SCALE));
      pango_layout_set_wrap (l, PANGO_WRAP_WORD);   /* never inside a number */
    }
  pango_layout_set_text (l, text, -1);
  return l;
}

static double
layout_height (PangoLayout *l)
{
  int w, h;
  pango_layout_get_size (l, &w, &h);
  return (double) h / PANGO_SCALE;
}

static double
layout_width (PangoLayout *l)
{
  int w, h;
  pango_layout_get_size (l, &w, &h);
  return (double) w / PANGO_SCALE;
}

static void
footer (Pdf *p)
{
  g_autofree char *text = g_strdup_printf ("%s · design report · page %d", p->r->title, p->page);
  PangoLayout *l = layout_new (p, p->small, text, COL_W);
  pango_layout_set_alignment (l, PANGO_ALIGN_CENTER);
  cairo_set_source_rgb (p->cr, 0.35, 0.35, 0.35);
  cairo_move_to (p->cr, MARGIN, PAGE_H - MARGIN + 14.0);
  pango_cairo_show_layout (p->cr, l);
  g_object_unref (l);
  cairo_set_source_rgb (p->cr, 0.11, 0.11, 0.12);
}

static void
new_page (Pdf *p)
{
  footer (p);
  cairo_show_page (p->cr);
  p->page++;
  p->y = MARGIN;
}

/* Room for h more points on this page, else a new page. */
static void
need (Pdf *p, double h)
{
  if (p->y + h > BOTTOM && p->y > MARGIN)
    new_page (p);
}

static void
text_block (Pdf *p, const PangoFontDescription *font, const char *text, double gap_after)
{
  PangoLayout *l = layout_new (p, font, text, COL_W);
  double h = layout_height (l);
  need (p, h);
  cairo_move_to (p->cr, MARGIN, p->y);
  pango_cairo_show_layout (p->cr, l);
  g_object_unref (l);
  p->y += h + gap_after;
}

static void
draw_heading (Pdf *p, const LwReportBlock *b)
{
  const PangoFontDescription *font = b->level == 1 ? p->h1 : b->level == 2 ? p->h2 : p->h3;
  bool page_break = b->level == 2 && b->id != NULL
                    && (g_str_has_prefix (b->id, "variant-") || strcmp (b->id, "figures") == 0
                        || strcmp (b->id, "comparison") == 0);
  if (page_break && p->y > MARGIN)
    new_page (p);
  PangoLayout *l = layout_new (p, font, b->text, COL_W - (b->level == 2 ? 10.0 : 0.0));
  double h = layout_height (l);
  p->y += b->level == 1 ? 0.0 : b->level == 2 ? 12.0 : 6.0;
  need (p, h + 60.0);   /* keep the heading with what follows it */
  if (b->level == 2)
    {
      /* our section mark: a bar in the first palette colour left of the heading */
      cairo_set_source_rgb (p->cr, 0x00 / 255.0, 0x72 / 255.0, 0xb2 / 255.0);
      cairo_rectangle (p->cr, MARGIN, p->y + 1.0, 3.5, h - 2.0);
      cairo_fill (p->cr);
      cairo_set_source_rgb (p->cr, 0.11, 0.11, 0.12);
      cairo_move_to (p->cr, MARGIN + 10.0, p->y);
    }
  else
    cairo_move_to (p->cr, MARGIN, p->y);
  pango_cairo_show_layout (p->cr, l);
  g_object_unref (l);
  p->y += h + (b->level == 1 ? 10.0 : 4.0);
}

static void
draw_caution (Pdf *p, const LwReportBlock *b)
{
  PangoLayout *l = layout_new (p, p->bold, b->text, COL_W - 20.0);
  double h = layout_height (l);
  need (p, h + 16.0);
  cairo_set_source_rgb (p->cr, 0xd5 / 255.0, 0x5e / 255.0, 0x00);
  cairo_set_line_width (p->cr, 1.5);
  cairo_rectangle (p->cr, MARGIN + 0.75, p->y + 0.75, COL_W - 1.5, h + 14.5);
  cairo_stroke (p->cr);
  cairo_set_source_rgb (p->cr, 0.11, 0.11, 0.12);
  cairo_move_to (p->cr, MARGIN + 10.0, p->y + 8.0);
  pango_cairo_show_layout (p->cr, l);
  g_object_unref (l);
  p->y += h + 24.0;
}

/* One table row at p->y with the given column widths; returns its height (draw false:
 * measure only). */
static double
table_row (Pdf *p, const double *w, size_t n, const char *const *texts, const bool *bold,
           bool header, bool draw)
{
  double h = 0.0;
  PangoLayout *ls[64];
  for (size_t c = 0; c < n; c++)
    {
      const PangoFontDescription *f = header || (bold && bold[c]) ? p->small_bold : p->small;
      ls[c] = layout_new (p, f, texts[c], w[c] - CELL_PAD_X);
      h = fmax (h, layout_height (ls[c]));
    }
  h += 2 * CELL_PAD_Y;
  if (draw)
    {
      double x = MARGIN;
      for (size_t c = 0; c < n; c++)
        {
          cairo_move_to (p->cr, x, p->y + CELL_PAD_Y);
          pango_cairo_show_layout (p->cr, ls[c]);
          x += w[c];
        }
      cairo_set_line_width (p->cr, header ? 1.0 : 0.5);
      if (header)
        cairo_set_source_rgb (p->cr, 0.23, 0.23, 0.23);
      else
        cairo_set_source_rgb (p->cr, 0.78, 0.78, 0.78);
      cairo_move_to (p->cr, MARGIN, p->y + h);
      cairo_line_to (p->cr, x - CELL_PAD_X + 2.0, p->y + h);
      cairo_stroke (p->cr);
      cairo_set_source_rgb (p->cr, 0.11, 0.11, 0.12);
    }
  for (size_t c = 0; c < n; c++)
    g_object_unref (ls[c]);
  return h;
}

static void
draw_table (Pdf *p, const LwReportBlock *b)
{
  size_t n = MIN (b->n_cols, (size_t) 64);
  double w[64];
  /* natural widths (no wrapping) and least widths (the widest word: numbers never break);
   * when the natural widths do not fit the column, every column gets its least width and the
   * room left is shared in proportion to what each would need more */
  double least[64];
  for (size_t c = 0; c < n; c++)
    {
      w[c] = least[c] = 0.0;
      for (size_t r = 0; r <= b->n_rows; r++)
        {
          const char *text = r == 0 ? b->header[c] : b->cells[(r - 1) * b->n_cols + c].text;
          bool strong = r == 0 || b->cells[(r - 1) * b->n_cols + c].best;
          PangoLayout *l = layout_new (p, strong ? p->small_bold : p->small, text, -1);
          w[c] = fmax (w[c], layout_width (l));
          g_object_unref (l);
          l = layout_new (p, strong ? p->small_bold : p->small, text, 1.0);
          PangoRectangle ink, logical;
          pango_layout_get_extents (l, &ink, &logical);
          least[c] = fmax (least[c], (double) logical.width / PANGO_SCALE);
          g_object_unref (l);
        }
      w[c] += CELL_PAD_X + 1.0;
      least[c] = fmin (least[c] + CELL_PAD_X + 1.0, w[c]);
    }
  double total = 0.0, total_least = 0.0;
  for (size_t c = 0; c < n; c++)
    {
      total += w[c];
      total_least += least[c];
    }
  if (total > COL_W && total > total_least)
    {
      double share = fmax (0.0, (COL_W - total_least) / (total - total_least));
      for (size_t c = 0; c < n; c++)
        w[c] = least[c] + (w[c] - least[c]) * share;
    }
  const char **texts = g_new (const char *, n);
  bool *bold = g_new0 (bool, n);
  for (size_t c = 0; c < n; c++)
    texts[c] = b->header[c];
  double hh = table_row (p, w, n, texts, NULL, true, false);
  double first = 0.0;
  if (b->n_rows > 0)
    {
      for (size_t c = 0; c < n; c++)
        texts[c] = b->cells[c].text;
      first = table_row (p, w, n, texts, NULL, false, false);
    }
  need (p, hh + first);
  for (size_t c = 0; c < n; c++)
    texts[c] = b->header[c];
  p->y += table_row (p, w, n, texts, NULL, true, true);
  for (size_t r = 0; r < b->n_rows; r++)
    {
      for (size_t c = 0; c < n; c++)
        {
          texts[c] = b->cells[r * b->n_cols + c].text;
          bold[c] = b->cells[r * b->n_cols + c].best;
        }
      double h = table_row (p, w, n, texts, bold, false, false);
      if (p->y + h > BOTTOM)
        {
          new_page (p);
          const char **head = g_new (const char *, n);
          for (size_t c = 0; c < n; c++)
            head[c] = b->header[c];
          p->y += table_row (p, w, n, head, NULL, true, true);
          g_free (head);
        }
      p->y += table_row (p, w, n, texts, bold, false, true);
    }
  g_free (texts);
  g_free (bold);
  p->y += 8.0;
}

static void
draw_figure (Pdf *p, const LwReportBlock *b, size_t number)
{
  g_autofree char *caption = g_strdup_printf ("Figure %zu. %s", number, b->text);
  PangoLayout *l = layout_new (p, p->small, caption, COL_W);
  double ch = layout_height (l);
  double scale = COL_W / b->fig_width;
  double fh = b->fig_height * scale;
  need (p, fh + ch + 6.0);
  cairo_save (p->cr);
  cairo_translate (p->cr, MARGIN, p->y);
  cairo_scale (p->cr, scale, scale);
  cairo_rectangle (p->cr, 0, 0, b->fig_width, b->fig_height);
  cairo_clip (p->cr);
  lw_plot_draw_static (b->plot, p->cr, b->fig_width, b->fig_height);
  cairo_restore (p->cr);
  p->y += fh + 4.0;
  cairo_set_source_rgb (p->cr, 0.23, 0.23, 0.23);
  cairo_move_to (p->cr, MARGIN, p->y);
  pango_cairo_show_layout (p->cr, l);
  cairo_set_source_rgb (p->cr, 0.11, 0.11, 0.12);
  g_object_unref (l);
  p->y += ch + 14.0;
}

static cairo_status_t
append_bytes (void *closure, const unsigned char *data, unsigned int length)
{
  g_byte_array_append (closure, data, length);
  return CAIRO_STATUS_SUCCESS;
}

bool
lw_report_pdf (const LwReport *r, unsigned char **out, size_t *len, GError **error)
{
  GByteArray *bytes = g_byte_array_new ();
  cairo_surface_t *s = cairo_pdf_surface_create_for_stream (append_bytes, bytes, PAGE_W, PAGE_H);
  g_autofree char *date = r->date ? g_strdup_printf ("%sT00:00:00Z", r->date)
                                  : g_strdup ("2000-01-01T00:00:00Z");
  cairo_pdf_surface_set_metadata (s, CAIRO_PDF_METADATA_CREATE_DATE, date);
  cairo_pdf_surface_set_metadata (s, CAIRO_PDF_METADATA_TITLE, r->title);
  if (r->author)
    cairo_pdf_surface_set_metadata (s, CAIRO_PDF_METADATA_AUTHOR, r->author);
  cairo_pdf_surface_set_metadata (s, CAIRO_PDF_METADATA_CREATOR,
                                  LW_REPORT_GENERATOR);
  Pdf p = { 0 };
  p.cr = cairo_create (s);
  p.r = r;
  p.y = MARGIN;
  p.page = 1;
  p.body = pango_font_description_from_string ("DejaVu Sans 9.5");
  p.bold = pango_font_description_from_string ("DejaVu Sans Bold 9.5");
  p.small = pango_font_description_from_string ("DejaVu Sans 8");
  p.small_bold = pango_font_description_from_string ("DejaVu Sans Bold 8");
  p.mono = pango_font_description_from_string ("DejaVu Sans Mono 8");
  p.h1 = pango_font_description_from_string ("DejaVu Sans Bold 19");
  p.h2 = pango_font_description_from_string ("DejaVu Sans Bold 13");
  p.h3 = pango_font_description_from_string ("DejaVu Sans Bold 10");
  cairo_set_source_rgb (p.cr, 0.11, 0.11, 0.12);
  size_t fig = 0;
  for (guint i = 0; i < r->blocks->len; i++)
    {
      const LwReportBlock *b = g_ptr_array_index (r->blocks, i);
      switch (b->kind)
        {
        case LW_REPORT_HEADING: draw_heading (&p, b); break;
        case LW_REPORT_PARAGRAPH: text_block (&p, p.body, b->text, 6.0); break;
        case LW_REPORT_FORMULA: text_block (&p, p.mono, b->text, 3.0); break;
        case LW_REPORT_TABLE: draw_table (&p, b); break;
        case LW_REPORT_FIGURE: draw_figure (&p, b, ++fig); break;
        case LW_REPORT_CAUTION: draw_caution (&p, b); break;
        }
    }
  footer (&p);
  cairo_show_page (p.cr);
  PangoFontDescription *fonts[] = { p.body, p.bold, p.small, p.small_bold, p.mono, p.h1, p.h2,
                                    p.h3 };
  for (size_t i = 0; i < G_N_ELEMENTS (fonts); i++)
    pango_font_description_free (fonts[i]);
  cairo_destroy (p.cr);
  cairo_surface_finish (s);
  cairo_status_t st = cairo_surface_status (s);
  cairo_surface_destroy (s);
  if (st != CAIRO_STATUS_SUCCESS)
    {
      g_set_error (error, LW_REPORT_ERROR, LW_REPORT_ERROR_FAILED,
                   "cairo could not write the PDF: %s", cairo_status_to_string (st));
      g_byte_array_unref (bytes);
      return false;
    }
  *len = bytes->len;
  *out = g_byte_array_free (bytes, FALSE);
  return true;
}
