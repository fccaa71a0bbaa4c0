/* lw-gui-util.h — small helpers the panels share (text of models and numbers for display).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <glib.h>

#include "lw-model.h"

G_BEGIN_DECLS

/* Factored text of a model with 6 significant digits (lw_zpk_format); g_free the result. */
char *lw_gui_format_zpk (const LwZpk *m);

G_END_DECLS
