/* lw-cli-family.c — plant families on the command line (lw-cli-family.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-cli-family.h"
#include "lw-cli-json.h"
#include "lw-engine.h"

void
lw_cli_family_args_clear (LwCliFamilyArgs *a)
{
  g_strfreev (a->ranges);
  g_strfreev (a->points);
  g_free (a->members);
  g_free (a->seed);
  memset (a, 0, sizeof *a);
}

gboolean
lw_cli_family_wanted (const LwCliFamilyArgs *a, const LwDesign *d)
{
  if ((a->ranges != NULL && a->ranges[0] != NULL) || (a->points != NULL && a->points[0] != NULL))
    return TRUE;
  return lw_family_wanted (d);
}

const char *
lw_cli_family_doc_refused (const LwCliFamilyArgs *a)
{
  return a->ranges != NULL ? "--range" : a->points != NULL ? "--point" : NULL;
}

int
lw_cli_family_refuse_doc (const LwCliFamilyArgs *a)
{
  const char *refused = lw_cli_family_doc_refused (a);
  if (refused == NULL)
    return LW_EXIT_OK;
  lw_cli_bad_input (refused, "not with a design document: its <parameters> give the ranges "
                    "and operating points (%s is for the loop options)", refused);
  return LW_EXIT_BAD_INPUT;
}

int
lw_cli_family_refuse_measured (const LwCliFamilyArgs *a)
{
  const char *option = lw_cli_family_doc_refused (a);
  if (option == NULL && a->members == NULL)
    return LW_EXIT_OK;
  lw_cli_bad_input (option != NULL ? option : "--members", "a plant family needs a model; "
                    "measured data are one machine");
  return LW_EXIT_BAD_INPUT;
}

/* The parameter called name of d, made from --dead-time when it is the dead time's and not
 * yet one (its nominal is the loop's dead time); NULL when there is none. */
static LwDesignParam *
find_or_dead_time (LwDesign *d, const char *name)
{
  for (size_t i = 0; i < d->n_params; i++)
    if (strcmp (d->params[i].name, name) == 0)
      return &d->params[i];
  if (strcmp (name, LW_DESIGN_DEAD_TIME_PARAM) != 0)
    return NULL;
  d->params = g_renew (LwDesignParam, d->params, d->n_params + 1);
  LwDesignParam *p = &d->params[d->n_params++];
  memset (p, 0, sizeof *p);
  p->name = g_strdup (name);
  p->nominal = d->dead_time_s;
  return p;
}

/* --point NAME:P=V,P=V,… into d's operating points (checked with the plant after). */
static int
add_point (LwDesign *d, const char *text)
{
  g_autofree char *shown = g_utf8_make_valid (text, -1);
  const char *colon = strchr (text, ':');
  if (colon == NULL || colon == text)
    {
      lw_cli_bad_input ("--point", "'%s' is not NAME:PARAM=VALUE,… (e.g. --point full:m=2.5)",
                        shown);
      return LW_EXIT_BAD_INPUT;
    }
  g_autofree char *name = g_strndup (text, (gsize) (colon - text));
  const char *bad = lw_design_point_name_problem (name);
  if (bad == NULL && lw_design_find_point (d, name) >= 0)
    bad = "it is given twice";
  if (bad != NULL)
    {
      lw_cli_bad_input ("--point", "'%s': the name '%s': %s", shown, name, bad);
      return LW_EXIT_BAD_INPUT;
    }
  if (d->n_points >= LW_DESIGN_MAX_POINTS)
    {
      lw_cli_bad_input ("--point", "more than %d operating points", LW_DESIGN_MAX_POINTS);
      return LW_EXIT_BAD_INPUT;
    }
  d->points = g_renew (LwDesignPoint, d->points, d->n_points + 1);
  LwDesignPoint *p = &d->points[d->n_points++];
  memset (p, 0, sizeof *p);
  p->name = g_steal_pointer (&name);
  g_auto (GStrv) items = colon[1] != '\0' ? g_strsplit (colon + 1, ",", -1) : g_new0 (char *, 1);
  g_autofree char *option = g_strdup_printf ("--point %s", shown);
  for (size_t k = 0; items[k] != NULL; k++)
    {
      const char *eq = strchr (items[k], '=');
      if (eq == NULL || eq == items[k])
        {
          lw_cli_bad_input ("--point", "'%s': '%s' is not PARAM=VALUE", shown, items[k]);
          return LW_EXIT_BAD_INPUT;
        }
      g_autofree char *param = g_strndup (items[k], (gsize) (eq - items[k]));
      if (find_or_dead_time (d, param) == NULL)
        {
          lw_cli_bad_input ("--point", "'%s': '%s' names no --param; give its nominal value "
                            "with --param %s=VALUE", shown, param, param);
          return LW_EXIT_BAD_INPUT;
        }
      for (size_t v = 0; v < p->n_values; v++)
        if (strcmp (p->values[v].parameter, param) == 0)
          {
            lw_cli_bad_input ("--point", "'%s': parameter '%s' is given twice", shown, param);
            return LW_EXIT_BAD_INPUT;
          }
      double value;
      if (!lw_cli_parse_double (option, eq + 1, &value))
        return LW_EXIT_BAD_INPUT;
      p->values = g_renew (LwDesignPointValue, p->values, p->n_values + 1);
      p->values[p->n_values++] = (LwDesignPointValue) { g_steal_pointer (&param), value };
    }
  return LW_EXIT_OK;
}

