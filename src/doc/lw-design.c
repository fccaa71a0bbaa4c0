/* lw-design.c — the design model: its vocabulary tables, building and copying a design.
 * See lw-design.h (lw-design-check.c: the checks; lw-design-save.c: the canonical text and the
 * save); the file format is described in docs/file-format.md.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <complex.h>
#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/types.h>
#include <unistd.h>

#include <glib/gstdio.h>

#include "lw-design-private.h"
#include "lw-file-write.h"
#include "lw-number.h"
#include "lw-expr.h"

G_DEFINE_QUARK (lw-design-error-quark, lw_design_error)

/* ---- vocabulary tables ------------------------------------------------------------------ */

const LwDocReqKind lw_doc_req_kinds[] = {
  { LW_REQ_MIN_PHASE_MARGIN, "phase-margin", "min_deg", NULL },
  { LW_REQ_MIN_GAIN_MARGIN, "gain-margin", "min_db", NULL },
  { LW_REQ_MAX_SENSITIVITY, "sensitivity-peak", "max_ratio", NULL },
  { LW_REQ_CROSSOVER_RANGE, "crossover", "min_rad_s", "max_rad_s" },
  { LW_REQ_MAX_STEP_ERROR, "step-error", "max_fraction", NULL },
  { LW_REQ_MAX_RAMP_ERROR, "ramp-error", "max_s", NULL },
  { LW_REQ_MAX_OVERSHOOT, "overshoot", "max_pct", NULL },
  { LW_REQ_MAX_RISE_TIME, "rise-time", "max_s", NULL },
  { LW_REQ_MAX_SETTLING_TIME, "settling-time", "max_s", NULL },
  { LW_REQ_MAX_ACTUATOR, "actuator-peak", "max_units", NULL },
};
const size_t lw_doc_n_req_kinds = G_N_ELEMENTS (lw_doc_req_kinds);

const LwDocReqKind *
lw_doc_req_kind (LwReqKind kind)
{
  for (size_t i = 0; i < lw_doc_n_req_kinds; i++)
    if (lw_doc_req_kinds[i].kind == kind)
      return &lw_doc_req_kinds[i];
  return NULL;
}

const char *
lw_design_requirement_element (LwReqKind kind)
{
  for (size_t i = 0; i < lw_doc_n_req_kinds; i++)
    if (lw_doc_req_kinds[i].kind == kind)
      return lw_doc_req_kinds[i].element;
  return NULL;
}

const char *
lw_design_requirement_title (const LwDesignRequirement *r)
{
  if (r->name != NULL && r->name[0] != '\0')
    return r->name;
  const char *e = lw_design_requirement_element (r->req.kind);
  return e != NULL ? e : "requirement";
}


const char *
lw_doc_rule_phrase (LwNumRule rule)
{
  if (rule == LW_NUM_PERIOD)
    return "a sample period from 1e-12 to 1e9 s (the range the numerics represent)";
  return lw_param_rule_phrase ((LwParamRule) rule);
}

gboolean
lw_doc_rule_ok (LwNumRule rule, double v)
{
  if (rule == LW_NUM_PERIOD)
    return isfinite (v) && lw_period_ok (v);
  return lw_param_rule_ok ((LwParamRule) rule, v);
}

const char *
lw_design_text_problem (const char *s)
{
  if (!g_utf8_validate (s, -1, NULL))
    return "it is not valid UTF-8";
  for (const char *p = s; *p != '\0'; p = g_utf8_next_char (p))
    {
      gunichar c = g_utf8_get_char (p);
      if ((c < 0x20 && c != '\t' && c != '\n' && c != '\r') || c == 0xFFFE || c == 0xFFFF)
        return "it holds a control character that XML cannot hold";
    }
  return NULL;
}

const char *
lw_design_view_name_problem (const char *name)
{
  size_t n = strlen (name);
  if (n == 0 || n > LW_DESIGN_VIEW_NAME_MAX)
    return n == 0 ? "it is empty" : "it is longer than 32 characters";
  if (!g_ascii_islower (name[0]))
    return "it does not start with a lower-case letter a-z";
  if (strspn (name, "abcdefghijklmnopqrstuvwxyz0123456789-") != n)
    return "it holds a character other than a-z, 0-9 and '-'";
  return NULL;
}

/* the rules of a short label (a unit, a source): 1 … max bytes of text without tabs or line
 * breaks, no space at either end; too_long: the sentence for more than max bytes */
