/* lw-report-build.c — the blocks of the design report: every variant evaluated (margins, step
 * and disturbance simulations, requirements, implementation forms), formatted once; figures
 * drawn by the shared renderer (src/plot/). See lw-report.h and docs/report.md.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-engine.h"
#include "lw-figure-data.h"
#include "lw-file-write.h"
#include "lw-implement.h"
#include "lw-report.h"
#include "lw-simulate.h"

G_DEFINE_QUARK (lw-report-error-quark, lw_report_error)

/* Figure size in points as drawn (the HTML's SVG size); the PDF scales it to its text column
 * (483 pt), so two figures fit a page and the annotations have room at the right edge. */
#define FIG_W 620.0
#define FIG_H 380.0

/* Everything computed for one variant. */
typedef struct
{
  const LwDesignVariant *v;
  LwVariantEval *e;             /* the engine's evaluation; the fields below are borrowed */
  const LwEvaluation *ev;
  const LwSimResponse *ref, *din, *dout;
  const LwReqResult *req;
  size_t failing;
  double actuator_peak;
  LwDiffEq *de;
  LwSos *sos;
} RVar;

static void
rvar_clear (RVar *r)
{
  lw_variant_eval_unref (r->e);
  lw_diffeq_free (r->de);
  lw_sos_free (r->sos);
  memset (r, 0, sizeof *r);
}

/* ---- blocks ----------------------------------------------------------------------------- */

static void
block_free (gpointer p)
{
  LwReportBlock *b = p;
  g_free (b->text);
  g_free (b->id);
  g_free (b->variant);
  for (size_t i = 0; i < b->n_cols && b->header; i++)
    g_free (b->header[i]);
  g_free (b->header);
  for (size_t i = 0; i < b->n_rows * b->n_cols; i++)
    g_free (b->cells[i].text);
  g_free (b->cells);
  lw_plot_free (b->plot);
  g_free (b);
}

void
lw_report_free (LwReport *r)
{
  if (r == NULL)
    return;
  g_free (r->title);
  g_free (r->author);
  g_free (r->date);
  g_ptr_array_unref (r->blocks);
  g_free (r);
}

static LwReportBlock *
add_block (LwReport *r, LwReportBlockKind kind, const char *text)
{
  LwReportBlock *b = g_new0 (LwReportBlock, 1);
  b->kind = kind;
  b->text = g_strdup (text);
  g_ptr_array_add (r->blocks, b);
  return b;
}

static void
heading (LwReport *r, int level, const char *id, const char *text)
{
  LwReportBlock *b = add_block (r, LW_REPORT_HEADING, text);
  b->level = level;
  b->id = g_strdup (id);
}

static void G_GNUC_PRINTF (2, 3)
para (LwReport *r, const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  char *t = g_strdup_vprintf (fmt, ap);
  va_end (ap);
  add_block (r, LW_REPORT_PARAGRAPH, t);
  g_free (t);
}

static void
formula (LwReport *r, const char *label, const LwModel *m)
{
  g_autofree char *text = lw_model_text (m);
  g_autofree char *line = g_strdup_printf ("%s%s", label, text);
  add_block (r, LW_REPORT_FORMULA, line);
}

/* A table being filled: header given, rows appended. */
typedef struct
{
  LwReportBlock *b;
  GArray *cells;   /* LwReportCell */
} TableFill;

static TableFill
table_begin (LwReport *r, const char *id, const char *variant, size_t n_cols,
             const char *const *header)
{
  LwReportBlock *b = add_block (r, LW_REPORT_TABLE, NULL);
  b->id = g_strdup (id);
  b->variant = g_strdup (variant);
  b->n_cols = n_cols;
  b->header = g_new0 (char *, n_cols);
  for (size_t i = 0; i < n_cols; i++)
    b->header[i] = g_strdup (header[i]);
  return (TableFill) { b, g_array_new (FALSE, TRUE, sizeof (LwReportCell)) };
}

