#!/usr/bin/python3
"""The commands over design documents with several variants: analyze --all-variants, plot FILE
(one variant or all overlaid), emit FILE and suggest FILE.

Usage: test-cli-variants.py PATH-TO-loopwright-cli SOURCE-ROOT

What is checked, and against what:
1. `analyze FILE --all-variants --json` is {"variants": [...]}, one entry per variant in the
   document's order, each equal (exactly: the same numbers printed with 17 digits) to
   `analyze FILE --variant NAME --json` plus its "name" key; the variant names are read from the
   document with xml.etree, outside the project's loader. The text form shows each variant.
2. `plot FILE --all-variants` overlays the variants: counting the curve paths per variant
   colour in the SVG as tests/plot/test-cli-plot.py does (curves and legend samples are the
   only strokes of width 1.75, src/plot/lw-plot.h), each variant's colour (the first two of
   the light palette, src/plot/lw-plot-draw.c) carries the same number of curves as a single-loop
   plot of that view; with --variant only the first colour appears. A report on the third
   and fourth of four variants draws them in the third and fourth colours (a variant's colour
   is that of its place in the document).
3. `emit FILE --variant NAME --json` gives the controller and margins of the same variant as
   `analyze FILE --variant NAME --json` (margins exactly equal: the same evaluation path), and
   its difference equation equals the expansion of its own controller_z by numpy.poly (a
   reference outside the project; relative 1e-12: expansion of at most a few roots in double).
4. `suggest FILE` equals `suggest --plant ... --period ...` with the document's values typed
   inline (read from the XML with xml.etree).
5. Bad input: the loop options, --name, and --variant with --all-variants are refused with a
   message naming the option; --variant without a document too.
"""

import json
import os
import re
import shutil
import subprocess
import sys
import tempfile
import xml.etree.ElementTree as ET

import numpy as np

CLI, ROOT = sys.argv[1], sys.argv[2]
EX = os.path.join(ROOT, "data", "examples", "camera-slider.lwd")
NS = "{urn:loopwright:design}"
TMP = tempfile.mkdtemp(prefix="lw-variants-test-")
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def run(args):
    p = subprocess.run([CLI] + args, capture_output=True, text=True, timeout=120)
    return p.returncode, p.stdout, p.stderr


doc = ET.parse(EX).getroot()
NAMES = [v.get("name") for v in doc.iter(NS + "variant")]
check(len(NAMES) == 2, f"the example has two variants (got {NAMES})")

# ---- 1. analyze --all-variants ------------------------------------------------------------

rc, out, err = run(["analyze", EX, "--all-variants", "--json"])
check(rc == 0, f"analyze --all-variants --json exits 0 (got {rc}: {err.strip()})")
allv = json.loads(out) if rc == 0 else {"variants": []}
check(list(allv.keys()) == ["variants"], f"the top level holds only 'variants' ({list(allv)})")
check([v.get("name") for v in allv["variants"]] == NAMES,
      f"one entry per variant in document order ({[v.get('name') for v in allv['variants']]})")
for entry in allv["variants"]:
    name = entry.get("name")
    rc, out, err = run(["analyze", EX, "--variant", name, "--json"])
    check(rc == 0, f"analyze --variant {name!r} exits 0")
    single = json.loads(out) if rc == 0 else {}
    rest = {k: v for k, v in entry.items() if k != "name"}
    check(rest == single, f"--all-variants entry {name!r} equals analyze --variant {name!r}")
    check(set(entry) == set(single) | {"name"}, f"entry {name!r}: the analyze keys plus name")

rc, out, err = run(["analyze", EX, "--all-variants"])
check(rc == 0, f"analyze --all-variants (text) exits 0 (got {rc})")
for name in NAMES:
    check(f"variant '{name}'" in out, f"the text report shows variant {name!r}")

# ---- 2. plot overlays ---------------------------------------------------------------------

