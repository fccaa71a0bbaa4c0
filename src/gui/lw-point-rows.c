/* lw-point-rows.c — the operating points of the plant family in the plant panel
 * (lw-point-rows.h).
 *
 * The rows are built from the document when its parameters or its points (their number,
 * their names) change, on an idle so that no widget is taken away inside its own signal;
 * otherwise only the values shown are updated in place, so a field keeps a refused text while
 * the design changes. Every widget finds its point and parameter by the names it carries,
 * never by a position; after a rebuild the focus goes back to the field at the same place
 * (to the new point's name after "Add operating point").
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <string.h>

#include <glib/gi18n.h>

#include "lw-gui-util.h"
#include "lw-number-field.h"
#include "lw-point-rows.h"

/* the column of a point's name entry (its value entries: 1 + the parameter's index) */
#define COL_NAME 0

struct _LwPointRows
{
  GtkWidget parent_instance;

  GtkWidget *box;
  GtkGrid *grid;
  GtkWidget *add_button;
  GtkLabel *problem;            /* a refusal, under the rows */
  GtkLabel *state;              /* what is wrong with the points as they are (a plant typed
                                   since that fails at one), over the button */

  LwDesignModel *model;
  GSignalGroup *model_signals;
  char *shape;                  /* what the rows were built for (rows_shape) */
  char *key;                    /* what they show (lw_design_model_params_key) */
  guint rebuild_id;
  gboolean filling;             /* showing the model: do not write back */
  gboolean focus_added;         /* after a rebuild, the focus to the last point's name */
};

G_DEFINE_FINAL_TYPE (LwPointRows, lw_point_rows, GTK_TYPE_WIDGET)

static const char *
point_of (gpointer widget)
{
  return g_object_get_data (G_OBJECT (widget), "lw-point-name");
}

static const char *
param_of (gpointer widget)
{
  return g_object_get_data (G_OBJECT (widget), "lw-point-param");   /* NULL: the name entry */
}

static const char *
field_of (gpointer widget)
{
  return g_object_get_data (G_OBJECT (widget), "lw-point-field");
}

static void
set_data (gpointer widget, const char *key, const char *value)
{
  g_object_set_data_full (G_OBJECT (widget), key, g_strdup (value), g_free);
}

static char *
value_text (LwPointRows *self, const char *point, const char *param)
{
  double v;
  if (!lw_design_model_get_point_value (self->model, point, param, &v))
    return g_strdup ("");
  return lw_number_field_format (v);
}

/* ---- writing back --------------------------------------------------------------------------- */

static void
show_problem (LwPointRows *self, const char *field, const char *why)
{
  lw_gui_show_refusal (self->problem, field, why);
}

/* The field's text taken (clear) or refused with why (the text stays, marked). */
static void
mark (LwPointRows *self, GtkWidget *entry, const char *why)
{
  if (why == NULL)
    {
      set_data (entry, "lw-point-refused", NULL);
      if (gtk_widget_has_css_class (entry, "error"))
        {
          gtk_widget_remove_css_class (entry, "error");
          lw_gui_set_tooltip (entry, g_object_get_data (G_OBJECT (entry), "lw-point-tip"));
          show_problem (self, NULL, NULL);
        }
      return;
    }
  g_autofree char *tip = g_strdup_printf (_("%s: %s; not taken."), field_of (entry), why);
  set_data (entry, "lw-point-refused", gtk_editable_get_text (GTK_EDITABLE (entry)));
  gtk_widget_add_css_class (entry, "error");
  lw_gui_set_tooltip (entry, tip);
  show_problem (self, field_of (entry), why);
}

static void
commit (LwPointRows *self)
{
  lw_gui_history_step (GTK_WIDGET (self));
}

/* A value field left or activated: an empty text takes the nominal, a number is the point's
 * value, anything else is refused; the text as shown already changes nothing. */
