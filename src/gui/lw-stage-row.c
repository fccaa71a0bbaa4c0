/* lw-stage-row.c — one compensator stage as a row.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include <glib/gi18n.h>

#include "lw-gui-util.h"
#include "lw-stage-row.h"

struct _LwStageRow
{
  GtkListBoxRow parent_instance;

  GtkLabel *kind_label;
  GtkSwitch *enabled_switch;
  GtkGrid *param_grid;
  GtkLabel *derived_label;

  LwDesignModel *model;
  guint index;
  gboolean filling;
  GPtrArray *spins;             /* the spin button of each stored parameter, in order */
};

G_DEFINE_FINAL_TYPE (LwStageRow, lw_stage_row, GTK_TYPE_LIST_BOX_ROW)

const char *
lw_stage_kind_title (LwStageKind kind)
{
  switch (kind)
    {
    case LW_STAGE_GAIN: return _("Gain");
    case LW_STAGE_INTEGRATOR: return _("Integrator");
    case LW_STAGE_REAL_ZERO: return _("Real zero");
    case LW_STAGE_REAL_POLE: return _("Real pole");
    case LW_STAGE_LEAD: return _("Lead");
    case LW_STAGE_LAG: return _("Lag");
    case LW_STAGE_PI: return _("PI");
    case LW_STAGE_PID: return _("PID");
    case LW_STAGE_NOTCH: return _("Notch");
    case LW_STAGE_ZERO_PAIR: return _("Zero pair");
    case LW_STAGE_POLE_PAIR: return _("Pole pair");
    }
  return "?";
}

/* How one stored parameter (lw_stage_params, derived = false) is shown and edited. */
typedef struct
{
  const char *name;       /* as lw_stage_params names it */
  const char *title;      /* translatable, N_() */
  double lower, upper;
  int digits;
} ParamUi;

static const ParamUi param_ui[] = {
  { "ratio", N_("Gain"), -1e9, 1e9, 4 },
  { "count", N_("Count"), 1, LW_STAGE_MAX_COUNT, 0 },
  { "corner_rad_s", N_("Corner"), 1e-6, 1e9, 3 },
  { "zero_rad_s", N_("Zero"), 1e-6, 1e9, 3 },
  { "pole_rad_s", N_("Pole"), 1e-6, 1e9, 3 },
  { "gain", N_("Gain"), -1e9, 1e9, 4 },
  { "kp", N_("Kp"), -1e9, 1e9, 4 },
  { "ti_s", N_("Ti"), 1e-9, 1e6, 6 },
  { "td_s", N_("Td"), 0, 1e6, 6 },
  { "filter_n", N_("N"), 1e-3, 1e6, 3 },
  { "centre_rad_s", N_("Centre"), 1e-6, 1e9, 3 },
  { "depth_db", N_("Depth"), 1e-3, 300, 2 },
  { "width_rad_s", N_("Width"), 1e-6, 1e9, 3 },
  { "natural_rad_s", N_("Natural frequency"), 1e-6, 1e9, 3 },
  { "damping", N_("Damping"), 0, 1e3, 4 },
};

static const ParamUi *
find_param_ui (const char *name)
{
  for (size_t i = 0; i < G_N_ELEMENTS (param_ui); i++)
    if (strcmp (param_ui[i].name, name) == 0)
      return &param_ui[i];
  return NULL;
}

