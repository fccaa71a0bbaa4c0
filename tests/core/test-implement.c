/* test-implement.c — implementation forms: difference equation, second-order sections, fixed
 * point (Q format, quantization, integer arithmetic) and the C emitter's text.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <complex.h>
#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "lw-ctrl-map.h"
#include "lw-emit-c.h"
#include "lw-expr.h"
#include "lw-implement.h"

#define EPS DBL_EPSILON
#define PI 3.14159265358979323846

static void
check_close (double got, double want, double tol, const char *what, int line)
{
  double scale = fmax (fabs (want), 1.0);
  if (!(fabs (got - want) <= tol * scale))
    fail_msg ("line %d: %s = %.17g, expected %.17g (tolerance %.3g relative)", line, what, got,
              want, tol);
}
#define CHECK_REL(got, want, tol) check_close ((got), (want), (tol), #got, __LINE__)

static LwModel *
parse_z (const char *text, double T)
{
  LwModel *m = NULL;
  LwError err;
  if (lw_expr_parse (text, LW_DOMAIN_Z, T, &m, &err) != LW_OK)
    fail_msg ("'%s': %s", text, err.message);
  return m;
}

/* A sixth-order controller of our own: a lightly damped pole pair (r = 0.995), a pair at
 * r = 0.8, an integrator, two real poles; zeros: a notch pair on the unit circle, two real
 * zeros, one zero fewer than poles in all (strictly proper by one). */
static LwModel *
sixth_order (void)
{
  LwModel *m = lw_model_new (LW_DOMAIN_Z, 0.001, 0.37, 5, 6);
  double complex p1 = 0.995 * cexp (I * 0.3), p2 = 0.8 * cexp (I * 1.1);
  m->poles[0] = p1;
  m->poles[1] = conj (p1);
  m->poles[2] = p2;
  m->poles[3] = conj (p2);
  m->poles[4] = 1.0;
  m->poles[5] = 0.4;
  double complex z1 = cexp (I * 0.31);
  m->zeros[0] = z1;
  m->zeros[1] = conj (z1);
  m->zeros[2] = 0.97;
  m->zeros[3] = -0.5;
  m->zeros[4] = 0.2;
  lw_model_canonicalize (m);
  return m;
}

static void
test_tustin_integrator_difference (void **state)
{
  (void) state;
  /* 1/s at T = 0.1 by Tustin: 0.05 (z + 1)/(z − 1), i.e. u[k] = 0.05 e[k] + 0.05 e[k−1] + u[k−1]:
   * b = [0.05, 0.05], a = [1, −1] (standard result; scipy.signal.bilinear([1], [1, 0], fs=10)).
   * 0.05 = 2/(2·10) rounded once or twice: 2 ulp. */
  LwModel *ms = NULL;
  assert_int_equal (lw_expr_parse ("1/s", LW_DOMAIN_S, 0.0, &ms, NULL), LW_OK);
  LwModel *mz = NULL;
  assert_int_equal (lw_ctrl_map (ms, LW_CTRL_MAP_TUSTIN, 0.1, 0.0, &mz, NULL), LW_OK);
  LwDiffEq *d = NULL;
  assert_int_equal (lw_diffeq_from_model (mz, &d, NULL), LW_OK);
  assert_int_equal (d->order, 1);
  CHECK_REL (d->b[0], 0.05, 2 * EPS);
  CHECK_REL (d->b[1], 0.05, 2 * EPS);
  assert_true (d->a[0] == 1.0 && d->a[1] == -1.0);
  lw_diffeq_free (d);
  lw_model_free (mz);
  lw_model_free (ms);
}

