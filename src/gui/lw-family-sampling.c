/* lw-family-sampling.c — the plant family's drawn members and seed in the plant panel
 * (lw-family-sampling.h).
 *
 * The model's "changed" comes every frame of a stage drag: the fields are touched only when
 * what they depend on changed (lw_design_model_params_key, which decides whether there is a
 * family, and the two values).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib/gi18n.h>

#include "lw-family.h"
#include "lw-family-sampling.h"
#include "lw-gui-util.h"
#include "lw-number-field.h"

/* the largest seed the field holds exactly (2^53 − 1: a field's value is a double); a
 * document's larger seed is shown and kept, not edited here */
#define SEED_FIELD_MAX 9007199254740991.0

struct _LwFamilySampling
{
  GtkWidget parent_instance;

  GtkWidget *box;
  GtkSpinButton *members;
  GtkSpinButton *seed;
  GtkLabel *problem;            /* a refusal, under the fields */

  LwDesignModel *model;
  GSignalGroup *model_signals;
  char *key;                    /* what the fields show (shown_key) */
  gboolean filling;             /* showing the model: do not write back */
};

G_DEFINE_FINAL_TYPE (LwFamilySampling, lw_family_sampling, GTK_TYPE_WIDGET)

/* ---- writing back --------------------------------------------------------------------------- */

static void
field_changed (GtkSpinButton *spin, LwFamilySampling *self)
{
  if (self->filling || self->model == NULL)
    return;
  gsize members = 0;
  guint64 seed = 0;
  lw_design_model_get_family_sampling (self->model, &members, &seed);
  double before = spin == self->members ? (double) members : (double) seed;
  if (spin == self->members)
    members = (gsize) gtk_spin_button_get_value (spin);
  else
    seed = (guint64) gtk_spin_button_get_value (spin);
  g_autofree char *why = NULL;
  /* one edit, one undo step: what was edited before is a step of its own, and so is this */
  lw_gui_history_step (GTK_WIDGET (self));
  gboolean ok = lw_design_model_set_family_sampling (self->model, members, seed, &why);
  lw_gui_history_step (GTK_WIDGET (self));
  if (!ok)
    {
      self->filling = TRUE;
      lw_number_field_refuse (spin, before, why);
      self->filling = FALSE;
    }
}

/* ---- showing the model ---------------------------------------------------------------------- */

static char *
shown_key (LwFamilySampling *self)
{
  gsize members = 0;
  guint64 seed = 0;
  lw_design_model_get_family_sampling (self->model, &members, &seed);
  g_autofree char *params = lw_design_model_params_key (self->model);
  return g_strdup_printf ("%s\x1c%" G_GSIZE_FORMAT " %" G_GUINT64_FORMAT, params, members, seed);
}

static void
set_field (LwFamilySampling *self, GtkSpinButton *spin, double value)
{
  /* a field showing a refused text keeps it while its value stays */
  if (gtk_spin_button_get_value (spin) != value)
    gtk_spin_button_set_value (spin, value);
}

static void
update (LwFamilySampling *self)
{
  gsize members = 0;
  guint64 seed = 0;
  lw_design_model_get_family_sampling (self->model, &members, &seed);
  self->filling = TRUE;
  set_field (self, self->members, (double) members);
  gboolean seed_editable = (double) seed <= SEED_FIELD_MAX;
  gtk_widget_set_sensitive (GTK_WIDGET (self->seed), seed_editable);
  if (seed_editable)
    {
      set_field (self, self->seed, (double) seed);
      gtk_widget_set_tooltip_text (GTK_WIDGET (self->seed),
                                   _("Where the random draw of the members starts: the same "
                                     "seed draws the same members"));
    }
  else
    {
      /* the exact seed in view, the field not taking it */
      g_autofree char *text = g_strdup_printf ("%" G_GUINT64_FORMAT, seed);
      g_autofree char *tip = g_strdup_printf (_("The seed %s is larger than this field takes; "
                                                "it is kept as the document gives it"), text);
      set_field (self, self->seed, SEED_FIELD_MAX);
      gtk_editable_set_text (GTK_EDITABLE (self->seed), text);
      gtk_widget_set_tooltip_text (GTK_WIDGET (self->seed), tip);
    }
  gtk_widget_set_visible (self->box, lw_family_wanted (lw_design_model_get_design (self->model)));
  self->filling = FALSE;
  lw_number_field_watch_positions ();
}

