/* lw-sampled-realize.c — a factored continuous model realized as a series of real
 * first- and second-order sections (lw_model_realize).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */

#include "lw-sampled-private.h"

/* ---- realization of a factored model as a series of real sections ---- */

typedef struct {
  int order;                  /* 1 or 2 */
  double complex p[2];        /* poles (for order 2 either a conjugate pair or two reals) */
  int nz;                     /* zeros in this section: 0 … order */
  double complex z[2];
} Section;

static bool
is_pair (double complex r)
{
  return cimag (r) != 0.0;
}

/* Builds the section list: complex zero pairs go with complex pole pairs first, then with two
 * real poles; remaining real zeros fill any section with room. */
static LwStatus
make_sections (const LwModel *m, Section **out, size_t *n_out, LwError *err)
{
  size_t np = m->n_poles, nz = m->n_zeros;
  Section *sec = calloc (np == 0 ? 1 : np, sizeof *sec);
  double complex *rp = calloc (np + 1, sizeof *rp), *rz = calloc (nz + 1, sizeof *rz);
  double complex *cz = calloc (nz + 1, sizeof *cz);
  if (sec == NULL || rp == NULL || rz == NULL || cz == NULL)
    {
      free (sec); free (rp); free (rz); free (cz);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory while realizing a model");
    }
  size_t ns = 0, nrp = 0, nrz = 0, ncz = 0;
  for (size_t i = 0; i < np; i++)
    {
      double complex p = m->poles[i];
      if (is_pair (p))
        {
          if (cimag (p) > 0)
            {
              sec[ns].order = 2;
              sec[ns].p[0] = p;
              sec[ns].p[1] = conj (p);
              ns++;
            }
        }
      else
        rp[nrp++] = p;
    }
  for (size_t i = 0; i < nz; i++)
    {
      double complex z = m->zeros[i];
      if (is_pair (z))
        {
          if (cimag (z) > 0)
            cz[ncz++] = z;
        }
      else
        rz[nrz++] = z;
    }
  size_t ncomplex = ns;
  size_t used_rp = 0;
  for (size_t k = 0; k < ncz; k++)
    {
      Section *s;
      if (k < ncomplex)
        s = &sec[k];
      else
        {
          if (used_rp + 2 > nrp)
            {
              free (sec); free (rp); free (rz); free (cz);
              return lw_error_set (err, LW_ERR_INVALID, -1,
                                   "the model is improper (more zeros than poles)");
            }
          s = &sec[ns++];
          s->order = 2;
          s->p[0] = rp[used_rp++];
          s->p[1] = rp[used_rp++];
        }
      s->nz = 2;
      s->z[0] = cz[k];
      s->z[1] = conj (cz[k]);
    }
  while (used_rp < nrp)
    {
      Section *s = &sec[ns++];
      s->order = 1;
      s->p[0] = rp[used_rp++];
    }
  size_t used_rz = 0;
  for (size_t k = 0; k < ns && used_rz < nrz; k++)
    while (sec[k].nz < sec[k].order && used_rz < nrz)
      sec[k].z[sec[k].nz++] = rz[used_rz++];
  free (rp); free (rz); free (cz);
  if (used_rz < nrz)
    {
      free (sec);
      return lw_error_set (err, LW_ERR_INVALID, -1, "the model is improper (more zeros than poles)");
    }
  *out = sec;
  *n_out = ns;
  return LW_OK;
}

