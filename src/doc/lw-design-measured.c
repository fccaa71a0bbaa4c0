/* lw-design-measured.c — the measured frequency response a design document holds
 * (<measured>, docs/file-format.md): read from the element's text by the CSV reader of
 * lw-measured.h with refusals placed at the document's line, checked before a save, and
 * written in its canonical form.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <complex.h>

#include "lw-design-load-private.h"

static const char *const kind_names[] = { "sampled", "continuous" };       /* LwMeasuredKind */
static const char *const analysis_names[] = { "model", "data" };           /* LwDesignAnalysis */

const char *
lw_design_measured_kind_name (LwMeasuredKind kind)
{
  return (unsigned) kind < G_N_ELEMENTS (kind_names) ? kind_names[kind] : NULL;
}

const char *
lw_design_analysis_name (LwDesignAnalysis a)
{
  return (unsigned) a < G_N_ELEMENTS (analysis_names) ? analysis_names[a] : NULL;
}

/* ---- reading ------------------------------------------------------------------------------- */

/* The element's text as the table: text and CDATA as they are; a comment (or a processing
 * instruction) stands as the line breaks it holds, so that a line of the table is the line
 * of the document. NULL after an error. */
static GString *
table_text (Reader *r, const xmlNode *e)
{
  GString *s = g_string_new (NULL);
  for (const xmlNode *n = e->children; n != NULL; n = n->next)
    {
      if (n->type == XML_TEXT_NODE || n->type == XML_CDATA_SECTION_NODE)
        g_string_append (s, (const char *) n->content);
      else if (n->type == XML_COMMENT_NODE || n->type == XML_PI_NODE)
        {
          for (const xmlChar *p = n->content; p != NULL && *p != '\0'; p++)
            if (*p == '\n')
              g_string_append_c (s, '\n');
        }
      else
        {
          if (n->type == XML_ENTITY_REF_NODE)
            lw_load_fail (r, e, LW_DESIGN_ERROR_REFUSED, ": entity references are not allowed");
          else
            lw_load_fail (r, e, LW_DESIGN_ERROR_SCHEMA, ": holds the table as text only, found "
                          "the element <%s>", (const char *) n->name);
          g_string_free (s, TRUE);
          return NULL;
        }
    }
  return s;
}

/* An attribute that is one of names (n of them): its index, the default when absent, -1
 * after an error. */
static int
read_choice (Reader *r, const xmlNode *e, const char *attr, const char *const *names, int n,
             int fallback)
{
  g_autofree char *v = lw_load_attribute (e, attr);
  if (v == NULL && fallback < 0)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_SCHEMA, ": attribute '%s' is required ('%s' or "
                         "'%s')", attr, names[0], names[1]), -1;
  if (v == NULL)
    return fallback;
  for (int i = 0; i < n; i++)
    if (strcmp (v, names[i]) == 0)
      return i;
  return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute '%s' must be '%s' or '%s', got "
                       "'%s'", attr, names[0], names[1], v), -1;
}

/* The table's refusal at the document's line: the element's line (where its text starts)
 * plus the table's line − 1; the message without the table's own "line N: ". */
static bool
table_fail (Reader *r, const xmlNode *e, LwStatus st, const LwMeasuredPlace *place,
            const char *message)
{
  if (r->error != NULL)
    return false;
  long line = xmlGetLineNo (e) + (place->line > 0 ? (long) place->line - 1 : 0);
  g_autofree char *prefix = g_strdup_printf ("line %zu: ", place->line);
  const char *msg = g_str_has_prefix (message, prefix) ? message + strlen (prefix) : message;
  GString *own = g_string_new (g_str_has_prefix (msg, "the file ") ? "the table " : "");
  msg += g_str_has_prefix (msg, "the file ") ? strlen ("the file ") : 0;
  /* "… of line N (…)": another line of the table, named by its line in the document */
  const char *other = strstr (msg, " of line ");
  char *end = NULL;
  guint64 k = other != NULL ? g_ascii_strtoull (other + strlen (" of line "), &end, 10) : 0;
  if (k > 0 && end != NULL && k <= place->line)
    {
      g_string_append_len (own, msg, other - msg);
      g_string_append_printf (own, " of line %ld", xmlGetLineNo (e) + (long) k - 1);
      msg = end;
    }
  g_string_append (own, msg);
  g_autofree char *column = place->column > 0
                              ? g_strdup_printf (", column %zu", place->column) : g_strdup ("");
  r->line = (int) MIN (line, (long) INT_MAX);
  g_set_error (&r->error, LW_DESIGN_ERROR,
               st == LW_ERR_NOMEM ? LW_DESIGN_ERROR_LIMIT : LW_DESIGN_ERROR_VALUE,
               "%s:%ld: <measured>: the table (line %zu of its text%s): %s", r->name, line,
               place->line, column, own->str);
  g_string_free (own, TRUE);
  return false;
}

