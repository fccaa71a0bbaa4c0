/* lw-design-load.c — reading design documents, hardened (see lw-design.h).
 *
 * Order of the checks: size; the XML parse with no network, no DTD and no entity expansion,
 * stopped at once by a DOCTYPE or by the depth, element and stage limits (SAX hooks); the
 * root element, its namespace and its version; the RELAX NG schema; then every element and
 * value, read into an LwDesign.  The last step also knows every element and attribute the
 * schema allows, so when the schema refuses a document its message can be replaced by the
 * reader's, which names the attribute and what was expected.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <libxml/parser.h>
#include <libxml/parserInternals.h>
#include <libxml/relaxng.h>
#include <libxml/tree.h>

#include "lw-design-private.h"
#include "lw-doc-resources.h"
#include "lw-expr.h"
#include "lw-number.h"

/* ---- parse state ------------------------------------------------------------------------ */

typedef enum
{
  STOP_NONE = 0,
  STOP_DOCTYPE,
  STOP_DEPTH,
  STOP_ELEMENTS,
  STOP_STAGES
} StopReason;

typedef struct
{
  int depth;
  long elements;
  bool in_variant;          /* inside <variant> at depth 3 */
  long stages;              /* children of the current variant */
  StopReason stop;
  int stop_line;
  char *first_error;        /* first XML error message (trimmed) */
  int first_error_line;
  startElementNsSAX2Func start_element;
  endElementNsSAX2Func end_element;
} ParseState;

static ParseState *
state_of (void *ctx)
{
  return ((xmlParserCtxtPtr) ctx)->_private;
}

static int
ctxt_line (xmlParserCtxtPtr ctxt)
{
  return ctxt->input != NULL ? ctxt->input->line : 0;
}

static void
stop (xmlParserCtxtPtr ctxt, StopReason why)
{
  ParseState *st = ctxt->_private;
  if (st->stop == STOP_NONE)
    {
      st->stop = why;
      st->stop_line = ctxt_line (ctxt);
    }
  xmlStopParser (ctxt);
}

static void
on_internal_subset (void *ctx, const xmlChar *name, const xmlChar *external_id,
                    const xmlChar *system_id)
{
  stop (ctx, STOP_DOCTYPE);
}

static void
on_start_element (void *ctx, const xmlChar *localname, const xmlChar *prefix,
                  const xmlChar *uri, int nb_namespaces, const xmlChar **namespaces,
                  int nb_attributes, int nb_defaulted, const xmlChar **attributes)
{
  xmlParserCtxtPtr ctxt = ctx;
  ParseState *st = state_of (ctx);
  st->depth++;
  st->elements++;
  if (st->depth > LW_DESIGN_MAX_DEPTH)
    {
      stop (ctxt, STOP_DEPTH);
      return;
    }
  if (st->elements > LW_DESIGN_MAX_ELEMENTS)
    {
      stop (ctxt, STOP_ELEMENTS);
      return;
    }
  if (st->depth == 3)
    {
      st->in_variant = strcmp ((const char *) localname, "variant") == 0;
      st->stages = 0;
    }
  else if (st->depth == 4 && st->in_variant && ++st->stages > LW_DESIGN_MAX_STAGES)
    {
      stop (ctxt, STOP_STAGES);
      return;
    }
  st->start_element (ctx, localname, prefix, uri, nb_namespaces, namespaces, nb_attributes,
                     nb_defaulted, attributes);
}

static void
on_end_element (void *ctx, const xmlChar *localname, const xmlChar *prefix, const xmlChar *uri)
{
  ParseState *st = state_of (ctx);
  if (st->depth == 3)
    st->in_variant = false;
  st->depth--;
  st->end_element (ctx, localname, prefix, uri);
}

static char *
trimmed_message (const char *m)
{
  char *s = g_strdup (m != NULL ? m : "unknown error");
  return g_strstrip (s);
}

static void
on_xml_error (void *ctx, xmlErrorPtr e)
{
  ParseState *st = state_of (ctx);
  if (e == NULL || e->level < XML_ERR_ERROR || st->first_error != NULL)
    return;
  st->first_error = trimmed_message (e->message);
  st->first_error_line = e->line;
}

/* ---- errors ------------------------------------------------------------------------------ */

typedef struct
{
  const char *name;         /* file name for messages */
  GError *error;            /* first error of the reader */
  int line;                 /* its line */
} Reader;

static bool fail (Reader *r, const xmlNode *node, LwDesignError code, const char *fmt, ...)
  G_GNUC_PRINTF (4, 5);

static bool
fail (Reader *r, const xmlNode *node, LwDesignError code, const char *fmt, ...)
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

static bool
is_element (const xmlNode *n, const char *name)
{
  return n != NULL && n->type == XML_ELEMENT_NODE && strcmp ((const char *) n->name, name) == 0;
}

static bool
is_blank (const xmlChar *s)
{
  for (; s != NULL && *s != '\0'; s++)
    if (*s != ' ' && *s != '\t' && *s != '\n' && *s != '\r')
      return false;
  return true;
}

