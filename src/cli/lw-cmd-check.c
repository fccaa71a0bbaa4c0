/* lw-cmd-check.c — `loopwright-cli check`: a design document's requirements, as a table, with
 * an exit status a CI job can gate on (docs/cli.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <stdio.h>
#include <string.h>

#include "lw-cli-commands.h"
#include "lw-cli-common.h"
#include "lw-cli-doc.h"
#include "lw-cli-family.h"
#include "lw-cli-family-measured.h"
#include "lw-cli-measured.h"

static const char check_help[] =
  "Usage: " LW_CLI_PROG " check FILE.lwd [--variant NAME | --all-variants]\n"
  "       [--measured FILE.csv --measured-kind KIND]\n"
  "\n"
  "Evaluates the sampled loop of a design document and checks it against the requirements\n"
  "the document states: a table of target, achieved value and result per requirement.\n"
  "A document that holds a measured response with analysis=\"data\" has its phase margin,\n"
  "gain margin, crossover and sensitivity requirements judged on the loop closed on the\n"
  "data (marked \"on data\"; docs/measured-data.md); with several measured responses (a\n"
  "measured family) on every one of them, and the check fails when one fails.\n"
  "\n"
  "Options:\n"
  "  --variant NAME           check this variant (default: the document's active variant)\n"
  "  --all-variants           check every variant in the document\n"
  "  --measured FILE.csv      judge on this measured response (as analysis=\"data\"), in\n"
  "                           place of the one the document holds; the file is unchanged;\n"
  "                           more than once: a measured family, every requirement on\n"
  "                           the data judged on each response\n"
  "  --measured-kind KIND     sampled or continuous (required with --measured)\n"
  "  -h, --help               show this help\n"
  "\n"
  "The actuator peak is max |u| of the reference step: a unit step without limits, or the\n"
  "variant's own <actuator> limits and reference step when it has them.\n"
  "Exit status: 0 every requirement passes, 3 a requirement fails (or cannot be evaluated),\n"
  "2 bad input or a bad document, 1 internal failure.\n";

typedef struct
{
  char **files;
  char *variant;
  LwCliMeasuredArgs measured;
  gboolean all;
  gboolean help;
} CheckArgs;

/* Checks one variant; returns LW_EXIT_OK, LW_EXIT_CHECK_FAILED or an error status. */
static int
check_variant (const char *path, const LwDesign *d, size_t index)
{
  const LwDesignVariant *v = &d->variants[index];
  LwVariantEval *e = NULL;
  int status = lw_cli_doc_evaluate_data (path, d, index, NULL, TRUE, &e);
  if (status != LW_EXIT_OK)
    return status;
  const LwEvaluation *ev = e->ev;
  const LwReqResult *res = e->requirements;
  size_t failing = e->n_not_passing;
  /* with a measurement, the stability said is the model's (the data do not tell it) */
  printf ("\nVariant '%s'%s: %zu stage(s), %s%s\n", v->name,
          index == d->active ? " (active)" : "", v->n_stages,
          ev == NULL ? "" : d->measured != NULL ? "the model's loop " : "loop ",
          ev == NULL ? "on the measured data alone (no model)"
                     : ev->stable ? "stable" : "UNSTABLE");
  lw_cli_doc_print_requirements (d, res);
  if (d->n_requirements > 0)
    printf ("  %zu of %zu requirement(s) pass\n", d->n_requirements - failing,
            d->n_requirements);
  lw_cli_measured_doc_check_lines (d, e);
  /* several measured responses: every requirement on the data judged on each */
  size_t family_failing = 0;
  status = lw_cli_measured_family_run (d, e, NULL, &family_failing);
  if (status != LW_EXIT_OK)
    {
      lw_variant_eval_unref (e);
      return status;
    }
  failing += family_failing;
  if (ev != NULL && lw_cli_family_wanted (&(LwCliFamilyArgs) { 0 }, d))
    {
      /* a plant family: every requirement judged on its worst member too */
      GError *error = NULL;
      g_autoptr (LwFamily) f = lw_family_evaluate (d, index, NULL, &error);
      if (f == NULL)
        {
          status = lw_cli_report_gerror ("family", error);
          g_error_free (error);
          lw_variant_eval_unref (e);
          return status;
        }
      lw_cli_family_print (f, d);
      if (d->n_requirements > 0)
        printf ("  %zu of %zu requirement(s) pass on every member\n",
                d->n_requirements - f->n_not_passing, d->n_requirements);
      failing += f->n_not_passing;
    }
  status = failing > 0 ? LW_EXIT_CHECK_FAILED : LW_EXIT_OK;
  lw_variant_eval_unref (e);
  return status;
}

static int
check_run (void *data)
{
  const CheckArgs *a = data;
  const char *path = NULL;
  if (lw_cli_doc_one_file ("check", a->files, &path) != LW_EXIT_OK)
    return LW_EXIT_BAD_INPUT;
  if (a->all && a->variant != NULL)
    {
      lw_cli_bad_input ("--all-variants", "cannot be combined with --variant; give one of them");
      return LW_EXIT_BAD_INPUT;
    }
  g_autoptr (LwDesign) d = NULL;
  int status = lw_cli_doc_load (path, &d);
  if (status != LW_EXIT_OK)
    return status;
  status = lw_cli_measured_doc_set (d, &a->measured, LW_DESIGN_ANALYSIS_DATA);
  if (status != LW_EXIT_OK)
    return status;
  size_t first = 0, last = 0;
  if (a->all)
    last = d->n_variants - 1;
  else
    {
      status = lw_cli_doc_variant (d, "--variant", a->variant, &first);
      if (status != LW_EXIT_OK)
        return status;
      last = first;
    }
  printf ("Design '%s' (%s): plant %s, T = %.6g s, computation delay %d, dead time %.6g s\n",
          d->title, path, lw_design_has_model (d) ? d->plant : "(none: measured data)",
          d->period_s, d->compute_delay, d->dead_time_s);
  lw_cli_measured_doc_header (d, lw_cli_measured_file (&a->measured));
  int worst = LW_EXIT_OK;
  for (size_t i = first; i <= last; i++)
    {
      int s = check_variant (path, d, i);
      if (s == LW_EXIT_CHECK_FAILED && worst == LW_EXIT_OK)
        worst = s;
      else if (s != LW_EXIT_OK && s != LW_EXIT_CHECK_FAILED)
        return s;
    }
  printf ("\n%s\n", worst == LW_EXIT_OK ? "result: every requirement passes"
                                        : "result: a requirement is not met");
  printf ("caution: simulation is not validation; commission with safe limits.\n");
  return worst;
}

int
lw_cmd_check (int argc, char **argv)
{
  CheckArgs a = { 0 };
  const GOptionEntry entries[] = {
    { "variant", 0, 0, G_OPTION_ARG_STRING, &a.variant, NULL, NULL },
    { "all-variants", 0, 0, G_OPTION_ARG_NONE, &a.all, NULL, NULL },
    LW_CLI_MEASURED_ENTRIES (&a.measured),
    { "help", 'h', 0, G_OPTION_ARG_NONE, &a.help, NULL, NULL },
    { G_OPTION_REMAINING, 0, 0, G_OPTION_ARG_FILENAME_ARRAY, &a.files, NULL, NULL },
    { NULL, 0, 0, 0, NULL, NULL, NULL }
  };
  int status = lw_cli_run_command ("check", argc, argv, entries, &a.help, check_help,
                                   check_run, &a);
  g_strfreev (a.files);
  g_free (a.variant);
  lw_cli_measured_args_clear (&a.measured);
  return status;
}
