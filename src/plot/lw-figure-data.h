/* lw-figure-data.h — the adapter between the numerics core and the renderer: fills the plain
 * structs of lw-plot.h from an LwEvaluation (and the sampled plant, for the w-plane curve).
 * This is the only file of src/plot/ that includes core headers or computes anything.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include "lw-analysis.h"
#include "lw-error.h"
#include "lw-model.h"
#include "lw-plot.h"
#include "lw-require.h"
#include "lw-simulate.h"

#ifdef __cplusplus
extern "C" {
#endif

/* One variant ready for lw_plot_new: `v` points into the arrays the adapter owns and into the
 * evaluation (the z-plane curve and step samples are borrowed: keep the evaluation alive until
 * lw_plot_new returns). Optional time series (continuous output, actuator signal and limits,
 * e.g. from lw-simulate.h) can be set into v.step by the caller afterwards; they stay the
 * caller's. */
typedef struct {
  LwPlotVariant v;
  LwPlotCrossover *z_gc, *z_pc, *w_gc, *w_pc;
  double *w_nu, *w_mag, *w_phase;
  double *asym_nu, *asym_db;
  double *ny_re, *ny_im;
  double *cl_re, *cl_im, *pole_re, *pole_im, *zero_re, *zero_im;
} LwFigureVariant;

/* Points of the w-plane curve added beyond the evaluation's grid (toward ν → ∞). */
#define LW_FIGURE_W_EXTRA_POINTS 400

/* Fills fv for one evaluated loop (name: legend text or NULL, copied by lw_plot_new).
 * The w-plane curve is evaluated at ν over the evaluation's grid warped to ν plus
 * LW_FIGURE_W_EXTRA_POINTS points up to lw_figure_w_end_rad_s, from the sampled plant's state
 * space at ω = (2/T)·atan(νT/2) (never through its computed zeros), the controller in z and
 * the computation delay. */
LwStatus lw_figure_variant_fill (LwFigureVariant *fv, const char *name,
                                 const LwSampledPlant *plant, const LwEvaluation *ev,
                                 LwError *err);
void lw_figure_variant_clear (LwFigureVariant *fv);

/* A plant family's members ready for LwPlotVariant.family: `f` points into the arrays the
 * adapter owns and into the evaluations (borrowed: keep them alive until lw_plot_new
 * returns). */
typedef struct {
  LwPlotFamily f;
  LwFigureVariant *members;   /* f.n */
  LwPlotFreqCurve *z, *w;
  LwPlotComplexCurve *nyquist;
  LwPlotStepData *step;
  LwPlotPoleData *poles;
  size_t n_filled;            /* members filled (f.n may be set lower: fewer lines drawn) */
  LwPlotBand band_z, band_w;  /* lw_figure_family_fill_lines */
  double *band_data;
} LwFigureFamily;

/* Fills ff from n members' sampled plants and loops (plants[i], evs[i]; a NULL evaluation
 * gives an empty curve), each as lw_figure_variant_fill fills a variant; worst_pm: which of
 * them gives the worst phase margin (worst_pm_deg), or SIZE_MAX; n_members: the members of
 * the family, for the key. */
void lw_figure_family_fill (LwFigureFamily *ff, size_t n_members, size_t n,
                            LwSampledPlant *const *plants, LwEvaluation *const *evs,
                            size_t worst_pm, double worst_pm_deg);
/* The same for a drag's picture: of the n members, only the first n_lines and the one of
 * the worst phase margin (worst_pm, when it is not among them; it comes last) are filled as
 * lines (their figure data: the w-plane curve from the sampled plant costs most), and the
 * band (ff->f.band_z, band_w) is the envelope of all n: on n_grid points spaced evenly in
 * log ω between the lowest and the highest frequency any member has, each member's loop read
 * linearly in log ω between the points of its evaluation (a band may miss the top of a
 * resonance narrower than the grid's spacing); in w the same values at ν = (2/T)·tan(ωT/2),
 * ω below 0.999 π/T. */
