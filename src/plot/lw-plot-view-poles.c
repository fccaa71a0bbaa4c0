/* lw-plot-view-poles.c — the pole-zero map in z: closed-loop poles, the loop's poles and
 * zeros, the unit circle.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-private.h"

#include <math.h>
#include <stdio.h>

#include <glib.h>

/* Roots that coincide on the map (closer than a 300th of the axis span: one marker over the
 * other) are counted, and a group of more than one is labelled "×N" beside it — six poles at
 * z = 0 from a dead time of six samples show as one marker with "×6". Each set (zeros, loop
 * poles, closed-loop poles) is counted on its own; groups by grid cells of that size (O(n)). */
static void
label_multiplicities (Panel *pn, size_t v, size_t n, const double *re, const double *im,
                      double dy)
{
  if (n < 2)
    return;
  double cell = fmax (pn->x.hi - pn->x.lo, pn->y.hi - pn->y.lo) / 300.0;
  if (!(cell > 0.0))
    return;
  typedef struct { size_t count, first; } Group;
  GHashTable *groups = g_hash_table_new_full (g_str_hash, g_str_equal, g_free, g_free);
  GPtrArray *order = g_ptr_array_new ();   /* the groups as first met: a fixed drawing order */
  for (size_t i = 0; i < n; i++)
    {
      if (re[i] < pn->x.lo || re[i] > pn->x.hi || im[i] < pn->y.lo || im[i] > pn->y.hi)
        continue;   /* off the map: no label */
      char key[64];
      snprintf (key, sizeof key, "%.0f:%.0f", floor (re[i] / cell + 0.5),
                floor (im[i] / cell + 0.5));
      Group *g = g_hash_table_lookup (groups, key);
      if (g == NULL)
        {
          g = g_new0 (Group, 1);
          g->first = i;
          g_hash_table_insert (groups, g_strdup (key), g);
          g_ptr_array_add (order, g);
        }
      g->count++;
    }
  for (guint k = 0; k < order->len; k++)
    {
      const Group *g = g_ptr_array_index (order, k);
      if (g->count < 2)
        continue;
      char buf[32];
      snprintf (buf, sizeof buf, "\u00d7%zu", g->count);
      lwp_style_variant (lwp_add_text (pn, re[g->first], im[g->first], buf, 7, dy, 0.0, 0.5), v,
                         1.0);
    }
  g_ptr_array_free (order, TRUE);
  g_hash_table_destroy (groups);
}

/* The marks of every variant's roots in panel pn (those off its axes are clipped), with their
 * multiplicity counts. */
static void
add_roots (Panel *pn, const LwPlotInput *in)
{
  /* a plant family's members' closed-loop poles: small light dots, under every variant's
   * marks (lwp_family_key has set the key) */
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotFamily *fam = in->variants[v].family;
      if (fam == NULL || fam->poles == NULL || fam->n == 0)
        continue;
      for (size_t i = 0; i < fam->n; i++)
        for (size_t k = 0; k < fam->poles[i].n_closed_loop; k++)
          {
            Prim *p = lwp_style_variant (lwp_add_mark (pn, fam->poles[i].cl_re[k],
                                                       fam->poles[i].cl_im[k], MARK_DISC, 3),
                                         v, 1.0);
            p->alpha = 2.0 * FAMILY_ALPHA;
          }
      break;   /* one variant's family */
    }
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotPoleData *d = &in->variants[v].poles;
      for (size_t i = 0; i < d->n_loop_zeros; i++)
        lwp_style_variant (lwp_add_mark (pn, d->zero_re[i], d->zero_im[i], MARK_CIRCLE, 8), v, 1.2);
      for (size_t i = 0; i < d->n_loop_poles; i++)
        lwp_style_variant (lwp_add_mark (pn, d->pole_re[i], d->pole_im[i], MARK_CROSS, 8), v, 1.2);
      for (size_t i = 0; i < d->n_closed_loop; i++)
        lwp_style_variant (lwp_add_mark (pn, d->cl_re[i], d->cl_im[i], MARK_DIAMOND, 9), v, 1.5)
          ->shape = MARK_DIAMOND;
      /* the count of coincident roots, beside them (zeros above, poles level, closed-loop
       * poles below, so the three counts of one place do not cover each other) */
      label_multiplicities (pn, v, d->n_loop_zeros, d->zero_re, d->zero_im, -9);
      label_multiplicities (pn, v, d->n_loop_poles, d->pole_re, d->pole_im, 0);
      label_multiplicities (pn, v, d->n_closed_loop, d->cl_re, d->cl_im, 9);
    }
}