/* The next element child at or after n; non-blank text between elements is an error. */
static const xmlNode *
next_element (Reader *r, const xmlNode *parent, const xmlNode *n)
{
  for (; n != NULL; n = n->next)
    {
      if (n->type == XML_ELEMENT_NODE)
        {
          const char *href = n->ns != NULL ? (const char *) n->ns->href : NULL;
          if (href == NULL || strcmp (href, LW_DESIGN_NAMESPACE) != 0)
            {
              fail (r, n, LW_DESIGN_ERROR_SCHEMA, ": is in %s%s%s; every element of a design "
                    "document is in the namespace '%s'", href != NULL ? "the namespace '" : "no "
                    "namespace", href != NULL ? href : "", href != NULL ? "'" : "",
                    LW_DESIGN_NAMESPACE);
              return NULL;
            }
          return n;
        }
      if ((n->type == XML_TEXT_NODE || n->type == XML_CDATA_SECTION_NODE)
          && !is_blank (n->content))
        {
          fail (r, parent, LW_DESIGN_ERROR_SCHEMA, ": text is not allowed here (line %d), only "
                "elements", (int) xmlGetLineNo (n));
          return NULL;
        }
      if (n->type == XML_ENTITY_REF_NODE)
        {
          fail (r, parent, LW_DESIGN_ERROR_REFUSED, ": entity references are not allowed");
          return NULL;
        }
    }
  return NULL;
}

/* The text of an element that may hold text only (NULL after an error). */
static char *
element_text (Reader *r, const xmlNode *e)
{
  GString *s = g_string_new (NULL);
  for (const xmlNode *n = e->children; n != NULL; n = n->next)
    {
      if (n->type == XML_TEXT_NODE || n->type == XML_CDATA_SECTION_NODE)
        g_string_append (s, (const char *) n->content);
      else if (n->type == XML_ELEMENT_NODE)
        {
          fail (r, e, LW_DESIGN_ERROR_SCHEMA, ": holds text only, found the element <%s>",
                (const char *) n->name);
          g_string_free (s, TRUE);
          return NULL;
        }
      else if (n->type == XML_ENTITY_REF_NODE)
        {
          fail (r, e, LW_DESIGN_ERROR_REFUSED, ": entity references are not allowed");
          g_string_free (s, TRUE);
          return NULL;
        }
    }
  return g_string_free (s, FALSE);
}

/* Refuses attributes other than those in allowed (NULL-terminated) and attributes in a
 * namespace. */
static bool
check_attributes (Reader *r, const xmlNode *e, const char *where, const char *const *allowed)
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
          return fail (r, e, LW_DESIGN_ERROR_SCHEMA, "%s: unknown attribute '%s'%s%s%s%s", where,
                       (const char *) a->name, allowed[0] != NULL ? "; expected '" : "",
                       allowed[0] != NULL ? list : "", allowed[0] != NULL ? "'" : "",
                       allowed[0] == NULL ? " (this element takes none)" : "");
        }
    }
  return true;
}

/* An attribute value (g_free) or NULL when absent. */
static char *
attribute (const xmlNode *e, const char *name)
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
static bool
parse_whole_text (const char *text, long long lo, long long hi, long long *out)
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
static bool
number_attr (Reader *r, const xmlNode *e, const char *where, const char *name, LwNumRule rule,
             bool required, double *out, bool *present)
{
  g_autofree char *text = attribute (e, name);
  if (present != NULL)
    *present = text != NULL;
  if (text == NULL)
    {
      if (!required)
        return true;
      return fail (r, e, LW_DESIGN_ERROR_SCHEMA, "%s: attribute '%s' is required (%s)", where,
                   name, lw_doc_rule_phrase (rule));
    }
  double v = 0.0;
  long long w = 0;
  bool read = rule == LW_NUM_COUNT ? parse_whole_text (text, 1, LW_STAGE_MAX_COUNT, &w)
                                   : parse_number_text (text, &v);
  if (rule == LW_NUM_COUNT)
    v = (double) w;
  if (!read || !lw_doc_rule_ok (rule, v))
    return fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: attribute '%s' must be %s, got '%s'", where,
                 name, lw_doc_rule_phrase (rule), text);
  *out = v;
  return true;
}

/* A string attribute that must be valid text (required or optional). */
static bool
text_attr (Reader *r, const xmlNode *e, const char *where, const char *name, bool required,
           char **out)
{
  *out = attribute (e, name);
  if (*out == NULL)
    {
      if (!required)
        return true;
      return fail (r, e, LW_DESIGN_ERROR_SCHEMA, "%s: attribute '%s' is required", where, name);
    }
  const char *problem = lw_design_text_problem (*out);
  if (problem != NULL)
    return fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: attribute '%s': %s", where, name, problem);
  return true;
}

