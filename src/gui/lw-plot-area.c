/* lw-plot-area.c — the grid of loop views.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>

#include <glib/gi18n.h>

#include "lw-plot-area-private.h"

LwPlotView lwpa_area_views[LW_PLOT_N_VIEWS];
guint lwpa_n_area_views;
LwPlotView lwpa_split_views[LW_PLOT_N_VIEWS];
guint lwpa_n_split_views;
guint lwpa_signals[LWPA_N_SIGNALS];

G_DEFINE_FINAL_TYPE (LwPlotArea, lw_plot_area, GTK_TYPE_WIDGET)


static const char *
view_title (LwPlotView v)
{
  return _(lw_plot_view_info (v)->title);
}

static void
detach (LwPlotArea *self, GtkWidget *p)
{
  if (gtk_widget_get_parent (p) != NULL)
    gtk_grid_remove (self->grid, p);
}

static int
split_row (LwPlotView v)
{
  for (guint k = 0; k < lwpa_n_split_views; k++)
    if (lwpa_split_views[k] == v)
      return (int) k;
  return -1;
}

void
lwpa_arrange (LwPlotArea *self)
{
  for (guint i = 0; i < lwpa_n_area_views; i++)
    g_object_ref (self->panes[i]), detach (self, GTK_WIDGET (self->panes[i]));
  for (guint k = 0; k < lwpa_n_split_views; k++)
    g_object_ref (self->split_panes[k]), detach (self, GTK_WIDGET (self->split_panes[k]));
  for (guint i = 0; i < lwpa_n_area_views; i++)
    {
      GtkWidget *p = GTK_WIDGET (self->panes[i]);
      if (self->split)
        {
          int row = split_row (self->views[i]);
          if (row >= 0)
            gtk_grid_attach (self->grid, p, 0, row, 1, 1);
        }
      else
        {
          int col = self->layout == LW_PLOT_LAYOUT_GRID ? (int) (i % 2) : 0;
          int row = self->layout == LW_PLOT_LAYOUT_GRID ? (int) (i / 2) : (int) i;
          gtk_grid_attach (self->grid, p, col, row, 1, 1);
        }
      g_object_unref (p);
    }
  for (guint k = 0; k < lwpa_n_split_views; k++)
    {
      if (self->split)
        gtk_grid_attach (self->grid, GTK_WIDGET (self->split_panes[k]), 1, (int) k, 1, 1);
      g_object_unref (self->split_panes[k]);
    }
  if (self->debug)
    {
      /* the views on the grid: VIEW:COLUMN:ROW, the split view's right column included */
      g_autoptr (GString) s = g_string_new ("LW-ARRANGE views=");
      for (GtkWidget *c = gtk_widget_get_first_child (GTK_WIDGET (self->grid)); c != NULL;
           c = gtk_widget_get_next_sibling (c))
        {
          int col, row;
          gtk_grid_query_child (self->grid, c, &col, &row, NULL, NULL);
          g_string_append_printf (s, "%s%s:%d:%d", s->str[s->len - 1] == '=' ? "" : ",",
                                  lw_plot_view_name (lw_plot_pane_get_view (LW_PLOT_PANE (c))),
                                  col, row);
        }
      puts (s->str);
      fflush (stdout);
    }
}

void
lw_plot_area_set_split (LwPlotArea *self, gboolean split)
{
  g_return_if_fail (LW_IS_PLOT_AREA (self));
  if (self->split == split)
    return;
  self->split = split;
  lwpa_arrange (self);
}

gboolean
lw_plot_area_get_split (LwPlotArea *self)
{
  g_return_val_if_fail (LW_IS_PLOT_AREA (self), FALSE);
  return self->split;
}

void
lw_plot_area_set_layout (LwPlotArea *self, LwPlotLayout layout)
{
  g_return_if_fail (LW_IS_PLOT_AREA (self));
  if (self->layout == layout)
    return;
  self->layout = layout;
  lwpa_arrange (self);
}

LwPlotLayout
lw_plot_area_get_layout (LwPlotArea *self)
{
  g_return_val_if_fail (LW_IS_PLOT_AREA (self), LW_PLOT_LAYOUT_GRID);
  return self->layout;
}

/* |L| in dB at frequency f on a curve (ascending frequencies), linear in log f between grid
 * points, the end value beyond the ends: where a handle sits on the drawn curve. */
