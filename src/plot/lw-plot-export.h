/* lw-plot-export.h — a figure written to a PNG, SVG or PDF file.
 *
 * The file is rendered in memory and then written by lw_file_replace (a hidden temporary
 * file beside the target, synced and renamed over it; a symbolic link is followed), so a
 * failed export leaves an older file intact.
 *
 * Reproducibility (checked with cairo 1.16, see docs/plot.md): the same figure gives the same
 * bytes each time. SVG: cairo numbers its ids (glyph0-1, clip1, …) in drawing order and writes
 * no date. PDF: cairo writes a /CreationDate of the current time unless one is set; we always
 * set one — the caller's (pdf_date) or, without it, a fixed 2000-01-01T00:00:00Z that means
 * "not stated" — so a PDF is reproducible unless the caller asks for a date.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include "lw-plot.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
  LW_PLOT_FORMAT_PNG = 0,
  LW_PLOT_FORMAT_SVG,
  LW_PLOT_FORMAT_PDF
} LwPlotFormat;

/* Sizes: 16 to LW_PLOT_MAX_SIDE on each side; a PNG has at most LW_PLOT_MAX_PNG_PIXELS pixels
 * (4 bytes each while it is drawn: 100 MB; an A3 page at 300 dpi is 17.4e6 pixels, while
 * 20000 x 20000 took 1.6 GB and 20 s). SVG and PDF are vector: their size costs nothing. */
#define LW_PLOT_MAX_SIDE 20000
#define LW_PLOT_MAX_PNG_PIXELS 25000000.0

/* The format named by a path's extension (.png, .svg, .pdf, any case); -1 for another. */
int lw_plot_format_from_path (const char *path);

typedef struct {
  const char *pdf_date;     /* PDF creation date, "YYYY-MM-DDThh:mm:ss" with optional zone, or
                               NULL for the fixed "not stated" date (see top) */
  const char *pdf_title;    /* PDF title metadata, or NULL */
  const char *pdf_creator;  /* PDF creator metadata, or NULL */
} LwPlotExportOptions;

/* Draws the static layer of p at width × height (pixels for PNG, points for SVG and PDF) and
 * writes it to path. opts may be NULL. false with a one-sentence error (LW_PLOT_ERROR) when
 * rendering or writing failed; the file is then left as it was. */
bool lw_plot_export (LwPlot *p, LwPlotFormat format, const char *path, double width,
                     double height, const LwPlotExportOptions *opts, GError **error);

/* The same into memory: *out (g_free) and *out_len. */
bool lw_plot_render (LwPlot *p, LwPlotFormat format, double width, double height,
                     const LwPlotExportOptions *opts, unsigned char **out, size_t *out_len,
                     GError **error);

#ifdef __cplusplus
}
#endif
