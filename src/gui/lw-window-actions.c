/* lw-window-actions.c — the window's keyboard shortcuts, undo and redo, the layout properties
 * ("one-column", "split") and its small actions.
 *
 * Undo and redo are an LwHistory of the design model (lw-history.h): an edit becomes a step
 * UNDO_MERGE_MS after the last of a burst, a finished drag or a variant action at once; the
 * window only refuses them while a drag is in progress and keeps the actions' enabled state
 * in step with "can-undo" and "can-redo".
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-window-private.h"

#define UNDO_MERGE_MS 700
#define UNDO_DEPTH 200

/* ---- undo ---------------------------------------------------------------------------------- */

static void
update_undo_actions (LwWindow *self)
{
  gtk_widget_action_set_enabled (GTK_WIDGET (self), "window.undo",
                                 lw_history_get_can_undo (self->history));
  gtk_widget_action_set_enabled (GTK_WIDGET (self), "window.redo",
                                 lw_history_get_can_redo (self->history));
}

void
lw_window_start_history (LwWindow *self)
{
  g_clear_object (&self->history);
  self->history = lw_history_new (self->model, UNDO_DEPTH, UNDO_MERGE_MS);
  g_signal_connect_object (self->history, "notify::can-undo", G_CALLBACK (update_undo_actions),
                           self, G_CONNECT_SWAPPED);
  g_signal_connect_object (self->history, "notify::can-redo", G_CALLBACK (update_undo_actions),
                           self, G_CONNECT_SWAPPED);
  update_undo_actions (self);
}

static void
undo_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (self->dragging)
    return;
  if (lw_history_undo (self->history))
    self->sel_stage = -1;
}

/* window.history-commit: what was edited so far becomes a step now (a panel's edit that is a
 * step of its own calls it before and after; nothing during a drag, which commits itself) */
static void
history_commit_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (!self->dragging)
    lw_history_commit (self->history);
}

static void
redo_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (self->dragging)
    return;
  if (lw_history_redo (self->history))
    self->sel_stage = -1;
}

/* ---- small actions ------------------------------------------------------------------------- */

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

static void
reset_view_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  lw_plot_area_reset_view (LW_WINDOW (widget)->plot_area);
}

/* ---- the layout: one column (F9) and the split view ---------------------------------------- */

enum
{
  PROP_0,
  PROP_ONE_COLUMN,
  PROP_SPLIT,
  N_PROPS
};
static GParamSpec *props[N_PROPS];

static void
lw_window_get_property (GObject *object, guint id, GValue *value, GParamSpec *pspec)
{
  LwWindow *self = LW_WINDOW (object);

  switch (id)
    {
    case PROP_ONE_COLUMN:
      g_value_set_boolean (value, self->one_column);
      break;
    case PROP_SPLIT:
      g_value_set_boolean (value, self->split);
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
        GSettings *settings = lw_window_get_settings (self);
        if (settings != NULL)
          g_settings_set_enum (settings, "layout", v ? LW_PLOT_LAYOUT_COLUMN
                                                     : LW_PLOT_LAYOUT_GRID);
        g_object_notify_by_pspec (object, pspec);
      }
      break;
    case PROP_SPLIT:
      {
        gboolean v = g_value_get_boolean (value);
        if (v == self->split)
          break;
        self->split = v;
        lw_plot_area_set_split (self->plot_area, v);
        if (self->eval != NULL)
          lw_window_show_variants (self);
        g_object_notify_by_pspec (object, pspec);
      }
      break;
    default:
      G_OBJECT_WARN_INVALID_PROPERTY_ID (object, id, pspec);
    }
}

void
lw_window_class_init_properties (GObjectClass *object_class)
{
  object_class->get_property = lw_window_get_property;
  object_class->set_property = lw_window_set_property;
  props[PROP_ONE_COLUMN] =
    g_param_spec_boolean ("one-column", NULL, NULL, FALSE,
                          G_PARAM_READWRITE | G_PARAM_EXPLICIT_NOTIFY | G_PARAM_STATIC_STRINGS);
  props[PROP_SPLIT] =
    g_param_spec_boolean ("split", NULL, NULL, FALSE,
                          G_PARAM_READWRITE | G_PARAM_EXPLICIT_NOTIFY | G_PARAM_STATIC_STRINGS);
  g_object_class_install_properties (object_class, N_PROPS, props);
}

/* ---- keyboard shortcuts -------------------------------------------------------------------- */

typedef struct
{
  guint key;
  GdkModifierType mods;
  const char *action;
} Binding;

#define CTRL GDK_CONTROL_MASK
#define CTRL_SHIFT (GDK_CONTROL_MASK | GDK_SHIFT_MASK)

