/* test-sampled — matrix exponential, exact ZOH with dead time, the w-plane map and warping.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <cmocka.h>

#include "lw-test.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "lw-analysis.h"
#include "lw-expr.h"
#include "lw-internal.h"
#include "lw-linalg.h"

/* e^{At} for A = [0 1; −1 0] is the rotation [cos t, sin t; −sin t, cos t] (closed form).
 * Tolerance 1e-15·(1 + t): Padé [13/13] with scaling and squaring is accurate to a few ulps
 * times the number of squarings (Higham 2005). */
static void
test_expm_rotation (void **state)
{
  (void) state;
  for (double t = 0.1; t < 40.0; t *= 3.0)
    {
      double a[4] = { 0, -t, t, 0 }, e[4];
      assert_int_equal (lw_expm (2, a, e, NULL), LW_OK);
      double tol = 4e-15 * (1.0 + t);
      assert_close (e[0], cos (t), tol, "cos");
      assert_close (e[2], sin (t), tol, "sin");
      assert_close (e[1], -sin (t), tol, "-sin");
      assert_close (e[3], cos (t), tol, "cos");
    }
}

/* The classic hard case A = [−49 24; −64 31] (Moler & Van Loan, "Nineteen dubious ways to
 * compute the exponential of a matrix", SIAM Review 1978/2003): eigenvalues −1 and −17, with
 * eigenvectors [1 2]ᵀ and [3 4]ᵀ, so e^A = V diag(e⁻¹, e⁻¹⁷) V⁻¹ in closed form.
 * Tolerance 1e-13 relative to ‖e^A‖ ≈ 1.5: the matrix has ‖A‖ ≈ 100, so several squarings. */
static void
test_expm_dubious (void **state)
{
  (void) state;
  double a[4] = { -49, -64, 24, 31 }, e[4];
  assert_int_equal (lw_expm (2, a, e, NULL), LW_OK);
  double e1 = exp (-1.0), e17 = exp (-17.0);
  /* V = [1 3; 2 4], V⁻¹ = [−2 1.5; 1 −0.5] */
  double want[4] = {
    1 * e1 * -2 + 3 * e17 * 1, 2 * e1 * -2 + 4 * e17 * 1,
    1 * e1 * 1.5 + 3 * e17 * -0.5, 2 * e1 * 1.5 + 4 * e17 * -0.5 };
  for (int i = 0; i < 4; i++)
    assert_close (e[i], want[i], 1e-13, "e^A entry");
}

/* ZOH of 1/(s(s+1)) at T = 1 s: (0.3679 z + 0.2642)/((z − 1)(z − 0.3679)) (Ogata, Discrete-Time
 * Control Systems, 2nd ed.; 4 decimals from memory). Exact values: numerator e⁻¹ z + (1 − 2e⁻¹),
 * poles 1 and e⁻¹ — compared to 1e-13 (Padé + dggev/dgeev rounding on an order-2 problem). */
static void
test_zoh_ogata (void **state)
{
  (void) state;
  LwModel *p = parse ("1/(s*(s+1))", LW_DOMAIN_S, 0);
  LwSampledPlant *sp = NULL;
  assert_int_equal (lw_sampled_plant_new (p, 0.0, 1.0, &sp, NULL), LW_OK);
  LwModel *z = lw_sampled_plant_model (sp);
  assert_non_null (z);
  assert_int_equal (z->n_zeros, 1);
  assert_int_equal (z->n_poles, 2);
  double e1 = exp (-1.0);
  assert_close (z->gain, e1, 1e-13, "gain");
  assert_close (creal (z->zeros[0]), -(1 - 2 * e1) / e1, 1e-13, "zero");
  assert_close (creal (z->poles[0]), e1, 1e-13, "pole e^-1");
  assert_close (creal (z->poles[1]), 1.0, 1e-13, "pole 1");
  /* 4-decimal book values */
  assert_close (z->gain, 0.3679, 5e-5, "book gain 0.3679");
  assert_close (z->gain * -creal (z->zeros[0]), 0.2642, 5e-5, "book b0 0.2642");
  /* the response from the state space equals the factored form away from the roots */
  double complex h = lw_sampled_plant_response (sp, 0.7);
  double complex zz = cexp (0.7 * I);
  double complex want = (e1 * zz + (1 - 2 * e1)) / ((zz - 1.0) * (zz - e1));
  assert_close (cabs (h - want) / cabs (want), 0.0, 1e-14, "response");
  lw_model_free (z);
  lw_sampled_plant_free (sp);
  lw_model_free (p);
}

/* Fractional dead time θ (0 < θ < T) on 1/(s + a): by the modified z-transform
 *   P(z) = [(1 − e^{−a(T−θ)}) z + (e^{−a(T−θ)} − e^{−aT})] / (a z (z − e^{−aT}))
 * (Franklin, Powell & Workman, Digital Control of Dynamic Systems, 3rd ed., §4.3; from memory,
 * re-derived from x(kT+θ) and x((k+1)T)). Whole samples add z^−d. Tolerance 1e-13 relative. */
