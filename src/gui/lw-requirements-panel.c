/* lw-requirements-panel.c — requirements and loop figures.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>

#include <glib/gi18n.h>

#include "lw-gui-util.h"
#include "lw-number-field.h"
#include "lw-family-summary.h"
#include "lw-measured-family-summary.h"
#include "lw-requirements-panel.h"

struct _LwRequirementsPanel
{
  GtkWidget parent_instance;

  GtkGrid *req_grid;
  GtkGrid *figure_grid;
  GtkLabel *family_label;
  GtkLabel *measured_label;     /* the measured family's worst cases */

  LwDesignModel *model;
  GSignalGroup *model_signals;   /* the model's signals, following self->model */
  GPtrArray *achieved_labels;   /* per requirement */
  GPtrArray *result_labels;
  GtkLabel *figure_titles[16];
  GtkLabel *figure_values[16];
  gboolean filling;
};

G_DEFINE_FINAL_TYPE (LwRequirementsPanel, lw_requirements_panel, GTK_TYPE_WIDGET)

static const char *
req_title (LwReqKind kind)
{
  switch (kind)
    {
    case LW_REQ_MIN_PHASE_MARGIN: return _("Phase margin ≥");
    case LW_REQ_MIN_GAIN_MARGIN: return _("Gain margin ≥");
    case LW_REQ_MAX_SENSITIVITY: return _("Sensitivity peak ≤");
    case LW_REQ_CROSSOVER_RANGE: return _("Crossover within");
    case LW_REQ_MAX_STEP_ERROR: return _("Step error ≤");
    case LW_REQ_MAX_RAMP_ERROR: return _("Ramp error ≤");
    case LW_REQ_MAX_OVERSHOOT: return _("Overshoot ≤");
    case LW_REQ_MAX_RISE_TIME: return _("Rise time ≤");
    case LW_REQ_MAX_SETTLING_TIME: return _("Settling time ≤");
    case LW_REQ_MAX_ACTUATOR: return _("Actuator peak ≤");
    }
  return "?";
}

/* A new requirement's limits: figures commonly asked of a servo loop (common practice, no
 * source); the engineer edits them. */
static LwRequirement
new_requirement (LwReqKind kind)
{
  LwRequirement r = { .kind = kind, .limit = 1.0, .limit_hi = 0.0 };
  switch (kind)
    {
    case LW_REQ_MIN_PHASE_MARGIN: r.limit = 45.0; break;
    case LW_REQ_MIN_GAIN_MARGIN: r.limit = 6.0; break;
    case LW_REQ_MAX_SENSITIVITY: r.limit = 2.0; break;
    case LW_REQ_CROSSOVER_RANGE: r.limit = 10.0; r.limit_hi = 100.0; break;
    case LW_REQ_MAX_STEP_ERROR: r.limit = 0.01; break;
    case LW_REQ_MAX_RAMP_ERROR: r.limit = 0.1; break;
    case LW_REQ_MAX_OVERSHOOT: r.limit = 20.0; break;
    case LW_REQ_MAX_RISE_TIME: r.limit = 0.1; break;
    case LW_REQ_MAX_SETTLING_TIME: r.limit = 0.5; break;
    case LW_REQ_MAX_ACTUATOR: r.limit = 10.0; break;
    }
  return r;
}

static void
target_changed (GtkSpinButton *spin, LwRequirementsPanel *self)
{
  if (self->filling)
    return;
  guint i = GPOINTER_TO_UINT (g_object_get_data (G_OBJECT (spin), "lw-req-index"));
  gboolean hi = g_object_get_data (G_OBJECT (spin), "lw-req-hi") != NULL;
  LwRequirement r = *lw_design_model_get_requirement (self->model, i);
  if (hi)
    r.limit_hi = gtk_spin_button_get_value (spin);
  else
    r.limit = gtk_spin_button_get_value (spin);
  lw_design_model_set_requirement (self->model, i, &r);
}

