/* lw-plot.c — the figure renderer (lw-plot.h).
 *
 * A view is turned once, in lw_plot_new, into panels of primitives (polylines, markers, texts,
 * bands, circles) whose points are already mapped to [0, 1] by the panel's axes. Drawing scales
 * them to the panel rectangles; nothing is recomputed when only the size changes.
 *
 * Style of our own: colour means a variant (a subset of the Okabe–Ito colour-universal-design
 * set, see docs/plot.md) and each variant also has its own dash pattern; everything that is a
 * reference (0 dB, −180°, the unit circle, the Nyquist line, requirement marks) is a neutral
 * grey of the theme. A margin is drawn as a short thick "gauge" bar from the reference to the
 * curve at its crossover, with a thin dotted drop line joining the magnitude and phase panels
 * and a small label ("PM 52.3°", "GM 8.1 dB") on a background plate.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include <glib.h>
#include <pango/pangocairo.h>

#define MAX_PANELS 3
#define MAX_TICKS 512
#define GAUGE_WIDTH 3.0
#define DROP_WIDTH 0.8
#define THIN_WIDTH 1.0
#define MAX_LABELLED_CROSSOVERS 3
/* Nyquist diagram and pole map: points with |L| (or |z|) beyond this are left out of the
 * automatic range (the curve is clipped, not dropped). Common practice, no source. */
#define NYQUIST_RANGE_CAP 2.0
#define POLE_RANGE_CAP 4.0
/* Magnitude axes show at most this many dB below the highest point of the curves. */
#define MAG_DEPTH_DB 140.0

/* ---- themes ---------------------------------------------------------------------------- */

typedef struct {
  double bg[3], text[3], frame[3], grid_major[3], grid_minor[3], ref[3], nyquist[3];
  double palette[LW_PLOT_MAX_VARIANTS][3];
} Theme;

#define HEX(h) { ((h) >> 16 & 0xff) / 255.0, ((h) >> 8 & 0xff) / 255.0, ((h) & 0xff) / 255.0 }

/* Palettes: members of the Okabe–Ito set (Okabe and Ito 2008, "Color Universal Design"),
 * ordered so the first colours stay apart under deuteranopia, protanopia and tritanopia
 * (checked by tests/plot/test-palette.py with the Machado 2009 simulation); the dark theme
 * swaps the dark blue for sky blue and vermillion for yellow, which read better on a dark
 * background. The palette test reads the two lists between "PALETTE_…:" and ":END". */
static const Theme themes[2] = {
  { /* light */
    HEX (0xffffff), HEX (0x1a1a1a), HEX (0x4d4d4d), HEX (0xd2d2d2), HEX (0xececec),
    HEX (0x7f7f7f), HEX (0x3a3a3a),
    { /* PALETTE_LIGHT: */ HEX (0x0072b2), HEX (0xd55e00), HEX (0x009e73), HEX (0xcc79a7),
      HEX (0xe69f00), HEX (0x56b4e9) /* :END */ } },
  { /* dark */
    HEX (0x1e1f22), HEX (0xe6e6e6), HEX (0xa0a0a0), HEX (0x3c3e43), HEX (0x2c2e32),
    HEX (0x8c8f95), HEX (0xcfcfcf),
    { /* PALETTE_DARK: */ HEX (0x56b4e9), HEX (0xe69f00), HEX (0x009e73), HEX (0xcc79a7),
      HEX (0xf0e442), HEX (0xd55e00) /* :END */ } },
};

/* Dash pattern of variant i (user units; empty = solid). */
static const double dash_patterns[LW_PLOT_MAX_VARIANTS][6] = {
  { 0 }, { 7, 3 }, { 8, 3, 2, 3 }, { 2, 2.5 }, { 12, 4 }, { 8, 3, 2, 3, 2, 3 },
};
static const int dash_lengths[LW_PLOT_MAX_VARIANTS] = { 0, 2, 4, 2, 2, 6 };

void
lw_plot_variant_colour (LwPlotTheme theme, size_t i, double rgb[3])
{
  const Theme *t = &themes[theme == LW_PLOT_THEME_DARK ? 1 : 0];
  memcpy (rgb, t->palette[i % LW_PLOT_MAX_VARIANTS], 3 * sizeof (double));
}

/* ---- figure model ---------------------------------------------------------------------- */

typedef enum { COL_VARIANT, COL_TEXT, COL_REF, COL_NYQUIST, COL_FRAME } ColourRole;
typedef enum { DASH_SOLID, DASH_VARIANT, DASH_DOTTED, DASH_DASHED, DASH_DASHDOT } DashRole;
typedef enum {
  PRIM_LINE,      /* polyline u[], v[]; NaN breaks it */
  PRIM_MARK,      /* markers at each point */
  PRIM_TEXT,      /* text at (u[0], v[0]) + pixel offset */
  PRIM_HBAND,     /* band between v[0] and v[1] across the panel */
  PRIM_CIRCLE,    /* circle centre (u[0], v[0]), radius r_units of the x axis (equal aspect) */
  PRIM_ARC        /* arc of the circle from angle a0 to a1 (degrees, data space) */
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
  bool shown;
  double lx, ly;
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
  const char *x_label, *y_label;   /* static strings */
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
};

static void
prim_free (gpointer data)
{
  Prim *p = data;
  g_free (p->u);
  g_free (p->v);
  g_free (p->text);
  g_free (p);
}

static Prim *
prim_add (Panel *pn, PrimKind kind, size_t n)
{
  Prim *p = g_new0 (Prim, 1);
  p->kind = kind;
  p->n = n;
  p->u = g_new0 (double, n > 0 ? n : 1);
  p->v = g_new0 (double, n > 0 ? n : 1);
  p->alpha = 1.0;
  p->width = THIN_WIDTH;
  p->colour = COL_REF;
  p->dash = DASH_SOLID;
  p->owner = -1;
  g_ptr_array_add (pn->prims, p);
  return p;
}

static double
mx (const Panel *pn, double x)
{
  return lw_plot_axis_map (&pn->x, x);
}

static double
my (const Panel *pn, double y)
{
  return lw_plot_axis_map (&pn->y, y);
}

/* A polyline of data points (x[i], y[i]); non-finite values break it. */
static Prim *
add_line (Panel *pn, size_t n, const double *x, const double *y)
{
  Prim *p = prim_add (pn, PRIM_LINE, n);
  for (size_t i = 0; i < n; i++)
    {
      p->u[i] = isfinite (x[i]) ? mx (pn, x[i]) : NAN;
      p->v[i] = isfinite (y[i]) ? my (pn, y[i]) : NAN;
    }
  return p;
}

static Prim *
add_segment (Panel *pn, double x0, double y0, double x1, double y1)
{
  double x[2] = { x0, x1 }, y[2] = { y0, y1 };
  return add_line (pn, 2, x, y);
}

static Prim *
add_vline (Panel *pn, double x)
{
  Prim *p = prim_add (pn, PRIM_LINE, 2);
  p->u[0] = p->u[1] = mx (pn, x);
  p->v[0] = 0.0;
  p->v[1] = 1.0;
  return p;
}

static Prim *
add_hline (Panel *pn, double y)
{
  Prim *p = prim_add (pn, PRIM_LINE, 2);
  p->u[0] = 0.0;
  p->u[1] = 1.0;
  p->v[0] = p->v[1] = my (pn, y);
  return p;
}

static Prim *
add_mark (Panel *pn, double x, double y, MarkShape shape, double size)
{
  Prim *p = prim_add (pn, PRIM_MARK, 1);
  p->u[0] = mx (pn, x);
  p->v[0] = my (pn, y);
  p->shape = shape;
  p->size = size;
  return p;
}

/* Text at data (x, y), or at mapped (u, v) when x, y are NaN and u, v given. */
static Prim *
add_text_uv (Panel *pn, double u, double v, const char *text, double dx, double dy, double ax,
             double ay)
{
  Prim *p = prim_add (pn, PRIM_TEXT, 1);
  p->u[0] = u;
  p->v[0] = v;
  p->text = g_strdup (text);
  p->dx = dx;
  p->dy = dy;
  p->ax = ax;
  p->ay = ay;
  p->colour = COL_TEXT;
  return p;
}

static Prim *
add_text (Panel *pn, double x, double y, const char *text, double dx, double dy, double ax,
          double ay)
{
  return add_text_uv (pn, mx (pn, x), my (pn, y), text, dx, dy, ax, ay);
}

static Prim *
style_variant (Prim *p, size_t variant, double width)
{
  p->colour = COL_VARIANT;
  p->variant = variant;
  p->owner = (long) variant;
  p->width = width;
  return p;
}

/* A margin label of variant v at (x, y) in data units, offset (dx, dy) pixels, anchor (ax, ay):
 * the place it prefers; place_labels moves it off other labels. */
static Prim *
margin_label (Panel *pn, double x, double y, const char *text, double dx, double dy, double ax,
              double ay, size_t v)
{
  Prim *t = style_variant (add_text (pn, x, y, text, dx, dy, ax, ay), v, THIN_WIDTH);
  t->plate = true;
  t->label = true;
  return t;
}

/* A curve of variant v made from the arrays src_x, src_y (tag tells apart curves made from
 * the same arrays), n points: copied from the figure being reused when it holds the same
 * curve of a variant with the same data key on equal axes, else NULL (map it then, and call
 * curve_mark). The caller's promise (lw-plot.h) makes a key and its arrays stand for the
 * values in them. */
static Prim *
curve_reuse (LwPlot *pl, Panel *pn, size_t v, const void *src_x, const void *src_y, int tag,
             size_t n)
{
  unsigned long key = pl->keys[v];
  const LwPlot *r = pl->reuse;
  size_t k = (size_t) (pn - pl->panels);
  if (key == 0 || r == NULL || k >= r->n_panels)
    return NULL;
  const Panel *rp = &r->panels[k];
  if (rp->x.scale != pn->x.scale || rp->x.lo != pn->x.lo || rp->x.hi != pn->x.hi
      || rp->y.scale != pn->y.scale || rp->y.lo != pn->y.lo || rp->y.hi != pn->y.hi)
    return NULL;
  for (guint i = 0; i < rp->prims->len; i++)
    {
      const Prim *q = rp->prims->pdata[i];
      if (q->key == key && q->src_x == src_x && q->src_y == src_y && q->tag == tag
          && q->kind == PRIM_LINE && q->n == n)
        {
          Prim *p = prim_add (pn, PRIM_LINE, n);
          memcpy (p->u, q->u, n * sizeof *p->u);
          memcpy (p->v, q->v, n * sizeof *p->v);
          p->key = key;
          p->src_x = src_x;
          p->src_y = src_y;
          p->tag = tag;
          return p;
        }
    }
  return NULL;
}

static Prim *
curve_mark (LwPlot *pl, Prim *p, size_t v, const void *src_x, const void *src_y, int tag)
{
  p->key = pl->keys[v];
  p->src_x = src_x;
  p->src_y = src_y;
  p->tag = tag;
  return p;
}

