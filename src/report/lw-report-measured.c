/* lw-report-measured.c — the measured response in the design report (docs/report.md,
 * docs/measured-data.md): the section on the data (where they come from, their kind and
 * range, the design's analysis choice), each variant's margins on the data with the interval
 * between the points each crossover lies in, its coherence and the outside-the-data flags,
 * and the data's loop as a variant of the frequency figures. See lw-report-private.h.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include "lw-report-private.h"

/* The points of the table below a coherence (0 without a coherence column). */
static size_t
points_below (const LwMeasured *m, double coherence)
{
  size_t k = 0;
  for (size_t i = 0; m->coherence != NULL && i < m->n; i++)
    k += m->coherence[i] < coherence;
  return k;
}

void
lwr_section_measured (LwReport *r, const LwDesign *d, const RVar *v0)
{
  const LwMeasured *m = d->measured;
  if (m == NULL)
    return;
  bool data = d->measured_analysis == LW_DESIGN_ANALYSIS_DATA;
  lwr_heading (r, 2, "measured", "Measured response");
  lwr_para (r, "The design holds a frequency response measured on the machine. Each variant's "
            "controller is applied to it as to the model: the loop L = z^−N·C(z)·P at every "
            "measured point below π/T, its crossovers and margins found between the points "
            "(ln|L| and the unwrapped phase straight in ln ω) and each given with the "
            "interval between the two points it lies in (docs/measured-data.md). %s",
            v0->ev == NULL
              ? "The design has no plant model: its phase-margin, gain-margin, crossover and "
                "sensitivity requirements are judged on the data; the time-domain figures, "
                "the closed-loop poles and the code's margins after quantization need a "
                "model and are not available."
            : data ? "The design's analysis uses the data (analysis=\"data\"): its phase-margin, "
                   "gain-margin, crossover and sensitivity requirements are judged on the "
                   "data; the time-domain figures, the closed-loop poles and the "
                   "implementation's figures are the model's, as the data cannot give them."
                 : "The design's analysis uses the model (analysis=\"model\"): every "
                   "requirement is judged on the model; the data's margins are shown beside "
                   "it.");
  TableFill t = lwr_table_begin (r, "measured", NULL, 2,
                                 (const char *const[]) { "item", "value" });
  lwr_cellf (&t, "source");
  lwr_cellf (&t, "%s", d->measured_source != NULL ? d->measured_source : "not stated");
  lwr_cellf (&t, "kind");
  if (d->measured_kind == LW_MEASURED_SAMPLED)
    lwr_cellf (&t, "sampled: through the digital loop at the design's period, from the "
               "controller's output value to the sampled measurement (hold, plant, sensor "
               "and dead time included; the computation delay added)");
  else
    lwr_cellf (&t, "continuous: the plant's G(jω); the zero-order hold's response and the "
               "dead time applied, the aliasing terms neglected (good well below π/T)");
  lwr_cellf (&t, "points");
  lwr_cellf (&t, "%zu, from %.6g to %.6g rad/s", m->n, m->omega_rad_s[0],
             m->omega_rad_s[m->n - 1]);
  if (v0->e->measured != NULL)
    {
      lwr_cellf (&t, "points used (below π/T)");
      lwr_cellf (&t, "%zu", v0->e->measured->n);
    }
  lwr_cellf (&t, "coherence");
  if (m->coherence == NULL)
    lwr_cellf (&t, "not given");
  else
    lwr_cellf (&t, "given; %zu point(s) below %.1f (drawn faded)", points_below (m, LW_MEASURED_LOW_COHERENCE),
               LW_MEASURED_LOW_COHERENCE);
  lwr_cellf (&t, "analysis");
  lwr_cellf (&t, "%s", data ? "data: the frequency-response requirements are judged on the data"
                            : "model: every requirement is judged on the model");
  lwr_cellf (&t, "open-loop unstable poles stated");
  lwr_cellf (&t, "%d", d->measured_unstable_poles);
  if (v0->e->measured != NULL && isfinite (v0->e->measured->model_diff))
    {
      lwr_cellf (&t, "model against the data");
      lwr_cellf (&t, "largest relative difference of the model's sampled response %.3g",
                 v0->e->measured->model_diff);
    }
  lwr_table_end (&t);
}

