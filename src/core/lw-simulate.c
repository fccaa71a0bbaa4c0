/* lw-simulate.c — time-domain verification of the sampled loop (see lw-simulate.h and
 * docs/simulation.md for every convention).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-simulate.h"

#include "lw-internal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* A real pole of the controller counts as integrating within this distance of z = 1 (the same
 * rule lw_evaluate uses to count integrators). */
#define UNIT_POLE_TOL 1e-12

struct LwSimPlan {
  const LwSampledPlant *plant;
  LwSimOptions opt;
  double t;                 /* period, s */
  int n_comp;               /* N: computation delay, samples */
  int n_dead;               /* d: whole samples of plant dead time */
  /* sampled plant core (real Schur form), A row-major */
  size_t np;
  double *pa, *pb, *pc, pd;
  /* controller sections, A row-major */
  size_t nc;
  double *ca, *cb, *cc, cd;
  bool *hold;               /* nc flags: integrating states (anti-windup holds them) */
  size_t n_hold;
  double int_sign;          /* sign of the integral action (+1 or −1), 0 when none */
  double den;               /* 1 + Dc·Dp, used when N + d == 0 */
  /* continuous plant (lw_model_realize of plant_s), column-major, sub-step maps */
  size_t ns;
  double *sc, sd;
  double *phi_h, *gam_h;    /* e^{A h}, ∫ e^{A s} ds B over h = T/M */
  double *phi_1, *gam_1;    /* over δ1 = θ − i_sw·h (the part before the switch) */
  double *phi_2, *gam_2;    /* over h − δ1 */
  size_t i_sw;              /* sub-step in which the input switches (θ = fractional dead time) */
  bool split;               /* the switch falls strictly inside sub-step i_sw */
};

void
lw_sim_options_init (LwSimOptions *o)
{
  o->compute_delay = 1;
  o->n_steps = 500;
  o->has_limits = false;
  o->u_low = -INFINITY;
  o->u_high = INFINITY;
  o->anti_windup = false;
  o->substeps = 20;
}

void
lw_sim_plan_free (LwSimPlan *p)
{
  if (p == NULL)
    return;
  free (p->pa); free (p->pb); free (p->pc);
  free (p->ca); free (p->cb); free (p->cc); free (p->hold);
  free (p->sc);
  free (p->phi_h); free (p->gam_h);
  free (p->phi_1); free (p->gam_1);
  free (p->phi_2); free (p->gam_2);
  free (p);
}

size_t
lw_sim_plan_n_integrating (const LwSimPlan *plan)
{
  return plan->n_hold;
}

/* Sign of the integral action: the sign of C(z)·(z − 1)^m at z = 1, with m the net number of
 * roots at z = 1 (poles minus zeros). Conjugate pairs contribute |1 − p|² > 0, so the sign is
 * that of the gain, flipped once for every real root beyond z = 1. 0 when m < 1. */
static double
integral_sign (const LwModel *c)
{
  int m = 0;
  double s = c->gain >= 0 ? 1.0 : -1.0;
  for (size_t i = 0; i < c->n_poles; i++)
    {
      double complex r = c->poles[i];
      if (cabs (r - 1.0) <= UNIT_POLE_TOL)
        m++;
      else if (cimag (r) == 0.0 && creal (r) > 1.0)
        s = -s;
    }
  for (size_t i = 0; i < c->n_zeros; i++)
    {
      double complex r = c->zeros[i];
      if (cabs (r - 1.0) <= UNIT_POLE_TOL)
        m--;
      else if (cimag (r) == 0.0 && creal (r) > 1.0)
        s = -s;
    }
  return m >= 1 ? s : 0.0;
}

static double *
row_major (const double *a, size_t n)
{
  double *r = calloc (n * n + 1, sizeof (double));
  if (r != NULL)
    for (size_t i = 0; i < n; i++)
      for (size_t j = 0; j < n; j++)
        r[i * n + j] = a[i + j * n];
  return r;
}

static double *
dup (const double *v, size_t n)
{
  double *r = calloc (n + 1, sizeof (double));
  if (r != NULL && n > 0)
    memcpy (r, v, n * sizeof (double));
  return r;
}

