/* lw-design-read.c — reading a design document: errors with the line and the element,
 * the attribute readers (numbers by the one number syntax, names, texts), the plant expression.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-design-load-private.h"

/* ---- errors ------------------------------------------------------------------------------ */

bool
lw_load_fail (Reader *r, const xmlNode *node, LwDesignError code, const char *fmt, ...)
{
  if (r->error != NULL)
    return false;
  va_list ap;
  va_start (ap, fmt);
  g_autofree char *msg = g_strdup_vprintf (fmt, ap);
  va_end (ap);
  int line = node != NULL ? (int) xmlGetLineNo (node) : 0;
  r->line = line;
  if (node != NULL)
    g_set_error (&r->error, LW_DESIGN_ERROR, code, "%s:%d: <%s>%s", r->name, line,
                 (const char *) node->name, msg);
  else
    g_set_error (&r->error, LW_DESIGN_ERROR, code, "%s: %s", r->name, msg);
  return false;
}

/* ---- reading helpers --------------------------------------------------------------------- */

bool
lw_load_is_element (const xmlNode *n, const char *name)
{
  return n != NULL && n->type == XML_ELEMENT_NODE && strcmp ((const char *) n->name, name) == 0;
}

bool
lw_load_is_blank (const xmlChar *s)
{
  for (; s != NULL && *s != '\0'; s++)
    if (*s != ' ' && *s != '\t' && *s != '\n' && *s != '\r')
      return false;
  return true;
}

/* The next element child at or after n; non-blank text between elements is an error. */
const xmlNode *
lw_load_next_element (Reader *r, const xmlNode *parent, const xmlNode *n)
{
  for (; n != NULL; n = n->next)
    {
      if (n->type == XML_ELEMENT_NODE)
        {
          const char *href = n->ns != NULL ? (const char *) n->ns->href : NULL;
          if (href == NULL || strcmp (href, LW_DESIGN_NAMESPACE) != 0)
            {
              lw_load_fail (r, n, LW_DESIGN_ERROR_SCHEMA, ": is in %s%s%s; every element of a design "
                    "document is in the namespace '%s'", href != NULL ? "the namespace '" : "no "
                    "namespace", href != NULL ? href : "", href != NULL ? "'" : "",
                    LW_DESIGN_NAMESPACE);
              return NULL;
            }
          return n;
        }
      if ((n->type == XML_TEXT_NODE || n->type == XML_CDATA_SECTION_NODE)
          && !lw_load_is_blank (n->content))
        {
          lw_load_fail (r, parent, LW_DESIGN_ERROR_SCHEMA, ": text is not allowed here (line %d), only "
                "elements", (int) xmlGetLineNo (n));
          return NULL;
        }
      if (n->type == XML_ENTITY_REF_NODE)
        {
          lw_load_fail (r, parent, LW_DESIGN_ERROR_REFUSED, ": entity references are not allowed");
          return NULL;
        }
    }
  return NULL;
}

/* The text of an element that may hold text only (NULL after an error). */
char *
lw_load_element_text (Reader *r, const xmlNode *e)
{
  GString *s = g_string_new (NULL);
  for (const xmlNode *n = e->children; n != NULL; n = n->next)
    {
      if (n->type == XML_TEXT_NODE || n->type == XML_CDATA_SECTION_NODE)
        g_string_append (s, (const char *) n->content);
      else if (n->type == XML_ELEMENT_NODE)
        {
          lw_load_fail (r, e, LW_DESIGN_ERROR_SCHEMA, ": holds text only, found the element <%s>",
                (const char *) n->name);
          g_string_free (s, TRUE);
          return NULL;
        }
      else if (n->type == XML_ENTITY_REF_NODE)
        {
          lw_load_fail (r, e, LW_DESIGN_ERROR_REFUSED, ": entity references are not allowed");
          g_string_free (s, TRUE);
          return NULL;
        }
    }
  return g_string_free (s, FALSE);
}

/* Refuses attributes other than those in allowed (NULL-terminated) and attributes in a
 * namespace. */