static const char *
label_problem (const char *s, size_t max, const char *too_long)
{
  size_t n = strlen (s);
  if (n == 0)
    return "it is empty";
  if (n > max)
    return too_long;
  const char *problem = lw_design_text_problem (s);
  if (problem != NULL)
    return problem;
  if (strpbrk (s, "\t\n\r") != NULL)
    return "it holds a tab or a line break";
  if (s[0] == ' ' || s[n - 1] == ' ')
    return "it starts or ends with a space";
  return NULL;
}

const char *
lw_design_unit_problem (const char *s)
{
  return label_problem (s, LW_DESIGN_UNIT_MAX, "it is longer than 32 bytes");
}

const char *
lw_design_source_problem (const char *s)
{
  return label_problem (s, LW_DESIGN_SOURCE_MAX, "it is longer than 200 bytes");
}

const char *
lw_design_measured_name_problem (const char *s)
{
  return label_problem (s, LW_DESIGN_MEASURED_NAME_MAX, "it is longer than 64 bytes");
}

const char *
lw_design_response_name (unsigned i)
{
  static const char *const names[LW_DESIGN_N_RESPONSES] = {
    "reference", "actuator", "input-disturbance", "output-disturbance"
  };
  return i < LW_DESIGN_N_RESPONSES ? names[i] : NULL;
}

/* ---- the model ---------------------------------------------------------------------------- */

void
lw_design_set_string (char **field, const char *value)
{
  char *copy = g_strdup (value);
  g_free (*field);
  *field = copy;
}

LwDesign *
lw_design_new (const char *plant, double period_s)
{
  LwDesign *d = g_new0 (LwDesign, 1);
  d->title = g_strdup ("");
  d->plant = g_strdup (plant != NULL ? plant : "");
  d->period_s = period_s;
  d->hold = LW_HOLD_ZERO_ORDER;
  d->compute_delay = 1;
  lw_design_add_variant (d, "initial");
  return d;
}

static void
variant_clear (LwDesignVariant *v)
{
  g_free (v->name);
  g_free (v->notes);
  g_free (v->stages);
}

void
lw_design_free (LwDesign *d)
{
  if (d == NULL)
    return;
  g_free (d->title);
  g_free (d->author);
  g_free (d->notes);
  g_free (d->plant);
  for (size_t i = 0; i < d->n_params; i++)
    g_free (d->params[i].name);
  g_free (d->params);
  lw_design_clear_points (d);
  g_free (d->input_unit);
  g_free (d->output_unit);
  for (size_t i = 0; i < d->n_requirements; i++)
    g_free (d->requirements[i].name);
  g_free (d->requirements);
  for (size_t i = 0; i < d->n_variants; i++)
    variant_clear (&d->variants[i]);
  g_free (d->variants);
  g_strfreev (d->views);
  lw_measured_free (d->measured);
  g_free (d->measured_source);
  g_free (d->measured_name);
  lw_design_measured_sets_free (d->more_measured, d->n_more_measured);
  g_free (d);
}

LwDesign *
lw_design_copy (const LwDesign *d)
{
  g_return_val_if_fail (d != NULL, NULL);
  LwDesign *c = g_new0 (LwDesign, 1);
  *c = *d;
  c->title = g_strdup (d->title);
  c->author = g_strdup (d->author);
  c->notes = g_strdup (d->notes);
  c->plant = g_strdup (d->plant);
  c->params = g_new0 (LwDesignParam, d->n_params);
  for (size_t i = 0; i < d->n_params; i++)
    {
      c->params[i] = d->params[i];
      c->params[i].name = g_strdup (d->params[i].name);
    }
  lw_design_copy_points (c, d);
  c->input_unit = g_strdup (d->input_unit);
  c->output_unit = g_strdup (d->output_unit);
  c->views = g_strdupv (d->views);
  c->measured_source = g_strdup (d->measured_source);
  c->measured = lw_measured_copy (d->measured);
  if (d->measured != NULL && c->measured == NULL)
    g_error ("out of memory copying the measured table of a design");
  c->measured_name = g_strdup (d->measured_name);
  c->more_measured = lw_design_measured_sets_copy (d->more_measured, d->n_more_measured);
  c->requirements = g_new0 (LwDesignRequirement, d->n_requirements);
  for (size_t i = 0; i < d->n_requirements; i++)
    {
      c->requirements[i] = d->requirements[i];
      c->requirements[i].name = g_strdup (d->requirements[i].name);
    }
  c->variants = g_new0 (LwDesignVariant, d->n_variants);
  for (size_t i = 0; i < d->n_variants; i++)
    {
      const LwDesignVariant *v = &d->variants[i];
      c->variants[i].name = g_strdup (v->name);
      c->variants[i].notes = g_strdup (v->notes);
      c->variants[i].has_period = v->has_period;
      c->variants[i].period_s = v->period_s;
      c->variants[i].has_actuator = v->has_actuator;
      c->variants[i].u_low = v->u_low;
      c->variants[i].u_high = v->u_high;
      c->variants[i].anti_windup = v->anti_windup;
      c->variants[i].reference_step = v->reference_step;
      c->variants[i].responses = v->responses;
      c->variants[i].compared = v->compared;
      c->variants[i].n_stages = v->n_stages;
      c->variants[i].stages = g_memdup2 (v->stages, v->n_stages * sizeof *v->stages);
    }
  return c;
}

