/* lw-evaluate-nyquist.c — the closed loop of a long delay: stability by the Nyquist
 * criterion on a contour just inside the unit circle, and the dominant closed-loop poles.
 * Conventions: docs/conventions.md.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-evaluate-private.h"

/* ---------------------------------------------------------------------------------------- */
/* Closed loop of a long delay: stability by the Nyquist criterion, the dominant poles        */
/*
 * The closed-loop order is n = np + nc + D (D whole samples of delay). Beyond
 * LwAnalysisOptions.max_full_order its state space is not formed: the count of closed-loop
 * poles on or outside the circle |z| = ρ = 1 − 1e-10 (the eigenvalue path's stability bound)
 * comes from the argument principle, and only the dominant poles are computed.
 *
 * Argument principle for F = 1 + L on the contour z = ρe^{jθ}, θ: 0 → 2π (counter-clockwise):
 * Z_out = P_out − W, with P_out the open-loop poles (controller poles, plant eigenvalues; the D
 * poles at z = 0 lie inside) with |p| > ρ and W the counter-clockwise winding of L about −1.
 * L is real at θ = 0 and π and L(ρe^{−jθ}) = conj L(ρe^{jθ}), so W is twice the signed count
 * of crossings of the ray (−∞, −1) on the upper half, a crossing on the real axis counting one
 * half. A crossing needs |L| > 1, and over an arc where |L| > 1 throughout the signed count
 * depends only on the continuous phase Φ = arg L at the two ends: that is why the cost does not
 * grow with D. Φ is continued along the arc factor by factor: z^{−D} exactly (−Dθ); each
 * controller root and plant eigenvalue r by the principal arg of (z_b − r)/(z_a − r) (the arc is
 * bisected until every one of them turns by at most π/2, which makes the principal value the
 * continuous one); the rest, Q = P·∏(z − λ_i) (a polynomial), by its principal increment,
 * bisecting until it turns by at most π/4.
 */


static bool
nyq_eval (Nyq *q, double th, NyqPoint *pt)
{
  double complex z;
  if (th == 0.0)
    z = CL_RHO;
  else if (th == LW_PI)
    z = -CL_RHO;
  else
    z = CL_RHO * cos (th) + CL_RHO * sin (th) * I;
  pt->th = th;
  pt->z = z;
  double complex p = lw_schur_eval (q->eval, z);
  double ap = cabs (p);
  double lm = log (fabs (q->lp->ctrl->gain)) + log (ap) - q->d * q->ln_rho;
  double complex dir = ap > 0.0 ? p / ap : 1.0;   /* |L| = 0 there: outside |L| >= 1 */
  for (size_t i = 0; i < q->n_roots; i++)
    {
      double complex f = z - q->roots[i];
      double a = cabs (f);
      if (i < q->n_ctrl_roots)
        lm += q->sign[i] * log (a);   /* |C| (P is already whole) */
      else
        dir *= f / a;                 /* Q = P·∏(z − λ_i) */
    }
  pt->lnmag = lm;
  pt->q = dir;
  return isfinite (creal (dir)) && isfinite (cimag (dir)) && !isnan (lm);
}

/* H(x) = twice the number of levels π + 2πm below x, plus one for a level at x. */
static long
nyq_levels2 (double x)
{
  double u = (x - LW_PI) / (2.0 * LW_PI);
  double c = ceil (u);
  return (u == c) ? 2 * (long) c + 1 : 2 * (long) c;
}

/* Phase increment of L from a to b along the contour; *ok false when the arc must be split. */
static double
nyq_increment (const Nyq *q, const NyqPoint *a, const NyqPoint *b, bool *ok)
{
  *ok = true;
  double dq = carg (b->q * conj (a->q));
  if (fabs (dq) > LW_PI / 4)
    *ok = false;
  double inc = dq - q->d * (b->th - a->th);
  for (size_t i = 0; i < q->n_roots; i++)
    {
      double complex fa = a->z - q->roots[i], fb = b->z - q->roots[i];
      double dr = carg (fb * conj (fa));
      if (fabs (dr) > LW_PI / 2)
        *ok = false;
      inc += q->sign[i] * dr;
    }
  return inc;
}