void lw_figure_family_fill_lines (LwFigureFamily *ff, size_t n_members, size_t n,
                                  LwSampledPlant *const *plants, LwEvaluation *const *evs,
                                  size_t n_lines, size_t worst_pm, double worst_pm_deg,
                                  size_t n_grid);
void lw_figure_family_clear (LwFigureFamily *ff);

/* Which time responses a variant shows: the same bits as a design variant's responses
 * (LW_DESIGN_RESPONSE_* in lw-design.h, which this layer does not include; the report, which
 * includes both, asserts at compile time that they agree), so a variant's choice is passed as it is. */
#define LW_FIGURE_SHOW_REFERENCE 0x1u          /* the reference step */
#define LW_FIGURE_SHOW_ACTUATOR 0x2u           /* u(kT) under it */
#define LW_FIGURE_SHOW_INPUT_DISTURBANCE 0x4u  /* a unit step disturbance at the plant input */
#define LW_FIGURE_SHOW_OUTPUT_DISTURBANCE 0x8u /* … at its output */
#define LW_FIGURE_SHOW_ALL 0xfu

/* The simulated responses into fv's time series, as `shows` chooses (all borrowed, each may
 * be NULL): the reference step ref — with actuator limits (so->has_limits) the limited output
 * replacing the linear step, the limits drawn with u; the continuous output between samples
 * when ref has it; the actuator signal u(kT) under it — and the disturbance steps in and
 * out. A response not shown is left out of the figure (the reference step's samples too,
 * so u goes with it). The window, the report and `plot` draw a variant's time responses this
 * way. */
void lw_figure_variant_set_responses (LwFigureVariant *fv, const LwSimResponse *ref,
                                      const LwSimOptions *so, const LwSimResponse *in,
                                      const LwSimResponse *out, unsigned shows);

/* The loop in the w-plane, factored: C(w)·P(w)·((1 − wT/2)/(1 + wT/2))^N — the computation
 * delay z^−N mapped by the bilinear transform. New model or NULL. */
LwModel *lw_figure_loop_w (const LwEvaluation *ev);

/* Where the w-plane axis ends (rad/s): one decade above the larger of 2/T and the largest
 * finite root magnitude of the loop in w, rounded up to a whole decade, at most 10⁴·2/T. */
double lw_figure_w_end_rad_s (const LwModel *loop_w, double period_s);

/* Straight-line asymptote of |H(jν)| for a factored model H in w (or s): each root r breaks
 * the line at |r| (a root at 0 acts from the start), ±20 dB/decade per zero/pole:
 *   |H|_asym(ν) = |gain| · Π_zeros max(|z|, ν) / Π_poles max(|p|, ν).
 * Writes the vertices on [nu_lo, nu_hi] (0 < nu_lo < nu_hi, rad/s): the two ends and every
 * corner strictly between, ascending, into nu[] and db[] (each with room for
 * n_zeros + n_poles + 2). Returns the number written. */
size_t lw_figure_asymptote (const LwModel *h, double nu_lo, double nu_hi, double *nu, double *db);

/* Requirement marks for the Bode views from the targets (ω in rad/s, degrees, dB); the target
 * crossover is warped to ν for the w-plane view. */
void lw_figure_requirements (LwPlotRequirements *r, double period_s, bool has_target_crossover,
                             double target_crossover_rad_s, bool has_min_phase_margin,
                             double min_phase_margin_deg);

/* Adds the mark of one of a design's requirements to r (made by lw_figure_requirements): a
 * minimum phase or gain margin raises that mark to its limit (the strictest shows); the first
 * crossover range sets the target crossover at its geometric centre √(lo·hi). Other kinds and
 * requirements that fail lw_requirement_check add nothing. The window, `plot` and `report`
 * mark a design's requirements this way. */
void lw_figure_requirements_add (LwPlotRequirements *r, double period_s,
                                 const LwRequirement *req);

#ifdef __cplusplus
}
#endif
