/* lw-cli-family-members.c — every member of a plant family, for `analyze --each-member`:
 * its parameter values (and operating point), where it comes from, whether its loop is
 * stable, and its figures (lw-cli-family-members.h; docs/families.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>

#include "lw-cli-family-members.h"
#include "lw-cli-json.h"

static const char *const origin_names[] = { "nominal", "corner", "sample", "search", "point" };

static const char *
origin_name (LwFamilyOrigin o)
{
  return (size_t) o < G_N_ELEMENTS (origin_names) ? origin_names[o] : "member";
}

static const char *const figure_keys[LW_FAMILY_N_FIGURES] = {
  "phase_margin_deg", "gain_margin_db", "delay_margin_s", "sensitivity_peak", "overshoot_pct",
  "settling_time_s"
};

void
lw_cli_family_members_json (JsonObject *family, const LwFamily *f)
{
  g_autoptr (JsonBuilder) b = json_builder_new ();
  json_builder_begin_array (b);
  for (size_t i = 0; i < f->n_members; i++)
    {
      const LwFamilyMember *m = &f->members[i];
      json_builder_begin_object (b);
      json_builder_set_member_name (b, "values");
      json_builder_begin_object (b);
      for (size_t k = 0; k < f->n_params; k++)
        {
          json_builder_set_member_name (b, f->names[k]);
          lw_cli_json_add_number (b, m->values[k]);
        }
      json_builder_end_object (b);
      json_builder_set_member_name (b, "origin");
      json_builder_add_string_value (b, origin_name (m->origin));
      if (m->point != NULL)
        {
          json_builder_set_member_name (b, "point");
          json_builder_add_string_value (b, m->point);
        }
      json_builder_set_member_name (b, "evaluated");
      json_builder_add_boolean_value (b, m->evaluated);
      if (!m->evaluated)
        {
          json_builder_set_member_name (b, "error");
          json_builder_add_string_value (b, m->error != NULL ? m->error : "");
        }
      else
        {
          json_builder_set_member_name (b, "stable");
          json_builder_add_boolean_value (b, m->stable);
          for (int k = 0; k < LW_FAMILY_N_FIGURES; k++)
            {
              json_builder_set_member_name (b, figure_keys[k]);
              if (m->has[k])
                lw_cli_json_add_number (b, m->figure[k]);
              else
                json_builder_add_null_value (b);
            }
          json_builder_set_member_name (b, "crossover_rad_s");
          if (m->has_crossover)
            lw_cli_json_add_number (b, m->crossover_rad_s);
          else
            json_builder_add_null_value (b);
        }
      json_builder_end_object (b);
    }
  json_builder_end_array (b);
  json_object_set_member (family, "each_member", json_builder_get_root (b));
}

/* A figure in a column of the table: "—" where the member has none. */
static void
print_figure (gboolean has, double v, int width)
{
  if (has && isfinite (v))
    printf (" %*.*g", width, 5, v);
  else
    printf (" %*s", width, "\u2014");
}

void
lw_cli_family_members_print (const LwFamily *f)
{
  printf ("\nEvery member (%zu):\n  #     origin  ", f->n_members);
  for (size_t k = 0; k < f->n_params; k++)
    printf (" %10s", f->names[k]);
  printf ("   PM (deg)   GM (dB)    DM (s)       Ms   OS (%%)    Ts (s)  stable\n");
  for (size_t i = 0; i < f->n_members; i++)
    {
      const LwFamilyMember *m = &f->members[i];
      printf ("  %-5zu %-8s", i, origin_name (m->origin));
      for (size_t k = 0; k < f->n_params; k++)
        printf (" %10.5g", m->values[k]);
      if (!m->evaluated)
        {
          printf ("   not evaluated: %s\n", m->error != NULL ? m->error : "");
          continue;
        }
      const int widths[LW_FAMILY_N_FIGURES] = { 10, 9, 9, 8, 8, 9 };
      for (int k = 0; k < LW_FAMILY_N_FIGURES; k++)
        print_figure (m->has[k], m->figure[k], widths[k]);
      printf ("  %s", m->stable ? "yes" : "NO");
      if (m->point != NULL)
        printf ("  point '%s'", m->point);
      printf ("\n");
    }
}