/* add_line for a curve of variant v, from the reused figure when it can be (curve_reuse). */
static Prim *
add_curve (LwPlot *pl, Panel *pn, size_t v, size_t n, const double *x, const double *y)
{
  Prim *p = curve_reuse (pl, pn, v, x, y, 0, n);
  return p != NULL ? p : curve_mark (pl, add_line (pn, n, x, y), v, x, y, 0);
}

static void
panel_init (Panel *pn)
{
  memset (pn, 0, sizeof *pn);
  pn->prims = g_ptr_array_new_with_free_func (prim_free);
  pn->x_tick_labels = true;
}

/* ---- ranges ---------------------------------------------------------------------------- */

typedef struct {
  double lo, hi;
  bool any;
} Extent;

static void
extent_add (Extent *e, double v)
{
  if (!isfinite (v))
    return;
  if (!e->any)
    {
      e->lo = e->hi = v;
      e->any = true;
      return;
    }
  e->lo = fmin (e->lo, v);
  e->hi = fmax (e->hi, v);
}

/* The largest 1, 2 or 5 × 10^k not above v > 0: where a frequency axis starts. */
static double
floor_125 (double v)
{
  double d = pow (10.0, floor (log10 (v) + 1e-12));
  static const double m[] = { 5, 2, 1 };
  for (int i = 0; i < 3; i++)
    if (m[i] * d <= v * (1.0 + 1e-12))
      return m[i] * d;
  return d;
}

/* Equal-aspect panels: widen the narrower range about its centre so the figure fills a plot
 * area of aspect EQUAL_ASPECT (width / height), the usual landscape shape. */
#define EQUAL_ASPECT 1.3
static void
widen_to_aspect (Extent *ex, Extent *ey)
{
  double w = ex->hi - ex->lo, h = ey->hi - ey->lo;
  if (w < EQUAL_ASPECT * h)
    {
      double c = 0.5 * (ex->lo + ex->hi);
      ex->lo = c - 0.5 * EQUAL_ASPECT * h;
      ex->hi = c + 0.5 * EQUAL_ASPECT * h;
    }
  else
    {
      double c = 0.5 * (ey->lo + ey->hi);
      ey->lo = c - 0.5 * w / EQUAL_ASPECT;
      ey->hi = c + 0.5 * w / EQUAL_ASPECT;
    }
}

static void
axis_from_extent (LwPlotAxis *a, LwPlotScale scale, LwPlotTickStyle style, Extent e,
                  int target_majors)
{
  double lo, hi;
  lw_plot_nice_range (scale, style, e.lo, e.hi, target_majors, &lo, &hi);
  lw_plot_axis_init (a, scale, style, lo, hi);
}

/* Takes the axes of in->axes_of when it shows the same view with as many panels (a figure
 * rebuilt during a drag keeps its frame, so what does not move stays where it was). */
static bool
axes_kept (const LwPlot *pl, const LwPlotInput *in)
{
  const LwPlot *o = in->axes_of;
  return o != NULL && o->view == in->view && o->n_panels == pl->n_panels;
}

static void
keep_axes (LwPlot *pl, const LwPlotInput *in)
{
  const LwPlot *o = in->axes_of;
  if (!axes_kept (pl, in))
    return;
  for (size_t k = 0; k < pl->n_panels; k++)
    {
      pl->panels[k].x = o->panels[k].x;
      pl->panels[k].y = o->panels[k].y;
    }
}

/* ---- Bode ------------------------------------------------------------------------------ */

static void
format_margin (char *buf, size_t size, const char *what, double value, const char *unit)
{
  char num[32];
  snprintf (num, sizeof num, "%.1f", fabs (value));
  snprintf (buf, size, "%s %s%s%s", what, value < 0 ? "\u2212" : "", num, unit);
}

/* Odd multiples of 180° inside the axis: the −180° reference lines. */
static void
add_phase_references (Panel *pn, const LwPlotAxis *a, bool vertical)
{
  for (int k = (int) floor ((a->lo - 180.0) / 360.0); k <= (int) ceil ((a->hi + 180.0) / 360.0);
       k++)
    {
      double v = 180.0 + 360.0 * k;
      if (v < a->lo || v > a->hi)
        continue;
      Prim *p = vertical ? add_vline (pn, v) : add_hline (pn, v);
      p->colour = COL_REF;
      p->width = 1.2;
    }
}

static void
build_bode (LwPlot *pl, const LwPlotInput *in, bool w_plane)
{
  Panel *mag = &pl->panels[0], *ph = &pl->panels[1];
  pl->n_panels = 2;
  Extent ex = { 0 }, em = { 0 }, ep = { 0 };
  /* the data's extents choose the axes, unless those of axes_of are kept (keep_axes) */
  size_t n_extent = axes_kept (pl, in) ? 0 : in->n_variants;
  for (size_t v = 0; v < n_extent; v++)
    {
      const LwPlotFreqCurve *c = w_plane ? &in->variants[v].w : &in->variants[v].z;
      for (size_t i = 0; i < c->n; i++)
        if (c->freq_rad_s[i] > 0.0)
          extent_add (&ex, c->freq_rad_s[i]);
    }
  for (size_t v = 0; v < n_extent; v++)
    {
      const LwPlotFreqCurve *c = w_plane ? &in->variants[v].w : &in->variants[v].z;
      for (size_t i = 0; i < c->n; i++)
        {
          extent_add (&em, c->mag_db[i]);
          extent_add (&ep, c->phase_deg[i]);
        }
    }
  /* the magnitude axis keeps 0 dB in view and at most MAG_DEPTH_DB below the top */
  extent_add (&em, 10.0);
  extent_add (&em, -10.0);
  if (em.lo < em.hi - MAG_DEPTH_DB)
    em.lo = em.hi - MAG_DEPTH_DB;
  extent_add (&ep, -180.0);

  axis_from_extent (&mag->x, LW_PLOT_SCALE_LOG, LW_PLOT_TICKS_PLAIN, ex, 6);
  if (ex.any && ex.lo > 0.0)
    mag->x.lo = floor_125 (ex.lo);   /* start at the data, on a 1-2-5 value */
  if (!w_plane && in->nyquist_rad_s > mag->x.lo)
    mag->x.hi = in->nyquist_rad_s;   /* the z-plane axis ends at π/T exactly */
  axis_from_extent (&mag->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, em, 6);
  ph->x = mag->x;
  axis_from_extent (&ph->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_DEGREES, ep, 6);
  keep_axes (pl, in);

  const char *fname = w_plane ? "\u03bd" : "\u03c9";
  mag->x_tick_labels = false;
  mag->x_name = ph->x_name = fname;
  mag->x_unit = ph->x_unit = "rad/s";
  ph->x_label = w_plane ? "\u03bd (rad/s), w-plane" : "\u03c9 (rad/s)";
  mag->y_label = "|L| (dB)";
  mag->y_name = "|L|";
  mag->y_unit = "dB";
  ph->y_label = "\u2220L (\u00b0)";
  ph->y_name = "\u2220L";
  ph->y_unit = "\u00b0";

  /* references */
  Prim *p = add_hline (mag, 0.0);
  p->width = 1.2;
  add_phase_references (ph, &ph->y, false);

  /* requirement marks */
  const LwPlotRequirements *rq = &in->req;
  if (rq->has_min_phase_margin)
    for (int k = -8; k <= 8; k++)
      {
        double ref = 180.0 + 360.0 * k;
        double top = ref + rq->min_phase_margin_deg;
        if (ref < ph->y.lo || ref > ph->y.hi)
          continue;
        Prim *b = prim_add (ph, PRIM_HBAND, 2);
        b->v[0] = my (ph, ref);
        b->v[1] = my (ph, fmin (top, ph->y.hi));
        b->alpha = 0.10;
        b->colour = COL_TEXT;
        Prim *l = add_hline (ph, top);
        l->dash = DASH_DOTTED;
        char buf[64];
        snprintf (buf, sizeof buf, "required PM \u2265 %.0f\u00b0", rq->min_phase_margin_deg);
        add_text_uv (ph, 0.0, my (ph, top), buf, 4, -2, 0.0, 1.0)->colour = COL_REF;
      }
  double target = w_plane ? rq->target_crossover_nu_rad_s : rq->target_crossover_rad_s;
  if (rq->has_target_crossover && target >= mag->x.lo && target <= mag->x.hi)
    {
      for (int k = 0; k < 2; k++)
        {
          Prim *l = add_vline (&pl->panels[k], target);
          l->dash = DASH_DASHED;
          l->width = 1.2;
        }
      add_mark (mag, target, NAN, MARK_DIAMOND, 7)->v[0] = 1.0;
      char buf[64];
      snprintf (buf, sizeof buf, "target crossover %.3g rad/s", target);
      add_text_uv (mag, mx (mag, target), 1.0, buf, 5, 3, 0.0, 0.0)->colour = COL_REF;
    }
  if (!w_plane)
    {
      for (int k = 0; k < 2; k++)
        {
          Prim *l = add_vline (&pl->panels[k], mag->x.hi);
          l->colour = COL_NYQUIST;
          l->width = 2.0;
          l->dash = DASH_DASHDOT;
        }
      char buf[64];
      snprintf (buf, sizeof buf, "Nyquist \u03c0/T = %.4g rad/s", in->nyquist_rad_s);
      Prim *t = add_text_uv (mag, 1.0, 1.0, buf, -5, 3, 1.0, 0.0);
      t->plate = true;
    }

  /* curves, asymptotes */
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotFreqCurve *c = w_plane ? &in->variants[v].w : &in->variants[v].z;
      if (c->n_asymptote >= 2)
        {
          Prim *a = add_curve (pl, mag, v, c->n_asymptote, c->asymptote_freq_rad_s,
                               c->asymptote_db);
          style_variant (a, v, THIN_WIDTH);
          a->dash = DASH_DASHED;
          a->alpha = 0.8;
        }
      Prim *pm = add_curve (pl, mag, v, c->n, c->freq_rad_s, c->mag_db);
      style_variant (pm, v, LW_PLOT_CURVE_WIDTH);
      pm->dash = DASH_VARIANT;
      Prim *pc = add_curve (pl, ph, v, c->n, c->freq_rad_s, c->phase_deg);
      style_variant (pc, v, LW_PLOT_CURVE_WIDTH);
      pc->dash = DASH_VARIANT;
    }

  /* margin annotations: drop line, gauge bar, label on a plate */
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotFreqCurve *c = w_plane ? &in->variants[v].w : &in->variants[v].z;
      for (size_t i = 0; i < c->n_gain_crossovers; i++)
        {
          const LwPlotCrossover *x = &c->gain_crossovers[i];
          double f = x->freq_rad_s, ref = x->phase_deg - x->margin;
          style_variant (add_segment (mag, f, 0.0, f, mag->y.lo), v, DROP_WIDTH)->dash =
            DASH_DOTTED;
          style_variant (add_segment (ph, f, ph->y.hi, f, x->phase_deg), v, DROP_WIDTH)->dash =
            DASH_DOTTED;
          style_variant (add_segment (ph, f, ref, f, x->phase_deg), v, GAUGE_WIDTH);
          style_variant (add_mark (mag, f, 0.0, MARK_CIRCLE, 7), v, 1.3);
          style_variant (add_mark (ph, f, x->phase_deg, MARK_DISC, 5), v, 1.0);
          if (i < MAX_LABELLED_CROSSOVERS)
            {
              char buf[48];
              format_margin (buf, sizeof buf, "PM", x->margin, "\u00b0");
              margin_label (ph, f, 0.5 * (ref + x->phase_deg), buf, 6, 0, 0.0, 0.5, v);
            }
        }
      for (size_t i = 0; i < c->n_phase_crossovers; i++)
        {
          const LwPlotCrossover *x = &c->phase_crossovers[i];
          double f = x->freq_rad_s;
          style_variant (add_segment (ph, f, x->phase_deg, f, ph->y.hi), v, DROP_WIDTH)->dash =
            DASH_DOTTED;
          style_variant (add_segment (mag, f, mag->y.lo, f, x->mag_db), v, DROP_WIDTH)->dash =
            DASH_DOTTED;
          style_variant (add_segment (mag, f, x->mag_db, f, 0.0), v, GAUGE_WIDTH);
          style_variant (add_mark (ph, f, x->phase_deg, MARK_DIAMOND, 7), v, 1.3);
          if (i < MAX_LABELLED_CROSSOVERS)
            {
              char buf[48];
              format_margin (buf, sizeof buf, "GM", x->margin, " dB");
              margin_label (mag, f, 0.5 * x->mag_db, buf, 6, 0, 0.0, 0.5, v);
            }
        }
    }
}

