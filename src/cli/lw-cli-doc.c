/* lw-cli-doc.c — shared by the commands over design documents; see lw-cli-doc.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-cli-doc.h"
#include "lw-cli-json.h"
#include "lw-expr.h"

int
lw_cli_doc_one_file (const char *cmd, char **files, const char **path)
{
  if (files == NULL || files[0] == NULL)
    {
      lw_cli_bad_input (cmd, "a design document is required (see '" LW_CLI_PROG " %s --help')",
                        cmd);
      return LW_EXIT_BAD_INPUT;
    }
  if (files[1] != NULL)
    {
      lw_cli_bad_input (cmd, "unexpected argument '%s': one design document at a time",
                        files[1]);
      return LW_EXIT_BAD_INPUT;
    }
  *path = files[0];
  return LW_EXIT_OK;
}

int
lw_cli_doc_load (const char *path, LwDesign **out)
{
  GError *error = NULL;
  *out = lw_design_load_file (path, &error);
  if (*out == NULL)
    {
      lw_cli_bad_input (NULL, "%s", error->message);
      g_error_free (error);
      return LW_EXIT_BAD_INPUT;
    }
  return LW_EXIT_OK;
}

int
lw_cli_doc_variant (const LwDesign *d, const char *option, const char *name, size_t *index)
{
  if (name == NULL)
    {
      *index = d->active;
      return LW_EXIT_OK;
    }
  gssize i = lw_design_find_variant (d, name);
  if (i >= 0)
    {
      *index = (size_t) i;
      return LW_EXIT_OK;
    }
  GString *list = g_string_new (NULL);
  for (size_t k = 0; k < d->n_variants; k++)
    g_string_append_printf (list, "%s'%s'", k == 0 ? "" : ", ", d->variants[k].name);
  lw_cli_bad_input (option, "the design has no variant '%s'; it has %s", name, list->str);
  g_string_free (list, TRUE);
  return LW_EXIT_BAD_INPUT;
}

int
lw_cli_doc_loop_build (const char *place, const LwDesign *d, size_t index, LwCliLoop *out)
{
  memset (out, 0, sizeof *out);
  g_return_val_if_fail (index < d->n_variants, LW_EXIT_INTERNAL);
  const LwDesignVariant *v = &d->variants[index];
  out->period_s = lw_design_variant_period_s (d, index);   /* its own, or the design's */
  out->dead_time_s = d->dead_time_s;
  out->compute_delay = d->compute_delay;
  LwError err;
  lw_error_clear (&err);
  int status = LW_EXIT_OK;
  /* The loader has parsed the plant already; a failure here is reported the same way. */
  if (lw_expr_parse_proper (d->plant, LW_DOMAIN_S, 0.0, &out->plant_s, &err) != LW_OK)
    {
      g_autofree char *where = g_strdup_printf ("%s: <plant>", place);
      status = lw_cli_report_core_error (where, &err);
      goto fail;
    }
  if (lw_compensator_w (v->stages, v->n_stages, out->period_s, &out->controller_w, &err) != LW_OK
      || lw_compensator_z (v->stages, v->n_stages, out->period_s, &out->controller_z, &err)
           != LW_OK)
    {
      g_autofree char *where = g_strdup_printf ("%s: variant '%s'", place, v->name);
      status = lw_cli_report_core_error (where, &err);
      goto fail;
    }
  if (lw_sampled_plant_new (out->plant_s, out->dead_time_s, out->period_s, &out->sampled, &err)
      != LW_OK)
    {
      g_autofree char *where = g_strdup_printf ("%s: <plant>", place);
      status = lw_cli_report_core_error (where, &err);
      goto fail;
    }
  return LW_EXIT_OK;

fail:
  lw_cli_loop_clear (out);
  return status;
}

