#!/usr/bin/python3
"""The variant palettes of src/plot/lw-plot-draw.c stay apart for colour-blind readers.

Usage: test-palette.py PATH-TO-lw-plot-draw.c

The palettes are read from the source (between "PALETTE_LIGHT:" / "PALETTE_DARK:" and ":END").
Each colour is simulated for deuteranopia, protanopia and tritanopia with the severity-1.0
matrices of Machado, Oliveira and Fernandes, "A Physiologically-based Model for Simulation of
Color Vision Deficiency", IEEE TVCG 15(6), 2009 (matrices quoted from memory; they act on
linear sRGB), then compared in CIELAB (ΔE*76, D65 white).

Checks:
- every pair of the six colours differs by ΔE76 >= 15 with normal vision and under each
  simulation (15: clearly different at a glance for 1.75 px lines — common practice, no
  source; 2.3 is one just-noticeable difference);
- contrast against the theme background (WCAG 2.1 relative luminance) >= 3:1, the minimum
  WCAG 2.1 SC 1.4.11 asks of graphical objects — for all dark-theme colours and the first four
  light-theme colours. Light colours 5 and 6 (orange, sky blue) are below it: every variant
  also has its own dash pattern, so they stay apart without colour (docs/plot.md).
"""

import itertools
import re
import sys

src = open(sys.argv[1], encoding="utf-8").read()
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def palette(name):
    m = re.search(r"PALETTE_" + name + r":(.*?):END", src, re.S)
    hexes = re.findall(r"HEX \(0x([0-9a-fA-F]{6})\)", m.group(1)) if m else []
    return [tuple(int(h[i:i + 2], 16) for i in (0, 2, 4)) for h in hexes]


def lin(c):
    c /= 255.0
    return c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4


def luminance(rgb):
    r, g, b = (lin(c) for c in rgb)
    return 0.2126 * r + 0.7152 * g + 0.0722 * b


def contrast(a, b):
    la, lb = sorted((luminance(a), luminance(b)), reverse=True)
    return (la + 0.05) / (lb + 0.05)


MACHADO = {
    "deuteranopia": [[0.367322, 0.860646, -0.227968], [0.280085, 0.672501, 0.047413],
                     [-0.011820, 0.042940, 0.968881]],
    "protanopia": [[0.152286, 1.052583, -0.204868], [0.114503, 0.786281, 0.099216],
                   [-0.003882, -0.048116, 1.051998]],
    "tritanopia": [[1.255528, -0.076749, -0.178779], [-0.078411, 0.930809, 0.147602],
                   [0.004733, 0.691367, 0.303900]],
}


def lab(linear):
    r, g, b = linear
    x = 0.4124 * r + 0.3576 * g + 0.1805 * b
    y = 0.2126 * r + 0.7152 * g + 0.0722 * b
    z = 0.0193 * r + 0.1192 * g + 0.9505 * b

    def f(t):
        return t ** (1 / 3) if t > (6 / 29) ** 3 else t / (3 * (6 / 29) ** 2) + 4 / 29
    fx, fy, fz = f(x / 0.95047), f(y / 1.0), f(z / 1.08883)
    return (116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz))


def simulate(rgb, m):
    l = [lin(c) for c in rgb]
    return [min(1.0, max(0.0, sum(m[i][j] * l[j] for j in range(3)))) for i in range(3)]


def delta_e(a, b):
    return sum((p - q) ** 2 for p, q in zip(a, b)) ** 0.5


BACKGROUND = {"LIGHT": (0xff, 0xff, 0xff), "DARK": (0x1e, 0x1f, 0x22)}   # lw-plot-draw.c themes
for name in ("LIGHT", "DARK"):
    pal = palette(name)
    check(len(pal) == 6, f"{name}: six colours read from lw-plot-draw.c (got {len(pal)})")
    for vision, m in [("normal", None)] + list(MACHADO.items()):
        labs = [lab([lin(c) for c in rgb]) if m is None else lab(simulate(rgb, m)) for rgb in pal]
        worst = min((delta_e(labs[i], labs[j]), i, j)
                    for i, j in itertools.combinations(range(len(labs)), 2))
        check(worst[0] >= 15.0,
              f"{name}, {vision}: colours {worst[1] + 1} and {worst[2] + 1} only ΔE76 {worst[0]:.1f} apart")
        print(f"{name:5s} {vision:12s} smallest ΔE76 {worst[0]:5.1f}")
    n_contrast = 4 if name == "LIGHT" else 6
    for i, rgb in enumerate(pal[:n_contrast]):
        c = contrast(rgb, BACKGROUND[name])
        check(c >= 3.0, f"{name}: colour {i + 1} contrast {c:.2f} < 3 against the background")

if failures:
    print(f"{len(failures)} failure(s)")
    sys.exit(1)
print("palettes pass")
