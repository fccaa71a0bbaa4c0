/* lw-compensator-panel.c — the compensator's stages.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <stdio.h>
#include <string.h>

#include <glib/gi18n.h>

#include "lw-compensator-panel.h"
#include "lw-gui-util.h"
#include "lw-number-field.h"
#include "lw-number.h"
#include "lw-stage-kinds.h"
#include "lw-stage-row.h"

struct _LwCompensatorPanel
{
  GtkWidget parent_instance;

  GtkMenuButton *add_button;
  GtkListBox *stage_list;
  GtkLabel *error_label;
  GtkLabel *controller_w_label;
  GtkLabel *controller_z_label;
  GtkLabel *ringing_label;      /* a controller pole near z = −1 */
  GtkDropDown *variant_dropdown;
  GtkMenuButton *variant_button;
  GtkEntry *name_entry;
  GtkButton *rename_button;
  GtkLabel *name_problem;
  GtkCheckButton *period_check;
  GtkSpinButton *period_spin;
  GtkBox *actuator_box;
  GtkCheckButton *actuator_check;
  GtkSpinButton *actuator_low;
  GtkSpinButton *actuator_high;
  GtkCheckButton *anti_windup_check;
  GtkSpinButton *reference_step;
  GtkLabel *actuator_problem;
  GtkBox *compare_box;
  gboolean updating;            /* the variant widgets are being filled from the model */
  GtkCheckButton *shows[LW_DESIGN_N_RESPONSES];   /* the responses the variant shows */

  gboolean debug;               /* LW_DEBUG_HANDLES=1: print where the Variants button is */
  char *debug_last;
  guint debug_same;             /* frames the position stayed the same */

  LwDesignModel *model;
  GSignalGroup *model_signals;   /* the model's signals, following self->model */
  /* where new stages go: the w-plane frequency ν (rad/s) of the last gain crossover, or a
   * tenth of 2/T when there is none */
  double place_nu_rad_s;
};

G_DEFINE_FINAL_TYPE (LwCompensatorPanel, lw_compensator_panel, GTK_TYPE_WIDGET)

static void
rebuild_rows (LwCompensatorPanel *self)
{
  GtkWidget *child;
  while ((child = gtk_widget_get_first_child (GTK_WIDGET (self->stage_list))) != NULL)
    gtk_list_box_remove (self->stage_list, child);

  guint n = lw_design_model_get_n_stages (self->model);
  for (guint i = 0; i < n; i++)
    gtk_list_box_append (self->stage_list, GTK_WIDGET (lw_stage_row_new (self->model, i)));
  if (n == 0)
    {
      GtkWidget *empty = gtk_label_new (_("No stages: the compensator is 1. Add one with "
                                          "Add Stage."));
      gtk_label_set_wrap (GTK_LABEL (empty), TRUE);
      gtk_widget_add_css_class (empty, "dim-label");
      gtk_widget_set_margin_top (empty, 12);
      gtk_widget_set_margin_bottom (empty, 12);
      gtk_list_box_append (self->stage_list, empty);
    }
}

/* ---- variants ---------------------------------------------------------------------------- */

static gboolean
is_compared (LwCompensatorPanel *self, guint i)
{
  const LwDesign *d = lw_design_model_get_design (self->model);
  return i < d->n_variants && d->variants[i].compared;
}

static void
compare_toggled (GtkCheckButton *b, LwCompensatorPanel *self)
{
  if (self->updating)
    return;
  const char *name = g_object_get_data (G_OBJECT (b), "lw-variant");
  gtk_widget_activate_action (GTK_WIDGET (self), "window.variant-compare", "(sb)", name,
                              gtk_check_button_get_active (b));
}

static void
show_actuator_sensitivity (LwCompensatorPanel *self)
{
  gboolean on = gtk_check_button_get_active (self->actuator_check);
  gtk_widget_set_sensitive (GTK_WIDGET (self->actuator_low), on);
  gtk_widget_set_sensitive (GTK_WIDGET (self->actuator_high), on);
  gtk_widget_set_sensitive (GTK_WIDGET (self->anti_windup_check), on);
  gtk_widget_set_sensitive (GTK_WIDGET (self->reference_step), on);
}

