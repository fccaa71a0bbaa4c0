/* lw-design.c — the design model, its checks, its canonical text and the atomic save.
 * See lw-design.h; the file format is described in docs/file-format.md.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

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

static const LwDocReqKind *
req_kind (LwReqKind kind)
{
  for (size_t i = 0; i < lw_doc_n_req_kinds; i++)
    if (lw_doc_req_kinds[i].kind == kind)
      return &lw_doc_req_kinds[i];
  return NULL;
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
  for (size_t i = 0; i < d->n_requirements; i++)
    g_free (d->requirements[i].name);
  g_free (d->requirements);
  for (size_t i = 0; i < d->n_variants; i++)
    variant_clear (&d->variants[i]);
  g_free (d->variants);
  g_strfreev (d->views);
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
  c->views = g_strdupv (d->views);
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

bool
lw_design_equal (const LwDesign *a, const LwDesign *b)
{
  if (a == NULL || b == NULL)
    return a == b;
  if (!str_equal (a->title, b->title) || !str_equal (a->author, b->author)
      || !str_equal (a->notes, b->notes) || !str_equal (a->plant, b->plant)
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
          || x->n_stages != y->n_stages)
        return false;
      for (size_t j = 0; j < x->n_stages; j++)
        if (!stage_equal (&x->stages[j], &y->stages[j]))
          return false;
    }
  return true;
}

/* ---- checks before saving ----------------------------------------------------------------- */

static gboolean
check_text (const char *what, const char *s, GError **error)
{
  if (s == NULL)
    return TRUE;
  const char *problem = lw_design_text_problem (s);
  if (problem != NULL)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "%s cannot be saved: %s",
                   what, problem);
      return FALSE;
    }
  return TRUE;
}

