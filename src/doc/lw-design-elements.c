/* lw-design-elements.c — every element of a design document read into an LwDesign
 * (docs/file-format.md): sampling, requirements, variants and their stages, views.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-design-load-private.h"

/* ---- elements ---------------------------------------------------------------------------- */

static const LwDocReqKind *
req_kind_by_element (const char *name)
{
  for (size_t i = 0; i < lw_doc_n_req_kinds; i++)
    if (strcmp (lw_doc_req_kinds[i].element, name) == 0)
      return &lw_doc_req_kinds[i];
  return NULL;
}

static char *
stage_element_list (void)
{
  GString *s = g_string_new (NULL);
  for (size_t i = 0; i < lw_stage_kind_count (); i++)
    g_string_append_printf (s, "%s<%s>", i == 0 ? "" : ", ",
                            lw_stage_kind_info ((LwStageKind) i)->name);
  return g_string_free (s, FALSE);
}

static char *
req_element_list (void)
{
  GString *s = g_string_new (NULL);
  for (size_t i = 0; i < lw_doc_n_req_kinds; i++)
    g_string_append_printf (s, "%s<%s>", i == 0 ? "" : ", ", lw_doc_req_kinds[i].element);
  return g_string_free (s, FALSE);
}

static bool
read_stage (Reader *r, const xmlNode *e, const LwDesignVariant *v, size_t index, LwStage *out)
{
  const LwStageKindInfo *k = lw_stage_kind_by_name ((const char *) e->name);
  if (k == NULL)
    {
      g_autofree char *list = stage_element_list ();
      return lw_load_fail (r, e, LW_DESIGN_ERROR_SCHEMA, " in variant '%s': not a stage; expected one "
                   "of %s", v->name, list);
    }
  memset (out, 0, sizeof *out);
  out->kind = k->kind;
  out->enabled = true;

  g_autofree char *label = lw_load_attribute (e, "label");
  g_autofree char *where = NULL;
  if (label != NULL && label[0] != '\0')
    where = g_strdup_printf (" in stage '%s' of variant '%s'", label, v->name);
  else
    where = g_strdup_printf (" (stage %zu of variant '%s')", index + 1, v->name);

  const char *allowed[LW_STAGE_MAX_STORED + 3] = { "label", "enabled" };
  for (size_t i = 0; i < k->n_params; i++)
    allowed[2 + i] = k->params[i].name;
  allowed[2 + k->n_params] = NULL;
  if (!lw_load_check_attributes (r, e, where, allowed) || !lw_load_no_children (r, e, where))
    return false;

  if (label != NULL)
    {
      const char *problem = lw_design_text_problem (label);
      if (problem != NULL)
        return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: attribute 'label': %s", where, problem);
      if (strlen (label) >= LW_STAGE_LABEL_MAX)
        return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE,
                     "%s: attribute 'label' must be at most %d bytes, it has %zu", where,
                     LW_STAGE_LABEL_MAX - 1, strlen (label));
      memcpy (out->label, label, strlen (label) + 1);
    }
  g_autofree char *enabled = lw_load_attribute (e, "enabled");
  if (enabled != NULL)
    {
      if (strcmp (enabled, "true") == 0)
        out->enabled = true;
      else if (strcmp (enabled, "false") == 0)
        out->enabled = false;
      else
        return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE,
                     "%s: attribute 'enabled' must be 'true' or 'false', got '%s'", where,
                     enabled);
    }
  for (size_t i = 0; i < k->n_params; i++)
    {
      double value = 0.0;
      if (!lw_load_number_attr (r, e, where, k->params[i].name, (LwNumRule) k->params[i].rule,
                        true, &value, NULL))
        return false;
      lw_stage_param_set (out, i, value);
    }
  LwError err;
  lw_error_clear (&err);
  if (lw_stage_check (out, &err) != LW_OK)
    {
      /* the core names the stage as "stage 'NAME': "; the location says that already */
      const char *msg = err.message;
      if (g_str_has_prefix (msg, "stage '") && strstr (msg, "': ") != NULL)
        msg = strstr (msg, "': ") + 3;
      return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: %s", where, msg);
    }
  return true;
}

