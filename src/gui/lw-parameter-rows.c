/* lw-parameter-rows.c — the plant's named parameters in the plant panel (lw-parameter-rows.h).
 *
 * The rows are built from the document when its parameters or the names its plant uses change
 * (a parameter added, removed, made a range or fixed; a name typed into the plant), on an idle
 * so that no widget is taken away inside its own signal; otherwise only the values shown are
 * updated in place, so a field keeps the focus (and a refused text) while the design changes.
 * Every widget finds its parameter by the name it carries, never by a position.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <string.h>

#include <glib/gi18n.h>

#include "lw-gui-util.h"
#include "lw-number-field.h"
#include "lw-parameter-rows.h"

/* which value of a parameter a field holds */
enum { END_NOMINAL, END_LOW, END_HIGH };
/* the choices of a parameter's kind drop-down */
enum { KIND_FIXED, KIND_RANGE, KIND_LOG };

typedef struct
{
  char *name;
  GtkSpinButton *spin[3];     /* nominal (NULL for the dead time), low, high (NULL: fixed) */
  GtkLabel *dead_time;        /* the dead time's nominal, or NULL */
  GtkDropDown *kind;
} Row;

struct _LwParameterRows
{
  GtkWidget parent_instance;

  GtkWidget *box;
  GtkWidget *dead_time_button;  /* the panel's "Vary" beside the dead time, or NULL */
  GtkGrid *grid;
  GtkLabel *problem;            /* a refusal, under the rows */
  GtkSizeGroup *label_group;    /* the panel's column of names (NULL) */

  LwDesignModel *model;
  GSignalGroup *model_signals;
  GPtrArray *rows;              /* of Row *, the parameters shown */
  char *shape;                  /* what the rows were built for (rows_shape) */
  char *key;                    /* what they show (lw_design_model_params_key) */
  guint rebuild_id;
  gboolean filling;             /* showing the model: do not write back */
  char *refocus;                /* a parameter just added from its empty row: the focus goes
                                   on to the next empty row, else to its kind */
};

G_DEFINE_FINAL_TYPE (LwParameterRows, lw_parameter_rows, GTK_TYPE_WIDGET)

static void
row_free (gpointer data)
{
  Row *r = data;
  g_free (r->name);
  g_free (r);
}

static const char *
name_of (gpointer widget)
{
  return g_object_get_data (G_OBJECT (widget), "lw-param-name");
}

static void
set_name (gpointer widget, const char *name)
{
  g_object_set_data_full (G_OBJECT (widget), "lw-param-name", g_strdup (name), g_free);
}

static gboolean
is_dead_time (const char *name)
{
  return strcmp (name, LW_DESIGN_DEAD_TIME_PARAM) == 0;
}

/* The parameter called name as the design has it (its name pointer the document's); FALSE
 * when there is none. */
static gboolean
current_param (LwParameterRows *self, const char *name, LwDesignParam *out)
{
  guint n = lw_design_model_get_n_params (self->model);
  for (guint i = 0; i < n; i++)
    {
      const LwDesignParam *p = lw_design_model_get_param (self->model, i);
      if (strcmp (p->name, name) == 0)
        {
          *out = *p;
          return TRUE;
        }
    }
  return FALSE;
}

/* ---- writing back --------------------------------------------------------------------------- */

static void
show_problem (LwParameterRows *self, const char *field, const char *why)
{
  lw_gui_show_refusal (self->problem, field, why);
}

/* One edit, one undo step: what was edited before is a step of its own, and so is this. */
static gboolean
apply (LwParameterRows *self, const LwDesignParam *p, char **why)
{
  lw_gui_history_step (GTK_WIDGET (self));
  gboolean ok = lw_design_model_set_param (self->model, p, why);
  lw_gui_history_step (GTK_WIDGET (self));
  return ok;
}

static void
put_end (LwDesignParam *p, int end, double value)
{
  if (end == END_NOMINAL)
    p->nominal = value;
  else if (end == END_LOW)
    p->low = value;
  else
    p->high = value;
}

static double
get_end (const LwDesignParam *p, int end)
{
  return end == END_NOMINAL ? p->nominal : end == END_LOW ? p->low : p->high;
}

/* The number field's own check: the value is refused at the field, as typed, when the design
 * would refuse it. */
