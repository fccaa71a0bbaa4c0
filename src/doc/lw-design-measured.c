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

/* One <measured>'s attributes and table into *set; analysis (the first only: else NULL, and
 * the attribute refused) gets the analysis choice. */
static bool
read_one (Reader *r, const xmlNode *e, LwDesignMeasuredSet *set, int *analysis)
{
  static const char *const allowed_first[] = { "kind", "analysis", "source",
                                               "open_loop_unstable_poles", "name", NULL };
  static const char *const allowed_more[] = { "kind", "source", "open_loop_unstable_poles",
                                              "name", "analysis", NULL };
  if (!lw_load_check_attributes (r, e, "", analysis != NULL ? allowed_first : allowed_more))
    return false;
  if (analysis == NULL && xmlHasProp (e, (const xmlChar *) "analysis") != NULL)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute 'analysis' belongs to the "
                         "first <measured> only: it chooses for the whole measured family");
  int kind = read_choice (r, e, "kind", kind_names, 2, -1);
  if (kind < 0)
    return false;
  if (analysis != NULL)
    {
      *analysis = read_choice (r, e, "analysis", analysis_names, 2, 0);
      if (*analysis < 0)
        return false;
    }
  g_autofree char *name = NULL;
  if (!lw_load_text_attr (r, e, "", "name", false, &name))
    return false;
  const char *problem = name != NULL ? lw_design_measured_name_problem (name) : NULL;
  if (problem != NULL)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute 'name' ('%s'): %s", name,
                         problem);
  g_autofree char *source = NULL;
  if (!lw_load_text_attr (r, e, "", "source", false, &source))
    return false;
  problem = source != NULL ? lw_design_source_problem (source) : NULL;
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
  set->data = m;
  set->kind = (LwMeasuredKind) kind;
  set->name = g_steal_pointer (&name);
  set->source = g_steal_pointer (&source);
  set->unstable_poles = (int) n_poles;
  return true;
}

bool
lw_load_read_measured (Reader *r, const xmlNode *e, LwDesign *d)
{
  LwDesignMeasuredSet set = { 0 };
  int analysis = 0;
  if (!read_one (r, e, &set, &analysis))
    return false;
  d->measured = set.data;
  d->measured_kind = set.kind;
  d->measured_analysis = (LwDesignAnalysis) analysis;
  d->measured_source = set.source;
  d->measured_unstable_poles = set.unstable_poles;
  d->measured_name = set.name;
  return true;
}

bool
lw_load_read_more_measured (Reader *r, const xmlNode *e, LwDesign *d, const xmlNode *first)
{
  if (d->n_more_measured + 1 >= LW_DESIGN_MAX_MEASURED)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_LIMIT, ": more than %d measured responses; a "
                         "measured family holds at most %d", LW_DESIGN_MAX_MEASURED - 1,
                         LW_DESIGN_MAX_MEASURED);
  if (xmlHasProp (e, (const xmlChar *) "name") == NULL)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": a further <measured> makes the design "
                         "a measured family, and each of its responses needs a name (attribute "
                         "'name', e.g. name=\"machine 2\")");
  if (d->measured_name == NULL)
    return lw_load_fail (r, first, LW_DESIGN_ERROR_VALUE, ": needs a name (attribute 'name'): "
                         "it is the first of a measured family (another <measured> follows at "
                         "line %ld)", (long) xmlGetLineNo (e));
  LwDesignMeasuredSet set = { 0 };
  if (!read_one (r, e, &set, NULL))
    return false;
  for (size_t i = 0; i <= d->n_more_measured; i++)
    if (strcmp (lw_design_measured_set_name (d, i), set.name) == 0)
      {
        lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": the name '%s' is already given to %s "
                      "<measured>; each response of a measured family has its own", set.name,
                      i == 0 ? "the first" : "an earlier");
        g_free (set.name);
        g_free (set.source);
        lw_measured_free (set.data);
        return false;
      }
  d->more_measured = g_renew (LwDesignMeasuredSet, d->more_measured, d->n_more_measured + 1);
  d->more_measured[d->n_more_measured++] = set;
  return true;
}

size_t
lw_design_n_measured (const LwDesign *d)
{
  return d->measured != NULL ? 1 + d->n_more_measured : 0;
}

