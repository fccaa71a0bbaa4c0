/* lw-cmd-report.c — `loopwright-cli report`: the design report of a document as HTML or PDF
 * (docs/report.md). The content is built in lw-report-build.c, written by lw-report-html.c or
 * lw-report-pdf.c.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "lw-cli-commands.h"
#include "lw-cli-common.h"
#include "lw-cli-doc.h"
#include "lw-cli-measured.h"
#include "lw-report.h"

static const char report_help[] =
  "Usage: " LW_CLI_PROG " report FILE.lwd --out REPORT.html|REPORT.pdf\n"
  "       [--variants A,B | --compared] [--date YYYY-MM-DD]\n"
  "       [--measured FILE.csv --measured-kind KIND]\n"
  "\n"
  "Writes the design report of a document: title, author, date and notes; the plant in s,\n"
  "z and w; sampling and delays; for each variant its stages, the controller in w and z,\n"
  "the difference equation and second-order sections, the requirements, margins and\n"
  "performance indices; the figures (Bode in z and w, step response, Nyquist) with the\n"
  "variants overlaid; a comparison table of the variants; and the caution. A measured\n"
  "response in the document (or --measured) has a section of its own, each variant's\n"
  "margins on it with the interval of each crossover, and is drawn in the frequency\n"
  "figures (docs/measured-data.md).\n"
  "\n"
  "Options:\n"
  "  --out FILE               REPORT.html (one file, figures as SVG inline) or REPORT.pdf\n"
  "                           (A4 pages) (required)\n"
  "  --variants A,B,...       the variants to report and compare, by name, separated by\n"
  "                           commas (default: every variant; at most 6)\n"
  "  --compared               the active variant and those the document marks compared\n"
  "                           (what the window shows)\n"
  "  --date YYYY-MM-DD        the date printed in the report and written as the PDF's\n"
  "                           creation date (default: SOURCE_DATE_EPOCH when set, else\n"
  "                           \"not stated\"); the same document and date give the same bytes\n"
  "  --measured FILE.csv      report on this measured response in place of the one the\n"
  "                           document holds, judged on as analysis=\"data\" (the file\n"
  "                           unchanged); more than once: a measured family, one\n"
  "                           response per machine, with a section of its own\n"
  "  --measured-kind KIND     sampled or continuous (required with --measured)\n"
  "  -h, --help               show this help\n"
  "\n"
  "Exit status: 0 success, 2 bad input or a bad document, 1 internal failure or the file\n"
  "could not be written.\n";

typedef struct
{
  char **files;
  char *out;
  char *variants;
  gboolean compared;
  char *date;
  LwCliMeasuredArgs measured;
  gboolean help;
} ReportArgs;

/* YYYY-MM-DD, a real calendar day. */
static bool
check_date (const char *text)
{
  bool shape = strlen (text) == 10 && text[4] == '-' && text[7] == '-';
  for (int i = 0; shape && i < 10; i++)
    if (i != 4 && i != 7 && !g_ascii_isdigit (text[i]))
      shape = false;
  if (shape)
    {
      int y = atoi (text), m = atoi (text + 5), d = atoi (text + 8);
      if (y >= 1 && m >= 1 && m <= 12 && d >= 1
          && g_date_valid_dmy ((GDateDay) d, (GDateMonth) m, (GDateYear) y))
        return true;
    }
  lw_cli_bad_input ("--date", "'%s' is not a date YYYY-MM-DD (e.g. 2024-05-17)", text);
  return false;
}

/* The date from SOURCE_DATE_EPOCH (lw_report_date_from_environment), or NULL when unset. */
static int
date_from_environment (char **out)
{
  g_autoptr (GError) error = NULL;
  if (!lw_report_date_from_environment (out, &error))
    {
      lw_cli_bad_input (NULL, "%s", error->message);
      return LW_EXIT_BAD_INPUT;
    }
  return LW_EXIT_OK;
}

/* --variants A,B: every name must exist, none twice. */
static int
select_variants (const LwDesign *d, const char *list, size_t **which, size_t *n)
{
  if (list == NULL)
    return lw_cli_doc_select (d, NULL, true, "--variants", which, n);
  g_auto (GStrv) names = g_strsplit (list, ",", -1);
  size_t count = g_strv_length (names);
  *which = g_new0 (size_t, count + 1);
  *n = 0;
  for (size_t i = 0; i < count; i++)
    {
      if (names[i][0] == '\0')
        {
          lw_cli_bad_input ("--variants", "an empty name in '%s' (names separated by commas)",
                            list);
          goto bad;
        }
      size_t index;
      if (lw_cli_doc_variant (d, "--variants", names[i], &index) != LW_EXIT_OK)
        goto bad;
      for (size_t k = 0; k < *n; k++)
        if ((*which)[k] == index)
          {
            lw_cli_bad_input ("--variants", "'%s' is named twice", names[i]);
            goto bad;
          }
      (*which)[(*n)++] = index;
    }
  if (*n == 0)
    {
      lw_cli_bad_input ("--variants", "no variant named");
      goto bad;
    }
  return LW_EXIT_OK;
bad:
  g_clear_pointer (which, g_free);
  *n = 0;
  return LW_EXIT_BAD_INPUT;
}

