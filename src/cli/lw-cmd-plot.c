/* lw-cmd-plot.c — `loopwright-cli plot`: one view of a sampled loop given on the command line,
 * written as PNG, SVG or PDF by the shared figure renderer (src/plot/).
 *
 * plot_options_check() turns the figure options into a PlotSpec, and plot_write() draws any
 * list of evaluated variants with it; plot_run() builds them from the inline loop options or
 * from the variants of a design document (several overlaid, each in its colour and dash).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include "lw-cli-commands.h"
#include "lw-cli-common.h"
#include "lw-cli-doc.h"
#include "lw-cli-measured.h"
#include "lw-figure-measured.h"
#include "lw-figure-data.h"
#include "lw-cli-family.h"
#include "lw-cli-family-plot.h"
#include "lw-cli-figure-options.h"
#include "lw-plot-export.h"
#include "lw-plot.h"

/* The help is put together at run time: its list of views is the view table's. */
static const char plot_help_head[] =
  "Usage: " LW_CLI_PROG " plot --plant EXPR --period SECONDS --view VIEW --out FILE [options]\n"
  "       " LW_CLI_PROG " plot FILE.lwd [--variant NAME | --all-variants | --compared]\n"
  "       --view VIEW --out FILE [--measured FILE.csv --measured-kind KIND] [options]\n"
  "       " LW_CLI_PROG " plot --measured FILE.csv --measured-kind KIND --period SECONDS\n"
  "       --view VIEW --out FILE [options]\n"
  "\n"
  "Draws one view of a sampled loop and writes it as a PNG, SVG or PDF file (by the\n"
  "extension of FILE).\n"
  "\n"
  "Given a design document (FILE.lwd), the loop comes from it: the active variant, or\n"
  "--variant NAME, or with --all-variants every variant overlaid (at most 6), each named\n"
  "in the legend, or with --compared the active variant and those the document marks\n"
  "compared (what the window shows); the document's phase-margin requirement is marked unless\n"
  "--min-phase-margin is given. The loop options and --name are then not accepted.\n"
  "A measured response (the document's, or --measured in its place) is drawn in the\n"
  "frequency views beside the model, closed by the active variant's loop (or the first\n"
  "drawn), faded where its coherence is below 0.8 (docs/measured-data.md).\n"
  "\n"
  "Views:\n";

static const char plot_help_tail[] =
  "\n"
  "Options:\n"
  "  --plant EXPR             plant P(s), a proper rational expression in s (required)\n"
  "  --period SECONDS         sample period T in seconds, > 0 (required)\n"
  "  --compute-delay N        computation delay in whole samples, 0 to 1000 (default 1)\n"
  "  --dead-time SECONDS      plant input dead time in seconds, >= 0 (default 0)\n"
  "  --controller EXPR        controller C(w), proper, in the w-plane variable w (default 1)\n"
  "  --controller-z EXPR      controller C(z), proper, in z (instead of --controller)\n"
  "  --param NAME=VALUE       a named parameter of the plant expression and its value\n"
  "                           (repeat for each; e.g. --plant 'K/(s*(s+a))' --param K=40\n"
  "                           --param a=8)\n"
  LW_CLI_MEASURED_HELP
  LW_CLI_FAMILY_HELP
  "                           A family (these options or a document's) is drawn under the\n"
  "                           loop's curve: its worst members, operating points and up to\n"
  "                           40 others (Bode, Nyquist, Nichols)\n"
  "  --variant NAME           the variant of FILE.lwd to draw (default: the active one)\n"
  "  --all-variants           every variant of FILE.lwd, overlaid\n"
  "  --compared               the active variant of FILE.lwd and those marked compared\n"
  "  --view VIEW              one of the views above (required)\n"
  "  --out FILE               FILE.png, FILE.svg or FILE.pdf (required)\n"
  "  --size WxH               width and height, 16 to 20000 (pixels for PNG, points for\n"
  "                           SVG and PDF; default 800x600)\n"
  "  --theme light|dark       colours (default light)\n"
  "  --phase-range crossovers|whole|turn\n"
  "                           Bode views: the phase around the gain crossovers, to a decade\n"
  "                           past the last (default), the whole unwrapped curve, or one\n"
  "                           turn (wrapped into -360...0 deg)\n"
  "  --nyquist-scale linear|compressed\n"
  "                           Nyquist: linear near the unit circle (default), or compressed\n"
  "                           beyond it (|L| = r at radius 1 + log10 r) to show it whole\n"
  "  --title TEXT             a title above the figure\n"
  "  --name TEXT              legend text of the loop (default \"loop\")\n"
  "  --target-crossover RAD_S mark a target gain crossover omega (rad/s) on the Bode views\n"
  "  --min-phase-margin DEG   mark a required phase margin on the Bode and Nichols views\n"
  "  --pdf-date DATE          creation date written into a PDF, YYYY-MM-DDThh:mm:ss\n"
  "                           (default: a fixed date, so the same figure gives the same file)\n"
  "  --points N               frequency points up to pi/T, 16 to 100000 (default 2000)\n"
  "  --steps N                step-response samples, 2 to 1000000 (default 500)\n"
  "  -h, --help               show this help\n"
  "\n"
  "Exit status: 0 success, 2 bad input, 1 internal failure or the file could not be written.\n";

