/* test-measured-doc.c — a measured frequency response kept in a design document
 * (<measured>, docs/file-format.md):
 *   * a literal document (tests/doc/measured-pump.lwd) loads to its literal values and saves
 *     back to its own bytes (the canonical form);
 *   * tables of awkward doubles (random bit patterns of every exponent, −0, subnormals, the
 *     largest finite) survive save → load bit for bit, and a second save gives the same bytes;
 *   * copy and equality see every value of the table and every attribute (undo relies on an
 *     exact copy);
 *   * a refused table is placed at the document's line, also after a comment with line
 *     breaks inside the element; the checks before a save; the 8 MiB limit on what is saved;
 *   * a design on measured data alone (an empty <plant>): loads, saves canonically, and is
 *     refused without data or with an analysis on the model it lacks.
 *
 * Usage: test-measured-doc SOURCE-ROOT
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <complex.h>
#include <float.h>
#include <locale.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <glib.h>

#include "lw-design.h"

static const char *source_root;

static LwDesign *
load_text (const char *text, size_t len)
{
  GError *error = NULL;
  LwDesign *d = lw_design_load_data (text, len, "measured.lwd", &error);
  if (d == NULL)
    fail_msg ("did not load: %s", error->message);
  return d;
}

static char *
text_ok (const LwDesign *d, size_t *len)
{
  GError *error = NULL;
  char *t = lw_design_to_text (d, len, &error);
  if (t == NULL)
    fail_msg ("to_text failed: %s", error->message);
  return t;
}

static LwMeasured *
table_new (size_t n, bool coherence)
{
  /* lw_measured_free releases with free() */
  LwMeasured *m = calloc (1, sizeof *m);
  assert_non_null (m);
  m->n = n;
  m->omega_rad_s = malloc (n * sizeof *m->omega_rad_s);
  m->h = malloc (n * sizeof *m->h);
  m->coherence = coherence ? malloc (n * sizeof *m->coherence) : NULL;
  assert_true (m->omega_rad_s != NULL && m->h != NULL && (!coherence || m->coherence != NULL));
  return m;
}

/* A finite double from random bits (any exponent, subnormals included). */
static double
random_double (GRand *r)
{
  for (;;)
    {
      uint64_t bits = ((uint64_t) g_rand_int (r) << 32) | g_rand_int (r);
      double v;
      memcpy (&v, &bits, sizeof v);
      if (isfinite (v))
        return v;
    }
}

static bool
same_bits (double a, double b)
{
  return memcmp (&a, &b, sizeof a) == 0;
}

/* ---- the literal document ------------------------------------------------------------------ */

static void
test_literal (void **state)
{
  (void) state;
  g_autofree char *path = g_build_filename (source_root, "tests", "doc", "measured-pump.lwd",
                                            NULL);
  g_autofree char *file = NULL;
  gsize file_len = 0;
  assert_true (g_file_get_contents (path, &file, &file_len, NULL));
  g_autoptr (LwDesign) d = load_text (file, file_len);
  assert_non_null (d->measured);
  assert_int_equal (d->measured_kind, LW_MEASURED_CONTINUOUS);
  assert_int_equal (d->measured_analysis, LW_DESIGN_ANALYSIS_DATA);
  assert_string_equal (d->measured_source, "pump rig, sweep 3.csv");
  assert_int_equal (d->measured_unstable_poles, 2);
  const LwMeasured *m = d->measured;
  assert_int_equal (m->n, 10);
  assert_non_null (m->coherence);
  /* the literals of the file: each is the shortest text of its double, so == holds */
  assert_true (m->omega_rad_s[0] == 0.5 && creal (m->h[0]) == 2.45 && cimag (m->h[0]) == -0.5
               && m->coherence[0] == 1.0);
  assert_true (m->omega_rad_s[5] == 16.0 && creal (m->h[5]) == -0.1 && cimag (m->h[5]) == -0.5
               && m->coherence[5] == 0.9);
  assert_true (m->omega_rad_s[9] == 256.0 && creal (m->h[9]) == -0.0008
               && cimag (m->h[9]) == -0.002 && m->coherence[9] == 0.0);
  size_t len = 0;
  g_autofree char *t = text_ok (d, &len);
  assert_int_equal (len, file_len);
  assert_memory_equal (t, file, len);

  /* the defaults: analysis "model", no source, 0 unstable poles; written out in full */
  d->measured_analysis = LW_DESIGN_ANALYSIS_MODEL;
  g_clear_pointer (&d->measured_source, g_free);
  d->measured_unstable_poles = 0;
  g_autofree char *t2 = text_ok (d, NULL);
  assert_non_null (strstr (t2, "  <measured kind=\"continuous\" analysis=\"model\" "
                               "open_loop_unstable_poles=\"0\">\nfrequency_rad_s,real,imag,"
                               "coherence\n0.5,2.45,-0.5,1\n"));
  g_autofree char *plain = g_strdup (file);
  char *at = strstr (plain, " analysis=\"data\" source=\"pump rig, sweep 3.csv\" "
                            "open_loop_unstable_poles=\"2\"");
  assert_non_null (at);
  memmove (at, at + strlen (" analysis=\"data\" source=\"pump rig, sweep 3.csv\" "
                            "open_loop_unstable_poles=\"2\""),
           strlen (at) + 1 - strlen (" analysis=\"data\" source=\"pump rig, sweep 3.csv\" "
                                     "open_loop_unstable_poles=\"2\""));
  g_autoptr (LwDesign) d2 = load_text (plain, strlen (plain));
  assert_int_equal (d2->measured_analysis, LW_DESIGN_ANALYSIS_MODEL);
  assert_null (d2->measured_source);
  assert_int_equal (d2->measured_unstable_poles, 0);
  assert_true (lw_design_equal (d, d2));
}