const char *
lw_design_measured_set_name (const LwDesign *d, size_t i)
{
  if (i == 0)
    return d->measured_name != NULL ? d->measured_name : "measured";
  return i - 1 < d->n_more_measured ? d->more_measured[i - 1].name : NULL;
}

void
lw_design_clear_more_measured (LwDesign *d)
{
  lw_design_measured_sets_free (d->more_measured, d->n_more_measured);
  d->more_measured = NULL;
  d->n_more_measured = 0;
}

void
lw_design_measured_sets_free (LwDesignMeasuredSet *s, size_t n)
{
  for (size_t i = 0; i < n; i++)
    {
      g_free (s[i].name);
      g_free (s[i].source);
      lw_measured_free (s[i].data);
    }
  if (n > 0)
    g_free (s);
}

LwDesignMeasuredSet *
lw_design_measured_sets_copy (const LwDesignMeasuredSet *s, size_t n)
{
  if (n == 0)
    return NULL;
  LwDesignMeasuredSet *c = g_new0 (LwDesignMeasuredSet, n);
  for (size_t i = 0; i < n; i++)
    {
      c[i] = s[i];
      c[i].name = g_strdup (s[i].name);
      c[i].source = g_strdup (s[i].source);
      c[i].data = lw_measured_copy (s[i].data);
      if (s[i].data != NULL && c[i].data == NULL)
        g_error ("out of memory copying a measured table of a design");
    }
  return c;
}

bool
lw_design_table_equal (const LwMeasured *x, const LwMeasured *y)
{
  if (x == NULL || y == NULL)
    return x == y;
  if (x->n != y->n || (x->coherence == NULL) != (y->coherence == NULL))
    return false;
  for (size_t i = 0; i < x->n; i++)
    if (x->omega_rad_s[i] != y->omega_rad_s[i] || creal (x->h[i]) != creal (y->h[i])
        || cimag (x->h[i]) != cimag (y->h[i])
        || (x->coherence != NULL && x->coherence[i] != y->coherence[i]))
      return false;
  return true;
}

bool
lw_design_measured_sets_equal (const LwDesignMeasuredSet *a, size_t na,
                               const LwDesignMeasuredSet *b, size_t nb)
{
  if (na != nb)
    return false;
  for (size_t i = 0; i < na; i++)
    if (g_strcmp0 (a[i].name, b[i].name) != 0 || g_strcmp0 (a[i].source, b[i].source) != 0
        || a[i].kind != b[i].kind || a[i].unstable_poles != b[i].unstable_poles
        || !lw_design_table_equal (a[i].data, b[i].data))
      return false;
  return true;
}

/* ---- checks before saving ---------------------------------------------------------------- */

/* One measured response's checks before a save; what names it in the message. */
static gboolean
check_one (const LwMeasured *m, LwMeasuredKind kind, const char *source, int poles,
           const char *what, GError **error)
{
  const char *bad = NULL;
  if (lw_design_measured_kind_name (kind) == NULL)
    bad = "its kind is unknown";
  else if (poles < 0 || poles > LW_DESIGN_MAX_UNSTABLE_POLES)
    bad = "its count of unstable open-loop poles is outside 0 to 1000";
  else if (m == NULL)
    bad = "it holds no table";
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
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "%s cannot be saved: %s", what,
                   bad);
      return FALSE;
    }
  const char *problem = source != NULL ? lw_design_source_problem (source) : NULL;
  if (problem != NULL)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "%s's source '%s' cannot be saved: %s", what, source, problem);
      return FALSE;
    }
  return TRUE;
}

