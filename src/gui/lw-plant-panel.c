/* lw-plant-panel.c — plant and sampling.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include <glib/gi18n.h>

#include "lw-gui-util.h"
#include "lw-number-field.h"
#include "lw-number.h"
#include "lw-parameter-rows.h"
#include "lw-plant-panel.h"
#include "lw-point-rows.h"
#include "lw-family-sampling.h"

struct _LwPlantPanel
{
  GtkWidget parent_instance;

  GtkEntry *plant_entry;
  GtkSpinButton *dead_time_spin;
  GtkSpinButton *period_spin;
  GtkSpinButton *delay_spin;
  GtkLabel *plant_z_label;
  GtkLabel *plant_w_label;
  GtkLabel *sampling_note;
  GtkLabel *field_problem;       /* a refused number in one of the fields */
  GtkEntry *input_unit_entry;
  GtkEntry *output_unit_entry;
  LwParameterRows *param_rows;   /* the plant's named parameters */
  LwPointRows *point_rows;       /* the plant family's operating points */
  LwFamilySampling *family_sampling;   /* its drawn members and seed */
  GtkSizeGroup *name_group;      /* the column of field names, the parameters' too */
  GtkWidget *vary_dead_time_button;

  LwDesignModel *model;
  gboolean filling;             /* showing the model: do not write back */
  char *plant_hint;             /* the plant entry's own placeholder and tooltip (from the */
  char *plant_tip;              /* template) */
};

G_DEFINE_FINAL_TYPE (LwPlantPanel, lw_plant_panel, GTK_TYPE_WIDGET)

static void
plant_entry_changed (LwPlantPanel *self, GtkEditable *editable)
{
  if (self->filling || self->model == NULL)
    return;
  lw_design_model_set_plant_text (self->model, gtk_editable_get_text (editable));
}

static void
sampling_changed (LwPlantPanel *self, GtkSpinButton *spin)
{
  if (self->filling || self->model == NULL)
    return;
  if (spin == self->dead_time_spin)
    lw_design_model_set_dead_time_s (self->model, gtk_spin_button_get_value (spin));
  else if (spin == self->period_spin)
    lw_design_model_set_period_s (self->model, gtk_spin_button_get_value (spin));
  else if (spin == self->delay_spin)
    lw_design_model_set_compute_delay (self->model, gtk_spin_button_get_value_as_int (spin));
}

/* The units: taken when both can be units (empty: none); a refused one is said under the
 * fields and the design keeps its last good units. */
static void
units_changed (LwPlantPanel *self, GtkEditable *editable)
{
  if (self->filling || self->model == NULL)
    return;
  const char *in = gtk_editable_get_text (GTK_EDITABLE (self->input_unit_entry));
  const char *out = gtk_editable_get_text (GTK_EDITABLE (self->output_unit_entry));
  const char *problem = NULL;
  GtkEntry *bad = NULL;
  if (in[0] != '\0' && (problem = lw_design_unit_problem (in)) != NULL)
    bad = self->input_unit_entry;
  else if (out[0] != '\0' && (problem = lw_design_unit_problem (out)) != NULL)
    bad = self->output_unit_entry;
  for (int k = 0; k < 2; k++)
    {
      GtkWidget *e = GTK_WIDGET (k == 0 ? self->input_unit_entry : self->output_unit_entry);
      if (e == GTK_WIDGET (bad))
        gtk_widget_add_css_class (e, "error");
      else
        gtk_widget_remove_css_class (e, "error");
    }
  if (bad != NULL)
    {
      const char *text = gtk_editable_get_text (GTK_EDITABLE (bad));
      g_autofree char *msg = bad == self->input_unit_entry
                             ? g_strdup_printf (_("Input unit “%s”: %s; not taken."), text, problem)
                             : g_strdup_printf (_("Output unit “%s”: %s; not taken."), text, problem);
      gtk_label_set_text (self->field_problem, msg);
      gtk_widget_set_visible (GTK_WIDGET (self->field_problem), TRUE);
      if (g_strcmp0 (g_getenv ("LW_DEBUG_HANDLES"), "1") == 0)   /* for the window tests */
        {
          printf ("LW-FIELD-REFUSED %s unit: %s\n",
                  bad == self->input_unit_entry ? "Input" : "Output", problem);
          fflush (stdout);
        }
      return;
    }
  gtk_widget_set_visible (GTK_WIDGET (self->field_problem), FALSE);
  lw_design_model_set_units (self->model, in, out);
}

