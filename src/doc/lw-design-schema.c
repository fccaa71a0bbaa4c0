/* lw-design-schema.c — the RELAX NG schema check of a design document
 * (data/loopwright-design.rng), its message replaced by the reader's where that names more.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-design-load-private.h"

/* ---- schema ------------------------------------------------------------------------------ */

static void
on_schema_error (void *data, xmlErrorPtr e)
{
  SchemaError *s = data;
  if (e == NULL || s->message != NULL)
    return;
  s->message = lw_load_trimmed_message (e->message);
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
int
lw_load_validate_schema (xmlDocPtr doc, SchemaError *out)
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
