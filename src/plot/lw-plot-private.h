/* lw-plot-private.h — the figure model shared by the renderer's files (not installed, not
 * included outside src/plot/).
 *
 * A view is turned once, in lw_plot_new (lw-plot-figure.c), into panels of primitives
 * (polylines, markers, texts, bands, circles) whose points are already mapped to [0, 1] by the
 * panel's axes; the view's builder (lw-plot-view-NAME.c, found through the view table in
 * lw-plot-view.c) adds them with the lwp_add_* helpers. Drawing (lw-plot-draw.c) scales them to
 * the panel rectangles; nothing is recomputed when only the size changes. Texts are laid out by
 * lw-plot-text.c, margin labels placed by lw-plot-labels.c; lw-plot-hit.c translates between
 * pixels and axis values and draws the overlay.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include <glib.h>
#include <pango/pangocairo.h>

#include "lw-plot.h"

#define MAX_PANELS 3
#define MAX_TICKS 512
/* Margins are dimensioned as on a drawing: a thin line between the reference and the curve
 * with an arrowhead at each end (Prim.arrows); requirements are hatched keep-out zones. */
#define GAUGE_WIDTH 1.3
#define ARROW_SIZE 5.0
#define HATCH_STEP 6.0
#define DROP_WIDTH 0.8
#define THIN_WIDTH 1.0
#define MAX_LABELLED_CROSSOVERS 3
/* A margin is labelled when it is the governing one (the smallest in magnitude) or within
 * this much of it; the rest are marked, and read in the hover and the metrics table. Common
 * practice, no source: a crossing more than a few dB or tens of degrees further from
 * instability than the governing one does not decide the design. */
#define LABEL_WITHIN_GM_DB 6.0
#define LABEL_WITHIN_PM_DEG 30.0
/* The default phase axis ends about this factor above the highest gain crossover (a decade,
 * issue 13's "about a decade past the last crossover"). */
#define PHASE_BRANCH_SPAN 10.0
/* Nyquist diagram and pole map: points with |L| (or |z|) beyond this are left out of the
 * automatic range (the curve is clipped, not dropped). Common practice, no source. */
#define NYQUIST_RANGE_CAP 2.0
#define POLE_RANGE_CAP 4.0
/* Magnitude axes show at most this many dB below the highest point of the curves. */
#define MAG_DEPTH_DB 140.0

/* ---- themes (lw-plot-draw.c) ------------------------------------------------------------ */

typedef struct {
  double bg[3], text[3], frame[3], grid_major[3], grid_minor[3], ref[3], nyquist[3];
  double palette[LW_PLOT_MAX_VARIANTS][3];
} Theme;

/* ---- figure model ---------------------------------------------------------------------- */

typedef enum { COL_VARIANT, COL_TEXT, COL_REF, COL_NYQUIST, COL_FRAME } ColourRole;
typedef enum { DASH_SOLID, DASH_VARIANT, DASH_DOTTED, DASH_DASHED, DASH_DASHDOT } DashRole;
typedef enum {
  PRIM_LINE,      /* polyline u[], v[]; NaN breaks it */
  PRIM_MARK,      /* markers at each point */
  PRIM_TEXT,      /* text at (u[0], v[0]) + pixel offset */
  PRIM_HBAND,     /* band between v[0] and v[1] across the panel */
  PRIM_CIRCLE,    /* circle centre (u[0], v[0]), radius r_units of the x axis (equal aspect) */
  PRIM_ARC,       /* arc of the circle from angle a0 to a1 (degrees, data space) */
  PRIM_AREA       /* filled polygon(s) u[], v[]; NaN closes one and starts the next */
} PrimKind;
typedef enum { MARK_CIRCLE, MARK_DISC, MARK_DIAMOND, MARK_CROSS, MARK_PLUS } MarkShape;

