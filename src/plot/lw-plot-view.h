/* lw-plot-view.h — the views the renderer draws: one table (lw-plot-view.c) with each view's
 * name, title, one-line summary, the data it needs, what the window does with it, and its
 * builder. The CLI's --view and its help, the window's panes and its export dialog, and
 * lw_plot_new all read it; a new view is a row there, a value here and its builder
 * (lw-plot-view-NAME.c). Design documents store view names as text (src/doc/lw-design.h,
 * `shows`) and the users of a document map them here.
 *
 * The table's order is the order views are listed and shown in (CLI help, export dialog,
 * window panes).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>
#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef enum {
  LW_PLOT_VIEW_BODE_Z = 0,    /* |L|, ∠L over ω up to the Nyquist frequency */
  LW_PLOT_VIEW_BODE_W,        /* |L|, ∠L over ν (w-plane), with straight-line asymptotes */
  LW_PLOT_VIEW_STEP,          /* output samples as a staircase; optional actuator panel */
  LW_PLOT_VIEW_NYQUIST,       /* Im L over Re L, unit circle, critical point −1 */
  LW_PLOT_VIEW_NICHOLS,       /* |L| (dB) over ∠L (°) */
  LW_PLOT_VIEW_POLES,         /* pole-zero map in z with the unit circle */
  LW_PLOT_VIEW_SENSITIVITY,   /* |S| and |T| in dB over ω up to π/T */
  LW_PLOT_VIEW_DISTURBANCE,   /* the output after input and output disturbance steps */
  LW_PLOT_N_VIEWS
} LwPlotView;

/* What a view draws from (LwPlotVariant and LwPlotInput in lw-plot.h): lw_plot_new refuses a
 * figure where no variant has one of the series the view needs. */
typedef enum {
  LW_PLOT_NEEDS_Z = 1u << 0,            /* .z, at least 2 points */
  LW_PLOT_NEEDS_W = 1u << 1,            /* .w, at least 2 points */
  LW_PLOT_NEEDS_NYQUIST = 1u << 2,      /* .nyquist, at least 2 points */
  LW_PLOT_NEEDS_STEP = 1u << 3,         /* .step, at least 2 samples and a period > 0 */
  LW_PLOT_NEEDS_POLES = 1u << 4,        /* .poles, at least one root */
  LW_PLOT_NEEDS_NYQUIST_RATE = 1u << 5, /* LwPlotInput.nyquist_rad_s > 0 */
  LW_PLOT_NEEDS_DISTURBANCE = 1u << 6   /* .dist_in or .dist_out, at least 2 samples */
} LwPlotNeeds;

/* What the view is to its users. */
typedef enum {
  /* its x axis is frequency (log): lw_plot_set_x_view zooms and pans it, and panes of the
   * same view follow each other */
  LW_PLOT_VIEW_FREQUENCY_AXIS = 1u << 0,
  /* over ν in the w-plane (else ω, where the x axis is frequency) */
  LW_PLOT_VIEW_W_PLANE = 1u << 1,
  /* the window puts the stages' handles on its magnitude panel (a frequency axis) */
  LW_PLOT_VIEW_HANDLES = 1u << 2,
  /* a pane of the window's grid, and in the split view shown for two variants side by side */
  LW_PLOT_VIEW_IN_WINDOW = 1u << 3,
  LW_PLOT_VIEW_IN_SPLIT = 1u << 4
} LwPlotViewTraits;

typedef struct {
  LwPlotView view;
  const char *name;       /* as the CLI, file names and documents spell it: "bode-z" */
  const char *title;      /* for people, untranslated (marked N_): window panes, export
                           * dialog; translate with the program's gettext domain */
  const char *menu_label; /* the title with a mnemonic, for the pane's menu (marked N_; the
                           * mnemonics differ from each other and from the menu's display
                           * options: W, T, P, Y) */
  const char *summary;    /* one line for the CLI's help (ASCII) */
  unsigned needs;         /* LwPlotNeeds */
  unsigned traits;        /* LwPlotViewTraits */
} LwPlotViewInfo;

/* The row of a view; NULL when v is not a view. */
const LwPlotViewInfo *lw_plot_view_info (LwPlotView v);
/* Name of a view ("bode-z", …; "?" when v is not a view) and back (-1 when unknown). */
const char *lw_plot_view_name (LwPlotView v);
int lw_plot_view_from_name (const char *name);
/* True when the view has every trait in traits. */
bool lw_plot_view_has (LwPlotView v, unsigned traits);
/* The names in table order for a message: "bode-z, bode-w, …, nichols or poles" (with
 * last_joiner " or "); free with g_free. */
char *lw_plot_view_names_joined (const char *last_joiner);

#ifdef __cplusplus
}
#endif
