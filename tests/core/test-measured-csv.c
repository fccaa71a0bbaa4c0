/* test-measured-csv.c — the CSV reader of a measured frequency response (lw-measured.h,
 * docs/measured-data.md "The table"): the three forms of the response in both frequency
 * units against the definitions (ω = 2πf; a level in dB is 20·log10 of the ratio, IEC
 * 60027-3; h = |h|·e^{jφ}), the dialect (BOM, CRLF, comments, ignored columns and the note),
 * a hostile corpus with the code, place and message of each refusal, the line limit on a
 * 10 000 001-line input, and random tables written with %.17g read back exactly.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <complex.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "lw-measured.h"
#include "../common/lw-test-utf8.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

static LwStatus
parse (const char *text, size_t len, LwMeasured **m, char *note, size_t note_size,
       LwMeasuredPlace *place, LwError *err)
{
  LwStatus st = lw_measured_parse (text, len, m, note, note_size, place, err);
  if (st == LW_OK)
    assert_non_null (*m);
  else
    assert_null (*m);
  return st;
}

/* |a − b| <= tol·|b|, with the values in the failure message. */
static void
assert_close (double complex a, double complex b, double tol, const char *what, size_t i)
{
  if (!(cabs (a - b) <= tol * cabs (b)))
    fail_msg ("%s row %zu: (%.17g, %.17g) against (%.17g, %.17g)", what, i, creal (a), cimag (a),
              creal (b), cimag (b));
}

/* ---- the three forms, both units -------------------------------------------------------- */

#define N_ROWS 10
static const double freq[N_ROWS] = { 0.5, 1, 2, 5, 10, 20, 50, 100, 200, 500 };
static const double col_a[N_ROWS] = { 20, -20, 0, 40, -3.5, 1e-3, -60, 6.5, 0.25, -120 };
static const double mag_a[N_ROWS] = { 10, 0.1, 1, 100, 0.5, 1e-3, 0, 2.5, 1e6, 3e-7 };
static const double col_b[N_ROWS] = { 0, 180, -90, 45, -179.5, 90, 12.25, -0.5, 135, -45 };

/* A table of the rows above with this header; the columns in the header's order are
 * frequency, a, b. */
static char *
table (const char *header, const double *a)
{
  size_t size = 4096, used = 0;
  char *t = malloc (size);
  assert_non_null (t);
  used += (size_t) snprintf (t, size, "%s\n", header);
  for (size_t i = 0; i < N_ROWS; i++)
    used += (size_t) snprintf (t + used, size - used, "%.17g, %.17g, %.17g\n", freq[i], a[i],
                               col_b[i]);
  assert_true (used < size);
  return t;
}

static void
check_form (const char *header, int form, bool hz)
{
  const double *a = form == 1 ? mag_a : col_a;
  char *t = table (header, a);
  LwMeasured *m = NULL;
  LwMeasuredPlace place;
  LwError err;
  char note[64];
  LwStatus st = parse (t, strlen (t), &m, note, sizeof note, &place, &err);
  if (st != LW_OK)
    fail_msg ("%s: %s", header, err.message);
  assert_int_equal (m->n, N_ROWS);
  assert_null (m->coherence);
  assert_string_equal (note, "");
  for (size_t i = 0; i < N_ROWS; i++)
    {
      /* ω = 2πf: the same IEEE operations on the same double, so exact */
      double omega = hz ? 2.0 * M_PI * freq[i] : freq[i];
      assert_true (m->omega_rad_s[i] == omega);
      double complex want;
      if (form == 2)
        {
          /* real and imag: the decimal text read back exactly (correctly rounded reading of
           * a %.17g text gives the same double) */
          want = CMPLX (a[i], col_b[i]);
          assert_true (m->h[i] == want);
          continue;
        }
      double mag = form == 0 ? pow (10.0, a[i] / 20.0) : a[i];
      want = mag * cexp (I * (col_b[i] * (M_PI / 180.0)));
      /* 1e-15 relative: the reader takes cos and sin, the reference cexp, each within an ulp
       * or two (2.2e-16 relative each); the ratio and the angle are the same operations */
      assert_close (m->h[i], want, 1e-15, header, i);
    }
  if (form == 0)
    {
      /* definitions, not the formula: 20 dB at 0° is 10; −20 dB at 180° is −0.1; 0 dB at
       * −90° is −j; 40 dB at 45° is 100·(1 + j)/√2. 1e-15 relative for cos/sin roundings */
      assert_true (m->h[0] == 10.0);
      assert_close (m->h[1], -0.1, 1e-15, "-20 dB", 1);
      assert_close (m->h[2], -I, 1e-15, "0 dB", 2);
      assert_close (m->h[3], 100.0 * (1.0 + I) / sqrt (2.0), 1e-15, "40 dB", 3);
    }
  if (hz)
    assert_true (m->omega_rad_s[0] == M_PI);   /* 0.5 Hz is π rad/s, 2·0.5 exact */
  lw_measured_free (m);
  free (t);
}

