/* lw-cli-measured.c — `analyze --measured FILE.csv --measured-kind KIND`: the loop on a
 * measured frequency response (lw-measured.h, docs/measured-data.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <complex.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-cli-json.h"
#include "lw-cli-measured.h"
#include "lw-measured.h"

void
lw_cli_measured_args_clear (LwCliMeasuredArgs *a)
{
  g_clear_pointer (&a->files, g_strfreev);
  g_clear_pointer (&a->kind, g_free);
  g_clear_pointer (&a->unstable_poles, g_free);
}

/* Reads FILE (mapped, so a huge file is not read whole: the parser stops at its line limit). */
int
lw_cli_measured_read (const char *file, LwMeasured **out, char *note, size_t note_size)
{
  g_autoptr (GError) gerr = NULL;
  g_autoptr (GMappedFile) mf = g_mapped_file_new (file, FALSE, &gerr);
  if (mf == NULL)
    {
      lw_cli_bad_input ("--measured", "cannot read %s: %s", file, gerr->message);
      return LW_EXIT_BAD_INPUT;
    }
  LwMeasuredPlace place = { 0, 0 };
  LwError err;
  lw_error_clear (&err);
  LwStatus st = lw_measured_parse (g_mapped_file_get_contents (mf),
                                   g_mapped_file_get_length (mf), out, note, note_size, &place,
                                   &err);
  if (st == LW_OK)
    return LW_EXIT_OK;
  if (st == LW_ERR_NOMEM)
    {
      lw_cli_bad_input ("--measured", "%s: %s", file, err.message);
      return LW_EXIT_INTERNAL;
    }
  if (place.line > 0 && place.column > 0)
    fprintf (stderr, "%s:%zu:%zu: %s\n", file, place.line, place.column, err.message);
  else if (place.line > 0)
    fprintf (stderr, "%s:%zu: %s\n", file, place.line, err.message);
  else
    fprintf (stderr, "%s: %s\n", file, err.message);
  return LW_EXIT_BAD_INPUT;
}

static void
add_crossings (JsonBuilder *b, const char *freq_key, const char *margin_key,
               const char *interval_key, const char *coherence_key, const char *noise_key,
               const LwMeasuredCrossing *c, size_t n)
{
  json_builder_set_member_name (b, freq_key);
  json_builder_begin_array (b);
  for (size_t i = 0; i < n; i++)
    lw_cli_json_add_number (b, c[i].omega_rad_s);
  json_builder_end_array (b);
  json_builder_set_member_name (b, margin_key);
  json_builder_begin_array (b);
  for (size_t i = 0; i < n; i++)
    lw_cli_json_add_number (b, c[i].margin);
  json_builder_end_array (b);
  if (interval_key == NULL)
    return;
  json_builder_set_member_name (b, interval_key);
  json_builder_begin_array (b);
  for (size_t i = 0; i < n; i++)
    {
      json_builder_begin_array (b);
      lw_cli_json_add_number (b, c[i].lo_rad_s);
      lw_cli_json_add_number (b, c[i].hi_rad_s);
      json_builder_end_array (b);
    }
  json_builder_end_array (b);
  json_builder_set_member_name (b, coherence_key);
  json_builder_begin_array (b);
  for (size_t i = 0; i < n; i++)
    json_builder_add_boolean_value (b, c[i].low_coherence);
  json_builder_end_array (b);
  json_builder_set_member_name (b, noise_key);
  json_builder_begin_array (b);
  for (size_t i = 0; i < n; i++)
    json_builder_add_boolean_value (b, c[i].within_noise);
  json_builder_end_array (b);
}

static void
member_number (JsonBuilder *b, const char *key, double v)
{
  json_builder_set_member_name (b, key);
  lw_cli_json_add_number (b, v);
}

/* The loop block with the keys a model's has (lw_cli_json_add_loop); nothing is unresolved in
 * data, so those counts are 0 and the bands empty. */
static void
add_loop (JsonBuilder *b, const LwMeasuredMargins *mm, double period_s)
{
  json_builder_begin_object (b);
  add_crossings (b, "gain_crossovers_rad_s", "phase_margins_deg", NULL, NULL, NULL, mm->gain,
                 mm->n_gain);
  add_crossings (b, "phase_crossovers_rad_s", "gain_margins_db", NULL, NULL, NULL, mm->phase,
                 mm->n_phase);
  member_number (b, "phase_margin_deg", mm->phase_margin_deg);
  member_number (b, "gain_crossover_rad_s", mm->gain_crossover_rad_s);
  member_number (b, "gain_margin_db", mm->gain_margin_db);
  member_number (b, "phase_crossover_rad_s", mm->phase_crossover_rad_s);
  member_number (b, "delay_margin_s", mm->delay_margin_s);
  member_number (b, "delay_margin_samples", mm->delay_margin_s / period_s);
  member_number (b, "sensitivity_peak", mm->sensitivity_peak);
  member_number (b, "sensitivity_peak_rad_s", mm->sensitivity_peak_rad_s);
  json_builder_set_member_name (b, "unresolved_gain_crossovers");
  json_builder_add_int_value (b, 0);
  json_builder_set_member_name (b, "unresolved_phase_crossovers");
  json_builder_add_int_value (b, 0);
  json_builder_set_member_name (b, "unresolved_bands_rad_s");
  json_builder_begin_array (b);
  json_builder_end_array (b);
  json_builder_end_object (b);
}