typedef struct
{
  LwCliLoopArgs loop;
  LwCliMeasuredArgs measured;
  LwCliFamilyArgs family;
  char *view, *out, *size, *theme, *title, *name, *target, *min_pm, *pdf_date, *points, *steps;
  char *phase_range, *nyquist_scale;
  char **files;
  char *variant;
  gboolean all;
  gboolean compared;
  gboolean help;
} PlotArgs;

/* An option of two words: false for the first (or none given), true for the second; a
 * message naming the option for anything else. */
static bool
second_word (const char *option, const char *value, const char *first, const char *second,
             const char *what, bool *out)
{
  *out = value != NULL && strcmp (value, second) == 0;
  if (value == NULL || *out || strcmp (value, first) == 0)
    return true;
  lw_cli_bad_input (option, "'%s' is not %s (%s or %s)", value, what, first, second);
  return false;
}

/* The figure options, checked. */
typedef struct
{
  LwPlotView view;
  LwPlotFormat format;
  const char *out;
  double width, height;
  LwPlotTheme theme;
  bool phase_full_range, phase_wrapped, nyquist_compressed;
  const char *title;
  bool has_target;  double target_rad_s;
  const LwDesign *design;   /* its requirements are marked too (the options win); or NULL */
  bool has_min_pm;  double min_pm_deg;
  const char *pdf_date;
  /* a plant family drawn with the variant at index family_of of the figure's, or NULL */
  const LwPlotFamily *family;
  size_t family_of;
} PlotSpec;

