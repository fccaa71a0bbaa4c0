/* lw-design.h — the design document: what an engineer keeps of one controller design, and its
 * file form (.lwd, an XML vocabulary of our own, docs/file-format.md).
 *
 * A design holds its title, author and notes; the plant as the expression in s the user typed
 * (kept as text, parsed on load only to report errors) and its input dead time; the sampling
 * (period, hold, computation delay in whole samples); optionally a measured frequency response
 * of the plant (the table, its kind, which of model and data the analysis uses); the requirements; one or more variants,
 * each with a name, notes, an optional sample period of its own (to compare loop rates) and its ordered compensator stages (lw-stage.h) with their on/off
 * state; which variant is active; and optional view settings (frequency range, visible views).
 *
 * Loading (lw_design_load_file, lw_design_load_data) is hardened: no network, no DTD (any
 * DOCTYPE is refused, so no entity can be declared or expanded), at most LW_DESIGN_MAX_BYTES
 * bytes, LW_DESIGN_MAX_DEPTH levels of elements, LW_DESIGN_MAX_ELEMENTS elements and
 * LW_DESIGN_MAX_STAGES stages per variant.  The root element's namespace and `version` are
 * checked first (a newer version is refused with its own message), then the RELAX NG schema
 * (data/loopwright-design.rng, compiled into the program), then every value.  Every error
 * message starts with "NAME:LINE: " (NAME as given by the caller) and names the element and
 * the attribute and what was expected.
 *
 * Saving (lw_design_to_text, lw_design_save_file) writes the canonical form: fixed element and
 * attribute order, one element per line, two-space indentation, numbers in the shortest text
 * that reads back to the same double (locale-independent), so saving the same design twice
 * gives the same bytes.  lw_design_save_file writes a temporary file in the target's
 * directory, flushes and syncs it, then renames it over the target: a failed save leaves the
 * old file as it was.
 *
 * Errors are GErrors in LW_DESIGN_ERROR.  Strings in the structures are UTF-8, owned by the
 * structure (g_malloc'd), NULL where optional and absent.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#include <glib.h>

#include "lw-measured.h"
#include "lw-require.h"
#include "lw-stage.h"

G_BEGIN_DECLS

#define LW_DESIGN_NAMESPACE "urn:loopwright:design"
#define LW_DESIGN_VERSION 1                      /* the version this program writes and reads */
#define LW_DESIGN_EXTENSION ".lwd"

#define LW_DESIGN_MAX_BYTES (8u * 1024u * 1024u) /* 8 MiB */
#define LW_DESIGN_MAX_DEPTH 16                   /* nesting of elements; the vocabulary uses 4 */
#define LW_DESIGN_MAX_ELEMENTS 100000
#define LW_DESIGN_MAX_STAGES 1000                /* per variant */
#define LW_DESIGN_MAX_VARIANTS 100
#define LW_DESIGN_MAX_REQUIREMENTS 1000
#define LW_DESIGN_MAX_COMPUTE_DELAY 1000         /* samples, as loopwright-cli --compute-delay */

#define LW_DESIGN_ERROR (lw_design_error_quark ())
GQuark lw_design_error_quark (void);

typedef enum
{
  LW_DESIGN_ERROR_IO,         /* the file cannot be read or written */
  LW_DESIGN_ERROR_LIMIT,      /* a size, depth or count limit */
  LW_DESIGN_ERROR_REFUSED,    /* a construct refused for safety: DOCTYPE, entity */
  LW_DESIGN_ERROR_XML,        /* not well-formed XML */
  LW_DESIGN_ERROR_FORMAT,     /* not a design document (root element, namespace) */
  LW_DESIGN_ERROR_VERSION,    /* a newer (or unknown) version of the format */
  LW_DESIGN_ERROR_SCHEMA,     /* does not match the schema */
  LW_DESIGN_ERROR_VALUE       /* a value out of its range, a bad plant expression, ... */
} LwDesignError;

typedef enum
{
  LW_HOLD_ZERO_ORDER = 0      /* "zero-order" */
} LwHold;

/* The time responses a variant can show (LwDesignVariant.responses): the reference step,
 * the actuator signal u(t) under it, the steps of a disturbance at the plant's input and at
 * its output. Their names in the document: lw_design_response_name. */
