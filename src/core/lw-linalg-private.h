/* lw-linalg-private.h — what the files of the linear algebra share (lw-linalg.c,
 * lw-linalg-hess.c, lw-linalg-schur.c); not used outside them.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-linalg.h"
#include <lapacke.h>
#include <math.h>
#include <stdbool.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

double *
lw_la_alloc_doubles (size_t count);

LwStatus
lw_la_balance_scaling (LwSs *s, LwError *err);

LwStatus
lw_la_apply_orthogonal (LwSs *s, const double *q, LwError *err);

double
lw_la_cabs_fast (double a, double b);
