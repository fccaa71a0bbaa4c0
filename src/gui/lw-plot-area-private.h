/* lw-plot-area-private.h — what the files of the plot area share (lw-plot-area.c, the grid
 * and its figures; lw-plot-area-views.c, which view each pane shows); not used elsewhere.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-figure-data.h"
#include "lw-figure-measured.h"
#include "lw-plot-area.h"
#include "lw-plot-pane.h"

/* The panes, from the view table (lw-plot-view.h) in its order: the views shown in the window
 * at first (LW_PLOT_VIEW_IN_WINDOW; each pane can be given any view, self->views), and those
 * of the split view (LW_PLOT_VIEW_IN_SPLIT), each shown twice: the active variant left, the
 * other right. Filled once, by class_init. */
extern LwPlotView lwpa_area_views[LW_PLOT_N_VIEWS];
extern guint lwpa_n_area_views;
extern LwPlotView lwpa_split_views[LW_PLOT_N_VIEWS];
extern guint lwpa_n_split_views;

/* A variant's figure data, kept while the same evaluation is shown: a reference variant's
 * curves are filled once, not again each frame of a drag. */
typedef struct
{
  LwVariantEval *eval;             /* a reference */
  LwFigureVariant fv;
  char *name;
  gboolean used;
  gboolean has_measured;           /* the design's measured response closed by this variant's */
  LwFigureMeasured measured;       /* controller (eval->measured), drawn beside its loop */
} FigureEntry;

struct _LwPlotArea
{
  GtkWidget parent_instance;

  GtkGrid *grid;
  GtkDrawingArea *key;                /* one key to the variants over every view */
  char *key_names[LW_PLOT_MAX_VARIANTS];
  unsigned key_styles[LW_PLOT_MAX_VARIANTS];
  guint key_n, key_active;
  LwPlotTheme theme;
  LwPlotPane *panes[LW_PLOT_N_VIEWS];
  LwPlotView views[LW_PLOT_N_VIEWS];  /* each pane's view, distinct (n_area_views of them) */
  LwPlotPane *split_panes[LW_PLOT_N_VIEWS];   /* the right column of the split view */
  LwPlotLayout layout;
  gboolean split;
  GPtrArray *figures;                 /* of FigureEntry *, each on its own (stable address) */
  unsigned long next_data_key;        /* the last LwPlotVariant.data_key given to an entry */
  gboolean debug;                     /* LW_DEBUG_HANDLES=1: print the series shown */
  gboolean linking;
  double period_s;                    /* the active variant's, for linking ω and ν axes */
  int phase_mode;                     /* Bode phase axes (pane menu): 0 around the crossovers,
                                         1 the whole curve, 2 one turn */
  gboolean nyquist_compressed;        /* Nyquist: compressed beyond |L| = 1 (pane menu) */
};

enum { LWPA_SIGNAL_VIEWS_CHANGED, LWPA_SIGNAL_DISPLAY_CHANGED, LWPA_N_SIGNALS };
extern guint lwpa_signals[LWPA_N_SIGNALS];

/* Puts the panes on the grid for the layout and the split view (lw-plot-area.c). */
void lwpa_arrange (LwPlotArea *self);

/* lw-plot-area-views.c: zoom and pan of one pane followed by the others ("x-view-changed") */
void lwpa_pane_view_changed (LwPlotPane *pane, double lo, double hi, LwPlotArea *self);

/* lw-plot-area-views.c: the display options of the pane menu (phase range, Nyquist scale) */
void lwpa_display_activated (GtkWidget *widget, const char *action, GVariant *param);

/* lw-plot-area-views.c: the pane menu's handlers and action, for init and class_init */
void lwpa_pane_menu_pressed (GtkGestureClick *gesture, int n_press, double x, double y,
                             gpointer data);
gboolean lwpa_pane_menu_key (GtkEventControllerKey *k, guint keyval, guint keycode,
                             GdkModifierType state, gpointer data);
void lwpa_pane_view_activated (GtkWidget *widget, const char *action, GVariant *param);

/* lw-plot-area-views.c: the variants of a view with the measured data after them when the
 * view draws data (view −1: for the key) — into out, at most LW_PLOT_MAX_VARIANTS; returns
 * the count */
guint lwpa_with_measured (const LwPlotVariant *vars, guint n, const LwPlotVariant *measured,
                          int view, LwPlotVariant *out);

/* lw-plot-area-views.c: the key strip above the panes, naming the variants drawn (shown for
 * two and more) */
void lwpa_key_measure (LwPlotArea *self, int width);
void lwpa_key_resized (GtkDrawingArea *area, int width, int height, LwPlotArea *self);
void lwpa_key_draw (GtkDrawingArea *area, cairo_t *cr, int width, int height, gpointer user_data);
void lwpa_set_key (LwPlotArea *self, const LwPlotVariant *vars, guint n, guint active);

/* lw-plot-area.c: the figure data of an evaluation (kept between frames), the figures of a
 * view, the drag handles on the active variant's curves, a message in every pane, and the
 * end of a showing (entries not used since are dropped) */
const FigureEntry *lwpa_figure_for (LwPlotArea *self, LwVariantEval *eval, const char *name,
                                    LwError *err);
LwPlot *lwpa_build_view (LwPlotView view, const LwPlotVariant *vars, guint n,
                         double nyquist_rad_s, const LwPlotRequirements *req,
                         const LwVariantEval *units_of, const LwPlotArea *opts,
                         const LwPlot *axes_of, const char *title, GError **error);
void lwpa_set_handles (LwPlotArea *self, LwVariantEval *eval, const LwFigureVariant *fv,
                       const LwStage *stages, guint n_stages, double gain_pin_nu,
                       int sel_stage, int sel_corner);
void lwpa_show_message (LwPlotArea *self, const char *msg);
void lwpa_drop_unused_figures (LwPlotArea *self);

/* lw-plot-area-data.c: a design on measured data alone (LW_EVAL_NO_MODEL): each variant's
 * loop on the data in the views that draw frequency responses, the active one with its
 * handles; the views that need a model say so */
void lwpa_show_data_alone (LwPlotArea *self, const LwAreaVariant *vs, guint n, guint active,
                           const LwPlotRequirements *req, const LwStage *stages,
                           guint n_stages, double gain_pin_nu_rad_s, int sel_stage,
                           int sel_corner);