typedef struct {
  PrimKind kind;
  ColourRole colour;
  size_t variant;
  DashRole dash;
  double width;
  double alpha;
  size_t n;
  double *u, *v;
  MarkShape shape;
  double size;
  char *text;
  double dx, dy;         /* text offset, user units */
  double ax, ay;         /* text anchor: 0 left/top, 0.5 centre, 1 right/bottom */
  bool plate;            /* background plate behind the text */
  /* a variant's margin label: placed at drawing time so that labels do not cover each other
   * (place_labels); lx, ly: the top left corner of its text there; shown: false when no free
   * place was found */
  bool label;
  bool arrows;           /* a dimension: a 2-point line or an arc with an arrowhead at each
                            end, pointing outward */
  bool optional;         /* a text that may be left out when it finds no free place (placed
                            after every other: the compressed Nyquist circles' values) */
  bool shown;
  bool moved;            /* a label placed a row or more away from where it prefers: drawn
                            with a leader line to its anchor */
  double lx, ly, lw, lh;         /* lw, lh: the size of its text */
  double r_units, a0, a1;
  long owner;            /* the variant the primitive belongs to (its layer), or −1 */
  /* a variant's curve: where its points came from (LwPlotVariant.data_key, the input arrays
   * and which curve of them), so a figure built with this one as axes_of can copy them */
  unsigned long key;
  const void *src_x, *src_y;
  int tag;
} Prim;

typedef struct {
  LwPlotAxis x, y;
  const char *x_label, *y_label;   /* static strings, or the figure's own (lwp_label) */
  const char *x_name, *x_unit, *y_name, *y_unit;
  bool x_tick_labels;
  bool equal_aspect;
  GPtrArray *prims;
  double rx, ry, rw, rh;            /* plot area of the last layout */
  /* the visible part of the x axis (zoom and pan, lw_plot_set_x_view): u in [wu0, wu1] is
   * drawn across the plot area, and xv is the axis of that part (ticks, read-outs) */
  double wu0, wu1;
  LwPlotAxis xv;
} Panel;

struct LwPlot {
  LwPlotView view;
  LwPlotTheme theme;
  char *title;
  size_t n_variants;
  char *names[LW_PLOT_MAX_VARIANTS];
  size_t styles[LW_PLOT_MAX_VARIANTS];   /* colour and dash slot of each variant, 0-based */
  LwPlotHandle *clear;                   /* places the labels keep clear of */
  size_t n_clear;
  size_t n_panels;
  Panel panels[MAX_PANELS];
  double width, height;
  int legend_rows;
  bool laid_out;
  bool decimate;                    /* lw_plot_set_decimate */
  LwPlotTextCache *text_cache;      /* borrowed (lw_plot_set_text_cache), or NULL */
  /* while lw_plot_new builds: the figure whose mapped curves may be copied (axes_of), and
   * each variant's data key */
  const LwPlot *reuse;
  unsigned long keys[LW_PLOT_MAX_VARIANTS];
  GPtrArray *strings;               /* texts the figure made (lwp_label), freed with it */
  bool side_by_side;                /* panels in a row (the pole-zero map and its zoom),
                                       not stacked */
  size_t n_keys;                    /* marker shapes explained in the legend rows, after the
                                       variants (the pole-zero map's: lwp_add_key) */
  struct { int shape; const char *text; } keys_shown[4];
  /* a plant family's key entry (lwp_family_key): a thin light line in the colour of the
   * variant family_style, then its text; NULL when no family is drawn */
  const char *family_key;
  size_t family_style;
};

/* A text made for this figure (an axis label with a unit): formatted, kept until the figure
 * is freed. */
const char *lwp_label (LwPlot *pl, const char *fmt, ...) G_GNUC_PRINTF (2, 3);

/* Which primitives a layer holds: everything, everything but variant `v`'s, or only its. */
typedef enum { LAYER_ALL, LAYER_BASE, LAYER_VARIANT } Layer;

typedef enum { FONT_TICK, FONT_LABEL, FONT_NOTE, FONT_TITLE } FontRole;

/* An extent of data values (ranges of the axes). */
typedef struct {
  double lo, hi;
  bool any;
} Extent;

/* A view's builder: fills pl->panels (and pl->n_panels) from in, whose data the view table
 * has checked (lw-plot-view.c). */
typedef void (*LwpBuildFunc) (LwPlot *pl, const LwPlotInput *in);

/* ---- mapping (inline: called once per point) ------------------------------------------- */

