/* lw-plot-draw.c — drawing a figure: themes, layout, primitives, grid, legend, the key strip,
 * and the layers (everything; the base without one variant; that variant alone).
 *
 * Style of our own: colour means a variant (a subset of the Okabe–Ito colour-universal-design
 * set, see docs/plot.md) and each variant also has its own dash pattern; everything that is a
 * reference (0 dB, −180°, the unit circle, the Nyquist line, requirement marks) is a neutral
 * grey of the theme. A margin is drawn as a short thick "gauge" bar from the reference to the
 * curve at its crossover, with a thin dotted drop line joining the magnitude and phase panels
 * and a small label ("PM 52.3°", "GM 8.1 dB") on a background plate (the builders,
 * lw-plot-view-NAME.c, make them).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-private.h"

#include <math.h>
#include <string.h>

/* ---- themes ---------------------------------------------------------------------------- */

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
  named += p->n_keys + (p->family_key != NULL);
  long slots = (long) floor ((right - left) / LW_PLOT_LEGEND_SLOT);
  if (slots < 1)
    slots = 1;
  p->legend_rows = (p->title ? 1 : 0) + (int) ((named + (size_t) slots - 1) / (size_t) slots);
  double top = LW_PLOT_MARGIN_TOP + LW_PLOT_LEGEND_ROW * p->legend_rows;
  double bottom = height - LW_PLOT_MARGIN_BOTTOM;
  double gap = LW_PLOT_PANEL_GAP;
  double ph = (bottom - top - gap * (double) (p->n_panels - 1)) / (double) p->n_panels;
  /* side by side (a map and its zoom): the first panel 60 % of the width, each keeping a
   * left margin of its own for its tick labels */
  double cols = right - left - LW_PLOT_MARGIN_LEFT * (double) (p->n_panels - 1);
  double colx = left;
  for (size_t k = 0; k < p->n_panels; k++)
    {
      Panel *pn = &p->panels[k];
      if (p->side_by_side)
        {
          double share = p->n_panels == 1 ? 1.0
                         : k == 0 ? 0.6 : 0.4 / (double) (p->n_panels - 1);
          pn->rx = colx;
          pn->rw = fmax (share * cols, 1.0);
          pn->ry = top;
          pn->rh = fmax (bottom - top, 1.0);
          colx += share * cols + LW_PLOT_MARGIN_LEFT;
        }
      else
        {
          pn->rx = left;
          pn->rw = fmax (right - left, 1.0);
          pn->ry = top + (double) k * (ph + gap);
          pn->rh = fmax (ph, 1.0);
        }
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

const Theme *
lwp_theme_of (const LwPlot *p)
{
  return &themes[p->theme == LW_PLOT_THEME_DARK ? 1 : 0];
}

void
lwp_set_rgb (cairo_t *cr, const double c[3], double alpha)
{
  cairo_set_source_rgba (cr, c[0], c[1], c[2], alpha);
}

static const double *
colour_of (const LwPlot *p, ColourRole role, size_t variant)
{
  const Theme *t = lwp_theme_of (p);
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

void
lwp_set_dash (cairo_t *cr, DashRole d, size_t variant)
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

/* An arrowhead at (x, y) pointing along (dx, dy) (any length), filled. */
static void
arrowhead (cairo_t *cr, double x, double y, double dx, double dy)
{
  double l = hypot (dx, dy);
  if (!(l > 0.0))
    return;
  dx /= l;
  dy /= l;
  cairo_move_to (cr, x, y);
  cairo_line_to (cr, x - ARROW_SIZE * dx + 0.45 * ARROW_SIZE * dy,
                 y - ARROW_SIZE * dy - 0.45 * ARROW_SIZE * dx);
  cairo_line_to (cr, x - ARROW_SIZE * dx - 0.45 * ARROW_SIZE * dy,
                 y - ARROW_SIZE * dy + 0.45 * ARROW_SIZE * dx);
  cairo_close_path (cr);
  cairo_fill (cr);
}

static void
draw_prim (const LwPlot *p, const Panel *pn, cairo_t *cr, const Prim *q)
{
  const Theme *t = lwp_theme_of (p);
  const double *c = colour_of (p, q->colour, q->variant);
  cairo_save (cr);
  lwp_set_rgb (cr, c, q->alpha);
  cairo_set_line_width (cr, q->width);
  lwp_set_dash (cr, q->dash, p->styles[q->variant % LW_PLOT_MAX_VARIANTS]);
  /* curves of many points: mitred joins (bevels at sharp turns), a tenth of a
   * dragged frame cheaper than round ones and the same to the eye where consecutive segments
   * turn by a few degrees; a held staircase gets square corners */
  cairo_set_line_join (cr, q->kind == PRIM_LINE && q->n > 8 ? CAIRO_LINE_JOIN_MITER
                                                            : CAIRO_LINE_JOIN_ROUND);
  cairo_set_miter_limit (cr, 2.0);   /* turns sharper than 60°: bevelled, no spikes */
  switch (q->kind)
    {
    case PRIM_LINE:
      if (p->decimate)
        lwp_polyline_decimated (pn, cr, q);
      else
        lwp_points_path (pn, cr, q, false);
      cairo_stroke (cr);
      if (q->arrows && q->n == 2 && isfinite (q->u[0]) && isfinite (q->v[0])
          && isfinite (q->u[1]) && isfinite (q->v[1]))
        {
          double x0 = px_of (pn, q->u[0]), y0 = py_of (pn, q->v[0]);
          double x1 = px_of (pn, q->u[1]), y1 = py_of (pn, q->v[1]);
          if (hypot (x1 - x0, y1 - y0) > 2.5 * ARROW_SIZE)   /* room for both heads */
            {
              arrowhead (cr, x0, y0, x0 - x1, y0 - y1);
              arrowhead (cr, x1, y1, x1 - x0, y1 - y0);
            }
        }
      break;
    case PRIM_MARK:
      if (isfinite (q->u[0]) && isfinite (q->v[0]))
        draw_marker (cr, q->shape, px_of (pn, q->u[0]) + q->dx, py_of (pn, q->v[0]) + q->dy,
                     q->size);
      break;
    case PRIM_TEXT:
      /* a label moved away from its marker: a thin leader line from the marker to the
       * nearest point of the label's box */
      if (q->shown && q->label && q->moved && isfinite (q->u[0]) && isfinite (q->v[0]))
        {
          double ax = px_of (pn, q->u[0]), ay = py_of (pn, q->v[0]);
          double bx = fmin (fmax (ax, q->lx), q->lx + q->lw);
          double by = fmin (fmax (ay, q->ly), q->ly + q->lh);
          if (hypot (bx - ax, by - ay) > 4.0)
            {
              cairo_save (cr);
              cairo_set_line_width (cr, 0.7);
              cairo_set_dash (cr, NULL, 0, 0.0);
              cairo_move_to (cr, ax, ay);
              cairo_line_to (cr, bx, by);
              cairo_stroke (cr);
              cairo_restore (cr);
            }
        }
      /* at the place lwp_place_labels found for it */
      if (q->shown)
        lwp_draw_text (p->text_cache, cr, q->text, FONT_NOTE, q->lx, q->ly, 0.0, 0.0, c,
                   q->plate ? t->bg : NULL, 0);
      break;
    case PRIM_HBAND:
      {
        /* a keep-out zone: a light wash and diagonal hatching */
        double y0 = py_of (pn, q->v[0]), y1 = py_of (pn, q->v[1]);
        double top = fmin (y0, y1), h = fabs (y1 - y0);
        cairo_rectangle (cr, pn->rx, top, pn->rw, h);
        cairo_clip_preserve (cr);
        cairo_fill (cr);
        lwp_set_rgb (cr, c, fmin (1.0, 3.0 * q->alpha));
        cairo_set_line_width (cr, 0.8);
        cairo_set_dash (cr, NULL, 0, 0.0);
        for (double x = pn->rx - h; x < pn->rx + pn->rw; x += HATCH_STEP)
          {
            cairo_move_to (cr, x, top + h);
            cairo_line_to (cr, x + h, top);
          }
        cairo_stroke (cr);
        break;
      }
    case PRIM_AREA:
      /* a light band: its edges without antialiasing cost less and look the same */
      cairo_set_antialias (cr, CAIRO_ANTIALIAS_NONE);
      lwp_points_path (pn, cr, q, true);
      cairo_fill (cr);
      break;
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
        if (q->kind == PRIM_ARC && q->arrows && fabs (q->a1 - q->a0) * G_PI / 180.0 * r
                                               > 2.5 * ARROW_SIZE)
          {
            /* the tangents at the ends, pointing away from the arc's middle */
            double s = q->a1 > q->a0 ? 1.0 : -1.0;
            for (int e = 0; e < 2; e++)
              {
                double a = (e == 0 ? q->a0 : q->a1) * G_PI / 180.0, dir = e == 0 ? -s : s;
                /* data angle a → pixel point (x + r cos a, y − r sin a); d/da of it */
                arrowhead (cr, x + r * cos (a), y - r * sin (a), -r * sin (a) * dir,
                           -r * cos (a) * dir);
              }
          }
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
          lwp_set_rgb (cr, t->bg, 1.0);
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
          PangoLayout *lay = lwp_text_layout (NULL, cr, names[v], role);
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
              lwp_set_rgb (cr, t->palette[slot], 1.0);
              cairo_set_line_width (cr, LW_PLOT_CURVE_WIDTH);
              lwp_set_dash (cr, DASH_VARIANT, slot);
              cairo_move_to (cr, x, y);
              cairo_line_to (cr, x + 28, y);
              cairo_stroke (cr);
              cairo_restore (cr);
              lwp_draw_text (NULL, cr, names[v], role, x + 34, y, 0.0, 0.5, t->text, NULL, 0);
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
  const Theme *t = lwp_theme_of (p);
  LwPlotTick ticks[MAX_TICKS];
  /* vertical grid lines and x tick labels */
  size_t n = lw_plot_axis_ticks (&pn->xv, max_labels_for (pn->rw, 64.0), ticks, MAX_TICKS);
  for (int pass = 0; pass < 2; pass++)
    for (size_t i = 0; i < n; i++)
      {
        if (ticks[i].major != (pass == 1))
          continue;
        double x = px_of (pn, lw_plot_axis_map (&pn->x, ticks[i].value));
        lwp_set_rgb (cr, ticks[i].major ? t->grid_major : t->grid_minor, 1.0);
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
        lwp_set_rgb (cr, ticks[i].major ? t->grid_major : t->grid_minor, 1.0);
        cairo_set_line_width (cr, ticks[i].major ? 0.9 : 0.6);
        cairo_move_to (cr, pn->rx, y);
        cairo_line_to (cr, pn->rx + pn->rw, y);
        cairo_stroke (cr);
      }
}

static void
draw_legend (const LwPlot *p, cairo_t *cr)
{
  const Theme *t = lwp_theme_of (p);
  double y = LW_PLOT_MARGIN_TOP + 0.5 * LW_PLOT_LEGEND_ROW;
  double left = LW_PLOT_MARGIN_LEFT;
  if (p->title)
    {
      lwp_draw_text (p->text_cache, cr, p->title, FONT_TITLE, left, y, 0.0, 0.5, t->text, NULL, 0);
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
      lwp_set_rgb (cr, t->palette[p->styles[v]], 1.0);
      cairo_set_line_width (cr, LW_PLOT_CURVE_WIDTH);
      lwp_set_dash (cr, DASH_VARIANT, p->styles[v]);
      cairo_move_to (cr, x, yy);
      cairo_line_to (cr, x + 28, yy);
      cairo_stroke (cr);
      cairo_restore (cr);
      lwp_draw_text (p->text_cache, cr, p->names[v], FONT_LABEL, x + 34, yy, 0.0, 0.5, t->text,
                 NULL, 0);
      k++;
    }
  /* a plant family: a thin light line in its variant's colour */
  if (p->family_key != NULL)
    {
      double x = left + LW_PLOT_LEGEND_SLOT * (double) (k % slots);
      double yy = y + LW_PLOT_LEGEND_ROW * (double) (k / slots);
      cairo_save (cr);
      lwp_set_rgb (cr, t->palette[p->family_style], FAMILY_ALPHA * 2.0);
      cairo_set_line_width (cr, FAMILY_WIDTH);
      for (int i = -1; i <= 1; i++)
        {
          cairo_move_to (cr, x, yy + 3.0 * i);
          cairo_line_to (cr, x + 28, yy + 3.0 * i);
        }
      cairo_stroke (cr);
      cairo_restore (cr);
      lwp_draw_text (p->text_cache, cr, p->family_key, FONT_LABEL, x + 34, yy, 0.0, 0.5,
                     t->text, NULL, 0);
      k++;
    }
  /* the marker shapes a view explains, in the text colour, after the variants */
  for (size_t i = 0; i < p->n_keys; i++, k++)
    {
      double x = left + LW_PLOT_LEGEND_SLOT * (double) (k % slots);
      double yy = y + LW_PLOT_LEGEND_ROW * (double) (k / slots);
      cairo_save (cr);
      lwp_set_rgb (cr, t->text, 1.0);
      cairo_set_line_width (cr, 1.2);
      draw_marker (cr, (MarkShape) p->keys_shown[i].shape, x + 14, yy, 8);
      cairo_restore (cr);
      lwp_draw_text (p->text_cache, cr, p->keys_shown[i].text, FONT_LABEL, x + 34, yy, 0.0, 0.5,
                     t->text, NULL, 0);
    }
}

void
lwp_add_key (LwPlot *p, int shape, const char *text)
{
  if (p->n_keys < G_N_ELEMENTS (p->keys_shown))
    {
      p->keys_shown[p->n_keys].shape = shape;
      p->keys_shown[p->n_keys].text = text;
      p->n_keys++;
    }
}

/* The margin labels of every variant belong to the top layer: where one goes depends on the
 * others, the moving variant's first (lwp_place_labels). */
bool
lwp_prim_in_layer (const Prim *q, Layer layer, size_t v)
{
  bool own = q->owner >= 0 && (size_t) q->owner == v;
  if (q->label)
    return layer != LAYER_BASE;
  return layer == LAYER_ALL || (layer == LAYER_BASE ? !own : own);
}

static void
draw_layer (LwPlot *p, cairo_t *cr, double width, double height, Layer layer, size_t var)
{
  lw_plot_layout (p, width, height);
  lwp_place_labels (p, cr, var < p->n_variants ? var : 0);
  const Theme *t = lwp_theme_of (p);
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
              if (lwp_prim_in_layer (q, layer, var) && q->kind != PRIM_TEXT
                  && !(q->kind == PRIM_MARK && (q->dx != 0 || q->dy != 0)))
                draw_prim (p, pn, cr, q);
            }
          cairo_restore (cr);
          for (guint i = 0; i < pn->prims->len; i++)
            {
              const Prim *q = pn->prims->pdata[i];
              if (lwp_prim_in_layer (q, layer, var)
                  && (q->kind == PRIM_TEXT || (q->kind == PRIM_MARK && (q->dx != 0 || q->dy != 0))))
                draw_prim (p, pn, cr, q);
            }
        }
      cairo_restore (cr);
      return;
    }
  lwp_set_rgb (cr, t->bg, 1.0);
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
                lwp_draw_text (p->text_cache, cr, ticks[i].label, FONT_TICK,
                           px_of (pn, lw_plot_axis_map (&pn->x, ticks[i].value)),
                           pn->ry + pn->rh + 4, 0.5, 0.0, t->text, NULL, 0);
          }
        n = lw_plot_axis_ticks (&pn->y, max_labels_for (pn->rh, 30.0), ticks, MAX_TICKS);
        for (size_t i = 0; i < n; i++)
          if (ticks[i].labelled)
            lwp_draw_text (p->text_cache, cr, ticks[i].label, FONT_TICK, pn->rx - 6,
                       py_of (pn, lw_plot_axis_map (&pn->y, ticks[i].value)), 1.0, 0.5,
                       t->text, NULL, 0);
      }
      if (pn->y_label)
        {
          /* a title longer than its panel is high would run into the next panel's: the
           * short form (the quantity and its unit) then */
          g_autofree char *brief = NULL;
          const char *title = pn->y_label;
          PangoLayout *lay = lwp_text_layout (p->text_cache, cr, title, FONT_LABEL);
          int lw_, lh_;
          pango_layout_get_size (lay, &lw_, &lh_);
          g_object_unref (lay);
          if ((double) lw_ / PANGO_SCALE > pn->rh && pn->y_name != NULL)
            title = brief = pn->y_unit != NULL && pn->y_unit[0] != '\0'
                            ? g_strdup_printf ("%s (%s)", pn->y_name, pn->y_unit)
                            : g_strdup (pn->y_name);
          lwp_draw_text (p->text_cache, cr, title, FONT_LABEL, pn->rx - 62,
                         pn->ry + 0.5 * pn->rh, 0.5, 0.5, t->text, NULL, -G_PI / 2);
        }
      if (pn->x_label && pn->x_tick_labels)
        lwp_draw_text (p->text_cache, cr, pn->x_label, FONT_LABEL, pn->rx + 0.5 * pn->rw,
                   pn->ry + pn->rh + 22,
                   0.5, 0.0, t->text, NULL, 0);
      cairo_restore (cr);

      cairo_save (cr);
      cairo_rectangle (cr, pn->rx, pn->ry, pn->rw, pn->rh);
      cairo_clip (cr);
      for (guint i = 0; i < pn->prims->len; i++)
        {
          const Prim *q = pn->prims->pdata[i];
          if (lwp_prim_in_layer (q, layer, var) && q->kind != PRIM_TEXT
              && !(q->kind == PRIM_MARK && (q->dx != 0 || q->dy != 0)))
            draw_prim (p, pn, cr, q);
        }
      cairo_restore (cr);
      /* frame, then texts and keys (not clipped, so labels near an edge stay whole) */
      lwp_set_rgb (cr, t->frame, 1.0);
      cairo_set_line_width (cr, 1.0);
      cairo_set_dash (cr, NULL, 0, 0);
      cairo_rectangle (cr, pn->rx, pn->ry, pn->rw, pn->rh);
      cairo_stroke (cr);
      for (guint i = 0; i < pn->prims->len; i++)
        {
          const Prim *q = pn->prims->pdata[i];
          if (lwp_prim_in_layer (q, layer, var)
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
