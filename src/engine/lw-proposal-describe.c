/* lw-proposal-describe.c — a proposal in words: its stages, its targets, what the
 * variant would reach with it and which requirements it leaves unmet.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-proposal-private.h"

/* ---- in words ------------------------------------------------------------------------------ */

static void
describe_stage (GString *s, size_t k, const LwStage *st)
{
  LwStageParam p[LW_STAGE_MAX_PARAMS];
  size_t np = lw_stage_params (st, p);
  g_string_append_printf (s, "  %zu. %-16s %-9s", k + 1, st->label, lw_stage_kind_name (st->kind));
  for (size_t i = 0; i < np; i++)
    {
      if (p[i].derived)
        continue;
      gboolean unit = p[i].unit[0] != '\0' && strcmp (p[i].unit, "ratio") != 0;
      g_string_append_printf (s, "%s%s %.6g%s%s", i == 0 ? " " : ", ", p[i].name, p[i].value,
                              unit ? " " : "", unit ? p[i].unit : "");
    }
  g_string_append_c (s, '\n');
}

static const char *
achieved_unit_sep (const char *unit)
{
  return unit[0] == '\0' || strcmp (unit, "ratio") == 0 || strcmp (unit, "%") == 0 ? "" : " ";
}

/* The margins the proposal reaches on the measured data (the design's analysis is on them). */
static void
describe_on_data (GString *s, const LwVariantEval *e)
{
  if (e->measured == NULL)
    {
      g_string_append_printf (s, "\nOn the measured data: the loop cannot be closed on them (%s)\n",
                              e->measured_error != NULL ? e->measured_error->message
                                                        : "not evaluated");
      return;
    }
  const LwMeasuredLoop *ml = e->measured;
  const LwMeasuredMargins *m = &ml->margins;
  g_string_append_printf (s, "\nReached on the measured data (%zu points, %.6g … %.6g rad/s), "
                             "L = z^-%d C(z) P_data, between the points\n", ml->n,
                          ml->omega_rad_s[0], ml->omega_rad_s[ml->n - 1], e->compute_delay);
  for (size_t i = 0; i < m->n_gain; i++)
    if (m->gain[i].omega_rad_s == m->gain_crossover_rad_s)
      g_string_append_printf (s, "  %-24s %.4g deg at %.6g rad/s (between the points at %.6g "
                                 "and %.6g)%s\n", "phase margin", m->phase_margin_deg,
                              m->gain_crossover_rad_s, m->gain[i].lo_rad_s, m->gain[i].hi_rad_s,
                              m->gain[i].low_coherence ? ", low coherence" : "");
  if (m->n_gain > 1)
    g_string_append_printf (s, "  %-24s %zu in the data\n", "gain crossovers", m->n_gain);
  if (m->n_gain == 0)
    g_string_append_printf (s, "  %-24s none in the data (no gain crossover)\n", "phase margin");
  if (m->crossover_above_data)
    g_string_append_printf (s, "  %-24s |L| >= 1 at the highest point: a crossover may lie above "
                               "the data\n", "note");
  if (m->n_phase > 0)
    g_string_append_printf (s, "  %-24s %.4g dB at %.6g rad/s\n", "gain margin",
                            m->gain_margin_db, m->phase_crossover_rad_s);
  else
    g_string_append_printf (s, "  %-24s none in the data (no phase crossover)\n", "gain margin");
  if (isfinite (m->sensitivity_peak))
    g_string_append_printf (s, "  %-24s %.4g (%.3g dB) at %.6g rad/s (over the points)\n",
                            "sensitivity peak |S|", m->sensitivity_peak,
                            20.0 * log10 (m->sensitivity_peak), m->sensitivity_peak_rad_s);
  const LwMeasuredStability *st = &ml->stability;
  /* the note begins with the verdict */
  g_string_append_printf (s, "  %-24s %s\n", "closed loop (Nyquist)",
                          st->note[0] ? st->note : lw_measured_verdict_name (st->verdict));
}

