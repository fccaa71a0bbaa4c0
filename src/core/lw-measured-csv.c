/* lw-measured-csv.c — the CSV table of a measured frequency response (lw-measured.h,
 * docs/measured-data.md "The table").
 *
 * One pass over the text, line by line: each line is checked to be UTF-8 (no NUL, no bare
 * carriage return) before anything in it is read, the line limit is checked before a line is
 * looked at (so an oversized file is refused at the limit, not read to its end), the comment
 * is cut off, the fields are split at commas and trimmed. The first line with content is the
 * header; every later one is a row of exactly as many fields. Values are read with the one
 * number syntax of lw-number.h (decimal point whatever the locale; no "inf", "nan" or hex).
 * The arrays grow by half their size and are cut to fit at the end.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-measured.h"

#include <limits.h>
#include <math.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "lw-internal.h"
#include "lw-number.h"

/* At most this many columns in the header (a frequency response has a handful; the bound
 * keeps the duplicate-name check small). */
#define MAX_COLUMNS 1000
/* Bytes of a user's text quoted in a message or a note (cut at a character boundary). */
#define QUOTE_BYTES 40
#define QUOTE_SIZE (QUOTE_BYTES + 8)
#define NONE SIZE_MAX

enum { K_FHZ, K_FRAD, K_DB, K_MAG, K_PHASE, K_RE, K_IM, K_COH, K_COUNT };
static const char *const known_names[K_COUNT] = {
  "frequency_hz", "frequency_rad_s", "magnitude_db", "magnitude", "phase_deg", "real", "imag",
  "coherence",
};

typedef struct {
  const char *text;
  LwMeasuredPlace *place;
  LwError *err;
  size_t ncols;
  const char *name[MAX_COLUMNS];     /* header names (into text) */
  size_t name_len[MAX_COLUMNS];
  unsigned char kind[MAX_COLUMNS];   /* K_* or K_COUNT for an ignored column */
  size_t col[K_COUNT];               /* 0-based column of each known name, or NONE */
  size_t n, cap;
  double *omega;
  double complex *h;
  double *coh;
  double prev_f;                     /* the previous row's frequency as written, and ω */
  double prev_omega;
  size_t prev_line;
  char prev_text[QUOTE_SIZE];
} Reader;

/* ---- messages ------------------------------------------------------------------------------ */

/* Length of the longest prefix of s (at most max bytes) that ends on a character boundary of
 * UTF-8 text (s is valid UTF-8, or cut inside its last character). */
static size_t
utf8_cut (const char *s, size_t len, size_t max)
{
  if (len <= max)
    return len;
  size_t k = max;
  while (k > 0 && ((unsigned char) s[k] & 0xC0) == 0x80)
    k--;
  return k;
}

/* The first len bytes of s (valid UTF-8), cut to QUOTE_BYTES with "…", control characters as
 * '?'; into buf (QUOTE_SIZE bytes). */
static const char *
quote (char *buf, const char *s, size_t len)
{
  size_t k = utf8_cut (s, len, QUOTE_BYTES);
  for (size_t i = 0; i < k; i++)
    {
      unsigned char c = (unsigned char) s[i];
      buf[i] = (c < 0x20 || c == 0x7F) ? '?' : (char) c;
    }
  if (k < len)
    {
      memcpy (buf + k, "\xE2\x80\xA6", 3);
      k += 3;
    }
  buf[k] = '\0';
  return buf;
}

/* Fills the place and the error (a message cut by the buffer loses no more than its last,
 * incomplete character) and returns code. offset: the byte offset in the text. */
static LwStatus __attribute__ ((format (printf, 6, 7)))
fail (Reader *r, LwStatus code, size_t line, size_t column, size_t offset, const char *fmt, ...)
{
  if (r->place != NULL)
    {
      r->place->line = line;
      r->place->column = column;
    }
  char buf[LW_ERROR_MESSAGE_MAX];
  va_list ap;
  va_start (ap, fmt);
  int len = vsnprintf (buf, sizeof buf, fmt, ap);
  va_end (ap);
  if (len < 0)
    buf[0] = '\0';
  else if ((size_t) len >= sizeof buf)
    buf[utf8_cut (buf, sizeof buf - 1, sizeof buf - 2)] = '\0';
  return lw_error_set (r->err, code, offset <= INT_MAX ? (int) offset : -1, "%s", buf);
}