/* The window's shortcuts (the shortcuts window, ui/help-overlay.ui, lists them for the user); with
 * Shift, a letter is bound as both cases, as keyboards report either. */
static const Binding bindings[] = {
  { GDK_KEY_n, CTRL_SHIFT, "window.variant-copy" },
  { GDK_KEY_N, CTRL_SHIFT, "window.variant-copy" },
  { GDK_KEY_Page_Down, CTRL, "window.variant-next" },
  { GDK_KEY_Page_Up, CTRL, "window.variant-previous" },
  { GDK_KEY_k, CTRL_SHIFT, "window.compare-all" },
  { GDK_KEY_K, CTRL_SHIFT, "window.compare-all" },
  { GDK_KEY_0, CTRL, "window.reset-view" },
  { GDK_KEY_l, CTRL, "window.focus-plant" },
  { GDK_KEY_a, CTRL_SHIFT, "window.add-stage" },
  { GDK_KEY_F9, 0, "window.one-column" },
  { GDK_KEY_w, CTRL, "window.close" },
  { GDK_KEY_o, CTRL, "window.open" },
  { GDK_KEY_s, CTRL, "window.save" },
  { GDK_KEY_s, CTRL_SHIFT, "window.save-as" },
  { GDK_KEY_e, CTRL, "window.export" },
  { GDK_KEY_m, CTRL_SHIFT, "window.import-measured" },
  { GDK_KEY_M, CTRL_SHIFT, "window.import-measured" },
  { GDK_KEY_f, CTRL_SHIFT, "window.fit-measured" },
  { GDK_KEY_F, CTRL_SHIFT, "window.fit-measured" },
  { GDK_KEY_e, CTRL_SHIFT, "window.export-report" },
  { GDK_KEY_E, CTRL_SHIFT, "window.export-report" },
  { GDK_KEY_z, CTRL, "window.undo" },
  { GDK_KEY_z, CTRL_SHIFT, "window.redo" },
  { GDK_KEY_Z, CTRL_SHIFT, "window.redo" },
  { GDK_KEY_F7, 0, "window.next-handle" },
  { GDK_KEY_F7, GDK_SHIFT_MASK, "window.previous-handle" },
};

/* Shortcuts that must win over the focused widget: a GtkPaned takes F6 and F8 and a text field
 * its own keys before a binding of the window's class is asked, so these are taken in the
 * capture phase. Undo and redo are the design's everywhere: a focused text field would
 * otherwise undo its own text (and could empty the plant behind the design's back). */
static const Binding early[] = {
  { GDK_KEY_b, CTRL_SHIFT, "window.split" },
  { GDK_KEY_v, CTRL_SHIFT, "window.variants" },
  { GDK_KEY_z, CTRL, "window.undo" },
  { GDK_KEY_z, CTRL_SHIFT, "window.redo" },
  { GDK_KEY_Z, CTRL_SHIFT, "window.redo" },
};

void
lw_window_class_init_actions (GtkWidgetClass *widget_class)
{
  gtk_widget_class_install_action (widget_class, "window.focus-plant", NULL,
                                   focus_plant_activated);
  gtk_widget_class_install_action (widget_class, "window.add-stage", NULL, add_stage_activated);
  gtk_widget_class_install_action (widget_class, "window.undo", NULL, undo_activated);
  gtk_widget_class_install_action (widget_class, "window.redo", NULL, redo_activated);
  gtk_widget_class_install_action (widget_class, "window.history-commit", NULL,
                                   history_commit_activated);
  gtk_widget_class_install_action (widget_class, "window.reset-view", NULL,
                                   reset_view_activated);
  gtk_widget_class_install_property_action (widget_class, "window.one-column", "one-column");
  gtk_widget_class_install_property_action (widget_class, "window.split", "split");
  for (guint i = 0; i < G_N_ELEMENTS (bindings); i++)
    gtk_widget_class_add_binding_action (widget_class, bindings[i].key, bindings[i].mods,
                                         bindings[i].action, NULL);
}

void
lw_window_init_actions (LwWindow *self)
{
  GtkEventController *sc = gtk_shortcut_controller_new ();
  gtk_event_controller_set_propagation_phase (sc, GTK_PHASE_CAPTURE);
  for (guint i = 0; i < G_N_ELEMENTS (early); i++)
    gtk_shortcut_controller_add_shortcut (GTK_SHORTCUT_CONTROLLER (sc),
                                          gtk_shortcut_new (gtk_keyval_trigger_new (early[i].key,
                                                                                    early[i].mods),
                                                            gtk_named_action_new (early[i].action)));
  gtk_widget_add_controller (GTK_WIDGET (self), sc);
}