static int
plot_options_check (const PlotArgs *a, PlotSpec *s)
{
  memset (s, 0, sizeof *s);
  s->width = 800;
  s->height = 600;
  if (a->view == NULL)
    {
      g_autofree char *names = lw_plot_view_names_joined (" or ");
      lw_cli_bad_input ("--view", "required: %s", names);
      return LW_EXIT_BAD_INPUT;
    }
  int v = lw_plot_view_from_name (a->view);
  if (v < 0)
    {
      g_autofree char *names = lw_plot_view_names_joined (", ");
      lw_cli_bad_input ("--view", "unknown view '%s' (%s)", a->view, names);
      return LW_EXIT_BAD_INPUT;
    }
  s->view = (LwPlotView) v;
  if (a->out == NULL)
    {
      lw_cli_bad_input ("--out", "required: a file name ending in .png, .svg or .pdf");
      return LW_EXIT_BAD_INPUT;
    }
  int f = lw_plot_format_from_path (a->out);
  if (f < 0)
    {
      lw_cli_bad_input ("--out", "'%s' does not end in .png, .svg or .pdf", a->out);
      return LW_EXIT_BAD_INPUT;
    }
  s->format = (LwPlotFormat) f;
  s->out = a->out;
  if (a->size && !lw_cli_parse_figure_size (a->size, &s->width, &s->height))
    return LW_EXIT_BAD_INPUT;
  if (s->format == LW_PLOT_FORMAT_PNG && s->width * s->height > LW_PLOT_MAX_PNG_PIXELS)
    {
      lw_cli_bad_input ("--size", "a PNG of %s pixels is %.0f pixels, more than the limit of "
                        "%.0f (e.g. 5000x5000); use .svg or .pdf for a larger figure "
                        "(docs/cli.md, Limits)", a->size, s->width * s->height,
                        LW_PLOT_MAX_PNG_PIXELS);
      return LW_EXIT_BAD_INPUT;
    }
  if (a->theme == NULL || strcmp (a->theme, "light") == 0)
    s->theme = LW_PLOT_THEME_LIGHT;
  else if (strcmp (a->theme, "dark") == 0)
    s->theme = LW_PLOT_THEME_DARK;
  else
    {
      lw_cli_bad_input ("--theme", "unknown theme '%s' (light or dark)", a->theme);
      return LW_EXIT_BAD_INPUT;
    }
  const char *pr = a->phase_range;
  s->phase_full_range = pr != NULL && strcmp (pr, "whole") == 0;
  s->phase_wrapped = pr != NULL && strcmp (pr, "turn") == 0;
  if (pr != NULL && !s->phase_full_range && !s->phase_wrapped && strcmp (pr, "crossovers") != 0)
    {
      lw_cli_bad_input ("--phase-range", "'%s' is not a phase range (crossovers, whole or turn)",
                        pr);
      return LW_EXIT_BAD_INPUT;
    }
  if (!second_word ("--nyquist-scale", a->nyquist_scale, "linear", "compressed", "a scale",
                       &s->nyquist_compressed))
    return LW_EXIT_BAD_INPUT;
  s->title = a->title;
  if (a->target)
    {
      if (!lw_cli_parse_double ("--target-crossover", a->target, &s->target_rad_s))
        return LW_EXIT_BAD_INPUT;
      if (!(s->target_rad_s > 0.0))
        {
          lw_cli_bad_input ("--target-crossover", "must be > 0 rad/s, not %s", a->target);
          return LW_EXIT_BAD_INPUT;
        }
      s->has_target = true;
    }
  if (a->min_pm)
    {
      if (!lw_cli_parse_double ("--min-phase-margin", a->min_pm, &s->min_pm_deg))
        return LW_EXIT_BAD_INPUT;
      if (!(s->min_pm_deg > 0.0 && s->min_pm_deg < 180.0))
        {
          lw_cli_bad_input ("--min-phase-margin", "must be between 0 and 180 degrees, not %s",
                            a->min_pm);
          return LW_EXIT_BAD_INPUT;
        }
      s->has_min_pm = true;
    }
  if (a->pdf_date)
    {
      if (!lw_cli_check_pdf_date (a->pdf_date))
        return LW_EXIT_BAD_INPUT;
      s->pdf_date = a->pdf_date;
    }
  return LW_EXIT_OK;
}

/* One evaluated variant to draw. */
typedef struct
{
  const char *name;
  const LwSampledPlant *plant;
  const LwEvaluation *ev;
  unsigned style;   /* LwPlotVariant.style: the variant's place in the document + 1 */
  const LwVariantEval *eval;   /* its simulations (limited step, actuator) */
} PlotVariantSource;