typedef enum
{
  LW_DESIGN_RESPONSE_REFERENCE = 1u << 0,
  LW_DESIGN_RESPONSE_ACTUATOR = 1u << 1,
  LW_DESIGN_RESPONSE_INPUT_DISTURBANCE = 1u << 2,
  LW_DESIGN_RESPONSE_OUTPUT_DISTURBANCE = 1u << 3
} LwDesignResponse;
#define LW_DESIGN_N_RESPONSES 4
#define LW_DESIGN_RESPONSES_ALL 0xfu

/* The document's name of response flag i (0 … LW_DESIGN_N_RESPONSES − 1, in flag order:
 * "reference", "actuator", "input-disturbance", "output-disturbance"); NULL past the end. */
const char *lw_design_response_name (unsigned i);

/* Longest unit text a document holds, in bytes. */
#define LW_DESIGN_UNIT_MAX 32

/* NULL when s can be a unit of the plant's input or output: 1 … LW_DESIGN_UNIT_MAX bytes of
 * text (lw_design_text_problem) without line breaks or tabs and without spaces at either end;
 * else a sentence saying what is wrong (a static string). */
const char *lw_design_unit_problem (const char *s);

/* Which of the two the design's analysis uses when it holds a measurement (<measured
 * analysis="…">): the plant model or the measured data. */
typedef enum
{
  LW_DESIGN_ANALYSIS_MODEL = 0,   /* "model" (default) */
  LW_DESIGN_ANALYSIS_DATA         /* "data" */
} LwDesignAnalysis;

/* Longest source text of a measurement, in bytes; most unstable open-loop poles stated. */
#define LW_DESIGN_SOURCE_MAX 200
#define LW_DESIGN_MAX_UNSTABLE_POLES 1000

/* NULL when s can be the source of a measurement: the rules of lw_design_unit_problem with
 * 1 … LW_DESIGN_SOURCE_MAX bytes; else a sentence saying what is wrong (a static string). */
const char *lw_design_source_problem (const char *s);

/* The document's words for a kind of measurement ("sampled", "continuous") and for an
 * analysis choice ("model", "data"); NULL for an unknown value. */
const char *lw_design_measured_kind_name (LwMeasuredKind kind);
const char *lw_design_analysis_name (LwDesignAnalysis a);

/* Longest name of a measured response in a measured family, in bytes; most responses a
 * document holds (the first and the further ones). */
#define LW_DESIGN_MEASURED_NAME_MAX 64
#define LW_DESIGN_MAX_MEASURED 100

/* NULL when s can name a measured response: the rules of lw_design_unit_problem with
 * 1 … LW_DESIGN_MEASURED_NAME_MAX bytes; else a sentence saying what is wrong (static). */
const char *lw_design_measured_name_problem (const char *s);

/* A further measured response of a measured family (<measured name=…> after the first): one
 * more machine's sweep, with its own kind, source and count of open-loop unstable poles; the
 * analysis choice is the first <measured>'s. */
typedef struct
{
  char *name;                 /* lw_design_measured_name_problem; unique in the design */
  LwMeasured *data;           /* as LwDesign.measured */
  LwMeasuredKind kind;
  char *source;               /* NULL: not given */
  int unstable_poles;         /* 0 … LW_DESIGN_MAX_UNSTABLE_POLES */
} LwDesignMeasuredSet;

/* A named parameter of the plant expression (<parameters>, docs/file-format.md): its nominal
 * value and, for a plant family, the range it spans. */
typedef enum
{
  LW_SPREAD_UNIFORM = 0,      /* "uniform": sampled members drawn evenly over [low, high] */
  LW_SPREAD_LOG               /* "log": evenly in log(value); low > 0 */
} LwParamSpread;

#define LW_DESIGN_MAX_PARAMS 64     /* LW_EXPR_PARAMS_MAX */
#define LW_DESIGN_MAX_FAMILY_MEMBERS 100000   /* LW_FAMILY_MAX_MEMBERS */
/* Corners of the range box checked for a plant that is improper or zero there (2^10) */
#define LW_DESIGN_MAX_CORNER_PARAMS 10

typedef struct
{
  char *name;                 /* lw_expr_param_name_problem: letters, digits, '_'; not s, w, z */
  double nominal;             /* finite */
  bool ranged;                /* a family's parameter: low < high, low <= nominal <= high */
  double low, high;
  LwParamSpread spread;
} LwDesignParam;