static int
report_run (void *data)
{
  const ReportArgs *a = data;
  const char *path = NULL;
  int status = lw_cli_doc_one_file ("report", a->files, &path);
  if (status != LW_EXIT_OK)
    return status;
  if (a->out == NULL)
    {
      lw_cli_bad_input ("--out", "required: a file name ending in .html or .pdf");
      return LW_EXIT_BAD_INPUT;
    }
  g_autofree char *lower = g_ascii_strdown (a->out, -1);
  bool html = g_str_has_suffix (lower, ".html") || g_str_has_suffix (lower, ".htm");
  bool pdf = g_str_has_suffix (lower, ".pdf");
  if (!html && !pdf)
    {
      lw_cli_bad_input ("--out", "'%s' does not end in .html or .pdf", a->out);
      return LW_EXIT_BAD_INPUT;
    }
  g_autofree char *date = NULL;
  if (a->date != NULL)
    {
      if (!check_date (a->date))
        return LW_EXIT_BAD_INPUT;
      date = g_strdup (a->date);
    }
  else if ((status = date_from_environment (&date)) != LW_EXIT_OK)
    return status;

  g_autoptr (LwDesign) d = NULL;
  status = lw_cli_doc_load (path, &d);
  if (status != LW_EXIT_OK)
    return status;
  status = lw_cli_measured_doc_set (d, &a->measured, LW_DESIGN_ANALYSIS_DATA);
  if (status != LW_EXIT_OK)
    return status;
  g_autofree size_t *which = NULL;
  size_t n = 0;
  if (a->compared && a->variants != NULL)
    {
      lw_cli_bad_input ("--compared", "cannot be combined with --variants; give one of them");
      return LW_EXIT_BAD_INPUT;
    }
  if (a->compared)
    lw_cli_doc_shown (d, &which, &n);
  else if ((status = select_variants (d, a->variants, &which, &n)) != LW_EXIT_OK)
    return status;
  if (n > LW_PLOT_MAX_VARIANTS)
    {
      lw_cli_bad_input ("--variants", "%zu variants; a report compares at most %d (name them "
                        "with --variants A,B,...)", n, LW_PLOT_MAX_VARIANTS);
      return LW_EXIT_BAD_INPUT;
    }
  g_autoptr (GError) error = NULL;
  g_autoptr (LwReport) r = lw_report_build (path, d, which, n, date, &error);
  if (r == NULL)
    {
      lw_cli_bad_input (NULL, "%s", error->message);
      return error->code == LW_REPORT_ERROR_BAD_INPUT ? LW_EXIT_BAD_INPUT : LW_EXIT_INTERNAL;
    }
  size_t len = 0;
  if (!lw_report_write_file (r, a->out, &len, &error))
    {
      lw_cli_bad_input (NULL, "%s", error->message);
      return LW_EXIT_INTERNAL;
    }
  printf ("Wrote %s (%s, %zu variant(s), %zu bytes)\n", a->out, html ? "HTML" : "PDF", n, len);
  return status;
}

int
lw_cmd_report (int argc, char **argv)
{
  ReportArgs a = { 0 };
  const GOptionEntry entries[] = {
    { "out", 0, 0, G_OPTION_ARG_FILENAME, &a.out, NULL, NULL },
    { "variants", 0, 0, G_OPTION_ARG_STRING, &a.variants, NULL, NULL },
    { "compared", 0, 0, G_OPTION_ARG_NONE, &a.compared, NULL, NULL },
    { "date", 0, 0, G_OPTION_ARG_STRING, &a.date, NULL, NULL },
    LW_CLI_MEASURED_ENTRIES (&a.measured),
    { "help", 'h', 0, G_OPTION_ARG_NONE, &a.help, NULL, NULL },
    { G_OPTION_REMAINING, 0, 0, G_OPTION_ARG_FILENAME_ARRAY, &a.files, NULL, NULL },
    { NULL, 0, 0, 0, NULL, NULL, NULL }
  };
  int status = lw_cli_run_command ("report", argc, argv, entries, &a.help, report_help,
                                   report_run, &a);
  g_strfreev (a.files);
  g_free (a.out);
  g_free (a.variants);
  g_free (a.date);
  lw_cli_measured_args_clear (&a.measured);
  return status;
}