/* The cluster of roots near z = 1 (slow poles and zeros, integrators, lags) that the map
 * cannot tell apart: of the roots within INSET_REACH of z = 1, those with another root
 * closer than INSET_CROWD of the map's span (a few pixels on a pane; coincident roots are
 * counted by "×N" instead and do not count). Returns the largest |z − 1| of them when there
 * are two or more, else 0. Common practice, no source: marks closer than about 1 % of the
 * map cannot be read apart. */
#define INSET_REACH 0.1
#define INSET_CROWD 0.01
static double
cluster_near_one (const LwPlotInput *in, double map_span)
{
  GArray *re = g_array_new (FALSE, FALSE, sizeof (double));
  GArray *im = g_array_new (FALSE, FALSE, sizeof (double));
  for (size_t v = 0; v < in->n_variants; v++)
    {
      const LwPlotPoleData *d = &in->variants[v].poles;
      const double *rs[3] = { d->cl_re, d->pole_re, d->zero_re };
      const double *is[3] = { d->cl_im, d->pole_im, d->zero_im };
      size_t n[3] = { d->n_closed_loop, d->n_loop_poles, d->n_loop_zeros };
      for (int s = 0; s < 3; s++)
        for (size_t i = 0; i < n[s] && re->len < 4096; i++)
          if (hypot (rs[s][i] - 1.0, is[s][i]) <= INSET_REACH)
            {
              g_array_append_val (re, rs[s][i]);
              g_array_append_val (im, is[s][i]);
            }
    }
  size_t crowded = 0;
  double reach = 0.0;
  for (guint i = 0; i < re->len; i++)
    {
      double xi = g_array_index (re, double, i), yi = g_array_index (im, double, i);
      bool close = false;
      for (guint j = 0; j < re->len && !close; j++)
        {
          double dd = hypot (xi - g_array_index (re, double, j), yi - g_array_index (im, double, j));
          close = j != i && dd > 1e-12 && dd < INSET_CROWD * map_span;
        }
      if (close)
        {
          crowded++;
          reach = fmax (reach, hypot (xi - 1.0, yi));
        }
    }
  g_array_free (re, TRUE);
  g_array_free (im, TRUE);
  return crowded >= 2 && reach > 1e-12 ? reach : 0.0;
}

/* One guide: the locus z = exp(sT) of s = ωn(−ζ ± j√(1 − ζ²)) as `t` runs over [0, 1] with
 * ζ = zeta (t) and ωn·T = wnt (t), in the upper and (mirrored) lower half, dotted. */
static void
add_locus (Panel *pn, double (*zeta) (double t, double k), double (*wnt) (double t, double k),
           double k)
{
  enum { N = 48 };
  double x[N], y[N], ym[N];
  for (int i = 0; i < N; i++)
    {
      double t = (double) i / (N - 1), z = zeta (t, k), w = wnt (t, k);
      double wd = sqrt (fmax (1.0 - z * z, 0.0)), r = exp (-z * w);
      x[i] = r * cos (w * wd);
      y[i] = r * sin (w * wd);
      ym[i] = -y[i];
    }
  for (int h = 0; h < 2; h++)
    {
      Prim *g = lwp_add_line (pn, N, x, h == 0 ? y : ym);
      g->colour = COL_REF;
      g->width = 0.7;
      g->dash = DASH_DOTTED;
    }
}

/* constant damping ζ = k: ωn·T from 0 to where the locus meets the negative real axis */
static double zeta_fixed (double t, double k) { (void) t; return k; }
static double wnt_to_axis (double t, double k) { return t * G_PI / sqrt (1.0 - k * k); }
/* constant natural frequency ωn·T = k: ζ from 0 to 1 */
static double zeta_ramp (double t, double k) { (void) k; return t; }
static double wnt_fixed (double t, double k) { (void) t; return k; }

/* Guides of z-plane practice, dotted: the loci of constant damping ζ = 0.2 … 0.8 and of
 * constant natural frequency ωn·T = π/5 … 4π/5. */
static void
add_guides (Panel *pn)
{
  for (int k = 1; k <= 4; k++)
    add_locus (pn, zeta_fixed, wnt_to_axis, 0.2 * k);
  for (int k = 1; k <= 4; k++)
    add_locus (pn, zeta_ramp, wnt_fixed, G_PI * k / 5.0);
}