static char *
check_end (GtkSpinButton *spin, double value, gpointer data)
{
  LwParameterRows *self = data;
  LwDesignParam p;
  if (self->model == NULL || !current_param (self, name_of (spin), &p))
    return NULL;
  put_end (&p, GPOINTER_TO_INT (g_object_get_data (G_OBJECT (spin), "lw-param-end")), value);
  return lw_design_model_param_problem (self->model, &p);
}

static void
end_changed (GtkSpinButton *spin, LwParameterRows *self)
{
  LwDesignParam p;
  if (self->filling || self->model == NULL || !current_param (self, name_of (spin), &p))
    return;
  int end = GPOINTER_TO_INT (g_object_get_data (G_OBJECT (spin), "lw-param-end"));
  double before = get_end (&p, end);
  put_end (&p, end, gtk_spin_button_get_value (spin));
  g_autofree char *why = NULL;
  if (!apply (self, &p, &why))
    {
      /* a step of the +/− buttons (typed values are checked before they are taken) */
      self->filling = TRUE;
      lw_number_field_refuse (spin, before, why);
      self->filling = FALSE;
    }
}

/* A range to start from when a fixed parameter becomes one: a sample period either side of
 * the dead time (not below zero), ±10 % of another value (±1 about zero); the engineer edits
 * it. */
static void
default_range (LwParameterRows *self, LwDesignParam *p)
{
  if (is_dead_time (p->name))
    {
      double t = lw_design_model_get_period_s (self->model);
      p->low = fmax (0.0, p->nominal - t);
      p->high = p->nominal + t;
    }
  else if (p->nominal != 0.0)
    {
      p->low = p->nominal - 0.1 * fabs (p->nominal);
      p->high = p->nominal + 0.1 * fabs (p->nominal);
    }
  else
    {
      p->low = -1.0;
      p->high = 1.0;
    }
}

static guint
kind_of (const LwDesignParam *p)
{
  return !p->ranged ? KIND_FIXED : p->spread == LW_SPREAD_LOG ? KIND_LOG : KIND_RANGE;
}

static void
kind_changed (GtkDropDown *dd, GParamSpec *pspec, LwParameterRows *self)
{
  LwDesignParam p;
  if (self->filling || self->model == NULL || !current_param (self, name_of (dd), &p))
    return;
  guint kind = gtk_drop_down_get_selected (dd);
  if (kind == kind_of (&p))
    return;
  if (kind != KIND_FIXED && !p.ranged)
    default_range (self, &p);
  p.ranged = kind != KIND_FIXED;
  p.spread = kind == KIND_LOG ? LW_SPREAD_LOG : LW_SPREAD_UNIFORM;
  g_autofree char *why = NULL;
  if (!apply (self, &p, &why))
    {
      LwDesignParam had;
      current_param (self, p.name, &had);
      self->filling = TRUE;
      gtk_drop_down_set_selected (dd, kind_of (&had));
      self->filling = FALSE;
      g_autofree char *field = g_strdup_printf (_("%s range"), name_of (dd));
      show_problem (self, field, why);
    }
  else
    show_problem (self, NULL, NULL);
}

static void
remove_clicked (GtkButton *button, LwParameterRows *self)
{
  if (self->model == NULL)
    return;
  lw_gui_history_step (GTK_WIDGET (self));
  lw_design_model_remove_param (self->model, name_of (button));
  lw_gui_history_step (GTK_WIDGET (self));
}

/* A value typed for a name the plant uses that no parameter gives: the parameter is added
 * with it, fixed. Left empty, nothing happens. */
static void
take_missing (LwParameterRows *self, GtkEntry *entry)
{
  if (self->filling || self->model == NULL || gtk_widget_get_parent (GTK_WIDGET (entry)) == NULL)
    return;
  const char *name = name_of (entry);
  const char *text = gtk_editable_get_text (GTK_EDITABLE (entry));
  g_autofree char *field = g_strdup_printf (_("%s nominal"), name);
  g_autofree char *why = NULL;
  double v;
  LwDesignParam had;
  if (text[strspn (text, " \t")] == '\0' || current_param (self, name, &had))
    {
      gtk_widget_remove_css_class (GTK_WIDGET (entry), "error");
      return;
    }
  if (lw_number_field_parse (text, -G_MAXDOUBLE, G_MAXDOUBLE, FALSE, &v, &why))
    {
      LwDesignParam p = { .name = (char *) name, .nominal = v };
      g_autofree char *added = g_strdup (name);   /* name is the entry's, gone on a rebuild */
      if (apply (self, &p, &why))
        {
          show_problem (self, NULL, NULL);
          g_free (self->refocus);
          self->refocus = g_steal_pointer (&added);
          return;
        }
    }
  gtk_widget_add_css_class (GTK_WIDGET (entry), "error");
  lw_gui_set_tooltip (GTK_WIDGET (entry), why);
  show_problem (self, field, why);
}