static double
curve_db_at (const LwPlotFreqCurve *c, double f)
{
  if (c->n == 0)
    return 0.0;
  if (f <= c->freq_rad_s[0])
    return c->mag_db[0];
  if (f >= c->freq_rad_s[c->n - 1])
    return c->mag_db[c->n - 1];
  size_t lo = 0, hi = c->n - 1;
  while (hi - lo > 1)
    {
      size_t mid = (lo + hi) / 2;
      if (c->freq_rad_s[mid] <= f)
        lo = mid;
      else
        hi = mid;
    }
  double t = log (f / c->freq_rad_s[lo]) / log (c->freq_rad_s[hi] / c->freq_rad_s[lo]);
  return c->mag_db[lo] + t * (c->mag_db[hi] - c->mag_db[lo]);
}

void
lwpa_set_handles (LwPlotArea *self, LwVariantEval *eval, const LwFigureVariant *fv,
             const LwStage *stages, guint n_stages, double gain_pin_nu, int sel_stage,
             int sel_corner)
{
  double period_s = eval->period_s;
  double gain_nu = gain_pin_nu;
  /* the gain's grip sits at the crossover: the model's, or on data alone the data's */
  double crossover = eval->ev != NULL ? (eval->ev->margins.has_phase_margin
                                           ? eval->ev->margins.gain_crossover_rad_s : NAN)
                     : eval->measured != NULL ? eval->measured->margins.gain_crossover_rad_s
                                              : NAN;
  if (!(gain_nu > 0))
    gain_nu = isfinite (crossover) ? lw_warp_omega_to_nu (crossover, period_s)
                                   : (fv->v.w.n > 0 ? fv->v.w.freq_rad_s[fv->v.w.n / 2] : 1.0);

  for (guint k = 0; k < lwpa_n_area_views; k++)
    {
      LwPlotView view = self->views[k];
      if (!lw_plot_view_has (view, LW_PLOT_VIEW_HANDLES))
        continue;
      gboolean in_w = lw_plot_view_has (view, LW_PLOT_VIEW_W_PLANE);
      const LwPlotFreqCurve *curve = in_w ? &fv->v.w : &fv->v.z;
      g_autoptr (GArray) hs = g_array_new (FALSE, FALSE, sizeof (LwPaneHandle));
      for (guint i = 0; i < n_stages; i++)
        {
          const LwStage *st = &stages[i];
          if (!st->enabled)
            continue;
          if (st->kind == LW_STAGE_GAIN)
            {
              double f = in_w ? gain_nu : lw_warp_nu_to_omega (gain_nu, period_s);
              LwPaneHandle h = { .stage = i, .corner = -1, .x = f, .y = curve_db_at (curve, f) };
              g_array_append_val (hs, h);
              continue;
            }
          size_t nc = lw_stage_corner_count (st);
          for (size_t c = 0; c < nc; c++)
            {
              double nu;
              LwHandleKind kind;
              if (lw_stage_corner_get (st, c, &nu, &kind, NULL) != LW_OK)
                continue;
              double f = in_w ? nu : lw_warp_nu_to_omega (nu, period_s);
              LwPaneHandle h = { .stage = i, .corner = (int) c, .x = f,
                                 .y = curve_db_at (curve, f) };
              g_array_append_val (hs, h);
            }
        }
      lw_plot_pane_set_handles (self->panes[k], (const LwPaneHandle *) (void *) hs->data,
                                hs->len, sel_stage, sel_corner);
    }
}

void
lwpa_show_message (LwPlotArea *self, const char *msg)
{
  for (guint i = 0; i < lwpa_n_area_views; i++)
    {
      lw_plot_pane_set_plot (self->panes[i], NULL, msg);
      lw_plot_pane_set_handles (self->panes[i], NULL, 0, -1, -1);
    }
  for (guint k = 0; k < lwpa_n_split_views; k++)
    lw_plot_pane_set_plot (self->split_panes[k], NULL, msg);
}

static void
figure_entry_free (gpointer data)
{
  FigureEntry *e = data;
  lw_figure_variant_clear (&e->fv);
  if (e->has_measured)
    lw_figure_measured_clear (&e->measured);
  g_clear_pointer (&e->eval, lw_variant_eval_unref);
  g_clear_pointer (&e->name, g_free);
  g_free (e);
}

