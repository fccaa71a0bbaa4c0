/* lw-evaluate.c — the sampled loop analyzed: frequency response on a densified grid, every
 * crossover refined, margins, sensitivity peak, bandwidth, closed-loop poles, step response.
 * Conventions: docs/conventions.md.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-evaluate-private.h"

void
lw_analysis_options_init (LwAnalysisOptions *o)
{
  o->compute_delay = 1;
  o->n_points = 2000;
  o->n_steps = 500;
  o->max_full_order = 150;
}

/* ---------------------------------------------------------------------------------------- */

void
lw_evaluation_free (LwEvaluation *ev)
{
  if (ev == NULL)
    return;
  lw_model_free (ev->plant_z);
  lw_model_free (ev->plant_w);
  lw_model_free (ev->controller_z);
  lw_model_free (ev->controller_w);
  free (ev->omega_rad_s);
  free (ev->loop_mag_db);
  free (ev->loop_phase_deg);
  free (ev->margins.gain_crossovers_rad_s);
  free (ev->margins.phase_margins_deg);
  free (ev->margins.phase_crossovers_rad_s);
  free (ev->margins.gain_margins_db);
  free (ev->margins.unresolved_bands_rad_s);
  free (ev->closed_loop_poles);
  free (ev->step.samples);
  free (ev);
}

