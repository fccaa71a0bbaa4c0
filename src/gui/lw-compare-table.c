/* lw-compare-table.c — the variants side by side.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <math.h>
#include <stdio.h>

#include <glib/gi18n.h>

#include "lw-compare-table.h"
#include "lw-family-summary.h"
#include "lw-gui-util.h"

/* The worst case of the active variant's plant family, as its column shows it. */
typedef struct
{
  char *variant;                /* the variant whose family it is */
  size_t n_members;
  gboolean stale;               /* from before a drag */
  double value[14];             /* per row (N_ROWS), NaN: not a figure of the family */
  char *member[14];             /* the member giving it, in words, or NULL */
  double crossover_lo, crossover_hi;
  guint n_req;
  LwReqStatus *req_status;
  char **req_member;
} FamilyColumn;

struct _LwCompareTable
{
  GtkWidget parent_instance;

  GtkGrid *grid;
  GHashTable *cells;            /* (col << 16 | row) → its label in grid (borrowed) */
  char *shape;                  /* what the cells were made for: names, active, requirements */
  gboolean debug;
  char *debug_last;
  LwPlotTheme theme;
  FamilyColumn *family;         /* NULL: no family shown */
};

G_DEFINE_FINAL_TYPE (LwCompareTable, lw_compare_table, GTK_TYPE_WIDGET)

typedef enum { BETTER_NONE, BETTER_HIGHER, BETTER_LOWER } Better;

typedef struct
{
  const char *key;             /* for the debug print */
  const char *label;           /* translatable */
  const char *unit;
  Better better;
  /* a variant is marked the best of a row only when it beats every other by more than
   * max(abs_tol, rel_tol·|value|): smaller differences are within what a model, a
   * measurement or the grid can tell apart (choices of the project, common practice, no
   * source) */
  double abs_tol, rel_tol;
} Row;

enum
{
  ROW_PERIOD, ROW_PM, ROW_GM, ROW_WC, ROW_DM, ROW_MS, ROW_OS, ROW_RISE, ROW_SETTLE, ROW_IAE,
  ROW_ISE, ROW_ITAE, ROW_EFFORT, ROW_UPEAK, N_ROWS
};
G_STATIC_ASSERT (N_ROWS == G_N_ELEMENTS (((FamilyColumn *) NULL)->value));

/* The family's figure of a row, or −1 (lw-family.h: the figures over the members). */
static int
family_figure (int row)
{
  switch (row)
    {
    case ROW_PM: return LW_FAMILY_PHASE_MARGIN;
    case ROW_GM: return LW_FAMILY_GAIN_MARGIN;
    case ROW_DM: return LW_FAMILY_DELAY_MARGIN;
    case ROW_MS: return LW_FAMILY_SENSITIVITY;
    case ROW_OS: return LW_FAMILY_OVERSHOOT;
    case ROW_SETTLE: return LW_FAMILY_SETTLING;
    default: return -1;
    }
}

static void
family_column_free (FamilyColumn *fc)
{
  if (fc == NULL)
    return;
  g_free (fc->variant);
  for (int r = 0; r < N_ROWS; r++)
    g_free (fc->member[r]);
  g_free (fc->req_status);
  for (guint i = 0; i < fc->n_req; i++)
    g_free (fc->req_member[i]);
  g_free (fc->req_member);
  g_free (fc);
}

/* Units of the time-domain indices: for a reference step of 1, the error is in units of the
 * step (lw-simulate.h): IAE = T Σ|e| in s, ISE = T Σe² in s, ITAE = T Σ kT|e| in s²; the
 * control effort T Σu² in (actuator units)²·s. */
