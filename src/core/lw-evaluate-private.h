/* lw-evaluate-private.h — what the files of the loop evaluation share (lw-evaluate.c and
 * lw-evaluate-{loop,grid,closed,nyquist,margins}.c); not used outside them.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-internal.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#define RAD2DEG (180.0 / LW_PI)
#define LW_LN10 2.302585092994045684

/* ---------------------------------------------------------------------------------------- */
/* The loop as a function of ω                                                               */

/* Relative error of L below which a value counts as resolved (a crossover is reported as a
 * number, docs/conventions.md): 1e-6 keeps a phase margin within 6e-5°, a gain margin within
 * 1e-5 dB. */
#define LW_REL_RESOLVED 1e-6
/* Estimated relative error of the state-space evaluation above which the aliasing sum is
 * tried. */
#define LW_REL_ALIAS 1e-9
/* Below this estimated relative error, a point counts as plainly resolved: points between such
 * points are evaluated without an error bound of their own (LW_GRID_STRIDE apart on the grid). */
#define LW_REL_QUIET 1e-10
#define LW_GRID_STRIDE 8
/* A phase crossover whose magnitude is certainly below this (a gain margin above 120 dB) is not
 * counted as unresolved when its phase cannot be resolved. */
#define LW_MAG_IRRELEVANT 1e-6

typedef struct {
  const LwSampledPlant *plant;
  const LwModel *ctrl;        /* in z */
  double t;                 /* sample period, s */
  double omega_n;           /* Nyquist frequency π/T, rad/s */
  int delay;                /* whole samples: plant dead time + computation delay */
  size_t order;             /* state-space order of the plant core */
  /* unwrapped phase of the delay-free part C·P_core on the grid, degrees */
  const double *grid;
  const double *core_phase;
  const double *rel;        /* relative error estimate of L on the grid */
  const bool *plain_ok;     /* the state space alone is plainly resolved there (LW_REL_QUIET) */
  size_t n;
} Loop;

typedef double (*ScalarFn) (double x, void *data);

typedef struct {
  const Loop *lp;
  double target;
} PhaseTarget;

typedef struct {
  size_t np, nd, nc, n;   /* plant core, delay line, controller, total */
  double *a;              /* n×n column-major */
  double *b;              /* n */
  double *c;              /* n: y = C x + D r */
  double d;
} ClosedLoop;

#define CL_RHO (1.0 - 1e-10)
/* when the Nyquist count does not resolve, every pole is computed up to this order */
#define LW_CL_FALLBACK_ORDER 2000
#define CL_MAX_DEPTH 64
#define CL_DOMINANT 32            /* dominant closed-loop poles reported beyond max_full_order */

typedef struct {
  double th;
  double complex z;
  double lnmag;                   /* ln|L(z)| on the contour */
  double complex q;               /* Q(z)/|Q(z)|, direction of the polynomial part */
} NyqPoint;

typedef struct {
  const Loop *lp;
  LwSchurEval *eval;
  double complex *roots;          /* controller zeros, controller poles, plant eigenvalues */
  int *sign;                      /* +1 for a zero, −1 for a pole */
  size_t n_roots, n_ctrl_roots;   /* the plant eigenvalues follow the controller roots */
  double d;                       /* D, whole samples */
  double ln_rho;
  long twice_cross;               /* W: signed crossings of (−∞, −1), in half units */
  bool marginal;                  /* |L| = 1 near L = −1: a pole on the contour */
  bool failed;                    /* non-finite values or unresolved phase */
  /* where |L| is largest on the upper half (seeds for the dominant poles) */
  double best_lnmag, best_th, best_phi;
} Nyq;

static inline double
cabs_fast (double complex z)
{
  return sqrt (creal (z) * creal (z) + cimag (z) * cimag (z));
}

void
lw_ev_closed_loop_free (ClosedLoop *cl);

LwStatus
lw_ev_closed_loop_build (const LwSs *p, const LwSs *c, int delay, ClosedLoop *cl, LwError *err);

LwStatus
lw_ev_simulate_step (const LwSs *p, const LwSs *c, int delay, size_t n_steps, double *y_out,
                     LwError *err);

void
lw_ev_step_figures (LwStep *st, double t);

int
lw_ev_cmp_double (const void *a, const void *b);

int
lw_ev_count_unit_roots (const double complex *r, size_t n);

LwStatus
lw_ev_build_grid (const Loop *lp, const LwModel *plant_s, int n_int, size_t n_points, double **grid_out,
                  size_t *n_out, LwError *err);

bool
lw_ev_at_nyquist (const Loop *lp, double w);

void
lw_ev_root_product (const double complex *roots, size_t n, double zm1, double zi, double *pr,
                    double *pi);

double complex
lw_ev_loop_core_eval (const Loop *lp, double w, double *rel, bool *plain_ok);

double complex
lw_ev_loop_core_rel (const Loop *lp, double w, double *rel);

double complex
lw_ev_loop_core (const Loop *lp, double w);

double
lw_ev_delay_phase_deg (const Loop *lp, double w);

double
lw_ev_nearest_branch (double ang, double ref);

double
lw_ev_loop_phase_deg (const Loop *lp, double w, double complex core);

double
lw_ev_brent_root (ScalarFn f, void *data, double a, double b, double fa, double fb);

double
lw_ev_golden_max (ScalarFn f, void *data, double a, double b, double *fmax_out);

double
lw_ev_fn_log_mag (double w, void *data);

double
lw_ev_fn_phase (double w, void *data);

double
lw_ev_fn_sens (double w, void *data);

double
lw_ev_fn_comp_db (double w, void *data);

LwStatus
lw_ev_find_margins (const Loop *lp, const double *mag_db, const double complex *full, int n_int,
                    LwMargins *mg, LwError *err);

LwStatus
lw_ev_closed_loop_long_delay (const Loop *lp, const LwSampledPlant *plant, LwEvaluation *ev,
                              bool *resolved_out, LwError *err);

LwStatus
lw_ev_nyq_count (Nyq *q, const double *grid, size_t n_grid, long n_order, long *n_out, bool *resolved,
                 LwError *err);

LwStatus
lw_ev_cl_dominant (const Nyq *q, const LwModel *plant_z, double complex **out, size_t *n_out,
                   LwError *err);