/* ---- Nyquist --------------------------------------------------------------------------- */

static void
build_nyquist (LwPlot *pl, const LwPlotInput *in)
{
  Panel *pn = &pl->panels[0];
  pl->n_panels = 1;
  pn->equal_aspect = true;
  Extent ex = { 0 }, ey = { 0 };
  extent_add (&ex, -1.5);
  extent_add (&ex, 1.0);
  extent_add (&ey, -1.2);
  extent_add (&ey, 1.2);
  /* the data's extents choose the axes, unless those of axes_of are kept (keep_axes) */
  size_t n_extent = axes_kept (pl, in) ? 0 : in->n_variants;
  for (size_t v = 0; v < n_extent; v++)
    {
      const LwPlotComplexCurve *c = &in->variants[v].nyquist;
      for (size_t i = 0; i < c->n; i++)
        if (hypot (c->re[i], c->im[i]) <= NYQUIST_RANGE_CAP)
          {
            extent_add (&ex, c->re[i]);
            extent_add (&ey, c->im[i]);
            extent_add (&ey, -c->im[i]);
          }
    }
  widen_to_aspect (&ex, &ey);
  axis_from_extent (&pn->x, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ex, 6);
  axis_from_extent (&pn->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ey, 6);
  keep_axes (pl, in);
  pn->x_label = "Re L";
  pn->y_label = "Im L";
  pn->x_name = "Re";
  pn->y_name = "Im";
  pn->x_unit = pn->y_unit = "";

  add_hline (pn, 0.0);
  add_vline (pn, 0.0);
  Prim *uc = prim_add (pn, PRIM_CIRCLE, 1);
  uc->u[0] = mx (pn, 0.0);
  uc->v[0] = my (pn, 0.0);
  uc->r_units = 1.0;
  uc->dash = DASH_DASHED;
  uc->width = 1.2;
  add_text (pn, 0.7071, 0.7071, "|L| = 1", 4, -2, 0.0, 1.0)->colour = COL_REF;

  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotComplexCurve *c = &in->variants[v].nyquist;
      Prim *m = curve_reuse (pl, pn, v, c->re, c->im, 1, c->n);
      if (m == NULL)
        {
          double *mirror = g_new (double, c->n > 0 ? c->n : 1);
          for (size_t i = 0; i < c->n; i++)
            mirror[i] = -c->im[i];
          m = curve_mark (pl, add_line (pn, c->n, c->re, mirror), v, c->re, c->im, 1);
          g_free (mirror);
        }
      style_variant (m, v, THIN_WIDTH);
      m->alpha = 0.45;
      m->dash = DASH_VARIANT;
      Prim *l = add_curve (pl, pn, v, c->n, c->re, c->im);
      style_variant (l, v, LW_PLOT_CURVE_WIDTH);
      l->dash = DASH_VARIANT;

      const LwPlotFreqCurve *z = &in->variants[v].z;
      for (size_t i = 0; i < z->n_gain_crossovers; i++)
        {
          const LwPlotCrossover *x = &z->gain_crossovers[i];
          /* angle of the crossover point, in (−180°, 180°]; the arc turns by −PM to −1 */
          double a0 = fmod (x->phase_deg, 360.0);
          if (a0 > 180.0)
            a0 -= 360.0;
          if (a0 <= -180.0)
            a0 += 360.0;
          Prim *arc = prim_add (pn, PRIM_ARC, 1);
          arc->u[0] = mx (pn, 0.0);
          arc->v[0] = my (pn, 0.0);
          arc->r_units = 1.0;
          arc->a0 = a0;
          arc->a1 = a0 - x->margin;
          style_variant (arc, v, GAUGE_WIDTH);
          style_variant (add_mark (pn, x->re, x->im, MARK_DISC, 5), v, 1.0);
          if (i < MAX_LABELLED_CROSSOVERS)
            {
              char buf[48];
              format_margin (buf, sizeof buf, "PM", x->margin, "\u00b0");
              double am = (a0 - 0.5 * x->margin) * G_PI / 180.0;
              margin_label (pn, 1.12 * cos (am), 1.12 * sin (am), buf, 0, 0,
                                  cos (am) < 0 ? 1.0 : 0.0, 0.5, v);
            }
        }
      for (size_t i = 0; i < z->n_phase_crossovers; i++)
        {
          const LwPlotCrossover *x = &z->phase_crossovers[i];
          style_variant (add_mark (pn, x->re, x->im, MARK_DIAMOND, 7), v, 1.3);
          if (i < MAX_LABELLED_CROSSOVERS)
            {
              char buf[48];
              format_margin (buf, sizeof buf, "GM", x->margin, " dB");
              margin_label (pn, x->re, x->im, buf, 0, 8, 0.5, 0.0, v);
            }
        }
    }
  Prim *cp = add_mark (pn, -1.0, 0.0, MARK_PLUS, 11);
  cp->colour = COL_TEXT;
  cp->width = 2.0;
  add_text (pn, -1.0, 0.0, "\u22121", -4, 4, 1.0, 0.0);
}

/* ---- Nichols --------------------------------------------------------------------------- */

static void
build_nichols (LwPlot *pl, const LwPlotInput *in)
{
  Panel *pn = &pl->panels[0];
  pl->n_panels = 1;
  Extent ex = { 0 }, ey = { 0 };
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotFreqCurve *c = &in->variants[v].z;
      for (size_t i = 0; i < c->n; i++)
        {
          extent_add (&ex, c->phase_deg[i]);
          extent_add (&ey, c->mag_db[i]);
        }
    }
  extent_add (&ex, -180.0);
  extent_add (&ey, 10.0);
  extent_add (&ey, -10.0);
  if (ey.lo < ey.hi - MAG_DEPTH_DB)
    ey.lo = ey.hi - MAG_DEPTH_DB;
  axis_from_extent (&pn->x, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_DEGREES, ex, 7);
  axis_from_extent (&pn->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ey, 7);
  keep_axes (pl, in);
  pn->x_label = "\u2220L (\u00b0)";
  pn->y_label = "|L| (dB)";
  pn->x_name = "\u2220L";
  pn->x_unit = "\u00b0";
  pn->y_name = "|L|";
  pn->y_unit = "dB";

  add_hline (pn, 0.0)->width = 1.2;
  add_phase_references (pn, &pn->x, true);
  if (in->req.has_min_phase_margin)
    for (int k = -8; k <= 8; k++)
      {
        double ref = 180.0 + 360.0 * k, lim = ref + in->req.min_phase_margin_deg;
        if (ref < pn->x.lo || ref > pn->x.hi)
          continue;
        Prim *l = add_vline (pn, lim);
        l->dash = DASH_DOTTED;
        char buf[64];
        snprintf (buf, sizeof buf, "required PM \u2265 %.0f\u00b0", in->req.min_phase_margin_deg);
        add_text_uv (pn, mx (pn, lim), 1.0, buf, 4, 3, 0.0, 0.0)->colour = COL_REF;
      }
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotFreqCurve *c = &in->variants[v].z;
      Prim *l = add_curve (pl, pn, v, c->n, c->phase_deg, c->mag_db);
      style_variant (l, v, LW_PLOT_CURVE_WIDTH);
      l->dash = DASH_VARIANT;
      for (size_t i = 0; i < c->n_gain_crossovers; i++)
        {
          const LwPlotCrossover *x = &c->gain_crossovers[i];
          style_variant (add_segment (pn, x->phase_deg - x->margin, 0.0, x->phase_deg, 0.0), v,
                         GAUGE_WIDTH);
          style_variant (add_mark (pn, x->phase_deg, 0.0, MARK_DISC, 5), v, 1.0);
          if (i < MAX_LABELLED_CROSSOVERS)
            {
              char buf[48];
              format_margin (buf, sizeof buf, "PM", x->margin, "\u00b0");
              margin_label (pn, x->phase_deg - 0.5 * x->margin, 0.0, buf, 0, -6,
                                  0.5, 1.0, v);
            }
        }
      for (size_t i = 0; i < c->n_phase_crossovers; i++)
        {
          const LwPlotCrossover *x = &c->phase_crossovers[i];
          style_variant (add_segment (pn, x->phase_deg, x->mag_db, x->phase_deg, 0.0), v,
                         GAUGE_WIDTH);
          style_variant (add_mark (pn, x->phase_deg, x->mag_db, MARK_DIAMOND, 7), v, 1.3);
          if (i < MAX_LABELLED_CROSSOVERS)
            {
              char buf[48];
              format_margin (buf, sizeof buf, "GM", x->margin, " dB");
              margin_label (pn, x->phase_deg, 0.5 * x->mag_db, buf, 6, 0, 0.0, 0.5, v);
            }
        }
    }
  for (int k = -8; k <= 8; k++)
    {
      double ref = 180.0 + 360.0 * k;
      if (ref < pn->x.lo || ref > pn->x.hi)
        continue;
      Prim *cp = add_mark (pn, ref, 0.0, MARK_PLUS, 11);
      cp->colour = COL_TEXT;
      cp->width = 2.0;
    }
}

/* ---- step ------------------------------------------------------------------------------ */

