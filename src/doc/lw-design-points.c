/* lw-design-points.c — the operating points of a plant family: named sets of parameter values
 * (<point name="…"><value parameter="…" value="…"/>…</point> after the <parameter> elements
 * of <parameters>), their rules, and their reading from a document (lw-design.h,
 * docs/file-format.md, docs/families.md).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-design-load-private.h"

const char *
lw_design_point_name_problem (const char *name)
{
  size_t n = name != NULL ? strlen (name) : 0;
  if (n == 0)
    return "it is empty";
  if (n > LW_DESIGN_POINT_NAME_MAX)
    return "it is longer than 64 bytes";
  const char *problem = lw_design_text_problem (name);
  if (problem != NULL)
    return problem;
  if (strpbrk (name, "\t\n\r") != NULL)
    return "it holds a tab or a line break";
  if (strchr (name, ':') != NULL)
    return "it holds a ':' (the command line's --point NAME:P=V ends the name there)";
  if (name[0] == ' ' || name[n - 1] == ' ')
    return "it starts or ends with a space";
  return NULL;
}

void
lw_design_point_values (const LwDesign *d, size_t point, double *values)
{
  for (size_t i = 0; i < d->n_params; i++)
    values[i] = d->params[i].nominal;
  if (point >= d->n_points)
    return;
  const LwDesignPoint *p = &d->points[point];
  for (size_t v = 0; v < p->n_values; v++)
    for (size_t i = 0; i < d->n_params; i++)
      if (strcmp (d->params[i].name, p->values[v].parameter) == 0)
        values[i] = p->values[v].value;
}

gssize
lw_design_find_point (const LwDesign *d, const char *name)
{
  for (size_t i = 0; i < d->n_points; i++)
    if (strcmp (d->points[i].name, name) == 0)
      return (gssize) i;
  return -1;
}

void
lw_design_clear_points (LwDesign *d)
{
  for (size_t i = 0; i < d->n_points; i++)
    {
      LwDesignPoint *p = &d->points[i];
      for (size_t v = 0; v < p->n_values; v++)
        g_free (p->values[v].parameter);
      g_free (p->values);
      g_free (p->name);
    }
  g_clear_pointer (&d->points, g_free);
  d->n_points = 0;
}

gssize
lw_design_param_index (const LwDesign *d, const char *name)
{
  for (size_t i = 0; i < d->n_params; i++)
    if (strcmp (d->params[i].name, name) == 0)
      return (gssize) i;
  return -1;
}

/* "K, wn": the parameters' names, for a message */
static char *
param_names (const LwDesign *d)
{
  GString *s = g_string_new (NULL);
  for (size_t i = 0; i < d->n_params; i++)
    g_string_append_printf (s, "%s%s", i > 0 ? ", " : "", d->params[i].name);
  if (d->n_params == 0)
    g_string_append (s, "none");
  return g_string_free (s, FALSE);
}

/* The problem of point i's own values (names, once each, finite, the dead time's rules),
 * else NULL; buf holds the sentence. */
static const char *
point_values_problem (const LwDesign *d, size_t i, char *buf, size_t size)
{
  const LwDesignPoint *p = &d->points[i];
  for (size_t v = 0; v < p->n_values; v++)
    {
      const LwDesignPointValue *pv = &p->values[v];
      if (pv->parameter == NULL || lw_design_param_index (d, pv->parameter) < 0)
        {
          g_autofree char *names = param_names (d);
          g_snprintf (buf, size, "point '%s': unknown parameter '%.32s' (the parameters are %s)",
                      p->name, pv->parameter != NULL ? pv->parameter : "", names);
          return buf;
        }
      for (size_t u = 0; u < v; u++)
        if (strcmp (p->values[u].parameter, pv->parameter) == 0)
          {
            g_snprintf (buf, size, "point '%s': parameter '%s' is given twice", p->name,
                        pv->parameter);
            return buf;
          }
      if (!isfinite (pv->value))
        {
          g_snprintf (buf, size, "point '%s': the value of '%s' is not finite", p->name,
                      pv->parameter);
          return buf;
        }
      if (strcmp (pv->parameter, LW_DESIGN_DEAD_TIME_PARAM) == 0
          && (!(pv->value >= 0.0) || !lw_dead_time_ok (pv->value, d->period_s)))
        {
          g_snprintf (buf, size, "point '%s': a dead time of %g s %s", p->name, pv->value,
                      pv->value < 0.0 ? "cannot be: it is negative"
                                      : "is more than 1e6 sample periods");
          return buf;
        }
    }
  return NULL;
}

