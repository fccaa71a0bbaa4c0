/* lw-test.h — small helpers shared by the core's cmocka tests (include after <cmocka.h>).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <math.h>
#include <stdint.h>

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

/* A seeded normal deviate (xorshift64* and Box–Muller) truncated at limit deviations: noise
 * of a known bound for the tests of measured data. *state must not be 0. */
static inline double
normal_truncated (uint64_t *state, double limit)
{
  for (;;)
    {
      double u[2];
      for (int k = 0; k < 2; k++)
        {
          *state ^= *state >> 12;
          *state ^= *state << 25;
          *state ^= *state >> 27;
          u[k] = ((double) ((*state * 2685821657736338717ull) >> 11) + 0.5) / 9007199254740992.0;
        }
      double g = sqrt (-2.0 * log (u[0])) * cos (2 * 3.14159265358979323846 * u[1]);
      if (fabs (g) <= limit)
        return g;
    }
}
