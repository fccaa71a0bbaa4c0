/* lw-bench-family — a plant family evaluated (lw-family.h): an order-6 plant (a rigid body, a
 * belt mode and a sensor pair, three parameters with ranges), the variant's controller a gain,
 * a lead and a notch, MEMBERS drawn members (default 1000) besides the nominal and the 8
 * corners, the worst-member search on, with THREADS worker threads (default: the processors).
 * Prints the wall-clock seconds of the evaluation (best of 3), the members evaluated and the
 * milliseconds per member. A benchmark, not a test: the goal (issue 15) is a 1000-member
 * family in at most 1 s on 2 cores.
 * Then, on one thread, the cost per member of the loops drawn in the figures (the worst
 * members and 40 others): sampled afresh on 300 and on 120 points (lw_family_loops), and on
 * 120 points with the sampled plants reused (lw_family_loops_again: the window's drag), each
 * against one single evaluation of the variant by the engine (lw_engine_evaluate_variant,
 * the nominal plant, the engine's default grid and the step).
 *   lw-bench-family [MEMBERS [THREADS]]
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <stdio.h>
#include <stdlib.h>

#include <glib.h>

#include "lw-engine.h"
#include "lw-family.h"

/* Best of 5 of the wall-clock milliseconds of fn (data). */
typedef struct
{
  const LwDesign *d;
  const LwFamily *f;
  const LwFamilyLoops *base;
  size_t points;
  size_t n;
} LoopsJob;

static double
per_member_ms (LoopsJob *j, int mode)
{
  double best = 1e300;
  for (int round = 0; round < 5; round++)
    {
      gint64 t0 = g_get_monotonic_time ();
      LwFamilyLoops *l = NULL;
      LwVariantEval *e = NULL;
      if (mode == 0)
        l = lw_family_loops (j->d, 0, j->f, 40, j->points);
      else if (mode == 1)
        l = lw_family_loops_again (j->base, j->d, 0, j->points);
      else
        {
          LwEngineOptions eo;
          lw_engine_options_init (&eo);
          e = lw_engine_evaluate_variant (j->d, 0, &eo, NULL);
        }
      double ms = (double) (g_get_monotonic_time () - t0) / 1e3;
      size_t n = l != NULL ? l->n : 1;
      j->n = n;
      lw_family_loops_free (l);
      if (e != NULL)
        lw_variant_eval_unref (e);
      if (ms / (double) n < best)
        best = ms / (double) n;
    }
  return best;
}

static const char doc[] =
  "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
  "<design xmlns=\"urn:loopwright:design\" version=\"1\">\n"
  "  <title>bench family</title>\n"
  "  <plant dead_time_s=\"0\">K*wn^2*ws^2/(s*(s+8)*(s^2+2*0.02*wn*s+wn^2)"
  "*(s^2+1.4*ws*s+ws^2))</plant>\n"
  "  <parameters>\n"
  "    <parameter name=\"K\" nominal=\"180\" low=\"140\" high=\"240\"/>\n"
  "    <parameter name=\"wn\" nominal=\"200\" low=\"160\" high=\"260\" spread=\"log\"/>\n"
  "    <parameter name=\"ws\" nominal=\"3000\" low=\"2000\" high=\"4000\"/>\n"
  "  </parameters>\n"
  "  <sampling period_s=\"0.001\" hold=\"zero-order\" compute_delay_samples=\"1\"/>\n"
  "  <variants active=\"a\">\n"
  "    <variant name=\"a\">\n"
  "      <gain ratio=\"2\"/>\n"
  "      <lead zero_rad_s=\"15\" pole_rad_s=\"110\"/>\n"
  "      <notch centre_rad_s=\"200\" depth_db=\"40\" width_rad_s=\"400\"/>\n"
  "    </variant>\n"
  "  </variants>\n"
  "</design>\n";

int
main (int argc, char **argv)
{
  size_t members = argc > 1 ? strtoul (argv[1], NULL, 10) : 1000;
  guint threads = argc > 2 ? (guint) strtoul (argv[2], NULL, 10) : 0;
  GError *error = NULL;
  LwDesign *d = lw_design_load_data (doc, sizeof doc - 1, "bench.lwd", &error);
  if (d == NULL)
    {
      fprintf (stderr, "%s\n", error->message);
      return 1;
    }
  LwFamilyOptions o;
  lw_family_options_init (&o);
  o.members = members;
  o.threads = threads;
  double best = 1e300;
  size_t n = 0;
  double worst_pm = 0.0;
  for (int round = 0; round < 3; round++)
    {
      gint64 t0 = g_get_monotonic_time ();
      LwFamily *f = lw_family_evaluate (d, 0, &o, &error);
      double s = (double) (g_get_monotonic_time () - t0) / 1e6;
      if (f == NULL)
        {
          fprintf (stderr, "%s\n", error->message);
          return 1;
        }
      n = f->n_members;
      worst_pm = f->worst[LW_FAMILY_PHASE_MARGIN] != G_MAXSIZE
                   ? f->members[f->worst[LW_FAMILY_PHASE_MARGIN]].figure[LW_FAMILY_PHASE_MARGIN]
                   : 0.0;
      lw_family_free (f);
      if (s < best)
        best = s;
    }
  printf ("members %zu (threads %u): %.3f s, %.3f ms per member; worst phase margin %.3f deg\n",
          n, threads > 0 ? threads : g_get_num_processors (), best, 1e3 * best / (double) n,
          worst_pm);

  /* the drawn members' loops, one thread */
  o.threads = 1;
  o.members = 100;
  LwFamily *f = lw_family_evaluate (d, 0, &o, &error);
  LwFamilyLoops *base = lw_family_loops (d, 0, f, 40, 120);
  LoopsJob j = { .d = d, .f = f, .base = base, .points = 300 };
  double single = per_member_ms (&j, 2);
  double fresh300 = per_member_ms (&j, 0);
  j.points = 120;
  double fresh120 = per_member_ms (&j, 0);
  double again120 = per_member_ms (&j, 1);
  printf ("one evaluation of the variant (engine, default grid, step): %.3f ms\n", single);
  printf ("drawn members (%zu), per member: sampled afresh, 300 points %.3f ms (%.1fx faster); "
          "120 points %.3f ms (%.1fx); plants reused, 120 points %.3f ms (%.1fx)\n",
          j.n, fresh300, single / fresh300, fresh120, single / fresh120, again120,
          single / again120);
  lw_family_loops_free (base);
  lw_family_free (f);
  lw_design_free (d);
  return 0;
}