static void
test_difference_vs_expanded (void **state)
{
  (void) state;
  LwModel *m = sixth_order ();
  LwDiffEq *d = NULL;
  assert_int_equal (lw_diffeq_from_model (m, &d, NULL), LW_OK);
  assert_int_equal (d->order, 6);
  /* Independent expansion here: ∏(1 − r z^−1) by repeated complex convolution (the core uses
   * real quadratic factors); agreement to 1e-14 absolute on coefficients of size <= 20
   * (a few ulp per multiply, six factors). */
  double complex a[7] = { 1 }, b[7] = { 0 };
  for (size_t i = 0; i < 6; i++)
    for (size_t j = i + 1; j > 0; j--)
      a[j] -= m->poles[i] * a[j - 1];
  b[1] = m->gain;   /* one zero fewer than poles: a leading delay */
  for (size_t i = 0; i < 5; i++)
    for (size_t j = i + 2; j > 1; j--)
      b[j] -= m->zeros[i] * b[j - 1];
  for (size_t i = 0; i <= 6; i++)
    {
      check_close (d->a[i], creal (a[i]), 1e-14, "a[i]", __LINE__);
      check_close (d->b[i], creal (b[i]), 1e-14, "b[i]", __LINE__);
    }
  assert_true (d->b[0] == 0.0);
  /* frequency response of the coefficients against the factored model, away from the
   * integrator (θ >= 0.05): 1e-11 relative (the expanded polynomial near the lightly damped
   * pair loses a few digits: cond ~ 1/(1 − r)²). */
  for (int j = 1; j <= 50; j++)
    {
      double th = 0.05 + (PI - 0.05) * j / 50.0;
      double complex zi = cexp (-I * th), num = 0, den = 0, zk = 1;
      for (size_t i = 0; i <= 6; i++, zk *= zi)
        {
          num += d->b[i] * zk;
          den += d->a[i] * zk;
        }
      double complex want = lw_model_eval (m, cexp (I * th));
      if (!(cabs (num / den - want) <= 1e-11 * cabs (want)))
        fail_msg ("θ = %g: |H| error %.3g relative", th, cabs (num / den - want) / cabs (want));
    }
  lw_diffeq_free (d);
  lw_model_free (m);
}

static void
test_sections_multiply_back (void **state)
{
  (void) state;
  LwModel *m = sixth_order ();
  LwSos *s = NULL;
  assert_int_equal (lw_sos_from_model (m, &s, NULL), LW_OK);
  assert_int_equal (s->n, 3);
  /* the product of the sections is C(z): 1e-12 relative on the unit circle (each section is a
   * ratio of two short polynomials; the scale factors multiply back exactly up to rounding),
   * 400 points, skipping θ = 0 where the integrator is */
  double worst = 0.0;
  for (int j = 1; j <= 400; j++)
    {
      double th = PI * j / 400.0;
      double complex z = cexp (I * th);
      double complex want = lw_model_eval (m, z), got = lw_sos_eval (s, z);
      worst = fmax (worst, cabs (got - want) / cabs (want));
    }
  if (!(worst <= 1e-12))
    fail_msg ("sections vs C(z): %.3g relative", worst);
  /* ordering: ascending pole radius, the integrator (|z| = 1) last */
  double last = 0.0;
  size_t poles = 0, zeros = 0;
  for (size_t k = 0; k < s->n; k++)
    {
      double r = 0.0;
      for (size_t i = 0; i < s->s[k].n_poles; i++)
        r = fmax (r, cabs (s->s[k].poles[i]));
      assert_true (r >= last);
      last = r;
      poles += s->s[k].n_poles;
      zeros += s->s[k].n_zeros;
      assert_true (s->s[k].a[0] == 1.0);
    }
  assert_int_equal (poles, 6);
  assert_int_equal (zeros, 5);
  CHECK_REL (last, 1.0, 1e-15);
  /* pairing: the notch zeros (on the circle at θ = 0.31) are nearest the pole pair at
   * 0.995·e^{j0.3}, so they share its section */
  int found = 0;
  for (size_t k = 0; k < s->n; k++)
    if (s->s[k].n_poles == 2 && fabs (cabs (s->s[k].poles[0]) - 0.995) < 1e-12)
      {
        found = 1;
        assert_int_equal (s->s[k].n_zeros, 2);
        CHECK_REL (fabs (carg (s->s[k].zeros[0])), 0.31, 1e-13);
      }
  assert_true (found);
  /* gain for headroom: every section but the last peaks at 1 over the unit circle; the grid
   * plus golden-section refinement finds the peak to 1e-9 relative (checked here against a
   * dense 200001-point scan that brackets it from below) */
  for (size_t k = 0; k + 1 < s->n; k++)
    {
      CHECK_REL (s->s[k].peak_gain, 1.0, 1e-9);
      double dense = 0.0;
      for (int j = 0; j <= 200000; j++)
        {
          double complex zi = cexp (-I * PI * j / 200000.0);
          const double *b = s->s[k].b, *a = s->s[k].a;
          dense = fmax (dense, cabs ((b[0] + zi * (b[1] + zi * b[2]))
                                     / (a[0] + zi * (a[1] + zi * a[2]))));
        }
      assert_true (dense <= 1.0 + 1e-9);
      assert_true (dense >= 0.999);
    }
  assert_true (isinf (s->s[s->n - 1].peak_gain));   /* the integrator section */
  lw_sos_free (s);
  lw_model_free (m);
}

