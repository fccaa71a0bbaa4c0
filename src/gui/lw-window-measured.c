/* lw-window-measured.c — a measured frequency response in the window: Import Measured
 * Response… (a CSV table read by lw_measured_parse, its kind asked, kept in the document as
 * <measured>: one undo step), Judge on Measured Data (the document's analysis choice), Fit
 * Model to Measured Response… (lw-fit-dialog.h; its "Use as Plant" one undo step) and Remove
 * Measured Response (docs/measured-data.md, docs/window.md).
 *
 * Test hook: with LW_TEST_MEASURED_CSV and LW_TEST_MEASURED_KIND (sampled|continuous) set, the
 * import takes that file and kind without the dialogs.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <stdio.h>
#include <string.h>

#include <glib/gi18n.h>

#include "lw-fit-dialog.h"
#include "lw-window-private.h"

/* the document keeps at most this much (the loader refuses larger documents) */
#define IMPORT_MAX_BYTES (8u << 20)

typedef struct
{
  LwWindow *window;
  LwMeasured *data;
  char *source;
} Pending;

static void
pending_free (Pending *p)
{
  g_object_unref (p->window);
  lw_measured_free (p->data);
  g_free (p->source);
  g_free (p);
}

static void
show_error (LwWindow *self, const char *primary, const char *detail)
{
  GtkWidget *dlg = gtk_message_dialog_new (GTK_WINDOW (self), GTK_DIALOG_MODAL
                                           | GTK_DIALOG_DESTROY_WITH_PARENT,
                                           GTK_MESSAGE_ERROR, GTK_BUTTONS_CLOSE, "%s", primary);
  gtk_message_dialog_format_secondary_text (GTK_MESSAGE_DIALOG (dlg), "%s", detail);
  g_signal_connect (dlg, "response", G_CALLBACK (gtk_window_destroy), NULL);
  gtk_window_present (GTK_WINDOW (dlg));
}

static void
keep (Pending *p, LwMeasuredKind kind)
{
  size_t n = p->data->n;
  lw_design_model_set_measured (p->window->model, p->data, kind, p->source);
  p->data = NULL;   /* the document's now */
  g_autofree char *text = g_strdup_printf (_("Measured response of %zu points kept in the "
                                             "design (%s)."), n,
                                           kind == LW_MEASURED_SAMPLED ? _("sampled")
                                                                       : _("continuous"));
  lw_window_notify (p->window, text);
}

enum { KIND_SAMPLED = 1, KIND_CONTINUOUS = 2 };

static void
kind_response (GtkDialog *dlg, int response, gpointer data)
{
  Pending *p = data;
  if (response == KIND_SAMPLED || response == KIND_CONTINUOUS)
    keep (p, response == KIND_SAMPLED ? LW_MEASURED_SAMPLED : LW_MEASURED_CONTINUOUS);
  pending_free (p);
  gtk_window_destroy (GTK_WINDOW (dlg));
}

/* Reads and checks the table in file; NULL with the refusal shown. */
static LwMeasured *
read_table (LwWindow *self, GFile *file)
{
  g_autofree char *name = g_file_get_parse_name (file);
  g_autoptr (GError) error = NULL;
  g_autoptr (GFileInfo) info = g_file_query_info (file, G_FILE_ATTRIBUTE_STANDARD_SIZE,
                                                  G_FILE_QUERY_INFO_NONE, NULL, &error);
  if (info != NULL && g_file_info_get_size (info) > (goffset) IMPORT_MAX_BYTES)
    {
      g_autofree char *detail = g_strdup_printf (_("%s is larger than the 8 MiB a design "
                                                   "document keeps; thin the table out."), name);
      show_error (self, _("The measured response was not imported"), detail);
      return NULL;
    }
  g_autofree char *text = NULL;
  gsize len = 0;
  if (info == NULL || !g_file_load_contents (file, NULL, &text, &len, NULL, &error))
    {
      show_error (self, _("The measured response was not imported"), error->message);
      return NULL;
    }
  LwMeasured *m = NULL;
  LwMeasuredPlace place = { 0, 0 };
  LwError err;
  lw_error_clear (&err);
  char note[256] = "";
  if (lw_measured_parse (text, len, &m, note, sizeof note, &place, &err) != LW_OK)
    {
      g_autofree char *detail = place.column > 0
                                ? g_strdup_printf ("%s:%zu:%zu: %s", name, place.line,
                                                   place.column, err.message)
                                : place.line > 0
                                ? g_strdup_printf ("%s:%zu: %s", name, place.line, err.message)
                                : g_strdup_printf ("%s: %s", name, err.message);
      show_error (self, _("The measured response was not imported"), detail);
      return NULL;
    }
  return m;
}