static void
member_int_or_null (JsonBuilder *b, const char *key, gboolean known, int v)
{
  json_builder_set_member_name (b, key);
  if (known)
    json_builder_add_int_value (b, v);
  else
    json_builder_add_null_value (b);
}

/* The Nyquist criterion on the data, as members of the measured object. */
static void
add_stability (JsonBuilder *b, const LwMeasuredStability *st)
{
  static const struct { unsigned bit; const char *name; } why[] = {
    { LW_NYQUIST_LOW_END, "low_end" },
    { LW_NYQUIST_HIGH_END, "high_end" },
    { LW_NYQUIST_NOT_REAL, "not_real_at_nyquist" },
    { LW_NYQUIST_NEAR_MINUS_ONE, "near_minus_one" },
    { LW_NYQUIST_POLE_COUNT, "unstable_pole_count" },
  };
  gboolean decided = st->verdict != LW_MEASURED_UNDECIDED;
  json_builder_set_member_name (b, "open_loop_unstable_poles");
  json_builder_add_int_value (b, st->open_loop_unstable);
  json_builder_set_member_name (b, "stability");
  json_builder_add_string_value (b, lw_measured_verdict_name (st->verdict));
  member_int_or_null (b, "closed_loop_unstable_poles", decided, st->closed_loop_unstable);
  member_int_or_null (b, "encirclements", decided, st->encirclements);
  member_int_or_null (b, "loop_type", st->loop_type >= 0, st->loop_type);
  json_builder_set_member_name (b, "stability_undecided_because");
  json_builder_begin_array (b);
  for (size_t i = 0; i < G_N_ELEMENTS (why); i++)
    if (st->undecided & why[i].bit)
      json_builder_add_string_value (b, why[i].name);
  json_builder_end_array (b);
  json_builder_set_member_name (b, "stability_note");
  json_builder_add_string_value (b, st->note);
}

/* a crossing's flags in the text report */
static const char *
crossing_flags (const LwMeasuredCrossing *c)
{
  if (c->low_coherence && c->within_noise)
    return "  (low coherence; within noise)";
  if (c->low_coherence)
    return "  (low coherence)";
  return c->within_noise ? "  (within noise)" : "";
}

void
lw_cli_measured_print_cautions (const LwMeasuredMargins *mm, const char *indent)
{
  if (mm->crossover_above_data)
    printf ("%scaution: |L| >= 1 at the highest measured frequency: a gain crossover lies above "
            "the data\n", indent);
  if (mm->crossover_below_data)
    printf ("%scaution: |L| < 1 at the lowest measured frequency: a gain crossover may lie "
            "below the data\n", indent);
}

/* The text section of the loop on the data; label names the data (a file, a document's
 * <measured>); closing: the last line saying what needs a model. */