/* Appends one cell (text taken). */
static void
cell_take (TableFill *t, char *text, bool best)
{
  LwReportCell c = { text, best };
  g_array_append_val (t->cells, c);
}

static void G_GNUC_PRINTF (2, 3)
cellf (TableFill *t, const char *fmt, ...)
{
  va_list ap;
  va_start (ap, fmt);
  char *s = g_strdup_vprintf (fmt, ap);
  va_end (ap);
  cell_take (t, s, false);
}

static void
table_end (TableFill *t)
{
  g_assert (t->cells->len % t->b->n_cols == 0);
  t->b->n_rows = t->cells->len / t->b->n_cols;
  t->b->cells = (LwReportCell *) (void *) g_array_free (t->cells, FALSE);
}

/* A figure value: 6 significant digits, or "n/a" when absent. */
static char *
num6 (bool has, double v)
{
  if (!has || isnan (v))
    return g_strdup ("n/a");
  if (isinf (v))
    return g_strdup (v > 0 ? "infinite" : "-infinite");
  return g_strdup_printf ("%.6g", v);
}

static char *
complex_text (double complex z)
{
  if (cimag (z) == 0.0)
    return g_strdup_printf ("%.8g", creal (z));
  return g_strdup_printf ("%.8g %c %.8gj", creal (z), cimag (z) < 0 ? '-' : '+',
                          fabs (cimag (z)));
}

/* ---- evaluation of one variant ---------------------------------------------------------- */

static gboolean
rvar_compute (const char *path, const LwDesign *d, size_t index, RVar *r, GError **error)
{
  memset (r, 0, sizeof *r);
  r->v = &d->variants[index];
  /* the reference step with the continuous output between samples, and both disturbances */
  LwEngineOptions opts;
  lw_engine_options_init (&opts);
  lw_sim_options_init (&opts.sim);
  opts.disturbances = TRUE;
  r->e = lw_engine_evaluate_variant (d, index, &opts, NULL);
  const LwVariantEval *e = r->e;
  g_autofree char *place = g_strdup_printf ("%s: variant '%s'", path, r->v->name);
  const GError *failure = e->failure != LW_EVAL_OK ? e->error
                          : e->sim_error != NULL ? e->sim_error
                          : !e->has_achieved ? e->achieved_error : NULL;
  if (failure != NULL)
    {
      const char *where = e->failure == LW_EVAL_FAILED_PLANT
                            || e->failure == LW_EVAL_FAILED_SAMPLING ? "<plant>" : NULL;
      gboolean bad_input = failure->code == LW_ERR_PARSE || failure->code == LW_ERR_INVALID;
      g_set_error (error, LW_REPORT_ERROR,
                   bad_input ? LW_REPORT_ERROR_BAD_INPUT : LW_REPORT_ERROR_FAILED,
                   "%s%s%s: %s%s", where != NULL ? path : place, where != NULL ? ": " : "",
                   where != NULL ? where : "", bad_input ? "" : "internal failure: ",
                   failure->message);
      return FALSE;
    }
  LwError err;
  lw_error_clear (&err);
  if (lw_diffeq_from_model (e->controller_z, &r->de, &err) != LW_OK
      || lw_sos_from_model (e->controller_z, &r->sos, &err) != LW_OK)
    {
      g_set_error (error, LW_REPORT_ERROR, LW_REPORT_ERROR_FAILED, "%s: %s", place,
                   err.message);
      return FALSE;
    }
  r->ev = e->ev;
  r->ref = e->sim_ref;
  r->din = e->sim_in;
  r->dout = e->sim_out;
  r->req = e->requirements;
  r->failing = e->n_not_passing;
  r->actuator_peak = e->actuator_peak;
  return TRUE;
}

/* ---- sections --------------------------------------------------------------------------- */

