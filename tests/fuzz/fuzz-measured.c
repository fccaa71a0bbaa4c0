/* fuzz-measured.c — libFuzzer target for the CSV reader of a measured frequency response
 * (src/core/lw-measured.h; build-aux/fuzz).
 *
 * The input is read as it is (it need not end in NUL; a copy of exactly its length, so a read
 * past the end is caught). A table that is read must hold what the header promises: at least
 * LW_MEASURED_MIN_POINTS points, ω > 0, finite and strictly increasing, h finite, coherence in
 * [0, 1], a note that is UTF-8 within its buffer, and a copy equal to it. A refusal must be
 * LW_ERR_PARSE or LW_ERR_INVALID with no table, a place on a line of the text and a
 * non-empty UTF-8 message. Anything else stops the fuzzer.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <complex.h>
#include <math.h>
#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "lw-measured.h"
#include "../common/lw-test-utf8.h"

int LLVMFuzzerTestOneInput (const uint8_t *data, size_t size);

static void
stop (const char *why, const char *detail)
{
  fprintf (stderr, "fuzz-measured: %s: %s\n", why, detail);
  abort ();
}

static size_t
count_lines (const char *text, size_t len)
{
  size_t n = 1;
  for (size_t i = 0; i + 1 < len; i++)
    n += text[i] == '\n';
  return n;
}

static void
check_table (const LwMeasured *m, const char *note, size_t note_size)
{
  if (m == NULL || m->n < LW_MEASURED_MIN_POINTS)
    stop ("table", "fewer points than the minimum");
  for (size_t i = 0; i < m->n; i++)
    {
      if (!(m->omega_rad_s[i] > 0.0) || !isfinite (m->omega_rad_s[i])
          || (i > 0 && !(m->omega_rad_s[i] > m->omega_rad_s[i - 1])))
        stop ("table", "a frequency not positive, finite and increasing");
      if (!isfinite (creal (m->h[i])) || !isfinite (cimag (m->h[i])))
        stop ("table", "a response value not finite");
      if (m->coherence != NULL && !(m->coherence[i] >= 0.0 && m->coherence[i] <= 1.0))
        stop ("table", "a coherence outside 0 ... 1");
    }
  if (memchr (note, '\0', note_size) == NULL || !lw_test_utf8_valid (note))
    stop ("note", "not a UTF-8 string within its buffer");
  LwMeasured *c = lw_measured_copy (m);
  if (c == NULL || c->n != m->n
      || memcmp (c->omega_rad_s, m->omega_rad_s, m->n * sizeof (double)) != 0
      || memcmp (c->h, m->h, m->n * sizeof (double complex)) != 0
      || (m->coherence == NULL) != (c->coherence == NULL)
      || (m->coherence != NULL
          && memcmp (c->coherence, m->coherence, m->n * sizeof (double)) != 0))
    stop ("copy", "differs from the table");
  lw_measured_free (c);
}

int
LLVMFuzzerTestOneInput (const uint8_t *data, size_t size)
{
  if (size > 65536)
    return 0;
  char *text = malloc (size > 0 ? size : 1);
  if (text == NULL)
    return 0;
  memcpy (text, data, size);
  /* a note buffer of a size taken from the input, to cut notes anywhere */
  size_t note_size = size > 0 ? 1 + (unsigned char) text[size - 1] % 48 : 16;
  char note[64];
  LwMeasured *m = NULL;
  LwMeasuredPlace place = { 0, 0 };
  LwError err;
  LwStatus st = lw_measured_parse (text, size, &m, note, note_size, &place, &err);
  if (st == LW_OK)
    {
      check_table (m, note, note_size);
      lw_measured_free (m);
    }
  else
    {
      if (m != NULL || (st != LW_ERR_PARSE && st != LW_ERR_INVALID) || err.code != st)
        stop ("refusal", "a table left behind or an unexpected code");
      if (err.message[0] == '\0' || !lw_test_utf8_valid (err.message))
        stop ("refusal", "an empty message or one not UTF-8");
      if (place.line < 1 || place.line > count_lines (text, size)
          || err.position < -1 || (err.position >= 0 && (size_t) err.position > size))
        {
          fprintf (stderr, "line %zu, position %d: %s\n", place.line, err.position,
                   err.message);
          stop ("refusal", "a place outside the text");
        }
    }
  free (text);
  return 0;
}
