/* lw-cli-family-plot.h — a plant family in `plot`'s figures.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-cli-family.h"
#include "lw-figure-data.h"
#include "lw-plot.h"

/* The views a plant family is drawn in (its members' loop frequency responses). */
bool lw_cli_family_plot_view (LwPlotView v);

/* The family of variant `variant` of d (--members, --seed; the caller refuses --range and --point
 * with a document: lw_cli_family_refuse_doc)
 * and the loops of the members drawn, into *ff for the figure; *family and *loops are the
 * caller's to free. Prints and returns the exit status on failure; path names the document. */
int lw_cli_family_plot (const char *path, const LwDesign *d, size_t variant,
                        const LwCliFamilyArgs *fa, LwFamily **family, LwFamilyLoops **loops,
                        LwFigureFamily *ff);

/* The family of the loop options (--param, --range, --point; the controller in z of lp, as
 * `analyze` evaluates it) and the loops of the members drawn, into *ff, when a family is
 * asked for (else *family stays NULL); with draw false the options are only checked. Prints
 * and returns the exit status on failure. */
int lw_cli_family_plot_loop (const LwCliLoopArgs *loop, const LwCliFamilyArgs *fa,
                             const LwCliLoop *lp, bool draw, LwFamily **family,
                             LwFamilyLoops **loops, LwFigureFamily *ff);