# Curves per variant at width 1.75 (curves + one legend sample), as in test-cli-plot.py.
CURVES = {"bode-z": 3, "bode-w": 3, "nyquist": 2, "nichols": 2, "step": 3, "poles": 1}
# light palette, first four (PALETTE_LIGHT in src/plot/lw-plot-draw.c)
COLOURS = [(0x00, 0x72, 0xb2), (0xd5, 0x5e, 0x00), (0x00, 0x9e, 0x73), (0xcc, 0x79, 0xa7)]


def curve_counts(path, n_colours=2):
    return svg_curve_counts(ET.parse(path).getroot(), n_colours)


def svg_curve_counts(root, n_colours):
    counts = [0] * n_colours
    for p in root.iter("{http://www.w3.org/2000/svg}path"):
        style = p.get("style", "")
        m = re.search(r"stroke:rgb\(([\d.]+)%,([\d.]+)%,([\d.]+)%\)", style)
        if "stroke-width:1.75;" in style and m:
            rgb = [float(v) * 255 / 100 for v in m.groups()]
            for i, c in enumerate(COLOURS[:n_colours]):
                # 0.6 of 255: cairo prints the colour in percent with a few digits
                if all(abs(a - b) <= 0.6 for a, b in zip(rgb, c)):
                    counts[i] += 1
    return counts


for view, n in CURVES.items():
    svg = os.path.join(TMP, f"all-{view}.svg")
    rc, _, err = run(["plot", EX, "--all-variants", "--view", view, "--out", svg])
    check(rc == 0, f"plot --all-variants --view {view} exits 0 (got {rc}: {err.strip()})")
    if rc == 0:
        got = curve_counts(svg)
        check(got == [n, n], f"{view}: {n} curves in each variant's colour, got {got}")
    svg1 = os.path.join(TMP, f"one-{view}.svg")
    rc, _, err = run(["plot", EX, "--variant", NAMES[1], "--view", view, "--out", svg1])
    check(rc == 0, f"plot --variant --view {view} exits 0 (got {rc}: {err.strip()})")
    if rc == 0:
        got = curve_counts(svg1)
        check(got == [n, 0], f"{view}, one variant: {n} curves in the first colour only, got {got}")

# A variant keeps the colour of its place in the document whichever others are drawn with it:
# the report's figures of the third and fourth variants of four (tests/gui/four-variants.lwd)
# carry the third and fourth colours, not the first two.
FOUR = os.path.join(ROOT, "tests", "gui", "four-variants.lwd")
four_names = [v.get("name") for v in ET.parse(FOUR).getroot().iter(NS + "variant")]
html = os.path.join(TMP, "two-of-four.html")
rc, _, err = run(["report", FOUR, "--variants", ",".join(four_names[2:4]), "--out", html])
check(rc == 0, f"report --variants (two of four) exits 0 (got {rc}: {err.strip()})")
if rc == 0:
    with open(html, encoding="utf-8") as f:
        svg = re.search(r"<svg.*?</svg>", f.read(), re.S)
    check(svg is not None, "the report holds an inline SVG figure")
    if svg:
        got = svg_curve_counts(ET.fromstring(svg.group(0)), 4)
        want = [0, 0, CURVES["bode-z"], CURVES["bode-z"]]
        check(got == want, f"bode-z of variants 3 and 4: curves per colour {want}, got {got}")

# The document's own choices (docs/file-format.md): a variant marked compared is drawn beside
# the active one by `plot --compared` and `report --compared` (what the window shows), and a
# variant whose <responses> leave out the actuator has no u(kT) curve in the step view: the
# active variant shows the reference step only (2 strokes: output and legend), the compared
# one all (3). The plant's units (the example's: A in, m out) label the actuator axis and
# the disturbance axes, read back with pdftotext.
with open(EX, encoding="utf-8") as f:
    text = f.read()
chosen = (text.replace(f'<variant name="{NAMES[1]}">', f'<variant name="{NAMES[1]}" compared="true">')
          .replace("<gain label", '<responses shows="reference"/>\n      <gain label', 1))
check(chosen.count("compared=") == 1 and "<responses" in chosen and 'input_unit="A"' in chosen,
      "the example could be marked up")