/* The actuator's check buttons or limits: one window action (one undo step) with the state of
 * all four; limits that hold nothing are said and not taken. */
static void
actuator_edited (LwCompensatorPanel *self)
{
  if (self->updating || self->model == NULL)
    return;
  show_actuator_sensitivity (self);
  gboolean on = gtk_check_button_get_active (self->actuator_check);
  double low = gtk_spin_button_get_value (self->actuator_low);
  double high = gtk_spin_button_get_value (self->actuator_high);
  if (on && !(low < high))
    {
      g_autofree char *msg = g_strdup_printf (_("Actuator limits: the low limit (%g) must be "
                                                "below the high limit (%g); not taken."),
                                              low, high);
      gtk_label_set_text (self->actuator_problem, msg);
      gtk_widget_set_visible (GTK_WIDGET (self->actuator_problem), TRUE);
      return;
    }
  if (lw_number_field_get_problem (self->actuator_low) == NULL
      && lw_number_field_get_problem (self->actuator_high) == NULL)
    gtk_widget_set_visible (GTK_WIDGET (self->actuator_problem), FALSE);
  gtk_widget_activate_action (GTK_WIDGET (self), "window.variant-actuator", "(bddb)", on, low,
                              high, gtk_check_button_get_active (self->anti_windup_check));
}

/* The variant drop-down shows a long name ellipsized, so the panel keeps its width; its list
 * shows names whole. */
static void
name_setup (GtkSignalListItemFactory *f, GtkListItem *item, gpointer ellipsize)
{
  GtkWidget *label = gtk_label_new (NULL);
  gtk_label_set_xalign (GTK_LABEL (label), 0.0);
  if (ellipsize != NULL)
    {
      gtk_label_set_ellipsize (GTK_LABEL (label), PANGO_ELLIPSIZE_END);
      gtk_label_set_width_chars (GTK_LABEL (label), 8);
    }
  gtk_list_item_set_child (item, label);
}

static void
name_bind (GtkSignalListItemFactory *f, GtkListItem *item, gpointer data)
{
  GtkStringObject *s = gtk_list_item_get_item (item);
  gtk_label_set_text (GTK_LABEL (gtk_list_item_get_child (item)),
                      s != NULL ? gtk_string_object_get_string (s) : "");
}

static GtkListItemFactory *
name_factory (gboolean ellipsize)
{
  GtkListItemFactory *f = gtk_signal_list_item_factory_new ();
  g_signal_connect (f, "setup", G_CALLBACK (name_setup), ellipsize ? f : NULL);
  g_signal_connect (f, "bind", G_CALLBACK (name_bind), NULL);
  return f;
}

static void
reference_step_edited (LwCompensatorPanel *self)
{
  if (self->updating || self->model == NULL)
    return;
  gtk_widget_activate_action (GTK_WIDGET (self), "window.variant-reference-step", "d",
                              gtk_spin_button_get_value (self->reference_step));
}

static void
shows_toggled (LwCompensatorPanel *self)
{
  if (self->updating || self->model == NULL)
    return;
  unsigned mask = 0;
  for (unsigned k = 0; k < LW_DESIGN_N_RESPONSES; k++)
    if (gtk_check_button_get_active (self->shows[k]))
      mask |= 1u << k;
  gtk_widget_activate_action (GTK_WIDGET (self), "window.variant-responses", "u", mask);
}

/* The time responses the variant shows, one switch each, two by two (the panel keeps its
 * width). */
