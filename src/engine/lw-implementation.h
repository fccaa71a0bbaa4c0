/* lw-implementation.h — the controller of an evaluated variant as firmware takes it: the
 * difference equation, the second-order sections, optionally the sections in Qm.n fixed point
 * with the loop evaluated again with the quantized controller, the C99 header and source
 * (lw-emit-c.h) and their summary in words. The window's Implementation dialog and the CLI's
 * emit both call it, so both hand over the same files.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <glib.h>

#include "lw-emit-c.h"
#include "lw-engine.h"
#include "lw-implement.h"

G_BEGIN_DECLS

#define LW_IMPL_ERROR (lw_impl_error_quark ())
typedef enum
{
  LW_IMPL_ERROR_INPUT,    /* the controller or the format cannot be implemented as asked */
  LW_IMPL_ERROR_FAILED    /* memory or a numerical failure */
} LwImplError;
GQuark lw_impl_error_quark (void);

/* Which step failed, for messages that name the place. */
typedef enum
{
  LW_IMPL_STEP_CONTROLLER,   /* difference equation or sections of the controller */
  LW_IMPL_STEP_FIXED,        /* quantization to Qm.n, or the quantized loop */
  LW_IMPL_STEP_CODE          /* the C text */
} LwImplStep;

typedef struct
{
  LwImplForm form;
  gboolean fixed;            /* sections in fixed point (form must be sections) */
  LwQFormat q;               /* when fixed */
  const char *prefix;        /* NULL: LW_EMIT_DEFAULT_PREFIX */
} LwImplOptions;

typedef struct
{
  LwImplOptions o;
  char *prefix;
  LwVariantEval *eval;             /* the variant (a reference) */
  LwDiffEq *diffeq;
  LwSos *sos;
  LwSosFixed *fixed;               /* NULL unless fixed */
  LwModel *controller_zq;          /* the quantized controller, or NULL */
  LwVariantEval *quantized;        /* the loop with it, or NULL */
  GPtrArray *warnings;             /* sentences about the quantized design (empty otherwise) */
  char *header_name, *source_name; /* "<prefix>controller.h" / ".c" */
  char *header, *source;           /* the C text */
  size_t header_len, source_len;
  double impulse[LW_EMIT_SELFTEST_LEN];
  int16_t impulse_counts[LW_EMIT_SELFTEST_LEN];
} LwImplementation;

/* The implementation of the evaluated variant e (lw_variant_eval_ok). The options are checked
 * by the caller (lw_qformat_parse, lw_emit_prefix_check, fixed only with sections). NULL with
 * an error (LW_IMPL_ERROR, or the engine's for the quantized loop) and *failed (may be NULL)
 * naming the step. */
LwImplementation *lw_implementation_make (LwVariantEval *e, const LwImplOptions *o,
                                          LwImplStep *failed, GError **error);
void lw_implementation_free (LwImplementation *im);
G_DEFINE_AUTOPTR_CLEANUP_FUNC (LwImplementation, lw_implementation_free)

/* The summary in words (the controller, the period, the coefficients, the sections, the
 * quantization and its warnings, the margins, the caution), numbers with '.' whatever the
 * locale; it starts with a newline. g_free it. */
char *lw_implementation_describe (const LwImplementation *im);

/* Writes the header and the source into the existing folder dir, both or neither (also under
 * kill -9; lw_files_replace). *header_path and *source_path (may be NULL) get the paths. */
gboolean lw_implementation_write (const LwImplementation *im, const char *dir,
                                  char **header_path, char **source_path, GError **error);

G_END_DECLS
