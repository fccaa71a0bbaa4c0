/* lw-number-field.c — strict number fields (lw-number-field.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <limits.h>
#include <locale.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include <glib/gi18n.h>

#include "lw-number-field.h"
#include "lw-number.h"

typedef struct
{
  char *name;
  GtkLabel *problem;      /* weak: the label the panel owns */
  char *why;              /* the refusal shown, or NULL */
  gboolean refusing;      /* the next output keeps the refused text */
  char *debug_last;       /* LW_DEBUG_HANDLES: the last position line printed */
  guint debug_same;
  GtkWidget *spin;        /* weak */
  guint debug_tick_id;    /* 0 when the position has settled */
  LwNumberFieldCheck check;   /* the owner's own refusal of a value, or NULL */
  gpointer check_data;
} Field;

/* LW_DEBUG_HANDLES: every field, so a refusal shown above some can start their position
 * lines again (the fields below it move) */
static GList *debug_fields;

static gboolean
debugging (void)
{
  return g_strcmp0 (g_getenv ("LW_DEBUG_HANDLES"), "1") == 0;
}

/* LW_DEBUG_HANDLES: the centre of the field in window-surface coordinates, printed when it
 * changes ("LW-FIELD name=Sample-period sx=… sy=…"), so a test can click into it; the tick
 * stops once the position has stayed put for 60 frames. */
static gboolean
debug_tick (GtkWidget *widget, GdkFrameClock *clock, gpointer data)
{
  Field *f = data;
  GtkNative *native = gtk_widget_get_native (widget);
  graphene_point_t p;
  if (native == NULL || gtk_widget_get_width (widget) <= 0
      || !gtk_widget_compute_point (widget, GTK_WIDGET (native),
                                    &GRAPHENE_POINT_INIT (gtk_widget_get_width (widget) / 4.0f,
                                                          gtk_widget_get_height (widget) / 2.0f),
                                    &p))
    return G_SOURCE_CONTINUE;
  double tx = 0, ty = 0;
  gtk_native_get_surface_transform (native, &tx, &ty);
  g_autofree char *name = g_strdelimit (g_strdup (f->name), " ", '-');
  g_autofree char *line = g_strdup_printf ("LW-FIELD name=%s sx=%.3f sy=%.3f\n", name,
                                           p.x + tx, p.y + ty);
  if (g_strcmp0 (line, f->debug_last) != 0)
    {
      g_free (f->debug_last);
      f->debug_last = g_steal_pointer (&line);
      fputs (f->debug_last, stdout);
      fflush (stdout);
      f->debug_same = 0;
    }
  if (++f->debug_same < 60)
    return G_SOURCE_CONTINUE;
  f->debug_tick_id = 0;
  return G_SOURCE_REMOVE;
}

static void debug_watch_positions (void);

void
lw_number_field_watch_positions (void)
{
  if (debugging ())
    debug_watch_positions ();
}

static void
debug_watch_positions (void)
{
  for (GList *l = debug_fields; l != NULL; l = l->next)
    {
      Field *f = l->data;
      f->debug_same = 0;
      if (f->debug_tick_id == 0 && f->spin != NULL)
        f->debug_tick_id = gtk_widget_add_tick_callback (f->spin, debug_tick, f, NULL);
    }
}

/* LW_DEBUG_HANDLES=1: a line per refusal, for the window tests */
static void
debug_refusal (const Field *f)
{
  if (debugging ())
    {
      printf ("LW-FIELD-REFUSED %s: %s\n", f->name, f->why);
      fflush (stdout);
    }
}

static void
field_free (gpointer data)
{
  Field *f = data;
  if (f->problem != NULL)
    g_object_remove_weak_pointer (G_OBJECT (f->problem), (gpointer *) &f->problem);
  g_free (f->name);
  g_free (f->why);
  g_free (f->debug_last);
  debug_fields = g_list_remove (debug_fields, f);
  g_free (f);
}

static Field *
field_of (GtkSpinButton *spin)
{
  return g_object_get_data (G_OBJECT (spin), "lw-number-field");
}

/* The decimal separator of the user's locale for numbers ('.' or ','). */
static char
locale_decimal_point (void)
{
  const struct lconv *lc = localeconv ();
  return lc != NULL && lc->decimal_point != NULL && strcmp (lc->decimal_point, ",") == 0 ? ','
                                                                                         : '.';
}

char *
lw_number_field_format (double value)
{
  char buf[G_ASCII_DTOSTR_BUF_SIZE];
  if (value == 0.0)
    return g_strdup ("0");
  g_ascii_formatd (buf, sizeof buf, "%.7g", value);
  return g_strdup (buf);
}

/* value as a field shows it: a whole-number field's every digit (a seed of 12345678 is not
 * 1.234568e+07), any other's lw_number_field_format */