const char *
lw_design_points_problem (const LwDesign *d, char *buf, size_t size, size_t *which)
{
  if (which != NULL)
    *which = G_MAXSIZE;
  if (d->n_points > LW_DESIGN_MAX_POINTS)
    {
      g_snprintf (buf, size, "%zu operating points, more than the %d a design takes",
                  d->n_points, LW_DESIGN_MAX_POINTS);
      return buf;
    }
  if (d->n_points > 0 && !lw_design_has_model (d))
    {
      g_snprintf (buf, size, "operating points are given but the plant has no model to use "
                  "them");
      return buf;
    }
  for (size_t i = 0; i < d->n_params && d->n_points > 0; i++)
    if (strcmp (d->params[i].name, "point") == 0)
      {
        g_snprintf (buf, size, "a parameter called 'point' and operating points cannot go "
                    "together (the outputs name a member's point with that word); rename the "
                    "parameter");
        return buf;
      }
  for (size_t i = 0; i < d->n_points; i++)
    {
      const LwDesignPoint *p = &d->points[i];
      if (which != NULL)
        *which = i;
      const char *bad = lw_design_point_name_problem (p->name);
      if (bad != NULL)
        {
          g_snprintf (buf, size, "point %zu ('%.64s'): %s", i + 1,
                      p->name != NULL ? p->name : "", bad);
          return buf;
        }
      for (size_t j = 0; j < i; j++)
        if (strcmp (d->points[j].name, p->name) == 0)
          {
            g_snprintf (buf, size, "point '%s' is given twice", p->name);
            return buf;
          }
      if (point_values_problem (d, i, buf, size) != NULL)
        return buf;
      /* the plant there: proper and not zero (a point may lie outside the ranges) */
      double values[LW_DESIGN_MAX_PARAMS];
      if (d->n_params > LW_DESIGN_MAX_PARAMS)
        return NULL;   /* lw_design_params_problem says so */
      lw_design_point_values (d, i, values);
      LwModel *m = NULL;
      LwError err;
      lw_error_clear (&err);
      LwStatus st = lw_design_plant_parse (d, values, &m, &err);
      lw_model_free (m);
      if (st != LW_OK)
        {
          g_snprintf (buf, size, "at operating point '%s': %s", p->name, err.message);
          return buf;
        }
    }
  if (which != NULL)
    *which = G_MAXSIZE;
  return NULL;
}

/* ---- reading ---------------------------------------------------------------------------- */

/* One <point>: its name (valid, not twice) and its <value parameter value/> children (a
 * parameter of the design, once, finite); appended to points. */
static bool
read_point (Reader *r, const xmlNode *e, const LwDesign *d, GArray *points)
{
  static const char *const point_attrs[] = { "name", NULL };
  static const char *const value_attrs[] = { "parameter", "value", NULL };
  LwDesignPoint p = { 0 };
  if (!lw_load_check_attributes (r, e, "", point_attrs)
      || !lw_load_text_attr (r, e, "", "name", true, &p.name))
    {
      g_free (p.name);   /* a name that is not text is read before it is refused */
      return false;
    }
  const char *bad = lw_design_point_name_problem (p.name);
  bool ok = bad == NULL ? true
                        : lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute 'name' '%s': %s",
                                        p.name, bad);
  for (guint j = 0; ok && j < points->len; j++)
    if (strcmp (g_array_index (points, LwDesignPoint, j).name, p.name) == 0)
      ok = lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": point '%s' is given twice (a point's "
                         "name is its own)", p.name);
  GArray *vs = g_array_new (FALSE, TRUE, sizeof (LwDesignPointValue));
  g_autofree char *where = ok ? g_strdup_printf (" (point '%s')", p.name) : NULL;
  for (const xmlNode *c = ok ? lw_load_next_element (r, e, e->children) : NULL; ok && c != NULL;
       c = lw_load_next_element (r, e, c->next))
    {
      if (!lw_load_is_element (c, "value"))
        {
          ok = lw_load_fail (r, c, LW_DESIGN_ERROR_SCHEMA, ": unexpected here; <point> holds "
                             "<value> elements only");
          break;
        }
      if (vs->len >= LW_DESIGN_MAX_PARAMS)
        {
          ok = lw_load_fail (r, c, LW_DESIGN_ERROR_LIMIT, "%s: more than %d values", where,
                             LW_DESIGN_MAX_PARAMS);
          break;
        }
      LwDesignPointValue v = { 0 };
      ok = lw_load_check_attributes (r, c, where, value_attrs)
           && lw_load_no_children (r, c, where)
           && lw_load_text_attr (r, c, where, "parameter", true, &v.parameter);
      if (ok && lw_design_param_index (d, v.parameter) < 0)
        {
          g_autofree char *names = param_names (d);
          ok = lw_load_fail (r, c, LW_DESIGN_ERROR_VALUE, "%s: unknown parameter '%s' (the "
                             "parameters are %s)", where, v.parameter, names);
        }
      for (guint j = 0; ok && j < vs->len; j++)
        if (strcmp (g_array_index (vs, LwDesignPointValue, j).parameter, v.parameter) == 0)
          ok = lw_load_fail (r, c, LW_DESIGN_ERROR_VALUE, "%s: parameter '%s' is given twice",
                             where, v.parameter);
      ok = ok && lw_load_number_attr (r, c, where, "value", LW_NUM_FINITE, true, &v.value, NULL);
      if (!ok)
        {
          g_free (v.parameter);
          break;
        }
      g_array_append_val (vs, v);
    }
  if (r->error != NULL)
    ok = false;
  p.n_values = vs->len;
  p.values = (LwDesignPointValue *) (void *) g_array_free (vs, FALSE);
  g_array_append_val (points, p);   /* kept even when bad: freed with the design */
  return ok;
}