static GtkWidget *
build_shows_row (LwCompensatorPanel *self)
{
  static const struct { const char *label, *tip; } what[LW_DESIGN_N_RESPONSES] = {
    { N_("St_ep"), N_("The reference step response in the step view") },
    { N_("_u(t)"), N_("The actuator signal under the reference step") },
    { N_("_Input dist."), N_("The output after a unit step disturbance at the plant's "
                             "input, in the disturbance view") },
    { N_("_Output dist."), N_("The output after a unit step disturbance at the plant's "
                              "output, in the disturbance view") },
  };
  GtkWidget *grid = gtk_grid_new ();
  gtk_grid_set_column_spacing (GTK_GRID (grid), 12);
  gtk_grid_set_column_homogeneous (GTK_GRID (grid), FALSE);
  GtkWidget *head = gtk_label_new (_("Shows:"));
  gtk_label_set_xalign (GTK_LABEL (head), 0.0f);
  gtk_widget_set_valign (head, GTK_ALIGN_START);
  gtk_widget_set_margin_top (head, 4);
  gtk_grid_attach (GTK_GRID (grid), head, 0, 0, 1, 2);
  for (unsigned k = 0; k < LW_DESIGN_N_RESPONSES; k++)
    {
      self->shows[k] = GTK_CHECK_BUTTON (gtk_check_button_new_with_mnemonic (_(what[k].label)));
      gtk_widget_set_tooltip_text (GTK_WIDGET (self->shows[k]), _(what[k].tip));
      gtk_widget_set_hexpand (GTK_WIDGET (self->shows[k]), TRUE);
      g_signal_connect_swapped (self->shows[k], "toggled", G_CALLBACK (shows_toggled), self);
      gtk_grid_attach (GTK_GRID (grid), GTK_WIDGET (self->shows[k]), 1 + (int) (k % 2),
                       (int) (k / 2), 1, 1);
    }
  return grid;
}

/* The actuator row under the variant: limits on the controller output and anti-windup. */
static void
build_actuator_row (LwCompensatorPanel *self)
{
  GtkWidget *row = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 6);
  self->actuator_check = GTK_CHECK_BUTTON (gtk_check_button_new_with_mnemonic (
    _("Actuator _limits")));
  gtk_widget_set_tooltip_text (GTK_WIDGET (self->actuator_check),
                               _("Limits on the controller output, in the actuator's units: "
                                 "the simulated responses of this variant are clipped to them"));
  self->actuator_low = GTK_SPIN_BUTTON (gtk_spin_button_new_with_range (-1e12, 1e12, 0.1));
  self->actuator_high = GTK_SPIN_BUTTON (gtk_spin_button_new_with_range (-1e12, 1e12, 0.1));
  gtk_spin_button_set_digits (self->actuator_low, 3);
  gtk_spin_button_set_digits (self->actuator_high, 3);
  gtk_spin_button_set_value (self->actuator_low, -1.0);
  gtk_spin_button_set_value (self->actuator_high, 1.0);
  self->actuator_problem = GTK_LABEL (gtk_label_new (NULL));
  gtk_label_set_xalign (self->actuator_problem, 0.0);
  gtk_label_set_wrap (self->actuator_problem, TRUE);
  gtk_widget_add_css_class (GTK_WIDGET (self->actuator_problem), "error");
  gtk_widget_set_visible (GTK_WIDGET (self->actuator_problem), FALSE);
  for (int i = 0; i < 2; i++)
    {
      GtkSpinButton *s = i == 0 ? self->actuator_low : self->actuator_high;
      lw_gui_spin_wheel_off (s);
      lw_number_field_setup (s, i == 0 ? _("Actuator low") : _("Actuator high"),
                             self->actuator_problem);
      gtk_editable_set_width_chars (GTK_EDITABLE (s), 7);
      gtk_widget_set_hexpand (GTK_WIDGET (s), TRUE);
    }
  gtk_accessible_update_property (GTK_ACCESSIBLE (self->actuator_low),
                                  GTK_ACCESSIBLE_PROPERTY_LABEL, _("Actuator low limit"), -1);
  gtk_accessible_update_property (GTK_ACCESSIBLE (self->actuator_high),
                                  GTK_ACCESSIBLE_PROPERTY_LABEL, _("Actuator high limit"), -1);
  self->anti_windup_check = GTK_CHECK_BUTTON (gtk_check_button_new_with_mnemonic (
    _("Anti-_windup")));
  gtk_widget_set_tooltip_text (GTK_WIDGET (self->anti_windup_check),
                               _("Hold the controller's integrating states while the output is "
                                 "at a limit (clamping)"));
  /* two lines, so the panel keeps its width: the switches, then the limits */
  GtkWidget *limits = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 6);
  gtk_widget_set_hexpand (GTK_WIDGET (self->actuator_check), TRUE);
  gtk_box_append (GTK_BOX (row), GTK_WIDGET (self->actuator_check));
  gtk_box_append (GTK_BOX (row), GTK_WIDGET (self->anti_windup_check));
  gtk_box_append (GTK_BOX (limits), GTK_WIDGET (self->actuator_low));
  gtk_box_append (GTK_BOX (limits), gtk_label_new ("…"));
  gtk_box_append (GTK_BOX (limits), GTK_WIDGET (self->actuator_high));
  /* the reference step the limits are checked with */
  GtkWidget *step_row = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 6);
  self->reference_step = GTK_SPIN_BUTTON (gtk_spin_button_new_with_range (1e-12, 1e12, 0.1));
  gtk_spin_button_set_digits (self->reference_step, 3);
  gtk_spin_button_set_value (self->reference_step, 1.0);
  lw_gui_spin_wheel_off (self->reference_step);
  lw_number_field_setup (self->reference_step, _("Reference step"), self->actuator_problem);
  gtk_widget_set_hexpand (GTK_WIDGET (self->reference_step), TRUE);
  gtk_widget_set_tooltip_text (GTK_WIDGET (self->reference_step),
                               _("The size of the reference step the limits are checked with, "
                                 "in the output's units: with limits the response depends on "
                                 "it (shown in units of r)"));
  GtkWidget *step_label = lw_gui_row_label (0.0f, 0.5f, _("Re_ference step"),
                                            GTK_WIDGET (self->reference_step));
  gtk_box_append (GTK_BOX (step_row), step_label);
  gtk_box_append (GTK_BOX (step_row), GTK_WIDGET (self->reference_step));
  gtk_box_append (self->actuator_box, row);
  gtk_box_append (self->actuator_box, limits);
  gtk_box_append (self->actuator_box, step_row);
  gtk_box_append (self->actuator_box, build_shows_row (self));
  gtk_box_append (self->actuator_box, GTK_WIDGET (self->actuator_problem));
  g_signal_connect_swapped (self->actuator_check, "toggled", G_CALLBACK (actuator_edited), self);
  g_signal_connect_swapped (self->anti_windup_check, "toggled", G_CALLBACK (actuator_edited),
                            self);
  g_signal_connect_swapped (self->actuator_low, "value-changed", G_CALLBACK (actuator_edited),
                            self);
  g_signal_connect_swapped (self->actuator_high, "value-changed", G_CALLBACK (actuator_edited),
                            self);
  g_signal_connect_swapped (self->reference_step, "value-changed",
                            G_CALLBACK (reference_step_edited), self);
  show_actuator_sensitivity (self);
}