static bool
no_children (Reader *r, const xmlNode *e, const char *where)
{
  for (const xmlNode *n = e->children; n != NULL; n = n->next)
    if (n->type == XML_ELEMENT_NODE
        || ((n->type == XML_TEXT_NODE || n->type == XML_CDATA_SECTION_NODE)
            && !is_blank (n->content))
        || n->type == XML_ENTITY_REF_NODE)
      return fail (r, e, LW_DESIGN_ERROR_SCHEMA, "%s: must be empty (attributes only)", where);
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

static bool
check_plant (Reader *r, const xmlNode *e, const char *text)
{
  LwModel *m = NULL;
  LwError err;
  lw_error_clear (&err);
  LwStatus st = lw_expr_parse_proper (text, LW_DOMAIN_S, 0.0, &m, &err);
  lw_model_free (m);
  if (st == LW_OK)
    return true;
  if (st == LW_ERR_NOMEM || st == LW_ERR_NUMERIC)
    return fail (r, e, LW_DESIGN_ERROR_VALUE, ": the expression could not be read: %s",
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

/* ---- elements ---------------------------------------------------------------------------- */

static const LwDocReqKind *
req_kind_by_element (const char *name)
{
  for (size_t i = 0; i < lw_doc_n_req_kinds; i++)
    if (strcmp (lw_doc_req_kinds[i].element, name) == 0)
      return &lw_doc_req_kinds[i];
  return NULL;
}

static char *
stage_element_list (void)
{
  GString *s = g_string_new (NULL);
  for (size_t i = 0; i < lw_stage_kind_count (); i++)
    g_string_append_printf (s, "%s<%s>", i == 0 ? "" : ", ",
                            lw_stage_kind_info ((LwStageKind) i)->name);
  return g_string_free (s, FALSE);
}

static char *
req_element_list (void)
{
  GString *s = g_string_new (NULL);
  for (size_t i = 0; i < lw_doc_n_req_kinds; i++)
    g_string_append_printf (s, "%s<%s>", i == 0 ? "" : ", ", lw_doc_req_kinds[i].element);
  return g_string_free (s, FALSE);
}

static bool
read_stage (Reader *r, const xmlNode *e, const LwDesignVariant *v, size_t index, LwStage *out)
{
  const LwStageKindInfo *k = lw_stage_kind_by_name ((const char *) e->name);
  if (k == NULL)
    {
      g_autofree char *list = stage_element_list ();
      return fail (r, e, LW_DESIGN_ERROR_SCHEMA, " in variant '%s': not a stage; expected one "
                   "of %s", v->name, list);
    }
  memset (out, 0, sizeof *out);
  out->kind = k->kind;
  out->enabled = true;

  g_autofree char *label = attribute (e, "label");
  g_autofree char *where = NULL;
  if (label != NULL && label[0] != '\0')
    where = g_strdup_printf (" in stage '%s' of variant '%s'", label, v->name);
  else
    where = g_strdup_printf (" (stage %zu of variant '%s')", index + 1, v->name);

  const char *allowed[LW_STAGE_MAX_STORED + 3] = { "label", "enabled" };
  for (size_t i = 0; i < k->n_params; i++)
    allowed[2 + i] = k->params[i].name;
  allowed[2 + k->n_params] = NULL;
  if (!check_attributes (r, e, where, allowed) || !no_children (r, e, where))
    return false;

  if (label != NULL)
    {
      const char *problem = lw_design_text_problem (label);
      if (problem != NULL)
        return fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: attribute 'label': %s", where, problem);
      if (strlen (label) >= LW_STAGE_LABEL_MAX)
        return fail (r, e, LW_DESIGN_ERROR_VALUE,
                     "%s: attribute 'label' must be at most %d bytes, it has %zu", where,
                     LW_STAGE_LABEL_MAX - 1, strlen (label));
      memcpy (out->label, label, strlen (label) + 1);
    }
  g_autofree char *enabled = attribute (e, "enabled");
  if (enabled != NULL)
    {
      if (strcmp (enabled, "true") == 0)
        out->enabled = true;
      else if (strcmp (enabled, "false") == 0)
        out->enabled = false;
      else
        return fail (r, e, LW_DESIGN_ERROR_VALUE,
                     "%s: attribute 'enabled' must be 'true' or 'false', got '%s'", where,
                     enabled);
    }
  for (size_t i = 0; i < k->n_params; i++)
    {
      double value = 0.0;
      if (!number_attr (r, e, where, k->params[i].name, (LwNumRule) k->params[i].rule,
                        true, &value, NULL))
        return false;
      lw_stage_param_set (out, i, value);
    }
  LwError err;
  lw_error_clear (&err);
  if (lw_stage_check (out, &err) != LW_OK)
    {
      /* the core names the stage as "stage 'NAME': "; the location says that already */
      const char *msg = err.message;
      if (g_str_has_prefix (msg, "stage '") && strstr (msg, "': ") != NULL)
        msg = strstr (msg, "': ") + 3;
      return fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: %s", where, msg);
    }
  return true;
}

static bool
read_variant (Reader *r, const xmlNode *e, LwDesign *d)
{
  static const char *const allowed[] = { "name", "period_s", NULL };
  if (!check_attributes (r, e, "", allowed))
    return false;
  g_autofree char *name = NULL;
  if (!text_attr (r, e, "", "name", true, &name))
    return false;
  double period_s = 0.0;
  bool has_period = false;
  g_autofree char *where = g_strdup_printf (" '%s'", name);
  if (!number_attr (r, e, where, "period_s", LW_NUM_PERIOD, false, &period_s, &has_period))
    return false;
  if (has_period && !lw_dead_time_ok (d->dead_time_s, period_s))
    return fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: at its attribute 'period_s' (%g s) the "
                 "plant's dead time of %g s is %.6g sample periods, more than the limit of %.0f",
                 where, period_s, d->dead_time_s,
                 d->dead_time_s / period_s, LW_DEAD_TIME_MAX_SAMPLES);
  if (name[0] == '\0')
    return fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute 'name' must not be empty");
  if (lw_design_find_variant (d, name) >= 0)
    return fail (r, e, LW_DESIGN_ERROR_VALUE, ": a variant named '%s' already exists; names "
                 "must be unique", name);
  if (d->n_variants >= LW_DESIGN_MAX_VARIANTS)
    return fail (r, e, LW_DESIGN_ERROR_LIMIT, ": more than %d variants",
                 LW_DESIGN_MAX_VARIANTS);
  LwDesignVariant *v = lw_design_add_variant (d, name);
  v->has_period = has_period;
  v->period_s = has_period ? period_s : 0.0;
  const xmlNode *c = next_element (r, e, e->children);
  if (r->error != NULL)
    return false;
  if (is_element (c, "notes"))
    {
      v->notes = element_text (r, c);
      if (v->notes == NULL)
        return false;
      const char *problem = lw_design_text_problem (v->notes);
      if (problem != NULL)
        return fail (r, c, LW_DESIGN_ERROR_VALUE, ": %s", problem);
      c = next_element (r, e, c->next);
    }
  for (; c != NULL; c = next_element (r, e, c->next))
    {
      if (v->n_stages >= LW_DESIGN_MAX_STAGES)
        return fail (r, c, LW_DESIGN_ERROR_LIMIT, ": variant '%s' has more than %d stages",
                     v->name, LW_DESIGN_MAX_STAGES);
      LwStage s;
      if (!read_stage (r, c, v, v->n_stages, &s))
        return false;
      lw_design_variant_add_stage (v, &s);
    }
  return r->error == NULL;
}

static bool
read_requirement (Reader *r, const xmlNode *e, LwDesign *d)
{
  const LwDocReqKind *k = req_kind_by_element ((const char *) e->name);
  if (k == NULL)
    {
      g_autofree char *list = req_element_list ();
      return fail (r, e, LW_DESIGN_ERROR_SCHEMA, ": not a requirement; expected one of %s", list);
    }
  if (d->n_requirements >= LW_DESIGN_MAX_REQUIREMENTS)
    return fail (r, e, LW_DESIGN_ERROR_LIMIT, ": more than %d requirements",
                 LW_DESIGN_MAX_REQUIREMENTS);
  const char *allowed[] = { "name", k->limit_attr, k->limit_hi_attr, NULL };
  if (!check_attributes (r, e, "", allowed) || !no_children (r, e, ""))
    return false;
  g_autofree char *name = NULL;
  if (!text_attr (r, e, "", "name", false, &name))
    return false;
  LwRequirement q = { .kind = k->kind, .limit = 0.0, .limit_hi = 0.0 };
  if (!number_attr (r, e, "", k->limit_attr, LW_NUM_FINITE, true, &q.limit, NULL))
    return false;
  if (k->limit_hi_attr != NULL
      && !number_attr (r, e, "", k->limit_hi_attr, LW_NUM_FINITE, true, &q.limit_hi, NULL))
    return false;
  LwError err;
  lw_error_clear (&err);
  if (lw_requirement_check (&q, &err) != LW_OK)
    return fail (r, e, LW_DESIGN_ERROR_VALUE, "%s%s%s: %s", name != NULL ? " '" : "",
                 name != NULL ? name : "", name != NULL ? "'" : "", err.message);
  lw_design_add_requirement (d, name, &q);
  return true;
}

static bool
read_view (Reader *r, const xmlNode *e, LwDesign *d)
{
  static const char *const allowed[] = { "from_rad_s", "to_rad_s", "shows", NULL };
  if (!check_attributes (r, e, "", allowed) || !no_children (r, e, ""))
    return false;
  bool has_from = false, has_to = false;
  if (!number_attr (r, e, "", "from_rad_s", LW_NUM_POSITIVE, false, &d->range_from_rad_s,
                    &has_from)
      || !number_attr (r, e, "", "to_rad_s", LW_NUM_POSITIVE, false, &d->range_to_rad_s, &has_to))
    return false;
  if (has_from != has_to)
    return fail (r, e, LW_DESIGN_ERROR_VALUE, ": attributes 'from_rad_s' and 'to_rad_s' go "
                 "together; give both or neither");
  if (has_from && !(d->range_from_rad_s < d->range_to_rad_s))
    return fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute 'from_rad_s' must be below "
                 "'to_rad_s'");
  d->has_range = has_from;
  if (!d->has_range)
    d->range_from_rad_s = d->range_to_rad_s = 0.0;
  g_autofree char *shows = attribute (e, "shows");
  if (shows != NULL)
    {
      /* names as text: the renderer, above this layer, knows which views exist (lw-design.h) */
      g_auto (GStrv) words = g_strsplit_set (shows, " \t\n\r", -1);
      g_autoptr (GPtrArray) names = g_ptr_array_new_with_free_func (g_free);
      for (size_t i = 0; words[i] != NULL; i++)
        {
          if (words[i][0] == '\0')
            continue;
          const char *problem = lw_design_view_name_problem (words[i]);
          if (problem != NULL)
            return fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute 'shows' has a bad view name "
                         "'%s': %s", words[i], problem);
          gboolean again = FALSE;
          for (guint j = 0; j < names->len && !again; j++)
            again = strcmp (names->pdata[j], words[i]) == 0;
          if (!again)   /* a name given twice counts once */
            g_ptr_array_add (names, g_strdup (words[i]));
        }
      if (names->len > 0)
        {
          g_ptr_array_add (names, NULL);
          g_strfreev (d->views);
          d->views = (char **) g_ptr_array_free (g_steal_pointer (&names), FALSE);
        }
    }
  return true;
}