LwStatus
lw_sim_plan_new (const LwSampledPlant *plant, const LwModel *controller_z,
                 const LwSimOptions *opts, LwSimPlan **out, LwError *err)
{
  *out = NULL;
  if (plant == NULL || controller_z == NULL || opts == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "missing plant, controller or options");
  double t = plant->period_s;
  LwStatus cst = lw_check_loop_controller (plant, controller_z, opts->compute_delay, err);
  if (cst != LW_OK)
    return cst;
  if (opts->n_steps < 2 || opts->n_steps > 100000000)
    return lw_error_set (err, LW_ERR_INVALID, -1, "the number of samples must be 2 … 1e8");
  if (opts->has_limits
      && !(isfinite (opts->u_low) && isfinite (opts->u_high) && opts->u_low < opts->u_high))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the actuator limits must be finite with low < high (got %g and %g)",
                         opts->u_low, opts->u_high);
  if (opts->substeps > 10000
      || (opts->substeps > 0 && (double) (opts->n_steps - 1) * (double) opts->substeps > 1e8))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the sub-steps per sample must be 0 … 10000 with (samples − 1) · "
                         "sub-steps at most 1e8");
  if ((long) plant->whole_delay + opts->compute_delay > 1000000)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the dead time (%d whole samples) plus the computation delay (%d) is "
                         "more than a million samples", plant->whole_delay, opts->compute_delay);

  LwSimPlan *p = calloc (1, sizeof *p);
  if (p == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory");
  LwStatus st = LW_OK;
  LwSs *css = NULL, *cont = NULL;
  p->plant = plant;
  p->opt = *opts;
  p->t = t;
  p->n_comp = opts->compute_delay;
  p->n_dead = plant->whole_delay;

  const LwSs *core = plant->core;
  p->np = core->n;
  p->pa = row_major (core->a, core->n);
  p->pb = dup (core->b, core->n);
  p->pc = dup (core->c, core->n);
  p->pd = core->d;
  st = lw_model_realize (controller_z, &css, err);
  if (st != LW_OK)
    goto fail;
  p->nc = css->n;
  p->ca = row_major (css->a, css->n);
  p->cb = dup (css->b, css->n);
  p->cc = dup (css->c, css->n);
  p->cd = css->d;
  p->hold = calloc (css->n + 1, sizeof (bool));
  if (p->pa == NULL || p->pb == NULL || p->pc == NULL || p->ca == NULL || p->cb == NULL
      || p->cc == NULL || p->hold == NULL)
    {
      st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the simulation plan");
      goto fail;
    }
  /* Integrating states: a pole at z = 1 is real, so it sits alone on the diagonal of the
   * cascade (a 2×2 modal block has its off-diagonal ω != 0 above the diagonal). */
  for (size_t i = 0; i < p->nc; i++)
    {
      size_t n = p->nc;
      bool in_block = (i + 1 < n && css->a[i + (i + 1) * n] != 0.0)
                      || (i > 0 && css->a[(i - 1) + i * n] != 0.0);
      if (!in_block && fabs (css->a[i + i * n] - 1.0) <= UNIT_POLE_TOL)
        {
          p->hold[i] = true;
          p->n_hold++;
        }
    }
  p->int_sign = integral_sign (controller_z);
  if (p->int_sign == 0.0)
    {
      /* a zero at z = 1 cancels the integration: nothing to hold */
      memset (p->hold, 0, (p->nc + 1) * sizeof (bool));
      p->n_hold = 0;
    }

  p->den = 1.0 + p->cd * p->pd;
  if (p->n_comp + p->n_dead == 0)
    {
      if (fabs (p->den) < 1e-14)
        {
          st = lw_error_set (err, LW_ERR_INVALID, -1,
                             "the loop has an algebraic loop with 1 + C·P = 0 at z = ∞; add a "
                             "computation delay");
          goto fail;
        }
      if (opts->has_limits && p->den < 0)
        {
          st = lw_error_set (err, LW_ERR_INVALID, -1,
                             "with actuator limits the algebraic loop (no delay, 1 + C·P < 0 at "
                             "z = ∞) has no unique solution; add a computation delay");
          goto fail;
        }
    }

  /* continuous plant and its sub-step maps */
  if (opts->substeps > 0)
    {
      st = lw_model_realize (plant->plant_s, &cont, err);
      if (st != LW_OK)
        goto fail;
      size_t n = cont->n;
      p->ns = n;
      p->sc = dup (cont->c, n);
      p->sd = cont->d;
      p->phi_h = calloc (n * n + 1, sizeof (double));
      p->gam_h = calloc (n + 1, sizeof (double));
      p->phi_1 = calloc (n * n + 1, sizeof (double));
      p->gam_1 = calloc (n + 1, sizeof (double));
      p->phi_2 = calloc (n * n + 1, sizeof (double));
      p->gam_2 = calloc (n + 1, sizeof (double));
      if (p->sc == NULL || p->phi_h == NULL || p->gam_h == NULL || p->phi_1 == NULL
          || p->gam_1 == NULL || p->phi_2 == NULL || p->gam_2 == NULL)
        {
          st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the simulation plan");
          goto fail;
        }
      double h = t / (double) opts->substeps;
      st = lw_zoh_blocks (cont, h, p->phi_h, p->gam_h, err);
      if (st != LW_OK)
        goto fail;
      /* the input switches at jT + θ: in sub-step i_sw, after δ1 = θ − i_sw·h; a switch
       * within 1e-9·h of a sub-step boundary is taken at the boundary */
      double theta = plant->frac_delay_s;
      double q = theta / h;
      double iq = floor (q), d1 = (q - iq) * h;
      if (d1 <= 1e-9 * h)
        d1 = 0.0;
      else if (d1 >= (1.0 - 1e-9) * h)
        {
          iq += 1.0;
          d1 = 0.0;
        }
      p->i_sw = (size_t) iq;
      p->split = d1 > 0.0;
      if (p->split)
        {
          st = lw_zoh_blocks (cont, d1, p->phi_1, p->gam_1, err);
          if (st == LW_OK)
            st = lw_zoh_blocks (cont, h - d1, p->phi_2, p->gam_2, err);
          if (st != LW_OK)
            goto fail;
        }
    }
  lw_ss_free (css);
  lw_ss_free (cont);
  *out = p;
  return LW_OK;

fail:
  lw_ss_free (css);
  lw_ss_free (cont);
  lw_sim_plan_free (p);
  return st;
}