/* Staircase of samples s[k] held over [kT, (k+1)T), k = 0 … n−1, ending at (n−1)T. */
static Prim *
add_staircase (LwPlot *pl, Panel *pn, size_t v, size_t n, const double *s, double T)
{
  size_t m = 2 * n - 1;
  Prim *r = curve_reuse (pl, pn, v, s, s, 2, m);
  if (r != NULL)
    return r;
  double *x = g_new (double, m), *y = g_new (double, m);
  for (size_t k = 0; k < n; k++)
    {
      x[2 * k] = (double) k * T;
      y[2 * k] = s[k];
      if (k + 1 < n)
        {
          x[2 * k + 1] = (double) (k + 1) * T;
          y[2 * k + 1] = s[k];
        }
    }
  Prim *p = curve_mark (pl, add_line (pn, m, x, y), v, s, s, 2);
  g_free (x);
  g_free (y);
  return p;
}

static void
build_step (LwPlot *pl, const LwPlotInput *in)
{
  Panel *out = &pl->panels[0], *act = &pl->panels[1];
  bool any_u = false;
  Extent et = { 0 }, ey = { 0 }, eu = { 0 };
  extent_add (&et, 0.0);
  extent_add (&ey, 0.0);
  extent_add (&eu, 0.0);
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotStepData *s = &in->variants[v].step;
      if (s->n >= 2)
        extent_add (&et, (double) (s->n - 1) * s->period_s);
      for (size_t k = 0; k < s->n; k++)
        extent_add (&ey, s->y[k]);
      for (size_t j = 0; j < s->n_fine && s->y_fine; j++)
        extent_add (&ey, s->y_fine[j]);
      if (s->has_final)
        extent_add (&ey, s->final_value);
      if (s->u)
        {
          any_u = true;
          for (size_t k = 0; k < s->n; k++)
            extent_add (&eu, s->u[k]);
          if (s->has_limits)
            {
              extent_add (&eu, s->u_low);
              extent_add (&eu, s->u_high);
            }
        }
    }
  pl->n_panels = any_u ? 2 : 1;
  /* headroom so the final value and the peak are not on the frame */
  ey.hi += 0.06 * (ey.hi - ey.lo);
  eu.hi += 0.06 * (eu.hi - eu.lo);
  eu.lo -= 0.06 * (eu.hi - eu.lo);
  double t_end = et.hi;
  axis_from_extent (&out->x, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, et, 8);
  if (t_end > 0.0)
    out->x.hi = t_end;   /* the axis ends at the last sample */
  axis_from_extent (&out->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ey, 6);
  out->x_label = "t (s)";
  out->y_label = "y (units of r)";
  out->x_name = "t";
  out->x_unit = "s";
  out->y_name = "y";
  out->y_unit = "";
  if (any_u)
    {
      out->x_tick_labels = false;
      act->x = out->x;
      axis_from_extent (&act->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, eu, 5);
      act->x_label = "t (s)";
      act->y_label = "u (actuator)";
      act->x_name = "t";
      act->x_unit = "s";
      act->y_name = "u";
      act->y_unit = "";
    }
  keep_axes (pl, in);
  if (any_u)
    add_hline (act, 0.0);
  add_hline (out, 0.0);
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotStepData *s = &in->variants[v].step;
      if (s->has_final)
        {
          Prim *f = add_hline (out, s->final_value);
          f->dash = DASH_DASHED;
          f->owner = (long) v;
        }
      if (s->n_fine >= 2 && s->t_fine_s && s->y_fine)
        {
          Prim *c = add_curve (pl, out, v, s->n_fine, s->t_fine_s, s->y_fine);
          style_variant (c, v, THIN_WIDTH);
          c->alpha = 0.7;
        }
      if (s->n >= 2)
        {
          Prim *st = add_staircase (pl, out, v, s->n, s->y, s->period_s);
          style_variant (st, v, LW_PLOT_CURVE_WIDTH);
          st->dash = DASH_VARIANT;
          if (s->n <= 120)
            for (size_t k = 0; k < s->n; k++)
              style_variant (add_mark (out, (double) k * s->period_s, s->y[k], MARK_DISC, 3.5),
                             v, 1.0);
        }
      if (any_u && s->u && s->n >= 2)
        {
          Prim *st = add_staircase (pl, act, v, s->n, s->u, s->period_s);
          style_variant (st, v, LW_PLOT_CURVE_WIDTH);
          st->dash = DASH_VARIANT;
          if (s->has_limits)
            {
              Prim *lim[4] = {
                add_hline (act, s->u_high), add_hline (act, s->u_low),
                add_text (act, act->x.hi, s->u_high, "u max", -4, -2, 1.0, 1.0),
                add_text (act, act->x.hi, s->u_low, "u min", -4, 2, 1.0, 0.0) };
              lim[0]->dash = lim[1]->dash = DASH_DOTTED;
              lim[2]->colour = lim[3]->colour = COL_REF;
              for (int k = 0; k < 4; k++)
                lim[k]->owner = (long) v;
            }
        }
    }
}

/* ---- pole-zero map --------------------------------------------------------------------- */

static void
build_poles (LwPlot *pl, const LwPlotInput *in)
{
  Panel *pn = &pl->panels[0];
  pl->n_panels = 1;
  pn->equal_aspect = true;
  Extent ex = { 0 }, ey = { 0 };
  extent_add (&ex, -1.2);
  extent_add (&ex, 1.2);
  extent_add (&ey, -1.2);
  extent_add (&ey, 1.2);
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotPoleData *d = &in->variants[v].poles;
      const double *re[3] = { d->cl_re, d->pole_re, d->zero_re };
      const double *im[3] = { d->cl_im, d->pole_im, d->zero_im };
      size_t n[3] = { d->n_closed_loop, d->n_loop_poles, d->n_loop_zeros };
      for (int s = 0; s < 3; s++)
        for (size_t i = 0; i < n[s]; i++)
          if (hypot (re[s][i], im[s][i]) <= POLE_RANGE_CAP)
            {
              extent_add (&ex, re[s][i]);
              extent_add (&ey, im[s][i]);
            }
    }
  widen_to_aspect (&ex, &ey);
  axis_from_extent (&pn->x, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ex, 6);
  axis_from_extent (&pn->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ey, 6);
  keep_axes (pl, in);
  pn->x_label = "Re z";
  pn->y_label = "Im z";
  pn->x_name = "Re";
  pn->y_name = "Im";
  pn->x_unit = pn->y_unit = "";
  add_hline (pn, 0.0);
  add_vline (pn, 0.0);
  Prim *uc = prim_add (pn, PRIM_CIRCLE, 1);
  uc->u[0] = mx (pn, 0.0);
  uc->v[0] = my (pn, 0.0);
  uc->r_units = 1.0;
  uc->width = 1.4;
  add_text (pn, 0.7071, 0.7071, "|z| = 1", 4, -2, 0.0, 1.0)->colour = COL_REF;

  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotPoleData *d = &in->variants[v].poles;
      for (size_t i = 0; i < d->n_loop_zeros; i++)
        style_variant (add_mark (pn, d->zero_re[i], d->zero_im[i], MARK_CIRCLE, 8), v, 1.2);
      for (size_t i = 0; i < d->n_loop_poles; i++)
        style_variant (add_mark (pn, d->pole_re[i], d->pole_im[i], MARK_CROSS, 8), v, 1.2);
      for (size_t i = 0; i < d->n_closed_loop; i++)
        style_variant (add_mark (pn, d->cl_re[i], d->cl_im[i], MARK_DIAMOND, 9), v, 1.5)
          ->shape = MARK_DIAMOND;
    }
  /* key of the marker shapes, bottom left inside the plot area */
  static const struct { MarkShape s; const char *t; } key[3] = {
    { MARK_DIAMOND, "closed-loop pole" }, { MARK_CROSS, "loop pole" },
    { MARK_CIRCLE, "loop zero" } };
  for (int k = 0; k < 3; k++)
    {
      Prim *m = prim_add (pn, PRIM_MARK, 1);
      m->u[0] = 0.0;
      m->v[0] = 0.0;
      m->dx = 12;
      m->dy = -12 - 15.0 * (2 - k);
      m->shape = key[k].s;
      m->size = 8;
      m->colour = COL_TEXT;
      m->width = 1.2;
      add_text_uv (pn, 0.0, 0.0, key[k].t, 22, -12 - 15.0 * (2 - k), 0.0, 0.5)->plate = true;
    }
}

/* ---- construction ---------------------------------------------------------------------- */

static const char *const view_names[] = { "bode-z", "bode-w", "nyquist", "nichols", "step",
                                          "poles" };

const char *
lw_plot_view_name (LwPlotView v)
{
  return (unsigned) v < G_N_ELEMENTS (view_names) ? view_names[v] : "?";
}

int
lw_plot_view_from_name (const char *name)
{
  for (size_t i = 0; name && i < G_N_ELEMENTS (view_names); i++)
    if (strcmp (name, view_names[i]) == 0)
      return (int) i;
  return -1;
}

static bool
has_data (const LwPlotInput *in)
{
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotVariant *x = &in->variants[v];
      switch (in->view)
        {
        case LW_PLOT_VIEW_BODE_Z:
        case LW_PLOT_VIEW_NICHOLS:
          if (x->z.n >= 2)
            return true;
          break;
        case LW_PLOT_VIEW_BODE_W:
          if (x->w.n >= 2)
            return true;
          break;
        case LW_PLOT_VIEW_NYQUIST:
          if (x->nyquist.n >= 2)
            return true;
          break;
        case LW_PLOT_VIEW_STEP:
          if (x->step.n >= 2 && x->step.period_s > 0.0)
            return true;
          break;
        case LW_PLOT_VIEW_POLES:
          if (x->poles.n_closed_loop + x->poles.n_loop_poles + x->poles.n_loop_zeros > 0)
            return true;
          break;
        }
    }
  return false;
}

LwPlot *
lw_plot_new (const LwPlotInput *in, char *err_msg, size_t err_size)
{
  g_return_val_if_fail (in != NULL, NULL);
  if (in->n_variants == 0 || in->n_variants > LW_PLOT_MAX_VARIANTS || in->variants == NULL)
    {
      if (err_msg)
        snprintf (err_msg, err_size, "a figure takes 1 to %d variants, not %zu",
                  LW_PLOT_MAX_VARIANTS, in->n_variants);
      return NULL;
    }
  if ((unsigned) in->view >= G_N_ELEMENTS (view_names) || !has_data (in))
    {
      if (err_msg)
        snprintf (err_msg, err_size, "nothing to draw for the view '%s'",
                  lw_plot_view_name (in->view));
      return NULL;
    }
  if (in->view == LW_PLOT_VIEW_BODE_Z && !(in->nyquist_rad_s > 0.0))
    {
      if (err_msg)
        snprintf (err_msg, err_size, "the Bode view in z needs the Nyquist frequency");
      return NULL;
    }
  LwPlot *pl = g_new0 (LwPlot, 1);
  pl->view = in->view;
  pl->title = g_strdup (in->title);
  pl->n_variants = in->n_variants;
  for (size_t v = 0; v < in->n_variants; v++)
    {
      pl->names[v] = g_strdup (in->variants[v].name);
      pl->keys[v] = in->variants[v].data_key;
      unsigned st = in->variants[v].style;
      pl->styles[v] = st >= 1 && st <= LW_PLOT_MAX_VARIANTS ? st - 1 : v;
    }
  if (in->axes_of != NULL && in->axes_of->view == in->view)
    pl->reuse = in->axes_of;
  for (size_t k = 0; k < MAX_PANELS; k++)
    panel_init (&pl->panels[k]);
  switch (in->view)
    {
    case LW_PLOT_VIEW_BODE_Z: build_bode (pl, in, false); break;
    case LW_PLOT_VIEW_BODE_W: build_bode (pl, in, true); break;
    case LW_PLOT_VIEW_NYQUIST: build_nyquist (pl, in); break;
    case LW_PLOT_VIEW_NICHOLS: build_nichols (pl, in); break;
    case LW_PLOT_VIEW_STEP: build_step (pl, in); break;
    case LW_PLOT_VIEW_POLES: build_poles (pl, in); break;
    }
  pl->reuse = NULL;
  for (size_t k = 0; k < MAX_PANELS; k++)
    {
      pl->panels[k].xv = pl->panels[k].x;
      pl->panels[k].wu0 = 0.0;
      pl->panels[k].wu1 = 1.0;
    }
  return pl;
}

