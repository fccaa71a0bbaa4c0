/* test-stage-doc.c — stages in documents against the stage-kind table (lw-stage-kinds.h):
 *   * the hand-written schema data/loopwright-design.rng and the table agree: one stage element
 *     per kind, named as the kind, with the kind's parameters as attributes in table order,
 *     counts as whole numbers and the rest as numbers; and the schema compiled into the
 *     program is that file;
 *   * a document with literal values for every kind loads to those values and saves back to
 *     the literal canonical text.
 *
 * Usage: test-stage-doc SOURCE-ROOT
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <string.h>

#include <glib.h>
#include <libxml/parser.h>
#include <libxml/tree.h>

#include "lw-design-private.h"
#include "lw-stage-kinds.h"

static const char *source_root;

#define RNG_NS "http://relaxng.org/ns/structure/1.0"

static bool
is (const xmlNode *n, const char *name)
{
  return n->type == XML_ELEMENT_NODE && n->ns != NULL
         && strcmp ((const char *) n->ns->href, RNG_NS) == 0
         && strcmp ((const char *) n->name, name) == 0;
}

static char *
prop (const xmlNode *n, const char *name)
{
  xmlChar *v = xmlGetProp (n, (const xmlChar *) name);
  char *s = g_strdup ((const char *) v);
  xmlFree (v);
  return s;
}

/* The <element> children of <define name="stage"><choice>. */
static GPtrArray *
schema_stage_elements (xmlDoc *doc)
{
  GPtrArray *out = g_ptr_array_new ();
  for (xmlNode *d = xmlDocGetRootElement (doc)->children; d != NULL; d = d->next)
    {
      if (!is (d, "define"))
        continue;
      g_autofree char *name = prop (d, "name");
      if (strcmp (name, "stage") != 0)
        continue;
      for (xmlNode *c = d->children; c != NULL; c = c->next)
        if (is (c, "choice"))
          for (xmlNode *e = c->children; e != NULL; e = e->next)
            if (is (e, "element"))
              g_ptr_array_add (out, e);
    }
  return out;
}

static void
test_schema_agrees (void **state)
{
  (void) state;
  g_autofree char *path = g_build_filename (source_root, "data", "loopwright-design.rng", NULL);
  g_autofree char *file = NULL;
  gsize file_len = 0;
  assert_true (g_file_get_contents (path, &file, &file_len, NULL));
  size_t built_len = 0;
  const char *built = lw_doc_schema_text (&built_len);
  if (built_len != file_len || memcmp (built, file, file_len) != 0)
    fail_msg ("the schema compiled into the program is not %s", path);

  xmlDoc *doc = xmlReadMemory (file, (int) file_len, "loopwright-design.rng", NULL,
                               XML_PARSE_NONET | XML_PARSE_NOBLANKS);
  assert_non_null (doc);
  g_autoptr (GPtrArray) elements = schema_stage_elements (doc);
  size_t n = lw_stage_kind_count ();
  if (elements->len != n)
    fail_msg ("the schema has %u stage elements, the stage-kind table %zu kinds", elements->len,
              n);
  for (guint i = 0; i < elements->len; i++)
    {
      const xmlNode *e = g_ptr_array_index (elements, i);
      g_autofree char *ename = prop (e, "name");
      const LwStageKindInfo *k = lw_stage_kind_by_name (ename);
      if (k == NULL)
        fail_msg ("schema stage <%s> is not a kind of the stage-kind table", ename);
      if ((size_t) k->kind != i)
        fail_msg ("schema stage <%s> is element %u, the table's row %d (keep one order)",
                  ename, i, (int) k->kind);
      size_t a = 0;
      bool common = false;
      for (const xmlNode *c = e->children; c != NULL; c = c->next)
        {
          if (is (c, "ref"))
            {
              g_autofree char *r = prop (c, "name");
              assert_string_equal (r, "stage-common");
              common = true;
              continue;
            }
          if (!is (c, "attribute"))
            fail_msg ("schema stage <%s>: unexpected <%s>", ename, (const char *) c->name);
          g_autofree char *aname = prop (c, "name");
          if (a >= k->n_params)
            fail_msg ("schema stage <%s> has attribute '%s' beyond the table's %zu", ename,
                      aname, k->n_params);
          if (strcmp (aname, k->params[a].name) != 0)
            fail_msg ("schema stage <%s>: attribute %zu is '%s', the table's '%s'", ename, a,
                      aname, k->params[a].name);
          const xmlNode *ref = c->children;
          while (ref != NULL && ref->type != XML_ELEMENT_NODE)
            ref = ref->next;
          assert_non_null (ref);
          assert_true (is (ref, "ref"));
          g_autofree char *type = prop (ref, "name");
          const char *want = k->params[a].rule == LW_PARAM_COUNT ? "whole" : "number";
          if (strcmp (type, want) != 0)
            fail_msg ("schema stage <%s>: attribute '%s' is a '%s', the table says '%s'", ename,
                      aname, type, want);
          a++;
        }
      if (a != k->n_params)
        fail_msg ("schema stage <%s> has %zu attributes, the table %zu", ename, a, k->n_params);
      assert_true (common);
    }
  xmlFreeDoc (doc);
}

