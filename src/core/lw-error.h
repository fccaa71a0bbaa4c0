/* lw-error.h — error reporting for the numerics core.
 *
 * Every fallible core function takes an optional LwError * (may be NULL) and returns an
 * LwStatus.  Nothing in core/ prints.  `position` is the 0-based character offset in the
 * text being parsed when the error is about typed input, otherwise -1.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
  LW_OK = 0,
  LW_ERR_PARSE,     /* malformed expression text */
  LW_ERR_INVALID,   /* well-formed but not acceptable (improper, zero denominator, T <= 0 ...) */
  LW_ERR_NUMERIC,   /* a numerical method failed (LAPACK info != 0, non-finite result) */
  LW_ERR_NOMEM      /* allocation failed or a size overflowed */
} LwStatus;

#define LW_ERROR_MESSAGE_MAX 256

typedef struct {
  LwStatus code;
  int position;                         /* 0-based character offset, or -1 */
  char message[LW_ERROR_MESSAGE_MAX];   /* one sentence, no trailing newline */
} LwError;

/* Fills *err (if err is non-NULL) and returns code. printf-style message. */
LwStatus lw_error_set (LwError *err, LwStatus code, int position, const char *fmt, ...)
  __attribute__ ((format (printf, 4, 5)));

/* Resets *err to LW_OK / position -1 / empty message (err may be NULL). */
void lw_error_clear (LwError *err);

#ifdef __cplusplus
}
#endif