static char *
format_for (double value, gboolean whole)
{
  if (whole && fabs (value) < 1e16)
    return g_strdup_printf ("%.0f", value);
  return lw_number_field_format (value);
}

static char *
spin_text (GtkSpinButton *spin)
{
  return format_for (gtk_spin_button_get_value (spin), gtk_spin_button_get_digits (spin) == 0);
}

gboolean
lw_number_field_parse (const char *text, double lo, double hi, gboolean whole, double *out,
                       char **why)
{
  g_autofree char *t = g_strstrip (g_strdup (text != NULL ? text : ""));
  if (t[0] == '\0')
    {
      *why = g_strdup (_("empty; type a number"));
      return FALSE;
    }
  /* U+2212 (the typographic minus) looks like '-' but is not the syntax */
  if (strstr (t, "\xe2\x88\x92") != NULL)
    {
      *why = g_strdup_printf (_("“%s” has a typographic minus (−); type “-”"), t);
      return FALSE;
    }
  char *comma = strchr (t, ',');
  if (comma != NULL)
    {
      if (locale_decimal_point () == ',' && strchr (comma + 1, ',') == NULL
          && strchr (t, '.') == NULL)
        *comma = '.';      /* the locale's decimal comma */
      else
        {
          *why = g_strdup_printf (_("“%s” is not a number: write the decimal point as “.” "
                                    "(0.5), and no thousands separators"), t);
          return FALSE;
        }
    }
  double v;
  if (whole)
    {
      long long n;
      if (lw_number_parse_whole (t, LLONG_MIN, LLONG_MAX, &n, NULL, NULL) == LW_NUMBER_OK)
        v = (double) n;
      else
        {
          *why = lw_number_parse (t, &v) == LW_NUMBER_OK
                   ? g_strdup_printf (_("“%s” is not a whole number"), t)
                   : g_strdup_printf (_("“%s” is not a whole number (for example 0, 1 or 2)"), t);
          return FALSE;
        }
    }
  else
    {
      LwNumberResult r = lw_number_parse (t, &v);
      if (r == LW_NUMBER_TOO_LONG)
        {
          *why = g_strdup_printf (_("more than %d characters"), LW_NUMBER_MAX_CHARS);
          return FALSE;
        }
      if (r == LW_NUMBER_NOT_FINITE)
        {
          *why = g_strdup_printf (_("“%s” is too large for a number"), t);
          return FALSE;
        }
      if (r != LW_NUMBER_OK)
        {
          *why = g_strdup_printf (_("“%s” is not a number (for example 25, 0.5 or 1e-3)"), t);
          return FALSE;
        }
    }
  if (v < lo || v > hi)
    {
      g_autofree char *l = format_for (lo, whole);
      g_autofree char *h = format_for (hi, whole);
      *why = g_strdup_printf (_("%s is outside what this field takes, %s to %s"), t, l, h);
      return FALSE;
    }
  *out = v;
  return TRUE;
}

static void
show (GtkSpinButton *spin, Field *f)
{
  GtkWidget *w = GTK_WIDGET (spin);
  if (f->why != NULL)
    {
      g_autofree char *kept = spin_text (spin);
      /* TRANSLATORS: field name, the reason, the value the design keeps */
      g_autofree char *msg = g_strdup_printf (_("%s: %s. The design keeps %s."), f->name, f->why,
                                              kept);
      gtk_widget_add_css_class (w, "error");
      gtk_widget_set_tooltip_text (w, msg);
      gtk_accessible_update_property (GTK_ACCESSIBLE (spin), GTK_ACCESSIBLE_PROPERTY_DESCRIPTION,
                                      msg, -1);
      if (f->problem != NULL)
        {
          gtk_label_set_text (f->problem, msg);
          g_object_set_data (G_OBJECT (f->problem), "lw-number-field-owner", spin);
          gtk_widget_set_visible (GTK_WIDGET (f->problem), TRUE);
        }
    }
  else
    {
      gtk_widget_remove_css_class (w, "error");
      gtk_widget_set_tooltip_text (w, NULL);
      gtk_accessible_reset_property (GTK_ACCESSIBLE (spin), GTK_ACCESSIBLE_PROPERTY_DESCRIPTION);
      if (f->problem != NULL
          && g_object_get_data (G_OBJECT (f->problem), "lw-number-field-owner") == spin)
        {
          g_object_set_data (G_OBJECT (f->problem), "lw-number-field-owner", NULL);
          gtk_label_set_text (f->problem, "");
          gtk_widget_set_visible (GTK_WIDGET (f->problem), FALSE);
        }
    }
  if (debugging ())
    debug_watch_positions ();
}

