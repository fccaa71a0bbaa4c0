/* lw-cli-figure-options.h — reading `plot`'s --size and --pdf-date.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>

/* --size WIDTHxHEIGHT: two whole numbers of pixels, 16 … LW_PLOT_MAX_SIDE each. Prints why
 * and returns false when it is not. */
bool lw_cli_parse_figure_size (const char *text, double *w, double *h);

/* --pdf-date: a date of the form YYYY-MM-DDThh:mm:ss with an optional zone (Z or ±hh:mm).
 * Prints why and returns false when it is not. */
bool lw_cli_check_pdf_date (const char *text);
