/* lw-plot-text.c — texts: fonts with unhinted metrics, the layout cache kept across figures,
 * drawing a text.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-private.h"

/* Font options of every text: metrics unhinted, so the same text has the same extent on
 * screen, PNG, SVG and PDF. */
static void
set_text_font_options (PangoContext *ctx)
{
  cairo_font_options_t *fo = cairo_font_options_create ();
  cairo_font_options_set_hint_metrics (fo, CAIRO_HINT_METRICS_OFF);
  cairo_font_options_set_hint_style (fo, CAIRO_HINT_STYLE_NONE);
  pango_cairo_context_set_font_options (ctx, fo);
  cairo_font_options_destroy (fo);
}

static void
set_text_font (PangoLayout *lay, FontRole role)
{
  PangoFontDescription *fd = pango_font_description_from_string ("Sans");
  static const double sizes[] = { 10.5, 11.5, 10.0, 12.5 };
  pango_font_description_set_absolute_size (fd, sizes[role] * PANGO_SCALE);
  if (role == FONT_TITLE)
    pango_font_description_set_weight (fd, PANGO_WEIGHT_BOLD);
  pango_layout_set_font_description (lay, fd);
  pango_font_description_free (fd);
}

/* ---- text layout cache ------------------------------------------------------------------ */

/* Two generations of layouts keyed by font role and text: a lookup moves a layout found in
 * the old generation to the current one, and when the current one is full it becomes the
 * old one (the one before is dropped), so texts used in the last frames stay while texts
 * of values that changed (margins during a drag) age out. */
#define TEXT_CACHE_GENERATION 256

struct LwPlotTextCache {
  PangoContext *ctx;        /* made from the first cairo_t drawn on, updated from each */
  GHashTable *cur, *old;    /* "role\x1ftext" → PangoLayout (owned) */
};

LwPlotTextCache *
lw_plot_text_cache_new (void)
{
  LwPlotTextCache *c = g_new0 (LwPlotTextCache, 1);
  c->cur = g_hash_table_new_full (g_str_hash, g_str_equal, g_free, g_object_unref);
  c->old = g_hash_table_new_full (g_str_hash, g_str_equal, g_free, g_object_unref);
  return c;
}

void
lw_plot_text_cache_free (LwPlotTextCache *c)
{
  if (c == NULL)
    return;
  g_hash_table_unref (c->cur);
  g_hash_table_unref (c->old);
  g_clear_object (&c->ctx);
  g_free (c);
}

void
lw_plot_set_text_cache (LwPlot *p, LwPlotTextCache *cache)
{
  g_return_if_fail (p != NULL);
  p->text_cache = cache;
}

/* A new reference to a layout of text in role for cr: from the cache when one is given (the
 * context follows cr's transformation and surface font options, as pango_cairo_create_layout
 * would set them), else made afresh. */
PangoLayout *
lwp_text_layout (LwPlotTextCache *c, cairo_t *cr, const char *text, FontRole role)
{
  if (c == NULL)
    {
      PangoLayout *lay = pango_cairo_create_layout (cr);
      set_text_font_options (pango_layout_get_context (lay));
      pango_layout_context_changed (lay);
      set_text_font (lay, role);
      pango_layout_set_text (lay, text, -1);
      return lay;
    }
  if (c->ctx == NULL)
    {
      c->ctx = pango_cairo_create_context (cr);
      set_text_font_options (c->ctx);
    }
  else
    pango_cairo_update_context (cr, c->ctx);
  char *key = g_strdup_printf ("%d\x1f%s", (int) role, text);
  PangoLayout *lay = g_hash_table_lookup (c->cur, key);
  if (lay != NULL)
    {
      g_free (key);
      return g_object_ref (lay);
    }
  char *old_key = NULL;
  if (g_hash_table_steal_extended (c->old, key, (gpointer *) &old_key, (gpointer *) &lay))
    g_free (old_key);
  else
    {
      lay = pango_layout_new (c->ctx);
      set_text_font (lay, role);
      pango_layout_set_text (lay, text, -1);
    }
  if (g_hash_table_size (c->cur) >= TEXT_CACHE_GENERATION)
    {
      g_hash_table_unref (c->old);
      c->old = c->cur;
      c->cur = g_hash_table_new_full (g_str_hash, g_str_equal, g_free, g_object_unref);
    }
  g_hash_table_insert (c->cur, key, lay);
  return g_object_ref (lay);
}

/* Draws text with its anchor point (ax, ay in [0, 1] of its extent) at (x, y). */
void
lwp_draw_text (LwPlotTextCache *tc, cairo_t *cr, const char *text, FontRole role, double x,
               double y, double ax, double ay, const double colour[3], const double *plate,
               double angle)
{
  PangoLayout *lay = lwp_text_layout (tc, cr, text, role);
  int w, h;
  pango_layout_get_size (lay, &w, &h);
  double tw = (double) w / PANGO_SCALE, th = (double) h / PANGO_SCALE;
  cairo_save (cr);
  cairo_translate (cr, x, y);
  cairo_rotate (cr, angle);
  cairo_translate (cr, -ax * tw, -ay * th);
  if (plate)
    {
      lwp_set_rgb (cr, plate, 0.85);
      cairo_rectangle (cr, -2, 0, tw + 4, th);
      cairo_fill (cr);
    }
  lwp_set_rgb (cr, colour, 1.0);
  cairo_move_to (cr, 0, 0);
  pango_cairo_show_layout (cr, lay);
  cairo_restore (cr);
  g_object_unref (lay);
}