/* Draws the variants with the spec and writes the file. */
static int
plot_write (const PlotSpec *s, const PlotVariantSource *src, size_t n, const LwPlotVariant *extra,
            double period_s)
{
  if (n + (extra != NULL) == 0 || n + (extra != NULL) > LW_PLOT_MAX_VARIANTS)
    {
      lw_cli_bad_input ("plot", "a figure shows 1 to %d variants, not %zu", LW_PLOT_MAX_VARIANTS,
                        n + (extra != NULL));
      return LW_EXIT_BAD_INPUT;
    }
  LwFigureVariant fv[LW_PLOT_MAX_VARIANTS];
  LwPlotVariant pv[LW_PLOT_MAX_VARIANTS];
  size_t filled = 0;
  int status = LW_EXIT_OK;
  LwError err;
  lw_error_clear (&err);
  for (; filled < n; filled++)
    {
      if (lw_figure_variant_fill (&fv[filled], src[filled].name, src[filled].plant,
                                  src[filled].ev, &err) != LW_OK)
        {
          status = lw_cli_report_core_error ("plot", &err);
          goto out;
        }
      /* the time responses the variant shows (a limited actuator: the limited step and
         u(kT) with its limits) */
      if (src[filled].eval != NULL)
        {
          const LwVariantEval *ve = src[filled].eval;
          lw_figure_variant_set_responses (&fv[filled], ve->sim_ref, &ve->sim_options,
                                           ve->sim_in, ve->sim_out, ve->responses);
        }
      pv[filled] = fv[filled].v;
      pv[filled].style = n > 1 ? src[filled].style : 0;   /* one variant: the first colour */
      if (s->family != NULL && filled == s->family_of)
        pv[filled].family = s->family;
    }
  if (extra != NULL)
    {
      pv[n] = *extra;   /* the measured data, after the model, in a style none of it has */
      pv[n].style = lw_figure_measured_style (pv, n);
    }
  LwPlotInput in = { 0 };
  in.view = s->view;
  in.nyquist_rad_s = G_PI / period_s;
  in.title = s->title;
  in.phase_full_range = s->phase_full_range;
  in.phase_wrapped = s->phase_wrapped;
  in.nyquist_compressed = s->nyquist_compressed;
  if (n > 0 && src[0].eval != NULL)
    {
      in.input_unit = src[0].eval->input_unit;
      in.output_unit = src[0].eval->output_unit;
    }
  in.n_variants = n + (extra != NULL);
  in.variants = pv;
  lw_figure_requirements (&in.req, period_s, s->has_target, s->target_rad_s,
                          s->has_min_pm, s->min_pm_deg);
  for (size_t i = 0; s->design != NULL && i < s->design->n_requirements; i++)
    {
      const LwRequirement *q = &s->design->requirements[i].req;
      if (!(q->kind == LW_REQ_MIN_PHASE_MARGIN && s->has_min_pm))
        lw_figure_requirements_add (&in.req, period_s, q);
    }
  g_autoptr (GError) error = NULL;
  LwPlot *plot = lw_plot_new (&in, &error);
  if (plot == NULL)
    {
      lw_cli_bad_input ("--view", "%s", error->message);
      status = LW_EXIT_BAD_INPUT;
      goto out;
    }
  lw_plot_set_theme (plot, s->theme);
  LwPlotExportOptions eo = { .pdf_date = s->pdf_date, .pdf_title = s->title,
                             .pdf_creator = LW_CLI_PROG " " PACKAGE_VERSION };
  if (!lw_plot_export (plot, s->format, s->out, s->width, s->height, &eo, &error))
    {
      g_printerr ("%s: %s: %s\n", LW_CLI_PROG, s->out, error->message);
      status = LW_EXIT_INTERNAL;
    }
  lw_plot_free (plot);
out:
  for (size_t i = 0; i < filled; i++)
    lw_figure_variant_clear (&fv[i]);
  return status;
}

/* --points and --steps into opts. */
static int
plot_analysis_options (const PlotArgs *a, LwAnalysisOptions *opts)
{
  gint64 v;
  lw_analysis_options_init (opts);
  if (a->points != NULL)
    {
      if (!lw_cli_parse_integer ("--points", a->points, 16, LW_CLI_MAX_POINTS, &v))
        return LW_EXIT_BAD_INPUT;
      opts->n_points = (size_t) v;
    }
  if (a->steps != NULL)
    {
      if (!lw_cli_parse_integer ("--steps", a->steps, 2, LW_CLI_MAX_STEPS, &v))
        return LW_EXIT_BAD_INPUT;
      opts->n_steps = (size_t) v;
    }
  return LW_EXIT_OK;
}

