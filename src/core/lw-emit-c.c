/* lw-emit-c.c — C99 code for a controller's implementation form; see lw-emit-c.h.
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-emit-c.h"

#include <ctype.h>
#include <math.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "config.h"

/* Relative tolerance of the generated floating-point self-test, times the peak of the impulse
 * response: room for another compiler's rounding (contracted multiply-adds, extended
 * registers) over 64 samples, far below any coefficient error worth catching. */
#define SELFTEST_REL_TOL 1e-9

/* ---- text buffer ----------------------------------------------------------------------- */

void
lw_text_init (LwText *t)
{
  memset (t, 0, sizeof *t);
}

void
lw_text_clear (LwText *t)
{
  free (t->data);
  memset (t, 0, sizeof *t);
}

bool
lw_text_printf (LwText *t, const char *fmt, ...)
{
  if (t->failed)
    return false;
  va_list ap;
  va_start (ap, fmt);
  va_list ap2;
  va_copy (ap2, ap);
  int need = vsnprintf (NULL, 0, fmt, ap);
  va_end (ap);
  if (need < 0)
    {
      va_end (ap2);
      t->failed = true;
      return false;
    }
  if (t->len + (size_t) need + 1 > t->cap)
    {
      size_t cap = t->cap ? t->cap : 1024;
      while (cap < t->len + (size_t) need + 1)
        {
          if (cap > SIZE_MAX / 2)
            {
              va_end (ap2);
              t->failed = true;
              return false;
            }
          cap *= 2;
        }
      char *d = realloc (t->data, cap);
      if (d == NULL)
        {
          va_end (ap2);
          t->failed = true;
          return false;
        }
      t->data = d;
      t->cap = cap;
    }
  vsnprintf (t->data + t->len, (size_t) need + 1, fmt, ap2);
  va_end (ap2);
  t->len += (size_t) need;
  return true;
}

/* ---- helpers --------------------------------------------------------------------------- */

/* A double as a C literal with 17 significant digits and a '.' whatever the locale. */
static void
num (double v, char *buf, size_t size)
{
  snprintf (buf, size, "%.17g", v);
  for (char *p = buf; *p; p++)
    if (*p == ',')
      *p = '.';
  if (strpbrk (buf, ".eEn") == NULL && strlen (buf) + 2 < size)
    strcat (buf, ".0");
}

/* A short number for comments (locale-independent too). */
static void
shortnum (double v, char *buf, size_t size)
{
  snprintf (buf, size, "%.6g", v);
  for (char *p = buf; *p; p++)
    if (*p == ',')
      *p = '.';
}

/* A factored model as comment text, with any end-of-comment sequence broken up. */
static void
put_model (LwText *t, const char *label, const LwModel *m)
{
  char small[512];
  size_t need = lw_model_format (m, 10, small, sizeof small);
  char *text = small;
  char *big = NULL;
  if (need >= sizeof small)
    {
      big = malloc (need + 1);
      if (big == NULL)
        {
          t->failed = true;
          return;
        }
      lw_model_format (m, 10, big, need + 1);
      text = big;
    }
  lw_text_printf (t, " *   %-22s ", label);
  for (const char *p = text; *p; p++)
    {
      if (p[0] == '*' && p[1] == '/')
        lw_text_printf (t, "* ");
      else
        lw_text_printf (t, "%c", *p);
    }
  lw_text_printf (t, "\n");
  free (big);
}

static void
put_complex (LwText *t, double complex r)
{
  char re[40], im[40];
  shortnum (creal (r), re, sizeof re);
  shortnum (fabs (cimag (r)), im, sizeof im);
  if (cimag (r) == 0.0)
    lw_text_printf (t, "%s", re);
  else
    lw_text_printf (t, "%s %c %sj", re, cimag (r) < 0 ? '-' : '+', im);
}

