/* lw-window.h — the designer window: the panels on the left (plant and sampling, compensator,
 * requirements), the plot area on the right, all showing one design model.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-application.h"

G_BEGIN_DECLS

#define LW_TYPE_WINDOW (lw_window_get_type ())
G_DECLARE_FINAL_TYPE (LwWindow, lw_window, LW, WINDOW, GtkApplicationWindow)

/* A window on the bundled example design (lw_design_model_new_example). */
LwWindow *lw_window_new (LwApplication *app);

G_END_DECLS