static void
missing_activated (GtkEntry *entry, LwParameterRows *self)
{
  take_missing (self, entry);
}

static void
missing_left (GtkEventControllerFocus *focus, LwParameterRows *self)
{
  take_missing (self, GTK_ENTRY (gtk_event_controller_get_widget (GTK_EVENT_CONTROLLER (focus))));
}

static void
vary_dead_time_clicked (LwParameterRows *self)
{
  if (self->model == NULL)
    return;
  LwDesignParam p = { .name = (char *) LW_DESIGN_DEAD_TIME_PARAM,
                      .nominal = lw_design_model_get_dead_time_s (self->model), .ranged = TRUE };
  default_range (self, &p);
  g_autofree char *why = NULL;
  if (!apply (self, &p, &why))
    show_problem (self, _("Dead time range"), why);
}

/* ---- the rows --------------------------------------------------------------------------------- */

static GtkWidget *
name_label (LwParameterRows *self, const char *text)
{
  GtkWidget *l = gtk_label_new (text);
  gtk_label_set_xalign (GTK_LABEL (l), 1.0f);
  gtk_label_set_ellipsize (GTK_LABEL (l), PANGO_ELLIPSIZE_MIDDLE);
  gtk_label_set_max_width_chars (GTK_LABEL (l), 16);
  if (self->label_group != NULL)
    gtk_size_group_add_widget (self->label_group, l);
  return l;
}

/* a strict number field for one value of parameter name */
static GtkSpinButton *
end_spin (LwParameterRows *self, const char *name, int end, double value, const char *field)
{
  /* the +/− buttons step by a tenth of the value's decade (0.1 about zero) */
  double step = value != 0.0 ? pow (10.0, floor (log10 (fabs (value))) - 1.0) : 0.1;
  GtkAdjustment *adj = gtk_adjustment_new (value, -G_MAXDOUBLE, G_MAXDOUBLE, step, 10.0 * step,
                                           0.0);
  GtkSpinButton *spin = GTK_SPIN_BUTTON (gtk_spin_button_new (adj, 0.0, 3));
  gtk_widget_set_hexpand (GTK_WIDGET (spin), TRUE);
  gtk_editable_set_width_chars (GTK_EDITABLE (spin), 5);
  lw_gui_spin_wheel_off (spin);
  lw_number_field_setup (spin, field, self->problem);
  set_name (spin, name);
  g_object_set_data (G_OBJECT (spin), "lw-param-end", GINT_TO_POINTER (end));
  lw_number_field_set_check (spin, check_end, self);
  g_signal_connect_object (spin, "value-changed", G_CALLBACK (end_changed), self, 0);
  return spin;
}

static GtkWidget *
remove_button (LwParameterRows *self, const char *name)
{
  GtkWidget *b = gtk_button_new_from_icon_name ("window-close-symbolic");
  gtk_widget_add_css_class (b, "flat");
  g_autofree char *tip = g_strdup_printf (_("Remove the parameter %s"), name);
  gtk_widget_set_tooltip_text (b, tip);
  set_name (b, name);
  g_signal_connect_object (b, "clicked", G_CALLBACK (remove_clicked), self, 0);
  return b;
}

static char *
dead_time_text (LwParameterRows *self)
{
  g_autofree char *v = lw_number_field_format (lw_design_model_get_dead_time_s (self->model));
  /* TRANSLATORS: the dead time's nominal value, which the dead-time field above sets */
  return g_strdup_printf (_("%s s, as above"), v);
}