gboolean
lw_design_validate (const LwDesign *d, GError **error)
{
  g_return_val_if_fail (d != NULL, FALSE);
  if (d->title == NULL)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "the design has no title");
      return FALSE;
    }
  if (!check_text ("the title", d->title, error) || !check_text ("the author", d->author, error)
      || !check_text ("the notes", d->notes, error) || !check_text ("the plant", d->plant, error))
    return FALSE;
  if (d->plant == NULL)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "the design has no plant");
      return FALSE;
    }
  LwModel *m = NULL;
  LwError err;
  lw_error_clear (&err);
  if (lw_expr_parse_proper (d->plant, LW_DOMAIN_S, 0.0, &m, &err) != LW_OK)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the plant '%s' is not a proper rational expression in s: %s (byte %d)",
                   d->plant, err.message, err.position);
      return FALSE;
    }
  lw_model_free (m);
  if (!lw_doc_rule_ok (LW_NUM_PERIOD, d->period_s))
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the sample period must be %s, got %g", lw_doc_rule_phrase (LW_NUM_PERIOD),
                   d->period_s);
      return FALSE;
    }
  if (!lw_doc_rule_ok (LW_NUM_NONNEGATIVE, d->dead_time_s))
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the dead time must be a finite number >= 0 s, got %g", d->dead_time_s);
      return FALSE;
    }
  if (!lw_dead_time_ok (d->dead_time_s, d->period_s))
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the dead time %g s is %.6g sample periods of %g s, more than the limit of "
                   "%.0f", d->dead_time_s, d->dead_time_s / d->period_s, d->period_s,
                   LW_DEAD_TIME_MAX_SAMPLES);
      return FALSE;
    }
  if (d->hold != LW_HOLD_ZERO_ORDER)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "unknown hold %d",
                   (int) d->hold);
      return FALSE;
    }
  if (d->compute_delay < 0 || d->compute_delay > LW_DESIGN_MAX_COMPUTE_DELAY)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the computation delay must be 0 to %d samples, got %d",
                   LW_DESIGN_MAX_COMPUTE_DELAY, d->compute_delay);
      return FALSE;
    }
  if (d->n_requirements > LW_DESIGN_MAX_REQUIREMENTS)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_LIMIT,
                   "%zu requirements; at most %d", d->n_requirements,
                   LW_DESIGN_MAX_REQUIREMENTS);
      return FALSE;
    }
  for (size_t i = 0; i < d->n_requirements; i++)
    {
      const LwDesignRequirement *r = &d->requirements[i];
      if (req_kind (r->req.kind) == NULL)
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                       "requirement %zu has an unknown kind %d", i + 1, (int) r->req.kind);
          return FALSE;
        }
      if (!check_text ("a requirement name", r->name, error))
        return FALSE;
      if (lw_requirement_check (&r->req, &err) != LW_OK)
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE, "requirement '%s': %s",
                       lw_design_requirement_title (r), err.message);
          return FALSE;
        }
    }
  if (d->n_variants == 0 || d->n_variants > LW_DESIGN_MAX_VARIANTS)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "a design needs 1 to %d variants, it has %zu", LW_DESIGN_MAX_VARIANTS,
                   d->n_variants);
      return FALSE;
    }
  if (d->active >= d->n_variants)
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the active variant %zu does not exist (%zu variants)", d->active,
                   d->n_variants);
      return FALSE;
    }
  for (size_t i = 0; i < d->n_variants; i++)
    {
      const LwDesignVariant *v = &d->variants[i];
      if (v->name == NULL || v->name[0] == '\0')
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                       "variant %zu has no name", i + 1);
          return FALSE;
        }
      if (!check_text ("a variant name", v->name, error)
          || !check_text ("the variant notes", v->notes, error))
        return FALSE;
      for (size_t j = 0; j < i; j++)
        if (strcmp (d->variants[j].name, v->name) == 0)
          {
            g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                         "two variants are named '%s'", v->name);
            return FALSE;
          }
      if (v->has_period && !lw_doc_rule_ok (LW_NUM_PERIOD, v->period_s))
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                       "variant '%s': the sample period must be %s, got %g", v->name,
                       lw_doc_rule_phrase (LW_NUM_PERIOD), v->period_s);
          return FALSE;
        }
      if (v->has_period && !lw_dead_time_ok (d->dead_time_s, v->period_s))
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                       "variant '%s': the dead time %g s is %.6g sample periods of %g s, more "
                       "than the limit of %.0f", v->name, d->dead_time_s,
                       d->dead_time_s / v->period_s, v->period_s, LW_DEAD_TIME_MAX_SAMPLES);
          return FALSE;
        }
      if (v->n_stages > LW_DESIGN_MAX_STAGES)
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_LIMIT,
                       "variant '%s' has %zu stages; at most %d", v->name, v->n_stages,
                       LW_DESIGN_MAX_STAGES);
          return FALSE;
        }
      for (size_t j = 0; j < v->n_stages; j++)
        {
          const LwStage *s = &v->stages[j];
          if (memchr (s->label, '\0', sizeof s->label) == NULL)
            {
              g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                           "stage %zu of variant '%s': the label is not terminated", j + 1,
                           v->name);
              return FALSE;
            }
          if (!check_text ("a stage label", s->label, error))
            return FALSE;
          if (lw_stage_kind_info (s->kind) == NULL || lw_stage_check (s, &err) != LW_OK)
            {
              g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                           "stage %zu of variant '%s': %s", j + 1, v->name,
                           lw_stage_kind_info (s->kind) == NULL ? "unknown kind"
                                                                : err.message);
              return FALSE;
            }
        }
    }
  if (d->has_range
      && !(lw_doc_rule_ok (LW_NUM_POSITIVE, d->range_from_rad_s)
           && lw_doc_rule_ok (LW_NUM_POSITIVE, d->range_to_rad_s)
           && d->range_from_rad_s < d->range_to_rad_s))
    {
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                   "the view range needs finite 0 < from < to rad/s, got %g to %g",
                   d->range_from_rad_s, d->range_to_rad_s);
      return FALSE;
    }
  for (size_t i = 0; d->views != NULL && d->views[i] != NULL; i++)
    {
      const char *problem = lw_design_view_name_problem (d->views[i]);
      if (problem != NULL)
        {
          g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                       "the view name '%s' cannot be saved: %s", d->views[i], problem);
          return FALSE;
        }
      for (size_t j = 0; j < i; j++)
        if (strcmp (d->views[j], d->views[i]) == 0)
          {
            g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_VALUE,
                         "the view '%s' is listed twice", d->views[i]);
            return FALSE;
          }
    }
  return TRUE;
}