static GtkWidget *
target_spin (LwRequirementsPanel *self, guint i, double value, gboolean hi, GtkLabel *problem,
             const char *name)
{
  GtkAdjustment *adj = gtk_adjustment_new (value, -1e9, 1e9, 0.1, 1.0, 0.0);
  GtkWidget *spin = gtk_spin_button_new (adj, 0.0, 3);
  lw_gui_spin_wheel_off (GTK_SPIN_BUTTON (spin));
  lw_number_field_setup (GTK_SPIN_BUTTON (spin), name, problem);
  gtk_editable_set_width_chars (GTK_EDITABLE (spin), 7);
  g_object_set_data (G_OBJECT (spin), "lw-req-index", GUINT_TO_POINTER (i));
  if (hi)
    g_object_set_data (G_OBJECT (spin), "lw-req-hi", GINT_TO_POINTER (1));
  g_signal_connect (spin, "value-changed", G_CALLBACK (target_changed), self);
  return spin;
}

static GtkWidget *
cell (const char *text, float xalign, const char *css)
{
  GtkWidget *l = gtk_label_new (text);
  gtk_label_set_xalign (GTK_LABEL (l), xalign);
  if (css != NULL)
    gtk_widget_add_css_class (l, css);
  return l;
}

static void
clear_grid (GtkGrid *grid)
{
  GtkWidget *child;
  while ((child = gtk_widget_get_first_child (GTK_WIDGET (grid))) != NULL)
    gtk_grid_remove (grid, child);
}

/* Requirements of the same kind more than once, and ranges that hold nothing: said in words
 * (NULL when the list is fine); g_free it. */
static char *
list_problems (LwRequirementsPanel *self)
{
  GString *s = g_string_new (NULL);
  guint n = lw_design_model_get_n_requirements (self->model);
  for (guint i = 0; i < n; i++)
    {
      const LwRequirement *r = lw_design_model_get_requirement (self->model, i);
      gboolean first = TRUE;
      for (guint j = 0; j < i; j++)
        if (lw_design_model_get_requirement (self->model, j)->kind == r->kind)
          first = FALSE;
      if (!first)
        continue;
      GString *same = g_string_new (NULL);
      guint count = 0;
      for (guint j = i; j < n; j++)
        if (lw_design_model_get_requirement (self->model, j)->kind == r->kind)
          {
            g_string_append_printf (same, "%s%u", count > 0 ? ", " : "", j + 1);
            count++;
          }
      if (count > 1)
        {
          /* TRANSLATORS: requirement kind, how often, then the rows (1-based) */
          g_autofree char *line = g_strdup_printf (_("“%s” appears %u times (rows %s): each is "
                                                     "judged on its own, the strictest "
                                                     "decides."),
                                                   req_title (r->kind), count, same->str);
          g_string_append_printf (s, "%s%s", s->len > 0 ? "\n" : "", line);
        }
      g_string_free (same, TRUE);
    }
  for (guint i = 0; i < n; i++)
    {
      const LwRequirement *r = lw_design_model_get_requirement (self->model, i);
      if (r->kind == LW_REQ_CROSSOVER_RANGE && !(r->limit < r->limit_hi))
        {
          g_autofree char *line = g_strdup_printf (_("Row %u: the crossover range %g … %g "
                                                     "rad/s holds no frequency; no loop can "
                                                     "meet it."),
                                                   i + 1, r->limit, r->limit_hi);
          g_string_append_printf (s, "%s%s", s->len > 0 ? "\n" : "", line);
        }
    }
  return g_string_free (s, s->len == 0);
}