/* A unit attribute of <plant> (lw_design_unit_problem) */
static bool
read_unit (Reader *r, const xmlNode *e, const char *name, char **out)
{
  if (!lw_load_text_attr (r, e, "", name, false, out))
    return false;
  const char *problem = *out != NULL ? lw_design_unit_problem (*out) : NULL;
  if (problem != NULL)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute '%s' ('%s'): %s", name, *out,
                         problem);
  return true;
}

/* <parameters><parameter name="…" nominal="…" [low="…" high="…"] [spread="…"]/>…
 * [<point name="…">…</point>…]</parameters>: the plant's named parameters, then the family's
 * operating points (lw-design-points.c) (lw_design_params_problem's rules; the plant
 * itself is checked with them by the caller) */
static bool
read_parameters (Reader *r, const xmlNode *e, LwDesign *d)
{
  static const char *const own[] = { "members", "seed", NULL };
  static const char *const allowed[] = { "name", "nominal", "low", "high", "spread", NULL };
  if (!lw_load_check_attributes (r, e, "", own))
    return false;
  /* the family's drawn members and their seed: whole numbers, as --members and --seed */
  g_autofree char *members = lw_load_attribute (e, "members");
  g_autofree char *seed = lw_load_attribute (e, "seed");
  long long v = -1;
  if (members != NULL)
    {
      if (!lw_load_parse_whole_text (members, 0, LW_DESIGN_MAX_FAMILY_MEMBERS, &v))
        return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute 'members' must be a whole "
                             "number from 0 to %d, got '%s'", LW_DESIGN_MAX_FAMILY_MEMBERS,
                             members);
      d->has_family_members = true;
      d->family_members = (size_t) v;
    }
  if (seed != NULL)
    {
      if (!lw_load_parse_whole_text (seed, 0, G_MAXINT64, &v))
        return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute 'seed' must be a whole "
                             "number from 0 to %" G_GINT64_FORMAT ", got '%s'", G_MAXINT64, seed);
      d->has_family_seed = true;
      d->family_seed = (guint64) v;
    }
  GArray *ps = g_array_new (FALSE, TRUE, sizeof (LwDesignParam));
  bool ok = true;
  const xmlNode *c = lw_load_next_element (r, e, e->children);
  for (; ok && c != NULL; c = lw_load_next_element (r, e, c->next))
    {
      if (lw_load_is_element (c, "point"))
        break;   /* the operating points follow the parameters */
      if (!lw_load_is_element (c, "parameter"))
        {
          ok = lw_load_fail (r, c, LW_DESIGN_ERROR_SCHEMA, ": unexpected here; <parameters> "
                             "holds <parameter> elements only");
          break;
        }
      if (ps->len >= LW_DESIGN_MAX_PARAMS)
        {
          ok = lw_load_fail (r, c, LW_DESIGN_ERROR_LIMIT, ": more than %d parameters",
                             LW_DESIGN_MAX_PARAMS);
          break;
        }
      LwDesignParam p = { 0 };
      bool has_low = false, has_high = false;
      ok = lw_load_check_attributes (r, c, "", allowed) && lw_load_no_children (r, c, "")
           && lw_load_text_attr (r, c, "", "name", true, &p.name);
      if (ok)
        {
          g_autofree char *where = g_strdup_printf (" (parameter '%s')", p.name);
          const char *bad = lw_expr_param_name_problem (p.name);
          ok = bad == NULL ? true
                           : lw_load_fail (r, c, LW_DESIGN_ERROR_VALUE, ": attribute 'name' "
                                           "'%s': %s", p.name, bad);
          for (guint j = 0; ok && j < ps->len; j++)
            if (strcmp (g_array_index (ps, LwDesignParam, j).name, p.name) == 0)
              ok = lw_load_fail (r, c, LW_DESIGN_ERROR_VALUE, ": parameter '%s' is given twice",
                                 p.name);
          ok = ok && lw_load_number_attr (r, c, where, "nominal", LW_NUM_FINITE, true,
                                          &p.nominal, NULL)
               && lw_load_number_attr (r, c, where, "low", LW_NUM_FINITE, false, &p.low,
                                       &has_low)
               && lw_load_number_attr (r, c, where, "high", LW_NUM_FINITE, false, &p.high,
                                       &has_high);
          if (ok && has_low != has_high)
            ok = lw_load_fail (r, c, LW_DESIGN_ERROR_VALUE, "%s: attribute '%s' without '%s'; "
                               "a range needs both", where, has_low ? "low" : "high",
                               has_low ? "high" : "low");
          g_autofree char *spread = ok ? lw_load_attribute (c, "spread") : NULL;
          if (spread != NULL && strcmp (spread, "uniform") != 0 && strcmp (spread, "log") != 0)
            ok = lw_load_fail (r, c, LW_DESIGN_ERROR_VALUE, "%s: attribute 'spread' must be "
                               "'uniform' or 'log', got '%s'", where, spread);
          p.ranged = has_low;
          p.spread = spread != NULL && strcmp (spread, "log") == 0 ? LW_SPREAD_LOG
                                                                   : LW_SPREAD_UNIFORM;
          if (ok && spread != NULL && !p.ranged)
            ok = lw_load_fail (r, c, LW_DESIGN_ERROR_VALUE, "%s: attribute 'spread' without a "
                               "range (low and high)", where);
          if (ok)
            {
              /* the value rules, one parameter at a time so the message points here */
              const char *problem = lw_design_param_problem (&p);
              if (problem != NULL)
                ok = lw_load_fail (r, c, LW_DESIGN_ERROR_VALUE, ": parameter '%s': %s", p.name,
                                   problem);
            }
        }
      if (!ok)
        {
          g_free (p.name);
          break;
        }
      g_array_append_val (ps, p);
    }
  if (r->error != NULL)
    ok = false;
  d->n_params = ps->len;
  d->params = (LwDesignParam *) (void *) g_array_free (ps, FALSE);
  if (ok && c != NULL)
    ok = lw_load_read_points (r, e, c, d);
  return ok;
}