void
lw_plant_panel_set_model (LwPlantPanel *self, LwDesignModel *model)
{
  g_return_if_fail (LW_IS_PLANT_PANEL (self));
  g_return_if_fail (LW_IS_DESIGN_MODEL (model));

  g_set_object (&self->model, model);
  self->filling = TRUE;
  gtk_editable_set_text (GTK_EDITABLE (self->plant_entry),
                         lw_design_model_get_plant_text (model));
  gtk_spin_button_set_value (self->dead_time_spin, lw_design_model_get_dead_time_s (model));
  gtk_spin_button_set_value (self->period_spin, lw_design_model_get_period_s (model));
  gtk_spin_button_set_value (self->delay_spin, lw_design_model_get_compute_delay (model));
  const LwDesign *d = lw_design_model_get_design (model);
  gtk_editable_set_text (GTK_EDITABLE (self->input_unit_entry),
                         d->input_unit != NULL ? d->input_unit : "");
  gtk_editable_set_text (GTK_EDITABLE (self->output_unit_entry),
                         d->output_unit != NULL ? d->output_unit : "");
  lw_parameter_rows_set_model (self->param_rows, model);
  lw_point_rows_set_model (self->point_rows, model);
  lw_family_sampling_set_model (self->family_sampling, model);
  self->filling = FALSE;
}

GtkWidget *
lw_plant_panel_get_entry (LwPlantPanel *self)
{
  g_return_val_if_fail (LW_IS_PLANT_PANEL (self), NULL);
  return GTK_WIDGET (self->plant_entry);
}

static void
clear_plant_error (LwPlantPanel *self)
{
  gtk_entry_set_icon_from_icon_name (self->plant_entry, GTK_ENTRY_ICON_SECONDARY, NULL);
  gtk_entry_set_icon_tooltip_text (self->plant_entry, GTK_ENTRY_ICON_SECONDARY, NULL);
  gtk_entry_set_attributes (self->plant_entry, NULL);
  gtk_widget_remove_css_class (GTK_WIDGET (self->plant_entry), "error");
}

/* Marks the error in the plant entry: an error icon whose tooltip names the character (1-based,
 * as the CLI reports it), and that character underlined. The core's position counts bytes of
 * the text, which equal characters up to the first non-ASCII one, where parsing stops. */
static void
mark_plant_error (LwPlantPanel *self, const LwVariantEval *eval)
{
  const struct { int position; const char *message; } e = { eval->error_position,
                                                            eval->error->message },
                                                      *err = &e;
  const char *text = gtk_editable_get_text (GTK_EDITABLE (self->plant_entry));
  size_t len = strlen (text);
  g_autofree char *tip = NULL;

  gtk_widget_add_css_class (GTK_WIDGET (self->plant_entry), "error");
  gtk_entry_set_attributes (self->plant_entry, NULL);
  if (err->position >= 0 && (size_t) err->position < len)
    {
      const char *at = text + err->position;
      const char *next = g_utf8_find_next_char (at, text + len);
      size_t end = next != NULL ? (size_t) (next - text) : len;
      g_autofree char *ch = g_strndup (at, end - (size_t) err->position);
      long column = g_utf8_pointer_to_offset (text, at) + 1;

      /* TRANSLATORS: %ld is the 1-based character position, %s the character, then the
       * parser's message */
      tip = g_strdup_printf (_("Character %ld (“%s”): %s"), column, ch, err->message);

      PangoAttrList *attrs = pango_attr_list_new ();
      PangoAttribute *u = pango_attr_underline_new (PANGO_UNDERLINE_ERROR);
      u->start_index = (guint) err->position;
      u->end_index = (guint) end;
      pango_attr_list_insert (attrs, u);
      PangoAttribute *w = pango_attr_weight_new (PANGO_WEIGHT_BOLD);
      w->start_index = (guint) err->position;
      w->end_index = (guint) end;
      pango_attr_list_insert (attrs, w);
      gtk_entry_set_attributes (self->plant_entry, attrs);
      pango_attr_list_unref (attrs);
    }
  else if (err->position >= 0)
    tip = g_strdup_printf (_("At the end of the expression: %s"), err->message);
  else
    tip = g_strdup (err->message);

  gtk_entry_set_icon_from_icon_name (self->plant_entry, GTK_ENTRY_ICON_SECONDARY,
                                     "dialog-error-symbolic");
  gtk_entry_set_icon_tooltip_text (self->plant_entry, GTK_ENTRY_ICON_SECONDARY, tip);
}

