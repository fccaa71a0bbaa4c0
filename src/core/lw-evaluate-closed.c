/* lw-evaluate-closed.c — the closed loop as a state space (unity negative feedback with
 * the delays), its step response, and the step figures.
 * Conventions: docs/conventions.md.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-evaluate-private.h"

/* ---------------------------------------------------------------------------------------- */
/* Closed loop                                                                                */


void
lw_ev_closed_loop_free (ClosedLoop *cl)
{
  free (cl->a);
  free (cl->b);
  free (cl->c);
  cl->a = cl->b = cl->c = NULL;   /* the error paths free here and lw_evaluate frees again */
}

/* Unity negative feedback of  z^-delay · C(z) · P_core(z). State [x_p; q_1…q_D; x_c] where
 * q_i holds u_c delayed by i samples. */
LwStatus
lw_ev_closed_loop_build (const LwSs *p, const LwSs *c, int delay, ClosedLoop *cl, LwError *err)
{
  size_t np = p->n, nc = c->n, nd = (size_t) delay, n = np + nd + nc;
  memset (cl, 0, sizeof *cl);
  cl->np = np; cl->nd = nd; cl->nc = nc; cl->n = n;
  size_t nn = lw_mul_size (n, n);
  if (n > 0 && nn == 0)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "closed loop too large");
  cl->a = calloc (nn + 1, sizeof (double));
  cl->b = calloc (n + 1, sizeof (double));
  cl->c = calloc (n + 1, sizeof (double));
  double *f = calloc (n + 1, sizeof (double));   /* u_c = F x + G r */
  if (cl->a == NULL || cl->b == NULL || cl->c == NULL || f == NULL)
    {
      free (f);
      lw_ev_closed_loop_free (cl);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the closed loop");
    }
  double gr;
  size_t iq = np + nd - 1;      /* q_D, valid when nd > 0 */
  size_t oc = np + nd;          /* controller offset */
  if (nd > 0)
    {
      /* y = Cp x_p + Dp q_D; u_c = Cc x_c + Dc (r − y) */
      for (size_t j = 0; j < np; j++)
        {
          cl->c[j] = p->c[j];
          f[j] = -c->d * p->c[j];
        }
      cl->c[iq] += p->d;
      f[iq] += -c->d * p->d;
      for (size_t j = 0; j < nc; j++)
        f[oc + j] = c->c[j];
      gr = c->d;
      cl->d = 0.0;
    }
  else
    {
      double den = 1.0 + c->d * p->d;
      if (fabs (den) < 1e-14)
        {
          free (f);
          lw_ev_closed_loop_free (cl);
          return lw_error_set (err, LW_ERR_INVALID, -1,
                               "the loop has an algebraic loop with 1 + C·P = 0 at z = ∞; "
                               "add a computation delay");
        }
      for (size_t j = 0; j < np; j++)
        f[j] = -c->d * p->c[j] / den;
      for (size_t j = 0; j < nc; j++)
        f[oc + j] = c->c[j] / den;
      gr = c->d / den;
      /* y = Cp x_p + Dp u_c */
      for (size_t j = 0; j < n; j++)
        cl->c[j] = p->d * f[j];
      for (size_t j = 0; j < np; j++)
        cl->c[j] += p->c[j];
      cl->d = p->d * gr;
    }
  /* x_p+ = Ap x_p + Bp u_d */
  for (size_t j = 0; j < np; j++)
    for (size_t i = 0; i < np; i++)
      cl->a[i + j * n] = p->a[i + j * np];
  if (nd > 0)
    for (size_t i = 0; i < np; i++)
      cl->a[i + iq * n] += p->b[i];
  else
    {
      for (size_t j = 0; j < n; j++)
        for (size_t i = 0; i < np; i++)
          cl->a[i + j * n] += p->b[i] * f[j];
      for (size_t i = 0; i < np; i++)
        cl->b[i] += p->b[i] * gr;
    }
  /* q_1+ = u_c, q_{i+1}+ = q_i */
  if (nd > 0)
    {
      for (size_t j = 0; j < n; j++)
        cl->a[np + j * n] = f[j];
      cl->b[np] = gr;
      for (size_t i = 1; i < nd; i++)
        cl->a[(np + i) + (np + i - 1) * n] = 1.0;
    }
  /* x_c+ = Ac x_c + Bc (r − y) */
  for (size_t i = 0; i < nc; i++)
    {
      for (size_t j = 0; j < nc; j++)
        cl->a[(oc + i) + (oc + j) * n] = c->a[i + j * nc];
      for (size_t j = 0; j < n; j++)
        cl->a[(oc + i) + j * n] -= c->b[i] * cl->c[j];
      cl->b[oc + i] = c->b[i] * (1.0 - cl->d);
    }
  free (f);
  return LW_OK;
}

/* Unity-feedback step response, simulated structurally: plant state space, delay line,
 * controller sections — never through an expanded polynomial. */