/* The figure data of eval named name: the kept one when this evaluation was shown last time,
 * else filled now (eval->sampled must be valid then). NULL with a message in err. */
const FigureEntry *
lwpa_figure_for (LwPlotArea *self, LwVariantEval *eval, const char *name, LwError *err)
{
  for (guint i = 0; i < self->figures->len; i++)
    {
      FigureEntry *e = self->figures->pdata[i];
      if (e->eval == eval && g_strcmp0 (e->name, name) == 0)
        {
          e->used = TRUE;
          return e;
        }
    }
  FigureEntry *e = g_new0 (FigureEntry, 1);
  e->eval = lw_variant_eval_ref (eval);
  e->name = g_strdup (name);
  e->used = TRUE;
  /* on measured data alone (no model) there are only the data's curves */
  if (eval->ev == NULL && eval->measured == NULL)
    {
      lw_error_set (err, LW_ERR_INVALID, -1, "no loop");
      figure_entry_free (e);
      return NULL;
    }
  if (eval->ev != NULL
      && lw_figure_variant_fill (&e->fv, NULL, eval->sampled, eval->ev, err) != LW_OK)
    {
      figure_entry_free (e);
      return NULL;
    }
  /* the step as simulated (with the variant's actuator limits) and u(kT) under it */
  if (eval->ev != NULL)
    lw_figure_variant_set_responses (&e->fv, eval->sim_ref, &eval->sim_options, eval->sim_in,
                                     eval->sim_out, eval->responses);
  e->fv.v.name = e->name;
  /* the entry's arrays do not change while it lives: a key of its own lets a figure rebuilt
   * during a drag copy this variant's mapped curves from the one before */
  e->fv.v.data_key = ++self->next_data_key;
  if (eval->measured != NULL)
    {
      lw_figure_measured_fill (&e->measured, eval->measured, eval->measured_kind,
                               eval->measured_coherence, eval->period_s);
      e->has_measured = TRUE;
    }
  g_ptr_array_add (self->figures, e);
  return e;
}

void
lwpa_drop_unused_figures (LwPlotArea *self)
{
  for (guint i = self->figures->len; i-- > 0;)
    {
      FigureEntry *e = self->figures->pdata[i];
      if (!e->used)
        g_ptr_array_remove_index (self->figures, i);
      else
        e->used = FALSE;
    }
}

/* The figure of one view of the given variants, without a legend of its own (the area's key
 * names them once for every view); axes_of: keep that figure's axes; title: NULL for the
 * view's own. */
LwPlot *
lwpa_build_view (LwPlotView view, const LwPlotVariant *vars, guint n, double nyquist_rad_s,
            const LwPlotRequirements *req, const LwVariantEval *units_of,
            const LwPlotArea *opts, const LwPlot *axes_of, const char *title, GError **error)
{
  LwPlotVariant unnamed[LW_PLOT_MAX_VARIANTS];
  n = MIN (n, LW_PLOT_MAX_VARIANTS);
  for (guint i = 0; i < n; i++)
    {
      unnamed[i] = vars[i];
      unnamed[i].name = NULL;
    }
  LwPlotInput in = {
    .view = view,
    .nyquist_rad_s = nyquist_rad_s,
    .title = title != NULL ? title : view_title (view),
    .n_variants = n,
    .variants = unnamed,
    .axes_of = axes_of,
    .input_unit = units_of->input_unit,
    .output_unit = units_of->output_unit,
    .phase_full_range = opts != NULL && opts->phase_mode == 1,
    .phase_wrapped = opts != NULL && opts->phase_mode == 2,
    .nyquist_compressed = opts != NULL && opts->nyquist_compressed,
  };
  if (req != NULL)
    in.req = *req;
  return lw_plot_new (&in, error);
}

