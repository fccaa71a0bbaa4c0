/* lw-report-build.c — the design report built: every variant evaluated by the engine (margins,
 * step and disturbance simulations, requirements, implementation forms) and its sections
 * formatted once; the figures and the comparison are in lw-report-compare.c, the block
 * helpers in lw-report-blocks.c. See lw-report.h and docs/report.md.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-file-write.h"
#include "lw-report-private.h"
#include "lw-simulate.h"

G_DEFINE_QUARK (lw-report-error-quark, lw_report_error)

void
lwr_rvar_clear (RVar *r)
{
  lw_variant_eval_unref (r->e);
  lw_diffeq_free (r->de);
  lw_sos_free (r->sos);
  memset (r, 0, sizeof *r);
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
  /* a design without a plant model is reported on its data (LW_EVAL_NO_MODEL: no model loop,
   * no simulations; the controller, the loop on the data and the requirements are set) */
  gboolean no_model = e->failure == LW_EVAL_NO_MODEL;
  const GError *failure = no_model ? NULL
                          : e->failure != LW_EVAL_OK ? e->error
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
  lwr_heading (r, 1, "title", d->title[0] ? d->title : "Untitled design");
  lwr_heading (r, 2, "design", "Design");
  TableFill t = lwr_table_begin (r, "design", NULL, 2, (const char *const[]) { "item", "value" });
  lwr_cellf (&t, "author");
  lwr_cellf (&t, "%s", d->author ? d->author : "not stated");
  lwr_cellf (&t, "date");
  lwr_cellf (&t, "%s", r->date ? r->date : "not stated");
  lwr_cellf (&t, "document");
  g_autofree char *base = g_path_get_basename (path);
  lwr_cellf (&t, "%s", base);
  lwr_cellf (&t, "variants in this report");
  lwr_cellf (&t, "%zu of %zu", n, d->n_variants);
  lwr_cellf (&t, "active variant");
  lwr_cellf (&t, "%s", d->variants[d->active].name);
  lwr_table_end (&t);
  if (d->notes != NULL && d->notes[0] != '\0')
    {
      lwr_heading (r, 3, "notes", "Notes");
      lwr_para (r, "%s", d->notes);
    }
}

/* The plant model in s, z and w, with the cautions on its factored forms. */
static void
plant_model (LwReport *r, const LwDesign *d, const RVar *v0)
{
  const LwEvaluation *ev = v0->ev;
  if (ev == NULL)
    {
      lwr_para (r, "No plant model: the analysis uses the measured response (below). The step "
                "and disturbance responses, the closed-loop poles and the code's margins "
                "after quantization need a model and are not available; fit one to the data "
                "(docs/measured-data.md, Model fit).");
      return;
    }
  lwr_para (r, "The plant as typed: P(s) = %s. Its zero-order-hold equivalent in z includes the "
        "dead time (poles at z = 0) but not the computation delay; the w-plane model is the "
        "bilinear image w = (2/T)(z − 1)/(z + 1), its roots in rad/s of ν.", d->plant);
  lwr_formula (r, "P(s) = ", v0->e->plant_s);
  lwr_formula (r, "P(z) = ", ev->plant_z);
  lwr_formula (r, "P(w) = ", ev->plant_w);
  double form_error = fmax (v0->e->plant_z_form_error, v0->e->plant_w_form_error);
  if (isnan (v0->e->plant_z_form_error) || isnan (v0->e->plant_w_form_error))
    lwr_para (r, "Caution: the factored forms P(z) and P(w) above could not be checked against "
              "the sampled plant (its own response is not resolved in double precision here); "
              "do not use them for implementation. Every margin, response and figure in this "
              "report is computed from the plant's own response.");
  else if (form_error > LW_FORM_TOLERANCE)
    lwr_para (r, "Caution: the factored forms P(z) and P(w) above are ill-conditioned here (high "
              "relative degree, fast sampling or stiff scaling): they differ from the sampled "
              "plant by up to %.2g relative, so they are not the plant and must not be used "
              "for implementation. Every margin, response and figure in this report is "
              "computed from the plant's own response, not from these factors.", form_error);
}