/* ---- round trips ---------------------------------------------------------------------------- */

static void
round_trip (bool coherence, guint32 seed)
{
  g_autoptr (GRand) r = g_rand_new_with_seed (seed);
  g_autoptr (LwDesign) d = lw_design_new ("1/(s*(s+1))", 0.001);
  size_t n = 500;
  LwMeasured *m = table_new (n, coherence);
  /* frequencies: increasing, awkward (the smallest subnormal first, the largest finite last) */
  m->omega_rad_s[0] = 4.9406564584124654e-324;
  for (size_t i = 1; i + 1 < n; i++)
    m->omega_rad_s[i] = ldexp (1.0 + g_rand_double (r), (int) i - 250) + 0.0;
  m->omega_rad_s[n - 1] = DBL_MAX;
  for (size_t i = 0; i < n; i++)
    {
      double re = random_double (r), im = random_double (r);
      if (i == 3)
        re = -0.0, im = 0.0;
      if (i == 4)
        re = DBL_MIN / 3.0, im = -DBL_MAX;
      m->h[i] = CMPLX (re, im);
      if (coherence)
        m->coherence[i] = i == 0 ? 0.0 : i == 1 ? 1.0 : g_rand_double (r);
    }
  d->measured = m;
  d->measured_kind = coherence ? LW_MEASURED_SAMPLED : LW_MEASURED_CONTINUOUS;
  d->measured_analysis = LW_DESIGN_ANALYSIS_DATA;
  lw_design_set_string (&d->measured_source, "bench «3» & <sweep> \"a\"");
  d->measured_unstable_poles = 1000;

  size_t len1 = 0, len2 = 0;
  g_autofree char *t1 = text_ok (d, &len1);
  g_autoptr (LwDesign) back = load_text (t1, len1);
  assert_non_null (back->measured);
  assert_int_equal (back->measured->n, n);
  assert_true ((back->measured->coherence != NULL) == coherence);
  for (size_t i = 0; i < n; i++)
    {
      const LwMeasured *b = back->measured;
      if (!same_bits (b->omega_rad_s[i], m->omega_rad_s[i])
          || !same_bits (creal (b->h[i]), creal (m->h[i]))
          || !same_bits (cimag (b->h[i]), cimag (m->h[i]))
          || (coherence && !same_bits (b->coherence[i], m->coherence[i])))
        fail_msg ("point %zu: %.17g %.17g %.17g read back as %.17g %.17g %.17g", i,
                  m->omega_rad_s[i], creal (m->h[i]), cimag (m->h[i]), b->omega_rad_s[i],
                  creal (b->h[i]), cimag (b->h[i]));
    }
  assert_int_equal (back->measured_kind, d->measured_kind);
  assert_int_equal (back->measured_analysis, LW_DESIGN_ANALYSIS_DATA);
  assert_string_equal (back->measured_source, d->measured_source);
  assert_int_equal (back->measured_unstable_poles, 1000);
  assert_true (lw_design_equal (d, back));
  /* canonical: the second save is the first, byte for byte */
  g_autofree char *t2 = text_ok (back, &len2);
  assert_int_equal (len1, len2);
  assert_memory_equal (t1, t2, len1);
}

