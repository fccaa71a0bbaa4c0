/* lw-measured.h — a measured frequency response as the plant: the table read from CSV, the
 * plant's sampled response at the measured frequencies (both kinds of measurement), the loop
 * on the data with its crossovers and margins found between the points, and a rational model
 * fitted to the data.
 *
 * The CSV dialect (docs/measured-data.md): UTF-8 text, '#' starts a comment (whole line or
 * after a value), the first non-comment line a header of column names separated by commas:
 *   frequency_hz | frequency_rad_s                       (exactly one)
 *   magnitude_db | magnitude, with phase_deg  — or —  real, imag   (exactly one pair)
 *   coherence                                             (optional, 0 … 1)
 * in any order; other columns are ignored (named in the note). Decimal point; blank lines
 * skipped; at least LW_MEASURED_MIN_POINTS rows, at most LW_MEASURED_MAX_LINES lines;
 * frequencies > 0 and strictly increasing; magnitudes (ratio) >= 0 and finite.
 *
 * Core: C11, no GLib, nothing printed.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <complex.h>
#include <stdbool.h>
#include <stddef.h>

#include "lw-error.h"
#include "lw-model.h"

#ifdef __cplusplus
extern "C" {
#endif

#define LW_MEASURED_MIN_POINTS 10
#define LW_MEASURED_MAX_UNSTABLE_POLES 1000
#define LW_MEASURED_MAX_LINES 10000000
/* coherence below this marks a point (and a crossover found next to it) as unreliable:
 * common practice for swept-sine and noise measurements, no single source */
#define LW_MEASURED_LOW_COHERENCE 0.8
/* The random error of a measured point, from its coherence γ² (docs/measured-data.md):
 * the standard deviation of the relative error of |H| and of the phase error in radians
 * are both about √(1 − γ²) / (γ·√(2·n_d)) for n_d averages (Bendat & Piersol, "Random Data",
 * the random errors of frequency-response estimates; from memory). The table does not say
 * n_d: LW_MEASURED_NOISE_AVERAGES is assumed (few: the intervals come out wider, not
 * narrower, than with more). A point is within the noise of a crossing when its distance
 * from it (|ln|L||, or the phase from the odd multiple of 180°) is below
 * LW_MEASURED_NOISE_SIGMAS of these deviations. */
#define LW_MEASURED_NOISE_AVERAGES 4
#define LW_MEASURED_NOISE_SIGMAS 3.0

typedef enum {
  LW_MEASURED_SAMPLED,      /* through the digital loop at the design's period, from the
                             * controller's output value to the sampled measurement: hold,
                             * plant, sensor, dead time included; not the computation delay */
  LW_MEASURED_CONTINUOUS    /* the continuous plant G(jω) (an analyzer on the analog plant) */
} LwMeasuredKind;

typedef struct {
  size_t n;
  double *omega_rad_s;      /* n, > 0, strictly increasing */
  double complex *h;        /* n, the response as a ratio (not dB) */
  double *coherence;        /* n values in [0, 1], or NULL when the file has none */
} LwMeasured;

/* Where a refusal points: 1-based line and column (column = the field's 1-based index in its
 * row, 0 when the refusal is about the whole line or file). */
typedef struct {
  size_t line;
  size_t column;
} LwMeasuredPlace;

/* Reads the CSV text (len bytes; need not end in NUL). On success *out is a new table and,
 * when note is non-NULL, note receives a one-line remark (empty when none: e.g. "ignored
 * columns: drive_v, temp_c"). On refusal: LW_ERR_PARSE (the text is not a table we read) or
 * LW_ERR_INVALID (values not acceptable), *place filled, err's message one sentence naming
 * the column by its header name where there is one; nothing allocated. */
LwStatus lw_measured_parse (const char *text, size_t len, LwMeasured **out, char *note,
                            size_t note_size, LwMeasuredPlace *place, LwError *err);
void lw_measured_free (LwMeasured *m);
LwMeasured *lw_measured_copy (const LwMeasured *m);

/* The sampled plant's response P(e^{jωT}) at the measured frequencies, whole-sample and
 * fractional dead time included for the continuous kind (dead_time_s is applied only to the
 * continuous kind: a sampled measurement already holds the dead time):
 *   sampled:     P = h (refused, LW_ERR_INVALID, when a frequency is above π/T by more than
 *                1e-9 relative; *bad_index set)
 *   continuous:  P = h · (1 − e^{−jωT})/(jωT) · e^{−jω·dead_time}  — the hold's response,
 *                the aliasing terms of the sum over ω + k·2π/T neglected; points above π/T
 *                are dropped (not refused).
 * out_omega and out_p get n_out values (caller allocates n each). */
LwStatus lw_measured_sampled_response (const LwMeasured *m, LwMeasuredKind kind,
                                       double period_s, double dead_time_s,
                                       double *out_omega, double complex *out_p,
                                       size_t *n_out, size_t *bad_index, LwError *err);