static void
test_forms (void **state)
{
  (void) state;
  check_form ("frequency_hz, magnitude_db, phase_deg", 0, true);
  check_form ("frequency_rad_s,magnitude_db,phase_deg", 0, false);
  check_form ("frequency_hz , magnitude , phase_deg", 1, true);
  check_form ("frequency_rad_s, magnitude, phase_deg", 1, false);
  check_form ("frequency_hz, real, imag", 2, true);
  check_form ("frequency_rad_s, real, imag", 2, false);
}

/* ---- the dialect ------------------------------------------------------------------------ */

static void
test_dialect (void **state)
{
  (void) state;
  /* BOM, CRLF, comments (whole line, after the header, after values), blank and white-space
   * lines, any column order, coherence, two ignored columns (one with a non-ASCII name) */
  const char *t =
    "\xEF\xBB\xBF# swept sine on the kiln heater, 2026-03-02\r\n"
    "\r\n"
    "imag, drive_v, coherence, frequency_rad_s, temp\xC3\xA9rature, real  # units: V, \xC2\xB0" "C\r\n"
    "  \t \r\n"
    "-1, 0.3, 1, 1, 20, 0.5\r\n"
    "-2, x, 0.99, 2, 21, 0.25 # a comment after values\r\n"
    "# a whole-line comment between rows\r\n"
    "-3,,0.5,3,,0.125\r\n"
    "-4, 1, 0.0, 4, 1, 1e-3\r\n"
    "-5, 1, 1e-1, 5, 1, -0\r\n"
    "-6, 1, 0.75, 6.5, 1, +2\r\n"
    "-7, 1, 0.8, 7, 1, .5\r\n"
    "-8, 1, 0.8, 8e0, 1, 5e-1\r\n"
    "-9, 1, 0.8, 9, 1, 0\r\n"
    "-10, 1, 0.8, 10, 1, 0\r\n";
  LwMeasured *m = NULL;
  LwMeasuredPlace place;
  LwError err;
  char note[128];
  if (parse (t, strlen (t), &m, note, sizeof note, &place, &err) != LW_OK)
    fail_msg ("%s", err.message);
  assert_string_equal (note, "ignored columns: drive_v, temp\xC3\xA9rature");
  assert_int_equal (m->n, 10);
  assert_non_null (m->coherence);
  /* the decimal texts above are exact in binary or read correctly rounded: exact */
  static const double omega[] = { 1, 2, 3, 4, 5, 6.5, 7, 8, 9, 10 };
  static const double re[] = { 0.5, 0.25, 0.125, 1e-3, 0, 2, 0.5, 0.5, 0, 0 };
  static const double coh[] = { 1, 0.99, 0.5, 0, 0.1, 0.75, 0.8, 0.8, 0.8, 0.8 };
  for (size_t i = 0; i < 10; i++)
    {
      assert_true (m->omega_rad_s[i] == omega[i]);
      assert_true (m->h[i] == CMPLX (re[i], -(double) (i + 1)));
      assert_true (m->coherence[i] == coh[i]);
    }
  /* the copy is equal and its own */
  LwMeasured *c = lw_measured_copy (m);
  assert_non_null (c);
  assert_int_equal (c->n, m->n);
  assert_ptr_not_equal (c->h, m->h);
  assert_memory_equal (c->omega_rad_s, m->omega_rad_s, m->n * sizeof (double));
  assert_memory_equal (c->h, m->h, m->n * sizeof (double complex));
  assert_memory_equal (c->coherence, m->coherence, m->n * sizeof (double));
  lw_measured_free (m);
  c->h[0] = 7.0;
  lw_measured_free (c);
  lw_measured_free (NULL);
  assert_null (lw_measured_copy (NULL));

  /* a short note buffer: every size gives a prefix of the full note, cut between characters */
  const char *full = "ignored columns: drive_v, temp\xC3\xA9rature";
  for (size_t size = 1; size <= strlen (full) + 1; size++)
    {
      char small[64];
      memset (small, 'Z', sizeof small);
      assert_int_equal (parse (t, strlen (t), &m, small, size, &place, &err), LW_OK);
      lw_measured_free (m);
      assert_true (strlen (small) < size);
      assert_true (strncmp (small, full, strlen (small)) == 0);
      assert_true (lw_test_utf8_valid (small));
      assert_true (small[size] == 'Z');   /* nothing written past the buffer */
    }
  /* the text need not end in NUL nor in a line end: the length bounds it */
  const char *u = "frequency_hz,real,imag\n1,0,0\n2,0,0\n3,0,0\n4,0,0\n5,0,0\n6,0,0\n"
                  "7,0,0\n8,0,0\n9,0,0\n10,0,1.5XXXX";
  assert_int_equal (parse (u, strlen (u) - 4, &m, NULL, 0, NULL, NULL), LW_OK);
  assert_true (m->h[9] == 1.5 * I);
  lw_measured_free (m);
}