char *
lw_proposal_describe (const LwDesign *d, size_t variant, const LwProposal *p)
{
  GString *s = g_string_new (NULL);
  for (guint i = 0; i < p->lines->len; i++)
    g_string_append_printf (s, "  %s\n", (const char *) g_ptr_array_index (p->lines, i));
  size_t kept = p->replaces ? 0 : d->variants[variant].n_stages;
  if (p->replaces)
    g_string_append (s, "\nStages replacing the variant's (w-plane; frequencies are nu in "
                        "rad/s)\n");
  else
    g_string_append_printf (s, "\nStages added after the variant's %zu (w-plane; frequencies "
                               "are nu in rad/s)\n", kept);
  for (size_t k = 0; k < p->n_stages; k++)
    describe_stage (s, kept + k, &p->stages[k]);

  const LwVariantEval *e = p->preview;
  if (!lw_prop_evaluated (e))
    {
      g_string_append_printf (s, "\nThe variant with these stages does not evaluate: %s\n",
                              e->error->message);
      return g_string_free (s, FALSE);
    }
  if (e->controller_w != NULL)
    {
      char *cw = lw_model_text (e->controller_w);
      g_string_append_printf (s, "\nController in w, with the proposal:\n  C(w) = %s\n", cw);
      g_free (cw);
    }
  gboolean on_data = d->measured != NULL && d->measured_analysis == LW_DESIGN_ANALYSIS_DATA;
  if (on_data)
    describe_on_data (s, e);
  if (e->ev != NULL)
    {
      const LwMargins *m = &e->ev->margins;
      g_string_append_printf (s, "\nReached%s, loop L(z) = z^-%d C(z) P(z)\n",
                              on_data ? " on the model (not what the requirements are judged on)"
                                      : "", e->compute_delay);
      if (m->has_phase_margin)
        g_string_append_printf (s, "  %-24s %.4g deg at %.6g rad/s\n", "phase margin",
                                m->phase_margin_deg, m->gain_crossover_rad_s);
      else
        g_string_append_printf (s, "  %-24s none (no gain crossover)\n", "phase margin");
      if (m->has_gain_margin)
        g_string_append_printf (s, "  %-24s %.4g dB at %.6g rad/s\n", "gain margin",
                                m->gain_margin_db, m->phase_crossover_rad_s);
      else
        g_string_append_printf (s, "  %-24s none (no phase crossover)\n", "gain margin");
      if (m->has_sensitivity)
        g_string_append_printf (s, "  %-24s %.4g (%.3g dB) at %.6g rad/s\n",
                                "sensitivity peak |S|", m->sensitivity_peak,
                                20.0 * log10 (m->sensitivity_peak), m->sensitivity_peak_rad_s);
      g_string_append_printf (s, "  %-24s %s\n", "closed loop",
                              e->ev->stable ? "stable" : "UNSTABLE");
    }

  if (e->requirements != NULL && d->n_requirements > 0)
    {
      g_string_append (s, "\nRequirements\n");
      for (size_t i = 0; i < d->n_requirements; i++)
        {
          const LwReqResult *r = &e->requirements[i];
          char *target = lw_requirement_target_text (&d->requirements[i].req);
          const char *unit = lw_req_kind_unit (d->requirements[i].req.kind);
          const char *word = r->status == LW_REQ_PASS ? "pass"
                             : r->status == LW_REQ_FAIL ? "FAIL" : "n/a ";
          if (isfinite (r->achieved))
            g_string_append_printf (s, "  %s  %s: %.4g%s%s (%s)\n", word, lw_prop_req_title (d, i),
                                    r->achieved, achieved_unit_sep (unit),
                                    achieved_unit_sep (unit)[0] ? unit : "", target);
          else
            g_string_append_printf (s, "  %s  %s (%s)\n", word, lw_prop_req_title (d, i), target);
          g_free (target);
        }
      if (p->n_unmet == 0)
        g_string_append (s, "\nEvery requirement passes.\n");
      else
        {
          g_string_append (s, "\nNot met:\n");
          for (size_t i = 0; i < p->n_unmet; i++)
            g_string_append_printf (s, "  %s\n", p->unmet[i].reason);
        }
    }
  return g_string_free (s, FALSE);
}
