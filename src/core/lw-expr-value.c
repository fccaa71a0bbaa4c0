/* lw-expr-value.c — the value of an expression while it is read: a constant times a
 * product of polynomial factors with integer exponents; products, quotients, powers and sums
 * of such values, with the degree limits checked.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */

#include "lw-expr-private.h"

/* ---------------------------------------------------------------------------------------- */
/* Values                                                                                   */

void
lw_expr_value_clear (Value *v)
{
  for (size_t i = 0; i < v->n; i++)
    free (v->f[i].c);
  free (v->f);
  v->f = NULL;
  v->n = 0;
  v->gain = 0.0;
}

void
lw_expr_value_set_zero (Value *v)
{
  lw_expr_value_clear (v);
}

static bool
poly_equal (const double *a, size_t da, const double *b, size_t db)
{
  if (da != db)
    return false;
  return memcmp (a, b, (da + 1) * sizeof *a) == 0;
}

/* Adds f^exp (copying the coefficients) and merges with an equal factor; false on no memory. */
bool
lw_expr_value_add_factor (Value *v, const double *c, size_t deg, long exp)
{
  if (exp == 0)
    return true;
  for (size_t i = 0; i < v->n; i++) {
    if (poly_equal (v->f[i].c, v->f[i].deg, c, deg)) {
      v->f[i].exp += exp;
      if (v->f[i].exp == 0) {
        free (v->f[i].c);
        memmove (v->f + i, v->f + i + 1, (v->n - i - 1) * sizeof *v->f);
        v->n--;
      }
      return true;
    }
  }
  Factor *nf = realloc (v->f, (v->n + 1) * sizeof *nf);
  if (nf == NULL)
    return false;
  v->f = nf;
  double *cc = malloc ((deg + 1) * sizeof *cc);
  if (cc == NULL)
    return false;
  memcpy (cc, c, (deg + 1) * sizeof *cc);
  v->f[v->n++] = (Factor){ cc, deg, exp };
  return true;
}

void
lw_expr_value_degrees (const Value *v, unsigned long long *num, unsigned long long *den)
{
  *num = 0;
  *den = 0;
  for (size_t i = 0; i < v->n; i++) {
    unsigned long long d = (unsigned long long) v->f[i].deg;
    if (v->f[i].exp > 0)
      *num += d * (unsigned long long) v->f[i].exp;
    else
      *den += d * (unsigned long long) (-v->f[i].exp);
  }
}

LwStatus
lw_expr_nomem (Parser *p)
{
  return lw_error_set (p->err, LW_ERR_NOMEM, (int) p->pos, "out of memory while parsing");
}

/* Checks the degree limit and finiteness after an operation at text position pos.  Outside
 * parentheses the running value's numerator and denominator are those of the result, so the
 * message names which one; inside parentheses it names only the degree. */
LwStatus
lw_expr_value_check (Parser *p, const Value *v, size_t pos)
{
  unsigned long long nd, dd;
  lw_expr_value_degrees (v, &nd, &dd);
  if (nd > LW_MAX_DEGREE || dd > LW_MAX_DEGREE) {
    bool num = nd > LW_MAX_DEGREE;
    unsigned long long deg = num ? nd : dd;
    if (p->depth == 0)
      return lw_error_set (p->err, LW_ERR_INVALID, (int) pos,
                           "%s degree %llu exceeds the limit of %d at position %zu",
                           num ? "numerator" : "denominator", deg, LW_MAX_DEGREE, pos);
    return lw_error_set (p->err, LW_ERR_INVALID, (int) pos,
                         "degree %llu exceeds the limit of %d at position %zu", deg,
                         LW_MAX_DEGREE, pos);
  }
  bool finite = isfinite (v->gain);
  for (size_t i = 0; finite && i < v->n; i++)
    for (size_t k = 0; k <= v->f[i].deg; k++)
      if (!isfinite (v->f[i].c[k]))
        finite = false;
  if (!finite)
    return lw_error_set (p->err, LW_ERR_INVALID, (int) pos,
                         "the value overflows (is not finite) at position %zu", pos);
  return LW_OK;
}

/* a ← a · b^sign (sign = +1 or −1).  b is left untouched.  b must not be zero for sign −1. */
bool
lw_expr_value_mul (Value *a, const Value *b, int sign)
{
  if (sign > 0)
    a->gain *= b->gain;
  else
    a->gain /= b->gain;
  if (a->gain == 0.0) {
    lw_expr_value_set_zero (a);
    return true;
  }
  for (size_t i = 0; i < b->n; i++)
    if (!lw_expr_value_add_factor (a, b->f[i].c, b->f[i].deg, sign * b->f[i].exp))
      return false;
  return true;
}