static void
model_changed (LwFamilySampling *self)
{
  if (self->model == NULL)
    return;
  /* a change they do not show (a stage dragged, every frame): nothing to do */
  if (!lw_gui_take_if_changed (&self->key, shown_key (self)))
    return;
  update (self);
}

void
lw_family_sampling_set_model (LwFamilySampling *self, LwDesignModel *model)
{
  g_return_if_fail (LW_IS_FAMILY_SAMPLING (self));
  g_return_if_fail (LW_IS_DESIGN_MODEL (model));
  g_set_object (&self->model, model);
  g_signal_group_set_target (self->model_signals, model);
  g_free (self->key);
  self->key = shown_key (self);
  gtk_widget_set_visible (GTK_WIDGET (self->problem), FALSE);
  update (self);
}

/* ---- the widget ------------------------------------------------------------------------------ */

static GtkSpinButton *
whole_field (LwFamilySampling *self, double upper, const char *name)
{
  GtkAdjustment *adj = gtk_adjustment_new (0.0, 0.0, upper, 1.0, 10.0, 0.0);
  GtkSpinButton *spin = GTK_SPIN_BUTTON (gtk_spin_button_new (adj, 1.0, 0));
  gtk_editable_set_width_chars (GTK_EDITABLE (spin), 6);
  gtk_widget_set_hexpand (GTK_WIDGET (spin), TRUE);
  lw_gui_spin_wheel_off (spin);
  lw_number_field_setup (spin, name, self->problem);
  g_signal_connect_object (spin, "value-changed", G_CALLBACK (field_changed), self, 0);
  return spin;
}

static GtkWidget *
words (const char *text)
{
  GtkWidget *l = gtk_label_new (text);
  gtk_label_set_xalign (GTK_LABEL (l), 0.0f);
  return l;
}

static void
lw_family_sampling_dispose (GObject *object)
{
  LwFamilySampling *self = LW_FAMILY_SAMPLING (object);
  if (self->model_signals != NULL)
    g_signal_group_set_target (self->model_signals, NULL);
  g_clear_object (&self->model_signals);
  g_clear_object (&self->model);
  g_clear_pointer (&self->box, gtk_widget_unparent);
  g_clear_pointer (&self->key, g_free);
  G_OBJECT_CLASS (lw_family_sampling_parent_class)->dispose (object);
}

static void
lw_family_sampling_class_init (LwFamilySamplingClass *klass)
{
  G_OBJECT_CLASS (klass)->dispose = lw_family_sampling_dispose;
  gtk_widget_class_set_layout_manager_type (GTK_WIDGET_CLASS (klass), GTK_TYPE_BIN_LAYOUT);
}

static void
lw_family_sampling_init (LwFamilySampling *self)
{
  self->box = gtk_box_new (GTK_ORIENTATION_VERTICAL, 6);
  gtk_widget_set_parent (self->box, GTK_WIDGET (self));
  gtk_widget_set_tooltip_text (self->box, _("The members drawn at random over the parameters' "
                                            "ranges, besides the operating points and the "
                                            "corners of the ranges"));

  self->problem = lw_gui_problem_label_new ();

  GtkWidget *row = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 6);
  GtkWidget *title = words (_("Family:"));
  gtk_widget_add_css_class (title, "heading");
  gtk_box_append (GTK_BOX (row), title);
  self->members = whole_field (self, LW_DESIGN_MAX_FAMILY_MEMBERS, _("Members drawn"));
  gtk_widget_set_tooltip_text (GTK_WIDGET (self->members),
                               _("How many members are drawn at random over the ranges "
                                 "(0: none; the nominal, the operating points and the corners are evaluated "
                                 "besides)"));
  gtk_box_append (GTK_BOX (row), GTK_WIDGET (self->members));
  /* TRANSLATORS: "Family: [100] members drawn, seed [1]" */
  gtk_box_append (GTK_BOX (row), words (_("members drawn, seed")));
  self->seed = whole_field (self, SEED_FIELD_MAX, _("Seed"));
  gtk_box_append (GTK_BOX (row), GTK_WIDGET (self->seed));
  gtk_box_append (GTK_BOX (self->box), row);
  gtk_box_append (GTK_BOX (self->box), GTK_WIDGET (self->problem));
  gtk_widget_set_visible (self->box, FALSE);

  self->model_signals = g_signal_group_new (LW_TYPE_DESIGN_MODEL);
  g_signal_group_connect_swapped (self->model_signals, "changed", G_CALLBACK (model_changed),
                                  self);
}