void
lw_plot_area_show_variants (LwPlotArea *self, const LwAreaVariant *vs, guint n, guint active,
                            const LwPlotRequirements *req, const LwStage *stages,
                            guint n_stages, double gain_pin_nu_rad_s, int sel_stage,
                            int sel_corner, gboolean keep_axes)
{
  g_return_if_fail (LW_IS_PLOT_AREA (self));
  g_return_if_fail (n >= 1 && active < n && vs != NULL);

  LwVariantEval *eval = vs[active].eval;
  if (eval->ev == NULL && eval->failure == LW_EVAL_NO_MODEL && eval->measured != NULL)
    {
      lwpa_show_data_alone (self, vs, n, active, req, stages, n_stages, gain_pin_nu_rad_s,
                            sel_stage, sel_corner);
      return;
    }
  if (eval->ev == NULL)
    {
      g_autofree char *msg
        = eval->failure == LW_EVAL_FAILED_PLANT && eval->error_position == 0
            && g_str_has_prefix (eval->error->message, "empty")
            ? g_strdup (_("A new design: type the plant P(s) on the left (for example "
                          "5/(s*(s+2))) and its sample period, or open an example from the "
                          "menu."))
            : g_strdup_printf (_("No loop to draw: %s"), eval->error->message);
      lwpa_show_message (self, msg);
      return;
    }

  /* the variants drawn: the active one and every other that evaluates, at most the
   * renderer's limit; the active one keeps its place (its colour) in the list */
  LwPlotVariant vars[LW_PLOT_MAX_VARIANTS];
  guint nv = 0, moving = 0;
  const LwFigureVariant *active_fv = NULL;
  const LwPlotVariant *other = NULL;
  const LwPlotVariant *measured = NULL;   /* the data closed by the active variant's loop */
  for (guint i = 0; i < n && nv < LW_PLOT_MAX_VARIANTS; i++)
    {
      if (vs[i].eval == NULL || vs[i].eval->ev == NULL)
        continue;
      LwError err;
      const FigureEntry *entry = lwpa_figure_for (self, vs[i].eval, vs[i].name, &err);
      const LwFigureVariant *fv = entry != NULL ? &entry->fv : NULL;
      if (fv == NULL)
        {
          if (i != active)
            continue;
          g_autofree char *msg = g_strdup_printf (_("No loop to draw: %s"), err.message);
          lwpa_show_message (self, msg);
          lwpa_drop_unused_figures (self);
          return;
        }
      if (i == active)
        {
          active_fv = fv;
          moving = nv;
          measured = entry->has_measured ? &entry->measured.variant : NULL;
        }
      vars[nv] = fv->v;
      vars[nv].style = vs[i].style;
      vars[nv].family = vs[i].family;
      if (i != active && other == NULL)
        other = &vars[nv];
      nv++;
    }
  g_assert (active_fv != NULL);
  double nyq = G_PI / eval->ev->period_s;
  self->period_s = eval->ev->period_s;
  if (self->split && other != NULL)
    {
      /* the split view shows two: the active variant and the first other one */
      LwPlotVariant two[2] = { vars[moving], *other };
      lwpa_set_key (self, two, 2, 0);
    }
  else
    {
      LwPlotVariant with[LW_PLOT_MAX_VARIANTS];
      lwpa_set_key (self, with, lwpa_with_measured (vars, nv, measured, -1, with), moving);
    }

  for (guint i = 0; i < lwpa_n_area_views; i++)
    {
      g_autoptr (GError) error = NULL;
      LwPlotPane *pane = self->panes[i];
      gboolean split_row_view = self->split && split_row (self->views[i]) >= 0;
      /* the split view's left column shows the active variant alone */
      LwPlotVariant with[LW_PLOT_MAX_VARIANTS];
      const LwPlotVariant *pv = split_row_view ? &vars[moving] : with;
      guint pn = split_row_view ? 1 : lwpa_with_measured (vars, nv, measured,
                                                          (int) self->views[i], with);
      g_autofree char *title = split_row_view && vars[moving].name != NULL
                               ? g_strdup_printf ("%s \u2014 %s", view_title (self->views[i]),
                                                  vars[moving].name)
                               : NULL;
      /* the split view's two columns share axes chosen from both variants' data, so neither
       * curve runs off the other's frame (a figure of both, only for its axes) */
      LwPlot *both = NULL;
      if (split_row_view && other != NULL && !keep_axes)
        {
          LwPlotVariant two[2] = { vars[moving], *other };
          both = lwpa_build_view (self->views[i], two, 2, nyq, req, eval, self, NULL, NULL, NULL);
        }
      LwPlot *plot = lwpa_build_view (self->views[i], pv, pn, nyq, req, eval, self,
                                 keep_axes ? lw_plot_pane_get_plot (pane) : both, title, &error);
      g_clear_pointer (&both, lw_plot_free);
      lw_plot_pane_set_plot_moving (pane, plot, plot == NULL ? error->message : NULL,
                                    split_row_view ? 0 : (int) moving);
      if (self->debug)
        {
          printf ("LW-SERIES view=%s variants=%u moving=%u\n",
                  lw_plot_view_name (self->views[i]), pn, split_row_view ? 0 : moving);
          fflush (stdout);
        }
    }
  for (guint k = 0; k < lwpa_n_split_views && self->split; k++)
    {
      g_autoptr (GError) error = NULL;
      LwPlotPane *left = lw_plot_area_get_pane (self, lwpa_split_views[k]);
      LwPlot *plot = NULL;
      if (other != NULL)
        /* the same axes as the left column, so the two can be read side by side */
        {
          g_autofree char *title = other->name != NULL
                                   ? g_strdup_printf ("%s \u2014 %s", view_title (lwpa_split_views[k]),
                                                      other->name)
                                   : NULL;
          plot = lwpa_build_view (lwpa_split_views[k], other, 1, nyq, req, eval, self,
                             lw_plot_pane_get_plot (left),
                             title, &error);
        }
      /* a reference: its whole figure is static */
      lw_plot_pane_set_plot_moving (self->split_panes[k], plot,
                                    plot != NULL ? NULL
                                    : error != NULL ? error->message
                                    : _("Choose a second variant to compare for the split view."),
                                    -1);
      double lo, hi;
      if (plot != NULL && lw_plot_pane_get_x_view (left, &lo, &hi))
        lw_plot_pane_set_x_view (self->split_panes[k], lo, hi);
    }
  if (self->debug)
    {
      /* the split view's two columns, by their variants' styles (place in the document + 1) */
      printf ("LW-SPLIT on=%d left=%u right=%u\n", self->split ? 1 : 0,
              self->split ? vars[moving].style : 0,
              self->split && other != NULL ? other->style : 0);
      fflush (stdout);
    }
  lwpa_set_handles (self, eval, active_fv, stages, n_stages, gain_pin_nu_rad_s, sel_stage,
               sel_corner);
  lwpa_drop_unused_figures (self);
}