/* ---- the hostile corpus ----------------------------------------------------------------- */

#define HDR "frequency_hz, magnitude_db, phase_deg\n"
#define R9 "1,0,0\n2,0,0\n3,0,0\n4,0,0\n5,0,0\n6,0,0\n7,0,0\n8,0,0\n9,0,0\n"  /* lines 2…10 */
#define HDRC "frequency_hz, magnitude_db, phase_deg, coherence\n"
#define R9C "1,0,0,1\n2,0,0,1\n3,0,0,1\n4,0,0,1\n5,0,0,1\n6,0,0,1\n7,0,0,1\n8,0,0,1\n9,0,0,1\n"

typedef struct {
  const char *text;
  size_t len;        /* 0: strlen */
  LwStatus code;
  size_t line, column;
  const char *key;   /* a part of the message */
} Hostile;

#define BIN(s) s, sizeof s - 1

static const Hostile hostile[] = {
  { "", 0, LW_ERR_PARSE, 1, 0, "the file is empty" },
  { "# only a comment\n\n  \n", 0, LW_ERR_PARSE, 3, 0, "no header line" },
  { "1,0,0\n2,0,0\n", 0, LW_ERR_PARSE, 1, 0, "holds numbers, not a header" },
  { "magnitude_db, phase_deg\n" R9, 0, LW_ERR_PARSE, 1, 0, "no frequency column" },
  { "frequency_hz, magnitude_db\n", 0, LW_ERR_PARSE, 1, 0, "magnitude_db but no phase_deg" },
  { "frequency_hz, phase_deg\n", 0, LW_ERR_PARSE, 1, 0, "no magnitude_db or magnitude" },
  { "frequency_rad_s, real\n", 0, LW_ERR_PARSE, 1, 0, "has real but no imag column" },
  { "frequency_rad_s, imag\n", 0, LW_ERR_PARSE, 1, 0, "has imag but no real column" },
  { "frequency_hz, coherence\n", 0, LW_ERR_PARSE, 1, 0, "no response columns" },
  { "Frequency_Hz, real, imag\n", 0, LW_ERR_PARSE, 1, 0, "no frequency column" },
  { "frequency_hz, magnitude_db, phase_deg, real\n", 0, LW_ERR_PARSE, 1, 4,
    "magnitude_db with real is not a combination" },
  { "frequency_hz, imag, phase_deg, real\n", 0, LW_ERR_PARSE, 1, 4, "phase_deg with real" },
  { "frequency_hz, magnitude_db, magnitude, phase_deg\n", 0, LW_ERR_PARSE, 1, 3,
    "both magnitude_db and magnitude" },
  { "frequency_rad_s, frequency_hz, real, imag\n", 0, LW_ERR_PARSE, 1, 2,
    "both frequency_hz and frequency_rad_s" },
  { "frequency_hz, real, imag, real\n", 0, LW_ERR_PARSE, 1, 4,
    "column 4 \"real\" repeats the name of column 2" },
  { "frequency_hz, , real, imag\n", 0, LW_ERR_PARSE, 1, 2, "column 2 of the header has no name" },
  { HDR R9 "10,abc,0\n", 0, LW_ERR_PARSE, 11, 2, "magnitude_db \"abc\" is not a number" },
  { HDR R9 "10,0,\n", 0, LW_ERR_PARSE, 11, 3, "phase_deg is empty" },
  { HDR R9 "10,nan,0\n", 0, LW_ERR_INVALID, 11, 2, "magnitude_db \"nan\" is not a finite" },
  { HDR R9 "10,0,-inf\n", 0, LW_ERR_INVALID, 11, 3, "phase_deg \"-inf\" is not a finite" },
  { HDR R9 "Infinity,0,0\n", 0, LW_ERR_INVALID, 11, 1, "\"Infinity\" is not a finite" },
  { HDR R9 "0x10,0,0\n", 0, LW_ERR_PARSE, 11, 1, "frequency_hz \"0x10\" is not a number" },
  { HDR R9 "10,1e999,0\n", 0, LW_ERR_INVALID, 11, 2, "\"1e999\" is beyond the range" },
  { HDR R9 "10,7000,0\n", 0, LW_ERR_INVALID, 11, 2, "magnitude_db \"7000\" is beyond" },
  { HDR R9 "1e308,0,0\n", 0, LW_ERR_INVALID, 11, 1, "\"1e308\" is too large" },
  { HDR R9 "8.5,0,0\n", 0, LW_ERR_INVALID, 11, 1,
    "frequency_hz \"8.5\" is not above the \"9\" of line 10 (frequencies must increase)" },
  { HDR R9 "9.0,0,0\n", 0, LW_ERR_INVALID, 11, 1,
    "frequency_hz \"9.0\" is not above the \"9\" of line 10 (a frequency given twice)" },
  { HDR "0,0,0\n" R9, 0, LW_ERR_INVALID, 2, 1, "frequency_hz \"0\" is not above zero" },
  { "frequency_rad_s, magnitude, phase_deg\n-1,0,0\n", 0, LW_ERR_INVALID, 2, 1,
    "frequency_rad_s \"-1\" is not above zero" },
  { "frequency_hz, magnitude, phase_deg\n" R9 "10,-0.5,0\n", 0, LW_ERR_INVALID, 11, 2,
    "magnitude \"-0.5\" is negative" },
  { HDRC R9C "10,0,0,1.5\n", 0, LW_ERR_INVALID, 11, 4, "coherence \"1.5\" is outside 0 to 1" },
  { HDRC R9C "10,0,0,-0.1\n", 0, LW_ERR_INVALID, 11, 4, "coherence \"-0.1\" is outside" },
  { HDR R9, 0, LW_ERR_INVALID, 10, 0, "has 9 data rows; it needs at least 10" },
  { HDR R9 "# the tenth row is missing\n\n", 0, LW_ERR_INVALID, 12, 0, "has 9 data rows" },
  { BIN (HDR "1,0,0\n\x7f" "ELF\x02\x01\x01\x00\x00\x00\x00\xff\xfe"), LW_ERR_PARSE, 3, 1,
    "a NUL byte at byte 8 (column frequency_hz): not UTF-8 text (binary?)" },
  { HDR R9 "10,0,\xC3\x28\n", 0, LW_ERR_PARSE, 11, 3,
    "byte 6 (column phase_deg) is not UTF-8 text (binary?)" },
  { HDR R9 "10,0,0 # \xED\xA0\x80 a surrogate\n", 0, LW_ERR_PARSE, 11, 0,
    "(in a comment) is not UTF-8" },
  { "frequency_hz, real, \xC0\xAFimag\n", 0, LW_ERR_PARSE, 1, 3, "byte 21 is not UTF-8" },
  { "\xFF\xFE" "f\0r\0", 6, LW_ERR_PARSE, 1, 0, "UTF-16" },
  { "frequency_hz,real,imag\r1,0,0\r2,0,0\r", 0, LW_ERR_PARSE, 1, 3,
    "a carriage return without a line feed" },
  { HDR R9 "10,0,5,45\n", 0, LW_ERR_PARSE, 11, 4,
    "4 fields where the header has 3 (a decimal comma? write 0.5, not 0,5)" },
  { HDR R9 "10,0,0,\n", 0, LW_ERR_PARSE, 11, 4, "4 fields where the header has 3" },
  { HDR R9 "10,0\n", 0, LW_ERR_PARSE, 11, 3,
    "2 fields where the header has 3; column \"phase_deg\" is missing" },
  { "frequency_hz, magnitude_db, phase_deg, a_very_long_column_name_that_goes_on_and_on\n"
    "1,0,0\n", 0, LW_ERR_PARSE, 2, 4,
    "column \"a_very_long_column_name_that_goes_on_and\xE2\x80\xA6\" is missing" },
  { HDR R9 "10,\xE2\x88\x92" "3,0\n", 0, LW_ERR_PARSE, 11, 2,
    "\"\xE2\x88\x92" "3\" is not a number" },
};

