/* fuzz-design.c — libFuzzer target for the design-document loader (build-aux/fuzz).
 *
 * Every input is loaded; a document that loads must also save, and its canonical text must
 * load back to an equal design and save to the same bytes (the round-trip property of
 * src/doc/lw-design.h). Anything else that goes wrong (a crash, a sanitizer report, a broken
 * round trip, or libxml2 printing an error itself instead of handing it to the loader) stops
 * the fuzzer.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <libxml/xmlerror.h>

#include "lw-design.h"

int LLVMFuzzerInitialize (int *argc, char ***argv);
int LLVMFuzzerTestOneInput (const uint8_t *data, size_t size);

/* libxml2's process-wide fallbacks: reached only by an error the loader failed to route
 * (which would otherwise be printed on standard error). Set here, in the harness only. */
static void
on_generic_error (void *ctx, const char *msg, ...)
{
  fprintf (stderr, "libxml2 would have printed: %s\n", msg);
  abort ();
}

static void
on_structured_error (void *ctx, xmlErrorPtr e)
{
  fprintf (stderr, "libxml2 would have printed: %s\n", e != NULL ? e->message : "?");
  abort ();
}

int
LLVMFuzzerInitialize (int *argc, char ***argv)
{
  xmlSetGenericErrorFunc (NULL, on_generic_error);
  xmlSetStructuredErrorFunc (NULL, on_structured_error);
  return 0;
}

int
LLVMFuzzerTestOneInput (const uint8_t *data, size_t size)
{
  GError *error = NULL;
  LwDesign *d = lw_design_load_data ((const char *) data, size, "fuzz.lwd", &error);
  if (d == NULL)
    {
      /* every refusal names the document */
      if (error == NULL || strncmp (error->message, "fuzz.lwd", 8) != 0)
        {
          fprintf (stderr, "refusal without a proper message: %s\n",
                   error != NULL ? error->message : "(no error)");
          abort ();
        }
      g_error_free (error);
      return 0;
    }
  size_t len = 0;
  char *text = lw_design_to_text (d, &len, &error);
  if (text == NULL)
    {
      fprintf (stderr, "a loaded design does not save: %s\n", error->message);
      abort ();
    }
  LwDesign *back = lw_design_load_data (text, len, "fuzz-canonical.lwd", &error);
  if (back == NULL)
    {
      fprintf (stderr, "the canonical text does not load: %s\n%s\n", error->message, text);
      abort ();
    }
  if (!lw_design_equal (d, back))
    {
      fprintf (stderr, "the canonical text loads to a different design:\n%s\n", text);
      abort ();
    }
  size_t len2 = 0;
  char *text2 = lw_design_to_text (back, &len2, NULL);
  if (text2 == NULL || len2 != len || memcmp (text, text2, len) != 0)
    {
      fprintf (stderr, "the second save differs from the first:\n%s\n", text);
      abort ();
    }
  g_free (text2);
  g_free (text);
  lw_design_free (back);
  lw_design_free (d);
  return 0;
}
