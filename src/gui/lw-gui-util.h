/* lw-gui-util.h — small helpers the panels share (text of models for display).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

#include "lw-design.h"
#include "lw-model.h"

G_BEGIN_DECLS

/* Shows "PREFIX = factored text" (lw_model_format, 6 significant digits) in label, or empties it when m is NULL. */
void lw_gui_label_show_model (GtkLabel *label, const char *prefix, const LwModel *m);

/* Sets a widget's tooltip text only when it differs: setting one asks the windowing system
 * where the pointer is, a round trip each time (it dominated a drag's frames). */
void lw_gui_set_tooltip (GtkWidget *widget, const char *text);

/* The mouse wheel over a number field scrolls the panels instead of changing the number:
 * reading down the panels must not edit the design (and GTK sends the wheel to the field
 * that was under the pointer before the panels moved). The arrow keys, Page Up/Down and the
 * field's − and + buttons still step it. */
void lw_gui_spin_wheel_off (GtkSpinButton *spin);

/* A hidden label for why a typed value was refused, under a part's fields: wrapped, in the
 * error style (the parameter and point rows, the family's members and seed). */
GtkLabel *lw_gui_problem_label_new (void);
/* Shows "FIELD: WHY; not taken." in such a label (why NULL: hides it), and the refusal's
 * debug line (lw_number_field_debug_refusal). */
void lw_gui_show_refusal (GtkLabel *problem, const char *field, const char *why);
/* now (taken) in place of *last when they differ: TRUE then (what a widget shows changed). */
gboolean lw_gui_take_if_changed (char **last, char *now);
/* Marks an undo step in widget's window (the window.history-commit action): before an edit
 * and after it, so the edit is one step of its own. */
void lw_gui_history_step (GtkWidget *widget);

/* A requirement in words for the window: its name when it has one, else its kind and target
 * ("Phase margin at least 45 deg"). g_free it. */
char *lw_gui_requirement_title (const LwDesignRequirement *r);

/* The grid of a small dialog: 8 px between rows, 12 between columns, 18 around. */
GtkWidget *lw_gui_dialog_grid (void);

/* A row's label with its mnemonic for target, aligned at xalign and yalign (0: the top, for
 * a target taller than one line). */
GtkWidget *lw_gui_row_label (float xalign, float yalign, const char *mnemonic, GtkWidget *target);

G_END_DECLS