static void
take_value (LwPointRows *self, GtkEntry *entry)
{
  const char *point = point_of (entry), *param = param_of (entry);
  const char *text = gtk_editable_get_text (GTK_EDITABLE (entry));
  g_autofree char *shown = value_text (self, point, param);
  g_autofree char *why = NULL;
  gboolean empty = text[strspn (text, " \t")] == '\0';
  if (strcmp (text, shown) == 0 || (empty && shown[0] == '\0'))
    {
      mark (self, GTK_WIDGET (entry), NULL);
      return;
    }
  double v;
  if (empty || lw_number_field_parse (text, -G_MAXDOUBLE, G_MAXDOUBLE, FALSE, &v, &why))
    {
      commit (self);
      gboolean ok = lw_design_model_set_point_value (self->model, point, param,
                                                     empty ? NULL : &v, &why);
      commit (self);
      if (ok)
        {
          mark (self, GTK_WIDGET (entry), NULL);
          return;
        }
    }
  mark (self, GTK_WIDGET (entry), why);
}

/* The name field left or activated: the point renamed, or the name refused. */
static void
take_name (LwPointRows *self, GtkEntry *entry)
{
  const char *point = point_of (entry);
  const char *text = gtk_editable_get_text (GTK_EDITABLE (entry));
  if (strcmp (text, point) == 0)
    {
      mark (self, GTK_WIDGET (entry), NULL);
      return;
    }
  g_autofree char *why = NULL;
  commit (self);
  gboolean ok = lw_design_model_rename_point (self->model, point, text, &why);
  commit (self);
  mark (self, GTK_WIDGET (entry), ok ? NULL : why);
}

static void
take (LwPointRows *self, GtkEntry *entry)
{
  if (self->filling || self->model == NULL || gtk_widget_get_parent (GTK_WIDGET (entry)) == NULL
      || lw_design_find_point (lw_design_model_get_design (self->model), point_of (entry)) < 0)
    return;
  /* a text refused already stays refused, marked, until it is edited */
  if (g_strcmp0 (gtk_editable_get_text (GTK_EDITABLE (entry)),
                 g_object_get_data (G_OBJECT (entry), "lw-point-refused")) == 0)
    return;
  if (param_of (entry) != NULL)
    take_value (self, entry);
  else
    take_name (self, entry);
}

static void
entry_activated (GtkEntry *entry, LwPointRows *self)
{
  take (self, entry);
}

static void
entry_left (GtkEventControllerFocus *focus, LwPointRows *self)
{
  take (self, GTK_ENTRY (gtk_event_controller_get_widget (GTK_EVENT_CONTROLLER (focus))));
}

static void
remove_clicked (GtkButton *button, LwPointRows *self)
{
  if (self->model == NULL)
    return;
  commit (self);
  lw_design_model_remove_point (self->model, point_of (button));
  commit (self);
  show_problem (self, NULL, NULL);
}

static void
add_clicked (LwPointRows *self)
{
  if (self->model == NULL)
    return;
  g_autofree char *why = NULL;
  commit (self);
  gboolean ok = lw_design_model_add_point (self->model, &why);
  commit (self);
  if (ok)
    {
      self->focus_added = TRUE;
      show_problem (self, NULL, NULL);
    }
  else
    show_problem (self, _("Add operating point"), why);
}

/* ---- the rows --------------------------------------------------------------------------------- */

/* A text field of point `point` (param NULL: its name), at (col, row) of the grid. */
static GtkWidget *
point_entry (LwPointRows *self, const char *point, const char *param, int col, int row)
{
  GtkWidget *entry = gtk_entry_new ();
  set_data (entry, "lw-point-name", point);
  set_data (entry, "lw-point-param", param);
  g_object_set_data (G_OBJECT (entry), "lw-point-col", GINT_TO_POINTER (col));
  g_object_set_data (G_OBJECT (entry), "lw-point-row", GINT_TO_POINTER (row));
  g_autofree char *field = NULL;
  g_autofree char *tip = NULL;
  if (param == NULL)
    {
      gtk_editable_set_text (GTK_EDITABLE (entry), point);
      gtk_editable_set_width_chars (GTK_EDITABLE (entry), 8);
      /* TRANSLATORS: the field of an operating point's name, e.g. "point 1 name" */
      field = g_strdup_printf (_("%s name"), point);
      tip = g_strdup (_("The operating point's name: where it is the worst member of the "
                        "family, it is named by it"));
    }
  else
    {
      g_autofree char *text = value_text (self, point, param);
      gtk_editable_set_text (GTK_EDITABLE (entry), text);
      gtk_editable_set_width_chars (GTK_EDITABLE (entry), 5);
      gtk_widget_set_hexpand (entry, TRUE);
      /* TRANSLATORS: a parameter's value at an operating point, e.g. "K at point 1" */
      field = g_strdup_printf (_("%s at %s"), param, point);
      tip = g_strdup_printf (_("The value of %s at this point; empty: its nominal value"),
                             param);
    }
  set_data (entry, "lw-point-field", field);
  set_data (entry, "lw-point-tip", tip);
  gtk_widget_set_tooltip_text (entry, tip);
  g_signal_connect_object (entry, "activate", G_CALLBACK (entry_activated), self, 0);
  GtkEventController *focus = gtk_event_controller_focus_new ();
  g_signal_connect_object (focus, "leave", G_CALLBACK (entry_left), self, 0);
  gtk_widget_add_controller (entry, focus);
  lw_number_field_watch_widget (entry, field);
  gtk_grid_attach (self->grid, entry, col, row, 1, 1);
  return entry;
}

