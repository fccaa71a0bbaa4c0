/* lw-cli-json.h — JSON output of the command-line tool, built with json-glib.
 *
 * Small builders shared by the commands that print results as JSON: a factored model, the
 * loop block (crossovers and margins), the closed loop, the step response, and the whole
 * analysis of a sampled loop.  Each lw_cli_json_add_* function adds one *value* to the
 * builder, so the caller sets the member name first (or is inside an array).
 *
 * Numbers: every double is written with round-trip precision (17 significant digits); a
 * value that is absent (has_* false) or not finite is written as null.  Units are those of
 * the core structures: frequencies ω in rad/s, margins in degrees / dB, times in seconds.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>

#include <json-glib/json-glib.h>

#include "lw-analysis.h"
#include "lw-model.h"
#include "lw-simulate.h"

G_BEGIN_DECLS

/* A number, or null when !isfinite (v). */
void lw_cli_json_add_number (JsonBuilder *b, double v);

/* A number when `has` (and finite), otherwise null. */
void lw_cli_json_add_optional (JsonBuilder *b, bool has, double v);

/* An array of n numbers (an empty array when n == 0). */
void lw_cli_json_add_number_array (JsonBuilder *b, const double *v, size_t n);

/* An array of n [re, im] pairs. */
void lw_cli_json_add_complex_array (JsonBuilder *b, const double complex *v, size_t n);

/* {"gain": leading-coefficient gain, "zeros": [[re, im]…], "poles": [[re, im]…]} */
void lw_cli_json_add_model (JsonBuilder *b, const LwModel *m);

/* The loop block: every crossover with its margin, then the governing values (null where the
 * core reports none). Keys: gain_crossovers_rad_s, phase_margins_deg, phase_crossovers_rad_s,
 * gain_margins_db, phase_margin_deg, gain_crossover_rad_s, gain_margin_db,
 * phase_crossover_rad_s, delay_margin_s, delay_margin_samples, sensitivity_peak,
 * sensitivity_peak_rad_s. */
void lw_cli_json_add_loop (JsonBuilder *b, const LwMargins *m);

/* {"stable": bool, "poles": [[re, im]…]}  (z-plane) */
void lw_cli_json_add_closed_loop (JsonBuilder *b, const LwEvaluation *ev);

/* {"final_value", "overshoot_pct", "rise_time_s", "settling_time_s", "samples": [y(kT)…]} */
void lw_cli_json_add_step (JsonBuilder *b, const LwStep *s);

/* The whole analysis object: sample_period_s, plant_z, plant_w, loop, closed_loop, step.
 * New node; free with json_node_unref. */
JsonNode *lw_cli_json_evaluation (const LwEvaluation *ev);

/* {"iae", "ise", "itae", "control_effort"}: the indices of one response (lw-simulate.h). */
void lw_cli_json_add_indices (JsonBuilder *b, const LwSimIndices *ix);

/* One disturbance response: {"samples": [y(kT)…], "actuator": [u(kT)…], "peak",
 * "peak_time_s", "last_value", "saturated_samples", "held_samples", "intersample_ripple",
 * "continuous_peak", "indices"} (the continuous keys null without sub-steps). */
void lw_cli_json_add_disturbance_response (JsonBuilder *b, const LwSimResponse *r);

/* The analysis with time-domain verification (`analyze --json`): the members of
 * lw_cli_json_evaluation, with `step` the figures of `step` (ev->step, or the limited loop's)
 * plus "actuator", "saturated_samples", "held_samples", "continuous" {"t_s", "y", "peak",
 * "peak_time_s"} (null without sub-steps) and "intersample_ripple" from `ref`; then
 * "disturbance" {"input_step", "output_step"} and "indices" (of the reference step).
 * New node; free with json_node_unref. */
JsonNode *lw_cli_json_analysis (const LwEvaluation *ev, const LwStep *step,
                                const LwSimResponse *ref, const LwSimResponse *input_step,
                                const LwSimResponse *output_step);

/* Pretty-printed JSON text of root, ending in a newline; g_free the result.
 * json-glib 1.6 appends ".0" to any double it prints without a '.', which turns 1e+20 into
 * the invalid token "1e+20.0"; this function repairs such tokens so the text is valid JSON. */
char *lw_cli_json_to_text (JsonNode *root);

/* Prints the builder's root (an object or array it has ended) as lw_cli_json_to_text does, to
 * stdout. */
void lw_cli_json_print_builder (JsonBuilder *b);

G_END_DECLS