/* A crossover of the loop found between two measured points. */
typedef struct {
  double omega_rad_s;       /* interpolated (docs/measured-data.md: log|L| and unwrapped ∠L
                             * linear in log ω between the two points) */
  double lo_rad_s, hi_rad_s;/* the interval between the points it lies in */
  double margin;            /* phase margin (deg) at a gain crossover; gain margin (dB) at a
                             * phase crossover */
  bool low_coherence;       /* a point of the interval has coherence
                             * < LW_MEASURED_LOW_COHERENCE */
  bool within_noise;        /* the interval was widened past neighbouring points within the
                             * noise of the crossing, or several sign changes there merged
                             * into this one (docs/measured-data.md); never with coherence 1
                             * or without a coherence column */
  unsigned sign_changes;    /* sign changes merged into this crossing (1 without noise; an
                             * even count: the curve may touch the crossing, not cross it) */
} LwMeasuredCrossing;

typedef struct {
  size_t n_gain, n_phase;
  LwMeasuredCrossing *gain;     /* |L| = 1, ascending ω */
  LwMeasuredCrossing *phase;    /* ∠L = −180° (mod 360°), ascending ω */
  /* the governing margins (the smallest |PM|, the smallest |GM|), as for a model; NAN when
   * there is no crossing of that kind in the data */
  double phase_margin_deg, gain_crossover_rad_s;
  double gain_margin_db, phase_crossover_rad_s;
  double delay_margin_s;
  double sensitivity_peak, sensitivity_peak_rad_s;  /* max 1/|1 + L| over the points */
  /* where the data may hide a crossover: |L| >= 1 at the highest measured point (a gain
   * crossover lies above the data), |L| < 1 at the lowest (one may lie below it); with
   * noise also when that point is within the noise of |L| = 1 */
  bool crossover_above_data, crossover_below_data;
} LwMeasuredMargins;

/* The standard deviation of a point's random error from its coherence (above: relative for
 * |L|, radians for the phase); 0 at coherence 1, infinite at 0. */
double lw_measured_noise_sigma (double coherence);

/* Crossovers and margins of the loop given at n points (omega ascending, l = L(e^{jωT})).
 * With coherence, a crossing's interval reaches past the neighbouring points that are within
 * the noise of it, and the sign changes inside one such interval make one crossing. */
LwStatus lw_measured_margins (const double *omega_rad_s, const double complex *l,
                              const double *coherence, size_t n, LwMeasuredMargins *out,
                              LwError *err);
void lw_measured_margins_clear (LwMeasuredMargins *m);

/* Closed-loop stability from the data by the Nyquist criterion (lw-measured-nyquist.c; the
 * method, its assumptions and their basis in docs/measured-data.md). */
typedef enum {
  LW_MEASURED_UNDECIDED,
  LW_MEASURED_STABLE,
  LW_MEASURED_UNSTABLE
} LwMeasuredVerdict;

/* why a verdict is undecided (bits of LwMeasuredStability.undecided) */
enum {
  LW_NYQUIST_LOW_END = 1u << 0,        /* the lowest point is on no asymptote the count can
                                        * extend to ω → 0 */
  LW_NYQUIST_HIGH_END = 1u << 1,       /* the data stop short of π/T with |L| > 0.5 at the
                                        * last point */
  LW_NYQUIST_NOT_REAL = 1u << 2,       /* the data reach π/T, where L is real, but are not */
  LW_NYQUIST_NEAR_MINUS_ONE = 1u << 3, /* the loop passes through −1, or a point is within
                                        * its noise of −1 */
  LW_NYQUIST_POLE_COUNT = 1u << 4      /* the count of open-loop unstable poles does not fit
                                        * the data (Z < 0) or the controller (fewer than the
                                        * controller's own) */
};

typedef struct {
  LwMeasuredVerdict verdict;
  unsigned undecided;         /* LW_NYQUIST_* bits; 0 when decided */
  int open_loop_unstable;     /* P, as given */
  int loop_type;              /* k, poles at z = 1 read from the low end; −1 when not read */
  bool low_end_small;         /* the low end assumed: |L| < 1 below the data (type 0); else
                               * (loop_type >= 0) the asymptote c/(jωT)^k */
  bool high_end_at_nyquist;   /* the data reach π/T; else |L| < 1 assumed above them */
  int encirclements;          /* N, counter-clockwise around −1 (when decided) */
  int closed_loop_unstable;   /* Z = P − N (when decided; −1 otherwise) */
  double nearest_minus_one;   /* min |1 + L| over the points */
  char note[512];             /* one or two sentences: the assumptions made, or why undecided */
} LwMeasuredStability;

/* The loop at n points (omega ascending, all at or below π/T), the sample period, P (0 …
 * 1000), the coherence of the points (NULL: none). LW_ERR_INVALID on bad arguments. */
LwStatus lw_measured_nyquist (const double *omega_rad_s, const double complex *l,
                              const double *coherence, size_t n, double period_s,
                              int open_loop_unstable, LwMeasuredStability *out, LwError *err);
const char *lw_measured_verdict_name (LwMeasuredVerdict v);   /* "stable", … */
/* The verdict made undecided (LW_NYQUIST_POLE_COUNT): the controller alone has ctrl poles
 * outside the unit circle, more than the P given. */