/* The nominals as the value fields' placeholders. */
static void
update_placeholders (LwPointRows *self)
{
  for (GtkWidget *c = gtk_widget_get_first_child (GTK_WIDGET (self->grid)); c != NULL;
       c = gtk_widget_get_next_sibling (c))
    if (GTK_IS_ENTRY (c) && param_of (c) != NULL)
      {
        const LwDesign *d = lw_design_model_get_design (self->model);
        gssize i = lw_design_param_index (d, param_of (c));
        g_autofree char *nominal = i >= 0 ? lw_number_field_format (d->params[i].nominal) : NULL;
        gtk_entry_set_placeholder_text (GTK_ENTRY (c), nominal);
      }
}

static void
add_point_row (LwPointRows *self, const LwDesignPoint *p, int row)
{
  const LwDesign *d = lw_design_model_get_design (self->model);
  point_entry (self, p->name, NULL, COL_NAME, row);
  for (size_t i = 0; i < d->n_params; i++)
    point_entry (self, p->name, d->params[i].name, 1 + (int) i, row);
  GtkWidget *b = gtk_button_new_from_icon_name ("window-close-symbolic");
  gtk_widget_add_css_class (b, "flat");
  g_autofree char *tip = g_strdup_printf (_("Remove the operating point “%s”"), p->name);
  gtk_widget_set_tooltip_text (b, tip);
  set_data (b, "lw-point-name", p->name);
  g_signal_connect_object (b, "clicked", G_CALLBACK (remove_clicked), self, 0);
  g_autofree char *field = g_strdup_printf ("Remove %s", p->name);   /* for the window tests */
  lw_number_field_watch_widget (b, field);
  gtk_grid_attach (self->grid, b, 1 + (int) d->n_params, row, 1, 1);
}

/* What the rows show, as text: rebuilt when it changes, else updated in place. */
static char *
rows_shape (LwPointRows *self)
{
  GString *s = g_string_new (NULL);
  const LwDesign *d = lw_design_model_get_design (self->model);
  for (size_t i = 0; i < d->n_params; i++)
    g_string_append_printf (s, "%s;", d->params[i].name);
  for (size_t i = 0; i < d->n_points; i++)
    g_string_append_printf (s, "\n%s", d->points[i].name);
  return g_string_free (s, FALSE);
}

static GtkWidget *
entry_at (LwPointRows *self, int col, int row)
{
  GtkWidget *w = gtk_grid_get_child_at (self->grid, col, row);
  return w != NULL && GTK_IS_ENTRY (w) ? w : NULL;
}

