/* lw-plot-family.c — a plant family's members drawn under a variant's curves: thin, light,
 * in the variant's colour; the member of the worst phase margin dashed and labelled
 * (lw-plot.h, LwPlotFamily; docs/plot.md).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-private.h"

#include <math.h>
#include <stdint.h>
#include <stdio.h>

size_t
lwp_family_key (LwPlot *pl, const LwPlotInput *in)
{
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotFamily *f = in->variants[v].family;
      if (f == NULL || f->n == 0)
        continue;
      pl->family_key = lwp_label (pl, "family (%zu members)", f->n_members);
      pl->family_style = pl->styles[v];
      return v;
    }
  return SIZE_MAX;
}

Prim *
lwp_family_line (Panel *pn, size_t v, size_t n, const double *x, const double *y, bool worst)
{
  Prim *p = lwp_style_variant (lwp_add_line (pn, n, x, y), v,
                               worst ? FAMILY_WORST_WIDTH : FAMILY_WIDTH);
  p->alpha = worst ? FAMILY_WORST_ALPHA : FAMILY_ALPHA;
  p->dash = worst ? DASH_DASHED : DASH_SOLID;
  return p;
}

Prim *
lwp_family_band (Panel *pn, size_t v, size_t n, const double *x, const double *lo,
                 const double *hi)
{
  /* each run of covered points: along hi forward, back along lo, then a NaN */
  size_t m = 0;
  double *u = g_new (double, 3 * n + 1), *w = g_new (double, 3 * n + 1);
  for (size_t i = 0; i < n;)
    {
      size_t a = i;
      while (a < n && !(isfinite (x[a]) && isfinite (lo[a]) && isfinite (hi[a])))
        a++;
      size_t b = a;
      while (b < n && isfinite (x[b]) && isfinite (lo[b]) && isfinite (hi[b]))
        b++;
      if (b - a >= 2)
        {
          for (size_t k = a; k < b; k++, m++)
            u[m] = x[k], w[m] = hi[k];
          for (size_t k = b; k-- > a; m++)
            u[m] = x[k], w[m] = lo[k];
          u[m] = w[m] = NAN;
          m++;
        }
      i = b > a ? b : a + 1;
    }
  Prim *p = NULL;
  if (m > 0)
    {
      p = lwp_add_line (pn, m, u, w);   /* mapped as a line's points are, then filled */
      p->kind = PRIM_AREA;
      lwp_style_variant (p, v, 0.0);
      p->alpha = FAMILY_BAND_ALPHA;
    }
  g_free (u);
  g_free (w);
  return p;
}

void
lwp_family_worst_label (Panel *pn, size_t v, double x, double y, double pm_deg)
{
  if (!isfinite (x) || !isfinite (y))
    return;
  char buf[48];
  if (isfinite (pm_deg))
    lwp_format_margin (buf, sizeof buf, "worst PM", pm_deg, "\u00b0");
  else
    snprintf (buf, sizeof buf, "worst PM");
  /* a small ring where the worst member crosses, the label placed with the margin labels,
   * off the others (with a leader line when moved far) */
  lwp_style_variant (lwp_add_mark (pn, x, y, MARK_CIRCLE, 6), v, 1.0);
  lwp_margin_label (pn, x, y, buf, 6, 4, 0.0, 0.0, v);
}