static bool
read_string_element (Reader *r, const xmlNode *e, char **out)
{
  static const char *const none[] = { NULL };
  if (!check_attributes (r, e, "", none))
    return false;
  *out = element_text (r, e);
  if (*out == NULL)
    return false;
  const char *problem = lw_design_text_problem (*out);
  if (problem != NULL)
    return fail (r, e, LW_DESIGN_ERROR_VALUE, ": %s", problem);
  return true;
}

static bool
missing (Reader *r, const xmlNode *parent, const xmlNode *at, const char *name,
         const char *after)
{
  if (at != NULL)
    return fail (r, at, LW_DESIGN_ERROR_SCHEMA, ": unexpected here; expected <%s>%s%s",
                 name, after != NULL ? " after " : "", after != NULL ? after : "");
  return fail (r, parent, LW_DESIGN_ERROR_SCHEMA, ": the required element <%s> is missing", name);
}

static LwDesign *
read_design (Reader *r, const xmlNode *root)
{
  g_autoptr (LwDesign) d = g_new0 (LwDesign, 1);
  d->hold = LW_HOLD_ZERO_ORDER;
  d->compute_delay = 1;

  static const char *const root_attrs[] = { "version", NULL };
  if (!check_attributes (r, root, "", root_attrs))
    return NULL;

  const xmlNode *c = next_element (r, root, root->children);
  if (r->error != NULL)
    return NULL;
  if (!is_element (c, "title"))
    return missing (r, root, c, "title", "the start of <design>"), NULL;
  if (!read_string_element (r, c, &d->title))
    return NULL;
  c = next_element (r, root, c->next);
  if (is_element (c, "author"))
    {
      if (!read_string_element (r, c, &d->author))
        return NULL;
      c = next_element (r, root, c->next);
    }
  if (is_element (c, "notes"))
    {
      if (!read_string_element (r, c, &d->notes))
        return NULL;
      c = next_element (r, root, c->next);
    }
  if (r->error != NULL)
    return NULL;

  /* <plant dead_time_s="…">expression</plant> */
  if (!is_element (c, "plant"))
    return missing (r, root, c, "plant", "<title>, <author> and <notes>"), NULL;
  static const char *const plant_attrs[] = { "dead_time_s", NULL };
  const xmlNode *plant_el = c;
  if (!check_attributes (r, c, "", plant_attrs)
      || !number_attr (r, c, "", "dead_time_s", LW_NUM_NONNEGATIVE, false, &d->dead_time_s,
                       NULL))
    return NULL;
  d->dead_time_s += 0.0;   /* -0 becomes +0 */
  d->plant = element_text (r, c);
  if (d->plant == NULL)
    return NULL;
  const char *problem = lw_design_text_problem (d->plant);
  if (problem != NULL)
    return fail (r, c, LW_DESIGN_ERROR_VALUE, ": %s", problem), NULL;
  if (is_blank ((const xmlChar *) d->plant))
    return fail (r, c, LW_DESIGN_ERROR_VALUE, ": the plant expression is empty; expected a "
                 "proper rational expression in s, e.g. 40/(s*(s+8))"), NULL;
  if (!check_plant (r, c, d->plant))
    return NULL;
  c = next_element (r, root, c->next);
  if (r->error != NULL)
    return NULL;

  /* <sampling period_s="…" hold="zero-order" compute_delay_samples="…"/> */
  if (!is_element (c, "sampling"))
    return missing (r, root, c, "sampling", "<plant>"), NULL;
  static const char *const sampling_attrs[] = { "period_s", "hold", "compute_delay_samples",
                                                NULL };
  if (!check_attributes (r, c, "", sampling_attrs) || !no_children (r, c, "")
      || !number_attr (r, c, "", "period_s", LW_NUM_PERIOD, true, &d->period_s, NULL))
    return NULL;
  if (!lw_dead_time_ok (d->dead_time_s, d->period_s))
    return fail (r, plant_el, LW_DESIGN_ERROR_VALUE, ": attribute 'dead_time_s' (%g s) is %.6g "
                 "sample periods of %g s (<sampling> at line %ld), more than the limit of %.0f",
                 d->dead_time_s, d->dead_time_s / d->period_s, d->period_s,
                 (long) xmlGetLineNo (c), LW_DEAD_TIME_MAX_SAMPLES), NULL;
  g_autofree char *hold = attribute (c, "hold");
  if (hold != NULL && strcmp (hold, "zero-order") != 0)
    return fail (r, c, LW_DESIGN_ERROR_VALUE, ": attribute 'hold' must be 'zero-order' (the "
                 "only hold there is), got '%s'", hold), NULL;
  g_autofree char *delay = attribute (c, "compute_delay_samples");
  if (delay != NULL)
    {
      /* a whole number, as --compute-delay reads it */
      long long n = -1;
      if (!parse_whole_text (delay, 0, LW_DESIGN_MAX_COMPUTE_DELAY, &n))
        return fail (r, c, LW_DESIGN_ERROR_VALUE, ": attribute 'compute_delay_samples' must be "
                     "a whole number from 0 to %d, got '%s'", LW_DESIGN_MAX_COMPUTE_DELAY,
                     delay), NULL;
      d->compute_delay = (int) n;
    }
  c = next_element (r, root, c->next);
  if (r->error != NULL)
    return NULL;

  if (is_element (c, "requirements"))
    {
      static const char *const none[] = { NULL };
      if (!check_attributes (r, c, "", none))
        return NULL;
      for (const xmlNode *q = next_element (r, c, c->children); q != NULL;
           q = next_element (r, c, q->next))
        if (!read_requirement (r, q, d))
          return NULL;
      if (r->error != NULL)
        return NULL;
      c = next_element (r, root, c->next);
      if (r->error != NULL)
        return NULL;
    }

  if (!is_element (c, "variants"))
    return missing (r, root, c, "variants", "<sampling> and <requirements>"), NULL;
  static const char *const variants_attrs[] = { "active", NULL };
  if (!check_attributes (r, c, "", variants_attrs))
    return NULL;
  g_autofree char *active = attribute (c, "active");
  const xmlNode *vs = c;
  for (const xmlNode *v = next_element (r, c, c->children); v != NULL;
       v = next_element (r, c, v->next))
    {
      if (!is_element (v, "variant"))
        return fail (r, v, LW_DESIGN_ERROR_SCHEMA, ": unexpected in <variants>; expected "
                     "<variant>"), NULL;
      if (!read_variant (r, v, d))
        return NULL;
    }
  if (r->error != NULL)
    return NULL;
  if (d->n_variants == 0)
    return fail (r, vs, LW_DESIGN_ERROR_SCHEMA, ": needs at least one <variant>"), NULL;
  if (active != NULL)
    {
      gssize i = lw_design_find_variant (d, active);
      if (i < 0)
        return fail (r, vs, LW_DESIGN_ERROR_VALUE, ": attribute 'active' names no variant: '%s'",
                     active), NULL;
      d->active = (size_t) i;
    }
  c = next_element (r, root, c->next);
  if (r->error != NULL)
    return NULL;

  if (is_element (c, "view"))
    {
      if (!read_view (r, c, d))
        return NULL;
      c = next_element (r, root, c->next);
      if (r->error != NULL)
        return NULL;
    }
  if (c != NULL)
    return fail (r, c, LW_DESIGN_ERROR_SCHEMA, ": unexpected element in <design> (after "
                 "<variants> only <view> may follow)"), NULL;
  return g_steal_pointer (&d);
}