static const Row rows[N_ROWS] = {
  { "period", N_("Sample period"), "s", BETTER_NONE, 0, 0 },
  { "phase-margin", N_("Phase margin"), "°", BETTER_HIGHER, 0.5, 0 },
  { "gain-margin", N_("Gain margin"), "dB", BETTER_HIGHER, 0.2, 0 },
  { "crossover", N_("Crossover ω"), "rad/s", BETTER_HIGHER, 0, 0.01 },
  { "delay-margin", N_("Delay margin"), "s", BETTER_HIGHER, 0, 0.01 },
  { "sensitivity-peak", N_("Sensitivity peak Ms"), "", BETTER_LOWER, 0.02, 0 },
  { "overshoot", N_("Overshoot"), "%", BETTER_LOWER, 0.5, 0 },
  { "rise-time", N_("Rise time"), "s", BETTER_LOWER, 0, 0.01 },
  { "settling-time", N_("Settling time"), "s", BETTER_LOWER, 0, 0.01 },
  { "iae", N_("IAE"), "s", BETTER_LOWER, 0, 0.01 },
  { "ise", N_("ISE"), "s", BETTER_LOWER, 0, 0.01 },
  { "itae", N_("ITAE"), "s²", BETTER_LOWER, 0, 0.01 },
  { "control-effort", N_("Control effort"), "u²·s", BETTER_LOWER, 0, 0.01 },
  { "actuator-peak", N_("Peak actuator output"), "", BETTER_LOWER, 0, 0.01 },
};

static const char source_data_tip[]
  = N_("From the measured data: the loop closed on the measured points, its crossovers found "
       "between them (docs/measured-data.md); the requirements are judged on these.");
static const char source_model_tip[]
  = N_("From the model: a time response and the closed-loop poles need a model in s, which the "
       "measured data are not.");

/* The index of the variant that is best in row by a meaningful difference, or −1. */
static int
best_of (int row, const double *vals, guint n)
{
  if (rows[row].better == BETTER_NONE)
    return -1;
  int best = -1;
  for (guint j = 0; j < n; j++)
    if (!isnan (vals[j])
        && (best < 0 || (rows[row].better == BETTER_HIGHER ? vals[j] > vals[best]
                                                            : vals[j] < vals[best])))
      best = (int) j;
  if (best < 0)
    return -1;
  double tol = fmax (rows[row].abs_tol, rows[row].rel_tol * fabs (vals[best]));
  for (guint j = 0; j < n; j++)
    if ((int) j != best && !isnan (vals[j]) && !(fabs (vals[j] - vals[best]) > tol))
      return -1;
  return best;
}

/* Where a row's figures come from when the design is judged on its measured data: the
 * margins, the crossover and the sensitivity peak from the loop closed on the data (as the
 * requirements' verdicts), everything of a time response from the model (the data have
 * none). */
typedef enum { SOURCE_DESIGN, SOURCE_DATA, SOURCE_MODEL } Source;

static Source
row_source (int row, gboolean on_data)
{
  if (row == ROW_PERIOD)
    return SOURCE_DESIGN;
  if (!on_data)
    return SOURCE_MODEL;
  return row <= ROW_MS ? SOURCE_DATA : SOURCE_MODEL;
}

/* The figure of a row from the loop on the measured data (the engine's achieved figures,
 * which it takes from the data when the design is judged on them); NaN when none. */
static double
data_value (int row, const LwVariantEval *e)
{
  const LwAchieved *a = e->has_achieved ? &e->achieved : NULL;
  const LwMeasuredMargins *m = e->measured != NULL ? &e->measured->margins : NULL;
  switch (row)
    {
    case ROW_PM: return a != NULL && a->has_phase_margin ? a->phase_margin_deg : NAN;
    case ROW_GM: return a != NULL && a->has_gain_margin ? a->gain_margin_db : NAN;
    case ROW_WC: return a != NULL && a->has_crossover ? a->crossover_rad_s : NAN;
    case ROW_DM:
      return m != NULL && m->n_gain > 0 && !m->crossover_above_data
             && isfinite (m->delay_margin_s) ? m->delay_margin_s : NAN;
    case ROW_MS: return a != NULL && a->has_sensitivity ? a->sensitivity_peak : NAN;
    }
  return NAN;
}