/* An operating point of a plant family (<point> in <parameters>, docs/families.md): a named
 * set of parameter values the engineer knows (a pump at "empty", "half", "full" tank); the
 * parameters it does not give take their nominal. A point may lie outside the ranges, but the
 * plant must be proper and non-zero there. */
#define LW_DESIGN_MAX_POINTS 1000
#define LW_DESIGN_POINT_NAME_MAX 64

typedef struct
{
  char *parameter;            /* the name of one of the design's parameters */
  double value;               /* finite */
} LwDesignPointValue;

typedef struct
{
  char *name;                 /* lw_design_point_name_problem; unique within the design */
  size_t n_values;            /* each parameter at most once */
  LwDesignPointValue *values;
} LwDesignPoint;

/* Longest view name a document holds, in bytes. */
#define LW_DESIGN_VIEW_NAME_MAX 32

typedef struct
{
  char *name;                 /* optional label; NULL: shown by its kind */
  LwRequirement req;          /* limits in the units of lw_req_kind_unit */
} LwDesignRequirement;

typedef struct
{
  char *name;                 /* non-empty, unique within the design */
  char *notes;                /* optional */
  bool has_period;            /* the variant overrides the design's sample period */
  double period_s;            /* its sample period T, > 0, s (when has_period) */
  /* the actuator this variant drives: limits on the controller output in the actuator's
   * units (finite, u_low < u_high) and whether the integrating states are held while the
   * output is limited; used by every simulation of the variant */
  bool has_actuator;
  double u_low, u_high;
  bool anti_windup;
  /* the size of the reference step the limits are checked with, in the output's units
   * (> 0, finite; 0: not given, a unit step) */
  double reference_step;
  /* which time responses are drawn for this variant (LW_DESIGN_RESPONSE_* flags; a new
   * variant shows all of them) */
  unsigned responses;
  /* compared with the active variant where the design is shown (the window's choice, kept
   * with the document so that it opens as it was left) */
  bool compared;
  size_t n_stages;
  LwStage *stages;            /* n_stages, in order (the compensator is their product) */
} LwDesignVariant;

typedef struct
{
  char *title;                /* required, may be empty */
  char *author;               /* optional */
  char *notes;                /* optional */
  char *plant;                /* P(s) as typed: a proper rational expression in s (lw-expr.h);
                               "" when the design is on measured data alone
                               (lw_design_has_model) */
  double dead_time_s;         /* plant input dead time, >= 0, s */
  /* the named parameters of the plant expression (<parameters>): nominal values, and ranges
   * for a plant family; n_params 0: none */
  size_t n_params;
  LwDesignParam *params;
  /* the operating points of a plant family (<point> after the <parameter> elements), in the
   * document's order; n_points 0: none */
  size_t n_points;
  LwDesignPoint *points;
  /* how many members a plant family draws over its ranges and their seed (<parameters
   * members="…" seed="…">; docs/families.md): given or not (then the engine's defaults,
   * 100 and 1); members 0 … LW_DESIGN_MAX_FAMILY_MEMBERS, the seed a whole number >= 0 */
  bool has_family_members;
  size_t family_members;
  bool has_family_seed;
  guint64 family_seed;
  /* the units of the plant's input (the actuator's, u) and output (the measured quantity,
   * y), as short free texts ("V", "mm"); NULL: not given (lw_design_unit_problem) */
  char *input_unit;
  char *output_unit;
  double period_s;            /* sample period T, > 0, s */
  LwHold hold;
  int compute_delay;          /* computation delay N, whole samples, 0 … 1000 */
  /* the measured frequency response kept in the document (<measured>, the table read by
   * lw_measured_parse: at least LW_MEASURED_MIN_POINTS points, ω > 0 increasing, values
   * finite, coherence in [0, 1]); NULL: none, and the four fields after it unused */
  LwMeasured *measured;
  LwMeasuredKind measured_kind;
  LwDesignAnalysis measured_analysis;
  char *measured_source;      /* where the data came from (lw_design_source_problem); NULL */
  int measured_unstable_poles;/* open-loop poles outside the unit circle, 0 … 1000 */
  /* a measured family (docs/families.md, "Measured families"): the first measurement's name
   * (<measured name>; NULL: none, allowed only when it is alone) and the further measured
   * responses after it (<measured name=…> each), all judged with the variant's controller;
   * n_more_measured 0: the first is the only one */
  char *measured_name;
  size_t n_more_measured;
  LwDesignMeasuredSet *more_measured;
  size_t n_requirements;
  LwDesignRequirement *requirements;
  size_t n_variants;          /* >= 1 in a valid design */
  LwDesignVariant *variants;
  size_t active;              /* index of the active variant, < n_variants */
  /* optional view settings */
  bool has_range;
  double range_from_rad_s;    /* frequency range of the views, ω in rad/s, 0 < from < to */
  double range_to_rad_s;
  /* names of the views to show, in the order given, no name twice (lw_design_view_name_problem);
   * NULL: not given. The names are the renderer's (src/plot/lw-plot-view.h), which lies above
   * this layer: the document keeps them as text and whoever shows views maps them, so a view
   * added to the renderer needs nothing here, and a name this build does not know (a view of a
   * newer version) is kept and saved back unchanged. */
  char **views;
} LwDesign;

