/* lw-cli-figure-options.c — the figure options of `plot` that need reading: --size and
 * --pdf-date (lw-cli-figure-options.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <string.h>

#include "lw-cli-common.h"
#include "lw-cli-figure-options.h"
#include "lw-plot-export.h"

bool
lw_cli_parse_figure_size (const char *text, double *w, double *h)
{
  const char *x = strchr (text, 'x');
  if (x == NULL)
    {
      lw_cli_bad_input ("--size", "'%s' is not WIDTHxHEIGHT, e.g. 800x600", text);
      return false;
    }
  g_autofree char *ws = g_strndup (text, (gsize) (x - text));
  gint64 a, b;
  if (!lw_cli_parse_integer ("--size (width)", ws, 16, LW_PLOT_MAX_SIDE, &a)
      || !lw_cli_parse_integer ("--size (height)", x + 1, 16, LW_PLOT_MAX_SIDE, &b))
    return false;
  *w = (double) a;
  *h = (double) b;
  return true;
}

bool
lw_cli_check_pdf_date (const char *text)
{
  g_autoptr (GTimeZone) utc = g_time_zone_new_utc ();
  g_autoptr (GDateTime) dt = g_date_time_new_from_iso8601 (text, utc);
  if (dt == NULL || strlen (text) < 19)
    {
      lw_cli_bad_input ("--pdf-date", "'%s' is not a date YYYY-MM-DDThh:mm:ss", text);
      return false;
    }
  return true;
}