/* The figure of a row for an evaluation; NaN when it has none. */
static double
row_value (int row, const LwVariantEval *e, gboolean on_data)
{
  if (e == NULL)
    return NAN;
  if (row == ROW_PERIOD)
    return e->period_s;
  if (row_source (row, on_data) == SOURCE_DATA)
    return data_value (row, e);
  if (e->ev == NULL)
    return NAN;
  const LwMargins *m = &e->ev->margins;
  const LwStep *s = &e->ev->step;
  switch (row)
    {
    case ROW_PM: return m->has_phase_margin ? m->phase_margin_deg : NAN;
    case ROW_GM: return m->has_gain_margin ? m->gain_margin_db : NAN;
    case ROW_WC: return m->has_phase_margin ? m->gain_crossover_rad_s : NAN;
    case ROW_DM: return m->has_delay_margin ? m->delay_margin_s : NAN;
    case ROW_MS: return m->has_sensitivity ? m->sensitivity_peak : NAN;
    case ROW_OS: return s->has_overshoot ? s->overshoot_pct : NAN;
    case ROW_RISE: return s->has_rise ? s->rise_time_s : NAN;
    case ROW_SETTLE: return s->has_settling ? s->settling_time_s : NAN;
    case ROW_IAE: return e->has_sim ? e->indices.iae : NAN;
    case ROW_ISE: return e->has_sim ? e->indices.ise : NAN;
    case ROW_ITAE: return e->has_sim ? e->indices.itae : NAN;
    case ROW_EFFORT: return e->has_sim ? e->indices.control_effort : NAN;
    case ROW_UPEAK: return e->has_sim ? e->actuator_peak : NAN;
    }
  return NAN;
}

static void
clear (LwCompareTable *self)
{
  GtkWidget *c;
  g_hash_table_remove_all (self->cells);
  while ((c = gtk_widget_get_first_child (GTK_WIDGET (self->grid))) != NULL)
    gtk_grid_remove (self->grid, c);
}

/* The label at (col, row), made when the grid has none there yet (the cells are kept while
 * the table's shape stays, so a drag only changes texts). */
static GtkWidget *
put (LwCompareTable *self, int col, int row, const char *markup, float xalign, gboolean dim)
{
  /* looked up in the table's own index: gtk_grid_get_child_at walks every cell, and a drag
   * puts every cell each frame */
  gpointer key = GUINT_TO_POINTER ((guint) col << 16 | (guint) row);
  GtkWidget *l = g_hash_table_lookup (self->cells, key);
  if (l == NULL)
    {
      l = gtk_label_new (NULL);
      gtk_label_set_xalign (GTK_LABEL (l), xalign);
      if (dim)
        gtk_widget_add_css_class (l, "dim-label");
      gtk_grid_attach (self->grid, l, col, row, 1, 1);
      g_hash_table_insert (self->cells, key, l);
    }
  if (g_strcmp0 (gtk_label_get_label (GTK_LABEL (l)), markup) != 0)
    gtk_label_set_markup (GTK_LABEL (l), markup);
  return l;
}

/* The family's cell of a figure's row: its worst value (the crossover: its range), the member
 * in the tooltip; dimmed when from before a drag. */
static void
family_cell (LwCompareTable *self, const FamilyColumn *fam, int col, int r, int row,
             GString *dbg)
{
  g_autofree char *text = NULL;
  if (row == ROW_WC && isfinite (fam->crossover_lo))
    text = g_strdup_printf ("%.4g … %.4g", fam->crossover_lo, fam->crossover_hi);
  else if (isfinite (fam->value[row]))
    text = g_strdup_printf ("%.4g", fam->value[row]);
  else
    text = g_strdup ("—");
  g_autofree char *markup = fam->stale ? g_strdup_printf ("<span alpha=\"55%%\">%s</span>", text)
                                       : g_strdup (text);
  GtkWidget *c = put (self, col, r, markup, 1, FALSE);
  lw_gui_set_tooltip (c, fam->member[row]);
  g_string_append_printf (dbg, " family=%.17g", row == ROW_WC ? fam->crossover_lo
                                                             : fam->value[row]);
}