/* ---- schema ------------------------------------------------------------------------------ */

typedef struct
{
  char *message;
  int line;
  char *element;
} SchemaError;

static void
on_schema_error (void *data, xmlErrorPtr e)
{
  SchemaError *s = data;
  if (e == NULL || s->message != NULL)
    return;
  s->message = trimmed_message (e->message);
  const xmlNode *n = e->node;
  s->line = n != NULL ? (int) xmlGetLineNo (n) : e->line;
  if (n != NULL && n->type == XML_ELEMENT_NODE)
    s->element = g_strdup ((const char *) n->name);
}

const char *
lw_doc_schema_text (size_t *len)
{
  GBytes *b = g_resource_lookup_data (lw_doc_get_resource (),
                                      "/org/loopwright/doc/loopwright-design.rng",
                                      G_RESOURCE_LOOKUP_FLAGS_NONE, NULL);
  g_assert (b != NULL);
  gsize n = 0;
  const char *data = g_bytes_get_data (b, &n);
  /* The resource data is static and NUL-terminated; the GBytes only wraps it. */
  g_bytes_unref (b);
  if (len != NULL)
    *len = n;
  return data;
}

/* 0 valid, 1 invalid (*out filled), -1 the schema itself failed (internal). */
static int
validate_schema (xmlDocPtr doc, SchemaError *out)
{
  size_t len = 0;
  const char *text = lw_doc_schema_text (&len);
  SchemaError ignored = { 0 };
  xmlRelaxNGParserCtxtPtr pc = xmlRelaxNGNewMemParserCtxt (text, (int) len);
  if (pc == NULL)
    return -1;
  xmlRelaxNGSetParserStructuredErrors (pc, on_schema_error, &ignored);
  xmlRelaxNGPtr schema = xmlRelaxNGParse (pc);
  xmlRelaxNGFreeParserCtxt (pc);
  g_free (ignored.message);
  g_free (ignored.element);
  if (schema == NULL)
    return -1;
  xmlRelaxNGValidCtxtPtr vc = xmlRelaxNGNewValidCtxt (schema);
  if (vc == NULL)
    {
      xmlRelaxNGFree (schema);
      return -1;
    }
  xmlRelaxNGSetValidStructuredErrors (vc, on_schema_error, out);
  int rc = xmlRelaxNGValidateDoc (vc, doc);
  xmlRelaxNGFreeValidCtxt (vc);
  xmlRelaxNGFree (schema);
  if (rc == 0)
    return 0;
  if (rc > 0)
    {
      if (out->message == NULL)
        out->message = g_strdup ("the document does not match the schema");
      return 1;
    }
  return -1;
}