/* The plant at every corner of the parameters' ranges (lw_design_params_problem), reported
 * at <plant>. */
static bool
check_parameter_ranges (Reader *r, const xmlNode *plant_el, const LwDesign *d)
{
  if (d->n_params == 0)
    return true;
  char why[512];
  const char *problem = lw_design_params_problem (d, why, sizeof why);
  if (problem == NULL)
    return true;
  return lw_load_fail (r, plant_el, LW_DESIGN_ERROR_VALUE, ": %s", problem);
}

/* <actuator low="…" high="…" anti_windup="true|false"/> of a variant */
static bool
read_actuator (Reader *r, const xmlNode *e, LwDesignVariant *v)
{
  static const char *const allowed[] = { "low", "high", "anti_windup", "reference_step", NULL };
  g_autofree char *where = g_strdup_printf (" of variant '%s'", v->name);
  if (!lw_load_check_attributes (r, e, where, allowed) || !lw_load_no_children (r, e, where))
    return false;
  if (!lw_load_number_attr (r, e, where, "low", LW_NUM_FINITE, true, &v->u_low, NULL)
      || !lw_load_number_attr (r, e, where, "high", LW_NUM_FINITE, true, &v->u_high, NULL))
    return false;
  if (!(v->u_low < v->u_high))
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: attribute 'low' (%g) must be below "
                         "'high' (%g)", where, v->u_low, v->u_high);
  g_autofree char *aw = lw_load_attribute (e, "anti_windup");
  if (aw != NULL && strcmp (aw, "true") != 0 && strcmp (aw, "false") != 0)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: attribute 'anti_windup' must be "
                         "'true' or 'false', got '%s'", where, aw);
  v->anti_windup = aw != NULL && strcmp (aw, "true") == 0;
  if (!lw_load_number_attr (r, e, where, "reference_step", LW_NUM_POSITIVE, false,
                            &v->reference_step, NULL))
    return false;
  v->has_actuator = true;
  return true;
}