int
lw_cli_family_options (const LwCliFamilyArgs *a, const LwDesign *d, LwFamilyOptions *o)
{
  lw_family_options_for (o, d);   /* the document's members and seed, unless given here */
  gint64 v;
  if (a->members != NULL)
    {
      if (!lw_cli_parse_integer ("--members", a->members, 0, LW_FAMILY_MAX_MEMBERS, &v))
        return LW_EXIT_BAD_INPUT;
      o->members = (size_t) v;
    }
  if (a->seed != NULL)
    {
      if (!lw_cli_parse_integer ("--seed", a->seed, 0, G_MAXINT64, &v))
        return LW_EXIT_BAD_INPUT;
      o->seed = (guint64) v;
    }
  return LW_EXIT_OK;
}

int
lw_cli_family_design (const LwCliLoopArgs *loop, const LwCliFamilyArgs *a, const LwCliLoop *lp,
                      LwDesign **out)
{
  *out = NULL;
  g_autoptr (LwDesign) d = lw_design_new (loop->plant, lp->period_s);
  d->dead_time_s = lp->dead_time_s;
  d->compute_delay = lp->compute_delay;
  LwExprParam params[LW_EXPR_PARAMS_MAX];
  char *names[LW_EXPR_PARAMS_MAX];
  size_t n = 0;
  int status = lw_cli_loop_params (loop, params, names, &n);
  if (status != LW_EXIT_OK)
    return status;
  d->params = g_new0 (LwDesignParam, n);
  d->n_params = n;
  for (size_t i = 0; i < n; i++)
    {
      d->params[i].name = names[i];   /* taken */
      d->params[i].nominal = params[i].value;
    }
  for (size_t r = 0; a->ranges != NULL && a->ranges[r] != NULL; r++)
    {
      const char *text = a->ranges[r];
      g_autofree char *shown = g_utf8_make_valid (text, -1);
      const char *eq = strchr (text, '=');
      const char *colon = eq != NULL ? strchr (eq + 1, ':') : NULL;
      if (eq == NULL || colon == NULL || eq == text)
        {
          lw_cli_bad_input ("--range", "'%s' is not NAME=LOW:HIGH (e.g. --range wn=90:150)",
                            shown);
          return LW_EXIT_BAD_INPUT;
        }
      g_autofree char *name = g_strndup (text, (gsize) (eq - text));
      g_autofree char *low = g_strndup (eq + 1, (gsize) (colon - eq - 1));
      g_autofree char *option = g_strdup_printf ("--range %s", shown);
      /* the dead time's range: its nominal is --dead-time */
      LwDesignParam *p = find_or_dead_time (d, name);
      if (p == NULL)
        {
          lw_cli_bad_input ("--range", "'%s' names no --param; give its nominal value with "
                            "--param %s=VALUE", shown, name);
          return LW_EXIT_BAD_INPUT;
        }
      if (p->ranged)
        {
          lw_cli_bad_input ("--range", "parameter '%s' is given two ranges", name);
          return LW_EXIT_BAD_INPUT;
        }
      if (!lw_cli_parse_double (option, low, &p->low)
          || !lw_cli_parse_double (option, colon + 1, &p->high))
        return LW_EXIT_BAD_INPUT;
      p->ranged = true;
      const char *bad = lw_design_param_problem (p);
      if (bad != NULL)
        {
          lw_cli_bad_input ("--range", "parameter '%s': %s", name, bad);
          return LW_EXIT_BAD_INPUT;
        }
    }
  char why[512];
  if (lw_design_params_problem (d, why, sizeof why) != NULL)
    {
      lw_cli_bad_input ("--range", "%s", why);
      return LW_EXIT_BAD_INPUT;
    }
  for (size_t k = 0; a->points != NULL && a->points[k] != NULL; k++)
    if ((status = add_point (d, a->points[k])) != LW_EXIT_OK)
      return status;
  if (lw_design_points_problem (d, why, sizeof why, NULL) != NULL)
    {
      lw_cli_bad_input ("--point", "%s", why);
      return LW_EXIT_BAD_INPUT;
    }
  *out = g_steal_pointer (&d);
  return LW_EXIT_OK;
}

