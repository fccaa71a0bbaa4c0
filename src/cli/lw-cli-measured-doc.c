/* lw-cli-measured-doc.c — the measured frequency response a design document holds
 * (<measured>, docs/file-format.md) on the command line: `new --measured FILE.csv` writes it
 * into the new document, `check`, `plot` and `report FILE.lwd --measured FILE.csv` put it in
 * place of the document's for the run, `analyze FILE.lwd` reports the variant's loop on it as
 * the engine closed it (LwVariantEval.measured, lw_measured_loop_close as for
 * `analyze --measured`), `check` says which requirements were judged on it.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <stdio.h>
#include <string.h>

#include "lw-cli-measured.h"

/* A file's base name without its extension ("rig/m1.csv": "m1"; the base name when that
 * leaves nothing). */
static char *
stem (const char *file)
{
  char *base = g_path_get_basename (file);
  char *dot = strrchr (base, '.');
  if (dot != NULL && dot != base)
    *dot = '\0';
  return base;
}

/* The name of table i of several given by --measured: its base name without the extension,
 * or the path as given
 * when another table has the same base name (or the base name is no name a document takes);
 * NULL (and the message printed) when neither will do. */
static char *
set_name (char **files, size_t i)
{
  g_autofree char *base = stem (files[i]);
  char *shown = g_filename_display_name (base);
  gboolean clash = lw_design_measured_name_problem (shown) != NULL;
  for (size_t j = 0; !clash && files[j] != NULL; j++)
    {
      g_autofree char *other = stem (files[j]);
      clash = j != i && strcmp (other, base) == 0;
    }
  if (!clash)
    return shown;
  g_free (shown);
  shown = g_filename_display_name (files[i]);
  const char *problem = lw_design_measured_name_problem (shown);
  for (size_t j = 0; problem == NULL && j < i; j++)
    if (strcmp (files[j], files[i]) == 0)
      problem = "the same file is given twice";
  if (problem == NULL)
    return shown;
  lw_cli_bad_input ("--measured", "'%s' cannot name a response of the measured family: %s",
                    shown, problem);
  g_free (shown);
  return NULL;
}

int
lw_cli_measured_doc_set (LwDesign *d, const LwCliMeasuredArgs *m, LwDesignAnalysis analysis)
{
  if (lw_cli_measured_file (m) == NULL)
    {
      if (m->kind == NULL)
        return LW_EXIT_OK;
      lw_cli_bad_input ("--measured-kind", "needs --measured FILE.csv");
      return LW_EXIT_BAD_INPUT;
    }
  LwMeasuredKind kind;
  int kind_status = lw_cli_measured_kind (m, &kind);
  if (kind_status != LW_EXIT_OK)
    return kind_status;
  size_t n = g_strv_length (m->files);
  if (n > LW_DESIGN_MAX_MEASURED)
    {
      lw_cli_bad_input ("--measured", "given %zu times; a measured family holds at most %d "
                        "responses", n, LW_DESIGN_MAX_MEASURED);
      return LW_EXIT_BAD_INPUT;
    }
  /* every table read and named before the document is changed */
  LwMeasured **data = g_new0 (LwMeasured *, n);
  char **names = g_new0 (char *, n + 1);
  int status = LW_EXIT_OK;
  for (size_t i = 0; i < n && status == LW_EXIT_OK; i++)
    {
      char note[256];
      status = lw_cli_measured_read (m->files[i], &data[i], note, sizeof note);
      if (status == LW_EXIT_OK && note[0] != '\0')
        fprintf (stderr, "%s: %s: %s (not kept)\n", LW_CLI_PROG, m->files[i], note);
      if (status == LW_EXIT_OK && n > 1 && (names[i] = set_name (m->files, i)) == NULL)
        status = LW_EXIT_BAD_INPUT;
    }
  if (status != LW_EXIT_OK)
    {
      for (size_t i = 0; i < n; i++)
        lw_measured_free (data[i]);
      g_free (data);
      g_strfreev (names);
      return status;
    }
  /* the tables given take the place of every measured response the document holds */
  lw_measured_free (d->measured);
  d->measured = data[0];
  d->measured_kind = kind;
  /* without a model the analysis can only be the data's; the count of open-loop unstable
   * poles is the plant's: a document's stays, for every response */
  d->measured_analysis = lw_design_has_model (d) ? analysis : LW_DESIGN_ANALYSIS_DATA;
  /* the file's base name as the source, when it is a text the document can hold */
  for (size_t i = 0; i < n; i++)
    {
      g_autofree char *base = g_path_get_basename (m->files[i]);
      g_autofree char *shown = g_filename_display_name (base);
      const char *source = lw_design_source_problem (shown) == NULL ? shown : NULL;
      if (i == 0)
        {
          lw_design_set_string (&d->measured_source, source);
          continue;
        }
      if (i == 1)
        {
          lw_design_clear_more_measured (d);
          d->more_measured = g_new0 (LwDesignMeasuredSet, n - 1);
        }
      LwDesignMeasuredSet *s = &d->more_measured[d->n_more_measured++];
      s->name = g_steal_pointer (&names[i]);
      s->data = data[i];
      s->kind = kind;
      s->source = g_strdup (source);
      s->unstable_poles = d->measured_unstable_poles;
    }
  if (n == 1)
    lw_design_clear_more_measured (d);
  lw_design_set_string (&d->measured_name, names[0]);
  g_free (data);
  g_strfreev (names);
  return LW_EXIT_OK;
}

