/* lw-design-model-points.c — the operating points of the plant family in the window's model
 * (docs/families.md): adding, renaming and removing a point, giving it values or taking them
 * away, each one "changed" (so one undo step), and what would be wrong with the points before
 * a change is made (lw_design_points_problem's rules).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <string.h>

#include "lw-design-model-private.h"

guint
lw_design_model_get_n_points (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), 0);
  return (guint) self->doc->n_points;
}

const LwDesignPoint *
lw_design_model_get_point (LwDesignModel *self, guint i)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  g_return_val_if_fail (i < self->doc->n_points, NULL);
  return &self->doc->points[i];
}

static gssize
value_index (const LwDesignPoint *p, const char *param)
{
  for (size_t v = 0; v < p->n_values; v++)
    if (strcmp (p->values[v].parameter, param) == 0)
      return (gssize) v;
  return -1;
}

gboolean
lw_design_model_get_point_value (LwDesignModel *self, const char *point, const char *param,
                                 double *value)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  g_return_val_if_fail (point != NULL && param != NULL, FALSE);
  gssize i = lw_design_find_point (self->doc, point);
  if (i < 0)
    return FALSE;
  const LwDesignPoint *p = &self->doc->points[i];
  gssize v = value_index (p, param);
  if (v < 0)
    return FALSE;
  if (value != NULL)
    *value = p->values[v].value;
  return TRUE;
}

/* The message of the plant's parse at values (NULL: the nominals), or NULL when it parses. */
static char *
plant_error (const LwDesign *d, const double *values)
{
  LwModel *m = NULL;
  LwError err;
  lw_error_clear (&err);
  LwStatus st = lw_design_plant_parse (d, values, &m, &err);
  lw_model_free (m);
  return st == LW_OK ? NULL : g_strdup (err.message);
}

char *
lw_design_model_points_problem (const LwDesign *d)
{
  char buf[512];
  if (d->n_points == 0)
    return NULL;
  if (d->n_points > LW_DESIGN_MAX_POINTS || d->n_params > LW_DESIGN_MAX_PARAMS)
    return g_strdup (lw_design_points_problem (d, buf, sizeof buf, NULL));
  g_autofree char *nominal_error = lw_design_has_model (d) ? plant_error (d, NULL) : NULL;
  for (size_t i = 0; i < d->n_points; i++)
    {
      const LwDesignPoint *p = &d->points[i];
      /* the name and its uniqueness here, so that the point is named by its place among all */
      const char *bad = lw_design_point_name_problem (p->name);
      if (bad != NULL)
        return g_strdup_printf ("point %zu ('%.64s'): %s", i + 1, p->name != NULL ? p->name : "",
                                bad);
      for (size_t j = 0; j < i; j++)
        if (strcmp (d->points[j].name, p->name) == 0)
          return g_strdup_printf ("point '%s' is given twice", p->name);
      /* the rest with this point alone: its values, the plant there */
      LwDesign one = *d;   /* shallow: only read, never freed */
      one.points = (LwDesignPoint *) p;
      one.n_points = 1;
      const char *problem = lw_design_points_problem (&one, buf, sizeof buf, NULL);
      if (problem == NULL)
        continue;
      if (nominal_error != NULL)
        {
          /* the plant failing here as at the nominals: the plant's own error says it */
          double values[LW_DESIGN_MAX_PARAMS];
          lw_design_point_values (d, i, values);
          g_autofree char *here = plant_error (d, values);
          g_autofree char *same = g_strdup_printf ("at operating point '%s': %s", p->name,
                                                   nominal_error);
          if (g_strcmp0 (here, nominal_error) == 0 && strcmp (problem, same) == 0)
            continue;
        }
      return g_strdup (problem);
    }
  return NULL;
}

char *
lw_design_model_get_points_problem (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  return lw_design_model_points_problem (self->doc);
}

/* What the points would be with point `at` replaced by p (appended when at is the number of
 * points): NULL when acceptable. */
static char *
problem_with (const LwDesign *d, size_t at, const LwDesignPoint *p)
{
  if (d->n_params == 0)
    return g_strdup ("operating points are values of the plant's parameters: the design has "
                     "none");
  size_t n = d->n_points + (at == d->n_points);
  if (n > LW_DESIGN_MAX_POINTS)
    return g_strdup_printf ("a design takes at most %d operating points", LW_DESIGN_MAX_POINTS);
  g_autofree LwDesignPoint *ps = g_new (LwDesignPoint, n);
  if (d->n_points > 0)
    memcpy (ps, d->points, d->n_points * sizeof *ps);
  ps[at] = *p;
  LwDesign view = *d;   /* shallow: only read, never freed */
  view.points = ps;
  view.n_points = n;
  return lw_design_model_points_problem (&view);
}

static gboolean
refuse (char *problem, char **why)
{
  if (why != NULL)
    *why = problem;
  else
    g_free (problem);
  return FALSE;
}

gboolean
lw_design_model_add_point (LwDesignModel *self, char **why)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  LwDesign *d = self->doc;
  g_autofree char *name = NULL;
  for (size_t k = d->n_points + 1;; k++)
    {
      g_free (name);
      name = g_strdup_printf ("point %zu", k);
      if (lw_design_find_point (d, name) < 0)
        break;
    }
  LwDesignPoint p = { .name = name };
  char *problem = problem_with (d, d->n_points, &p);
  if (problem != NULL)
    return refuse (problem, why);
  d->points = g_renew (LwDesignPoint, d->points, d->n_points + 1);
  d->points[d->n_points++] = (LwDesignPoint) { .name = g_steal_pointer (&name) };
  lw_design_model_emit_changed (self);
  return TRUE;
}