static void
put_margins (LwText *t, const LwMargins *m, bool stable)
{
  char a[40], b[40];
  if (m->has_phase_margin)
    {
      shortnum (m->phase_margin_deg, a, sizeof a);
      shortnum (m->gain_crossover_rad_s, b, sizeof b);
      lw_text_printf (t, " *     phase margin         %s deg at %s rad/s\n", a, b);
    }
  else
    lw_text_printf (t, " *     phase margin         none (no gain crossover)\n");
  if (m->has_gain_margin)
    {
      shortnum (m->gain_margin_db, a, sizeof a);
      shortnum (m->phase_crossover_rad_s, b, sizeof b);
      lw_text_printf (t, " *     gain margin          %s dB at %s rad/s\n", a, b);
    }
  else
    lw_text_printf (t, " *     gain margin          none (no phase crossover)\n");
  if (m->has_delay_margin)
    {
      shortnum (m->delay_margin_s, a, sizeof a);
      shortnum (m->delay_margin_samples, b, sizeof b);
      lw_text_printf (t, " *     delay margin         %s s = %s samples\n", a, b);
    }
  if (m->has_sensitivity)
    {
      shortnum (m->sensitivity_peak, a, sizeof a);
      lw_text_printf (t, " *     sensitivity peak     %s (ratio)\n", a);
    }
  lw_text_printf (t, " *     closed loop          %s\n",
                  stable ? "stable" : "NOT STABLE: a closed-loop pole on or outside |z| = 1");
}

LwStatus
lw_emit_prefix_check (const char *prefix, LwError *err)
{
  if (prefix == NULL || prefix[0] == '\0')
    return lw_error_set (err, LW_ERR_INVALID, 0, "the prefix is empty");
  size_t n = strlen (prefix);
  if (n > 40)
    return lw_error_set (err, LW_ERR_INVALID, 40, "the prefix is longer than 40 characters");
  for (size_t i = 0; i < n; i++)
    {
      unsigned char c = (unsigned char) prefix[i];
      bool ok = c == '_' || (c < 128 && isalpha (c)) || (i > 0 && c < 128 && isdigit (c));
      if (!ok)
        return lw_error_set (err, LW_ERR_INVALID, (int) i,
                             "the prefix must be a C identifier (letters, digits and '_', "
                             "not starting with a digit): bad character '%c'", (char) c);
    }
  return LW_OK;
}

static LwStatus
check_input (const LwEmitInput *in, LwError *err)
{
  if (in == NULL || in->controller_z == NULL)
    return lw_error_set (err, LW_ERR_INVALID, -1, "emit: no controller");
  if (!(in->period_s > 0.0) || in->compute_delay < 0)
    return lw_error_set (err, LW_ERR_INVALID, -1, "emit: bad period or computation delay");
  if (in->form == LW_FORM_DIFFERENCE)
    {
      if (in->diffeq == NULL)
        return lw_error_set (err, LW_ERR_INVALID, -1, "emit: no difference equation");
      if (in->fixed != NULL)
        return lw_error_set (err, LW_ERR_INVALID, -1,
                             "emit: fixed point is available for the sections form only");
    }
  else if (in->form == LW_FORM_SECTIONS)
    {
      if (in->sos == NULL || in->sos->n == 0)
        return lw_error_set (err, LW_ERR_INVALID, -1, "emit: no sections");
      if (in->fixed != NULL && in->fixed->n != in->sos->n)
        return lw_error_set (err, LW_ERR_INVALID, -1, "emit: fixed sections do not match");
    }
  else
    return lw_error_set (err, LW_ERR_INVALID, -1, "emit: unknown form");
  return lw_emit_prefix_check (in->prefix ? in->prefix : LW_EMIT_DEFAULT_PREFIX, err);
}

LwStatus
lw_emit_selftest_vectors (const LwEmitInput *in, double *y, int16_t *yq, LwError *err)
{
  LwStatus st = check_input (in, err);
  if (st != LW_OK)
    return st;
  double x[LW_EMIT_SELFTEST_LEN] = { 1.0 };
  if (in->form == LW_FORM_DIFFERENCE)
    lw_diffeq_filter (in->diffeq, x, y, LW_EMIT_SELFTEST_LEN);
  else
    lw_sos_filter (in->sos, x, y, LW_EMIT_SELFTEST_LEN);
  if (in->fixed != NULL && yq != NULL)
    {
      int16_t xq[LW_EMIT_SELFTEST_LEN] = { LW_EMIT_FIXED_IMPULSE };
      lw_sos_fixed_filter (in->fixed, xq, yq, LW_EMIT_SELFTEST_LEN);
    }
  for (size_t k = 0; k < LW_EMIT_SELFTEST_LEN; k++)
    if (!isfinite (y[k]))
      return lw_error_set (err, LW_ERR_NUMERIC, -1,
                           "emit: the impulse response overflows at sample %zu", k);
  return LW_OK;
}