static void
test_hostile (void **state)
{
  (void) state;
  for (size_t i = 0; i < sizeof hostile / sizeof hostile[0]; i++)
    {
      const Hostile *c = &hostile[i];
      size_t len = c->len > 0 ? c->len : strlen (c->text);
      LwMeasured *m = (LwMeasured *) &m;   /* must come back NULL */
      LwMeasuredPlace place = { 99, 99 };
      LwError err;
      char note[32] = "untouched";
      LwStatus st = parse (c->text, len, &m, note, sizeof note, &place, &err);
      if (st != c->code || place.line != c->line || place.column != c->column
          || strstr (err.message, c->key) == NULL || err.code != st)
        fail_msg ("case %zu: got %d at %zu:%zu \"%s\", want %d at %zu:%zu with \"%s\"", i,
                  (int) st, place.line, place.column, err.message, (int) c->code, c->line,
                  c->column, c->key);
      assert_true (lw_test_utf8_valid (err.message));
      assert_true (err.position >= -1 && err.position <= (int) len);
      assert_string_equal (note, "");
    }
  /* the position points into the text at the refused field */
  const char *t = HDR R9 "10,abc,0\n";
  LwMeasured *m = NULL;
  LwError err;
  assert_int_equal (parse (t, strlen (t), &m, NULL, 0, NULL, &err), LW_ERR_PARSE);
  assert_true (strncmp (t + err.position, "abc,0", 5) == 0);
  /* a long non-UTF-8 field: the quoted text in the message is cut and stays UTF-8 */
  char buf[512];
  snprintf (buf, sizeof buf, HDR R9 "10,%s,0\n",
            "\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9"
            "\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9\xC3\xA9x"
            "\xE2\x82\xAC\xE2\x82\xAC\xE2\x82\xAC");
  assert_int_equal (parse (buf, strlen (buf), &m, NULL, 0, NULL, &err), LW_ERR_PARSE);
  assert_true (lw_test_utf8_valid (err.message));
  assert_non_null (strstr (err.message, "\xE2\x80\xA6\" is not a number"));
  /* no output place */
  assert_int_equal (lw_measured_parse (t, strlen (t), NULL, NULL, 0, NULL, &err),
                    LW_ERR_INVALID);
}

