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
lw_cli_report_gerror (const char *place, const GError *error)
{
  if (error->domain == LW_ENGINE_ERROR
      && (error->code == LW_ERR_PARSE || error->code == LW_ERR_INVALID))
    {
      lw_cli_bad_input (place, "%s", error->message);
      return LW_EXIT_BAD_INPUT;
    }
  lw_cli_bad_input (place, "internal failure: %s",
                    error->message[0] ? error->message : "unknown error");
  return LW_EXIT_INTERNAL;
}

/* The failures of an evaluation made, reported as the commands always have. */
static int
report_eval (const char *variant_place, const char *plant_place, LwVariantEval *e,
             gboolean strict, gboolean need_achieved, gboolean data_alone, LwVariantEval **out)
{
  int status = LW_EXIT_OK;
  if (e->failure == LW_EVAL_NO_MODEL && data_alone)
    ;   /* on the data alone: the caller reads e->measured */
  else if (e->failure != LW_EVAL_OK)
    status = lw_cli_report_gerror (e->failure == LW_EVAL_FAILED_PLANT
                                     || e->failure == LW_EVAL_FAILED_SAMPLING
                                   ? plant_place : variant_place, e->error);
  else if (strict && e->sim_error != NULL)
    status = lw_cli_report_gerror (variant_place, e->sim_error);
  else if (strict && need_achieved && !e->has_achieved)
    {
      lw_cli_report_gerror ("requirements", e->achieved_error);
      status = LW_EXIT_INTERNAL;
    }
  if (status != LW_EXIT_OK)
    {
      lw_variant_eval_unref (e);
      e = NULL;
    }
  *out = e;
  return status;
}

static int
doc_evaluate (const char *place, const LwDesign *d, size_t index, const LwEngineOptions *opts,
              gboolean strict, gboolean data_alone, LwVariantEval **out)
{
  g_return_val_if_fail (index < d->n_variants, LW_EXIT_INTERNAL);
  LwVariantEval *e = lw_engine_evaluate_variant (d, index, opts, NULL);
  g_autofree char *vplace = g_strdup_printf ("%s: variant '%s'", place, d->variants[index].name);
  g_autofree char *pplace = g_strdup_printf ("%s: <plant>", place);
  return report_eval (vplace, pplace, e, strict, TRUE, data_alone, out);
}

int
lw_cli_doc_evaluate (const char *place, const LwDesign *d, size_t index,
                     const LwEngineOptions *opts, gboolean strict, LwVariantEval **out)
{
  return doc_evaluate (place, d, index, opts, strict, FALSE, out);
}

int
lw_cli_doc_evaluate_data (const char *place, const LwDesign *d, size_t index,
                          const LwEngineOptions *opts, gboolean strict, LwVariantEval **out)
{
  return doc_evaluate (place, d, index, opts, strict, TRUE, out);
}

int
lw_cli_loop_evaluate (const char *place, const LwCliLoop *lp, const LwEngineOptions *opts,
                      gboolean strict, LwVariantEval **out)
{
  LwEngineLoop loop = {
    .plant_s = lp->plant_s,
    .sampled = lp->sampled,
    .controller_w = lp->controller_w,
    .controller_z = lp->controller_z,
    .dead_time_s = lp->dead_time_s,
    .compute_delay = lp->compute_delay,
  };
  return report_eval (place, place, lw_engine_evaluate_loop (&loop, opts), strict, FALSE, FALSE,
                      out);
}

gboolean
lw_cli_doc_on_data (const LwDesign *d, LwReqKind kind)
{
  return d->measured != NULL && d->measured_analysis == LW_DESIGN_ANALYSIS_DATA
         && lw_req_kind_from_frequency_response (kind);
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
      json_builder_add_string_value (b, lw_req_status_word (res[i].status));
      if (d->measured != NULL)
        {
          /* a document with a measurement says what each verdict was judged on */
          json_builder_set_member_name (b, "judged_on");
          json_builder_add_string_value (b, lw_cli_doc_on_data (d, r->req.kind) ? "data"
                                                                                : "model");
        }
      json_builder_end_object (b);
    }
  json_builder_end_array (b);
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
      g_autofree char *target = lw_requirement_target_text (&r->req);
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
      if (lw_cli_doc_on_data (d, r->req.kind))
        printf (" (on data)");
      if (res[i].note != NULL && res[i].status != LW_REQ_PASS)
        printf (" (%s)", res[i].note);
      printf ("\n");
    }
}

int
lw_cli_doc_refuse_loop_options (const char *cmd, const char *file, const LwCliLoopArgs *a)
{
  const char *given[] = { a->plant, a->period, a->compute_delay, a->dead_time, a->controller,
                          a->controller_z, a->params != NULL ? a->params[0] : NULL };
  const char *names[] = { "--plant", "--period", "--compute-delay", "--dead-time",
                          "--controller", "--controller-z", "--param" };
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
lw_cli_doc_shown (const LwDesign *d, size_t **indices, size_t *n)
{
  *indices = g_new (size_t, d->n_variants);
  *n = 0;
  for (size_t i = 0; i < d->n_variants; i++)
    if (i == d->active || d->variants[i].compared)
      (*indices)[(*n)++] = i;
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
  out->params = g_new0 (char *, d->n_params + 1);
  for (size_t i = 0; i < d->n_params; i++)
    out->params[i] = g_strdup_printf ("%s=%s", d->params[i].name,
                                      lw_design_format_number (d->params[i].nominal, buf));
}