void
lw_compare_table_set_family (LwCompareTable *self, const LwFamily *f, const LwDesign *d,
                             size_t variant)
{
  g_return_if_fail (LW_IS_COMPARE_TABLE (self));
  g_clear_pointer (&self->family, family_column_free);
  if (f == NULL || d == NULL || variant >= d->n_variants)
    return;
  FamilyColumn *fc = g_new0 (FamilyColumn, 1);
  fc->variant = g_strdup (d->variants[variant].name);
  fc->n_members = f->n_members;
  for (int row = 0; row < N_ROWS; row++)
    {
      fc->value[row] = NAN;
      int k = family_figure (row);
      size_t w = k >= 0 ? f->worst[k] : G_MAXSIZE;
      if (w == G_MAXSIZE || w >= f->n_members)
        continue;
      fc->value[row] = f->members[w].figure[k];
      g_autofree char *who = lw_family_member_words (f, d, w);
      /* TRANSLATORS: the member of a plant family giving a worst value */
      fc->member[row] = g_strdup_printf (_("Worst on the member %s"), who);
    }
  fc->crossover_lo = f->crossover_min_rad_s;
  fc->crossover_hi = f->crossover_max_rad_s;
  if (!(isfinite (fc->crossover_lo) && isfinite (fc->crossover_hi)))
    fc->crossover_lo = fc->crossover_hi = NAN;
  fc->member[ROW_WC] = g_strdup (_("The gain crossover's range over the members"));
  fc->n_req = (guint) f->n_requirements;
  fc->req_status = g_new0 (LwReqStatus, fc->n_req + 1);
  fc->req_member = g_new0 (char *, fc->n_req + 1);
  for (guint i = 0; i < fc->n_req; i++)
    {
      fc->req_status[i] = f->requirements[i].status;
      size_t m = f->requirement_member[i];
      if (m != G_MAXSIZE && m < f->n_members)
        {
          g_autofree char *who = lw_family_member_words (f, d, m);
          fc->req_member[i] = g_strdup_printf (_("Worst on the member %s"), who);
        }
    }
  self->family = fc;
}

void
lw_compare_table_family_stale (LwCompareTable *self, gboolean stale)
{
  g_return_if_fail (LW_IS_COMPARE_TABLE (self));
  if (self->family != NULL)
    self->family->stale = stale;
}

