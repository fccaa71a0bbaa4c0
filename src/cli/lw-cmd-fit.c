/* lw-cmd-fit.c — `loopwright-cli fit`: a rational model in s fitted to a measured continuous
 * frequency response (lw_measured_fit, docs/measured-data.md), printed as an expression that
 * `--plant` takes.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <complex.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-cli-commands.h"
#include "lw-cli-common.h"
#include "lw-cli-json.h"
#include "lw-cli-measured.h"
#include "lw-engine.h"
#include "lw-measured.h"

static const char fit_help[] =
  "Usage: " LW_CLI_PROG " fit --measured FILE.csv --measured-kind continuous --order N\n"
  "       [--relative-degree K] [--iterations I] [--json]\n"
  "\n"
  "Fits a rational model G(s) of order N (N poles, N - K zeros) to a measured continuous\n"
  "frequency response by vector fitting, relative error weighted, and prints it as an\n"
  "expression --plant takes, with the largest relative error of the fit over the points\n"
  "(docs/measured-data.md). Check the fit against the data before designing on it.\n"
  "\n"
  "Options:\n"
  LW_CLI_MEASURED_HELP
  "  --order N                poles of the model, 1 to 40 (required)\n"
  "  --relative-degree K      poles minus zeros, 0 to N (default 1)\n"
  "  --iterations I           pole relocations, 1 to 200 (default 20)\n"
  "  --json                   print the model, the expression and the error at every point\n"
  "  -h, --help               show this help\n"
  "\n"
  "Exit status: 0 success, 2 bad input, 1 internal failure.\n";

typedef struct
{
  LwCliMeasuredArgs measured;
  char *order, *relative_degree, *iterations;
  gboolean json, help;
} FitArgs;

static int
fit_run (void *arg)
{
  const FitArgs *a = arg;
  if (lw_cli_measured_file (&a->measured) == NULL)
    {
      lw_cli_bad_input ("fit", "--measured FILE.csv is required (see '" LW_CLI_PROG
                        " fit --help')");
      return LW_EXIT_BAD_INPUT;
    }
  if (lw_cli_measured_one (&a->measured, "a model is fitted to one table") != LW_EXIT_OK)
    return LW_EXIT_BAD_INPUT;
  if (a->measured.kind == NULL || strcmp (a->measured.kind, "continuous") != 0)
    {
      lw_cli_bad_input ("--measured-kind", "fit takes continuous data (a model in s); a fit of "
                        "sampled data (a model in z) is not built yet");
      return LW_EXIT_BAD_INPUT;
    }
  if (a->order == NULL)
    {
      lw_cli_bad_input ("fit", "--order is required (see '" LW_CLI_PROG " fit --help')");
      return LW_EXIT_BAD_INPUT;
    }
  gint64 order, reldeg = 1, iters = 20;
  if (!lw_cli_parse_integer ("--order", a->order, 1, 40, &order))
    return LW_EXIT_BAD_INPUT;
  if (a->relative_degree != NULL
      && !lw_cli_parse_integer ("--relative-degree", a->relative_degree, 0, order, &reldeg))
    return LW_EXIT_BAD_INPUT;
  if (a->iterations != NULL
      && !lw_cli_parse_integer ("--iterations", a->iterations, 1, 200, &iters))
    return LW_EXIT_BAD_INPUT;
  LwMeasured *data = NULL;
  char note[256] = "";
  int status = lw_cli_measured_read (lw_cli_measured_file (&a->measured), &data, note, sizeof note);
  if (status != LW_EXIT_OK)
    return status;
  LwModel *model = NULL;
  double worst = NAN;
  LwError err;
  lw_error_clear (&err);
  LwStatus st = lw_measured_fit (data->omega_rad_s, data->h, NULL, data->n, (int) order,
                                 (int) reldeg, (int) iters, &model, &worst, &err);
  if (st != LW_OK)
    {
      fprintf (stderr, "%s: %s\n", lw_cli_measured_file (&a->measured), err.message);
      lw_measured_free (data);
      return st == LW_ERR_INVALID ? LW_EXIT_BAD_INPUT : LW_EXIT_INTERNAL;
    }
  g_autofree char *expr = lw_model_expression (model);
  if (!a->json)
    {
      g_autofree char *text = lw_model_text (model);
      printf ("Fitted G(s) = %s\n", text);
      printf ("  order %d, relative degree %d, %d iterations, %zu points\n", (int) order,
              (int) reldeg, (int) iters, data->n);
      printf ("  largest relative error over the points: %.3g\n", worst);
      if (note[0] != '\0')
        printf ("  note: %s\n", note);
      printf ("\nAs --plant:\n%s\n", expr);
    }
  else
    {
      g_autoptr (JsonBuilder) b = json_builder_new ();
      json_builder_begin_object (b);
      json_builder_set_member_name (b, "plant");
      json_builder_add_string_value (b, expr);
      json_builder_set_member_name (b, "model");
      lw_cli_json_add_model (b, model);
      json_builder_set_member_name (b, "max_relative_error");
      lw_cli_json_add_number (b, worst);
      json_builder_set_member_name (b, "frequencies_rad_s");
      lw_cli_json_add_number_array (b, data->omega_rad_s, data->n);
      json_builder_set_member_name (b, "relative_errors");
      json_builder_begin_array (b);
      for (size_t i = 0; i < data->n; i++)
        lw_cli_json_add_number (b, cabs (lw_model_eval (model, I * data->omega_rad_s[i])
                                         - data->h[i]) / cabs (data->h[i]));
      json_builder_end_array (b);
      json_builder_end_object (b);
      lw_cli_json_print_builder (b);
    }
  lw_model_free (model);
  lw_measured_free (data);
  return LW_EXIT_OK;
}

int
lw_cmd_fit (int argc, char **argv)
{
  FitArgs a = { 0 };
  const GOptionEntry entries[] = {
    LW_CLI_MEASURED_ENTRIES (&a.measured),
    { "order", 0, 0, G_OPTION_ARG_STRING, &a.order, NULL, NULL },
    { "relative-degree", 0, 0, G_OPTION_ARG_STRING, &a.relative_degree, NULL, NULL },
    { "iterations", 0, 0, G_OPTION_ARG_STRING, &a.iterations, NULL, NULL },
    { "json", 0, 0, G_OPTION_ARG_NONE, &a.json, NULL, NULL },
    { "help", 'h', 0, G_OPTION_ARG_NONE, &a.help, NULL, NULL },
    { NULL, 0, 0, 0, NULL, NULL, NULL }
  };
  int status = lw_cli_run_command ("fit", argc, argv, entries, &a.help, fit_help, fit_run, &a);
  lw_cli_measured_args_clear (&a.measured);
  g_free (a.order);
  g_free (a.relative_degree);
  g_free (a.iterations);
  return status;
}
