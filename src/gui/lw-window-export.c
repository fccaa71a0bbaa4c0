/* lw-window-export.c — what the window writes besides the document: Export Figure (one view
 * as PNG, SVG or PDF, with the variants on show, through the export dialog,
 * lw-export-dialog.h), Export Report (src/report/), and the notice of where it wrote.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <string.h>

#include <glib/gi18n.h>

#include "lw-export-dialog.h"
#include "lw-report.h"
#include "lw-window-private.h"

LwPlot *
lw_window_build_export_plot (LwPlotView view, gpointer user_data, GError **error)
{
  LwWindow *self = LW_WINDOW (user_data);
  if (self->eval == NULL)
    {
      g_set_error_literal (error, LW_PLOT_ERROR, LW_PLOT_ERROR_INPUT, _("Nothing evaluated yet."));
      return NULL;
    }
  LwPlotRequirements req = { 0 };
  lw_window_plot_requirements (self, &req);
  const LwDesign *d = lw_design_model_get_design (self->model);
  /* what the window shows: the active variant and those compared with it, document order */
  LwAreaVariant vs[LW_PLOT_MAX_VARIANTS];
  guint n = 0;
  for (guint i = 0; i < d->n_variants && n < LW_PLOT_MAX_VARIANTS; i++)
    {
      const char *name = d->variants[i].name;
      LwVariantEval *e = NULL;
      if (i == d->active)
        e = self->eval;
      else if (lw_window_is_compared (self, name))
        e = lw_window_get_reference_eval (self, name);
      if (e == NULL || e->ev == NULL)
        continue;
      vs[n++] = (LwAreaVariant) { .eval = e, .name = name,
                                  .style = i % LW_PLOT_MAX_VARIANTS + 1,
                                  .family = i == d->active ? lw_window_family_drawn (self)
                                                           : NULL };
    }
  if (n == 0)
    {
      g_set_error_literal (error, LW_PLOT_ERROR, LW_PLOT_ERROR_INPUT, _("Nothing evaluated yet."));
      return NULL;
    }
  return lw_plot_area_build_plot (self->plot_area, vs, n, &req, view, NULL, error);
}

static void
export_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  if (lw_window_export_figure_for_test (self))
    return;
  g_autofree char *name = lw_window_document_name (self);
  char *dot = strrchr (name, '.');
  if (dot != NULL && self->file != NULL)
    *dot = '\0';
  lw_export_dialog_show (GTK_WINDOW (self), lw_window_get_settings (self), name,
                         lw_window_build_export_plot,
                         self);
}

/* ---- design report ------------------------------------------------------------------------ */

/* Writes the design report of the variants shown (the active one and those compared with it,
 * in the document's order) to path, .pdf or else .html: the report of
 * `loopwright-cli report FILE --variants … --date …` built by the same library (src/report/),
 * FILE being the document's file name. The date: SOURCE_DATE_EPOCH when set (the
 * reproducible-builds convention), else today. Explains a failure over the window. */
static void
write_report (LwWindow *self, const char *path)
{
  const LwDesign *d = lw_design_model_get_design (self->model);
  size_t which[LW_PLOT_MAX_VARIANTS];
  size_t n = 0;
  for (size_t i = 0; i < d->n_variants && n < LW_PLOT_MAX_VARIANTS; i++)
    if (i == d->active || lw_window_is_compared (self, d->variants[i].name))
      which[n++] = i;
  g_autofree char *name = lw_window_document_name (self);
  g_autofree char *shown = g_filename_display_name (path);
  g_autofree char *primary = g_strdup_printf (_("Could not write the report “%s”"), shown);
  g_autoptr (GError) error = NULL;
  g_autofree char *date = NULL;
  if (!lw_report_date_from_environment (&date, &error))
    {
      lw_window_show_error (self, primary, error->message);
      return;
    }
  if (date == NULL)
    {
      g_autoptr (GDateTime) now = g_date_time_new_now_local ();
      date = g_date_time_format (now, "%Y-%m-%d");
    }
  g_autoptr (LwReport) r = lw_report_build (name, d, which, n, date, &error);
  size_t len = 0;
  if (r == NULL || !lw_report_write_file (r, path, &len, &error))
    lw_window_show_error (self, primary, error->message);
  else
    {
      g_autofree char *msg = g_strdup_printf (_("Report written to %s"), shown);
      lw_window_notify (self, msg);
      if (self->debug)
        g_print ("LW-REPORT path=%s bytes=%zu variants=%zu\n", path, len, n);
    }
}

