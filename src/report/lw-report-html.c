/* lw-report-html.c — the design report as one HTML file: our own plain layout (a narrow text
 * column, ruled tables, figures as SVG inline). No scripts, no external resources, no date
 * but the report's own, so the same report gives the same bytes. See lw-report.h.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <string.h>

#include "lw-plot-export.h"
#include "lw-report.h"

static const char style[] =
  "body{font-family:'DejaVu Sans',sans-serif;font-size:10.5pt;line-height:1.45;color:#1d1d1f;"
  "max-width:52em;margin:2em auto;padding:0 1em}\n"
  "h1{font-size:1.7em;margin:0 0 .2em}\n"
  "h2{font-size:1.25em;margin:1.8em 0 .5em;padding-left:.5em;border-left:.3em solid #0072b2}\n"
  "h3{font-size:1.02em;margin:1.2em 0 .3em;color:#3a3a3a}\n"
  "table{border-collapse:collapse;margin:.4em 0 .8em;font-size:.93em}\n"
  "th,td{border-bottom:1px solid #c8c8c8;padding:.2em .7em .2em 0;text-align:left;"
  "vertical-align:top}\n"
  "th{border-bottom:1.5px solid #3a3a3a}\n"
  "td.best{font-weight:bold}\n"
  "code.formula{display:block;font-family:'DejaVu Sans Mono',monospace;font-size:.9em;"
  "margin:.15em 0;white-space:pre-wrap}\n"
  "figure{margin:1em 0}\nfigcaption{font-size:.9em;color:#3a3a3a}\n"
  "p.caution{border:1.5px solid #d55e00;padding:.6em .8em;font-weight:bold}\n";

static void
esc (GString *s, const char *t, bool breaks)
{
  for (const char *p = t; *p; p++)
    switch (*p)
      {
      case '&': g_string_append (s, "&amp;"); break;
      case '<': g_string_append (s, "&lt;"); break;
      case '>': g_string_append (s, "&gt;"); break;
      case '"': g_string_append (s, "&quot;"); break;
      case '\n':
        g_string_append (s, breaks ? "<br>" : " ");
        break;
      default: g_string_append_c (s, *p);
      }
}

/* cairo's SVG ids (glyph0-1, clip1, …) are numbered per file; several SVGs inline in one page
 * would share them, so each figure's ids get the prefix "figN-". Surface ids are renumbered
 * (below). */
static void
append_svg (GString *s, const char *svg, size_t len, size_t fig)
{
  const char *p = svg, *end = svg + len;
  const char *open = strstr (svg, "<svg");   /* drop the XML declaration */
  if (open != NULL)
    p = open;
  g_autofree char *prefix = g_strdup_printf ("fig%zu-", fig);
  g_autoptr (GHashTable) surfaces = g_hash_table_new (g_direct_hash, g_direct_equal);
  static const char *const marks[] = { "id=\"", "href=\"#", "url(#" };
  while (p < end)
    {
      const char *next = NULL;
      size_t mark_len = 0;
      for (size_t i = 0; i < G_N_ELEMENTS (marks); i++)
        {
          const char *q = g_strstr_len (p, end - p, marks[i]);
          if (q != NULL && (next == NULL || q < next))
            {
              next = q;
              mark_len = strlen (marks[i]);
            }
        }
      if (next == NULL)
        {
          g_string_append_len (s, p, end - p);
          break;
        }
      g_string_append_len (s, p, next + mark_len - p);
      g_string_append (s, prefix);
      p = next + mark_len;
      /* "surfaceN": cairo numbers surfaces per process, not per file, so N depends on what
       * the process drew before (the window draws many). Renumber them 1, 2, … in the order
       * they appear in this figure, so the page is the same bytes in any process. */
      static const char surface[] = "surface";
      size_t sl = sizeof surface - 1;
      if ((size_t) (end - p) > sl && memcmp (p, surface, sl) == 0 && g_ascii_isdigit (p[sl]))
        {
          const char *q = p + sl;
          guint64 num = 0;
          while (q < end && g_ascii_isdigit (*q))
            num = num * 10 + (guint64) (*q++ - '0');
          gpointer key = GSIZE_TO_POINTER ((gsize) num + 1);
          gpointer seq = g_hash_table_lookup (surfaces, key);
          if (seq == NULL)
            {
              seq = GUINT_TO_POINTER (g_hash_table_size (surfaces) + 1);
              g_hash_table_insert (surfaces, key, seq);
            }
          g_string_append_printf (s, "%s%u", surface, GPOINTER_TO_UINT (seq));
          p = q;
        }
    }
  if (s->len > 0 && s->str[s->len - 1] != '\n')
    g_string_append_c (s, '\n');
}