gboolean
lw_design_check_measured (const LwDesign *d, GError **error)
{
  if (d->measured == NULL)
    {
      /* the first taken away: the next is written first (lw_design_write_measured) */
      for (size_t i = 0; i < d->n_more_measured; i++)
        {
          const LwDesignMeasuredSet *m = &d->more_measured[i];
          g_autofree char *what = g_strdup_printf ("the measured response '%s'", m->name);
          if (m->name == NULL || lw_design_measured_name_problem (m->name) != NULL)
            return g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "the name of "
                                "measured response %zu cannot be saved", i + 2), FALSE;
          if (!check_one (m->data, m->kind, m->source, m->unstable_poles, what, error))
            return FALSE;
        }
      return TRUE;
    }
  if (lw_design_analysis_name (d->measured_analysis) == NULL)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "the measured response cannot "
                   "be saved: its analysis choice is unknown");
      return FALSE;
    }
  if (!check_one (d->measured, d->measured_kind, d->measured_source, d->measured_unstable_poles,
                  "the measured response", error))
    return FALSE;
  if (d->n_more_measured + 1 > LW_DESIGN_MAX_MEASURED)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_LIMIT, "%zu measured responses; a "
                   "measured family holds at most %d", d->n_more_measured + 1,
                   LW_DESIGN_MAX_MEASURED);
      return FALSE;
    }
  for (size_t i = 0; i <= d->n_more_measured; i++)
    {
      const char *name = i == 0 ? d->measured_name : d->more_measured[i - 1].name;
      const char *problem = name == NULL ? (d->n_more_measured > 0 ? "it has none (each "
                                            "response of a measured family needs one)" : NULL)
                                         : lw_design_measured_name_problem (name);
      for (size_t j = 0; problem == NULL && name != NULL && j < i; j++)
        if (strcmp (lw_design_measured_set_name (d, j), name) == 0)
          problem = "an earlier measured response has it too";
      if (problem != NULL)
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "the name%s%s%s of "
                       "measured response %zu cannot be saved: %s", name != NULL ? " '" : "",
                       name != NULL ? name : "", name != NULL ? "'" : "", i + 1, problem);
          return FALSE;
        }
      if (i == 0)
        continue;
      const LwDesignMeasuredSet *m = &d->more_measured[i - 1];
      g_autofree char *what = g_strdup_printf ("the measured response '%s'", m->name);
      if (!check_one (m->data, m->kind, m->source, m->unstable_poles, what, error))
        return FALSE;
    }
  return TRUE;
}

/* ---- the canonical text ------------------------------------------------------------------ */

/* One <measured> element: its opening tag's attributes come from the caller (open, written
 * before), then `open_loop_unstable_poles=…>`, a line break, the header, one row per point
 * (numbers in the shortest text that reads back exactly), then `  </measured>`. */
static void
write_table (GString *o, const LwMeasured *m, int poles)
{
  g_string_append_printf (o, " open_loop_unstable_poles=\"%d\">\n", poles);
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

/* `  <measured [name=…] kind=… [analysis=…] [source=…] open_loop_unstable_poles=…>` and its
 * table (analysis NULL: left out, a further response's). */
static void
write_one (GString *o, const char *name, LwMeasuredKind kind, const char *analysis,
           const char *source, const LwMeasured *m, int poles,
           void (*attr_text) (GString *, const char *, const char *))
{
  g_string_append (o, "  <measured");
  if (name != NULL)
    attr_text (o, "name", name);
  attr_text (o, "kind", lw_design_measured_kind_name (kind));
  if (analysis != NULL)
    attr_text (o, "analysis", analysis);
  if (source != NULL)
    attr_text (o, "source", source);
  write_table (o, m, poles);
}

/* The first <measured> with the design's analysis choice, then each further response of a
 * measured family with its own name, kind, source and count. A family whose first response
 * was taken away (the window's Remove) is written with its next one first. attr_text writes
 * an escaped attribute. */
void
lw_design_write_measured (GString *o, const LwDesign *d,
                          void (*attr_text) (GString *, const char *, const char *))
{
  size_t from = 0;
  if (d->measured != NULL)
    /* without a model the analysis is the data's, whatever the field says (a plant cleared
     * in the window leaves it as it was) */
    write_one (o, d->measured_name, d->measured_kind,
               lw_design_analysis_name (lw_design_analysis_on_data (d) ? LW_DESIGN_ANALYSIS_DATA
                                                                       : LW_DESIGN_ANALYSIS_MODEL),
               d->measured_source, d->measured, d->measured_unstable_poles, attr_text);
  else if (d->n_more_measured > 0)
    {
      const LwDesignMeasuredSet *s = &d->more_measured[0];
      write_one (o, s->name, s->kind, lw_design_has_model (d) ? "model" : "data", s->source,
                 s->data, s->unstable_poles, attr_text);
      from = 1;
    }
  for (size_t i = from; i < d->n_more_measured; i++)
    {
      const LwDesignMeasuredSet *s = &d->more_measured[i];
      write_one (o, s->name, s->kind, NULL, s->source, s->data, s->unstable_poles, attr_text);
    }
}