static void
rebuild (LwPointRows *self)
{
  /* the field with the focus, by its place, to give it back after the rebuild */
  GtkRoot *root = gtk_widget_get_root (GTK_WIDGET (self));
  GtkWidget *focus = root != NULL ? gtk_root_get_focus (root) : NULL;
  int focus_col = -1, focus_row = -1;
  for (GtkWidget *w = focus; w != NULL && w != GTK_WIDGET (self->grid);
       w = gtk_widget_get_parent (w))
    if (GTK_IS_ENTRY (w) && gtk_widget_get_parent (w) == GTK_WIDGET (self->grid))
      {
        focus_col = GPOINTER_TO_INT (g_object_get_data (G_OBJECT (w), "lw-point-col"));
        focus_row = GPOINTER_TO_INT (g_object_get_data (G_OBJECT (w), "lw-point-row"));
      }
  self->filling = TRUE;
  GtkWidget *child;
  while ((child = gtk_widget_get_first_child (GTK_WIDGET (self->grid))) != NULL)
    gtk_grid_remove (self->grid, child);
  const LwDesign *d = lw_design_model_get_design (self->model);
  if (d->n_points > 0)   /* a heading over each column: the points' names, the parameters */
    {
      GtkWidget *h = gtk_label_new (_("Name"));
      gtk_label_set_xalign (GTK_LABEL (h), 0.0f);
      gtk_widget_add_css_class (h, "dim-label");
      gtk_grid_attach (self->grid, h, COL_NAME, 0, 1, 1);
      for (size_t i = 0; i < d->n_params; i++)
        {
          gboolean dead = strcmp (d->params[i].name, LW_DESIGN_DEAD_TIME_PARAM) == 0;
          h = gtk_label_new (dead ? _("Dead time") : d->params[i].name);
          gtk_label_set_xalign (GTK_LABEL (h), 0.0f);
          gtk_label_set_ellipsize (GTK_LABEL (h), PANGO_ELLIPSIZE_END);
          gtk_widget_add_css_class (h, "dim-label");
          gtk_grid_attach (self->grid, h, 1 + (int) i, 0, 1, 1);
        }
    }
  for (size_t i = 0; i < d->n_points; i++)
    add_point_row (self, &d->points[i], 1 + (int) i);
  update_placeholders (self);
  gtk_widget_set_visible (GTK_WIDGET (self->grid), d->n_points > 0);
  /* without parameters a point has nothing to give: nothing shown */
  gtk_widget_set_visible (self->box, d->n_params > 0);
  self->filling = FALSE;
  GtkWidget *next = NULL;
  if (self->focus_added && d->n_points > 0)
    next = entry_at (self, COL_NAME, (int) d->n_points);
  else if (focus_row >= 0)
    next = entry_at (self, focus_col, focus_row);
  self->focus_added = FALSE;
  if (next != NULL)
    {
      gtk_widget_grab_focus (next);
      gtk_editable_select_region (GTK_EDITABLE (next), 0, -1);
    }
  lw_number_field_watch_positions ();
}

static gboolean
rebuild_idle (gpointer data)
{
  LwPointRows *self = data;
  self->rebuild_id = 0;
  if (self->model != NULL)
    rebuild (self);
  return G_SOURCE_REMOVE;
}

/* The values shown, from the design (the rows are those of its points); a field holding a
 * refused text keeps it. */
static void
update_values (LwPointRows *self)
{
  self->filling = TRUE;
  for (GtkWidget *c = gtk_widget_get_first_child (GTK_WIDGET (self->grid)); c != NULL;
       c = gtk_widget_get_next_sibling (c))
    if (GTK_IS_ENTRY (c) && param_of (c) != NULL && !gtk_widget_has_css_class (c, "error"))
      {
        g_autofree char *text = value_text (self, point_of (c), param_of (c));
        if (strcmp (text, gtk_editable_get_text (GTK_EDITABLE (c))) != 0)
          gtk_editable_set_text (GTK_EDITABLE (c), text);
      }
  update_placeholders (self);
  self->filling = FALSE;
}

/* A plant typed since a point was made may be improper or zero there: said over the button
 * (the document is not saved so). */
static void
update_state (LwPointRows *self)
{
  g_autofree char *problem = lw_design_model_get_points_problem (self->model);
  /* TRANSLATORS: what is wrong with the points ("at operating point 'full': …") */
  g_autofree char *msg = problem != NULL ? g_strdup_printf (_("Operating points: %s"), problem)
                                         : NULL;
  gtk_label_set_text (self->state, msg);
  gtk_widget_set_visible (GTK_WIDGET (self->state), msg != NULL);
}

static void
model_changed (LwPointRows *self)
{
  if (self->model == NULL)
    return;
  /* a change they do not show (a stage dragged, every frame): nothing to do */
  if (!lw_gui_take_if_changed (&self->key, lw_design_model_params_key (self->model)))
    return;
  update_state (self);
  g_autofree char *shape = rows_shape (self);
  if (g_strcmp0 (shape, self->shape) == 0)
    {
      update_values (self);
      return;
    }
  g_free (self->shape);
  self->shape = g_steal_pointer (&shape);
  if (self->rebuild_id == 0)
    self->rebuild_id = g_idle_add (rebuild_idle, self);
}