/* ---- bytes, lines and fields --------------------------------------------------------------- */

/* The first byte in [s, e) that is not part of UTF-8 text of a line: a NUL, a carriage
 * return, an invalid or truncated sequence (overlong forms, surrogates and code points above
 * U+10FFFF are invalid); NULL when there is none. */
static const char *
first_bad_byte (const char *s, const char *e)
{
  const unsigned char *p = (const unsigned char *) s, *end = (const unsigned char *) e;
  while (p < end)
    {
      unsigned c = *p;
      if (c < 0x80)
        {
          if (c == 0 || c == '\r')
            return (const char *) p;
          p++;
          continue;
        }
      size_t more;
      unsigned lo = 0x80, hi = 0xBF;
      if (c >= 0xC2 && c <= 0xDF)
        more = 1;
      else if (c >= 0xE0 && c <= 0xEF)
        {
          more = 2;
          if (c == 0xE0)
            lo = 0xA0;
          else if (c == 0xED)
            hi = 0x9F;
        }
      else if (c >= 0xF0 && c <= 0xF4)
        {
          more = 3;
          if (c == 0xF0)
            lo = 0x90;
          else if (c == 0xF4)
            hi = 0x8F;
        }
      else
        return (const char *) p;
      if ((size_t) (end - p) <= more || p[1] < lo || p[1] > hi)
        return (const char *) p;
      for (size_t i = 2; i <= more; i++)
        if ((p[i] & 0xC0) != 0x80)
          return (const char *) p;
      p += more + 1;
    }
  return NULL;
}

static bool
is_blank (char c)
{
  return c == ' ' || c == '\t';
}

static void
trim (const char **s, const char **e)
{
  while (*s < *e && is_blank (**s))
    (*s)++;
  while (*e > *s && is_blank ((*e)[-1]))
    (*e)--;
}

static size_t
count_byte (const char *s, const char *e, char c)
{
  size_t n = 0;
  for (const char *p = s; p < e && (p = memchr (p, c, (size_t) (e - p))) != NULL; p++)
    n++;
  return n;
}

/* The field after *s up to the next comma or e, trimmed; *s moves past the comma. */
static void
next_field (const char **s, const char *e, const char **fs, const char **fe)
{
  const char *c = memchr (*s, ',', (size_t) (e - *s));
  *fs = *s;
  *fe = c != NULL ? c : e;
  *s = c != NULL ? c + 1 : e;
  trim (fs, fe);
}

/* A refusal of the line [s, e) at its byte bad: a NUL, a bare carriage return or not UTF-8. */
static LwStatus
refuse_byte (Reader *r, size_t line, const char *s, const char *bad)
{
  const char *hash = memchr (s, '#', (size_t) (bad - s));
  size_t field = hash != NULL ? 0 : 1 + count_byte (s, bad, ',');
  size_t at = (size_t) (bad - s) + 1, offset = (size_t) (bad - r->text);
  char where[QUOTE_SIZE + 32] = "";
  char q[QUOTE_SIZE];
  if (field == 0)
    snprintf (where, sizeof where, " (in a comment)");
  else if (r->ncols > 0 && field <= r->ncols)
    snprintf (where, sizeof where, " (column %s)",
              quote (q, r->name[field - 1], r->name_len[field - 1]));
  if (*bad == '\r')
    return fail (r, LW_ERR_PARSE, line, field, offset,
                 "line %zu: a carriage return without a line feed at byte %zu%s; lines end "
                 "in LF or CRLF", line, at, where);
  if (*bad == '\0')
    return fail (r, LW_ERR_PARSE, line, field, offset,
                 "line %zu: a NUL byte at byte %zu%s: not UTF-8 text (binary?)", line, at,
                 where);
  return fail (r, LW_ERR_PARSE, line, field, offset,
               "line %zu: byte %zu%s is not UTF-8 text (binary?)", line, at, where);
}

/* ---- the header ---------------------------------------------------------------------------- */

