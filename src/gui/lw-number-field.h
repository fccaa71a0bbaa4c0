/* lw-number-field.h — number fields that never lie: a GtkSpinButton that reads what is typed
 * with the one number syntax of documents and the command line (lw-number.h), refuses what
 * is not a number or lies outside the field's range with the reason at the field, keeps the
 * design's last good value meanwhile, and shows values with enough significant digits.
 *
 * A refused text stays in the field, marked (the "error" style class, the reason in its
 * tooltip and in an optional problem label), until it is corrected or the design gives the
 * field a new value; the spin button's value, and so the design, keep the last good value.
 * The decimal comma is taken where the user's locale writes numbers with one ("0,5" in a
 * German locale); elsewhere it is refused with the reason. Whole-number fields (digits 0)
 * take whole numbers only, and show every digit of them.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <gtk/gtk.h>

G_BEGIN_DECLS

/* Makes spin a strict number field. name: the field's name for messages (translated, e.g.
 * "Sample period"); problem: a label (may be NULL, may be shared by several fields) that
 * shows the refusal beside the fields and hides when it is resolved. The range is the
 * spin button's adjustment's [lower, upper]; whole numbers when its digits are 0. */
void lw_number_field_setup (GtkSpinButton *spin, const char *name, GtkLabel *problem);

/* LW_DEBUG_HANDLES=1: print every field's position again while it moves (the window calls
 * this when a new evaluation is shown, as labels above the fields change); else nothing. */
void lw_number_field_watch_positions (void);

/* The reason the field's text is refused, or NULL when it shows a value. */
const char *lw_number_field_get_problem (GtkSpinButton *spin);

/* Reads text as a number for a field [lo, hi] (whole: whole numbers only). TRUE with *out,
 * or FALSE with *why (g_free) saying what is wrong with it, in words for the window. */
gboolean lw_number_field_parse (const char *text, double lo, double hi, gboolean whole,
                                double *out, char **why);

/* value for display: up to 7 significant digits, no trailing zeros; g_free it. */
char *lw_number_field_format (double value);

/* The owner's own rule on a value the field takes (a range's low end below its high end):
 * NULL to take value, else why not (g_free'd by the field), refused like a number outside
 * the field's range — at the field, the text kept, the design keeping its last good value. */
typedef char *(*LwNumberFieldCheck) (GtkSpinButton *spin, double value, gpointer data);
void lw_number_field_set_check (GtkSpinButton *spin, LwNumberFieldCheck check, gpointer data);

/* Refuses the value the field shows now (one its +/− buttons stepped to, which no check
 * sees) with why: the field shows keep again as its value, its text stays, marked. */
void lw_number_field_refuse (GtkSpinButton *spin, double keep, const char *why);

/* LW_DEBUG_HANDLES=1: prints widget's position as a field's ("LW-FIELD name=…") for the
 * window tests (a text entry taking a number, not a spin button); else nothing. */
void lw_number_field_watch_widget (GtkWidget *widget, const char *name);
/* LW_DEBUG_HANDLES=1: the line a refusal prints ("LW-FIELD-REFUSED name: why"). */
void lw_number_field_debug_refusal (const char *name, const char *why);

G_END_DECLS