/* data value → u, v in [0, 1] of a panel's axes */
static inline double
mx (const Panel *pn, double x)
{
  return lw_plot_axis_map (&pn->x, x);
}

static inline double
my (const Panel *pn, double y)
{
  return lw_plot_axis_map (&pn->y, y);
}

/* u, v → pixels of the last layout, through the visible part of the x axis. A point mapped
 * far outside the plot area (a diverging response on an axis chosen for another) is held at
 * twice the area's size beyond it: cairo keeps coordinates in 24.8 fixed point, and its
 * vector surfaces clip and dash whole segments, so a segment millions of pixels long makes
 * them fail ("out of memory"). What is visible stays exact when only one coordinate is held
 * (the usual case: a curve far above or below the axis). */
static inline double
lwp_hold_px (double p, double lo, double size)
{
  double m = 2.0 * size + 100.0;
  return p < lo - m ? lo - m : p > lo + size + m ? lo + size + m : p;
}

static inline double
px_of (const Panel *pn, double u)
{
  return lwp_hold_px (pn->rx + (u - pn->wu0) / (pn->wu1 - pn->wu0) * pn->rw, pn->rx, pn->rw);
}

static inline double
py_of (const Panel *pn, double v)
{
  return lwp_hold_px (pn->ry + (1.0 - v) * pn->rh, pn->ry, pn->rh);
}

/* ---- primitives and ranges (lw-plot-figure.c), for the builders ------------------------ */

/* lw-plot-polyline.c: a polyline prim q of panel pn as a path of at most four vertices per
 * pixel column, vertices within 0.2 px of a straight segment left out (NaN breaks it) */
void lwp_polyline_decimated (const Panel *pn, cairo_t *cr, const Prim *q);
/* The path through every point of q (NaN breaks it), each piece closed when closed (a
 * PRIM_AREA's polygons, filled by the caller). */
void lwp_points_path (const Panel *pn, cairo_t *cr, const Prim *q, bool closed);
Prim *lwp_prim_add (Panel *pn, PrimKind kind, size_t n);
Prim *lwp_add_line (Panel *pn, size_t n, const double *x, const double *y);
Prim *lwp_add_segment (Panel *pn, double x0, double y0, double x1, double y1);
Prim *lwp_add_vline (Panel *pn, double x);
Prim *lwp_add_hline (Panel *pn, double y);
Prim *lwp_add_mark (Panel *pn, double x, double y, MarkShape shape, double size);
Prim *lwp_add_text_uv (Panel *pn, double u, double v, const char *text, double dx, double dy,
                       double ax, double ay);
Prim *lwp_add_text (Panel *pn, double x, double y, const char *text, double dx, double dy,
                    double ax, double ay);
Prim *lwp_style_variant (Prim *p, size_t variant, double width);
/* A marker shape (MarkShape) and what it means, shown in the legend rows after the variants
 * (at most four; text static) */
void lwp_add_key (LwPlot *p, int shape, const char *text);
/* Which of the n crossovers x get a margin label (label[i]): the governing one (the
 * smallest |margin|) and those whose |margin| is within `within` of it, at most
 * MAX_LABELLED_CROSSOVERS of them, the smallest first; non-finite margins never. */
void lwp_choose_labels (const LwPlotCrossover *x, size_t n, double within, bool *label);
/* The choice for both margins of curve c: *pm for its gain crossovers (phase margins), *gm
 * for its phase crossovers (gain margins); new arrays, g_free them. */
void lwp_choose_margin_labels (const LwPlotFreqCurve *c, bool **pm, bool **gm);

Prim *lwp_margin_label (Panel *pn, double x, double y, const char *text, double dx, double dy,
                        double ax, double ay, size_t v);
Prim *lwp_curve_reuse (LwPlot *pl, Panel *pn, size_t v, const void *src_x, const void *src_y,
                       int tag, size_t n);
Prim *lwp_curve_mark (LwPlot *pl, Prim *p, size_t v, const void *src_x, const void *src_y,
                      int tag);
Prim *lwp_add_curve (LwPlot *pl, Panel *pn, size_t v, size_t n, const double *x,
                     const double *y);