static bool
is_number_text (const char *s, const char *e)
{
  char buf[LW_NUMBER_MAX_CHARS + 1];
  size_t len = (size_t) (e - s);
  double v;
  if (len == 0 || len > LW_NUMBER_MAX_CHARS)
    return false;
  memcpy (buf, s, len);
  buf[len] = '\0';
  return lw_number_parse (buf, &v) != LW_NUMBER_SYNTAX;
}

/* Refuses a header with both names a and b (known indices): "keep one" or, for names of two
 * different forms, the combinations that are read. */
static LwStatus
refuse_pair (Reader *r, size_t line, size_t offset, int a, int b, bool alternatives)
{
  size_t later = r->col[a] > r->col[b] ? r->col[a] : r->col[b];
  if (alternatives)
    return fail (r, LW_ERR_PARSE, line, later + 1, offset,
                 "line %zu: the header has both %s and %s; keep one", line, known_names[a],
                 known_names[b]);
  return fail (r, LW_ERR_PARSE, line, later + 1, offset,
               "line %zu: %s with %s is not a combination this reader takes; the header gives "
               "magnitude_db or magnitude with phase_deg, or real with imag", line,
               known_names[a], known_names[b]);
}

/* The known column of index k present in the header, the first of ks[0 … n), or -1. */
static int
first_present (const Reader *r, const int *ks, size_t n)
{
  for (size_t i = 0; i < n; i++)
    if (r->col[ks[i]] != NONE)
      return ks[i];
  return -1;
}

/* Checks the columns present make one frequency and one form of the response. */
static LwStatus
check_columns (Reader *r, size_t line, size_t offset)
{
  const size_t *c = r->col;
  if (c[K_FHZ] != NONE && c[K_FRAD] != NONE)
    return refuse_pair (r, line, offset, K_FHZ, K_FRAD, true);
  if (c[K_DB] != NONE && c[K_MAG] != NONE)
    return refuse_pair (r, line, offset, K_DB, K_MAG, true);
  static const int polar[] = { K_DB, K_MAG, K_PHASE }, rect[] = { K_RE, K_IM };
  int p = first_present (r, polar, 3), q = first_present (r, rect, 2);
  if (p >= 0 && q >= 0)
    return refuse_pair (r, line, offset, p, q, false);
  if (c[K_FHZ] == NONE && c[K_FRAD] == NONE)
    return fail (r, LW_ERR_PARSE, line, 0, offset,
                 "line %zu: the header has no frequency column; it needs frequency_hz or "
                 "frequency_rad_s", line);
  if (p < 0 && q < 0)
    return fail (r, LW_ERR_PARSE, line, 0, offset,
                 "line %zu: the header has no response columns; it needs magnitude_db or "
                 "magnitude with phase_deg, or real with imag", line);
  if (p >= 0 && c[K_PHASE] == NONE)
    return fail (r, LW_ERR_PARSE, line, 0, offset,
                 "line %zu: the header has %s but no phase_deg column", line, known_names[p]);
  if (p == K_PHASE)
    return fail (r, LW_ERR_PARSE, line, 0, offset,
                 "line %zu: the header has phase_deg but no magnitude_db or magnitude column",
                 line);
  if (q >= 0 && (c[K_RE] == NONE || c[K_IM] == NONE))
    return fail (r, LW_ERR_PARSE, line, 0, offset,
                 "line %zu: the header has %s but no %s column", line,
                 known_names[c[K_RE] == NONE ? K_IM : K_RE],
                 known_names[c[K_RE] == NONE ? K_RE : K_IM]);
  return LW_OK;
}

