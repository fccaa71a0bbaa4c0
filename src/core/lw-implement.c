/* lw-implement.c — difference equation, second-order sections, fixed-point sections.
 * See lw-implement.h and docs/implementation.md.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-implement-private.h"

LwStatus
lw_impl_check_controller (const LwModel *cz, const char *fn, LwError *err)
{
  if (cz == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "%s: NULL controller", fn);
  if (cz->domain != LW_DOMAIN_Z)
    return lw_error_set (err, LW_ERR_INVALID, -1, "%s: the controller must be in z", fn);
  if (cz->n_zeros > cz->n_poles)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "%s: the controller is improper (%zu zeros, %zu poles); it cannot be "
                         "run causally", fn, cz->n_zeros, cz->n_poles);
  if (!lw_model_is_finite (cz) || cz->gain == 0.0)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "%s: the controller must be finite and not zero", fn);
  if (cz->n_poles > LW_MAX_DEGREE)
    return lw_error_set (err, LW_ERR_INVALID, -1, "%s: order %zu exceeds %d", fn, cz->n_poles,
                         LW_MAX_DEGREE);
  return LW_OK;
}

/* ---- difference equation --------------------------------------------------------------- */

void
lw_diffeq_free (LwDiffEq *d)
{
  if (d == NULL)
    return;
  free (d->b);
  free (d->a);
  free (d);
}

LwStatus
lw_diffeq_from_model (const LwModel *cz, LwDiffEq **out, LwError *err)
{
  *out = NULL;
  LwStatus st = lw_impl_check_controller (cz, "difference equation", err);
  if (st != LW_OK)
    return st;
  size_t n = cz->n_poles;
  LwDiffEq *d = calloc (1, sizeof *d);
  double *num = calloc (cz->n_zeros + 1, sizeof *num);
  double *den = calloc (n + 1, sizeof *den);
  if (d != NULL)
    {
      d->b = calloc (n + 1, sizeof *d->b);
      d->a = calloc (n + 1, sizeof *d->a);
    }
  if (d == NULL || num == NULL || den == NULL || d->b == NULL || d->a == NULL)
    {
      free (num);
      free (den);
      lw_diffeq_free (d);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "difference equation: out of memory");
    }
  d->order = n;
  st = lw_model_to_poly (cz, num, den, err);
  if (st == LW_OK)
    {
      /* Divide numerator and denominator by z^n: the coefficient of z^j becomes that of
       * z^−(n−j).  den is monic (a[0] = 1 exactly). */
      for (size_t i = 0; i <= n; i++)
        {
          d->a[i] = den[n - i];
          size_t j = n - i;   /* power of z in the numerator */
          d->b[i] = j <= cz->n_zeros ? num[j] : 0.0;
        }
      d->a[0] = 1.0;
      for (size_t i = 0; i <= n; i++)
        if (!isfinite (d->a[i]) || !isfinite (d->b[i]))
          st = lw_error_set (err, LW_ERR_NUMERIC, -1,
                             "difference equation: a coefficient overflowed");
    }
  free (num);
  free (den);
  if (st != LW_OK)
    {
      lw_diffeq_free (d);
      return st;
    }
  *out = d;
  return LW_OK;
}

void
lw_diffeq_filter (const LwDiffEq *d, const double *x, double *y, size_t n)
{
  size_t m = d->order;
  for (size_t k = 0; k < n; k++)
    {
      /* u = b0 e[k] + Σ (b_i e[k−i] − a_i u[k−i]), the same order as the emitted step. */
      double u = d->b[0] * x[k];
      for (size_t i = 1; i <= m && i <= k; i++)
        u += d->b[i] * x[k - i] - d->a[i] * y[k - i];
      y[k] = u;
    }
}

/* ---- fixed point ----------------------------------------------------------------------- */

