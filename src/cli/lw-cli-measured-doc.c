/* lw-cli-measured-doc.c — the measured frequency response a design document holds
 * (<measured>, docs/file-format.md) on the command line: `new --measured FILE.csv` writes it
 * into the new document, `analyze FILE.lwd` closes the variant's loop on it by the same code
 * as `analyze --measured` (lw-cli-measured.c).
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
  if (m->kind == NULL || (strcmp (m->kind, "sampled") != 0 && strcmp (m->kind, "continuous") != 0))
    {
      g_autofree char *shown = m->kind != NULL ? g_utf8_make_valid (m->kind, -1) : NULL;
      if (shown == NULL)
        lw_cli_bad_input ("--measured-kind", "is required with --measured: sampled or "
                          "continuous (docs/measured-data.md)");
      else
        lw_cli_bad_input ("--measured-kind", "'%s' is neither sampled nor continuous", shown);
      return LW_EXIT_BAD_INPUT;
    }
  char note[256];
  LwMeasured *data = NULL;
  int status = lw_cli_measured_read (m->file, &data, note, sizeof note);
  if (status != LW_EXIT_OK)
    return status;
  lw_measured_free (d->measured);
  d->measured = data;
  d->measured_kind = strcmp (m->kind, "sampled") == 0 ? LW_MEASURED_SAMPLED
                                                      : LW_MEASURED_CONTINUOUS;
  d->measured_analysis = LW_DESIGN_ANALYSIS_MODEL;
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
  LwCliMeasuredLoop ml;
  memset (&ml, 0, sizeof ml);
  ml.kind = d->measured_kind;
  ml.data = lw_measured_copy (d->measured);
  if (ml.data == NULL)
    {
      lw_cli_bad_input (file, "out of memory copying the measured table");
      return LW_EXIT_INTERNAL;
    }
  const LwCliMeasuredInput in = { e->period_s, e->dead_time_s, e->compute_delay,
                                  e->controller_z, e->sampled };
  g_autofree char *place = g_strdup_printf ("%s: <measured>", file);
  int status = lw_cli_measured_loop_close (&ml, &in, place);
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
      json_object_set_int_member (o, "open_loop_unstable_poles", d->measured_unstable_poles);
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
      if (data)
        printf ("  the design's analysis uses the data (analysis=\"data\"): these margins, not "
                "the model's above\n");
    }
  lw_cli_measured_loop_clear (&ml);
  return status;
}