void
lw_sim_response_free (LwSimResponse *r)
{
  if (r == NULL)
    return;
  free (r->y);
  free (r->u);
  free (r->e);
  free (r->t_fine_s);
  free (r->y_fine);
  free (r);
}

static double
clip (const LwSimPlan *p, double v)
{
  if (!p->opt.has_limits)
    return v;
  return v > p->opt.u_high ? p->opt.u_high : (v < p->opt.u_low ? p->opt.u_low : v);
}

/* x ← Φ x + Γ w  (column-major Φ, n×n), using tmp (n). */
static void
advance (size_t n, const double *phi, const double *gam, double w, double *x, double *tmp)
{
  for (size_t i = 0; i < n; i++)
    tmp[i] = gam[i] * w;
  for (size_t j = 0; j < n; j++)
    {
      double xj = x[j];
      const double *col = phi + j * n;
      for (size_t i = 0; i < n; i++)
        tmp[i] += col[i] * xj;
    }
  memcpy (x, tmp, n * sizeof (double));
}

static double
dot (size_t n, const double *a, const double *b)
{
  double s = 0.0;
  for (size_t j = 0; j < n; j++)
    s += a[j] * b[j];
  return s;
}

/* The continuous plant driven by the plant input pin[k] held on [kT, (k+1)T) and delayed by
 * the dead time τ = dT + θ; output plus the output disturbance dout, at t_j = jT/M. */
