/* SPDX-License-Identifier: GPL-3.0-or-later */
#include "lw-error.h"

#include <stdarg.h>
#include <stdio.h>

LwStatus
lw_error_set (LwError *err, LwStatus code, int position, const char *fmt, ...)
{
  if (err == NULL)
    return code;
  err->code = code;
  err->position = position;
  va_list ap;
  va_start (ap, fmt);
  vsnprintf (err->message, sizeof err->message, fmt, ap);
  va_end (ap);
  return code;
}

void
lw_error_clear (LwError *err)
{
  if (err == NULL)
    return;
  err->code = LW_OK;
  err->position = -1;
  err->message[0] = '\0';
}
