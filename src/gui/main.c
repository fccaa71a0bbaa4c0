/* main.c — the loopwright executable: the designer window.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <locale.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

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

  /* loopwright --bench-drag N FILE: the frame-budget benchmark (lw_window_start_bench_drag) */
  if (argc >= 2 && strcmp (argv[1], "--bench-drag") == 0)
    {
      char *end = NULL;
      unsigned long n = argc == 4 ? strtoul (argv[2], &end, 10) : 0;
      if (argc != 4 || end == argv[2] || *end != '\0' || n == 0 || n > 100000)
        {
          fprintf (stderr, "loopwright: --bench-drag: expected --bench-drag N FILE with N a "
                           "whole number from 1 to 100000\n");
          return 2;
        }
      lw_application_set_bench_drag (app, (guint) n, argv[3]);
      return g_application_run (G_APPLICATION (app), 1, argv);
    }
  return g_application_run (G_APPLICATION (app), argc, argv);
}