/* ---- numbers ------------------------------------------------------------------------------ */

char *
lw_design_format_number (double v, char *buf)
{
  g_return_val_if_fail (isfinite (v), NULL);
  /* The shortest of 15, 16 and 17 significant digits that reads back exactly; 17 always
   * does for a binary64 (IEEE 754-2008, 5.12.2). */
  static const char *const formats[] = { "%.15g", "%.16g", "%.17g" };
  for (size_t i = 0; i < G_N_ELEMENTS (formats); i++)
    {
      g_ascii_formatd (buf, G_ASCII_DTOSTR_BUF_SIZE, formats[i], v);
      if (g_ascii_strtod (buf, NULL) == v)
        break;
    }
  return buf;
}

/* ---- canonical text ----------------------------------------------------------------------- */

static void
append_escaped (GString *out, const char *s, gboolean attribute)
{
  for (const char *p = s; *p != '\0'; p++)
    {
      switch (*p)
        {
        case '&': g_string_append (out, "&amp;"); break;
        case '<': g_string_append (out, "&lt;"); break;
        case '>': g_string_append (out, "&gt;"); break;
        case '"':
          if (attribute)
            g_string_append (out, "&quot;");
          else
            g_string_append_c (out, '"');
          break;
        case '\r': g_string_append (out, "&#13;"); break;
        case '\n':
          if (attribute)
            g_string_append (out, "&#10;");
          else
            g_string_append_c (out, '\n');
          break;
        case '\t':
          if (attribute)
            g_string_append (out, "&#9;");
          else
            g_string_append_c (out, '\t');
          break;
        default: g_string_append_c (out, *p); break;
        }
    }
}

static void
indent (GString *out, int level)
{
  for (int i = 0; i < level; i++)
    g_string_append (out, "  ");
}

static void
attr_text (GString *out, const char *name, const char *value)
{
  g_string_append_printf (out, " %s=\"", name);
  append_escaped (out, value, TRUE);
  g_string_append_c (out, '"');
}

static void
attr_number (GString *out, const char *name, double v)
{
  char buf[G_ASCII_DTOSTR_BUF_SIZE];
  g_string_append_printf (out, " %s=\"%s\"", name, lw_design_format_number (v, buf));
}

static void
text_element (GString *out, int level, const char *name, const char *text)
{
  indent (out, level);
  g_string_append_printf (out, "<%s>", name);
  append_escaped (out, text, FALSE);
  g_string_append_printf (out, "</%s>\n", name);
}

