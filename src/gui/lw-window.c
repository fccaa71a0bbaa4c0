/* lw-window.c — the designer window.
 *
 * Data flows one way: a panel edits the design model; the model's "changed" signal makes the
 * window evaluate the loop (lw_design_model_evaluate, through core/) and hand the evaluation
 * to every panel and to the plot area, which turn it into text and figures.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>

#include <glib/gi18n.h>

#include "lw-compensator-panel.h"
#include "lw-design-model.h"
#include "lw-figure-data.h"
#include "lw-plant-panel.h"
#include "lw-plot-area.h"
#include "lw-requirements-panel.h"
#include "lw-window.h"

struct _LwWindow
{
  GtkApplicationWindow parent_instance;

  LwPlantPanel *plant_panel;
  LwCompensatorPanel *compensator_panel;
  LwRequirementsPanel *requirements_panel;
  LwPlotArea *plot_area;

  LwDesignModel *model;
  LwLoopEval *eval;             /* the evaluation on show */
  gboolean one_column;
};

G_DEFINE_FINAL_TYPE (LwWindow, lw_window, GTK_TYPE_APPLICATION_WINDOW)

enum
{
  PROP_0,
  PROP_ONE_COLUMN,
  N_PROPS
};
static GParamSpec *props[N_PROPS];

static GSettings *
window_settings (LwWindow *self)
{
  GtkApplication *app = gtk_window_get_application (GTK_WINDOW (self));
  return LW_IS_APPLICATION (app) ? lw_application_get_settings (LW_APPLICATION (app)) : NULL;
}

/* Requirement marks for the Bode views: the first minimum phase margin, gain margin and
 * crossover range of the design (the range drawn at its geometric middle). */
static void
plot_requirements (LwWindow *self, LwPlotRequirements *req)
{
  gboolean has_pm = FALSE, has_gm = FALSE, has_wc = FALSE;
  double pm = 0, gm = 0, wc = 0;
  guint n = lw_design_model_get_n_requirements (self->model);

  for (guint i = 0; i < n; i++)
    {
      const LwRequirement *r = lw_design_model_get_requirement (self->model, i);
      if (lw_requirement_check (r, NULL) != LW_OK)
        continue;
      if (r->kind == LW_REQ_MIN_PHASE_MARGIN && !has_pm)
        has_pm = TRUE, pm = r->limit;
      else if (r->kind == LW_REQ_MIN_GAIN_MARGIN && !has_gm)
        has_gm = TRUE, gm = r->limit;
      else if (r->kind == LW_REQ_CROSSOVER_RANGE && !has_wc)
        has_wc = TRUE, wc = sqrt (r->limit * r->limit_hi);
    }
  lw_figure_requirements (req, lw_design_model_get_period_s (self->model), has_wc, wc, has_pm,
                          pm);
  req->has_min_gain_margin = has_gm;
  req->min_gain_margin_db = gm;
}

/* Evaluates the design and shows the result everywhere. Synchronous for now: a loop
 * evaluation takes about a millisecond at the default grid. The off-main-loop worker goes
 * here — evaluate a copy of the model on a GTask thread, drop results older than the newest
 * edit, and show the newest in its completion callback — when dense sweeps and long
 * simulations join the evaluation. */
static void
reevaluate (LwWindow *self)
{
  g_clear_pointer (&self->eval, lw_loop_eval_unref);
  self->eval = lw_design_model_evaluate (self->model);

  lw_plant_panel_show_eval (self->plant_panel, self->eval);
  lw_compensator_panel_show_eval (self->compensator_panel, self->eval);
  lw_requirements_panel_show_eval (self->requirements_panel, self->eval);
  LwPlotRequirements req = { 0 };
  plot_requirements (self, &req);
  lw_plot_area_show_eval (self->plot_area, self->eval, &req);
}

static void
set_model (LwWindow *self, LwDesignModel *model)
{
  if (self->model != NULL)
    g_signal_handlers_disconnect_by_data (self->model, self);
  g_set_object (&self->model, model);
  lw_plant_panel_set_model (self->plant_panel, model);
  lw_compensator_panel_set_model (self->compensator_panel, model);
  lw_requirements_panel_set_model (self->requirements_panel, model);
  g_signal_connect_swapped (model, "changed", G_CALLBACK (reevaluate), self);
  reevaluate (self);
}

/* ---- dark style ---------------------------------------------------------------------------- */

static void
follow_theme (LwWindow *self)
{
  gboolean dark = FALSE;
  g_object_get (gtk_settings_get_default (), "gtk-application-prefer-dark-theme", &dark, NULL);
  lw_plot_area_set_theme (self->plot_area, dark ? LW_PLOT_THEME_DARK : LW_PLOT_THEME_LIGHT);
}

/* ---- actions ------------------------------------------------------------------------------- */

static void
focus_plant_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  gtk_widget_grab_focus (lw_plant_panel_get_entry (self->plant_panel));
}

static void
add_stage_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  lw_compensator_panel_popup_add_menu (self->compensator_panel);
}

/* ---- life cycle ---------------------------------------------------------------------------- */

static gboolean
lw_window_close_request (GtkWindow *window)
{
  LwWindow *self = LW_WINDOW (window);
  GSettings *settings = window_settings (self);

  if (settings != NULL)
    {
      int width = 0, height = 0;
      gtk_window_get_default_size (window, &width, &height);
      gboolean maximized = gtk_window_is_maximized (window);
      g_settings_delay (settings);
      if (!maximized && width > 0 && height > 0)
        {
          g_settings_set_int (settings, "window-width", width);
          g_settings_set_int (settings, "window-height", height);
        }
      g_settings_set_boolean (settings, "window-maximized", maximized);
      g_settings_apply (settings);
    }
  return GTK_WINDOW_CLASS (lw_window_parent_class)->close_request (window);
}