/* The loop of evaluation e on the document's measurement as a figure variant (*has FALSE
 * when there is none, the view draws no data, or the n_model variants leave no room: said on
 * stderr); a measurement the engine could not use at the variant's period is bad input, as
 * for analyze. */
static int
plot_doc_measured (const char *path, const LwDesign *d, const LwVariantEval *e,
                   const PlotSpec *spec, size_t n_model, LwFigureMeasured *fig, gboolean *has)
{
  *has = FALSE;
  if (d->measured == NULL || !lw_figure_measured_view_ok (spec->view))
    return LW_EXIT_OK;
  if (e->measured == NULL)
    {
      lw_cli_bad_input (path, "<measured>: %s", e->measured_error != NULL
                                                  ? e->measured_error->message
                                                  : "not evaluated");
      return LW_EXIT_BAD_INPUT;
    }
  if (n_model >= LW_PLOT_MAX_VARIANTS)
    {
      lw_cli_bad_input ("plot", "note: the measured data are not drawn: a figure holds %d "
                        "curves and the %zu variants take them all", LW_PLOT_MAX_VARIANTS,
                        n_model);
      return LW_EXIT_OK;
    }
  lw_figure_measured_fill (fig, e->measured, e->measured_kind, e->measured_coherence,
                           e->period_s);
  fig->variant.name = fig->legend;   /* the legend's slot; the fading is in docs/cli.md */
  *has = TRUE;
  return LW_EXIT_OK;
}