/* ---- the line limit --------------------------------------------------------------------- */

static void
test_line_limit (void **state)
{
  (void) state;
  /* a header, ten rows (lines 2…11), blank lines up to line 10 000 000, one more row on line
   * 10 000 001, then a NUL: refused at the limit, before the NUL is reached */
  const char head[] = HDR R9 "10,0,0\n";
  size_t limit = LW_MEASURED_MAX_LINES, lines_head = 11;
  const char tail[] = "11,0,0\n\0binary";
  size_t blank = limit - lines_head;
  size_t len = sizeof head - 1 + blank + sizeof tail - 1;
  char *t = malloc (len);
  assert_non_null (t);
  memcpy (t, head, sizeof head - 1);
  memset (t + sizeof head - 1, '\n', blank);
  memcpy (t + sizeof head - 1 + blank, tail, sizeof tail - 1);
  LwMeasured *m = NULL;
  LwMeasuredPlace place;
  LwError err;
  assert_int_equal (parse (t, len, &m, NULL, 0, &place, &err), LW_ERR_INVALID);
  assert_int_equal (place.line, limit + 1);
  assert_int_equal (place.column, 0);
  assert_non_null (strstr (err.message, "line 10000001: the table goes on past 10000000 lines"));
  /* exactly the limit is read: the same text cut after line 10 000 000 */
  size_t cut = sizeof head - 1 + blank;
  assert_int_equal (parse (t, cut, &m, NULL, 0, &place, &err), LW_OK);
  assert_int_equal (m->n, 10);
  lw_measured_free (m);
  /* … and with that line's end missing too */
  assert_int_equal (parse (t, cut - 1, &m, NULL, 0, &place, &err), LW_OK);
  lw_measured_free (m);
  free (t);
}

/* ---- random tables ---------------------------------------------------------------------- */

static uint64_t rng_state = 0x5eed2026u;

static double
uniform (void)   /* splitmix64, [0, 1) with 53 bits */
{
  uint64_t z = (rng_state += 0x9E3779B97F4A7C15u);
  z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9u;
  z = (z ^ (z >> 27)) * 0x94D049BB133111EBu;
  z ^= z >> 31;
  return (double) (z >> 11) * 0x1p-53;
}