static void
section_plant (LwReport *r, const LwDesign *d, const RVar *v0)
{
  lwr_heading (r, 2, "plant", "Plant and sampling");
  plant_model (r, d, v0);
  TableFill t = lwr_table_begin (r, "sampling", NULL, 2, (const char *const[]) { "item", "value" });
  lwr_cellf (&t, "sample period T");
  lwr_cellf (&t, "%.6g s (%.6g Hz)", d->period_s, 1.0 / d->period_s);
  lwr_cellf (&t, "Nyquist frequency π/T");
  lwr_cellf (&t, "%.6g rad/s", G_PI / d->period_s);
  lwr_cellf (&t, "hold");
  lwr_cellf (&t, "zero-order");
  lwr_cellf (&t, "computation delay N");
  lwr_cellf (&t, "%d sample(s) = %.6g s", d->compute_delay, d->compute_delay * d->period_s);
  lwr_cellf (&t, "plant dead time");
  lwr_cellf (&t, "%.6g s = %.6g sample(s)", d->dead_time_s, d->dead_time_s / d->period_s);
  if (d->input_unit != NULL || d->output_unit != NULL)
    {
      lwr_cellf (&t, "plant units");
      lwr_cellf (&t, "input u in %s, output y in %s",
                 d->input_unit != NULL ? d->input_unit : "(not given)",
                 d->output_unit != NULL ? d->output_unit : "(not given)");
    }
  lwr_cellf (&t, "loop");
  lwr_cellf (&t, "L(z) = z^−%d · C(z) · P(z), unity negative feedback", d->compute_delay);
  lwr_table_end (&t);
}