LwStatus
lw_evaluate (const LwSampledPlant *plant, const LwModel *controller_z,
             const LwAnalysisOptions *opts, LwEvaluation **out, LwError *err)
{
  *out = NULL;
  if (plant == NULL || controller_z == NULL || opts == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "missing plant, controller or options");
  double t = plant->period_s;
  LwStatus cst = lw_check_loop_controller (plant, controller_z, opts->compute_delay, err);
  if (cst != LW_OK)
    return cst;
  if (opts->n_points < 16 || opts->n_points > 10000000)
    return lw_error_set (err, LW_ERR_INVALID, -1, "the number of frequency points must be 16 … 1e7");
  if (opts->n_steps < 2 || opts->n_steps > 100000000)
    return lw_error_set (err, LW_ERR_INVALID, -1, "the number of step samples must be 2 … 1e8");
  if ((long) plant->whole_delay + opts->compute_delay > 1000000)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the dead time (%d whole samples) plus the computation delay (%d) is "
                         "more than a million samples", plant->whole_delay, opts->compute_delay);
  if (opts->max_full_order > 2000)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the closed-loop order for every pole must be at most 2000");

  LwEvaluation *ev = calloc (1, sizeof *ev);
  if (ev == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
  LwStatus st = LW_OK;
  LwSs *css = NULL;
  ClosedLoop cl = { 0 };
  double complex *core = NULL;
  double *core_phase = NULL, *rel = NULL;
  bool *plain_ok = NULL;

  ev->period_s = t;
  ev->compute_delay = opts->compute_delay;
  ev->plant_z = lw_model_copy (plant->model);
  ev->controller_z = lw_model_copy (controller_z);
  if (ev->plant_z == NULL || ev->controller_z == NULL)
    {
      st = lw_error_set (err, LW_ERR_NUMERIC, -1, "could not factor the sampled plant");
      goto fail;
    }
  ev->plant_w = lw_model_z_to_w (ev->plant_z);
  ev->controller_w = lw_model_z_to_w (ev->controller_z);
  if (ev->plant_w == NULL || ev->controller_w == NULL)
    {
      st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
      goto fail;
    }

  Loop lp = { .plant = plant, .ctrl = ev->controller_z, .t = t, .omega_n = LW_PI / t,
              .delay = plant->whole_delay + opts->compute_delay, .order = plant->core->n };
  int n_int = plant->n_integrators
              + lw_ev_count_unit_roots (controller_z->poles, controller_z->n_poles)
              - lw_ev_count_unit_roots (controller_z->zeros, controller_z->n_zeros);

  /* grid and response */
  st = lw_ev_build_grid (&lp, plant->plant_s, n_int, opts->n_points, &ev->omega_rad_s, &ev->n_points,
                   err);
  if (st != LW_OK)
    goto fail;
  size_t n = ev->n_points;
  ev->loop_mag_db = calloc (n, sizeof (double));
  ev->loop_phase_deg = calloc (n, sizeof (double));
  core = calloc (n, sizeof *core);
  core_phase = calloc (n, sizeof (double));
  rel = calloc (n, sizeof (double));
  plain_ok = calloc (n, sizeof (bool));
  if (plain_ok == NULL || ev->loop_mag_db == NULL || ev->loop_phase_deg == NULL || core == NULL || core_phase == NULL
      || rel == NULL)
    {
      st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the frequency response");
      goto fail;
    }
  /* the response with an estimate of its relative error at every point: the error-aware
   * evaluation (running bound, and the aliasing sum where the state space is not accurate
   * enough) on every LW_GRID_STRIDE-th point and at π/T; between them the absolute error, which
   * varies slowly with ω, is taken as the larger of theirs and divided by the local |L|, and a
   * point whose estimate so found is above LW_REL_QUIET (or whose neighbours were not plainly
   * resolved) gets the error-aware evaluation of its own */
  for (size_t i = 0; i < n; i++)
    {
      bool full = i % LW_GRID_STRIDE == 0 || i + 1 == n;
      plain_ok[i] = false;
      core[i] = lw_ev_loop_core_eval (&lp, ev->omega_rad_s[i], full ? &rel[i] : NULL,
                                full ? &plain_ok[i] : NULL);
      if (!full)
        rel[i] = NAN;
      else if (!(rel[i] <= INFINITY))
        rel[i] = INFINITY;
    }
  for (size_t i = 0; i < n; i++)
    {
      if (!isnan (rel[i]))
        continue;
      size_t a = i - i % LW_GRID_STRIDE, b = a + LW_GRID_STRIDE < n ? a + LW_GRID_STRIDE : n - 1;
      bool need = !(plain_ok[a] && plain_ok[b]);
      if (!need)
        {
          double ea = rel[a] * cabs_fast (core[a]), eb = rel[b] * cabs_fast (core[b]);
          double ri = fmax (ea, eb) / cabs_fast (core[i]);
          need = !(ri <= LW_REL_QUIET);
          if (!need)
            {
              rel[i] = ri;
              plain_ok[i] = true;
            }
        }
      if (need)
        {
          core[i] = lw_ev_loop_core_eval (&lp, ev->omega_rad_s[i], &rel[i], &plain_ok[i]);
          if (!(rel[i] <= INFINITY))
            rel[i] = INFINITY;
        }
    }
  for (size_t i = 0; i < n; i++)
    {
      double re = creal (core[i]), im = cimag (core[i]);
      ev->loop_mag_db[i] = (10.0 / LW_LN10) * log (re * re + im * im);
    }
  /* unwrap the delay-free part continuously; anchor the first point at the branch nearest the
   * integrator asymptote −90°·k (or −90°·k − 180° for a negative low-frequency gain) */
  {
    double ph = carg (core[0]) * RAD2DEG, expect = -90.0 * n_int;
    ph = lw_ev_nearest_branch (ph, expect);
    if (fabs (ph - expect) > 90.0)
      ph = lw_ev_nearest_branch (ph, expect - 180.0);
    core_phase[0] = ph;
    /* at a zero of L on the unit circle (e.g. z = −1 from a controller that is strictly proper
     * in w) the phase is undefined, and where the error of L is half its size or more it is
     * unknown: hold the previous value there; no crossover is placed at such a point */
    for (size_t i = 1; i < n; i++)
      core_phase[i] = (ev->loop_mag_db[i] > -HUGE_VAL && isfinite (ev->loop_mag_db[i])
                       && rel[i] < 0.5)
                        ? lw_ev_nearest_branch (carg (core[i]) * RAD2DEG, core_phase[i - 1])
                        : core_phase[i - 1];
    for (size_t i = 0; i < n; i++)
      ev->loop_phase_deg[i] = core_phase[i] + lw_ev_delay_phase_deg (&lp, ev->omega_rad_s[i]);
  }
  lp.grid = ev->omega_rad_s;
  lp.core_phase = core_phase;
  lp.rel = rel;
  lp.plain_ok = plain_ok;
  lp.n = n;
  /* the full loop on the grid, for the sensitivity and bandwidth scans (reuses core[]) */
  for (size_t i = 0; i < n; i++)
    {
      double w = ev->omega_rad_s[i];
      if (lp.delay != 0)
        {
          double c, sn;
          if (lw_ev_at_nyquist (&lp, w))
            c = (lp.delay % 2) ? -1.0 : 1.0, sn = 0.0;
          else if (lp.delay == 1)
            c = cos (w * t), sn = -sin (w * t);
          else
            c = cos (w * t * lp.delay), sn = -sin (w * t * lp.delay);
          double re = creal (core[i]), im = cimag (core[i]);
          core[i] = (re * c - im * sn) + (re * sn + im * c) * I;
        }
    }
  st = lw_ev_find_margins (&lp, ev->loop_mag_db, core, n_int, &ev->margins, err);
  if (st != LW_OK)
    goto fail;

  /* closed loop */
  st = lw_model_realize (ev->controller_z, &css, err);
  if (st != LW_OK)
    goto fail;
  ev->closed_loop_order = plant->core->n + css->n + (size_t) lp.delay;
  bool long_path = ev->closed_loop_order > opts->max_full_order && lp.delay > 0;
  if (long_path)
    {
      bool resolved = false;
      st = lw_ev_closed_loop_long_delay (&lp, plant, ev, &resolved, err);
      if (st != LW_OK)
        goto fail;
      long_path = resolved;      /* else every pole after all (order <= 2000 here) */
    }
  if (!long_path)
    {
      /* every pole: eigenvalues of the closed-loop state space */
      st = lw_ev_closed_loop_build (plant->core, css, lp.delay, &cl, err);
      if (st != LW_OK)
        goto fail;
      ev->n_closed_loop_poles = cl.n;
      ev->closed_loop_poles = calloc (cl.n + 1, sizeof (double complex));
      if (ev->closed_loop_poles == NULL)
        {
          st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
          goto fail;
        }
      st = lw_eigenvalues (cl.n, cl.a, ev->closed_loop_poles, err);
      if (st != LW_OK)
        goto fail;
      double rmax = 0.0;
      for (size_t i = 0; i < cl.n; i++)
        {
          double r = cabs (ev->closed_loop_poles[i]);
          rmax = fmax (rmax, r);
          ev->n_closed_loop_unstable += !(r < 1.0 - 1e-10);
        }
      ev->stable = rmax < 1.0 - 1e-10;
      ev->closed_loop_poles_complete = true;
    }
  else
    {
      /* the final value needs only the loop at z = 1, where z^−D = z^−1: the closed loop with
       * one sample of delay has the same DC gain (its order stays small) */
      st = lw_ev_closed_loop_build (plant->core, css, 1, &cl, err);
      if (st != LW_OK)
        goto fail;
    }
  /* a delay margin is the delay that destabilizes a stable loop: none for an unstable one */
  if (!ev->stable && ev->margins.has_delay_margin)
    {
      ev->margins.has_delay_margin = false;
      ev->margins.delay_margin_s = 0.0;
      ev->margins.delay_margin_samples = 0.0;
    }

  /* step */
  ev->step.n = opts->n_steps;
  ev->step.samples = calloc (opts->n_steps, sizeof (double));
  if (ev->step.samples == NULL)
    {
      st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the step response");
      goto fail;
    }
  st = lw_ev_simulate_step (plant->core, css, lp.delay, opts->n_steps, ev->step.samples, err);
  if (st != LW_OK)
    goto fail;
  if (ev->stable)
    {
      /* final value = C_cl (I − A_cl)⁻¹ B_cl + D_cl */
      size_t m = cl.n;
      double *ia = calloc (m * m + 1, sizeof (double)), *x = calloc (m + 1, sizeof (double));
      if (ia == NULL || x == NULL)
        {
          free (ia);
          free (x);
          st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
          goto fail;
        }
      for (size_t i = 0; i < m * m; i++)
        ia[i] = -cl.a[i];
      for (size_t i = 0; i < m; i++)
        {
          ia[i + i * m] += 1.0;
          x[i] = cl.b[i];
        }
      if (lw_solve (m, ia, x, NULL) == LW_OK)
        {
          double yf = cl.d;
          for (size_t i = 0; i < m; i++)
            yf += cl.c[i] * x[i];
          ev->step.has_final = isfinite (yf);
          ev->step.final_value = yf;
        }
      free (ia);
      free (x);
    }
  lw_ev_step_figures (&ev->step, t);

  free (core);
  free (core_phase);
  free (rel);
  free (plain_ok);
  lw_ss_free (css);
  lw_ev_closed_loop_free (&cl);
  *out = ev;
  return LW_OK;

fail:
  free (core);
  free (core_phase);
  free (rel);
  free (plain_ok);
  lw_ss_free (css);
  lw_ev_closed_loop_free (&cl);
  lw_evaluation_free (ev);
  return st;
}