static void
section_design (LwReport *r, const char *path, const LwDesign *d, size_t n)
{
  heading (r, 1, "title", d->title[0] ? d->title : "Untitled design");
  heading (r, 2, "design", "Design");
  TableFill t = table_begin (r, "design", NULL, 2, (const char *const[]) { "item", "value" });
  cellf (&t, "author");
  cellf (&t, "%s", d->author ? d->author : "not stated");
  cellf (&t, "date");
  cellf (&t, "%s", r->date ? r->date : "not stated");
  cellf (&t, "document");
  g_autofree char *base = g_path_get_basename (path);
  cellf (&t, "%s", base);
  cellf (&t, "variants in this report");
  cellf (&t, "%zu of %zu", n, d->n_variants);
  cellf (&t, "active variant");
  cellf (&t, "%s", d->variants[d->active].name);
  table_end (&t);
  if (d->notes != NULL && d->notes[0] != '\0')
    {
      heading (r, 3, "notes", "Notes");
      para (r, "%s", d->notes);
    }
}

static void
section_plant (LwReport *r, const LwDesign *d, const RVar *v0)
{
  const LwEvaluation *ev = v0->ev;
  heading (r, 2, "plant", "Plant and sampling");
  para (r, "The plant as typed: P(s) = %s. Its zero-order-hold equivalent in z includes the "
        "dead time (poles at z = 0) but not the computation delay; the w-plane model is the "
        "bilinear image w = (2/T)(z − 1)/(z + 1), its roots in rad/s of ν.", d->plant);
  formula (r, "P(s) = ", v0->e->plant_s);
  formula (r, "P(z) = ", ev->plant_z);
  formula (r, "P(w) = ", ev->plant_w);
  TableFill t = table_begin (r, "sampling", NULL, 2, (const char *const[]) { "item", "value" });
  cellf (&t, "sample period T");
  cellf (&t, "%.6g s (%.6g Hz)", d->period_s, 1.0 / d->period_s);
  cellf (&t, "Nyquist frequency π/T");
  cellf (&t, "%.6g rad/s", G_PI / d->period_s);
  cellf (&t, "hold");
  cellf (&t, "zero-order");
  cellf (&t, "computation delay N");
  cellf (&t, "%d sample(s) = %.6g s", d->compute_delay, d->compute_delay * d->period_s);
  cellf (&t, "plant dead time");
  cellf (&t, "%.6g s = %.6g sample(s)", d->dead_time_s, d->dead_time_s / d->period_s);
  cellf (&t, "loop");
  cellf (&t, "L(z) = z^−%d · C(z) · P(z), unity negative feedback", d->compute_delay);
  table_end (&t);
}

