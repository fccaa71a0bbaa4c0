/* lw-measured-family-summary.c — a measured family in words for the window's panel
 * (lw-measured-family-summary.h): the figures are lw_measured_family_evaluate's, as `analyze`
 * prints them (docs/families.md, "Measured families").
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <glib/gi18n.h>

#include "lw-measured-family-summary.h"

char *
lw_measured_family_summary (const LwMeasuredFamily *f, const GError *error)
{
  GString *t = g_string_new (NULL);
  if (f == NULL)
    {
      g_string_append_printf (t, _("Measured family: not evaluated: %s"),
                              error != NULL ? error->message : "");
      return g_string_free (t, FALSE);
    }
  g_string_append_printf (t, _("Measured family: %zu responses"), f->n_sets);
  if (f->n_unstable > 0)
    g_string_append_printf (t, _(", %zu with the loop NOT stable on the data"), f->n_unstable);
  if (f->n_undecided > 0)
    g_string_append_printf (t, _(", %zu whose stability the data leave undecided"),
                            f->n_undecided);
  if (f->n_failed > 0)
    g_string_append_printf (t, _(", %zu not closed at this variant's period"), f->n_failed);
  for (int k = 0; k < LW_MEASURED_FAMILY_N_FIGURES; k++)
    {
      size_t w = f->worst[k];
      if (w >= f->n_sets)
        continue;
      double v = f->worst_value[k];
      g_string_append_c (t, '\n');
      /* the plant family's words for the figures (lw-family-summary.c) */
      if (k == LW_MEASURED_FAMILY_PHASE_MARGIN)
        g_string_append_printf (t, _("worst phase margin %.4g°"), v);
      else if (k == LW_MEASURED_FAMILY_GAIN_MARGIN)
        g_string_append_printf (t, _("worst gain margin %.4g dB"), v);
      else
        g_string_append_printf (t, _("worst sensitivity peak %.4g"), v);
      g_string_append_printf (t, _(" on “%s”"), f->sets[w].name);
    }
  size_t judged = 0;
  for (size_t r = 0; r < f->n_requirements; r++)
    judged += f->judged_requirement[r];
  g_string_append_c (t, '\n');
  if (!f->judged)
    g_string_append (t, _("shown for information, not judged (the design is judged on the "
                          "plant model)"));
  else if (judged > 0)
    g_string_append_printf (t, _("%zu of %zu requirements judged on the data pass on every "
                                 "response"), judged - f->n_not_passing, judged);
  else
    g_string_append (t, _("no requirement is judged on the data"));
  return g_string_free (t, FALSE);
}