LwStatus
lw_qformat_parse (const char *text, LwQFormat *q, LwError *err)
{
  if (text == NULL)
    return lw_error_set (err, LW_ERR_PARSE, 0, "expected a Q format such as Q2.14");
  const char *p = text;
  if (*p == 'Q' || *p == 'q')
    p++;
  long v[2] = { 0, 0 };
  for (int part = 0; part < 2; part++)
    {
      if (*p < '0' || *p > '9')
        return lw_error_set (err, LW_ERR_PARSE, (int) (p - text),
                             "expected %s at %d in a Q format such as Q2.14",
                             part == 0 ? "the number of integer bits" : "the number of fraction bits",
                             (int) (p - text));
      while (*p >= '0' && *p <= '9')
        {
          if (v[part] < 1000)
            v[part] = v[part] * 10 + (*p - '0');
          p++;
        }
      if (part == 0)
        {
          if (*p != '.')
            return lw_error_set (err, LW_ERR_PARSE, (int) (p - text),
                                 "expected '.' at %d between integer and fraction bits (Q2.14)",
                                 (int) (p - text));
          p++;
        }
    }
  if (*p != '\0')
    return lw_error_set (err, LW_ERR_PARSE, (int) (p - text),
                         "unexpected character at %d after the Q format", (int) (p - text));
  if (v[0] < 1)
    return lw_error_set (err, LW_ERR_INVALID, 0,
                         "at least 1 integer bit is needed (it includes the sign bit)");
  if (v[1] > 15 || v[0] + v[1] > 16)
    return lw_error_set (err, LW_ERR_INVALID, 0,
                         "word length %ld + %ld bits: at most 16 bits in all (coefficients are "
                         "int16_t) and at most 15 fraction bits", v[0], v[1]);
  q->int_bits = (int) v[0];
  q->frac_bits = (int) v[1];
  return LW_OK;
}

double
lw_qformat_min (LwQFormat q)
{
  return -ldexp (1.0, q.int_bits - 1);
}

double
lw_qformat_max (LwQFormat q)
{
  return ldexp (1.0, q.int_bits - 1) - ldexp (1.0, -q.frac_bits);
}

void
lw_sos_fixed_free (LwSosFixed *f)
{
  if (f == NULL)
    return;
  free (f->s);
  free (f);
}

/* Roots of a real monic section denominator 1 + a1 z^−1 + a2 z^−2 of the given order. */
static size_t
section_poles (int order, double a1, double a2, double complex *r)
{
  if (order == 2)
    {
      double c[3] = { a2, a1, 1.0 };
      if (lw_poly_roots (c, 2, r, NULL) != LW_OK)
        return 0;
      return 2;
    }
  if (order == 1)
    {
      r[0] = -a1;
      return 1;
    }
  return 0;
}