static void
test_random_tables (void **state)
{
  (void) state;
  enum { TABLES = 300, MAX_ROWS = 80 };
  static const char *const form_names[3][2] = {
    { "magnitude_db", "phase_deg" }, { "magnitude", "phase_deg" }, { "real", "imag" },
  };
  size_t size = 200 * MAX_ROWS + 256;
  char *t = malloc (size);
  assert_non_null (t);
  for (int k = 0; k < TABLES; k++)
    {
      int form = (int) (uniform () * 3), hz = uniform () < 0.5, with_coh = uniform () < 0.5;
      size_t n = 10 + (size_t) (uniform () * (MAX_ROWS - 10));
      /* columns 0 frequency, 1 a, 2 b, 3 coherence, 4 ignored; in a shuffled order */
      int order[5] = { 0, 1, 2, 3, 4 };
      for (int i = 4; i > 0; i--)
        {
          int j = (int) (uniform () * (i + 1)), s = order[i];
          order[i] = order[j];
          order[j] = s;
        }
      const char *names[5] = { hz ? "frequency_hz" : "frequency_rad_s", form_names[form][0],
                               form_names[form][1], "coherence", "notes" };
      double f[MAX_ROWS], a[MAX_ROWS], b[MAX_ROWS], c[MAX_ROWS];
      double fi = pow (10.0, -3.0 + 6.0 * uniform ());
      size_t used = 0;
      for (int i = 0, first = 1; i < 5; i++)
        if (order[i] != 3 || with_coh)
          {
            used += (size_t) snprintf (t + used, size - used, "%s%s", first ? "" : ", ",
                                       names[order[i]]);
            first = 0;
          }
      used += (size_t) snprintf (t + used, size - used, "\n");
      for (size_t r = 0; r < n; r++)
        {
          f[r] = fi;
          fi *= 1.0 + 1e-9 + uniform ();
          a[r] = form == 0 ? -120.0 + 180.0 * uniform ()
                 : form == 1 ? pow (10.0, -6.0 + 9.0 * uniform ())
                             : (uniform () - 0.5) * pow (10.0, -6.0 + 12.0 * uniform ());
          b[r] = form == 2 ? (uniform () - 0.5) * pow (10.0, -6.0 + 12.0 * uniform ())
                           : -180.0 + 360.0 * uniform ();
          c[r] = uniform ();
          const double *vals[4] = { f, a, b, c };
          for (int i = 0, first = 1; i < 5; i++)
            {
              if (order[i] == 3 && !with_coh)
                continue;
              used += (size_t) snprintf (t + used, size - used, "%s", first ? "" : ",");
              first = 0;
              if (order[i] == 4)
                used += (size_t) snprintf (t + used, size - used, "x");
              else
                used += (size_t) snprintf (t + used, size - used, "%.17g", vals[order[i]][r]);
            }
          used += (size_t) snprintf (t + used, size - used, "\n");
        }
      assert_true (used < size);
      LwMeasured *m = NULL;
      LwMeasuredPlace place;
      LwError err;
      char note[64];
      if (parse (t, used, &m, note, sizeof note, &place, &err) != LW_OK)
        fail_msg ("table %d: %s", k, err.message);
      assert_string_equal (note, "ignored columns: notes");
      assert_int_equal (m->n, n);
      assert_true ((m->coherence != NULL) == with_coh);
      for (size_t r = 0; r < n; r++)
        {
          /* %.17g text read back correctly rounded is the same double: exact; ω = 2πf the
           * same operations: exact */
          assert_true (m->omega_rad_s[r] == (hz ? 2.0 * M_PI * f[r] : f[r]));
          if (with_coh)
            assert_true (m->coherence[r] == c[r]);
          if (form == 2)
            {
              assert_true (m->h[r] == CMPLX (a[r], b[r]));
              continue;
            }
          double mag = form == 0 ? pow (10.0, a[r] / 20.0) : a[r];
          /* 1e-15 relative: cos/sin against cexp, each within an ulp or two */
          assert_close (m->h[r], mag * cexp (I * (b[r] * (M_PI / 180.0))), 1e-15, "random", r);
        }
      lw_measured_free (m);
    }
  free (t);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_forms),
    cmocka_unit_test (test_dialect),
    cmocka_unit_test (test_hostile),
    cmocka_unit_test (test_line_limit),
    cmocka_unit_test (test_random_tables),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