bool
lw_load_check_attributes (Reader *r, const xmlNode *e, const char *where, const char *const *allowed)
{
  for (const xmlAttr *a = e->properties; a != NULL; a = a->next)
    {
      bool ok = a->ns == NULL;
      for (size_t i = 0; ok && allowed[i] != NULL; i++)
        if (strcmp ((const char *) a->name, allowed[i]) == 0)
          break;
        else if (allowed[i + 1] == NULL)
          ok = false;
      if (allowed[0] == NULL)
        ok = false;
      if (!ok)
        {
          g_autofree char *list = g_strjoinv ("', '", (char **) allowed);
          return lw_load_fail (r, e, LW_DESIGN_ERROR_SCHEMA, "%s: unknown attribute '%s'%s%s%s%s", where,
                       (const char *) a->name, allowed[0] != NULL ? "; expected '" : "",
                       allowed[0] != NULL ? list : "", allowed[0] != NULL ? "'" : "",
                       allowed[0] == NULL ? " (this element takes none)" : "");
        }
    }
  return true;
}

/* An attribute value (g_free) or NULL when absent. */
char *
lw_load_attribute (const xmlNode *e, const char *name)
{
  xmlChar *v = xmlGetNoNsProp (e, (const xmlChar *) name);
  if (v == NULL)
    return NULL;
  char *s = g_strdup ((const char *) v);
  xmlFree (v);
  return s;
}

/* A number in the one syntax of typed numbers (lw-number.h: no hexadecimal, INF or NaN, no
 * trailing '.'), after removing the white space XML allows around an xsd:double. */
static bool
xml_space (char c)
{
  return c == ' ' || c == '\t' || c == '\n' || c == '\r';
}

static bool
parse_number_text (const char *text, double *out)
{
  const char *p = text;
  while (xml_space (*p))
    p++;
  size_t n = strlen (p);
  while (n > 0 && xml_space (p[n - 1]))
    n--;
  if (n == 0 || n > LW_NUMBER_MAX_CHARS)
    return false;
  char buf[LW_NUMBER_MAX_CHARS + 1];
  memcpy (buf, p, n);
  buf[n] = '\0';
  return lw_number_parse (buf, out) == LW_NUMBER_OK;
}

/* A whole number (sign and digits, xsd:integer) after removing XML's white space. */
bool
lw_load_parse_whole_text (const char *text, long long lo, long long hi, long long *out)
{
  const char *p = text;
  while (xml_space (*p))
    p++;
  size_t n = strlen (p);
  while (n > 0 && xml_space (p[n - 1]))
    n--;
  if (n == 0 || n > LW_NUMBER_MAX_CHARS)
    return false;
  char buf[LW_NUMBER_MAX_CHARS + 1];
  memcpy (buf, p, n);
  buf[n] = '\0';
  return lw_number_parse_whole (buf, lo, hi, out, NULL, NULL) == LW_NUMBER_OK;
}

/* Reads a required (or optional, *present set) number attribute with a rule. */
bool
lw_load_number_attr (Reader *r, const xmlNode *e, const char *where, const char *name, LwNumRule rule,
                     bool required, double *out, bool *present)
{
  g_autofree char *text = lw_load_attribute (e, name);
  if (present != NULL)
    *present = text != NULL;
  if (text == NULL)
    {
      if (!required)
        return true;
      return lw_load_fail (r, e, LW_DESIGN_ERROR_SCHEMA, "%s: attribute '%s' is required (%s)", where,
                   name, lw_doc_rule_phrase (rule));
    }
  double v = 0.0;
  long long w = 0;
  bool read = rule == LW_NUM_COUNT ? lw_load_parse_whole_text (text, 1, LW_STAGE_MAX_COUNT, &w)
                                   : parse_number_text (text, &v);
  if (rule == LW_NUM_COUNT)
    v = (double) w;
  if (!read || !lw_doc_rule_ok (rule, v))
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: attribute '%s' must be %s, got '%s'", where,
                 name, lw_doc_rule_phrase (rule), text);
  *out = v;
  return true;
}