/* ---- the comment block ----------------------------------------------------------------- */

static void
put_design_comment (LwText *t, const LwEmitInput *in, const char *file, const char *pfx)
{
  char a[40], b[40];
  lw_text_printf (t, "/* %s - a digital controller generated by Loopwright %s.\n *\n",
                  file, PACKAGE_VERSION);
  shortnum (in->period_s, a, sizeof a);
  shortnum (1.0 / in->period_s, b, sizeof b);
  lw_text_printf (t, " * Design\n *   sample period T        %s s (%s Hz)\n", a, b);
  lw_text_printf (t, " *   computation delay N    %d sample(s)\n", in->compute_delay);
  if (in->plant_s != NULL)
    {
      shortnum (in->dead_time_s, a, sizeof a);
      put_model (t, "plant P(s)", in->plant_s);
      lw_text_printf (t, " *   plant dead time        %s s\n", a);
    }
  if (in->controller_w != NULL)
    put_model (t, "controller C(w)", in->controller_w);
  put_model (t, "controller C(z)", in->controller_z);
  if (in->margins != NULL)
    {
      lw_text_printf (t, " *   loop L(z) = z^-%d C(z) P(z), the design as computed:\n",
                      in->compute_delay);
      put_margins (t, in->margins, in->stable);
    }
  if (in->fixed != NULL && in->margins_fixed != NULL)
    {
      lw_text_printf (t, " *   the same loop with the quantized coefficients (Q%d.%d):\n",
                      in->fixed->q.int_bits, in->fixed->q.frac_bits);
      put_margins (t, in->margins_fixed, in->stable_fixed);
    }
  lw_text_printf (t, " *\n * Form\n");
  if (in->form == LW_FORM_DIFFERENCE)
    lw_text_printf (t, " *   difference equation in double, order %zu:\n"
                       " *   u[k] = sum_{i=0..n} b[i] e[k-i] - sum_{i=1..n} a[i] u[k-i], a[0] = 1\n",
                    in->diffeq->order);
  else if (in->fixed == NULL)
    lw_text_printf (t, " *   %zu cascaded section(s) in double, direct form II transposed:\n"
                       " *   H(z) = (b0 + b1 z^-1 + b2 z^-2) / (1 + a1 z^-1 + a2 z^-2)\n",
                    in->sos->n);
  else
    {
      int fb = in->fixed->q.frac_bits;
      lw_text_printf (t,
        " *   %zu cascaded section(s) in fixed point, direct form II transposed.\n"
        " *   Coefficients: int16_t in Q%d.%d (%d bits, %d fraction bits: value = integer / 2^%d).\n"
        " *   e and u are int16_t counts; the states are int32_t. Per section, x its input:\n"
        " *     acc = sat32(b0*x + s1);  y = sat16(round(acc / 2^%d))  (round half up)\n"
        " *     s1  = sat32(sat32(b1*x - a1*y) + s2);  s2 = sat32(b2*x - a2*y)\n"
        " *   Products are int16 x int16 -> int32 (exact); sat32/sat16 clamp to the range.\n",
        in->fixed->n, in->fixed->q.int_bits, fb, in->fixed->q.int_bits + fb, fb, fb, fb);
    }
  lw_text_printf (t,
    " *\n * Timing\n"
    " *   Call %sstep() once per sample period T with e[k] = r[k] - y[k]. The computation\n"
    " *   delay of %d sample(s) is NOT in the coefficients: the design assumes the value\n"
    " *   returned at sample k reaches the actuator %d tick(s) later (at sample k + %d), as\n"
    " *   the firmware's timing does when it writes the output at the next tick(s).\n",
    pfx, in->compute_delay, in->compute_delay, in->compute_delay);
  if (in->compute_delay == 0)
    lw_text_printf (t, " *   N = 0: the output must be applied at once, within the same sample.\n");
  lw_text_printf (t,
    " *   %sself_test() returns 0 when the code reproduces the design's impulse response.\n"
    " *\n * Caution\n"
    " *   Simulation is not validation. Commission with safe limits. Follow the applicable\n"
    " *   functional-safety standards and have the design and this code reviewed by qualified\n"
    " *   people. Local codes and regulations prevail.\n */\n", pfx);
}