static void
section_variant (LwReport *r, const LwDesign *d, const RVar *rv, size_t k)
{
  const LwDesignVariant *v = rv->v;
  const LwEvaluation *ev = rv->ev;
  const LwMargins *m = &ev->margins;
  g_autofree char *id = g_strdup_printf ("variant-%zu", k + 1);
  g_autofree char *title = g_strdup_printf ("Variant “%s”", v->name);
  heading (r, 2, id, title);
  if (v->notes != NULL && v->notes[0] != '\0')
    para (r, "%s", v->notes);
  if (v->has_period)
    para (r, "This variant is sampled at its own period T = %.6g s (%.6g Hz, Nyquist frequency "
          "π/T = %.6g rad/s) instead of the design's %.6g s; the computation delay of %d "
          "sample(s) is then %.6g s.", v->period_s, 1.0 / v->period_s, G_PI / v->period_s,
          d->period_s, d->compute_delay, d->compute_delay * v->period_s);

  heading (r, 3, NULL, "Stages");
  if (v->n_stages == 0)
    para (r, "No stages: the controller is 1.");
  else
    {
      TableFill t = table_begin (r, "stages", v->name, 4,
                                 (const char *const[]) { "#", "stage", "state", "parameters (w-plane, ν in rad/s)" });
      for (size_t i = 0; i < v->n_stages; i++)
        {
          const LwStage *st = &v->stages[i];
          cellf (&t, "%zu", i + 1);
          cellf (&t, "%s%s%s", st->label[0] ? st->label : lw_stage_kind_name (st->kind),
                 st->label[0] ? " — " : "", st->label[0] ? lw_stage_kind_name (st->kind) : "");
          cellf (&t, "%s", st->enabled ? "on" : "off");
          LwStageParam p[LW_STAGE_MAX_PARAMS];
          size_t np = lw_stage_params (st, p);
          GString *s = g_string_new (NULL);
          for (size_t j = 0; j < np; j++)
            {
              bool unit = p[j].unit[0] != '\0' && strcmp (p[j].unit, "ratio") != 0;
              g_string_append_printf (s, "%s%s %.6g%s%s", j ? ", " : "", p[j].name, p[j].value,
                                      unit ? " " : "", unit ? p[j].unit : "");
            }
          cell_take (&t, g_string_free (s, FALSE), false);
        }
      table_end (&t);
    }

  heading (r, 3, NULL, "Controller");
  formula (r, "C(w) = ", rv->e->controller_w);
  formula (r, "C(z) = ", rv->e->controller_z);

  heading (r, 3, NULL, "Difference equation");
  para (r, "u[k] = Σ b[i]·e[k−i] − Σ a[i]·u[k−i], order %zu, coefficients to 17 significant "
        "digits (the computation delay is realized by the firmware's timing, not here).",
        rv->de->order);
  {
    TableFill t = table_begin (r, "difference", v->name, 3,
                               (const char *const[]) { "i", "b[i]", "a[i]" });
    for (size_t i = 0; i <= rv->de->order; i++)
      {
        cellf (&t, "%zu", i);
        cellf (&t, "%.17g", rv->de->b[i]);
        cellf (&t, "%.17g", rv->de->a[i]);
      }
    table_end (&t);
  }

  heading (r, 3, NULL, "Second-order sections");
  para (r, "H_k(z) = (b0 + b1 z^−1 + b2 z^−2) / (1 + a1 z^−1 + a2 z^−2), applied in this "
        "order (docs/implementation.md).");
  {
    TableFill t = table_begin (r, "sections", v->name, 5,
                               (const char *const[]) { "section", "b0, b1, b2", "a1, a2", "poles", "peak gain" });
    for (size_t i = 0; i < rv->sos->n; i++)
      {
        const LwSection *s = &rv->sos->s[i];
        cellf (&t, "%zu (order %d)", i + 1, s->order);
        cellf (&t, "%.17g\n%.17g\n%.17g", s->b[0], s->b[1], s->b[2]);
        cellf (&t, "%.17g\n%.17g", s->a[1], s->a[2]);
        GString *p = g_string_new (NULL);
        for (size_t j = 0; j < s->n_poles; j++)
          {
            g_autofree char *c = complex_text (s->poles[j]);
            g_string_append_printf (p, "%s%s", j ? "\n" : "", c);
          }
        if (s->n_poles == 0)
          g_string_append (p, "none");
        cell_take (&t, g_string_free (p, FALSE), false);
        cell_take (&t, num6 (isfinite (s->peak_gain), s->peak_gain), false);
      }
    table_end (&t);
  }

  heading (r, 3, NULL, "Requirements");
  if (d->n_requirements == 0)
    para (r, "The design states no requirements.");
  else
    {
      TableFill t = table_begin (r, "requirements", v->name, 4,
                                 (const char *const[]) { "requirement", "target", "achieved", "result" });
      for (size_t i = 0; i < d->n_requirements; i++)
        {
          const LwDesignRequirement *q = &d->requirements[i];
          const char *unit = lw_req_kind_unit (q->req.kind);
          cellf (&t, "%s", lw_design_requirement_title (q));
          cell_take (&t, lw_requirement_target_text (&q->req), false);
          const LwReqResult *res = &rv->req[i];
          if (res->status == LW_REQ_NOT_AVAILABLE || isnan (res->achieved))
            cellf (&t, "n/a");
          else
            {
              g_autofree char *a = num6 (true, res->achieved);
              cellf (&t, "%s%s%s", a, strcmp (unit, "%") == 0 ? "" : " ", unit);
            }
          cellf (&t, "%s", res->status == LW_REQ_PASS ? "pass"
                           : res->status == LW_REQ_FAIL ? "FAIL" : "not available");
        }
      table_end (&t);
      para (r, "%zu of %zu requirement(s) pass.", d->n_requirements - (size_t) rv->failing,
            d->n_requirements);
    }

  heading (r, 3, NULL, "Margins");
  {
    TableFill t = table_begin (r, "margins", v->name, 3,
                               (const char *const[]) { "figure", "value", "at (rad/s)" });
    cellf (&t, "phase margin (deg)");
    cell_take (&t, num6 (m->has_phase_margin, m->phase_margin_deg), false);
    cell_take (&t, num6 (m->has_phase_margin, m->gain_crossover_rad_s), false);
    cellf (&t, "gain margin (dB)");
    cell_take (&t, num6 (m->has_gain_margin, m->gain_margin_db), false);
    cell_take (&t, num6 (m->has_gain_margin, m->phase_crossover_rad_s), false);
    cellf (&t, "delay margin (s)");
    cell_take (&t, num6 (m->has_delay_margin, m->delay_margin_s), false);
    cell_take (&t, g_strdup (""), false);
    cellf (&t, "delay margin (samples)");
    cell_take (&t, num6 (m->has_delay_margin, m->delay_margin_samples), false);
    cell_take (&t, g_strdup (""), false);
    cellf (&t, "sensitivity peak max|S| (ratio)");
    cell_take (&t, num6 (m->has_sensitivity, m->sensitivity_peak), false);
    cell_take (&t, num6 (m->has_sensitivity, m->sensitivity_peak_rad_s), false);
    cellf (&t, "closed-loop bandwidth (rad/s)");
    cell_take (&t, num6 (m->has_bandwidth, m->bandwidth_rad_s), false);
    cell_take (&t, g_strdup (""), false);
    cellf (&t, "closed loop");
    cellf (&t, "%s", ev->stable ? "stable" : "UNSTABLE");
    cell_take (&t, g_strdup (""), false);
    table_end (&t);
  }
  if (m->n_gain_crossovers > 1 || m->n_phase_crossovers > 1)
    {
      GString *s = g_string_new ("Every crossover up to π/T: gain crossovers (phase margin)");
      for (size_t i = 0; i < m->n_gain_crossovers; i++)
        g_string_append_printf (s, "%s %.6g rad/s (%.4g deg)", i ? "," : "",
                                m->gain_crossovers_rad_s[i], m->phase_margins_deg[i]);
      g_string_append (s, "; phase crossovers (gain margin)");
      for (size_t i = 0; i < m->n_phase_crossovers; i++)
        g_string_append_printf (s, "%s %.6g rad/s (%.4g dB)", i ? "," : "",
                                m->phase_crossovers_rad_s[i], m->gain_margins_db[i]);
      g_string_append_c (s, '.');
      add_block (r, LW_REPORT_PARAGRAPH, s->str);
      g_string_free (s, TRUE);
    }

  heading (r, 3, NULL, "Responses and performance indices");
  {
    const LwStep *st = &ev->step;
    TableFill t = table_begin (r, "performance", v->name, 4,
                               (const char *const[]) { "figure", "reference step", "input disturbance", "output disturbance" });
    cellf (&t, "overshoot (%%)");
    cell_take (&t, num6 (st->has_overshoot, st->overshoot_pct), false);
    cell_take (&t, g_strdup (""), false);
    cell_take (&t, g_strdup (""), false);
    cellf (&t, "rise time (s)");
    cell_take (&t, num6 (st->has_rise, st->rise_time_s), false);
    cell_take (&t, g_strdup (""), false);
    cell_take (&t, g_strdup (""), false);
    cellf (&t, "settling time, 2 %% (s)");
    cell_take (&t, num6 (st->has_settling, st->settling_time_s), false);
    cell_take (&t, g_strdup (""), false);
    cell_take (&t, g_strdup (""), false);
    cellf (&t, "peak output");
    cell_take (&t, num6 (true, rv->ref->peak), false);
    cell_take (&t, num6 (true, rv->din->peak), false);
    cell_take (&t, num6 (true, rv->dout->peak), false);
    cellf (&t, "peak actuator |u|");
    cell_take (&t, num6 (true, rv->actuator_peak), false);
    cell_take (&t, g_strdup (""), false);
    cell_take (&t, g_strdup (""), false);
    const LwSimResponse *rs[3] = { rv->ref, rv->din, rv->dout };
    const char *names[4] = { "IAE", "ISE", "ITAE", "control effort" };
    for (int i = 0; i < 4; i++)
      {
        cellf (&t, "%s", names[i]);
        for (int j = 0; j < 3; j++)
          {
            const LwSimIndices *ix = &rs[j]->indices;
            double val = i == 0 ? ix->iae : i == 1 ? ix->ise : i == 2 ? ix->itae
                                                                      : ix->control_effort;
            cell_take (&t, num6 (true, val), false);
          }
      }
    table_end (&t);
    para (r, "Unit steps over %zu samples (%.6g s), without actuator limits; indices are "
          "T·Σ|e|, T·Σe², T·Σ(kT)|e| and T·Σu² (docs/simulation.md).", rv->ref->n,
          (double) (rv->ref->n - 1) * rv->e->period_s);
  }
}

