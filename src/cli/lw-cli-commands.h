/* lw-cli-commands.h — the commands of loopwright-cli, one file each (lw-cmd-NAME.c).
 * Each takes argv with the command name in argv[0] and returns the exit status.
 * To add a command: write lw-cmd-NAME.c, declare it here, add a row to `commands` in
 * loopwright-cli.c and the file to src/cli/meson.build.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

int lw_cmd_analyze (int argc, char **argv);
int lw_cmd_check (int argc, char **argv);
int lw_cmd_new (int argc, char **argv);
int lw_cmd_tidy (int argc, char **argv);
int lw_cmd_plot (int argc, char **argv);
int lw_cmd_suggest (int argc, char **argv);
int lw_cmd_emit (int argc, char **argv);
int lw_cmd_report (int argc, char **argv);
int lw_cmd_fit (int argc, char **argv);