LwDesignVariant *
lw_design_add_variant (LwDesign *d, const char *name)
{
  g_return_val_if_fail (d != NULL, NULL);
  d->variants = g_renew (LwDesignVariant, d->variants, d->n_variants + 1);
  LwDesignVariant *v = &d->variants[d->n_variants++];
  memset (v, 0, sizeof *v);
  v->name = g_strdup (name != NULL ? name : "");
  v->responses = LW_DESIGN_RESPONSES_ALL;
  return v;
}

LwStage *
lw_design_variant_add_stage (LwDesignVariant *v, const LwStage *s)
{
  g_return_val_if_fail (v != NULL && s != NULL, NULL);
  v->stages = g_renew (LwStage, v->stages, v->n_stages + 1);
  v->stages[v->n_stages] = *s;
  return &v->stages[v->n_stages++];
}

LwDesignRequirement *
lw_design_add_requirement (LwDesign *d, const char *name, const LwRequirement *r)
{
  g_return_val_if_fail (d != NULL && r != NULL, NULL);
  d->requirements = g_renew (LwDesignRequirement, d->requirements, d->n_requirements + 1);
  LwDesignRequirement *q = &d->requirements[d->n_requirements++];
  q->name = g_strdup (name);
  q->req = *r;
  return q;
}

double
lw_design_variant_period_s (const LwDesign *d, size_t index)
{
  g_return_val_if_fail (d != NULL && index < d->n_variants, NAN);
  const LwDesignVariant *v = &d->variants[index];
  return v->has_period ? v->period_s : d->period_s;
}

gssize
lw_design_find_variant (const LwDesign *d, const char *name)
{
  g_return_val_if_fail (d != NULL && name != NULL, -1);
  for (size_t i = 0; i < d->n_variants; i++)
    if (strcmp (d->variants[i].name, name) == 0)
      return (gssize) i;
  return -1;
}

static bool
str_equal (const char *a, const char *b)
{
  if (a == NULL || b == NULL)
    return a == b;
  return strcmp (a, b) == 0;
}

static bool
stage_equal (const LwStage *a, const LwStage *b)
{
  if (a->kind != b->kind || a->enabled != b->enabled || strcmp (a->label, b->label) != 0)
    return false;
  const LwStageKindInfo *k = lw_stage_kind_info (a->kind);
  if (k == NULL)
    return false;
  for (size_t i = 0; i < k->n_params; i++)
    if (lw_stage_param_get (a, i) != lw_stage_param_get (b, i))
      return false;
  return true;
}

/* Equal tables and attributes of the <measured> responses (numbers compared with ==). */
static bool
measured_equal (const LwDesign *a, const LwDesign *b)
{
  if (!str_equal (a->measured_name, b->measured_name)
      || !lw_design_measured_sets_equal (a->more_measured, a->n_more_measured,
                                         b->more_measured, b->n_more_measured))
    return false;
  if (a->measured == NULL || b->measured == NULL)
    return a->measured == b->measured;
  return a->measured_kind == b->measured_kind && a->measured_analysis == b->measured_analysis
         && str_equal (a->measured_source, b->measured_source)
         && a->measured_unstable_poles == b->measured_unstable_poles
         && lw_design_table_equal (a->measured, b->measured);
}