static void
import_file (LwWindow *self, GFile *file)
{
  LwMeasured *m = read_table (self, file);
  if (m == NULL)
    return;
  Pending *p = g_new0 (Pending, 1);
  p->window = g_object_ref (self);
  p->data = m;
  p->source = g_file_get_basename (file);
  const char *kind = g_getenv ("LW_TEST_MEASURED_KIND");
  if (kind != NULL)
    {
      keep (p, strcmp (kind, "sampled") == 0 ? LW_MEASURED_SAMPLED : LW_MEASURED_CONTINUOUS);
      pending_free (p);
      return;
    }
  GtkWidget *dlg = gtk_message_dialog_new (GTK_WINDOW (self), GTK_DIALOG_MODAL
                                           | GTK_DIALOG_DESTROY_WITH_PARENT,
                                           GTK_MESSAGE_QUESTION, GTK_BUTTONS_NONE,
                                           _("What was measured?"));
  gtk_message_dialog_format_secondary_text (
    GTK_MESSAGE_DIALOG (dlg),
    _("Sampled: through the running digital loop at the design's sample period, from the "
      "controller's output value to the sampled measurement (hold, plant, sensor and dead "
      "time included).\nContinuous: the analog plant's response G(j\u03c9), from an analyzer "
      "on the plant (the hold and the design's dead time are applied)."));
  gtk_dialog_add_buttons (GTK_DIALOG (dlg), _("_Cancel"), GTK_RESPONSE_CANCEL,
                          _("_Sampled through the Loop"), KIND_SAMPLED,
                          _("C_ontinuous Plant"), KIND_CONTINUOUS, NULL);
  g_signal_connect (dlg, "response", G_CALLBACK (kind_response), p);
  gtk_window_present (GTK_WINDOW (dlg));
}

static void
chooser_response (GtkNativeDialog *native, int response, gpointer data)
{
  LwWindow *self = data;
  if (response == GTK_RESPONSE_ACCEPT)
    {
      g_autoptr (GFile) file = gtk_file_chooser_get_file (GTK_FILE_CHOOSER (native));
      if (file != NULL)
        import_file (self, file);
    }
  g_object_unref (native);
  g_object_unref (self);
}

static void
import_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  const char *hook = g_getenv ("LW_TEST_MEASURED_CSV");
  if (hook != NULL)
    {
      g_autoptr (GFile) file = g_file_new_for_path (hook);
      import_file (self, file);
      return;
    }
  GtkFileChooserNative *native =
    gtk_file_chooser_native_new (_("Import Measured Response"), GTK_WINDOW (self),
                                 GTK_FILE_CHOOSER_ACTION_OPEN, _("_Import"), _("_Cancel"));
  gtk_native_dialog_set_modal (GTK_NATIVE_DIALOG (native), TRUE);
  GtkFileFilter *f = gtk_file_filter_new ();
  gtk_file_filter_set_name (f, _("Tables (CSV)"));
  gtk_file_filter_add_pattern (f, "*.csv");
  gtk_file_filter_add_pattern (f, "*.CSV");
  gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (native), f);
  g_object_unref (f);
  lw_window_set_chooser_folder (self, GTK_FILE_CHOOSER (native));
  g_signal_connect (native, "response", G_CALLBACK (chooser_response), g_object_ref (self));
  gtk_native_dialog_show (GTK_NATIVE_DIALOG (native));
}

