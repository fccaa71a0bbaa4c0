/* lw-plot-figure.c — the figure model (lw-plot-private.h): primitives, ranges, building a
 * figure, comparing base layers, the visible x range.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <stdarg.h>

#include "lw-plot-private.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

static void
prim_free (gpointer data)
{
  Prim *p = data;
  g_free (p->u);
  g_free (p->v);
  g_free (p->text);
  g_free (p);
}

Prim *
lwp_prim_add (Panel *pn, PrimKind kind, size_t n)
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

/* A polyline of data points (x[i], y[i]); non-finite values break it. */
Prim *
lwp_add_line (Panel *pn, size_t n, const double *x, const double *y)
{
  Prim *p = lwp_prim_add (pn, PRIM_LINE, n);
  for (size_t i = 0; i < n; i++)
    {
      p->u[i] = isfinite (x[i]) ? mx (pn, x[i]) : NAN;
      p->v[i] = isfinite (y[i]) ? my (pn, y[i]) : NAN;
    }
  return p;
}

Prim *
lwp_add_segment (Panel *pn, double x0, double y0, double x1, double y1)
{
  double x[2] = { x0, x1 }, y[2] = { y0, y1 };
  return lwp_add_line (pn, 2, x, y);
}

Prim *
lwp_add_vline (Panel *pn, double x)
{
  Prim *p = lwp_prim_add (pn, PRIM_LINE, 2);
  p->u[0] = p->u[1] = mx (pn, x);
  p->v[0] = 0.0;
  p->v[1] = 1.0;
  return p;
}

Prim *
lwp_add_hline (Panel *pn, double y)
{
  Prim *p = lwp_prim_add (pn, PRIM_LINE, 2);
  p->u[0] = 0.0;
  p->u[1] = 1.0;
  p->v[0] = p->v[1] = my (pn, y);
  return p;
}

Prim *
lwp_add_mark (Panel *pn, double x, double y, MarkShape shape, double size)
{
  Prim *p = lwp_prim_add (pn, PRIM_MARK, 1);
  p->u[0] = mx (pn, x);
  p->v[0] = my (pn, y);
  p->shape = shape;
  p->size = size;
  return p;
}

/* Text at data (x, y), or at mapped (u, v) when x, y are NaN and u, v given. */
Prim *
lwp_add_text_uv (Panel *pn, double u, double v, const char *text, double dx, double dy, double ax,
                 double ay)
{
  Prim *p = lwp_prim_add (pn, PRIM_TEXT, 1);
  p->u[0] = u;
  p->v[0] = v;
  p->text = g_strdup (text);
  p->dx = dx;
  p->dy = dy;
  p->ax = ax;
  p->ay = ay;
  p->colour = COL_TEXT;
  p->plate = true;   /* every text on the background's colour: no grid line crosses it */
  return p;
}

Prim *
lwp_add_text (Panel *pn, double x, double y, const char *text, double dx, double dy, double ax,
              double ay)
{
  return lwp_add_text_uv (pn, mx (pn, x), my (pn, y), text, dx, dy, ax, ay);
}

Prim *
lwp_style_variant (Prim *p, size_t variant, double width)
{
  p->colour = COL_VARIANT;
  p->variant = variant;
  p->owner = (long) variant;
  p->width = width;
  return p;
}

/* A margin label of variant v at (x, y) in data units, offset (dx, dy) pixels, anchor (ax, ay):
 * the place it prefers; lwp_place_labels moves it off other labels. */
Prim *
lwp_margin_label (Panel *pn, double x, double y, const char *text, double dx, double dy, double ax,
                  double ay, size_t v)
{
  Prim *t = lwp_style_variant (lwp_add_text (pn, x, y, text, dx, dy, ax, ay), v, THIN_WIDTH);
  t->plate = true;
  t->label = true;
  return t;
}

void
lwp_choose_labels (const LwPlotCrossover *x, size_t n, double within, bool *label)
{
  double best = INFINITY;
  for (size_t i = 0; i < n; i++)
    {
      label[i] = false;
      if (isfinite (x[i].margin))
        best = fmin (best, fabs (x[i].margin));
    }
  for (int k = 0; k < MAX_LABELLED_CROSSOVERS; k++)
    {
      size_t pick = n;
      for (size_t i = 0; i < n; i++)
        if (!label[i] && isfinite (x[i].margin) && fabs (x[i].margin) <= best + within
            && (pick == n || fabs (x[i].margin) < fabs (x[pick].margin)))
          pick = i;
      if (pick == n)
        break;
      label[pick] = true;
    }
}