CHOSEN = os.path.join(TMP, "chosen.lwd")
with open(CHOSEN, "w", encoding="utf-8") as f:
    f.write(chosen)
svg = os.path.join(TMP, "compared-step.svg")
rc, _, err = run(["plot", CHOSEN, "--compared", "--view", "step", "--out", svg])
check(rc == 0, f"plot --compared exits 0 (got {rc}: {err.strip()})")
if rc == 0:
    got = curve_counts(svg)
    check(got == [2, 3], f"step of the compared set: [2, 3] curves per colour, got {got}")
rc, _, err = run(["plot", EX, "--compared", "--view", "step", "--out", svg])
if rc == 0:
    got = curve_counts(svg)
    check(got == [3, 0], f"nothing marked compared: the active variant alone, got {got}")
rc, _, err = run(["plot", CHOSEN, "--compared", "--all-variants", "--view", "step", "--out", svg])
check(rc == 2 and "--compared" in err and "--all-variants" in err,
      f"--compared with --all-variants is refused naming both (got {rc}: {err.strip()})")
rc, _, err = run(["report", CHOSEN, "--compared", "--variants", NAMES[0], "--out", svg + ".html"])
check(rc == 2 and "--compared" in err, f"report --compared with --variants is refused ({rc})")
html = os.path.join(TMP, "compared.html")
rc, out, err = run(["report", CHOSEN, "--compared", "--out", html])
check(rc == 0 and "2 variant(s)" in out, f"report --compared reports the two shown ({rc}: {out}{err})")
if shutil.which("pdftotext"):
    pdf = os.path.join(TMP, "units.pdf")
    rc, _, err = run(["plot", CHOSEN, "--compared", "--view", "step", "--out", pdf])
    words = subprocess.run(["pdftotext", pdf, "-"], capture_output=True, text=True,
                           timeout=60).stdout if rc == 0 else ""
    check("u (A)" in words, f"the actuator axis is labelled with the input unit: {words!r:.300}")
    rc, _, err = run(["plot", CHOSEN, "--variant", NAMES[1], "--view", "disturbance", "--out", pdf])
    words = subprocess.run(["pdftotext", pdf, "-"], capture_output=True, text=True,
                           timeout=60).stdout if rc == 0 else ""
    check("y (m), input dist." in words, f"the disturbance axes carry the output unit: {words!r:.300}")

# Variants sampled at very different periods: the step's time axis is cut at 4 times the
# shorter horizon (the fast loop keeps a quarter of the width), and the cut variant says how
# far it runs (docs/plot.md).
if shutil.which("pdftotext"):
    slow = text.replace(f'<variant name="{NAMES[1]}">', f'<variant name="{NAMES[1]}" period_s="0.05">')
    SLOW = os.path.join(TMP, "slow.lwd")
    with open(SLOW, "w", encoding="utf-8") as f:
        f.write(slow)
    pdf = os.path.join(TMP, "rates.pdf")
    rc, _, err = run(["plot", SLOW, "--all-variants", "--view", "step", "--out", pdf])
    words = subprocess.run(["pdftotext", pdf, "-"], capture_output=True, text=True,
                           timeout=60).stdout if rc == 0 else ""
    check(f"{NAMES[1]}: runs to" in words,
          f"the slow variant's step is cut with a note saying how far it runs: {words!r:.300}")
    rc, _, err = run(["plot", EX, "--all-variants", "--view", "step", "--out", pdf])
    words = subprocess.run(["pdftotext", pdf, "-"], capture_output=True, text=True,
                           timeout=60).stdout if rc == 0 else ""
    check("runs to" not in words, "variants at one period: no cut, no note")

rc, _, err = run(["plot", CHOSEN, "--view", "disturbance", "--out", svg])
check(rc == 2 and "nothing to draw" in err,
      f"a variant that shows no disturbance has no disturbance figure, said so ({rc}: {err.strip()})")

# ---- 3. emit FILE -------------------------------------------------------------------------

