/* lw-plot.h — the figure renderer: draws one view of one or more evaluated variants of a design
 * into any cairo_t (a window, a PNG, SVG or PDF surface). Shared by the CLI and the window, so a
 * figure exported from either is the same figure.
 *
 * No numerics here: the caller fills the plain structs below with evaluated curves and figures
 * (lw-figure-data.h does it from a core evaluation). Every array is borrowed only during
 * lw_plot_new, which maps it once through the axes and keeps the mapped values (u, v in [0, 1]);
 * drawing only scales them to the panel rectangles of the current size.
 *
 * For a window: lw_plot_draw_static draws the static layer (frame, grid, curves, annotations,
 * legend) — cache it in a surface or render node and redraw it when the data or the size
 * change; lw_plot_draw_overlay draws hover read-outs and drag handles on top, cheaply, every
 * frame. lw_plot_value_at_pixel / lw_plot_pixel_of_value translate between pointer positions
 * and axis values using the layout of the last draw (or of lw_plot_layout).
 *
 * Layout rule (user units of the cairo_t, pixels for PNG): every panel's plot area is
 *   x from LW_PLOT_MARGIN_LEFT to width − LW_PLOT_MARGIN_RIGHT,
 *   y from LW_PLOT_MARGIN_TOP + LW_PLOT_LEGEND_ROW · rows to height − LW_PLOT_MARGIN_BOTTOM,
 * with rows = (title ? 1 : 0) + ⌈named variants / slots⌉ and slots = max(1, ⌊(width −
 * LW_PLOT_MARGIN_LEFT − LW_PLOT_MARGIN_RIGHT) / LW_PLOT_LEGEND_SLOT⌋) legend entries per row,
 * split into stacked panels of equal height with LW_PLOT_PANEL_GAP between them (first panel
 * on top). A panel with equal aspect (Nyquist, pole-zero map) is shrunk about its centre so one
 * unit has the same length on both axes. Inside a panel,
 *   pixel x = left + u · width,   pixel y = top + (1 − v) · height.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include <cairo.h>
#include <glib.h>

#include "lw-plot-axis.h"
#include "lw-plot-view.h"   /* LwPlotView and the view table */

