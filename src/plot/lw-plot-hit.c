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
      cairo_new_path (cr);
      cairo_arc (cr, x, y, h->active ? 7.0 : 5.5, 0, 2 * G_PI);
      lwp_set_rgb (cr, t->bg, 1.0);
      cairo_fill_preserve (cr);
      lwp_set_rgb (cr, t->text, 1.0);
      cairo_set_line_width (cr, h->active ? 2.0 : 1.3);
      cairo_stroke (cr);
    }
  size_t k;
  double vx, vy;
  if (ov->has_hover && lw_plot_value_at_pixel (p, ov->hover_x, ov->hover_y, &k, &vx, &vy))
    {
      const Panel *pn = &p->panels[k];
      lwp_set_rgb (cr, t->ref, 0.8);
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
      lwp_draw_text (p->text_cache, cr, buf, FONT_NOTE, ov->hover_x + (right_half ? -8 : 8),
                 ov->hover_y - 6,
                 right_half ? 1.0 : 0.0, 1.0, t->text, t->bg, 0);
    }
  cairo_restore (cr);
}