static void
rebuild_variants (LwCompensatorPanel *self)
{
  if (self->model == NULL)
    return;
  self->updating = TRUE;
  guint n = lw_design_model_get_n_variants (self->model);
  guint active = lw_design_model_get_active (self->model);
  g_autoptr (GtkStringList) list = gtk_string_list_new (NULL);
  for (guint i = 0; i < n; i++)
    gtk_string_list_append (list, lw_design_model_get_variant_name (self->model, i));
  gtk_drop_down_set_model (self->variant_dropdown, G_LIST_MODEL (list));
  gtk_drop_down_set_selected (self->variant_dropdown, active);
  gtk_editable_set_text (GTK_EDITABLE (self->name_entry),
                         lw_design_model_get_variant_name (self->model, active));
  gtk_widget_set_visible (GTK_WIDGET (self->name_problem), FALSE);
  gboolean own = FALSE;
  double period_s = lw_design_model_get_variant_period_s (self->model, active, &own);
  gtk_check_button_set_active (self->period_check, own);
  gtk_spin_button_set_value (self->period_spin, period_s);
  gtk_widget_set_sensitive (GTK_WIDGET (self->period_spin), own);
  double low = -1.0, high = 1.0;
  gboolean aw = FALSE;
  gboolean limited = lw_design_model_get_variant_actuator (self->model, active, &low, &high, &aw);
  gtk_check_button_set_active (self->actuator_check, limited);
  if (limited)
    {
      gtk_spin_button_set_value (self->actuator_low, low);
      gtk_spin_button_set_value (self->actuator_high, high);
    }
  gtk_check_button_set_active (self->anti_windup_check, limited && aw);
  gtk_spin_button_set_value (self->reference_step,
                             lw_design_model_get_variant_reference_step (self->model, active));
  show_actuator_sensitivity (self);
  unsigned responses = lw_design_model_get_design (self->model)->variants[active].responses;
  for (unsigned k = 0; k < LW_DESIGN_N_RESPONSES; k++)
    gtk_check_button_set_active (self->shows[k], (responses & (1u << k)) != 0);

  GtkWidget *c;
  while ((c = gtk_widget_get_first_child (GTK_WIDGET (self->compare_box))) != NULL)
    gtk_box_remove (self->compare_box, c);
  for (guint i = 0; i < n; i++)
    {
      const char *name = lw_design_model_get_variant_name (self->model, i);
      GtkWidget *b = gtk_check_button_new_with_label (name);
      g_object_set_data_full (G_OBJECT (b), "lw-variant", g_strdup (name), g_free);
      gtk_check_button_set_active (GTK_CHECK_BUTTON (b), i == active || is_compared (self, i));
      /* the active variant is always shown */
      gtk_widget_set_sensitive (b, i != active);
      g_signal_connect (b, "toggled", G_CALLBACK (compare_toggled), self);
      gtk_box_append (self->compare_box, b);
    }
  self->updating = FALSE;
}

