/* lw-fit-dialog.h — Fit Model to Measured Response: a rational model in s fitted to the
 * design's measured continuous response (lw_measured_fit, vector fitting; docs/measured-data.md
 * "Model fit"), its order, relative degree and iterations in number fields, fitted again
 * (in a worker thread, after a short pause) whenever one changes; the model as text, the
 * largest relative fit error, and a figure of the data's and the model's magnitude over the
 * measured range with the relative fit error at every measured point below it.
 *
 * "Use as Plant" emits "use" with the model as a plant expression (lw_model_expression) and
 * closes; the window stores it as the design's plant in one undo step. The dialog works on
 * a copy of the measured table made when it opens.
 *
 * With LW_DEBUG_HANDLES=1 every fit shown prints one line
 *   LW-FIT order=N relative-degree=K iterations=I points=P max-rel-error=E
 * (E to 17 digits) or, when the core refuses it, LW-FIT-REFUSED order=N … message=TEXT.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-measured.h"

G_BEGIN_DECLS

#define LW_TYPE_FIT_DIALOG (lw_fit_dialog_get_type ())
G_DECLARE_FINAL_TYPE (LwFitDialog, lw_fit_dialog, LW, FIT_DIALOG, GtkWindow)

/* A dialog over parent fitting a copy of data (a continuous-kind table; source: the table's
 * file name for the intro, may be NULL). Signal "use" (const char *expression): the user
 * takes the fit on show as the plant. */
LwFitDialog *lw_fit_dialog_new (GtkWindow *parent, const LwMeasured *data, const char *source);

G_END_DECLS
