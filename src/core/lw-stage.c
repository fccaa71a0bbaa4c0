/* lw-stage.c — compensator stages in the w-plane; definitions in lw-stage.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-stage.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "lw-analysis.h"
#include "lw-stage-kinds.h"
#include "stages/lw-stage-kind-impl.h"


/* Every kind's definition, parameters and handles are its row in the stage-kind table
 * (lw-stage-kinds.h, one file per kind under stages/); this file walks the table. */

void
lw_stage_set_label (LwStage *s, const char *label)
{
  if (s == NULL)
    return;
  snprintf (s->label, sizeof s->label, "%s", label != NULL ? label : "");
}

static const char *
stage_name (const LwStage *s)
{
  if (s->label[0] != '\0')
    return s->label;
  const char *k = lw_stage_kind_name (s->kind);
  return k != NULL ? k : "stage";
}

LwStatus
lw_stage_check (const LwStage *s, LwError *err)
{
  if (s == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "missing stage");
  const char *nm = stage_name (s);
  const LwStageKindInfo *k = lw_stage_kind_info (s->kind);
  if (k == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "stage '%s': unknown kind %d", nm,
                         (int) s->kind);
  for (size_t i = 0; i < k->n_params; i++)
    {
      const LwStageParamInfo *p = &k->params[i];
      double v = lw_stage_param_get (s, i);
      if (!lw_param_rule_ok (p->rule, v))
        {
          bool unit = p->unit[0] != '\0' && strcmp (p->unit, "ratio") != 0;
          return lw_error_set (err, LW_ERR_INVALID, -1, "stage '%s': the %s must be %s%s%s%s, "
                               "got %.6g", nm, p->what, lw_param_rule_phrase (p->rule),
                               unit ? " (" : "", unit ? p->unit : "", unit ? ")" : "", v);
        }
    }
  return k->check != NULL ? k->check (s, nm, err) : LW_OK;
}

LwStatus
lw_stage_to_model (const LwStage *s, double period_s, LwModel **out, LwError *err)
{
  *out = NULL;
  if (!(period_s > 0.0) || !isfinite (period_s))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the sample period must be finite and > 0 s");
  LwStatus st = lw_stage_check (s, err);
  if (st != LW_OK)
    return st;
  LwModel *m = NULL;
  st = lw_stage_kind_info (s->kind)->to_model (s, period_s, &m, err);
  if (st == LW_ERR_NOMEM || (st == LW_OK && m == NULL))
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
  if (st != LW_OK)
    return st;
  lw_model_canonicalize (m);
  *out = m;
  return LW_OK;
}

/* ---- corner handles ----------------------------------------------------------------------- */

size_t
lw_stage_corner_count (const LwStage *s)
{
  const LwStageKindInfo *k = s != NULL ? lw_stage_kind_info (s->kind) : NULL;
  if (k == NULL || k->corner_count == NULL)
    return 0;
  size_t n = k->corner_count (s);
  return n <= LW_STAGE_MAX_CORNERS ? n : LW_STAGE_MAX_CORNERS;
}

LwStatus
lw_stage_corner_get (const LwStage *s, size_t i, double *nu_rad_s, LwHandleKind *kind,
                     LwError *err)
{
  size_t n = lw_stage_corner_count (s);
  if (i >= n)
    return lw_error_set (err, LW_ERR_INVALID, -1, "stage '%s' has no corner %zu (it has %zu)",
                         s != NULL ? stage_name (s) : "(null)", i, n);
  LwHandleKind k = LW_HANDLE_ZERO;
  double nu = lw_stage_kind_info (s->kind)->corner_get (s, i, &k);
  if (nu_rad_s != NULL)
    *nu_rad_s = nu;
  if (kind != NULL)
    *kind = k;
  return LW_OK;
}

