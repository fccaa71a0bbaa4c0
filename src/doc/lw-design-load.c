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

#include "lw-design-load-private.h"

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

char *
lw_load_trimmed_message (const char *m)
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
  st->first_error = lw_load_trimmed_message (e->message);
  st->first_error_line = e->line;
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
    return lw_load_fail (r, NULL, LW_DESIGN_ERROR_FORMAT, "no root element"), NULL;
  const char *href = root->ns != NULL ? (const char *) root->ns->href : NULL;
  if (strcmp ((const char *) root->name, "design") != 0 || href == NULL
      || strcmp (href, LW_DESIGN_NAMESPACE) != 0)
    return lw_load_fail (r, root, LW_DESIGN_ERROR_FORMAT,
                 ": not a Loopwright design document: the root element must be <design> in "
                 "the namespace '%s', found <%s> in %s%s%s", LW_DESIGN_NAMESPACE,
                 (const char *) root->name, href != NULL ? "the namespace '" : "no namespace",
                 href != NULL ? href : "", href != NULL ? "'" : ""), NULL;

  g_autofree char *version = lw_load_attribute (root, "version");
  long number = -1;
  const char *vp = version_problem (version, &number);
  if (vp != NULL && strcmp (vp, "newer") == 0)
    return lw_load_fail (r, root, LW_DESIGN_ERROR_VERSION,
                 ": this document has format version %s, newer than this program reads "
                 "(version %d); open it with a newer Loopwright", version,
                 LW_DESIGN_VERSION), NULL;
  if (vp != NULL)
    return lw_load_fail (r, root, LW_DESIGN_ERROR_VERSION,
                 ": attribute 'version' must be the format version %d, got %s%s%s",
                 LW_DESIGN_VERSION, version != NULL ? "'" : "nothing", version != NULL ? version : "",
                 version != NULL ? "'" : ""), NULL;

  SchemaError se = { 0 };
  int rc = lw_load_validate_schema (doc, &se);
  if (rc < 0)
    {
      g_free (se.message);
      g_free (se.element);
      return lw_load_fail (r, NULL, LW_DESIGN_ERROR_SCHEMA, "internal failure: the schema could not be "
                   "compiled"), NULL;
    }
  LwDesign *d = lw_load_read_design (r, root);
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