static void
test_filters_agree (void **state)
{
  (void) state;
  /* Impulse responses of the sections (DF2T) and of the difference equation describe the same
   * C(z): 1e-9 of the peak over 300 samples (the difference equation of order 6 with poles at
   * r = 0.995 amplifies rounding by its condition, ~1e4·eps per step). */
  LwModel *m = sixth_order ();
  LwSos *s = NULL;
  LwDiffEq *d = NULL;
  assert_int_equal (lw_sos_from_model (m, &s, NULL), LW_OK);
  assert_int_equal (lw_diffeq_from_model (m, &d, NULL), LW_OK);
  enum { N = 300 };
  double x[N] = { 1.0 }, y1[N], y2[N];
  lw_sos_filter (s, x, y1, N);
  lw_diffeq_filter (d, x, y2, N);
  double peak = 0.0, err = 0.0;
  for (int k = 0; k < N; k++)
    {
      peak = fmax (peak, fabs (y2[k]));
      err = fmax (err, fabs (y1[k] - y2[k]));
    }
  assert_true (y1[0] == 0.0);   /* strictly proper by one: the response starts at k = 1 */
  if (!(err <= 1e-9 * peak))
    fail_msg ("sections vs difference equation: %.3g of the peak %.3g", err / peak, peak);
  lw_diffeq_free (d);
  lw_sos_free (s);
  lw_model_free (m);
}

static void
test_pure_gain_and_errors (void **state)
{
  (void) state;
  LwModel *g = lw_model_new_constant (LW_DOMAIN_Z, 0.01, -2.5);
  LwSos *s = NULL;
  assert_int_equal (lw_sos_from_model (g, &s, NULL), LW_OK);
  assert_int_equal (s->n, 1);
  assert_int_equal (s->s[0].order, 0);
  assert_true (s->s[0].b[0] == -2.5 && s->s[0].b[1] == 0.0 && s->s[0].a[1] == 0.0);
  lw_sos_free (s);
  lw_model_free (g);
  /* improper and wrong domain are refused with a message */
  LwModel *imp = parse_z ("(z-0.5)^2/(z-0.1)", 0.01);
  LwError err;
  assert_int_equal (lw_sos_from_model (imp, &s, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "improper"));
  LwDiffEq *d = NULL;
  assert_int_equal (lw_diffeq_from_model (imp, &d, &err), LW_ERR_INVALID);
  lw_model_free (imp);
}

static void
test_qformat (void **state)
{
  (void) state;
  LwQFormat q;
  LwError err;
  assert_int_equal (lw_qformat_parse ("Q2.14", &q, &err), LW_OK);
  assert_int_equal (q.int_bits, 2);
  assert_int_equal (q.frac_bits, 14);
  /* Q2.14: range [−2, 2 − 2^−14] by the definition in lw-implement.h */
  assert_true (lw_qformat_min (q) == -2.0 && lw_qformat_max (q) == 2.0 - 1.0 / 16384);
  assert_int_equal (lw_qformat_parse ("1.15", &q, &err), LW_OK);
  assert_int_equal (lw_qformat_parse ("Q2,14", &q, &err), LW_ERR_PARSE);
  assert_int_equal (err.position, 2);
  assert_int_equal (lw_qformat_parse ("Q2.14x", &q, &err), LW_ERR_PARSE);
  assert_int_equal (err.position, 5);
  assert_int_equal (lw_qformat_parse ("Q.14", &q, &err), LW_ERR_PARSE);
  assert_int_equal (err.position, 1);
  assert_int_equal (lw_qformat_parse ("Q0.15", &q, &err), LW_ERR_INVALID);
  assert_int_equal (lw_qformat_parse ("Q9.9", &q, &err), LW_ERR_INVALID);
  assert_int_equal (lw_qformat_parse ("Q1.16", &q, &err), LW_ERR_INVALID);
}