LwStatus
lw_stage_corner_set (LwStage *s, size_t i, double nu_rad_s, bool keep_ratio, LwError *err)
{
  size_t n = lw_stage_corner_count (s);
  if (i >= n)
    return lw_error_set (err, LW_ERR_INVALID, -1, "stage '%s' has no corner %zu (it has %zu)",
                         s != NULL ? stage_name (s) : "(null)", i, n);
  if (!lw_stage_positive (nu_rad_s))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "stage '%s': a corner must be a finite frequency > 0 rad/s",
                         stage_name (s));
  double old = NAN;
  lw_stage_corner_get (s, i, &old, NULL, NULL);
  double f = nu_rad_s / old;                 /* factor along the frequency axis */
  LwStage t = *s;
  LwStatus st = lw_stage_kind_info (s->kind)->corner_set (&t, i, nu_rad_s, f, keep_ratio,
                                                          stage_name (s), err);
  if (st == LW_OK)
    st = lw_stage_check (&t, err);
  if (st != LW_OK)
    return st;
  *s = t;
  return LW_OK;
}

/* ---- parameters --------------------------------------------------------------------------- */

size_t
lw_stage_params (const LwStage *s, LwStageParam *o)
{
  const LwStageKindInfo *k = s != NULL ? lw_stage_kind_info (s->kind) : NULL;
  if (k == NULL)
    return 0;
  size_t n = 0;
  for (size_t i = 0; i < k->n_params; i++)
    n = lw_stage_put_param (o, n, k->params[i].name, k->params[i].title,
                            lw_stage_param_get (s, i), k->params[i].unit, false);
  if (k->derived != NULL)
    n += k->derived (s, o + n);
  return n;
}

/* ---- the compensator ---------------------------------------------------------------------- */

LwStatus
lw_compensator_w (const LwStage *stages, size_t n, double period_s, LwModel **out, LwError *err)
{
  *out = NULL;
  if (n > 0 && stages == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "missing stages");
  if (!(period_s > 0.0) || !isfinite (period_s))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the sample period must be finite and > 0 s");
  LwModel *acc = lw_model_new_constant (LW_DOMAIN_W, period_s, 1.0);
  if (acc == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
  for (size_t i = 0; i < n; i++)
    {
      if (!stages[i].enabled)
        continue;
      LwModel *m = NULL;
      LwStatus st = lw_stage_to_model (&stages[i], period_s, &m, err);
      if (st != LW_OK)
        {
          lw_model_free (acc);
          return st;
        }
      if (acc->n_zeros + m->n_zeros > LW_MAX_DEGREE || acc->n_poles + m->n_poles > LW_MAX_DEGREE)
        {
          lw_model_free (m);
          lw_model_free (acc);
          return lw_error_set (err, LW_ERR_INVALID, -1,
                               "the compensator exceeds degree %d at stage %zu", LW_MAX_DEGREE,
                               i + 1);
        }
      LwModel *p = lw_model_mul (acc, m);
      lw_model_free (m);
      lw_model_free (acc);
      if (p == NULL)
        return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
      acc = p;
    }
  *out = acc;
  return LW_OK;
}

LwStatus
lw_compensator_z (const LwStage *stages, size_t n, double period_s, LwModel **out, LwError *err)
{
  *out = NULL;
  LwModel *w = NULL;
  LwStatus st = lw_compensator_w (stages, n, period_s, &w, err);
  if (st != LW_OK)
    return st;
  double edge = 2.0 / period_s;
  for (size_t i = 0; i < w->n_zeros + w->n_poles; i++)
    {
      double complex r = i < w->n_zeros ? w->zeros[i] : w->poles[i - w->n_zeros];
      if (cabs (r - edge) <= 1e-12 * edge)
        {
          lw_model_free (w);
          return lw_error_set (err, LW_ERR_INVALID, -1,
                               "a compensator root at w = 2/T = %.6g rad/s has no image in z",
                               edge);
        }
    }
  LwModel *z = lw_model_w_to_z (w);
  lw_model_free (w);
  if (z == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
  *out = z;
  return LW_OK;
}
