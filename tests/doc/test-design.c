/* test-design.c — design documents: the bundled examples, canonical round trips, numbers,
 * hostile documents (tests/doc/hostile/expected.txt), limits, and saves that fail or are
 * killed half-way.
 *
 * Usage: test-design SOURCE-ROOT
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <errno.h>
#include <float.h>
#include <locale.h>
#include <math.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

#include <glib.h>
#include <glib/gstdio.h>

#include "lw-design.h"

static const char *source_root;

static char *
src_path (const char *rel)
{
  return g_build_filename (source_root, rel, NULL);
}

static const char *const examples[] = {
  "data/examples/camera-slider.lwd",
  "data/examples/kiln.lwd",
  "data/examples/pump-pressure.lwd",
  "data/examples/belt-conveyor.lwd",
  "data/examples/camera-slider-fleet.lwd",
};

static LwDesign *
load_ok (const char *path)
{
  GError *error = NULL;
  LwDesign *d = lw_design_load_file (path, &error);
  if (d == NULL)
    fail_msg ("%s did not load: %s", path, error->message);
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

/* ---- examples and round trips ------------------------------------------------------------ */

static void
test_examples_load (void **state)
{
  (void) state;
  for (size_t i = 0; i < G_N_ELEMENTS (examples); i++)
    {
      g_autofree char *p = src_path (examples[i]);
      g_autoptr (LwDesign) d = load_ok (p);
      assert_true (d->n_variants >= 1);
      assert_true (d->n_requirements >= 3);
      assert_non_null (d->notes);
      /* each example says its numbers are invented */
      assert_non_null (strstr (d->notes, "invented"));
      GError *error = NULL;
      assert_true (lw_design_validate (d, &error));
    }
}

/* The examples are stored in canonical form: load → text gives the file's bytes; and load →
 * save → load is equal, the second text byte-identical to the first. */
static void
test_round_trip (void **state)
{
  (void) state;
  for (size_t i = 0; i < G_N_ELEMENTS (examples); i++)
    {
      g_autofree char *p = src_path (examples[i]);
      g_autofree char *file = NULL;
      gsize file_len = 0;
      assert_true (g_file_get_contents (p, &file, &file_len, NULL));
      g_autoptr (LwDesign) d = load_ok (p);
      size_t len1 = 0, len2 = 0;
      g_autofree char *t1 = text_ok (d, &len1);
      assert_int_equal (len1, file_len);
      assert_memory_equal (t1, file, len1);

      GError *error = NULL;
      g_autoptr (LwDesign) d2 = lw_design_load_data (t1, len1, "round-trip", &error);
      assert_non_null (d2);
      assert_true (lw_design_equal (d, d2));
      g_autofree char *t2 = text_ok (d2, &len2);
      assert_int_equal (len1, len2);
      assert_memory_equal (t1, t2, len1);

      g_autoptr (LwDesign) c = lw_design_copy (d);
      assert_true (lw_design_equal (d, c));
      c->variants[0].stages[0].enabled = !c->variants[0].stages[0].enabled;
      assert_false (lw_design_equal (d, c));
    }
}

/* Operating points (<point> in <parameters>) and the family's members and seed: a literal
 * document in canonical form reads back to its bytes, the values at each point are the
 * point's own and the nominals, copies and comparisons see the points and the members and
 * seed, and a point the API breaks is refused on save. */
static void
test_round_trip_points (void **state)
{
  (void) state;
  static const char text[] =
    "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
    "<design xmlns=\"urn:loopwright:design\" version=\"1\">\n"
    "  <title>pump over tank level</title>\n"
    "  <plant dead_time_s=\"0.02\">K/((0.3*s+1)*(tau*s+1))</plant>\n"
    "  <parameters members=\"250\" seed=\"18446744\">\n"
    "    <parameter name=\"K\" nominal=\"0.8\" low=\"0.7\" high=\"0.9\"/>\n"
    "    <parameter name=\"tau\" nominal=\"0.05\"/>\n"
    "    <parameter name=\"dead_time_s\" nominal=\"0.02\"/>\n"
    "    <point name=\"empty tank\">\n"
    "      <value parameter=\"tau\" value=\"0.03\"/>\n"
    "      <value parameter=\"K\" value=\"1.1\"/>\n"
    "    </point>\n"
    "    <point name=\"half\"/>\n"
    "    <point name=\"full\">\n"
    "      <value parameter=\"dead_time_s\" value=\"0.05\"/>\n"
    "    </point>\n"
    "  </parameters>\n"
    "  <sampling period_s=\"0.01\" hold=\"zero-order\" compute_delay_samples=\"1\"/>\n"
    "  <variants active=\"a\">\n"
    "    <variant name=\"a\"/>\n"
    "  </variants>\n"
    "</design>\n";
  GError *error = NULL;
  g_autoptr (LwDesign) d = lw_design_load_data (text, strlen (text), "points", &error);
  if (d == NULL)
    fail_msg ("did not load: %s", error->message);
  assert_int_equal (d->n_points, 3);
  assert_true (d->has_family_members && d->family_members == 250);
  assert_true (d->has_family_seed && d->family_seed == 18446744);
  assert_string_equal (d->points[0].name, "empty tank");
  assert_int_equal (d->points[0].n_values, 2);
  assert_int_equal (d->points[1].n_values, 0);
  assert_int_equal (lw_design_find_point (d, "full"), 2);
  assert_int_equal (lw_design_find_point (d, "overflow"), -1);
  /* a point outside K's range is allowed: the engineer knows it */
  double v[3];
  lw_design_point_values (d, 0, v);
  assert_true (v[0] == 1.1 && v[1] == 0.03 && v[2] == 0.02);
  lw_design_point_values (d, 1, v);
  assert_true (v[0] == 0.8 && v[1] == 0.05 && v[2] == 0.02);
  lw_design_point_values (d, 2, v);
  assert_true (lw_design_dead_time_at (d, v) == 0.05);
  size_t len = 0;
  g_autofree char *t = text_ok (d, &len);
  assert_int_equal (len, strlen (text));
  assert_memory_equal (t, text, len);
  g_autoptr (LwDesign) c = lw_design_copy (d);
  assert_true (lw_design_equal (d, c));
  c->points[0].values[1].value = 1.2;
  assert_false (lw_design_equal (d, c));
  c->points[0].values[1].value = 1.1;
  assert_true (lw_design_equal (d, c));
  c->family_seed = 2;
  assert_false (lw_design_equal (d, c));
  c->family_seed = d->family_seed;
  c->has_family_members = false;
  assert_false (lw_design_equal (d, c));
  c->has_family_members = true;
  assert_true (lw_design_equal (d, c));
  /* broken through the API: refused on save, naming the point */
  lw_design_set_string (&c->points[2].values[0].parameter, "m");
  assert_null (lw_design_to_text (c, NULL, &error));
  assert_non_null (strstr (error->message, "point 'full': unknown parameter 'm'"));
  g_clear_error (&error);
  lw_design_set_string (&c->points[2].values[0].parameter, "K");
  c->points[2].values[0].value = 0.0;
  assert_null (lw_design_to_text (c, NULL, &error));
  assert_non_null (strstr (error->message, "at operating point 'full'"));
  g_clear_error (&error);
  lw_design_clear_points (c);
  assert_int_equal (c->n_points, 0);
  g_autofree char *t2 = text_ok (c, NULL);
  assert_null (strstr (t2, "<point"));
}

