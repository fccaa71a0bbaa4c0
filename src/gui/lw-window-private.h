/* lw-window-private.h — the designer window's state, shared by the files it is made of.
 *
 *   lw-window.c          life cycle (class, start, close, dispose), the design model's
 *                        signals, the evaluation and what is shown, the design report
 *   lw-window-actions.c  keyboard shortcuts, undo and redo (LwHistory), the layout properties,
 *                        small actions
 *   lw-window-files.c    open, save, save as, recent files, dropped files, the title and
 *                        unsaved state, asking before close, error messages, autosave
 *                        (LwAutosave) and restoring it
 *   lw-window-variants.c the variant actions and which variants are compared
 *   lw-window-drag.c     drag handles on the Bode views and their keyboard moves
 *   lw-window-export.c   Export Figure, Export Report, the notice of what was written
 *   lw-window-helpers.c  the formula helpers (lw-helper-dialog) applied as one undo step
 *   lw-window-measured.c a measured response: import, judge on it, fit a model to it
 *                        (lw-fit-dialog, "Use as Plant" one undo step), remove it
 *   lw-window-family.c   the plant family: evaluated on a worker, summarised, drawn
 *   lw-window-measured-family.c  the measured family (several measured responses):
 *                        evaluated on a worker, summarised under the loop figures
 *   lw-window-theme.c    the plots' colours following the dark style
 *   lw-window-testing.c  the drag benchmark and the test hook of Export Figure
 *
 * Only these files include this header.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-autosave.h"
#include "lw-compare-table.h"
#include "lw-compensator-panel.h"
#include "lw-design-model.h"
#include "lw-history.h"
#include "lw-plant-panel.h"
#include "lw-plot-area.h"
#include "lw-requirements-panel.h"
#include "lw-window.h"

G_BEGIN_DECLS

/* A plant family's members drawn in the loop views (lw-window-family.c). */
typedef struct _LwFamilyPicture LwFamilyPicture;

struct _LwWindow
{
  GtkApplicationWindow parent_instance;

  LwPlantPanel *plant_panel;
  LwCompensatorPanel *compensator_panel;
  LwRequirementsPanel *requirements_panel;
  LwPlotArea *plot_area;
  LwCompareTable *compare_table;
  GtkRevealer *notice;          /* what was just written, for a few seconds */
  GtkLabel *notice_label;
  guint notice_timeout;
  GMenu *recent_menu;

  /* variants shown beside the active one (names; the active one is always shown) */
  gboolean split;
  GHashTable *ref_evals;        /* variant name → RefEval: references, evaluated once */

  LwDesignModel *model;
  GSignalGroup *model_signals;  /* the window's handlers on model */
  LwVariantEval *eval;          /* the evaluation on show */
  guint eval_tick;              /* pending evaluation on the frame clock, or 0 */
  guint64 eval_generation;      /* of the newest evaluation started */
  guint64 shown_generation;     /* of the evaluation on show */
  gboolean eval_running;        /* a worker is evaluating */
  gboolean eval_again;          /* an edit came meanwhile: evaluate again when it ends */
  GCancellable *eval_cancel;    /* cancelled when the window goes */
  gboolean family_running;      /* a plant family is being evaluated (lw-window.c) */
  gpointer family_pending;      /* the newest family asked for meanwhile (FamilyJob), or NULL */
  LwFamilyPicture *family_picture; /* the family's members drawn with the active variant */
  gboolean family_drag_running; /* its members follow a drag on a worker (lw-window-family.c) */
  gpointer family_drag_pending; /* the newest drag step waiting for it (DragJob), or NULL */
  gint64 family_drag_started;   /* when the last one started (monotonic µs) */
  guint family_drag_timer;      /* the waiting one's start, or 0 */
  gboolean family_redraw;       /* a new picture: the figures are drawn again at the next frame */
  guint family_tick;            /* … by this tick callback, or 0 */
  gboolean measured_family_running; /* a measured family is being evaluated
                                       (lw-window-measured-family.c) */
  gpointer measured_family_pending; /* the newest one asked for meanwhile, or NULL */
  gboolean one_column;

  /* file and unsaved state */
  GFile *file;                  /* NULL: never saved */
  LwDesign *saved;              /* the document as last opened or saved; NULL: none */
  gboolean dirty;
  gboolean close_confirmed;
  LwAutosave *autosave;         /* the application's, or NULL: no autosave */
  guint autosave_slot;

  LwHistory *history;           /* undo and redo */

  /* drag */
  gboolean dragging;
  gint64 panels_shown_us;          /* when the panels last followed an evaluation (drag) */
  LwPlotPane *drag_pane;
  guint drag_stage;
  int drag_corner;              /* −1: gain */
  LwStage drag_start_stage;
  double drag_start_x, drag_start_y_db;
  double gain_pin_nu;           /* where the gain handle stays during a gain drag, or 0 */
  int sel_stage, sel_corner;    /* the selected handle (sel_stage −1: none) */

  gboolean debug;               /* LW_DEBUG_HANDLES=1 */

  /* benchmark */
  guint bench_frames, bench_done, bench_tick;
  gboolean bench_pending;       /* an edit was made in this frame's update */
  gint64 paint_start;
  GArray *bench_paint;
  double bench_nu0;
  gulong before_paint_id, after_paint_id;
};