/* A parameter: its name, nominal, kind and remove button; its range beneath when it has one. */
static int
add_param_row (LwParameterRows *self, const LwDesignParam *p, int row)
{
  Row *r = g_new0 (Row, 1);
  r->name = g_strdup (p->name);
  g_ptr_array_add (self->rows, r);
  gboolean dead = is_dead_time (p->name);
  GtkWidget *label = name_label (self, dead ? _("Dead time") : p->name);
  if (!dead && !lw_design_model_plant_uses (self->model, p->name))
    {
      g_autofree char *tip = g_strdup_printf (_("P(s) does not use %s: remove it, or use it "
                                                "in P(s)"), p->name);
      gtk_widget_add_css_class (label, "error");
      gtk_widget_set_tooltip_text (label, tip);
    }
  gtk_grid_attach (self->grid, label, 0, row, 1, 1);
  if (dead)
    {
      g_autofree char *text = dead_time_text (self);
      r->dead_time = GTK_LABEL (gtk_label_new (text));
      gtk_label_set_xalign (r->dead_time, 0.0f);
      gtk_widget_add_css_class (GTK_WIDGET (r->dead_time), "dim-label");
      gtk_widget_set_tooltip_text (GTK_WIDGET (r->dead_time),
                                   _("The dead time's nominal value is the dead-time field's; "
                                     "its range makes it vary over the plant family"));
      gtk_grid_attach (self->grid, GTK_WIDGET (r->dead_time), 1, row, 1, 1);
    }
  else
    {
      g_autofree char *field = g_strdup_printf (_("%s nominal"), p->name);
      r->spin[END_NOMINAL] = end_spin (self, p->name, END_NOMINAL, p->nominal, field);
      gtk_widget_set_tooltip_text (GTK_WIDGET (r->spin[END_NOMINAL]),
                                   _("The value P(s) takes for this name: the nominal plant"));
      gtk_grid_attach (self->grid, GTK_WIDGET (r->spin[END_NOMINAL]), 1, row, 1, 1);
    }
  const char *const kinds[] = { _("fixed"), _("range"), _("log range"), NULL };
  r->kind = GTK_DROP_DOWN (gtk_drop_down_new_from_strings (kinds));
  gtk_drop_down_set_selected (r->kind, kind_of (p));
  gtk_widget_set_tooltip_text (GTK_WIDGET (r->kind),
                               _("Fixed: one value. Range: a plant family, its members spread "
                                 "evenly from low to high. Log range: spread evenly in "
                                 "log(value), for a range spanning a ratio (above zero)."));
  set_name (r->kind, p->name);
  g_autofree char *kind_field = g_strdup_printf (_("%s range"), p->name);
  lw_number_field_watch_widget (GTK_WIDGET (r->kind), kind_field);
  g_signal_connect_object (r->kind, "notify::selected", G_CALLBACK (kind_changed), self, 0);
  gtk_grid_attach (self->grid, GTK_WIDGET (r->kind), 2, row, 1, 1);
  gtk_grid_attach (self->grid, remove_button (self, p->name), 3, row, 1, 1);
  row++;
  if (!p->ranged)
    return row;
  GtkWidget *from = gtk_label_new (_("from"));
  gtk_label_set_xalign (GTK_LABEL (from), 1.0f);
  gtk_widget_add_css_class (from, "dim-label");
  gtk_grid_attach (self->grid, from, 0, row, 1, 1);
  GtkWidget *box = gtk_box_new (GTK_ORIENTATION_HORIZONTAL, 6);
  for (int end = END_LOW; end <= END_HIGH; end++)
    {
      g_autofree char *field = g_strdup_printf (end == END_LOW ? _("%s low") : _("%s high"),
                                                p->name);
      r->spin[end] = end_spin (self, p->name, end, get_end (p, end), field);
      gtk_widget_set_tooltip_text (GTK_WIDGET (r->spin[end]),
                                   end == END_LOW ? _("The low end of the range")
                                                  : _("The high end of the range"));
      if (end == END_HIGH)
        gtk_box_append (GTK_BOX (box), gtk_label_new (_("to")));
      gtk_box_append (GTK_BOX (box), GTK_WIDGET (r->spin[end]));
    }
  gtk_grid_attach (self->grid, box, 1, row, 3, 1);
  return row + 1;
}

/* A name the plant uses that no parameter gives: an empty value to fill. */
static int
add_missing_row (LwParameterRows *self, const char *name, int row)
{
  gtk_grid_attach (self->grid, name_label (self, name), 0, row, 1, 1);
  GtkWidget *entry = gtk_entry_new ();
  gtk_widget_set_hexpand (entry, TRUE);
  gtk_editable_set_width_chars (GTK_EDITABLE (entry), 5);
  gtk_entry_set_placeholder_text (GTK_ENTRY (entry), _("its value, to add it"));
  g_autofree char *tip = g_strdup_printf (_("P(s) uses %s, which no parameter gives yet: type "
                                            "its nominal value"), name);
  gtk_widget_set_tooltip_text (entry, tip);
  set_name (entry, name);
  g_signal_connect_object (entry, "activate", G_CALLBACK (missing_activated), self, 0);
  GtkEventController *focus = gtk_event_controller_focus_new ();
  g_signal_connect_object (focus, "leave", G_CALLBACK (missing_left), self, 0);
  gtk_widget_add_controller (entry, focus);
  g_autofree char *field = g_strdup_printf (_("%s nominal"), name);
  lw_number_field_watch_widget (entry, field);
  gtk_grid_attach (self->grid, entry, 1, row, 3, 1);
  return row + 1;
}