/* A design built through the API, with every stage kind, every requirement kind, awkward
 * strings and numbers, survives save → load unchanged. */
static void
test_round_trip_everything (void **state)
{
  (void) state;
  g_autoptr (LwDesign) d = lw_design_new ("0.5*(s+2)/(s*(s^2+0.4*s+4))", 1.0 / 3.0);
  lw_design_set_string (&d->title, "Ünïcode & <markup> \"quotes\" 'apostrophes'");
  lw_design_set_string (&d->author, "  leading and trailing spaces  ");
  lw_design_set_string (&d->notes, "line one\nline two\r\nthird\tline &amp; not an entity\n");
  d->dead_time_s = 0.123456789012345678;
  d->compute_delay = 0;
  LwDesignVariant *v = &d->variants[0];
  LwStage stages[] = {
    lw_stage_gain (-2.5e-7), lw_stage_integrator (2), lw_stage_real_zero (0.1),
    lw_stage_real_pole (1e300), lw_stage_lead (0.2, 2.0), lw_stage_lag (0.3, 0.03),
    lw_stage_pi (1.7, 0.05), lw_stage_pid (3.0, 2.0, 0.0, 10.0), lw_stage_pid (3.0, 2.0, 0.1, 8.0),
    lw_stage_notch (5.0, 20.0, 1.0), lw_stage_zero_pair (3.0, 0.0), lw_stage_pole_pair (4.0, 1.5),
  };
  for (size_t i = 0; i < G_N_ELEMENTS (stages); i++)
    {
      LwStage *s = lw_design_variant_add_stage (v, &stages[i]);
      if (i % 3 == 1)
        s->enabled = false;
      if (i % 2 == 0)
        lw_stage_set_label (s, i == 0 ? "a \"label\"\nwith a line break & <brackets>" : "x");
    }
  LwDesignVariant *w = lw_design_add_variant (d, "second, with notes");
  lw_design_set_string (&w->notes, "");
  d->active = 1;
  const LwRequirement reqs[] = {
    { LW_REQ_MIN_PHASE_MARGIN, 45.0, 0.0 }, { LW_REQ_MIN_GAIN_MARGIN, -3.0, 0.0 },
    { LW_REQ_MAX_SENSITIVITY, 2.0, 0.0 }, { LW_REQ_CROSSOVER_RANGE, 0.1, 0.7 },
    { LW_REQ_MAX_STEP_ERROR, 0.0, 0.0 }, { LW_REQ_MAX_RAMP_ERROR, 0.5, 0.0 },
    { LW_REQ_MAX_OVERSHOOT, 20.0, 0.0 }, { LW_REQ_MAX_RISE_TIME, 3.0, 0.0 },
    { LW_REQ_MAX_SETTLING_TIME, 30.0, 0.0 }, { LW_REQ_MAX_ACTUATOR, 12.0, 0.0 },
  };
  for (size_t i = 0; i < G_N_ELEMENTS (reqs); i++)
    lw_design_add_requirement (d, i == 3 ? "bandwidth window" : NULL, &reqs[i]);
  d->has_range = true;
  d->range_from_rad_s = 0.01;
  d->range_to_rad_s = G_PI * 3.0;
  /* view names as text, in the order given; one the renderer may not know is kept */
  d->views = g_strdupv ((char *[]) { "bode-w", "poles", "nyquist", "spectrum-2", NULL });

  size_t len = 0;
  g_autofree char *t = text_ok (d, &len);
  GError *error = NULL;
  g_autoptr (LwDesign) back = lw_design_load_data (t, len, "everything", &error);
  if (back == NULL)
    fail_msg ("%s\n%s", error->message, t);
  assert_true (lw_design_equal (d, back));
  size_t len2 = 0;
  g_autofree char *t2 = text_ok (back, &len2);
  assert_int_equal (len, len2);
  assert_memory_equal (t, t2, len);
  /* the literal form of the view element (docs/file-format.md) */
  assert_non_null (strstr (t, "<view from_rad_s=\"0.01\" to_rad_s=\"9.42477796076938\" "
                              "shows=\"bode-w poles nyquist spectrum-2\"/>"));

  /* the file form: one element per line, two-space indentation */
  g_auto (GStrv) lines = g_strsplit (t, "\n", -1);
  for (size_t i = 0; lines[i] != NULL; i++)
    {
      const char *l = lines[i];
      size_t sp = strspn (l, " ");
      if (l[sp] != '<')
        continue;   /* a continuation line of multi-line notes */
      assert_int_equal (sp % 2, 0);
      /* one element per line: a line holds one start tag (or one text element) */
      assert_null (strstr (l + sp + 1, "/><"));
    }
}

/* The views a document shows are kept as the words it gives, in its order, a repeat counted
 * once, names this build's renderer may not know included (a newer version's view), and
 * written back so; a word that cannot be a view name is refused with its place. */