static LwStatus
continuous (const LwSimPlan *p, const double *pin, double dout, LwSimResponse *r, LwError *err)
{
  size_t n = r->n, m = p->opt.substeps, ns = p->ns;
  size_t nf = (n - 1) * m + 1;
  r->n_fine = nf;
  r->t_fine_s = calloc (nf, sizeof (double));
  r->y_fine = calloc (nf, sizeof (double));
  double *x = calloc (ns + 1, sizeof (double)), *tmp = calloc (ns + 1, sizeof (double));
  if (r->t_fine_s == NULL || r->y_fine == NULL || x == NULL || tmp == NULL)
    {
      free (x);
      free (tmp);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the continuous output");
    }
  long d = p->n_dead;
  double h = p->t / (double) m;
  for (size_t k = 0; k < n; k++)
    {
      /* before the switch: the input of sample k − d − 1; after: of sample k − d */
      long ko = (long) k - d - 1, kn = (long) k - d;
      double w_old = ko >= 0 ? pin[ko] : 0.0, w_new = kn >= 0 ? pin[kn] : 0.0;
      size_t mm = (k + 1 < n) ? m : 1;
      for (size_t i = 0; i < mm; i++)
        {
          size_t j = k * m + i;
          /* the input in force at t_j (right-continuous: the new value from the switch on) */
          double w_at = (i < p->i_sw || (i == p->i_sw && p->split)) ? w_old : w_new;
          r->t_fine_s[j] = (double) k * p->t + (double) i * h;
          r->y_fine[j] = dot (ns, p->sc, x) + p->sd * w_at + dout;
          if (k + 1 == n)
            break;
          if (i == p->i_sw && p->split)
            {
              advance (ns, p->phi_1, p->gam_1, w_old, x, tmp);
              advance (ns, p->phi_2, p->gam_2, w_new, x, tmp);
            }
          else
            advance (ns, p->phi_h, p->gam_h, w_at, x, tmp);
        }
    }
  free (x);
  free (tmp);
  /* ripple: deviation from the straight line between consecutive samples; peak */
  double ripple = 0.0, pk = 0.0, pkt = 0.0;
  for (size_t j = 0; j < nf; j++)
    {
      size_t k = j / m, i = j % m;
      double line = r->y[k];
      if (i > 0)
        line = r->y[k] + (r->y[k + 1] - r->y[k]) * ((double) i / (double) m);
      ripple = fmax (ripple, fabs (r->y_fine[j] - line));
      if (fabs (r->y_fine[j]) > fabs (pk))
        {
          pk = r->y_fine[j];
          pkt = r->t_fine_s[j];
        }
    }
  r->has_continuous = true;
  r->intersample_ripple = ripple;
  r->continuous_peak = pk;
  r->continuous_peak_time_s = pkt;
  return LW_OK;
}

