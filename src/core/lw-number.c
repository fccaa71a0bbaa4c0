/* lw-number.c — the shared number syntax (lw-number.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-number.h"

#include <errno.h>
#include <limits.h>
#include <locale.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

static bool
is_digit (char c)
{
  return c >= '0' && c <= '9';
}

size_t
lw_number_span (const char *text)
{
  const char *p = text;
  bool int_digits = false;
  while (is_digit (*p))
    p++, int_digits = true;
  if (*p == '.' && is_digit (p[1]))
    {
      p++;
      while (is_digit (*p))
        p++;
    }
  else if (!int_digits)
    return 0;
  if (*p == 'e' || *p == 'E')
    {
      const char *q = p + 1;
      if (*q == '+' || *q == '-')
        q++;
      if (is_digit (*q))
        {
          while (is_digit (*q))
            q++;
          p = q;
        }
    }
  return (size_t) (p - text);
}

/* strtod honours LC_NUMERIC, so the '.' becomes the locale's decimal-point string first. */
double
lw_number_convert (const char *token, size_t len)
{
  char buf[LW_NUMBER_MAX_CHARS * 2 + 16];
  const char *dp = localeconv ()->decimal_point;
  if (dp == NULL || dp[0] == '\0')
    dp = ".";
  size_t dl = strlen (dp), o = 0;
  for (size_t i = 0; i < len && token[i] != '\0' && o + dl + 1 < sizeof buf; i++)
    {
      if (token[i] == '.')
        {
          memcpy (buf + o, dp, dl);
          o += dl;
        }
      else
        buf[o++] = token[i];
    }
  buf[o] = '\0';
  int saved = errno;
  double v = strtod (buf, NULL);
  errno = saved;
  return v;
}

LwNumberResult
lw_number_parse (const char *text, double *out)
{
  if (text == NULL)
    return LW_NUMBER_SYNTAX;
  size_t sign = (text[0] == '+' || text[0] == '-') ? 1 : 0;
  size_t span = lw_number_span (text + sign);
  if (span == 0 || text[sign + span] != '\0')
    return LW_NUMBER_SYNTAX;
  if (sign + span > LW_NUMBER_MAX_CHARS)
    return LW_NUMBER_TOO_LONG;
  double v = lw_number_convert (text, sign + span);
  if (!isfinite (v))
    return LW_NUMBER_NOT_FINITE;
  *out = v;
  return LW_NUMBER_OK;
}

LwNumberResult
lw_number_parse_whole (const char *text, long long lo, long long hi, long long *out,
                       bool *whole_out, bool *in_range_out)
{
  if (whole_out != NULL)
    *whole_out = true;
  if (in_range_out != NULL)
    *in_range_out = true;
  if (text == NULL)
    return LW_NUMBER_SYNTAX;
  const char *p = text + (text[0] == '+' || text[0] == '-');
  size_t n = strspn (p, "0123456789");
  if (n == 0 || p[n] != '\0')
    {
      /* a number of the general syntax that is not written as a whole number: say so */
      double v;
      if (whole_out != NULL && lw_number_parse (text, &v) == LW_NUMBER_OK)
        *whole_out = false;
      return LW_NUMBER_SYNTAX;
    }
  if ((size_t) (p - text) + n > LW_NUMBER_MAX_CHARS)
    return LW_NUMBER_TOO_LONG;
  /* digits only: exact as long as it fits; anything beyond hi is out of range */
  long long v = 0;
  bool big = false;
  for (size_t i = 0; i < n; i++)
    {
      int d = p[i] - '0';
      if (v > (LLONG_MAX - d) / 10)
        {
          big = true;
          break;
        }
      v = v * 10 + d;
    }
  if (text[0] == '-')
    v = -v;
  if (big || v < lo || v > hi)
    {
      if (in_range_out != NULL)
        *in_range_out = false;
      return LW_NUMBER_SYNTAX;
    }
  *out = v;
  return LW_NUMBER_OK;
}

bool
lw_period_ok (double period_s)
{
  return period_s >= LW_PERIOD_MIN_S && period_s <= LW_PERIOD_MAX_S;
}

bool
lw_dead_time_ok (double dead_time_s, double period_s)
{
  return dead_time_s >= 0.0 && isfinite (dead_time_s) && period_s > 0.0
         && dead_time_s / period_s <= LW_DEAD_TIME_MAX_SAMPLES;
}
