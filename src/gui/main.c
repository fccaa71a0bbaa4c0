/* main.c — the loopwright executable: the designer window.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <locale.h>

#include <glib/gi18n.h>

#include "lw-application.h"

int
main (int argc, char **argv)
{
  setlocale (LC_ALL, "");
  bindtextdomain (GETTEXT_PACKAGE, LW_LOCALEDIR);
  bind_textdomain_codeset (GETTEXT_PACKAGE, "UTF-8");
  textdomain (GETTEXT_PACKAGE);

  g_autoptr (LwApplication) app = lw_application_new ();
  return g_application_run (G_APPLICATION (app), argc, argv);
}