void
lw_plot_free (LwPlot *p)
{
  if (p == NULL)
    return;
  for (size_t k = 0; k < MAX_PANELS; k++)
    g_ptr_array_unref (p->panels[k].prims);
  for (size_t v = 0; v < p->n_variants; v++)
    g_free (p->names[v]);
  g_free (p->title);
  g_free (p->clear);
  g_free (p);
}

void
lw_plot_set_keep_clear (LwPlot *p, const LwPlotHandle *places, size_t n)
{
  g_return_if_fail (p != NULL && (n == 0 || places != NULL));
  g_free (p->clear);
  p->clear = n > 0 ? g_memdup2 (places, n * sizeof *places) : NULL;
  p->n_clear = n;
}

void
lw_plot_set_theme (LwPlot *p, LwPlotTheme theme)
{
  g_return_if_fail (p != NULL);
  p->theme = theme == LW_PLOT_THEME_DARK ? LW_PLOT_THEME_DARK : LW_PLOT_THEME_LIGHT;
}

/* ---- layout ---------------------------------------------------------------------------- */

void
lw_plot_layout (LwPlot *p, double width, double height)
{
  g_return_if_fail (p != NULL);
  p->width = width;
  p->height = height;
  double left = LW_PLOT_MARGIN_LEFT, right = width - LW_PLOT_MARGIN_RIGHT;
  size_t named = 0;
  for (size_t v = 0; v < p->n_variants; v++)
    named += p->names[v] != NULL;
  long slots = (long) floor ((right - left) / LW_PLOT_LEGEND_SLOT);
  if (slots < 1)
    slots = 1;
  p->legend_rows = (p->title ? 1 : 0) + (int) ((named + (size_t) slots - 1) / (size_t) slots);
  double top = LW_PLOT_MARGIN_TOP + LW_PLOT_LEGEND_ROW * p->legend_rows;
  double bottom = height - LW_PLOT_MARGIN_BOTTOM;
  double gap = LW_PLOT_PANEL_GAP;
  double ph = (bottom - top - gap * (double) (p->n_panels - 1)) / (double) p->n_panels;
  for (size_t k = 0; k < p->n_panels; k++)
    {
      Panel *pn = &p->panels[k];
      pn->rx = left;
      pn->rw = fmax (right - left, 1.0);
      pn->ry = top + (double) k * (ph + gap);
      pn->rh = fmax (ph, 1.0);
      if (pn->equal_aspect)
        {
          double sx = pn->rw / (pn->x.hi - pn->x.lo), sy = pn->rh / (pn->y.hi - pn->y.lo);
          double s = fmin (sx, sy);
          double w = s * (pn->x.hi - pn->x.lo), h = s * (pn->y.hi - pn->y.lo);
          pn->rx += 0.5 * (pn->rw - w);
          pn->ry += 0.5 * (pn->rh - h);
          pn->rw = w;
          pn->rh = h;
        }
    }
  p->laid_out = true;
}

/* ---- drawing --------------------------------------------------------------------------- */

static const Theme *
theme_of (const LwPlot *p)
{
  return &themes[p->theme == LW_PLOT_THEME_DARK ? 1 : 0];
}

static void
set_rgb (cairo_t *cr, const double c[3], double alpha)
{
  cairo_set_source_rgba (cr, c[0], c[1], c[2], alpha);
}

static const double *
colour_of (const LwPlot *p, ColourRole role, size_t variant)
{
  const Theme *t = theme_of (p);
  switch (role)
    {
    case COL_VARIANT: return t->palette[p->styles[variant % LW_PLOT_MAX_VARIANTS]];
    case COL_TEXT: return t->text;
    case COL_REF: return t->ref;
    case COL_NYQUIST: return t->nyquist;
    case COL_FRAME: return t->frame;
    }
  return t->text;
}

static void
set_dash (cairo_t *cr, DashRole d, size_t variant)
{
  static const double dotted[] = { 1.5, 2.5 }, dashed[] = { 5, 3 }, dashdot[] = { 9, 3, 2, 3 };
  switch (d)
    {
    case DASH_SOLID: cairo_set_dash (cr, NULL, 0, 0); break;
    case DASH_VARIANT:
      cairo_set_dash (cr, dash_patterns[variant % LW_PLOT_MAX_VARIANTS],
                      dash_lengths[variant % LW_PLOT_MAX_VARIANTS], 0);
      break;
    case DASH_DOTTED: cairo_set_dash (cr, dotted, 2, 0); break;
    case DASH_DASHED: cairo_set_dash (cr, dashed, 2, 0); break;
    case DASH_DASHDOT: cairo_set_dash (cr, dashdot, 4, 0); break;
    }
}

static double
px_of (const Panel *pn, double u)
{
  return pn->rx + (u - pn->wu0) / (pn->wu1 - pn->wu0) * pn->rw;
}

static double
py_of (const Panel *pn, double v)
{
  return pn->ry + (1.0 - v) * pn->rh;
}

typedef enum { FONT_TICK, FONT_LABEL, FONT_NOTE, FONT_TITLE } FontRole;

/* Font options of every text: metrics unhinted, so the same text has the same extent on
 * screen, PNG, SVG and PDF. */
static void
set_text_font_options (PangoContext *ctx)
{
  cairo_font_options_t *fo = cairo_font_options_create ();
  cairo_font_options_set_hint_metrics (fo, CAIRO_HINT_METRICS_OFF);
  cairo_font_options_set_hint_style (fo, CAIRO_HINT_STYLE_NONE);
  pango_cairo_context_set_font_options (ctx, fo);
  cairo_font_options_destroy (fo);
}

static void
set_text_font (PangoLayout *lay, FontRole role)
{
  PangoFontDescription *fd = pango_font_description_from_string ("Sans");
  static const double sizes[] = { 10.5, 11.5, 10.0, 12.5 };
  pango_font_description_set_absolute_size (fd, sizes[role] * PANGO_SCALE);
  if (role == FONT_TITLE)
    pango_font_description_set_weight (fd, PANGO_WEIGHT_BOLD);
  pango_layout_set_font_description (lay, fd);
  pango_font_description_free (fd);
}

/* ---- text layout cache ------------------------------------------------------------------ */

/* Two generations of layouts keyed by font role and text: a lookup moves a layout found in
 * the old generation to the current one, and when the current one is full it becomes the
 * old one (the one before is dropped), so texts used in the last frames stay while texts
 * of values that changed (margins during a drag) age out. */
#define TEXT_CACHE_GENERATION 256

struct LwPlotTextCache {
  PangoContext *ctx;        /* made from the first cairo_t drawn on, updated from each */
  GHashTable *cur, *old;    /* "role\x1ftext" → PangoLayout (owned) */
};

LwPlotTextCache *
lw_plot_text_cache_new (void)
{
  LwPlotTextCache *c = g_new0 (LwPlotTextCache, 1);
  c->cur = g_hash_table_new_full (g_str_hash, g_str_equal, g_free, g_object_unref);
  c->old = g_hash_table_new_full (g_str_hash, g_str_equal, g_free, g_object_unref);
  return c;
}

void
lw_plot_text_cache_free (LwPlotTextCache *c)
{
  if (c == NULL)
    return;
  g_hash_table_unref (c->cur);
  g_hash_table_unref (c->old);
  g_clear_object (&c->ctx);
  g_free (c);
}

void
lw_plot_set_text_cache (LwPlot *p, LwPlotTextCache *cache)
{
  g_return_if_fail (p != NULL);
  p->text_cache = cache;
}

/* A new reference to a layout of text in role for cr: from the cache when one is given (the
 * context follows cr's transformation and surface font options, as pango_cairo_create_layout
 * would set them), else made afresh. */
static PangoLayout *
text_layout (LwPlotTextCache *c, cairo_t *cr, const char *text, FontRole role)
{
  if (c == NULL)
    {
      PangoLayout *lay = pango_cairo_create_layout (cr);
      set_text_font_options (pango_layout_get_context (lay));
      pango_layout_context_changed (lay);
      set_text_font (lay, role);
      pango_layout_set_text (lay, text, -1);
      return lay;
    }
  if (c->ctx == NULL)
    {
      c->ctx = pango_cairo_create_context (cr);
      set_text_font_options (c->ctx);
    }
  else
    pango_cairo_update_context (cr, c->ctx);
  char *key = g_strdup_printf ("%d\x1f%s", (int) role, text);
  PangoLayout *lay = g_hash_table_lookup (c->cur, key);
  if (lay != NULL)
    {
      g_free (key);
      return g_object_ref (lay);
    }
  char *old_key = NULL;
  if (g_hash_table_steal_extended (c->old, key, (gpointer *) &old_key, (gpointer *) &lay))
    g_free (old_key);
  else
    {
      lay = pango_layout_new (c->ctx);
      set_text_font (lay, role);
      pango_layout_set_text (lay, text, -1);
    }
  if (g_hash_table_size (c->cur) >= TEXT_CACHE_GENERATION)
    {
      g_hash_table_unref (c->old);
      c->old = c->cur;
      c->cur = g_hash_table_new_full (g_str_hash, g_str_equal, g_free, g_object_unref);
    }
  g_hash_table_insert (c->cur, key, lay);
  return g_object_ref (lay);
}

/* Draws text with its anchor point (ax, ay in [0, 1] of its extent) at (x, y). */
static void
draw_text (LwPlotTextCache *tc, cairo_t *cr, const char *text, FontRole role, double x,
           double y, double ax, double ay, const double colour[3], const double *plate,
           double angle)
{
  PangoLayout *lay = text_layout (tc, cr, text, role);
  int w, h;
  pango_layout_get_size (lay, &w, &h);
  double tw = (double) w / PANGO_SCALE, th = (double) h / PANGO_SCALE;
  cairo_save (cr);
  cairo_translate (cr, x, y);
  cairo_rotate (cr, angle);
  cairo_translate (cr, -ax * tw, -ay * th);
  if (plate)
    {
      set_rgb (cr, plate, 0.85);
      cairo_rectangle (cr, -2, 0, tw + 4, th);
      cairo_fill (cr);
    }
  set_rgb (cr, colour, 1.0);
  cairo_move_to (cr, 0, 0);
  pango_cairo_show_layout (cr, lay);
  cairo_restore (cr);
  g_object_unref (lay);
}