LwStatus
lw_sos_quantize (const LwSos *sos, LwQFormat q, LwSosFixed **out, LwError *err)
{
  *out = NULL;
  if (sos == NULL || sos->n == 0)
    return lw_error_set (err, LW_ERR_INVALID, -1, "quantize: no sections");
  if (q.int_bits < 1 || q.frac_bits < 0 || q.frac_bits > 15 || q.int_bits + q.frac_bits > 16)
    return lw_error_set (err, LW_ERR_INVALID, -1, "quantize: unsupported Q%d.%d", q.int_bits,
                         q.frac_bits);
  LwSosFixed *f = calloc (1, sizeof *f);
  if (f != NULL)
    f->s = calloc (sos->n, sizeof *f->s);
  if (f == NULL || f->s == NULL)
    {
      lw_sos_fixed_free (f);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "quantize: out of memory");
    }
  f->q = q;
  f->n = sos->n;
  int wl = q.int_bits + q.frac_bits;
  double qmin = -ldexp (1.0, wl - 1), qmax = ldexp (1.0, wl - 1) - 1.0;
  static const char *const names[2][3] = { { "b0", "b1", "b2" }, { "a0", "a1", "a2" } };
  for (size_t k = 0; k < sos->n; k++)
    {
      const LwSection *s = &sos->s[k];
      LwSectionQ *t = &f->s[k];
      t->order = s->order;
      for (int which = 0; which < 2; which++)
        for (int i = which; i < 3; i++)   /* a0 = 1 is implied, never stored */
          {
            double c = which == 0 ? s->b[i] : s->a[i];
            double v = round (ldexp (c, q.frac_bits));
            if (!(v >= qmin && v <= qmax))
              {
                lw_sos_fixed_free (f);
                return lw_error_set (err, LW_ERR_INVALID, -1,
                                     "section %zu: %s = %.17g does not fit Q%d.%d (range %.6g "
                                     "to %.6g)", k + 1, names[which][i], c, q.int_bits,
                                     q.frac_bits, lw_qformat_min (q), lw_qformat_max (q));
              }
            if (which == 0)
              t->b[i] = (int32_t) v;
            else
              t->a[i] = (int32_t) v;
          }
      t->a[0] = 0;
      if (t->b[0] == 0 && t->b[1] == 0 && t->b[2] == 0)
        {
          lw_sos_fixed_free (f);
          return lw_error_set (err, LW_ERR_INVALID, -1,
                               "section %zu: every numerator coefficient (b0 %.6g, b1 %.6g, "
                               "b2 %.6g) rounds to 0 in Q%d.%d; use more fraction bits",
                               k + 1, s->b[0], s->b[1], s->b[2], q.int_bits, q.frac_bits);
        }
      /* poles exact (as stored in the section) and quantized, matched: for two, the
       * assignment with the smaller largest distance */
      double complex pq[2] = { 0, 0 };
      size_t nq = section_poles (t->order, ldexp ((double) t->a[1], -q.frac_bits),
                                 ldexp ((double) t->a[2], -q.frac_bits), pq);
      t->n_poles = s->n_poles < nq ? s->n_poles : nq;
      t->poles_exact[0] = s->poles[0];
      t->poles_exact[1] = s->poles[1];
      t->poles_quant[0] = pq[0];
      t->poles_quant[1] = pq[1];
      if (t->n_poles == 2
          && fmax (cabs (s->poles[0] - pq[1]), cabs (s->poles[1] - pq[0]))
               < fmax (cabs (s->poles[0] - pq[0]), cabs (s->poles[1] - pq[1])))
        {
          t->poles_quant[0] = pq[1];
          t->poles_quant[1] = pq[0];
        }
    }
  *out = f;
  return LW_OK;
}

LwStatus
lw_sos_fixed_to_sos (const LwSosFixed *f, LwSos **out, LwError *err)
{
  *out = NULL;
  LwSos *s = calloc (1, sizeof *s);
  if (s != NULL)
    s->s = calloc (f->n, sizeof *s->s);
  if (s == NULL || s->s == NULL)
    {
      lw_sos_free (s);
      return lw_error_set (err, LW_ERR_NOMEM, -1, "quantized sections: out of memory");
    }
  s->n = f->n;
  for (size_t k = 0; k < f->n; k++)
    {
      LwSection *c = &s->s[k];
      const LwSectionQ *t = &f->s[k];
      c->order = t->order;
      for (int i = 0; i < 3; i++)
        {
          c->b[i] = ldexp ((double) t->b[i], -f->q.frac_bits);
          c->a[i] = i == 0 ? 1.0 : ldexp ((double) t->a[i], -f->q.frac_bits);
        }
      c->n_poles = t->n_poles;
      memcpy (c->poles, t->poles_quant, sizeof c->poles);
      c->scale = 1.0;
      c->peak_gain = lw_section_peak_gain (c->b, c->a, NULL);
    }
  *out = s;
  return LW_OK;
}

