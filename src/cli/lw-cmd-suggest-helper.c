/* lw-cmd-suggest-helper.c — `loopwright-cli suggest --helper NAME`: one of the formula helpers
 * of the engine (lw-proposal.h) applied to a design variant or to the loop of the options,
 * reported with the variant as it would be with the proposal (docs/cli.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-cli-common.h"
#include "lw-cli-doc.h"
#include "lw-cli-json.h"
#include "lw-cli-measured.h"
#include "lw-cmd-suggest-helper.h"
#include "lw-proposal.h"

static void
print_report (const LwDesign *d, size_t variant, const LwProposal *p, gboolean with_doc)
{
  printf ("%s", lw_helper_title (p->kind));
  if (with_doc)
    printf (" for variant '%s'", d->variants[variant].name);
  printf ("\n");
  g_autofree char *text = lw_proposal_describe (d, variant, p);
  fputs (text, stdout);
  printf ("\ncaution: simulation is not validation; commission with safe limits; follow the "
          "applicable functional-safety standards and qualified review; local codes prevail.\n");
}

static void
json_stage (JsonBuilder *b, const LwStage *st)
{
  LwStageParam p[LW_STAGE_MAX_PARAMS];
  size_t np = lw_stage_params (st, p);
  json_builder_begin_object (b);
  json_builder_set_member_name (b, "kind");
  json_builder_add_string_value (b, lw_stage_kind_name (st->kind));
  json_builder_set_member_name (b, "label");
  json_builder_add_string_value (b, st->label);
  json_builder_set_member_name (b, "params");
  json_builder_begin_object (b);
  for (size_t i = 0; i < np; i++)
    {
      json_builder_set_member_name (b, p[i].name);
      lw_cli_json_add_number (b, p[i].value);
    }
  json_builder_end_object (b);
  json_builder_end_object (b);
}

static void
print_json (const LwDesign *d, const LwProposal *p, gboolean with_doc)
{
  const LwVariantEval *e = p->preview;
  JsonBuilder *b = json_builder_new ();
  json_builder_begin_object (b);
  json_builder_set_member_name (b, "helper");
  json_builder_add_string_value (b, lw_helper_name (p->kind));
  json_builder_set_member_name (b, "replaces_stages");
  json_builder_add_boolean_value (b, p->replaces);
  json_builder_set_member_name (b, "stages");
  json_builder_begin_array (b);
  for (size_t k = 0; k < p->n_stages; k++)
    json_stage (b, &p->stages[k]);
  json_builder_end_array (b);
  json_builder_set_member_name (b, "steps");
  json_builder_begin_array (b);
  for (guint i = 0; i < p->lines->len; i++)
    json_builder_add_string_value (b, g_ptr_array_index (p->lines, i));
  json_builder_end_array (b);
  json_builder_set_member_name (b, "crossover_target_rad_s");
  lw_cli_json_add_optional (b, isfinite (p->crossover_rad_s), p->crossover_rad_s);
  json_builder_set_member_name (b, "phase_margin_target_deg");
  lw_cli_json_add_optional (b, isfinite (p->phase_margin_deg), p->phase_margin_deg);
  if (e->failure == LW_EVAL_OK || (e->failure == LW_EVAL_NO_MODEL && e->measured != NULL))
    {
      if (e->controller_w != NULL)
        {
          json_builder_set_member_name (b, "controller_w");
          lw_cli_json_add_model (b, e->controller_w);
        }
      gboolean on_data = d->measured != NULL && d->measured_analysis == LW_DESIGN_ANALYSIS_DATA;
      if (d->measured != NULL)
        {
          json_builder_set_member_name (b, "analysis");
          json_builder_add_string_value (b, lw_design_analysis_name (d->measured_analysis));
        }
      if (on_data && e->measured != NULL)
        {
          /* the helper worked on the data: the loop block is the data's, as analyze FILE's */
          LwCliMeasuredLoop ml;
          lw_cli_measured_loop_borrow (&ml, d, e);
          json_builder_set_member_name (b, "loop");
          lw_cli_measured_json_loop (b, &ml);
          json_builder_set_member_name (b, "stability_on_data");
          json_builder_add_string_value (b, lw_measured_verdict_name (
                                                e->measured->stability.verdict));
        }
      else if (e->ev != NULL)
        {
          json_builder_set_member_name (b, "loop");
          lw_cli_json_add_loop (b, &e->ev->margins);
        }
      if (e->ev != NULL)
        {
          /* the model's closed loop (the data alone do not tell) */
          json_builder_set_member_name (b, "stable");
          json_builder_add_boolean_value (b, e->ev->stable);
        }
      if (with_doc)
        {
          json_builder_set_member_name (b, "requirements");
          lw_cli_doc_json_requirements (b, d, e->requirements);
          json_builder_set_member_name (b, "not_met");
          json_builder_begin_array (b);
          for (size_t i = 0; i < p->n_unmet; i++)
            {
              json_builder_begin_object (b);
              json_builder_set_member_name (b, "requirement");
              json_builder_add_int_value (b, (gint64) p->unmet[i].index + 1);
              json_builder_set_member_name (b, "reason");
              json_builder_add_string_value (b, p->unmet[i].reason);
              json_builder_end_object (b);
            }
          json_builder_end_array (b);
        }
    }
  else
    {
      json_builder_set_member_name (b, "error");
      json_builder_add_string_value (b, e->error->message);
    }
  json_builder_end_object (b);
  lw_cli_json_print_builder (b);
  g_object_unref (b);
}