/* ---- figures ---------------------------------------------------------------------------- */

static gboolean
add_figures (LwReport *r, const LwDesign *d, RVar *rv, size_t n, GError **error)
{
  heading (r, 2, "figures", "Figures");
  para (r, "Every variant of the report overlaid, each in its colour and dash; drawn by the "
        "same renderer as `loopwright-cli plot`.");
  LwFigureVariant fv[LW_PLOT_MAX_VARIANTS];
  LwPlotVariant pv[LW_PLOT_MAX_VARIANTS];
  size_t filled = 0;
  gboolean ok = TRUE;
  LwError err;
  lw_error_clear (&err);
  for (; filled < n; filled++)
    {
      if (lw_figure_variant_fill (&fv[filled], rv[filled].v->name, rv[filled].e->sampled,
                                  rv[filled].ev, &err) != LW_OK)
        {
          g_set_error (error, LW_REPORT_ERROR, LW_REPORT_ERROR_FAILED,
                       "report: internal failure: %s", err.message);
          ok = FALSE;
          goto out;
        }
      pv[filled] = fv[filled].v;
      /* a variant keeps the colour of its place in the document, as in the window; one
       * variant alone has the first colour */
      pv[filled].style = n > 1 ? (unsigned) ((size_t) (rv[filled].v - d->variants)
                                             % LW_PLOT_MAX_VARIANTS) + 1
                               : 0;
      /* the continuous output between samples and the actuator signal, from the simulation */
      const LwSimResponse *s = rv[filled].ref;
      if (s->has_continuous)
        {
          pv[filled].step.n_fine = s->n_fine;
          pv[filled].step.t_fine_s = s->t_fine_s;
          pv[filled].step.y_fine = s->y_fine;
        }
      pv[filled].step.u = s->u;
    }
  /* the design's requirement marks, as the window and `plot` draw them */
  LwPlotRequirements marks;
  lw_figure_requirements (&marks, rv[0].ev->period_s, false, 0.0, false, 0.0);
  for (size_t i = 0; i < d->n_requirements; i++)
    lw_figure_requirements_add (&marks, rv[0].ev->period_s, &d->requirements[i].req);
  static const struct { LwPlotView view; const char *caption; double h; } figs[] = {
    { LW_PLOT_VIEW_BODE_Z, "Bode diagram of the loop L in z, up to the Nyquist frequency π/T", FIG_H },
    { LW_PLOT_VIEW_BODE_W, "Bode diagram of the loop in the w-plane (over ν), with straight-line asymptotes", FIG_H },
    { LW_PLOT_VIEW_STEP, "Unit step response: samples held, the continuous output between samples, and the actuator signal", FIG_H },
    { LW_PLOT_VIEW_NYQUIST, "Nyquist diagram of L with the unit circle and the critical point −1", FIG_H },
  };
  for (size_t f = 0; f < G_N_ELEMENTS (figs); f++)
    {
      LwPlotInput in = { 0 };
      in.view = figs[f].view;
      in.nyquist_rad_s = G_PI / rv[0].ev->period_s;
      in.n_variants = n;
      in.variants = pv;
      in.req = marks;
      char msg[256];
      LwPlot *p = lw_plot_new (&in, msg, sizeof msg);
      if (p == NULL)
        {
          g_set_error (error, LW_REPORT_ERROR, LW_REPORT_ERROR_FAILED, "report: figure '%s': %s",
                       lw_plot_view_name (figs[f].view), msg);
          ok = FALSE;
          goto out;
        }
      LwReportBlock *b = add_block (r, LW_REPORT_FIGURE, figs[f].caption);
      b->id = g_strdup (lw_plot_view_name (figs[f].view));
      b->plot = p;
      b->fig_width = FIG_W;
      b->fig_height = figs[f].h;
    }
out:
  for (size_t i = 0; i < filled; i++)
    lw_figure_variant_clear (&fv[i]);
  return ok;
}