/* ---- emitter --------------------------------------------------------------------------- */

static void
put_int16 (LwText *t, int32_t v)
{
  if (v == INT16_MIN)
    lw_text_printf (t, "(-32767 - 1)");
  else
    lw_text_printf (t, "%ld", (long) v);
}

LwStatus
lw_emit_c (const LwEmitInput *in, LwText *header, LwText *source, LwError *err)
{
  LwStatus st = check_input (in, err);
  if (st != LW_OK)
    return st;
  const char *pfx = in->prefix ? in->prefix : LW_EMIT_DEFAULT_PREFIX;
  char up[48];
  size_t pl = strlen (pfx);
  for (size_t i = 0; i <= pl; i++)
    up[i] = (char) toupper ((unsigned char) pfx[i]);

  double h[LW_EMIT_SELFTEST_LEN];
  int16_t hq[LW_EMIT_SELFTEST_LEN];
  st = lw_emit_selftest_vectors (in, h, hq, err);
  if (st != LW_OK)
    return st;
  double peak = 0.0;
  for (size_t k = 0; k < LW_EMIT_SELFTEST_LEN; k++)
    peak = fmax (peak, fabs (h[k]));
  double tol = SELFTEST_REL_TOL * fmax (peak, 1e-300);

  bool fixed = in->fixed != NULL;
  bool diff = in->form == LW_FORM_DIFFERENCE;
  size_t order = diff ? in->diffeq->order : 0;
  size_t nsec = diff ? 0 : in->sos->n;
  const char *sig = fixed ? "int16_t" : "double";
  char hname[64], cname[64];
  snprintf (hname, sizeof hname, "%scontroller.h", pfx);
  snprintf (cname, sizeof cname, "%scontroller.c", pfx);
  char nb[48];

  /* header */
  LwText *t = header;
  put_design_comment (t, in, hname, pfx);
  lw_text_printf (t, "#ifndef %sCONTROLLER_H\n#define %sCONTROLLER_H\n\n#include <stdint.h>\n\n",
                  up, up);
  num (in->period_s, nb, sizeof nb);
  lw_text_printf (t, "#define %sPERIOD_S %s\n", up, nb);
  lw_text_printf (t, "#define %sCOMPUTE_DELAY %d\n", up, in->compute_delay);
  lw_text_printf (t, "#define %sSELFTEST_LEN %d\n", up, LW_EMIT_SELFTEST_LEN);
  if (diff)
    lw_text_printf (t, "#define %sORDER %zu\n\n", up, order);
  else
    lw_text_printf (t, "#define %sSECTIONS %zu\n", up, nsec);
  if (fixed)
    lw_text_printf (t, "#define %sFRAC_BITS %d\n#define %sSELFTEST_IMPULSE %d\n", up,
                    in->fixed->q.frac_bits, up, LW_EMIT_FIXED_IMPULSE);
  if (!diff)
    lw_text_printf (t, "\n");

  lw_text_printf (t, "/* Controller state; initialize with %sinit() before the first step. */\n"
                     "typedef struct {\n", pfx);
  if (diff && order == 0)
    lw_text_printf (t, "  int unused;   /* a pure gain has no state */\n");
  else if (diff)
    lw_text_printf (t, "  double e[%sORDER];   /* e[i] = e[k-1-i] */\n"
                       "  double u[%sORDER];   /* u[i] = u[k-1-i] */\n", up, up);
  else
    lw_text_printf (t, "  %s s1[%sSECTIONS];\n  %s s2[%sSECTIONS];\n",
                    fixed ? "int32_t" : "double", up, fixed ? "int32_t" : "double", up);
  lw_text_printf (t, "} %sstate;\n\n", pfx);
  lw_text_printf (t, "/* Resets the state to rest (all past inputs and outputs 0). */\n"
                     "void %sinit (%sstate *st);\n\n", pfx, pfx);
  if (fixed)
    lw_text_printf (t, "/* One sample: e[k] in counts -> u[k] in counts (saturated to int16_t). */\n");
  else
    lw_text_printf (t, "/* One sample: e[k] -> u[k]. */\n");
  lw_text_printf (t, "%s %sstep (%sstate *st, %s e);\n\n", sig, pfx, pfx, sig);
  lw_text_printf (t, "/* Runs the impulse response on a state of its own (yours is untouched) and\n"
                     " * compares it with the stored one; 0 on success, else 1 + the first\n"
                     " * sample that differs. */\nint %sself_test (void);\n\n", pfx);
  lw_text_printf (t, "/* Impulse response of the floating-point design (e = 1 at k = 0, then 0). */\n"
                     "extern const double %simpulse_response[%sSELFTEST_LEN];\n", pfx, up);
  if (fixed)
    lw_text_printf (t, "/* Response of the fixed-point code to e = %sSELFTEST_IMPULSE counts at\n"
                       " * k = 0, then 0 (exact: integer arithmetic). */\n"
                       "extern const int16_t %simpulse_response_fixed[%sSELFTEST_LEN];\n", up,
                    pfx, up);
  lw_text_printf (t, "\n#endif /* %sCONTROLLER_H */\n", up);

  /* source */
  t = source;
  put_design_comment (t, in, cname, pfx);
  lw_text_printf (t, "#include \"%s\"\n\n", hname);
  if (diff)
    {
      lw_text_printf (t, "/* b[i] multiplies e[k-i]; a[i] multiplies u[k-i] (a[0] = 1). */\n");
      lw_text_printf (t, "static const double %sb[%sORDER + 1] = {\n", pfx, up);
      for (size_t i = 0; i <= order; i++)
        {
          num (in->diffeq->b[i], nb, sizeof nb);
          lw_text_printf (t, "  %s%s\n", nb, i < order ? "," : "");
        }
      lw_text_printf (t, "};\n");
      if (order > 0)   /* a pure gain has no a[] (it would be unused) */
        {
          lw_text_printf (t, "static const double %sa[%sORDER + 1] = {\n", pfx, up);
          for (size_t i = 0; i <= order; i++)
            {
              num (in->diffeq->a[i], nb, sizeof nb);
              lw_text_printf (t, "  %s%s\n", nb, i < order ? "," : "");
            }
          lw_text_printf (t, "};\n");
        }
      lw_text_printf (t, "\n");
    }
  else
    {
      lw_text_printf (t, "/* One row per section, in cascade order: b0, b1, b2, a1, a2 (a0 = 1)%s. */\n",
                      fixed ? ", integers in Qm.n" : "");
      lw_text_printf (t, "static const %s %ssos[%sSECTIONS][5] = {\n",
                      fixed ? "int16_t" : "double", pfx, up);
      for (size_t k = 0; k < nsec; k++)
        {
          const LwSection *s = &in->sos->s[k];
          lw_text_printf (t, "  /* section %zu, order %d; poles ", k + 1, s->order);
          for (size_t i = 0; i < s->n_poles; i++)
            {
              if (i)
                lw_text_printf (t, ", ");
              put_complex (t, s->poles[i]);
            }
          if (s->n_poles == 0)
            lw_text_printf (t, "none");
          lw_text_printf (t, "; zeros ");
          for (size_t i = 0; i < s->n_zeros; i++)
            {
              if (i)
                lw_text_printf (t, ", ");
              put_complex (t, s->zeros[i]);
            }
          if (s->n_zeros == 0)
            lw_text_printf (t, "none");
          lw_text_printf (t, " */\n  { ");
          for (int i = 0; i < 5; i++)
            {
              if (i)
                lw_text_printf (t, ", ");
              if (fixed)
                put_int16 (t, i < 3 ? in->fixed->s[k].b[i] : in->fixed->s[k].a[i - 2]);
              else
                {
                  num (i < 3 ? s->b[i] : s->a[i - 2], nb, sizeof nb);
                  lw_text_printf (t, "%s", nb);
                }
            }
          lw_text_printf (t, " }%s\n", k + 1 < nsec ? "," : "");
        }
      lw_text_printf (t, "};\n\n");
    }

  lw_text_printf (t, "const double %simpulse_response[%sSELFTEST_LEN] = {\n", pfx, up);
  for (size_t k = 0; k < LW_EMIT_SELFTEST_LEN; k++)
    {
      num (h[k], nb, sizeof nb);
      lw_text_printf (t, "  %s%s\n", nb, k + 1 < LW_EMIT_SELFTEST_LEN ? "," : "");
    }
  lw_text_printf (t, "};\n\n");
  if (fixed)
    {
      lw_text_printf (t, "const int16_t %simpulse_response_fixed[%sSELFTEST_LEN] = {\n", pfx, up);
      for (size_t k = 0; k < LW_EMIT_SELFTEST_LEN; k++)
        {
          lw_text_printf (t, "  ");
          put_int16 (t, hq[k]);
          lw_text_printf (t, "%s\n", k + 1 < LW_EMIT_SELFTEST_LEN ? "," : "");
        }
      lw_text_printf (t, "};\n\n");
    }

  /* init */
  lw_text_printf (t, "void\n%sinit (%sstate *st)\n{\n", pfx, pfx);
  if (diff && order == 0)
    lw_text_printf (t, "  st->unused = 0;\n");
  else if (diff)
    lw_text_printf (t, "  int i;\n  for (i = 0; i < %sORDER; i++)\n    {\n"
                       "      st->e[i] = 0.0;\n      st->u[i] = 0.0;\n    }\n", up);
  else
    lw_text_printf (t, "  int k;\n  for (k = 0; k < %sSECTIONS; k++)\n    {\n"
                       "      st->s1[k] = 0;\n      st->s2[k] = 0;\n    }\n", up);
  lw_text_printf (t, "}\n\n");

  /* step */
  if (fixed)
    {
      int fb = in->fixed->q.frac_bits;
      lw_text_printf (t,
        "/* a + b clamped to the int32_t range (no wider type needed). */\n"
        "static int32_t\n%ssat_add32 (int32_t a, int32_t b)\n{\n"
        "  if (b > 0 && a > INT32_MAX - b)\n    return INT32_MAX;\n"
        "  if (b < 0 && a < INT32_MIN - b)\n    return INT32_MIN;\n  return a + b;\n}\n\n",
        pfx);
      lw_text_printf (t, "/* v / 2^%sFRAC_BITS rounded to nearest, ties toward +infinity; never\n"
                         " * shifts a negative number (implementation-defined in C). */\n"
                         "static int32_t\n%sround_shift (int32_t v)\n{\n", up, pfx);
      if (fb == 0)
        lw_text_printf (t, "  return v;\n}\n\n");
      else
        lw_text_printf (t,
          "  int32_t q = v >= 0 ? (v >> %sFRAC_BITS) : -1 - ((-(v + 1)) >> %sFRAC_BITS);\n"
          "  uint32_t r = (uint32_t) v & ((UINT32_C (1) << %sFRAC_BITS) - 1u);\n"
          "  return q + (r >= (UINT32_C (1) << (%sFRAC_BITS - 1)) ? 1 : 0);\n}\n\n",
          up, up, up, up);
      lw_text_printf (t,
        "static int16_t\n%ssat16 (int32_t v)\n{\n"
        "  return v > INT16_MAX ? INT16_MAX : v < INT16_MIN ? INT16_MIN : (int16_t) v;\n}\n\n",
        pfx);
      lw_text_printf (t,
        "int16_t\n%sstep (%sstate *st, int16_t e)\n{\n  int16_t x = e;\n  int k;\n"
        "  for (k = 0; k < %sSECTIONS; k++)\n    {\n"
        "      const int16_t *c = %ssos[k];\n"
        "      int32_t acc = %ssat_add32 ((int32_t) c[0] * (int32_t) x, st->s1[k]);\n"
        "      int16_t y = %ssat16 (%sround_shift (acc));\n"
        "      st->s1[k] = %ssat_add32 (%ssat_add32 ((int32_t) c[1] * (int32_t) x,\n"
        "                                  -((int32_t) c[3] * (int32_t) y)), st->s2[k]);\n"
        "      st->s2[k] = %ssat_add32 ((int32_t) c[2] * (int32_t) x, -((int32_t) c[4] * (int32_t) y));\n"
        "      x = y;\n    }\n  return x;\n}\n\n",
        pfx, pfx, up, pfx, pfx, pfx, pfx, pfx, pfx, pfx);
    }
  else if (diff)
    {
      lw_text_printf (t, "double\n%sstep (%sstate *st, double e)\n{\n", pfx, pfx);
      if (order == 0)
        lw_text_printf (t, "  (void) st;\n  return %sb[0] * e;\n}\n\n", pfx);
      else
        lw_text_printf (t,
          "  double u = %sb[0] * e;\n  int i;\n"
          "  for (i = 1; i <= %sORDER; i++)\n"
          "    u += %sb[i] * st->e[i - 1] - %sa[i] * st->u[i - 1];\n"
          "  for (i = %sORDER - 1; i > 0; i--)\n    {\n"
          "      st->e[i] = st->e[i - 1];\n      st->u[i] = st->u[i - 1];\n    }\n"
          "  st->e[0] = e;\n  st->u[0] = u;\n  return u;\n}\n\n",
          pfx, up, pfx, pfx, up);
    }
  else
    lw_text_printf (t,
      "double\n%sstep (%sstate *st, double e)\n{\n  double x = e;\n  int k;\n"
      "  for (k = 0; k < %sSECTIONS; k++)\n    {\n"
      "      const double *c = %ssos[k];\n"
      "      double y = c[0] * x + st->s1[k];\n"
      "      st->s1[k] = c[1] * x - c[3] * y + st->s2[k];\n"
      "      st->s2[k] = c[2] * x - c[4] * y;\n"
      "      x = y;\n    }\n  return x;\n}\n\n",
      pfx, pfx, up, pfx);

  /* self-test */
  if (fixed)
    lw_text_printf (t,
      "int\n%sself_test (void)\n{\n  %sstate st;\n  int k;\n  %sinit (&st);\n"
      "  for (k = 0; k < %sSELFTEST_LEN; k++)\n    {\n"
      "      int16_t y = %sstep (&st, (int16_t) (k == 0 ? %sSELFTEST_IMPULSE : 0));\n"
      "      if (y != %simpulse_response_fixed[k])\n        return k + 1;\n    }\n"
      "  return 0;\n}\n", pfx, pfx, pfx, up, pfx, up, pfx);
  else
    {
      num (tol, nb, sizeof nb);
      lw_text_printf (t,
        "int\n%sself_test (void)\n{\n"
        "  /* tolerance: %g x the peak of the impulse response (room for another compiler's\n"
        "   * rounding; a wrong coefficient is far larger) */\n"
        "  const double tol = %s;\n  %sstate st;\n  int k;\n  %sinit (&st);\n"
        "  for (k = 0; k < %sSELFTEST_LEN; k++)\n    {\n"
        "      double d = %sstep (&st, k == 0 ? 1.0 : 0.0) - %simpulse_response[k];\n"
        "      if (d < 0.0)\n        d = -d;\n"
        "      if (!(d <= tol))\n        return k + 1;\n    }\n"
        "  return 0;\n}\n", pfx, SELFTEST_REL_TOL, nb, pfx, pfx, up, pfx, pfx);
    }

  if (header->failed || source->failed)
    return lw_error_set (err, LW_ERR_NOMEM, -1, "emit: out of memory");
  return LW_OK;
}