/* One stage of every kind, literal values, in canonical form (the writer's own layout:
 * shortest round-trip numbers, two-space indent, label and enabled first). */
static const char literal_doc[] =
  "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
  "<design xmlns=\"urn:loopwright:design\" version=\"1\">\n"
  "  <title>Every stage kind</title>\n"
  "  <plant dead_time_s=\"0\">3/(s*(0.2*s+1))</plant>\n"
  "  <sampling period_s=\"0.01\" hold=\"zero-order\" compute_delay_samples=\"0\"/>\n"
  "  <variants active=\"all\">\n"
  "    <variant name=\"all\">\n"
  "      <gain ratio=\"-2.5\"/>\n"
  "      <integrator label=\"twice\" count=\"2\"/>\n"
  "      <real-zero corner_rad_s=\"0.125\"/>\n"
  "      <real-pole enabled=\"false\" corner_rad_s=\"40\"/>\n"
  "      <lead zero_rad_s=\"1.5\" pole_rad_s=\"12\"/>\n"
  "      <lag zero_rad_s=\"0.3\" pole_rad_s=\"0.03\"/>\n"
  "      <pi gain=\"1.7\" zero_rad_s=\"0.05\"/>\n"
  "      <pid kp=\"3\" ti_s=\"2\" td_s=\"0.1\" filter_n=\"8\"/>\n"
  "      <notch label=\"belt\" centre_rad_s=\"55\" depth_db=\"18.5\" width_rad_s=\"9\"/>\n"
  "      <zero-pair natural_rad_s=\"3\" damping=\"0\"/>\n"
  "      <pole-pair natural_rad_s=\"4\" damping=\"1.5\"/>\n"
  "      <resonant label=\"runout\" centre_rad_s=\"12.5\" peak_db=\"26.25\" width_rad_s=\"3.75\"/>\n"
  "    </variant>\n"
  "  </variants>\n"
  "</design>\n";

