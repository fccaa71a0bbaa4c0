/* lw-ctrl-map.c — continuous controller to z, factor by factor (see lw-ctrl-map.h).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-ctrl-map.h"

#include <math.h>
#include <stdlib.h>

#define LW_PI 3.14159265358979323846

const char *
lw_ctrl_map_method_name (LwCtrlMapMethod method)
{
  switch (method) {
  case LW_CTRL_MAP_TUSTIN:
    return "tustin";
  case LW_CTRL_MAP_MATCHED:
    return "matched";
  case LW_CTRL_MAP_MATCHED_BIPROPER:
    return "matched-biproper";
  case LW_CTRL_MAP_FORWARD_EULER:
    return "forward-euler";
  case LW_CTRL_MAP_BACKWARD_EULER:
    return "backward-euler";
  default:
    return NULL;
  }
}

/* e^{x} − 1 for complex x without cancellation near x = 0:
 * e^{a}(cos b + i sin b) − 1 = expm1(a) cos b − 2 sin²(b/2) + i e^{a} sin b. */
static double complex
cexpm1 (double complex x)
{
  double a = creal (x), b = cimag (x);
  if (b == 0.0)
    return CMPLX (expm1 (a), 0.0);
  double h = sin (0.5 * b);
  return CMPLX (expm1 (a) * cos (b) - 2.0 * h * h, exp (a) * sin (b));
}

static double complex
cexp_exact_conj (double complex x)
{
  double a = creal (x), b = cimag (x);
  if (b == 0.0)
    return CMPLX (exp (a), 0.0);
  double r = exp (a);
  return CMPLX (r * cos (b), r * sin (b));
}

typedef struct {
  LwModel *m;      /* output; n_zeros / n_poles grow as roots are appended */
  double gain;
} Acc;

static void
push (Acc *acc, bool zero, double complex r)
{
  if (zero)
    acc->m->zeros[acc->m->n_zeros++] = r;
  else
    acc->m->poles[acc->m->n_poles++] = r;
}

/* Pushes a mapped root or conjugate pair. */
static void
push_mapped (Acc *acc, bool zero, double complex w, bool pair)
{
  if (pair) {
    push (acc, zero, w);
    push (acc, zero, conj (w));
  } else {
    push (acc, zero, CMPLX (creal (w), 0.0));
  }
}

/* Maps one real root or one conjugate pair x (positive-imaginary member given).  `zero` says
 * which side it is on; *extra_other_side counts the roots at z = −1 (Tustin) or z = 0
 * (backward Euler) that the map adds on the other side. */
static void
map_root (Acc *acc, LwCtrlMapMethod method, double T, double K, bool zero, double complex x,
          bool pair, size_t *extra_other_side)
{
  size_t mult = pair ? 2 : 1;
  switch (method) {
  case LW_CTRL_MAP_TUSTIN: {
    /* s − x = ((K − x) z − (K + x)) / (z + 1) */
    double complex km = K - x;
    if (!pair && creal (km) == 0.0) {
      /* x = K: the root goes to z = ∞, leaving −2K. */
      acc->gain = zero ? acc->gain * (-2.0 * K) : acc->gain / (-2.0 * K);
    } else {
      double g = pair ? creal (km) * creal (km) + cimag (km) * cimag (km) : creal (km);
      acc->gain = zero ? acc->gain * g : acc->gain / g;
      push_mapped (acc, zero, (K + x) / km, pair);
    }
    *extra_other_side += mult;    /* a root at z = −1 on the other side, per s-root */
    break;
  }
  case LW_CTRL_MAP_MATCHED:
  case LW_CTRL_MAP_MATCHED_BIPROPER: {
    if (x == 0.0) {
      push (acc, zero, 1.0);
      acc->gain = zero ? acc->gain / T : acc->gain * T;
      break;
    }
    /* factor −x / (1 − e^{xT}) = x / expm1(xT) for a zero, its inverse for a pole */
    double complex f = x / cexpm1 (x * T);
    double g = pair ? creal (f) * creal (f) + cimag (f) * cimag (f) : creal (f);
    acc->gain = zero ? acc->gain * g : acc->gain / g;
    push_mapped (acc, zero, cexp_exact_conj (x * T), pair);
    break;
  }
  case LW_CTRL_MAP_FORWARD_EULER: {
    /* s − x = (z − (1 + xT)) / T */
    double g = pair ? T * T : T;
    acc->gain = zero ? acc->gain / g : acc->gain * g;
    push_mapped (acc, zero, 1.0 + x * T, pair);
    break;
  }
  case LW_CTRL_MAP_BACKWARD_EULER: {
    /* s − x = ((1 − xT) z − 1) / (T z) */
    double complex a = 1.0 - x * T;
    if (!pair && creal (a) == 0.0) {
      acc->gain = zero ? acc->gain * (-1.0 / T) : acc->gain * (-T);
    } else {
      double g = pair ? (creal (a) * creal (a) + cimag (a) * cimag (a)) / (T * T)
                      : creal (a) / T;
      acc->gain = zero ? acc->gain * g : acc->gain / g;
      push_mapped (acc, zero, 1.0 / a, pair);
    }
    *extra_other_side += mult;    /* a root at z = 0 on the other side, per s-root */
    break;
  }
  }
}

