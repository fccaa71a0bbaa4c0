/* lw-plot-axis.h — one axis of a figure: maps values to [0, 1] and chooses its ticks.
 *
 * An axis maps a value v to u in [0, 1] (u = 0 at lo, 1 at hi; values outside map outside):
 *   linear:  u = (v − lo) / (hi − lo)
 *   log:     u = (log10 v − log10 lo) / (log10 hi − log10 lo)     (lo > 0; v <= 0 maps to NaN)
 * Everything the renderer draws is first mapped by its axes once; drawing only scales u to
 * pixels (lw-plot.h gives the pixel rule of each panel).
 *
 * Ticks: a log axis has a major tick at every decade 10^k and minor ticks at 2…9·10^k inside
 * [lo, hi]; a linear axis has major ticks at multiples of a natural step (1, 2, 5 × 10^k, or
 * for degrees 15°, 30°, 45°, 90°, 180°, 360° …) and minor ticks between them.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
  LW_PLOT_SCALE_LINEAR = 0,
  LW_PLOT_SCALE_LOG = 1
} LwPlotScale;

/* How tick values are chosen and written: plain numbers, or degrees (steps that are multiples
 * of 45° or 90° once the range spans more than about 180°). */
typedef enum {
  LW_PLOT_TICKS_PLAIN = 0,
  LW_PLOT_TICKS_DEGREES = 1
} LwPlotTickStyle;

typedef struct {
  LwPlotScale scale;
  LwPlotTickStyle style;
  double lo, hi;           /* lo < hi; for log, 0 < lo */
} LwPlotAxis;

/* Sets up an axis; false (axis untouched) unless lo < hi, both finite, and lo > 0 for log. */
bool lw_plot_axis_init (LwPlotAxis *a, LwPlotScale scale, LwPlotTickStyle style, double lo,
                        double hi);

double lw_plot_axis_map (const LwPlotAxis *a, double v);     /* value → u (see top) */
double lw_plot_axis_unmap (const LwPlotAxis *a, double u);   /* u → value */

/* Widens [lo, hi] (data extent, lo <= hi) to a range with natural ends: whole decades for log
 * (lo > 0), multiples of the major step for linear (chosen for about `target_majors` majors).
 * A degenerate extent (lo == hi) is opened around the value. Result written to *out_lo/hi. */
void lw_plot_nice_range (LwPlotScale scale, LwPlotTickStyle style, double lo, double hi,
                         int target_majors, double *out_lo, double *out_hi);

#define LW_PLOT_TICK_LABEL_MAX 32

typedef struct {
  double value;
  bool major;
  bool labelled;                       /* label[] holds text only when labelled */
  char label[LW_PLOT_TICK_LABEL_MAX];  /* UTF-8; negative numbers with U+2212 MINUS SIGN */
} LwPlotTick;

/* Ticks of `a` inside [lo, hi] (ends included within 1e-9 relative), ascending, at most `cap`
 * written to out[]. At most about `max_labels` (>= 2) ticks carry a label: on a log axis every
 * decade, or every 2nd, 5th … when there are more decades than max_labels; when fewer than two
 * decades fall inside, 2·10^k and 5·10^k are labelled too, and every minor tick when still
 * fewer than three labels result. Returns the number of ticks written. */
size_t lw_plot_axis_ticks (const LwPlotAxis *a, int max_labels, LwPlotTick *out, size_t cap);

/* The major step a linear axis uses for about `target_majors` majors over `span` > 0. */
double lw_plot_nice_step (LwPlotTickStyle style, double span, int target_majors);

/* Writes v as a tick label (shortest of %g-like forms at the given step; U+2212 for minus;
 * m·10^k with superscript digits for log values outside [1e-4, 1e5)). */
void lw_plot_format_tick (double v, double step, bool log_scale, char *buf, size_t size);

#ifdef __cplusplus
}
#endif