/* The variants of a design document, overlaid. */
static int
plot_run_document (const PlotArgs *a)
{
  const char *path = NULL;
  int status = lw_cli_doc_one_file ("plot", a->files, &path);
  if (status != LW_EXIT_OK)
    return status;
  status = lw_cli_doc_refuse_loop_options ("plot", path, &a->loop);
  if (status != LW_EXIT_OK)
    return status;
  if ((status = lw_cli_family_refuse_doc (&a->family)) != LW_EXIT_OK)
    return status;
  if (a->name != NULL)
    {
      lw_cli_bad_input ("--name", "not with a design document: the legend shows the variants' "
                        "names");
      return LW_EXIT_BAD_INPUT;
    }
  g_autoptr (LwDesign) d = NULL;
  status = lw_cli_doc_load (path, &d);
  if (status != LW_EXIT_OK)
    return status;
  g_autofree size_t *which = NULL;
  size_t n = 0;
  if (a->compared && (a->variant != NULL || a->all))
    {
      lw_cli_bad_input ("--compared", "cannot be combined with %s; give one of them",
                        a->all ? "--all-variants" : "--variant");
      return LW_EXIT_BAD_INPUT;
    }
  if (a->compared)
    lw_cli_doc_shown (d, &which, &n);
  else if ((status = lw_cli_doc_select (d, a->variant, a->all, "--all-variants", &which, &n))
           != LW_EXIT_OK)
    return status;
  if (n > LW_PLOT_MAX_VARIANTS)
    {
      lw_cli_bad_input ("--all-variants", "the design has %zu variants; a figure overlays at "
                        "most %d (pick one with --variant)", n, LW_PLOT_MAX_VARIANTS);
      return LW_EXIT_BAD_INPUT;
    }
  PlotSpec spec;
  status = plot_options_check (a, &spec);
  if (status != LW_EXIT_OK)
    return status;
  spec.design = d;
  LwAnalysisOptions opts;
  status = plot_analysis_options (a, &opts);
  if (status != LW_EXIT_OK)
    return status;

  /* a measurement given here takes the place of the document's (as check and report do) */
  if (lw_cli_measured_file (&a->measured) != NULL && !lw_figure_measured_view_ok (spec.view))
    {
      lw_cli_bad_input ("--view", "%s is a model's (time responses or poles); measured data "
                        "draw in the frequency views", a->view);
      return LW_EXIT_BAD_INPUT;
    }
  status = lw_cli_measured_doc_set (d, &a->measured, LW_DESIGN_ANALYSIS_DATA);
  if (status != LW_EXIT_OK)
    return status;

  LwEngineOptions eo;
  lw_engine_options_init (&eo);
  eo.n_points = opts.n_points;
  eo.n_steps = a->steps != NULL ? opts.n_steps : 0;   /* else the engine chooses */
  eo.disturbances = (lw_plot_view_info (spec.view)->needs & LW_PLOT_NEEDS_DISTURBANCE) != 0;
  LwVariantEval *e[LW_PLOT_MAX_VARIANTS] = { NULL };
  PlotVariantSource src[LW_PLOT_MAX_VARIANTS] = { { 0 } };
  size_t built = 0, n_model = 0, with_data = 0, first_model = 0;
  LwFamily *family = NULL;
  LwFamilyLoops *loops = NULL;
  LwFigureFamily ffam = { 0 };
  for (; built < n; built++)
    {
      /* a design without a plant model is drawn on its data alone */
      status = lw_cli_doc_evaluate_data (path, d, which[built], &eo, FALSE, &e[built]);
      if (status != LW_EXIT_OK)
        goto out;
      if (which[built] == d->active)
        with_data = built;
      if (e[built]->ev == NULL)
        continue;   /* no model loop: only its data are drawn */
      first_model = n_model == 0 ? which[built] : first_model;
      src[n_model++] = (PlotVariantSource) { d->variants[which[built]].name, e[built]->sampled,
                                             e[built]->ev,
                                             (unsigned) (which[built] % LW_PLOT_MAX_VARIANTS)
                                             + 1, e[built] };
    }
  /* a plant family: the members' loops drawn under the first model variant's curves */
  if (n_model > 0 && lw_cli_family_plot_view (spec.view) && lw_cli_family_wanted (&a->family, d))
    {
      status = lw_cli_family_plot (path, d, first_model, &a->family, &family, &loops, &ffam);
      if (status != LW_EXIT_OK)
        goto out;
      spec.family = &ffam.f;   /* of the first variant drawn: family_of 0 */
    }
  /* the document's measurement, closed by the loop of the active variant when it is drawn
   * (else the first drawn), in the frequency views, as the window draws it */
  LwFigureMeasured fig;
  gboolean has_fig = FALSE;
  status = plot_doc_measured (path, d, e[with_data], &spec, n_model, &fig, &has_fig);
  if (status == LW_EXIT_OK && n_model == 0 && !has_fig)
    {
      lw_cli_bad_input ("--view", "%s is a model's (time responses or poles) and the design "
                        "has no plant model; measured data draw in the frequency views",
                        a->view);
      status = LW_EXIT_BAD_INPUT;
    }
  if (status == LW_EXIT_OK)
    status = plot_write (&spec, src, n_model, has_fig ? &fig.variant : NULL,
                         e[with_data]->period_s);
  if (has_fig)
    lw_figure_measured_clear (&fig);
out:
  lw_figure_family_clear (&ffam);
  lw_family_loops_free (loops);
  lw_family_free (family);
  for (size_t i = 0; i < built; i++)
    lw_variant_eval_unref (e[i]);
  return status;
}