static void
test_view_names_as_text (void **state)
{
  (void) state;
  static const char doc[] =
    "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
    "<design xmlns=\"urn:loopwright:design\" version=\"1\">\n"
    "  <title>views</title>\n"
    "  <plant dead_time_s=\"0\">1/(s*(s+1))</plant>\n"
    "  <sampling period_s=\"0.1\" hold=\"zero-order\" compute_delay_samples=\"1\"/>\n"
    "  <variants active=\"a\">\n"
    "    <variant name=\"a\"/>\n"
    "  </variants>\n"
    "  <view shows=\"%s\"/>\n"
    "</design>\n";
  GError *error = NULL;
  g_autofree char *t = g_strdup_printf (doc, " step\tbode-z step  spectrum-2 ");
  g_autoptr (LwDesign) d = lw_design_load_data (t, strlen (t), "views", &error);
  if (d == NULL)
    fail_msg ("%s", error->message);
  assert_non_null (d->views);
  assert_int_equal (g_strv_length (d->views), 3);
  assert_string_equal (d->views[0], "step");
  assert_string_equal (d->views[1], "bode-z");
  assert_string_equal (d->views[2], "spectrum-2");
  g_autofree char *out = text_ok (d, NULL);
  assert_non_null (strstr (out, "  <view shows=\"step bode-z spectrum-2\"/>\n"));

  /* an empty list is no list: nothing written */
  g_autofree char *t2 = g_strdup_printf (doc, " ");
  g_autoptr (LwDesign) d2 = lw_design_load_data (t2, strlen (t2), "views", &error);
  assert_non_null (d2);
  assert_null (d2->views);
  g_autofree char *out2 = text_ok (d2, NULL);
  assert_null (strstr (out2, "<view"));

  g_autofree char *t3 = g_strdup_printf (doc, "bode-z Bode_W");
  assert_null (lw_design_load_data (t3, strlen (t3), "views", &error));
  assert_non_null (strstr (error->message, "views:9:"));
  assert_non_null (strstr (error->message, "'Bode_W'"));
  g_clear_error (&error);
}

/* A variant that overrides the sample period: the attribute is written only for it, reads
 * back to the same double, and the second save is byte-identical to the first. */
static void
test_round_trip_variant_period (void **state)
{
  (void) state;
  g_autoptr (LwDesign) d = lw_design_new ("1/(s*(s+1))", 0.1);
  LwStage g = lw_stage_gain (0.5);
  lw_design_variant_add_stage (&d->variants[0], &g);
  LwDesignVariant *fast = lw_design_add_variant (d, "fast");
  fast->has_period = true;
  fast->period_s = 1.0 / 3.0;   /* not a short decimal: checks the shortest round-trip text */
  lw_design_variant_add_stage (fast, &g);
  assert_true (lw_design_variant_period_s (d, 0) == 0.1);
  assert_true (lw_design_variant_period_s (d, 1) == 1.0 / 3.0);

  size_t len = 0, len2 = 0;
  g_autofree char *t = text_ok (d, &len);
  /* omitted when not overriding, written after the name when overriding */
  assert_non_null (strstr (t, "<variant name=\"initial\">"));
  assert_non_null (strstr (t, "<variant name=\"fast\" period_s=\"0.3333333333333333\">"));
  GError *error = NULL;
  g_autoptr (LwDesign) back = lw_design_load_data (t, len, "variant-period", &error);
  if (back == NULL)
    fail_msg ("%s\n%s", error->message, t);
  assert_true (lw_design_equal (d, back));
  assert_false (back->variants[0].has_period);
  assert_true (back->variants[1].has_period);
  assert_true (back->variants[1].period_s == 1.0 / 3.0);
  g_autofree char *t2 = text_ok (back, &len2);
  assert_int_equal (len, len2);
  assert_memory_equal (t, t2, len);

  /* a copy keeps it; clearing it makes the designs differ */
  g_autoptr (LwDesign) c = lw_design_copy (d);
  assert_true (lw_design_equal (d, c));
  c->variants[1].has_period = false;
  assert_false (lw_design_equal (d, c));

  /* a bad override is refused before saving */
  c->variants[1].has_period = true;
  c->variants[1].period_s = -1.0;
  assert_false (lw_design_validate (c, &error));
  assert_non_null (strstr (error->message, "variant 'fast'"));
  g_clear_error (&error);
}

/* A variant's actuator: written as its literal element after the notes (docs/file-format.md),
 * read back to the same numbers, anti-windup only when on, absent when there is none; a copy
 * keeps it; limits that hold nothing are refused before saving. */
static void
test_round_trip_actuator (void **state)
{
  (void) state;
  g_autoptr (LwDesign) d = lw_design_new ("1/(s*(s+1))", 0.1);
  LwStage g = lw_stage_gain (0.5);
  lw_design_variant_add_stage (&d->variants[0], &g);
  LwDesignVariant *v = &d->variants[0];
  v->has_actuator = true;
  v->u_low = -2.5;
  v->u_high = 0.1;
  v->anti_windup = true;
  LwDesignVariant *w = lw_design_add_variant (d, "loose");
  w->has_actuator = true;
  w->u_low = -10;
  w->u_high = 10;
  w->reference_step = 0.05;

  size_t len = 0, len2 = 0;
  g_autofree char *t = text_ok (d, &len);
  assert_non_null (strstr (t, "<variant name=\"initial\">\n      <actuator low=\"-2.5\" "
                              "high=\"0.1\" anti_windup=\"true\"/>\n      <gain"));
  assert_non_null (strstr (t, "<variant name=\"loose\">\n      <actuator low=\"-10\" "
                              "high=\"10\" reference_step=\"0.05\"/>\n    </variant>"));
  GError *error = NULL;
  g_autoptr (LwDesign) back = lw_design_load_data (t, len, "actuator", &error);
  if (back == NULL)
    fail_msg ("%s\n%s", error->message, t);
  assert_true (lw_design_equal (d, back));
  assert_true (back->variants[0].has_actuator && back->variants[0].anti_windup);
  assert_true (back->variants[0].u_low == -2.5 && back->variants[0].u_high == 0.1);
  assert_true (back->variants[1].has_actuator && !back->variants[1].anti_windup);
  assert_true (back->variants[1].reference_step == 0.05 && back->variants[0].reference_step == 0);
  g_autofree char *t2 = text_ok (back, &len2);
  assert_int_equal (len, len2);
  assert_memory_equal (t, t2, len);

  g_autoptr (LwDesign) c = lw_design_copy (d);
  assert_true (lw_design_equal (d, c));
  c->variants[1].anti_windup = true;
  assert_false (lw_design_equal (d, c));
  c->variants[1].u_low = 10;
  assert_false (lw_design_validate (c, &error));
  assert_non_null (strstr (error->message, "variant 'loose': the actuator limits"));
  g_clear_error (&error);
}