/* One row of the margins table: figure, value, at (rad/s), between the points, coherence. */
static void
crossing_row (TableFill *t, const char *figure, const LwMeasuredCrossing *c, bool coherence)
{
  lwr_cellf (t, "%s", figure);
  lwr_cell_take (t, lwr_num6 (c != NULL, c != NULL ? c->margin : NAN), false);
  lwr_cell_take (t, lwr_num6 (c != NULL, c != NULL ? c->omega_rad_s : NAN), false);
  if (c == NULL)
    lwr_cellf (t, "none in the data");
  else
    lwr_cellf (t, "%.6g … %.6g", c->lo_rad_s, c->hi_rad_s);
  lwr_cellf (t, "%s%s", c == NULL || !coherence ? "" : c->low_coherence ? "LOW (< 0.8)" : "ok",
             c != NULL && c->within_noise ? (coherence ? "; within noise" : "within noise")
                                          : "");
}

void
lwr_measured_variant (LwReport *r, const LwDesign *d, const RVar *rv)
{
  if (d->measured == NULL)
    return;
  const LwVariantEval *e = rv->e;
  lwr_heading (r, 3, NULL, "Margins on the measured data");
  if (e->measured == NULL)
    {
      lwr_para (r, "The measured data cannot be used at this variant's period: %s. The "
                "requirements judged on them are not available.",
                e->measured_error != NULL ? e->measured_error->message : "not evaluated");
      return;
    }
  const LwMeasuredMargins *mm = &e->measured->margins;
  bool coh = e->measured_coherence != NULL;
  TableFill t = lwr_table_begin (r, "measured-margins", rv->v->name, 5,
                                 (const char *const[]) { "figure", "value", "at (rad/s)",
                                                         "between the points (rad/s)",
                                                         "coherence" });
  crossing_row (&t, "phase margin (deg)", lw_engine_measured_governing (mm, TRUE), coh);
  crossing_row (&t, "gain margin (dB)", lw_engine_measured_governing (mm, FALSE), coh);
  for (size_t i = 0; i < mm->n_gain + mm->n_phase; i++)
    {
      bool gain = i < mm->n_gain;
      g_autofree char *what = g_strdup_printf ("%s crossover %zu: %s", gain ? "gain" : "phase",
                                               gain ? i + 1 : i - mm->n_gain + 1,
                                               gain ? "phase margin (deg)" : "gain margin (dB)");
      crossing_row (&t, what, gain ? &mm->gain[i] : &mm->phase[i - mm->n_gain], coh);
    }
  lwr_cellf (&t, "delay margin (s)");
  lwr_cell_take (&t, lwr_num6 (isfinite (mm->delay_margin_s), mm->delay_margin_s), false);
  for (int k = 0; k < 3; k++)
    lwr_cellf (&t, "%s", "");
  lwr_cellf (&t, "sensitivity peak max|S| at a measured point");
  lwr_cell_take (&t, lwr_num6 (isfinite (mm->sensitivity_peak), mm->sensitivity_peak), false);
  lwr_cell_take (&t, lwr_num6 (isfinite (mm->sensitivity_peak),
                               mm->sensitivity_peak_rad_s), false);
  for (int k = 0; k < 2; k++)
    lwr_cellf (&t, "%s", "");
  lwr_cellf (&t, "gain crossover above the data (|L| ≥ 1 at the last point)");
  lwr_cellf (&t, "%s", mm->crossover_above_data ? "YES" : "no");
  for (int k = 0; k < 3; k++)
    lwr_cellf (&t, "%s", "");
  lwr_cellf (&t, "gain crossover below the data (|L| < 1 at the first point)");
  lwr_cellf (&t, "%s", mm->crossover_below_data ? "YES" : "no");
  for (int k = 0; k < 3; k++)
    lwr_cellf (&t, "%s", "");
  const LwMeasuredStability *st = &e->measured->stability;
  lwr_cellf (&t, "closed loop on the data (Nyquist criterion)");
  lwr_cellf (&t, "%s", st->verdict == LW_MEASURED_STABLE ? "stable"
                       : st->verdict == LW_MEASURED_UNSTABLE ? "UNSTABLE" : "undecided");
  if (st->verdict == LW_MEASURED_UNDECIDED)
    lwr_cellf (&t, "%s", "");
  else
    lwr_cellf (&t, "%d unstable closed-loop pole(s)", st->closed_loop_unstable);
  lwr_cellf (&t, "%d open-loop unstable pole(s) stated", st->open_loop_unstable);
  lwr_cellf (&t, "%s", "");
  lwr_table_end (&t);
  lwr_para (r, "Stability on the data: %s", st->note);
  lwr_para (r, "%s A crossover next to a point of coherence below %.1f is marked LOW, one "
            "whose interval was widened by the noise “within noise”; one outside the data is "
            "flagged, never hidden.",
            d->measured_analysis == LW_DESIGN_ANALYSIS_DATA
              ? "The requirements judged on the data (above) take these numbers."
              : "Shown beside the model's; the requirements are the model's (analysis=\"model\").",
            LW_MEASURED_LOW_COHERENCE);
}