/* ---- entry points ------------------------------------------------------------------------ */

static const char *
version_problem (const char *v, long *number)
{
  *number = -1;
  if (v == NULL)
    return "missing";
  size_t n = strlen (v);
  if (n == 0 || n > 9)
    return n == 0 ? "empty" : (strspn (v, "0123456789") == n ? "newer" : "bad");
  if (strspn (v, "0123456789") != n)
    return "bad";
  *number = strtol (v, NULL, 10);
  if (*number > LW_DESIGN_VERSION)
    return "newer";
  if (*number != LW_DESIGN_VERSION)
    return "bad";
  return NULL;
}

static LwDesign *
load_doc (Reader *r, xmlDocPtr doc)
{
  const xmlNode *root = xmlDocGetRootElement (doc);
  if (root == NULL)
    return fail (r, NULL, LW_DESIGN_ERROR_FORMAT, "no root element"), NULL;
  const char *href = root->ns != NULL ? (const char *) root->ns->href : NULL;
  if (strcmp ((const char *) root->name, "design") != 0 || href == NULL
      || strcmp (href, LW_DESIGN_NAMESPACE) != 0)
    return fail (r, root, LW_DESIGN_ERROR_FORMAT,
                 ": not a Loopwright design document: the root element must be <design> in "
                 "the namespace '%s', found <%s> in %s%s%s", LW_DESIGN_NAMESPACE,
                 (const char *) root->name, href != NULL ? "the namespace '" : "no namespace",
                 href != NULL ? href : "", href != NULL ? "'" : ""), NULL;

  g_autofree char *version = attribute (root, "version");
  long number = -1;
  const char *vp = version_problem (version, &number);
  if (vp != NULL && strcmp (vp, "newer") == 0)
    return fail (r, root, LW_DESIGN_ERROR_VERSION,
                 ": this document has format version %s, newer than this program reads "
                 "(version %d); open it with a newer Loopwright", version,
                 LW_DESIGN_VERSION), NULL;
  if (vp != NULL)
    return fail (r, root, LW_DESIGN_ERROR_VERSION,
                 ": attribute 'version' must be the format version %d, got %s%s%s",
                 LW_DESIGN_VERSION, version != NULL ? "'" : "nothing", version != NULL ? version : "",
                 version != NULL ? "'" : ""), NULL;

  SchemaError se = { 0 };
  int rc = validate_schema (doc, &se);
  if (rc < 0)
    {
      g_free (se.message);
      g_free (se.element);
      return fail (r, NULL, LW_DESIGN_ERROR_SCHEMA, "internal failure: the schema could not be "
                   "compiled"), NULL;
    }
  LwDesign *d = read_design (r, root);
  if (rc == 0)
    {
      g_free (se.message);
      g_free (se.element);
      return d;
    }
  /* The schema refused the document. The reader's message is more precise when it found a
   * problem at or before the schema's line; otherwise the schema's own message stands. */
  if (d == NULL && r->error != NULL && (se.line <= 0 || r->line <= se.line))
    {
      g_free (se.message);
      g_free (se.element);
      return NULL;
    }
  lw_design_free (d);
  g_clear_error (&r->error);
  if (se.element != NULL)
    g_set_error (&r->error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_SCHEMA,
                 "%s:%d: <%s>: does not match the schema (data/loopwright-design.rng): %s",
                 r->name, se.line, se.element, se.message);
  else
    g_set_error (&r->error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_SCHEMA,
                 "%s:%d: does not match the schema (data/loopwright-design.rng): %s", r->name,
                 se.line, se.message);
  g_free (se.message);
  g_free (se.element);
  return NULL;
}