/* Walks the roots of one side; false when a complex root has no conjugate partner. */
static bool
map_side (Acc *acc, LwCtrlMapMethod method, double T, double K, bool zero,
          const double complex *roots, size_t n, size_t *extra_other_side)
{
  for (size_t i = 0; i < n;) {
    double complex x = roots[i];
    if (cimag (x) == 0.0) {
      map_root (acc, method, T, K, zero, x, false, extra_other_side);
      i += 1;
    } else if (i + 1 < n && roots[i + 1] == conj (x)) {
      double complex xp = cimag (x) > 0 ? x : conj (x);
      map_root (acc, method, T, K, zero, xp, true, extra_other_side);
      i += 2;
    } else {
      return false;
    }
  }
  return true;
}

LwStatus
lw_ctrl_map (const LwModel *ms, LwCtrlMapMethod method, double period_s, double prewarp_rad_s,
        LwModel **out, LwError *err)
{
  lw_error_clear (err);
  if (out == NULL || ms == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "lw_ctrl_map: NULL argument");
  *out = NULL;
  const char *name = lw_ctrl_map_method_name (method);
  if (name == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "unknown discretization method %d",
                         (int) method);
  if (ms->domain != LW_DOMAIN_S)
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the model to discretize must be in s, not in '%c'",
                         lw_domain_var (ms->domain));
  if (!lw_model_is_finite (ms))
    return lw_error_set (err, LW_ERR_INVALID, -1, "the model has a non-finite gain or root");
  if (!(isfinite (period_s) && period_s > 0.0))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "sample period %g s must be finite and positive", period_s);
  double T = period_s;
  double K = 2.0 / T;
  if (prewarp_rad_s != 0.0) {
    if (method != LW_CTRL_MAP_TUSTIN)
      return lw_error_set (err, LW_ERR_INVALID, -1,
                           "a prewarp frequency applies to Tustin only, not to %s", name);
    double half = 0.5 * prewarp_rad_s * T;
    if (!(isfinite (prewarp_rad_s) && prewarp_rad_s > 0.0 && half < 0.5 * LW_PI))
      return lw_error_set (err, LW_ERR_INVALID, -1,
                           "prewarp frequency %g rad/s must lie strictly between 0 and the "
                           "Nyquist frequency %g rad/s", prewarp_rad_s, LW_PI / T);
    K = prewarp_rad_s / tan (half);
  }
  bool improper = ms->n_zeros > ms->n_poles;
  if (improper && (method == LW_CTRL_MAP_MATCHED || method == LW_CTRL_MAP_MATCHED_BIPROPER ||
                   method == LW_CTRL_MAP_FORWARD_EULER))
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the %s map of an improper model (%zu zeros, %zu poles) is not causal; "
                         "use Tustin or backward Euler", name, ms->n_zeros, ms->n_poles);

  LwModel *in = lw_model_copy (ms);
  size_t total = ms->n_zeros + ms->n_poles;
  LwModel *m = lw_model_new (LW_DOMAIN_Z, T, 0.0, total, total);
  if (in == NULL || m == NULL) {
    lw_model_free (in);
    lw_model_free (m);
    return lw_error_set (err, LW_ERR_NOMEM, -1, "out of memory in lw_ctrl_map");
  }
  lw_model_canonicalize (in);
  m->n_zeros = 0;
  m->n_poles = 0;
  Acc acc = { m, ms->gain };
  size_t extra_poles = 0, extra_zeros = 0;   /* at −1 (Tustin) or 0 (backward Euler) */
  bool ok = map_side (&acc, method, T, K, true, in->zeros, in->n_zeros, &extra_poles) &&
            map_side (&acc, method, T, K, false, in->poles, in->n_poles, &extra_zeros);
  lw_model_free (in);
  if (!ok) {
    lw_model_free (m);
    return lw_error_set (err, LW_ERR_INVALID, -1,
                         "the model has a complex root without its conjugate");
  }

  if (method == LW_CTRL_MAP_TUSTIN || method == LW_CTRL_MAP_BACKWARD_EULER) {
    double complex at = method == LW_CTRL_MAP_TUSTIN ? -1.0 : 0.0;
    /* Net count: the extra roots of the two sides cancel pairwise. */
    while (extra_zeros > extra_poles) {
      push (&acc, true, at);
      extra_zeros--;
    }
    while (extra_poles > extra_zeros) {
      push (&acc, false, at);
      extra_poles--;
    }
  } else if (method == LW_CTRL_MAP_MATCHED || method == LW_CTRL_MAP_MATCHED_BIPROPER) {
    size_t d = ms->n_poles - ms->n_zeros;
    size_t at_minus1 = method == LW_CTRL_MAP_MATCHED_BIPROPER ? d : (d > 0 ? d - 1 : 0);
    for (size_t i = 0; i < at_minus1; i++) {
      push (&acc, true, -1.0);
      acc.gain *= 0.5;    /* (z + 1) is 2 at z = 1 */
    }
  }
  m->gain = acc.gain;
  if (!lw_model_is_finite (m)) {
    lw_model_free (m);
    return lw_error_set (err, LW_ERR_NUMERIC, -1,
                         "the %s map produced a non-finite gain or root (a root maps onto "
                         "z = 1 or the period is extreme)", name);
  }
  lw_model_canonicalize (m);
  *out = m;
  return LW_OK;
}