static LwStatus
read_header (Reader *r, size_t line, const char *s, const char *e)
{
  size_t offset = (size_t) (s - r->text);
  size_t n = 1 + count_byte (s, e, ',');
  if (n > MAX_COLUMNS)
    return fail (r, LW_ERR_PARSE, line, MAX_COLUMNS + 1, offset,
                 "line %zu: the header names %zu columns, more than the %d this reader takes",
                 line, n, MAX_COLUMNS);
  bool all_numbers = true;
  const char *p = s;
  for (size_t k = 0; k < n; k++)
    {
      const char *fs, *fe;
      next_field (&p, e, &fs, &fe);
      r->name[k] = fs;
      r->name_len[k] = (size_t) (fe - fs);
      all_numbers = all_numbers && is_number_text (fs, fe);
    }
  if (all_numbers)
    return fail (r, LW_ERR_PARSE, line, 0, offset,
                 "line %zu: the first line that is not a comment holds numbers, not a header "
                 "of column names such as \"frequency_hz, magnitude_db, phase_deg\"", line);
  char q[QUOTE_SIZE];
  for (size_t k = 0; k < n; k++)
    {
      size_t at = (size_t) (r->name[k] - r->text);
      if (r->name_len[k] == 0)
        return fail (r, LW_ERR_PARSE, line, k + 1, at,
                     "line %zu: column %zu of the header has no name", line, k + 1);
      for (size_t j = 0; j < k; j++)
        if (r->name_len[j] == r->name_len[k]
            && memcmp (r->name[j], r->name[k], r->name_len[k]) == 0)
          return fail (r, LW_ERR_PARSE, line, k + 1, at,
                       "line %zu: column %zu \"%s\" repeats the name of column %zu", line, k + 1,
                       quote (q, r->name[k], r->name_len[k]), j + 1);
      r->kind[k] = K_COUNT;
      for (int i = 0; i < K_COUNT; i++)
        if (strlen (known_names[i]) == r->name_len[k]
            && memcmp (known_names[i], r->name[k], r->name_len[k]) == 0)
          {
            r->kind[k] = (unsigned char) i;
            r->col[i] = k;
          }
    }
  r->ncols = n;
  return check_columns (r, line, offset);
}

/* ---- rows ---------------------------------------------------------------------------------- */

static LwStatus
grow (Reader *r)
{
  if (r->n < r->cap)
    return LW_OK;
  size_t cap = r->cap < 64 ? 64 : r->cap + r->cap / 2;
  if (cap < r->cap || cap > SIZE_MAX / sizeof (double complex))
    return fail (r, LW_ERR_NOMEM, 0, 0, SIZE_MAX, "the table is too large for memory");
  double *omega = realloc (r->omega, cap * sizeof *omega);
  if (omega != NULL)
    r->omega = omega;
  double complex *h = omega != NULL ? realloc (r->h, cap * sizeof *h) : NULL;
  if (h != NULL)
    r->h = h;
  double *coh = NULL;
  if (h != NULL && r->col[K_COH] != NONE)
    {
      coh = realloc (r->coh, cap * sizeof *coh);
      if (coh != NULL)
        r->coh = coh;
    }
  if (omega == NULL || h == NULL || (r->col[K_COH] != NONE && coh == NULL))
    return fail (r, LW_ERR_NOMEM, 0, 0, SIZE_MAX, "out of memory after %zu rows of the table",
                 r->n);
  r->cap = cap;
  return LW_OK;
}

/* Whether text (after a sign) spells a NaN or an infinity the way C libraries print them:
 * "nan", "inf", "infinity" in any case, "nan(…)". */
static bool
names_non_finite (const char *text)
{
  const char *t = text + (text[0] == '+' || text[0] == '-');
  char low[10];
  size_t i = 0;
  for (; i < sizeof low - 1 && t[i] != '\0'; i++)
    low[i] = (t[i] >= 'A' && t[i] <= 'Z') ? (char) (t[i] - 'A' + 'a') : t[i];
  low[i] = '\0';
  return strcmp (low, "nan") == 0 || strcmp (low, "inf") == 0 || strcmp (low, "infinity") == 0
         || strncmp (low, "nan(", 4) == 0;
}