/* One section as (A, B, C, D), gain g applied to C and D. */
static void
section_ss (const Section *s, double g, double a[4], double b[2], double c[2], double *d)
{
  /* numerator coefficients n2 x² + n1 x + n0 (monic in the highest present power) */
  double n0, n1, n2;
  if (s->nz == 0)
    { n2 = 0; n1 = 0; n0 = 1; }
  else if (s->nz == 1)
    { n2 = 0; n1 = 1; n0 = -creal (s->z[0]); }
  else
    {
      n2 = 1;
      n1 = -creal (s->z[0] + s->z[1]);
      n0 = creal (s->z[0] * s->z[1]);
    }
  if (s->order == 1)
    {
      double p = creal (s->p[0]);
      /* (n1 x + n0)/(x − p) = n1 + (n0 + n1 p)/(x − p) */
      a[0] = p;
      b[0] = 1.0;
      c[0] = g * (n0 + n1 * p);
      *d = g * n1;
      return;
    }
  double b1 = -creal (s->p[0] + s->p[1]);
  double b0 = creal (s->p[0] * s->p[1]);
  double r1 = n1 - n2 * b1, r0 = n0 - n2 * b0;
  *d = g * n2;
  if (is_pair (s->p[0]))
    {
      /* modal form A = [σ ω; −ω σ], B = [0; 1]: C (xI−A)⁻¹ B = (c2 x + c1 ω − c2 σ)/den */
      double sg = creal (s->p[0]), om = fabs (cimag (s->p[0]));
      a[0] = sg; a[2] = om;
      a[1] = -om; a[3] = sg;
      b[0] = 0.0; b[1] = 1.0;
      c[1] = g * r1;
      c[0] = g * (r0 + r1 * sg) / om;
    }
  else
    {
      /* cascade of two real poles: x1 = u/(x−p1), x2 = x1/(x−p2);
       * C x = (c1 (x − p2) + c2)/den */
      double p1 = creal (s->p[0]), p2 = creal (s->p[1]);
      a[0] = p1; a[2] = 0.0;
      a[1] = 1.0; a[3] = p2;
      b[0] = 1.0; b[1] = 0.0;
      c[0] = g * r1;
      c[1] = g * (r0 + r1 * p2);
    }
}

LwStatus
lw_model_realize (const LwModel *m, LwSs **out, LwError *err)
{
  if (m->n_zeros > m->n_poles)
    return lw_error_set (err, LW_ERR_INVALID, -1, "the model is improper (more zeros than poles)");
  Section *sec = NULL;
  size_t ns = 0;
  LwStatus st = make_sections (m, &sec, &ns, err);
  if (st != LW_OK)
    return st;
  LwSs *ss = lw_ss_new (m->n_poles);
  if (ss == NULL)
    {
      free (sec);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory while realizing a model");
    }
  size_t n = m->n_poles;
  /* Series connection, section by section: x = [x_1; …; x_k], u → sec 1 → … → y.
   * Keep track of the running output map (C_run, D_run) of the cascade so far. */
  double *crun = calloc (n + 1, sizeof (double));
  double drun = 1.0;
  if (crun == NULL)
    {
      free (sec);
      lw_ss_free (ss);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory while realizing a model");
    }
  size_t off = 0;
  for (size_t k = 0; k < ns; k++)
    {
      double a[4] = { 0 }, b[2] = { 0 }, c[2] = { 0 }, d = 0;
      double g = (k + 1 == ns) ? m->gain : 1.0;
      section_ss (&sec[k], g, a, b, c, &d);
      size_t o = (size_t) sec[k].order;
      /* new states driven by the previous output: x_k+ = A_k x_k + B_k (C_run x + D_run u) */
      for (size_t i = 0; i < o; i++)
        {
          for (size_t j = 0; j < o; j++)
            ss->a[(off + i) + (off + j) * n] = a[i + j * o];
          for (size_t j = 0; j < off; j++)
            ss->a[(off + i) + j * n] = b[i] * crun[j];
          ss->b[off + i] = b[i] * drun;
        }
      /* output: y_k = C_k x_k + D_k (C_run x + D_run u) */
      for (size_t j = 0; j < off; j++)
        crun[j] *= d;
      for (size_t i = 0; i < o; i++)
        crun[off + i] = c[i];
      drun *= d;
      off += o;
    }
  if (ns == 0)
    drun = m->gain;
  memcpy (ss->c, crun, n * sizeof (double));
  ss->d = drun;
  free (crun);
  free (sec);
  *out = ss;
  return LW_OK;
}