/* ---- comparison ------------------------------------------------------------------------- */

typedef struct
{
  const char *name;
  int better;          /* +1 higher is better, −1 lower is better, 0 neither */
} Metric;

/* The value of metric i for variant rv (has false when there is none). */
static double
metric_value (size_t i, const RVar *rv, bool *has)
{
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
};

static void
add_comparison (LwReport *r, const LwDesign *d, const RVar *rv, size_t n)
{
  heading (r, 2, "comparison", "Comparison of the variants");
  para (r, "One column per variant; the better value of each row is in bold and marked ▲ "
        "(higher is better for margins, crossover and bandwidth, lower for the rest; no mark "
        "when all are equal). In parentheses: the difference from the first column, “%s”.",
        rv[0].v->name);
  const char **header = g_new0 (const char *, n + 1);
  header[0] = "figure";
  for (size_t k = 0; k < n; k++)
    header[k + 1] = rv[k].v->name;
  TableFill t = table_begin (r, "comparison", NULL, n + 1, header);
  g_free (header);
  for (size_t i = 0; i < G_N_ELEMENTS (metrics); i++)
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
      cellf (&t, "%s", metrics[i].name);
      for (size_t k = 0; k < n; k++)
        {
          char *text = num6 (has[k], val[k]);
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
          cell_take (&t, text, is_best);
        }
    }
  /* the requirements, pass or fail per variant */
  for (size_t i = 0; i < d->n_requirements; i++)
    {
      cellf (&t, "requirement: %s", lw_design_requirement_title (&d->requirements[i]));
      for (size_t k = 0; k < n; k++)
        {
          LwReqStatus s = rv[k].req[i].status;
          cellf (&t, "%s", s == LW_REQ_PASS ? "pass" : s == LW_REQ_FAIL ? "FAIL" : "n/a");
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
      cellf (&t, "requirements passed");
      for (size_t k = 0; k < n; k++)
        {
          size_t p = d->n_requirements - (size_t) rv[k].failing;
          bool is_best = differ && p == most;
          cell_take (&t, g_strdup_printf ("%zu of %zu%s", p, d->n_requirements,
                                          is_best ? " ▲" : ""), is_best);
        }
    }
  table_end (&t);
}