static void
show_sampling_note (LwPlantPanel *self, const LwEvaluation *ev)
{
  g_autofree char *text = NULL;

  double per_rise;
  switch (ev != NULL ? lw_engine_sampling_advice (&ev->step, ev->period_s, &per_rise)
                     : LW_SAMPLING_ADVICE_NONE)
    {
    case LW_SAMPLING_ADVICE_TOO_FEW:
      text = g_strdup_printf (_("%.3g samples per closed-loop rise time (%.3g s), fewer than "
                                "the usual 10 to 30: consider a shorter period."),
                              per_rise, ev->step.rise_time_s);
      break;
    case LW_SAMPLING_ADVICE_TOO_MANY:
      text = g_strdup_printf (_("%.3g samples per closed-loop rise time (%.3g s), more than "
                                "the usual 10 to 30: a longer period would do."),
                              per_rise, ev->step.rise_time_s);
      break;
    case LW_SAMPLING_ADVICE_NONE:
      break;
    }
  gtk_label_set_text (self->sampling_note, text != NULL ? text : "");
  gtk_widget_set_visible (GTK_WIDGET (self->sampling_note), text != NULL);
}

void
lw_plant_panel_show_eval (LwPlantPanel *self, LwVariantEval *eval)
{
  g_return_if_fail (LW_IS_PLANT_PANEL (self));
  g_return_if_fail (eval != NULL);

  /* an empty plant is a design still to be begun, not an error to mark */
  const char *plant = gtk_editable_get_text (GTK_EDITABLE (self->plant_entry));
  gboolean empty = plant[strspn (plant, " \t")] == '\0';
  if (eval->failure == LW_EVAL_FAILED_PLANT && !empty)
    mark_plant_error (self, eval);
  else
    clear_plant_error (self);

  /* on measured data alone the empty field says what stands for the plant */
  if (self->plant_hint == NULL)
    self->plant_hint = g_strdup (gtk_entry_get_placeholder_text (self->plant_entry));
  gtk_entry_set_placeholder_text (self->plant_entry,
                                  eval->failure == LW_EVAL_NO_MODEL
                                    ? _("none: the measured response is the plant")
                                    : self->plant_hint);
  if (self->plant_tip == NULL)
    self->plant_tip = g_strdup (gtk_widget_get_tooltip_text (GTK_WIDGET (self->plant_entry)));
  lw_gui_set_tooltip (GTK_WIDGET (self->plant_entry),
                      eval->failure == LW_EVAL_NO_MODEL ? eval->error->message
                                                        : self->plant_tip);

  if (eval->failure == LW_EVAL_FAILED_SAMPLING)
    {
      gtk_widget_add_css_class (GTK_WIDGET (self->period_spin), "error");
      lw_gui_set_tooltip (GTK_WIDGET (self->period_spin), eval->error->message);
    }
  else
    {
      gtk_widget_remove_css_class (GTK_WIDGET (self->period_spin), "error");
      lw_gui_set_tooltip (GTK_WIDGET (self->period_spin), NULL);
    }

  const LwEvaluation *ev = eval->ev;
  /* The factored forms are for display; where their roots are ill-conditioned they are not
   * the plant (lw_sampled_plant_form_error), and the label says so instead of passing them
   * off as it. */
  gboolean z_bad = ev != NULL && !(eval->plant_z_form_error <= LW_FORM_TOLERANCE);
  gboolean w_bad = ev != NULL && !(eval->plant_w_form_error <= LW_FORM_TOLERANCE);
  /* the active variant may be sampled at a period of its own: P(z) is at that period */
  g_autofree char *z_title = NULL;
  if (ev != NULL && self->model != NULL
      && eval->period_s != lw_design_model_get_period_s (self->model))
    /* TRANSLATORS: the discretized plant at the active variant's own sample period */
    z_title = g_strdup_printf (_("P(z) at the variant's own T = %g s"), eval->period_s);
  /* TRANSLATORS: the discretized plant in z, as factors */
  lw_gui_label_show_model (self->plant_z_label, z_bad ? _("P(z), ill-conditioned factors (not "
                                                          "the plant), ≈")
                           : z_title != NULL ? z_title : _("P(z)"),
                           ev != NULL ? ev->plant_z : NULL);
  /* TRANSLATORS: the discretized plant in the w-plane, as factors */
  lw_gui_label_show_model (self->plant_w_label, w_bad ? _("P(w), ill-conditioned factors (not "
                                                          "the plant), ≈")
                                                      : _("P(w)"),
                           ev != NULL ? ev->plant_w : NULL);
  g_autofree char *tip = NULL;
  if (z_bad || w_bad)
    tip = g_strdup_printf (_("These factors differ from the sampled plant by up to %.2g "
                             "(relative): their roots are ill-conditioned at this relative "
                             "degree and sample period. Every margin and figure is computed "
                             "from the plant's own response, not from them."),
                           /* NAN (printed "nan") when they could not be checked at all */
                           fmax (eval->plant_z_form_error, eval->plant_w_form_error));
  lw_gui_set_tooltip (GTK_WIDGET (self->plant_z_label), tip);
  lw_gui_set_tooltip (GTK_WIDGET (self->plant_w_label), tip);
  show_sampling_note (self, ev);
}