static void
report_response (GtkNativeDialog *native, int response, gpointer user_data)
{
  LwWindow *self = LW_WINDOW (user_data);
  if (response == GTK_RESPONSE_ACCEPT)
    {
      g_autoptr (GFile) file = gtk_file_chooser_get_file (GTK_FILE_CHOOSER (native));
      const char *path = file != NULL ? g_file_peek_path (file) : NULL;
      if (path != NULL)
        {
          g_autofree char *lower = g_ascii_strdown (path, -1);
          if (g_str_has_suffix (lower, ".pdf") || g_str_has_suffix (lower, ".html")
              || g_str_has_suffix (lower, ".htm"))
            write_report (self, path);
          else
            {
              /* no known extension: the format of the chosen filter */
              GtkFileFilter *f = gtk_file_chooser_get_filter (GTK_FILE_CHOOSER (native));
              gboolean pdf = f != NULL && g_object_get_data (G_OBJECT (f), "lw-pdf") != NULL;
              g_autofree char *full = g_strconcat (path, pdf ? ".pdf" : ".html", NULL);
              write_report (self, full);
            }
        }
    }
  g_object_unref (native);
  g_object_unref (self);
}

static gboolean
notice_expired (gpointer data)
{
  LwWindow *self = data;
  self->notice_timeout = 0;
  gtk_revealer_set_reveal_child (self->notice, FALSE);
  return G_SOURCE_REMOVE;
}

void
lw_window_notify (LwWindow *self, const char *text)
{
  g_return_if_fail (LW_IS_WINDOW (self));
  gtk_label_set_text (self->notice_label, text);
  gtk_revealer_set_reveal_child (self->notice, TRUE);
  g_clear_handle_id (&self->notice_timeout, g_source_remove);
  self->notice_timeout = g_timeout_add_seconds (6, notice_expired, self);
  if (self->debug)
    {
      printf ("LW-NOTICE %s\n", text);
      fflush (stdout);
    }
}

static void
notify_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  lw_window_notify (LW_WINDOW (widget), g_variant_get_string (param, NULL));
}

/* Test hook: with LW_TEST_REPORT_PATH set, Export Report writes there at once, without the
 * file chooser (tests/gui/test-report.py). */
static void
export_report_activated (GtkWidget *widget, const char *action, GVariant *param)
{
  LwWindow *self = LW_WINDOW (widget);
  const char *test_path = g_getenv ("LW_TEST_REPORT_PATH");
  if (test_path != NULL && *test_path != '\0')
    {
      write_report (self, test_path);
      return;
    }
  GtkFileChooserNative *native =
    gtk_file_chooser_native_new (_("Export Report"), GTK_WINDOW (self),
                                 GTK_FILE_CHOOSER_ACTION_SAVE, _("_Export"), _("_Cancel"));
  gtk_native_dialog_set_modal (GTK_NATIVE_DIALOG (native), TRUE);
  GtkFileFilter *pdf = gtk_file_filter_new ();
  gtk_file_filter_set_name (pdf, _("PDF report (*.pdf)"));
  gtk_file_filter_add_suffix (pdf, "pdf");
  g_object_set_data (G_OBJECT (pdf), "lw-pdf", GINT_TO_POINTER (1));
  GtkFileFilter *html = gtk_file_filter_new ();
  gtk_file_filter_set_name (html, _("HTML report (*.html)"));
  gtk_file_filter_add_suffix (html, "html");
  gtk_file_filter_add_suffix (html, "htm");
  gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (native), pdf);
  gtk_file_chooser_add_filter (GTK_FILE_CHOOSER (native), html);
  g_object_unref (pdf);
  g_object_unref (html);
  lw_window_set_chooser_folder (self, GTK_FILE_CHOOSER (native));
  g_autofree char *name = lw_window_document_name (self);
  char *dot = strrchr (name, '.');
  if (dot != NULL && self->file != NULL)
    *dot = '\0';
  /* TRANSLATORS: the suggested file name of a design report; %s is the design's file name */
  g_autofree char *suggested = g_strdup_printf (_("%s report.pdf"), name);
  gtk_file_chooser_set_current_name (GTK_FILE_CHOOSER (native), suggested);
  g_signal_connect (native, "response", G_CALLBACK (report_response), g_object_ref (self));
  gtk_native_dialog_show (GTK_NATIVE_DIALOG (native));
}

void
lw_window_class_init_export (GtkWidgetClass *widget_class)
{
  gtk_widget_class_install_action (widget_class, "window.export", NULL, export_activated);
  gtk_widget_class_install_action (widget_class, "window.export-report", NULL,
                                   export_report_activated);
  gtk_widget_class_install_action (widget_class, "window.notify", "s", notify_activated);
}