/* The plant's units, the compared set and a variant's responses: written in their places
 * (docs/file-format.md), read back the same, left out when they say the default; a copy keeps
 * them; a unit that cannot be saved is refused with its name. */
static void
test_round_trip_view_choices (void **state)
{
  (void) state;
  g_autoptr (LwDesign) d = lw_design_new ("1/(s*(s+1))", 0.1);
  lw_design_set_string (&d->input_unit, "V");
  lw_design_set_string (&d->output_unit, "µm");
  LwDesignVariant *w = lw_design_add_variant (d, "slow");
  w->compared = true;
  w->responses = LW_DESIGN_RESPONSE_REFERENCE | LW_DESIGN_RESPONSE_OUTPUT_DISTURBANCE;
  LwDesignVariant *x = lw_design_add_variant (d, "none");
  x->responses = 0;
  assert_int_equal (d->variants[0].responses, LW_DESIGN_RESPONSES_ALL);

  size_t len = 0, len2 = 0;
  g_autofree char *t = text_ok (d, &len);
  assert_non_null (strstr (t, "<plant dead_time_s=\"0\" input_unit=\"V\" output_unit=\"µm\">"));
  assert_non_null (strstr (t, "<variant name=\"initial\"/>"));
  assert_non_null (strstr (t, "<variant name=\"slow\" compared=\"true\">\n      <responses "
                              "shows=\"reference output-disturbance\"/>\n    </variant>"));
  assert_non_null (strstr (t, "<variant name=\"none\">\n      <responses shows=\"\"/>"));
  GError *error = NULL;
  g_autoptr (LwDesign) back = lw_design_load_data (t, len, "choices", &error);
  if (back == NULL)
    fail_msg ("%s\n%s", error->message, t);
  assert_true (lw_design_equal (d, back));
  assert_true (back->variants[1].compared && !back->variants[0].compared);
  assert_int_equal (back->variants[2].responses, 0);
  assert_string_equal (back->output_unit, "µm");
  g_autofree char *t2 = text_ok (back, &len2);
  assert_int_equal (len, len2);
  assert_memory_equal (t, t2, len);

  g_autoptr (LwDesign) c = lw_design_copy (d);
  assert_true (lw_design_equal (d, c));
  c->variants[1].compared = false;
  assert_false (lw_design_equal (d, c));
  c->variants[1].compared = true;
  lw_design_set_string (&c->input_unit, " V");
  assert_false (lw_design_equal (d, c));
  assert_false (lw_design_validate (c, &error));
  assert_non_null (strstr (error->message, "the plant's input unit ' V'"));
  g_clear_error (&error);
  lw_design_set_string (&c->input_unit, "a unit longer than thirty-two bytes");
  assert_false (lw_design_validate (c, &error));
  assert_non_null (strstr (error->message, "longer than 32 bytes"));
  g_clear_error (&error);
}

/* ---- numbers ------------------------------------------------------------------------------ */

/* Every finite double is written so that the C library's strtod reads back the same value
 * (the only property that matters for a round trip), with '.' as the separator, and no more
 * than 17 significant digits (enough for any binary64: IEEE 754-2008, 5.12.2). */
static void
test_numbers_round_trip (void **state)
{
  (void) state;
  const double fixed[] = { 0.0, -0.0, 1.0, -1.0, 0.1, 1.0 / 3.0, 2.0 / 3.0, 1e-300, 5e-324,
                           DBL_MAX, -DBL_MAX, DBL_MIN, 123456789012345678.0, 0.002, 1e22,
                           G_PI, 9007199254740993.0 };
  char buf[G_ASCII_DTOSTR_BUF_SIZE];
  for (size_t i = 0; i < G_N_ELEMENTS (fixed); i++)
    {
      lw_design_format_number (fixed[i], buf);
      double back = strtod (buf, NULL);
      assert_true (memcmp (&back, &fixed[i], sizeof back) == 0 || back == fixed[i]);
      assert_null (strchr (buf, ','));
    }
  /* short forms where the short form is exact */
  assert_string_equal (lw_design_format_number (0.1, buf), "0.1");
  assert_string_equal (lw_design_format_number (0.002, buf), "0.002");
  assert_string_equal (lw_design_format_number (3.4, buf), "3.4");
  assert_string_equal (lw_design_format_number (1.0 / 3.0, buf), "0.3333333333333333");
  /* random bit patterns: 20000 finite doubles */
  guint64 x = 0x9E3779B97F4A7C15u;
  for (int i = 0; i < 20000; i++)
    {
      x ^= x << 13;
      x ^= x >> 7;
      x ^= x << 17;
      double v;
      memcpy (&v, &x, sizeof v);
      if (!isfinite (v))
        continue;
      lw_design_format_number (v, buf);
      double back = strtod (buf, NULL);
      if (back != v)
        fail_msg ("%.17g written as '%s' reads back as %.17g", v, buf, back);
    }
}

/* A locale with a decimal comma changes nothing in the text. */
static void
test_numbers_locale (void **state)
{
  (void) state;
  g_autofree char *p = src_path (examples[0]);
  g_autoptr (LwDesign) d = load_ok (p);
  size_t len = 0;
  g_autofree char *before = text_ok (d, &len);
  const char *locales[] = { "de_DE.UTF-8", "fr_FR.UTF-8", "de_DE", "fr_FR" };
  const char *set = NULL;
  for (size_t i = 0; i < G_N_ELEMENTS (locales) && set == NULL; i++)
    set = setlocale (LC_NUMERIC, locales[i]);
  if (set == NULL)
    {
      /* no comma locale installed: the check below still runs in the C locale */
      print_message ("note: no decimal-comma locale installed; locale check in C only\n");
    }
  g_autoptr (LwDesign) again = load_ok (p);
  size_t len2 = 0;
  g_autofree char *after = text_ok (again, &len2);
  setlocale (LC_NUMERIC, "C");
  assert_true (lw_design_equal (d, again));
  assert_int_equal (len, len2);
  assert_memory_equal (before, after, len);
}

/* ---- hostile documents -------------------------------------------------------------------- */

