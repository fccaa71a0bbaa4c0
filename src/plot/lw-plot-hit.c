/* lw-plot-hit.c — panels, pixels and axis values (hit tests), and the overlay of handles and
 * the read-out.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-private.h"

#include <math.h>
#include <stdio.h>

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

/* The value of variant v's curve in panel pn at u (its axis fraction), from the curve drawn
 * at the curve width: the first segment that spans u, interpolated in the mapped
 * coordinates (linear in what the axis shows, so log frequency and dB); NAN where the
 * curve does not reach u. Only for views whose curves are functions of the abscissa. */
static double
curve_value_at (const LwPlot *p, const Panel *pn, size_t v, double u)
{
  if (p->view != LW_PLOT_VIEW_BODE_Z && p->view != LW_PLOT_VIEW_BODE_W
      && p->view != LW_PLOT_VIEW_SENSITIVITY && p->view != LW_PLOT_VIEW_STEP
      && p->view != LW_PLOT_VIEW_DISTURBANCE)
    return NAN;
  for (guint i = 0; i < pn->prims->len; i++)
    {
      const Prim *q = pn->prims->pdata[i];
      if (q->kind != PRIM_LINE || q->variant != v || q->colour != COL_VARIANT
          || q->width != LW_PLOT_CURVE_WIDTH || q->n < 2)
        continue;
      for (size_t k = 0; k + 1 < q->n; k++)
        {
          double u0 = q->u[k], u1 = q->u[k + 1];
          if (!isfinite (u0) || !isfinite (u1) || !isfinite (q->v[k]) || !isfinite (q->v[k + 1]))
            continue;
          if ((u0 <= u && u <= u1) || (u1 <= u && u <= u0))
            {
              double t = u1 != u0 ? (u - u0) / (u1 - u0) : 1.0;
              return lw_plot_axis_unmap (&pn->y, q->v[k] + t * (q->v[k + 1] - q->v[k]));
            }
        }
    }
  return NAN;
}

/* What the read-out shows for ov's pointer: the panel *k it is over, the abscissa *vx and
 * the value *vy — the curve's at that abscissa where the view's curves are functions of it
 * (*on_curve true), else the pointer's height; the text into buf. False when there is no
 * hover or it is off every panel. */
static bool
readout_at (const LwPlot *p, const LwPlotOverlay *ov, size_t *k, double *vx, double *vy,
            bool *on_curve, char *buf, size_t size)
{
  if (p == NULL || ov == NULL || !ov->has_hover
      || !lw_plot_value_at_pixel (p, ov->hover_x, ov->hover_y, k, vx, vy))
    return false;
  const Panel *pn = &p->panels[*k];
  double u = pn->wu0 + (ov->hover_x - pn->rx) / pn->rw * (pn->wu1 - pn->wu0);
  double cv = curve_value_at (p, pn, ov->readout_variant < p->n_variants
                                     ? ov->readout_variant : 0, u);
  *on_curve = isfinite (cv);
  if (*on_curve)
    *vy = cv;
  snprintf (buf, size, "%s %.4g %s   %s %.4g %s", pn->x_name ? pn->x_name : "x", *vx,
            pn->x_unit ? pn->x_unit : "", pn->y_name ? pn->y_name : "y", *vy,
            pn->y_unit ? pn->y_unit : "");
  return true;
}

bool
lw_plot_readout (const LwPlot *p, const LwPlotOverlay *ov, char *buf, size_t size)
{
  size_t k;
  double vx, vy;
  bool on_curve;
  return readout_at (p, ov, &k, &vx, &vy, &on_curve, buf, size);
}