static void
test_quantize_pole_shift (void **state)
{
  (void) state;
  /* A section with poles 0.9 e^{±j0.2} and zeros 0.7, −0.3 (numbers of our own). The
   * independent computation: a1 = −1.8 cos 0.2, a2 = 0.81, rounded by hand to multiples of
   * 2^−14 (round to nearest), roots by the quadratic formula. 1e-12: a handful of roundings. */
  LwModel *m = lw_model_new (LW_DOMAIN_Z, 0.01, 0.25, 2, 2);
  m->poles[0] = 0.9 * cexp (I * 0.2);
  m->poles[1] = conj (m->poles[0]);
  m->zeros[0] = 0.7;
  m->zeros[1] = -0.3;
  lw_model_canonicalize (m);
  LwSos *s = NULL;
  assert_int_equal (lw_sos_from_model (m, &s, NULL), LW_OK);
  assert_int_equal (s->n, 1);
  LwQFormat q = { 2, 14 };
  LwSosFixed *f = NULL;
  assert_int_equal (lw_sos_quantize (s, q, &f, NULL), LW_OK);
  double a1 = -1.8 * cos (0.2), a2 = 0.81;
  long ia1 = lround (a1 * 16384), ia2 = lround (a2 * 16384);
  assert_int_equal (f->s[0].a[1], ia1);
  assert_int_equal (f->s[0].a[2], ia2);
  /* the only section carries the gain: b = 0.25·[1, −0.4, −0.21] */
  assert_int_equal (f->s[0].b[0], lround (0.25 * 16384));
  assert_int_equal (f->s[0].b[1], lround (-0.1 * 16384));
  assert_int_equal (f->s[0].b[2], lround (-0.0525 * 16384));
  double qa1 = ia1 / 16384.0, qa2 = ia2 / 16384.0;
  double re = -qa1 / 2, im = sqrt (qa2 - re * re);
  double complex pq = re + I * im;
  assert_int_equal (f->s[0].n_poles, 2);
  int upper = cimag (f->s[0].poles_quant[0]) > 0 ? 0 : 1;
  check_close (cabs (f->s[0].poles_quant[upper] - pq), 0.0, 1e-12, "quantized pole", __LINE__);
  check_close (cabs (f->s[0].poles_quant[1 - upper] - conj (pq)), 0.0, 1e-12, "conjugate",
               __LINE__);
  /* matched to the exact pole on the same side, and the shift is below half a step in each
   * coefficient (2^−15) divided by |dp/da| ≈ 1/(2 Im p) ≈ 2.8: well below 1e-4 */
  assert_true (cimag (f->s[0].poles_exact[upper]) > 0);
  double shift = cabs (f->s[0].poles_quant[upper] - f->s[0].poles_exact[upper]);
  assert_true (shift > 0.0 && shift < 1e-4);

  /* the quantized controller re-factored: its poles are the quantized roots (1e-12) */
  LwModel *cq = NULL;
  assert_int_equal (lw_sos_fixed_model (f, 0.01, &cq, NULL), LW_OK);
  assert_int_equal (cq->n_poles, 2);
  check_close (cabs (cq->poles[0] - pq), 0.0, 1e-12, "model pole", __LINE__);
  CHECK_REL (cq->gain, lround (0.25 * 16384) / 16384.0, EPS);
  lw_model_free (cq);
  lw_sos_fixed_free (f);

  /* Q1.15 cannot hold a1 ≈ −1.76: the error names the section and the coefficient */
  LwError err;
  LwQFormat q115 = { 1, 15 };
  assert_int_equal (lw_sos_quantize (s, q115, &f, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "section 1: a1 = "));
  assert_non_null (strstr (err.message, "Q1.15"));
  lw_sos_free (s);
  lw_model_free (m);
}

/* One first-order section given directly in integers. */
static LwSosFixed *
fixed_one (int b0, int b1, int a1, int frac)
{
  LwSosFixed *f = calloc (1, sizeof *f);
  f->s = calloc (1, sizeof *f->s);
  f->n = 1;
  f->q.int_bits = 16 - frac;
  f->q.frac_bits = frac;
  f->s[0].order = 1;
  f->s[0].b[0] = b0;
  f->s[0].b[1] = b1;
  f->s[0].a[1] = a1;
  return f;
}