/* <responses shows="reference actuator input-disturbance output-disturbance"/> of a variant:
 * the time responses drawn for it (any of the four, in any order, each once; may be empty) */
static bool
read_responses (Reader *r, const xmlNode *e, LwDesignVariant *v)
{
  static const char *const allowed[] = { "shows", NULL };
  g_autofree char *where = g_strdup_printf (" of variant '%s'", v->name);
  if (!lw_load_check_attributes (r, e, where, allowed) || !lw_load_no_children (r, e, where))
    return false;
  g_autofree char *shows = NULL;
  if (!lw_load_text_attr (r, e, where, "shows", true, &shows))
    return false;
  g_auto (GStrv) words = g_strsplit_set (shows, " \t\r\n", -1);
  unsigned mask = 0;
  for (size_t i = 0; words[i] != NULL; i++)
    {
      if (words[i][0] == '\0')
        continue;
      unsigned k = 0;
      while (lw_design_response_name (k) != NULL && strcmp (lw_design_response_name (k), words[i]) != 0)
        k++;
      if (lw_design_response_name (k) == NULL)
        return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: attribute 'shows': '%s' is not a "
                             "response; expected any of reference, actuator, input-disturbance, "
                             "output-disturbance", where, words[i]);
      if (mask & (1u << k))
        return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: attribute 'shows': '%s' is "
                             "listed twice", where, words[i]);
      mask |= 1u << k;
    }
  v->responses = mask;
  return true;
}

static bool
read_variant (Reader *r, const xmlNode *e, LwDesign *d)
{
  static const char *const allowed[] = { "name", "period_s", "compared", NULL };
  if (!lw_load_check_attributes (r, e, "", allowed))
    return false;
  g_autofree char *name = NULL;
  if (!lw_load_text_attr (r, e, "", "name", true, &name))
    return false;
  double period_s = 0.0;
  bool has_period = false;
  g_autofree char *where = g_strdup_printf (" '%s'", name);
  if (!lw_load_number_attr (r, e, where, "period_s", LW_NUM_PERIOD, false, &period_s, &has_period))
    return false;
  if (has_period && !lw_dead_time_ok (d->dead_time_s, period_s))
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: at its attribute 'period_s' (%g s) the "
                 "plant's dead time of %g s is %.6g sample periods, more than the limit of %.0f",
                 where, period_s, d->dead_time_s,
                 d->dead_time_s / period_s, LW_DEAD_TIME_MAX_SAMPLES);
  if (name[0] == '\0')
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute 'name' must not be empty");
  if (lw_design_find_variant (d, name) >= 0)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": a variant named '%s' already exists; names "
                 "must be unique", name);
  if (d->n_variants >= LW_DESIGN_MAX_VARIANTS)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_LIMIT, ": more than %d variants",
                 LW_DESIGN_MAX_VARIANTS);
  g_autofree char *compared = lw_load_attribute (e, "compared");
  if (compared != NULL && strcmp (compared, "true") != 0 && strcmp (compared, "false") != 0)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, "%s: attribute 'compared' must be 'true' or "
                         "'false', got '%s'", where, compared);
  LwDesignVariant *v = lw_design_add_variant (d, name);
  v->compared = compared != NULL && strcmp (compared, "true") == 0;
  v->has_period = has_period;
  v->period_s = has_period ? period_s : 0.0;
  const xmlNode *c = lw_load_next_element (r, e, e->children);
  if (r->error != NULL)
    return false;
  if (lw_load_is_element (c, "notes"))
    {
      v->notes = lw_load_element_text (r, c);
      if (v->notes == NULL)
        return false;
      const char *problem = lw_design_text_problem (v->notes);
      if (problem != NULL)
        return lw_load_fail (r, c, LW_DESIGN_ERROR_VALUE, ": %s", problem);
      c = lw_load_next_element (r, e, c->next);
    }
  if (lw_load_is_element (c, "actuator"))
    {
      if (!read_actuator (r, c, v))
        return false;
      c = lw_load_next_element (r, e, c->next);
    }
  if (lw_load_is_element (c, "responses"))
    {
      if (!read_responses (r, c, v))
        return false;
      c = lw_load_next_element (r, e, c->next);
    }
  for (; c != NULL; c = lw_load_next_element (r, e, c->next))
    {
      if (v->n_stages >= LW_DESIGN_MAX_STAGES)
        return lw_load_fail (r, c, LW_DESIGN_ERROR_LIMIT, ": variant '%s' has more than %d stages",
                     v->name, LW_DESIGN_MAX_STAGES);
      LwStage s;
      if (!read_stage (r, c, v, v->n_stages, &s))
        return false;
      lw_design_variant_add_stage (v, &s);
    }
  return r->error == NULL;
}

