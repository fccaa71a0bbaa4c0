/* lw-plot-labels.c — placing margin labels so that no text covers another.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-private.h"

#include <math.h>
#include <stdio.h>

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
  PangoLayout *lay = lwp_text_layout (p->text_cache, cr, text, FONT_NOTE);
  int iw, ih;
  pango_layout_get_size (lay, &iw, &ih);
  g_object_unref (lay);
  *w = (double) iw / PANGO_SCALE;
  *h = (double) ih / PANGO_SCALE;
}

/* Puts text q at the first free place of: where it prefers, mirrored about its anchor, then
 * a row down or up (one text height at a time, up to LABEL_ROWS rows each way), inside its
 * panel's plot area; with must_show, where it prefers (moved inside the plot area) when no
 * place is free. A text whose anchor is outside the plot area (a marker zoomed or scrolled
 * out of view, a crossing beyond the phase axis) is left out. Its box joins taken. */
#define LABEL_ROWS 8
static void
place_text (LwPlot *p, cairo_t *cr, const Panel *pn, Prim *q, GArray *taken, bool must_show)
{
  q->shown = false;
  q->moved = false;
  if (!isfinite (q->u[0]) || !isfinite (q->v[0]))
    return;
  double tw, th;
  text_size (p, cr, q->text, &tw, &th);
  double axp = px_of (pn, q->u[0]), ayp = py_of (pn, q->v[0]);
  const double edge = 0.5;   /* px: an anchor on the frame is inside */
  if (axp < pn->rx - edge || axp > pn->rx + pn->rw + edge || ayp < pn->ry - edge
      || ayp > pn->ry + pn->rh + edge)
    return;
  /* the preferred and the mirrored left edge; the preferred top edge */
  double xs[2] = { axp + q->dx - q->ax * tw, axp - q->dx - (1.0 - q->ax) * tw };
  double y0 = ayp + q->dy - q->ay * th;
  double ylo = pn->ry, yhi = pn->ry + pn->rh, xlo = pn->rx, xhi = pn->rx + pn->rw;
  for (int row = 0; row <= 2 * LABEL_ROWS; row++)
    {
      /* rows 0, +1, −1, +2, −2, … */
      double dy = (double) ((row + 1) / 2) * (row % 2 == 1 ? 1.0 : -1.0) * (th + 1.0);
      for (int side = 0; side < 2; side++)
        {
          double x = xs[side], y = y0 + dy;
          Box b = text_box (x, y, tw, th);
          if (b.x0 < xlo || b.x1 > xhi || y < ylo || y + th > yhi || !box_free (&b, taken))
            continue;
          q->lx = x;
          q->ly = y;
          q->lw = tw;
          q->lh = th;
          q->shown = true;
          q->moved = row > 0;
          g_array_append_val (taken, b);
          return;
        }
    }
  if (must_show)
    {
      q->lx = fmin (fmax (xs[0], xlo + 2.0), fmax (xhi - tw - 2.0, xlo + 2.0));
      q->ly = fmin (fmax (y0, ylo), fmax (yhi - th, ylo));
      q->lw = tw;
      q->lh = th;
      q->shown = true;
      Box b = text_box (q->lx, q->ly, tw, th);
      g_array_append_val (taken, b);
    }
}

/* Where the texts go, panel by panel, for the layout just made, so that none covers another:
 * first the places kept clear (lw_plot_set_keep_clear: the drag handles), then the texts that
 * belong to no variant (reference levels, the Nyquist frequency: in the base layer, so their
 * places must not depend on a variant), then the margin labels of variant `first`,
 * then those of the others in order. A label of `first` that finds no free place stays where
 * it prefers; another variant's is left out (its figures are in the metrics table and the
 * report). */
void
lwp_place_labels (LwPlot *p, cairo_t *cr, size_t first)
{
  GArray *taken = g_array_new (FALSE, FALSE, sizeof (Box));
  for (size_t k = 0; k < p->n_panels; k++)
    {
      Panel *pn = &p->panels[k];
      g_array_set_size (taken, 0);
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
      for (guint i = 0; i < pn->prims->len; i++)
        {
          Prim *q = pn->prims->pdata[i];
          if (q->kind == PRIM_TEXT && !q->label && !q->optional)
            place_text (p, cr, pn, q, taken, true);
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
      for (guint i = 0; i < pn->prims->len; i++)
        {
          Prim *q = pn->prims->pdata[i];
          if (q->kind == PRIM_TEXT && q->optional)
            place_text (p, cr, pn, q, taken, false);
        }
    }
  g_array_free (taken, TRUE);
  /* LW_DEBUG_TEXT=1: each text drawn in a plot area with its box and the area's, in the
   * figure's units, for the label gallery test (tests/plot/test-label-gallery.py) */
  if (g_strcmp0 (g_getenv ("LW_DEBUG_TEXT"), "1") == 0)
    for (size_t k = 0; k < p->n_panels; k++)
      {
        const Panel *pn = &p->panels[k];
        for (guint i = 0; i < pn->prims->len; i++)
          {
            const Prim *q = pn->prims->pdata[i];
            if (q->kind == PRIM_TEXT && q->shown)
              fprintf (stderr, "LW-TEXT panel=%zu box=%.2f,%.2f,%.2f,%.2f area=%.2f,%.2f,%.2f,%.2f "
                       "text=%s\n", k, q->lx, q->ly, q->lx + q->lw, q->ly + q->lh, pn->rx,
                       pn->ry, pn->rx + pn->rw, pn->ry + pn->rh, q->text);
          }
      }
}