void
lwp_build_poles (LwPlot *pl, const LwPlotInput *in)
{
  Panel *pn = &pl->panels[0];
  pl->n_panels = 1;
  pn->equal_aspect = true;
  lwp_family_key (pl, in);   /* a plant family's members' poles are drawn: its key */
  Extent ex = { 0 }, ey = { 0 };
  lwp_extent_add (&ex, -1.2);
  lwp_extent_add (&ex, 1.2);
  lwp_extent_add (&ey, -1.2);
  lwp_extent_add (&ey, 1.2);
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
              lwp_extent_add (&ex, re[s][i]);
              lwp_extent_add (&ey, im[s][i]);
            }
    }
  lwp_widen_to_aspect (&ex, &ey);
  lwp_axis_from_extent (&pn->x, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ex, 6);
  lwp_axis_from_extent (&pn->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, ey, 6);
  /* a cluster near z = 1 too small to read on the map: a second panel beside it, zoomed */
  double reach = cluster_near_one (in, pn->x.hi - pn->x.lo);
  Panel *zoom = NULL;
  if (reach > 0.0)
    {
      zoom = &pl->panels[1];
      pl->n_panels = 2;
      pl->side_by_side = true;
      zoom->equal_aspect = true;
      Extent zx = { 0 }, zy = { 0 };
      lwp_extent_add (&zx, 1.0 - 1.3 * reach);
      lwp_extent_add (&zx, 1.0 + 1.3 * reach);
      lwp_extent_add (&zy, -1.3 * reach);
      lwp_extent_add (&zy, 1.3 * reach);
      lwp_axis_from_extent (&zoom->x, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, zx, 4);
      lwp_axis_from_extent (&zoom->y, LW_PLOT_SCALE_LINEAR, LW_PLOT_TICKS_PLAIN, zy, 4);
      /* the same scale on both axes: the larger half-width for both, centred on z = 1 */
      double h = fmax (fmax (1.0 - zoom->x.lo, zoom->x.hi - 1.0), fmax (-zoom->y.lo, zoom->y.hi));
      zoom->x.lo = 1.0 - h;
      zoom->x.hi = 1.0 + h;
      zoom->y.lo = -h;
      zoom->y.hi = h;
    }
  lwp_keep_axes (pl, in);
  pn->x_label = "Re z";
  pn->y_label = "Im z";
  pn->x_name = "Re";
  pn->y_name = "Im";
  pn->x_unit = pn->y_unit = "";
  lwp_add_hline (pn, 0.0);
  lwp_add_vline (pn, 0.0);
  add_guides (pn);
  Prim *uc = lwp_prim_add (pn, PRIM_CIRCLE, 1);
  uc->u[0] = mx (pn, 0.0);
  uc->v[0] = my (pn, 0.0);
  uc->r_units = 1.0;
  uc->width = 1.4;
  lwp_add_text (pn, 0.7071, 0.7071, "|z| = 1", 4, -2, 0.0, 1.0)->colour = COL_REF;
  add_roots (pn, in);
  if (zoom != NULL)
    {
      zoom->x_label = "Re z, near z = 1";
      zoom->x_name = "Re";
      zoom->y_name = "Im";
      zoom->x_unit = zoom->y_unit = "";
      lwp_add_hline (zoom, 0.0);
      /* the unit circle near z = 1, as a line (an arc of radius 1 would be huge in pixels) */
      enum { N = 65 };
      double cx[N], cy[N], span = fmin (2.0 * (zoom->x.hi - zoom->x.lo), 1.0);
      for (int i = 0; i < N; i++)
        {
          double a = span * ((double) i / (N - 1) - 0.5);
          cx[i] = cos (a);
          cy[i] = sin (a);
        }
      lwp_add_line (zoom, N, cx, cy)->width = 1.4;
      add_roots (zoom, in);
      /* where the zoom is, on the map: its frame */
      double bx[5] = { zoom->x.lo, zoom->x.hi, zoom->x.hi, zoom->x.lo, zoom->x.lo };
      double by[5] = { zoom->y.lo, zoom->y.lo, zoom->y.hi, zoom->y.hi, zoom->y.lo };
      Prim *f = lwp_add_line (pn, 5, bx, by);
      f->colour = COL_REF;
      f->width = 1.0;
    }
  /* the marker shapes explained in the legend rows above the panels, where they cover
   * nothing at any size (inside the map they covered a third of it below ~420 px) */
  lwp_add_key (pl, MARK_DIAMOND, "closed-loop pole");
  lwp_add_key (pl, MARK_CROSS, "loop pole");
  lwp_add_key (pl, MARK_CIRCLE, "loop zero");
}
