/* lw-cli-family-plot.c — a plant family in `plot`'s figures: the family of a document's
 * variant, the loops of the members drawn, as figure data (lw-cli-family-plot.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdint.h>

#include "lw-cli-family-plot.h"

/* The views a plant family is drawn in (its members' loops, |S|, steps and closed-loop
 * poles; not the disturbance steps). */
bool
lw_cli_family_plot_view (LwPlotView v)
{
  return v != LW_PLOT_VIEW_DISTURBANCE;
}

/* The family of variant `variant` of d (--members, --seed) and the loops of the members
 * drawn, into *ff for the figure. */
int
lw_cli_family_plot (const char *path, const LwDesign *d, size_t variant, const LwCliFamilyArgs *fa,
             LwFamily **family, LwFamilyLoops **loops, LwFigureFamily *ff)
{
  if (fa->ranges != NULL && fa->ranges[0] != NULL)
    {
      lw_cli_bad_input ("--range", "not with a design document: its <parameters> give the "
                        "ranges");
      return LW_EXIT_BAD_INPUT;
    }
  LwFamilyOptions fo;
  int status = lw_cli_family_options (fa, &fo);
  if (status != LW_EXIT_OK)
    return status;
  g_autoptr (GError) error = NULL;
  *family = lw_family_evaluate (d, variant, &fo, &error);
  if (*family == NULL)
    {
      lw_cli_bad_input (path, "the plant family: %s", error->message);
      return LW_EXIT_BAD_INPUT;
    }
  const LwFamily *f = *family;
  *loops = lw_family_loops (d, variant, f, LW_FAMILY_LOOPS_OTHERS, 0);
  const LwFamilyLoops *l = *loops;
  size_t w = f->worst[LW_FAMILY_PHASE_MARGIN];
  lw_figure_family_fill (ff, f->n_members, l->n, l->plant, l->ev,
                         l->worst_pm != G_MAXSIZE ? l->worst_pm : SIZE_MAX,
                         w != G_MAXSIZE ? f->members[w].figure[LW_FAMILY_PHASE_MARGIN] : NAN);
  return LW_EXIT_OK;
}