static void
test_round_trip (void **state)
{
  (void) state;
  round_trip (true, 20261204);
  round_trip (false, 7);
}

/* ---- copy and equality ---------------------------------------------------------------------- */

static void
test_copy_equal (void **state)
{
  (void) state;
  g_autofree char *path = g_build_filename (source_root, "tests", "doc", "measured-pump.lwd",
                                            NULL);
  g_autofree char *file = NULL;
  gsize len = 0;
  assert_true (g_file_get_contents (path, &file, &len, NULL));
  g_autoptr (LwDesign) d = load_text (file, len);
  for (int change = 0; change < 10; change++)
    {
      g_autoptr (LwDesign) c = lw_design_copy (d);
      assert_true (c->measured != d->measured && lw_design_equal (d, c));
      LwMeasured *m = c->measured;
      switch (change)
        {
        case 0: m->omega_rad_s[9] = nextafter (m->omega_rad_s[9], INFINITY); break;
        case 1: m->h[4] = CMPLX (nextafter (creal (m->h[4]), 0.0), cimag (m->h[4])); break;
        case 2: m->h[4] = CMPLX (creal (m->h[4]), nextafter (cimag (m->h[4]), 0.0)); break;
        case 3: m->coherence[2] = 0.5; break;
        case 4: free (m->coherence); m->coherence = NULL; break;
        case 5: c->measured_kind = LW_MEASURED_SAMPLED; break;
        case 6: c->measured_analysis = LW_DESIGN_ANALYSIS_MODEL; break;
        case 7: lw_design_set_string (&c->measured_source, "pump rig, sweep 4.csv"); break;
        case 8: c->measured_unstable_poles = 0; break;
        default: lw_measured_free (c->measured); c->measured = NULL; break;
        }
      if (lw_design_equal (d, c) || lw_design_equal (c, d))
        fail_msg ("change %d not seen by lw_design_equal", change);
    }
}

/* ---- a measured family: further named responses ------------------------------------------ */

/* d (the pump example) made a measured family of three: the first named, two more copies of
 * its table with their own kind, source and count. */
static void
make_family (LwDesign *d)
{
  lw_design_set_string (&d->measured_name, "pump A");
  d->more_measured = g_new0 (LwDesignMeasuredSet, 2);
  d->n_more_measured = 2;
  static const char *const names[] = { "pump B", "pump «C» & <D>" };
  for (size_t i = 0; i < 2; i++)
    {
      LwDesignMeasuredSet *s = &d->more_measured[i];
      s->name = g_strdup (names[i]);
      s->data = lw_measured_copy (d->measured);
      s->data->h[3] *= 1.5 + (double) i;
      s->kind = i == 0 ? LW_MEASURED_SAMPLED : LW_MEASURED_CONTINUOUS;
      s->source = i == 0 ? g_strdup ("rig 2.csv") : NULL;
      s->unstable_poles = (int) i;
    }
}