/* The loop on a measured response (and the model's, with --plant), overlaid. */
static int
plot_run_measured (const PlotArgs *a)
{
  PlotSpec spec;
  int status = plot_options_check (a, &spec);
  if (status != LW_EXIT_OK)
    return status;
  if (!lw_figure_measured_view_ok (spec.view))
    {
      lw_cli_bad_input ("--view", "%s needs a model (time responses or poles); measured data "
                        "draw in the frequency views", a->view);
      return LW_EXIT_BAD_INPUT;
    }
  LwCliMeasuredLoop ml;
  status = lw_cli_measured_loop_build ("plot", &a->loop, &a->measured, &ml);
  if (status != LW_EXIT_OK)
    return status;
  LwFigureMeasured fig;
  lw_figure_measured_fill (&fig, &ml.loop, ml.kind, ml.data->coherence, ml.lp.period_s);
  fig.variant.name = fig.legend;   /* the legend's slot; the fading is in docs/cli.md */
  LwVariantEval *e = NULL;
  if (ml.has_model)
    {
      LwAnalysisOptions opts;
      status = plot_analysis_options (a, &opts);
      LwEngineOptions eo;
      lw_engine_options_init (&eo);
      eo.n_points = opts.n_points;
      if (status == LW_EXIT_OK)
        status = lw_cli_loop_evaluate ("plot", &ml.lp, &eo, FALSE, &e);
    }
  if (status == LW_EXIT_OK)
    {
      PlotVariantSource src = { a->name ? a->name : "model", ml.lp.sampled,
                                e != NULL ? e->ev : NULL, 1, e };
      status = plot_write (&spec, &src, e != NULL ? 1 : 0, &fig.variant, ml.lp.period_s);
    }
  if (e != NULL)
    lw_variant_eval_unref (e);
  lw_figure_measured_clear (&fig);
  lw_cli_measured_loop_clear (&ml);
  return status;
}

static int
plot_run (void *data)
{
  const PlotArgs *a = data;
  if (lw_cli_measured_file (&a->measured) == NULL && a->measured.kind != NULL)
    {
      lw_cli_bad_input ("--measured-kind", "needs --measured FILE.csv");
      return LW_EXIT_BAD_INPUT;
    }
  if (lw_cli_measured_one (&a->measured, "plot draws one measured response (a measured "
                           "family's worst margins: analyze, check, report)") != LW_EXIT_OK)
    return LW_EXIT_BAD_INPUT;
  if (a->files != NULL && a->files[0] != NULL)
    return plot_run_document (a);
  if (lw_cli_measured_file (&a->measured) != NULL)
    return lw_cli_family_refuse_measured (&a->family) != LW_EXIT_OK ? LW_EXIT_BAD_INPUT
                                                                    : plot_run_measured (a);
  if (a->variant != NULL || a->all || a->compared)
    {
      lw_cli_bad_input (a->all ? "--all-variants" : a->compared ? "--compared" : "--variant",
                        "needs a design document (FILE.lwd) to pick from");
      return LW_EXIT_BAD_INPUT;
    }
  LwCliLoop lp;
  int status = lw_cli_loop_build ("plot", &a->loop, &lp);
  if (status != LW_EXIT_OK)
    return status;
  PlotSpec spec;
  LwVariantEval *e = NULL;
  LwAnalysisOptions opts;
  LwFamily *family = NULL;
  LwFamilyLoops *loops = NULL;
  LwFigureFamily ffam = { 0 };
  status = plot_options_check (a, &spec);
  if (status != LW_EXIT_OK)
    goto out;
  status = plot_analysis_options (a, &opts);
  if (status != LW_EXIT_OK)
    goto out;
  LwEngineOptions eo;
  lw_engine_options_init (&eo);
  eo.n_points = opts.n_points;
  eo.n_steps = a->steps != NULL ? opts.n_steps : 0;   /* else the engine chooses */
  eo.disturbances = (lw_plot_view_info (spec.view)->needs & LW_PLOT_NEEDS_DISTURBANCE) != 0;
  status = lw_cli_loop_evaluate ("plot", &lp, &eo, FALSE, &e);
  if (status != LW_EXIT_OK)
    goto out;
  /* a plant family of the loop options: the members drawn under the loop's curve */
  status = lw_cli_family_plot_loop (&a->loop, &a->family, &lp, lw_cli_family_plot_view (spec.view),
                                    &family, &loops, &ffam);
  if (status != LW_EXIT_OK)
    goto out;
  spec.family = family != NULL ? &ffam.f : NULL;
  PlotVariantSource src = { a->name ? a->name : "loop", lp.sampled, e->ev, 0, e };
  status = plot_write (&spec, &src, 1, NULL, e->ev->period_s);
out:
  lw_figure_family_clear (&ffam);
  lw_family_loops_free (loops);
  lw_family_free (family);
  lw_variant_eval_unref (e);
  lw_cli_loop_clear (&lp);
  return status;
}