static void
rebuild_requirements (LwRequirementsPanel *self)
{
  clear_grid (self->req_grid);
  g_ptr_array_set_size (self->achieved_labels, 0);
  g_ptr_array_set_size (self->result_labels, 0);

  gtk_grid_attach (self->req_grid, cell (_("Requirement"), 0, "dim-label"), 0, 0, 1, 1);
  gtk_grid_attach (self->req_grid, cell (_("Target"), 0, "dim-label"), 1, 0, 1, 1);
  gtk_grid_attach (self->req_grid, cell (_("Achieved"), 1, "dim-label"), 3, 0, 1, 1);
  gtk_grid_attach (self->req_grid, cell (_("Result"), 0, "dim-label"), 4, 0, 1, 1);

  self->filling = TRUE;
  guint n = lw_design_model_get_n_requirements (self->model);
  /* under the rows: a refused target, then what is wrong with the list itself */
  GtkLabel *problem = GTK_LABEL (cell (NULL, 0, "error"));
  gtk_label_set_wrap (problem, TRUE);
  gtk_widget_set_visible (GTK_WIDGET (problem), FALSE);
  gtk_grid_attach (self->req_grid, GTK_WIDGET (problem), 0, (int) n + 1, 5, 1);
  g_autofree char *list_note = list_problems (self);
  GtkWidget *note = cell (list_note, 0, "warning");
  gtk_label_set_wrap (GTK_LABEL (note), TRUE);
  gtk_widget_set_visible (note, list_note != NULL);
  gtk_grid_attach (self->req_grid, note, 0, (int) n + 2, 5, 1);
  for (guint i = 0; i < n; i++)
    {
      const LwRequirement *r = lw_design_model_get_requirement (self->model, i);
      int row = (int) i + 1;
      GtkWidget *title = cell (req_title (r->kind), 0, NULL);
      gtk_label_set_wrap (GTK_LABEL (title), TRUE);
      gtk_grid_attach (self->req_grid, title, 0, row, 1, 1);
      /* a range's two ends one above the other: the column stays one field wide, so the
       * panel keeps its width */
      GtkWidget *targets = gtk_box_new (r->kind == LW_REQ_CROSSOVER_RANGE
                                        ? GTK_ORIENTATION_VERTICAL : GTK_ORIENTATION_HORIZONTAL,
                                        2);
      gtk_box_append (GTK_BOX (targets),
                      target_spin (self, i, r->limit, FALSE, problem, req_title (r->kind)));
      if (r->kind == LW_REQ_CROSSOVER_RANGE)
        {
          gtk_box_append (GTK_BOX (targets),
                          target_spin (self, i, r->limit_hi, TRUE, problem, req_title (r->kind)));
        }
      gtk_grid_attach (self->req_grid, targets, 1, row, 1, 1);
      gtk_grid_attach (self->req_grid, cell (lw_req_kind_unit (r->kind), 0, "dim-label"), 2,
                       row, 1, 1);
      GtkWidget *achieved = cell ("—", 1, "numeric");
      GtkWidget *result = cell ("—", 0, NULL);
      /* texts that change with every evaluation wrap instead of widening the panel */
      gtk_label_set_wrap (GTK_LABEL (achieved), TRUE);
      gtk_label_set_wrap (GTK_LABEL (result), TRUE);
      gtk_grid_attach (self->req_grid, achieved, 3, row, 1, 1);
      gtk_grid_attach (self->req_grid, result, 4, row, 1, 1);
      g_ptr_array_add (self->achieved_labels, achieved);
      g_ptr_array_add (self->result_labels, result);
    }
  self->filling = FALSE;
}

/* ---- where a figure comes from ------------------------------------------------------------ */

static const char data_tip[]
  = N_("From the measured data: the loop closed on the measured points, its crossovers found "
       "between them (docs/measured-data.md).");
static const char model_tip[]
  = N_("From the model: a time response, the low-frequency gain and the closed-loop poles need "
       "a model in s, which the measured data are not.");

/* text (may be NULL: "—") and, when the design is judged on data, a small "data" or "model"
 * after it; markup, g_free it. */
static char *
with_source (const char *text, gboolean on_data, gboolean from_data)
{
  g_autofree char *esc = g_markup_escape_text (text != NULL ? text : "—", -1);
  if (!on_data)
    return g_steal_pointer (&esc);
  return g_strdup_printf ("%s <span alpha=\"60%%\" size=\"small\">%s</span>", esc,
                          from_data ? _("data") : _("model"));
}

