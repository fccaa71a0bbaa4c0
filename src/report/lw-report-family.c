/* lw-report-family.c — the report's "Plant family" section: a design with ranged parameters
 * or operating points has its family evaluated for one reported variant (lw_family_evaluate, the members `check`
 * and `analyze` evaluate by default), each figure's nominal value beside its worst with the
 * member giving it (an operating point by its name),
 * every requirement judged on every member, and the members' loops for the figures
 * (docs/report.md, docs/families.md).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdint.h>

#include "lw-report-private.h"

void
lwr_family_clear (RFamily *rf)
{
  lw_figure_family_clear (&rf->fig);
  g_clear_pointer (&rf->loops, lw_family_loops_free);
  g_clear_pointer (&rf->family, lw_family_free);
}

/* The member's parameter values, "K = 180, wr = 203" (the ranged ones and the others), after
 * its name when it is an operating point: "point “full”: K = 180, wr = 203". */
static char *
member_text (const LwFamily *f, size_t index)
{
  if (index >= f->n_members)
    return g_strdup ("");
  GString *s = g_string_new (NULL);
  if (f->members[index].point != NULL)
    g_string_append_printf (s, "point “%s”: ", f->members[index].point);
  for (size_t i = 0; i < f->n_params; i++)
    g_string_append_printf (s, "%s%s = %.6g", i > 0 ? ", " : "", f->names[i],
                            f->members[index].values[i]);
  return g_string_free (s, FALSE);
}

gboolean
lwr_family_compute (const LwDesign *d, const RVar *rv, size_t n, RFamily *rf, GError **error)
{
  memset (rf, 0, sizeof *rf);
  if (!lw_family_wanted (d) || !lw_design_has_model (d))
    return TRUE;
  /* the active variant when it is reported, else the first with a model loop */
  size_t of = SIZE_MAX;
  for (size_t k = 0; k < n; k++)
    if (rv[k].ev != NULL && (of == SIZE_MAX || (size_t) (rv[k].v - d->variants) == d->active))
      of = k;
  if (of == SIZE_MAX)
    return TRUE;
  size_t variant = (size_t) (rv[of].v - d->variants);
  g_autoptr (GError) ferr = NULL;
  rf->family = lw_family_evaluate (d, variant, NULL, &ferr);
  if (rf->family == NULL)
    {
      g_set_error (error, LW_REPORT_ERROR, LW_REPORT_ERROR_FAILED, "report: the plant family: %s",
                   ferr->message);
      return FALSE;
    }
  rf->of = of;
  const LwFamily *f = rf->family;
  rf->loops = lw_family_loops (d, variant, f, LW_FAMILY_LOOPS_OTHERS, 0);
  size_t w = f->worst[LW_FAMILY_PHASE_MARGIN];
  lw_figure_family_fill (&rf->fig, f->n_members, rf->loops->n, rf->loops->plant, rf->loops->ev,
                         rf->loops->worst_pm != G_MAXSIZE ? rf->loops->worst_pm : SIZE_MAX,
                         w != G_MAXSIZE ? f->members[w].figure[LW_FAMILY_PHASE_MARGIN] : NAN);
  return TRUE;
}