void
lw_plot_draw_overlay (LwPlot *p, cairo_t *cr, const LwPlotOverlay *ov)
{
  g_return_if_fail (p != NULL && cr != NULL && ov != NULL);
  if (!p->laid_out)
    return;
  const Theme *t = lwp_theme_of (p);
  cairo_save (cr);
  for (size_t i = 0; i < ov->n_handles; i++)
    {
      const LwPlotHandle *h = &ov->handles[i];
      double x, y;
      if (!lw_plot_pixel_of_value (p, (size_t) h->panel, h->x, h->y, &x, &y))
        continue;
      /* an upright grip, like a slider's thumb (a corner moves along the frequency axis):
       * a capsule with a groove down its middle; the active one solid, the groove cut out */
      double hw = h->active ? 5.0 : 4.0, hh = h->active ? 9.0 : 7.5;
      cairo_new_path (cr);
      cairo_arc (cr, x, y - hh + hw, hw, G_PI, 2 * G_PI);
      cairo_arc (cr, x, y + hh - hw, hw, 0, G_PI);
      cairo_close_path (cr);
      lwp_set_rgb (cr, h->active ? t->text : t->bg, 1.0);
      cairo_fill_preserve (cr);
      lwp_set_rgb (cr, t->text, 1.0);
      cairo_set_line_width (cr, 1.3);
      cairo_stroke (cr);
      lwp_set_rgb (cr, h->active ? t->bg : t->text, 1.0);
      cairo_set_line_width (cr, 1.2);
      cairo_move_to (cr, x, y - hh + 3.0);
      cairo_line_to (cr, x, y + hh - 3.0);
      cairo_stroke (cr);
    }
  size_t k;
  double vx, vy, cx, cy;
  bool on_curve;
  char buf[128];
  if (readout_at (p, ov, &k, &vx, &vy, &on_curve, buf, sizeof buf))
    {
      const Panel *pn = &p->panels[k];
      lwp_set_rgb (cr, t->ref, 0.8);
      cairo_set_line_width (cr, 0.8);
      cairo_move_to (cr, ov->hover_x, pn->ry);
      cairo_line_to (cr, ov->hover_x, pn->ry + pn->rh);
      cairo_move_to (cr, pn->rx, ov->hover_y);
      cairo_line_to (cr, pn->rx + pn->rw, ov->hover_y);
      cairo_stroke (cr);
      /* the point of the curve read, when the read-out is the curve's */
      if (on_curve && lw_plot_pixel_of_value (p, k, vx, vy, &cx, &cy) && cy >= pn->ry
          && cy <= pn->ry + pn->rh)
        {
          cairo_new_path (cr);
          cairo_arc (cr, ov->hover_x, cy, 3.5, 0, 2 * G_PI);
          cairo_stroke (cr);
        }
      /* beside the pointer, on the side with room, and off the margin labels: of the four
       * corners around the pointer the first whose box covers no label shown */
      PangoLayout *lay = lwp_text_layout (p->text_cache, cr, buf, FONT_NOTE);
      int iw, ih;
      pango_layout_get_size (lay, &iw, &ih);
      g_object_unref (lay);
      double tw = (double) iw / PANGO_SCALE, th = (double) ih / PANGO_SCALE;
      bool right_half = ov->hover_x > pn->rx + 0.5 * pn->rw;
      double bx = 0.0, by = 0.0;
      for (int c = 0; c < 4; c++)
        {
          bool left = (c % 2 == 0) == right_half;   /* the side with room first */
          bool above = c < 2;
          bx = left ? ov->hover_x - 8 - tw : ov->hover_x + 8;
          by = above ? ov->hover_y - 6 - th : ov->hover_y + 6;
          bool clear = true;
          for (guint i = 0; i < pn->prims->len && clear; i++)
            {
              const Prim *q = pn->prims->pdata[i];
              if (q->kind == PRIM_TEXT && q->label && q->shown)
                clear = !(bx < q->lx + q->lw && q->lx < bx + tw && by < q->ly + q->lh
                          && q->ly < by + th);
            }
          if (clear)
            break;
          if (c == 3)   /* nowhere clear: where it goes by default */
            {
              bx = right_half ? ov->hover_x - 8 - tw : ov->hover_x + 8;
              by = ov->hover_y - 6 - th;
            }
        }
      lwp_draw_text (p->text_cache, cr, buf, FONT_NOTE, bx, by, 0.0, 0.0, t->text, t->bg, 0);
    }
  cairo_restore (cr);
}