void
lw_cli_measured_print (const LwCliMeasuredLoop *ml, const char *label, gboolean closing)
{
  const LwMeasuredMargins *mm = &ml->loop.margins;
  const double *omega = ml->loop.omega_rad_s;
  size_t n_used = ml->loop.n, n_all = ml->data->n;
  double T = ml->period_s;
  printf ("Measured plant: %s (%s), %zu points from %.6g to %.6g rad/s", label,
          lw_design_measured_kind_name (ml->kind), n_all, omega[0], omega[n_used - 1]);
  if (n_used < n_all)
    printf (", %zu of them below pi/T", n_used);
  printf ("\n");
  if (ml->note[0] != '\0')
    printf ("  note: %s\n", ml->note);
  if (ml->kind == LW_MEASURED_CONTINUOUS)
    printf ("  the hold's response and the dead time applied; the aliasing terms neglected "
            "(docs/measured-data.md)\n");
  if (isfinite (ml->loop.model_diff))
    printf ("  %s against the data: largest relative difference %.3g\n",
            closing ? "--plant" : "the plant model", ml->loop.model_diff);
  printf ("\nMargins of the loop L(z) = z^-%d C(z) P(z) on the data, found between the points\n",
          ml->compute_delay);
  printf ("  %-26s %-20s %s\n", "gain crossover (rad/s)", "phase margin (deg)",
          "between (rad/s)");
  if (mm->n_gain == 0)
    printf ("  none in the data\n");
  for (size_t i = 0; i < mm->n_gain && i < LW_CLI_MAX_LISTED; i++)
    printf ("  %-26.6g %-20.4g %.6g … %.6g%s\n", mm->gain[i].omega_rad_s, mm->gain[i].margin,
            mm->gain[i].lo_rad_s, mm->gain[i].hi_rad_s, crossing_flags (&mm->gain[i]));
  printf ("  %-26s %-20s %s\n", "phase crossover (rad/s)", "gain margin (dB)",
          "between (rad/s)");
  if (mm->n_phase == 0)
    printf ("  none in the data\n");
  for (size_t i = 0; i < mm->n_phase && i < LW_CLI_MAX_LISTED; i++)
    printf ("  %-26.6g %-20.4g %.6g … %.6g%s\n", mm->phase[i].omega_rad_s, mm->phase[i].margin,
            mm->phase[i].lo_rad_s, mm->phase[i].hi_rad_s, crossing_flags (&mm->phase[i]));
  printf ("\n");
  if (isfinite (mm->phase_margin_deg))
    printf ("  %-24s %.4g deg at %.6g rad/s\n", "phase margin", mm->phase_margin_deg,
            mm->gain_crossover_rad_s);
  if (isfinite (mm->gain_margin_db))
    printf ("  %-24s %.4g dB at %.6g rad/s\n", "gain margin", mm->gain_margin_db,
            mm->phase_crossover_rad_s);
  if (isfinite (mm->delay_margin_s))
    printf ("  %-24s %.4g s (%.4g samples)\n", "delay margin", mm->delay_margin_s,
            mm->delay_margin_s / T);
  printf ("  %-24s %.4g at %.6g rad/s (the largest at a measured point)\n", "sensitivity peak",
          mm->sensitivity_peak, mm->sensitivity_peak_rad_s);
  lw_cli_measured_print_cautions (mm, "  ");
  const LwMeasuredStability *st = &ml->loop.stability;
  printf ("\nStability on the data (Nyquist criterion, %d open-loop unstable pole%s given): "
          "%s\n  %s\n", st->open_loop_unstable, st->open_loop_unstable == 1 ? "" : "s",
          lw_measured_verdict_name (st->verdict), st->note);
  if (closing)
    printf ("\nThe closed-loop poles and the time responses need a model: fit one to the data, "
            "or give --plant.\n");
}

void
lw_cli_measured_loop_clear (LwCliMeasuredLoop *ml)
{
  lw_measured_loop_clear (&ml->loop);
  lw_measured_free (ml->data);
  lw_cli_loop_clear (&ml->lp);
  memset (ml, 0, sizeof *ml);
}

int
lw_cli_measured_one (const LwCliMeasuredArgs *a, const char *what)
{
  if (a->files == NULL || a->files[0] == NULL || a->files[1] == NULL)
    return LW_EXIT_OK;
  lw_cli_bad_input ("--measured", "given more than once: %s", what);
  return LW_EXIT_BAD_INPUT;
}

int
lw_cli_measured_kind (const LwCliMeasuredArgs *m, LwMeasuredKind *kind)
{
  if (m->kind == NULL)
    {
      lw_cli_bad_input ("--measured-kind", "is required with --measured: sampled or continuous "
                        "(docs/measured-data.md)");
      return LW_EXIT_BAD_INPUT;
    }
  for (int k = LW_MEASURED_SAMPLED; k <= LW_MEASURED_CONTINUOUS; k++)
    if (strcmp (m->kind, lw_design_measured_kind_name ((LwMeasuredKind) k)) == 0)
      {
        *kind = (LwMeasuredKind) k;
        return LW_EXIT_OK;
      }
  g_autofree char *shown = g_utf8_make_valid (m->kind, -1);
  lw_cli_bad_input ("--measured-kind", "'%s' is neither sampled nor continuous", shown);
  return LW_EXIT_BAD_INPUT;
}

