/* lw-implementation-dialog.h — the active variant's controller as firmware takes it, in the
 * window: form (difference equation or second-order sections), optional Qm.n fixed point with
 * the margins after quantization, the coefficients and sections in words, "Copy" of that text
 * and "Save C Code…" writing the header and source exactly as `loopwright-cli emit` does (one
 * implementation in the engine behind both, lw-implementation.h).
 *
 * Test hook: with LW_TEST_CODE_DIR set, Save C Code writes into that folder without asking.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-engine.h"

G_BEGIN_DECLS

#define LW_TYPE_IMPLEMENTATION_DIALOG (lw_implementation_dialog_get_type ())
G_DECLARE_FINAL_TYPE (LwImplementationDialog, lw_implementation_dialog, LW,
                      IMPLEMENTATION_DIALOG, GtkWindow)

/* A dialog over parent for the evaluated variant eval (a reference is taken); variant_name
 * names it in the title. settings (may be NULL) keeps the last folder. */
LwImplementationDialog *lw_implementation_dialog_new (GtkWindow *parent, LwVariantEval *eval,
                                                      const char *variant_name,
                                                      GSettings *settings);

G_END_DECLS
