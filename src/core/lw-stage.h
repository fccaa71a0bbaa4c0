/* lw-stage.h — compensator stages, defined in the w-plane, and the compensator they make.
 *
 * A stage is one factor of the controller C(w), with parameters the engineer reasons in:
 * corner frequencies in rad/s of the w-plane frequency ν (ν = (2/T)·tan(ωT/2), see
 * lw-analysis.h), gains as ratios, phases in degrees, times in seconds.  Every stage but the
 * gain, the PI and the PID is normalized to a DC gain of 1 (its value at w = 0, or for the
 * integrator its coefficient of 1/w^n), so that the loop gain lives in gain stages alone and
 * moving a corner never changes the low-frequency gain.  Definitions (w the w-plane variable):
 *
 *   GAIN            C = k                                  k: ratio (finite, != 0; may be < 0)
 *   INTEGRATOR      C = 1 / w^n                            n: count, 1 … LW_STAGE_MAX_COUNT
 *   REAL_ZERO       C = 1 + w/a                            a: corner, rad/s, > 0
 *   REAL_POLE       C = 1 / (1 + w/a)                      a: corner, rad/s, > 0
 *   LEAD, LAG       C = (1 + w/z) / (1 + w/p)              z, p: zero and pole corners, rad/s
 *                   lead: 0 < z < p;  lag: 0 < p < z.  DC gain 1, high-frequency gain α = p/z
 *                   (α > 1 for a lead, 1/α > 1 for a lag).  Equivalently centre ν_m = √(z·p)
 *                   and maximum phase φ_m = asin((α − 1)/(α + 1)) (positive for a lead,
 *                   negative for a lag), reached at ν_m, where |C| = √α (10·log10 α dB).
 *   PI              C = k · (1 + a/w) = k (w + a)/w        k: high-frequency gain (ratio),
 *                                                          a: zero corner, rad/s, > 0
 *   PID             C = Kp · (1 + 1/(Ti·w) + Td·w / (1 + Td·w/N))
 *                   Kp: proportional gain (ratio, != 0); Ti: integral time, s, > 0;
 *                   Td: derivative time, s, >= 0 (0: a PI with a = 1/Ti); N: derivative filter,
 *                   > 0, the ratio of the filter pole N/Td to the derivative corner 1/Td (the
 *                   high-frequency gain is Kp·(1 + N)).  Ideal parallel form with a first-order
 *                   filter on the derivative term only, all in w.
 *   NOTCH           C = (w² + 2ζz·ν0·w + ν0²) / (w² + 2ζp·ν0·w + ν0²)
 *                   ν0: centre, rad/s, > 0;  depth: attenuation at ν0 in dB, > 0 (|C(jν0)| =
 *                   ζz/ζp = 10^(−depth/20));  width: rad/s, > 0, width = 2ζp·ν0, which is
 *                   exactly the −3 dB width of the infinitely deep notch with the same poles
 *                   (|C| = 1/√2 where |ν0² − ν²| = 2ζp·ν0·ν, so ν2 − ν1 = 2ζp·ν0).
 *                   Unit gain at DC and at high frequency.
 *   RESONANT        C = (w² + 2ζz·ν0·w + ν0²) / (w² + 2ζp·ν0·w + ν0²),  ζz > ζp > 0
 *                   ν0: centre, rad/s, > 0;  peak: gain at ν0 in dB, > 0 (|C(jν0)| = ζz/ζp =
 *                   10^(peak/20));  width: rad/s, > 0, width = 2ζz·ν0, exactly the band where
 *                   the infinitely high peak with the same zeros is 3 dB above unity.  Unit gain
 *                   at DC and at high frequency; the counterpart of the notch, to reject a
 *                   periodic disturbance at a known frequency (stages/lw-stage-resonant.c).
 *   ZERO_PAIR       C = (w² + 2ζ·ν0·w + ν0²) / ν0²         ν0: natural frequency, rad/s, > 0;
 *   POLE_PAIR       C = ν0² / (w² + 2ζ·ν0·w + ν0²)         ζ: damping, >= 0 (>= 1: two real
 *                                                          roots)
 *
 * Corner handles (what the window lets one drag) per kind, index order:
 *   REAL_ZERO, REAL_POLE: a;  LEAD, LAG: z then p;  PI: a;  PID: 1/Ti, then (when Td > 0)
 *   1/Td and N/Td;  NOTCH, RESONANT: ν0;  ZERO_PAIR, POLE_PAIR: ν0.  GAIN and INTEGRATOR have none.
 * Moving a handle (lw_stage_corner_set) keeps these invariants, or refuses and leaves the stage
 * unchanged: every corner stays finite and > 0; a lead stays a lead (z < p) and a lag a lag
 * (p < z).  With keep_ratio the whole stage moves along the frequency axis: a lead's or lag's
 * two corners move together (α kept); a PID's three corners move together (Ti and Td scale
 * by the inverse factor, N kept); a notch keeps its damping (width scales with ν0).  Without
 * keep_ratio one corner moves alone; a notch then keeps its width in rad/s (refused when the
 * width would exceed 2ν0, i.e. ζp > 1); PID: 1/Ti sets Ti, 1/Td sets Td with N kept (the filter
 * pole follows), N/Td sets N.  The PID handles are the parameter corners: its two zeros lie
 * near 1/Ti and 1/Td only when Ti ≫ Td.
 *
 * Each kind is one row of the stage-kind table (lw-stage-kinds.h) with its own file under
 * stages/: its parameters (names, units, rules, editor ranges, placement) and what differs per
 * kind (model, relations, handles). The functions below walk that table.
 *
 * The compensator is the ordered product of the enabled stages (lw_compensator_w); it is mapped
 * to z by the inverse bilinear map lw_model_w_to_z (lw_compensator_z).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include "lw-error.h"
#include "lw-model.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
  LW_STAGE_GAIN = 0,
  LW_STAGE_INTEGRATOR,
  LW_STAGE_REAL_ZERO,
  LW_STAGE_REAL_POLE,
  LW_STAGE_LEAD,
  LW_STAGE_LAG,
  LW_STAGE_PI,
  LW_STAGE_PID,
  LW_STAGE_NOTCH,
  LW_STAGE_ZERO_PAIR,
  LW_STAGE_POLE_PAIR,
  LW_STAGE_RESONANT
} LwStageKind;

#define LW_STAGE_LABEL_MAX 64
#define LW_STAGE_MAX_COUNT 8     /* highest integrator count */
#define LW_STAGE_MAX_CORNERS 3
#define LW_STAGE_MAX_PARAMS 6

