/* lw-family-summary.h — a plant family in words (the window's requirements panel).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <glib.h>

#include "lw-family.h"

/* A few lines: "Plant family: N members", the worst phase and gain margin and sensitivity
 * peak, each with its member's ranged parameters, "k of n requirements pass on every
 * member"; on a design judged on data, that the members are the model's; or "not
 * evaluated" with error's message when family is NULL. g_free it. */
char *lw_family_summary (const LwFamily *family, const LwDesign *d, const GError *error);
/* What a plant family's numbers are when the design is judged on its measured data
 * (lw_design_analysis_on_data): the model's members; the words `analyze` prints, translated. */
const char *lw_family_on_model_note (void);
/* A member in words: "K = 150, wn = 225" (its ranged parameters), "nominal" for the nominal
 * without any. g_free it. */
char *lw_family_member_words (const LwFamily *f, const LwDesign *d, size_t index);