void
lw_plot_area_show_eval (LwPlotArea *self, LwVariantEval *eval, const LwPlotRequirements *req,
                        const LwStage *stages, guint n_stages, double gain_pin_nu_rad_s,
                        int sel_stage, int sel_corner)
{
  g_return_if_fail (eval != NULL);
  LwAreaVariant v = { .eval = eval, .name = NULL };
  lw_plot_area_show_variants (self, &v, 1, 0, req, stages, n_stages, gain_pin_nu_rad_s,
                              sel_stage, sel_corner, FALSE);
}


void
lw_plot_area_reset_view (LwPlotArea *self)
{
  g_return_if_fail (LW_IS_PLOT_AREA (self));
  for (guint i = 0; i < lwpa_n_area_views; i++)
    lw_plot_pane_reset_view (self->panes[i]);
  for (guint k = 0; k < lwpa_n_split_views; k++)
    lw_plot_pane_reset_view (self->split_panes[k]);
}

LwPlotPane *
lw_plot_area_get_split_pane (LwPlotArea *self, LwPlotView view)
{
  g_return_val_if_fail (LW_IS_PLOT_AREA (self), NULL);
  int k = split_row (view);
  return k >= 0 ? self->split_panes[k] : NULL;
}

LwPlotPane *
lw_plot_area_get_pane (LwPlotArea *self, LwPlotView view)
{
  g_return_val_if_fail (LW_IS_PLOT_AREA (self), NULL);
  for (guint i = 0; i < lwpa_n_area_views; i++)
    if (self->views[i] == view)
      return self->panes[i];
  return NULL;
}