static void
show_requirements (LwRequirementsPanel *self, LwVariantEval *eval)
{
  gboolean on_data = lw_design_model_judged_on_data (self->model);
  guint n = self->achieved_labels->len;
  for (guint i = 0; i < n && i < lw_design_model_get_n_requirements (self->model); i++)
    {
      GtkLabel *achieved = g_ptr_array_index (self->achieved_labels, i);
      GtkWidget *result = g_ptr_array_index (self->result_labels, i);
      const LwRequirement *r = lw_design_model_get_requirement (self->model, i);
      const char *verdict = "—";
      const char *tip = NULL;
      g_autofree char *value = NULL;
      LwError err;

      gtk_widget_remove_css_class (result, "success");
      gtk_widget_remove_css_class (result, "error");
      if (lw_requirement_check (r, &err) != LW_OK)
        {
          verdict = _("invalid target");
          tip = err.message;
          gtk_widget_add_css_class (result, "error");
        }
      else if (eval != NULL && eval->has_achieved)
        {
          LwReqResult res = lw_requirement_evaluate (r, &eval->achieved);
          if (isfinite (res.achieved))
            value = g_strdup_printf ("%.4g", res.achieved);
          else if (isinf (res.achieved))
            value = g_strdup ("∞");
          tip = res.note;
          switch (res.status)
            {
            case LW_REQ_PASS:
              verdict = _("pass");
              gtk_widget_add_css_class (result, "success");
              break;
            case LW_REQ_FAIL:
              verdict = _("fail");
              gtk_widget_add_css_class (result, "error");
              break;
            case LW_REQ_NOT_AVAILABLE:
              verdict = _("not available");
              break;
            }
        }
      /* judged on the data, the engine takes these figures from the loop on the data */
      gboolean from_data = lw_req_kind_from_frequency_response (r->kind);
      g_autofree char *markup = with_source (value, on_data, from_data);
      if (g_strcmp0 (gtk_label_get_label (achieved), markup) != 0)
        gtk_label_set_markup (achieved, markup);
      lw_gui_set_tooltip (GTK_WIDGET (achieved), !on_data ? NULL
                                                 : from_data ? _(data_tip) : _(model_tip));
      gtk_label_set_text (GTK_LABEL (result), verdict);
      lw_gui_set_tooltip (result, tip);
    }
}

/* ---- loop figures ---------------------------------------------------------------------- */

enum
{
  FIG_STABLE,
  FIG_PHASE_MARGIN,
  FIG_GAIN_MARGIN,
  FIG_DELAY_MARGIN,
  FIG_CROSSOVERS,
  FIG_SENSITIVITY,
  FIG_BANDWIDTH,
  FIG_OVERSHOOT,
  FIG_RISE,
  FIG_SETTLING,
  N_FIGURES
};

static const char *const figure_title[N_FIGURES] = {
  [FIG_STABLE] = N_("Closed loop"),
  [FIG_PHASE_MARGIN] = N_("Phase margin"),
  [FIG_GAIN_MARGIN] = N_("Gain margin"),
  [FIG_DELAY_MARGIN] = N_("Delay margin"),
  [FIG_CROSSOVERS] = N_("Gain crossovers"),
  [FIG_SENSITIVITY] = N_("Sensitivity peak"),
  [FIG_BANDWIDTH] = N_("Bandwidth (−3 dB)"),
  [FIG_OVERSHOOT] = N_("Step overshoot"),
  [FIG_RISE] = N_("Rise time (10–90 %)"),
  [FIG_SETTLING] = N_("Settling time (2 %)"),
};

/* The figures the loop on the data gives when the design is judged on it (the closed loop's
 * stability by the Nyquist criterion on the data, the model's poles said beside it); the
 * bandwidth (|T| needs the closed loop between the points too) and the step stay the
 * model's. */
