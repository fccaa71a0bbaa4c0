/* lw-design-model-params.c — the plant's named parameters in the window's model: the names
 * the plant's text uses, setting and removing a parameter (each one "changed", so one undo
 * step; a parameter removed takes its values in the operating points with it), and what
 * would be wrong with a parameter before it is set, the operating points' rules included
 * (docs/families.md); the family's drawn members and their seed.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <string.h>

#include "lw-design-model-private.h"
#include "lw-expr.h"
#include "lw-family.h"

guint
lw_design_model_get_n_params (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), 0);
  return (guint) self->doc->n_params;
}

const LwDesignParam *
lw_design_model_get_param (LwDesignModel *self, guint i)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  g_return_val_if_fail (i < self->doc->n_params, NULL);
  return &self->doc->params[i];
}

/* The names in text as the expression parser reads them (lw-expr.h): a letter or '_', then
 * letters, digits and '_'; numbers (with their exponent letter) skipped. Those that cannot
 * name a parameter (the variable s, the letters w and z, a name too long) are left out: the
 * plant's own error names them. Each name once, in order of first use. */
static GPtrArray *
plant_names (const char *text)
{
  GPtrArray *names = g_ptr_array_new_with_free_func (g_free);
  const char *c = text != NULL ? text : "";
  while (*c != '\0')
    {
      if (g_ascii_isdigit (*c) || *c == '.')
        {
          while (g_ascii_isdigit (*c) || *c == '.')
            c++;
          if ((*c == 'e' || *c == 'E')
              && (g_ascii_isdigit (c[1])
                  || ((c[1] == '+' || c[1] == '-') && g_ascii_isdigit (c[2]))))
            {
              c += 2;
              while (g_ascii_isdigit (*c))
                c++;
            }
          continue;
        }
      if (g_ascii_isalpha (*c) || *c == '_')
        {
          const char *start = c;
          while (g_ascii_isalnum (*c) || *c == '_')
            c++;
          g_autofree char *name = g_strndup (start, (gsize) (c - start));
          gboolean seen = FALSE;
          for (guint i = 0; i < names->len && !seen; i++)
            seen = strcmp (g_ptr_array_index (names, i), name) == 0;
          if (!seen && lw_expr_param_name_problem (name) == NULL)
            g_ptr_array_add (names, g_steal_pointer (&name));
          continue;
        }
      c++;
    }
  return names;
}

gboolean
lw_design_model_plant_uses (LwDesignModel *self, const char *name)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  g_autoptr (GPtrArray) names = plant_names (self->doc->plant);
  for (guint i = 0; i < names->len; i++)
    if (strcmp (g_ptr_array_index (names, i), name) == 0)
      return TRUE;
  return FALSE;
}

char **
lw_design_model_missing_params (LwDesignModel *self)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  g_autoptr (GPtrArray) names = plant_names (self->doc->plant);
  GPtrArray *missing = g_ptr_array_new ();
  for (guint i = 0; i < names->len; i++)
    {
      const char *n = g_ptr_array_index (names, i);
      /* the dead time's parameter is not written in the plant: its name there is the
       * plant's error to say */
      if (lw_design_param_index (self->doc, n) < 0 && strcmp (n, LW_DESIGN_DEAD_TIME_PARAM) != 0
          && missing->len < LW_DESIGN_MAX_PARAMS)
        g_ptr_array_add (missing, g_strdup (n));
    }
  g_ptr_array_add (missing, NULL);
  return (char **) g_ptr_array_free (missing, FALSE);
}

/* The design's parameters with p in place of the one of its name (appended when new); the
 * array is a shallow copy: the names are the document's and p's. */
static LwDesignParam *
params_with (const LwDesign *d, const LwDesignParam *p, size_t *n_out)
{
  gssize at = lw_design_param_index (d, p->name);
  size_t n = d->n_params + (at < 0);
  LwDesignParam *ps = g_new (LwDesignParam, n);
  if (d->n_params > 0)
    memcpy (ps, d->params, d->n_params * sizeof *ps);
  ps[at < 0 ? (gssize) d->n_params : at] = *p;
  *n_out = n;
  return ps;
}

/* What lw_design_params_problem says of the document with params in place of its own, or
 * NULL. A plant that does not parse at the nominals is not the parameter's fault (a name not
 * given yet, an expression half typed): the plant's own error says it, so that one is let
 * through; a parameter refused on its own or a corner where the plant fails is not. Then the
 * operating points with these parameters (lw_design_model_points_problem). */
static char *
params_problem (const LwDesign *d, LwDesignParam *params, size_t n)
{
  LwDesign view = *d;   /* shallow: only read, never freed */
  view.params = params;
  view.n_params = n;
  char buf[512];
  const char *problem = lw_design_params_problem (&view, buf, sizeof buf);
  if (problem == NULL)
    return lw_design_model_points_problem (&view);   /* the points with these parameters */
  if (lw_design_has_model (&view))
    {
      LwModel *m = NULL;
      LwError err;
      lw_error_clear (&err);
      LwStatus st = lw_design_plant_parse (&view, NULL, &m, &err);
      lw_model_free (m);
      if (st != LW_OK && strcmp (problem, err.message) == 0)
        return lw_design_model_points_problem (&view);
    }
  return g_strdup (problem);
}

