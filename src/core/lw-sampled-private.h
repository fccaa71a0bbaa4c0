/* lw-sampled-private.h — what the files of the sampled plant share (lw-sampled.c,
 * lw-sampled-realize.c); not used outside them.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-internal.h"
#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
