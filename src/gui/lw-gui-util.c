/* lw-gui-util.c — small helpers the panels share.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-gui-util.h"

char *
lw_gui_format_zpk (const LwZpk *m)
{
  g_return_val_if_fail (m != NULL, NULL);
  size_t need = lw_zpk_format (m, 6, NULL, 0);
  char *text = g_malloc (need + 1);
  lw_zpk_format (m, 6, text, need + 1);
  return text;
}
