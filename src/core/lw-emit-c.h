/* lw-emit-c.h — C99 source for a controller in one of its implementation forms.
 *
 * lw_emit_c writes a header and a source file as text into caller-owned growable buffers:
 * a state struct, an init function, a step function called once per sample, the impulse
 * response of the floating-point design (LW_EMIT_SELFTEST_LEN samples) and a self-test function
 * a target can call, with a comment block giving the design's figures and the caution.
 * Names in the generated code all start with a prefix (default "lw_ctrl_"); the files are meant
 * to be named <prefix>controller.h and <prefix>controller.c.  The generated code compiles with
 * `cc -std=c99 -Wall -Wextra -Werror -pedantic`; it needs <stdint.h> only (no libm).
 *
 * Forms (lw-implement.h):
 *   difference, double      u[k] = Σ b_i e[k−i] − Σ a_i u[k−i] (direct form I, histories)
 *   sections, double        the cascade, direct form II transposed per section
 *   sections, fixed point   int16_t e and u (counts), int16_t coefficients in Qm.n, int32_t
 *                           states, saturation; exactly lw_sos_fixed_filter
 * The computation delay is not in the coefficients: the generated comments tell the firmware to
 * write the value returned by step() at sample k to the actuator N ticks later.
 *
 * Numbers are printed with 17 significant digits (round trip) and a '.' whatever the locale.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include "lw-analysis.h"
#include "lw-error.h"
#include "lw-implement.h"
#include "lw-model.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Samples of the self-test impulse response. */
#define LW_EMIT_SELFTEST_LEN 64
/* Height (counts) of the impulse the fixed-point self-test applies: 2^13, a quarter of the
 * int16_t range. */
#define LW_EMIT_FIXED_IMPULSE 8192
/* Default identifier prefix. */
#define LW_EMIT_DEFAULT_PREFIX "lw_ctrl_"

/* A growable text buffer. Initialize with { 0 } or lw_text_init; data is NUL-terminated when
 * len > 0; free with lw_text_clear. */
typedef struct {
  char *data;
  size_t len;
  size_t cap;
  bool failed;      /* an allocation failed; the text is incomplete */
} LwText;

void lw_text_init (LwText *t);
void lw_text_clear (LwText *t);
/* Appends printf-style text; false (and t->failed) when memory ran out. */
bool lw_text_printf (LwText *t, const char *fmt, ...) __attribute__ ((format (printf, 2, 3)));

typedef enum {
  LW_FORM_DIFFERENCE = 0,
  LW_FORM_SECTIONS = 1
} LwImplForm;

typedef struct {
  const char *prefix;            /* NULL for LW_EMIT_DEFAULT_PREFIX; see lw_emit_prefix_check */
  LwImplForm form;
  double period_s;               /* sample period T, seconds */
  int compute_delay;             /* N, whole samples */
  double dead_time_s;            /* plant dead time, seconds (for the comment only) */
  const LwModel *plant_s;          /* may be NULL (comment only) */
  const LwModel *controller_w;     /* may be NULL (comment only) */
  const LwModel *controller_z;     /* required (comment) */
  const LwMargins *margins;      /* of the design; may be NULL */
  const LwMargins *margins_fixed;/* of the quantized controller; may be NULL */
  bool stable, stable_fixed;     /* closed loop stable (shown when margins are given) */
  const LwDiffEq *diffeq;        /* required for LW_FORM_DIFFERENCE */
  const LwSos *sos;              /* required for LW_FORM_SECTIONS */
  const LwSosFixed *fixed;       /* non-NULL: fixed-point code (sections only) */
} LwEmitInput;

/* Checks an identifier prefix: [A-Za-z_][A-Za-z0-9_]*, at most 40 characters. On failure
 * LW_ERR_INVALID with the 0-based position of the first bad character. */
LwStatus lw_emit_prefix_check (const char *prefix, LwError *err);

/* Writes the header into *header and the source into *source (both appended to). */
LwStatus lw_emit_c (const LwEmitInput *in, LwText *header, LwText *source, LwError *err);

/* The self-test vectors as emitted: the impulse response of the floating-point design (form as
 * given; sections in double when fixed) in y[0..LW_EMIT_SELFTEST_LEN-1]; and, when in->fixed,
 * the response of the fixed-point arithmetic to an impulse of LW_EMIT_FIXED_IMPULSE counts in
 * yq (may be NULL otherwise). */
LwStatus lw_emit_selftest_vectors (const LwEmitInput *in, double *y, int16_t *yq, LwError *err);

#ifdef __cplusplus
}
#endif