/* A string attribute that must be valid text (required or optional). */
bool
lw_load_text_attr (Reader *r, const xmlNode *e, const char *where, const char *name, bool required,
                   char **out)
{
  *out = lw_load_attribute (e, name);
  if (*out == NULL)
    {
      if (!required)
        return true;
      return lw_load_fail (r, e, LW_DESIGN_ERROR_SCHEMA, "%s: attribute '%s' is required", where, name);
    }
  const char *problem = lw_design_text_problem (*out);
  if (problem != NULL)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: attribute '%s': %s", where, name, problem);
  return true;
}

bool
lw_load_no_children (Reader *r, const xmlNode *e, const char *where)
{
  for (const xmlNode *n = e->children; n != NULL; n = n->next)
    if (n->type == XML_ELEMENT_NODE
        || ((n->type == XML_TEXT_NODE || n->type == XML_CDATA_SECTION_NODE)
            && !lw_load_is_blank (n->content))
        || n->type == XML_ENTITY_REF_NODE)
      return lw_load_fail (r, e, LW_DESIGN_ERROR_SCHEMA, "%s: must be empty (attributes only)", where);
  return true;
}

/* ---- the plant expression ---------------------------------------------------------------- */

static long
chars_before (const char *text, size_t byte_pos)
{
  if (g_utf8_validate (text, (gssize) byte_pos, NULL))
    return g_utf8_strlen (text, (gssize) byte_pos);
  return (long) byte_pos;
}

/* Core messages name 0-based byte offsets as " at position N" or " at N"; here they become
 * 1-based characters. Sets *names_own when one of them is the error's own position. */
static char *
rewrite_positions (const char *msg, const char *text, int position, bool *names_own)
{
  GString *out = g_string_new (NULL);
  size_t len = strlen (text);
  *names_own = false;
  const char *p = msg;
  while (*p != '\0')
    {
      size_t skip = 0;
      if (g_str_has_prefix (p, " at position "))
        skip = strlen (" at position ");
      else if (g_str_has_prefix (p, " at "))
        skip = strlen (" at ");
      if (skip > 0 && g_ascii_isdigit (p[skip]))
        {
          char *end = NULL;
          gint64 n = g_ascii_strtoll (p + skip, &end, 10);
          if (*end != '.' && !g_ascii_isalnum (*end) && n >= 0 && (guint64) n <= len)
            {
              g_string_append_printf (out, " at character %ld",
                                      chars_before (text, (size_t) n) + 1);
              *names_own = *names_own || n == position;
              p = end;
              continue;
            }
        }
      g_string_append_c (out, *p++);
    }
  return g_string_free (out, FALSE);
}

bool
lw_load_check_plant (Reader *r, const xmlNode *e, const LwDesign *d)
{
  const char *text = d->plant;
  LwModel *m = NULL;
  LwError err;
  lw_error_clear (&err);
  LwStatus st = lw_design_plant_parse (d, NULL, &m, &err);
  lw_model_free (m);
  if (st == LW_OK)
    return true;
  if (st == LW_ERR_NOMEM || st == LW_ERR_NUMERIC)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": the expression could not be read: %s",
                 err.message);
  size_t len = strlen (text);
  size_t pos = err.position >= 0 && (size_t) err.position <= len ? (size_t) err.position : 0;
  bool own = false;
  g_autofree char *msg = rewrite_positions (err.message, text, err.position, &own);
  /* the line of the error: the element's line plus the line breaks before the position */
  int extra = 0;
  for (size_t i = 0; i < pos; i++)
    extra += text[i] == '\n';
  long col = chars_before (text, pos) + 1;
  if (r->error != NULL)
    return false;
  int line = (int) xmlGetLineNo (e) + extra;
  r->line = line;
  /* Improperness and the like are reported at position 0 for the whole expression: no
   * character is named then. */
  bool name_char = err.position >= 0 && !own && !(st == LW_ERR_INVALID && err.position == 0);
  g_autofree char *at = name_char ? g_strdup_printf (" (at character %ld of the expression)", col)
                                  : g_strdup ("");
  if (len <= 80)
    g_set_error (&r->error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                 "%s:%d: <plant>: the plant must be a proper rational expression in s ('%s'): "
                 "%s%s", r->name, line, text, msg, at);
  else
    g_set_error (&r->error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                 "%s:%d: <plant>: the plant must be a proper rational expression in s: %s%s",
                 r->name, line, msg, at);
  return false;
}