typedef struct {
  LwStageKind kind;
  bool enabled;
  char label[LW_STAGE_LABEL_MAX];   /* NUL-terminated, may be empty */
  union {
    struct { double ratio; } gain;                               /* GAIN */
    struct { int count; } integrator;                            /* INTEGRATOR */
    struct { double corner_rad_s; } real;                        /* REAL_ZERO, REAL_POLE */
    struct { double zero_rad_s, pole_rad_s; } leadlag;           /* LEAD, LAG */
    struct { double gain, zero_rad_s; } pi;                      /* PI */
    struct { double kp, ti_s, td_s, filter_n; } pid;             /* PID */
    struct { double centre_rad_s, depth_db, width_rad_s; } notch;  /* NOTCH */
    struct { double natural_rad_s, damping; } pair;              /* ZERO_PAIR, POLE_PAIR */
    struct { double centre_rad_s, peak_db, width_rad_s; } resonant;  /* RESONANT */
  } p;
} LwStage;

/* What a corner handle stands for. */
typedef enum {
  LW_HANDLE_ZERO = 0,      /* a real zero corner */
  LW_HANDLE_POLE,          /* a real pole corner */
  LW_HANDLE_ZERO_PAIR,     /* natural frequency of a complex zero pair */
  LW_HANDLE_POLE_PAIR,     /* natural frequency of a complex pole pair */
  LW_HANDLE_NOTCH,         /* centre of a notch */
  LW_HANDLE_PEAK           /* centre of a resonant stage */
} LwHandleKind;

/* Constructors: enabled, empty label, parameters as given (not checked; see lw_stage_check). */
LwStage lw_stage_gain (double ratio);
LwStage lw_stage_gain_db (double gain_db);                   /* ratio = 10^(dB/20) */
LwStage lw_stage_integrator (int count);
LwStage lw_stage_real_zero (double corner_rad_s);
LwStage lw_stage_real_pole (double corner_rad_s);
LwStage lw_stage_lead (double zero_rad_s, double pole_rad_s);
LwStage lw_stage_lag (double zero_rad_s, double pole_rad_s);
/* Lead from its centre ν_m (rad/s) and maximum phase φ_m in degrees, 0 < φ_m < 90:
 * α = (1 + sin φ_m)/(1 − sin φ_m), z = ν_m/√α, p = ν_m·√α. */