char *
lw_design_to_text (const LwDesign *d, size_t *len_out, GError **error)
{
  g_return_val_if_fail (d != NULL, NULL);
  if (!lw_design_validate (d, error))
    return NULL;
  GString *o = g_string_new ("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n");
  g_string_append_printf (o, "<design xmlns=\"%s\" version=\"%d\">\n", LW_DESIGN_NAMESPACE,
                          LW_DESIGN_VERSION);
  text_element (o, 1, "title", d->title);
  if (d->author != NULL)
    text_element (o, 1, "author", d->author);
  if (d->notes != NULL)
    text_element (o, 1, "notes", d->notes);

  indent (o, 1);
  g_string_append (o, "<plant");
  attr_number (o, "dead_time_s", d->dead_time_s);
  g_string_append_c (o, '>');
  append_escaped (o, d->plant, FALSE);
  g_string_append (o, "</plant>\n");

  indent (o, 1);
  g_string_append (o, "<sampling");
  attr_number (o, "period_s", d->period_s);
  attr_text (o, "hold", "zero-order");
  g_string_append_printf (o, " compute_delay_samples=\"%d\"/>\n", d->compute_delay);

  if (d->n_requirements > 0)
    {
      indent (o, 1);
      g_string_append (o, "<requirements>\n");
      for (size_t i = 0; i < d->n_requirements; i++)
        {
          const LwDesignRequirement *r = &d->requirements[i];
          const LwDocReqKind *k = req_kind (r->req.kind);
          g_assert (k != NULL);   /* validated */
          indent (o, 2);
          g_string_append_printf (o, "<%s", k->element);
          if (r->name != NULL)
            attr_text (o, "name", r->name);
          attr_number (o, k->limit_attr, r->req.limit);
          if (k->limit_hi_attr != NULL)
            attr_number (o, k->limit_hi_attr, r->req.limit_hi);
          g_string_append (o, "/>\n");
        }
      indent (o, 1);
      g_string_append (o, "</requirements>\n");
    }

  indent (o, 1);
  g_string_append (o, "<variants");
  attr_text (o, "active", d->variants[d->active].name);
  g_string_append (o, ">\n");
  for (size_t i = 0; i < d->n_variants; i++)
    {
      const LwDesignVariant *v = &d->variants[i];
      indent (o, 2);
      g_string_append (o, "<variant");
      attr_text (o, "name", v->name);
      if (v->has_period)
        attr_number (o, "period_s", v->period_s);
      if (v->notes == NULL && v->n_stages == 0)
        {
          g_string_append (o, "/>\n");
          continue;
        }
      g_string_append (o, ">\n");
      if (v->notes != NULL)
        text_element (o, 3, "notes", v->notes);
      for (size_t j = 0; j < v->n_stages; j++)
        {
          const LwStage *s = &v->stages[j];
          const LwStageKindInfo *k = lw_stage_kind_info (s->kind);
          g_assert (k != NULL);   /* validated */
          indent (o, 3);
          g_string_append_printf (o, "<%s", k->name);
          if (s->label[0] != '\0')
            attr_text (o, "label", s->label);
          if (!s->enabled)
            attr_text (o, "enabled", "false");
          for (size_t a = 0; a < k->n_params; a++)
            {
              double value = lw_stage_param_get (s, a);
              if (k->params[a].rule == LW_PARAM_COUNT)
                g_string_append_printf (o, " %s=\"%d\"", k->params[a].name, (int) value);
              else
                attr_number (o, k->params[a].name, value);
            }
          g_string_append (o, "/>\n");
        }
      indent (o, 2);
      g_string_append (o, "</variant>\n");
    }
  indent (o, 1);
  g_string_append (o, "</variants>\n");

  bool has_views = d->views != NULL && d->views[0] != NULL;
  if (d->has_range || has_views)
    {
      indent (o, 1);
      g_string_append (o, "<view");
      if (d->has_range)
        {
          attr_number (o, "from_rad_s", d->range_from_rad_s);
          attr_number (o, "to_rad_s", d->range_to_rad_s);
        }
      if (has_views)
        {
          g_autofree char *list = g_strjoinv (" ", d->views);
          attr_text (o, "shows", list);
        }
      g_string_append (o, "/>\n");
    }
  g_string_append (o, "</design>\n");
  if (len_out != NULL)
    *len_out = o->len;
  return g_string_free (o, FALSE);
}

/* ---- atomic save -------------------------------------------------------------------------- */

/* Whole or not at all, a symbolic link followed, our stale temporaries cleaned
 * (lw-file-write.h). */
gboolean
lw_design_save_file (const LwDesign *d, const char *path, GError **error)
{
  g_return_val_if_fail (d != NULL && path != NULL, FALSE);
  size_t len = 0;
  g_autofree char *text = lw_design_to_text (d, &len, error);
  if (text == NULL)
    {
      g_prefix_error (error, "%s: not saved: ", path);
      return FALSE;
    }
  GError *e = NULL;
  if (!lw_file_replace (path, text, len, &e))
    {
      g_set_error_literal (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_IO, e->message);
      g_error_free (e);
      return FALSE;
    }
  return TRUE;
}