static bool
read_requirement (Reader *r, const xmlNode *e, LwDesign *d)
{
  const LwDocReqKind *k = req_kind_by_element ((const char *) e->name);
  if (k == NULL)
    {
      g_autofree char *list = req_element_list ();
      return lw_load_fail (r, e, LW_DESIGN_ERROR_SCHEMA, ": not a requirement; expected one of %s", list);
    }
  if (d->n_requirements >= LW_DESIGN_MAX_REQUIREMENTS)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_LIMIT, ": more than %d requirements",
                 LW_DESIGN_MAX_REQUIREMENTS);
  const char *allowed[] = { "name", k->limit_attr, k->limit_hi_attr, NULL };
  if (!lw_load_check_attributes (r, e, "", allowed) || !lw_load_no_children (r, e, ""))
    return false;
  g_autofree char *name = NULL;
  if (!lw_load_text_attr (r, e, "", "name", false, &name))
    return false;
  LwRequirement q = { .kind = k->kind, .limit = 0.0, .limit_hi = 0.0 };
  if (!lw_load_number_attr (r, e, "", k->limit_attr, LW_NUM_FINITE, true, &q.limit, NULL))
    return false;
  if (k->limit_hi_attr != NULL
      && !lw_load_number_attr (r, e, "", k->limit_hi_attr, LW_NUM_FINITE, true, &q.limit_hi, NULL))
    return false;
  LwError err;
  lw_error_clear (&err);
  if (lw_requirement_check (&q, &err) != LW_OK)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, "%s%s%s: %s", name != NULL ? " '" : "",
                 name != NULL ? name : "", name != NULL ? "'" : "", err.message);
  lw_design_add_requirement (d, name, &q);
  return true;
}

static bool
read_view (Reader *r, const xmlNode *e, LwDesign *d)
{
  static const char *const allowed[] = { "from_rad_s", "to_rad_s", "shows", NULL };
  if (!lw_load_check_attributes (r, e, "", allowed) || !lw_load_no_children (r, e, ""))
    return false;
  bool has_from = false, has_to = false;
  if (!lw_load_number_attr (r, e, "", "from_rad_s", LW_NUM_POSITIVE, false, &d->range_from_rad_s,
                    &has_from)
      || !lw_load_number_attr (r, e, "", "to_rad_s", LW_NUM_POSITIVE, false, &d->range_to_rad_s, &has_to))
    return false;
  if (has_from != has_to)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": attributes 'from_rad_s' and 'to_rad_s' go "
                 "together; give both or neither");
  if (has_from && !(d->range_from_rad_s < d->range_to_rad_s))
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute 'from_rad_s' must be below "
                 "'to_rad_s'");
  d->has_range = has_from;
  if (!d->has_range)
    d->range_from_rad_s = d->range_to_rad_s = 0.0;
  g_autofree char *shows = lw_load_attribute (e, "shows");
  if (shows != NULL)
    {
      /* names as text: the renderer, above this layer, knows which views exist (lw-design.h) */
      g_auto (GStrv) words = g_strsplit_set (shows, " \t\n\r", -1);
      g_autoptr (GPtrArray) names = g_ptr_array_new_with_free_func (g_free);
      for (size_t i = 0; words[i] != NULL; i++)
        {
          if (words[i][0] == '\0')
            continue;
          const char *problem = lw_design_view_name_problem (words[i]);
          if (problem != NULL)
            return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": attribute 'shows' has a bad view name "
                         "'%s': %s", words[i], problem);
          gboolean again = FALSE;
          for (guint j = 0; j < names->len && !again; j++)
            again = strcmp (names->pdata[j], words[i]) == 0;
          if (!again)   /* a name given twice counts once */
            g_ptr_array_add (names, g_strdup (words[i]));
        }
      if (names->len > 0)
        {
          g_ptr_array_add (names, NULL);
          g_strfreev (d->views);
          d->views = (char **) g_ptr_array_free (g_steal_pointer (&names), FALSE);
        }
    }
  return true;
}