/* ---- the whole report ------------------------------------------------------------------- */

LwReport *
lw_report_build (const char *path, const LwDesign *d, const size_t *which, size_t n,
                 const char *date, GError **error)
{
  g_return_val_if_fail (n >= 1 && n <= LW_PLOT_MAX_VARIANTS, NULL);
  g_return_val_if_fail (error == NULL || *error == NULL, NULL);
  RVar rv[LW_PLOT_MAX_VARIANTS];
  memset (rv, 0, sizeof rv);
  gboolean ok = TRUE;
  for (size_t k = 0; k < n && ok; k++)
    ok = rvar_compute (path, d, which[k], &rv[k], error);
  LwReport *r = g_new0 (LwReport, 1);
  r->title = g_strdup (d->title[0] ? d->title : "Untitled design");
  r->author = g_strdup (d->author);
  r->date = g_strdup (date);
  r->blocks = g_ptr_array_new_with_free_func (block_free);
  if (!ok)
    goto out;

  section_design (r, path, d, n);
  section_plant (r, d, &rv[0]);
  for (size_t k = 0; k < n; k++)
    section_variant (r, d, &rv[k], k);
  ok = add_figures (r, d, rv, n, error);
  if (!ok)
    goto out;
  add_comparison (r, d, rv, n);
  heading (r, 2, "caution", "Caution");
  add_block (r, LW_REPORT_CAUTION, LW_REPORT_CAUTION_TEXT);
  para (r, "Written by " LW_REPORT_GENERATOR " from %s.", d->title[0] ? d->title
                                                                     : "an untitled design");
out:
  for (size_t k = 0; k < n; k++)
    rvar_clear (&rv[k]);
  if (!ok)
    {
      lw_report_free (r);
      return NULL;
    }
  return r;
}

