/* lw-plot-axis.c — axis mapping and tick choice (lw-plot-axis.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "lw-plot-axis.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

/* Relative slack when deciding whether a tick at an end of the range is inside: the ends are
 * often computed values (π/T, a decade from pow) one or two ulps off. */
#define END_SLACK 1e-9

bool
lw_plot_axis_init (LwPlotAxis *a, LwPlotScale scale, LwPlotTickStyle style, double lo,
                   double hi)
{
  if (!(isfinite (lo) && isfinite (hi) && lo < hi))
    return false;
  if (scale == LW_PLOT_SCALE_LOG && !(lo > 0.0))
    return false;
  a->scale = scale;
  a->style = style;
  a->lo = lo;
  a->hi = hi;
  return true;
}

double
lw_plot_axis_map (const LwPlotAxis *a, double v)
{
  if (a->scale == LW_PLOT_SCALE_LOG)
    {
      if (!(v > 0.0))
        return NAN;
      double l0 = log10 (a->lo), l1 = log10 (a->hi);
      return (log10 (v) - l0) / (l1 - l0);
    }
  return (v - a->lo) / (a->hi - a->lo);
}

double
lw_plot_axis_unmap (const LwPlotAxis *a, double u)
{
  if (a->scale == LW_PLOT_SCALE_LOG)
    {
      double l0 = log10 (a->lo), l1 = log10 (a->hi);
      return pow (10.0, l0 + u * (l1 - l0));
    }
  return a->lo + u * (a->hi - a->lo);
}

/* 10^d for a whole d, correctly rounded for |d| <= 22 (10^|d| is exact there). */
static double
decade (int d)
{
  return d >= 0 ? pow (10.0, d) : 1.0 / pow (10.0, -d);
}

/* m·10^d, the nearest double to the decimal value. */
static double
decade_multiple (int m, int d)
{
  return d >= 0 ? m * pow (10.0, d) : m / pow (10.0, -d);
}

static const double degree_steps[] = { 1, 2, 5, 10, 15, 30, 45, 90, 180, 360, 720, 1440 };

double
lw_plot_nice_step (LwPlotTickStyle style, double span, int target_majors)
{
  if (target_majors < 1)
    target_majors = 1;
  double raw = span / target_majors;
  if (!(raw > 0.0) || !isfinite (raw))
    return 1.0;
  if (style == LW_PLOT_TICKS_DEGREES)
    {
      for (size_t i = 0; i < sizeof degree_steps / sizeof degree_steps[0]; i++)
        if (degree_steps[i] >= raw * (1.0 - END_SLACK))
          return degree_steps[i];
      double s = 1440.0;
      while (s < raw)
        s *= 2.0;
      return s;
    }
  int e = (int) floor (log10 (raw));
  static const int mant[] = { 1, 2, 5, 10 };
  for (size_t i = 0; i < 4; i++)
    {
      double s = decade_multiple (mant[i], e);
      if (s >= raw * (1.0 - END_SLACK))
        return s;
    }
  return decade (e + 1);
}

void
lw_plot_nice_range (LwPlotScale scale, LwPlotTickStyle style, double lo, double hi,
                    int target_majors, double *out_lo, double *out_hi)
{
  if (scale == LW_PLOT_SCALE_LOG)
    {
      if (!(lo > 0.0))
        lo = hi > 0.0 ? hi / 10.0 : 1.0;
      if (!(hi >= lo))
        hi = lo;
      int d0 = (int) floor (log10 (lo) + END_SLACK);
      int d1 = (int) ceil (log10 (hi) - END_SLACK);
      if (d1 <= d0)
        d1 = d0 + 1;
      *out_lo = decade (d0);
      *out_hi = decade (d1);
      return;
    }
  if (!(hi > lo))
    {
      double c = lo, w = fabs (c) > 1.0 ? fabs (c) * 0.1 : 1.0;
      lo = c - w;
      hi = c + w;
    }
  double step = lw_plot_nice_step (style, hi - lo, target_majors);
  double l = floor (lo / step + END_SLACK) * step;
  double h = ceil (hi / step - END_SLACK) * step;
  if (h <= l)
    h = l + step;
  *out_lo = l;
  *out_hi = h;
}

static bool
inside (const LwPlotAxis *a, double v)
{
  double slack = END_SLACK * fmax (fabs (a->lo), fabs (a->hi));
  if (a->scale == LW_PLOT_SCALE_LOG)
    return v >= a->lo * (1.0 - END_SLACK) && v <= a->hi * (1.0 + END_SLACK);
  return v >= a->lo - slack && v <= a->hi + slack;
}

/* Appends U+207B / superscript digits of d to buf. */
static void
append_superscript (int d, char *buf, size_t size)
{
  static const char *const sup[10] = { "\u2070", "\u00b9", "\u00b2", "\u00b3", "\u2074",
                                       "\u2075", "\u2076", "\u2077", "\u2078", "\u2079" };
  char digits[16];
  snprintf (digits, sizeof digits, "%d", d < 0 ? -d : d);
  if (d < 0)
    strncat (buf, "\u207b", size - strlen (buf) - 1);
  for (const char *p = digits; *p; p++)
    strncat (buf, sup[*p - '0'], size - strlen (buf) - 1);
}

