/* lw-bench-delay — cost of a long whole-sample dead time: discretization, the whole evaluation
 * (frequency response, crossovers, Nyquist count or closed-loop eigenvalues, dominant poles,
 * step response) and one simulated reference step with actuator limits and continuous output,
 * for dead times of 10² … 10⁶ samples. Each size runs in a child process so that its peak
 * resident memory is its own (getrusage of the child via wait4).
 * Prints one line per size: samples, seconds of evaluation and of simulation, peak RSS in MB.
 * Workload: a kiln, 1.5/((40 s + 1)(6 s + 1)), T = 0.01 s, PI 0.2 (z − 0.9995)/(z − 1) in z,
 * one sample of computation delay, 500 step samples, 20 sub-steps. A benchmark, not a test:
 * the goals (docs/benchmarks.md) are 10⁴ samples evaluated in under 0.2 s and 10⁶ in under
 * 5 s and 200 MB.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#define _DEFAULT_SOURCE
#include <stdio.h>
#include <stdlib.h>
#include <sys/resource.h>
#include <sys/time.h>
#include <sys/types.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

#include "lw-analysis.h"
#include "lw-expr.h"
#include "lw-simulate.h"

static double
now_s (void)
{
  struct timespec ts;
  clock_gettime (CLOCK_MONOTONIC, &ts);
  return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

static int
one (long samples)
{
  const double t = 0.01;
  LwError err;
  LwModel *p = NULL, *c = NULL;
  if (lw_expr_parse ("1.5/((40*s+1)*(6*s+1))", LW_DOMAIN_S, 0, &p, &err) != LW_OK
      || lw_expr_parse ("0.2*(z-0.9995)/(z-1)", LW_DOMAIN_Z, t, &c, &err) != LW_OK)
    {
      fprintf (stderr, "lw-bench-delay: %s\n", err.message);
      return 1;
    }
  double t0 = now_s ();
  LwSampledPlant *sp = NULL;
  LwEvaluation *ev = NULL;
  LwAnalysisOptions o;
  lw_analysis_options_init (&o);
  if (lw_sampled_plant_new (p, (double) samples * t, t, &sp, &err) != LW_OK
      || lw_evaluate (sp, c, &o, &ev, &err) != LW_OK)
    {
      fprintf (stderr, "lw-bench-delay: %ld samples: %s\n", samples, err.message);
      return 1;
    }
  double t1 = now_s ();
  LwSimOptions so;
  lw_sim_options_init (&so);
  so.has_limits = true;
  so.u_low = -2.0;
  so.u_high = 2.0;
  so.anti_windup = true;
  LwSimPlan *plan = NULL;
  LwSimResponse *r = NULL;
  if (lw_sim_plan_new (sp, c, &so, &plan, &err) != LW_OK
      || lw_sim_run (plan, LW_SIM_REFERENCE_STEP, 1.0, &r, &err) != LW_OK)
    {
      fprintf (stderr, "lw-bench-delay: %ld samples: simulation: %s\n", samples, err.message);
      return 1;
    }
  double t2 = now_s ();
  printf ("%8ld samples: evaluation %8.4f s, simulation %8.4f s, %s, order %zu, %zu poles%s",
          samples, t1 - t0, t2 - t1, ev->stable ? "stable" : "unstable", ev->closed_loop_order,
          ev->n_closed_loop_poles, ev->closed_loop_poles_complete ? " (all)" : " (dominant)");
  fflush (stdout);
  lw_sim_response_free (r);
  lw_sim_plan_free (plan);
  lw_evaluation_free (ev);
  lw_sampled_plant_free (sp);
  lw_model_free (p);
  lw_model_free (c);
  return 0;
}

int
main (int argc, char **argv)
{
  long sizes[] = { 100, 1000, 10000, 100000, 999999 };   /* + 1 computation delay */
  size_t n = sizeof sizes / sizeof sizes[0];
  if (argc > 1)
    {
      sizes[0] = atol (argv[1]);
      n = 1;
    }
  for (size_t i = 0; i < n; i++)
    {
      fflush (stdout);
      pid_t pid = fork ();
      if (pid < 0)
        return 1;
      if (pid == 0)
        _exit (one (sizes[i]));
      int status = 0;
      struct rusage ru;
      if (wait4 (pid, &status, 0, &ru) < 0 || !WIFEXITED (status) || WEXITSTATUS (status) != 0)
        {
          printf ("%8ld samples: failed\n", sizes[i]);
          return 1;
        }
      printf (", peak RSS %.1f MB\n", (double) ru.ru_maxrss / 1024.0);
    }
  return 0;
}
