/* lw-report-compare.c — the report's figures (every variant overlaid, drawn by src/plot/) and
 * the comparison table of the variants. See lw-report-private.h.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include "lw-figure-data.h"
#include "lw-figure-measured.h"
#include "lw-report-private.h"

/* A variant's responses (lw-design.h) are passed to the figure as they are (lw-figure-data.h):
 * the two layers must agree on the bits. */
G_STATIC_ASSERT (LW_FIGURE_SHOW_REFERENCE == LW_DESIGN_RESPONSE_REFERENCE);
G_STATIC_ASSERT (LW_FIGURE_SHOW_ACTUATOR == LW_DESIGN_RESPONSE_ACTUATOR);
G_STATIC_ASSERT (LW_FIGURE_SHOW_INPUT_DISTURBANCE == LW_DESIGN_RESPONSE_INPUT_DISTURBANCE);
G_STATIC_ASSERT (LW_FIGURE_SHOW_OUTPUT_DISTURBANCE == LW_DESIGN_RESPONSE_OUTPUT_DISTURBANCE);
G_STATIC_ASSERT (LW_FIGURE_SHOW_ALL == LW_DESIGN_RESPONSES_ALL);

/* ---- figures ---------------------------------------------------------------------------- */

gboolean
lwr_add_figures (LwReport *r, const LwDesign *d, RVar *rv, size_t n, const RFamily *rf,
                 GError **error)
{
  lwr_heading (r, 2, "figures", "Figures");
  lwr_para (r, "Every variant of the report overlaid, each in its colour and dash; drawn by the "
        "same renderer as `loopwright-cli plot`.");
  if (rf->family != NULL && rf->loops->n > 0)
    lwr_para (r, "The plant family of “%s” is drawn under its curves: %zu of its %zu members "
              "as thin light curves (the worst of each figure%s others spread over the rest; "
              "their closed-loop poles as small dots), the member of the worst phase margin "
              "dashed and labelled.", rv[rf->of].v->name, rf->loops->n,
              rf->family->n_members,
              rf->family->n_points > 0 ? ", the operating points and" : " and");
  LwFigureVariant fv[LW_PLOT_MAX_VARIANTS];
  LwPlotVariant pv[LW_PLOT_MAX_VARIANTS];
  size_t filled = 0, n_model = 0;
  gboolean ok = TRUE;
  LwError err;
  lw_error_clear (&err);
  /* the measured data, closed by the loop of the active variant when it is reported (else
   * the first), after the variants in the frequency figures, as the window draws them */
  const RVar *with_data = &rv[0];
  for (size_t k = 0; k < n; k++)
    if ((size_t) (rv[k].v - d->variants) == d->active)
      with_data = &rv[k];
  LwFigureMeasured fm;
  bool has_fm = false;
  for (; filled < n; filled++)
    {
      if (rv[filled].ev == NULL)
        continue;   /* no model loop: only its data are drawn */
      if (lw_figure_variant_fill (&fv[n_model], rv[filled].v->name, rv[filled].e->sampled,
                                  rv[filled].ev, &err) != LW_OK)
        {
          g_set_error (error, LW_REPORT_ERROR, LW_REPORT_ERROR_FAILED,
                       "report: internal failure: %s", err.message);
          ok = FALSE;
          goto out;
        }
      pv[n_model] = fv[n_model].v;
      if (rf->family != NULL && filled == rf->of)
        pv[n_model].family = &rf->fig.f;
      /* a variant keeps the colour of its place in the document, as in the window; one
       * variant alone has the first colour */
      pv[n_model].style = n > 1 ? (unsigned) ((size_t) (rv[filled].v - d->variants)
                                              % LW_PLOT_MAX_VARIANTS) + 1
                                : 0;
      /* the continuous output between samples and the actuator signal, from the simulation */
      lw_figure_variant_set_responses (&fv[n_model], rv[filled].ref, &rv[filled].e->sim_options,
                                       NULL, NULL, rv[filled].e->responses);
      pv[n_model].step = fv[n_model].v.step;
      n_model++;
    }
  const LwVariantEval *de = with_data->e;
  if (de->measured != NULL && n_model < LW_PLOT_MAX_VARIANTS)
    {
      lw_figure_measured_fill (&fm, de->measured, de->measured_kind, de->measured_coherence,
                               de->period_s);
      has_fm = true;
      pv[n_model] = fm.variant;
      pv[n_model].name = fm.legend;   /* the fading is said in the paragraph below */
      pv[n_model].style = lw_figure_measured_style (pv, n_model);
      lwr_para (r, "The measured response is drawn in the frequency figures as well: the "
                "loop of “%s” closed on the data, a curve of its own%s; %s.", with_data->v->name,
                de->measured_coherence != NULL ? ", faded where the coherence is below 0.8"
                                               : "",
                n_model > 0 ? "the step response is the model's alone"
                            : "without a plant model there is no step response");
    }
  else if (d->measured != NULL)
    lwr_para (r, "The measured response is not drawn in the figures: %s.",
              de->measured == NULL ? "it cannot be used at the variant's period"
                                   : "the figure holds six curves and the variants take them");
  /* the design's requirement marks, as the window and `plot` draw them */
  double period_s = rv[0].e->period_s;
  LwPlotRequirements marks;
  lw_figure_requirements (&marks, period_s, false, 0.0, false, 0.0);
  for (size_t i = 0; i < d->n_requirements; i++)
    lw_figure_requirements_add (&marks, period_s, &d->requirements[i].req);
  static const struct { LwPlotView view; const char *caption; double h; } figs[] = {
    { LW_PLOT_VIEW_BODE_Z, "Bode diagram of the loop L in z, up to the Nyquist frequency π/T", FIG_H },
    { LW_PLOT_VIEW_BODE_W, "Bode diagram of the loop in the w-plane (over ν), with straight-line asymptotes", FIG_H },
    { LW_PLOT_VIEW_STEP, "Unit step response: samples held, the continuous output between samples, and the actuator signal", FIG_H },
    { LW_PLOT_VIEW_NYQUIST, "Nyquist diagram of L with the unit circle and the critical point −1", FIG_H },
  };
  for (size_t f = 0; f < G_N_ELEMENTS (figs); f++)
    {
      bool data = has_fm && lw_figure_measured_view_ok (figs[f].view);
      if (n_model + data == 0)
        continue;   /* a model's view without a model */
      LwPlotInput in = { 0 };
      in.view = figs[f].view;
      in.nyquist_rad_s = G_PI / period_s;
      in.n_variants = n_model + data;
      in.variants = pv;
      in.req = marks;
      in.input_unit = rv[0].e->input_unit;
      in.output_unit = rv[0].e->output_unit;
      g_autoptr (GError) ferr = NULL;
      LwPlot *p = lw_plot_new (&in, &ferr);
      if (p == NULL)
        {
          g_set_error (error, LW_REPORT_ERROR, LW_REPORT_ERROR_FAILED, "report: figure '%s': %s",
                       lw_plot_view_name (figs[f].view), ferr->message);
          ok = FALSE;
          goto out;
        }
      LwReportBlock *b = lwr_add_block (r, LW_REPORT_FIGURE, figs[f].caption);
      b->id = g_strdup (lw_plot_view_name (figs[f].view));
      b->plot = p;
      b->fig_width = FIG_W;
      b->fig_height = figs[f].h;
    }
out:
  for (size_t i = 0; i < n_model; i++)
    lw_figure_variant_clear (&fv[i]);
  if (has_fm)
    lw_figure_measured_clear (&fm);
  return ok;
}