static void
judge_on_data_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  const LwDesign *d = lw_design_model_get_design (self->model);
  if (d->measured == NULL)
    {
      lw_window_notify (self, _("The design holds no measured response: import one first."));
      return;
    }
  if (!lw_design_has_model (d))
    {
      lw_window_notify (self, _("The design has no plant model: its analysis can only be on "
                                "the measured data. Type a plant or fit one first."));
      return;
    }
  gboolean on = d->measured_analysis != LW_DESIGN_ANALYSIS_DATA;
  lw_design_model_set_measured_analysis (self->model, on);
  lw_window_notify (self, on ? _("Margins, crossover and sensitivity are judged on the "
                                 "measured data.")
                             : _("The requirements are judged on the model."));
}

static void
remove_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  const LwDesign *d = lw_design_model_get_design (self->model);
  if (d->measured == NULL)
    return;
  if (!lw_design_has_model (d))
    {
      lw_window_notify (self, _("The design has no plant model: without the measured response "
                                "nothing would be left to design on. Type a plant first."));
      return;
    }
  lw_design_model_set_measured (self->model, NULL, LW_MEASURED_CONTINUOUS, NULL);
  lw_window_notify (self, _("Measured response removed (Ctrl+Z brings it back)."));
}

/* The fitted model becomes the plant: one undo step (what was typed before stays a step of
 * its own). The measured response and the analysis choice stay; the named parameters of the
 * old plant go with it (the fitted plant is numbers only, and a parameter it does not use
 * would be refused). */
static void
fit_used (LwWindow *self, const char *expression)
{
  lw_history_commit (self->history);
  LwDesign *d = lw_design_copy (lw_design_model_get_design (self->model));
  lw_design_set_string (&d->plant, expression);
  gboolean had_params = d->n_params > 0;
  for (size_t i = 0; i < d->n_params; i++)
    g_free (d->params[i].name);
  g_clear_pointer (&d->params, g_free);
  d->n_params = 0;
  lw_design_clear_points (d);   /* they give values of the parameters gone */
  lw_design_model_replace (self->model, d);
  lw_history_commit (self->history);
  if (self->debug)
    {
      printf ("LW-FIT-USED plant=%s\n", expression);
      fflush (stdout);
    }
  lw_window_notify (self, had_params ? _("The fitted model is the plant now, without the old "
                                         "plant's parameters (Ctrl+Z restores both).")
                                      : _("The fitted model is the plant now (Ctrl+Z restores "
                                          "the previous one)."));
}

static void
fit_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  const LwDesign *d = lw_design_model_get_design (self->model);
  if (self->dragging)
    return;
  if (d->measured == NULL)
    {
      lw_window_notify (self, _("The design holds no measured response: import one first."));
      return;
    }
  if (d->measured_kind != LW_MEASURED_CONTINUOUS)
    {
      /* a model in s fitted to sampled data would hold the hold and the dead time, and the
       * plant path applies both again (docs/measured-data.md, "Model fit in the window") */
      show_error (self, _("The fit needs a continuous measurement"),
                  _("This design's measured response is of the sampled kind: it was taken "
                    "through the digital loop and already holds the zero-order hold, the "
                    "aliasing and the dead time. A model in s fitted to it would count the hold "
                    "and the dead time twice once used as the plant. Fit a continuous "
                    "measurement of the plant G(j\u03c9) instead (an analyzer on the analog "
                    "plant), imported as continuous."));
      if (self->debug)
        {
          printf ("LW-FIT-REFUSED kind=sampled\n");
          fflush (stdout);
        }
      return;
    }
  lw_history_commit (self->history);
  LwFitDialog *dialog = lw_fit_dialog_new (GTK_WINDOW (self), d->measured, d->measured_source);
  g_signal_connect_object (dialog, "use", G_CALLBACK (fit_used), self, G_CONNECT_SWAPPED);
  gtk_window_present (GTK_WINDOW (dialog));
}

void
lw_window_class_init_measured (GtkWidgetClass *widget_class)
{
  gtk_widget_class_install_action (widget_class, "window.import-measured", NULL,
                                   import_activated);
  gtk_widget_class_install_action (widget_class, "window.judge-on-data", NULL,
                                   judge_on_data_activated);
  gtk_widget_class_install_action (widget_class, "window.remove-measured", NULL,
                                   remove_activated);
  gtk_widget_class_install_action (widget_class, "window.fit-measured", NULL, fit_activated);
}
