/* lw-cli-json.c — JSON output of the command-line tool (see lw-cli-json.h).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-cli-json.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

void
lw_cli_json_add_number (JsonBuilder *b, double v)
{
  if (isfinite (v))
    json_builder_add_double_value (b, v);
  else
    json_builder_add_null_value (b);
}

void
lw_cli_json_add_optional (JsonBuilder *b, bool has, double v)
{
  if (has)
    lw_cli_json_add_number (b, v);
  else
    json_builder_add_null_value (b);
}

void
lw_cli_json_add_number_array (JsonBuilder *b, const double *v, size_t n)
{
  json_builder_begin_array (b);
  for (size_t i = 0; i < n; i++)
    lw_cli_json_add_number (b, v[i]);
  json_builder_end_array (b);
}

void
lw_cli_json_add_complex_array (JsonBuilder *b, const double complex *v, size_t n)
{
  json_builder_begin_array (b);
  for (size_t i = 0; i < n; i++)
    {
      json_builder_begin_array (b);
      lw_cli_json_add_number (b, creal (v[i]));
      lw_cli_json_add_number (b, cimag (v[i]));
      json_builder_end_array (b);
    }
  json_builder_end_array (b);
}

static void
member_number (JsonBuilder *b, const char *name, double v)
{
  json_builder_set_member_name (b, name);
  lw_cli_json_add_number (b, v);
}

static void
member_optional (JsonBuilder *b, const char *name, bool has, double v)
{
  json_builder_set_member_name (b, name);
  lw_cli_json_add_optional (b, has, v);
}

static void
member_numbers (JsonBuilder *b, const char *name, const double *v, size_t n)
{
  json_builder_set_member_name (b, name);
  lw_cli_json_add_number_array (b, v, n);
}

void
lw_cli_json_add_model (JsonBuilder *b, const LwModel *m)
{
  g_assert (m != NULL);
  json_builder_begin_object (b);
  member_number (b, "gain", m->gain);
  json_builder_set_member_name (b, "zeros");
  lw_cli_json_add_complex_array (b, m->zeros, m->n_zeros);
  json_builder_set_member_name (b, "poles");
  lw_cli_json_add_complex_array (b, m->poles, m->n_poles);
  json_builder_end_object (b);
}

void
lw_cli_json_add_loop (JsonBuilder *b, const LwMargins *m)
{
  g_assert (m != NULL);
  json_builder_begin_object (b);
  member_numbers (b, "gain_crossovers_rad_s", m->gain_crossovers_rad_s, m->n_gain_crossovers);
  member_numbers (b, "phase_margins_deg", m->phase_margins_deg, m->n_gain_crossovers);
  member_numbers (b, "phase_crossovers_rad_s", m->phase_crossovers_rad_s,
                  m->n_phase_crossovers);
  member_numbers (b, "gain_margins_db", m->gain_margins_db, m->n_phase_crossovers);
  member_optional (b, "phase_margin_deg", m->has_phase_margin, m->phase_margin_deg);
  member_optional (b, "gain_crossover_rad_s", m->has_phase_margin, m->gain_crossover_rad_s);
  member_optional (b, "gain_margin_db", m->has_gain_margin, m->gain_margin_db);
  member_optional (b, "phase_crossover_rad_s", m->has_gain_margin, m->phase_crossover_rad_s);
  member_optional (b, "delay_margin_s", m->has_delay_margin, m->delay_margin_s);
  member_optional (b, "delay_margin_samples", m->has_delay_margin, m->delay_margin_samples);
  member_optional (b, "sensitivity_peak", m->has_sensitivity, m->sensitivity_peak);
  member_optional (b, "sensitivity_peak_rad_s", m->has_sensitivity,
                   m->sensitivity_peak_rad_s);
  json_builder_set_member_name (b, "unresolved_gain_crossovers");
  json_builder_add_int_value (b, (gint64) m->n_unresolved_gain_crossovers);
  json_builder_set_member_name (b, "unresolved_phase_crossovers");
  json_builder_add_int_value (b, (gint64) m->n_unresolved_phase_crossovers);
  json_builder_set_member_name (b, "unresolved_bands_rad_s");
  json_builder_begin_array (b);
  for (size_t i = 0; i < m->n_unresolved_bands; i++)
    lw_cli_json_add_number_array (b, m->unresolved_bands_rad_s + 2 * i, 2);
  json_builder_end_array (b);
  json_builder_end_object (b);
}

void
lw_cli_json_add_closed_loop (JsonBuilder *b, const LwEvaluation *ev)
{
  g_assert (ev != NULL);
  json_builder_begin_object (b);
  json_builder_set_member_name (b, "stable");
  json_builder_add_boolean_value (b, ev->stable);
  json_builder_set_member_name (b, "poles");
  lw_cli_json_add_complex_array (b, ev->closed_loop_poles, ev->n_closed_loop_poles);
  json_builder_set_member_name (b, "poles_complete");
  json_builder_add_boolean_value (b, ev->closed_loop_poles_complete);
  json_builder_set_member_name (b, "order");
  json_builder_add_int_value (b, (gint64) ev->closed_loop_order);
  json_builder_set_member_name (b, "unstable_poles");
  json_builder_add_int_value (b, (gint64) ev->n_closed_loop_unstable);
  json_builder_end_object (b);
}

void
lw_cli_json_add_step (JsonBuilder *b, const LwStep *s)
{
  g_assert (s != NULL);
  json_builder_begin_object (b);
  member_optional (b, "final_value", s->has_final, s->final_value);
  member_optional (b, "overshoot_pct", s->has_overshoot, s->overshoot_pct);
  member_optional (b, "rise_time_s", s->has_rise, s->rise_time_s);
  member_optional (b, "settling_time_s", s->has_settling, s->settling_time_s);
  member_numbers (b, "samples", s->samples, s->n);
  json_builder_end_object (b);
}

JsonNode *
lw_cli_json_evaluation (const LwEvaluation *ev)
{
  g_return_val_if_fail (ev != NULL, NULL);
  g_autoptr (JsonBuilder) b = json_builder_new ();
  json_builder_begin_object (b);
  member_number (b, "sample_period_s", ev->period_s);
  json_builder_set_member_name (b, "plant_z");
  lw_cli_json_add_model (b, ev->plant_z);
  json_builder_set_member_name (b, "plant_w");
  lw_cli_json_add_model (b, ev->plant_w);
  json_builder_set_member_name (b, "loop");
  lw_cli_json_add_loop (b, &ev->margins);
  json_builder_set_member_name (b, "closed_loop");
  lw_cli_json_add_closed_loop (b, ev);
  json_builder_set_member_name (b, "step");
  lw_cli_json_add_step (b, &ev->step);
  json_builder_end_object (b);
  return json_builder_get_root (b);
}

static void
member_count (JsonBuilder *b, const char *name, size_t v)
{
  json_builder_set_member_name (b, name);
  json_builder_add_int_value (b, (gint64) v);
}

void
lw_cli_json_add_indices (JsonBuilder *b, const LwSimIndices *ix)
{
  g_assert (ix != NULL);
  json_builder_begin_object (b);
  member_number (b, "iae", ix->iae);
  member_number (b, "ise", ix->ise);
  member_number (b, "itae", ix->itae);
  member_number (b, "control_effort", ix->control_effort);
  json_builder_end_object (b);
}

void
lw_cli_json_add_disturbance_response (JsonBuilder *b, const LwSimResponse *r)
{
  g_assert (r != NULL);
  json_builder_begin_object (b);
  member_numbers (b, "samples", r->y, r->n);
  member_numbers (b, "actuator", r->u, r->n);
  member_number (b, "peak", r->peak);
  member_number (b, "peak_time_s", r->peak_time_s);
  member_number (b, "last_value", r->n > 0 ? r->y[r->n - 1] : NAN);
  member_count (b, "saturated_samples", r->n_saturated);
  member_count (b, "held_samples", r->n_held);
  member_optional (b, "intersample_ripple", r->has_continuous, r->intersample_ripple);
  member_optional (b, "continuous_peak", r->has_continuous, r->continuous_peak);
  json_builder_set_member_name (b, "indices");
  lw_cli_json_add_indices (b, &r->indices);
  json_builder_end_object (b);
}

JsonNode *
lw_cli_json_analysis (const LwEvaluation *ev, const LwStep *step, const LwSimResponse *ref,
                      const LwSimResponse *input_step, const LwSimResponse *output_step)
{
  g_return_val_if_fail (ev != NULL && step != NULL && ref != NULL && input_step != NULL
                        && output_step != NULL, NULL);
  g_autoptr (JsonBuilder) b = json_builder_new ();
  json_builder_begin_object (b);
  member_number (b, "sample_period_s", ev->period_s);
  json_builder_set_member_name (b, "plant_z");
  lw_cli_json_add_model (b, ev->plant_z);
  json_builder_set_member_name (b, "plant_w");
  lw_cli_json_add_model (b, ev->plant_w);
  json_builder_set_member_name (b, "loop");
  lw_cli_json_add_loop (b, &ev->margins);
  json_builder_set_member_name (b, "closed_loop");
  lw_cli_json_add_closed_loop (b, ev);

  json_builder_set_member_name (b, "step");
  json_builder_begin_object (b);
  member_optional (b, "final_value", step->has_final, step->final_value);
  member_optional (b, "overshoot_pct", step->has_overshoot, step->overshoot_pct);
  member_optional (b, "rise_time_s", step->has_rise, step->rise_time_s);
  member_optional (b, "settling_time_s", step->has_settling, step->settling_time_s);
  member_numbers (b, "samples", step->samples, step->n);
  member_numbers (b, "actuator", ref->u, ref->n);
  member_count (b, "saturated_samples", ref->n_saturated);
  member_count (b, "held_samples", ref->n_held);
  json_builder_set_member_name (b, "continuous");
  if (ref->has_continuous)
    {
      json_builder_begin_object (b);
      member_numbers (b, "t_s", ref->t_fine_s, ref->n_fine);
      member_numbers (b, "y", ref->y_fine, ref->n_fine);
      member_number (b, "peak", ref->continuous_peak);
      member_number (b, "peak_time_s", ref->continuous_peak_time_s);
      json_builder_end_object (b);
    }
  else
    json_builder_add_null_value (b);
  member_optional (b, "intersample_ripple", ref->has_continuous, ref->intersample_ripple);
  json_builder_end_object (b);

  json_builder_set_member_name (b, "disturbance");
  json_builder_begin_object (b);
  json_builder_set_member_name (b, "input_step");
  lw_cli_json_add_disturbance_response (b, input_step);
  json_builder_set_member_name (b, "output_step");
  lw_cli_json_add_disturbance_response (b, output_step);
  json_builder_end_object (b);

  json_builder_set_member_name (b, "indices");
  lw_cli_json_add_indices (b, &ref->indices);
  json_builder_end_object (b);
  return json_builder_get_root (b);
}

/* Copies text to out, dropping the ".0" that json-glib appends to a number token that has an
 * exponent but no decimal point ("1e+20.0" -> "1e+20"). String literals are copied untouched. */