/* ---- comparison ------------------------------------------------------------------------- */

typedef struct
{
  const char *name;
  int better;          /* +1 higher is better, −1 lower is better, 0 neither */
} Metric;

/* the rows of the model (metrics below); the four after them are the data's */
#define N_MODEL_METRICS 15

/* The value of metric i for variant rv (has false when there is none). */
static double
metric_value (size_t i, const RVar *rv, bool *has)
{
  const LwMeasuredLoop *ml = rv->e->measured;
  if (i >= N_MODEL_METRICS)
    {
      /* the loop on the measured data: the governing margins, NAN when the data hold none */
      const LwMeasuredMargins *mm = ml != NULL ? &ml->margins : NULL;
      double v = mm == NULL ? NAN
                 : i == N_MODEL_METRICS ? mm->phase_margin_deg
                 : i == N_MODEL_METRICS + 1 ? mm->gain_crossover_rad_s
                 : i == N_MODEL_METRICS + 2 ? mm->gain_margin_db
                 : mm->sensitivity_peak;
      *has = isfinite (v);
      return v;
    }
  if (rv->ev == NULL)
    {
      *has = false;   /* no model */
      return NAN;
    }
  const LwMargins *m = &rv->ev->margins;
  const LwStep *s = &rv->ev->step;
  *has = true;
  switch (i)
    {
    case 0: *has = m->has_phase_margin; return m->phase_margin_deg;
    case 1: *has = m->has_phase_margin; return m->gain_crossover_rad_s;
    case 2: *has = m->has_gain_margin; return m->gain_margin_db;
    case 3: *has = m->has_delay_margin; return m->delay_margin_s;
    case 4: *has = m->has_sensitivity; return m->sensitivity_peak;
    case 5: *has = m->has_bandwidth; return m->bandwidth_rad_s;
    case 6: *has = s->has_overshoot; return s->overshoot_pct;
    case 7: *has = s->has_rise; return s->rise_time_s;
    case 8: *has = s->has_settling; return s->settling_time_s;
    case 9: return rv->ref->indices.iae;
    case 10: return rv->ref->indices.ise;
    case 11: return rv->ref->indices.itae;
    case 12: return rv->ref->indices.control_effort;
    case 13: return rv->actuator_peak;
    case 14: return rv->din->indices.iae;
    default: *has = false; return NAN;
    }
}