/* What the rows show, as text: rebuilt when it changes, else updated in place. */
static char *
rows_shape (LwParameterRows *self)
{
  GString *s = g_string_new (NULL);
  const LwDesign *d = lw_design_model_get_design (self->model);
  g_string_append_printf (s, "model=%d;", lw_design_has_model (d));
  for (size_t i = 0; i < d->n_params; i++)
    g_string_append_printf (s, "%s:%d:%d;", d->params[i].name, d->params[i].ranged,
                            lw_design_model_plant_uses (self->model, d->params[i].name));
  g_auto (GStrv) missing = lw_design_model_missing_params (self->model);
  for (char **m = missing; *m != NULL; m++)
    g_string_append_printf (s, "?%s;", *m);
  return g_string_free (s, FALSE);
}

static void
rebuild (LwParameterRows *self)
{
  GtkWidget *child;
  /* after a value typed into an empty row, the focus goes on through the rows when it is
   * still in them (Enter, Tab) or was lost with them; a click elsewhere keeps it there */
  GtkRoot *root = gtk_widget_get_root (GTK_WIDGET (self));
  GtkWidget *focus = root != NULL ? gtk_root_get_focus (root) : NULL;
  gboolean go_on = self->refocus != NULL
                   && (focus == NULL || gtk_widget_is_ancestor (focus, GTK_WIDGET (self->grid)));
  self->filling = TRUE;
  while ((child = gtk_widget_get_first_child (GTK_WIDGET (self->grid))) != NULL)
    {
      if (self->label_group != NULL && GTK_IS_LABEL (child))
        gtk_size_group_remove_widget (self->label_group, child);
      gtk_grid_remove (self->grid, child);
    }
  g_ptr_array_set_size (self->rows, 0);
  const LwDesign *d = lw_design_model_get_design (self->model);
  int row = 0;
  for (size_t i = 0; i < d->n_params; i++)
    row = add_param_row (self, &d->params[i], row);
  g_auto (GStrv) missing = lw_design_model_missing_params (self->model);
  for (char **m = missing; *m != NULL; m++)
    row = add_missing_row (self, *m, row);
  /* without parameters (and no name to give) the panel is as it was: nothing shown */
  gtk_widget_set_visible (self->box, row > 0);
  LwDesignParam dead;
  if (self->dead_time_button != NULL)
    gtk_widget_set_visible (self->dead_time_button,
                            lw_design_has_model (d)
                            && !current_param (self, LW_DESIGN_DEAD_TIME_PARAM, &dead));
  self->filling = FALSE;
  if (go_on)
    {
      /* the next empty row (they come after every parameter), else the kind of the one added */
      GtkWidget *next = NULL;
      for (child = gtk_widget_get_first_child (GTK_WIDGET (self->grid)); child != NULL;
           child = gtk_widget_get_next_sibling (child))
        if (GTK_IS_ENTRY (child))
          {
            next = child;
            break;
          }
        else if (next == NULL && GTK_IS_DROP_DOWN (child)
                 && g_strcmp0 (name_of (child), self->refocus) == 0)
          next = child;
      if (next != NULL)
        gtk_widget_grab_focus (next);
    }
  g_clear_pointer (&self->refocus, g_free);
  lw_number_field_watch_positions ();
}

static gboolean
rebuild_idle (gpointer data)
{
  LwParameterRows *self = data;
  self->rebuild_id = 0;
  if (self->model != NULL)
    rebuild (self);
  return G_SOURCE_REMOVE;
}

/* The values shown, from the design (the rows are those of its parameters). */
static void
update_values (LwParameterRows *self)
{
  self->filling = TRUE;
  for (guint i = 0; i < self->rows->len; i++)
    {
      Row *r = g_ptr_array_index (self->rows, i);
      LwDesignParam p;
      if (!current_param (self, r->name, &p))
        continue;
      for (int end = END_NOMINAL; end <= END_HIGH; end++)
        if (r->spin[end] != NULL)
          gtk_spin_button_set_value (r->spin[end], get_end (&p, end));
      if (r->dead_time != NULL)
        {
          g_autofree char *text = dead_time_text (self);
          gtk_label_set_text (r->dead_time, text);
        }
      gtk_drop_down_set_selected (r->kind, kind_of (&p));
    }
  self->filling = FALSE;
}

