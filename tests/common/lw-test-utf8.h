/* lw-test-utf8.h — whether a string is UTF-8 text, for tests and fuzz targets that check the
 * messages of the code under test. Decoded by code point ranges (RFC 3629: no overlong forms,
 * no surrogates, nothing above U+10FFFF), independently of any check in src/.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stdbool.h>

static inline bool
lw_test_utf8_valid (const char *s)
{
  static const unsigned long min_cp[] = { 0, 0x80, 0x800, 0x10000 };
  const unsigned char *p = (const unsigned char *) s;
  while (*p != 0)
    {
      int more = *p < 0x80 ? 0 : (*p & 0xE0) == 0xC0 ? 1 : (*p & 0xF0) == 0xE0 ? 2
                 : (*p & 0xF8) == 0xF0 ? 3 : -1;
      if (more < 0)
        return false;
      unsigned long cp = more == 0 ? *p : (unsigned long) (*p & (0x3F >> more));
      for (int i = 1; i <= more; i++)
        {
          if ((p[i] & 0xC0) != 0x80)
            return false;
          cp = (cp << 6) | (p[i] & 0x3F);
        }
      if (cp < min_cp[more] || cp > 0x10FFFF || (cp >= 0xD800 && cp <= 0xDFFF))
        return false;
      p += more + 1;
    }
  return true;
}