void
lw_plot_format_tick (double v, double step, bool log_scale, char *buf, size_t size)
{
  if (size == 0)
    return;
  buf[0] = '\0';
  char num[LW_PLOT_TICK_LABEL_MAX];
  bool negative = v < 0.0;
  double av = fabs (v);
  if (log_scale)
    {
      if (!(av > 0.0))
        {
          snprintf (buf, size, "0");
          return;
        }
      int d = (int) floor (log10 (av) * (1.0 + 1e-15) + 1e-12);
      double m = av / decade (d);
      int mi = (int) lround (m);
      if (av >= 1e-4 && av < 1e5)
        {
          if (fabs (m - mi) < 1e-6 && mi >= 1 && mi <= 9)
            snprintf (num, sizeof num, "%.*f", d < 0 ? -d : 0, av);
          else
            snprintf (num, sizeof num, "%.6g", av);
        }
      else
        {
          if (mi == 1)
            snprintf (num, sizeof num, "10");
          else
            snprintf (num, sizeof num, "%d\u00b710", mi);
          append_superscript (d, num, sizeof num);
        }
    }
  else
    {
      if (av < fabs (step) * 1e-6)
        {
          av = 0.0;
          negative = false;
        }
      if (av >= 1e5 || (av > 0.0 && av < 1e-4))
        {
          /* far from 1 (a diverging response, a tiny signal): m·10ⁿ, as on log axes, so a
           * label never runs into the next panel or out of the figure */
          int d = (int) floor (log10 (av) * (1.0 + 1e-15) + 1e-12);
          double m = av / decade (d);
          char mant[12];
          snprintf (mant, sizeof mant, "%.3g", m);
          if (strcmp (mant, "10") == 0)
            {
              snprintf (mant, sizeof mant, "1");
              d++;
            }
          if (strcmp (mant, "1") == 0)
            snprintf (num, sizeof num, "10");
          else
            snprintf (num, sizeof num, "%s\u00b710", mant);
          append_superscript (d, num, sizeof num);
        }
      else
        {
          int decimals = 0;
          if (step > 0.0 && step < 1.0)
            decimals = (int) ceil (-log10 (step) - 1e-9);
          if (decimals > 12)
            decimals = 12;
          snprintf (num, sizeof num, "%.*f", decimals, av);
        }
    }
  snprintf (buf, size, "%s%s", negative ? "\u2212" : "", num);
}

static size_t
log_ticks (const LwPlotAxis *a, int max_labels, LwPlotTick *out, size_t cap)
{
  int d0 = (int) floor (log10 (a->lo) + END_SLACK);
  int d1 = (int) floor (log10 (a->hi) + END_SLACK);
  size_t n = 0;
  int n_decades = 0;
  for (int d = d0; d <= d1; d++)
    if (inside (a, decade (d)))
      n_decades++;
  /* label every k-th decade, k from 1, 2, 5, 10 … so that at most max_labels carry text */
  int k = 1;
  static const int ks[] = { 1, 2, 5, 10, 20, 50, 100 };
  for (size_t i = 0; i < sizeof ks / sizeof ks[0]; i++)
    {
      k = ks[i];
      if ((n_decades + k - 1) / k <= max_labels)
        break;
    }
  for (int d = d0; d <= d1; d++)
    for (int m = 1; m <= 9; m++)
      {
        double v = decade_multiple (m, d);
        if (!inside (a, v) || n >= cap)
          continue;
        LwPlotTick *t = &out[n++];
        t->value = v;
        t->major = (m == 1);
        t->labelled = t->major && (((d % k) + k) % k == 0);
        t->label[0] = '\0';
      }
  if (n_decades < 2)
    {
      size_t n_lab = 0;
      for (size_t i = 0; i < n; i++)
        {
          double mm = out[i].value / decade ((int) floor (log10 (out[i].value) + END_SLACK));
          long mi = lround (mm);
          if (mi == 1 || mi == 2 || mi == 5)
            out[i].labelled = true;
          n_lab += out[i].labelled;
        }
      if (n_lab < 3)
        for (size_t i = 0; i < n; i++)
          out[i].labelled = true;
    }
  for (size_t i = 0; i < n; i++)
    if (out[i].labelled)
      lw_plot_format_tick (out[i].value, 0.0, true, out[i].label, sizeof out[i].label);
  return n;
}

/* Number of minor intervals per major step. */
static int
minor_divisions (LwPlotTickStyle style, double step)
{
  if (style == LW_PLOT_TICKS_DEGREES && step >= 15.0)
    {
      if (step == 15.0 || step == 30.0 || step == 45.0)
        return 3;
      if (step == 90.0)
        return 2;
      return 4;
    }
  double m = step / decade ((int) floor (log10 (step) + END_SLACK));
  return lround (m) == 2 ? 4 : 5;
}

static size_t
linear_ticks (const LwPlotAxis *a, int max_labels, LwPlotTick *out, size_t cap)
{
  double step = lw_plot_nice_step (a->style, a->hi - a->lo, max_labels);
  int div = minor_divisions (a->style, step);
  double minor = step / div;
  double start = ceil (a->lo / minor - END_SLACK);
  double stop = floor (a->hi / minor + END_SLACK);
  size_t n = 0;
  for (double i = start; i <= stop && n < cap; i += 1.0)
    {
      double v = i * minor;
      long j = lround (i);
      LwPlotTick *t = &out[n++];
      t->value = v;
      t->major = (j % div) == 0;
      t->labelled = t->major;
      t->label[0] = '\0';
      if (t->labelled)
        {
          /* the label is of the major multiple, computed from whole numbers */
          double mv = (double) (j / div) * step;
          t->value = mv;
          lw_plot_format_tick (mv, step, false, t->label, sizeof t->label);
        }
    }
  return n;
}

size_t
lw_plot_axis_ticks (const LwPlotAxis *a, int max_labels, LwPlotTick *out, size_t cap)
{
  if (max_labels < 2)
    max_labels = 2;
  if (a->scale == LW_PLOT_SCALE_LOG)
    return log_ticks (a, max_labels, out, cap);
  return linear_ticks (a, max_labels, out, cap);
}