static void
section_variant (LwReport *r, const LwDesign *d, const RVar *rv, size_t k)
{
  const LwDesignVariant *v = rv->v;
  const LwEvaluation *ev = rv->ev;
  g_autofree char *id = g_strdup_printf ("variant-%zu", k + 1);
  g_autofree char *title = g_strdup_printf ("Variant “%s”", v->name);
  lwr_heading (r, 2, id, title);
  if (v->notes != NULL && v->notes[0] != '\0')
    lwr_para (r, "%s", v->notes);
  if (v->has_period)
    lwr_para (r, "This variant is sampled at its own period T = %.6g s (%.6g Hz, Nyquist frequency "
          "π/T = %.6g rad/s) instead of the design's %.6g s; the computation delay of %d "
          "sample(s) is then %.6g s.", v->period_s, 1.0 / v->period_s, G_PI / v->period_s,
          d->period_s, d->compute_delay, d->compute_delay * v->period_s);

  lwr_heading (r, 3, NULL, "Stages");
  if (v->n_stages == 0)
    lwr_para (r, "No stages: the controller is 1.");
  else
    {
      TableFill t = lwr_table_begin (r, "stages", v->name, 4,
                                 (const char *const[]) { "#", "stage", "state", "parameters (w-plane, ν in rad/s)" });
      for (size_t i = 0; i < v->n_stages; i++)
        {
          const LwStage *st = &v->stages[i];
          lwr_cellf (&t, "%zu", i + 1);
          lwr_cellf (&t, "%s%s%s", st->label[0] ? st->label : lw_stage_kind_name (st->kind),
                 st->label[0] ? " — " : "", st->label[0] ? lw_stage_kind_name (st->kind) : "");
          lwr_cellf (&t, "%s", st->enabled ? "on" : "off");
          LwStageParam p[LW_STAGE_MAX_PARAMS];
          size_t np = lw_stage_params (st, p);
          GString *s = g_string_new (NULL);
          for (size_t j = 0; j < np; j++)
            {
              bool unit = p[j].unit[0] != '\0' && strcmp (p[j].unit, "ratio") != 0;
              g_string_append_printf (s, "%s%s %.6g%s%s", j ? ", " : "", p[j].name, p[j].value,
                                      unit ? " " : "", unit ? p[j].unit : "");
            }
          lwr_cell_take (&t, g_string_free (s, FALSE), false);
        }
      lwr_table_end (&t);
    }

  lwr_heading (r, 3, NULL, "Controller");
  lwr_formula (r, "C(w) = ", rv->e->controller_w);
  lwr_formula (r, "C(z) = ", rv->e->controller_z);

  lwr_heading (r, 3, NULL, "Difference equation");
  lwr_para (r, "u[k] = Σ b[i]·e[k−i] − Σ a[i]·u[k−i], order %zu, coefficients to 17 significant "
        "digits (the computation delay is realized by the firmware's timing, not here).",
        rv->de->order);
  {
    TableFill t = lwr_table_begin (r, "difference", v->name, 3,
                               (const char *const[]) { "i", "b[i]", "a[i]" });
    for (size_t i = 0; i <= rv->de->order; i++)
      {
        lwr_cellf (&t, "%zu", i);
        lwr_cellf (&t, "%.17g", rv->de->b[i]);
        lwr_cellf (&t, "%.17g", rv->de->a[i]);
      }
    lwr_table_end (&t);
  }

  lwr_heading (r, 3, NULL, "Second-order sections");
  lwr_para (r, "H_k(z) = (b0 + b1 z^−1 + b2 z^−2) / (1 + a1 z^−1 + a2 z^−2), applied in this "
        "order (docs/implementation.md).");
  {
    TableFill t = lwr_table_begin (r, "sections", v->name, 5,
                               (const char *const[]) { "section", "b0, b1, b2", "a1, a2", "poles", "peak gain" });
    for (size_t i = 0; i < rv->sos->n; i++)
      {
        const LwSection *s = &rv->sos->s[i];
        lwr_cellf (&t, "%zu (order %d)", i + 1, s->order);
        lwr_cellf (&t, "%.17g\n%.17g\n%.17g", s->b[0], s->b[1], s->b[2]);
        lwr_cellf (&t, "%.17g\n%.17g", s->a[1], s->a[2]);
        GString *p = g_string_new (NULL);
        for (size_t j = 0; j < s->n_poles; j++)
          {
            g_autofree char *c = lwr_complex_text (s->poles[j]);
            g_string_append_printf (p, "%s%s", j ? "\n" : "", c);
          }
        if (s->n_poles == 0)
          g_string_append (p, "none");
        lwr_cell_take (&t, g_string_free (p, FALSE), false);
        lwr_cell_take (&t, lwr_num6 (isfinite (s->peak_gain), s->peak_gain), false);
      }
    lwr_table_end (&t);
  }

  lwr_heading (r, 3, NULL, "Requirements");
  if (d->n_requirements == 0)
    lwr_para (r, "The design states no requirements.");
  else
    {
      /* with a measurement, a column says what each verdict was judged on */
      bool on = d->measured != NULL;
      TableFill t = lwr_table_begin (r, "requirements", v->name, on ? 5 : 4,
                                 (const char *const[]) { "requirement", "target", "achieved",
                                                         "result", "judged on" });
      for (size_t i = 0; i < d->n_requirements; i++)
        {
          const LwDesignRequirement *q = &d->requirements[i];
          const char *unit = lw_req_kind_unit (q->req.kind);
          lwr_cellf (&t, "%s", lw_design_requirement_title (q));
          lwr_cell_take (&t, lw_requirement_target_text (&q->req), false);
          const LwReqResult *res = &rv->req[i];
          if (res->status == LW_REQ_NOT_AVAILABLE || isnan (res->achieved))
            lwr_cellf (&t, "n/a");
          else
            {
              g_autofree char *a = lwr_num6 (true, res->achieved);
              lwr_cellf (&t, "%s%s%s", a, strcmp (unit, "%") == 0 ? "" : " ", unit);
            }
          lwr_cellf (&t, "%s", res->status == LW_REQ_PASS ? "pass"
                           : res->status == LW_REQ_FAIL ? "FAIL" : "not available");
          if (on)
            lwr_cellf (&t, "%s", d->measured_analysis == LW_DESIGN_ANALYSIS_DATA
                                   && lw_req_kind_from_frequency_response (q->req.kind)
                                 ? "measured data" : rv->ev != NULL ? "model" : "needs a plant model");
        }
      lwr_table_end (&t);
      lwr_para (r, "%zu of %zu requirement(s) pass.", d->n_requirements - (size_t) rv->failing,
            d->n_requirements);
    }

  lwr_measured_variant (r, d, rv);
  if (ev == NULL)
    {
      lwr_heading (r, 3, NULL, "Margins of the model");
      lwr_para (r, "Not available without a plant model: the closed-loop poles and stability, "
                "the step and disturbance responses and the performance indices need one.");
      return;
    }
  lwr_heading (r, 3, NULL, d->measured != NULL ? "Margins of the model" : "Margins");
  if (d->measured != NULL)
    lwr_para (r, "The model's loop, over its own frequency grid up to π/T; the closed-loop "
              "poles (stability), the responses below and the implementation's figures are "
              "the model's alone: measured data cannot give them.");
  {
    const LwMargins *m = &ev->margins;
    TableFill t = lwr_table_begin (r, "margins", v->name, 3,
                               (const char *const[]) { "figure", "value", "at (rad/s)" });
    lwr_cellf (&t, "phase margin (deg)");
    lwr_cell_take (&t, lwr_num6 (m->has_phase_margin, m->phase_margin_deg), false);
    lwr_cell_take (&t, lwr_num6 (m->has_phase_margin, m->gain_crossover_rad_s), false);
    lwr_cellf (&t, "gain margin (dB)");
    lwr_cell_take (&t, lwr_num6 (m->has_gain_margin, m->gain_margin_db), false);
    lwr_cell_take (&t, lwr_num6 (m->has_gain_margin, m->phase_crossover_rad_s), false);
    lwr_cellf (&t, "delay margin (s)");
    lwr_cell_take (&t, lwr_num6 (m->has_delay_margin, m->delay_margin_s), false);
    lwr_cell_take (&t, g_strdup (""), false);
    lwr_cellf (&t, "delay margin (samples)");
    lwr_cell_take (&t, lwr_num6 (m->has_delay_margin, m->delay_margin_samples), false);
    lwr_cell_take (&t, g_strdup (""), false);
    lwr_cellf (&t, "sensitivity peak max|S| (ratio)");
    lwr_cell_take (&t, lwr_num6 (m->has_sensitivity, m->sensitivity_peak), false);
    lwr_cell_take (&t, lwr_num6 (m->has_sensitivity, m->sensitivity_peak_rad_s), false);
    lwr_cellf (&t, "closed-loop bandwidth (rad/s)");
    lwr_cell_take (&t, lwr_num6 (m->has_bandwidth, m->bandwidth_rad_s), false);
    lwr_cell_take (&t, g_strdup (""), false);
    lwr_cellf (&t, "closed loop");
    lwr_cellf (&t, "%s", ev->stable ? "stable" : "UNSTABLE");
    lwr_cell_take (&t, g_strdup (""), false);
    lwr_table_end (&t);
  }
  const LwMargins *m = &ev->margins;
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
      lwr_add_block (r, LW_REPORT_PARAGRAPH, s->str);
      g_string_free (s, TRUE);
    }

  lwr_heading (r, 3, NULL, "Responses and performance indices");
  {
    const LwStep *st = &ev->step;
    TableFill t = lwr_table_begin (r, "performance", v->name, 4,
                               (const char *const[]) { "figure", "reference step", "input disturbance", "output disturbance" });
    lwr_cellf (&t, "overshoot (%%)");
    lwr_cell_take (&t, lwr_num6 (st->has_overshoot, st->overshoot_pct), false);
    lwr_cell_take (&t, g_strdup (""), false);
    lwr_cell_take (&t, g_strdup (""), false);
    lwr_cellf (&t, "rise time (s)");
    lwr_cell_take (&t, lwr_num6 (st->has_rise, st->rise_time_s), false);
    lwr_cell_take (&t, g_strdup (""), false);
    lwr_cell_take (&t, g_strdup (""), false);
    lwr_cellf (&t, "settling time, 2 %% (s)");
    lwr_cell_take (&t, lwr_num6 (st->has_settling, st->settling_time_s), false);
    lwr_cell_take (&t, g_strdup (""), false);
    lwr_cell_take (&t, g_strdup (""), false);
    lwr_cellf (&t, "peak output");
    lwr_cell_take (&t, lwr_num6 (true, rv->ref->peak), false);
    lwr_cell_take (&t, lwr_num6 (true, rv->din->peak), false);
    lwr_cell_take (&t, lwr_num6 (true, rv->dout->peak), false);
    lwr_cellf (&t, "peak actuator |u|");
    lwr_cell_take (&t, lwr_num6 (true, rv->actuator_peak), false);
    lwr_cell_take (&t, g_strdup (""), false);
    lwr_cell_take (&t, g_strdup (""), false);
    const LwSimResponse *rs[3] = { rv->ref, rv->din, rv->dout };
    const char *names[4] = { "IAE", "ISE", "ITAE", "control effort" };
    for (int i = 0; i < 4; i++)
      {
        lwr_cellf (&t, "%s", names[i]);
        for (int j = 0; j < 3; j++)
          {
            const LwSimIndices *ix = &rs[j]->indices;
            double val = i == 0 ? ix->iae : i == 1 ? ix->ise : i == 2 ? ix->itae
                                                                      : ix->control_effort;
            lwr_cell_take (&t, lwr_num6 (true, val), false);
          }
      }
    lwr_table_end (&t);
    lwr_para (r, "Unit steps over %zu samples (%.6g s), without actuator limits; indices are "
          "T·Σ|e|, T·Σe², T·Σ(kT)|e| and T·Σu² (docs/simulation.md).", rv->ref->n,
          (double) (rv->ref->n - 1) * rv->e->period_s);
  }
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
  RFamily rf;
  memset (&rf, 0, sizeof rf);
  gboolean ok = TRUE;
  for (size_t k = 0; k < n && ok; k++)
    ok = rvar_compute (path, d, which[k], &rv[k], error);
  if (ok)
    ok = lwr_family_compute (d, rv, n, &rf, error);
  LwReport *r = g_new0 (LwReport, 1);
  r->title = g_strdup (d->title[0] ? d->title : "Untitled design");
  r->author = g_strdup (d->author);
  r->date = g_strdup (date);
  r->blocks = g_ptr_array_new_with_free_func (lwr_block_free);
  if (!ok)
    goto out;

  section_design (r, path, d, n);
  section_plant (r, d, &rv[0]);
  lwr_section_measured (r, d, &rv[0]);
  for (size_t k = 0; k < n; k++)
    section_variant (r, d, &rv[k], k);
  lwr_section_family (r, d, rv, &rf);
  lwr_section_measured_family (r, d, rv, n);
  ok = lwr_add_figures (r, d, rv, n, &rf, error);
  if (!ok)
    goto out;
  lwr_add_comparison (r, d, rv, n);
  lwr_heading (r, 2, "caution", "Caution");
  lwr_add_block (r, LW_REPORT_CAUTION, LW_REPORT_CAUTION_TEXT);
  lwr_para (r, "Written by " LW_REPORT_GENERATOR " from %s.", d->title[0] ? d->title
                                                                     : "an untitled design");
out:
  lwr_family_clear (&rf);
  for (size_t k = 0; k < n; k++)
    lwr_rvar_clear (&rv[k]);
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
