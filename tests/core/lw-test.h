/* lw-test.h — small helpers shared by the core's cmocka tests (include after <cmocka.h>).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <math.h>

#include "lw-expr.h"

/* Fails the test unless |got − want| <= tol, printing both to 17 digits. */
static inline void
assert_close (double got, double want, double tol, const char *what)
{
  if (!(fabs (got - want) <= tol))
    fail_msg ("%s: got %.17g, want %.17g (tolerance %g)", what, got, want, tol);
}

/* Parses text in domain d (period t for z and w) or fails the test. */
static inline LwModel *
parse (const char *text, LwDomain d, double t)
{
  LwModel *m = NULL;
  LwError err;
  if (lw_expr_parse (text, d, t, &m, &err) != LW_OK)
    fail_msg ("parse of '%s' failed: %s", text, err.message);
  return m;
}
