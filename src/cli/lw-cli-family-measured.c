/* lw-cli-family-measured.c — a measured family on the command line
 * (lw-cli-family-measured.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>

#include "lw-cli-common.h"
#include "lw-cli-doc.h"
#include "lw-cli-family-measured.h"
#include "lw-cli-json.h"

static const char *const worst_keys[LW_MEASURED_FAMILY_N_FIGURES] = {
  "worst_phase_margin_deg", "worst_gain_margin_db", "worst_sensitivity_peak"
};
static const char *const figure_keys[LW_MEASURED_FAMILY_N_FIGURES] = {
  "phase_margin", "gain_margin", "sensitivity_peak"
};

static void
add_set_name (JsonBuilder *b, const LwMeasuredFamily *f, size_t i)
{
  if (i < f->n_sets)
    json_builder_add_string_value (b, f->sets[i].name);
  else
    json_builder_add_null_value (b);
}

static void
json_family (JsonObject *root, const LwMeasuredFamily *f, const LwDesign *d)
{
  g_autoptr (JsonBuilder) b = json_builder_new ();
  json_builder_begin_object (b);
  json_builder_set_member_name (b, "sets");
  json_builder_add_int_value (b, (gint64) f->n_sets);
  json_builder_set_member_name (b, "judged");
  json_builder_add_boolean_value (b, f->judged);
  json_builder_set_member_name (b, "failed_sets");
  json_builder_add_int_value (b, (gint64) f->n_failed);
  json_builder_set_member_name (b, "unstable_sets");
  json_builder_add_int_value (b, (gint64) f->n_unstable);
  json_builder_set_member_name (b, "undecided_sets");
  json_builder_add_int_value (b, (gint64) f->n_undecided);
  for (int k = 0; k < LW_MEASURED_FAMILY_N_FIGURES; k++)
    {
      json_builder_set_member_name (b, worst_keys[k]);
      lw_cli_json_add_optional (b, f->worst[k] != G_MAXSIZE, f->worst_value[k]);
    }
  json_builder_set_member_name (b, "worst_set");
  add_set_name (b, f, f->worst[LW_MEASURED_FAMILY_PHASE_MARGIN]);
  json_builder_set_member_name (b, "worst_sets");
  json_builder_begin_object (b);
  for (int k = 0; k < LW_MEASURED_FAMILY_N_FIGURES; k++)
    {
      json_builder_set_member_name (b, figure_keys[k]);
      add_set_name (b, f, f->worst[k]);
    }
  json_builder_end_object (b);
  json_builder_set_member_name (b, "requirements");
  json_builder_begin_array (b);
  for (size_t r = 0; r < f->n_requirements; r++)
    {
      if (!f->judged_requirement[r])
        continue;
      json_builder_begin_object (b);
      json_builder_set_member_name (b, "name");
      json_builder_add_string_value (b, lw_design_requirement_title (&d->requirements[r]));
      json_builder_set_member_name (b, "achieved");
      lw_cli_json_add_optional (b, f->requirements[r].status != LW_REQ_NOT_AVAILABLE
                                   && !isnan (f->requirements[r].achieved),
                                f->requirements[r].achieved);
      json_builder_set_member_name (b, "status");
      json_builder_add_string_value (b, lw_req_status_word (f->requirements[r].status));
      json_builder_set_member_name (b, "set");
      add_set_name (b, f, f->requirement_set[r]);
      json_builder_end_object (b);
    }
  json_builder_end_array (b);
  /* each response's own figures */
  json_builder_set_member_name (b, "per_set");
  json_builder_begin_array (b);
  for (size_t i = 0; i < f->n_sets; i++)
    {
      const LwMeasuredFamilySet *s = &f->sets[i];
      json_builder_begin_object (b);
      json_builder_set_member_name (b, "name");
      json_builder_add_string_value (b, s->name);
      json_builder_set_member_name (b, "kind");
      json_builder_add_string_value (b, lw_design_measured_kind_name (s->kind));
      json_builder_set_member_name (b, "points");
      json_builder_add_int_value (b, (gint64) s->points);
      const LwMeasuredMargins *m = &s->loop.margins;
      json_builder_set_member_name (b, "phase_margin_deg");
      lw_cli_json_add_optional (b, s->closed && m->n_gain > 0, m->phase_margin_deg);
      json_builder_set_member_name (b, "gain_crossover_rad_s");
      lw_cli_json_add_optional (b, s->closed && m->n_gain > 0, m->gain_crossover_rad_s);
      json_builder_set_member_name (b, "gain_margin_db");
      lw_cli_json_add_optional (b, s->closed && m->n_phase > 0, m->gain_margin_db);
      json_builder_set_member_name (b, "sensitivity_peak");
      lw_cli_json_add_optional (b, s->closed && isfinite (m->sensitivity_peak),
                                m->sensitivity_peak);
      json_builder_set_member_name (b, "crossover_above_data");
      json_builder_add_boolean_value (b, s->closed && m->crossover_above_data);
      json_builder_set_member_name (b, "stability");
      if (s->closed)
        json_builder_add_string_value (b, lw_measured_verdict_name (s->loop.stability.verdict));
      else
        json_builder_add_null_value (b);
      json_builder_set_member_name (b, "closed_loop_unstable_poles");
      if (s->closed && s->loop.stability.verdict != LW_MEASURED_UNDECIDED)
        json_builder_add_int_value (b, s->loop.stability.closed_loop_unstable);
      else
        json_builder_add_null_value (b);
      json_builder_set_member_name (b, "error");
      if (s->error != NULL)
        json_builder_add_string_value (b, s->error);
      else
        json_builder_add_null_value (b);
      json_builder_end_object (b);
    }
  json_builder_end_array (b);
  json_builder_end_object (b);
  json_object_set_member (root, "measured_family", json_builder_get_root (b));
}