static void
lw_window_get_property (GObject *object, guint id, GValue *value, GParamSpec *pspec)
{
  LwWindow *self = LW_WINDOW (object);

  switch (id)
    {
    case PROP_ONE_COLUMN:
      g_value_set_boolean (value, self->one_column);
      break;
    default:
      G_OBJECT_WARN_INVALID_PROPERTY_ID (object, id, pspec);
    }
}

static void
lw_window_set_property (GObject *object, guint id, const GValue *value, GParamSpec *pspec)
{
  LwWindow *self = LW_WINDOW (object);

  switch (id)
    {
    case PROP_ONE_COLUMN:
      {
        gboolean v = g_value_get_boolean (value);
        if (v == self->one_column)
          break;
        self->one_column = v;
        lw_plot_area_set_layout (self->plot_area, v ? LW_PLOT_LAYOUT_COLUMN
                                                    : LW_PLOT_LAYOUT_GRID);
        GSettings *settings = window_settings (self);
        if (settings != NULL)
          g_settings_set_enum (settings, "layout", v ? LW_PLOT_LAYOUT_COLUMN
                                                     : LW_PLOT_LAYOUT_GRID);
        g_object_notify_by_pspec (object, pspec);
      }
      break;
    default:
      G_OBJECT_WARN_INVALID_PROPERTY_ID (object, id, pspec);
    }
}

/* Once the window belongs to the application: restore its size and layout, show the example. */
static void
start (LwWindow *self)
{
  GSettings *settings = window_settings (self);
  if (settings != NULL)
    {
      gtk_window_set_default_size (GTK_WINDOW (self), g_settings_get_int (settings, "window-width"),
                                   g_settings_get_int (settings, "window-height"));
      if (g_settings_get_boolean (settings, "window-maximized"))
        gtk_window_maximize (GTK_WINDOW (self));
      self->one_column = g_settings_get_enum (settings, "layout") == LW_PLOT_LAYOUT_COLUMN;
      lw_plot_area_set_layout (self->plot_area, self->one_column ? LW_PLOT_LAYOUT_COLUMN
                                                                 : LW_PLOT_LAYOUT_GRID);
    }

  g_autoptr (LwDesignModel) model = lw_design_model_new_example ();
  set_model (self, model);
}

static void
lw_window_dispose (GObject *object)
{
  LwWindow *self = LW_WINDOW (object);

  g_signal_handlers_disconnect_by_data (gtk_settings_get_default (), self);
  if (self->model != NULL)
    g_signal_handlers_disconnect_by_data (self->model, self);
  g_clear_object (&self->model);
  g_clear_pointer (&self->eval, lw_loop_eval_unref);
  gtk_widget_dispose_template (GTK_WIDGET (self), LW_TYPE_WINDOW);
  G_OBJECT_CLASS (lw_window_parent_class)->dispose (object);
}

static void
lw_window_class_init (LwWindowClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);
  GtkWidgetClass *widget_class = GTK_WIDGET_CLASS (klass);

  object_class->dispose = lw_window_dispose;
  object_class->get_property = lw_window_get_property;
  object_class->set_property = lw_window_set_property;
  GTK_WINDOW_CLASS (klass)->close_request = lw_window_close_request;

  props[PROP_ONE_COLUMN] =
    g_param_spec_boolean ("one-column", NULL, NULL, FALSE,
                          G_PARAM_READWRITE | G_PARAM_EXPLICIT_NOTIFY | G_PARAM_STATIC_STRINGS);
  g_object_class_install_properties (object_class, N_PROPS, props);

  g_type_ensure (LW_TYPE_PLANT_PANEL);
  g_type_ensure (LW_TYPE_COMPENSATOR_PANEL);
  g_type_ensure (LW_TYPE_REQUIREMENTS_PANEL);
  g_type_ensure (LW_TYPE_PLOT_AREA);
  gtk_widget_class_set_template_from_resource (widget_class,
                                               "/org/loopwright/Designer/ui/lw-window.ui");
  gtk_widget_class_bind_template_child (widget_class, LwWindow, plant_panel);
  gtk_widget_class_bind_template_child (widget_class, LwWindow, compensator_panel);
  gtk_widget_class_bind_template_child (widget_class, LwWindow, requirements_panel);
  gtk_widget_class_bind_template_child (widget_class, LwWindow, plot_area);

  gtk_widget_class_install_action (widget_class, "window.focus-plant", NULL,
                                   focus_plant_activated);
  gtk_widget_class_install_action (widget_class, "window.add-stage", NULL, add_stage_activated);
  gtk_widget_class_install_property_action (widget_class, "window.one-column", "one-column");
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_l, GDK_CONTROL_MASK,
                                       "window.focus-plant", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_a, GDK_CONTROL_MASK | GDK_SHIFT_MASK,
                                       "window.add-stage", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_F9, 0, "window.one-column", NULL);
  gtk_widget_class_add_binding_action (widget_class, GDK_KEY_w, GDK_CONTROL_MASK,
                                       "window.close", NULL);
}

static void
lw_window_init (LwWindow *self)
{
  gtk_widget_init_template (GTK_WIDGET (self));
  g_signal_connect_swapped (gtk_settings_get_default (), "notify::gtk-application-prefer-dark-theme",
                            G_CALLBACK (follow_theme), self);
  follow_theme (self);
}

LwWindow *
lw_window_new (LwApplication *app)
{
  LwWindow *self = g_object_new (LW_TYPE_WINDOW, "application", app, NULL);
  start (self);
  return self;
}