static int
code_of (const char *name)
{
  static const struct { const char *name; int code; } codes[] = {
    { "IO", LW_DESIGN_ERROR_IO }, { "LIMIT", LW_DESIGN_ERROR_LIMIT },
    { "REFUSED", LW_DESIGN_ERROR_REFUSED }, { "XML", LW_DESIGN_ERROR_XML },
    { "FORMAT", LW_DESIGN_ERROR_FORMAT }, { "VERSION", LW_DESIGN_ERROR_VERSION },
    { "SCHEMA", LW_DESIGN_ERROR_SCHEMA }, { "VALUE", LW_DESIGN_ERROR_VALUE },
  };
  for (size_t i = 0; i < G_N_ELEMENTS (codes); i++)
    if (strcmp (codes[i].name, name) == 0)
      return codes[i].code;
  fail_msg ("unknown error code %s in expected.txt", name);
  return -1;
}

/* While a hostile document is loaded, standard error is sent to a file: the loader must not
 * print anything (libxml2 prints some errors itself unless they are routed or avoided). */
typedef struct
{
  int saved;
  int fd;
  char *path;
} Capture;

static void
capture_stderr (Capture *c)
{
  GError *error = NULL;
  c->fd = g_file_open_tmp ("lw-doc-stderr-XXXXXX", &c->path, &error);
  assert_true (c->fd >= 0);
  fflush (stderr);
  c->saved = dup (2);
  assert_true (dup2 (c->fd, 2) == 2);
}

static void
expect_nothing_printed (Capture *c)
{
  fflush (stderr);
  dup2 (c->saved, 2);
  close (c->saved);
  struct stat st;
  assert_int_equal (fstat (c->fd, &st), 0);
  close (c->fd);
  if (st.st_size != 0)
    {
      g_autofree char *text = NULL;
      g_file_get_contents (c->path, &text, NULL, NULL);
      g_unlink (c->path);
      fail_msg ("the loader printed: %s", text);
    }
  g_unlink (c->path);
  g_free (c->path);
}

static void
test_hostile_files (void **state)
{
  (void) state;
  Capture cap;
  capture_stderr (&cap);
  g_autofree char *dir = src_path ("tests/doc/hostile");
  g_autofree char *manifest = g_build_filename (dir, "expected.txt", NULL);
  g_autofree char *text = NULL;
  assert_true (g_file_get_contents (manifest, &text, NULL, NULL));
  g_auto (GStrv) lines = g_strsplit (text, "\n", -1);
  GHashTable *listed = g_hash_table_new_full (g_str_hash, g_str_equal, g_free, NULL);
  size_t n = 0;
  for (size_t i = 0; lines[i] != NULL; i++)
    {
      if (lines[i][0] == '#' || lines[i][0] == '\0')
        continue;
      g_auto (GStrv) f = g_strsplit (lines[i], " | ", -1);
      assert_true (g_strv_length (f) >= 3);
      g_autofree char *path = g_build_filename (dir, f[0], NULL);
      /* messages name the file as the caller gave it: load by the bare name from the data */
      g_autofree char *data = NULL;
      gsize len = 0;
      if (!g_file_get_contents (path, &data, &len, NULL))
        fail_msg ("cannot read %s", path);
      GError *error = NULL;
      LwDesign *d = lw_design_load_data (data, len, f[0], &error);
      if (d != NULL)
        fail_msg ("%s loaded; expected a %s error", f[0], f[1]);
      assert_true (error->domain == LW_DESIGN_ERROR);
      if (error->code != code_of (f[1]))
        fail_msg ("%s: error code %d, expected %s: %s", f[0], error->code, f[1], error->message);
      g_autofree char *prefix = g_strdup_printf ("%s:", f[0]);
      if (!g_str_has_prefix (error->message, prefix))
        fail_msg ("%s: message does not start with the file name: %s", f[0], error->message);
      for (size_t k = 2; f[k] != NULL; k++)
        if (strstr (error->message, f[k]) == NULL)
          fail_msg ("%s: message lacks '%s': %s", f[0], f[k], error->message);
      g_error_free (error);
      g_hash_table_add (listed, g_strdup (f[0]));
      n++;
    }
  assert_true (n >= 30);
  /* every other file (fuzz regressions): loads or fails, with a message, without a crash */
  GDir *gd = g_dir_open (dir, 0, NULL);
  assert_non_null (gd);
  const char *name;
  while ((name = g_dir_read_name (gd)) != NULL)
    {
      if (g_hash_table_contains (listed, name) || strcmp (name, "expected.txt") == 0)
        continue;
      g_autofree char *path = g_build_filename (dir, name, NULL);
      GError *error = NULL;
      LwDesign *d = lw_design_load_file (path, &error);
      assert_true ((d != NULL) != (error != NULL));
      if (error != NULL)
        assert_true (error->message[0] != '\0');
      lw_design_free (d);
      g_clear_error (&error);
    }
  g_dir_close (gd);
  g_hash_table_unref (listed);
  expect_nothing_printed (&cap);
}

static const char base_head[] =
  "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
  "<design xmlns=\"urn:loopwright:design\" version=\"1\">\n"
  "  <title>limits</title>\n"
  "  <plant dead_time_s=\"0\">1/(s*(s+1))</plant>\n"
  "  <sampling period_s=\"0.1\"/>\n";

static void
expect_error (const GString *doc, int code, const char *substring)
{
  GError *error = NULL;
  LwDesign *d = lw_design_load_data (doc->str, doc->len, "limits.lwd", &error);
  if (d != NULL)
    fail_msg ("loaded; expected an error containing '%s'", substring);
  if (error->code != code || strstr (error->message, substring) == NULL)
    fail_msg ("error %d '%s'; expected code %d containing '%s'", error->code, error->message,
              code, substring);
  g_error_free (error);
}

/* 10⁶ stages: refused by the size limit before any parsing. */
static void
test_million_stages (void **state)
{
  (void) state;
  GString *s = g_string_new (base_head);
  g_string_append (s, "  <variants>\n    <variant name=\"a\">\n");
  for (int i = 0; i < 1000000; i++)
    g_string_append (s, "<gain ratio=\"1\"/>");
  g_string_append (s, "\n    </variant>\n  </variants>\n</design>\n");
  expect_error (s, LW_DESIGN_ERROR_LIMIT, "more than the limit of 8388608 bytes");
  g_string_free (s, TRUE);
}

/* Under the size limit: more stages than LW_DESIGN_MAX_STAGES in one variant, and more
 * elements than LW_DESIGN_MAX_ELEMENTS, are refused while parsing (the parser stops). */