int
lw_cmd_plot (int argc, char **argv)
{
  PlotArgs a = { 0 };
  const GOptionEntry entries[] = {
    LW_CLI_LOOP_ENTRIES (&a.loop),
    LW_CLI_MEASURED_ENTRIES (&a.measured),
    LW_CLI_FAMILY_ENTRIES (&a.family),
    { "view", 0, 0, G_OPTION_ARG_STRING, &a.view, NULL, NULL },
    { "out", 0, 0, G_OPTION_ARG_FILENAME, &a.out, NULL, NULL },
    { "size", 0, 0, G_OPTION_ARG_STRING, &a.size, NULL, NULL },
    { "theme", 0, 0, G_OPTION_ARG_STRING, &a.theme, NULL, NULL },
    { "phase-range", 0, 0, G_OPTION_ARG_STRING, &a.phase_range, NULL, NULL },
    { "nyquist-scale", 0, 0, G_OPTION_ARG_STRING, &a.nyquist_scale, NULL, NULL },
    { "title", 0, 0, G_OPTION_ARG_STRING, &a.title, NULL, NULL },
    { "name", 0, 0, G_OPTION_ARG_STRING, &a.name, NULL, NULL },
    { "target-crossover", 0, 0, G_OPTION_ARG_STRING, &a.target, NULL, NULL },
    { "min-phase-margin", 0, 0, G_OPTION_ARG_STRING, &a.min_pm, NULL, NULL },
    { "pdf-date", 0, 0, G_OPTION_ARG_STRING, &a.pdf_date, NULL, NULL },
    { "points", 0, 0, G_OPTION_ARG_STRING, &a.points, NULL, NULL },
    { "steps", 0, 0, G_OPTION_ARG_STRING, &a.steps, NULL, NULL },
    { "variant", 0, 0, G_OPTION_ARG_STRING, &a.variant, NULL, NULL },
    { "all-variants", 0, 0, G_OPTION_ARG_NONE, &a.all, NULL, NULL },
    { "compared", 0, 0, G_OPTION_ARG_NONE, &a.compared, NULL, NULL },
    { "help", 'h', 0, G_OPTION_ARG_NONE, &a.help, NULL, NULL },
    { G_OPTION_REMAINING, 0, 0, G_OPTION_ARG_FILENAME_ARRAY, &a.files, NULL, NULL },
    { NULL, 0, 0, 0, NULL, NULL, NULL }
  };
  GString *help = g_string_new (plot_help_head);
  for (size_t i = 0; i < LW_PLOT_N_VIEWS; i++)
    {
      const LwPlotViewInfo *v = lw_plot_view_info ((LwPlotView) i);
      g_string_append_printf (help, "  %-12s %s\n", v->name, v->summary);
    }
  g_string_append (help, plot_help_tail);
  int status = lw_cli_run_command ("plot", argc, argv, entries, &a.help, help->str, plot_run,
                                   &a);
  g_string_free (help, TRUE);
  lw_cli_loop_args_clear (&a.loop);
  lw_cli_measured_args_clear (&a.measured);
  lw_cli_family_args_clear (&a.family);
  char **strs[] = { &a.view, &a.out, &a.size, &a.theme, &a.title, &a.name, &a.target,
                    &a.min_pm, &a.pdf_date, &a.points, &a.steps, &a.phase_range,
                    &a.nyquist_scale };
  for (size_t i = 0; i < G_N_ELEMENTS (strs); i++)
    g_free (*strs[i]);
  g_strfreev (a.files);
  g_free (a.variant);
  return status;
}