static void
test_family (void **state)
{
  (void) state;
  g_autofree char *path = g_build_filename (source_root, "tests", "doc", "measured-pump.lwd",
                                            NULL);
  g_autofree char *file = NULL;
  gsize len = 0;
  assert_true (g_file_get_contents (path, &file, &len, NULL));
  g_autoptr (LwDesign) d = load_text (file, len);
  make_family (d);
  assert_int_equal (lw_design_n_measured (d), 3);
  assert_string_equal (lw_design_measured_set_name (d, 2), "pump «C» & <D>");

  /* saved and read back equal; the second save is the first byte for byte */
  size_t len1 = 0, len2 = 0;
  g_autofree char *t1 = text_ok (d, &len1);
  g_autoptr (LwDesign) back = load_text (t1, len1);
  assert_int_equal (back->n_more_measured, 2);
  assert_true (lw_design_equal (d, back));
  g_autofree char *t2 = text_ok (back, &len2);
  assert_int_equal (len1, len2);
  assert_memory_equal (t1, t2, len1);
  /* the analysis choice written on the first only */
  assert_non_null (strstr (t1, "<measured name=\"pump B\" kind=\"sampled\" source=\"rig 2.csv\" "
                                "open_loop_unstable_poles=\"0\">"));

  /* every change of a further response is seen */
  for (int change = 0; change < 7; change++)
    {
      g_autoptr (LwDesign) c = lw_design_copy (d);
      assert_true (lw_design_equal (d, c));
      LwDesignMeasuredSet *s = &c->more_measured[1];
      switch (change)
        {
        case 0: lw_design_set_string (&s->name, "pump E"); break;
        case 1: s->kind = LW_MEASURED_SAMPLED; break;
        case 2: lw_design_set_string (&s->source, "x"); break;
        case 3: s->unstable_poles = 2; break;
        case 4: s->data->h[0] = CMPLX (nextafter (creal (s->data->h[0]), 0.0),
                                       cimag (s->data->h[0])); break;
        case 5: lw_design_set_string (&c->measured_name, "pump Z"); break;
        default: lw_design_clear_more_measured (c); break;
        }
      if (lw_design_equal (d, c) || lw_design_equal (c, d))
        fail_msg ("change %d of the measured family not seen by lw_design_equal", change);
    }

  /* not saved: a name twice, a further response without one, the first without one */
  g_autoptr (LwDesign) twice = lw_design_copy (d);
  lw_design_set_string (&twice->more_measured[1].name, "pump A");
  GError *error = NULL;
  assert_null (lw_design_to_text (twice, NULL, &error));
  assert_non_null (strstr (error->message, "an earlier measured response has it too"));
  g_clear_error (&error);
  g_autoptr (LwDesign) unnamed = lw_design_copy (d);
  lw_design_set_string (&unnamed->measured_name, NULL);
  assert_null (lw_design_to_text (unnamed, NULL, &error));
  assert_non_null (strstr (error->message, "each response of a measured family needs one"));
  g_clear_error (&error);

  /* the first taken away (the window's Remove): the next is written first, with the
   * analysis choice */
  g_autoptr (LwDesign) gone = lw_design_copy (d);
  g_clear_pointer (&gone->measured, lw_measured_free);
  size_t len3 = 0;
  g_autofree char *t3 = text_ok (gone, &len3);
  g_autoptr (LwDesign) next = load_text (t3, len3);
  assert_string_equal (next->measured_name, "pump B");
  assert_int_equal (next->measured_kind, LW_MEASURED_SAMPLED);
  assert_int_equal (next->n_more_measured, 1);
  assert_string_equal (next->more_measured[0].name, "pump «C» & <D>");
}

/* ---- places of refusals, checks before saving, the size limit ------------------------------- */

static void
expect_error (const char *doc, int code, const char *substring)
{
  GError *error = NULL;
  LwDesign *d = lw_design_load_data (doc, strlen (doc), "measured.lwd", &error);
  if (d != NULL)
    fail_msg ("loaded; expected an error containing '%s'", substring);
  if (error->code != code || strstr (error->message, substring) == NULL)
    fail_msg ("error %d '%s'; expected code %d containing '%s'", error->code, error->message,
              code, substring);
  g_error_free (error);
}

static const char head[] =
  "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
  "<design xmlns=\"urn:loopwright:design\" version=\"1\">\n"
  "  <title>places</title>\n"
  "  <plant>1/(s+1)</plant>\n"
  "  <sampling period_s=\"0.1\"/>\n";               /* lines 1 … 5 */
static const char tail[] =
  "  </measured>\n"
  "  <variants><variant name=\"a\"/></variants>\n"
  "</design>\n";