static void
test_stage_and_element_limits (void **state)
{
  (void) state;
  GString *s = g_string_new (base_head);
  g_string_append (s, "  <variants>\n    <variant name=\"a\">\n");
  for (int i = 0; i < LW_DESIGN_MAX_STAGES + 1; i++)
    g_string_append (s, "      <gain ratio=\"1\"/>\n");
  g_string_append (s, "    </variant>\n  </variants>\n</design>\n");
  /* the first stage is on line 8, so stage 1001 is on line 1008 */
  expect_error (s, LW_DESIGN_ERROR_LIMIT, "limits.lwd:1008: a <variant> with more than 1000");

  g_string_assign (s, base_head);
  g_string_append (s, "  <requirements>\n");
  for (int i = 0; i < LW_DESIGN_MAX_ELEMENTS + 10; i++)
    g_string_append (s, "<overshoot max_pct=\"1\"/>");
  g_string_append (s, "\n  </requirements>\n</design>\n");
  assert_true (s->len < LW_DESIGN_MAX_BYTES);
  expect_error (s, LW_DESIGN_ERROR_LIMIT, "more than 100000 elements");

  /* exactly the stage limit loads */
  g_string_assign (s, base_head);
  g_string_append (s, "  <variants>\n    <variant name=\"a\">\n");
  for (int i = 0; i < LW_DESIGN_MAX_STAGES; i++)
    g_string_append (s, "      <gain ratio=\"1\"/>\n");
  g_string_append (s, "    </variant>\n  </variants>\n</design>\n");
  GError *error = NULL;
  g_autoptr (LwDesign) d = lw_design_load_data (s->str, s->len, "limits.lwd", &error);
  assert_non_null (d);
  assert_int_equal (d->variants[0].n_stages, LW_DESIGN_MAX_STAGES);
  g_string_free (s, TRUE);
}

/* 100000 nested elements: refused at depth LW_DESIGN_MAX_DEPTH + 1, no recursion anywhere. */
static void
test_deep_nesting (void **state)
{
  (void) state;
  GString *s = g_string_new (base_head);
  for (int i = 0; i < 100000; i++)
    g_string_append (s, "<notes>");
  for (int i = 0; i < 100000; i++)
    g_string_append (s, "</notes>");
  g_string_append (s, "</design>\n");
  expect_error (s, LW_DESIGN_ERROR_LIMIT, "nested more than 16 deep");
  g_string_free (s, TRUE);
}

/* The same bytes through the file loader: a file over the limit is refused from its size. */
static void
test_file_limits (void **state)
{
  (void) state;
  g_autofree char *dir = g_dir_make_tmp ("lw-doc-XXXXXX", NULL);
  g_autofree char *big = g_build_filename (dir, "big.lwd", NULL);
  FILE *f = fopen (big, "wb");
  assert_non_null (f);
  assert_int_equal (fseek (f, (long) LW_DESIGN_MAX_BYTES + 1, SEEK_SET), 0);
  fputc ('x', f);
  fclose (f);
  GError *error = NULL;
  assert_null (lw_design_load_file (big, &error));
  assert_int_equal (error->code, LW_DESIGN_ERROR_LIMIT);
  g_clear_error (&error);
  g_autofree char *none = g_build_filename (dir, "missing.lwd", NULL);
  assert_null (lw_design_load_file (none, &error));
  assert_int_equal (error->code, LW_DESIGN_ERROR_IO);
  assert_non_null (strstr (error->message, "missing.lwd: cannot open"));
  g_clear_error (&error);
  assert_null (lw_design_load_file (dir, &error));   /* a directory */
  assert_int_equal (error->code, LW_DESIGN_ERROR_IO);
  g_clear_error (&error);
  /* A FIFO with no writer: refused at once as not a regular file (before the fix, open
   * waited for a writer forever). In a child under alarm(), so a regression fails here with
   * SIGALRM instead of hanging the suite. */
  g_autofree char *fifo = g_build_filename (dir, "pipe.lwd", NULL);
  assert_int_equal (mkfifo (fifo, 0600), 0);
  pid_t pid = fork ();
  assert_true (pid >= 0);
  if (pid == 0)
    {
      alarm (10);
      GError *e = NULL;
      LwDesign *d = lw_design_load_file (fifo, &e);
      _exit (d == NULL && e->code == LW_DESIGN_ERROR_IO
             && strstr (e->message, "pipe.lwd: not a regular file") != NULL ? 0 : 1);
    }
  int status = 0;
  assert_int_equal (waitpid (pid, &status, 0), pid);
  assert_true (WIFEXITED (status));
  assert_int_equal (WEXITSTATUS (status), 0);
  g_unlink (fifo);
  g_unlink (big);
  g_rmdir (dir);
}

/* The number syntax of documents is the command line's (src/core/lw-number.h) plus the white
 * space XML allows around an xsd:double; whole numbers in the same syntax; the period range
 * ends are accepted. */
static void
test_number_syntax (void **state)
{
  (void) state;
  struct { const char *period, *delay; double want_period; int want_delay; } ok[] = {
    { " 0.5 ", "1", 0.5, 1 },
    { "\n\t2.5e-3\r\n", " 10 ", 2.5e-3, 10 },
    { ".25", "0", 0.25, 0 },
    { "1e-12", "1000", 1e-12, 1000 },   /* the range ends (docs/cli.md, Limits) */
    { "1e9", "2", 1e9, 2 },
  };
  for (size_t i = 0; i < sizeof ok / sizeof ok[0]; i++)
    {
      g_autofree char *text = g_strdup_printf (
        "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
        "<design xmlns=\"urn:loopwright:design\" version=\"1\">\n"
        "  <title>numbers</title>\n  <plant>1/(s+1)</plant>\n"
        "  <sampling period_s=\"%s\" compute_delay_samples=\"%s\"/>\n"
        "  <variants active=\"a\"><variant name=\"a\"/></variants>\n</design>\n",
        ok[i].period, ok[i].delay);
      GError *error = NULL;
      LwDesign *d = lw_design_load_data (text, strlen (text), "numbers.lwd", &error);
      if (d == NULL)
        fail_msg ("period '%s' delay '%s' refused: %s", ok[i].period, ok[i].delay,
                  error->message);
      assert_true (d->period_s == ok[i].want_period);   /* exact: one correctly rounded read */
      assert_int_equal (d->compute_delay, ok[i].want_delay);
      lw_design_free (d);
    }
}

/* ---- saving ------------------------------------------------------------------------------- */