void
lw_compare_table_show (LwCompareTable *self, const char *const *names,
                       LwVariantEval *const *evals, const guint *styles, guint n, guint active,
                       const LwDesignRequirement *reqs, guint n_req, gboolean on_data)
{
  g_return_if_fail (LW_IS_COMPARE_TABLE (self));
  g_return_if_fail (n == 0 || (names != NULL && evals != NULL && active < n));
  /* the active variant's plant family: a column of its worst cases */
  const FamilyColumn *fam = self->family != NULL && n >= 1
                            && g_strcmp0 (self->family->variant, names[active]) == 0
                            ? self->family : NULL;
  gtk_widget_set_visible (GTK_WIDGET (self), n >= 2 || (n >= 1 && fam != NULL));
  if (n < 2 && fam == NULL)
    {
      clear (self);
      g_clear_pointer (&self->shape, g_free);
      return;
    }
  g_autoptr (GString) shape = g_string_new (NULL);
  g_string_append_printf (shape, "%u %u %u %d %d %d", n, active, n_req, (int) self->theme,
                          on_data, fam != NULL);
  for (guint j = 0; j < n; j++)
    g_string_append_printf (shape, "\x1f%s", names[j]);
  for (guint i = 0; i < n_req; i++)
    g_string_append_printf (shape, "\x1e%s", lw_design_requirement_title (&reqs[i]));
  if (g_strcmp0 (shape->str, self->shape) != 0)
    {
      clear (self);
      g_free (self->shape);
      self->shape = g_strdup (shape->str);
    }

  g_autoptr (GString) dbg = g_string_new (NULL);
  put (self, 0, 0, _("<b>Compared</b>"), 0, FALSE);
  for (guint j = 0; j < n; j++)
    {
      g_autofree char *esc = g_markup_escape_text (names[j], -1);
      /* a sample of the variant's colour, as in the plots' key */
      g_autofree char *sample = NULL;
      if (styles != NULL && styles[j] >= 1)
        {
          double rgb[3];
          lw_plot_variant_colour (self->theme, styles[j] - 1, rgb);
          sample = g_strdup_printf ("<span foreground=\"#%02x%02x%02x\">\u2501\u2501</span> ",
                                    (unsigned) lround (255 * rgb[0]),
                                    (unsigned) lround (255 * rgb[1]),
                                    (unsigned) lround (255 * rgb[2]));
        }
      g_autofree char *name = g_strdup_printf ("%s<b>%s</b>", sample ? sample : "", esc);
      g_autofree char *head = j == active
                                /* TRANSLATORS: %s is the variant's name (with markup) */
                                ? g_strdup_printf (_("%s (active)"), name)
                                : g_strdup (name);
      put (self, (int) j + 1, 0, head, 1, FALSE);
    }
  const int fcol = (int) n + 1;   /* the family's column */
  if (fam != NULL)
    {
      /* TRANSLATORS: the column of a plant family's worst cases; %zu its members */
      g_autofree char *head = g_strdup_printf (_("<b>Worst of the family</b>\n(%zu members)"),
                                               fam->n_members);
      GtkWidget *h = put (self, fcol, 0, head, 1, FALSE);
      lw_gui_set_tooltip (h, fam->stale
                               ? _("From before the drag: the family is evaluated again when "
                                   "it ends.")
                               : _("The worst value over the plant family's members, with the "
                                   "active variant's controller (docs/families.md); the member "
                                   "giving it is in each value's tooltip."));
    }

  int r = 1;
  for (int row = 0; row < N_ROWS; row++, r++)
    {
      double vals[LW_DESIGN_MAX_VARIANTS];
      guint nv = MIN (n, LW_DESIGN_MAX_VARIANTS);
      for (guint j = 0; j < nv; j++)
        vals[j] = row_value (row, evals[j], on_data);
      int best = best_of (row, vals, nv);
      g_autofree char *title = rows[row].unit[0] != '\0'
                                 ? g_strdup_printf ("%s (%s)", _(rows[row].label),
                                                    rows[row].unit)
                                 : g_strdup (_(rows[row].label));
      Source src = row_source (row, on_data);
      /* judged on data: every figure says where it comes from */
      g_autofree char *label
        = !on_data || src == SOURCE_DESIGN
            ? g_strdup (title)
            : g_strdup_printf ("%s <span alpha=\"60%%\" size=\"small\">%s</span>", title,
                               src == SOURCE_DATA ? _("data") : _("model"));
      GtkWidget *lc = put (self, 0, r, label, 0, FALSE);
      lw_gui_set_tooltip (lc, !on_data || src == SOURCE_DESIGN ? NULL
                              : src == SOURCE_DATA ? _(source_data_tip) : _(source_model_tip));
      g_string_append_printf (dbg, "LW-METRIC row=%s source=%s active=%u best=%d values=",
                              rows[row].key, src == SOURCE_DESIGN ? "design"
                                             : src == SOURCE_DATA ? "data" : "model",
                              active, best);
      for (guint j = 0; j < nv; j++)
        {
          /* 17 significant digits: the double itself, for tests against analyze --json */
          g_string_append_printf (dbg, "%s%.17g", j > 0 ? "," : "", vals[j]);
          g_autofree char *text = NULL;
          if (isnan (vals[j]))
            text = g_strdup ("—");
          else if (j == active || isnan (vals[active]) || row == ROW_PERIOD)
            text = g_strdup_printf ("%.4g", vals[j]);
          else
            /* TRANSLATORS: a value and its difference to the active variant's */
            text = g_strdup_printf (_("%.4g (Δ %+.3g)"), vals[j], vals[j] - vals[active]);
          g_autofree char *markup = (int) j == best
                                      ? g_strdup_printf ("<b>★ %s</b>", text)
                                      : g_strdup (text);
          GtkWidget *c = put (self, (int) j + 1, r, markup, 1, FALSE);
          const char *tip = (int) j != best ? NULL
                            : rows[row].better == BETTER_HIGHER
                                ? _("The highest of the variants compared, by a meaningful "
                                    "difference")
                                : _("The lowest of the variants compared, by a meaningful "
                                    "difference");
          lw_gui_set_tooltip (c, tip);
        }
      if (fam != NULL)
        family_cell (self, fam, fcol, r, row, dbg);
      g_string_append_c (dbg, '\n');
    }

  for (guint i = 0; i < n_req; i++, r++)
    {
      const LwDesignRequirement *q = &reqs[i];
      g_autofree char *words = lw_gui_requirement_title (q);
      g_autofree char *title = g_markup_escape_text (words, -1);
      put (self, 0, r, title, 0, TRUE);
      if (lw_requirement_check (&q->req, NULL) != LW_OK)
        continue;
      g_string_append_printf (dbg, "LW-METRIC row=req-%u results=", i);
      for (guint j = 0; j < n; j++)
        {
          const char *t = "—";
          const char *d = "n/a";
          if (evals[j] != NULL && evals[j]->has_achieved)
            {
              LwReqResult res = lw_requirement_evaluate (&q->req, &evals[j]->achieved);
              if (res.status == LW_REQ_PASS)
                t = _("pass"), d = "pass";
              else if (res.status == LW_REQ_FAIL)
                t = _("<b>fail</b>"), d = "fail";
            }
          g_string_append_printf (dbg, "%s%s", j > 0 ? "," : "", d);
          put (self, (int) j + 1, r, t, 1, FALSE);
        }
      if (fam != NULL && fam->n_req == n_req)
        {
          LwReqStatus st = fam->req_status[i];
          const char *t = st == LW_REQ_PASS ? _("pass on every member")
                          : st == LW_REQ_FAIL ? _("<b>fails on a member</b>") : "—";
          GtkWidget *c = put (self, fcol, r, t, 1, FALSE);
          lw_gui_set_tooltip (c, fam->req_member[i]);
          g_string_append_printf (dbg, " family=%s", st == LW_REQ_PASS ? "pass"
                                                     : st == LW_REQ_FAIL ? "fail" : "n/a");
        }
      g_string_append_c (dbg, '\n');
    }

  if (self->debug && g_strcmp0 (dbg->str, self->debug_last) != 0)
    {
      g_free (self->debug_last);
      self->debug_last = g_strdup (dbg->str);
      fputs (dbg->str, stdout);
      fflush (stdout);
    }
}

