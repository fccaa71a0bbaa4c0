/* lw-history.c — undo and redo of a design model (see lw-history.h).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-history.h"

struct _LwHistory
{
  GObject parent_instance;

  LwDesignModel *model;
  GSignalGroup *model_signals;
  guint depth, merge_ms;

  GPtrArray *undo, *redo;       /* of LwDesign *, oldest first */
  LwDesign *committed;          /* the document as of the last step */
  guint commit_id;              /* the merge timer, or 0 */
  gboolean restoring;           /* putting a snapshot back: not an edit */
  gboolean held;

  gboolean can_undo, can_redo;  /* as last notified */
};

G_DEFINE_FINAL_TYPE (LwHistory, lw_history, G_TYPE_OBJECT)

enum
{
  PROP_0,
  PROP_CAN_UNDO,
  PROP_CAN_REDO,
  N_PROPS
};
static GParamSpec *props[N_PROPS];

static gboolean
compute_can_undo (LwHistory *self)
{
  return self->undo->len > 0
         || (self->committed != NULL
             && !lw_design_equal (self->committed, lw_design_model_get_design (self->model)));
}

/* Notifies "can-undo" and "can-redo" when they changed. */
static void
update (LwHistory *self)
{
  gboolean can_undo = compute_can_undo (self);
  gboolean can_redo = self->redo->len > 0;
  if (can_undo != self->can_undo)
    {
      self->can_undo = can_undo;
      g_object_notify_by_pspec (G_OBJECT (self), props[PROP_CAN_UNDO]);
    }
  if (can_redo != self->can_redo)
    {
      self->can_redo = can_redo;
      g_object_notify_by_pspec (G_OBJECT (self), props[PROP_CAN_REDO]);
    }
}

void
lw_history_commit (LwHistory *self)
{
  g_return_if_fail (LW_IS_HISTORY (self));
  g_clear_handle_id (&self->commit_id, g_source_remove);
  const LwDesign *cur = lw_design_model_get_design (self->model);
  if (self->committed != NULL && lw_design_equal (cur, self->committed))
    return;
  if (self->committed != NULL)
    {
      g_ptr_array_add (self->undo, self->committed);
      if (self->undo->len > self->depth)
        g_ptr_array_remove_index (self->undo, 0);
    }
  self->committed = lw_design_copy (cur);
  g_ptr_array_set_size (self->redo, 0);
  update (self);
}

static gboolean
commit_timeout (gpointer user_data)
{
  LwHistory *self = user_data;
  self->commit_id = 0;
  lw_history_commit (self);
  return G_SOURCE_REMOVE;
}

static void
model_changed (LwHistory *self)
{
  if (!self->restoring && !self->held)
    {
      g_clear_handle_id (&self->commit_id, g_source_remove);
      self->commit_id = g_timeout_add (self->merge_ms, commit_timeout, self);
    }
  update (self);
}

void
lw_history_reset (LwHistory *self)
{
  g_return_if_fail (LW_IS_HISTORY (self));
  g_clear_handle_id (&self->commit_id, g_source_remove);
  g_ptr_array_set_size (self->undo, 0);
  g_ptr_array_set_size (self->redo, 0);
  g_clear_pointer (&self->committed, lw_design_free);
  self->committed = lw_design_copy (lw_design_model_get_design (self->model));
  update (self);
}

void
lw_history_hold (LwHistory *self, gboolean hold)
{
  g_return_if_fail (LW_IS_HISTORY (self));
  self->held = hold;
}

/* Moves `committed` onto to and the newest snapshot of from into its place, and shows it. */
static gboolean
step (LwHistory *self, GPtrArray *from, GPtrArray *to)
{
  lw_history_commit (self);
  if (from->len == 0)
    return FALSE;
  g_ptr_array_add (to, self->committed);
  self->committed = g_ptr_array_steal_index (from, from->len - 1);
  self->restoring = TRUE;
  lw_design_model_replace (self->model, lw_design_copy (self->committed));
  self->restoring = FALSE;
  update (self);
  return TRUE;
}

