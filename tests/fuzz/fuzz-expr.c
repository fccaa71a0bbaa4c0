/* fuzz-expr.c — libFuzzer target for the expression parser of src/core/lw-expr.h
 * (build-aux/fuzz).
 *
 * The input (cut at its first NUL) is parsed in each domain, with and without the properness
 * check. A parse either succeeds with a finite, canonical model within the degree limit, or
 * fails with a position inside the text (or -1) and a message; anything else stops the fuzzer.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <math.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "lw-expr.h"

int LLVMFuzzerTestOneInput (const uint8_t *data, size_t size);

/* named parameters the text may use (lw_expr_parse_params); with them, one the text does not
 * use is refused, which the checks below take as any other refusal */
static const LwExprParam params[] = { { "K", 2.5 }, { "wn", 120.0 }, { "zeta_1", 0.05 },
                                      { "a0", 0.0 } };

static void
check (const char *text, LwDomain domain, double period_s, int proper)
{
  LwModel *m = NULL;
  LwError err;
  lw_error_clear (&err);
  LwStatus st = proper == 2 ? lw_expr_parse_params_proper (text, domain, period_s, params, 4,
                                                           &m, &err)
                : proper ? lw_expr_parse_proper (text, domain, period_s, &m, &err)
                         : lw_expr_parse (text, domain, period_s, &m, &err);
  if (st == LW_OK)
    {
      if (m == NULL || m->n_zeros > LW_MAX_DEGREE || m->n_poles > LW_MAX_DEGREE
          || !lw_model_is_finite (m) || (proper && m->n_zeros > m->n_poles))
        {
          fprintf (stderr, "bad model from '%s'\n", text);
          abort ();
        }
      lw_model_free (m);
      return;
    }
  if (m != NULL || err.message[0] == '\0' || err.position < -1
      || (err.position >= 0 && (size_t) err.position > strlen (text)))
    {
      fprintf (stderr, "bad error for '%s': %d at %d: %s\n", text, (int) st, err.position,
               err.message);
      abort ();
    }
}

int
LLVMFuzzerTestOneInput (const uint8_t *data, size_t size)
{
  if (size > 4096)
    return 0;
  char *text = malloc (size + 1);
  if (text == NULL)
    return 0;
  memcpy (text, data, size);
  text[size] = '\0';
  check (text, LW_DOMAIN_S, 0.0, 0);
  check (text, LW_DOMAIN_S, 0.0, 1);
  check (text, LW_DOMAIN_Z, 0.01, 1);
  check (text, LW_DOMAIN_W, 0.01, 0);
  check (text, LW_DOMAIN_S, 0.0, 2);
  free (text);
  return 0;
}