/* Reads the field [s, e) of column k on this line as a finite number. */
static LwStatus
read_value (Reader *r, size_t line, size_t k, const char *s, const char *e, double *out)
{
  char q[QUOTE_SIZE];
  const char *col = known_names[r->kind[k]];
  size_t len = (size_t) (e - s), offset = (size_t) (s - r->text);
  if (len == 0)
    return fail (r, LW_ERR_PARSE, line, k + 1, offset, "line %zu: %s is empty", line, col);
  char buf[LW_NUMBER_MAX_CHARS + 1];
  LwNumberResult res = LW_NUMBER_TOO_LONG;
  if (len <= LW_NUMBER_MAX_CHARS)
    {
      memcpy (buf, s, len);
      buf[len] = '\0';
      res = lw_number_parse (buf, out);
    }
  if (res == LW_NUMBER_OK)
    return LW_OK;
  if (res == LW_NUMBER_NOT_FINITE)
    return fail (r, LW_ERR_INVALID, line, k + 1, offset,
                 "line %zu: %s \"%s\" is beyond the range of a double", line, col,
                 quote (q, s, len));
  if (res == LW_NUMBER_SYNTAX && names_non_finite (buf))
    return fail (r, LW_ERR_INVALID, line, k + 1, offset,
                 "line %zu: %s \"%s\" is not a finite number", line, col, quote (q, s, len));
  return fail (r, LW_ERR_PARSE, line, k + 1, offset,
               "line %zu: %s \"%s\" is not a number (digits with a decimal point)", line, col,
               quote (q, s, len));
}

static LwStatus
read_row (Reader *r, size_t line, const char *s, const char *e)
{
  size_t offset = (size_t) (s - r->text), n = 1 + count_byte (s, e, ',');
  char q[QUOTE_SIZE];
  if (n > r->ncols)
    return fail (r, LW_ERR_PARSE, line, r->ncols + 1, offset,
                 "line %zu: %zu fields where the header has %zu (a decimal comma? write 0.5, "
                 "not 0,5)", line, n, r->ncols);
  if (n < r->ncols)
    return fail (r, LW_ERR_PARSE, line, n + 1, offset,
                 "line %zu: %zu fields where the header has %zu; column \"%s\" is missing",
                 line, n, r->ncols, quote (q, r->name[n], r->name_len[n]));
  double v[K_COUNT] = { 0 };
  const char *at[K_COUNT] = { 0 }, *end[K_COUNT] = { 0 };
  const char *p = s;
  for (size_t k = 0; k < n; k++)
    {
      const char *fs, *fe;
      next_field (&p, e, &fs, &fe);
      int kind = r->kind[k];
      if (kind == K_COUNT)
        continue;
      LwStatus st = read_value (r, line, k, fs, fe, &v[kind]);
      if (st != LW_OK)
        return st;
      at[kind] = fs;
      end[kind] = fe;
    }
  int fk = r->col[K_FHZ] != NONE ? K_FHZ : K_FRAD;
  size_t fc = r->col[fk] + 1, fo = (size_t) (at[fk] - r->text), flen = (size_t) (end[fk] - at[fk]);
  double f = v[fk], omega = fk == K_FHZ ? 2.0 * LW_PI * f : f;
  if (!(f > 0.0))
    return fail (r, LW_ERR_INVALID, line, fc, fo, "line %zu: %s \"%s\" is not above zero", line,
                 known_names[fk], quote (q, at[fk], flen));
  if (!isfinite (omega))
    return fail (r, LW_ERR_INVALID, line, fc, fo,
                 "line %zu: %s \"%s\" is too large to be a frequency in rad/s", line,
                 known_names[fk], quote (q, at[fk], flen));
  if (r->n > 0 && (f <= r->prev_f || omega <= r->prev_omega))
    return fail (r, LW_ERR_INVALID, line, fc, fo,
                 "line %zu: %s \"%s\" is not above the \"%s\" of line %zu (%s)", line,
                 known_names[fk], quote (q, at[fk], flen), r->prev_text, r->prev_line,
                 f == r->prev_f ? "a frequency given twice" : "frequencies must increase");
  double complex h;
  if (r->col[K_RE] != NONE)
    h = CMPLX (v[K_RE], v[K_IM]);
  else
    {
      int mk = r->col[K_DB] != NONE ? K_DB : K_MAG;
      size_t mc = r->col[mk] + 1, mo = (size_t) (at[mk] - r->text);
      size_t mlen = (size_t) (end[mk] - at[mk]);
      double mag = mk == K_DB ? pow (10.0, v[K_DB] / 20.0) : v[K_MAG];
      if (mag < 0.0)
        return fail (r, LW_ERR_INVALID, line, mc, mo,
                     "line %zu: magnitude \"%s\" is negative; a ratio is 0 or more (the sign "
                     "belongs in phase_deg)", line, quote (q, at[mk], mlen));
      if (!isfinite (mag))
        return fail (r, LW_ERR_INVALID, line, mc, mo,
                     "line %zu: magnitude_db \"%s\" is beyond the range of a double as a ratio",
                     line, quote (q, at[mk], mlen));
      double phi = v[K_PHASE] * (LW_PI / 180.0);
      h = CMPLX (mag * cos (phi), mag * sin (phi));
    }
  if (r->col[K_COH] != NONE && !(v[K_COH] >= 0.0 && v[K_COH] <= 1.0))
    return fail (r, LW_ERR_INVALID, line, r->col[K_COH] + 1, (size_t) (at[K_COH] - r->text),
                 "line %zu: coherence \"%s\" is outside 0 to 1", line,
                 quote (q, at[K_COH], (size_t) (end[K_COH] - at[K_COH])));
  LwStatus st = grow (r);
  if (st != LW_OK)
    return st;
  r->omega[r->n] = omega;
  r->h[r->n] = h;
  if (r->coh != NULL)
    r->coh[r->n] = v[K_COH];
  r->n++;
  r->prev_f = f;
  r->prev_omega = omega;
  r->prev_line = line;
  quote (r->prev_text, at[fk], flen);
  return LW_OK;
}