/* {"NAME": value, …} of a member */
static void
add_member (JsonBuilder *b, const LwFamily *f, size_t index)
{
  if (index >= f->n_members)
    {
      json_builder_add_null_value (b);
      return;
    }
  json_builder_begin_object (b);
  for (size_t i = 0; i < f->n_params; i++)
    {
      json_builder_set_member_name (b, f->names[i]);
      lw_cli_json_add_number (b, f->members[index].values[i]);
    }
  if (f->members[index].point != NULL)
    {
      /* an operating point: its name (a design with points has no parameter called "point":
         lw_design_points_problem) */
      json_builder_set_member_name (b, "point");
      json_builder_add_string_value (b, f->members[index].point);
    }
  json_builder_end_object (b);
}

static const char *const worst_keys[LW_FAMILY_N_FIGURES] = {
  "worst_phase_margin_deg", "worst_gain_margin_db", "worst_delay_margin_s",
  "worst_sensitivity_peak", "worst_overshoot_pct", "worst_settling_time_s"
};
static const char *const figure_keys[LW_FAMILY_N_FIGURES] = {
  "phase_margin", "gain_margin", "delay_margin", "sensitivity_peak", "overshoot",
  "settling_time"
};

void
lw_cli_family_json (JsonObject *root, const LwFamily *f, const LwDesign *d)
{
  g_autoptr (JsonBuilder) b = json_builder_new ();
  json_builder_begin_object (b);
  json_builder_set_member_name (b, "members");
  json_builder_add_int_value (b, (gint64) f->n_members);
  json_builder_set_member_name (b, "points");
  json_builder_add_int_value (b, (gint64) f->n_points);
  json_builder_set_member_name (b, "corners");
  json_builder_add_int_value (b, (gint64) f->n_corners);
  json_builder_set_member_name (b, "failed_members");
  json_builder_add_int_value (b, (gint64) f->n_failed);
  json_builder_set_member_name (b, "unstable_members");
  json_builder_add_int_value (b, (gint64) f->n_unstable);
  for (int k = 0; k < LW_FAMILY_N_FIGURES; k++)
    {
      json_builder_set_member_name (b, worst_keys[k]);
      size_t w = f->worst[k];
      lw_cli_json_add_optional (b, w != G_MAXSIZE, w != G_MAXSIZE ? f->members[w].figure[k]
                                                                  : NAN);
    }
  json_builder_set_member_name (b, "crossover_range_rad_s");
  if (isnan (f->crossover_min_rad_s))
    json_builder_add_null_value (b);
  else
    {
      json_builder_begin_array (b);
      lw_cli_json_add_number (b, f->crossover_min_rad_s);
      lw_cli_json_add_number (b, f->crossover_max_rad_s);
      json_builder_end_array (b);
    }
  /* the member of the worst phase margin, and that of each figure */
  json_builder_set_member_name (b, "worst_member");
  add_member (b, f, f->worst[LW_FAMILY_PHASE_MARGIN]);
  json_builder_set_member_name (b, "worst_members");
  json_builder_begin_object (b);
  for (int k = 0; k < LW_FAMILY_N_FIGURES; k++)
    {
      json_builder_set_member_name (b, figure_keys[k]);
      add_member (b, f, f->worst[k]);
    }
  json_builder_end_object (b);
  json_builder_set_member_name (b, "requirements");
  json_builder_begin_array (b);
  for (size_t r = 0; r < f->n_requirements; r++)
    {
      json_builder_begin_object (b);
      json_builder_set_member_name (b, "name");
      json_builder_add_string_value (b, lw_design_requirement_title (&d->requirements[r]));
      json_builder_set_member_name (b, "achieved");
      lw_cli_json_add_optional (b, f->requirements[r].status != LW_REQ_NOT_AVAILABLE,
                                f->requirements[r].achieved);
      json_builder_set_member_name (b, "status");
      json_builder_add_string_value (b, lw_req_status_word (f->requirements[r].status));
      json_builder_set_member_name (b, "member");
      add_member (b, f, f->requirement_member[r]);
      json_builder_end_object (b);
    }
  json_builder_end_array (b);
  if (lw_design_analysis_on_data (d))
    {
      /* the design is judged on measured data, its family on the model's members: say so */
      json_builder_set_member_name (b, "analysis");
      json_builder_add_string_value (b, "model");
      json_builder_set_member_name (b, "note");
      json_builder_add_string_value (b, LW_CLI_FAMILY_ON_MODEL_NOTE);
    }
  json_builder_end_object (b);
  json_object_set_member (root, "family", json_builder_get_root (b));
}