char *
lw_design_model_param_problem (LwDesignModel *self, const LwDesignParam *p)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), NULL);
  g_return_val_if_fail (p != NULL && p->name != NULL, NULL);
  if (lw_design_param_index (self->doc, p->name) < 0 && self->doc->n_params >= LW_DESIGN_MAX_PARAMS)
    return g_strdup_printf ("a design takes at most %d parameters", LW_DESIGN_MAX_PARAMS);
  size_t n;
  g_autofree LwDesignParam *ps = params_with (self->doc, p, &n);
  return params_problem (self->doc, ps, n);
}

gboolean
lw_design_model_set_param (LwDesignModel *self, const LwDesignParam *p, char **why)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  g_return_val_if_fail (p != NULL && p->name != NULL, FALSE);
  char *problem = lw_design_model_param_problem (self, p);
  if (problem != NULL)
    {
      if (why != NULL)
        *why = problem;
      else
        g_free (problem);
      return FALSE;
    }
  LwDesign *d = self->doc;
  gssize at = lw_design_param_index (d, p->name);
  LwDesignParam *t;
  if (at < 0)
    {
      d->params = g_renew (LwDesignParam, d->params, d->n_params + 1);
      t = &d->params[d->n_params++];
      t->name = g_strdup (p->name);
    }
  else
    {
      t = &d->params[at];
      if (t->nominal == p->nominal && t->ranged == p->ranged && t->spread == p->spread
          && (!p->ranged || (t->low == p->low && t->high == p->high)))
        return TRUE;   /* nothing to change */
    }
  t->nominal = p->nominal;
  t->ranged = p->ranged;
  /* a fixed value keeps no range (the document writes none) */
  t->low = p->ranged ? p->low : 0.0;
  t->high = p->ranged ? p->high : 0.0;
  t->spread = p->ranged ? p->spread : LW_SPREAD_UNIFORM;
  lw_design_model_emit_changed (self);
  return TRUE;
}

gboolean
lw_design_model_remove_param (LwDesignModel *self, const char *name)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  g_return_val_if_fail (name != NULL, FALSE);
  LwDesign *d = self->doc;
  gssize at = lw_design_param_index (d, name);
  if (at < 0)
    return FALSE;
  g_autofree char *gone = g_strdup (name);   /* name may be one of the strings freed below */
  name = gone;
  /* the points' values of it go with it (a point names only parameters the design has) */
  for (size_t i = 0; i < d->n_points; i++)
    {
      LwDesignPoint *p = &d->points[i];
      size_t kept = 0;
      for (size_t v = 0; v < p->n_values; v++)
        if (strcmp (p->values[v].parameter, name) == 0)
          g_free (p->values[v].parameter);
        else
          p->values[kept++] = p->values[v];
      p->n_values = kept;
    }
  g_free (d->params[at].name);
  memmove (&d->params[at], &d->params[at + 1],
           (d->n_params - (size_t) at - 1) * sizeof *d->params);
  if (--d->n_params == 0)
    {
      /* no parameter, no point: a document writes them inside <parameters> */
      g_clear_pointer (&d->params, g_free);
      lw_design_clear_points (d);
      d->has_family_members = d->has_family_seed = false;   /* written there too */
    }
  lw_design_model_emit_changed (self);
  return TRUE;
}

void
lw_design_model_get_family_sampling (LwDesignModel *self, gsize *members, guint64 *seed)
{
  g_return_if_fail (LW_IS_DESIGN_MODEL (self));
  LwFamilyOptions o;
  lw_family_options_for (&o, self->doc);
  if (members != NULL)
    *members = o.members;
  if (seed != NULL)
    *seed = o.seed;
}

gboolean
lw_design_model_set_family_sampling (LwDesignModel *self, gsize members, guint64 seed,
                                     char **why)
{
  g_return_val_if_fail (LW_IS_DESIGN_MODEL (self), FALSE);
  LwDesign *d = self->doc;
  char *problem = NULL;
  if (d->n_params == 0)
    problem = g_strdup ("a design without parameters has no family to draw");
  else if (members > LW_DESIGN_MAX_FAMILY_MEMBERS)
    problem = g_strdup_printf ("a family draws at most %d members", LW_DESIGN_MAX_FAMILY_MEMBERS);
  else if (seed > (guint64) G_MAXINT64)
    problem = g_strdup_printf ("a seed is at most %" G_GINT64_FORMAT, G_MAXINT64);
  if (problem != NULL)
    {
      if (why != NULL)
        *why = problem;
      else
        g_free (problem);
      return FALSE;
    }
  gsize had_members = 0;
  guint64 had_seed = 0;
  lw_design_model_get_family_sampling (self, &had_members, &had_seed);
  /* a value as it is stays as the document gives it (written, or the default left out) */
  gboolean changed = FALSE;
  if (members != had_members)
    {
      d->has_family_members = true;
      d->family_members = members;
      changed = TRUE;
    }
  if (seed != had_seed)
    {
      d->has_family_seed = true;
      d->family_seed = seed;
      changed = TRUE;
    }
  if (changed)
    lw_design_model_emit_changed (self);
  return TRUE;
}
