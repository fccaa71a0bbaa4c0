/* lw-design-save.c — a design written: numbers in their shortest round-trip form, the
 * canonical text (docs/file-format.md) and the atomic save.
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
  if (d->input_unit != NULL)
    attr_text (o, "input_unit", d->input_unit);
  if (d->output_unit != NULL)
    attr_text (o, "output_unit", d->output_unit);
  g_string_append_c (o, '>');
  append_escaped (o, d->plant, FALSE);
  g_string_append (o, "</plant>\n");
  if (d->n_params > 0)
    {
      indent (o, 1);
      g_string_append (o, "<parameters");
      if (d->has_family_members)
        g_string_append_printf (o, " members=\"%zu\"", d->family_members);
      if (d->has_family_seed)
        g_string_append_printf (o, " seed=\"%" G_GUINT64_FORMAT "\"", d->family_seed);
      g_string_append (o, ">\n");
      for (size_t i = 0; i < d->n_params; i++)
        {
          const LwDesignParam *p = &d->params[i];
          indent (o, 2);
          g_string_append (o, "<parameter");
          attr_text (o, "name", p->name);
          attr_number (o, "nominal", p->nominal);
          if (p->ranged)
            {
              attr_number (o, "low", p->low);
              attr_number (o, "high", p->high);
              if (p->spread == LW_SPREAD_LOG)
                attr_text (o, "spread", "log");
            }
          g_string_append (o, "/>\n");
        }
      for (size_t i = 0; i < d->n_points; i++)
        {
          const LwDesignPoint *p = &d->points[i];
          indent (o, 2);
          g_string_append (o, "<point");
          attr_text (o, "name", p->name);
          g_string_append (o, p->n_values > 0 ? ">\n" : "/>\n");
          for (size_t v = 0; v < p->n_values; v++)
            {
              indent (o, 3);
              g_string_append (o, "<value");
              attr_text (o, "parameter", p->values[v].parameter);
              attr_number (o, "value", p->values[v].value);
              g_string_append (o, "/>\n");
            }
          if (p->n_values > 0)
            {
              indent (o, 2);
              g_string_append (o, "</point>\n");
            }
        }
      indent (o, 1);
      g_string_append (o, "</parameters>\n");
    }

  indent (o, 1);
  g_string_append (o, "<sampling");
  attr_number (o, "period_s", d->period_s);
  attr_text (o, "hold", "zero-order");
  g_string_append_printf (o, " compute_delay_samples=\"%d\"/>\n", d->compute_delay);
  lw_design_write_measured (o, d, attr_text);

  if (d->n_requirements > 0)
    {
      indent (o, 1);
      g_string_append (o, "<requirements>\n");
      for (size_t i = 0; i < d->n_requirements; i++)
        {
          const LwDesignRequirement *r = &d->requirements[i];
          const LwDocReqKind *k = lw_doc_req_kind (r->req.kind);
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
      if (v->compared)
        attr_text (o, "compared", "true");
      bool all_responses = v->responses == LW_DESIGN_RESPONSES_ALL;
      if (v->notes == NULL && v->n_stages == 0 && !v->has_actuator && all_responses)
        {
          g_string_append (o, "/>\n");
          continue;
        }
      g_string_append (o, ">\n");
      if (v->notes != NULL)
        text_element (o, 3, "notes", v->notes);
      if (v->has_actuator)
        {
          indent (o, 3);
          g_string_append (o, "<actuator");
          attr_number (o, "low", v->u_low);
          attr_number (o, "high", v->u_high);
          if (v->anti_windup)
            attr_text (o, "anti_windup", "true");
          if (v->reference_step > 0.0)
            attr_number (o, "reference_step", v->reference_step);
          g_string_append (o, "/>\n");
        }
      if (!all_responses)
        {
          GString *list = g_string_new (NULL);
          for (unsigned k = 0; k < LW_DESIGN_N_RESPONSES; k++)
            if (v->responses & (1u << k))
              g_string_append_printf (list, "%s%s", list->len > 0 ? " " : "",
                                      lw_design_response_name (k));
          indent (o, 3);
          g_string_append (o, "<responses");
          attr_text (o, "shows", list->str);
          g_string_append (o, "/>\n");
          g_string_free (list, TRUE);
        }
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
  if (o->len > LW_DESIGN_MAX_BYTES)
    {
      /* a file the loader would refuse is not written (a long measured table makes one) */
      g_set_error (error, LW_DESIGN_ERROR, LW_DESIGN_ERROR_LIMIT,
                   "the document would be %zu bytes, more than the limit of %u bytes (8 MiB) "
                   "a document may have%s", o->len, LW_DESIGN_MAX_BYTES,
                   d->measured != NULL ? "; keep fewer points of the measured response" : "");
      g_string_free (o, TRUE);
      return NULL;
    }
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
