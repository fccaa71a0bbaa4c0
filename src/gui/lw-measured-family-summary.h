/* lw-measured-family-summary.h — a measured family in words (the window's requirements
 * panel, under the plant family's summary).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <glib.h>

#include "lw-family-measured.h"

/* A few lines: "Measured family: N responses" with the responses whose loop the data call
 * unstable, leave undecided or could not close; the worst phase margin, gain margin and
 * sensitivity peak, each with the response giving it; "k of n requirements judged on the data
 * pass on every response", or (analysis="model") that the family is shown for information, not
 * judged. "not evaluated" with error's message when family is NULL. g_free it. */
char *lw_measured_family_summary (const LwMeasuredFamily *family, const GError *error);