static void
test_fixed_arithmetic (void **state)
{
  (void) state;
  /* The arithmetic defined in lw-implement.h, worked by hand:
   * b0 = 0.5 (8192 in Q2.14): x = 3 → acc = 24576 → 24576/16384 = 1.5 → rounds half up to 2;
   * x = −3 → −1.5 → −1; x = 1 → 0.5 → 1; x = −1 → −0.5 → 0. */
  LwSosFixed *f = fixed_one (8192, 0, 0, 14);
  int16_t x[4] = { 3, -3, 1, -1 }, y[4];
  lw_sos_fixed_filter (f, x, y, 4);
  assert_int_equal (y[0], 2);
  assert_int_equal (y[1], -1);
  assert_int_equal (y[2], 1);
  assert_int_equal (y[3], 0);
  lw_sos_fixed_free (f);
  /* saturation: b0 = 32767/16384 ≈ 2, x = 32767 → 65532 → clamps to 32767; x = −32768 →
   * −65534 → −32768 */
  f = fixed_one (32767, 0, 0, 14);
  int16_t xs[2] = { 32767, -32768 }, ys[2];
  lw_sos_fixed_filter (f, xs, ys, 2);
  assert_int_equal (ys[0], 32767);
  assert_int_equal (ys[1], -32768);
  lw_sos_fixed_free (f);
  /* an integrator u[k] = e[k] + u[k−1] (b0 = 1, a1 = −1 in Q2.14): a constant 10000 gives
   * 10000, 20000, 30000, then 32767 (int16 saturation) and stays there */
  f = fixed_one (16384, 0, -16384, 14);
  int16_t xi[5] = { 10000, 10000, 10000, 10000, 10000 }, yi[5];
  lw_sos_fixed_filter (f, xi, yi, 5);
  assert_int_equal (yi[0], 10000);
  assert_int_equal (yi[1], 20000);
  assert_int_equal (yi[2], 30000);
  assert_int_equal (yi[3], 32767);
  assert_int_equal (yi[4], 32767);
  lw_sos_fixed_free (f);
}

static void
test_emit_text (void **state)
{
  (void) state;
  LwModel *m = sixth_order ();
  LwSos *s = NULL;
  assert_int_equal (lw_sos_from_model (m, &s, NULL), LW_OK);
  LwEmitInput in = { .prefix = "motor_", .form = LW_FORM_SECTIONS, .period_s = 0.001,
                     .compute_delay = 1, .controller_z = m, .sos = s };
  LwText h, c;
  lw_text_init (&h);
  lw_text_init (&c);
  LwError err;
  assert_int_equal (lw_emit_c (&in, &h, &c, &err), LW_OK);
  assert_non_null (strstr (h.data, "#ifndef MOTOR_CONTROLLER_H"));
  assert_non_null (strstr (h.data, "double motor_step (motor_state *st, double e);"));
  assert_non_null (strstr (h.data, "int motor_self_test (void);"));
  assert_non_null (strstr (c.data, "#include \"motor_controller.h\""));
  assert_non_null (strstr (c.data, "Simulation is not validation"));
  assert_non_null (strstr (c.data, "functional-safety standards"));
  assert_non_null (strstr (c.data, "Local codes and regulations prevail"));
  assert_non_null (strstr (c.data, "NOT in the coefficients"));
  assert_null (strstr (c.data, "lw_ctrl_"));
  /* the self-test vector is the DF2T impulse response (the same routine as the code) */
  double y[LW_EMIT_SELFTEST_LEN];
  assert_int_equal (lw_emit_selftest_vectors (&in, y, NULL, NULL), LW_OK);
  assert_true (y[0] == 0.0 && y[1] != 0.0);
  lw_text_clear (&h);
  lw_text_clear (&c);
  /* bad prefixes name the character */
  assert_int_equal (lw_emit_prefix_check ("9abc", &err), LW_ERR_INVALID);
  assert_int_equal (err.position, 0);
  assert_int_equal (lw_emit_prefix_check ("ab-c", &err), LW_ERR_INVALID);
  assert_int_equal (err.position, 2);
  assert_int_equal (lw_emit_prefix_check ("_ok9_", &err), LW_OK);
  /* fixed point with the difference form is refused */
  LwDiffEq *d = NULL;
  assert_int_equal (lw_diffeq_from_model (m, &d, NULL), LW_OK);
  LwSosFixed dummy = { { 2, 14 }, 0, NULL };
  in.form = LW_FORM_DIFFERENCE;
  in.diffeq = d;
  in.fixed = &dummy;
  assert_int_equal (lw_emit_c (&in, &h, &c, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "sections form only"));
  lw_text_clear (&h);
  lw_text_clear (&c);
  lw_diffeq_free (d);
  lw_sos_free (s);
  lw_model_free (m);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_tustin_integrator_difference),
    cmocka_unit_test (test_difference_vs_expanded),
    cmocka_unit_test (test_sections_multiply_back),
    cmocka_unit_test (test_filters_agree),
    cmocka_unit_test (test_pure_gain_and_errors),
    cmocka_unit_test (test_qformat),
    cmocka_unit_test (test_quantize_pole_shift),
    cmocka_unit_test (test_fixed_arithmetic),
    cmocka_unit_test (test_emit_text),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
