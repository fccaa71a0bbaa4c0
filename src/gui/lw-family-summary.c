/* lw-family-summary.c — a plant family in words for the window's panel: its members, the
 * worst phase and gain margin and sensitivity peak with the members giving them (an operating
 * point by its name), and the requirements passing on every member (lw-family-summary.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib/gi18n.h>

#include "lw-family-summary.h"

/* " (K = 150, wn = 225)" of a member (the parameters with a range only); an operating point
 * by its name: " at “full” (K = 150, wn = 225)" */
static void
append_member (GString *t, const LwFamily *f, const LwDesign *d, size_t index)
{
  if (index >= f->n_members)
    return;
  if (f->members[index].point != NULL)
    g_string_append_printf (t, _(" at “%s”"), f->members[index].point);
  gboolean first = TRUE;
  for (size_t i = 0; i < f->n_params && i < d->n_params; i++)
    if (d->params[i].ranged)
      {
        g_string_append_printf (t, "%s%s = %.4g", first ? " (" : ", ", f->names[i],
                                f->members[index].values[i]);
        first = FALSE;
      }
  if (!first)
    g_string_append_c (t, ')');
}

char *
lw_family_summary (const LwFamily *family, const LwDesign *d, const GError *error)
{
  GString *t = g_string_new (NULL);
  if (family == NULL)
    g_string_append_printf (t, _("Plant family: not evaluated: %s"), error->message);
  else
    {
      g_string_append_printf (t, _("Plant family: %zu members"), family->n_members);
      if (family->n_unstable > 0)
        g_string_append_printf (t, _(", %zu with the loop NOT stable"), family->n_unstable);
      /* judged on the data: the members are the model's (the CLI's words,
       * LW_CLI_FAMILY_ON_MODEL_NOTE; docs/families.md) */
      if (lw_design_analysis_on_data (d))
        {
          g_string_append_c (t, '\n');
          g_string_append (t, lw_family_on_model_note ());
        }
      const LwFamilyFigure shown[] = { LW_FAMILY_PHASE_MARGIN, LW_FAMILY_GAIN_MARGIN,
                                       LW_FAMILY_SENSITIVITY };
      for (size_t k = 0; k < G_N_ELEMENTS (shown); k++)
        {
          size_t w = family->worst[shown[k]];
          if (w == G_MAXSIZE)
            continue;
          double v = family->members[w].figure[shown[k]];
          g_string_append_c (t, '\n');
          if (shown[k] == LW_FAMILY_PHASE_MARGIN)
            g_string_append_printf (t, _("worst phase margin %.4g°"), v);
          else if (shown[k] == LW_FAMILY_GAIN_MARGIN)
            g_string_append_printf (t, _("worst gain margin %.4g dB"), v);
          else
            g_string_append_printf (t, _("worst sensitivity peak %.4g"), v);
          append_member (t, family, d, w);
        }
      if (family->n_requirements > 0)
        {
          g_string_append_c (t, '\n');
          g_string_append_printf (t, _("%zu of %zu requirements pass on every member"),
                                  family->n_requirements - family->n_not_passing,
                                  family->n_requirements);
        }
    }
  return g_string_free (t, FALSE);
}

const char *
lw_family_on_model_note (void)
{
  return _("these are the plant model's members (the family is on the plant model; the design "
           "is judged on the measured data)");
}

char *
lw_family_member_words (const LwFamily *f, const LwDesign *d, size_t index)
{
  GString *t = g_string_new (NULL);
  append_member (t, f, d, index);
  /* without the parentheses the summary puts it in */
  if (t->len >= 3 && t->str[0] == ' ' && t->str[1] == '(')
    {
      g_string_erase (t, 0, 2);
      g_string_truncate (t, t->len - 1);
    }
  else if (index == 0)
    g_string_assign (t, _("nominal"));
  return g_string_free (t, FALSE);
}
