/* lw-cli-family-measured.h — a measured family on the command line: the worst margins of the
 * variant's loop over several measured responses (the document's <measured> responses, or
 * `--measured` given more than once), as text and as the "measured_family" JSON member
 * (docs/families.md, docs/cli.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <json-glib/json-glib.h>

#include "lw-design.h"
#include "lw-engine.h"
#include "lw-family-measured.h"

/* The measured family of d with variant evaluation e, printed (root NULL) or added to root as
 * "measured_family"; nothing when d holds at most one measured response. *not_passing (may be
 * NULL) gets the count of requirements judged on the data that do not pass on every response
 * (0 when the design's analysis is the model's). Returns the exit status. */
int lw_cli_measured_family_run (const LwDesign *d, const LwVariantEval *e, JsonObject *root,
                                size_t *not_passing);