static int
on_input (GtkSpinButton *spin, double *new_value, gpointer data)
{
  Field *f = data;
  GtkAdjustment *adj = gtk_spin_button_get_adjustment (spin);
  double v = 0.0;
  char *why = NULL;
  g_clear_pointer (&f->why, g_free);
  /* the text as shown for the current value, untouched: the value itself, not the 7 digits
   * on display (reading them back would change the design by a rounding) */
  g_autofree char *shown = spin_text (spin);
  if (strcmp (shown, gtk_editable_get_text (GTK_EDITABLE (spin))) == 0)
    {
      *new_value = gtk_spin_button_get_value (spin);
      if (gtk_widget_has_css_class (GTK_WIDGET (spin), "error"))
        show (spin, f);
      return TRUE;
    }
  if (!lw_number_field_parse (gtk_editable_get_text (GTK_EDITABLE (spin)),
                              gtk_adjustment_get_lower (adj), gtk_adjustment_get_upper (adj),
                              gtk_spin_button_get_digits (spin) == 0, &v, &why))
    {
      f->why = why;
      f->refusing = TRUE;
      show (spin, f);
      debug_refusal (f);
      return GTK_INPUT_ERROR;
    }
  if (f->check != NULL && (why = f->check (spin, v, f->check_data)) != NULL)
    {
      f->why = why;
      f->refusing = TRUE;
      show (spin, f);
      debug_refusal (f);
      return GTK_INPUT_ERROR;
    }
  *new_value = v;
  return TRUE;
}

static gboolean
on_output (GtkSpinButton *spin, gpointer data)
{
  Field *f = data;
  if (f->refusing)
    {
      /* the refused text stays in view, marked; the value is the last good one */
      f->refusing = FALSE;
      return TRUE;
    }
  g_autofree char *text = spin_text (spin);
  if (strcmp (text, gtk_editable_get_text (GTK_EDITABLE (spin))) != 0)
    gtk_editable_set_text (GTK_EDITABLE (spin), text);
  if (f->why != NULL)
    {
      g_clear_pointer (&f->why, g_free);
      show (spin, f);
    }
  return TRUE;
}

void
lw_number_field_setup (GtkSpinButton *spin, const char *name, GtkLabel *problem)
{
  g_return_if_fail (GTK_IS_SPIN_BUTTON (spin));
  Field *f = g_new0 (Field, 1);
  f->name = g_strdup (name);
  f->problem = problem;
  if (problem != NULL)
    g_object_add_weak_pointer (G_OBJECT (problem), (gpointer *) &f->problem);
  g_object_set_data_full (G_OBJECT (spin), "lw-number-field", f, field_free);
  /* the text is ours to read: letters (1e-3) must reach the parser, and a refusal must not
   * be clamped into the range */
  gtk_spin_button_set_numeric (spin, FALSE);
  gtk_spin_button_set_update_policy (spin, GTK_UPDATE_IF_VALID);
  g_signal_connect (spin, "input", G_CALLBACK (on_input), f);
  g_signal_connect (spin, "output", G_CALLBACK (on_output), f);
  on_output (spin, f);
  f->spin = GTK_WIDGET (spin);
  if (debugging ())
    {
      debug_fields = g_list_prepend (debug_fields, f);
      f->debug_tick_id = gtk_widget_add_tick_callback (GTK_WIDGET (spin), debug_tick, f, NULL);
    }
}

const char *
lw_number_field_get_problem (GtkSpinButton *spin)
{
  Field *f = field_of (spin);
  return f != NULL ? f->why : NULL;
}

void
lw_number_field_set_check (GtkSpinButton *spin, LwNumberFieldCheck check, gpointer data)
{
  Field *f = field_of (spin);
  g_return_if_fail (f != NULL);
  f->check = check;
  f->check_data = data;
}

void
lw_number_field_refuse (GtkSpinButton *spin, double keep, const char *why)
{
  Field *f = field_of (spin);
  g_return_if_fail (f != NULL && why != NULL);
  g_free (f->why);
  f->why = g_strdup (why);
  f->refusing = TRUE;          /* the refused text stays in view */
  gtk_spin_button_set_value (spin, keep);
  f->refusing = FALSE;
  show (spin, f);
  debug_refusal (f);
}

void
lw_number_field_watch_widget (GtkWidget *widget, const char *name)
{
  g_return_if_fail (GTK_IS_WIDGET (widget));
  if (!debugging ())
    return;
  Field *f = g_new0 (Field, 1);
  f->name = g_strdup (name);
  f->spin = widget;
  g_object_set_data_full (G_OBJECT (widget), "lw-number-field-watch", f, field_free);
  debug_fields = g_list_prepend (debug_fields, f);
  f->debug_tick_id = gtk_widget_add_tick_callback (widget, debug_tick, f, NULL);
}

void
lw_number_field_debug_refusal (const char *name, const char *why)
{
  if (debugging ())
    {
      printf ("LW-FIELD-REFUSED %s: %s\n", name, why);
      fflush (stdout);
    }
}