char *
lw_report_html (const LwReport *r, size_t *len)
{
  GString *s = g_string_new ("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n");
  g_string_append (s, "<title>");
  esc (s, r->title, false);
  g_string_append (s, "</title>\n<meta name=\"generator\" content=\"" LW_REPORT_GENERATOR
                      "\">\n");
  if (r->author)
    {
      g_string_append (s, "<meta name=\"author\" content=\"");
      esc (s, r->author, false);
      g_string_append (s, "\">\n");
    }
  g_string_append_printf (s, "<style>\n%s</style>\n</head>\n<body>\n", style);
  size_t fig = 0, section = 0;
  for (guint i = 0; i < r->blocks->len; i++)
    {
      const LwReportBlock *b = g_ptr_array_index (r->blocks, i);
      switch (b->kind)
        {
        case LW_REPORT_HEADING:
          if (b->level == 2)
            {
              if (section++ > 0)
                g_string_append (s, "</section>\n");
              g_string_append_printf (s, "<section id=\"%s\">\n", b->id ? b->id : "part");
            }
          g_string_append_printf (s, "<h%d>", b->level);
          esc (s, b->text, false);
          g_string_append_printf (s, "</h%d>\n", b->level);
          break;
        case LW_REPORT_PARAGRAPH:
          g_string_append (s, "<p>");
          esc (s, b->text, true);
          g_string_append (s, "</p>\n");
          break;
        case LW_REPORT_FORMULA:
          g_string_append (s, "<code class=\"formula\">");
          esc (s, b->text, false);
          g_string_append (s, "</code>\n");
          break;
        case LW_REPORT_CAUTION:
          g_string_append (s, "<p class=\"caution\">");
          esc (s, b->text, true);
          g_string_append (s, "</p>\n");
          break;
        case LW_REPORT_TABLE:
          g_string_append (s, "<table");
          if (b->id)
            g_string_append_printf (s, " data-table=\"%s\"", b->id);
          if (b->variant)
            {
              g_string_append (s, " data-variant=\"");
              esc (s, b->variant, false);
              g_string_append_c (s, '"');
            }
          g_string_append (s, ">\n<thead><tr>");
          for (size_t c = 0; c < b->n_cols; c++)
            {
              g_string_append (s, "<th>");
              esc (s, b->header[c], false);
              g_string_append (s, "</th>");
            }
          g_string_append (s, "</tr></thead>\n<tbody>\n");
          for (size_t row = 0; row < b->n_rows; row++)
            {
              g_string_append (s, "<tr>");
              for (size_t c = 0; c < b->n_cols; c++)
                {
                  const LwReportCell *cell = &b->cells[row * b->n_cols + c];
                  g_string_append (s, cell->best ? "<td class=\"best\">" : "<td>");
                  esc (s, cell->text, true);
                  g_string_append (s, "</td>");
                }
              g_string_append (s, "</tr>\n");
            }
          g_string_append (s, "</tbody>\n</table>\n");
          break;
        case LW_REPORT_FIGURE:
          {
            unsigned char *svg = NULL;
            size_t svg_len = 0;
            g_autoptr (GError) ferr = NULL;
            fig++;
            g_string_append_printf (s, "<figure id=\"figure-%s\">\n", b->id ? b->id : "plot");
            if (lw_plot_render (b->plot, LW_PLOT_FORMAT_SVG, b->fig_width, b->fig_height, NULL,
                                &svg, &svg_len, &ferr))
              append_svg (s, (const char *) svg, svg_len, fig);
            else
              {
                g_string_append (s, "<p>The figure could not be drawn: ");
                esc (s, ferr->message, false);
                g_string_append (s, "</p>\n");
              }
            g_free (svg);
            g_string_append_printf (s, "<figcaption>Figure %zu. ", fig);
            esc (s, b->text, false);
            g_string_append (s, "</figcaption>\n</figure>\n");
          }
          break;
        }
    }
  if (section > 0)
    g_string_append (s, "</section>\n");
  g_string_append (s, "</body>\n</html>\n");
  if (len)
    *len = s->len;
  return g_string_free (s, FALSE);
}