for name in NAMES:
    rc, out, err = run(["emit", EX, "--variant", name, "--form", "sections", "--out", TMP,
                        "--json"])
    check(rc == 0, f"emit --variant {name!r} exits 0 (got {rc}: {err.strip()})")
    if rc != 0:
        continue
    em = json.loads(out)
    rc, out, _ = run(["analyze", EX, "--variant", name, "--json"])
    an = json.loads(out)
    check(em["design"]["loop"] == an["loop"], f"emit {name!r}: margins equal analyze's")
    cz = em["controller_z"]
    zeros = [complex(*r) for r in cz["zeros"]]
    poles = [complex(*r) for r in cz["poles"]]
    b_ref = cz["gain"] * np.real(np.poly(zeros)) if zeros else np.array([cz["gain"]])
    a_ref = np.real(np.poly(poles)) if poles else np.array([1.0])
    b_ref = np.concatenate([np.zeros(len(a_ref) - len(b_ref)), b_ref])
    b, a = np.array(em["difference"]["b"]), np.array(em["difference"]["a"])
    # relative 1e-12 of the largest coefficient: a few roots expanded in double
    check(len(b) == len(b_ref) and np.allclose(b, b_ref, rtol=0, atol=1e-12 * max(abs(b_ref))),
          f"emit {name!r}: b equals numpy.poly of the zeros ({b} vs {b_ref})")
    check(len(a) == len(a_ref) and np.allclose(a, a_ref, rtol=0, atol=1e-12 * max(abs(a_ref))),
          f"emit {name!r}: a equals numpy.poly of the poles ({a} vs {a_ref})")

# ---- 4. suggest FILE ----------------------------------------------------------------------

plant = doc.find(NS + "plant")
sampling = doc.find(NS + "sampling")
inline = ["--plant", plant.text, "--dead-time", plant.get("dead_time_s"),
          "--period", sampling.get("period_s"),
          "--compute-delay", sampling.get("compute_delay_samples")]
ask = ["--phase-margin", "50", "--crossover", "30", "--json"]
rc1, out1, err1 = run(["suggest", EX] + ask)
rc2, out2, err2 = run(["suggest"] + inline + ask)
check(rc1 == 0 and rc2 == 0, f"suggest FILE and inline exit 0 ({rc1}: {err1.strip()}; {rc2})")
check(rc1 == 0 and out1 == out2, "suggest FILE equals suggest with the document's loop inline")

# ---- 5. bad input -------------------------------------------------------------------------

BAD = [
    (["analyze", EX, "--variant", NAMES[0], "--all-variants", "--json"], ["--all-variants"]),
    (["analyze", "--plant", "1/s", "--period", "1", "--all-variants"], ["--all-variants", "design document"]),
    (["plot", EX, "--view", "bode-z", "--out", os.path.join(TMP, "x.svg"), "--period", "1"], ["--period"]),
    (["plot", EX, "--view", "bode-z", "--out", os.path.join(TMP, "x.svg"), "--name", "a"], ["--name"]),
    (["plot", EX, "--view", "bode-z", "--out", os.path.join(TMP, "x.svg"), "--variant", "none"], ["--variant", "'none'", "'notched'"]),
    (["plot", "--plant", "1/s", "--period", "1", "--view", "bode-z", "--out", os.path.join(TMP, "x.svg"), "--variant", "a"], ["--variant"]),
    (["emit", EX, "--form", "sections", "--out", TMP, "--controller", "1"], ["--controller"]),
    (["emit", "--plant", "1/s", "--period", "1", "--form", "sections", "--out", TMP, "--variant", "a"], ["--variant"]),
    (["suggest", EX, "--plant", "1/s", "--phase-margin", "50", "--crossover", "3"], ["--plant"]),
]
for args, parts in BAD:
    rc, out, err = run(args)
    check(rc == 2, f"{' '.join(args[:4])}…: exit 2 (got {rc})")
    check(out == "", f"{' '.join(args[:4])}…: nothing on stdout")
    for p in parts:
        check(p in err, f"{' '.join(args[:4])}…: message names {p!r} ({err.strip()})")

if failures:
    print(f"{len(failures)} check(s) failed")
    sys.exit(1)
print("all variant checks passed")