/* ---- the table ----------------------------------------------------------------------------- */

/* Reads every line; on LW_OK the rows are in r and *lines holds the number of lines. */
static LwStatus
read_lines (Reader *r, size_t len, size_t *lines)
{
  const char *p = r->text, *end = r->text + len;
  if (len >= 3 && memcmp (p, "\xEF\xBB\xBF", 3) == 0)
    p += 3;
  else if (len >= 2 && (memcmp (p, "\xFF\xFE", 2) == 0 || memcmp (p, "\xFE\xFF", 2) == 0))
    return fail (r, LW_ERR_PARSE, 1, 0, 0,
                 "line 1: not UTF-8 text (UTF-16? save the table as UTF-8)");
  size_t line = 0;
  bool header = false;
  while (p < end)
    {
      if (line == LW_MEASURED_MAX_LINES)
        return fail (r, LW_ERR_INVALID, line + 1, 0, (size_t) (p - r->text),
                     "line %zu: the table goes on past %d lines, the most this reader takes",
                     line + 1, LW_MEASURED_MAX_LINES);
      line++;
      const char *nl = memchr (p, '\n', (size_t) (end - p));
      const char *le = nl != NULL ? nl : end, *next = nl != NULL ? nl + 1 : end;
      if (le > p && le[-1] == '\r')
        le--;
      const char *bad = first_bad_byte (p, le);
      if (bad != NULL)
        return refuse_byte (r, line, p, bad);
      const char *hash = memchr (p, '#', (size_t) (le - p));
      const char *s = p, *e = hash != NULL ? hash : le;
      trim (&s, &e);
      p = next;
      if (s == e)
        continue;
      LwStatus st = header ? read_row (r, line, s, e) : read_header (r, line, s, e);
      if (st != LW_OK)
        return st;
      header = true;
    }
  *lines = line;
  if (!header)
    return fail (r, LW_ERR_PARSE, line > 0 ? line : 1, 0, 0,
                 line == 0 ? "the file is empty; a table starts with a header line of column "
                             "names"
                           : "the file has no header line, only comments and blank lines");
  return LW_OK;
}

/* "ignored columns: a, b" into note (cut at a character boundary when it does not fit). */
static void
write_note (const Reader *r, char *note, size_t note_size)
{
  if (note == NULL || note_size == 0)
    return;
  size_t used = 0;
  bool first = true;
  for (size_t k = 0; k < r->ncols; k++)
    {
      if (r->kind[k] != K_COUNT)
        continue;
      char q[QUOTE_SIZE];
      const char *parts[2] = { first ? "ignored columns: " : ", ",
                               quote (q, r->name[k], r->name_len[k]) };
      first = false;
      for (int i = 0; i < 2; i++)
        {
          size_t len = strlen (parts[i]), room = note_size - 1 - used;
          size_t take = utf8_cut (parts[i], len, room);
          memcpy (note + used, parts[i], take);
          used += take;
          if (take < len)
            {
              note[used] = '\0';
              return;
            }
        }
    }
  note[used] = '\0';
}

