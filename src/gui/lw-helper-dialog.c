/* lw-helper-dialog.c — one formula helper on the active variant, with a preview; see
 * lw-helper-dialog.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib/gi18n.h>
#include <math.h>

#include "lw-helper-dialog.h"
#include "lw-number-field.h"
#include "lw-number.h"

/* The pause after a keystroke before the proposal is made again. */
#define PREVIEW_DELAY_MS 200

/* A target field: which helpers show it, and where its number goes. */
typedef struct
{
  const char *title;
  const char *unit;
  const char *empty;            /* what an empty field means */
  const char *initial;          /* the field's text when the dialog opens ("" for empty) */
  guint kinds;                  /* 1 << LwHelperKind */
  gsize offset;                 /* in LwHelperOptions */
} Field;

#define K(k) (1u << (k))
#define OFF(m) G_STRUCT_OFFSET (LwHelperOptions, m)

static const Field fields[] = {
  { N_("Crossover"), "rad/s", N_("from the requirements"), "",
    K (LW_HELPER_CROSSOVER_GAIN) | K (LW_HELPER_LEAD) | K (LW_HELPER_MEET), OFF (crossover_rad_s) },
  { N_("Crossover"), "rad/s", N_("the loop's present crossover"), "",
    K (LW_HELPER_LAG) | K (LW_HELPER_PI), OFF (crossover_rad_s) },
  { N_("Phase margin"), "°", N_("from the requirements"), "",
    K (LW_HELPER_LEAD) | K (LW_HELPER_MEET), OFF (phase_margin_deg) },
  { N_("Safety angle"), "°", NULL, "5", K (LW_HELPER_LEAD) | K (LW_HELPER_MEET), OFF (safety_deg) },
  { N_("Gain ratio"), "", N_("from the error requirement"), "", K (LW_HELPER_LAG), OFF (lag_ratio) },
  { N_("Decades below the crossover"), "", NULL, "1", K (LW_HELPER_LAG), OFF (lag_decades) },
  { N_("Zero at a fraction of the crossover"), "", NULL, "0.1", K (LW_HELPER_PI), OFF (pi_fraction) },
  { N_("Resonances damped below"), "", NULL, "0.2", K (LW_HELPER_NOTCH), OFF (notch_zeta_max) },
  { N_("Damping of the notch's poles"), "", NULL, "0.5", K (LW_HELPER_NOTCH), OFF (notch_zeta) },
};

struct _LwHelperDialog
{
  GtkWindow parent_instance;

  LwHelperKind kind;
  LwDesign *doc;
  size_t variant;
  LwPlantCache *cache;
  LwProposal *proposal;

  GtkEntry *entries[G_N_ELEMENTS (fields)];
  GtkLabel *preview;
  GtkLabel *problem;
  GtkWidget *apply;
  guint pending;
};

G_DEFINE_FINAL_TYPE (LwHelperDialog, lw_helper_dialog, GTK_TYPE_WINDOW)

enum { SIGNAL_APPLY, N_SIGNALS };
static guint signals[N_SIGNALS];

/* Reads the fields into o; FALSE with *why (g_free) naming the field when one is not a
 * number. */
static gboolean
read_fields (LwHelperDialog *self, LwHelperOptions *o, char **why)
{
  lw_helper_options_init (o, self->kind);
  for (guint i = 0; i < G_N_ELEMENTS (fields); i++)
    {
      if (self->entries[i] == NULL)
        continue;
      const char *text = gtk_editable_get_text (GTK_EDITABLE (self->entries[i]));
      g_autofree char *trimmed = g_strstrip (g_strdup (text));
      double *slot = G_STRUCT_MEMBER_P (o, fields[i].offset);
      gtk_widget_remove_css_class (GTK_WIDGET (self->entries[i]), "error");
      if (trimmed[0] == '\0' && fields[i].empty != NULL)
        continue;
      /* the window's one reading of a typed number (lw-number-field.h) */
      double v;
      g_autofree char *reason = NULL;
      if (!lw_number_field_parse (trimmed, -G_MAXDOUBLE, G_MAXDOUBLE, FALSE, &v, &reason))
        {
          gtk_widget_add_css_class (GTK_WIDGET (self->entries[i]), "error");
          *why = g_strdup_printf ("%s: %s", _(fields[i].title), reason);
          return FALSE;
        }
      *slot = v;
    }
  return TRUE;
}