static void
print_family (const LwMeasuredFamily *f, const LwDesign *d)
{
  printf ("\nMeasured family: %zu measured responses, each closed with this variant's "
          "controller\n", f->n_sets);
  if (f->judged)
    printf ("  judged on the data (analysis=\"data\"): the requirements below count for every "
            "response\n");
  else
    printf ("  NOT judged: the design's analysis is the model's (analysis=\"model\"); shown for "
            "information\n");
  if (f->n_failed > 0)
    printf ("  %zu response(s) could not be closed at this variant's period\n", f->n_failed);
  if (f->n_unstable > 0)
    printf ("  %zu response(s) whose loop the data call NOT stable\n", f->n_unstable);
  if (f->n_undecided > 0)
    printf ("  %zu response(s) whose stability the data leave undecided\n", f->n_undecided);
  for (int k = 0; k < LW_MEASURED_FAMILY_N_FIGURES; k++)
    {
      size_t w = f->worst[k];
      const char *unit = lw_measured_family_figure_unit ((LwMeasuredFamilyFigure) k);
      if (w == G_MAXSIZE)
        printf ("  worst %-18s none in the data\n",
                lw_measured_family_figure_name ((LwMeasuredFamilyFigure) k));
      else
        printf ("  worst %-18s %.4g%s%s on \"%s\"\n",
                lw_measured_family_figure_name ((LwMeasuredFamilyFigure) k), f->worst_value[k],
                unit[0] ? " " : "", unit, f->sets[w].name);
    }
  printf ("  %-24s %12s %10s %10s  %s\n", "response", "PM (deg)", "GM (dB)", "peak |S|",
          "closed loop (Nyquist on the data)");
  for (size_t i = 0; i < f->n_sets; i++)
    {
      const LwMeasuredFamilySet *s = &f->sets[i];
      if (!s->closed)
        {
          printf ("  %-24s not closed: %s\n", s->name, s->error);
          continue;
        }
      const LwMeasuredMargins *m = &s->loop.margins;
      char pm[32] = "none", gm[32] = "none", ms[32] = "n/a";
      if (m->n_gain > 0)
        g_snprintf (pm, sizeof pm, "%.4g%s", m->phase_margin_deg,
                    m->crossover_above_data ? "?" : "");
      if (m->n_phase > 0)
        g_snprintf (gm, sizeof gm, "%.4g", m->gain_margin_db);
      if (isfinite (m->sensitivity_peak))
        g_snprintf (ms, sizeof ms, "%.4g", m->sensitivity_peak);
      printf ("  %-24s %12s %10s %10s  %s\n", s->name, pm, gm, ms,
              lw_measured_verdict_name (s->loop.stability.verdict));
    }
  size_t judged = 0;
  for (size_t r = 0; r < f->n_requirements; r++)
    judged += f->judged_requirement[r];
  if (judged == 0)
    return;
  printf ("  requirements on the worst response%s:\n", f->judged ? "" : " (not judged)");
  for (size_t r = 0; r < f->n_requirements; r++)
    {
      if (!f->judged_requirement[r])
        continue;
      const LwReqResult *v = &f->requirements[r];
      printf ("    %-24s %-14s", lw_design_requirement_title (&d->requirements[r]),
              v->status == LW_REQ_PASS ? "pass" : v->status == LW_REQ_FAIL ? "FAIL"
                                                                             : "NOT AVAILABLE");
      if (f->requirement_set[r] < f->n_sets)
        printf (" on \"%s\"", f->sets[f->requirement_set[r]].name);
      printf ("\n");
    }
  if (f->judged)
    printf ("  %zu of %zu requirement(s) judged on the data pass on every response\n",
            judged - f->n_not_passing, judged);
}

int
lw_cli_measured_family_run (const LwDesign *d, const LwVariantEval *e, JsonObject *root,
                            size_t *not_passing)
{
  if (not_passing != NULL)
    *not_passing = 0;
  if (!lw_measured_family_wanted (d))
    return LW_EXIT_OK;
  GError *error = NULL;
  g_autoptr (LwMeasuredFamily) f = lw_measured_family_evaluate (d, e, &error);
  if (f == NULL)
    {
      int status = lw_cli_report_gerror ("measured family", error);
      g_error_free (error);
      return status;
    }
  if (root != NULL)
    json_family (root, f, d);
  else
    print_family (f, d);
  if (not_passing != NULL)
    *not_passing = f->n_not_passing;
  return LW_EXIT_OK;
}
