/* lw-evaluate-margins.c — every gain and phase crossover refined, the margins, the
 * sensitivity peak and bandwidth; stability and poles of a closed loop too large to form.
 * Conventions: docs/conventions.md.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-evaluate-private.h"

/* ---------------------------------------------------------------------------------------- */
/* Margins                                                                                    */

/* Sorts crossover frequencies ascending and drops exact duplicates; returns the new count. */
static size_t
sort_unique (double *v, size_t n)
{
  qsort (v, n, sizeof *v, lw_ev_cmp_double);
  size_t m = 0;
  for (size_t i = 0; i < n; i++)
    if (m == 0 || v[i] > v[m - 1])
      v[m++] = v[i];
  return m;
}

LwStatus
lw_ev_find_margins (const Loop *lp, const double *mag_db, const double complex *full, int n_int,
                    LwMargins *mg, LwError *err)
{
  size_t n = lp->n;
  const double *w = lp->grid;
  const double *rel = lp->rel;
  size_t cap = 16, ngc = 0, npc = 0, nb = 0;
  double *gc = malloc (cap * sizeof *gc), *pc = malloc (cap * sizeof *pc);
  double *bands = malloc (cap * sizeof *bands);
  size_t capg = cap, capp = cap, capb = cap;
  if (gc == NULL || pc == NULL || bands == NULL)
    {
      free (gc); free (pc); free (bands);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the margins");
    }
#define PUSH(arr, cnt, capv, val)                                             \
  do {                                                                        \
    if ((cnt) == (capv))                                                      \
      {                                                                       \
        double *nw = realloc ((arr), 2 * (capv) * sizeof *(arr));             \
        if (nw == NULL) { free (gc); free (pc); free (bands);                 \
          return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory"); }     \
        (arr) = nw; (capv) *= 2;                                              \
      }                                                                       \
    (arr)[(cnt)++] = (val);                                                   \
  } while (0)
#define OK(i) (rel[(i)] <= LW_REL_RESOLVED && isfinite (mag_db[(i)]))

  /* gain crossovers: sign changes of ln|L| between resolved grid points (a grid value of
   * exactly 0 dB counts once, at that point), each refined and kept when resolved there */
  for (size_t i = 0; i + 1 < n; i++)
    {
      if (!OK (i) || !OK (i + 1))
        continue;
      double f0 = mag_db[i], f1 = mag_db[i + 1];
      if (f0 == 0.0)
        PUSH (gc, ngc, capg, w[i]);
      else if ((f0 > 0) != (f1 > 0) && f1 != 0.0)
        {
          double a = log (10.0) / 20.0, r;
          double x = lw_ev_brent_root (lw_ev_fn_log_mag, (void *) lp, w[i], w[i + 1], f0 * a, f1 * a);
          lw_ev_loop_core_rel (lp, x, &r);
          if (r <= LW_REL_RESOLVED)
            PUSH (gc, ngc, capg, x);
          else
            mg->n_unresolved_gain_crossovers++;
        }
    }
  if (n > 0 && OK (n - 1) && mag_db[n - 1] == 0.0)
    PUSH (gc, ngc, capg, w[n - 1]);

  /* phase crossovers: the unwrapped phase passes an odd multiple of 180° strictly inside an
   * interval between resolved points; the Nyquist end point is handled on its own below */
  double nyq_phase = lp->core_phase[n - 1] + lw_ev_delay_phase_deg (lp, w[n - 1]);
  for (size_t i = 0; i + 1 < n; i++)
    {
      if (!OK (i) || !OK (i + 1))
        continue;
      double p0 = lp->core_phase[i] + lw_ev_delay_phase_deg (lp, w[i]);
      double p1 = lp->core_phase[i + 1] + lw_ev_delay_phase_deg (lp, w[i + 1]);
      double lo = fmin (p0, p1), hi = fmax (p0, p1);
      /* odd multiples c = 180 (2m + 1) with lo <= c <= hi */
      double mlo = ceil ((lo - 180.0) / 360.0), mhi = floor ((hi - 180.0) / 360.0);
      for (double m = mlo; m <= mhi; m += 1.0)
        {
          double c = 180.0 + 360.0 * m;
          if (i + 2 == n && fabs (p1 - c) <= 1e-9)
            continue;                        /* at the Nyquist point: below */
          if (p0 == c && i > 0)
            continue;                        /* counted at the end of the previous interval */
          PhaseTarget pt = { lp, c };
          double r, x = lw_ev_brent_root (lw_ev_fn_phase, &pt, w[i], w[i + 1], p0 - c, p1 - c);
          lw_ev_loop_core_rel (lp, x, &r);
          if (r <= LW_REL_RESOLVED)
            PUSH (pc, npc, capp, x);
          else
            mg->n_unresolved_phase_crossovers++;
        }
    }
  /* at π/T, where L is real: a phase crossover when L is negative there and resolved — not where
   * L is zero within its error (e.g. a zero at z = −1) */
  {
    double m = round ((nyq_phase - 180.0) / 360.0);
    if (OK (n - 1) && fabs (nyq_phase - (180.0 + 360.0 * m)) <= 1e-9)
      PUSH (pc, npc, capp, w[n - 1]);
  }

  /* runs of grid points where L is not resolved: each is a band; it counts one unresolved gain
   * crossover when |L| = 1 is possible in it (within the error, or between its resolved
   * neighbours), and one unresolved phase crossover when its phase is unknown (relative error
   * >= 0.5) or passes an odd multiple of 180° — unless |L| is certainly below
   * LW_MAG_IRRELEVANT there (a gain margin above 120 dB) */
  for (size_t i = 0; i < n;)
    {
      if (OK (i))
        {
          i++;
          continue;
        }
      size_t a = i, b = i;
      while (b + 1 < n && !OK (b + 1))
        b++;
      i = b + 1;
      double lo_mag = INFINITY, hi_mag = 0.0;
      bool phase_unknown = false, phase_passes = false;
      size_t from = a > 0 ? a - 1 : a, to = b + 1 < n ? b + 1 : b;
      double pprev = 0.0;
      for (size_t j = from; j <= to; j++)
        {
          double mag = pow (10.0, mag_db[j] / 20.0), r = rel[j];
          if (!isfinite (mag_db[j]))
            mag = mag_db[j] > 0 ? INFINITY : 0.0, r = INFINITY;
          double e = isfinite (r) ? r * mag : INFINITY;
          lo_mag = fmin (lo_mag, fmax (mag - e, 0.0));
          hi_mag = fmax (hi_mag, mag + e);
          if (j >= a && j <= b && !(r < 0.5))
            phase_unknown = true;
          double p = lp->core_phase[j] + lw_ev_delay_phase_deg (lp, w[j]);
          if (j > from
              && floor ((fmax (p, pprev) - 180.0) / 360.0) != floor ((fmin (p, pprev) - 180.0) / 360.0))
            phase_passes = true;
          pprev = p;
        }
      bool any = false;
      if (lo_mag <= 1.0 && hi_mag >= 1.0)
        {
          mg->n_unresolved_gain_crossovers++;
          any = true;
        }
      if (hi_mag >= LW_MAG_IRRELEVANT && (phase_unknown || phase_passes))
        {
          mg->n_unresolved_phase_crossovers++;
          any = true;
        }
      (void) any;
      PUSH (bands, nb, capb, w[a]);
      PUSH (bands, nb, capb, w[b]);
    }
#undef OK
#undef PUSH

  /* a crossover refined from a neighbouring interval can land in another's place; keep the
   * lists ascending (docs/cli.md) */
  ngc = sort_unique (gc, ngc);
  npc = sort_unique (pc, npc);
  mg->n_unresolved_bands = nb / 2;
  mg->unresolved_bands_rad_s = bands;

  mg->n_gain_crossovers = ngc;
  mg->gain_crossovers_rad_s = gc;
  mg->phase_margins_deg = calloc (ngc + 1, sizeof (double));
  mg->n_phase_crossovers = npc;
  mg->phase_crossovers_rad_s = pc;
  mg->gain_margins_db = calloc (npc + 1, sizeof (double));
  if (mg->phase_margins_deg == NULL || mg->gain_margins_db == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the margins");

  /* delay margin: the smallest extra delay that turns some crossover point onto −1; the point
   * at ω_c must turn clockwise by PM, or by PM + 360° when PM < 0 (lw_evaluate drops it when
   * the closed loop is unstable) */
  double dm = INFINITY;
  for (size_t i = 0; i < ngc; i++)
    {
      double ph = lw_ev_loop_phase_deg (lp, gc[i], lw_ev_loop_core (lp, gc[i]));
      double pm = 180.0 + ph;
      pm -= 360.0 * ceil ((pm - 180.0) / 360.0);      /* into (−180, 180] */
      mg->phase_margins_deg[i] = pm;
      if (!mg->has_phase_margin || pm < mg->phase_margin_deg)
        {
          mg->has_phase_margin = true;
          mg->phase_margin_deg = pm;
          mg->gain_crossover_rad_s = gc[i];
        }
      double turn = pm >= 0 ? pm : pm + 360.0;
      dm = fmin (dm, turn / RAD2DEG / gc[i]);
    }
  if (ngc > 0)
    {
      mg->has_delay_margin = true;
      mg->delay_margin_s = dm;
      mg->delay_margin_samples = dm / lp->t;
    }
  for (size_t i = 0; i < npc; i++)
    {
      double gm = -20.0 * log10 (cabs (lw_ev_loop_core (lp, pc[i])));
      mg->gain_margins_db[i] = gm;
      if (!mg->has_gain_margin || fabs (gm) < fabs (mg->gain_margin_db))
        {
          mg->has_gain_margin = true;
          mg->gain_margin_db = gm;
          mg->phase_crossover_rad_s = pc[i];
        }
    }

  /* sensitivity peak: largest |1/(1+L)| on the grid, refined between its neighbours */
  {
    size_t imax = 0;
    double smax = -1.0;
    for (size_t i = 0; i < n; i++)
      {
        double re = 1.0 + creal (full[i]), im = cimag (full[i]);
        double s = 1.0 / sqrt (re * re + im * im);
        if (s > smax)
          {
            smax = s;
            imax = i;
          }
      }
    if (smax > 0 && isfinite (smax))
      {
        double a = w[imax > 0 ? imax - 1 : 0], b = w[imax + 1 < n ? imax + 1 : n - 1];
        double fbest;
        double wbest = lw_ev_golden_max (lw_ev_fn_sens, (void *) lp, a, b, &fbest);
        if (!(fbest >= smax))
          {
            wbest = w[imax];
            fbest = smax;
          }
        /* the supremum may lie at ω → 0, below the grid (an unstable plant: |S| rises to
         * 1/|1 + L(1)|): the limit is L at z = 1 when the loop has no integrator or
         * differentiator (with k > 0 integrators S → 0, with k < 0, S → 1) */
        double s0 = -1.0;
        if (n_int > 0)
          s0 = 0.0;
        else if (n_int < 0)
          s0 = 1.0;
        else if (lp->plant->n_integrators == 0)
          {
            const LwModel *c = lp->ctrl;
            double nr = c->gain, ni = 0.0, dr = 1.0, di = 0.0;
            lw_ev_root_product (c->zeros, c->n_zeros, 0.0, 0.0, &nr, &ni);
            lw_ev_root_product (c->poles, c->n_poles, 0.0, 0.0, &dr, &di);
            double complex h = lw_schur_eval_unit (lp->plant->eval, 1.0, 0.0);
            double cr = nr / dr;   /* C(1) is real */
            if (dr != 0.0 && isfinite (cr) && isfinite (creal (h)))
              {
                double l0 = cr * creal (h);   /* z^-d is 1 at z = 1 */
                s0 = 1.0 / fabs (1.0 + l0);
              }
          }
        if (s0 > fbest && isfinite (s0))
          {
            fbest = s0;
            wbest = 0.0;
          }
        mg->has_sensitivity = true;
        mg->sensitivity_peak = fbest;
        mg->sensitivity_peak_rad_s = wbest;
      }
  }
  /* bandwidth: first frequency where |T| falls 3 dB below its value at the grid start */
  {
    /* |T|² = |L|² / |1 + L|², compared against |T(ω_0)|²/2 without logarithms */
#define T2(l) ((creal (l) * creal (l) + cimag (l) * cimag (l))                                 \
               / ((1.0 + creal (l)) * (1.0 + creal (l)) + cimag (l) * cimag (l)))
    double t0 = T2 (full[0]);
    if (isfinite (t0) && t0 > 0)
      {
        double lim = t0 * pow (10.0, -0.3);
        PhaseTarget pt = { lp, 10.0 * log10 (t0) - 3.0 };
        for (size_t i = 1; i < n; i++)
          if (T2 (full[i]) < lim)
            {
              double prev = 10.0 * log10 (T2 (full[i - 1])) - pt.target;
              double f = 10.0 * log10 (T2 (full[i])) - pt.target;
              mg->has_bandwidth = true;
              mg->bandwidth_rad_s = lw_ev_brent_root (lw_ev_fn_comp_db, &pt, w[i - 1], w[i], prev, f);
              break;
            }
      }
#undef T2
  }
  return LW_OK;
}

/* Stability and the dominant poles of a closed loop too large to form (see above). */
LwStatus
lw_ev_closed_loop_long_delay (const Loop *lp, const LwSampledPlant *plant, LwEvaluation *ev,
                              bool *resolved_out, LwError *err)
{
  const LwModel *c = lp->ctrl;
  size_t np = plant->core->n, nr = c->n_zeros + c->n_poles + np;
  Nyq q = { .lp = lp, .eval = plant->eval, .n_roots = nr,
            .n_ctrl_roots = c->n_zeros + c->n_poles, .d = (double) lp->delay,
            .ln_rho = log (CL_RHO) };
  q.roots = calloc (nr + 1, sizeof *q.roots);
  q.sign = calloc (nr + 1, sizeof *q.sign);
  if (q.roots == NULL || q.sign == NULL)
    {
      free (q.roots);
      free (q.sign);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the closed loop");
    }
  size_t k = 0;
  for (size_t i = 0; i < c->n_zeros; i++, k++)
    q.roots[k] = c->zeros[i], q.sign[k] = 1;
  for (size_t i = 0; i < c->n_poles; i++, k++)
    q.roots[k] = c->poles[i], q.sign[k] = -1;
  LwStatus st = lw_eigenvalues (np, plant->core->a, q.roots + k, err);
  for (size_t i = 0; i < np; i++)
    q.sign[k + i] = -1;
  long z_out = 0;
  bool resolved = false;
  if (st == LW_OK)
    st = lw_ev_nyq_count (&q, ev->omega_rad_s, ev->n_points, (long) ev->closed_loop_order, &z_out,
                    &resolved, err);
  *resolved_out = resolved;
  if (st == LW_OK && !resolved && ev->closed_loop_order > LW_CL_FALLBACK_ORDER)
    st = lw_error_set (err, LW_ERR_NUMERIC, -1,
                       "could not decide the stability of the closed loop (order %zu) by the "
                       "Nyquist count", ev->closed_loop_order);
  if (st == LW_OK && resolved)
    {
      ev->n_closed_loop_unstable = (size_t) z_out + (q.marginal && z_out == 0);
      ev->stable = ev->n_closed_loop_unstable == 0;
      ev->closed_loop_poles_complete = false;
      st = lw_ev_cl_dominant (&q, plant->model, &ev->closed_loop_poles, &ev->n_closed_loop_poles, err);
    }
  free (q.roots);
  free (q.sign);
  return st;
}