gboolean
lw_history_undo (LwHistory *self)
{
  g_return_val_if_fail (LW_IS_HISTORY (self), FALSE);
  return step (self, self->undo, self->redo);
}

gboolean
lw_history_redo (LwHistory *self)
{
  g_return_val_if_fail (LW_IS_HISTORY (self), FALSE);
  return step (self, self->redo, self->undo);
}

gboolean
lw_history_get_can_undo (LwHistory *self)
{
  g_return_val_if_fail (LW_IS_HISTORY (self), FALSE);
  return compute_can_undo (self);
}

gboolean
lw_history_get_can_redo (LwHistory *self)
{
  g_return_val_if_fail (LW_IS_HISTORY (self), FALSE);
  return self->redo->len > 0;
}

gboolean
lw_history_has_steps (LwHistory *self)
{
  g_return_val_if_fail (LW_IS_HISTORY (self), FALSE);
  return self->undo->len > 0 || self->redo->len > 0;
}

static void
lw_history_get_property (GObject *object, guint id, GValue *value, GParamSpec *pspec)
{
  LwHistory *self = LW_HISTORY (object);

  switch (id)
    {
    case PROP_CAN_UNDO:
      g_value_set_boolean (value, lw_history_get_can_undo (self));
      break;
    case PROP_CAN_REDO:
      g_value_set_boolean (value, lw_history_get_can_redo (self));
      break;
    default:
      G_OBJECT_WARN_INVALID_PROPERTY_ID (object, id, pspec);
    }
}

static void
lw_history_dispose (GObject *object)
{
  LwHistory *self = LW_HISTORY (object);

  g_clear_handle_id (&self->commit_id, g_source_remove);
  g_clear_object (&self->model_signals);
  g_clear_object (&self->model);
  G_OBJECT_CLASS (lw_history_parent_class)->dispose (object);
}

static void
lw_history_finalize (GObject *object)
{
  LwHistory *self = LW_HISTORY (object);

  g_clear_pointer (&self->committed, lw_design_free);
  g_ptr_array_unref (self->undo);
  g_ptr_array_unref (self->redo);
  G_OBJECT_CLASS (lw_history_parent_class)->finalize (object);
}

static void
lw_history_class_init (LwHistoryClass *klass)
{
  GObjectClass *object_class = G_OBJECT_CLASS (klass);

  object_class->dispose = lw_history_dispose;
  object_class->finalize = lw_history_finalize;
  object_class->get_property = lw_history_get_property;

  props[PROP_CAN_UNDO] =
    g_param_spec_boolean ("can-undo", NULL, NULL, FALSE,
                          G_PARAM_READABLE | G_PARAM_EXPLICIT_NOTIFY | G_PARAM_STATIC_STRINGS);
  props[PROP_CAN_REDO] =
    g_param_spec_boolean ("can-redo", NULL, NULL, FALSE,
                          G_PARAM_READABLE | G_PARAM_EXPLICIT_NOTIFY | G_PARAM_STATIC_STRINGS);
  g_object_class_install_properties (object_class, N_PROPS, props);
}

static void
lw_history_init (LwHistory *self)
{
  self->undo = g_ptr_array_new_with_free_func ((GDestroyNotify) lw_design_free);
  self->redo = g_ptr_array_new_with_free_func ((GDestroyNotify) lw_design_free);
  self->model_signals = g_signal_group_new (LW_TYPE_DESIGN_MODEL);
  g_signal_group_connect_swapped (self->model_signals, "changed", G_CALLBACK (model_changed),
                                  self);
}

LwHistory *
lw_history_new (LwDesignModel *model, guint depth, guint merge_ms)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (model), NULL);
  g_return_val_if_fail (depth >= 1, NULL);

  LwHistory *self = g_object_new (LW_TYPE_HISTORY, NULL);
  self->model = g_object_ref (model);
  self->depth = depth;
  self->merge_ms = merge_ms;
  g_signal_group_set_target (self->model_signals, model);
  lw_history_reset (self);
  return self;
}