static gboolean
figure_from_data (int i)
{
  return i == FIG_STABLE || i == FIG_PHASE_MARGIN || i == FIG_GAIN_MARGIN || i == FIG_DELAY_MARGIN
         || i == FIG_CROSSOVERS || i == FIG_SENSITIVITY;
}

static void
build_figures (LwRequirementsPanel *self)
{
  G_STATIC_ASSERT (N_FIGURES <= G_N_ELEMENTS (((LwRequirementsPanel *) 0)->figure_values));
  for (int i = 0; i < N_FIGURES; i++)
    {
      GtkWidget *t = cell (_(figure_title[i]), 0, "dim-label");
      gtk_grid_attach (self->figure_grid, t, 0, i, 1, 1);
      self->figure_titles[i] = GTK_LABEL (t);
      GtkWidget *v = cell ("—", 0, NULL);
      gtk_label_set_selectable (GTK_LABEL (v), TRUE);
      gtk_grid_attach (self->figure_grid, v, 1, i, 1, 1);
      self->figure_values[i] = GTK_LABEL (v);
    }
}

static void
set_figure (LwRequirementsPanel *self, int i, char *text)
{
  gtk_label_set_text (self->figure_values[i], text != NULL ? text : "—");
  g_free (text);
}

/* Every figure's title says "data" or "model" while the design is judged on data. */
static void
show_figure_sources (LwRequirementsPanel *self, gboolean on_data)
{
  for (int i = 0; i < N_FIGURES; i++)
    {
      g_autofree char *markup = with_source (_(figure_title[i]), on_data, figure_from_data (i));
      if (g_strcmp0 (gtk_label_get_label (self->figure_titles[i]), markup) != 0)
        gtk_label_set_markup (self->figure_titles[i], markup);
      lw_gui_set_tooltip (GTK_WIDGET (self->figure_titles[i]),
                          !on_data ? NULL : figure_from_data (i) ? _(data_tip) : _(model_tip));
    }
}

/* The crossing at omega among n (the governing one the margins name), or NULL. */
static const LwMeasuredCrossing *
crossing_at (const LwMeasuredCrossing *c, size_t n, double omega)
{
  for (size_t i = 0; i < n; i++)
    if (c[i].omega_rad_s == omega)
      return &c[i];
  return NULL;
}

/* "at ω rad/s (points a … b)": where a crossover on the data lies and the two measured points
 * it was found between, with the coherence flag. */
static char *
where_text (const LwMeasuredCrossing *c)
{
  return g_strdup_printf (_("at %.4g rad/s (points %.4g … %.4g%s)"),
                          c->omega_rad_s, c->lo_rad_s, c->hi_rad_s,
                          c->low_coherence ? _(", low coherence") : "");
}