gboolean
lw_report_date_from_environment (char **out, GError **error)
{
  *out = NULL;
  const char *e = g_getenv ("SOURCE_DATE_EPOCH");
  if (e == NULL || *e == '\0')
    return TRUE;
  /* whole seconds, decimal digits only, up to 9999-12-31T23:59:59Z */
  gboolean digits = TRUE;
  for (const char *c = e; *c != '\0'; c++)
    digits = digits && g_ascii_isdigit (*c);
  guint64 secs = 0;
  if (!digits || strlen (e) > 12
      || !g_ascii_string_to_unsigned (e, 10, 0, G_GUINT64_CONSTANT (253402300799), &secs, NULL))
    {
      g_set_error (error, LW_REPORT_ERROR, LW_REPORT_ERROR_BAD_INPUT,
                   "SOURCE_DATE_EPOCH: '%s' is not a whole number of seconds from 0 to "
                   "253402300799", e);
      return FALSE;
    }
  g_autoptr (GDateTime) dt = g_date_time_new_from_unix_utc ((gint64) secs);
  *out = g_date_time_format (dt, "%Y-%m-%d");
  return TRUE;
}

bool
lw_report_write_file (const LwReport *r, const char *path, size_t *len, GError **error)
{
  g_autofree char *lower = g_ascii_strdown (path, -1);
  unsigned char *bytes = NULL;
  size_t n = 0;
  if (g_str_has_suffix (lower, ".pdf"))
    {
      if (!lw_report_pdf (r, &bytes, &n, error))
        {
          g_prefix_error (error, "%s: ", path);
          return false;
        }
    }
  else
    bytes = (unsigned char *) lw_report_html (r, &n);
  /* whole or not at all, a link followed; the message names path (lw-file-write.h) */
  gboolean ok = lw_file_replace (path, bytes, n, error);
  g_free (bytes);
  if (ok && len != NULL)
    *len = n;
  return ok;
}
