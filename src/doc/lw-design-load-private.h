/* lw-design-load-private.h — what the files reading design documents share
 * (lw-design-load.c, lw-design-read.c, lw-design-elements.c, lw-design-schema.c).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include <libxml/parser.h>
#include <libxml/parserInternals.h>
#include <libxml/relaxng.h>
#include <libxml/tree.h>
#include "lw-design-private.h"
#include "lw-doc-resources.h"
#include "lw-expr.h"
#include "lw-number.h"

typedef struct
{
  const char *name;         /* file name for messages */
  GError *error;            /* first error of the reader */
  int line;                 /* its line */
} Reader;

typedef struct
{
  char *message;
  int line;
  char *element;
} SchemaError;

char *
lw_load_trimmed_message (const char *m);

bool
lw_load_fail (Reader *r, const xmlNode *node, LwDesignError code, const char *fmt, ...)
  G_GNUC_PRINTF (4, 5);

bool
lw_load_is_element (const xmlNode *n, const char *name);

bool
lw_load_is_blank (const xmlChar *s);

const xmlNode *
lw_load_next_element (Reader *r, const xmlNode *parent, const xmlNode *n);

char *
lw_load_element_text (Reader *r, const xmlNode *e);

bool
lw_load_check_attributes (Reader *r, const xmlNode *e, const char *where, const char *const *allowed);

char *
lw_load_attribute (const xmlNode *e, const char *name);

bool
lw_load_parse_whole_text (const char *text, long long lo, long long hi, long long *out);

bool
lw_load_number_attr (Reader *r, const xmlNode *e, const char *where, const char *name, LwNumRule rule,
                     bool required, double *out, bool *present);

bool
lw_load_text_attr (Reader *r, const xmlNode *e, const char *where, const char *name, bool required,
                   char **out);

bool
lw_load_no_children (Reader *r, const xmlNode *e, const char *where);

bool
lw_load_check_plant (Reader *r, const xmlNode *e, const LwDesign *d);

bool
lw_load_missing (Reader *r, const xmlNode *parent, const xmlNode *at, const char *name,
                 const char *after);

/* <measured>: its attributes and its table into d (lw-design-measured.c) */
bool
lw_load_read_measured (Reader *r, const xmlNode *e, LwDesign *d);

/* The <point> elements of <parameters> from first on into d (lw-design-points.c); the
 * plant at each point is checked by lw_load_check_points once the period is known, the
 * failing point named at its line. */
bool
lw_load_read_points (Reader *r, const xmlNode *parent, const xmlNode *first, LwDesign *d);
bool
lw_load_check_points (Reader *r, const xmlNode *parameters_el, const LwDesign *d);

/* A further <measured> of a measured family (first: the first one's element, for the line
 * of a refusal about it). */
bool
lw_load_read_more_measured (Reader *r, const xmlNode *e, LwDesign *d, const xmlNode *first);

LwDesign *
lw_load_read_design (Reader *r, const xmlNode *root);

int
lw_load_validate_schema (xmlDocPtr doc, SchemaError *out);
