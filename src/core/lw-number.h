/* lw-number.h — the one syntax of a number a user types, wherever it is typed: a command-line
 * option, an attribute of a design document, a constant inside an expression (lw-expr.h).
 *
 *   number   = [ "+" | "-" ] mantissa [ exponent ]
 *   mantissa = digits [ "." digits ]  |  "." digits
 *   exponent = ( "e" | "E" ) [ "+" | "-" ] digits
 *
 * ASCII digits, '.' as the decimal point whatever the locale, at most LW_NUMBER_MAX_CHARS
 * characters. Not accepted: hexadecimal ("0x10", "0x1p3"), "inf", "nan", a trailing '.'
 * ("5."), white space before or after, a thousands separator. Inside an expression the sign
 * is the expression's unary minus, so the expression parser scans the mantissa and exponent
 * with the same rule. A design document first removes the white space XML allows around
 * an attribute's number (xsd:double collapses it); nothing else differs. Whole numbers are
 * an optional sign and digits, everywhere (lw_number_parse_whole).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

#define LW_NUMBER_MAX_CHARS 64

typedef enum {
  LW_NUMBER_OK = 0,
  LW_NUMBER_SYNTAX,      /* not the syntax above (or empty) */
  LW_NUMBER_TOO_LONG,    /* more than LW_NUMBER_MAX_CHARS characters */
  LW_NUMBER_NOT_FINITE   /* the syntax is right but the value overflows a double (1e999) */
} LwNumberResult;

/* Length in bytes of the unsigned mantissa-and-exponent at the start of text (no sign), or
 * 0 when text does not start with one. A dangling '.' or exponent is not part of it: "5." and
 * "5e" give 1. */
size_t lw_number_span (const char *text);

/* Converts a token already checked against the syntax (sign allowed; len bytes) to the nearest
 * double, independently of LC_NUMERIC. Underflow gives 0 or a subnormal; overflow ±HUGE_VAL. */
double lw_number_convert (const char *token, size_t len);

/* Reads the whole of text as one number of the syntax above into *out (set only on
 * LW_NUMBER_OK). */
LwNumberResult lw_number_parse (const char *text, double *out);

/* Reads the whole of text as a whole number: an optional sign and decimal digits only (as
 * XML Schema's xsd:integer, which documents use for whole numbers: "1e3" and "1.0" are not
 * whole numbers) in [lo, hi]. Returns LW_NUMBER_OK with *out set, or the reason; *whole_out
 * (may be NULL) is false when the text is a number of the syntax above but not written as a
 * whole number, and *in_range_out (may be NULL) false when it is whole but outside [lo, hi]. */
LwNumberResult lw_number_parse_whole (const char *text, long long lo, long long hi,
                                      long long *out, bool *whole_out, bool *in_range_out);

/* ---- ranges of the loop's timing ---------------------------------------------------------
 *
 * The sample period T is accepted from LW_PERIOD_MIN_S to LW_PERIOD_MAX_S (1 ps to about 32
 * years). Reason: every sampled controller in use lies far inside (the fastest digital loops
 * run near 1 ns, the slowest process loops at hours), while at the extremes the numerics stop
 * representing the loop: 1/T overflows below about 5.6e-309 s, 2/T (the w-plane's scale)
 * underflows to subnormals above about 1e308 s, and the frequency grid (twelve decades below
 * pi/T and more), the time axis (up to 1e7 samples) and the loop's state-space products need
 * hundreds of decades of head room on both sides. 1e-12 … 1e9 keeps more than 250 decades of
 * it, so no figure of an accepted period overflows or underflows for lack of range.
 * The dead time is at most LW_DEAD_TIME_MAX_SAMPLES sample periods (the sampled plant's own
 * limit, lw_sampled_plant_new). */
#define LW_PERIOD_MIN_S 1e-12
#define LW_PERIOD_MAX_S 1e9
#define LW_DEAD_TIME_MAX_SAMPLES 1e6

/* Whether period_s is finite and within [LW_PERIOD_MIN_S, LW_PERIOD_MAX_S]. */
bool lw_period_ok (double period_s);

/* Whether a dead time dead_time_s >= 0 is at most LW_DEAD_TIME_MAX_SAMPLES periods of
 * period_s (an accepted period). */
bool lw_dead_time_ok (double dead_time_s, double period_s);

#ifdef __cplusplus
}
#endif
