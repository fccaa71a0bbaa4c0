/* test-cli-json.c — the JSON writer of the command-line tool.
 *
 * Reference: json-glib's own parser (JsonParser) reads back what the writer produced; every
 * double must come back bit-for-bit (round-trip precision: 17 significant digits suffice for
 * IEEE 754 binary64, so the tolerance is exactly 0), absent or non-finite values must read
 * as null, and the text must be valid JSON even for values json-glib 1.6 prints with an
 * exponent and no decimal point (1e+20, 1e-300), which it would otherwise suffix with ".0".
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include <cmocka.h>

#include "lw-cli-json.h"

/* Values chosen to hit every shape of %.17g output: plain, with exponent and mantissa dot,
 * with exponent and no dot (the json-glib defect), subnormal, negative zero, integral. */
static const double awkward[] = {
  0.1, 1.0 / 3.0, -2.5, 1e20, 1e-300, 5e-324, -0.0, 2.0, 123456789012345678.0, -1e+100,
  1.7976931348623157e308,
};
#define N_AWKWARD (sizeof awkward / sizeof awkward[0])

static JsonNode *
parse_text (const char *text)
{
  g_autoptr (JsonParser) parser = json_parser_new ();
  GError *error = NULL;
  gboolean ok = json_parser_load_from_data (parser, text, -1, &error);
  if (!ok)
    print_error ("JsonParser rejected the text: %s\n%s\n", error->message, text);
  assert_true (ok);
  return json_node_copy (json_parser_get_root (parser));
}

static double
node_double (JsonNode *n)
{
  assert_int_equal (json_node_get_node_type (n), JSON_NODE_VALUE);
  /* json-glib reads "2.0" as a double and "2" as an integer; accept both exactly */
  if (json_node_get_value_type (n) == G_TYPE_INT64)
    return (double) json_node_get_int (n);
  return json_node_get_double (n);
}

static void
assert_same_double (double expected, double got)
{
  /* tolerance 0: round-trip precision means the very same binary64 value, sign of 0 too */
  assert_memory_equal (&expected, &got, sizeof expected);
}

static void
test_numbers_round_trip (void **state)
{
  (void) state;
  g_autoptr (JsonBuilder) b = json_builder_new ();
  json_builder_begin_array (b);
  for (size_t i = 0; i < N_AWKWARD; i++)
    lw_cli_json_add_number (b, awkward[i]);
  lw_cli_json_add_number (b, NAN);
  lw_cli_json_add_number (b, INFINITY);
  lw_cli_json_add_optional (b, false, 1.0);
  lw_cli_json_add_optional (b, true, 0.25);
  json_builder_end_array (b);
  JsonNode *root = json_builder_get_root (b);
  g_autofree char *text = lw_cli_json_to_text (root);
  json_node_unref (root);

  JsonNode *back = parse_text (text);
  JsonArray *a = json_node_get_array (back);
  assert_int_equal (json_array_get_length (a), N_AWKWARD + 4);
  for (size_t i = 0; i < N_AWKWARD; i++)
    assert_same_double (awkward[i], node_double (json_array_get_element (a, (guint) i)));
  assert_true (JSON_NODE_HOLDS_NULL (json_array_get_element (a, N_AWKWARD)));
  assert_true (JSON_NODE_HOLDS_NULL (json_array_get_element (a, N_AWKWARD + 1)));
  assert_true (JSON_NODE_HOLDS_NULL (json_array_get_element (a, N_AWKWARD + 2)));
  assert_same_double (0.25, node_double (json_array_get_element (a, N_AWKWARD + 3)));
  json_node_unref (back);
  /* the repaired text ends in exactly one newline */
  size_t n = strlen (text);
  assert_true (n >= 2 && text[n - 1] == '\n' && text[n - 2] != '\n');
}

static void
test_strings_untouched (void **state)
{
  (void) state;
  /* the repair must not alter string contents that look like the defective token */
  g_autoptr (JsonBuilder) b = json_builder_new ();
  json_builder_begin_object (b);
  json_builder_set_member_name (b, "1e+20.0");
  json_builder_add_string_value (b, "x \"1e5.0\" -3e2.0");
  json_builder_end_object (b);
  JsonNode *root = json_builder_get_root (b);
  g_autofree char *text = lw_cli_json_to_text (root);
  json_node_unref (root);
  JsonNode *back = parse_text (text);
  JsonObject *o = json_node_get_object (back);
  assert_string_equal (json_object_get_string_member (o, "1e+20.0"), "x \"1e5.0\" -3e2.0");
  json_node_unref (back);
}