static void
release (Reader *r)
{
  free (r->omega);
  free (r->h);
  free (r->coh);
  r->omega = r->coh = NULL;
  r->h = NULL;
}

LwStatus
lw_measured_parse (const char *text, size_t len, LwMeasured **out, char *note, size_t note_size,
                   LwMeasuredPlace *place, LwError *err)
{
  lw_error_clear (err);
  if (place != NULL)
    place->line = place->column = 0;
  if (note != NULL && note_size > 0)
    note[0] = '\0';
  if (out != NULL)
    *out = NULL;
  Reader *r = calloc (1, sizeof *r);
  if (r == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory reading the table");
  r->text = text;
  r->place = place;
  r->err = err;
  for (int i = 0; i < K_COUNT; i++)
    r->col[i] = NONE;
  LwStatus st;
  if (out == NULL || (text == NULL && len > 0))
    st = fail (r, LW_ERR_INVALID, 1, 0, SIZE_MAX, "no text or no place for the table");
  else
    {
      size_t lines = 0;
      st = read_lines (r, text == NULL ? 0 : len, &lines);
      if (st == LW_OK && r->n < LW_MEASURED_MIN_POINTS)
        st = fail (r, LW_ERR_INVALID, lines, 0, SIZE_MAX,
                   "the table has %zu data rows; it needs at least %d", r->n,
                   LW_MEASURED_MIN_POINTS);
    }
  LwMeasured *m = st == LW_OK ? malloc (sizeof *m) : NULL;
  if (st == LW_OK && m == NULL)
    st = fail (r, LW_ERR_NOMEM, 0, 0, SIZE_MAX, "out of memory reading the table");
  if (st != LW_OK)
    {
      release (r);
      free (r);
      return st;
    }
  /* cut to fit (a failed shrink keeps the larger block) */
  double *omega = realloc (r->omega, r->n * sizeof *omega);
  double complex *h = realloc (r->h, r->n * sizeof *h);
  double *coh = r->coh != NULL ? realloc (r->coh, r->n * sizeof *coh) : NULL;
  m->n = r->n;
  m->omega_rad_s = omega != NULL ? omega : r->omega;
  m->h = h != NULL ? h : r->h;
  m->coherence = coh != NULL ? coh : r->coh;
  write_note (r, note, note_size);
  free (r);
  *out = m;
  return LW_OK;
}

void
lw_measured_free (LwMeasured *m)
{
  if (m == NULL)
    return;
  free (m->omega_rad_s);
  free (m->h);
  free (m->coherence);
  free (m);
}

LwMeasured *
lw_measured_copy (const LwMeasured *m)
{
  if (m == NULL)
    return NULL;
  LwMeasured *c = calloc (1, sizeof *c);
  size_t n = m->n > 0 ? m->n : 1;
  if (c == NULL || n > SIZE_MAX / sizeof (double complex))
    {
      free (c);
      return NULL;
    }
  c->n = m->n;
  c->omega_rad_s = malloc (n * sizeof *c->omega_rad_s);
  c->h = malloc (n * sizeof *c->h);
  c->coherence = m->coherence != NULL ? malloc (n * sizeof *c->coherence) : NULL;
  if (c->omega_rad_s == NULL || c->h == NULL || (m->coherence != NULL && c->coherence == NULL))
    {
      lw_measured_free (c);
      return NULL;
    }
  if (m->n > 0)
    {
      memcpy (c->omega_rad_s, m->omega_rad_s, m->n * sizeof *c->omega_rad_s);
      memcpy (c->h, m->h, m->n * sizeof *c->h);
      if (m->coherence != NULL)
        memcpy (c->coherence, m->coherence, m->n * sizeof *c->coherence);
    }
  return c;
}
