/* lw-cmd-suggest-helper.h — `suggest --helper NAME` (lw-cmd-suggest-helper.c).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include "lw-cli-common.h"

typedef struct
{
  const LwCliLoopArgs *loop;
  char **files;
  const char *helper;
  const char *variant;
  const char *phase_margin;
  const char *crossover;
  const char *rise_time;
  const char *safety;
  const char *ratio;
  const char *decades;
  const char *fraction;
  const char *output;
  gboolean json;
} LwSuggestHelperArgs;

/* Runs the helper a->helper; returns the exit status. */
int lw_cmd_suggest_helper (const LwSuggestHelperArgs *a);
