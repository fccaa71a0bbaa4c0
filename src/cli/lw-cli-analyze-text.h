/* lw-cli-analyze-text.h — the text report of `analyze` for a model's loop.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-analysis.h"
#include "lw-simulate.h"

/* Prints the loop's report: plant (with the remarks on its factored forms' errors), the
 * controller, margins, closed loop, step, the simulated reference (with the limits so) and
 * disturbance responses. */
void lw_cli_analyze_print_report (const LwModel *plant_s, double dead_time_s,
                                  const LwEvaluation *ev, const LwStep *step,
                                  const LwSimOptions *so, double reference_step,
                                  const LwSimResponse *ref, const LwSimResponse *din,
                                  const LwSimResponse *dout, double z_form_error,
                                  double w_form_error);