LwStatus
lw_design_plant_parse (const LwDesign *d, const double *values, LwModel **out, LwError *err)
{
  if (d->n_params > LW_DESIGN_MAX_PARAMS)
    return lw_error_set (err, LW_ERR_INVALID, -1, "%zu parameters, more than the %d a design "
                         "takes", d->n_params, LW_DESIGN_MAX_PARAMS);
  LwExprParam pr[LW_DESIGN_MAX_PARAMS];
  size_t n = 0;
  for (size_t i = 0; i < d->n_params; i++)
    if (strcmp (d->params[i].name, LW_DESIGN_DEAD_TIME_PARAM) != 0)   /* not in the text */
      {
        pr[n].name = d->params[i].name;
        pr[n++].value = values != NULL ? values[i] : d->params[i].nominal;
      }
  return lw_expr_parse_params_proper (d->plant, LW_DOMAIN_S, 0.0, pr, n, out, err);
}

double
lw_design_dead_time_at (const LwDesign *d, const double *values)
{
  for (size_t i = 0; i < d->n_params && values != NULL; i++)
    if (strcmp (d->params[i].name, LW_DESIGN_DEAD_TIME_PARAM) == 0)
      return values[i];
  return d->dead_time_s;
}

const char *
lw_design_param_problem (const LwDesignParam *p)
{
  if (!isfinite (p->nominal))
    return "its nominal value is not finite";
  if (p->ranged && !(isfinite (p->low) && isfinite (p->high)))
    return "its range is not finite";
  if (p->ranged && p->low == p->high)
    return "its range is empty (low equals high; give no range for a fixed value)";
  if (p->ranged && !(p->low < p->high))
    return "its range runs backwards (low above high)";
  if (p->ranged && !(p->low <= p->nominal && p->nominal <= p->high))
    return "its nominal value lies outside its range";
  if (p->ranged && p->spread == LW_SPREAD_LOG && !(p->low > 0.0))
    return "a log spread needs a range above zero";
  if (p->spread != LW_SPREAD_UNIFORM && p->spread != LW_SPREAD_LOG)
    return "its spread is unknown";
  return NULL;
}

const char *
lw_design_params_problem (const LwDesign *d, char *buf, size_t size)
{
  if (d->n_params > LW_DESIGN_MAX_PARAMS)
    {
      g_snprintf (buf, size, "%zu parameters, more than the %d a design takes", d->n_params,
                  LW_DESIGN_MAX_PARAMS);
      return buf;
    }
  size_t n_ranged = 0;
  for (size_t i = 0; i < d->n_params; i++)
    {
      const LwDesignParam *p = &d->params[i];
      const char *bad = lw_expr_param_name_problem (p->name);
      if (bad != NULL)
        {
          g_snprintf (buf, size, "parameter %zu ('%.32s'): %s", i + 1,
                      p->name != NULL ? p->name : "", bad);
          return buf;
        }
      for (size_t j = 0; j < i; j++)
        if (strcmp (d->params[j].name, p->name) == 0)
          {
            g_snprintf (buf, size, "parameter '%s' is given twice", p->name);
            return buf;
          }
      bad = lw_design_param_problem (p);
      if (bad == NULL && strcmp (p->name, LW_DESIGN_DEAD_TIME_PARAM) == 0)
        {
          /* the plant's dead time as a parameter: its nominal is <plant dead_time_s> */
          if (p->nominal != d->dead_time_s)
            {
              g_snprintf (buf, size, "parameter '%s': its nominal value %g s is not the "
                          "plant's dead time of %g s (dead_time_s of <plant>)", p->name,
                          p->nominal, d->dead_time_s);
              return buf;
            }
          if (p->ranged && !(p->low >= 0.0))
            bad = "a dead time cannot be negative";
          else if (p->ranged && !lw_dead_time_ok (p->high, d->period_s))
            bad = "its high end is more than 1e6 sample periods";
        }
      if (bad != NULL)
        {
          g_snprintf (buf, size, "parameter '%s': %s", p->name, bad);
          return buf;
        }
      n_ranged += p->ranged;
    }
  if (!lw_design_has_model (d))
    {
      if (d->n_params > 0)
        {
          g_snprintf (buf, size, "parameters are given but the plant has no model to use them");
          return buf;
        }
      return NULL;
    }
  /* the plant at the nominals, then at every corner of the range box */
  double values[LW_DESIGN_MAX_PARAMS];
  size_t ranged[LW_DESIGN_MAX_PARAMS], k = 0;
  for (size_t i = 0; i < d->n_params; i++)
    {
      values[i] = d->params[i].nominal;
      if (d->params[i].ranged)
        ranged[k++] = i;
    }
  size_t corners = n_ranged <= LW_DESIGN_MAX_CORNER_PARAMS ? (size_t) 1 << n_ranged : 0;
  for (size_t c = 0; c <= corners; c++)
    {
      if (c > 0)
        for (size_t b = 0; b < n_ranged; b++)
          {
            const LwDesignParam *p = &d->params[ranged[b]];
            values[ranged[b]] = ((c - 1) >> b) & 1 ? p->high : p->low;
          }
      LwModel *m = NULL;
      LwError err;
      lw_error_clear (&err);
      LwStatus st = lw_design_plant_parse (d, values, &m, &err);
      lw_model_free (m);
      if (st == LW_OK)
        continue;
      if (c == 0)
        {
          g_snprintf (buf, size, "%s", err.message);
          return buf;
        }
      GString *at = g_string_new (NULL);
      for (size_t b = 0; b < n_ranged; b++)
        g_string_append_printf (at, "%s%s = %.6g", b > 0 ? ", " : "",
                                d->params[ranged[b]].name, values[ranged[b]]);
      g_snprintf (buf, size, "at the corner of the parameter ranges %s: %s", at->str,
                  err.message);
      g_string_free (at, TRUE);
      return buf;
    }
  return NULL;
}