int
lw_cli_doc_requirements (const LwDesign *d, const LwEvaluation *ev, const LwModel *plant_s,
                         const LwSimResponse *sim_ref, LwReqResult *out)
{
  LwAchieved a;
  LwError err;
  lw_error_clear (&err);
  if (lw_achieved_from_evaluation (ev, plant_s, &a, &err) != LW_OK)
    {
      lw_cli_report_core_error ("requirements", &err);
      return -1;
    }
  if (sim_ref != NULL && sim_ref->n > 0)
    {
      double peak = 0.0;
      for (size_t k = 0; k < sim_ref->n; k++)
        peak = fmax (peak, fabs (sim_ref->u[k]));
      a.has_actuator_peak = true;
      a.actuator_peak = peak;
    }
  int not_passing = 0;
  for (size_t i = 0; i < d->n_requirements; i++)
    {
      out[i] = lw_requirement_evaluate (&d->requirements[i].req, &a);
      if (out[i].status != LW_REQ_PASS)
        not_passing++;
    }
  return not_passing;
}

static const char *
status_word (LwReqStatus s)
{
  switch (s)
    {
    case LW_REQ_PASS: return "pass";
    case LW_REQ_FAIL: return "fail";
    case LW_REQ_NOT_AVAILABLE: return "not-available";
    }
  return "unknown";
}

void
lw_cli_doc_json_requirements (JsonBuilder *b, const LwDesign *d, const LwReqResult *res)
{
  json_builder_begin_array (b);
  for (size_t i = 0; i < d->n_requirements; i++)
    {
      const LwDesignRequirement *r = &d->requirements[i];
      json_builder_begin_object (b);
      json_builder_set_member_name (b, "name");
      json_builder_add_string_value (b, lw_design_requirement_title (r));
      json_builder_set_member_name (b, "kind");
      json_builder_add_string_value (b, lw_design_requirement_element (r->req.kind));
      json_builder_set_member_name (b, "unit");
      json_builder_add_string_value (b, lw_req_kind_unit (r->req.kind));
      json_builder_set_member_name (b, "target");
      if (r->req.kind == LW_REQ_CROSSOVER_RANGE)
        {
          json_builder_begin_array (b);
          lw_cli_json_add_number (b, r->req.limit);
          lw_cli_json_add_number (b, r->req.limit_hi);
          json_builder_end_array (b);
        }
      else
        lw_cli_json_add_number (b, r->req.limit);
      json_builder_set_member_name (b, "achieved");
      lw_cli_json_add_optional (b, res[i].status != LW_REQ_NOT_AVAILABLE, res[i].achieved);
      json_builder_set_member_name (b, "slack");
      lw_cli_json_add_number (b, res[i].slack);
      json_builder_set_member_name (b, "pass");
      json_builder_add_boolean_value (b, res[i].status == LW_REQ_PASS);
      json_builder_set_member_name (b, "status");
      json_builder_add_string_value (b, status_word (res[i].status));
      json_builder_end_object (b);
    }
  json_builder_end_array (b);
}

char *
lw_cli_doc_target_text (const LwRequirement *r)
{
  const char *unit = lw_req_kind_unit (r->kind);
  const char *sep = strcmp (unit, "%") == 0 ? "" : " ";
  switch (r->kind)
    {
    case LW_REQ_MIN_PHASE_MARGIN:
    case LW_REQ_MIN_GAIN_MARGIN:
      return g_strdup_printf ("at least %.6g%s%s", r->limit, sep, unit);
    case LW_REQ_CROSSOVER_RANGE:
      return g_strdup_printf ("%.6g to %.6g %s", r->limit, r->limit_hi, unit);
    case LW_REQ_MAX_SENSITIVITY:
    case LW_REQ_MAX_STEP_ERROR:
    case LW_REQ_MAX_RAMP_ERROR:
    case LW_REQ_MAX_OVERSHOOT:
    case LW_REQ_MAX_RISE_TIME:
    case LW_REQ_MAX_SETTLING_TIME:
    case LW_REQ_MAX_ACTUATOR:
      return g_strdup_printf ("at most %.6g%s%s", r->limit, sep, unit);
    }
  return g_strdup ("?");
}

