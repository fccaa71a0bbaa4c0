#!/usr/bin/python3
"""A gallery of stress figures, drawn to PDF by `loopwright-cli plot`, in which no text may
cover another and no label may leave its plot area.

Usage: test-label-gallery.py PATH-TO-loopwright-cli SOURCE-ROOT ARTEFACT_DIR

The stress cases: the kiln (3.75 samples of dead time: the phase runs to −1080° and crosses
−180° + k·360° again and again), four compared variants (tests/gui/four-variants.lwd), a
loop whose crossovers crowd below π/T, and a loop with 200 samples of dead time (hundreds of
phase crossings); each in the Bode views (and with the whole phase range, and the compressed
Nyquist scale) in z and w, Nyquist, Nichols (and for the variants
the step, sensitivity and pole-zero views), at the export size 800×600 and at a pane's size
420×300.

Two checks, one of them independent of the renderer:
1. poppler's pdftotext -bbox reads every word back from the PDF with its box; no two words
   may overlap. pdftotext's boxes span the font's whole ascent and descent (more than the
   ink, and more than a line's advance for this font), so each box is shrunk by 15 % of its
   height at the top and at the bottom before comparing (a tolerance of the method, not of
   the figure).
2. The renderer's own extents (LW_DEBUG_TEXT=1 prints each text it placed with its box and
   its plot area, in points): every text inside its plot area (0.5 pt for rounding), and no
   two texts of a plot area overlapping.
Exit 77 (skipped) when pdftotext is missing. The PDFs stay in ARTEFACT_DIR/gallery/.
"""
import itertools
import os
import re
import shutil
import subprocess
import sys

CLI, ROOT, ARTEFACTS = sys.argv[1], sys.argv[2], sys.argv[3]
OUT = os.path.join(ARTEFACTS, "gallery")
failures = []

KILN = os.path.join(ROOT, "data", "examples", "kiln.lwd")
FOUR = os.path.join(ROOT, "tests", "gui", "four-variants.lwd")
# invented loops: a double integrator with a lead pushed close to pi/T (crossovers crowd
# below it), and a first-order lag behind 2 s of dead time at T = 10 ms (200 samples)
NEAR = ["--plant", "1/s^2", "--period", "0.05", "--controller", "900*(w+8)/(w+120)"]
DEAD = ["--plant", "1/(s+1)", "--period", "0.01", "--dead-time", "2",
        "--controller", "0.8*(w+1)/w"]
LOOP_VIEWS = ["bode-z", "bode-w", "nyquist", "nichols"]
CASES = ([("kiln", [KILN], v) for v in LOOP_VIEWS]
         + [("four", [FOUR, "--all-variants"], v)
            for v in LOOP_VIEWS + ["step", "sensitivity", "poles"]]
         + [("near", NEAR, v) for v in LOOP_VIEWS]
         + [("dead", DEAD, v) for v in LOOP_VIEWS]
         # the display options: the whole phase range, the compressed Nyquist scale
         + [("kiln-whole", [KILN, "--phase-range", "whole"], "bode-z"),
            ("dead-whole", DEAD + ["--phase-range", "whole"], "bode-w"),
            ("kiln-turn", [KILN, "--phase-range", "turn"], "bode-z"),
            ("four-turn", [FOUR, "--all-variants", "--phase-range", "turn"], "bode-w"),
            ("four-compressed", [FOUR, "--all-variants", "--nyquist-scale", "compressed"],
             "nyquist"),
            ("near-compressed", NEAR + ["--nyquist-scale", "compressed"], "nyquist")])
SIZES = ["800x600", "420x300", "330x240"]
SHRINK = 0.15
EDGE = 0.5


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def overlap(a, b):
    return a[0] < b[2] and b[0] < a[2] and a[1] < b[3] and b[1] < a[3]


def pdf_words(path):
    p = subprocess.run(["pdftotext", "-bbox", path, "-"], capture_output=True, text=True,
                       timeout=60)
    words = []
    for m in re.finditer(r'<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" '
                         r'yMax="([\d.]+)">([^<]*)</word>', p.stdout):
        x0, y0, x1, y1 = (float(m.group(i)) for i in range(1, 5))
        h = y1 - y0
        words.append(((x0, y0 + SHRINK * h, x1, y1 - SHRINK * h), m.group(5)))
    return words


def main():
    if shutil.which("pdftotext") is None:
        print("pdftotext missing: skipped")
        sys.exit(77)
    os.makedirs(OUT, exist_ok=True)
    n_words = n_texts = 0
    for (name, args, view), size in itertools.product(CASES, SIZES):
        pdf = os.path.join(OUT, f"{name}-{view}-{size}.pdf")
        p = subprocess.run([CLI, "plot"] + args + ["--view", view, "--size", size, "--out", pdf],
                           capture_output=True, text=True, timeout=120,
                           env=dict(os.environ, LW_DEBUG_TEXT="1", LC_ALL="C.UTF-8"))
        check(p.returncode == 0, f"{name} {view} {size}: plot exits 0 ({p.stderr[-300:]})")
        if p.returncode != 0:
            continue
        where = f"{name} {view} {size}"
        # 1. the words read back from the PDF
        words = pdf_words(pdf)
        n_words += len(words)
        check(len(words) > 0, f"{where}: pdftotext reads words")
        for (a, ta), (b, tb) in itertools.combinations(words, 2):
            check(not overlap(a, b), f"{where}: '{ta}' and '{tb}' overlap ({a}, {b})")
        # 2. the renderer's own boxes
        texts = []
        for line in p.stderr.splitlines():
            m = re.match(r"LW-TEXT panel=(\d+) box=([-\d.,]+) area=([-\d.,]+) text=(.*)", line)
            if m:
                box = [float(v) for v in m.group(2).split(",")]
                area = [float(v) for v in m.group(3).split(",")]
                texts.append((int(m.group(1)), box, area, m.group(4)))
        n_texts += len(texts)
        for k, box, area, text in texts:
            inside = (box[0] >= area[0] - EDGE and box[1] >= area[1] - EDGE
                      and box[2] <= area[2] + EDGE and box[3] <= area[3] + EDGE)
            check(inside, f"{where}: '{text}' {box} leaves its plot area {area}")
        for (k1, b1, _, t1), (k2, b2, _, t2) in itertools.combinations(texts, 2):
            check(k1 != k2 or not overlap(b1, b2), f"{where}: '{t1}' and '{t2}' overlap")
    print(f"{len(CASES) * len(SIZES)} figures, {n_words} words, {n_texts} placed texts")
    if failures:
        print(f"{len(failures)} failed")
        sys.exit(1)
    print("1 passed, 0 failed")


main()
