/* loopwright-cli — the headless command-line tool: dispatches to one command per file.
 *
 * Exit status: 0 success, 2 bad input (message on stderr naming the option and, for an
 * expression, the character position), 1 internal failure (a numerical method failed, out of
 * memory, output could not be written).  Documented in docs/cli.md.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <locale.h>
#include <stdio.h>
#include <string.h>

#include <glib.h>

#include "lw-cli-commands.h"
#include "lw-cli-common.h"

typedef struct
{
  const char *name;
  int (*run) (int argc, char **argv);
  const char *summary;
} Command;

static const Command commands[] = {
  { "analyze", lw_cmd_analyze, "analyze a sampled loop given on the command line or in a design" },
  { "check", lw_cmd_check, "check a design document against its requirements (exit 3: not met)" },
  { "new", lw_cmd_new, "write a fresh design document for a plant and a period" },
  { "tidy", lw_cmd_tidy, "rewrite a design document in its canonical form" },
  { "plot", lw_cmd_plot, "draw a view of a sampled loop into a PNG, SVG or PDF file" },
  { "suggest", lw_cmd_suggest, "propose a crossover gain and lead stages for a phase margin" },
  { "emit", lw_cmd_emit, "write the controller as C code (difference equation or sections)" },
  { "fit", lw_cmd_fit, "fit a rational model to a measured frequency response" },
  { "report", lw_cmd_report, "write the design report of a document (HTML or PDF)" },
};

static void
print_main_help (FILE *f)
{
  fprintf (f, "Usage: " LW_CLI_PROG " COMMAND [options]\n\n"
              "Headless loop analysis for digital feedback controllers.\n\nCommands:\n");
  for (size_t i = 0; i < G_N_ELEMENTS (commands); i++)
    fprintf (f, "  %-12s %s\n", commands[i].name, commands[i].summary);
  fprintf (f, "\nOptions:\n  -h, --help   show this help\n  --version    show the version\n\n"
              "'" LW_CLI_PROG " COMMAND --help' describes a command.\n");
}

int
main (int argc, char **argv)
{
  setlocale (LC_ALL, "");
  setlocale (LC_NUMERIC, "C");   /* numbers in and out are always written with a '.' */
  g_set_prgname (LW_CLI_PROG);

  int status = -1;
  if (argc < 2)
    {
      print_main_help (stderr);
      status = LW_EXIT_BAD_INPUT;
    }
  else if (strcmp (argv[1], "--help") == 0 || strcmp (argv[1], "-h") == 0)
    {
      print_main_help (stdout);
      status = LW_EXIT_OK;
    }
  else if (strcmp (argv[1], "--version") == 0)
    {
      printf ("%s %s\n", LW_CLI_PROG, PACKAGE_VERSION);
      status = LW_EXIT_OK;
    }
  else
    {
      for (size_t i = 0; i < G_N_ELEMENTS (commands); i++)
        if (strcmp (argv[1], commands[i].name) == 0)
          status = commands[i].run (argc - 1, argv + 1);
      if (status < 0)
        {
          lw_cli_bad_input (NULL, "unknown command or option '%s' (see '" LW_CLI_PROG " --help')",
                            argv[1]);
          status = LW_EXIT_BAD_INPUT;
        }
    }

  if (fflush (stdout) != 0 || ferror (stdout))
    {
      g_printerr ("%s: cannot write the output\n", LW_CLI_PROG);
      if (status == LW_EXIT_OK)
        status = LW_EXIT_INTERNAL;
    }
  return status;
}