/* A number option: NAN when not given, else parsed and checked to be finite. */
static gboolean
number_option (const char *option, const char *text, double *out)
{
  *out = NAN;
  if (text == NULL)
    return TRUE;
  if (!lw_cli_parse_double (option, text, out))
    return FALSE;
  if (!isfinite (*out))
    {
      lw_cli_bad_input (option, "must be a finite number, got %s", text);
      return FALSE;
    }
  return TRUE;
}

int
lw_cmd_suggest_helper (const LwSuggestHelperArgs *a)
{
  LwHelperKind kind;
  if (!lw_helper_from_name (a->helper, &kind))
    {
      GString *names = g_string_new (NULL);
      for (int k = 0; k < LW_HELPER_COUNT; k++)
        g_string_append_printf (names, "%s%s", k ? ", " : "", lw_helper_name (k));
      lw_cli_bad_input ("--helper", "unknown helper '%s' (one of: %s)", a->helper, names->str);
      g_string_free (names, TRUE);
      return LW_EXIT_BAD_INPUT;
    }
  LwHelperOptions o;
  lw_helper_options_init (&o, kind);
  double safety, decades, fraction;
  if (!number_option ("--crossover", a->crossover, &o.crossover_rad_s)
      || !number_option ("--rise-time", a->rise_time, &o.rise_time_s)
      || !number_option ("--phase-margin", a->phase_margin, &o.phase_margin_deg)
      || !number_option ("--safety", a->safety, &safety)
      || !number_option ("--ratio", a->ratio, &o.lag_ratio)
      || !number_option ("--decades-below", a->decades, &decades)
      || !number_option ("--zero-fraction", a->fraction, &fraction))
    return LW_EXIT_BAD_INPUT;
  if (!isnan (safety))
    o.safety_deg = safety;
  if (!isnan (decades))
    o.lag_decades = decades;
  if (!isnan (fraction))
    o.pi_fraction = fraction;
  if (a->crossover != NULL && a->rise_time != NULL)
    {
      lw_cli_bad_input ("suggest", "give at most one of --crossover and --rise-time");
      return LW_EXIT_BAD_INPUT;
    }

  g_autoptr (LwDesign) d = NULL;
  size_t variant = 0;
  const char *place = "suggest";
  gboolean with_doc = a->files != NULL && a->files[0] != NULL;
  int status;
  if (with_doc)
    {
      status = lw_cli_doc_one_file ("suggest", a->files, &place);
      if (status == LW_EXIT_OK)
        status = lw_cli_doc_refuse_loop_options ("suggest", place, a->loop);
      if (status == LW_EXIT_OK)
        status = lw_cli_doc_load (place, &d);
      if (status == LW_EXIT_OK)
        status = lw_cli_doc_variant (d, "--variant", a->variant, &variant);
      if (status != LW_EXIT_OK)
        return status;
    }
  else
    {
      if (a->variant != NULL)
        {
          lw_cli_bad_input ("--variant", "needs a design document");
          return LW_EXIT_BAD_INPUT;
        }
      LwCliLoop lp;
      status = lw_cli_loop_build ("suggest", a->loop, &lp);
      if (status != LW_EXIT_OK)
        return status;
      if (a->loop->controller != NULL || a->loop->controller_z != NULL)
        {
          lw_cli_loop_clear (&lp);
          lw_cli_bad_input ("suggest", "--helper works on a design document's stages; without "
                            "one, the loop starts from no controller (give no --controller)");
          return LW_EXIT_BAD_INPUT;
        }
      d = lw_design_new (a->loop->plant, lp.period_s);
      d->dead_time_s = lp.dead_time_s;
      d->compute_delay = lp.compute_delay;
      lw_cli_loop_clear (&lp);
    }

  g_autoptr (GError) error = NULL;
  g_autoptr (LwProposal) p = lw_proposal_make (d, variant, &o, NULL, &error);
  if (p == NULL)
    return lw_cli_report_gerror (with_doc ? place : "suggest", error);

  if (a->output != NULL)
    {
      g_autoptr (LwDesign) applied = lw_proposal_apply (d, variant, p);
      if (!lw_design_save_file (applied, a->output, &error))
        {
          lw_cli_bad_input ("--output", "%s", error->message);
          return LW_EXIT_INTERNAL;
        }
    }
  if (a->json)
    print_json (d, p, with_doc);
  else
    print_report (d, variant, p, with_doc);
  return LW_EXIT_OK;
}
