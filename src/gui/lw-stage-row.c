/* lw-stage-row.c — one compensator stage as a row: its kind's title, one spin button per
 * stored parameter and the derived figures, all from the stage-kind table (lw-stage-kinds.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include <glib/gi18n.h>

#include "lw-gui-util.h"
#include "lw-number-field.h"
#include "lw-stage-kinds.h"
#include "lw-stage-row.h"

struct _LwStageRow
{
  GtkListBoxRow parent_instance;

  GtkLabel *kind_label;
  GtkSwitch *enabled_switch;
  GtkGrid *param_grid;
  GtkLabel *derived_label;

  LwDesignModel *model;
  GSignalGroup *model_signals;   /* the model's signals, following self->model */
  guint index;
  gboolean filling;
  GPtrArray *spins;             /* the spin button of each stored parameter, in order */
};

G_DEFINE_FINAL_TYPE (LwStageRow, lw_stage_row, GTK_TYPE_LIST_BOX_ROW)

const char *
lw_stage_kind_title (LwStageKind kind)
{
  const LwStageKindInfo *k = lw_stage_kind_info (kind);
  return k != NULL ? _(k->title) : "?";
}

/* The derived figures (gain in dB, a lead's or lag's centre and maximum phase), one line. */
static void
show_derived (LwStageRow *self, const LwStage *s)
{
  LwStageParam params[LW_STAGE_MAX_PARAMS];
  size_t n = lw_stage_params (s, params);
  g_autoptr (GString) text = g_string_new (NULL);

  for (size_t i = 0; i < n; i++)
    {
      if (!params[i].derived)
        continue;
      const char *what = params[i].title != NULL ? _(params[i].title) : params[i].name;
      if (text->len > 0)
        g_string_append (text, ", ");
      g_string_append_printf (text, "%s %.4g %s", what, params[i].value, params[i].unit);
    }
  gtk_label_set_text (self->derived_label, text->str);
  gtk_widget_set_visible (GTK_WIDGET (self->derived_label), text->len > 0);
}

static void
param_changed (GtkSpinButton *spin, LwStageRow *self)
{
  if (self->filling)
    return;
  guint k = GPOINTER_TO_UINT (g_object_get_data (G_OBJECT (spin), "lw-param-index"));
  LwStage s = *lw_design_model_get_stage (self->model, self->index);
  lw_stage_param_set (&s, k, gtk_spin_button_get_value (spin));
  show_derived (self, &s);
  lw_design_model_set_stage (self->model, self->index, &s);
}

static void
enabled_toggled (LwStageRow *self, GParamSpec *pspec, GtkSwitch *sw)
{
  if (self->filling)
    return;
  LwStage s = *lw_design_model_get_stage (self->model, self->index);
  s.enabled = gtk_switch_get_active (sw);
  lw_design_model_set_stage (self->model, self->index, &s);
}

static void
fill (LwStageRow *self)
{
  const LwStage *s = lw_design_model_get_stage (self->model, self->index);
  const LwStageKindInfo *kind = lw_stage_kind_info (s->kind);
  g_assert (kind != NULL);   /* the document was checked */

  self->filling = TRUE;
  if (s->label[0] != '\0')
    {
      g_autofree char *title = g_strdup_printf ("%s — %s", lw_stage_kind_title (s->kind),
                                                s->label);
      gtk_label_set_text (self->kind_label, title);
    }
  else
    gtk_label_set_text (self->kind_label, lw_stage_kind_title (s->kind));
  gtk_switch_set_active (self->enabled_switch, s->enabled);

  /* a refused number in one of the fields, under them */
  GtkLabel *problem = GTK_LABEL (gtk_label_new (NULL));
  gtk_label_set_xalign (problem, 0.0);
  gtk_label_set_wrap (problem, TRUE);
  gtk_label_set_wrap_mode (problem, PANGO_WRAP_WORD_CHAR);
  gtk_widget_add_css_class (GTK_WIDGET (problem), "error");
  gtk_widget_set_visible (GTK_WIDGET (problem), FALSE);
  gtk_grid_attach (self->param_grid, GTK_WIDGET (problem), 0, (int) kind->n_params, 3, 1);
  for (guint row = 0; row < kind->n_params; row++)
    {
      const LwStageParamInfo *ui = &kind->params[row];
      GtkWidget *label = gtk_label_new (_(ui->title));
      gtk_label_set_xalign (GTK_LABEL (label), 1.0);
      double step = ui->digits == 0 ? 1.0 : pow (10.0, -ui->digits);
      GtkAdjustment *adj = gtk_adjustment_new (lw_stage_param_get (s, row), ui->lower, ui->upper,
                                               step,
                                               step * 10.0, 0.0);
      GtkWidget *spin = gtk_spin_button_new (adj, 0.0, (guint) ui->digits);
      lw_gui_spin_wheel_off (GTK_SPIN_BUTTON (spin));
      lw_number_field_setup (GTK_SPIN_BUTTON (spin), _(ui->title), problem);
      gtk_widget_set_hexpand (spin, TRUE);
      gtk_accessible_update_relation (GTK_ACCESSIBLE (spin), GTK_ACCESSIBLE_RELATION_LABELLED_BY,
                                      label, NULL, -1);
      g_object_set_data (G_OBJECT (spin), "lw-param-index", GUINT_TO_POINTER (row));
      g_signal_connect (spin, "value-changed", G_CALLBACK (param_changed), self);
      g_ptr_array_add (self->spins, spin);
      GtkWidget *unit = gtk_label_new (ui->unit);
      gtk_label_set_xalign (GTK_LABEL (unit), 0.0);
      gtk_widget_add_css_class (unit, "dim-label");

      gtk_grid_attach (self->param_grid, label, 0, (int) row, 1, 1);
      gtk_grid_attach (self->param_grid, spin, 1, (int) row, 1, 1);
      gtk_grid_attach (self->param_grid, unit, 2, (int) row, 1, 1);
    }
  show_derived (self, s);

  guint n_stages = lw_design_model_get_n_stages (self->model);
  gtk_widget_action_set_enabled (GTK_WIDGET (self), "stage.move-up", self->index > 0);
  gtk_widget_action_set_enabled (GTK_WIDGET (self), "stage.move-down",
                                 self->index + 1 < n_stages);
  self->filling = FALSE;
}