static void
draw_marker (cairo_t *cr, MarkShape shape, double x, double y, double size)
{
  double r = 0.5 * size;
  cairo_new_path (cr);
  switch (shape)
    {
    case MARK_CIRCLE:
      cairo_arc (cr, x, y, r, 0, 2 * G_PI);
      cairo_stroke (cr);
      break;
    case MARK_DISC:
      cairo_arc (cr, x, y, r, 0, 2 * G_PI);
      cairo_fill (cr);
      break;
    case MARK_DIAMOND:
      cairo_move_to (cr, x, y - r);
      cairo_line_to (cr, x + r, y);
      cairo_line_to (cr, x, y + r);
      cairo_line_to (cr, x - r, y);
      cairo_close_path (cr);
      cairo_fill_preserve (cr);
      cairo_stroke (cr);
      break;
    case MARK_CROSS:
      cairo_move_to (cr, x - r, y - r);
      cairo_line_to (cr, x + r, y + r);
      cairo_move_to (cr, x - r, y + r);
      cairo_line_to (cr, x + r, y - r);
      cairo_stroke (cr);
      break;
    case MARK_PLUS:
      cairo_move_to (cr, x - r, y);
      cairo_line_to (cr, x + r, y);
      cairo_move_to (cr, x, y - r);
      cairo_line_to (cr, x, y + r);
      cairo_stroke (cr);
      break;
    }
}

/* A polyline with at most four vertices per pixel column (the first, lowest, highest and last
 * point of each run of consecutive points in one column, in their order along the curve), so
 * a curve of thousands of points costs about as much as the plot is wide; what is drawn stays
 * within the column of what the full polyline would cover. NaN breaks the line. */
static void
draw_polyline_decimated (const Panel *pn, cairo_t *cr, const Prim *q)
{
  bool pen = false, open = false;
  double col = 0;
  size_t idx[4];
  double xs[4], ys[4];   /* first, min, max, last of the run */
  cairo_new_path (cr);
  for (size_t i = 0; i <= q->n; i++)
    {
      bool ok = i < q->n && isfinite (q->u[i]) && isfinite (q->v[i]);
      double x = ok ? px_of (pn, q->u[i]) : 0, y = ok ? py_of (pn, q->v[i]) : 0;
      double c = ok ? floor (x) : 0;
      if (open && (!ok || c != col))
        {
          /* flush the run: its extreme points in the order they came */
          size_t order[4] = { 0, 1, 2, 3 };
          for (int a = 1; a < 4; a++)
            for (int b = a; b > 0 && idx[order[b]] < idx[order[b - 1]]; b--)
              {
                size_t t = order[b];
                order[b] = order[b - 1];
                order[b - 1] = t;
              }
          size_t last = (size_t) -1;
          for (int k = 0; k < 4; k++)
            {
              size_t j = order[k];
              if (idx[j] == last)
                continue;
              last = idx[j];
              if (pen)
                cairo_line_to (cr, xs[j], ys[j]);
              else
                cairo_move_to (cr, xs[j], ys[j]);
              pen = true;
            }
          open = false;
        }
      if (!ok)
        {
          pen = false;
          continue;
        }
      if (!open)
        {
          open = true;
          col = c;
          for (int k = 0; k < 4; k++)
            idx[k] = i, xs[k] = x, ys[k] = y;
          continue;
        }
      if (y < ys[1])
        idx[1] = i, xs[1] = x, ys[1] = y;
      if (y > ys[2])
        idx[2] = i, xs[2] = x, ys[2] = y;
      idx[3] = i, xs[3] = x, ys[3] = y;
    }
}

static void
draw_prim (const LwPlot *p, const Panel *pn, cairo_t *cr, const Prim *q)
{
  const Theme *t = theme_of (p);
  const double *c = colour_of (p, q->colour, q->variant);
  cairo_save (cr);
  set_rgb (cr, c, q->alpha);
  cairo_set_line_width (cr, q->width);
  set_dash (cr, q->dash, p->styles[q->variant % LW_PLOT_MAX_VARIANTS]);
  cairo_set_line_join (cr, CAIRO_LINE_JOIN_ROUND);
  switch (q->kind)
    {
    case PRIM_LINE:
      if (p->decimate)
        draw_polyline_decimated (pn, cr, q);
      else
        {
          bool pen = false;
          cairo_new_path (cr);
          for (size_t i = 0; i < q->n; i++)
            {
              if (!isfinite (q->u[i]) || !isfinite (q->v[i]))
                {
                  pen = false;
                  continue;
                }
              double x = px_of (pn, q->u[i]), y = py_of (pn, q->v[i]);
              if (pen)
                cairo_line_to (cr, x, y);
              else
                cairo_move_to (cr, x, y);
              pen = true;
            }
        }
      cairo_stroke (cr);
      break;
    case PRIM_MARK:
      if (isfinite (q->u[0]) && isfinite (q->v[0]))
        draw_marker (cr, q->shape, px_of (pn, q->u[0]) + q->dx, py_of (pn, q->v[0]) + q->dy,
                     q->size);
      break;
    case PRIM_TEXT:
      /* at the place place_labels found for it */
      if (q->shown)
        draw_text (p->text_cache, cr, q->text, FONT_NOTE, q->lx, q->ly, 0.0, 0.0, c,
                   q->plate ? t->bg : NULL, 0);
      break;
    case PRIM_HBAND:
      {
        double y0 = py_of (pn, q->v[0]), y1 = py_of (pn, q->v[1]);
        cairo_rectangle (cr, pn->rx, fmin (y0, y1), pn->rw, fabs (y1 - y0));
        cairo_fill (cr);
        break;
      }
    case PRIM_CIRCLE:
    case PRIM_ARC:
      {
        double r = q->r_units * pn->rw / (pn->x.hi - pn->x.lo);
        double x = px_of (pn, q->u[0]), y = py_of (pn, q->v[0]);
        cairo_new_path (cr);
        if (q->kind == PRIM_CIRCLE)
          cairo_arc (cr, x, y, r, 0, 2 * G_PI);
        else if (q->a1 <= q->a0)   /* clockwise in data space: increasing pixel angle */
          cairo_arc (cr, x, y, r, -q->a0 * G_PI / 180.0, -q->a1 * G_PI / 180.0);
        else
          cairo_arc_negative (cr, x, y, r, -q->a0 * G_PI / 180.0, -q->a1 * G_PI / 180.0);
        cairo_stroke (cr);
        break;
      }
    }
  cairo_restore (cr);
}

double
lw_plot_draw_key_strip (cairo_t *cr, LwPlotTheme theme, const char *const *names,
                        const unsigned *styles, size_t n, size_t active, double width)
{
  g_return_val_if_fail (cr != NULL && (n == 0 || names != NULL), 0.0);
  const Theme *t = &themes[theme == LW_PLOT_THEME_DARK ? 1 : 0];
  double height = 0.0;
  cairo_save (cr);
  /* pass 0 measures (the height, for the background), pass 1 draws */
  for (int pass = 0; pass < 2; pass++)
    {
      double x = 8.0, y = 0.5 * LW_PLOT_LEGEND_ROW;
      if (pass == 1)
        {
          set_rgb (cr, t->bg, 1.0);
          cairo_rectangle (cr, 0, 0, width, height);
          cairo_fill (cr);
        }
      for (size_t v = 0; v < n; v++)
        {
          if (names[v] == NULL)
            continue;
          unsigned st = styles != NULL ? styles[v] : 0;
          size_t slot = st >= 1 && st <= LW_PLOT_MAX_VARIANTS ? st - 1 : v % LW_PLOT_MAX_VARIANTS;
          FontRole role = v == active ? FONT_TITLE : FONT_LABEL;
          PangoLayout *lay = text_layout (NULL, cr, names[v], role);
          int iw, ih;
          pango_layout_get_size (lay, &iw, &ih);
          g_object_unref (lay);
          double need = 34.0 + (double) iw / PANGO_SCALE + 18.0;
          if (x > 8.0 && x + need > width)
            {
              x = 8.0;
              y += LW_PLOT_LEGEND_ROW;
            }
          if (pass == 1)
            {
              cairo_save (cr);
              set_rgb (cr, t->palette[slot], 1.0);
              cairo_set_line_width (cr, LW_PLOT_CURVE_WIDTH);
              set_dash (cr, DASH_VARIANT, slot);
              cairo_move_to (cr, x, y);
              cairo_line_to (cr, x + 28, y);
              cairo_stroke (cr);
              cairo_restore (cr);
              draw_text (NULL, cr, names[v], role, x + 34, y, 0.0, 0.5, t->text, NULL, 0);
            }
          x += need;
        }
      height = y + 0.5 * LW_PLOT_LEGEND_ROW;
    }
  cairo_restore (cr);
  return height;
}

static int
max_labels_for (double length, double per_label)
{
  int n = (int) floor (length / per_label);
  return n < 2 ? 2 : n;
}

static void
draw_grid (const LwPlot *p, const Panel *pn, cairo_t *cr)
{
  const Theme *t = theme_of (p);
  LwPlotTick ticks[MAX_TICKS];
  /* vertical grid lines and x tick labels */
  size_t n = lw_plot_axis_ticks (&pn->xv, max_labels_for (pn->rw, 64.0), ticks, MAX_TICKS);
  for (int pass = 0; pass < 2; pass++)
    for (size_t i = 0; i < n; i++)
      {
        if (ticks[i].major != (pass == 1))
          continue;
        double x = px_of (pn, lw_plot_axis_map (&pn->x, ticks[i].value));
        set_rgb (cr, ticks[i].major ? t->grid_major : t->grid_minor, 1.0);
        cairo_set_line_width (cr, ticks[i].major ? 0.9 : 0.6);
        cairo_move_to (cr, x, pn->ry);
        cairo_line_to (cr, x, pn->ry + pn->rh);
        cairo_stroke (cr);
      }
  n = lw_plot_axis_ticks (&pn->y, max_labels_for (pn->rh, 30.0), ticks, MAX_TICKS);
  for (int pass = 0; pass < 2; pass++)
    for (size_t i = 0; i < n; i++)
      {
        if (ticks[i].major != (pass == 1))
          continue;
        double y = py_of (pn, lw_plot_axis_map (&pn->y, ticks[i].value));
        set_rgb (cr, ticks[i].major ? t->grid_major : t->grid_minor, 1.0);
        cairo_set_line_width (cr, ticks[i].major ? 0.9 : 0.6);
        cairo_move_to (cr, pn->rx, y);
        cairo_line_to (cr, pn->rx + pn->rw, y);
        cairo_stroke (cr);
      }
}