bool
lw_load_read_measured (Reader *r, const xmlNode *e, LwDesign *d)
{
  static const char *const allowed[] = { "kind", "analysis", "source",
                                         "open_loop_unstable_poles", NULL };
  if (!lw_load_check_attributes (r, e, "", allowed))
    return false;
  int kind = read_choice (r, e, "kind", kind_names, 2, -1);
  int analysis = kind < 0 ? -1 : read_choice (r, e, "analysis", analysis_names, 2, 0);
  if (analysis < 0)
    return false;
  g_autofree char *source = NULL;
  if (!lw_load_text_attr (r, e, "", "source", false, &source))
    return false;
  const char *problem = source != NULL ? lw_design_source_problem (source) : NULL;
  if (problem != NULL)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute 'source' ('%s'): %s", source,
                         problem);
  g_autofree char *poles = lw_load_attribute (e, "open_loop_unstable_poles");
  long long n_poles = 0;
  if (poles != NULL
      && !lw_load_parse_whole_text (poles, 0, LW_DESIGN_MAX_UNSTABLE_POLES, &n_poles))
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute 'open_loop_unstable_poles' "
                         "must be a whole number from 0 to %d, got '%s'",
                         LW_DESIGN_MAX_UNSTABLE_POLES, poles);
  GString *text = table_text (r, e);
  if (text == NULL)
    return false;
  LwMeasuredPlace place = { 0, 0 };
  LwError err;
  lw_error_clear (&err);
  LwMeasured *m = NULL;
  LwStatus st = lw_measured_parse (text->str, text->len, &m, NULL, 0, &place, &err);
  g_string_free (text, TRUE);
  if (st != LW_OK)
    return table_fail (r, e, st, &place, err.message);
  d->measured = m;
  d->measured_kind = (LwMeasuredKind) kind;
  d->measured_analysis = (LwDesignAnalysis) analysis;
  d->measured_source = g_steal_pointer (&source);
  d->measured_unstable_poles = (int) n_poles;
  return true;
}

/* ---- checks before saving ---------------------------------------------------------------- */

gboolean
lw_design_check_measured (const LwDesign *d, GError **error)
{
  const LwMeasured *m = d->measured;
  if (m == NULL)
    return TRUE;
  const char *bad = NULL;
  if (lw_design_measured_kind_name (d->measured_kind) == NULL)
    bad = "its kind is unknown";
  else if (lw_design_analysis_name (d->measured_analysis) == NULL)
    bad = "its analysis choice is unknown";
  else if (d->measured_unstable_poles < 0
           || d->measured_unstable_poles > LW_DESIGN_MAX_UNSTABLE_POLES)
    bad = "its count of unstable open-loop poles is outside 0 to 1000";
  else if (m->n < LW_MEASURED_MIN_POINTS)
    bad = "its table has fewer than 10 points";
  for (size_t i = 0; bad == NULL && i < m->n; i++)
    {
      double w = m->omega_rad_s[i];
      if (!(isfinite (w) && w > 0.0) || (i > 0 && !(w > m->omega_rad_s[i - 1])))
        bad = "its frequencies are not finite, above zero and increasing";
      else if (!isfinite (creal (m->h[i])) || !isfinite (cimag (m->h[i])))
        bad = "its response holds a value that is not finite";
      else if (m->coherence != NULL && !(m->coherence[i] >= 0.0 && m->coherence[i] <= 1.0))
        bad = "its coherence holds a value outside 0 to 1";
    }
  if (bad != NULL)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the measured response cannot be saved: %s", bad);
      return FALSE;
    }
  const char *problem = d->measured_source != NULL
                          ? lw_design_source_problem (d->measured_source) : NULL;
  if (problem != NULL)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the measured response's source '%s' cannot be saved: %s",
                   d->measured_source, problem);
      return FALSE;
    }
  return TRUE;
}

/* ---- the canonical text ------------------------------------------------------------------ */

/* `  <measured kind=… analysis=… [source=…] open_loop_unstable_poles=…>`, a line break, the
 * header, one row per point (numbers in the shortest text that reads back exactly), then
 * `  </measured>`. attr_text writes an escaped attribute. */
void
lw_design_write_measured (GString *o, const LwDesign *d,
                          void (*attr_text) (GString *, const char *, const char *))
{
  const LwMeasured *m = d->measured;
  if (m == NULL)
    return;
  g_string_append (o, "  <measured");
  attr_text (o, "kind", lw_design_measured_kind_name (d->measured_kind));
  /* without a model the analysis is the data's, whatever the field says (a plant cleared in
   * the window leaves it as it was) */
  attr_text (o, "analysis", lw_design_analysis_name (lw_design_analysis_on_data (d)
                                                       ? LW_DESIGN_ANALYSIS_DATA
                                                       : LW_DESIGN_ANALYSIS_MODEL));
  if (d->measured_source != NULL)
    attr_text (o, "source", d->measured_source);
  g_string_append_printf (o, " open_loop_unstable_poles=\"%d\">\n", d->measured_unstable_poles);
  g_string_append (o, m->coherence != NULL ? "frequency_rad_s,real,imag,coherence\n"
                                           : "frequency_rad_s,real,imag\n");
  char a[G_ASCII_DTOSTR_BUF_SIZE], b[G_ASCII_DTOSTR_BUF_SIZE], c[G_ASCII_DTOSTR_BUF_SIZE];
  for (size_t i = 0; i < m->n; i++)
    {
      g_string_append_printf (o, "%s,%s,%s", lw_design_format_number (m->omega_rad_s[i], a),
                              lw_design_format_number (creal (m->h[i]), b),
                              lw_design_format_number (cimag (m->h[i]), c));
      if (m->coherence != NULL)
        g_string_append_printf (o, ",%s", lw_design_format_number (m->coherence[i], a));
      g_string_append_c (o, '\n');
    }
  g_string_append (o, "  </measured>\n");
}