static const Metric metrics[] = {
  { "phase margin (deg)", +1 },
  { "gain crossover (rad/s)", +1 },
  { "gain margin (dB)", +1 },
  { "delay margin (s)", +1 },
  { "sensitivity peak max|S|", -1 },
  { "closed-loop bandwidth (rad/s)", +1 },
  { "overshoot (%)", -1 },
  { "rise time (s)", -1 },
  { "settling time (s)", -1 },
  { "IAE, reference step", -1 },
  { "ISE, reference step", -1 },
  { "ITAE, reference step", -1 },
  { "control effort, reference step", -1 },
  { "peak actuator |u|", -1 },
  { "IAE, input disturbance", -1 },
  /* with a measured response: the same figures of the loop on the data */
  { "phase margin on the data (deg)", +1 },
  { "gain crossover on the data (rad/s)", +1 },
  { "gain margin on the data (dB)", +1 },
  { "sensitivity peak on the data", -1 },
};
G_STATIC_ASSERT (G_N_ELEMENTS (metrics) == N_MODEL_METRICS + 4);

void
lwr_add_comparison (LwReport *r, const LwDesign *d, const RVar *rv, size_t n)
{
  lwr_heading (r, 2, "comparison", "Comparison of the variants");
  lwr_para (r, "One column per variant; the better value of each row is in bold and marked ▲ "
        "(higher is better for margins, crossover and bandwidth, lower for the rest; no mark "
        "when all are equal). In parentheses: the difference from the first column, “%s”.",
        rv[0].v->name);
  const char **header = g_new0 (const char *, n + 1);
  header[0] = "figure";
  for (size_t k = 0; k < n; k++)
    header[k + 1] = rv[k].v->name;
  TableFill t = lwr_table_begin (r, "comparison", NULL, n + 1, header);
  g_free (header);
  size_t rows = d->measured != NULL ? G_N_ELEMENTS (metrics) : N_MODEL_METRICS;
  for (size_t i = 0; i < rows; i++)
    {
      double val[LW_PLOT_MAX_VARIANTS];
      bool has[LW_PLOT_MAX_VARIANTS];
      double best = NAN;
      bool differ = false;
      for (size_t k = 0; k < n; k++)
        {
          val[k] = metric_value (i, &rv[k], &has[k]);
          if (!has[k] || isnan (val[k]))
            continue;
          if (isnan (best))
            best = val[k];
          else
            {
              if (val[k] != best)
                differ = true;
              best = metrics[i].better > 0 ? fmax (best, val[k]) : fmin (best, val[k]);
            }
        }
      lwr_cellf (&t, "%s", metrics[i].name);
      for (size_t k = 0; k < n; k++)
        {
          char *text = lwr_num6 (has[k], val[k]);
          if (k > 0 && has[k] && has[0] && isfinite (val[k]) && isfinite (val[0]))
            {
              char *with = g_strdup_printf ("%s (%+.4g)", text, val[k] - val[0]);
              g_free (text);
              text = with;
            }
          bool is_best = differ && has[k] && val[k] == best;
          if (is_best)
            {
              char *with = g_strdup_printf ("%s ▲", text);
              g_free (text);
              text = with;
            }
          lwr_cell_take (&t, text, is_best);
        }
    }
  /* the requirements, pass or fail per variant */
  for (size_t i = 0; i < d->n_requirements; i++)
    {
      lwr_cellf (&t, "requirement: %s", lw_design_requirement_title (&d->requirements[i]));
      for (size_t k = 0; k < n; k++)
        {
          LwReqStatus s = rv[k].req[i].status;
          lwr_cellf (&t, "%s", s == LW_REQ_PASS ? "pass" : s == LW_REQ_FAIL ? "FAIL" : "n/a");
        }
    }
  if (d->n_requirements > 0)
    {
      size_t most = 0;
      bool differ = false;
      for (size_t k = 0; k < n; k++)
        {
          size_t p = d->n_requirements - (size_t) rv[k].failing;
          if (k > 0 && p != most)
            differ = true;
          most = MAX (most, p);
        }
      lwr_cellf (&t, "requirements passed");
      for (size_t k = 0; k < n; k++)
        {
          size_t p = d->n_requirements - (size_t) rv[k].failing;
          bool is_best = differ && p == most;
          lwr_cell_take (&t, g_strdup_printf ("%zu of %zu%s", p, d->n_requirements,
                                          is_best ? " ▲" : ""), is_best);
        }
    }
  lwr_table_end (&t);
}

