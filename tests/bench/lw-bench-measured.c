/* lw-bench-measured — reading a large CSV table of a measured response (lw-measured.h): a
 * header and ROWS rows of frequency_hz, magnitude_db, phase_deg, coherence (default 9 999 999
 * rows, a file of 10 000 000 lines, the most the reader takes), made in memory. Prints the
 * CPU seconds of lw_measured_parse, the bytes the table keeps per row, and the growth of the peak
 * resident memory during the reading per row (the text itself is resident before). A
 * benchmark, not a test: the goal is at most about 40 bytes per row while reading.
 *   lw-bench-measured [ROWS]
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#define _DEFAULT_SOURCE
#include <sys/resource.h>
#include <time.h>

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "lw-measured.h"

static double
peak_mb (void)
{
  struct rusage ru;
  getrusage (RUSAGE_SELF, &ru);
  return (double) ru.ru_maxrss / 1024.0;   /* ru_maxrss in KiB on Linux */
}

int
main (int argc, char **argv)
{
  size_t rows = argc > 1 ? strtoul (argv[1], NULL, 10) : LW_MEASURED_MAX_LINES - 1;
  size_t size = 64 + rows * 40, used = 0;
  char *text = malloc (size);
  if (text == NULL)
    return 1;
  used += (size_t) snprintf (text, size, "frequency_hz, magnitude_db, phase_deg, coherence\n");
  for (size_t i = 0; i < rows; i++)
    used += (size_t) snprintf (text + used, size - used, "%zu.5,-%zu.25,-%zu.5,0.%03zu\n", i + 1,
                               i % 97, i % 179, i % 1000);
  memset (text + used, 0, size - used);   /* the whole buffer resident before the reading */
  double before = peak_mb ();
  clock_t c0 = clock ();
  LwMeasured *m = NULL;
  LwError err;
  LwStatus st = lw_measured_parse (text, used, &m, NULL, 0, NULL, &err);
  double cpu_s = (double) (clock () - c0) / CLOCKS_PER_SEC, after = peak_mb ();
  if (st != LW_OK)
    {
      fprintf (stderr, "lw-bench-measured: %s\n", err.message);
      return 1;
    }
  printf ("rows %zu, text %.0f MB: %.2f s of CPU to read, %zu bytes per row kept, peak memory grew by "
          "%.1f MB while reading (%.1f bytes per row)\n", m->n, (double) used / 1e6, cpu_s,
          sizeof (double) * 2 + sizeof (double _Complex), after - before,
          (after - before) * 1048576.0 / (double) rows);
  lw_measured_free (m);
  free (text);
  return 0;
}