static bool
read_string_element (Reader *r, const xmlNode *e, char **out)
{
  static const char *const none[] = { NULL };
  if (!lw_load_check_attributes (r, e, "", none))
    return false;
  *out = lw_load_element_text (r, e);
  if (*out == NULL)
    return false;
  const char *problem = lw_design_text_problem (*out);
  if (problem != NULL)
    return lw_load_fail (r, e, LW_DESIGN_ERROR_VALUE, ": %s", problem);
  return true;
}

bool
lw_load_missing (Reader *r, const xmlNode *parent, const xmlNode *at, const char *name,
                 const char *after)
{
  if (at != NULL)
    return lw_load_fail (r, at, LW_DESIGN_ERROR_SCHEMA, ": unexpected here; expected <%s>%s%s",
                 name, after != NULL ? " after " : "", after != NULL ? after : "");
  return lw_load_fail (r, parent, LW_DESIGN_ERROR_SCHEMA, ": the required element <%s> is missing", name);
}

/* A <measured> anywhere but right after <sampling>, or a second one. */
static bool
misplaced_measured (Reader *r, const xmlNode *c)
{
  return lw_load_fail (r, c, LW_DESIGN_ERROR_SCHEMA, ": unexpected here; a design's <measured> "
                       "responses come together, right after <sampling>");
}