LwStage lw_stage_lead_centred (double centre_rad_s, double max_phase_deg);
/* Lag from its centre ν_m and maximum phase lag φ_m in degrees, 0 < φ_m < 90 (given as a
 * positive number): z = ν_m·√α, p = ν_m/√α with α as for the lead. */
LwStage lw_stage_lag_centred (double centre_rad_s, double max_phase_lag_deg);
LwStage lw_stage_pi (double gain, double zero_rad_s);
LwStage lw_stage_pid (double kp, double ti_s, double td_s, double filter_n);
LwStage lw_stage_notch (double centre_rad_s, double depth_db, double width_rad_s);
LwStage lw_stage_zero_pair (double natural_rad_s, double damping);
LwStage lw_stage_pole_pair (double natural_rad_s, double damping);
LwStage lw_stage_resonant (double centre_rad_s, double peak_db, double width_rad_s);

/* Copies label into s->label (truncated to fit). */
void lw_stage_set_label (LwStage *s, const char *label);

/* Lead/lag helpers: α = p/z (ratio), centre √(z·p) in rad/s, maximum phase in degrees
 * asin((α − 1)/(α + 1)) (negative for a lag). NAN for other kinds. */
double lw_stage_leadlag_alpha (const LwStage *s);
double lw_stage_leadlag_centre_rad_s (const LwStage *s);
double lw_stage_leadlag_max_phase_deg (const LwStage *s);

/* Checks the parameters against the definitions above. LW_ERR_INVALID with a message naming
 * the stage (its label when set, else its kind) and the parameter. */
LwStatus lw_stage_check (const LwStage *s, LwError *err);

/* The stage as a factored model in w (domain w, period_s > 0), whether enabled or not. */
LwStatus lw_stage_to_model (const LwStage *s, double period_s, LwModel **out, LwError *err);

/* Corner handles (see the top of the file). Count is 0 … LW_STAGE_MAX_CORNERS. */
size_t lw_stage_corner_count (const LwStage *s);
/* The i-th handle's frequency ν in rad/s and what it stands for. LW_ERR_INVALID for a bad i. */
LwStatus lw_stage_corner_get (const LwStage *s, size_t i, double *nu_rad_s, LwHandleKind *kind,
                              LwError *err);
/* Moves the i-th handle to nu_rad_s (see the invariants above). On failure the stage is left
 * as it was. */
LwStatus lw_stage_corner_set (LwStage *s, size_t i, double nu_rad_s, bool keep_ratio,
                              LwError *err);

/* Named parameters of a stage, for display and JSON: the primary parameters of its kind (as
 * stored), then for a lead or lag the derived centre and maximum phase (derived = true). */
typedef struct {
  const char *name;    /* e.g. "zero_rad_s"; a static string */
  const char *title;   /* short English label ("Zero", "maximum phase"), translatable */
  double value;
  const char *unit;    /* "rad/s", "s", "dB", "deg", "ratio" or "" (count, N, damping) */
  bool derived;
} LwStageParam;
/* Fills out (room for LW_STAGE_MAX_PARAMS) and returns the count. */
size_t lw_stage_params (const LwStage *s, LwStageParam *out);

/* Lower-case name of a kind, its row's name in the stage-kind table (lw-stage-kinds.h):
 * "gain", "integrator", "real-zero", …; NULL for an unknown value. */
const char *lw_stage_kind_name (LwStageKind kind);

/* The product of the enabled stages among stages[0 … n−1], in order, as a model in w with
 * period_s (a constant 1 when none is enabled). Each stage is checked first. */
LwStatus lw_compensator_w (const LwStage *stages, size_t n, double period_s, LwModel **out,
                           LwError *err);
/* The same mapped to z by lw_model_w_to_z. A root at exactly w = 2/T (no image in z) is
 * refused. */
LwStatus lw_compensator_z (const LwStage *stages, size_t n, double period_s, LwModel **out,
                           LwError *err);

#ifdef __cplusplus
}
#endif
