/* lw-sampled.c — exact zero-order-hold discretization of a continuous plant with input dead
 * time, held as a balanced state space in real Schur form.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-sampled-private.h"

/* ---- zero-order hold ---- */

LwStatus
lw_zoh_blocks (const LwSs *c, double h, double *phi, double *gam, LwError *err)
{
  size_t n = c->n, m = n + 1;
  double *mm = calloc (m * m, sizeof (double)), *em = calloc (m * m, sizeof (double));
  if (mm == NULL || em == NULL)
    {
      free (mm);
      free (em);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory in the discretization");
    }
  for (size_t j = 0; j < n; j++)
    for (size_t i = 0; i < n; i++)
      mm[i + j * m] = c->a[i + j * n] * h;
  for (size_t i = 0; i < n; i++)
    mm[i + n * m] = c->b[i] * h;
  LwStatus st = lw_expm (m, mm, em, err);
  if (st == LW_OK)
    {
      for (size_t j = 0; j < n; j++)
        for (size_t i = 0; i < n; i++)
          phi[i + j * n] = em[i + j * m];
      for (size_t i = 0; i < n; i++)
        gam[i] = em[i + n * m];
    }
  free (mm);
  free (em);
  return st;
}

static LwModel *sampled_model (const LwSampledPlant *p);
static double realization_check (const LwSampledPlant *p);