int
lw_cli_measured_doc_analyze (const char *file, const LwDesign *d, const LwVariantEval *e,
                             JsonObject *root)
{
  if (d->measured == NULL)
    return LW_EXIT_OK;
  if (e->measured == NULL)
    {
      /* the engine could not close the loop on the data at this variant's period */
      fprintf (stderr, "%s: <measured>: %s\n", file,
               e->measured_error != NULL ? e->measured_error->message : "not evaluated");
      return LW_EXIT_BAD_INPUT;
    }
  /* the evaluation's loop on the data, borrowed (the engine closed it with this variant's
   * controller, period, delay and dead time: the same numbers as analyze --measured) */
  LwCliMeasuredLoop ml;
  lw_cli_measured_loop_borrow (&ml, d, e);
  int status = LW_EXIT_OK;
  gboolean data = d->measured_analysis == LW_DESIGN_ANALYSIS_DATA;
  if (status == LW_EXIT_OK && root != NULL)
    {
      g_autoptr (JsonBuilder) b = json_builder_new ();
      lw_cli_measured_json (b, &ml, file);
      JsonNode *node = json_builder_get_root (b);
      JsonObject *o = json_node_get_object (node);
      if (d->measured_source != NULL)
        json_object_set_string_member (o, "source", d->measured_source);
      else
        json_object_set_null_member (o, "source");
      json_object_set_string_member (o, "analysis",
                                     lw_design_analysis_name (d->measured_analysis));
      json_object_set_member (root, "measured", node);
      if (data)
        {
          /* the design's analysis uses the data: the loop block is theirs, as with
           * analyze --measured */
          g_autoptr (JsonBuilder) lb = json_builder_new ();
          lw_cli_measured_json_loop (lb, &ml);
          json_object_set_member (root, "loop", json_builder_get_root (lb));
        }
    }
  else if (status == LW_EXIT_OK)
    {
      g_autofree char *label = d->measured_source != NULL
        ? g_strdup_printf ("<measured> of %s (source: %s)", file, d->measured_source)
        : g_strdup_printf ("<measured> of %s", file);
      printf ("\n");
      lw_cli_measured_print (&ml, label, FALSE);
      if (data && ml.has_model)
        printf ("  the design's analysis uses the data (analysis=\"data\"): these margins, not "
                "the model's above\n");
    }
  return status;   /* nothing of ml is its own */
}