static void
model_changed (LwParameterRows *self)
{
  if (self->model == NULL)
    return;
  /* a change they do not show (a stage dragged, every frame): nothing to do */
  if (!lw_gui_take_if_changed (&self->key, lw_design_model_params_key (self->model)))
    return;
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
lw_parameter_rows_set_model (LwParameterRows *self, LwDesignModel *model)
{
  g_return_if_fail (LW_IS_PARAMETER_ROWS (self));
  g_return_if_fail (LW_IS_DESIGN_MODEL (model));
  g_set_object (&self->model, model);
  g_signal_group_set_target (self->model_signals, model);
  g_clear_handle_id (&self->rebuild_id, g_source_remove);
  g_free (self->shape);
  self->shape = rows_shape (self);
  show_problem (self, NULL, NULL);
  rebuild (self);
}

void
lw_parameter_rows_set_dead_time_button (LwParameterRows *self, GtkWidget *button)
{
  g_return_if_fail (LW_IS_PARAMETER_ROWS (self));
  g_return_if_fail (GTK_IS_BUTTON (button));
  g_return_if_fail (self->dead_time_button == NULL);
  self->dead_time_button = button;   /* the panel's: it outlives the rows' use of it */
  g_signal_connect_object (button, "clicked", G_CALLBACK (vary_dead_time_clicked), self,
                           G_CONNECT_SWAPPED);
  lw_number_field_watch_widget (button, "Vary dead time");
}

void
lw_parameter_rows_set_label_group (LwParameterRows *self, GtkSizeGroup *group)
{
  g_return_if_fail (LW_IS_PARAMETER_ROWS (self));
  g_set_object (&self->label_group, group);
}

static void
lw_parameter_rows_dispose (GObject *object)
{
  LwParameterRows *self = LW_PARAMETER_ROWS (object);
  g_clear_handle_id (&self->rebuild_id, g_source_remove);
  if (self->model_signals != NULL)
    g_signal_group_set_target (self->model_signals, NULL);
  g_clear_object (&self->model_signals);
  g_clear_object (&self->model);
  g_clear_pointer (&self->box, gtk_widget_unparent);
  g_clear_object (&self->label_group);
  g_clear_pointer (&self->rows, g_ptr_array_unref);
  g_clear_pointer (&self->shape, g_free);
  g_clear_pointer (&self->key, g_free);
  g_clear_pointer (&self->refocus, g_free);
  G_OBJECT_CLASS (lw_parameter_rows_parent_class)->dispose (object);
}

static void
lw_parameter_rows_class_init (LwParameterRowsClass *klass)
{
  G_OBJECT_CLASS (klass)->dispose = lw_parameter_rows_dispose;
  gtk_widget_class_set_layout_manager_type (GTK_WIDGET_CLASS (klass), GTK_TYPE_BIN_LAYOUT);
}

static void
lw_parameter_rows_init (LwParameterRows *self)
{
  self->rows = g_ptr_array_new_with_free_func (row_free);
  self->box = gtk_box_new (GTK_ORIENTATION_VERTICAL, 6);
  gtk_widget_set_parent (self->box, GTK_WIDGET (self));

  GtkWidget *title = gtk_label_new (_("Parameters"));
  gtk_label_set_xalign (GTK_LABEL (title), 0.0f);
  gtk_widget_add_css_class (title, "heading");
  gtk_box_append (GTK_BOX (self->box), title);

  self->grid = GTK_GRID (gtk_grid_new ());
  gtk_grid_set_row_spacing (self->grid, 6);
  gtk_grid_set_column_spacing (self->grid, 8);
  gtk_box_append (GTK_BOX (self->box), GTK_WIDGET (self->grid));


  self->problem = lw_gui_problem_label_new ();
  gtk_box_append (GTK_BOX (self->box), GTK_WIDGET (self->problem));

  self->model_signals = g_signal_group_new (LW_TYPE_DESIGN_MODEL);
  g_signal_group_connect_swapped (self->model_signals, "changed", G_CALLBACK (model_changed),
                                  self);
}
