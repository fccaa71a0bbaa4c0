/* lw-window-variants.c — the variants of the design in the window: new, copy, rename,
 * delete, move, an own sample period, switching the active one (each one undo step of its
 * own), which variants are compared with the active one and which time responses it shows
 * (both kept in the document).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib/gi18n.h>

#include "lw-window-private.h"

/* Marks variant `name` compared (or not) in the document. */
static void
set_compared (LwWindow *self, const char *name, gboolean shown)
{
  const LwDesign *d = lw_design_model_get_design (self->model);
  gssize i = lw_design_find_variant (d, name);
  if (i >= 0)
    lw_design_model_set_variant_shown (self->model, (guint) i, d->variants[i].responses, shown);
}

/* Before and after each variant action: it is one undo step of its own. */
static gboolean
variant_action_begin (LwWindow *self)
{
  if (self->dragging)
    return FALSE;
  lw_history_commit (self->history);
  self->sel_stage = -1;
  return TRUE;
}

static void
variant_action_end (LwWindow *self)
{
  lw_history_commit (self->history);
}

static void
variant_add (LwWindow *self, gboolean copy)
{
  if (!variant_action_begin (self))
    return;
  guint active = lw_design_model_get_active (self->model);
  g_autofree char *from = g_strdup (lw_design_model_get_variant_name (self->model, active));
  g_autofree char *base = copy ? g_strdup_printf (_("%s copy"), from) : g_strdup (_("variant"));
  g_autofree char *name = lw_design_model_unused_variant_name (self->model, base);
  if (lw_design_model_add_variant (self->model, name, copy) && copy)
    set_compared (self, from, TRUE);   /* the original stays in view as the reference */
  if (copy)   /* the copy starts as the active one, not compared with itself */
    set_compared (self, name, FALSE);
  variant_action_end (self);
}

static void
variant_copy_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  variant_add (LW_WINDOW (widget), TRUE);
}

static void
variant_new_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  variant_add (LW_WINDOW (widget), FALSE);
}

static void
variant_delete_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (!variant_action_begin (self))
    return;
  lw_design_model_remove_variant (self->model, lw_design_model_get_active (self->model));
  variant_action_end (self);
}

static void
variant_move (LwWindow *self, int delta)
{
  if (!variant_action_begin (self))
    return;
  lw_design_model_move_variant (self->model, lw_design_model_get_active (self->model), delta);
  variant_action_end (self);
}

static void
variant_up_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  variant_move (LW_WINDOW (widget), -1);
}

static void
variant_down_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  variant_move (LW_WINDOW (widget), +1);
}

static void
variant_rename_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (!variant_action_begin (self))
    return;
  lw_design_model_rename_variant (self->model, lw_design_model_get_active (self->model),
                                  g_variant_get_string (param, NULL));
  variant_action_end (self);
}

/* The active variant's own sample period, set ((true, T)) or cleared ((false, _)): one undo
 * step. The spin's value when cleared is ignored. */
static void
variant_period_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  gboolean own = FALSE;
  double period_s = 0.0;
  g_variant_get (param, "(bd)", &own, &period_s);
  if (!variant_action_begin (self))
    return;
  lw_design_model_set_variant_period (self->model, lw_design_model_get_active (self->model),
                                      own, period_s);
  variant_action_end (self);
}

static void
variant_actuator_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  gboolean has = FALSE, anti_windup = FALSE;
  double low = 0.0, high = 0.0;
  g_variant_get (param, "(bddb)", &has, &low, &high, &anti_windup);
  if (!variant_action_begin (self))
    return;
  lw_design_model_set_variant_actuator (self->model, lw_design_model_get_active (self->model),
                                        has, low, high, anti_windup);
  variant_action_end (self);
}

static void
variant_reference_step_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (!variant_action_begin (self))
    return;
  lw_design_model_set_variant_reference_step (self->model,
                                              lw_design_model_get_active (self->model),
                                              g_variant_get_double (param));
  variant_action_end (self);
}

static void
variant_switch_to (LwWindow *self, guint i)
{
  if (i >= lw_design_model_get_n_variants (self->model) || !variant_action_begin (self))
    return;
  lw_design_model_set_active (self->model, i);
  variant_action_end (self);
}

static void
variant_switch_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  variant_switch_to (LW_WINDOW (widget), g_variant_get_uint32 (param));
}

static void
variant_step (LwWindow *self, int delta)
{
  guint n = lw_design_model_get_n_variants (self->model);
  guint a = lw_design_model_get_active (self->model);
  variant_switch_to (self, (a + n + (guint) (delta + (int) n)) % n);
}

static void
variant_next_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  variant_step (LW_WINDOW (widget), +1);
}

static void
variant_previous_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  variant_step (LW_WINDOW (widget), -1);
}

/* Which variants are compared is kept with the document: one undo step. */
static void
variant_compare_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  const char *name = NULL;
  gboolean shown = FALSE;
  g_variant_get (param, "(&sb)", &name, &shown);
  if (!variant_action_begin (self))
    return;
  set_compared (self, name, shown);
  variant_action_end (self);
}

/* The time responses the active variant shows (LW_DESIGN_RESPONSE_* flags): one undo step. */
static void
variant_responses_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (!variant_action_begin (self))
    return;
  guint active = lw_design_model_get_active (self->model);
  const LwDesign *d = lw_design_model_get_design (self->model);
  lw_design_model_set_variant_shown (self->model, active, g_variant_get_uint32 (param),
                                     d->variants[active].compared);
  variant_action_end (self);
}

static void
compare_all_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  const LwDesign *d = lw_design_model_get_design (self->model);
  gboolean all = TRUE;
  for (size_t i = 0; i < d->n_variants; i++)
    if (i != d->active && !lw_window_is_compared (self, d->variants[i].name))
      all = FALSE;
  if (!variant_action_begin (self))
    return;
  for (size_t i = 0; i < d->n_variants; i++)
    if (i != d->active)
      lw_design_model_set_variant_shown (self->model, (guint) i, d->variants[i].responses, !all);
  variant_action_end (self);
}

static void
variants_menu_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  lw_compensator_panel_popup_variants (LW_WINDOW (widget)->compensator_panel);
}

void
lw_window_class_init_variants (GtkWidgetClass *widget_class)
{
  gtk_widget_class_install_action (widget_class, "window.variant-period", "(bd)",
                                   variant_period_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-actuator", "(bddb)",
                                   variant_actuator_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-reference-step", "d",
                                   variant_reference_step_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-copy", NULL,
                                   variant_copy_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-new", NULL,
                                   variant_new_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-delete", NULL,
                                   variant_delete_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-up", NULL, variant_up_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-down", NULL,
                                   variant_down_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-rename", "s",
                                   variant_rename_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-switch", "u",
                                   variant_switch_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-next", NULL,
                                   variant_next_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-previous", NULL,
                                   variant_previous_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-compare", "(sb)",
                                   variant_compare_activated);
  gtk_widget_class_install_action (widget_class, "window.variant-responses", "u",
                                   variant_responses_activated);
  gtk_widget_class_install_action (widget_class, "window.compare-all", NULL,
                                   compare_all_activated);
  gtk_widget_class_install_action (widget_class, "window.variants", NULL,
                                   variants_menu_activated);
}