/* Walks the arc a → b with Φ(a) = *phi; on return *phi = Φ(b). */
static void
nyq_walk (Nyq *q, const NyqPoint *a, const NyqPoint *b, double *phi, int depth)
{
  if (q->failed)
    return;
  bool ok;
  double inc = nyq_increment (q, a, b, &ok);
  if (!isfinite (inc) || !isfinite (*phi))
    {
      q->failed = true;
      return;
    }
  bool in_a = a->lnmag >= 0.0, in_b = b->lnmag >= 0.0;
  /* between two points with |L| < 1 nothing is counted and Φ is needed only modulo 2π, which
   * the sum of principal values gives */
  if (!in_a && !in_b)
    ok = true;
  /* an arc that leaves or enters |L| >= 1 is narrowed until Φ barely moves along it and no
   * level lies in between: where a level stays in an arc at the limit of resolution, L = −1 on
   * the contour (a closed-loop pole on |z| = ρ, to rounding) */
  if (ok && in_a != in_b
      && (fabs (inc) > 1e-3 || nyq_levels2 (*phi + inc) != nyq_levels2 (*phi)))
    ok = false;
  double width = b->th - a->th;
  if (!ok && (depth >= CL_MAX_DEPTH || width <= 4.0 * DBL_EPSILON * fmax (b->th, 1e-300)))
    {
      if (in_a != in_b)
        ok = true;                     /* an edge of |L| >= 1 located to rounding */
      else
        {
          q->failed = true;
          return;
        }
    }
  if (!ok)
    {
      NyqPoint m;
      if (!nyq_eval (q, 0.5 * (a->th + b->th), &m))
        {
          q->failed = true;
          return;
        }
      nyq_walk (q, a, &m, phi, depth + 1);
      nyq_walk (q, &m, b, phi, depth + 1);
      return;
    }
  double pa = *phi, pb = pa + inc;
  if (in_a || in_b)
    {
      long dh = nyq_levels2 (pb) - nyq_levels2 (pa);
      q->twice_cross += dh;
      if (in_a != in_b && dh != 0)
        q->marginal = true;
    }
  if (b->lnmag > q->best_lnmag)
    {
      q->best_lnmag = b->lnmag;
      q->best_th = b->th;
      q->best_phi = pb;
    }
  *phi = pb;
}

/* Closed-loop poles with |z| >= ρ by the Nyquist count. *resolved false when the count could
 * not be made (non-finite values, a phase that would not resolve). */
