/* lw-plot-export.c — PNG, SVG and PDF files of a figure (lw-plot-export.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-export.h"
#include "lw-file-write.h"

#include <stdio.h>
#include <string.h>

#include <cairo-pdf.h>
#include <cairo-svg.h>
#include <glib.h>

#define FIXED_PDF_DATE "2000-01-01T00:00:00Z"

G_DEFINE_QUARK (lw-plot-error-quark, lw_plot_error)

int
lw_plot_format_from_path (const char *path)
{
  const char *dot = path ? strrchr (path, '.') : NULL;
  if (dot == NULL)
    return -1;
  if (g_ascii_strcasecmp (dot, ".png") == 0)
    return LW_PLOT_FORMAT_PNG;
  if (g_ascii_strcasecmp (dot, ".svg") == 0)
    return LW_PLOT_FORMAT_SVG;
  if (g_ascii_strcasecmp (dot, ".pdf") == 0)
    return LW_PLOT_FORMAT_PDF;
  return -1;
}

static cairo_status_t
append_bytes (void *closure, const unsigned char *data, unsigned int length)
{
  g_byte_array_append (closure, data, length);
  return CAIRO_STATUS_SUCCESS;
}


bool
lw_plot_render (LwPlot *p, LwPlotFormat format, double width, double height,
                const LwPlotExportOptions *opts, unsigned char **out, size_t *out_len,
                GError **error)
{
  g_return_val_if_fail (p != NULL && out != NULL && out_len != NULL, false);
  if (!(width >= 16 && height >= 16 && width <= LW_PLOT_MAX_SIDE && height <= LW_PLOT_MAX_SIDE))
    {
      g_set_error (error, LW_PLOT_ERROR, LW_PLOT_ERROR_SIZE,
                   "the size %gx%g is outside 16 to %d", width, height, LW_PLOT_MAX_SIDE);
      return false;
    }
  if (format == LW_PLOT_FORMAT_PNG && width * height > LW_PLOT_MAX_PNG_PIXELS)
    {
      g_set_error (error, LW_PLOT_ERROR, LW_PLOT_ERROR_SIZE,
                   "a PNG of %gx%g pixels is more than the limit of %.0f pixels "
                   "(e.g. 5000x5000); use SVG or PDF for larger figures", width, height,
                   LW_PLOT_MAX_PNG_PIXELS);
      return false;
    }
  GByteArray *bytes = g_byte_array_new ();
  cairo_surface_t *s = NULL;
  switch (format)
    {
    case LW_PLOT_FORMAT_PNG:
      s = cairo_image_surface_create (CAIRO_FORMAT_ARGB32, (int) width, (int) height);
      break;
    case LW_PLOT_FORMAT_SVG:
      s = cairo_svg_surface_create_for_stream (append_bytes, bytes, width, height);
      cairo_svg_surface_restrict_to_version (s, CAIRO_SVG_VERSION_1_1);
      break;
    case LW_PLOT_FORMAT_PDF:
      s = cairo_pdf_surface_create_for_stream (append_bytes, bytes, width, height);
      cairo_pdf_surface_set_metadata (s, CAIRO_PDF_METADATA_CREATE_DATE,
                                      opts && opts->pdf_date ? opts->pdf_date : FIXED_PDF_DATE);
      if (opts && opts->pdf_title)
        cairo_pdf_surface_set_metadata (s, CAIRO_PDF_METADATA_TITLE, opts->pdf_title);
      if (opts && opts->pdf_creator)
        cairo_pdf_surface_set_metadata (s, CAIRO_PDF_METADATA_CREATOR, opts->pdf_creator);
      break;
    default:
      g_byte_array_unref (bytes);
      g_set_error (error, LW_PLOT_ERROR, LW_PLOT_ERROR_INPUT, "unknown figure format %d",
                   (int) format);
      return false;
    }
  cairo_status_t st = cairo_surface_status (s);
  if (st == CAIRO_STATUS_SUCCESS)
    {
      cairo_t *cr = cairo_create (s);
      lw_plot_draw_static (p, cr, width, height);
      st = cairo_status (cr);
      cairo_destroy (cr);
    }
  if (st == CAIRO_STATUS_SUCCESS && format == LW_PLOT_FORMAT_PNG)
    st = cairo_surface_write_to_png_stream (s, append_bytes, bytes);
  cairo_surface_finish (s);
  if (st == CAIRO_STATUS_SUCCESS)
    st = cairo_surface_status (s);
  cairo_surface_destroy (s);
  if (st != CAIRO_STATUS_SUCCESS)
    {
      g_set_error (error, LW_PLOT_ERROR, LW_PLOT_ERROR_RENDER, "cannot render the figure: %s",
                   cairo_status_to_string (st));
      g_byte_array_unref (bytes);
      return false;
    }
  *out_len = bytes->len;
  *out = g_byte_array_free (bytes, FALSE);
  return true;
}

bool
lw_plot_export (LwPlot *p, LwPlotFormat format, const char *path, double width, double height,
                const LwPlotExportOptions *opts, GError **error)
{
  unsigned char *data = NULL;
  size_t len = 0;
  if (!lw_plot_render (p, format, width, height, opts, &data, &len, error))
    return false;
  GError *gerr = NULL;
  bool ok = lw_file_replace (path, data, len, &gerr);
  if (!ok)
    {
      g_set_error_literal (error, LW_PLOT_ERROR, LW_PLOT_ERROR_WRITE, gerr->message);
      g_error_free (gerr);
    }
  g_free (data);
  return ok;
}