static void
draw_legend (const LwPlot *p, cairo_t *cr)
{
  const Theme *t = theme_of (p);
  double y = LW_PLOT_MARGIN_TOP + 0.5 * LW_PLOT_LEGEND_ROW;
  double left = LW_PLOT_MARGIN_LEFT;
  if (p->title)
    {
      draw_text (p->text_cache, cr, p->title, FONT_TITLE, left, y, 0.0, 0.5, t->text, NULL, 0);
      y += LW_PLOT_LEGEND_ROW;
    }
  long slots = (long) floor ((p->width - LW_PLOT_MARGIN_LEFT - LW_PLOT_MARGIN_RIGHT) /
                             LW_PLOT_LEGEND_SLOT);
  if (slots < 1)
    slots = 1;
  long k = 0;
  for (size_t v = 0; v < p->n_variants; v++)
    {
      if (p->names[v] == NULL)
        continue;
      double x = left + LW_PLOT_LEGEND_SLOT * (double) (k % slots);
      double yy = y + LW_PLOT_LEGEND_ROW * (double) (k / slots);
      cairo_save (cr);
      set_rgb (cr, t->palette[p->styles[v]], 1.0);
      cairo_set_line_width (cr, LW_PLOT_CURVE_WIDTH);
      set_dash (cr, DASH_VARIANT, p->styles[v]);
      cairo_move_to (cr, x, yy);
      cairo_line_to (cr, x + 28, yy);
      cairo_stroke (cr);
      cairo_restore (cr);
      draw_text (p->text_cache, cr, p->names[v], FONT_LABEL, x + 34, yy, 0.0, 0.5, t->text,
                 NULL, 0);
      k++;
    }
}

/* Which primitives a layer holds: everything, everything but variant `v`'s, or only its. */
typedef enum { LAYER_ALL, LAYER_BASE, LAYER_VARIANT } Layer;

/* The margin labels of every variant belong to the top layer: where one goes depends on the
 * others, the moving variant's first (place_labels). */
static bool
prim_in_layer (const Prim *q, Layer layer, size_t v)
{
  bool own = q->owner >= 0 && (size_t) q->owner == v;
  if (q->label)
    return layer != LAYER_BASE;
  return layer == LAYER_ALL || (layer == LAYER_BASE ? !own : own);
}

typedef struct { double x0, y0, x1, y1; } Box;

static bool
box_free (const Box *b, const GArray *taken)
{
  for (guint i = 0; i < taken->len; i++)
    {
      const Box *o = &g_array_index (taken, Box, i);
      if (b->x0 < o->x1 && o->x0 < b->x1 && b->y0 < o->y1 && o->y0 < b->y1)
        return false;
    }
  return true;
}

/* The box of a text w × h with its top left corner at (x, y), its plate included. */
static Box
text_box (double x, double y, double w, double h)
{
  return (Box) { x - 2.0, y, x + w + 2.0, y + h };
}

static void
text_size (LwPlot *p, cairo_t *cr, const char *text, double *w, double *h)
{
  PangoLayout *lay = text_layout (p->text_cache, cr, text, FONT_NOTE);
  int iw, ih;
  pango_layout_get_size (lay, &iw, &ih);
  g_object_unref (lay);
  *w = (double) iw / PANGO_SCALE;
  *h = (double) ih / PANGO_SCALE;
}

/* Puts text q at the first free place of: where it prefers, mirrored about its anchor, then
 * a row down or up (one text height at a time, up to LABEL_ROWS rows each way), inside its
 * panel's height and the figure's width; with must_show, where it prefers (moved inside the
 * figure) when no place is free. Its box joins taken. */
#define LABEL_ROWS 8
static void
place_text (LwPlot *p, cairo_t *cr, const Panel *pn, Prim *q, GArray *taken, bool must_show)
{
  q->shown = false;
  if (!isfinite (q->u[0]) || !isfinite (q->v[0]))
    return;
  double tw, th;
  text_size (p, cr, q->text, &tw, &th);
  double axp = px_of (pn, q->u[0]), ayp = py_of (pn, q->v[0]);
  /* the preferred and the mirrored left edge; the preferred top edge */
  double xs[2] = { axp + q->dx - q->ax * tw, axp - q->dx - (1.0 - q->ax) * tw };
  double y0 = ayp + q->dy - q->ay * th;
  double ylo = pn->ry, yhi = pn->ry + pn->rh, xhi = p->width - 1.0;
  for (int row = 0; row <= 2 * LABEL_ROWS; row++)
    {
      /* rows 0, +1, −1, +2, −2, … */
      double dy = (double) ((row + 1) / 2) * (row % 2 == 1 ? 1.0 : -1.0) * (th + 1.0);
      for (int side = 0; side < 2; side++)
        {
          double x = xs[side], y = y0 + dy;
          Box b = text_box (x, y, tw, th);
          if (b.x0 < 0.0 || b.x1 > xhi || y < ylo || y + th > yhi || !box_free (&b, taken))
            continue;
          q->lx = x;
          q->ly = y;
          q->shown = true;
          g_array_append_val (taken, b);
          return;
        }
    }
  if (must_show)
    {
      q->lx = fmin (fmax (xs[0], 2.0), fmax (xhi - tw - 2.0, 2.0));
      q->ly = fmin (fmax (y0, ylo), fmax (yhi - th, ylo));
      q->shown = true;
      Box b = text_box (q->lx, q->ly, tw, th);
      g_array_append_val (taken, b);
    }
}

/* Where the texts go, panel by panel, for the layout just made, so that none covers another:
 * first the texts that belong to no variant (reference levels, the Nyquist frequency: in the
 * base layer, so their places must not depend on a variant), then the places kept clear
 * (lw_plot_set_keep_clear: the drag handles), then the margin labels of variant `first`,
 * then those of the others in order. A label of `first` that finds no free place stays where
 * it prefers; another variant's is left out (its figures are in the metrics table and the
 * report). */
static void
place_labels (LwPlot *p, cairo_t *cr, size_t first)
{
  GArray *taken = g_array_new (FALSE, FALSE, sizeof (Box));
  for (size_t k = 0; k < p->n_panels; k++)
    {
      Panel *pn = &p->panels[k];
      g_array_set_size (taken, 0);
      for (guint i = 0; i < pn->prims->len; i++)
        {
          Prim *q = pn->prims->pdata[i];
          if (q->kind == PRIM_TEXT && !q->label)
            place_text (p, cr, pn, q, taken, true);
        }
      for (size_t i = 0; i < p->n_clear; i++)
        {
          double x, y;
          if (p->clear[i].panel == (int) k
              && lw_plot_pixel_of_value (p, k, p->clear[i].x, p->clear[i].y, &x, &y))
            {
              Box b = { x - 8.0, y - 8.0, x + 8.0, y + 8.0 };
              g_array_append_val (taken, b);
            }
        }
      for (size_t pass = 0; pass < p->n_variants; pass++)
        {
          size_t v = pass == 0 ? first : (pass <= first ? pass - 1 : pass);
          for (guint i = 0; i < pn->prims->len; i++)
            {
              Prim *q = pn->prims->pdata[i];
              if (q->label && q->variant == v)
                place_text (p, cr, pn, q, taken, pass == 0);
            }
        }
    }
  g_array_free (taken, TRUE);
}

static void
draw_layer (LwPlot *p, cairo_t *cr, double width, double height, Layer layer, size_t var)
{
  lw_plot_layout (p, width, height);
  place_labels (p, cr, var < p->n_variants ? var : 0);
  const Theme *t = theme_of (p);
  cairo_save (cr);
  cairo_set_line_cap (cr, CAIRO_LINE_CAP_BUTT);
  if (layer == LAYER_VARIANT)
    {
      /* only the variant's curves and annotations, over a base layer already drawn */
      for (size_t k = 0; k < p->n_panels; k++)
        {
          const Panel *pn = &p->panels[k];
          cairo_save (cr);
          cairo_rectangle (cr, pn->rx, pn->ry, pn->rw, pn->rh);
          cairo_clip (cr);
          for (guint i = 0; i < pn->prims->len; i++)
            {
              const Prim *q = pn->prims->pdata[i];
              if (prim_in_layer (q, layer, var) && q->kind != PRIM_TEXT
                  && !(q->kind == PRIM_MARK && (q->dx != 0 || q->dy != 0)))
                draw_prim (p, pn, cr, q);
            }
          cairo_restore (cr);
          for (guint i = 0; i < pn->prims->len; i++)
            {
              const Prim *q = pn->prims->pdata[i];
              if (prim_in_layer (q, layer, var)
                  && (q->kind == PRIM_TEXT || (q->kind == PRIM_MARK && (q->dx != 0 || q->dy != 0))))
                draw_prim (p, pn, cr, q);
            }
        }
      cairo_restore (cr);
      return;
    }
  set_rgb (cr, t->bg, 1.0);
  cairo_rectangle (cr, 0, 0, width, height);
  cairo_fill (cr);
  for (size_t k = 0; k < p->n_panels; k++)
    {
      const Panel *pn = &p->panels[k];
      cairo_save (cr);
      cairo_rectangle (cr, pn->rx, pn->ry, pn->rw, pn->rh);
      cairo_clip (cr);
      draw_grid (p, pn, cr);
      cairo_restore (cr);
      /* tick labels outside the clip */
      cairo_save (cr);
      {
        LwPlotTick ticks[MAX_TICKS];
        size_t n;
        if (pn->x_tick_labels)
          {
            n = lw_plot_axis_ticks (&pn->xv, max_labels_for (pn->rw, 64.0), ticks, MAX_TICKS);
            for (size_t i = 0; i < n; i++)
              if (ticks[i].labelled)
                draw_text (p->text_cache, cr, ticks[i].label, FONT_TICK,
                           px_of (pn, lw_plot_axis_map (&pn->x, ticks[i].value)),
                           pn->ry + pn->rh + 4, 0.5, 0.0, t->text, NULL, 0);
          }
        n = lw_plot_axis_ticks (&pn->y, max_labels_for (pn->rh, 30.0), ticks, MAX_TICKS);
        for (size_t i = 0; i < n; i++)
          if (ticks[i].labelled)
            draw_text (p->text_cache, cr, ticks[i].label, FONT_TICK, pn->rx - 6,
                       py_of (pn, lw_plot_axis_map (&pn->y, ticks[i].value)), 1.0, 0.5,
                       t->text, NULL, 0);
      }
      if (pn->y_label)
        draw_text (p->text_cache, cr, pn->y_label, FONT_LABEL, pn->rx - 62,
                   pn->ry + 0.5 * pn->rh, 0.5, 0.5,
                   t->text, NULL, -G_PI / 2);
      if (pn->x_label && pn->x_tick_labels)
        draw_text (p->text_cache, cr, pn->x_label, FONT_LABEL, pn->rx + 0.5 * pn->rw,
                   pn->ry + pn->rh + 22,
                   0.5, 0.0, t->text, NULL, 0);
      cairo_restore (cr);

      cairo_save (cr);
      cairo_rectangle (cr, pn->rx, pn->ry, pn->rw, pn->rh);
      cairo_clip (cr);
      for (guint i = 0; i < pn->prims->len; i++)
        {
          const Prim *q = pn->prims->pdata[i];
          if (prim_in_layer (q, layer, var) && q->kind != PRIM_TEXT
              && !(q->kind == PRIM_MARK && (q->dx != 0 || q->dy != 0)))
            draw_prim (p, pn, cr, q);
        }
      cairo_restore (cr);
      /* frame, then texts and keys (not clipped, so labels near an edge stay whole) */
      set_rgb (cr, t->frame, 1.0);
      cairo_set_line_width (cr, 1.0);
      cairo_set_dash (cr, NULL, 0, 0);
      cairo_rectangle (cr, pn->rx, pn->ry, pn->rw, pn->rh);
      cairo_stroke (cr);
      for (guint i = 0; i < pn->prims->len; i++)
        {
          const Prim *q = pn->prims->pdata[i];
          if (prim_in_layer (q, layer, var)
              && (q->kind == PRIM_TEXT || (q->kind == PRIM_MARK && (q->dx != 0 || q->dy != 0))))
            draw_prim (p, pn, cr, q);
        }
      /* the Nyquist line sits on the right edge of the frame: draw it again over the frame */
      for (guint i = 0; i < pn->prims->len; i++)
        {
          const Prim *q = pn->prims->pdata[i];
          if (q->kind == PRIM_LINE && q->colour == COL_NYQUIST)
            draw_prim (p, pn, cr, q);
        }
    }
  draw_legend (p, cr);
  cairo_restore (cr);
}