static void
test_zoh_fractional_delay (void **state)
{
  (void) state;
  const double a = 3.0, t = 0.1;
  LwModel *p = parse ("3/(s+3)", LW_DOMAIN_S, 0);
  const double taus[] = { 0.037, 0.1 + 0.064, 0.3, 0.0999 };
  for (size_t k = 0; k < sizeof taus / sizeof taus[0]; k++)
    {
      double tau = taus[k];
      int d = (int) floor (tau / t + 1e-9);
      double th = tau - d * t;
      if (th < 1e-9 * t)
        th = 0.0;
      LwSampledPlant *sp = NULL;
      assert_int_equal (lw_sampled_plant_new (p, tau, t, &sp, NULL), LW_OK);
      for (double w = 0.3; w < LW_PI / t; w *= 1.7)
        {
          double complex z = cexp (I * w * t);
          double complex want;
          if (th > 0)
            want = a * ((1 - exp (-a * (t - th))) * z + (exp (-a * (t - th)) - exp (-a * t)))
                   / (a * z * (z - exp (-a * t)));
          else
            want = (1 - exp (-a * t)) / (z - exp (-a * t));
          want *= cpow (z, -d);
          double complex got = lw_sampled_plant_response (sp, w);
          if (!(cabs (got - want) <= 1e-13 * cabs (want)))
            fail_msg ("tau %g w %g: got %g%+gi want %g%+gi", tau, w, creal (got), cimag (got),
                      creal (want), cimag (want));
        }
      lw_sampled_plant_free (sp);
    }
  lw_model_free (p);
}

/* Warping ν = (2/T) tan(ωT/2): at ω = π/(2T), ν = 2/T exactly (tan(π/4) = 1; standard
 * identity). Round trip ω → ν → ω to 1e-15 relative. */
static void
test_warping (void **state)
{
  (void) state;
  const double t = 0.004;
  assert_close (lw_warp_omega_to_nu (LW_PI / (2 * t), t), 2 / t, 2e-16 * 2 / t, "nu(pi/2T)");
  for (double w = 0.01; w < LW_PI / t; w *= 1.9)
    assert_close (lw_warp_nu_to_omega (lw_warp_omega_to_nu (w, t), t), w, 1e-15 * w, "round trip");
}

/* The bilinear map factor by factor: H_w(w(z)) must equal H_z(z) at test points, and z → w → z
 * must give back the model (1e-12 relative: one root map and back). Zeros at z = −1 go to w = ∞
 * and the relative degree shows up as zeros at w = 2/T. */
static void
test_bilinear_map (void **state)
{
  (void) state;
  const double t = 0.05;
  LwModel *mz = parse ("0.2*(z+1)*(z-0.5)/((z-1)*(z^2-1.2*z+0.52)*(z-0.1))", LW_DOMAIN_Z, t);
  LwModel *mw = lw_model_z_to_w (mz);
  assert_non_null (mw);
  /* zero at −1 dropped, relative degree 2 → two zeros at 2/T */
  assert_int_equal (mw->n_zeros, 1 + 2);
  assert_int_equal (mw->n_poles, 4);
  int at_2t = 0;
  for (size_t i = 0; i < mw->n_zeros; i++)
    at_2t += cabs (mw->zeros[i] - 2 / t) < 1e-12 * 2 / t;
  assert_int_equal (at_2t, 2);
  const double complex pts[] = { 0.3 + 0.2 * I, -0.7 + 0.1 * I, 2.0 - 1.0 * I, 0.9 * I };
  for (size_t k = 0; k < 4; k++)
    {
      double complex z = pts[k];
      double complex w = (2 / t) * (z - 1) / (z + 1);
      double complex hz = lw_model_eval (mz, z), hw = lw_model_eval (mw, w);
      assert_close (cabs (hz - hw) / cabs (hz), 0, 1e-12, "H_w(w(z)) = H_z(z)");
    }
  LwModel *back = lw_model_w_to_z (mw);
  assert_non_null (back);
  assert_int_equal (back->n_zeros, mz->n_zeros);
  assert_int_equal (back->n_poles, mz->n_poles);
  assert_close (back->gain, mz->gain, 1e-12 * fabs (mz->gain), "gain back");
  for (size_t i = 0; i < mz->n_zeros; i++)
    assert_close (cabs (back->zeros[i] - mz->zeros[i]), 0, 1e-12, "zero back");
  for (size_t i = 0; i < mz->n_poles; i++)
    assert_close (cabs (back->poles[i] - mz->poles[i]), 0, 1e-12, "pole back");
  lw_model_free (back);
  lw_model_free (mw);
  lw_model_free (mz);
}

/* Section realization: C(xI−A)⁻¹B + D equals the factored model (1e-13 relative) for a mix of
 * real and complex roots, including a complex zero pair realized over two real poles — through
 * both evaluators: Hessenberg elimination and the real Schur back substitution. */