/* Ascending polynomial product r ← r · f (r has room; *dr its degree). */
static void
poly_mul_into (double *r, size_t *dr, const double *f, size_t df)
{
  size_t d = *dr;
  for (size_t k = d + df + 1; k-- > 0;) {
    double s = 0.0;
    size_t jlo = k > d ? k - d : 0;
    size_t jhi = k < df ? k : df;
    for (size_t j = jlo; j <= jhi; j++)
      s += f[j] * r[k - j];
    r[k] = s;
  }
  *dr = d + df;
}

/* Expands ∏ f_k^(e_k) for the given non-negative exponents into a new array. */
static double *
expand (const Value *v, const long *e, size_t *deg_out)
{
  size_t deg = 0;
  for (size_t i = 0; i < v->n; i++)
    deg += v->f[i].deg * (size_t) e[i];
  double *r = calloc (deg + 1, sizeof *r);
  if (r == NULL)
    return NULL;
  r[0] = 1.0;
  size_t d = 0;
  for (size_t i = 0; i < v->n; i++)
    for (long k = 0; k < e[i]; k++)
      poly_mul_into (r, &d, v->f[i].c, v->f[i].deg);
  *deg_out = d;
  return r;
}

/* a ← a + sign·b. */
bool
lw_expr_value_add (Value *a, const Value *b, int sign)
{
  if (b->gain == 0.0)
    return true;
  if (a->gain == 0.0) {
    a->gain = sign * b->gain;
    for (size_t i = 0; i < b->n; i++)
      if (!lw_expr_value_add_factor (a, b->f[i].c, b->f[i].deg, b->f[i].exp))
        return false;
    return true;
  }
  /* Union of the factors, with each side's exponent (0 where absent). */
  Value u = { .gain = 1.0 };
  bool ok = true;
  for (size_t i = 0; ok && i < a->n; i++)
    ok = lw_expr_value_add_factor (&u, a->f[i].c, a->f[i].deg, 1);
  for (size_t i = 0; ok && i < b->n; i++) {
    bool found = false;
    for (size_t j = 0; j < u.n; j++)
      if (poly_equal (u.f[j].c, u.f[j].deg, b->f[i].c, b->f[i].deg))
        found = true;
    if (!found)
      ok = lw_expr_value_add_factor (&u, b->f[i].c, b->f[i].deg, 1);
  }
  long *ea = NULL, *eb = NULL, *em = NULL;
  double *pa = NULL, *pb = NULL;
  if (ok) {
    ea = calloc (u.n + 1, sizeof *ea);
    eb = calloc (u.n + 1, sizeof *eb);
    em = calloc (u.n + 1, sizeof *em);
    ok = ea != NULL && eb != NULL && em != NULL;
  }
  if (ok) {
    for (size_t j = 0; j < u.n; j++) {
      for (size_t i = 0; i < a->n; i++)
        if (poly_equal (u.f[j].c, u.f[j].deg, a->f[i].c, a->f[i].deg))
          ea[j] = a->f[i].exp;
      for (size_t i = 0; i < b->n; i++)
        if (poly_equal (u.f[j].c, u.f[j].deg, b->f[i].c, b->f[i].deg))
          eb[j] = b->f[i].exp;
      em[j] = ea[j] < eb[j] ? ea[j] : eb[j];
      ea[j] -= em[j];
      eb[j] -= em[j];
    }
  }
  size_t da = 0, db = 0;
  if (ok) {
    pa = expand (&u, ea, &da);
    pb = expand (&u, eb, &db);
    ok = pa != NULL && pb != NULL;
  }
  Value r = { .gain = 1.0 };
  if (ok) {
    size_t dmax = da > db ? da : db;
    double *sum = calloc (dmax + 1, sizeof *sum);
    ok = sum != NULL;
    if (ok) {
      for (size_t k = 0; k <= dmax; k++) {
        double x = k <= da ? a->gain * pa[k] : 0.0;
        double y = k <= db ? b->gain * pb[k] : 0.0;
        sum[k] = sign > 0 ? x + y : x - y;
      }
      size_t ds = dmax;
      while (ds > 0 && sum[ds] == 0.0)
        ds--;
      if (sum[ds] == 0.0) {
        r.gain = 0.0;            /* identically zero */
      } else {
        double lead = sum[ds];
        r.gain = lead;
        if (ds > 0) {
          for (size_t k = 0; k < ds; k++)
            sum[k] /= lead;
          sum[ds] = 1.0;
        }
        for (size_t j = 0; ok && j < u.n; j++)
          ok = lw_expr_value_add_factor (&r, u.f[j].c, u.f[j].deg, em[j]);
        if (ok && ds > 0)
          ok = lw_expr_value_add_factor (&r, sum, ds, 1);
      }
      free (sum);
    }
  }
  free (ea);
  free (eb);
  free (em);
  free (pa);
  free (pb);
  lw_expr_value_clear (&u);
  if (!ok) {
    lw_expr_value_clear (&r);
    return false;
  }
  lw_expr_value_clear (a);
  *a = r;
  if (a->gain == 0.0)
    lw_expr_value_set_zero (a);
  return true;
}
