/* lw-cli-measured-doc.c — the measured frequency response a design document holds
 * (<measured>, docs/file-format.md) on the command line: `new --measured FILE.csv` writes it
 * into the new document, `analyze FILE.lwd` reports the variant's loop on it as the engine
 * closed it (LwVariantEval.measured, lw_measured_loop_close as for `analyze --measured`).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <stdio.h>
#include <string.h>

#include "lw-cli-measured.h"

int
lw_cli_measured_doc_set (LwDesign *d, const LwCliMeasuredArgs *m)
{
  if (m->file == NULL)
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
  char note[256];
  LwMeasured *data = NULL;
  int status = lw_cli_measured_read (m->file, &data, note, sizeof note);
  if (status != LW_EXIT_OK)
    return status;
  lw_measured_free (d->measured);
  d->measured = data;
  d->measured_kind = kind;
  /* without a model the analysis can only be the data's */
  d->measured_analysis = lw_design_has_model (d) ? LW_DESIGN_ANALYSIS_MODEL
                                                 : LW_DESIGN_ANALYSIS_DATA;
  d->measured_unstable_poles = 0;
  /* the file's base name as the source, when it is a text the document can hold */
  g_autofree char *base = g_path_get_basename (m->file);
  g_autofree char *shown = g_filename_display_name (base);
  lw_design_set_string (&d->measured_source,
                        lw_design_source_problem (shown) == NULL ? shown : NULL);
  if (note[0] != '\0')
    fprintf (stderr, "%s: %s: %s (not kept in the document)\n", LW_CLI_PROG, m->file, note);
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
  memset (&ml, 0, sizeof ml);
  ml.kind = d->measured_kind;
  ml.data = d->measured;
  ml.loop = *e->measured;
  ml.period_s = e->period_s;
  ml.compute_delay = e->compute_delay;
  ml.has_model = lw_design_has_model (d);
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