static LwDesign *
design_with_stages (size_t n, double gain)
{
  LwDesign *d = lw_design_new ("1/(s*(s+1))", 0.1);
  lw_design_set_string (&d->title, "save test");
  LwStage g = lw_stage_gain (gain);
  lw_design_variant_add_stage (&d->variants[0], &g);
  for (size_t i = 0; i < n; i++)
    {
      LwStage s = lw_stage_lead (1.0 + (double) i, 10.0 + (double) i);
      lw_design_variant_add_stage (&d->variants[0], &s);
    }
  return d;
}

static void
test_save_and_failures (void **state)
{
  (void) state;
  g_autofree char *dir = g_dir_make_tmp ("lw-doc-XXXXXX", NULL);
  g_autofree char *path = g_build_filename (dir, "d.lwd", NULL);
  g_autoptr (LwDesign) a = design_with_stages (1, 2.0);
  GError *error = NULL;
  assert_true (lw_design_save_file (a, path, &error));
  g_autoptr (LwDesign) back = load_ok (path);
  assert_true (lw_design_equal (a, back));
  /* permissions of an existing file are kept */
  assert_int_equal (g_chmod (path, 0640), 0);
  assert_true (lw_design_save_file (a, path, &error));
  struct stat st;
  assert_int_equal (stat (path, &st), 0);
  assert_int_equal (st.st_mode & 0777, 0640);

  /* an invalid design is not saved, and the old file stays */
  g_autoptr (LwDesign) bad = lw_design_copy (a);
  bad->period_s = -1.0;
  assert_false (lw_design_save_file (bad, path, &error));
  assert_non_null (strstr (error->message, "not saved"));
  g_clear_error (&error);
  g_autoptr (LwDesign) still = load_ok (path);
  assert_true (lw_design_equal (a, still));

  /* a directory that does not exist: the reason is named */
  g_autofree char *nowhere = g_build_filename (dir, "no-such-dir", "d.lwd", NULL);
  assert_false (lw_design_save_file (a, nowhere, &error));
  assert_int_equal (error->code, LW_DESIGN_ERROR_IO);
  assert_non_null (strstr (error->message, "No such file or directory"));
  g_clear_error (&error);

  /* A write that fails half-way (file size limit below the new text's length, in a child so
   * the limit does not touch this process): the save fails with the reason, the old file is
   * intact and no temporary file is left. */
  g_autoptr (LwDesign) big = design_with_stages (200, 3.0);
  pid_t pid = fork ();
  assert_true (pid >= 0);
  if (pid == 0)
    {
      signal (SIGXFSZ, SIG_IGN);
      struct rlimit rl = { 2000, 2000 };
      setrlimit (RLIMIT_FSIZE, &rl);
      GError *e = NULL;
      gboolean ok = lw_design_save_file (big, path, &e);
      int rc = ok ? 10 : (strstr (e->message, "File too large") != NULL ? 0 : 11);
      _exit (rc);
    }
  int status = 0;
  assert_int_equal (waitpid (pid, &status, 0), pid);
  assert_true (WIFEXITED (status));
  assert_int_equal (WEXITSTATUS (status), 0);
  g_autoptr (LwDesign) after = load_ok (path);
  assert_true (lw_design_equal (a, after));
  GDir *gd = g_dir_open (dir, 0, NULL);
  const char *name;
  int files = 0;
  while ((name = g_dir_read_name (gd)) != NULL)
    files++;
  g_dir_close (gd);
  assert_int_equal (files, 1);   /* d.lwd only */

  g_unlink (path);
  g_rmdir (dir);
}

/* kill -9 at random moments while a child saves two designs in turn: the file always loads
 * and equals one of the two (temporary files may be left behind; the target never breaks). */
static void
test_kill_during_saves (void **state)
{
  (void) state;
  g_autofree char *dir = g_dir_make_tmp ("lw-doc-XXXXXX", NULL);
  g_autofree char *path = g_build_filename (dir, "d.lwd", NULL);
  g_autoptr (LwDesign) a = design_with_stages (2, 2.0);
  g_autoptr (LwDesign) b = design_with_stages (300, 5.0);   /* ~20 kB: many writes to cut */
  GError *error = NULL;
  assert_true (lw_design_save_file (a, path, &error));
  GRand *rand = g_rand_new_with_seed (20240611);
  for (int round = 0; round < 40; round++)
    {
      pid_t pid = fork ();
      assert_true (pid >= 0);
      if (pid == 0)
        {
          for (unsigned long i = 0;; i++)
            lw_design_save_file ((i & 1) ? b : a, path, NULL);
        }
      g_usleep ((gulong) g_rand_int_range (rand, 0, 20000));
      kill (pid, SIGKILL);
      int status = 0;
      assert_int_equal (waitpid (pid, &status, 0), pid);
      g_autoptr (LwDesign) got = load_ok (path);
      assert_true (lw_design_equal (got, a) || lw_design_equal (got, b));
    }
  g_rand_free (rand);
  /* clean up, temporary files included */
  GDir *gd = g_dir_open (dir, 0, NULL);
  const char *name;
  while ((name = g_dir_read_name (gd)) != NULL)
    {
      g_autofree char *p = g_build_filename (dir, name, NULL);
      g_unlink (p);
    }
  g_dir_close (gd);
  g_rmdir (dir);
}

/* ---- the model API ------------------------------------------------------------------------ */