void
lwr_section_family (LwReport *r, const LwDesign *d, const RVar *rv, const RFamily *rf)
{
  const LwFamily *f = rf->family;
  if (f == NULL)
    return;
  const char *name = rv[rf->of].v->name;
  lwr_heading (r, 2, "family", "Plant family");
  GString *ranges = g_string_new (NULL);
  for (size_t i = 0; i < d->n_params; i++)
    if (d->params[i].ranged)
      g_string_append_printf (ranges, "%s%s from %.6g to %.6g%s", ranges->len > 0 ? ", " : "",
                              d->params[i].name, d->params[i].low, d->params[i].high,
                              d->params[i].spread == LW_SPREAD_LOG ? " (log)" : "");
  GString *points = g_string_new (NULL);
  for (size_t i = 0; i < d->n_points; i++)
    g_string_append_printf (points, "%s“%s”", i > 0 ? ", " : "", d->points[i].name);
  if (d->n_points == 0)
    lwr_para (r, "The controller of “%s” on every machine the parameter ranges describe (%s): "
              "%zu members evaluated — the nominal, %zu corners, a seeded sample and a search "
              "for the worst member of each margin — each exactly as the nominal plant is, "
              "linear (the actuator limits are not simulated for the members).", name,
              ranges->str, f->n_members, f->n_corners);
  else if (ranges->len == 0)
    lwr_para (r, "The controller of “%s” at the nominal plant and at the %zu operating "
              "point(s) of the design (%s), each evaluated exactly as the nominal plant is, "
              "linear (the actuator limits are not simulated for the members).", name,
              f->n_points, points->str);
  else
    lwr_para (r, "The controller of “%s” at the %zu operating point(s) of the design (%s) and "
              "on every machine the parameter ranges describe (%s): %zu members evaluated — "
              "the nominal, the points, %zu corners, a seeded sample and a search for the "
              "worst member of each margin within the ranges — each exactly as the nominal "
              "plant is, linear (the actuator limits are not simulated for the members).",
              name, f->n_points, points->str, ranges->str, f->n_members, f->n_corners);
  g_string_free (ranges, TRUE);
  g_string_free (points, TRUE);
  if (lw_design_analysis_on_data (d))
    lwr_para (r, "These are the plant model's members: the family is on the plant model, "
              "while the design is judged on the measured data (analysis=\"data\").");
  if (f->n_unstable > 0 || f->n_failed > 0)
    lwr_para (r, "%zu member(s) with a loop that is NOT stable, %zu that could not be "
              "evaluated; their figures are included (a negative margin is the worst).",
              f->n_unstable, f->n_failed);
  TableFill t = lwr_table_begin (r, "family-worst", name, 4,
                                 (const char *const[]) { "figure", "nominal", "worst",
                                                         "member" });
  const LwFamilyMember *nominal = &f->members[0];
  for (int k = 0; k < LW_FAMILY_N_FIGURES; k++)
    {
      size_t w = f->worst[k];
      const char *unit = lw_family_figure_unit ((LwFamilyFigure) k);
      lwr_cellf (&t, "%s%s%s%s", lw_family_figure_name ((LwFamilyFigure) k),
                 unit[0] ? " (" : "", unit, unit[0] ? ")" : "");
      gboolean has = nominal->evaluated && nominal->has[k] && !isnan (nominal->figure[k]);
      lwr_cell_take (&t, lwr_num6 (has, has ? nominal->figure[k] : NAN), false);
      lwr_cell_take (&t, lwr_num6 (w != G_MAXSIZE, w != G_MAXSIZE ? f->members[w].figure[k]
                                                                  : NAN), false);
      lwr_cell_take (&t, member_text (f, w), false);
    }
  lwr_cellf (&t, "crossover (rad/s)");
  if (nominal->evaluated && nominal->has_crossover)
    lwr_cell_take (&t, lwr_num6 (true, nominal->crossover_rad_s), false);
  else
    lwr_cellf (&t, "n/a");
  if (isnan (f->crossover_min_rad_s))
    lwr_cellf (&t, "n/a");
  else
    lwr_cellf (&t, "%.6g … %.6g", f->crossover_min_rad_s, f->crossover_max_rad_s);
  lwr_cellf (&t, "over the members");
  lwr_table_end (&t);
  if (f->n_requirements == 0)
    return;
  lwr_para (r, "Each requirement judged on every member; the worst verdict and the member "
            "giving it (a fail before “not available” before a pass, then the smallest "
            "slack). %zu of %zu requirements hold on every member.",
            f->n_requirements - f->n_not_passing, f->n_requirements);
  TableFill q = lwr_table_begin (r, "family-requirements", name, 4,
                                 (const char *const[]) { "requirement", "worst member's value",
                                                         "verdict", "member" });
  for (size_t i = 0; i < f->n_requirements; i++)
    {
      const LwReqResult *v = &f->requirements[i];
      lwr_cellf (&q, "%s", lw_design_requirement_title (&d->requirements[i]));
      lwr_cell_take (&q, lwr_num6 (!isnan (v->achieved), v->achieved), false);
      lwr_cellf (&q, "%s", v->status == LW_REQ_PASS ? "pass" : v->status == LW_REQ_FAIL
                                                                 ? "FAIL" : "not available");
      lwr_cell_take (&q, member_text (f, f->requirement_member[i]), false);
    }
  lwr_table_end (&q);
}