/* The model changed (a drag, a key press, another row): show the stage's values as they are
 * now, without writing them back. */
static void
refresh (LwStageRow *self)
{
  if (self->index >= lw_design_model_get_n_stages (self->model))
    return;
  const LwStage *s = lw_design_model_get_stage (self->model, self->index);

  self->filling = TRUE;
  for (guint k = 0; k < self->spins->len; k++)
    {
      GtkSpinButton *spin = g_ptr_array_index (self->spins, k);
      double value = lw_stage_param_get (s, k);
      if (gtk_spin_button_get_value (spin) != value)
        gtk_spin_button_set_value (spin, value);
    }
  if (gtk_switch_get_active (self->enabled_switch) != s->enabled)
    gtk_switch_set_active (self->enabled_switch, s->enabled);
  show_derived (self, s);
  self->filling = FALSE;
}

static void
move_up_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwStageRow *self = LW_STAGE_ROW (widget);
  g_autoptr (LwStageRow) hold = g_object_ref (self);   /* the list is rebuilt meanwhile */
  lw_design_model_move_stage (self->model, self->index, -1);
}

static void
move_down_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwStageRow *self = LW_STAGE_ROW (widget);
  g_autoptr (LwStageRow) hold = g_object_ref (self);
  lw_design_model_move_stage (self->model, self->index, +1);
}

static void
remove_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwStageRow *self = LW_STAGE_ROW (widget);
  g_autoptr (LwStageRow) hold = g_object_ref (self);
  lw_design_model_remove_stage (self->model, self->index);
}

static void
lw_stage_row_dispose (GObject *object)
{
  LwStageRow *self = LW_STAGE_ROW (object);

  g_clear_object (&self->model_signals);
  g_clear_object (&self->model);
  g_clear_pointer (&self->spins, g_ptr_array_unref);
  gtk_widget_dispose_template (GTK_WIDGET (self), LW_TYPE_STAGE_ROW);
  G_OBJECT_CLASS (lw_stage_row_parent_class)->dispose (object);
}

static void
lw_stage_row_class_init (LwStageRowClass *klass)
{
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  G_OBJECT_CLASS (klass)->dispose = lw_stage_row_dispose;
  gtk_widget_class_set_template_from_resource (widget_class,
                                               "/org/loopwright/Designer/ui/lw-stage-row.ui");
  gtk_widget_class_bind_template_child (widget_class, LwStageRow, kind_label);
  gtk_widget_class_bind_template_child (widget_class, LwStageRow, enabled_switch);
  gtk_widget_class_bind_template_child (widget_class, LwStageRow, param_grid);
  gtk_widget_class_bind_template_child (widget_class, LwStageRow, derived_label);
  gtk_widget_class_bind_template_callback (widget_class, enabled_toggled);

  gtk_widget_class_install_action (widget_class, "stage.move-up", NULL, move_up_activated);
  gtk_widget_class_install_action (widget_class, "stage.move-down", NULL, move_down_activated);
  gtk_widget_class_install_action (widget_class, "stage.remove", NULL, remove_activated);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_Up, GDK_ALT_MASK,
                                       "stage.move-up", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_Down, GDK_ALT_MASK,
                                       "stage.move-down", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_Delete, GDK_CONTROL_MASK,
                                       "stage.remove", NULL);
}

static void
lw_stage_row_init (LwStageRow *self)
{
  gtk_widget_init_template (GTK_WIDGET (self));
  self->spins = g_ptr_array_new ();
  self->model_signals = g_signal_group_new (LW_TYPE_DESIGN_MODEL);
  g_signal_group_connect_swapped (self->model_signals, "changed", G_CALLBACK (refresh), self);
}

LwStageRow *
lw_stage_row_new (LwDesignModel *model, guint index)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (model), NULL);
  g_return_val_if_fail (index < lw_design_model_get_n_stages (model), NULL);

  LwStageRow *self = g_object_new (LW_TYPE_STAGE_ROW, NULL);
  self->model = g_object_ref (model);
  self->index = index;
  fill (self);
  g_signal_group_set_target (self->model_signals, model);
  return self;
}