void
lw_point_rows_set_model (LwPointRows *self, LwDesignModel *model)
{
  g_return_if_fail (LW_IS_POINT_ROWS (self));
  g_return_if_fail (LW_IS_DESIGN_MODEL (model));
  g_set_object (&self->model, model);
  g_signal_group_set_target (self->model_signals, model);
  g_clear_handle_id (&self->rebuild_id, g_source_remove);
  g_free (self->shape);
  self->shape = rows_shape (self);
  show_problem (self, NULL, NULL);
  update_state (self);
  rebuild (self);
}

static void
lw_point_rows_dispose (GObject *object)
{
  LwPointRows *self = LW_POINT_ROWS (object);
  g_clear_handle_id (&self->rebuild_id, g_source_remove);
  if (self->model_signals != NULL)
    g_signal_group_set_target (self->model_signals, NULL);
  g_clear_object (&self->model_signals);
  g_clear_object (&self->model);
  g_clear_pointer (&self->box, gtk_widget_unparent);
  g_clear_pointer (&self->shape, g_free);
  g_clear_pointer (&self->key, g_free);
  G_OBJECT_CLASS (lw_point_rows_parent_class)->dispose (object);
}

static void
lw_point_rows_class_init (LwPointRowsClass *klass)
{
  G_OBJECT_CLASS (klass)->dispose = lw_point_rows_dispose;
  gtk_widget_class_set_layout_manager_type (GTK_WIDGET_CLASS (klass), GTK_TYPE_BIN_LAYOUT);
}

static void
lw_point_rows_init (LwPointRows *self)
{
  self->box = gtk_box_new (GTK_ORIENTATION_VERTICAL, 6);
  gtk_widget_set_parent (self->box, GTK_WIDGET (self));

  GtkWidget *title = gtk_label_new (_("Operating points"));
  gtk_label_set_xalign (GTK_LABEL (title), 0.0f);
  gtk_widget_add_css_class (title, "heading");
  gtk_widget_set_tooltip_text (title, _("Machines the engineer knows, each a set of parameter "
                                        "values: members of the plant family, named where "
                                        "they are the worst"));
  gtk_box_append (GTK_BOX (self->box), title);

  self->grid = GTK_GRID (gtk_grid_new ());
  gtk_grid_set_row_spacing (self->grid, 6);
  gtk_grid_set_column_spacing (self->grid, 6);
  gtk_box_append (GTK_BOX (self->box), GTK_WIDGET (self->grid));

  self->state = GTK_LABEL (gtk_label_new (NULL));
  gtk_label_set_xalign (self->state, 0.0f);
  gtk_label_set_wrap (self->state, TRUE);
  gtk_label_set_wrap_mode (self->state, PANGO_WRAP_WORD_CHAR);
  gtk_label_set_width_chars (self->state, 20);
  gtk_label_set_max_width_chars (self->state, 40);
  gtk_widget_add_css_class (GTK_WIDGET (self->state), "error");
  gtk_widget_set_visible (GTK_WIDGET (self->state), FALSE);
  gtk_box_append (GTK_BOX (self->box), GTK_WIDGET (self->state));

  self->add_button = gtk_button_new_with_label (_("Add operating point"));
  gtk_widget_set_halign (self->add_button, GTK_ALIGN_START);
  gtk_widget_set_tooltip_text (self->add_button, _("A new point, at the nominal values until "
                                                   "you give it others"));
  g_signal_connect_swapped (self->add_button, "clicked", G_CALLBACK (add_clicked), self);
  lw_number_field_watch_widget (self->add_button, "Add operating point");
  gtk_box_append (GTK_BOX (self->box), self->add_button);

  self->problem = lw_gui_problem_label_new ();
  gtk_box_append (GTK_BOX (self->box), GTK_WIDGET (self->problem));

  self->model_signals = g_signal_group_new (LW_TYPE_DESIGN_MODEL);
  g_signal_group_connect_swapped (self->model_signals, "changed", G_CALLBACK (model_changed),
                                  self);
}