static void
test_places (void **state)
{
  (void) state;
  /* the element on line 6 with a comment over lines 6 … 8, the header on line 9, rows from
   * line 10: the bad field on the 13th row is on line 22, the table's line 17 */
  GString *doc = g_string_new (head);
  g_string_append (doc, "  <measured kind=\"sampled\"><!-- measured on\nthe bench\n-->\n"
                        "frequency_rad_s,real,imag\n");
  for (int i = 1; i <= 20; i++)
    g_string_append_printf (doc, i == 13 ? "%d,0.5,0x1p3\n" : "%d,0.5,-0.5\n", i);
  g_string_append (doc, tail);
  expect_error (doc->str, LW_DESIGN_ERROR_VALUE,
                "measured.lwd:22: <measured>: the table (line 17 of its text, column 3): imag "
                "\"0x1p3\" is not a number");
  g_string_free (doc, TRUE);

  /* an empty element: the table is refused as empty, at the element's line */
  g_autofree char *empty = g_strconcat (head, "  <measured kind=\"continuous\"/>\n", tail + 14,
                                        NULL);
  expect_error (empty, LW_DESIGN_ERROR_VALUE, "measured.lwd:6: <measured>: the table (line 1 "
                "of its text): the table is empty");
  /* an element inside the table */
  g_autofree char *child = g_strconcat (head, "  <measured kind=\"continuous\"><title/>\n", tail,
                                        NULL);
  expect_error (child, LW_DESIGN_ERROR_SCHEMA, "measured.lwd:6: <measured>: holds the table as "
                "text only, found the element <title>");
  /* kind is required */
  g_autofree char *no_kind = g_strconcat (head, "  <measured>\n", tail, NULL);
  expect_error (no_kind, LW_DESIGN_ERROR_SCHEMA, "measured.lwd:6: <measured>: attribute 'kind' "
                "is required");
  /* a source of more than 200 bytes */
  g_autofree char *long_source = g_strnfill (201, 'x');
  g_autofree char *source = g_strdup_printf ("%s  <measured kind=\"sampled\" source=\"%s\">\n%s",
                                             head, long_source, tail);
  expect_error (source, LW_DESIGN_ERROR_VALUE, "longer than 200 bytes");
  /* between <plant> and <sampling> */
  g_autofree char *before = g_strdup (
    "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
    "<design xmlns=\"urn:loopwright:design\" version=\"1\">\n"
    "  <title>places</title>\n"
    "  <plant>1/(s+1)</plant>\n"
    "  <measured kind=\"sampled\">\n  </measured>\n"
    "  <sampling period_s=\"0.1\"/>\n"
    "  <variants><variant name=\"a\"/></variants>\n"
    "</design>\n");
  expect_error (before, LW_DESIGN_ERROR_SCHEMA, "measured.lwd:5: <measured>: unexpected here; "
                "expected <sampling>");
}

static void
test_checks_before_save (void **state)
{
  (void) state;
  for (int bad = 0; bad < 7; bad++)
    {
      g_autoptr (LwDesign) d = lw_design_new ("1/(s+1)", 0.1);
      d->measured = table_new (12, true);
      for (size_t i = 0; i < 12; i++)
        {
          d->measured->omega_rad_s[i] = (double) (i + 1);
          d->measured->h[i] = CMPLX (1.0, -1.0);
          d->measured->coherence[i] = 0.5;
        }
      GError *error = NULL;
      assert_true (lw_design_validate (d, &error));
      switch (bad)
        {
        case 0: d->measured->omega_rad_s[5] = d->measured->omega_rad_s[4]; break;
        case 1: d->measured->h[2] = CMPLX (NAN, 0.0); break;
        case 2: d->measured->coherence[0] = 1.5; break;
        case 3: d->measured->n = 9; break;
        case 4: d->measured_unstable_poles = 1001; break;
        case 5: lw_design_set_string (&d->measured_source, ""); break;
        default: d->measured_kind = (LwMeasuredKind) 7; break;
        }
      if (lw_design_validate (d, &error))
        fail_msg ("bad table %d validated", bad);
      assert_null (lw_design_to_text (d, NULL, NULL));
      g_error_free (error);
    }
}

/* ---- a design on measured data alone (an empty <plant>) ------------------------------------- */

static char *
data_alone_doc (const char *plant, const char *measured_attrs, gboolean with_table)
{
  GString *doc = g_string_new ("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
                               "<design xmlns=\"urn:loopwright:design\" version=\"1\">\n"
                               "  <title>alone</title>\n");
  g_string_append_printf (doc, "  <plant dead_time_s=\"0\">%s</plant>\n", plant);  /* line 4 */
  g_string_append (doc, "  <sampling period_s=\"0.01\" hold=\"zero-order\" "
                        "compute_delay_samples=\"1\"/>\n");
  if (with_table)
    {
      g_string_append_printf (doc, "  <measured %s>\nfrequency_rad_s,real,imag\n",  /* line 6 */
                              measured_attrs);
      for (int i = 1; i <= 12; i++)
        g_string_append_printf (doc, "%d,%g,-1\n", i, 0.25 * i);   /* exact, shortest */
      g_string_append (doc, "  </measured>\n");
    }
  g_string_append (doc, "  <variants active=\"a\">\n    <variant name=\"a\"/>\n  </variants>\n"
                        "</design>\n");
  return g_string_free (doc, FALSE);
}