LwStatus
lw_sampled_plant_new (const LwModel *plant_s, double dead_time_s, double period_s,
                      LwSampledPlant **out, LwError *err)
{
  *out = NULL;
  if (plant_s == NULL || plant_s->domain != LW_DOMAIN_S)
    return lw_error_set (err, LW_ERR_INVALID, -1, "the plant must be a model in s");
  if (!(period_s > 0.0) || !isfinite (period_s))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the sample period must be a finite number > 0 s");
  if (!(dead_time_s >= 0.0) || !isfinite (dead_time_s))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the dead time must be a finite number >= 0 s");
  if (plant_s->n_zeros > plant_s->n_poles)
    return lw_error_set (err, LW_ERR_INVALID, -1, "the plant is improper (more zeros than poles)");
  if (!lw_model_is_finite (plant_s))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the plant has a non-finite gain or root");
  double ratio = dead_time_s / period_s;
  if (ratio > 1e6)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the dead time is more than a million samples (%.6g samples)", ratio);
  /* Whole samples plus a fraction; a ratio within 1e-9 of an integer counts as whole so that
   * e.g. 0.03 s at 0.01 s is exactly 3 samples. */
  double whole = floor (ratio);
  double frac = ratio - whole;
  if (frac > 1.0 - 1e-9)
    {
      whole += 1.0;
      frac = 0.0;
    }
  else if (frac < 1e-9)
    frac = 0.0;

  LwSampledPlant *p = calloc (1, sizeof *p);
  if (p == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
  p->period_s = period_s;
  p->dead_time_s = dead_time_s;
  p->whole_delay = (int) whole;
  p->frac_delay_s = frac * period_s;
  p->plant_s = lw_model_copy (plant_s);
  for (size_t i = 0; i < plant_s->n_poles; i++)
    if (plant_s->poles[i] == 0.0)
      p->n_integrators++;
  for (size_t i = 0; i < plant_s->n_zeros; i++)
    if (plant_s->zeros[i] == 0.0)
      p->n_integrators--;

  LwSs *cs = NULL;
  LwStatus st = lw_model_realize (plant_s, &cs, err);
  if (st != LW_OK)
    {
      lw_sampled_plant_free (p);
      return st;
    }
  /* Balance the continuous realization before the matrix exponential: the series sections
   * couple through entries as large as a section's numerator over its poles (1e6 and more),
   * and scaling and squaring of so non-normal a matrix lost up to 1e-2 of the slow modes'
   * response (against 50-digit arithmetic; tests/reference/ref_extremes.py). A diagonal
   * similarity commutes with the hold: the sampled transfer function is unchanged. */
  st = lw_ss_balance (cs, err);
  if (st != LW_OK)
    {
      lw_ss_free (cs);
      lw_sampled_plant_free (p);
      return st;
    }
  size_t n = cs->n;
  bool frac_part = p->frac_delay_s > 0.0;
  size_t nd = n + (frac_part ? 1 : 0);
  LwSs *ds = lw_ss_new (nd);
  double *phi1 = calloc (n * n + 1, sizeof (double)), *gam1 = calloc (n + 1, sizeof (double));
  double *phi2 = calloc (n * n + 1, sizeof (double)), *gam2 = calloc (n + 1, sizeof (double));
  if (ds == NULL || phi1 == NULL || gam1 == NULL || phi2 == NULL || gam2 == NULL)
    {
      st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory in the discretization");
      goto fail;
    }
  if (!frac_part)
    {
      st = lw_zoh_blocks (cs, period_s, phi1, gam1, err);
      if (st != LW_OK)
        goto fail;
      for (size_t j = 0; j < n; j++)
        for (size_t i = 0; i < n; i++)
          ds->a[i + j * nd] = phi1[i + j * n];
      for (size_t i = 0; i < n; i++)
        {
          ds->b[i] = gam1[i];
          ds->c[i] = cs->c[i];
        }
      ds->d = cs->d;
    }
  else
    {
      /* Input switches at kT + θ: x((k+1)T) = Φ(T) x + Φ(T−θ) Γ(θ) v + Γ(T−θ) u,
       * v[k] = the input held before the switch (previous sample), y = C x + D v. */
      double th = p->frac_delay_s;
      st = lw_zoh_blocks (cs, th, phi1, gam1, err);
      if (st == LW_OK)
        st = lw_zoh_blocks (cs, period_s - th, phi2, gam2, err);
      if (st != LW_OK)
        goto fail;
      for (size_t i = 0; i < n; i++)
        {
          for (size_t j = 0; j < n; j++)
            {
              double acc = 0.0;
              for (size_t k = 0; k < n; k++)
                acc += phi2[i + k * n] * phi1[k + j * n];
              ds->a[i + j * nd] = acc;
            }
          double acc = 0.0;
          for (size_t k = 0; k < n; k++)
            acc += phi2[i + k * n] * gam1[k];
          ds->a[i + n * nd] = acc;
          ds->b[i] = gam2[i];
          ds->c[i] = cs->c[i];
        }
      /* v+ = u */
      ds->b[n] = 1.0;
      ds->c[n] = cs->d;
      ds->d = 0.0;
    }
  st = lw_ss_balance_schur (ds, err);
  if (st != LW_OK)
    goto fail;
  p->core = ds;
  ds = NULL;
  p->eval = lw_schur_eval_new (p->core);
  if (p->eval == NULL)
    {
      st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
      goto fail;
    }
  p->realization_rel = realization_check (p);
  p->model = sampled_model (p);
  if (p->model == NULL)
    {
      st = lw_error_set (err, LW_ERR_NUMERIC, -1, "could not factor the sampled plant");
      goto fail;
    }
  free (phi1); free (gam1); free (phi2); free (gam2);
  lw_ss_free (cs);
  *out = p;
  return LW_OK;

fail:
  free (phi1); free (gam1); free (phi2); free (gam2);
  lw_ss_free (cs);
  lw_ss_free (ds);
  lw_sampled_plant_free (p);
  return st;
}

void
lw_sampled_plant_free (LwSampledPlant *p)
{
  if (p == NULL)
    return;
  lw_model_free (p->plant_s);
  lw_model_free (p->model);
  lw_ss_free (p->core);
  lw_schur_eval_free (p->eval);
  free (p);
}

double
lw_sampled_plant_period (const LwSampledPlant *p)
{
  return p->period_s;
}

double complex
lw_sampled_plant_response (const LwSampledPlant *p, double omega_rad_s)
{
  double wt = omega_rad_s * p->period_s;
  /* At the Nyquist frequency z is exactly −1 (the response of a real system is real there). */
  bool nyquist = fabs (wt - LW_PI) <= 4.0 * LW_PI * 2.220446049250313e-16;
  double complex h = nyquist ? lw_schur_eval_unit (p->eval, -1.0, 0.0)
                             : lw_schur_eval_unit (p->eval, cos (wt), sin (wt));
  if (p->whole_delay > 0)
    h *= nyquist ? ((p->whole_delay % 2) ? -1.0 : 1.0) : cexp (-I * wt * p->whole_delay);
  return h;
}

/* Keeps a running product within range: a factor 1e±100 moved into a decimal exponent. */
static inline void
rescale (double *re, double *im, int *e100)
{
  double a = fabs (*re) + fabs (*im);
  if (a > 1e100)
    {
      *re *= 1e-100;
      *im *= 1e-100;
      (*e100)++;
    }
  else if (a < 1e-100 && a > 0.0)
    {
      *re *= 1e100;
      *im *= 1e100;
      (*e100)--;
    }
}

/* P(s)·e^{−sθ}/s at s = jΩ from the factored continuous plant: numerator and denominator
 * products accumulated apart (no division per factor), kept in range by rescale, one division
 * at the end; *abs_out its modulus. */
static double complex
alias_term (const LwModel *m, double om, double th, double *abs_out)
{
  double nr = 1.0, ni = 0.0, dr = 1.0, di = 0.0;
  int ne = 0, de = 0;
  size_t nz = m->n_zeros, np = m->n_poles;
  for (size_t i = 0; i < nz; i++)
    {
      double fr = -creal (m->zeros[i]), fi = om - cimag (m->zeros[i]);
      double t = nr * fr - ni * fi;
      ni = nr * fi + ni * fr;
      nr = t;
      rescale (&nr, &ni, &ne);
    }
  for (size_t i = 0; i < np; i++)
    {
      double fr = -creal (m->poles[i]), fi = om - cimag (m->poles[i]);
      double t = dr * fr - di * fi;
      di = dr * fi + di * fr;
      dr = t;
      rescale (&dr, &di, &de);
    }
  /* times jΩ in the denominator: (dr + j di)·jΩ = −di·Ω + j dr·Ω */
  double t = -di * om;
  di = dr * om;
  dr = t;
  double den = dr * dr + di * di;
  if (!(den > 0.0) || !isfinite (den) || !isfinite (nr) || !isfinite (ni))
    return NAN;
  double sc = m->gain / den;
  for (int e = ne - de; e > 0; e--)
    sc *= 1e100;
  for (int e = ne - de; e < 0; e++)
    sc *= 1e-100;
  double ar = (nr * dr + ni * di) * sc, ai = (ni * dr - nr * di) * sc;
  if (th > 0.0)
    {
      double c = cos (om * th), sn = -sin (om * th);
      t = ar * c - ai * sn;
      ai = ar * sn + ai * c;
      ar = t;
    }
  *abs_out = sqrt (ar * ar + ai * ai);
  return ar + ai * I;
}

static double complex
alias_eval (const LwSampledPlant *p, double omega_rad_s, double rel_target, int kmax,
            double *err_abs)
{
  const LwModel *m = p->plant_s;
  *err_abs = INFINITY;
  if (m->n_poles < m->n_zeros + 2 || !(omega_rad_s > 0.0))
    return NAN;
  const double u = 1.1102230246251565e-16;
  double t = p->period_s, th = p->frac_delay_s, ws = 2.0 * LW_PI / t;
  double wt = omega_rad_s * t;
  bool nyq = fabs (wt - LW_PI) <= 4.0 * LW_PI * DBL_EPSILON;
  double w = nyq ? LW_PI / t : omega_rad_s;
  double r = (double) (m->n_poles - m->n_zeros);
  /* per term: the product's 2(n_z + n_p) + 4 roundings, and the rounding of Ω·θ in the delay */
  double per_term = u * (2.0 * (double) (m->n_zeros + m->n_poles) + 8.0);
  double sr = 0.0, si = 0.0, sabs = 0.0, rnd = 0.0, tail = INFINITY;
  /* the terms fall like |k|^−(r+1) only once |Ω| is well above every root: no tail estimate
   * before 4·max|root| */
  double rmax = 0.0;
  for (size_t i = 0; i < m->n_zeros; i++)
    rmax = fmax (rmax, cabs (m->zeros[i]));
  for (size_t i = 0; i < m->n_poles; i++)
    rmax = fmax (rmax, cabs (m->poles[i]));
  double kmin = ceil (4.0 * rmax / ws) + 2.0;
  if (!(kmin < (double) kmax))
    return NAN;
  for (int k = 0; k <= kmax; k++)
    {
      /* the pair Ω = ω + k·ω_s and Ω = ω − (k + 1)·ω_s (at π/T the two are mirror images) */
      double a1, a2;
      double complex g1 = alias_term (m, w + k * ws, th, &a1);
      double complex g2 = alias_term (m, w - (k + 1) * ws, th, &a2);
      if (!isfinite (creal (g1)) || !isfinite (cimag (g1)) || !isfinite (creal (g2))
          || !isfinite (cimag (g2)))
        return NAN;
      sr += creal (g1) + creal (g2);
      si += cimag (g1) + cimag (g2);
      sabs += a1 + a2;
      rnd += (a1 * (per_term + u * fabs ((w + k * ws) * th))
              + a2 * (per_term + u * fabs ((w - (k + 1) * ws) * th)));
      /* the terms fall like |k|^−(r+1): what is left beyond k is about (a1 + a2)·k/r */
      if (k >= (int) kmin)
        {
          tail = (a1 + a2) * (double) (k + 1) / r;
          if (tail <= 0.1 * rel_target * hypot (sr, si))
            break;
        }
    }
  /* the prefactor (1 − e^{−jωT})/T, with 1 − cos ωT formed without cancellation */
  double c = nyq ? -1.0 : cos (wt), sn = nyq ? 0.0 : sin (wt);
  double omc = c > 0.0 ? (sn * sn) / (1.0 + c) : 1.0 - c;
  double fr = omc / t, fi = sn / t;
  double hr = fr * sr - fi * si, hi = fr * si + fi * sr;
  double fabs_ = hypot (fr, fi);
  /* summation: each partial sum rounds at most u·(running Σ|g|), 2·k_max terms */
  *err_abs = fabs_ * (rnd + tail + u * sabs * log2 (2.0 * kmax) + 4.0 * u * hypot (sr, si));
  if (nyq)
    hi = 0.0;
  return hr + hi * I;
}

double complex
lw_sampled_plant_alias_eval (const LwSampledPlant *p, double omega_rad_s, double rel_target,
                             double *err_abs)
{
  return alias_eval (p, omega_rad_s, rel_target, 2048, err_abs);
}

/* The realization's own error (continuous sections, matrix exponential, balancing, Schur form),
 * which the running bound of the back substitution does not see: the state space against the
 * aliasing sum of the factored plant (to 1e-10, up to 65536 pairs of terms, once per plant) at three
 * frequencies — the slowest corner, π/(2T) and their geometric mean. Returns the factor by which
 * the disagreement (less the aliasing sum's own error) exceeds the running bound, times 10 for
 * the frequencies in between, or 0 when it never does; the bound is scaled by it (the error of
 * the realization grows with the same cancellations the bound measures). 0 where the aliasing
 * sum does not apply (relative degree < 2) or does not converge. */
static double
realization_check (const LwSampledPlant *p)
{
  const LwModel *m = p->plant_s;
  double wn = LW_PI / p->period_s, wlo = wn;
  for (size_t i = 0; i < m->n_zeros; i++)
    if (cabs (m->zeros[i]) > 0.0)
      wlo = fmin (wlo, cabs (m->zeros[i]));
  for (size_t i = 0; i < m->n_poles; i++)
    if (cabs (m->poles[i]) > 0.0)
      wlo = fmin (wlo, cabs (m->poles[i]));
  double ws[3] = { wlo, sqrt (wlo * 0.5 * wn), 0.5 * wn };
  double worst = 0.0;
  for (int i = 0; i < 3; i++)
    {
      double w = fmin (ws[i], 0.5 * wn), wt = w * p->period_s, es, ea;
      double complex hs = lw_schur_eval_unit_err (p->eval, cos (wt), sin (wt), &es);
      double complex ha = alias_eval (p, w, 1e-10, 65536, &ea);
      double ma = cabs (ha);
      if (!isfinite (ea) || !(ma > 0.0) || !isfinite (cabs (hs)))
        continue;
      /* only where the bound calls the state space resolved: elsewhere the aliasing sum is
       * used anyway */
      double d = cabs (hs - ha) - ea;
      if (d > es && es > 0.0 && es <= 1e-6 * cabs (hs))
        worst = fmax (worst, 10.0 * d / es);
    }
  return worst;
}

double
lw_sampled_plant_form_error (const LwSampledPlant *p, const LwModel *m)
{
  if (p == NULL || m == NULL || (m->domain != LW_DOMAIN_Z && m->domain != LW_DOMAIN_W))
    return NAN;
  const LwModel *ps = p->plant_s;
  double t = p->period_s, wn = LW_PI / t, wlo = wn;
  for (size_t i = 0; i < ps->n_zeros; i++)
    if (cabs (ps->zeros[i]) > 0.0)
      wlo = fmin (wlo, cabs (ps->zeros[i]));
  for (size_t i = 0; i < ps->n_poles; i++)
    if (cabs (ps->poles[i]) > 0.0)
      wlo = fmin (wlo, cabs (ps->poles[i]));
  wlo = fmin (wlo / 10.0, 1e-3 * wn);
  /* FORM_POINTS frequencies, log-spaced from a decade below the slowest corner to just below
   * π/T; at each the plant's own response is the reference where it is resolved to 1e-7
   * (an order below the tolerance checked): the state space where its running bound, scaled
   * by what the realization check found it to miss, says so, else the aliasing sum of the
   * factored plant where it converges */
  enum { FORM_POINTS = 24 };
  double complex ref[FORM_POINTS], got[FORM_POINTS];
  bool ok[FORM_POINTS];
  double peak = 0.0;
  for (int k = 0; k < FORM_POINTS; k++)
    {
      double w = wlo * pow (0.999 * wn / wlo, (double) k / (FORM_POINTS - 1)), wt = w * t;
      double es = INFINITY, ea = INFINITY;
      double complex h = lw_schur_eval_unit_err (p->eval, cos (wt), sin (wt), &es);
      ok[k] = false;
      /* the state space's bound, scaled by what the realization check found it to miss */
      double scale = fmax (1.0, p->realization_rel);
      if (isfinite (cabs (h)) && es * scale <= 1e-7 * cabs (h))
        ok[k] = true;
      else
        {
          h = lw_sampled_plant_alias_eval (p, w, 1e-10, &ea);
          ok[k] = isfinite (ea) && isfinite (cabs (h)) && ea <= 1e-7 * cabs (h);
        }
      if (!ok[k])
        continue;
      if (p->whole_delay > 0)
        h *= cexp (-I * wt * p->whole_delay);
      ref[k] = h;
      peak = fmax (peak, cabs (h));
      double complex x = m->domain == LW_DOMAIN_Z ? cexp (I * wt)
                                                  : I * (2.0 / t) * tan (0.5 * wt);
      got[k] = lw_model_eval (m, x);
    }
  double worst = NAN;
  for (int k = 0; k < FORM_POINTS; k++)
    {
      /* points where the plant is 180 dB below its largest value say nothing relative */
      if (!ok[k] || !(cabs (ref[k]) > 1e-9 * peak))
        continue;
      double e = cabs (got[k] - ref[k]) / cabs (ref[k]);
      if (!isfinite (e))
        e = INFINITY;
      worst = isnan (worst) ? e : fmax (worst, e);
    }
  return worst;
}

LwModel *
lw_sampled_plant_model (const LwSampledPlant *p)
{
  return lw_model_copy (p->model);
}

static LwModel *
sampled_model (const LwSampledPlant *p)
{
  const LwSs *s = p->core;
  size_t n = s->n, d = (size_t) p->whole_delay;
  double complex *zeros = calloc (n + 1, sizeof *zeros), *poles = calloc (n + 1, sizeof *poles);
  size_t nz = 0;
  LwModel *m = NULL;
  if (zeros == NULL || poles == NULL)
    goto out;
  if (lw_ss_zeros (s, zeros, &nz, NULL) != LW_OK || lw_eigenvalues (n, s->a, poles, NULL) != LW_OK)
    goto out;
  m = lw_model_new (LW_DOMAIN_Z, p->period_s, 1.0, nz, n + d);
  if (m == NULL)
    goto out;
  /* Polish each zero with Newton steps on the state-space response H(z) (exact derivative):
   * the pencil's zeros carry the conditioning of the pencil, the response is evaluated to
   * rounding. A step is kept only while it lowers |H|; display only, nothing is evaluated
   * through these zeros. */
  for (size_t i = 0; i < nz; i++)
    {
      double complex zk = zeros[i], dh;
      double complex hk = lw_schur_eval_deriv (p->eval, zk, &dh);
      for (int it = 0; it < 8 && isfinite (cabs (hk)) && dh != 0.0; it++)
        {
          double complex step = hk / dh;
          if (cabs (step) <= 4.0 * DBL_EPSILON * fmax (cabs (zk), 1.0))
            break;
          double complex zn = zk - step;
          if (cimag (zeros[i]) == 0.0)
            zn = creal (zn);
          double complex dn, hn = lw_schur_eval_deriv (p->eval, zn, &dn);
          if (!(cabs (hn) < cabs (hk)))
            break;
          zk = zn; hk = hn; dh = dn;
        }
      zeros[i] = zk;
    }
  if (nz > 0)
    memcpy (m->zeros, zeros, nz * sizeof *zeros);
  if (n > 0)
    memcpy (m->poles, poles, n * sizeof *poles);
  /* Gain for display: match the state-space response at a point well away from every root. */
  double rmax0 = 1.0;
  for (size_t i = 0; i < nz; i++)
    rmax0 = fmax (rmax0, cabs (zeros[i]));
  for (size_t i = 0; i < n; i++)
    rmax0 = fmax (rmax0, cabs (poles[i]));
  if ((double) d * log (2.0 * rmax0) < 600.0)
    {
      /* a short dead time: z0^−d is representable; the d poles at z = 0 go in first */
      for (size_t i = 0; i < d; i++)
        m->poles[n + i] = 0.0;
      lw_model_canonicalize (m);
      double rmax = 1.0;
      for (size_t i = 0; i < m->n_zeros; i++)
        rmax = fmax (rmax, cabs (m->zeros[i]));
      for (size_t i = 0; i < m->n_poles; i++)
        rmax = fmax (rmax, cabs (m->poles[i]));
      double complex z0 = 2.0 * rmax * cexp (I * 0.3);
      double complex h = lw_schur_eval (p->eval, z0) * cpow (z0, -(double) d);
      m->gain = 1.0;
      double complex unit = lw_model_eval (m, z0);
      m->gain = creal (h / unit);
      goto out;
    }
  /* a long dead time: z0^−d underflows. The match is made without the d poles at z = 0 (both
   * sides would carry the same z0^−d), which then go where the canonical order puts them (real
   * roots first, ascending: after the negative real poles) — O(n + d), no sort of a million
   * roots */
  m->n_poles = n;
  lw_model_canonicalize (m);
  {
    double rmax = 1.0;
    for (size_t i = 0; i < m->n_zeros; i++)
      rmax = fmax (rmax, cabs (m->zeros[i]));
    for (size_t i = 0; i < m->n_poles; i++)
      rmax = fmax (rmax, cabs (m->poles[i]));
    double complex z0 = 2.0 * rmax * cexp (I * 0.3);
    double complex h = lw_schur_eval (p->eval, z0);
    m->gain = 1.0;
    double complex unit = lw_model_eval (m, z0);
    m->gain = creal (h / unit);
  }
  {
    size_t at = 0;
    while (at < n && cimag (m->poles[at]) == 0.0 && creal (m->poles[at]) < 0.0)
      at++;
    if (d > 0 && at < n)
      memmove (m->poles + at + d, m->poles + at, (n - at) * sizeof *m->poles);
    for (size_t i = 0; i < d; i++)
      m->poles[at + i] = 0.0;
    m->n_poles = n + d;
  }
out:
  free (zeros);
  free (poles);
  return m;
}

LwStatus
lw_check_loop_controller (const LwSampledPlant *plant, const LwModel *controller_z,
                          int compute_delay, LwError *err)
{
  double t = plant->period_s;
  if (controller_z->domain != LW_DOMAIN_Z || fabs (controller_z->period_s - t) > 1e-12 * t)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the controller must be a model in z with the plant's sample period");
  if (controller_z->n_zeros > controller_z->n_poles)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the controller is improper (more zeros than poles): it would need "
                         "future samples");
  if (!lw_model_is_finite (controller_z))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the controller has a non-finite gain or root");
  if (compute_delay < 0 || compute_delay > 100000)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the computation delay must be a whole number of samples from 0 to 100000");
  return LW_OK;
}