/* Design documents are UTF-8. A UTF-16 or UTF-32 byte-order mark, or an XML declaration
 * naming another encoding, is refused here: libxml2 would otherwise convert the input, and
 * its conversion errors bypass the parser's error handler (they would be printed). Returns
 * NULL when fine, else the encoding found (static or in buf). */
static const char *
foreign_encoding (const char *data, size_t len, char *buf, size_t size)
{
  const unsigned char *u = (const unsigned char *) data;
  if (len >= 2 && ((u[0] == 0xFE && u[1] == 0xFF) || (u[0] == 0xFF && u[1] == 0xFE)))
    return "UTF-16 or UTF-32 (byte-order mark)";
  if (len >= 4 && u[0] == 0 && u[1] == 0 && u[2] == 0xFE && u[3] == 0xFF)
    return "UTF-32 (byte-order mark)";
  if (len >= 2 && (u[0] == 0 || u[1] == 0))
    return "UTF-16 or UTF-32 (zero bytes)";
  size_t skip = len >= 3 && u[0] == 0xEF && u[1] == 0xBB && u[2] == 0xBF ? 3 : 0;
  if (len - skip < 5 || memcmp (data + skip, "<?xml", 5) != 0)
    return NULL;
  const char *end = memchr (data + skip, '>', len - skip);
  size_t decl_len = end != NULL ? (size_t) (end - data) : len;
  g_autofree char *decl = g_strndup (data + skip, decl_len - skip);
  const char *enc = strstr (decl, "encoding");
  if (enc == NULL)
    return NULL;
  enc += strlen ("encoding");
  while (*enc == ' ' || *enc == '\t' || *enc == '\r' || *enc == '\n' || *enc == '=')
    enc++;
  if (*enc != '"' && *enc != '\'')
    return NULL;   /* malformed: the parser says so */
  char quote = *enc++;
  const char *close = strchr (enc, quote);
  if (close == NULL)
    return NULL;
  g_strlcpy (buf, enc, MIN (size, (size_t) (close - enc) + 1));
  if (g_ascii_strcasecmp (buf, "UTF-8") == 0 || g_ascii_strcasecmp (buf, "UTF8") == 0)
    return NULL;
  return buf;
}