static void
print_member (const LwFamily *f, size_t index)
{
  if (index >= f->n_members)
    return;
  if (f->members[index].point != NULL)
    printf (" at point '%s' (", f->members[index].point);
  else
    printf (" at");
  for (size_t i = 0; i < f->n_params; i++)
    printf ("%s%s = %.6g", i > 0 ? ", " : f->members[index].point != NULL ? "" : " ",
            f->names[i], f->members[index].values[i]);
  if (f->members[index].point != NULL)
    printf (")");
}

void
lw_cli_family_print (const LwFamily *f, const LwDesign *d)
{
  if (f->n_points > 0 && f->n_members == f->n_points + 1)
    printf ("\nPlant family: %zu members (the nominal and %zu operating point(s))",
            f->n_members, f->n_points);
  else if (f->n_points > 0)
    printf ("\nPlant family: %zu members (the nominal, %zu operating point(s), %zu corners, the "
            "drawn and the searched)", f->n_members, f->n_points, f->n_corners);
  else
    printf ("\nPlant family: %zu members (the nominal, %zu corners, the drawn and the "
            "searched)", f->n_members, f->n_corners);
  if (f->n_failed > 0)
    printf (", %zu not evaluated", f->n_failed);
  printf ("\n");
  if (lw_design_analysis_on_data (d))
    printf ("  %s\n", LW_CLI_FAMILY_ON_MODEL_NOTE);
  if (f->n_unstable > 0)
    printf ("  %zu member(s) with a loop that is NOT stable\n", f->n_unstable);
  for (int k = 0; k < LW_FAMILY_N_FIGURES; k++)
    {
      size_t w = f->worst[k];
      if (w == G_MAXSIZE)
        continue;
      const char *unit = lw_family_figure_unit ((LwFamilyFigure) k);
      printf ("  worst %-18s %.4g%s%s", lw_family_figure_name ((LwFamilyFigure) k),
              f->members[w].figure[k], unit[0] ? " " : "", unit);
      print_member (f, w);
      printf ("\n");
    }
  if (!isnan (f->crossover_min_rad_s))
    printf ("  crossover                %.4g … %.4g rad/s\n", f->crossover_min_rad_s,
            f->crossover_max_rad_s);
  if (f->n_requirements > 0)
    {
      printf ("  requirements on the worst member:\n");
      for (size_t r = 0; r < f->n_requirements; r++)
        {
          const LwReqResult *v = &f->requirements[r];
          printf ("    %-24s %-14s", lw_design_requirement_title (&d->requirements[r]),
                  v->status == LW_REQ_PASS ? "pass" : v->status == LW_REQ_FAIL ? "FAIL"
                                                                                 : "NOT AVAILABLE");
          print_member (f, f->requirement_member[r]);
          printf ("\n");
        }
    }
}
