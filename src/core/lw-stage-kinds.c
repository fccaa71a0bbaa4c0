/* lw-stage-kinds.c — the stage-kind table (lw-stage-kinds.h): one row per kind, each defined
 * in its own file under stages/; and what every row shares (parameter access, rules, placement).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-stage-kinds.h"

#include <math.h>
#include <string.h>

#include "stages/lw-stage-kind-impl.h"

extern const LwStageKindInfo lw_stage_kind_gain, lw_stage_kind_integrator,
  lw_stage_kind_real_zero, lw_stage_kind_real_pole, lw_stage_kind_lead, lw_stage_kind_lag,
  lw_stage_kind_pi, lw_stage_kind_pid, lw_stage_kind_notch, lw_stage_kind_zero_pair,
  lw_stage_kind_pole_pair, lw_stage_kind_resonant;

/* In LwStageKind order (row i is kind i; tests/core/test-stage-kinds.c checks), which is also
 * the order of the add-stage menu. */
static const LwStageKindInfo *const kinds[] = {
  &lw_stage_kind_gain,
  &lw_stage_kind_integrator,
  &lw_stage_kind_real_zero,
  &lw_stage_kind_real_pole,
  &lw_stage_kind_lead,
  &lw_stage_kind_lag,
  &lw_stage_kind_pi,
  &lw_stage_kind_pid,
  &lw_stage_kind_notch,
  &lw_stage_kind_zero_pair,
  &lw_stage_kind_pole_pair,
  &lw_stage_kind_resonant,
};

#define N_KINDS (sizeof kinds / sizeof kinds[0])

size_t
lw_stage_kind_count (void)
{
  return N_KINDS;
}

const LwStageKindInfo *
lw_stage_kind_info (LwStageKind kind)
{
  if ((int) kind < 0 || (size_t) kind >= N_KINDS || kinds[kind]->kind != kind)
    return NULL;
  return kinds[kind];
}

const LwStageKindInfo *
lw_stage_kind_by_name (const char *name)
{
  if (name == NULL)
    return NULL;
  for (size_t i = 0; i < N_KINDS; i++)
    if (strcmp (kinds[i]->name, name) == 0)
      return kinds[i];
  return NULL;
}

const char *
lw_stage_kind_name (LwStageKind kind)
{
  const LwStageKindInfo *k = lw_stage_kind_info (kind);
  return k != NULL ? k->name : NULL;
}

double
lw_stage_param_get (const LwStage *s, size_t i)
{
  const LwStageKindInfo *k = s != NULL ? lw_stage_kind_info (s->kind) : NULL;
  if (k == NULL || i >= k->n_params)
    return NAN;
  const char *p = (const char *) s + k->params[i].offset;
  if (k->params[i].rule == LW_PARAM_COUNT)
    {
      int v;
      memcpy (&v, p, sizeof v);
      return v;
    }
  double v;
  memcpy (&v, p, sizeof v);
  return v;
}

void
lw_stage_param_set (LwStage *s, size_t i, double value)
{
  const LwStageKindInfo *k = s != NULL ? lw_stage_kind_info (s->kind) : NULL;
  if (k == NULL || i >= k->n_params)
    return;
  char *p = (char *) s + k->params[i].offset;
  if (k->params[i].rule == LW_PARAM_COUNT)
    {
      /* out-of-range values become 0 (refused by the rule), never undefined conversions */
      int v = isfinite (value) && fabs (value) <= 1e6 ? (int) lround (value) : 0;
      memcpy (p, &v, sizeof v);
    }
  else
    memcpy (p, &value, sizeof value);
}

bool
lw_param_rule_ok (LwParamRule rule, double v)
{
  if (!isfinite (v))
    return false;
  switch (rule)
    {
    case LW_PARAM_FINITE: return true;
    case LW_PARAM_POSITIVE: return v > 0.0;
    case LW_PARAM_NONNEGATIVE: return v >= 0.0;
    case LW_PARAM_NONZERO: return v != 0.0;
    case LW_PARAM_COUNT: return v == floor (v) && v >= 1.0 && v <= LW_STAGE_MAX_COUNT;
    }
  return false;
}

#define STR_(x) #x
#define STR(x) STR_ (x)

const char *
lw_param_rule_phrase (LwParamRule rule)
{
  switch (rule)
    {
    case LW_PARAM_FINITE: return "a finite number";
    case LW_PARAM_POSITIVE: return "a finite number > 0";
    case LW_PARAM_NONNEGATIVE: return "a finite number >= 0";
    case LW_PARAM_NONZERO: return "a finite number other than 0";
    case LW_PARAM_COUNT: return "a whole number from 1 to " STR (LW_STAGE_MAX_COUNT);
    }
  return "a number";
}

LwStage
lw_stage_placed (LwStageKind kind, double nu_c_rad_s)
{
  LwStage s;
  memset (&s, 0, sizeof s);
  s.enabled = true;
  const LwStageKindInfo *k = lw_stage_kind_info (kind);
  if (k == NULL)
    {
      s.kind = LW_STAGE_GAIN;
      s.p.gain.ratio = 1.0;
      return s;
    }
  s.kind = kind;
  for (size_t i = 0; i < k->n_params; i++)
    {
      const LwStageParamInfo *p = &k->params[i];
      double v = p->place;
      if (p->place_by == LW_PLACE_TIMES_NU)
        v = p->place * nu_c_rad_s;
      else if (p->place_by == LW_PLACE_PER_NU)
        v = p->place / nu_c_rad_s;
      lw_stage_param_set (&s, i, v);
    }
  return s;
}

/* ---- shared by the kind files ------------------------------------------------------------- */

void
lw_stage_quad_roots (double nu0, double zeta, double complex *r)
{
  if (zeta < 1.0)
    {
      double im = nu0 * sqrt ((1.0 - zeta) * (1.0 + zeta));
      r[0] = CMPLX (-zeta * nu0, im);
      r[1] = CMPLX (-zeta * nu0, -im);
    }
  else
    {
      double big = -nu0 * (zeta + sqrt ((zeta - 1.0) * (zeta + 1.0)));
      r[0] = big;
      r[1] = nu0 * nu0 / big;
    }
}

size_t
lw_stage_put_param (LwStageParam *o, size_t k, const char *name, const char *title, double v,
                    const char *unit, bool derived)
{
  o[k].name = name;
  o[k].title = title;
  o[k].value = v;
  o[k].unit = unit;
  o[k].derived = derived;
  return k + 1;
}

size_t
lw_stage_one_corner (const LwStage *s)
{
  (void) s;
  return 1;
}