LwStatus
lw_ev_nyq_count (Nyq *q, const double *grid, size_t n_grid, long n_order, long *n_out, bool *resolved,
                 LwError *err)
{
  const Loop *lp = q->lp;
  size_t cap = n_grid + q->n_roots + 2 + 15;   /* ends, grid, root angles, π/16 steps */
  double *th = malloc (cap * sizeof *th);
  if (th == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the Nyquist count");
  size_t k = 0;
  th[k++] = 0.0;
  th[k++] = LW_PI;
  for (size_t i = 0; i < n_grid; i++)
    {
      double v = grid[i] * lp->t;
      if (v > 0.0 && v < LW_PI)
        th[k++] = v;
    }
  /* roots near the contour: their angle, where |L| peaks or dips */
  for (size_t i = 0; i < q->n_roots; i++)
    {
      double a = carg (q->roots[i]);
      if (fabs (cabs (q->roots[i]) - 1.0) < 1e-2 && a > 0.0 && a < LW_PI)
        th[k++] = a;
    }
  /* no arc longer than π/16 (roots far from the contour then turn by less than π/2) */
  for (int i = 1; i < 16; i++)
    th[k++] = LW_PI * i / 16.0;
  qsort (th, k, sizeof *th, lw_ev_cmp_double);

  q->twice_cross = 0;
  q->marginal = q->failed = false;
  q->best_lnmag = -INFINITY;
  NyqPoint a, b;
  double phi = 0.0;
  if (!nyq_eval (q, 0.0, &a))
    q->failed = true;
  else
    {
      /* L(ρ) is real: Φ(0) is 0 or π exactly */
      double complex c0 = lw_model_eval (lp->ctrl, a.z) * lw_schur_eval (q->eval, a.z);
      phi = creal (c0) < 0.0 ? LW_PI : 0.0;
      q->best_lnmag = a.lnmag;
      q->best_th = 0.0;
      q->best_phi = phi;
    }
  for (size_t i = 1; i < k && !q->failed; i++)
    {
      if (th[i] == th[i - 1])
        continue;
      if (!nyq_eval (q, th[i], &b))
        {
          q->failed = true;
          break;
        }
      nyq_walk (q, &a, &b, &phi, 0);
      a = b;
    }
  free (th);
  if (!q->failed)
    {
      /* L(−ρ) is real: Φ(π) must be a multiple of π of the right parity; snap it there and
       * correct the count of the last arc by the snap */
      double complex cpi = lw_model_eval (lp->ctrl, -CL_RHO) * lw_schur_eval (q->eval, -CL_RHO);
      double delay_sign = (lp->delay % 2) ? -1.0 : 1.0;
      bool neg = creal (cpi) * delay_sign < 0.0;
      double m = round (phi / LW_PI);
      bool odd = fmod (fabs (m), 2.0) == 1.0;
      if (odd != neg || fabs (phi - m * LW_PI) > 1e-6 * fmax (1.0, fabs (phi)))
        q->failed = true;
      else if (a.lnmag >= 0.0)
        /* a level exactly at θ = π counts one half (the mirror arc brings the other);
         * nyq_walk counted it whole or not at all. H(mπ) = m exactly (m·π in floating point
         * need not land on the level) */
        q->twice_cross += (long) m - nyq_levels2 (phi);
    }
  *resolved = !q->failed;
  if (q->failed)
    return LW_OK;
  long p_out = 0;
  for (size_t i = 0; i < q->n_roots; i++)
    if (q->sign[i] < 0 && cabs (q->roots[i]) > CL_RHO)
      p_out++;
  long z_out = p_out - q->twice_cross;
  if (z_out < 0 || z_out > n_order)
    {
      *resolved = false;
      return LW_OK;
    }
  *n_out = z_out;
  return LW_OK;
}

/* ln(−z^{−D} C(z) P(z)) with its imaginary part wrapped into [−π, π] (zero at a closed-loop
 * pole), and its derivative; false where it is not finite. */
static bool
cl_log_char (const Nyq *q, double complex z, double complex *g, double complex *dg)
{
  const LwModel *c = q->lp->ctrl;
  if (!(cabs (z) > 0.0) || !isfinite (cabs (z)))
    return false;
  double complex dp, p = lw_schur_eval_deriv (q->eval, z, &dp);
  double complex cz = lw_model_eval (c, z);
  if (!(cabs (p) > 0.0) || !(cabs (cz) > 0.0) || !isfinite (cabs (p)) || !isfinite (cabs (cz)))
    return false;
  double complex dlc = 0.0;
  for (size_t i = 0; i < c->n_zeros; i++)
    dlc += 1.0 / (z - c->zeros[i]);
  for (size_t i = 0; i < c->n_poles; i++)
    dlc -= 1.0 / (z - c->poles[i]);
  double complex lw = -q->d * clog (z) + clog (cz) + clog (p);
  *g = creal (lw) + remainder (cimag (lw) + LW_PI, 2.0 * LW_PI) * I;
  *dg = -q->d / z + dlc + dp / p;
  return isfinite (creal (*g)) && isfinite (cabs (*dg));
}

/* Newton's method on ln(−z^{−D} C(z) P(z)) = 0 (nearly linear in ln z for a long delay, where
 * 1 + z^{−D} C P is not) from *z; true when it converged to a closed-loop pole. */
static bool
cl_newton (const Nyq *q, double complex *zio)
{
  double complex z = *zio, g, dg;
  bool conv = false;
  for (int it = 0; it < 100; it++)
    {
      if (!cl_log_char (q, z, &g, &dg) || !(cabs (dg) > 0.0))
        return false;
      double complex step = g / dg;
      /* at most a tenth of |z| per step */
      double a = cabs (step);
      if (a > 0.1 * cabs (z))
        step *= 0.1 * cabs (z) / a;
      z -= step;
      if (a <= 8.0 * DBL_EPSILON * cabs (z))
        {
          conv = true;
          break;
        }
    }
  /* accept a root only: |ln(−w)| small (it is the relative residual of 1 + w) */
  if (!conv || !cl_log_char (q, z, &g, &dg) || !(cabs (g) <= 1e-8))
    return false;
  *zio = z;
  return true;
}

static int
cmp_modulus_desc (const void *a, const void *b)
{
  double x = cabs (*(const double complex *) a), y = cabs (*(const double complex *) b);
  return (x < y) - (x > y);
}

/* The dominant closed-loop poles (largest |z|, up to CL_DOMINANT, conjugates together): Newton
 * from the points spaced 2π/D around where |L| is largest on the contour (the roots near the
 * circle, |z|^D ≈ |C P|), from the open-loop poles outside the contour and from the controller
 * zeros and the sampled plant's zeros. Sorted by |z|, largest first. */
LwStatus
lw_ev_cl_dominant (const Nyq *q, const LwModel *plant_z, double complex **out, size_t *n_out,
                   LwError *err)
{
  size_t cap = 2 * (2 * CL_DOMINANT + 1) + 6 * (q->n_roots + plant_z->n_zeros) + 2;
  double complex *r = malloc (cap * sizeof *r);
  if (r == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the closed-loop poles");
  size_t k = 0;
  double rad = exp ((q->best_lnmag + q->d * q->ln_rho) / q->d);
  if (!isfinite (rad))
    rad = 1.0;
  rad = fmin (fmax (rad, 0.5), 2.0);
  /* where arg L = π (mod 2π) near θ_best: Φ falls with slope ≈ D */
  double off = remainder (q->best_phi - LW_PI, 2.0 * LW_PI) / q->d;
  for (int j = -CL_DOMINANT; j <= CL_DOMINANT; j++)
    {
      double th = q->best_th + off + 2.0 * LW_PI * j / q->d;
      if (th < 0.0 || th > LW_PI)
        continue;
      double complex z = rad * cexp (I * th);
      if (cl_newton (q, &z))
        r[k++] = z;
    }
  for (size_t i = 0; i < q->n_roots + plant_z->n_zeros; i++)
    {
      double complex s = i < q->n_roots ? q->roots[i] : plant_z->zeros[i - q->n_roots];
      if (cabs (s) == 0.0 || cimag (s) < 0.0)
        continue;
      /* both sides, near and farther: a root beside a pole–zero dipole lies between them */
      const double eps[4] = { 1e-7, -1e-7, 1e-9, -1e-9 };
      for (int e = 0; e < 4; e++)
        {
          double complex z = s * (1.0 + eps[e]) + fabs (eps[e]) * I * (cimag (s) != 0.0);
          if (cl_newton (q, &z))
            r[k++] = z;
        }
    }
  /* beside an open-loop pole p outside the circle z^−D is tiny and the closed-loop pole sits
   * at p − p^−D·R (R the residue of C P at p, from (z − p)·C P a little beside it), closer
   * than Newton on the logarithm resolves: taken from that first-order formula when the shift
   * is below 1e-6·|p| (its error is then of the order of the shift squared) */
  for (size_t i = 0; i < q->n_roots; i++)
    {
      double complex pz = q->roots[i];
      if (q->sign[i] > 0 || !(cabs (pz) > CL_RHO) || cimag (pz) < 0.0)
        continue;
      double dl = 1e-7 * cabs (pz);
      double complex z1 = pz + dl;
      double complex res = dl * lw_model_eval (q->lp->ctrl, z1) * lw_schur_eval (q->eval, z1);
      double complex shift = cexp (-q->d * clog (pz)) * res;
      if (isfinite (cabs (shift)) && cabs (shift) <= 1e-6 * cabs (pz))
        {
          double complex z = pz - shift;
          if (cimag (pz) == 0.0)
            z = creal (z);
          r[k++] = z;
        }
    }
  /* an open-loop pole that a zero of the other factor cancels (a controller pole on a plant
   * zero, e.g. at z = −1) is a closed-loop pole that 1 + L does not show: taken as it is when
   * |C P| does not grow towards it (at a pole of L it grows like 1/δ: ×10 from 10δ to δ) */
  for (size_t i = 0; i < q->n_roots; i++)
    {
      double complex pz = q->roots[i];
      if (q->sign[i] > 0 || cabs (pz) == 0.0 || cimag (pz) < 0.0)
        continue;
      double dl = 1e-6 * fmax (1.0, cabs (pz));
      double complex z1 = pz + dl, z10 = pz + 10.0 * dl;
      double a1 = cabs (lw_model_eval (q->lp->ctrl, z1) * lw_schur_eval (q->eval, z1));
      double a10 = cabs (lw_model_eval (q->lp->ctrl, z10) * lw_schur_eval (q->eval, z10));
      if (a1 < 3.0 * a10)
        r[k++] = pz;
    }
  /* one of each conjugate pair (upper half), real roots exactly real, duplicates dropped */
  size_t m = 0;
  for (size_t i = 0; i < k; i++)
    {
      double complex z = r[i];
      if (fabs (cimag (z)) <= 1e-12 * cabs (z))
        z = creal (z);
      else if (cimag (z) < 0.0)
        z = conj (z);
      bool dup = false;
      for (size_t j = 0; j < m && !dup; j++)
        dup = cabs (r[j] - z) <= 1e-9 * fmax (cabs (z), 1e-300);
      if (!dup)
        r[m++] = z;
    }
  qsort (r, m, sizeof *r, cmp_modulus_desc);
  size_t n = 0;
  double complex *o = malloc ((2 * CL_DOMINANT + 1) * sizeof *o);
  if (o == NULL)
    {
      free (r);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory for the closed-loop poles");
    }
  for (size_t i = 0; i < m && n < CL_DOMINANT; i++)
    {
      o[n++] = r[i];
      if (cimag (r[i]) != 0.0)
        {
          if (n == CL_DOMINANT)
            {
              n--;                      /* keep pairs whole */
              break;
            }
          o[n++] = conj (r[i]);
        }
    }
  free (r);
  *out = o;
  *n_out = n;
  return LW_OK;
}