bool
lw_load_read_points (Reader *r, const xmlNode *parent, const xmlNode *first, LwDesign *d)
{
  GArray *points = g_array_new (FALSE, TRUE, sizeof (LwDesignPoint));
  bool ok = true;
  for (const xmlNode *c = first; ok && c != NULL; c = lw_load_next_element (r, parent, c->next))
    {
      if (!lw_load_is_element (c, "point"))
        {
          ok = lw_load_fail (r, c, LW_DESIGN_ERROR_SCHEMA, ": unexpected here; <parameters> "
                             "holds <parameter> elements, then <point> elements");
          break;
        }
      if (points->len >= LW_DESIGN_MAX_POINTS)
        {
          ok = lw_load_fail (r, c, LW_DESIGN_ERROR_LIMIT, ": more than %d operating points",
                             LW_DESIGN_MAX_POINTS);
          break;
        }
      ok = read_point (r, c, d, points);
    }
  if (r->error != NULL)
    ok = false;
  d->n_points = points->len;
  d->points = (LwDesignPoint *) (void *) g_array_free (points, FALSE);
  return ok;
}

bool
lw_load_check_points (Reader *r, const xmlNode *parameters_el, const LwDesign *d)
{
  if (d->n_points == 0)
    return true;
  char why[512];
  size_t which = G_MAXSIZE;
  if (lw_design_points_problem (d, why, sizeof why, &which) == NULL)
    return true;
  /* the which-th <point> of <parameters> */
  const xmlNode *at = parameters_el;
  size_t k = 0;
  for (const xmlNode *c = parameters_el->children; c != NULL && which != G_MAXSIZE; c = c->next)
    if (lw_load_is_element (c, "point") && k++ == which)
      {
        at = c;
        break;
      }
  return lw_load_fail (r, at, LW_DESIGN_ERROR_VALUE, ": %s", why);
}

/* ---- copies and comparisons (lw-design.c) ----------------------------------------------- */

void
lw_design_copy_points (LwDesign *to, const LwDesign *from)
{
  to->n_points = from->n_points;
  to->points = g_new0 (LwDesignPoint, from->n_points + 1);
  for (size_t i = 0; i < from->n_points; i++)
    {
      const LwDesignPoint *p = &from->points[i];
      LwDesignPoint *q = &to->points[i];
      q->name = g_strdup (p->name);
      q->n_values = p->n_values;
      q->values = g_new0 (LwDesignPointValue, p->n_values + 1);
      for (size_t v = 0; v < p->n_values; v++)
        {
          q->values[v].parameter = g_strdup (p->values[v].parameter);
          q->values[v].value = p->values[v].value;
        }
    }
}

bool
lw_design_points_equal (const LwDesign *a, const LwDesign *b)
{
  if (a->n_points != b->n_points)
    return false;
  for (size_t i = 0; i < a->n_points; i++)
    {
      const LwDesignPoint *x = &a->points[i], *y = &b->points[i];
      if (g_strcmp0 (x->name, y->name) != 0 || x->n_values != y->n_values)
        return false;
      for (size_t v = 0; v < x->n_values; v++)
        if (g_strcmp0 (x->values[v].parameter, y->values[v].parameter) != 0
            || x->values[v].value != y->values[v].value)
          return false;
    }
  return true;
}
