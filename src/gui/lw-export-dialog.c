/* lw-export-dialog.c — Export Figure.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib/gi18n.h>

#include "lw-export-dialog.h"
#include "lw-gui-util.h"
#include "lw-number-field.h"
#include "lw-plot-export.h"

typedef struct
{
  GtkWindow *parent;
  GSettings *settings;
  char *base_name;
  LwExportBuildFunc build;
  gpointer user_data;
  GtkDropDown *view, *format, *theme;
  GtkSpinButton *width, *height;
} ExportDialog;

static const char *const format_ext[] = { "png", "svg", "pdf" };

static void
export_dialog_free (ExportDialog *e)
{
  g_clear_object (&e->settings);
  g_free (e->base_name);
  g_free (e);
}

static void
show_failure (GtkWindow *parent, const char *path, const char *why)
{
  GtkWidget *d = gtk_message_dialog_new (parent, GTK_DIALOG_MODAL | GTK_DIALOG_DESTROY_WITH_PARENT,
                                         GTK_MESSAGE_ERROR, GTK_BUTTONS_CLOSE,
                                         _("Could not export “%s”"), path);
  gtk_message_dialog_format_secondary_text (GTK_MESSAGE_DIALOG (d), "%s", why);
  g_signal_connect (d, "response", G_CALLBACK (gtk_window_destroy), NULL);
  gtk_window_present (GTK_WINDOW (d));
}

static void
file_response (GtkNativeDialog *native, int response, gpointer user_data)
{
  ExportDialog *e = user_data;
  if (response == GTK_RESPONSE_ACCEPT)
    {
      g_autoptr (GFile) file = gtk_file_chooser_get_file (GTK_FILE_CHOOSER (native));
      const char *path = file != NULL ? g_file_peek_path (file) : NULL;
      LwPlotView view = (LwPlotView) gtk_drop_down_get_selected (e->view);
      LwPlotFormat format = (LwPlotFormat) gtk_drop_down_get_selected (e->format);
      LwPlotTheme theme = gtk_drop_down_get_selected (e->theme) == 1 ? LW_PLOT_THEME_DARK
                                                                     : LW_PLOT_THEME_LIGHT;
      g_autoptr (GError) error = NULL;
      if (path == NULL)
        show_failure (e->parent, "?", _("Only local files can be written."));
      else
        {
          LwPlot *plot = e->build (view, e->user_data, &error);
          if (plot == NULL)
            show_failure (e->parent, path, error->message);
          else
            {
              lw_plot_set_theme (plot, theme);
              LwPlotExportOptions eo = { .pdf_creator = "loopwright " PACKAGE_VERSION };
              if (!lw_plot_export (plot, format, path, gtk_spin_button_get_value (e->width),
                                   gtk_spin_button_get_value (e->height), &eo, &error))
                show_failure (e->parent, path, error->message);
              else
                {
                  g_autofree char *shown = g_filename_display_name (path);
                  g_autofree char *msg = g_strdup_printf (_("Figure written to %s"), shown);
                  /* the window says so, if it listens (window.notify) */
                  gtk_widget_activate_action (GTK_WIDGET (e->parent), "window.notify", "s", msg);
                }
              lw_plot_free (plot);
              g_autoptr (GFile) parent = g_file_get_parent (file);
              if (e->settings != NULL && parent != NULL && g_file_peek_path (parent) != NULL)
                g_settings_set_string (e->settings, "last-folder", g_file_peek_path (parent));
            }
        }
    }
  g_object_unref (native);
  export_dialog_free (e);
}

static void
dialog_response (GtkDialog *dialog, int response, gpointer user_data)
{
  ExportDialog *e = user_data;
  if (response != GTK_RESPONSE_ACCEPT)
    {
      gtk_window_destroy (GTK_WINDOW (dialog));
      export_dialog_free (e);
      return;
    }
  gtk_widget_set_visible (GTK_WIDGET (dialog), FALSE);
  guint fmt = gtk_drop_down_get_selected (e->format);
  LwPlotView view = (LwPlotView) gtk_drop_down_get_selected (e->view);
  GtkFileChooserNative *native =
    gtk_file_chooser_native_new (_("Export Figure"), e->parent, GTK_FILE_CHOOSER_ACTION_SAVE,
                                 _("_Export"), _("_Cancel"));
  gtk_native_dialog_set_modal (GTK_NATIVE_DIALOG (native), TRUE);
  g_autofree char *name = g_strdup_printf ("%s-%s.%s", e->base_name, lw_plot_view_name (view),
                                           format_ext[fmt]);
  gtk_file_chooser_set_current_name (GTK_FILE_CHOOSER (native), name);
  g_autofree char *folder = e->settings != NULL
                              ? g_settings_get_string (e->settings, "last-folder") : NULL;
  if (folder != NULL && folder[0] != '\0')
    {
      g_autoptr (GFile) f = g_file_new_for_path (folder);
      gtk_file_chooser_set_current_folder (GTK_FILE_CHOOSER (native), f, NULL);
    }
  /* the options are read from the widgets in file_response: keep them until then */
  g_object_set_data_full (G_OBJECT (native), "lw-export-dialog", dialog,
                          (GDestroyNotify) gtk_window_destroy);
  g_signal_connect (native, "response", G_CALLBACK (file_response), e);
  gtk_native_dialog_show (GTK_NATIVE_DIALOG (native));
}