static void
variant_selected (GtkDropDown *dd, GParamSpec *pspec, LwCompensatorPanel *self)
{
  guint i = gtk_drop_down_get_selected (dd);
  if (self->updating || self->model == NULL || i == GTK_INVALID_LIST_POSITION
      || i == lw_design_model_get_active (self->model))
    return;
  gtk_widget_activate_action (GTK_WIDGET (self), "window.variant-switch", "u", i);
}

/* The check button or the spin of the variant's own period: one window action (one undo
 * step) with the state of both. */
static void
period_edited (LwCompensatorPanel *self)
{
  if (self->updating || self->model == NULL)
    return;
  gboolean own = gtk_check_button_get_active (self->period_check);
  gtk_widget_set_sensitive (GTK_WIDGET (self->period_spin), own);
  gtk_widget_activate_action (GTK_WIDGET (self), "window.variant-period", "(bd)", own,
                              gtk_spin_button_get_value (self->period_spin));
}

static void
rename_clicked (LwCompensatorPanel *self)
{
  if (self->model == NULL)
    return;
  const char *name = gtk_editable_get_text (GTK_EDITABLE (self->name_entry));
  const char *problem =
    lw_design_model_variant_name_problem (self->model, lw_design_model_get_active (self->model),
                                          name);
  gtk_label_set_text (self->name_problem, problem != NULL ? problem : "");
  gtk_widget_set_visible (GTK_WIDGET (self->name_problem), problem != NULL);
  if (problem == NULL)
    gtk_widget_activate_action (GTK_WIDGET (self), "window.variant-rename", "s", name);
}

void
lw_compensator_panel_popup_variants (LwCompensatorPanel *self)
{
  g_return_if_fail (LW_IS_COMPENSATOR_PANEL (self));
  gtk_menu_button_popup (self->variant_button);
}

void
lw_compensator_panel_set_model (LwCompensatorPanel *self, LwDesignModel *model)
{
  g_return_if_fail (LW_IS_COMPENSATOR_PANEL (self));
  g_return_if_fail (LW_IS_DESIGN_MODEL (model));

  g_set_object (&self->model, model);
  g_signal_group_set_target (self->model_signals, model);
  self->place_nu_rad_s = 0.1 * 2.0 / lw_design_model_get_period_s (model);
  rebuild_rows (self);
  rebuild_variants (self);
}