/* The figures of the loop closed on the measured data (docs/measured-data.md). */
static void
show_data_figures (LwRequirementsPanel *self, const LwVariantEval *eval)
{
  const LwMeasuredLoop *ml = eval->measured;
  if (ml == NULL)
    {
      for (int i = 0; i < N_FIGURES; i++)
        if (figure_from_data (i))
          set_figure (self, i, NULL);
      if (eval->measured_error != NULL)
        set_figure (self, FIG_PHASE_MARGIN, g_strdup_printf (_("not on the data: %s"),
                                                             eval->measured_error->message));
      return;
    }
  const LwMeasuredStability *st = &ml->stability;
  g_autofree char *verdict
    = st->verdict == LW_MEASURED_STABLE
        ? g_strdup (_("stable (Nyquist criterion on the data)"))
        : st->verdict == LW_MEASURED_UNSTABLE
            ? g_strdup_printf (_("NOT stable: %d pole(s) outside the unit circle (Nyquist "
                                 "criterion on the data)"), st->closed_loop_unstable)
            : g_strdup (_("not decided by the data (see the tooltip)"));
  set_figure (self, FIG_STABLE, g_steal_pointer (&verdict));
  /* the model's own verdict beside the data's, in the tooltip (the panel keeps its width) */
  g_autofree char *tip
    = eval->ev == NULL ? g_strdup (st->note)
      : g_strdup_printf (_("%s\nThe model's closed-loop poles: %s"),
                         st->note,
                         eval->ev->stable ? _("stable")
                         : _("NOT stable (a pole on or outside the unit circle)"));
  lw_gui_set_tooltip (GTK_WIDGET (self->figure_values[FIG_STABLE]), tip);
  const LwMeasuredMargins *m = &ml->margins;
  const LwMeasuredCrossing *gc = crossing_at (m->gain, m->n_gain, m->gain_crossover_rad_s);
  const LwMeasuredCrossing *pc = crossing_at (m->phase, m->n_phase, m->phase_crossover_rad_s);
  if (m->crossover_above_data)
    set_figure (self, FIG_PHASE_MARGIN,
                g_strdup (_("not in the data: |L| ≥ 1 at the highest measured point (a "
                            "crossover lies above the data)")));
  else if (gc == NULL)
    set_figure (self, FIG_PHASE_MARGIN, g_strdup (_("none (no gain crossover in the data)")));
  else
    {
      g_autofree char *where = where_text (gc);
      set_figure (self, FIG_PHASE_MARGIN, g_strdup_printf ("%.4g° %s", m->phase_margin_deg,
                                                           where));
    }
  if (pc == NULL)
    set_figure (self, FIG_GAIN_MARGIN, g_strdup (_("none (no phase crossover in the data)")));
  else
    {
      g_autofree char *where = where_text (pc);
      set_figure (self, FIG_GAIN_MARGIN, g_strdup_printf ("%.4g dB %s", m->gain_margin_db,
                                                          where));
    }
  set_figure (self, FIG_DELAY_MARGIN,
              gc != NULL && !m->crossover_above_data && isfinite (m->delay_margin_s)
                ? g_strdup_printf (_("%.4g s (%.3g samples)"), m->delay_margin_s,
                                   m->delay_margin_s / eval->period_s)
                : NULL);
  g_autoptr (GString) xs = g_string_new (NULL);
  for (size_t i = 0; i < m->n_gain; i++)
    g_string_append_printf (xs, "%s%.4g", i > 0 ? ", " : "", m->gain[i].omega_rad_s);
  set_figure (self, FIG_CROSSOVERS,
              m->n_gain > 0 ? g_strdup_printf (_("%s rad/s"), xs->str)
              : m->crossover_above_data ? g_strdup (_("none in the data (one lies above it)"))
                                        : g_strdup (_("none")));
  set_figure (self, FIG_SENSITIVITY,
              isfinite (m->sensitivity_peak)
                ? g_strdup_printf (_("%.4g (%.3g dB) at %.4g rad/s"),
                                   m->sensitivity_peak, 20.0 * log10 (m->sensitivity_peak),
                                   m->sensitivity_peak_rad_s)
                : NULL);
}