void
lw_plot_draw_static (LwPlot *p, cairo_t *cr, double width, double height)
{
  g_return_if_fail (p != NULL && cr != NULL);
  draw_layer (p, cr, width, height, LAYER_ALL, 0);
}

void
lw_plot_draw_base (LwPlot *p, cairo_t *cr, double width, double height, size_t variant)
{
  g_return_if_fail (p != NULL && cr != NULL);
  draw_layer (p, cr, width, height, LAYER_BASE, variant);
}

void
lw_plot_draw_variant (LwPlot *p, cairo_t *cr, double width, double height, size_t variant)
{
  g_return_if_fail (p != NULL && cr != NULL);
  draw_layer (p, cr, width, height, LAYER_VARIANT, variant);
}

static bool
prim_equal (const Prim *a, const Prim *b)
{
  return a->kind == b->kind && a->colour == b->colour && a->variant == b->variant
         && a->owner == b->owner
         && a->dash == b->dash && a->width == b->width && a->alpha == b->alpha && a->n == b->n
         && a->shape == b->shape && a->size == b->size && a->dx == b->dx && a->dy == b->dy
         && a->ax == b->ax && a->ay == b->ay && a->plate == b->plate
         && a->r_units == b->r_units && a->a0 == b->a0 && a->a1 == b->a1
         && g_strcmp0 (a->text, b->text) == 0
         && (a->n == 0 || (memcmp (a->u, b->u, a->n * sizeof *a->u) == 0
                           && memcmp (a->v, b->v, a->n * sizeof *a->v) == 0));
}

static bool
axis_equal (const LwPlotAxis *a, const LwPlotAxis *b)
{
  return a->scale == b->scale && a->style == b->style && a->lo == b->lo && a->hi == b->hi;
}

bool
lw_plot_base_equal (const LwPlot *a, const LwPlot *b, size_t variant)
{
  if (a == NULL || b == NULL || a->view != b->view || a->theme != b->theme
      || a->n_variants != b->n_variants || a->n_panels != b->n_panels
      || g_strcmp0 (a->title, b->title) != 0)
    return false;
  for (size_t v = 0; v < a->n_variants; v++)
    if (g_strcmp0 (a->names[v], b->names[v]) != 0 || a->styles[v] != b->styles[v])
      return false;
  for (size_t k = 0; k < a->n_panels; k++)
    {
      const Panel *pa = &a->panels[k], *pb = &b->panels[k];
      if (!axis_equal (&pa->x, &pb->x) || !axis_equal (&pa->y, &pb->y)
          || !axis_equal (&pa->xv, &pb->xv) || pa->wu0 != pb->wu0 || pa->wu1 != pb->wu1)
        return false;
      guint i = 0, j = 0;
      for (;;)
        {
          while (i < pa->prims->len && !prim_in_layer (pa->prims->pdata[i], LAYER_BASE, variant))
            i++;
          while (j < pb->prims->len && !prim_in_layer (pb->prims->pdata[j], LAYER_BASE, variant))
            j++;
          if (i == pa->prims->len || j == pb->prims->len)
            {
              if (i != pa->prims->len || j != pb->prims->len)
                return false;
              break;
            }
          if (!prim_equal (pa->prims->pdata[i], pb->prims->pdata[j]))
            return false;
          i++, j++;
        }
    }
  return true;
}

void
lw_plot_set_decimate (LwPlot *p, bool decimate)
{
  g_return_if_fail (p != NULL);
  p->decimate = decimate;
}

static bool
has_frequency_axis (const LwPlot *p)
{
  return p->view == LW_PLOT_VIEW_BODE_Z || p->view == LW_PLOT_VIEW_BODE_W;
}

bool
lw_plot_set_x_view (LwPlot *p, double lo, double hi)
{
  g_return_val_if_fail (p != NULL, false);
  if (!has_frequency_axis (p) || !(lo > 0.0) || !(hi > lo) || !isfinite (hi))
    return false;
  for (size_t k = 0; k < p->n_panels; k++)
    {
      Panel *pn = &p->panels[k];
      LwPlotAxis xv;
      if (!lw_plot_axis_init (&xv, pn->x.scale, pn->x.style, lo, hi))
        return false;
      pn->xv = xv;
      pn->wu0 = lw_plot_axis_map (&pn->x, lo);
      pn->wu1 = lw_plot_axis_map (&pn->x, hi);
    }
  return true;
}

bool
lw_plot_get_x_view (const LwPlot *p, double *lo, double *hi)
{
  g_return_val_if_fail (p != NULL, false);
  if (!has_frequency_axis (p) || p->n_panels == 0)
    return false;
  *lo = p->panels[0].xv.lo;
  *hi = p->panels[0].xv.hi;
  return true;
}

void
lw_plot_full_x_range (const LwPlot *p, double *lo, double *hi)
{
  g_return_if_fail (p != NULL);
  *lo = p->n_panels > 0 ? p->panels[0].x.lo : 0.0;
  *hi = p->n_panels > 0 ? p->panels[0].x.hi : 1.0;
}

/* ---- overlay and hit tests ------------------------------------------------------------- */

size_t
lw_plot_n_panels (const LwPlot *p)
{
  return p ? p->n_panels : 0;
}

const LwPlotAxis *
lw_plot_panel_x_axis (const LwPlot *p, size_t panel)
{
  return p && panel < p->n_panels ? &p->panels[panel].xv : NULL;
}

const LwPlotAxis *
lw_plot_panel_y_axis (const LwPlot *p, size_t panel)
{
  return p && panel < p->n_panels ? &p->panels[panel].y : NULL;
}

bool
lw_plot_panel_rect (const LwPlot *p, size_t panel, double *x, double *y, double *w, double *h)
{
  if (!p || panel >= p->n_panels || !p->laid_out)
    return false;
  const Panel *pn = &p->panels[panel];
  *x = pn->rx;
  *y = pn->ry;
  *w = pn->rw;
  *h = pn->rh;
  return true;
}

bool
lw_plot_value_at_pixel (const LwPlot *p, double px, double py, size_t *panel, double *x,
                        double *y)
{
  if (!p || !p->laid_out)
    return false;
  for (size_t k = 0; k < p->n_panels; k++)
    {
      const Panel *pn = &p->panels[k];
      if (px < pn->rx || px > pn->rx + pn->rw || py < pn->ry || py > pn->ry + pn->rh)
        continue;
      *panel = k;
      *x = lw_plot_axis_unmap (&pn->x, pn->wu0 + (px - pn->rx) / pn->rw * (pn->wu1 - pn->wu0));
      *y = lw_plot_axis_unmap (&pn->y, 1.0 - (py - pn->ry) / pn->rh);
      return true;
    }
  return false;
}

bool
lw_plot_pixel_of_value (const LwPlot *p, size_t panel, double x, double y, double *px,
                        double *py)
{
  if (!p || !p->laid_out || panel >= p->n_panels)
    return false;
  const Panel *pn = &p->panels[panel];
  double u = lw_plot_axis_map (&pn->x, x), v = lw_plot_axis_map (&pn->y, y);
  if (!isfinite (u) || !isfinite (v))
    return false;
  *px = px_of (pn, u);
  *py = py_of (pn, v);
  return true;
}

void
lw_plot_draw_overlay (LwPlot *p, cairo_t *cr, const LwPlotOverlay *ov)
{
  g_return_if_fail (p != NULL && cr != NULL && ov != NULL);
  if (!p->laid_out)
    return;
  const Theme *t = theme_of (p);
  cairo_save (cr);
  for (size_t i = 0; i < ov->n_handles; i++)
    {
      const LwPlotHandle *h = &ov->handles[i];
      double x, y;
      if (!lw_plot_pixel_of_value (p, (size_t) h->panel, h->x, h->y, &x, &y))
        continue;
      cairo_new_path (cr);
      cairo_arc (cr, x, y, h->active ? 7.0 : 5.5, 0, 2 * G_PI);
      set_rgb (cr, t->bg, 1.0);
      cairo_fill_preserve (cr);
      set_rgb (cr, t->text, 1.0);
      cairo_set_line_width (cr, h->active ? 2.0 : 1.3);
      cairo_stroke (cr);
    }
  size_t k;
  double vx, vy;
  if (ov->has_hover && lw_plot_value_at_pixel (p, ov->hover_x, ov->hover_y, &k, &vx, &vy))
    {
      const Panel *pn = &p->panels[k];
      set_rgb (cr, t->ref, 0.8);
      cairo_set_line_width (cr, 0.8);
      cairo_move_to (cr, ov->hover_x, pn->ry);
      cairo_line_to (cr, ov->hover_x, pn->ry + pn->rh);
      cairo_move_to (cr, pn->rx, ov->hover_y);
      cairo_line_to (cr, pn->rx + pn->rw, ov->hover_y);
      cairo_stroke (cr);
      char buf[128];
      snprintf (buf, sizeof buf, "%s %.4g %s   %s %.4g %s", pn->x_name ? pn->x_name : "x", vx,
                pn->x_unit ? pn->x_unit : "", pn->y_name ? pn->y_name : "y", vy,
                pn->y_unit ? pn->y_unit : "");
      bool right_half = ov->hover_x > pn->rx + 0.5 * pn->rw;
      draw_text (p->text_cache, cr, buf, FONT_NOTE, ov->hover_x + (right_half ? -8 : 8),
                 ov->hover_y - 6,
                 right_half ? 1.0 : 0.0, 1.0, t->text, t->bg, 0);
    }
  cairo_restore (cr);
}