int
lw_cli_measured_loop_build (const char *cmd, const LwCliLoopArgs *loop,
                            const LwCliMeasuredArgs *m, LwCliMeasuredLoop *ml)
{
  memset (ml, 0, sizeof *ml);
  int kind_status = lw_cli_measured_kind (m, &ml->kind);
  if (kind_status != LW_EXIT_OK)
    return kind_status;
  /* the loop options, with a plant of 1 when none is given (only its checks are used then) */
  LwCliLoopArgs la = *loop;
  ml->has_model = loop->plant != NULL;
  if (!ml->has_model)
    la.plant = (char *) "1";
  if (ml->kind == LW_MEASURED_SAMPLED && loop->dead_time != NULL)
    {
      lw_cli_bad_input ("--dead-time", "a sampled measurement holds the plant's dead time "
                        "already; give it only with --measured-kind continuous");
      return LW_EXIT_BAD_INPUT;
    }
  gint64 poles = 0;
  if (m->unstable_poles != NULL
      && !lw_cli_parse_integer ("--measured-unstable-poles", m->unstable_poles, 0,
                                LW_MEASURED_MAX_UNSTABLE_POLES, &poles))
    return LW_EXIT_BAD_INPUT;
  int status = lw_cli_loop_build (cmd, &la, &ml->lp);
  if (status != LW_EXIT_OK)
    return status;
  status = lw_cli_measured_read (lw_cli_measured_file (m), &ml->data, ml->note, sizeof ml->note);
  if (status != LW_EXIT_OK)
    {
      lw_cli_loop_clear (&ml->lp);
      return status;
    }
  const LwCliLoop *lp = &ml->lp;
  ml->period_s = lp->period_s;
  ml->compute_delay = lp->compute_delay;
  LwError err;
  lw_error_clear (&err);
  LwStatus st = lw_measured_loop_close (ml->data, ml->kind, lp->period_s, lp->dead_time_s,
                                        lp->compute_delay, lp->controller_z,
                                        ml->has_model ? lp->sampled : NULL, (int) poles,
                                        &ml->loop, &err);
  if (st != LW_OK)
    {
      fprintf (stderr, "%s: %s\n", lw_cli_measured_file (m), err.message);
      lw_cli_measured_loop_clear (ml);
      return st == LW_ERR_NOMEM ? LW_EXIT_INTERNAL : LW_EXIT_BAD_INPUT;
    }
  return LW_EXIT_OK;
}

void
lw_cli_measured_json (JsonBuilder *b, const LwCliMeasuredLoop *ml, const char *file)
{
  const LwMeasuredMargins *mm = &ml->loop.margins;
  json_builder_begin_object (b);
  json_builder_set_member_name (b, "file");
  g_autofree char *shown = g_filename_display_name (file);
  json_builder_add_string_value (b, shown);
  json_builder_set_member_name (b, "kind");
  json_builder_add_string_value (b, lw_design_measured_kind_name (ml->kind));
  json_builder_set_member_name (b, "points");
  json_builder_add_int_value (b, (gint64) ml->data->n);
  json_builder_set_member_name (b, "points_below_nyquist");
  json_builder_add_int_value (b, (gint64) ml->loop.n);
  json_builder_set_member_name (b, "note");
  json_builder_add_string_value (b, ml->note);
  add_crossings (b, "gain_crossovers_rad_s", "phase_margins_deg",
                 "gain_crossover_intervals_rad_s", "gain_crossover_low_coherence",
                 "gain_crossover_within_noise", mm->gain, mm->n_gain);
  add_crossings (b, "phase_crossovers_rad_s", "gain_margins_db",
                 "phase_crossover_intervals_rad_s", "phase_crossover_low_coherence",
                 "phase_crossover_within_noise", mm->phase, mm->n_phase);
  json_builder_set_member_name (b, "crossover_above_data");
  json_builder_add_boolean_value (b, mm->crossover_above_data);
  json_builder_set_member_name (b, "crossover_below_data");
  json_builder_add_boolean_value (b, mm->crossover_below_data);
  member_number (b, "model_relative_difference", ml->loop.model_diff);
  add_stability (b, &ml->loop.stability);
  json_builder_end_object (b);
}

void
lw_cli_measured_json_loop (JsonBuilder *b, const LwCliMeasuredLoop *ml)
{
  add_loop (b, &ml->loop.margins, ml->period_s);
}

int
lw_cli_measured_analyze (const char *cmd, const LwCliLoopArgs *loop, const LwCliMeasuredArgs *m,
                         gboolean json)
{
  LwCliMeasuredLoop ml;
  int status = lw_cli_measured_loop_build (cmd, loop, m, &ml);
  if (status != LW_EXIT_OK)
    return status;
  if (!json)
    lw_cli_measured_print (&ml, lw_cli_measured_file (m), TRUE);
  else
    {
      g_autoptr (JsonBuilder) b = json_builder_new ();
      json_builder_begin_object (b);
      member_number (b, "sample_period_s", ml.period_s);
      json_builder_set_member_name (b, "loop");
      lw_cli_measured_json_loop (b, &ml);
      json_builder_set_member_name (b, "measured");
      lw_cli_measured_json (b, &ml, lw_cli_measured_file (m));
      json_builder_end_object (b);
      lw_cli_json_print_builder (b);
    }
  lw_cli_measured_loop_clear (&ml);
  return LW_EXIT_OK;
}

