/* lw-report-family-measured.c — the report's "Measured family" section: a design holding
 * several measured responses has each variant's loop closed on every one of them
 * (lw_measured_family_evaluate, as `analyze` and `check` do), the worst margins with the
 * response giving each, each response's figures and Nyquist verdict, and the requirements
 * judged on the data with the response of the worst verdict (docs/families.md).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>

#include "lw-family-measured.h"
#include "lw-report-private.h"

/* One variant's measured family, its tables. */
static void
variant_family (LwReport *r, const LwDesign *d, const RVar *rv)
{
  g_autoptr (GError) error = NULL;
  g_autoptr (LwMeasuredFamily) f = lw_measured_family_evaluate (d, rv->e, &error);
  const char *name = rv->v->name;
  if (f == NULL)
    {
      lwr_para (r, "“%s”: the measured family could not be evaluated: %s", name,
                error->message);
      return;
    }
  char *worst[LW_MEASURED_FAMILY_N_FIGURES];
  for (int k = 0; k < LW_MEASURED_FAMILY_N_FIGURES; k++)
    {
      const char *unit = lw_measured_family_figure_unit ((LwMeasuredFamilyFigure) k);
      worst[k] = f->worst[k] != G_MAXSIZE
                   ? g_strdup_printf ("%.4g%s%s on “%s”", f->worst_value[k], unit[0] ? " " : "",
                                      unit, f->sets[f->worst[k]].name)
                   : g_strdup ("none in the data");
    }
  lwr_para (r, "“%s” on %zu measured responses: worst phase margin %s, worst gain margin %s, "
            "largest sensitivity peak %s.%s%s", name, f->n_sets, worst[0], worst[1], worst[2],
            f->n_unstable > 0 ? " Responses whose loop the data call NOT stable are listed "
                                "below." : "",
            f->n_undecided > 0 ? " For some responses the data leave the stability "
                                 "undecided." : "");
  for (int k = 0; k < LW_MEASURED_FAMILY_N_FIGURES; k++)
    g_free (worst[k]);
  TableFill t = lwr_table_begin (r, "measured-family", name, 5,
                                 (const char *const[]) { "response", "phase margin (deg)",
                                                         "gain margin (dB)",
                                                         "sensitivity peak",
                                                         "closed loop on the data" });
  for (size_t i = 0; i < f->n_sets; i++)
    {
      const LwMeasuredFamilySet *s = &f->sets[i];
      const LwMeasuredMargins *m = &s->loop.margins;
      lwr_cellf (&t, "%s", s->name);
      lwr_cell_take (&t, lwr_num6 (s->closed && m->n_gain > 0, m->phase_margin_deg),
                     i == f->worst[0]);
      lwr_cell_take (&t, lwr_num6 (s->closed && m->n_phase > 0, m->gain_margin_db),
                     i == f->worst[1]);
      lwr_cell_take (&t, lwr_num6 (s->closed && isfinite (m->sensitivity_peak),
                                   m->sensitivity_peak), i == f->worst[2]);
      if (s->closed)
        lwr_cellf (&t, "%s", lw_measured_verdict_name (s->loop.stability.verdict));
      else
        lwr_cellf (&t, "not closed: %s", s->error);
    }
  lwr_table_end (&t);
  size_t judged = 0;
  for (size_t q = 0; q < f->n_requirements; q++)
    judged += f->judged_requirement[q];
  if (judged == 0)
    return;
  TableFill q = lwr_table_begin (r, "measured-family-requirements", name, 4,
                                 (const char *const[]) { "requirement", "worst value",
                                                         "verdict", "response" });
  for (size_t i = 0; i < f->n_requirements; i++)
    {
      if (!f->judged_requirement[i])
        continue;
      const LwReqResult *v = &f->requirements[i];
      lwr_cellf (&q, "%s", lw_design_requirement_title (&d->requirements[i]));
      lwr_cell_take (&q, lwr_num6 (!isnan (v->achieved), v->achieved), false);
      lwr_cellf (&q, "%s", v->status == LW_REQ_PASS ? "pass" : v->status == LW_REQ_FAIL
                                                                 ? "FAIL" : "not available");
      lwr_cellf (&q, "%s", f->requirement_set[i] < f->n_sets
                             ? f->sets[f->requirement_set[i]].name : "");
    }
  lwr_table_end (&q);
}

void
lwr_section_measured_family (LwReport *r, const LwDesign *d, const RVar *rv, size_t n)
{
  if (!lw_measured_family_wanted (d))
    return;
  lwr_heading (r, 2, "measured-family", "Measured family");
  lwr_para (r, "The design holds %zu measured responses (one sweep per machine). Each "
            "variant's loop is closed on every one of them as on the first; %s",
            lw_design_n_measured (d),
            lw_design_analysis_on_data (d)
              ? "the phase margin, gain margin, crossover and sensitivity requirements are "
                "judged on every response (analysis=\"data\")."
              : "the design's analysis is the model's (analysis=\"model\"): these figures are "
                "shown for information and not judged.");
  for (size_t k = 0; k < n; k++)
    if (rv[k].e != NULL && rv[k].e->controller_z != NULL)
      variant_family (r, d, &rv[k]);
}