static void
refresh (LwHelperDialog *self)
{
  g_clear_pointer (&self->proposal, lw_proposal_free);
  LwHelperOptions o;
  char *why = NULL;
  if (!read_fields (self, &o, &why))
    {
      gtk_label_set_text (self->problem, why);
      gtk_widget_set_visible (GTK_WIDGET (self->problem), TRUE);
      gtk_label_set_text (self->preview, "");
      gtk_widget_set_sensitive (self->apply, FALSE);
      g_free (why);
      return;
    }
  g_autoptr (GError) error = NULL;
  self->proposal = lw_proposal_make (self->doc, self->variant, &o, self->cache, &error);
  if (self->proposal == NULL)
    {
      gtk_label_set_text (self->problem, error->message);
      gtk_widget_set_visible (GTK_WIDGET (self->problem), TRUE);
      gtk_label_set_text (self->preview, "");
      gtk_widget_set_sensitive (self->apply, FALSE);
      return;
    }
  gtk_widget_set_visible (GTK_WIDGET (self->problem), FALSE);
  g_autofree char *text = lw_proposal_describe (self->doc, self->variant, self->proposal);
  gtk_label_set_text (self->preview, text);
  gtk_widget_set_sensitive (self->apply, self->proposal->n_stages > 0);
}

static gboolean
refresh_due (gpointer data)
{
  LwHelperDialog *self = data;
  self->pending = 0;
  refresh (self);
  return G_SOURCE_REMOVE;
}

static void
field_changed (LwHelperDialog *self)
{
  g_clear_handle_id (&self->pending, g_source_remove);
  self->pending = g_timeout_add (PREVIEW_DELAY_MS, refresh_due, self);
}

static void
apply_clicked (LwHelperDialog *self)
{
  if (self->pending != 0)
    {
      g_clear_handle_id (&self->pending, g_source_remove);
      refresh (self);
    }
  if (self->proposal == NULL || self->proposal->n_stages == 0)
    return;
  g_signal_emit (self, signals[SIGNAL_APPLY], 0, self->proposal);
  gtk_window_destroy (GTK_WINDOW (self));
}

static void
lw_helper_dialog_dispose (GObject *object)
{
  LwHelperDialog *self = LW_HELPER_DIALOG (object);
  g_clear_handle_id (&self->pending, g_source_remove);
  g_clear_pointer (&self->proposal, lw_proposal_free);
  g_clear_pointer (&self->doc, lw_design_free);
  g_clear_pointer (&self->cache, lw_plant_cache_unref);
  G_OBJECT_CLASS (lw_helper_dialog_parent_class)->dispose (object);
}

static void
lw_helper_dialog_class_init (LwHelperDialogClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);
  object_class->dispose = lw_helper_dialog_dispose;
  /* "apply" (const LwProposal *): the user applies the proposal on show */
  signals[SIGNAL_APPLY] = g_signal_new ("apply", G_TYPE_FROM_CLASS (klass), G_SIGNAL_RUN_LAST,
                                        0, NULL, NULL, NULL, G_TYPE_NONE, 1, G_TYPE_POINTER);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_Escape, 0, "window.close", NULL);
}

static void
lw_helper_dialog_init (LwHelperDialog *self)
{
  (void) self;
}