void
lw_compensator_panel_show_eval (LwCompensatorPanel *self, LwVariantEval *eval)
{
  g_return_if_fail (LW_IS_COMPENSATOR_PANEL (self));
  g_return_if_fail (eval != NULL);

  gboolean failed = eval->failure == LW_EVAL_FAILED_COMPENSATOR;
  gtk_label_set_text (self->error_label, failed ? eval->error->message : "");
  gtk_widget_set_visible (GTK_WIDGET (self->error_label), failed);

  lw_gui_label_show_model (self->controller_w_label, _("C(w)"), eval->controller_w);
  lw_gui_label_show_model (self->controller_z_label, _("C(z)"),
                   eval->ev != NULL ? eval->ev->controller_z : NULL);

  double ring;
  gboolean rings = eval->ev != NULL && lw_engine_ringing_pole (eval->ev->controller_z, &ring);
  if (rings)
    {
      g_autofree char *text
        = g_strdup_printf (_("The controller has a pole at z = %.4g, on the negative real axis: "
                             "it rings at half the sample rate. A filter faster than the loop "
                             "can sample (a derivative filter with N/Td > 2/T) belongs at a "
                             "lower frequency."), ring);
      gtk_label_set_text (self->ringing_label, text);
    }
  gtk_widget_set_visible (GTK_WIDGET (self->ringing_label), rings);

  if (eval->ev != NULL && eval->ev->margins.has_phase_margin)
    self->place_nu_rad_s = lw_warp_omega_to_nu (eval->ev->margins.gain_crossover_rad_s,
                                                eval->ev->period_s);
}

void
lw_compensator_panel_popup_add_menu (LwCompensatorPanel *self)
{
  g_return_if_fail (LW_IS_COMPENSATOR_PANEL (self));
  gtk_menu_button_popup (self->add_button);
}

/* New stages are placed around ν (rad/s) by the stage-kind table (lw_stage_placed). */
static void
add_stage_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwCompensatorPanel *self = LW_COMPENSATOR_PANEL (widget);
  const char *name = g_variant_get_string (param, NULL);
  const LwStageKindInfo *k = lw_stage_kind_by_name (name);

  if (k == NULL)
    {
      g_warning ("compensator.add-stage: unknown stage kind “%s”", name);
      return;
    }
  LwStage s = lw_stage_placed (k->kind, self->place_nu_rad_s);
  lw_design_model_append_stage (self->model, &s);
}

/* For the window tests: the add-stage menu is on screen and takes the keys */
static void
add_menu_mapped (void)
{
  printf ("LW-ADD-MENU shown=1\n");
  fflush (stdout);
}

/* The add-stage menu: one item per row of the stage-kind table, in its order. */
static GMenuModel *
add_stage_menu_new (void)
{
  GMenu *menu = g_menu_new ();
  for (size_t i = 0; i < lw_stage_kind_count (); i++)
    {
      const LwStageKindInfo *k = lw_stage_kind_info ((LwStageKind) i);
      g_autoptr (GMenuItem) item = g_menu_item_new (_(k->title), NULL);
      g_menu_item_set_action_and_target_value (item, "compensator.add-stage",
                                               g_variant_new_string (k->name));
      g_menu_append_item (menu, item);
    }
  return G_MENU_MODEL (menu);
}

/* LW_DEBUG_HANDLES: the centre of the Variants button in window-surface coordinates (as the
 * plot panes print their handles), printed when it changes, so a test can open the popover.
 * The tick stops once the position has stayed put for 60 frames (it would keep the frame
 * clock running). */
static gboolean
debug_tick (GtkWidget *widget, GdkFrameClock *clock, gpointer data)
{
  LwCompensatorPanel *self = LW_COMPENSATOR_PANEL (widget);
  GtkWidget *b = GTK_WIDGET (self->variant_button);
  GtkNative *native = gtk_widget_get_native (b);
  graphene_point_t p;
  if (native == NULL || gtk_widget_get_width (b) <= 0
      || !gtk_widget_compute_point (b, GTK_WIDGET (native),
                                    &GRAPHENE_POINT_INIT (gtk_widget_get_width (b) / 2.0f,
                                                          gtk_widget_get_height (b) / 2.0f),
                                    &p))
    return G_SOURCE_CONTINUE;
  double tx = 0, ty = 0;
  gtk_native_get_surface_transform (native, &tx, &ty);
  g_autofree char *line = g_strdup_printf ("LW-WIDGET name=variants-button sx=%.3f sy=%.3f\n",
                                           p.x + tx, p.y + ty);
  if (g_strcmp0 (line, self->debug_last) != 0)
    {
      g_free (self->debug_last);
      self->debug_last = g_steal_pointer (&line);
      fputs (self->debug_last, stdout);
      fflush (stdout);
      self->debug_same = 0;
    }
  return ++self->debug_same < 60 ? G_SOURCE_CONTINUE : G_SOURCE_REMOVE;
}

