/* lw-cli-family-plot.c — a plant family in `plot`'s figures: the family of a document's
 * variant or of the loop options (--range, --point), the loops of the members drawn, as
 * figure data (lw-cli-family-plot.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdint.h>

#include "lw-cli-doc.h"
#include "lw-cli-family-plot.h"

/* The views a plant family is drawn in (its members' loops, |S|, steps and closed-loop
 * poles; not the disturbance steps). */
bool
lw_cli_family_plot_view (LwPlotView v)
{
  return v != LW_PLOT_VIEW_DISTURBANCE;
}

/* The loops of the members drawn, as figure data: the worst phase margin's member marked. */
static void
fill (const LwFamily *f, const LwFamilyLoops *l, LwFigureFamily *ff)
{
  size_t w = f->worst[LW_FAMILY_PHASE_MARGIN];
  lw_figure_family_fill (ff, f->n_members, l->n, l->plant, l->ev,
                         l->worst_pm != G_MAXSIZE ? l->worst_pm : SIZE_MAX,
                         w != G_MAXSIZE ? f->members[w].figure[LW_FAMILY_PHASE_MARGIN] : NAN);
}

/* The family of variant `variant` of d (--members, --seed) and the loops of the members
 * drawn, into *ff for the figure. */
int
lw_cli_family_plot (const char *path, const LwDesign *d, size_t variant, const LwCliFamilyArgs *fa,
             LwFamily **family, LwFamilyLoops **loops, LwFigureFamily *ff)
{
  LwFamilyOptions fo;
  int status = lw_cli_family_options (fa, d, &fo);
  if (status != LW_EXIT_OK)
    return status;
  g_autoptr (GError) error = NULL;
  *family = lw_family_evaluate (d, variant, &fo, &error);
  if (*family == NULL)
    {
      lw_cli_bad_input (path, "the plant family: %s", error->message);
      return LW_EXIT_BAD_INPUT;
    }
  *loops = lw_family_loops (d, variant, *family, LW_FAMILY_LOOPS_OTHERS, 0);
  fill (*family, *loops, ff);
  return LW_EXIT_OK;
}

int
lw_cli_family_plot_loop (const LwCliLoopArgs *loop, const LwCliFamilyArgs *fa,
                         const LwCliLoop *lp, bool draw, LwFamily **family,
                         LwFamilyLoops **loops, LwFigureFamily *ff)
{
  *family = NULL;
  *loops = NULL;
  if (!lw_cli_family_wanted (fa, NULL))
    return LW_EXIT_OK;
  LwFamilyOptions fo;
  int status = lw_cli_family_options (fa, NULL, &fo);
  if (status != LW_EXIT_OK)
    return status;
  g_autoptr (LwDesign) fd = NULL;
  status = lw_cli_family_design (loop, fa, lp, &fd);
  if (status != LW_EXIT_OK || !draw)
    return status;
  /* the members as analyze evaluates them with the same options (lw-cmd-analyze.c) */
  GError *error = NULL;
  *family = lw_family_evaluate_controller (fd, lp->period_s, lp->controller_z, &fo, &error);
  if (*family == NULL)
    {
      status = lw_cli_report_gerror ("family", error);
      g_error_free (error);
      return status;
    }
  *loops = lw_family_loops_controller (fd, lp->period_s, lp->controller_z, *family,
                                       LW_FAMILY_LOOPS_OTHERS, 0);
  fill (*family, *loops, ff);
  return LW_EXIT_OK;
}