void
lw_export_dialog_show (GtkWindow *parent, GSettings *settings, const char *base_name,
                       LwExportBuildFunc build, gpointer user_data)
{
  g_return_if_fail (GTK_IS_WINDOW (parent));
  g_return_if_fail (build != NULL);

  ExportDialog *e = g_new0 (ExportDialog, 1);
  e->parent = parent;
  e->settings = settings != NULL ? g_object_ref (settings) : NULL;
  e->base_name = g_strdup (base_name != NULL ? base_name : "figure");
  e->build = build;
  e->user_data = user_data;

  GtkWidget *dialog = gtk_dialog_new_with_buttons (_("Export Figure"), parent,
                                                   GTK_DIALOG_MODAL
                                                     | GTK_DIALOG_DESTROY_WITH_PARENT,
                                                   _("_Cancel"), GTK_RESPONSE_CANCEL,
                                                   _("_Choose File…"), GTK_RESPONSE_ACCEPT,
                                                   NULL);
  gtk_dialog_set_default_response (GTK_DIALOG (dialog), GTK_RESPONSE_ACCEPT);
  GtkWidget *content = gtk_dialog_get_content_area (GTK_DIALOG (dialog));

  GtkWidget *grid = lw_gui_dialog_grid ();
  gtk_box_append (GTK_BOX (content), grid);

  /* every view of the table, in its order: item i is LwPlotView i */
  const char *view_titles[LW_PLOT_N_VIEWS + 1] = { NULL };
  for (guint i = 0; i < LW_PLOT_N_VIEWS; i++)
    view_titles[i] = _(lw_plot_view_info ((LwPlotView) i)->title);
  e->view = GTK_DROP_DOWN (gtk_drop_down_new_from_strings (view_titles));
  const char *formats[] = { "PNG", "SVG", "PDF", NULL };
  e->format = GTK_DROP_DOWN (gtk_drop_down_new_from_strings (formats));
  const char *themes[] = { _("Light"), _("Dark"), NULL };
  e->theme = GTK_DROP_DOWN (gtk_drop_down_new_from_strings (themes));
  /* the CLI's range for --size, and its default 800 × 600 */
  e->width = GTK_SPIN_BUTTON (gtk_spin_button_new_with_range (16, 20000, 10));
  e->height = GTK_SPIN_BUTTON (gtk_spin_button_new_with_range (16, 20000, 10));
  gtk_spin_button_set_value (e->width, 800);
  gtk_spin_button_set_value (e->height, 600);
  lw_number_field_setup (e->width, _("Width"), NULL);
  lw_number_field_setup (e->height, _("Height"), NULL);

  gtk_grid_attach (GTK_GRID (grid),
                   lw_gui_row_label (1.0f, 0.5f, _("_View"), GTK_WIDGET (e->view)), 0, 0,
                   1, 1);
  gtk_grid_attach (GTK_GRID (grid), GTK_WIDGET (e->view), 1, 0, 1, 1);
  gtk_grid_attach (GTK_GRID (grid),
                   lw_gui_row_label (1.0f, 0.5f, _("_Width"), GTK_WIDGET (e->width)), 0, 1,
                   1, 1);
  gtk_grid_attach (GTK_GRID (grid), GTK_WIDGET (e->width), 1, 1, 1, 1);
  gtk_grid_attach (GTK_GRID (grid),
                   lw_gui_row_label (1.0f, 0.5f, _("_Height"), GTK_WIDGET (e->height)), 0, 2,
                   1, 1);
  gtk_grid_attach (GTK_GRID (grid), GTK_WIDGET (e->height), 1, 2, 1, 1);
  GtkWidget *unit = gtk_label_new (_("pixels for PNG, points for SVG and PDF"));
  gtk_widget_add_css_class (unit, "dim-label");
  gtk_grid_attach (GTK_GRID (grid), unit, 1, 3, 1, 1);
  gtk_grid_attach (GTK_GRID (grid),
                   lw_gui_row_label (1.0f, 0.5f, _("_Format"), GTK_WIDGET (e->format)), 0, 4,
                   1, 1);
  gtk_grid_attach (GTK_GRID (grid), GTK_WIDGET (e->format), 1, 4, 1, 1);
  gtk_grid_attach (GTK_GRID (grid),
                   lw_gui_row_label (1.0f, 0.5f, _("_Theme"), GTK_WIDGET (e->theme)), 0, 5,
                   1, 1);
  gtk_grid_attach (GTK_GRID (grid), GTK_WIDGET (e->theme), 1, 5, 1, 1);

  g_signal_connect (dialog, "response", G_CALLBACK (dialog_response), e);
  gtk_window_present (GTK_WINDOW (dialog));
}