static void
lw_plant_panel_dispose (GObject *object)
{
  LwPlantPanel *self = LW_PLANT_PANEL (object);

  g_clear_object (&self->model);
  g_clear_pointer (&self->plant_hint, g_free);
  g_clear_pointer (&self->plant_tip, g_free);
  gtk_widget_dispose_template (GTK_WIDGET (self), LW_TYPE_PLANT_PANEL);
  GtkWidget *child;
  while ((child = gtk_widget_get_first_child (GTK_WIDGET (self))) != NULL)
    gtk_widget_unparent (child);
  G_OBJECT_CLASS (lw_plant_panel_parent_class)->dispose (object);
}

static void
lw_plant_panel_class_init (LwPlantPanelClass *klass)
{
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  G_OBJECT_CLASS (klass)->dispose = lw_plant_panel_dispose;
  g_type_ensure (LW_TYPE_PARAMETER_ROWS);
  g_type_ensure (LW_TYPE_POINT_ROWS);
  g_type_ensure (LW_TYPE_FAMILY_SAMPLING);
  gtk_widget_class_set_template_from_resource (widget_class,
                                               "/org/loopwright/Designer/ui/lw-plant-panel.ui");
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, plant_entry);
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, dead_time_spin);
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, period_spin);
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, delay_spin);
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, plant_z_label);
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, plant_w_label);
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, sampling_note);
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, field_problem);
  gtk_widget_class_bind_template_callback (widget_class, plant_entry_changed);
  gtk_widget_class_bind_template_callback (widget_class, sampling_changed);
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, input_unit_entry);
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, output_unit_entry);
  gtk_widget_class_bind_template_callback (widget_class, units_changed);
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, param_rows);
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, point_rows);
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, family_sampling);
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, name_group);
  gtk_widget_class_bind_template_child (widget_class, LwPlantPanel, vary_dead_time_button);
  gtk_widget_class_set_layout_manager_type (widget_class, GTK_TYPE_BIN_LAYOUT);
}

static void
lw_plant_panel_init (LwPlantPanel *self)
{
  gtk_widget_init_template (GTK_WIDGET (self));
  lw_parameter_rows_set_label_group (self->param_rows, self->name_group);
  lw_parameter_rows_set_dead_time_button (self->param_rows, self->vary_dead_time_button);
  lw_gui_spin_wheel_off (self->dead_time_spin);
  lw_gui_spin_wheel_off (self->period_spin);
  lw_gui_spin_wheel_off (self->delay_spin);
  /* the period's own range, as documents and the command line take it (lw-number.h) */
  GtkAdjustment *pa = gtk_spin_button_get_adjustment (self->period_spin);
  gtk_adjustment_set_lower (pa, LW_PERIOD_MIN_S);
  gtk_adjustment_set_upper (pa, LW_PERIOD_MAX_S);
  lw_number_field_setup (self->dead_time_spin, _("Dead time"), self->field_problem);
  lw_number_field_setup (self->period_spin, _("Sample period"), self->field_problem);
  lw_number_field_setup (self->delay_spin, _("Computation delay"), self->field_problem);
}