gboolean
lw_design_model_rename_point (LwDesignModel *self, const char *point, const char *name,
                              char **why)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  g_return_val_if_fail (point != NULL && name != NULL, FALSE);
  LwDesign *d = self->doc;
  gssize at = lw_design_find_point (d, point);
  if (at < 0)
    return refuse (g_strdup_printf ("there is no point '%s'", point), why);
  if (strcmp (point, name) == 0)
    return TRUE;   /* nothing to change */
  LwDesignPoint p = d->points[at];
  p.name = (char *) name;
  char *problem = problem_with (d, (size_t) at, &p);
  if (problem != NULL)
    return refuse (problem, why);
  g_free (d->points[at].name);
  d->points[at].name = g_strdup (name);
  lw_design_model_emit_changed (self);
  return TRUE;
}

gboolean
lw_design_model_set_point_value (LwDesignModel *self, const char *point, const char *param,
                                 const double *value, char **why)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  g_return_val_if_fail (point != NULL && param != NULL, FALSE);
  LwDesign *d = self->doc;
  gssize at = lw_design_find_point (d, point);
  if (at < 0)
    return refuse (g_strdup_printf ("there is no point '%s'", point), why);
  LwDesignPoint *t = &d->points[at];
  gssize v = value_index (t, param);
  if (value == NULL ? v < 0 : (v >= 0 && t->values[v].value == *value))
    return TRUE;   /* nothing to change */
  /* the point as it would be: its values with this one in the parameters' order, or without
   * it (a shallow copy: the names are the document's and param) */
  LwDesignPoint p = *t;
  g_autofree LwDesignPointValue *vs = g_new (LwDesignPointValue, t->n_values + 1);
  size_t n = 0, put = G_MAXSIZE;
  gssize order = lw_design_param_index (d, param);
  for (size_t u = 0; u < t->n_values; u++)
    {
      if ((gssize) u == v)
        {
          if (value != NULL)
            {
              put = n;
              vs[n++] = (LwDesignPointValue) { (char *) param, *value };
            }
          continue;
        }
      if (value != NULL && v < 0 && put == G_MAXSIZE && order >= 0
          && lw_design_param_index (d, t->values[u].parameter) > order)
        {
          put = n;
          vs[n++] = (LwDesignPointValue) { (char *) param, *value };
        }
      vs[n++] = t->values[u];
    }
  if (value != NULL && put == G_MAXSIZE)
    {
      put = n;
      vs[n++] = (LwDesignPointValue) { (char *) param, *value };
    }
  p.values = vs;
  p.n_values = n;
  char *problem = problem_with (d, (size_t) at, &p);
  if (problem != NULL)
    return refuse (problem, why);
  /* taken: the document's own copy, its names its own */
  LwDesignPointValue *own = g_new (LwDesignPointValue, n + 1);
  for (size_t u = 0; u < n; u++)
    {
      own[u].value = vs[u].value;
      if (u == put)
        own[u].parameter = v >= 0 ? g_steal_pointer (&t->values[v].parameter) : g_strdup (param);
      else
        own[u].parameter = vs[u].parameter;   /* moved from t->values below */
    }
  for (size_t u = 0; u < t->n_values; u++)
    if ((gssize) u == v)
      g_free (t->values[u].parameter);   /* taken away (NULL when stolen above) */
  g_free (t->values);
  t->values = own;
  t->n_values = n;
  lw_design_model_emit_changed (self);
  return TRUE;
}

gboolean
lw_design_model_remove_point (LwDesignModel *self, const char *point)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  g_return_val_if_fail (point != NULL, FALSE);
  LwDesign *d = self->doc;
  gssize at = lw_design_find_point (d, point);
  if (at < 0)
    return FALSE;
  LwDesignPoint *p = &d->points[at];
  for (size_t v = 0; v < p->n_values; v++)
    g_free (p->values[v].parameter);
  g_free (p->values);
  g_free (p->name);
  memmove (&d->points[at], &d->points[at + 1],
           (d->n_points - (size_t) at - 1) * sizeof *d->points);
  if (--d->n_points == 0)
    g_clear_pointer (&d->points, g_free);
  lw_design_model_emit_changed (self);
  return TRUE;
}

char *
lw_design_model_params_key (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  const LwDesign *d = lw_design_model_get_design (self);
  GString *k = g_string_new (d->plant);
  g_string_append_printf (k, "\x1f%.17g\x1f%.17g", d->dead_time_s, d->period_s);
  for (size_t i = 0; i < d->n_params; i++)
    {
      const LwDesignParam *p = &d->params[i];
      g_string_append_printf (k, "\x1e%s %.17g %d %.17g %.17g %d", p->name, p->nominal,
                              p->ranged, p->low, p->high, (int) p->spread);
    }
  for (size_t i = 0; i < d->n_points; i++)
    {
      const LwDesignPoint *pt = &d->points[i];
      g_string_append_printf (k, "\x1d%s", pt->name);
      for (size_t j = 0; j < pt->n_values; j++)
        g_string_append_printf (k, " %s=%.17g", pt->values[j].parameter, pt->values[j].value);
    }
  return g_string_free (k, FALSE);
}