LwPlot *
lw_plot_area_build_plot (LwPlotArea *area, const LwAreaVariant *vs, guint n,
                         const LwPlotRequirements *req, LwPlotView view, const char *title,
                         GError **error)
{
  g_return_val_if_fail (vs != NULL && n >= 1, NULL);
  n = MIN (n, LW_PLOT_MAX_VARIANTS);
  LwFigureVariant fv[LW_PLOT_MAX_VARIANTS];
  LwPlotVariant pv[LW_PLOT_MAX_VARIANTS];
  guint filled = 0;
  LwPlot *plot = NULL;
  for (; filled < n; filled++)
    {
      LwVariantEval *eval = vs[filled].eval;
      LwError e;
      if (eval == NULL || eval->ev == NULL)
        {
          g_set_error (error, LW_PLOT_ERROR, LW_PLOT_ERROR_INPUT, "%s: %s",
                       vs[filled].name ? vs[filled].name : "loop",
                       eval != NULL ? eval->error->message : "not evaluated");
          goto out;
        }
      if (lw_figure_variant_fill (&fv[filled], vs[filled].name, eval->sampled, eval->ev, &e)
          != LW_OK)
        {
          g_set_error_literal (error, LW_PLOT_ERROR, LW_PLOT_ERROR_INPUT, e.message);
          lw_figure_variant_clear (&fv[filled]);
          goto out;
        }
      lw_figure_variant_set_responses (&fv[filled], eval->sim_ref, &eval->sim_options,
                                       eval->sim_in, eval->sim_out, eval->responses);
      pv[filled] = fv[filled].v;
      pv[filled].style = n > 1 ? vs[filled].style : 0;   /* one variant: the first colour */
      pv[filled].family = vs[filled].family;
    }
  LwPlotInput in = {
    .view = view,
    .nyquist_rad_s = G_PI / vs[0].eval->ev->period_s,
    .title = title,
    .n_variants = n,
    .variants = pv,
    .input_unit = vs[0].eval->input_unit,
    .output_unit = vs[0].eval->output_unit,
    .phase_full_range = area != NULL && area->phase_mode == 1,
    .phase_wrapped = area != NULL && area->phase_mode == 2,
    .nyquist_compressed = area != NULL && area->nyquist_compressed,
  };
  if (req != NULL)
    in.req = *req;
  plot = lw_plot_new (&in, error);
out:
  for (guint i = 0; i < filled; i++)
    lw_figure_variant_clear (&fv[i]);
  return plot;
}

void
lw_plot_area_set_theme (LwPlotArea *self, LwPlotTheme theme)
{
  g_return_if_fail (LW_IS_PLOT_AREA (self));
  for (guint i = 0; i < lwpa_n_area_views; i++)
    lw_plot_pane_set_theme (self->panes[i], theme);
  for (guint k = 0; k < lwpa_n_split_views; k++)
    lw_plot_pane_set_theme (self->split_panes[k], theme);
  self->theme = theme;
  lwpa_key_measure (self, gtk_widget_get_width (GTK_WIDGET (self->key)));
  gtk_widget_queue_draw (GTK_WIDGET (self->key));
}

static void
lw_plot_area_dispose (GObject *object)
{
  LwPlotArea *self = LW_PLOT_AREA (object);

  if (self->grid != NULL)
    {
      gtk_widget_unparent (GTK_WIDGET (self->grid));
      self->grid = NULL;
    }
  if (self->key != NULL)
    {
      gtk_widget_unparent (GTK_WIDGET (self->key));
      self->key = NULL;
    }
  for (guint i = 0; i < LW_PLOT_MAX_VARIANTS; i++)
    g_clear_pointer (&self->key_names[i], g_free);
  /* the area's own references (see init), after the grid let go of its children */
  for (guint k = 0; k < lwpa_n_split_views; k++)
    g_clear_object (&self->split_panes[k]);
  for (guint i = 0; i < lwpa_n_area_views; i++)
    g_clear_object (&self->panes[i]);
  g_clear_pointer (&self->figures, g_ptr_array_unref);
  G_OBJECT_CLASS (lw_plot_area_parent_class)->dispose (object);
}