/* Sets the k-th stored parameter of s (the order of lw_stage_params). */
static void
stage_param_set (LwStage *s, guint k, double v)
{
  switch (s->kind)
    {
    case LW_STAGE_GAIN: s->p.gain.ratio = v; break;
    case LW_STAGE_INTEGRATOR: s->p.integrator.count = (int) lround (v); break;
    case LW_STAGE_REAL_ZERO:
    case LW_STAGE_REAL_POLE: s->p.real.corner_rad_s = v; break;
    case LW_STAGE_LEAD:
    case LW_STAGE_LAG:
      if (k == 0) s->p.leadlag.zero_rad_s = v; else s->p.leadlag.pole_rad_s = v;
      break;
    case LW_STAGE_PI:
      if (k == 0) s->p.pi.gain = v; else s->p.pi.zero_rad_s = v;
      break;
    case LW_STAGE_PID:
      if (k == 0) s->p.pid.kp = v;
      else if (k == 1) s->p.pid.ti_s = v;
      else if (k == 2) s->p.pid.td_s = v;
      else s->p.pid.filter_n = v;
      break;
    case LW_STAGE_NOTCH:
      if (k == 0) s->p.notch.centre_rad_s = v;
      else if (k == 1) s->p.notch.depth_db = v;
      else s->p.notch.width_rad_s = v;
      break;
    case LW_STAGE_ZERO_PAIR:
    case LW_STAGE_POLE_PAIR:
      if (k == 0) s->p.pair.natural_rad_s = v; else s->p.pair.damping = v;
      break;
    }
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
      const char *what = NULL;
      if (strcmp (params[i].name, "gain_db") == 0)
        what = _("gain");
      else if (strcmp (params[i].name, "centre_rad_s") == 0)
        what = _("centre");
      else if (strcmp (params[i].name, "max_phase_deg") == 0)
        what = _("maximum phase");
      else
        what = params[i].name;
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
  stage_param_set (&s, k, gtk_spin_button_get_value (spin));
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
  LwStageParam params[LW_STAGE_MAX_PARAMS];
  size_t n = lw_stage_params (s, params);
  int row = 0;

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

  for (size_t i = 0; i < n; i++)
    {
      if (params[i].derived)
        continue;
      const ParamUi *ui = find_param_ui (params[i].name);
      g_assert (ui != NULL);

      GtkWidget *label = gtk_label_new (_(ui->title));
      gtk_label_set_xalign (GTK_LABEL (label), 1.0);
      double step = ui->digits == 0 ? 1.0 : pow (10.0, -ui->digits);
      GtkAdjustment *adj = gtk_adjustment_new (params[i].value, ui->lower, ui->upper, step,
                                               step * 10.0, 0.0);
      GtkWidget *spin = gtk_spin_button_new (adj, 0.0, (guint) ui->digits);
      lw_gui_spin_wheel_off (GTK_SPIN_BUTTON (spin));
      gtk_spin_button_set_numeric (GTK_SPIN_BUTTON (spin), TRUE);
      gtk_widget_set_hexpand (spin, TRUE);
      gtk_accessible_update_relation (GTK_ACCESSIBLE (spin), GTK_ACCESSIBLE_RELATION_LABELLED_BY,
                                      label, NULL, -1);
      g_object_set_data (G_OBJECT (spin), "lw-param-index", GUINT_TO_POINTER ((guint) row));
      g_signal_connect (spin, "value-changed", G_CALLBACK (param_changed), self);
      g_ptr_array_add (self->spins, spin);
      GtkWidget *unit = gtk_label_new (params[i].unit);
      gtk_label_set_xalign (GTK_LABEL (unit), 0.0);
      gtk_widget_add_css_class (unit, "dim-label");

      gtk_grid_attach (self->param_grid, label, 0, row, 1, 1);
      gtk_grid_attach (self->param_grid, spin, 1, row, 1, 1);
      gtk_grid_attach (self->param_grid, unit, 2, row, 1, 1);
      row++;
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
  LwStageParam params[LW_STAGE_MAX_PARAMS];
  size_t n = lw_stage_params (s, params);
  guint k = 0;

  self->filling = TRUE;
  for (size_t i = 0; i < n && k < self->spins->len; i++)
    {
      if (params[i].derived)
        continue;
      GtkSpinButton *spin = g_ptr_array_index (self->spins, k++);
      if (gtk_spin_button_get_value (spin) != params[i].value)
        gtk_spin_button_set_value (spin, params[i].value);
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

  if (self->model != NULL)
    g_signal_handlers_disconnect_by_data (self->model, self);
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
  g_signal_connect_swapped (model, "changed", G_CALLBACK (refresh), self);
  return self;
}