LwDesign *
lw_design_load_data (const char *data, size_t len, const char *name, GError **error)
{
  g_return_val_if_fail (data != NULL || len == 0, NULL);
  if (name == NULL)
    name = "(document)";
  if (len > LW_DESIGN_MAX_BYTES)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_LIMIT,
                   "%s: the document is %zu bytes, more than the limit of %u bytes (8 MiB)",
                   name, len, LW_DESIGN_MAX_BYTES);
      return NULL;
    }
  if (len == 0)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_XML, "%s: the document is empty",
                   name);
      return NULL;
    }

  char enc_buf[64];
  const char *foreign = foreign_encoding (data, len, enc_buf, sizeof enc_buf);
  if (foreign != NULL)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_FORMAT,
                   "%s:1: design documents are UTF-8; this one is in '%s'", name, foreign);
      return NULL;
    }

  xmlParserCtxtPtr ctxt = xmlNewParserCtxt ();
  if (ctxt == NULL)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_IO, "%s: out of memory", name);
      return NULL;
    }
  ParseState st = { 0 };
  st.start_element = ctxt->sax->startElementNs;
  st.end_element = ctxt->sax->endElementNs;
  ctxt->sax->internalSubset = on_internal_subset;
  ctxt->sax->externalSubset = NULL;
  ctxt->sax->startElementNs = on_start_element;
  ctxt->sax->endElementNs = on_end_element;
  ctxt->sax->serror = on_xml_error;
  ctxt->sax->warning = NULL;
  ctxt->_private = &st;

  /* No XML_PARSE_NOENT (entities are not substituted), no DTD loading or validation, no
   * network; BIG_LINES so line numbers past 65535 are right. */
  int options = XML_PARSE_NONET | XML_PARSE_NOCDATA | XML_PARSE_BIG_LINES | XML_PARSE_NOWARNING;
  xmlDocPtr doc = xmlCtxtReadMemory (ctxt, data, (int) len, name, "UTF-8", options);

  Reader r = { .name = name, .error = NULL, .line = 0 };
  LwDesign *d = NULL;
  if (st.stop != STOP_NONE)
    {
      switch (st.stop)
        {
        case STOP_DOCTYPE:
          g_set_error (&r.error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_REFUSED,
                       "%s:%d: a DOCTYPE declaration is not allowed in a design document (no "
                       "DTD, no entity declarations)", name, st.stop_line);
          break;
        case STOP_DEPTH:
          g_set_error (&r.error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_LIMIT,
                       "%s:%d: elements nested more than %d deep; a design document needs 4",
                       name, st.stop_line, LW_DESIGN_MAX_DEPTH);
          break;
        case STOP_ELEMENTS:
          g_set_error (&r.error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_LIMIT,
                       "%s:%d: more than %d elements; the limit of a design document",
                       name, st.stop_line, LW_DESIGN_MAX_ELEMENTS);
          break;
        case STOP_STAGES:
          g_set_error (&r.error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_LIMIT,
                       "%s:%d: a <variant> with more than %d stages; the limit is %d", name,
                       st.stop_line, LW_DESIGN_MAX_STAGES, LW_DESIGN_MAX_STAGES);
          break;
        case STOP_NONE:
          break;
        }
    }
  else if (doc == NULL || !ctxt->wellFormed)
    {
      const char *msg = st.first_error != NULL ? st.first_error : "not well-formed";
      int line = st.first_error_line > 0 ? st.first_error_line : ctxt_line (ctxt);
      /* An undeclared entity reference is the trace of an entity a hostile file expected a
       * DTD to supply; say so plainly. */
      bool entity = st.first_error != NULL && strstr (st.first_error, "Entity") != NULL;
      g_set_error (&r.error, LW_DESIGN_ERROR, entity ? LW_DESIGN_ERROR_REFUSED : LW_DESIGN_ERROR_XML,
                   "%s:%d: %s: %s", name, line,
                   entity ? "entity references other than &lt; &gt; &amp; &quot; &apos; and "
                            "character references are not allowed"
                          : "not well-formed XML",
                   msg);
    }
  else
    d = load_doc (&r, doc);

  if (doc != NULL)
    xmlFreeDoc (doc);
  ctxt->_private = NULL;
  xmlFreeParserCtxt (ctxt);
  g_free (st.first_error);
  if (r.error != NULL)
    {
      lw_design_free (d);
      g_propagate_error (error, r.error);
      return NULL;
    }
  return d;
}

LwDesign *
lw_design_load_file (const char *path, GError **error)
{
  g_return_val_if_fail (path != NULL, NULL);
  /* O_NONBLOCK: opening a FIFO (or a terminal, a tape) for reading would otherwise wait for
   * a writer forever, before fstat could say it is not a regular file. A regular file
   * ignores the flag; it is cleared before reading anyway. */
  int fd = open (path, O_RDONLY | O_CLOEXEC | O_NONBLOCK | O_NOCTTY);
  if (fd < 0)
    {
      int e = errno;
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_IO, "%s: cannot open: %s", path,
                   g_strerror (e));
      return NULL;
    }
  struct stat sb;
  if (fstat (fd, &sb) != 0 || !S_ISREG (sb.st_mode))
    {
      close (fd);
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_IO,
                   "%s: not a regular file (a design document is read from a file, not from "
                   "a pipe, a device or a directory)", path);
      return NULL;
    }
  int fl = fcntl (fd, F_GETFL);
  if (fl != -1)
    (void) fcntl (fd, F_SETFL, fl & ~O_NONBLOCK);
  if ((guint64) sb.st_size > LW_DESIGN_MAX_BYTES)
    {
      close (fd);
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_LIMIT,
                   "%s: the file is %" G_GUINT64_FORMAT " bytes, more than the limit of %u "
                   "bytes (8 MiB)", path, (guint64) sb.st_size, LW_DESIGN_MAX_BYTES);
      return NULL;
    }
  /* Read at most the limit plus one byte: the file may grow while we read. */
  size_t cap = LW_DESIGN_MAX_BYTES + 1;
  size_t want = (size_t) sb.st_size + 1 < cap ? (size_t) sb.st_size + 1 : cap;
  char *buf = g_malloc (want + 1);
  size_t got = 0;
  for (;;)
    {
      if (got == want)
        {
          if (want == cap)
            break;
          want = want * 2 < cap ? want * 2 : cap;
          buf = g_realloc (buf, want + 1);
        }
      ssize_t n = read (fd, buf + got, want - got);
      if (n < 0 && errno == EINTR)
        continue;
      if (n < 0)
        {
          int e = errno;
          close (fd);
          g_free (buf);
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_IO, "%s: cannot read: %s", path,
                       g_strerror (e));
          return NULL;
        }
      if (n == 0)
        break;
      got += (size_t) n;
    }
  close (fd);
  buf[got] = '\0';
  LwDesign *d = lw_design_load_data (buf, got, path, error);
  g_free (buf);
  return d;
}