#ifdef __cplusplus
extern "C" {
#endif

#define LW_PLOT_MARGIN_LEFT 78.0
#define LW_PLOT_MARGIN_RIGHT 24.0
#define LW_PLOT_MARGIN_TOP 14.0
#define LW_PLOT_MARGIN_BOTTOM 48.0
#define LW_PLOT_LEGEND_ROW 20.0
#define LW_PLOT_PANEL_GAP 18.0
#define LW_PLOT_LEGEND_SLOT 170.0
/* Line width of every curve of a variant (and its legend sample): no other stroke uses it, so
 * exported SVG curves can be told apart from grid and annotations. */
#define LW_PLOT_CURVE_WIDTH 1.75
/* Line widths of a plant family's member curves and of its worst phase margin's member
 * (dashed), and of the family's key sample: no other stroke of the frequency views uses them. */
#define LW_PLOT_FAMILY_WIDTH 0.85
#define LW_PLOT_FAMILY_WORST_WIDTH 1.35

typedef enum {
  LW_PLOT_THEME_LIGHT = 0,
  LW_PLOT_THEME_DARK = 1
} LwPlotTheme;

/* A crossover of the loop with its margin, and the point of L there (for annotations). */
typedef struct {
  double freq_rad_s;       /* ω (Bode in z) or ν (w-plane), rad/s */
  double margin;           /* phase margin in degrees, or gain margin in dB */
  double mag_db;           /* |L| there, dB */
  double phase_deg;        /* ∠L there, degrees, on the branch of the curve */
  double re, im;           /* L there */
} LwPlotCrossover;

/* A loop frequency response over one frequency axis (ascending freq, > 0). */
typedef struct {
  size_t n;
  const double *freq_rad_s;
  const double *mag_db;
  const double *phase_deg;
  size_t n_gain_crossovers;
  const LwPlotCrossover *gain_crossovers;    /* margin = phase margin, degrees */
  size_t n_phase_crossovers;
  const LwPlotCrossover *phase_crossovers;   /* margin = gain margin, dB */
  /* straight-line asymptote of |L| (w-plane): vertices, drawn joined (may be 0) */
  size_t n_asymptote;
  const double *asymptote_freq_rad_s;
  const double *asymptote_db;
  /* optional (NULL): how far each point is to be trusted, 0 … 1 (a measurement's coherence);
   * the Bode views draw the curve faded where it is below LW_PLOT_LOW_CONFIDENCE */
  const double *confidence;
} LwPlotFreqCurve;

#define LW_PLOT_LOW_CONFIDENCE 0.8

/* L along ascending ω, for the Nyquist diagram (the mirror for negative ω is drawn too). */
typedef struct {
  size_t n;
  const double *re;
  const double *im;
} LwPlotComplexCurve;

/* Time responses; every optional series may be absent (n or pointer 0). */
typedef struct {
  double period_s;
  size_t n;                  /* samples y(kT), k = 0 … n−1, drawn held over [kT, (k+1)T) */
  const double *y;
  bool has_final;  double final_value;     /* drawn as a reference level */
  size_t n_fine;             /* continuous output between samples (optional) */
  const double *t_fine_s;
  const double *y_fine;
  const double *u;           /* actuator signal u(kT), n samples (optional, NULL) */
  bool has_limits;  double u_low, u_high;
} LwPlotStepData;

typedef struct {
  size_t n_closed_loop;  const double *cl_re;  const double *cl_im;
  size_t n_loop_poles;   const double *pole_re; const double *pole_im;   /* open loop L(z) */
  size_t n_loop_zeros;   const double *zero_re; const double *zero_im;
} LwPlotPoleData;

/* The envelope of a plant family's members over a common frequency grid (ω or ν): at each
 * frequency the lowest and highest magnitude and phase of the members covering it (NaN where
 * none does). Drawn as a light filled band under the member lines. */
typedef struct {
  size_t n;
  const double *freq_rad_s;
  const double *mag_lo_db, *mag_hi_db;
  const double *phase_lo_deg, *phase_hi_deg;
} LwPlotBand;

/* The members of a plant family drawn with a variant (docs/families.md): each member's loop
 * over the same axes as the variant's own curves, drawn thin and light in the variant's colour
 * under it (Bode in z and w, Nyquist, Nichols, |S| in the sensitivity view, the step's output,
 * the closed-loop poles as small dots); the member of the worst phase margin dashed, with a
 * small label in the Bode views. Arrays of n; a member's curve may be empty (n = 0). */
typedef struct {
  size_t n_members;                   /* members evaluated, for the key "family (N members)" */
  size_t n;                           /* members drawn */
  const LwPlotFreqCurve *z;           /* n, or NULL */
  const LwPlotFreqCurve *w;           /* n, or NULL */
  const LwPlotComplexCurve *nyquist;  /* n, or NULL */
  size_t worst_pm;                    /* the drawn member of the worst phase margin, or
                                         SIZE_MAX; labelled with worst_pm_deg */
  double worst_pm_deg;
  /* optional: the envelope of more members than those drawn (the window during a drag draws
   * the band and the worst members' lines); not drawn with a wrapped phase axis */
  const LwPlotBand *band_z, *band_w;
  const LwPlotStepData *step;         /* n, or NULL: each member's reference step (y only) */
  const LwPlotPoleData *poles;        /* n, or NULL: each member's closed-loop poles */
} LwPlotFamily;

/* One variant of the design: what each view needs (a view ignores the rest). */
typedef struct {
  const char *name;            /* legend text (UTF-8); NULL: no legend entry */
  LwPlotFreqCurve z;           /* over ω, ending at the Nyquist frequency */
  LwPlotFreqCurve w;           /* over ν */
  LwPlotComplexCurve nyquist;
  LwPlotStepData step;
  /* the output after a unit step disturbance at the plant's input and at its output
   * (period_s, n, y; optional) */
  LwPlotStepData dist_in, dist_out;
  LwPlotPoleData poles;
  /* optional (0: none): a key for the data above. A caller that gives the same nonzero key
   * to a variant of this figure and of its axes_of promises the same arrays with the same
   * values in them; the figure then copies that variant's mapped curves from axes_of (when
   * their panel has the same axes) instead of mapping every point again. */
  unsigned long data_key;
  /* optional: the variant's colour and dash, 1 … LW_PLOT_MAX_VARIANTS (its place in the
   * document, say, so that a variant keeps its look whichever others are drawn with it);
   * 0: its position in this figure's list. */
  unsigned style;
  /* optional (NULL: none): a plant family drawn under this variant's curves; at most one
   * variant of a figure has one (the first with it is drawn) */
  const LwPlotFamily *family;
} LwPlotVariant;

/* Requirement marks, drawn where they apply. */
typedef struct {
  bool has_target_crossover;
  double target_crossover_rad_s;     /* ω (Bode in z) */
  double target_crossover_nu_rad_s;  /* the same warped to ν (w-plane) */
  bool has_min_phase_margin;
  double min_phase_margin_deg;
  bool has_min_gain_margin;
  double min_gain_margin_db;
  bool has_max_sensitivity;        /* the strictest bound on the peak of |S| (ratio) */
  double max_sensitivity;
} LwPlotRequirements;

typedef struct LwPlot LwPlot;

typedef struct {
  LwPlotView view;
  double nyquist_rad_s;        /* π/T, where the Bode-in-z axis ends */
  const char *title;           /* optional, drawn top left (UTF-8) */
  size_t n_variants;           /* 1 … LW_PLOT_MAX_VARIANTS */
  const LwPlotVariant *variants;
  LwPlotRequirements req;
  /* optional: a figure of the same view whose axes (every panel's x and y) are taken instead
   * of ranges chosen from the data, when it has as many panels — a figure rebuilt during a
   * drag keeps its frame, so its grid and the other variants' curves stay in place */
  const LwPlot *axes_of;
  /* optional: the units of the plant's input (u, the actuator's) and output (y), short texts
   * ("V", "mm"); the time views label their axes with them */
  const char *input_unit;
  const char *output_unit;
  /* the Bode views' phase axis: false (default) the branch around the gain crossovers, from
   * the low end to about a decade past the last one, the curve continuing off the axis with
   * a note saying where to; true the whole unwrapped range of the curve */
  bool phase_full_range;
  /* the Bode views' phase in one turn: ∠L wrapped into (−360°, 0°], the curve broken where it
   * wraps (takes the place of phase_full_range) */
  bool phase_wrapped;
  /* the Nyquist diagram's radial scale: false (default) linear, the view capped near the
   * unit circle; true compressed beyond the unit circle, |L| = r drawn at radius
   * 1 + log10 r (each decade one unit), so a loop with a large low-frequency gain
   * (integrators) shows whole with the region around −1 at its true scale */
  bool nyquist_compressed;
} LwPlotInput;

#define LW_PLOT_MAX_VARIANTS 6


/* The renderer's errors (GError domain LW_PLOT_ERROR). */
#define LW_PLOT_ERROR (lw_plot_error_quark ())
typedef enum
{
  LW_PLOT_ERROR_INPUT,     /* nothing to draw, or the input does not suit the view */
  LW_PLOT_ERROR_SIZE,      /* a figure size outside the limits */
  LW_PLOT_ERROR_RENDER,    /* cairo could not draw or encode the figure */
  LW_PLOT_ERROR_WRITE      /* the file could not be written */
} LwPlotError;
GQuark lw_plot_error_quark (void);

/* Builds the figure: chooses axis ranges, maps every series once. NULL with a one-sentence
 * error (LW_PLOT_ERROR_INPUT) when the input has nothing to draw for the view. */
LwPlot *lw_plot_new (const LwPlotInput *in, GError **error);
void lw_plot_free (LwPlot *p);

void lw_plot_set_theme (LwPlot *p, LwPlotTheme theme);

/* Computes panel rectangles for a width × height figure (user units). Called by the draws. */
void lw_plot_layout (LwPlot *p, double width, double height);

/* Static layer: background, panels, grid, curves, annotations, legend. */
void lw_plot_draw_static (LwPlot *p, cairo_t *cr, double width, double height);

/* The static layer split in two, for a window where one variant moves (the one dragged):
 * lw_plot_draw_base draws everything but the curves, marks and labels in the colour of
 * `variant` (background, frame, grid, tick labels, references, legend, every other variant);
 * lw_plot_draw_variant draws only those, on top of a base drawn at the same size. Cache the
 * base and redraw it only when lw_plot_base_equal says it changed. */
void lw_plot_draw_base (LwPlot *p, cairo_t *cr, double width, double height, size_t variant);
void lw_plot_draw_variant (LwPlot *p, cairo_t *cr, double width, double height,
                           size_t variant);

/* True when a and b draw the same base layer for `variant` (lw_plot_draw_base): same view,
 * theme, title, legend, axes and visible range, and equal primitives apart from the
 * variant's own, compared value for value (false when either is NULL). */
bool lw_plot_base_equal (const LwPlot *a, const LwPlot *b, size_t variant);

/* Text layouts kept across figures, for a window that rebuilds its figure every frame of a
 * drag: a cache owned by the caller and lent to each figure with lw_plot_set_text_cache
 * (NULL: none, every text laid out afresh, as for files). A text drawn again in the same font
 * role reuses its layout; the cache holds the layouts of the last few hundred distinct texts.
 * Use one cache per widget (its texts are laid out for the cairo_t drawn on). */
typedef struct LwPlotTextCache LwPlotTextCache;
LwPlotTextCache *lw_plot_text_cache_new (void);
void lw_plot_text_cache_free (LwPlotTextCache *cache);
/* cache is borrowed: it must outlive the figure's draws */
void lw_plot_set_text_cache (LwPlot *p, LwPlotTextCache *cache);

/* Draw polylines with at most four vertices per pixel column (first, lowest, highest and last
 * point of each column's run), for screens; off by default, so exported files keep every
 * point. */
void lw_plot_set_decimate (LwPlot *p, bool decimate);

/* Zoom and pan of the frequency axis (Bode views only; false for others or a bad range):
 * the panels show ν or ω from lo to hi (rad/s, 0 < lo < hi; may reach beyond the data), with
 * ticks, read-outs and hit tests on that range; lw_plot_panel_x_axis returns the visible axis.
 * lw_plot_get_x_view gives the visible range, lw_plot_full_x_range the range lw_plot_new
 * chose. */
bool lw_plot_set_x_view (LwPlot *p, double lo, double hi);
bool lw_plot_get_x_view (const LwPlot *p, double *lo, double *hi);
void lw_plot_full_x_range (const LwPlot *p, double *lo, double *hi);

typedef struct {
  int panel;                   /* panel index */
  double x, y;                 /* axis values */
  bool active;                 /* being dragged / hovered */
} LwPlotHandle;

typedef struct {
  bool has_hover;
  double hover_x, hover_y;     /* pointer, user units */
  size_t n_handles;
  const LwPlotHandle *handles;
  /* the variant whose curve the read-out gives at the pointer's abscissa (in the views whose
   * curves are functions of it: Bode, sensitivity, time responses); 0 for the first */
  size_t readout_variant;
} LwPlotOverlay;

/* The read-out lw_plot_draw_overlay writes by the pointer ("ω 40.5 rad/s   |L| 0.02 dB"),
 * for the layout of the last draw; false when there is no hover or it is off every panel. */
bool lw_plot_readout (const LwPlot *p, const LwPlotOverlay *ov, char *buf, size_t size);

/* A key to the variants shown, in a row that wraps at width (one curve sample and name each,
 * in each variant's colour and dash: styles as LwPlotVariant.style, NULL: by position; the
 * active one's name in bold), drawn from (0, 0) on the theme's background. Gives the height
 * it took. For a window that shows one key over several figures. */
double lw_plot_draw_key_strip (cairo_t *cr, LwPlotTheme theme, const char *const *names,
                               const unsigned *styles, size_t n, size_t active, double width);

/* Places (their .panel, .x, .y; 8 px around each) that the margin labels drawn from now on
 * keep clear of: the drag handles, say. n = 0 clears the list. */
void lw_plot_set_keep_clear (LwPlot *p, const LwPlotHandle *places, size_t n);

/* Overlay layer on top of the static layer (last layout): crosshair with a read-out of the
 * axis values under the pointer, and drag handles. */
void lw_plot_draw_overlay (LwPlot *p, cairo_t *cr, const LwPlotOverlay *ov);

size_t lw_plot_n_panels (const LwPlot *p);
/* Axes of a panel (NULL when out of range). */
const LwPlotAxis *lw_plot_panel_x_axis (const LwPlot *p, size_t panel);
const LwPlotAxis *lw_plot_panel_y_axis (const LwPlot *p, size_t panel);
/* Plot area of a panel in the last layout. */
bool lw_plot_panel_rect (const LwPlot *p, size_t panel, double *x, double *y, double *w,
                         double *h);

/* Panel under a pixel and the axis values there; false outside every plot area. */
bool lw_plot_value_at_pixel (const LwPlot *p, double px, double py, size_t *panel, double *x,
                             double *y);
/* Pixel of axis values in a panel; false for a bad panel or a value not on the axis
 * (e.g. <= 0 on a log axis). The pixel may lie outside the plot area. */
bool lw_plot_pixel_of_value (const LwPlot *p, size_t panel, double x, double y, double *px,
                             double *py);

/* Colour of variant i (0-based, modulo the palette) in a theme, components in [0, 1]. */
void lw_plot_variant_colour (LwPlotTheme theme, size_t i, double rgb[3]);

#ifdef __cplusplus
}
#endif
