/* lw-cli-family.h — plant families on the command line: --range, --members, --seed, the
 * design a family is made from without a document, and the family's JSON and text
 * (docs/families.md).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <json-glib/json-glib.h>

#include "lw-cli-common.h"
#include "lw-design.h"
#include "lw-family.h"

typedef struct
{
  char **ranges;          /* --range NAME=LOW:HIGH, repeated */
  char **points;          /* --point NAME:P=V,P=V, repeated */
  char *members;          /* --members N */
  char *seed;             /* --seed N */
} LwCliFamilyArgs;

#define LW_CLI_FAMILY_ENTRIES(a)                                                          \
  { "range", 0, 0, G_OPTION_ARG_FILENAME_ARRAY, &(a)->ranges, NULL, NULL },               \
  { "point", 0, 0, G_OPTION_ARG_FILENAME_ARRAY, &(a)->points, NULL, NULL },               \
  { "members", 0, 0, G_OPTION_ARG_FILENAME, &(a)->members, NULL, NULL },                  \
  { "seed", 0, 0, G_OPTION_ARG_FILENAME, &(a)->seed, NULL, NULL }

/* The option of a family refused with a design document (it gives its own ranges and
 * points), or NULL: "--range" or "--point". */
const char *lw_cli_family_doc_refused (const LwCliFamilyArgs *a);
/* With a design document: prints why --range or --point is refused and returns the exit
 * status, or LW_EXIT_OK when neither is given. */
int lw_cli_family_refuse_doc (const LwCliFamilyArgs *a);
/* With measured data as the plant: prints why --range, --point or --members is refused and
 * returns the exit status, or LW_EXIT_OK when none is given. */
int lw_cli_family_refuse_measured (const LwCliFamilyArgs *a);

#define LW_CLI_FAMILY_HELP                                                                \
  "  --range NAME=LOW:HIGH    the range of a --param over a plant family (repeat for\n"    \
  "                           each); the margins are then given for every member too\n"    \
  "  --point NAME:P=V,...     an operating point of the family: a name and some --param\n"   \
  "                           values (the others nominal), e.g. --point full:m=2.5; a\n"     \
  "                           member of its own, named where it is the worst (repeat)\n"    \
  "  --members N              members drawn over the ranges, 0 to 100000 (default 100),\n"  \
  "                           besides the nominal and the corners\n"                       \
  "  --seed N                 seed of the drawn members, a whole number (default 1)\n"

void lw_cli_family_args_clear (LwCliFamilyArgs *a);

/* Whether a family is asked for: a --range or --point, or a document with a ranged
 * parameter or an operating point. */
gboolean lw_cli_family_wanted (const LwCliFamilyArgs *a, const LwDesign *d);

/* --members and --seed into *o, over the design d's own (lw_family_options_for; d may be
 * NULL). Prints and returns the exit status on a bad value. */
int lw_cli_family_options (const LwCliFamilyArgs *a, const LwDesign *d, LwFamilyOptions *o);

/* A design holding the loop options' plant, its --param values with their --range, the
 * --point operating points, the period, dead time and computation delay (no requirements,
 * one empty variant). Prints and returns the exit status on a bad --range or --point. */
int lw_cli_family_design (const LwCliLoopArgs *loop, const LwCliFamilyArgs *a,
                          const LwCliLoop *lp, LwDesign **out);

/* What a family's numbers are when the design is judged on measured data (analysis="data"):
 * its members are the plant model's; the data are one machine. */
#define LW_CLI_FAMILY_ON_MODEL_NOTE                                                        \
  "these are the plant model's members (the family is on the plant model; the design is "  \
  "judged on the measured data)"

/* The family as the "family" member of root (docs/cli.md); with analysis="data" it says its
 * figures are the model's ("analysis": "model", "note"). */
void lw_cli_family_json (JsonObject *root, const LwFamily *f, const LwDesign *d);

/* The family as text. */
void lw_cli_family_print (const LwFamily *f, const LwDesign *d);