static void
test_model_api (void **state)
{
  (void) state;
  g_autoptr (LwDesign) d = lw_design_new ("1/(s+1)", 0.01);
  assert_int_equal (d->n_variants, 1);
  assert_string_equal (d->variants[0].name, "initial");
  assert_int_equal (d->compute_delay, 1);
  lw_design_add_variant (d, "second");
  assert_int_equal (lw_design_find_variant (d, "second"), 1);
  assert_int_equal (lw_design_find_variant (d, "third"), -1);
  GError *error = NULL;
  assert_true (lw_design_validate (d, &error));
  lw_design_add_variant (d, "second");
  assert_false (lw_design_validate (d, &error));
  assert_non_null (strstr (error->message, "two variants are named 'second'"));
  g_clear_error (&error);
  d->n_variants--;
  g_free (d->variants[d->n_variants].name);
  lw_design_set_string (&d->title, "bad \x01 control");
  assert_false (lw_design_validate (d, &error));
  assert_non_null (strstr (error->message, "control character"));
  g_clear_error (&error);
  lw_design_set_string (&d->title, "ok");
  lw_design_set_string (&d->plant, "s^2/(s+1)");
  assert_false (lw_design_validate (d, &error));
  assert_non_null (strstr (error->message, "plant"));
  g_clear_error (&error);

  /* view names: words of a-z, 0-9 and '-' starting with a letter, at most 32 bytes, none
   * twice; whether the view exists is not the document's to say */
  assert_null (lw_design_view_name_problem ("nichols"));
  assert_null (lw_design_view_name_problem ("a-view-2"));
  assert_null (lw_design_view_name_problem ("abcdefghijklmnopqrstuvwxyzabcdef"));   /* 32 */
  const char *bad[] = { "", "Nichols", "2d", "-x", "bode_w", "bode w",
                        "abcdefghijklmnopqrstuvwxyzabcdefg" /* 33 */ };
  for (size_t i = 0; i < G_N_ELEMENTS (bad); i++)
    if (lw_design_view_name_problem (bad[i]) == NULL)
      fail_msg ("view name '%s' accepted", bad[i]);
  lw_design_set_string (&d->plant, "1/(s+1)");
  assert_true (lw_design_validate (d, &error));
  d->views = g_strdupv ((char *[]) { "step", "bode-z", "step", NULL });
  assert_false (lw_design_validate (d, &error));
  assert_non_null (strstr (error->message, "'step' is listed twice"));
  g_clear_error (&error);
  g_strfreev (d->views);
  d->views = g_strdupv ((char *[]) { "step", "Bode", NULL });
  assert_false (lw_design_validate (d, &error));
  assert_non_null (strstr (error->message, "'Bode'"));
  g_clear_error (&error);
  g_strfreev (d->views);
  d->views = NULL;
}

/* A document written out by hand (the vocabulary of docs/file-format.md) reads to the literal
 * values it states, and saving them gives the very same text back: the round trip checked
 * against something written outside the writer, not only against itself. */
static const char literal_doc[] =
  "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
  "<design xmlns=\"urn:loopwright:design\" version=\"1\">\n"
  "  <title>Pump pressure, literal</title>\n"
  "  <plant dead_time_s=\"0.05\">2.5/((0.4*s+1)*(0.05*s+1))</plant>\n"
  "  <sampling period_s=\"0.01\" hold=\"zero-order\" compute_delay_samples=\"2\"/>\n"
  "  <requirements>\n"
  "    <phase-margin min_deg=\"50\"/>\n"
  "    <crossover min_rad_s=\"2\" max_rad_s=\"8.5\"/>\n"
  "  </requirements>\n"
  "  <variants active=\"slow\">\n"
  "    <variant name=\"fast\" period_s=\"0.005\">\n"
  "      <gain ratio=\"1.25\"/>\n"
  "      <lead label=\"lead\" zero_rad_s=\"3\" pole_rad_s=\"30\"/>\n"
  "    </variant>\n"
  "    <variant name=\"slow\">\n"
  "      <pi gain=\"0.8\" zero_rad_s=\"0.5\"/>\n"
  "    </variant>\n"
  "  </variants>\n"
  "</design>\n";

static void
test_literal_document (void **state)
{
  (void) state;
  GError *error = NULL;
  g_autoptr (LwDesign) d = lw_design_load_data (literal_doc, strlen (literal_doc), "literal",
                                                &error);
  if (d == NULL)
    fail_msg ("%s", error->message);
  assert_string_equal (d->title, "Pump pressure, literal");
  assert_string_equal (d->plant, "2.5/((0.4*s+1)*(0.05*s+1))");
  /* numbers as written: exact, since each literal is the shortest text of its double */
  assert_true (d->dead_time_s == 0.05);
  assert_true (d->period_s == 0.01);
  assert_int_equal (d->compute_delay, 2);
  assert_int_equal (d->n_requirements, 2);
  assert_int_equal (d->requirements[0].req.kind, LW_REQ_MIN_PHASE_MARGIN);
  assert_true (d->requirements[0].req.limit == 50.0);
  assert_int_equal (d->requirements[1].req.kind, LW_REQ_CROSSOVER_RANGE);
  assert_true (d->requirements[1].req.limit == 2.0 && d->requirements[1].req.limit_hi == 8.5);
  assert_int_equal (d->n_variants, 2);
  assert_int_equal (d->active, 1);
  const LwDesignVariant *fast = &d->variants[0], *slow = &d->variants[1];
  assert_string_equal (fast->name, "fast");
  assert_true (fast->has_period && fast->period_s == 0.005);
  assert_int_equal (fast->n_stages, 2);
  assert_int_equal (fast->stages[0].kind, LW_STAGE_GAIN);
  assert_true (fast->stages[0].p.gain.ratio == 1.25);
  assert_int_equal (fast->stages[1].kind, LW_STAGE_LEAD);
  assert_true (fast->stages[1].p.leadlag.zero_rad_s == 3.0
               && fast->stages[1].p.leadlag.pole_rad_s == 30.0);
  assert_string_equal (slow->name, "slow");
  assert_false (slow->has_period);
  assert_int_equal (slow->n_stages, 1);
  assert_int_equal (slow->stages[0].kind, LW_STAGE_PI);
  assert_true (slow->stages[0].p.pi.gain == 0.8 && slow->stages[0].p.pi.zero_rad_s == 0.5);

  size_t len = 0;
  g_autofree char *t = text_ok (d, &len);
  assert_string_equal (t, literal_doc);
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
    cmocka_unit_test (test_examples_load),
    cmocka_unit_test (test_round_trip),
    cmocka_unit_test (test_round_trip_everything),
    cmocka_unit_test (test_round_trip_points),
    cmocka_unit_test (test_literal_document),
    cmocka_unit_test (test_round_trip_variant_period),
    cmocka_unit_test (test_round_trip_actuator),
    cmocka_unit_test (test_round_trip_view_choices),
    cmocka_unit_test (test_view_names_as_text),
    cmocka_unit_test (test_numbers_round_trip),
    cmocka_unit_test (test_numbers_locale),
    cmocka_unit_test (test_hostile_files),
    cmocka_unit_test (test_million_stages),
    cmocka_unit_test (test_stage_and_element_limits),
    cmocka_unit_test (test_deep_nesting),
    cmocka_unit_test (test_file_limits),
    cmocka_unit_test (test_number_syntax),
    cmocka_unit_test (test_save_and_failures),
    cmocka_unit_test (test_kill_during_saves),
    cmocka_unit_test (test_model_api),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