void lw_measured_stability_refuse_count (LwMeasuredStability *s, int ctrl);

/* The loop closed on the data: the sampled plant P at the measured points below π/T (n of
 * them), L = z^−N·C(z)·P there (z = e^{jωT}), its crossovers and margins (coherence of the
 * table's first n points), its stability by the Nyquist criterion given the count of the
 * loop's open-loop poles outside the unit circle (0 … LW_MEASURED_MAX_UNSTABLE_POLES), and
 * with a model the largest relative difference of the model's sampled response from P (NAN
 * without one). */
typedef struct {
  size_t n;
  double *omega_rad_s;
  double complex *p;
  double complex *l;
  LwMeasuredMargins margins;
  LwMeasuredStability stability;  /* the Nyquist criterion on L with P = open_loop_unstable */
  double model_diff;
} LwMeasuredLoop;

/* The loop's phase at its n points (radians), unwrapped as lw_measured_margins takes it: each
 * step between neighbours the one within ±π, the first point's phase in (−2π, 0]. */
void lw_measured_unwrap_phase (const double complex *l, size_t n, double *phase_rad);

/* |L| (ratio) and ∠L (degrees, on the branch of lw_measured_unwrap_phase) of the loop given
 * at n points at a frequency between them, interpolated as the crossovers are found: ln|L| and
 * the unwrapped phase linear in ln ω between the two points around it (a point's own value
 * on it). Refused (LW_ERR_INVALID; the message names the frequency and the data's range)
 * outside [omega[0], omega[n − 1]]. mag or phase_deg may be NULL. */
LwStatus lw_measured_loop_at (const double *omega_rad_s, const double complex *l, size_t n,
                              double at_rad_s, double *mag, double *phase_deg, LwError *err);

/* The dominant lightly damped resonance of a measured plant response p at n points (ω
 * ascending), for a notch on the data (docs/measured-data.md, "Resonance in the data"):
 *   a peak is a point whose |p| is above its lower neighbour's and not below its upper one's;
 *   its neighbourhood trend is the straight line in (ln ω, ln|p|) through the response
 *   interpolated half a decade below and half a decade above it (narrower, but symmetric,
 *   near the ends of the data; less than a quarter decade either side is too near an end to
 *   judge); the peak stands clearly above it when it is at least LW_RESONANCE_HEIGHT_DB
 *   higher there.  Of those, the LW_RESONANCE_MAX_PEAKS highest are fitted: a background
 *   power law ω^s is taken out (s first the trend's slope + 1, since a chord centred on a
 *   second-order resonance has the slope −1 from it; then, three times, the slope of the data
 *   without the resonance fitted, ±0.1 decade about ω_n) and 1/|p|² of the points around the
 *   peak (down to 6 dB below it, at least two either side) is fitted by least squares,
 *   relative, with the second-order form c·((ω_n² − ω²)² + (2ζω_nω)²), which gives ω_n and ζ.
 *   The one with the smallest ζ below zeta_max is the resonance.
 * out->found false (and LW_OK) when there is none; out->n_peaks, n_near_end say what was
 * seen, for the refusal. */
#define LW_RESONANCE_HEIGHT_DB 6.0
#define LW_RESONANCE_MAX_PEAKS 32

typedef struct {
  bool found;
  double omega_n_rad_s;     /* natural frequency of the fitted pair */
  double zeta;              /* its damping */
  double peak_rad_s;        /* the measured point at the top of the peak */
  double height_db;         /* how far that point stands above the neighbourhood trend */
  double fit_lo_rad_s, fit_hi_rad_s;  /* the points the fit used */
  size_t n_fit;
  size_t n_peaks;           /* peaks standing clearly above their trend */
  size_t n_near_end;        /* peaks too near an end of the data to judge */
} LwMeasuredResonance;

LwStatus lw_measured_resonance (const double *omega_rad_s, const double complex *p, size_t n,
                                double zeta_max, LwMeasuredResonance *out, LwError *err);

struct LwSampledPlant;
LwStatus lw_measured_loop_close (const LwMeasured *m, LwMeasuredKind kind, double period_s,
                                 double dead_time_s, int compute_delay,
                                 const LwModel *controller_z,
                                 const struct LwSampledPlant *model, int open_loop_unstable,
                                 LwMeasuredLoop *out, LwError *err);
void lw_measured_loop_clear (LwMeasuredLoop *l);

/* Rational fit in s of the given order (poles; zeros up to order − relative_degree) to a
 * continuous response h at omega, by vector fitting (Gustavsen and Semlyen 1999, with
 * relaxation), weights w (NULL: 1/|h|, relative error). New model in s on success. The
 * largest relative fit error over the points goes to *max_rel_error when non-NULL. */
LwStatus lw_measured_fit (const double *omega_rad_s, const double complex *h,
                          const double *weight, size_t n, int order, int relative_degree,
                          int iterations, LwModel **out, double *max_rel_error, LwError *err);

#ifdef __cplusplus
}
#endif