static void
test_data_alone (void **state)
{
  (void) state;
  /* loads with an empty plant and analysis "data", saves back to its own bytes */
  g_autofree char *ok = data_alone_doc ("", "kind=\"sampled\" analysis=\"data\" "
                                        "open_loop_unstable_poles=\"0\"", TRUE);
  g_autoptr (LwDesign) d = load_text (ok, strlen (ok));
  assert_false (lw_design_has_model (d));
  assert_true (lw_design_analysis_on_data (d));
  assert_string_equal (d->plant, "");
  size_t len = 0;
  g_autofree char *again = text_ok (d, &len);
  assert_string_equal (again, ok);
  /* blanks count as empty */
  g_autofree char *blank = data_alone_doc ("  \n ", "kind=\"sampled\" analysis=\"data\"", TRUE);
  g_autoptr (LwDesign) b = load_text (blank, strlen (blank));
  assert_false (lw_design_has_model (b));

  /* no model and no data: refused at the plant */
  g_autofree char *neither = data_alone_doc ("", "", FALSE);
  expect_error (neither, LW_DESIGN_ERROR_VALUE, "measured.lwd:4: <plant>: the plant expression "
                "is empty; expected a proper rational expression in s, e.g. 40/(s*(s+8)), or a "
                "<measured> response after <sampling> to design on");
  /* no model but an analysis on the model: refused at <measured>, naming the plant's line */
  g_autofree char *on_model = data_alone_doc ("", "kind=\"sampled\" analysis=\"model\"", TRUE);
  expect_error (on_model, LW_DESIGN_ERROR_VALUE, "measured.lwd:6: <measured>: attribute "
                "'analysis' is \"model\" but <plant> (line 4) holds no model; write "
                "analysis=\"data\"");
  g_autofree char *by_default = data_alone_doc ("", "kind=\"sampled\"", TRUE);
  expect_error (by_default, LW_DESIGN_ERROR_VALUE, "holds no model");

  /* a plant cleared in the window leaves the analysis field as it was: without a model the
   * analysis is the data's all the same, and so is what is saved */
  GError *error = NULL;
  d->measured_analysis = LW_DESIGN_ANALYSIS_MODEL;
  assert_true (lw_design_analysis_on_data (d));
  g_autofree char *saved = text_ok (d, &len);
  assert_string_equal (saved, ok);
  /* no model and no data: refused before a save */
  lw_measured_free (d->measured);
  d->measured = NULL;
  assert_false (lw_design_validate (d, &error));
  assert_non_null (strstr (error->message, "neither a plant model nor a measured response"));
  g_clear_error (&error);
  /* a model with data judged on the model is on the model */
  g_autoptr (LwDesign) m = lw_design_new ("1/(s+1)", 0.01);
  assert_true (lw_design_has_model (m));
  assert_false (lw_design_analysis_on_data (m));
}

/* A table whose canonical text is over 8 MiB is not written: the loader would refuse it. */
static void
test_size_limit (void **state)
{
  (void) state;
  g_autoptr (LwDesign) d = lw_design_new ("1/(s+1)", 0.1);
  size_t n = 200000;   /* rows of about 60 bytes: 12 MB */
  d->measured = table_new (n, false);
  for (size_t i = 0; i < n; i++)
    {
      d->measured->omega_rad_s[i] = 1.0 + (double) i * 0.1234567891234567;
      d->measured->h[i] = CMPLX (0.1234567891234567, -0.9876543219876543);
    }
  GError *error = NULL;
  assert_null (lw_design_to_text (d, NULL, &error));
  assert_int_equal (error->code, LW_DESIGN_ERROR_LIMIT);
  assert_non_null (strstr (error->message, "more than the limit of 8388608 bytes"));
  g_error_free (error);
  /* a tenth of it is written and reads back */
  d->measured->n = n / 10;
  size_t len = 0;
  g_autofree char *t = text_ok (d, &len);
  g_autoptr (LwDesign) back = load_text (t, len);
  assert_true (lw_design_equal (d, back));
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
  setlocale (LC_ALL, "C");
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_literal),
    cmocka_unit_test (test_round_trip),
    cmocka_unit_test (test_copy_equal),
    cmocka_unit_test (test_family),
    cmocka_unit_test (test_places),
    cmocka_unit_test (test_checks_before_save),
    cmocka_unit_test (test_size_limit),
    cmocka_unit_test (test_data_alone),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
