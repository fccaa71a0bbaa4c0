/* lw-cmd-tidy.c — `loopwright-cli tidy`: rewrites a design document in its canonical form
 * (what a save writes), so hand edits and merges can be normalized before a commit
 * (docs/cli.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <stdio.h>
#include <string.h>

#include "lw-cli-commands.h"
#include "lw-cli-common.h"
#include "lw-cli-doc.h"

static const char tidy_help[] =
  "Usage: " LW_CLI_PROG " tidy FILE.lwd [--out FILE | --check]\n"
  "\n"
  "Reads a design document and writes it back in its canonical form: fixed element and\n"
  "attribute order, one element per line, two-space indentation, numbers in their shortest\n"
  "exact form. Comments and formatting of the original are not kept. The file is replaced\n"
  "atomically (a temporary file beside it, then a rename).\n"
  "\n"
  "Options:\n"
  "  --out FILE               write FILE instead of rewriting FILE.lwd ('-': standard output)\n"
  "  --check                  write nothing; exit 3 when the file is not in canonical form\n"
  "  -h, --help               show this help\n"
  "\n"
  "Exit status: 0 success (or canonical already, with --check), 3 not canonical (--check),\n"
  "2 bad input or a bad document, 1 internal failure (the file could not be written).\n";

typedef struct
{
  char **files;
  char *out;
  gboolean check;
  gboolean help;
} TidyArgs;

static int
tidy_run (void *data)
{
  const TidyArgs *a = data;
  const char *path = NULL;
  if (lw_cli_doc_one_file ("tidy", a->files, &path) != LW_EXIT_OK)
    return LW_EXIT_BAD_INPUT;
  if (a->check && a->out != NULL)
    {
      lw_cli_bad_input ("--check", "cannot be combined with --out; --check writes nothing");
      return LW_EXIT_BAD_INPUT;
    }
  g_autoptr (LwDesign) d = NULL;
  int status = lw_cli_doc_load (path, &d);
  if (status != LW_EXIT_OK)
    return status;
  GError *error = NULL;
  size_t len = 0;
  g_autofree char *text = lw_design_to_text (d, &len, &error);
  if (text == NULL)
    {
      lw_cli_bad_input (path, "%s", error->message);
      g_error_free (error);
      return LW_EXIT_BAD_INPUT;
    }
  if (a->check)
    {
      g_autofree char *old = NULL;
      gsize old_len = 0;
      if (!g_file_get_contents (path, &old, &old_len, &error))
        {
          lw_cli_bad_input (path, "%s", error->message);
          g_error_free (error);
          return LW_EXIT_BAD_INPUT;
        }
      if (old_len == len && memcmp (old, text, len) == 0)
        return LW_EXIT_OK;
      printf ("%s: not in canonical form (run '" LW_CLI_PROG " tidy %s')\n", path, path);
      return LW_EXIT_CHECK_FAILED;
    }
  if (a->out != NULL && strcmp (a->out, "-") == 0)
    {
      fwrite (text, 1, len, stdout);
      return LW_EXIT_OK;
    }
  const char *target = a->out != NULL ? a->out : path;
  if (!lw_design_save_file (d, target, &error))
    {
      lw_cli_bad_input (a->out != NULL ? "--out" : "tidy", "%s", error->message);
      g_error_free (error);
      return LW_EXIT_INTERNAL;
    }
  return LW_EXIT_OK;
}

int
lw_cmd_tidy (int argc, char **argv)
{
  TidyArgs a = { 0 };
  const GOptionEntry entries[] = {
    { "out", 0, 0, G_OPTION_ARG_FILENAME, &a.out, NULL, NULL },
    { "check", 0, 0, G_OPTION_ARG_NONE, &a.check, NULL, NULL },
    { "help", 'h', 0, G_OPTION_ARG_NONE, &a.help, NULL, NULL },
    { G_OPTION_REMAINING, 0, 0, G_OPTION_ARG_FILENAME_ARRAY, &a.files, NULL, NULL },
    { NULL, 0, 0, 0, NULL, NULL, NULL }
  };
  int status = lw_cli_run_command ("tidy", argc, argv, entries, &a.help, tidy_help, tidy_run,
                                   &a);
  g_strfreev (a.files);
  g_free (a.out);
  return status;
}