void
lw_cli_doc_print_requirements (const LwDesign *d, const LwReqResult *res)
{
  if (d->n_requirements == 0)
    {
      printf ("  (the design states no requirements)\n");
      return;
    }
  int width = (int) strlen ("requirement");
  for (size_t i = 0; i < d->n_requirements; i++)
    width = MAX (width, g_utf8_strlen (lw_design_requirement_title (&d->requirements[i]), -1));
  width = MIN (width, 60);
  printf ("  %-*s  %-24s %-18s %s\n", width, "requirement", "target", "achieved", "result");
  for (size_t i = 0; i < d->n_requirements; i++)
    {
      const LwDesignRequirement *r = &d->requirements[i];
      g_autofree char *target = lw_cli_doc_target_text (&r->req);
      char achieved[64];
      const char *unit = lw_req_kind_unit (r->req.kind);
      if (res[i].status == LW_REQ_NOT_AVAILABLE || isnan (res[i].achieved))
        g_strlcpy (achieved, "n/a", sizeof achieved);
      else if (isinf (res[i].achieved))
        g_snprintf (achieved, sizeof achieved, "%s", res[i].achieved > 0 ? "infinite" : "-infinite");
      else
        g_snprintf (achieved, sizeof achieved, "%.4g%s%s", res[i].achieved,
                    strcmp (unit, "%") == 0 ? "" : " ", unit);
      const char *result = res[i].status == LW_REQ_PASS ? "pass"
                           : res[i].status == LW_REQ_FAIL ? "FAIL" : "NOT AVAILABLE";
      const char *title = lw_design_requirement_title (r);
      /* pad by characters, not bytes */
      int pad = width - (int) g_utf8_strlen (title, -1);
      printf ("  %s%*s  %-24s %-18s %s", title, pad > 0 ? pad : 0, "", target, achieved, result);
      if (res[i].note != NULL && res[i].status != LW_REQ_PASS)
        printf (" (%s)", res[i].note);
      printf ("\n");
    }
}

int
lw_cli_doc_refuse_loop_options (const char *cmd, const char *file, const LwCliLoopArgs *a)
{
  const char *given[] = { a->plant, a->period, a->compute_delay, a->dead_time, a->controller,
                          a->controller_z };
  const char *names[] = { "--plant", "--period", "--compute-delay", "--dead-time",
                          "--controller", "--controller-z" };
  for (size_t i = 0; i < G_N_ELEMENTS (given); i++)
    if (given[i] != NULL)
      {
        lw_cli_bad_input (cmd, "unexpected argument '%s' (see '" LW_CLI_PROG " %s --help'): a "
                          "design document cannot be combined with %s", file, cmd, names[i]);
        return LW_EXIT_BAD_INPUT;
      }
  return LW_EXIT_OK;
}

int
lw_cli_doc_select (const LwDesign *d, const char *name, bool all, const char *all_option,
                   size_t **indices, size_t *n)
{
  *indices = NULL;
  *n = 0;
  if (all && name != NULL)
    {
      lw_cli_bad_input (all_option, "cannot be combined with --variant; give one of them");
      return LW_EXIT_BAD_INPUT;
    }
  if (all)
    {
      *indices = g_new (size_t, d->n_variants);
      for (size_t i = 0; i < d->n_variants; i++)
        (*indices)[i] = i;
      *n = d->n_variants;
      return LW_EXIT_OK;
    }
  size_t index;
  int status = lw_cli_doc_variant (d, "--variant", name, &index);
  if (status != LW_EXIT_OK)
    return status;
  *indices = g_new (size_t, 1);
  (*indices)[0] = index;
  *n = 1;
  return LW_EXIT_OK;
}

void
lw_cli_doc_loop_args (const LwDesign *d, LwCliLoopArgs *out)
{
  char buf[G_ASCII_DTOSTR_BUF_SIZE];
  memset (out, 0, sizeof *out);
  out->plant = g_strdup (d->plant);
  out->period = g_strdup (lw_design_format_number (lw_design_variant_period_s (d, d->active),
                                                   buf));
  out->dead_time = g_strdup (lw_design_format_number (d->dead_time_s, buf));
  out->compute_delay = g_strdup_printf ("%d", d->compute_delay);
}