void
lwp_choose_margin_labels (const LwPlotFreqCurve *c, bool **pm, bool **gm)
{
  *pm = g_new0 (bool, c->n_gain_crossovers + 1);
  *gm = g_new0 (bool, c->n_phase_crossovers + 1);
  lwp_choose_labels (c->gain_crossovers, c->n_gain_crossovers, LABEL_WITHIN_PM_DEG, *pm);
  lwp_choose_labels (c->phase_crossovers, c->n_phase_crossovers, LABEL_WITHIN_GM_DB, *gm);
}

/* A curve of variant v made from the arrays src_x, src_y (tag tells apart curves made from
 * the same arrays), n points: copied from the figure being reused when it holds the same
 * curve of a variant with the same data key on equal axes, else NULL (map it then, and call
 * lwp_curve_mark). The caller's promise (lw-plot.h) makes a key and its arrays stand for the
 * values in them. */
Prim *
lwp_curve_reuse (LwPlot *pl, Panel *pn, size_t v, const void *src_x, const void *src_y, int tag,
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
          Prim *p = lwp_prim_add (pn, PRIM_LINE, n);
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

Prim *
lwp_curve_mark (LwPlot *pl, Prim *p, size_t v, const void *src_x, const void *src_y, int tag)
{
  p->key = pl->keys[v];
  p->src_x = src_x;
  p->src_y = src_y;
  p->tag = tag;
  return p;
}

/* lwp_add_line for a curve of variant v, from the reused figure when it can be
 * (lwp_curve_reuse). */
Prim *
lwp_add_curve (LwPlot *pl, Panel *pn, size_t v, size_t n, const double *x, const double *y)
{
  Prim *p = lwp_curve_reuse (pl, pn, v, x, y, 0, n);
  return p != NULL ? p : lwp_curve_mark (pl, lwp_add_line (pn, n, x, y), v, x, y, 0);
}

static void
panel_init (Panel *pn)
{
  memset (pn, 0, sizeof *pn);
  pn->prims = g_ptr_array_new_with_free_func (prim_free);
  pn->x_tick_labels = true;
}

/* ---- ranges ---------------------------------------------------------------------------- */

void
lwp_extent_add (Extent *e, double v)
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

/* Equal-aspect panels: widen the narrower range about its centre so the figure fills a plot
 * area of aspect EQUAL_ASPECT (width / height), the usual landscape shape. */
#define EQUAL_ASPECT 1.3
void
lwp_widen_to_aspect (Extent *ex, Extent *ey)
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

void
lwp_axis_from_extent (LwPlotAxis *a, LwPlotScale scale, LwPlotTickStyle style, Extent e,
                      int target_majors)
{
  double lo, hi;
  lw_plot_nice_range (scale, style, e.lo, e.hi, target_majors, &lo, &hi);
  lw_plot_axis_init (a, scale, style, lo, hi);
}

/* Takes the axes of in->axes_of when it shows the same view with as many panels (a figure
 * rebuilt during a drag keeps its frame, so what does not move stays where it was). */
bool
lwp_axes_kept (const LwPlot *pl, const LwPlotInput *in)
{
  const LwPlot *o = in->axes_of;
  return o != NULL && o->view == in->view && o->n_panels == pl->n_panels;
}

void
lwp_keep_axes (LwPlot *pl, const LwPlotInput *in)
{
  const LwPlot *o = in->axes_of;
  if (!lwp_axes_kept (pl, in))
    return;
  for (size_t k = 0; k < pl->n_panels; k++)
    {
      pl->panels[k].x = o->panels[k].x;
      pl->panels[k].y = o->panels[k].y;
    }
}

/* ---- Bode ------------------------------------------------------------------------------ */

void
lwp_format_margin (char *buf, size_t size, const char *what, double value, const char *unit)
{
  char num[32];
  snprintf (num, sizeof num, "%.1f", fabs (value));
  snprintf (buf, size, "%s %s%s%s", what, value < 0 ? "\u2212" : "", num, unit);
}

/* Odd multiples of 180° inside the axis: the −180° reference lines. */
void
lwp_add_phase_references (Panel *pn, const LwPlotAxis *a, bool vertical)
{
  for (int k = (int) floor ((a->lo - 180.0) / 360.0); k <= (int) ceil ((a->hi + 180.0) / 360.0);
       k++)
    {
      double v = 180.0 + 360.0 * k;
      if (v < a->lo || v > a->hi)
        continue;
      Prim *p = vertical ? lwp_add_vline (pn, v) : lwp_add_hline (pn, v);
      p->colour = COL_REF;
      p->width = 1.2;
    }
}

/* ---- construction ---------------------------------------------------------------------- */

LwPlot *
lw_plot_new (const LwPlotInput *in, GError **error)
{
  g_return_val_if_fail (in != NULL, NULL);
  if (in->n_variants == 0 || in->n_variants > LW_PLOT_MAX_VARIANTS || in->variants == NULL)
    {
      g_set_error (error, LW_PLOT_ERROR, LW_PLOT_ERROR_INPUT,
                   "a figure takes 1 to %d variants, not %zu", LW_PLOT_MAX_VARIANTS,
                   in->n_variants);
      return NULL;
    }
  const LwPlotViewInfo *info = lw_plot_view_info (in->view);
  if (info == NULL || !lwp_view_has_data (in))
    {
      g_set_error (error, LW_PLOT_ERROR, LW_PLOT_ERROR_INPUT, "nothing to draw for the view '%s'",
                   lw_plot_view_name (in->view));
      return NULL;
    }
  if ((info->needs & LW_PLOT_NEEDS_NYQUIST_RATE) && !(in->nyquist_rad_s > 0.0))
    {
      g_set_error (error, LW_PLOT_ERROR, LW_PLOT_ERROR_INPUT,
                   "the view '%s' needs the Nyquist frequency", info->name);
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
  lwp_view_builder (in->view) (pl, in);
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
  if (p->strings != NULL)
    g_ptr_array_unref (p->strings);
  g_free (p->title);
  g_free (p->clear);
  g_free (p);
}

const char *
lwp_label (LwPlot *pl, const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  char *text = g_strdup_vprintf (fmt, ap);
  va_end (ap);
  if (pl->strings == NULL)
    pl->strings = g_ptr_array_new_with_free_func (g_free);
  g_ptr_array_add (pl->strings, text);
  return text;
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

static bool
prim_equal (const Prim *a, const Prim *b)
{
  return a->kind == b->kind && a->colour == b->colour && a->variant == b->variant
         && a->owner == b->owner
         && a->dash == b->dash && a->width == b->width && a->alpha == b->alpha && a->n == b->n
         && a->shape == b->shape && a->size == b->size && a->dx == b->dx && a->dy == b->dy
         && a->ax == b->ax && a->ay == b->ay && a->plate == b->plate && a->arrows == b->arrows
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
    if (g_strcmp0 (a->names[v], b->names[v]) != 0 || a->styles[v] != b->styles[v]
        || g_strcmp0 (a->family_key, b->family_key) != 0)
      return false;
  for (size_t k = 0; k < a->n_panels; k++)
    {
      const Panel *pa = &a->panels[k], *pb = &b->panels[k];
      if (!axis_equal (&pa->x, &pb->x) || !axis_equal (&pa->y, &pb->y)
          || !axis_equal (&pa->xv, &pb->xv) || pa->wu0 != pb->wu0 || pa->wu1 != pb->wu1
          || g_strcmp0 (pa->x_label, pb->x_label) != 0 || g_strcmp0 (pa->y_label, pb->y_label) != 0)
        return false;
      guint i = 0, j = 0;
      for (;;)
        {
          while (i < pa->prims->len
                 && !lwp_prim_in_layer (pa->prims->pdata[i], LAYER_BASE, variant))
            i++;
          while (j < pb->prims->len
                 && !lwp_prim_in_layer (pb->prims->pdata[j], LAYER_BASE, variant))
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
  return lw_plot_view_has (p->view, LW_PLOT_VIEW_FREQUENCY_AXIS);
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
