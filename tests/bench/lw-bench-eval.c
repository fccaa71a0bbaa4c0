/* lw-bench-eval — times the whole evaluation `loopwright-cli analyze` does (discretize,
 * frequency response, every crossover and margin, closed-loop poles, step response), without
 * process start and printing, on the standard workload of docs/benchmarks.md.
 * Prints one line per order: "order 10: 312.5 us per evaluation". A benchmark, not a test.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "lw-analysis.h"
#include "lw-expr.h"

static double
now_s (void)
{
  struct timespec ts;
  clock_gettime (CLOCK_MONOTONIC, &ts);
  return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

/* g / (s · ∏ₖ (s² + 0.6·ωₖ·s + ωₖ²)) with ωₖ = 20·k, k = 1 … ⌊(n−1)/2⌋, times 3/(s+3) when n is
 * even; g = ∏ ωₖ² (times 3 when n is even). */
static void
workload_plant (int n, char *buf, size_t size)
{
  int pairs = (n - 1) / 2;
  double g = 1.0;
  for (int k = 1; k <= pairs; k++)
    g *= (20.0 * k) * (20.0 * k);
  if (n % 2 == 0)
    g *= 3.0;
  size_t len = (size_t) snprintf (buf, size, "%.17g/(s", g);
  for (int k = 1; k <= pairs && len < size; k++)
    {
      double w = 20.0 * k;
      len += (size_t) snprintf (buf + len, size - len, "*(s^2+%.17g*s+%.17g)", 0.6 * w, w * w);
    }
  if (n % 2 == 0 && len < size)
    len += (size_t) snprintf (buf + len, size - len, "*(s+3)");
  if (len < size)
    snprintf (buf + len, size - len, ")");
}

int
main (int argc, char **argv)
{
  const int orders[] = { 4, 10, 20, 40 };
  double min_seconds = argc > 1 ? atof (argv[1]) : 1.0;
  const double t = 0.01;
  LwError err;
  LwModel *cw = NULL;
  if (lw_expr_parse ("50*(w+0.2)*(w+2)*(w+4)/(w*(w+20)*(w+40))", LW_DOMAIN_W, t, &cw, &err))
    {
      fprintf (stderr, "lw-bench-eval: controller: %s\n", err.message);
      return 1;
    }
  LwAnalysisOptions o;
  lw_analysis_options_init (&o);
  o.compute_delay = 1;
  o.n_points = 2000;
  o.n_steps = 2000;
  for (size_t i = 0; i < sizeof orders / sizeof orders[0]; i++)
    {
      char text[4096];
      workload_plant (orders[i], text, sizeof text);
      LwModel *p = NULL;
      if (lw_expr_parse_proper (text, LW_DOMAIN_S, 0, &p, &err))
        {
          fprintf (stderr, "lw-bench-eval: plant: %s\n", err.message);
          return 1;
        }
      /* median of batches; each batch long enough for the clock */
      double times[64];
      int nb = 0;
      double start_all = now_s ();
      long evals = 0;
      while (nb < 64 && (nb < 5 || now_s () - start_all < min_seconds))
        {
          int reps = 20;
          double t0 = now_s ();
          for (int r = 0; r < reps; r++)
            {
              LwModel *cz = lw_model_w_to_z (cw);
              LwSampledPlant *sp = NULL;
              LwEvaluation *ev = NULL;
              if (lw_sampled_plant_new (p, 0.0, t, &sp, &err) != LW_OK
                  || lw_evaluate (sp, cz, &o, &ev, &err) != LW_OK)
                {
                  fprintf (stderr, "lw-bench-eval: order %d: %s\n", orders[i], err.message);
                  return 1;
                }
              lw_evaluation_free (ev);
              lw_sampled_plant_free (sp);
              lw_model_free (cz);
            }
          times[nb++] = (now_s () - t0) / reps;
          evals += reps;
        }
      for (int a = 1; a < nb; a++)
        for (int b = a; b > 0 && times[b] < times[b - 1]; b--)
          {
            double x = times[b];
            times[b] = times[b - 1];
            times[b - 1] = x;
          }
      printf ("order %d: %.1f us per evaluation\n", orders[i], 1e6 * times[nb / 2]);
      fflush (stdout);
      lw_model_free (p);
    }
  lw_model_free (cw);
  return 0;
}
