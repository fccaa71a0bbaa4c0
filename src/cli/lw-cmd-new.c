/* lw-cmd-new.c — `loopwright-cli new`: a fresh design document for a plant and a period
 * (docs/cli.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <stdio.h>
#include <string.h>

#include "lw-cli-commands.h"
#include "lw-cli-common.h"
#include "lw-cli-doc.h"
#include "lw-cli-measured.h"

static const char new_help[] =
  "Usage: " LW_CLI_PROG " new --plant EXPR --period SECONDS [options] > FILE.lwd\n"
  "\n"
  "Writes a fresh design document in its canonical form: the plant, the sampling and one\n"
  "variant named 'initial' with no stages (a controller of 1), no requirements.\n"
  "\n"
  "Options:\n"
  "  --plant EXPR             plant P(s), a proper rational expression in s (required\n"
  "                           unless --measured is given: the design is then on the data\n"
  "                           alone, its analysis \"data\")\n"
  "  --period SECONDS         sample period T in seconds, > 0 (required)\n"
  "  --compute-delay N        computation delay in whole samples, 0 to 1000 (default 1)\n"
  "  --dead-time SECONDS      plant input dead time in seconds, >= 0 (default 0)\n"
  "  --param NAME=VALUE       a named parameter of the plant expression and its nominal\n"
  "                           value, kept in <parameters> (repeat for each)\n"
  "  --title TEXT             the design's title (default: empty)\n"
  "  --measured FILE.csv      a measured frequency response of the plant, kept in the\n"
  "                           document as <measured> (docs/file-format.md)\n"
  "  --measured-kind KIND     sampled or continuous (required with --measured;\n"
  "                           docs/measured-data.md)\n"
  "  --out FILE               write FILE (atomically) instead of standard output\n"
  "  -h, --help               show this help\n"
  "\n"
  "Exit status: 0 success, 2 bad input (also a document over 8 MiB), 1 internal failure\n"
  "(the file could not be written).\n";

typedef struct
{
  LwCliLoopArgs loop;
  LwCliMeasuredArgs measured;
  char *title;
  char *out;
  gboolean help;
} NewArgs;

static int
new_run (void *data)
{
  NewArgs *a = data;
  /* with a measurement and no --plant, a design on the data alone (an empty plant; the
   * loop options are checked with a plant of 1) */
  LwCliLoopArgs la = a->loop;
  gboolean no_model = a->loop.plant == NULL && lw_cli_measured_file (&a->measured) != NULL;
  if (no_model)
    la.plant = (char *) "1";
  LwCliLoop lp;
  int status = lw_cli_loop_build ("new", &la, &lp);
  if (status != LW_EXIT_OK)
    return status;
  g_autoptr (LwDesign) d = lw_design_new (no_model ? "" : a->loop.plant, lp.period_s);
  d->dead_time_s = lp.dead_time_s;
  d->compute_delay = lp.compute_delay;
  lw_cli_loop_clear (&lp);
  /* the plant's parameters (checked with the plant by lw_cli_loop_build), nominal values */
  LwExprParam params[LW_EXPR_PARAMS_MAX];
  char *names[LW_EXPR_PARAMS_MAX];
  size_t n_params = 0;
  status = lw_cli_loop_params (&a->loop, params, names, &n_params);
  if (status != LW_EXIT_OK)
    return status;
  d->params = g_new0 (LwDesignParam, n_params);
  d->n_params = n_params;
  for (size_t i = 0; i < n_params; i++)
    {
      d->params[i].name = names[i];      /* taken */
      d->params[i].nominal = params[i].value;
    }
  if (a->title != NULL)
    {
      const char *problem = lw_design_text_problem (a->title);
      if (problem != NULL)
        {
          lw_cli_bad_input ("--title", "%s", problem);
          return LW_EXIT_BAD_INPUT;
        }
      lw_design_set_string (&d->title, a->title);
    }
  status = lw_cli_measured_doc_set (d, &a->measured, LW_DESIGN_ANALYSIS_MODEL);
  if (status != LW_EXIT_OK)
    return status;
  GError *error = NULL;
  if (a->out != NULL)
    {
      if (!lw_design_save_file (d, a->out, &error))
        {
          lw_cli_bad_input ("--out", "%s", error->message);
          /* a document too large to be read back (a long measured table) is bad input */
          int code = error->code == LW_DESIGN_ERROR_LIMIT ? LW_EXIT_BAD_INPUT : LW_EXIT_INTERNAL;
          g_error_free (error);
          return code;
        }
      return LW_EXIT_OK;
    }
  size_t len = 0;
  g_autofree char *text = lw_design_to_text (d, &len, &error);
  if (text == NULL)
    {
      lw_cli_bad_input ("new", "%s", error->message);
      g_error_free (error);
      return LW_EXIT_BAD_INPUT;
    }
  fwrite (text, 1, len, stdout);
  return LW_EXIT_OK;
}

int
lw_cmd_new (int argc, char **argv)
{
  NewArgs a = { 0 };
  const GOptionEntry entries[] = {
    { "plant", 0, 0, G_OPTION_ARG_FILENAME, &a.loop.plant, NULL, NULL },
    { "period", 0, 0, G_OPTION_ARG_FILENAME, &a.loop.period, NULL, NULL },
    { "compute-delay", 0, 0, G_OPTION_ARG_FILENAME, &a.loop.compute_delay, NULL, NULL },
    { "dead-time", 0, 0, G_OPTION_ARG_FILENAME, &a.loop.dead_time, NULL, NULL },
    { "param", 0, 0, G_OPTION_ARG_FILENAME_ARRAY, &a.loop.params, NULL, NULL },
    { "title", 0, 0, G_OPTION_ARG_STRING, &a.title, NULL, NULL },
    LW_CLI_MEASURED_ENTRIES (&a.measured),
    { "out", 0, 0, G_OPTION_ARG_FILENAME, &a.out, NULL, NULL },
    { "help", 'h', 0, G_OPTION_ARG_NONE, &a.help, NULL, NULL },
    { NULL, 0, 0, 0, NULL, NULL, NULL }
  };
  int status = lw_cli_run_command ("new", argc, argv, entries, &a.help, new_help, new_run, &a);
  lw_cli_loop_args_clear (&a.loop);
  lw_cli_measured_args_clear (&a.measured);
  g_free (a.title);
  g_free (a.out);
  return status;
}