static void
lw_compensator_panel_dispose (GObject *object)
{
  LwCompensatorPanel *self = LW_COMPENSATOR_PANEL (object);

  g_clear_object (&self->model_signals);
  g_clear_object (&self->model);
  g_clear_pointer (&self->debug_last, g_free);
  gtk_widget_dispose_template (GTK_WIDGET (self), LW_TYPE_COMPENSATOR_PANEL);
  GtkWidget *child;
  while ((child = gtk_widget_get_first_child (GTK_WIDGET (self))) != NULL)
    gtk_widget_unparent (child);
  G_OBJECT_CLASS (lw_compensator_panel_parent_class)->dispose (object);
}

static void
lw_compensator_panel_class_init (LwCompensatorPanelClass *klass)
{
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  G_OBJECT_CLASS (klass)->dispose = lw_compensator_panel_dispose;
  gtk_widget_class_set_template_from_resource (
    widget_class, "/org/loopwright/Designer/ui/lw-compensator-panel.ui");
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, add_button);
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, stage_list);
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, error_label);
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, controller_w_label);
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, controller_z_label);
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, ringing_label);
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, variant_dropdown);
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, variant_button);
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, name_entry);
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, rename_button);
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, name_problem);
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, compare_box);
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, period_check);
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, period_spin);
  gtk_widget_class_bind_template_child (widget_class, LwCompensatorPanel, actuator_box);
  gtk_widget_class_install_action (widget_class, "compensator.add-stage", "s",
                                   add_stage_activated);
  gtk_widget_class_set_layout_manager_type (widget_class, GTK_TYPE_BIN_LAYOUT);
}

static void
lw_compensator_panel_init (LwCompensatorPanel *self)
{
  gtk_widget_init_template (GTK_WIDGET (self));
  self->model_signals = g_signal_group_new (LW_TYPE_DESIGN_MODEL);
  g_signal_group_connect_swapped (self->model_signals, "stages-changed",
                                  G_CALLBACK (rebuild_rows), self);
  g_signal_group_connect_swapped (self->model_signals, "variants-changed",
                                  G_CALLBACK (rebuild_variants), self);
  g_signal_group_connect_swapped (self->model_signals, "replaced",
                                  G_CALLBACK (rebuild_variants), self);
  g_autoptr (GMenuModel) add_menu = add_stage_menu_new ();
  gtk_menu_button_set_menu_model (self->add_button, add_menu);
  lw_gui_spin_wheel_off (self->period_spin);
  GtkAdjustment *pa = gtk_spin_button_get_adjustment (self->period_spin);
  gtk_adjustment_set_lower (pa, LW_PERIOD_MIN_S);
  gtk_adjustment_set_upper (pa, LW_PERIOD_MAX_S);
  lw_number_field_setup (self->period_spin, _("Own sample period"), self->name_problem);
  build_actuator_row (self);
  g_autoptr (GtkListItemFactory) shown = name_factory (TRUE);
  g_autoptr (GtkListItemFactory) listed = name_factory (FALSE);
  gtk_drop_down_set_factory (self->variant_dropdown, shown);
  gtk_drop_down_set_list_factory (self->variant_dropdown, listed);
  g_signal_connect (self->variant_dropdown, "notify::selected", G_CALLBACK (variant_selected),
                    self);
  g_signal_connect_swapped (self->rename_button, "clicked", G_CALLBACK (rename_clicked), self);
  g_signal_connect_swapped (self->name_entry, "activate", G_CALLBACK (rename_clicked), self);
  self->debug = g_strcmp0 (g_getenv ("LW_DEBUG_HANDLES"), "1") == 0;
  if (self->debug)
    g_signal_connect (gtk_menu_button_get_popover (self->add_button), "map",
                      G_CALLBACK (add_menu_mapped), NULL);
  if (self->debug)
    gtk_widget_add_tick_callback (GTK_WIDGET (self), debug_tick, NULL, NULL);
  g_signal_connect_swapped (self->period_check, "toggled", G_CALLBACK (period_edited), self);
  g_signal_connect_swapped (self->period_spin, "value-changed", G_CALLBACK (period_edited),
                            self);
}