/* A new design: title "", the plant text copied, dead time 0, period_s, zero-order hold,
 * computation delay 1, no requirements, one variant named "initial" with no stages. */
LwDesign *lw_design_new (const char *plant, double period_s);
void lw_design_free (LwDesign *d);
LwDesign *lw_design_copy (const LwDesign *d);
G_DEFINE_AUTOPTR_CLEANUP_FUNC (LwDesign, lw_design_free)

/* The number of measured responses d holds (0 without a measurement; 1 + the further
 * ones of a measured family). */
size_t lw_design_n_measured (const LwDesign *d);

/* Drops the further responses of d's measured family (the first stays). */
void lw_design_clear_more_measured (LwDesign *d);

/* The name of measured response i of d's measured family (0: the first, d->measured; then
 * d->more_measured[i − 1]); "measured" for a first without a name. */
const char *lw_design_measured_set_name (const LwDesign *d, size_t i);

/* True when the design has a plant model: its plant text is not blank. A design without one
 * holds a measured response (<measured>, analysis "data"): the loop is closed on the data
 * alone, and what needs a model (steps, closed-loop poles) is not available. */
bool lw_design_has_model (const LwDesign *d);

/* True when the design's frequency-response figures are the measured data's: it holds a
 * measurement and says analysis="data" (always so without a model). */
bool lw_design_analysis_on_data (const LwDesign *d);

/* The name of the parameter that stands for the plant's dead time: it is not used in the
 * plant's text, its nominal is <plant dead_time_s>, and a range on it makes the dead time
 * vary over a plant family (docs/families.md). */
#define LW_DESIGN_DEAD_TIME_PARAM "dead_time_s"

/* The dead time (s) with the parameters at values (NULL: the nominals, d->dead_time_s). */
double lw_design_dead_time_at (const LwDesign *d, const double *values);

/* The plant P(s) with the parameters at values (d->n_params of them in the document's
 * order; NULL: the nominals), proper and not zero; the core's error otherwise. */
LwStatus lw_design_plant_parse (const LwDesign *d, const double *values, LwModel **out,
                                LwError *err);

/* NULL when one parameter's values are acceptable (finite; a range with low < high holding
 * the nominal; a log spread only above zero), else a sentence (a static string). */
const char *lw_design_param_problem (const LwDesignParam *p);

/* NULL when the parameters are acceptable: each name valid and given once, values finite,
 * ranges with low < high holding the nominal, log spread only above zero, at most
 * LW_DESIGN_MAX_PARAMS; else a sentence (written into buf) naming the parameter. The plant at
 * the nominals and at every corner of the range box (up to LW_DESIGN_MAX_CORNER_PARAMS ranged
 * parameters) must parse proper and non-zero: a corner where it does not is named with its
 * values. */
const char *lw_design_params_problem (const LwDesign *d, char *buf, size_t size);

/* NULL when name can be an operating point's name: 1 … LW_DESIGN_POINT_NAME_MAX bytes of
 * text (lw_design_text_problem) without line breaks, tabs or ':' and without spaces at either
 * end; else a sentence (a static string). */
const char *lw_design_point_name_problem (const char *name);

/* The parameters' values at operating point `point` (d->n_params of them, in the document's
 * order): the point's own values, the nominal for the others. */
void lw_design_point_values (const LwDesign *d, size_t point, double *values);