LwStatus
lw_ev_simulate_step (const LwSs *p, const LwSs *c, int delay, size_t n_steps, double *y_out,
                     LwError *err)
{
  size_t np = p->n, nc = c->n, nd = (size_t) delay;
  double *xp = calloc (np + 1, sizeof (double)), *xp2 = calloc (np + 1, sizeof (double));
  double *xc = calloc (nc + 1, sizeof (double)), *xc2 = calloc (nc + 1, sizeof (double));
  double *line = calloc (nd + 1, sizeof (double));
  /* row-major copies: the inner loops run along rows */
  double *pa = calloc (np * np + 1, sizeof (double)), *ca = calloc (nc * nc + 1, sizeof (double));
  if (xp == NULL || xp2 == NULL || xc == NULL || xc2 == NULL || line == NULL || pa == NULL
      || ca == NULL)
    {
      free (xp); free (xp2); free (xc); free (xc2); free (line); free (pa); free (ca);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the step response");
    }
  for (size_t i = 0; i < np; i++)
    for (size_t j = 0; j < np; j++)
      pa[i * np + j] = p->a[i + j * np];
  for (size_t i = 0; i < nc; i++)
    for (size_t j = 0; j < nc; j++)
      ca[i * nc + j] = c->a[i + j * nc];
  const double r = 1.0;
  double den = 1.0 + c->d * p->d;
  for (size_t k = 0; k < n_steps; k++)
    {
      double cpx = 0.0, ccx = 0.0;
      for (size_t j = 0; j < np; j++)
        cpx += p->c[j] * xp[j];
      for (size_t j = 0; j < nc; j++)
        ccx += c->c[j] * xc[j];
      double y, e, uc, ud;
      if (nd > 0)
        {
          ud = line[k % nd];            /* u_c[k − D] */
          y = cpx + p->d * ud;
          e = r - y;
          uc = ccx + c->d * e;
          line[k % nd] = uc;
        }
      else
        {
          uc = (ccx + c->d * (r - cpx)) / den;
          ud = uc;
          y = cpx + p->d * uc;
          e = r - y;
        }
      y_out[k] = y;
      /* plant: quasi-triangular (real Schur) A, row i uses columns i−1 … n−1 */
      for (size_t i = 0; i < np; i++)
        {
          double acc = p->b[i] * ud;
          const double *row = pa + i * np;
          for (size_t j = i == 0 ? 0 : i - 1; j < np; j++)
            acc += row[j] * xp[j];
          xp2[i] = acc;
        }
      for (size_t i = 0; i < nc; i++)
        {
          double acc = c->b[i] * e;
          const double *row = ca + i * nc;
          for (size_t j = 0; j < nc; j++)
            acc += row[j] * xc[j];
          xc2[i] = acc;
        }
      double *t = xp; xp = xp2; xp2 = t;
      t = xc; xc = xc2; xc2 = t;
    }
  free (xp); free (xp2); free (xc); free (xc2); free (line); free (pa); free (ca);
  return LW_OK;
}

/* Step figures from the samples: see docs/conventions.md. */
void
lw_ev_step_figures (LwStep *st, double t)
{
  if (!st->has_final || fabs (st->final_value) < 1e-12)
    return;
  double yf = st->final_value;
  size_t n = st->n;
  double peak = -INFINITY;
  for (size_t k = 0; k < n; k++)
    peak = fmax (peak, st->samples[k] / yf);
  /* rise 10 % → 90 %, linear interpolation between samples */
  double t10 = NAN, t90 = NAN;
  for (size_t k = 0; k < n; k++)
    {
      double v = st->samples[k] / yf, vp = k > 0 ? st->samples[k - 1] / yf : 0.0;
      if (isnan (t10) && v >= 0.1)
        t10 = k == 0 ? 0.0 : t * ((double) (k - 1) + (0.1 - vp) / (v - vp));
      if (!isnan (t10) && v >= 0.9)
        {
          t90 = k == 0 ? 0.0 : t * ((double) (k - 1) + (0.9 - vp) / (v - vp));
          break;
        }
    }
  if (!isnan (t10) && !isnan (t90))
    {
      st->has_rise = true;
      st->rise_time_s = t90 - t10;
    }
  /* no overshoot figure of a response that has not started (a long dead time, a short
   * horizon: it has not reached 10 % of its final value) — 0 % would be a figure of nothing */
  if (!isnan (t10) || peak > 1.0)
    {
      st->has_overshoot = true;
      st->overshoot_pct = peak > 1.0 ? (peak - 1.0) * 100.0 : 0.0;
    }
  /* settling: last sample outside ±2 %; the time is where the straight line between it and the
   * next sample enters the band. Not settled if the last sample is outside. */
  size_t last = n;
  for (size_t k = n; k-- > 0;)
    if (fabs (st->samples[k] / yf - 1.0) > 0.02)
      {
        last = k;
        break;
      }
  if (last == n)
    {
      st->has_settling = true;
      st->settling_time_s = 0.0;
    }
  else if (last + 1 < n)
    {
      double a = st->samples[last] / yf - 1.0, b = st->samples[last + 1] / yf - 1.0;
      double edge = a > 0 ? 0.02 : -0.02;
      double frac = (b != a) ? (edge - a) / (b - a) : 0.0;
      st->has_settling = true;
      st->settling_time_s = t * ((double) last + fmin (fmax (frac, 0.0), 1.0));
    }
}

void
lw_step_figures (LwStep *s, double period_s)
{
  s->has_overshoot = s->has_rise = s->has_settling = false;
  s->overshoot_pct = s->rise_time_s = s->settling_time_s = 0.0;
  lw_ev_step_figures (s, period_s);
}