bool
lw_design_has_model (const LwDesign *d)
{
  if (d->plant == NULL)
    return false;
  for (const char *c = d->plant; *c != '\0'; c++)
    if (!g_ascii_isspace (*c))
      return true;
  return false;
}

bool
lw_design_analysis_on_data (const LwDesign *d)
{
  return d->measured != NULL
         && (d->measured_analysis == LW_DESIGN_ANALYSIS_DATA || !lw_design_has_model (d));
}

bool
lw_design_equal (const LwDesign *a, const LwDesign *b)
{
  if (a == NULL || b == NULL)
    return a == b;
  if (!measured_equal (a, b) || a->n_params != b->n_params || !lw_design_points_equal (a, b)
      || a->has_family_members != b->has_family_members
      || a->family_members != b->family_members || a->has_family_seed != b->has_family_seed
      || a->family_seed != b->family_seed)
    return false;
  for (size_t i = 0; i < a->n_params; i++)
    {
      const LwDesignParam *x = &a->params[i], *y = &b->params[i];
      if (!str_equal (x->name, y->name) || x->nominal != y->nominal || x->ranged != y->ranged
          || x->low != y->low || x->high != y->high || x->spread != y->spread)
        return false;
    }
  if (!str_equal (a->title, b->title) || !str_equal (a->author, b->author)
      || !str_equal (a->notes, b->notes) || !str_equal (a->plant, b->plant)
      || !str_equal (a->input_unit, b->input_unit) || !str_equal (a->output_unit, b->output_unit)
      || a->dead_time_s != b->dead_time_s || a->period_s != b->period_s || a->hold != b->hold
      || a->compute_delay != b->compute_delay || a->n_requirements != b->n_requirements
      || a->n_variants != b->n_variants || a->active != b->active
      || a->has_range != b->has_range || (a->views == NULL) != (b->views == NULL)
      || (a->views != NULL && !g_strv_equal ((const char *const *) a->views,
                                             (const char *const *) b->views)))
    return false;
  if (a->has_range
      && (a->range_from_rad_s != b->range_from_rad_s || a->range_to_rad_s != b->range_to_rad_s))
    return false;
  for (size_t i = 0; i < a->n_requirements; i++)
    {
      const LwDesignRequirement *x = &a->requirements[i], *y = &b->requirements[i];
      if (!str_equal (x->name, y->name) || x->req.kind != y->req.kind
          || x->req.limit != y->req.limit
          || (x->req.kind == LW_REQ_CROSSOVER_RANGE && x->req.limit_hi != y->req.limit_hi))
        return false;
    }
  for (size_t i = 0; i < a->n_variants; i++)
    {
      const LwDesignVariant *x = &a->variants[i], *y = &b->variants[i];
      if (!str_equal (x->name, y->name) || !str_equal (x->notes, y->notes)
          || x->has_period != y->has_period || (x->has_period && x->period_s != y->period_s)
          || x->has_actuator != y->has_actuator
          || (x->has_actuator && (x->u_low != y->u_low || x->u_high != y->u_high
                                  || x->anti_windup != y->anti_windup
                                  || x->reference_step != y->reference_step))
          || x->responses != y->responses || x->compared != y->compared
          || x->n_stages != y->n_stages)
        return false;
      for (size_t j = 0; j < x->n_stages; j++)
        if (!stage_equal (&x->stages[j], &y->stages[j]))
          return false;
    }
  return true;
}