static void
lw_plot_area_class_init (LwPlotAreaClass *klass)
{
  G_OBJECT_CLASS (klass)->dispose = lw_plot_area_dispose;
  for (LwPlotView v = 0; v < LW_PLOT_N_VIEWS; v++)
    {
      if (lw_plot_view_has (v, LW_PLOT_VIEW_IN_WINDOW))
        lwpa_area_views[lwpa_n_area_views++] = v;
      if (lw_plot_view_has (v, LW_PLOT_VIEW_IN_WINDOW | LW_PLOT_VIEW_IN_SPLIT))
        lwpa_split_views[lwpa_n_split_views++] = v;
    }
  gtk_widget_class_install_action (GTK_WIDGET_CLASS (klass), "area.pane-view", "(us)",
                                   lwpa_pane_view_activated);
  gtk_widget_class_install_action (GTK_WIDGET_CLASS (klass), "area.display", "s",
                                   lwpa_display_activated);
  /* a display option changed (phase range, Nyquist scale): show the variants again */
  lwpa_signals[LWPA_SIGNAL_DISPLAY_CHANGED] =
    g_signal_new ("display-changed", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST, 0, NULL,
                  NULL, NULL, G_TYPE_NONE, 0);
  lwpa_signals[LWPA_SIGNAL_VIEWS_CHANGED] = g_signal_new ("views-changed", G_TYPE_FROM_CLASS (klass),
                                                G_SIGNAL_RUN_LAST, 0, NULL, NULL, NULL,
                                                G_TYPE_NONE, 0);
  gtk_widget_class_set_layout_manager_type (GTK_WIDGET_CLASS (klass), GTK_TYPE_BOX_LAYOUT);
  gtk_widget_class_set_css_name (GTK_WIDGET_CLASS (klass), "plotarea");
}

static void
lw_plot_area_init (LwPlotArea *self)
{
  gtk_orientable_set_orientation (GTK_ORIENTABLE (gtk_widget_get_layout_manager (GTK_WIDGET (self))),
                                  GTK_ORIENTATION_VERTICAL);
  self->key = GTK_DRAWING_AREA (gtk_drawing_area_new ());
  gtk_drawing_area_set_content_height (self->key, 20);
  gtk_drawing_area_set_draw_func (self->key, lwpa_key_draw, self, NULL);
  g_signal_connect (self->key, "resize", G_CALLBACK (lwpa_key_resized), self);
  gtk_widget_set_visible (GTK_WIDGET (self->key), FALSE);
  gtk_widget_set_parent (GTK_WIDGET (self->key), GTK_WIDGET (self));
  self->grid = GTK_GRID (gtk_grid_new ());
  gtk_widget_set_vexpand (GTK_WIDGET (self->grid), TRUE);
  gtk_grid_set_row_homogeneous (self->grid, TRUE);
  gtk_grid_set_column_homogeneous (self->grid, TRUE);
  gtk_grid_set_row_spacing (self->grid, 4);
  gtk_grid_set_column_spacing (self->grid, 4);
  gtk_widget_set_parent (GTK_WIDGET (self->grid), GTK_WIDGET (self));
  self->figures = g_ptr_array_new_with_free_func (figure_entry_free);
  self->debug = g_strcmp0 (g_getenv ("LW_DEBUG_HANDLES"), "1") == 0;
  /* every pane is held by the area too, so the ones off the grid (split view) live on */
  for (guint i = 0; i < lwpa_n_area_views; i++)
    {
      self->views[i] = lwpa_area_views[i];
      self->panes[i] = g_object_ref_sink (lw_plot_pane_new (lwpa_area_views[i]));
      g_object_set_data (G_OBJECT (self->panes[i]), "lw-pane-index", GUINT_TO_POINTER (i));
      GtkGesture *menu_click = gtk_gesture_click_new ();
      gtk_gesture_single_set_button (GTK_GESTURE_SINGLE (menu_click), GDK_BUTTON_SECONDARY);
      g_signal_connect (menu_click, "pressed", G_CALLBACK (lwpa_pane_menu_pressed), self->panes[i]);
      gtk_widget_add_controller (GTK_WIDGET (self->panes[i]), GTK_EVENT_CONTROLLER (menu_click));
      GtkEventController *menu_key = gtk_event_controller_key_new ();
      g_signal_connect (menu_key, "key-pressed", G_CALLBACK (lwpa_pane_menu_key), self->panes[i]);
      gtk_widget_add_controller (GTK_WIDGET (self->panes[i]), menu_key);
      g_signal_connect (self->panes[i], "x-view-changed", G_CALLBACK (lwpa_pane_view_changed), self);
    }
  for (guint k = 0; k < lwpa_n_split_views; k++)
    {
      self->split_panes[k] = g_object_ref_sink (lw_plot_pane_new (lwpa_split_views[k]));
      g_signal_connect (self->split_panes[k], "x-view-changed", G_CALLBACK (lwpa_pane_view_changed),
                        self);
    }
  self->layout = LW_PLOT_LAYOUT_GRID;
  lwpa_arrange (self);
}
