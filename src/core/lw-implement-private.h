/* lw-implement-private.h — what the files of the implementation forms share
 * (lw-implement.c, lw-implement-sections.c); not used outside them.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-implement.h"
#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "lw-internal.h"

LwStatus
lw_impl_check_controller (const LwModel *cz, const char *fn, LwError *err);