static void
repair_numbers (const char *text, GString *out)
{
  const char *p = text;
  while (*p != '\0')
    {
      if (*p == '"')
        {
          /* copy the string literal, honouring backslash escapes */
          g_string_append_c (out, *p++);
          while (*p != '\0' && *p != '"')
            {
              if (*p == '\\' && p[1] != '\0')
                g_string_append_c (out, *p++);
              g_string_append_c (out, *p++);
            }
          if (*p == '"')
            g_string_append_c (out, *p++);
          continue;
        }
      if (*p == '-' || g_ascii_isdigit (*p))
        {
          size_t len = strspn (p, "0123456789+-.eE");
          const char *e = memchr (p, 'e', len);
          if (e == NULL)
            e = memchr (p, 'E', len);
          size_t keep = len;
          if (e != NULL && len >= 2 && p[len - 2] == '.' && p[len - 1] == '0'
              && memchr (p, '.', (size_t) (e - p)) == NULL
              && memchr (e, '.', len - 2 - (size_t) (e - p)) == NULL)
            keep = len - 2;
          g_string_append_len (out, p, (gssize) keep);
          p += len;
          continue;
        }
      g_string_append_c (out, *p++);
    }
}

char *
lw_cli_json_to_text (JsonNode *root)
{
  g_return_val_if_fail (root != NULL, NULL);
  g_autoptr (JsonGenerator) gen = json_generator_new ();
  json_generator_set_pretty (gen, TRUE);
  json_generator_set_indent (gen, 2);
  json_generator_set_root (gen, root);
  g_autofree char *raw = json_generator_to_data (gen, NULL);
  GString *out = g_string_sized_new (strlen (raw) + 2);
  repair_numbers (raw, out);
  g_string_append_c (out, '\n');
  return g_string_free (out, FALSE);
}

void
lw_cli_json_print_builder (JsonBuilder *b)
{
  JsonNode *root = json_builder_get_root (b);
  char *text = lw_cli_json_to_text (root);
  fputs (text, stdout);
  g_free (text);
  json_node_unref (root);
}