LwStatus
lw_sos_fixed_model (const LwSosFixed *f, double period_s, LwModel **out, LwError *err)
{
  *out = NULL;
  LwSos *s = NULL;
  LwStatus st = lw_sos_fixed_to_sos (f, &s, err);
  if (st != LW_OK)
    return st;
  LwModel *acc = lw_model_new_constant (LW_DOMAIN_Z, period_s, 1.0);
  for (size_t k = 0; k < s->n && acc != NULL && st == LW_OK; k++)
    {
      const LwSection *c = &s->s[k];
      int order = c->order;
      /* numerator b0 z^order + b1 z^(order−1) + …: its leading nonzero coefficient gives the
       * gain, the rest its roots (a leading zero coefficient is a zero at infinity). */
      size_t lead = 0;
      while (lead < (size_t) order && c->b[lead] == 0.0)
        lead++;
      size_t nzr = (size_t) order - lead;
      LwModel *sec = lw_model_new (LW_DOMAIN_Z, period_s, c->b[lead], nzr, (size_t) order);
      if (sec == NULL)
        break;
      if (nzr > 0)
        {
          double asc[3];
          for (size_t i = 0; i <= nzr; i++)
            asc[i] = c->b[lead + nzr - i];   /* ascending powers */
          st = lw_poly_roots (asc, nzr, sec->zeros, err);
        }
      if (st == LW_OK && order > 0)
        {
          double asc[3] = { order == 2 ? c->a[2] : c->a[1], order == 2 ? c->a[1] : 1.0, 1.0 };
          st = lw_poly_roots (asc, (size_t) order, sec->poles, err);
        }
      if (st == LW_OK)
        {
          LwModel *prod = lw_model_mul (acc, sec);
          lw_model_free (acc);
          acc = prod;
        }
      lw_model_free (sec);
    }
  lw_sos_free (s);
  if (st != LW_OK)
    {
      lw_model_free (acc);
      return st;
    }
  if (acc == NULL)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "quantized controller: out of memory");
  *out = acc;
  return LW_OK;
}

/* Saturating int32 addition without a wider type: the exact sum when it fits, else the bound. */
static int32_t
sat_add32 (int32_t a, int32_t b)
{
  if (b > 0 && a > INT32_MAX - b)
    return INT32_MAX;
  if (b < 0 && a < INT32_MIN - b)
    return INT32_MIN;
  return a + b;
}

/* round(v / 2^n) with ties toward +∞, i.e. floor(v / 2^n + 1/2), for 0 <= n <= 15, without
 * right-shifting a negative number (implementation-defined in C). */
static int32_t
round_shift (int32_t v, int n)
{
  if (n == 0)
    return v;
  int32_t q;
  if (v >= 0)
    q = v >> n;
  else
    q = -1 - ((-(v + 1)) >> n);   /* floor(v / 2^n) */
  uint32_t r = (uint32_t) v & (((uint32_t) 1 << n) - 1u);   /* v mod 2^n, in [0, 2^n) */
  return q + (r >= ((uint32_t) 1 << (n - 1)) ? 1 : 0);
}

static int16_t
sat16 (int32_t v)
{
  return v > INT16_MAX ? INT16_MAX : v < INT16_MIN ? INT16_MIN : (int16_t) v;
}

void
lw_sos_fixed_filter (const LwSosFixed *f, const int16_t *x, int16_t *y, size_t n)
{
  int32_t *s1 = calloc (f->n, sizeof *s1);
  int32_t *s2 = calloc (f->n, sizeof *s2);
  if (s1 == NULL || s2 == NULL)
    {
      memset (y, 0, n * sizeof *y);
      free (s1);
      free (s2);
      return;
    }
  int fb = f->q.frac_bits;
  for (size_t k = 0; k < n; k++)
    {
      int16_t v = x[k];
      for (size_t j = 0; j < f->n; j++)
        {
          const LwSectionQ *c = &f->s[j];
          int32_t acc = sat_add32 ((int32_t) c->b[0] * v, s1[j]);
          int16_t out = sat16 (round_shift (acc, fb));
          s1[j] = sat_add32 (sat_add32 ((int32_t) c->b[1] * v, -((int32_t) c->a[1] * out)),
                             s2[j]);
          s2[j] = sat_add32 ((int32_t) c->b[2] * v, -((int32_t) c->a[2] * out));
          v = out;
        }
      y[k] = v;
    }
  free (s1);
  free (s2);
}