static void
test_realize (void **state)
{
  (void) state;
  const char *cases[] = {
    "8*(s+2)/(s*(s^2+1.2*s+16))",
    "(s^2+2*s+5)/((s+1)*(s+3))",
    "(s^2+0.1*s+100)*(s-4)/((s^2+s+400)*(s+1)*(s+20)*(s+0.5))",
    "2.5",
    "(s+3)/(s+5)",
  };
  for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++)
    {
      LwModel *m = parse (cases[k], LW_DOMAIN_S, 0);
      LwSs *ss = NULL;
      assert_int_equal (lw_model_realize (m, &ss, NULL), LW_OK);
      for (double w = 0.05; w < 1000; w *= 2.3)
        {
          double complex s = I * w, want = lw_model_eval (m, s);
          /* dense complex solve via the Hessenberg evaluator after reduction */
          LwSs *h = lw_ss_copy (ss);
          assert_int_equal (lw_ss_balance_hessenberg (h, NULL), LW_OK);
          LwHessEval *he = lw_hess_eval_new (h);
          double complex got = lw_hess_eval (he, s);
          lw_hess_eval_free (he);
          lw_ss_free (h);
          if (!(cabs (got - want) <= 1e-13 * cabs (want)))
            fail_msg ("%s at w=%g: got %g%+gi want %g%+gi", cases[k], w, creal (got), cimag (got),
                      creal (want), cimag (want));
          LwSs *sc = lw_ss_copy (ss);
          assert_int_equal (lw_ss_balance_schur (sc, NULL), LW_OK);
          LwSchurEval *se = lw_schur_eval_new (sc);
          got = lw_schur_eval (se, s);
          lw_schur_eval_free (se);
          lw_ss_free (sc);
          if (!(cabs (got - want) <= 1e-13 * cabs (want)))
            fail_msg ("Schur: %s at w=%g: got %g%+gi want %g%+gi", cases[k], w, creal (got),
                      cimag (got), creal (want), cimag (want));
        }
      lw_ss_free (ss);
      lw_model_free (m);
    }
}

static void
test_bad_input (void **state)
{
  (void) state;
  LwModel *p = parse ("1/(s+1)", LW_DOMAIN_S, 0);
  LwModel *imp = parse ("(s+1)^2/(s+3)", LW_DOMAIN_S, 0);
  LwSampledPlant *sp = NULL;
  LwError err;
  assert_int_equal (lw_sampled_plant_new (p, 0, 0.0, &sp, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "sample period"));
  assert_int_equal (lw_sampled_plant_new (p, -1, 0.1, &sp, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "dead time"));
  assert_int_equal (lw_sampled_plant_new (p, 0, NAN, &sp, &err), LW_ERR_INVALID);
  assert_int_equal (lw_sampled_plant_new (imp, 0, 0.1, &sp, &err), LW_ERR_INVALID);
  assert_non_null (strstr (err.message, "improper"));
  assert_null (sp);
  lw_model_free (p);
  lw_model_free (imp);
}

/* The factored display form against the plant (lw_sampled_plant_form_error). */
static void
test_form_error (void **state)
{
  (void) state;
  LwModel *ps = parse ("180/(s*(s+12))", LW_DOMAIN_S, 0.0);
  LwSampledPlant *p = NULL;
  LwError err;
  assert_int_equal (lw_sampled_plant_new (ps, 0.0, 0.002, &p, &err), LW_OK);
  LwModel *mz = lw_sampled_plant_model (p);
  LwModel *mw = lw_model_z_to_w (mz);
  /* a well-conditioned second-order plant: the factors are the plant to rounding (1e-10 leaves
   * room for the roots' own rounding, far below the tolerance of 1e-6) */
  double ez = lw_sampled_plant_form_error (p, mz), ew = lw_sampled_plant_form_error (p, mw);
  assert_true (ez <= 1e-10);
  assert_true (ew <= 1e-10);
  /* the same form with its gain off by 0.1 %: the check sees 1e-3 (to its rounding) */
  mz->gain *= 1.001;
  assert_close (lw_sampled_plant_form_error (p, mz), 1e-3, 1e-9, "form error of a gain off by 0.1 %");
  /* a zero moved by 1e-3: seen well above the tolerance */
  mw->zeros[0] += 1e-3 * cabs (mw->zeros[0]);
  assert_true (lw_sampled_plant_form_error (p, mw) > LW_FORM_TOLERANCE);
  lw_model_free (mz);
  lw_model_free (mw);
  lw_sampled_plant_free (p);
  lw_model_free (ps);
}

int
main (void)
{
  const struct CMUnitTest tests[] = {
    cmocka_unit_test (test_expm_rotation),
    cmocka_unit_test (test_expm_dubious),
    cmocka_unit_test (test_zoh_ogata),
    cmocka_unit_test (test_zoh_fractional_delay),
    cmocka_unit_test (test_warping),
    cmocka_unit_test (test_bilinear_map),
    cmocka_unit_test (test_realize),
    cmocka_unit_test (test_bad_input),
    cmocka_unit_test (test_form_error),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