void lwp_extent_add (Extent *e, double v);
void lwp_widen_to_aspect (Extent *ex, Extent *ey);
void lwp_axis_from_extent (LwPlotAxis *a, LwPlotScale scale, LwPlotTickStyle style, Extent e,
                           int target_majors);
bool lwp_axes_kept (const LwPlot *pl, const LwPlotInput *in);
void lwp_keep_axes (LwPlot *pl, const LwPlotInput *in);
void lwp_format_margin (char *buf, size_t size, const char *what, double value,
                        const char *unit);
void lwp_add_phase_references (Panel *pn, const LwPlotAxis *a, bool vertical);

/* ---- plant families (lw-plot-family.c) ------------------------------------------------- */

/* Opacity of a family member's curve (widths in lw-plot.h); the worst phase margin's member
 * nearly opaque. */
#define FAMILY_WIDTH LW_PLOT_FAMILY_WIDTH
#define FAMILY_ALPHA 0.28
#define FAMILY_WORST_WIDTH LW_PLOT_FAMILY_WORST_WIDTH
#define FAMILY_WORST_ALPHA 0.85
#define FAMILY_BAND_ALPHA 0.16

/* The variant of `in` whose family is drawn (the first with one of at least one member), or
 * SIZE_MAX; sets the figure's key entry "family (N members)" for it. */
size_t lwp_family_key (LwPlot *pl, const LwPlotInput *in);
/* A member's curve (x[i], y[i]) in panel pn, styled as a member of variant v's family (the
 * worst member's style when worst); added before the variant's own curves, so under them. */
Prim *lwp_family_line (Panel *pn, size_t v, size_t n, const double *x, const double *y,
                       bool worst);
/* The worst member marked at (x, y) in data units of pn (its crossover) and labelled. */
void lwp_family_worst_label (Panel *pn, size_t v, double x, double y, double pm_deg);
/* A family's band between lo[] and hi[] over x[] (n points; NaN: not covered) as a filled
 * area in variant v's colour; NULL when it has no two covered points in a row. */
Prim *lwp_family_band (Panel *pn, size_t v, size_t n, const double *x, const double *lo,
                       const double *hi);

/* ---- the view table (lw-plot-view.c) and the builders (lw-plot-view-NAME.c) ----------- */

/* The builder of a view; NULL when v is not a view. */
LwpBuildFunc lwp_view_builder (LwPlotView v);
/* True when some variant of in has a series in->view needs (LwPlotViewInfo.needs; the
 * Nyquist rate is checked apart, with its own message). */
bool lwp_view_has_data (const LwPlotInput *in);

void lwp_build_bode_z (LwPlot *pl, const LwPlotInput *in);
void lwp_build_bode_w (LwPlot *pl, const LwPlotInput *in);
void lwp_build_nyquist (LwPlot *pl, const LwPlotInput *in);
void lwp_build_nichols (LwPlot *pl, const LwPlotInput *in);
void lwp_build_step (LwPlot *pl, const LwPlotInput *in);
void lwp_build_poles (LwPlot *pl, const LwPlotInput *in);
void lwp_build_sensitivity (LwPlot *pl, const LwPlotInput *in);
void lwp_build_disturbance (LwPlot *pl, const LwPlotInput *in);

/* ---- drawing (lw-plot-draw.c) ---------------------------------------------------------- */

const Theme *lwp_theme_of (const LwPlot *p);
void lwp_set_rgb (cairo_t *cr, const double c[3], double alpha);
void lwp_set_dash (cairo_t *cr, DashRole d, size_t variant);
bool lwp_prim_in_layer (const Prim *q, Layer layer, size_t v);

/* ---- texts (lw-plot-text.c) and labels (lw-plot-labels.c) ------------------------------ */

PangoLayout *lwp_text_layout (LwPlotTextCache *c, cairo_t *cr, const char *text, FontRole role);
void lwp_draw_text (LwPlotTextCache *tc, cairo_t *cr, const char *text, FontRole role,
                    double x, double y, double ax, double ay, const double colour[3],
                    const double *plate, double angle);
void lwp_place_labels (LwPlot *p, cairo_t *cr, size_t first);