static void
test_model_layout (void **state)
{
  (void) state;
  /* H(z) = 1e20 (z + 0.5) / ((z − 1)(z² − z + 0.5)), poles 0.5 ± 0.5j: hand-built, no core
   * call, so this checks the layout alone */
  double complex zeros[] = { -0.5 };
  double complex poles[] = { 1.0, 0.5 + 0.5 * I, 0.5 - 0.5 * I };
  LwModel m = { .domain = LW_DOMAIN_Z, .period_s = 0.01, .gain = 1e20, .n_zeros = 1,
              .n_poles = 3, .zeros = zeros, .poles = poles };
  g_autoptr (JsonBuilder) b = json_builder_new ();
  lw_cli_json_add_model (b, &m);
  JsonNode *root = json_builder_get_root (b);
  g_autofree char *text = lw_cli_json_to_text (root);
  json_node_unref (root);

  JsonNode *back = parse_text (text);
  JsonObject *o = json_node_get_object (back);
  assert_int_equal (json_object_get_size (o), 3);
  assert_same_double (1e20, node_double (json_object_get_member (o, "gain")));
  JsonArray *z = json_object_get_array_member (o, "zeros");
  JsonArray *p = json_object_get_array_member (o, "poles");
  assert_int_equal (json_array_get_length (z), 1);
  assert_int_equal (json_array_get_length (p), 3);
  for (guint i = 0; i < 3; i++)
    {
      JsonArray *pair = json_array_get_array_element (p, i);
      assert_int_equal (json_array_get_length (pair), 2);
      assert_same_double (creal (poles[i]), node_double (json_array_get_element (pair, 0)));
      assert_same_double (cimag (poles[i]), node_double (json_array_get_element (pair, 1)));
    }
  JsonArray *zpair = json_array_get_array_element (z, 0);
  assert_same_double (-0.5, node_double (json_array_get_element (zpair, 0)));
  json_node_unref (back);
}

static void
test_loop_nulls (void **state)
{
  (void) state;
  /* two gain crossovers, no phase crossover, no gain margin, no sensitivity peak */
  double wc[] = { 3.0, 40.0 };
  double pm[] = { 45.5, -170.25 };
  LwMargins m = { 0 };
  m.n_gain_crossovers = 2;
  m.gain_crossovers_rad_s = wc;
  m.phase_margins_deg = pm;
  m.has_phase_margin = true;
  m.phase_margin_deg = -170.25;
  m.gain_crossover_rad_s = 40.0;
  m.has_delay_margin = true;
  m.delay_margin_s = 1e-3;
  m.delay_margin_samples = 0.5;
  g_autoptr (JsonBuilder) b = json_builder_new ();
  lw_cli_json_add_loop (b, &m);
  JsonNode *root = json_builder_get_root (b);
  g_autofree char *text = lw_cli_json_to_text (root);
  json_node_unref (root);

  JsonNode *back = parse_text (text);
  JsonObject *o = json_node_get_object (back);
  static const char *const keys[] = {
    "gain_crossovers_rad_s", "phase_margins_deg", "phase_crossovers_rad_s", "gain_margins_db",
    "phase_margin_deg", "gain_crossover_rad_s", "gain_margin_db", "phase_crossover_rad_s",
    "delay_margin_s", "delay_margin_samples", "sensitivity_peak", "sensitivity_peak_rad_s",
    "unresolved_gain_crossovers", "unresolved_phase_crossovers", "unresolved_bands_rad_s",
  };
  assert_int_equal (json_object_get_size (o), G_N_ELEMENTS (keys));
  for (size_t i = 0; i < G_N_ELEMENTS (keys); i++)
    assert_true (json_object_has_member (o, keys[i]));
  assert_int_equal (json_array_get_length (json_object_get_array_member (o, "phase_margins_deg")),
                    2);
  assert_int_equal (
    json_array_get_length (json_object_get_array_member (o, "phase_crossovers_rad_s")), 0);
  assert_same_double (-170.25, node_double (json_object_get_member (o, "phase_margin_deg")));
  assert_same_double (40.0, node_double (json_object_get_member (o, "gain_crossover_rad_s")));
  assert_true (json_object_get_null_member (o, "gain_margin_db"));
  assert_true (json_object_get_null_member (o, "phase_crossover_rad_s"));
  assert_true (json_object_get_null_member (o, "sensitivity_peak"));
  assert_true (json_object_get_null_member (o, "sensitivity_peak_rad_s"));
  assert_same_double (0.5, node_double (json_object_get_member (o, "delay_margin_samples")));
  json_node_unref (back);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_numbers_round_trip),
    cmocka_unit_test (test_strings_untouched),
    cmocka_unit_test (test_model_layout),
    cmocka_unit_test (test_loop_nulls),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