LwHelperDialog *
lw_helper_dialog_new (GtkWindow *parent, LwHelperKind kind, const LwDesign *d, size_t variant,
                      LwPlantCache *cache)
{
  LwHelperDialog *self = g_object_new (LW_TYPE_HELPER_DIALOG, "transient-for", parent,
                                       "modal", TRUE, "destroy-with-parent", TRUE,
                                       "default-width", 640, "default-height", 620, NULL);
  self->kind = kind;
  self->doc = lw_design_copy (d);
  self->variant = variant;
  self->cache = cache != NULL ? lw_plant_cache_ref (cache) : NULL;
  gtk_window_set_title (GTK_WINDOW (self), _(lw_helper_title (kind)));

  GtkWidget *box = gtk_box_new (GTK_ORIENTATION_VERTICAL, 12);
  gtk_widget_set_margin_start (box, 18);
  gtk_widget_set_margin_end (box, 18);
  gtk_widget_set_margin_top (box, 18);
  gtk_widget_set_margin_bottom (box, 18);
  gtk_window_set_child (GTK_WINDOW (self), box);

  g_autofree char *intro
    = kind == LW_HELPER_MEET
        ? g_strdup_printf (_("Replaces the stages of variant “%s” with a compensator composed "
                             "from the requirements."), d->variants[variant].name)
        : g_strdup_printf (_("Adds stages after those of variant “%s”."),
                           d->variants[variant].name);
  GtkWidget *intro_label = gtk_label_new (intro);
  gtk_label_set_wrap (GTK_LABEL (intro_label), TRUE);
  gtk_label_set_xalign (GTK_LABEL (intro_label), 0.0);
  gtk_box_append (GTK_BOX (box), intro_label);

  GtkWidget *grid = gtk_grid_new ();
  gtk_grid_set_row_spacing (GTK_GRID (grid), 6);
  gtk_grid_set_column_spacing (GTK_GRID (grid), 12);
  int row = 0;
  for (guint i = 0; i < G_N_ELEMENTS (fields); i++)
    {
      if (!(fields[i].kinds & K (kind)))
        continue;
      GtkWidget *label = gtk_label_new (_(fields[i].title));
      gtk_label_set_xalign (GTK_LABEL (label), 0.0);
      GtkWidget *entry = gtk_entry_new ();
      gtk_widget_set_hexpand (entry, TRUE);
      gtk_editable_set_text (GTK_EDITABLE (entry), fields[i].initial);
      if (fields[i].empty != NULL)
        gtk_entry_set_placeholder_text (GTK_ENTRY (entry), _(fields[i].empty));
      gtk_entry_set_activates_default (GTK_ENTRY (entry), TRUE);
      gtk_accessible_update_relation (GTK_ACCESSIBLE (entry), GTK_ACCESSIBLE_RELATION_LABELLED_BY,
                                      label, NULL, -1);
      GtkWidget *unit = gtk_label_new (fields[i].unit);
      gtk_label_set_xalign (GTK_LABEL (unit), 0.0);
      gtk_grid_attach (GTK_GRID (grid), label, 0, row, 1, 1);
      gtk_grid_attach (GTK_GRID (grid), entry, 1, row, 1, 1);
      gtk_grid_attach (GTK_GRID (grid), unit, 2, row, 1, 1);
      g_signal_connect_swapped (entry, "changed", G_CALLBACK (field_changed), self);
      self->entries[i] = GTK_ENTRY (entry);
      row++;
    }
  if (row > 0)
    gtk_box_append (GTK_BOX (box), grid);

  self->problem = GTK_LABEL (gtk_label_new (NULL));
  gtk_label_set_wrap (self->problem, TRUE);
  gtk_label_set_xalign (self->problem, 0.0);
  gtk_widget_add_css_class (GTK_WIDGET (self->problem), "error");
  gtk_widget_set_visible (GTK_WIDGET (self->problem), FALSE);
  gtk_box_append (GTK_BOX (box), GTK_WIDGET (self->problem));

  GtkWidget *heading = gtk_label_new (_("What it proposes, and what the variant would reach"));
  gtk_label_set_xalign (GTK_LABEL (heading), 0.0);
  gtk_widget_add_css_class (heading, "heading");
  gtk_box_append (GTK_BOX (box), heading);
  self->preview = GTK_LABEL (gtk_label_new (NULL));
  gtk_label_set_xalign (self->preview, 0.0);
  gtk_label_set_yalign (self->preview, 0.0);
  gtk_label_set_selectable (self->preview, TRUE);
  gtk_label_set_wrap (self->preview, TRUE);
  gtk_widget_add_css_class (GTK_WIDGET (self->preview), "monospace");
  GtkWidget *scroll = gtk_scrolled_window_new ();
  gtk_scrolled_window_set_child (GTK_SCROLLED_WINDOW (scroll), GTK_WIDGET (self->preview));
  gtk_widget_set_vexpand (scroll, TRUE);
  gtk_box_append (GTK_BOX (box), scroll);

  GtkWidget *buttons = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 6);
  gtk_widget_set_halign (buttons, GTK_ALIGN_END);
  GtkWidget *cancel = gtk_button_new_with_mnemonic (_("_Cancel"));
  gtk_actionable_set_action_name (GTK_ACTIONABLE (cancel), "window.close");
  self->apply = gtk_button_new_with_mnemonic (_("_Apply"));
  gtk_widget_add_css_class (self->apply, "suggested-action");
  g_signal_connect_swapped (self->apply, "clicked", G_CALLBACK (apply_clicked), self);
  gtk_box_append (GTK_BOX (buttons), cancel);
  gtk_box_append (GTK_BOX (buttons), self->apply);
  gtk_box_append (GTK_BOX (box), buttons);
  gtk_window_set_default_widget (GTK_WINDOW (self), self->apply);

  refresh (self);
  return self;
}

const LwProposal *
lw_helper_dialog_get_proposal (LwHelperDialog *self)
{
  g_return_val_if_fail (LW_IS_HELPER_DIALOG (self), NULL);
  return self->proposal;
}

const char *
lw_helper_dialog_get_preview (LwHelperDialog *self)
{
  g_return_val_if_fail (LW_IS_HELPER_DIALOG (self), NULL);
  return gtk_label_get_text (self->preview);
}