LwDesign *
lw_load_read_design (Reader *r, const xmlNode *root)
{
  g_autoptr (LwDesign) d = g_new0 (LwDesign, 1);
  d->hold = LW_HOLD_ZERO_ORDER;
  d->compute_delay = 1;

  static const char *const root_attrs[] = { "version", NULL };
  if (!lw_load_check_attributes (r, root, "", root_attrs))
    return NULL;

  const xmlNode *c = lw_load_next_element (r, root, root->children);
  if (r->error != NULL)
    return NULL;
  if (!lw_load_is_element (c, "title"))
    return lw_load_missing (r, root, c, "title", "the start of <design>"), NULL;
  if (!read_string_element (r, c, &d->title))
    return NULL;
  c = lw_load_next_element (r, root, c->next);
  if (lw_load_is_element (c, "author"))
    {
      if (!read_string_element (r, c, &d->author))
        return NULL;
      c = lw_load_next_element (r, root, c->next);
    }
  if (lw_load_is_element (c, "notes"))
    {
      if (!read_string_element (r, c, &d->notes))
        return NULL;
      c = lw_load_next_element (r, root, c->next);
    }
  if (r->error != NULL)
    return NULL;

  /* <plant dead_time_s="…">expression</plant> */
  if (!lw_load_is_element (c, "plant"))
    return lw_load_missing (r, root, c, "plant", "<title>, <author> and <notes>"), NULL;
  static const char *const plant_attrs[] = { "dead_time_s", "input_unit", "output_unit", NULL };
  const xmlNode *plant_el = c;
  if (!lw_load_check_attributes (r, c, "", plant_attrs)
      || !lw_load_number_attr (r, c, "", "dead_time_s", LW_NUM_NONNEGATIVE, false, &d->dead_time_s,
                       NULL)
      || !read_unit (r, c, "input_unit", &d->input_unit)
      || !read_unit (r, c, "output_unit", &d->output_unit))
    return NULL;
  d->dead_time_s += 0.0;   /* -0 becomes +0 */
  d->plant = lw_load_element_text (r, c);
  if (d->plant == NULL)
    return NULL;
  const char *problem = lw_design_text_problem (d->plant);
  if (problem != NULL)
    return lw_load_fail (r, c, LW_DESIGN_ERROR_VALUE, ": %s", problem), NULL;
  /* an empty plant is a design on measured data alone: allowed only when a <measured>
   * follows (checked below, once it is read) */
  bool no_model = lw_load_is_blank ((const xmlChar *) d->plant);
  if (no_model)
    lw_design_set_string (&d->plant, "");
  c = lw_load_next_element (r, root, c->next);
  if (r->error != NULL)
    return NULL;

  /* <parameters> of the plant expression; the plant is read with them */
  const xmlNode *parameters_el = NULL;
  if (lw_load_is_element (c, "parameters"))
    {
      parameters_el = c;
      if (!read_parameters (r, c, d))
        return NULL;
      c = lw_load_next_element (r, root, c->next);
      if (r->error != NULL)
        return NULL;
    }
  if (!no_model && !lw_load_check_plant (r, plant_el, d))
    return NULL;

  /* <sampling period_s="…" hold="zero-order" compute_delay_samples="…"/> */
  if (!lw_load_is_element (c, "sampling"))
    return lw_load_missing (r, root, c, "sampling", "<plant>"), NULL;
  static const char *const sampling_attrs[] = { "period_s", "hold", "compute_delay_samples",
                                                NULL };
  if (!lw_load_check_attributes (r, c, "", sampling_attrs) || !lw_load_no_children (r, c, "")
      || !lw_load_number_attr (r, c, "", "period_s", LW_NUM_PERIOD, true, &d->period_s, NULL))
    return NULL;
  if (!lw_dead_time_ok (d->dead_time_s, d->period_s))
    return lw_load_fail (r, plant_el, LW_DESIGN_ERROR_VALUE, ": attribute 'dead_time_s' (%g s) is %.6g "
                 "sample periods of %g s (<sampling> at line %ld), more than the limit of %.0f",
                 d->dead_time_s, d->dead_time_s / d->period_s, d->period_s,
                 (long) xmlGetLineNo (c), LW_DEAD_TIME_MAX_SAMPLES), NULL;
  g_autofree char *hold = lw_load_attribute (c, "hold");
  if (hold != NULL && strcmp (hold, "zero-order") != 0)
    return lw_load_fail (r, c, LW_DESIGN_ERROR_VALUE, ": attribute 'hold' must be 'zero-order' (the "
                 "only hold there is), got '%s'", hold), NULL;
  g_autofree char *delay = lw_load_attribute (c, "compute_delay_samples");
  if (delay != NULL)
    {
      /* a whole number, as --compute-delay reads it */
      long long n = -1;
      if (!lw_load_parse_whole_text (delay, 0, LW_DESIGN_MAX_COMPUTE_DELAY, &n))
        return lw_load_fail (r, c, LW_DESIGN_ERROR_VALUE, ": attribute 'compute_delay_samples' must be "
                     "a whole number from 0 to %d, got '%s'", LW_DESIGN_MAX_COMPUTE_DELAY,
                     delay), NULL;
      d->compute_delay = (int) n;
    }
  /* the parameters' ranges, now that the period is known (a dead time's range is counted in
   * sample periods) */
  if (!check_parameter_ranges (r, plant_el, d)
      || (parameters_el != NULL && !lw_load_check_points (r, parameters_el, d)))
    return NULL;
  c = lw_load_next_element (r, root, c->next);
  if (r->error != NULL)
    return NULL;

  /* <measured kind="…">table</measured> */
  if (lw_load_is_element (c, "measured"))
    {
      if (!lw_load_read_measured (r, c, d))
        return NULL;
      if (no_model && d->measured_analysis != LW_DESIGN_ANALYSIS_DATA)
        return lw_load_fail (r, c, LW_DESIGN_ERROR_VALUE, ": attribute 'analysis' is \"model\" "
                             "but <plant> (line %ld) holds no model; write analysis=\"data\"",
                             (long) xmlGetLineNo (plant_el)), NULL;
      const xmlNode *first = c;
      c = lw_load_next_element (r, root, c->next);
      /* a measured family: further named responses right after the first */
      for (; r->error == NULL && lw_load_is_element (c, "measured");
           c = lw_load_next_element (r, root, c->next))
        if (!lw_load_read_more_measured (r, c, d, first))
          return NULL;
      if (r->error != NULL)
        return NULL;
    }
  if (no_model && d->measured == NULL)
    return lw_load_fail (r, plant_el, LW_DESIGN_ERROR_VALUE, ": the plant expression is empty; "
                         "expected a proper rational expression in s, e.g. 40/(s*(s+8)), or a "
                         "<measured> response after <sampling> to design on"), NULL;

  if (lw_load_is_element (c, "requirements"))
    {
      static const char *const none[] = { NULL };
      if (!lw_load_check_attributes (r, c, "", none))
        return NULL;
      for (const xmlNode *q = lw_load_next_element (r, c, c->children); q != NULL;
           q = lw_load_next_element (r, c, q->next))
        if (!read_requirement (r, q, d))
          return NULL;
      if (r->error != NULL)
        return NULL;
      c = lw_load_next_element (r, root, c->next);
      if (r->error != NULL)
        return NULL;
    }

  if (lw_load_is_element (c, "measured"))
    return misplaced_measured (r, c), NULL;
  if (!lw_load_is_element (c, "variants"))
    return lw_load_missing (r, root, c, "variants", "<sampling>, <measured> and <requirements>"),
           NULL;
  static const char *const variants_attrs[] = { "active", NULL };
  if (!lw_load_check_attributes (r, c, "", variants_attrs))
    return NULL;
  g_autofree char *active = lw_load_attribute (c, "active");
  const xmlNode *vs = c;
  for (const xmlNode *v = lw_load_next_element (r, c, c->children); v != NULL;
       v = lw_load_next_element (r, c, v->next))
    {
      if (!lw_load_is_element (v, "variant"))
        return lw_load_fail (r, v, LW_DESIGN_ERROR_SCHEMA, ": unexpected in <variants>; expected "
                     "<variant>"), NULL;
      if (!read_variant (r, v, d))
        return NULL;
    }
  if (r->error != NULL)
    return NULL;
  if (d->n_variants == 0)
    return lw_load_fail (r, vs, LW_DESIGN_ERROR_SCHEMA, ": needs at least one <variant>"), NULL;
  if (active != NULL)
    {
      gssize i = lw_design_find_variant (d, active);
      if (i < 0)
        return lw_load_fail (r, vs, LW_DESIGN_ERROR_VALUE, ": attribute 'active' names no variant: '%s'",
                     active), NULL;
      d->active = (size_t) i;
    }
  c = lw_load_next_element (r, root, c->next);
  if (r->error != NULL)
    return NULL;

  if (lw_load_is_element (c, "view"))
    {
      if (!read_view (r, c, d))
        return NULL;
      c = lw_load_next_element (r, root, c->next);
      if (r->error != NULL)
        return NULL;
    }
  if (lw_load_is_element (c, "measured"))
    return misplaced_measured (r, c), NULL;
  if (c != NULL)
    return lw_load_fail (r, c, LW_DESIGN_ERROR_SCHEMA, ": unexpected element in <design> (after "
                 "<variants> only <view> may follow)"), NULL;
  return g_steal_pointer (&d);
}
