/* lw-stage-kind-impl.h — what the kind files under src/core/stages/ share; not public API.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <complex.h>
#include <math.h>
#include <stddef.h>

#include "lw-stage-kinds.h"

/* Marks a title for translation (xgettext --keyword=N_); the window looks it up. */
#ifndef N_
#define N_(s) (s)
#endif

#define LW_OFF(field) offsetof (LwStage, field)

/* The two roots of x² + 2ζν0·x + ν0² (conjugate pair, positive imaginary part first, when
 * ζ < 1; else the larger by the stable formula and the smaller from the product ν0²). */
void lw_stage_quad_roots (double nu0, double zeta, double complex *r);

/* Fills one LwStageParam; returns k + 1. */
size_t lw_stage_put_param (LwStageParam *o, size_t k, const char *name, const char *title,
                           double v, const char *unit, bool derived);

static inline bool
lw_stage_positive (double v)
{
  return isfinite (v) && v > 0.0;
}

/* corner_count of a kind with one handle */
size_t lw_stage_one_corner (const LwStage *s);