/* Index of the operating point called name, or -1. */
gssize lw_design_find_point (const LwDesign *d, const char *name);

/* NULL when the operating points are acceptable: at most LW_DESIGN_MAX_POINTS, names valid and
 * unique, each value naming a parameter of the design once and finite, a dead time among them
 * not negative nor beyond 1e6 sample periods, no parameter called "point" (the outputs use
 * the word for the point's name), and the plant proper and non-zero at each point
 * (outside the ranges too); else a sentence (written into buf) naming the point, its index in
 * *which when which is not NULL (G_MAXSIZE: not one point's). */
const char *lw_design_points_problem (const LwDesign *d, char *buf, size_t size, size_t *which);

/* Frees the operating points of d and sets none. */
void lw_design_clear_points (LwDesign *d);
/* The index of the parameter called name in d->params, or −1. */
gssize lw_design_param_index (const LwDesign *d, const char *name);

/* True when every field is equal (numbers compared with ==, strings byte for byte, absent
 * strings equal only to absent ones). */
bool lw_design_equal (const LwDesign *a, const LwDesign *b);

/* Replaces a string field: g_free (*field), then a copy of value (NULL stays NULL). */
void lw_design_set_string (char **field, const char *value);

/* Appends a variant (name copied, no stages) / a stage to variant v / a requirement; returns
 * a pointer to the new element, valid until the next append to the same array. */
LwDesignVariant *lw_design_add_variant (LwDesign *d, const char *name);
LwStage *lw_design_variant_add_stage (LwDesignVariant *v, const LwStage *s);
LwDesignRequirement *lw_design_add_requirement (LwDesign *d, const char *name,
                                                const LwRequirement *r);

/* The sample period T (s) of variant `index`: its own when it overrides the design's, else
 * d->period_s. Every loop built from a document uses this. */
double lw_design_variant_period_s (const LwDesign *d, size_t index);

/* Index of the variant called name, or -1. */
gssize lw_design_find_variant (const LwDesign *d, const char *name);

/* Checks everything a loaded design must satisfy (the value rules of docs/file-format.md):
 * plant expression proper, T > 0, dead time >= 0, delay in range, every stage and requirement
 * valid, variant names non-empty and unique, active in range, view range and view names (well
 * formed, none twice), strings valid UTF-8
 * without characters XML cannot hold.  Used before saving. */
gboolean lw_design_validate (const LwDesign *d, GError **error);

/* NULL when s is valid UTF-8 holding only characters XML 1.0 allows (so it can be saved),
 * else a sentence saying what is wrong (a static string). */
const char *lw_design_text_problem (const char *s);

/* NULL when name can be a view name of a document: a lower-case letter, then lower-case
 * letters, digits and '-', at most LW_DESIGN_VIEW_NAME_MAX bytes; else a sentence saying what
 * is wrong (a static string). Whether a view of that name exists is the renderer's to say. */
const char *lw_design_view_name_problem (const char *name);

/* Loads a document. name is used in messages (the path as the user gave it). */
LwDesign *lw_design_load_file (const char *path, GError **error);
LwDesign *lw_design_load_data (const char *data, size_t len, const char *name,
                               GError **error);

/* The canonical text of a validated design (NUL-terminated; *len_out, if not NULL, gets its
 * length). NULL with an error when lw_design_validate fails, or (LW_DESIGN_ERROR_LIMIT) when
 * the text would be over LW_DESIGN_MAX_BYTES, which the loader refuses. g_free the result. */
char *lw_design_to_text (const LwDesign *d, size_t *len_out, GError **error);

/* Writes the canonical text atomically to path (see the top of this file). The new file gets
 * the old file's permission bits, or 0666 less the umask when there was none. */
gboolean lw_design_save_file (const LwDesign *d, const char *path, GError **error);

/* Shortest decimal text (at most 17 significant digits, '.' as the separator whatever the
 * locale) that g_ascii_strtod reads back to exactly v; v must be finite. buf needs room for
 * G_ASCII_DTOSTR_BUF_SIZE bytes. Returns buf. */
char *lw_design_format_number (double v, char *buf);

/* The element name of a requirement kind in the file ("phase-margin", ...); NULL if unknown. */
const char *lw_design_requirement_element (LwReqKind kind);

/* The name shown for a requirement: its label, else the element name. */
const char *lw_design_requirement_title (const LwDesignRequirement *r);

G_END_DECLS