void
lw_cli_measured_doc_header (const LwDesign *d, const char *given)
{
  const LwMeasured *m = d->measured;
  if (m == NULL)
    return;
  g_autofree char *shown = given != NULL ? g_filename_display_name (given) : NULL;
  printf ("Measured response: %s (%s, %zu points from %.6g to %.6g rad/s%s)%s\n",
          shown != NULL ? shown : d->measured_source != NULL ? d->measured_source
                                                             : "the document's <measured>",
          lw_design_measured_kind_name (d->measured_kind), m->n, m->omega_rad_s[0],
          m->omega_rad_s[m->n - 1], m->coherence != NULL ? ", with coherence" : "",
          shown != NULL ? ", given by --measured in place of the document's" : "");
  if (d->n_more_measured > 0)
    {
      printf ("  a measured family of %zu responses:", d->n_more_measured + 1);
      for (size_t i = 0; i <= d->n_more_measured; i++)
        printf ("%s \"%s\"", i > 0 ? "," : "", lw_design_measured_set_name (d, i));
      printf (" (the first above; each variant's loop closed on every one)\n");
    }
  if (d->measured_analysis == LW_DESIGN_ANALYSIS_DATA)
    printf ("  judged on the data (analysis=\"data\"): the phase margin, gain margin, crossover "
            "and sensitivity requirements (marked \"on data\"); the others %s\n",
            lw_design_has_model (d) ? "on the model" : "need a plant model (the design has none)");
  else
    printf ("  not judged on (analysis=\"model\"): every requirement is the model's\n");
}

static void
print_margin (const char *what, double value, const char *unit, const LwMeasuredCrossing *c)
{
  if (c == NULL)
    {
      printf ("    %-16s none in the data\n", what);
      return;
    }
  printf ("    %-16s %.4g %s at %.6g rad/s (between the points %.6g and %.6g rad/s)%s%s\n",
          what, value, unit, c->omega_rad_s, c->lo_rad_s, c->hi_rad_s,
          c->low_coherence ? " LOW COHERENCE" : "", c->within_noise ? " WITHIN NOISE" : "");
}

void
lw_cli_measured_doc_check_lines (const LwDesign *d, const LwVariantEval *e)
{
  if (d->measured == NULL || d->measured_analysis != LW_DESIGN_ANALYSIS_DATA)
    return;
  if (e->measured == NULL)
    {
      printf ("  the measured data cannot be used at this variant's period: %s; the "
              "requirements judged on them are not available\n",
              e->measured_error != NULL ? e->measured_error->message : "not evaluated");
      return;
    }
  const LwMeasuredMargins *mm = &e->measured->margins;
  printf ("  on the measured data (L = z^-%d C(z) P on %zu points, found between them):\n",
          e->compute_delay, e->measured->n);
  print_margin ("phase margin", mm->phase_margin_deg, "deg",
                lw_engine_measured_governing (mm, TRUE));
  print_margin ("gain margin", mm->gain_margin_db, "dB",
                lw_engine_measured_governing (mm, FALSE));
  size_t low = 0;
  for (size_t i = 0; i < mm->n_gain + mm->n_phase; i++)
    low += (i < mm->n_gain ? mm->gain[i] : mm->phase[i - mm->n_gain]).low_coherence;
  if (mm->n_gain + mm->n_phase > 2 || low > 0)
    printf ("    %zu gain and %zu phase crossover(s) in the data, %zu next to a point of "
            "coherence below %.1f (analyze FILE lists them)\n", mm->n_gain, mm->n_phase, low,
            LW_MEASURED_LOW_COHERENCE);
  printf ("    %-16s %.4g at %.6g rad/s (the largest at a measured point)\n",
          "sensitivity peak", mm->sensitivity_peak, mm->sensitivity_peak_rad_s);
  lw_cli_measured_print_cautions (mm, "    ");
  const LwMeasuredStability *st = &e->measured->stability;
  printf ("    %-16s %s (Nyquist criterion, %d open-loop unstable pole%s stated): %s\n",
          "closed loop", lw_measured_verdict_name (st->verdict), st->open_loop_unstable,
          st->open_loop_unstable == 1 ? "" : "s", st->note);
}

void
lw_cli_measured_loop_borrow (LwCliMeasuredLoop *ml, const LwDesign *d, const LwVariantEval *e)
{
  memset (ml, 0, sizeof *ml);
  ml->kind = d->measured_kind;
  ml->data = d->measured;
  ml->loop = *e->measured;
  ml->period_s = e->period_s;
  ml->compute_delay = e->compute_delay;
  ml->has_model = e->ev != NULL;
}
