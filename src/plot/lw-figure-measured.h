/* lw-figure-measured.h — the loop closed on a measured response (lw_measured_loop_close) as a
 * variant of a figure: Bode in z and w, Nyquist, Nichols, sensitivity (no time responses or
 * poles), faded where the coherence is low. Shared by the window and `plot --measured`.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-measured.h"
#include "lw-plot.h"

typedef struct
{
  LwPlotVariant variant;     /* points into the arrays below and the loop's */
  char *name;                /* "measured (KIND; faded: coherence < 0.8)": variant.name */
  char *legend;              /* "measured (KIND)": for a figure's own legend, whose slots of
                              * LW_PLOT_LEGEND_SLOT do not hold the longer name (the fading
                              * then said in a caption or note) */
  double *mag_db, *phase_deg, *nu, *re, *im;
  LwPlotCrossover *cross, *cross_w;
} LwFigureMeasured;

/* Fills f from the loop ml (kept by the caller while f is used), of the table's kind, with the
 * coherence of its points (NULL: none) at period_s. */
void lw_figure_measured_fill (LwFigureMeasured *f, const LwMeasuredLoop *ml,
                              LwMeasuredKind kind, const double *coherence, double period_s);
void lw_figure_measured_clear (LwFigureMeasured *f);

/* The style of the data drawn after the n variants vars: the first style (1 …
 * LW_PLOT_MAX_VARIANTS) none of them has (a style 0 stands for its position + 1), so the data
 * never take a drawn variant's colour and dash. The window, `plot` and the report alike. */
unsigned lw_figure_measured_style (const LwPlotVariant *vars, size_t n);

/* Whether view (an LwPlotView) can draw measured data (it needs only frequency curves). */
bool lw_figure_measured_view_ok (int view);