static void
show_figures (LwRequirementsPanel *self, LwVariantEval *eval)
{
  gboolean on_data = lw_design_model_judged_on_data (self->model);
  show_figure_sources (self, on_data);
  const LwEvaluation *ev = eval->ev;
  lw_gui_set_tooltip (GTK_WIDGET (self->figure_values[FIG_STABLE]), NULL);
  if (ev == NULL && eval->failure == LW_EVAL_NO_MODEL && eval->measured != NULL)
    {
      /* a design on measured data alone: the data's figures, the model's left to a model */
      for (int i = 0; i < N_FIGURES; i++)
        set_figure (self, i, NULL);
      show_data_figures (self, eval);
      const char *model = _("needs a model");
      set_figure (self, FIG_BANDWIDTH, g_strdup (model));
      set_figure (self, FIG_OVERSHOOT, g_strdup (model));
      set_figure (self, FIG_RISE, g_strdup (model));
      set_figure (self, FIG_SETTLING, g_strdup (model));
      return;
    }
  if (ev == NULL)
    {
      for (int i = 0; i < N_FIGURES; i++)
        set_figure (self, i, NULL);
      set_figure (self, FIG_STABLE, g_strdup (_("not evaluated (see the message above)")));
      if (on_data)
        show_data_figures (self, eval);
      return;
    }
  const LwMargins *m = &ev->margins;

  set_figure (self, FIG_STABLE, g_strdup (ev->stable ? _("stable")
                                                     : _("NOT stable (a pole on or outside "
                                                         "the unit circle)")));
  set_figure (self, FIG_PHASE_MARGIN,
              m->has_phase_margin
                ? g_strdup_printf (_("%.4g° at %.4g rad/s"), m->phase_margin_deg,
                                   m->gain_crossover_rad_s)
                : g_strdup (_("none (no gain crossover)")));
  set_figure (self, FIG_GAIN_MARGIN,
              m->has_gain_margin
                ? g_strdup_printf (_("%.4g dB at %.4g rad/s"), m->gain_margin_db,
                                   m->phase_crossover_rad_s)
                : g_strdup (_("none (no phase crossover)")));
  set_figure (self, FIG_DELAY_MARGIN,
              m->has_delay_margin
                ? g_strdup_printf (_("%.4g s (%.3g samples)"), m->delay_margin_s,
                                   m->delay_margin_samples)
                : NULL);
  g_autoptr (GString) xs = g_string_new (NULL);
  for (size_t i = 0; i < m->n_gain_crossovers; i++)
    g_string_append_printf (xs, "%s%.4g", i > 0 ? ", " : "", m->gain_crossovers_rad_s[i]);
  set_figure (self, FIG_CROSSOVERS,
              m->n_gain_crossovers > 0 ? g_strdup_printf (_("%s rad/s"), xs->str)
                                       : g_strdup (_("none")));
  set_figure (self, FIG_SENSITIVITY,
              m->has_sensitivity
                ? g_strdup_printf (_("%.4g (%.3g dB) at %.4g rad/s"), m->sensitivity_peak,
                                   20.0 * log10 (m->sensitivity_peak), m->sensitivity_peak_rad_s)
                : NULL);
  set_figure (self, FIG_BANDWIDTH,
              m->has_bandwidth ? g_strdup_printf (_("%.4g rad/s"), m->bandwidth_rad_s) : NULL);
  const LwStep *st = &ev->step;
  set_figure (self, FIG_OVERSHOOT,
              st->has_overshoot ? g_strdup_printf ("%.3g %%", st->overshoot_pct) : NULL);
  set_figure (self, FIG_RISE,
              st->has_rise ? g_strdup_printf (_("%.4g s"), st->rise_time_s) : NULL);
  set_figure (self, FIG_SETTLING,
              st->has_settling ? g_strdup_printf (_("%.4g s"), st->settling_time_s) : NULL);
  if (on_data)
    show_data_figures (self, eval);
}


/* ---- public ---------------------------------------------------------------------------- */

static void
requirements_changed (LwRequirementsPanel *self)
{
  rebuild_requirements (self);
}

void
lw_requirements_panel_set_model (LwRequirementsPanel *self, LwDesignModel *model)
{
  g_return_if_fail (LW_IS_REQUIREMENTS_PANEL (self));
  g_return_if_fail (LW_IS_DESIGN_MODEL (model));

  g_set_object (&self->model, model);
  g_signal_group_set_target (self->model_signals, model);
  rebuild_requirements (self);
}

void
lw_requirements_panel_show_eval (LwRequirementsPanel *self, LwVariantEval *eval)
{
  g_return_if_fail (LW_IS_REQUIREMENTS_PANEL (self));
  g_return_if_fail (eval != NULL);

  show_requirements (self, eval);
  show_figures (self, eval);
}

/* A family's summary in label: text (taken; NULL: hidden); stale: a drag is on, the last one
 * stays, dimmed (the family is evaluated again when it ends). */
