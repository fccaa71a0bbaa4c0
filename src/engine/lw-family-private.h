/* lw-family-private.h — what the family's files share (lw-family.c, lw-family-loops.c).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-family.h"

/* Variant `variant`'s compensator in z at its period, or NULL with an error naming it. */
LwModel *lw_family_variant_controller (const LwDesign *d, size_t variant, GError **error);
