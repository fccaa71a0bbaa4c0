/* lw-plot-polyline.c — a curve of many points drawn at the cost of the plot's width (the
 * window's figures, lw_plot_set_decimate): per pixel column the points that shape it, then
 * the vertices a straight segment passes within a fifth of a pixel left out.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-private.h"

#include <math.h>

/* A pen that leaves out the vertices a straight segment would pass within PEN_TOLERANCE px of:
 * a point is held until the next one shows whether the segment from the last vertex still
 * passes all the held ones; at most PEN_HOLD held (a cap on the work per point). */
#define PEN_TOLERANCE 0.2
#define PEN_HOLD 48
typedef struct {
  cairo_t *cr;
  bool down;                /* a vertex has been put down */
  double ax, ay;            /* the last vertex */
  double hx[PEN_HOLD], hy[PEN_HOLD];
  int n;                    /* points held since the last vertex */
} Pen;

static bool
pen_passes (const Pen *pen, double x, double y)
{
  double dx = x - pen->ax, dy = y - pen->ay, l2 = dx * dx + dy * dy;
  for (int k = 0; k < pen->n; k++)
    {
      double ex = pen->hx[k] - pen->ax, ey = pen->hy[k] - pen->ay;
      double t = l2 > 0 ? (ex * dx + ey * dy) / l2 : 0;
      if (t < 0 || t > 1)
        return false;
      double cx = ex - t * dx, cy = ey - t * dy;
      if (cx * cx + cy * cy > PEN_TOLERANCE * PEN_TOLERANCE)
        return false;
    }
  return true;
}

static void
pen_vertex (Pen *pen, double x, double y)
{
  cairo_line_to (pen->cr, x, y);
  pen->ax = x;
  pen->ay = y;
  pen->n = 0;
}

static void
pen_to (Pen *pen, double x, double y)
{
  if (!pen->down)
    {
      cairo_move_to (pen->cr, x, y);
      pen->down = true;
      pen->ax = x;
      pen->ay = y;
      pen->n = 0;
      return;
    }
  if (pen->n > 0 && (pen->n == PEN_HOLD || !pen_passes (pen, x, y)))
    pen_vertex (pen, pen->hx[pen->n - 1], pen->hy[pen->n - 1]);
  pen->hx[pen->n] = x;
  pen->hy[pen->n] = y;
  pen->n++;
}

static void
pen_up (Pen *pen)
{
  if (pen->down && pen->n > 0)
    pen_vertex (pen, pen->hx[pen->n - 1], pen->hy[pen->n - 1]);
  pen->down = false;
}

/* A polyline with at most four vertices per pixel column (the first, lowest, highest and last
 * point of each run of consecutive points in one column, in their order along the curve), so
 * a curve of thousands of points costs about as much as the plot is wide; what is drawn stays
 * within the column of what the full polyline would cover. NaN breaks the line. */
void
lwp_polyline_decimated (const Panel *pn, cairo_t *cr, const Prim *q)
{
  bool open = false;
  double col = 0;
  size_t idx[4];
  double xs[4], ys[4];   /* first, min, max, last of the run */
  Pen pen = { .cr = cr };
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
              pen_to (&pen, xs[j], ys[j]);
            }
          open = false;
        }
      if (!ok)
        {
          pen_up (&pen);
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

void
lwp_points_path (const Panel *pn, cairo_t *cr, const Prim *q, bool closed)
{
  bool pen = false;
  cairo_new_path (cr);
  for (size_t i = 0; i < q->n; i++)
    {
      if (!isfinite (q->u[i]) || !isfinite (q->v[i]))
        {
          if (pen && closed)
            cairo_close_path (cr);
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
  if (pen && closed)
    cairo_close_path (cr);
}