LwStatus
lw_sim_run (LwSimPlan *p, LwSimInput input, double amplitude, LwSimResponse **out, LwError *err)
{
  *out = NULL;
  if (p == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "missing simulation plan");
  if (!isfinite (amplitude))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the step amplitude must be finite");
  if (input != LW_SIM_REFERENCE_STEP && input != LW_SIM_INPUT_DISTURBANCE_STEP
      && input != LW_SIM_OUTPUT_DISTURBANCE_STEP)
    return lw_error_set (err, LW_ERR_INVALID, -1, "unknown simulation input");
  size_t n = p->opt.n_steps, np = p->np, nc = p->nc;
  size_t nn = (size_t) p->n_comp, nd = (size_t) p->n_dead;
  LwSimResponse *r = calloc (1, sizeof *r);
  double *xp = calloc (np + 1, sizeof (double)), *xp2 = calloc (np + 1, sizeof (double));
  double *xc = calloc (nc + 1, sizeof (double)), *xc2 = calloc (nc + 1, sizeof (double));
  double *cline = calloc (nn + 1, sizeof (double)), *dline = calloc (nd + 1, sizeof (double));
  double *pin = calloc (n, sizeof (double));
  if (r != NULL)
    {
      r->y = calloc (n, sizeof (double));
      r->u = calloc (n, sizeof (double));
      r->e = calloc (n, sizeof (double));
    }
  LwStatus st = LW_OK;
  if (r == NULL || xp == NULL || xp2 == NULL || xc == NULL || xc2 == NULL || cline == NULL
      || dline == NULL || pin == NULL || r->y == NULL || r->u == NULL || r->e == NULL)
    {
      st = lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the simulation");
      goto out;
    }
  r->input = input;
  r->amplitude = amplitude;
  r->period_s = p->t;
  r->n = n;
  const double ref = input == LW_SIM_REFERENCE_STEP ? amplitude : 0.0;
  const double di = input == LW_SIM_INPUT_DISTURBANCE_STEP ? amplitude : 0.0;
  const double dout = input == LW_SIM_OUTPUT_DISTURBANCE_STEP ? amplitude : 0.0;
  const bool limited = p->opt.has_limits;
  const bool aw = limited && p->opt.anti_windup && p->n_hold > 0;
  for (size_t k = 0; k < n; k++)
    {
      double cpx = 0.0, ccx = 0.0;
      for (size_t j = 0; j < np; j++)
        cpx += p->pc[j] * xp[j];
      for (size_t j = 0; j < nc; j++)
        ccx += p->cc[j] * xc[j];
      double y, e, v, s, a, ud;
      if (nn + nd > 0)
        {
          a = nn > 0 ? cline[k % nn] : 0.0;          /* s[k − N], when N > 0 */
          ud = nd > 0 ? dline[k % nd] : a + di;      /* plant input d samples ago */
          y = cpx + p->pd * ud + dout;
          e = ref - y;
          v = ccx + p->cd * e;
          s = clip (p, v);
          if (nn > 0)
            cline[k % nn] = s;
          else
            a = s;
          if (nd > 0)
            dline[k % nd] = a + di;
        }
      else
        {
          /* no delay: v = Cc xc + Dc (r − Cp xp − Dp (s + d_i) − d_o); with 1 + Dc·Dp > 0 the
           * limited loop s = sat(v) has the unique solution sat(v_linear) */
          double r_eff = ref - dout - p->pd * di;
          v = (ccx + p->cd * (r_eff - cpx)) / p->den;
          s = clip (p, v);
          a = s;
          ud = a + di;
          y = cpx + p->pd * ud + dout;
          e = ref - y;
        }
      bool sat = limited && s != v;
      if (sat)
        r->n_saturated++;
      r->y[k] = y;
      r->u[k] = a;
      r->e[k] = e;
      pin[k] = a + di;
      /* plant */
      for (size_t i = 0; i < np; i++)
        {
          double acc = p->pb[i] * ud;
          const double *row = p->pa + i * np;
          for (size_t j = i == 0 ? 0 : i - 1; j < np; j++)
            acc += row[j] * xp[j];
          xp2[i] = acc;
        }
      /* controller */
      for (size_t i = 0; i < nc; i++)
        {
          double acc = p->cb[i] * e;
          const double *row = p->ca + i * nc;
          for (size_t j = 0; j < nc; j++)
            acc += row[j] * xc[j];
          xc2[i] = acc;
        }
      /* clamping: while the output is limited and the error drives it further out, the
       * integrating states keep their values */
      if (aw && sat && ((v > s && p->int_sign * e > 0.0) || (v < s && p->int_sign * e < 0.0)))
        {
          r->n_held++;
          for (size_t i = 0; i < nc; i++)
            if (p->hold[i])
              xc2[i] = xc[i];
        }
      double *tp = xp; xp = xp2; xp2 = tp;
      tp = xc; xc = xc2; xc2 = tp;
    }
  /* peak and indices */
  {
    double pk = 0.0, pkt = 0.0, iae = 0.0, ise = 0.0, itae = 0.0, eff = 0.0, t = p->t;
    for (size_t k = 0; k < n; k++)
      {
        if (fabs (r->y[k]) > fabs (pk))
          {
            pk = r->y[k];
            pkt = (double) k * t;
          }
        double ae = fabs (r->e[k]);
        iae += ae;
        ise += r->e[k] * r->e[k];
        itae += (double) k * ae;
        eff += r->u[k] * r->u[k];
      }
    r->peak = pk;
    r->peak_time_s = pkt;
    r->indices.iae = t * iae;
    r->indices.ise = t * ise;
    r->indices.itae = t * t * itae;
    r->indices.control_effort = t * eff;
  }
  if (p->opt.substeps > 0)
    st = continuous (p, pin, dout, r, err);

out:
  free (xp); free (xp2); free (xc); free (xc2); free (cline); free (dline); free (pin);
  if (st != LW_OK)
    {
      lw_sim_response_free (r);
      return st;
    }
  *out = r;
  return LW_OK;
}