/* lw-window.c */
/* Shows text over the foot of the plots for a few seconds (a file written, where). With
 * LW_DEBUG_HANDLES=1 also prints "LW-NOTICE TEXT". Also the action window.notify("s"). */
void lw_window_notify (LwWindow *self, const char *text);
GSettings *lw_window_get_settings (LwWindow *self);
/* The evaluation (lw-window.c): shows the evaluation on show and the references' on the
 * plots and in the metrics table; evaluates now; evaluates on the next frame. */
void lw_window_show_variants (LwWindow *self);
void lw_window_reevaluate (LwWindow *self);
void lw_window_schedule_eval (LwWindow *self);
gboolean lw_window_is_compared (LwWindow *self, const char *name);
/* The reference variant name's evaluation as last shown, or NULL. */
LwVariantEval *lw_window_get_reference_eval (LwWindow *self, const char *name);
void lw_window_plot_requirements (LwWindow *self, LwPlotRequirements *req);

/* lw-window-actions.c */
void lw_window_class_init_properties (GObjectClass *object_class);
void lw_window_class_init_actions (GtkWidgetClass *widget_class);
void lw_window_init_actions (LwWindow *self);
/* Starts the undo history on the model, at its current document. */
void lw_window_start_history (LwWindow *self);

/* lw-window-files.c */
/* The file's name, or (never saved) the design's title, or "Untitled design". g_free it. */
char *lw_window_document_name (LwWindow *self);
void lw_window_update_title (LwWindow *self);
/* Whether the document differs from what was opened or saved; the title follows. */
void lw_window_update_dirty (LwWindow *self);
/* An error dialog over the window (and the message on the log). */
void lw_window_show_error (LwWindow *self, const char *primary, const char *secondary);
void lw_window_class_init_files (GtkWidgetClass *widget_class);
void lw_window_init_files (LwWindow *self);
void lw_window_set_chooser_folder (LwWindow *self, GtkFileChooser *chooser);
void lw_window_refresh_recent (LwWindow *self);
/* Registers the window's unsaved work with the application's autosave. */
void lw_window_start_autosave (LwWindow *self);
void lw_window_clear_autosave (LwWindow *self);
/* Asks whether to save before closing; closes when the answer allows. */
void lw_window_ask_before_close (LwWindow *self);

/* lw-window-variants.c */
void lw_window_class_init_variants (GtkWidgetClass *widget_class);

/* lw-window-drag.c */
void lw_window_class_init_drag (GtkWidgetClass *widget_class);
void lw_window_init_drag (LwWindow *self);
void lw_window_begin_drag (LwWindow *self, LwPlotPane *pane, guint stage, int corner, double x,
                           double y_db);
void lw_window_update_drag (LwWindow *self, double x, double y_db, gboolean keep_ratio);
void lw_window_end_drag (LwWindow *self, gboolean cancel);

/* lw-window-export.c */
void lw_window_class_init_export (GtkWidgetClass *widget_class);
/* The figure of view for Export Figure: the variants on show (LwExportBuildFunc). */
LwPlot *lw_window_build_export_plot (LwPlotView view, gpointer user_data, GError **error);

/* lw-window-helpers.c */
void lw_window_class_init_helpers (GtkWidgetClass *widget_class);
/* lw-window-measured.c: import, judge on and remove a measured response */
void lw_window_class_init_measured (GtkWidgetClass *widget_class);

/* lw-window-theme.c */
void lw_window_init_theme (LwWindow *self);
void lw_window_finish_theme (LwWindow *self);

/* lw-window-testing.c */
/* With LW_TEST_FIGURE_PATH set: writes the figure there and returns TRUE. */
gboolean lw_window_export_figure_for_test (LwWindow *self);

/* lw-window-family.c: the family (lw_family_wanted: ranged parameters or operating points) of
 * `variant` of doc evaluated for the evaluation of `generation` and shown when that one is
 * still on show; the waiting one dropped (the window goes) */
void lw_window_start_family (LwWindow *self, const LwDesign *doc, size_t variant,
                             guint64 generation);
void lw_window_drop_family (LwWindow *self);
/* During a drag: the family's drawn members follow the controller of `variant` of doc (the
 * evaluation of `generation`), on a worker, shown when done unless a newer picture is. */
void lw_window_follow_family (LwWindow *self, const LwDesign *doc, size_t variant,
                              guint64 generation);
/* The family's members to draw with the active variant, or NULL (none, or another
 * variant's); its picture dropped (the design has no family any more). */
const LwPlotFamily *lw_window_family_drawn (LwWindow *self);
void lw_window_clear_family_picture (LwWindow *self);
void lw_family_picture_unref (LwFamilyPicture *p);
/* lw-window-measured-family.c: the measured family (lw_measured_family_wanted: more than one
 * measured response) of doc closed with the loop of eval (the active variant's evaluation of
 * `generation`, just put on show) on a worker, shown under the loop figures when that
 * evaluation is still on show; one at a time, the newest waiting. Without a measured family
 * its summary is hidden; during a drag (an evaluation on fewer points) the last one stays,
 * dimmed. drop: the waiting one dropped (the window goes). */
void lw_window_show_measured_family (LwWindow *self, const LwDesign *doc, LwVariantEval *eval,
                                     guint64 generation, gboolean dragging);
void lw_window_drop_measured_family (LwWindow *self);
/* lw-window.c: the figures drawn again from the evaluation on show (not the panels). */
void lw_window_show_plots (LwWindow *self);

G_END_DECLS