static void
show_summary (GtkLabel *label, char *text, gboolean stale)
{
  g_autofree char *owned = text;
  GtkWidget *w = GTK_WIDGET (label);
  if (stale)
    {
      if (gtk_widget_get_visible (w))
        gtk_widget_add_css_class (w, "dim-label");
      return;
    }
  gtk_widget_remove_css_class (w, "dim-label");
  if (text != NULL)
    gtk_label_set_text (label, text);
  gtk_widget_set_visible (w, text != NULL);
}

void
lw_requirements_panel_show_family (LwRequirementsPanel *self, const LwFamily *family,
                                   const LwDesign *d, const GError *error, gboolean stale)
{
  g_return_if_fail (LW_IS_REQUIREMENTS_PANEL (self));
  show_summary (self->family_label, !stale && (family != NULL || error != NULL)
                                      ? lw_family_summary (family, d, error) : NULL, stale);
}

void
lw_requirements_panel_show_measured_family (LwRequirementsPanel *self,
                                            const LwMeasuredFamily *family,
                                            const GError *error, gboolean stale)
{
  g_return_if_fail (LW_IS_REQUIREMENTS_PANEL (self));
  show_summary (self->measured_label, !stale && (family != NULL || error != NULL)
                                        ? lw_measured_family_summary (family, error) : NULL,
                stale);
}

static void
add_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwRequirementsPanel *self = LW_REQUIREMENTS_PANEL (widget);
  const char *name = g_variant_get_string (param, NULL);

  for (int k = LW_REQ_MIN_PHASE_MARGIN; k <= LW_REQ_MAX_ACTUATOR; k++)
    if (g_strcmp0 (lw_req_kind_name ((LwReqKind) k), name) == 0)
      {
        LwRequirement r = new_requirement ((LwReqKind) k);
        lw_design_model_append_requirement (self->model, &r);
        return;
      }
  g_warning ("requirements.add: unknown requirement kind “%s”", name);
}

static void
lw_requirements_panel_dispose (GObject *object)
{
  LwRequirementsPanel *self = LW_REQUIREMENTS_PANEL (object);

  g_clear_object (&self->model_signals);
  g_clear_object (&self->model);
  g_clear_pointer (&self->achieved_labels, g_ptr_array_unref);
  g_clear_pointer (&self->result_labels, g_ptr_array_unref);
  gtk_widget_dispose_template (GTK_WIDGET (self), LW_TYPE_REQUIREMENTS_PANEL);
  GtkWidget *child;
  while ((child = gtk_widget_get_first_child (GTK_WIDGET (self))) != NULL)
    gtk_widget_unparent (child);
  G_OBJECT_CLASS (lw_requirements_panel_parent_class)->dispose (object);
}

static void
lw_requirements_panel_class_init (LwRequirementsPanelClass *klass)
{
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  G_OBJECT_CLASS (klass)->dispose = lw_requirements_panel_dispose;
  gtk_widget_class_set_template_from_resource (
    widget_class, "/org/loopwright/Designer/ui/lw-requirements-panel.ui");
  gtk_widget_class_bind_template_child (widget_class, LwRequirementsPanel, req_grid);
  gtk_widget_class_bind_template_child (widget_class, LwRequirementsPanel, figure_grid);
  gtk_widget_class_bind_template_child (widget_class, LwRequirementsPanel, family_label);
  gtk_widget_class_bind_template_child (widget_class, LwRequirementsPanel, measured_label);
  gtk_widget_class_install_action (widget_class, "requirements.add", "s", add_activated);
  gtk_widget_class_set_layout_manager_type (widget_class, GTK_TYPE_BIN_LAYOUT);
}

static void
lw_requirements_panel_init (LwRequirementsPanel *self)
{
  gtk_widget_init_template (GTK_WIDGET (self));
  self->model_signals = g_signal_group_new (LW_TYPE_DESIGN_MODEL);
  g_signal_group_connect_swapped (self->model_signals, "requirements-changed",
                                  G_CALLBACK (requirements_changed), self);
  self->achieved_labels = g_ptr_array_new ();
  self->result_labels = g_ptr_array_new ();
  build_figures (self);
}