static void
lw_compare_table_dispose (GObject *object)
{
  LwCompareTable *self = LW_COMPARE_TABLE (object);
  g_clear_pointer (&self->family, family_column_free);
  if (self->grid != NULL)
    {
      gtk_widget_unparent (GTK_WIDGET (self->grid));
      self->grid = NULL;
    }
  g_clear_pointer (&self->cells, g_hash_table_unref);
  g_clear_pointer (&self->debug_last, g_free);
  g_clear_pointer (&self->shape, g_free);
  G_OBJECT_CLASS (lw_compare_table_parent_class)->dispose (object);
}

static void
lw_compare_table_class_init (LwCompareTableClass *klass)
{
  G_OBJECT_CLASS (klass)->dispose = lw_compare_table_dispose;
  gtk_widget_class_set_layout_manager_type (GTK_WIDGET_CLASS (klass), GTK_TYPE_BIN_LAYOUT);
  gtk_widget_class_set_css_name (GTK_WIDGET_CLASS (klass), "comparetable");
}

static void
lw_compare_table_init (LwCompareTable *self)
{
  self->grid = GTK_GRID (gtk_grid_new ());
  self->cells = g_hash_table_new (g_direct_hash, g_direct_equal);
  gtk_grid_set_row_spacing (self->grid, 3);
  gtk_grid_set_column_spacing (self->grid, 12);
  gtk_widget_set_parent (GTK_WIDGET (self->grid), GTK_WIDGET (self));
  gtk_widget_set_visible (GTK_WIDGET (self), FALSE);
  self->debug = g_strcmp0 (g_getenv ("LW_DEBUG_HANDLES"), "1") == 0;
}

LwCompareTable *
lw_compare_table_new (void)
{
  return g_object_new (LW_TYPE_COMPARE_TABLE, NULL);
}

void
lw_compare_table_set_theme (LwCompareTable *self, LwPlotTheme theme)
{
  g_return_if_fail (LW_IS_COMPARE_TABLE (self));
  self->theme = theme;
}
