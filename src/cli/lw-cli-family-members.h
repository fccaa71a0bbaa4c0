/* lw-cli-family-members.h — every member of a plant family on the command line
 * (`analyze --each-member`; docs/families.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <json-glib/json-glib.h>

#include "lw-family.h"

/* Adds "each_member" to the family's JSON object: one object per member in the family's
 * order — "values" {NAME: value}, "origin" (nominal, corner, sample, search, point), "point"
 * (an operating point's name), "evaluated", "error" (when not), "stable", each figure's value
 * or null ("phase_margin_deg", "gain_margin_db", "delay_margin_s", "sensitivity_peak",
 * "overshoot_pct", "settling_time_s") and the governing "crossover_rad_s". */
void lw_cli_family_members_json (JsonObject *family, const LwFamily *f);

/* The same as a table, one line per member. */
void lw_cli_family_members_print (const LwFamily *f);