static void
test_literal_round_trip (void **state)
{
  (void) state;
  GError *error = NULL;
  g_autoptr (LwDesign) d = lw_design_load_data (literal_doc, strlen (literal_doc), "literal",
                                                &error);
  if (d == NULL)
    fail_msg ("literal document: %s", error->message);
  assert_int_equal (d->n_variants, 1);
  const LwDesignVariant *v = &d->variants[0];
  assert_int_equal (v->n_stages, 12);
  const LwStage *s = v->stages;
  assert_true (s[0].kind == LW_STAGE_GAIN && s[0].p.gain.ratio == -2.5);
  assert_true (s[1].kind == LW_STAGE_INTEGRATOR && s[1].p.integrator.count == 2);
  assert_string_equal (s[1].label, "twice");
  assert_true (s[2].kind == LW_STAGE_REAL_ZERO && s[2].p.real.corner_rad_s == 0.125);
  assert_true (s[3].kind == LW_STAGE_REAL_POLE && s[3].p.real.corner_rad_s == 40.0
               && !s[3].enabled);
  assert_true (s[4].kind == LW_STAGE_LEAD && s[4].p.leadlag.zero_rad_s == 1.5
               && s[4].p.leadlag.pole_rad_s == 12.0);
  assert_true (s[5].kind == LW_STAGE_LAG && s[5].p.leadlag.zero_rad_s == 0.3
               && s[5].p.leadlag.pole_rad_s == 0.03);
  assert_true (s[6].kind == LW_STAGE_PI && s[6].p.pi.gain == 1.7 && s[6].p.pi.zero_rad_s == 0.05);
  assert_true (s[7].kind == LW_STAGE_PID && s[7].p.pid.kp == 3.0 && s[7].p.pid.ti_s == 2.0
               && s[7].p.pid.td_s == 0.1 && s[7].p.pid.filter_n == 8.0);
  assert_true (s[8].kind == LW_STAGE_NOTCH && s[8].p.notch.centre_rad_s == 55.0
               && s[8].p.notch.depth_db == 18.5 && s[8].p.notch.width_rad_s == 9.0);
  assert_string_equal (s[8].label, "belt");
  assert_true (s[9].kind == LW_STAGE_ZERO_PAIR && s[9].p.pair.natural_rad_s == 3.0
               && s[9].p.pair.damping == 0.0);
  assert_true (s[10].kind == LW_STAGE_POLE_PAIR && s[10].p.pair.natural_rad_s == 4.0
               && s[10].p.pair.damping == 1.5);
  assert_true (s[11].kind == LW_STAGE_RESONANT && s[11].p.resonant.centre_rad_s == 12.5
               && s[11].p.resonant.peak_db == 26.25 && s[11].p.resonant.width_rad_s == 3.75
               && s[11].enabled);
  assert_string_equal (s[11].label, "runout");
  assert_int_equal (v->n_stages, lw_stage_kind_count ());
  for (size_t i = 0; i < v->n_stages; i++)
    assert_int_equal (s[i].kind, (int) i);   /* one of each, in table order */

  g_autofree char *text = lw_design_to_text (d, NULL, &error);
  if (text == NULL)
    fail_msg ("to_text: %s", error->message);
  assert_string_equal (text, literal_doc);
}

/* A resonant stage whose pole damping underflows (peak 1e4 dB) passes the schema and every
 * parameter's rule but is refused by the kind's own relation, with the place named. */
static void
test_resonant_refused (void **state)
{
  (void) state;
  g_autofree char *bad = g_strdup (literal_doc);
  char *at = strstr (bad, "peak_db=\"26.25\"");
  assert_non_null (at);
  memcpy (at, "peak_db=\"1e4\"  ", strlen ("peak_db=\"1e4\"  "));
  GError *error = NULL;
  LwDesign *d = lw_design_load_data (bad, strlen (bad), "bad.lwd", &error);
  assert_null (d);
  assert_non_null (error);
  if (strstr (error->message, "bad.lwd:19: <resonant> in stage 'runout'") == NULL
      || strstr (error->message, "pole damping") == NULL)
    fail_msg ("unexpected message: %s", error->message);
  g_error_free (error);
}

int
main (int argc, char **argv)
{
  if (argc < 2)
    {
      fprintf (stderr, "usage: %s SOURCE-ROOT\n", argv[0]);
      return 2;
    }
  source_root = argv[1];
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_schema_agrees),
    cmocka_unit_test (test_literal_round_trip),
    cmocka_unit_test (test_resonant_refused),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
