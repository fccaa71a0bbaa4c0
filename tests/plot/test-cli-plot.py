#!/usr/bin/python3
"""Tests of `loopwright-cli plot`, spawned as a user runs it, for every view and format.

Usage: test-cli-plot.py PATH-TO-loopwright-cli

What is checked, and against what:
1. SVG parses as XML (xml.etree) and holds the expected curves: every curve of a variant (and
   its legend sample) is stroked with the width LW_PLOT_CURVE_WIDTH = 1.75 that nothing else
   uses (src/plot/lw-plot.h), in the variant's colour, so counting <path> elements with that
   width and colour counts curves. Text: cairo writes text as glyph outlines (<symbol
   id="glyphN-M"> used by <use xlink:href>), never <text>; so the SVG check is structural —
   a title k characters longer adds exactly k glyph <use> elements (one per character drawn,
   spaces included).
2. The label text itself is read back from the PDF with poppler's pdftotext (an extractor
   outside the project): tick labels, axis titles with units, the Nyquist label, and the
   margin labels, whose numbers must equal `analyze --json` rounded as the label rounds (1
   decimal), so the annotation sits on the analysis result.
3. PNG pixel probes (decoded here with zlib): the Nyquist line is at the right edge of the plot
   area given by the documented layout rule (lw-plot.h: x from 78 to width − 24), in the
   Nyquist line colour; the decade grid lines sit where the log mapping puts them for the
   period: with x_R the right edge (π/T) and x₁₀, x₁₀₀ the last two decades,
   (x_R − x₁₀₀)/(x₁₀₀ − x₁₀) = log10(π/T) − 2 (tolerance 1.5 px over the decade: anti-aliased
   lines are located to about half a pixel at each end).
4. PDF opens: pdftoppm renders it (exit 77 = skipped when pdftoppm or pdftotext is missing).
5. Reproducible output (same bytes twice for SVG and PDF), themes, and bad input messages.
"""

import json
import math
import os
import re
import shutil
import struct
import subprocess
import sys
import tempfile
import xml.etree.ElementTree as ET
import zlib

CLI = sys.argv[1]
failures = []
TMP = tempfile.mkdtemp(prefix="lw-plot-test-")

# An invented servo: 40/(s(s+8)), T = 20 ms, a lead in w.
LOOP = ["--plant", "40/(s*(s+8))", "--period", "0.02", "--controller", "5*(w+4)/(w+25)"]
T = 0.02
VIEWS = ["bode-z", "bode-w", "nyquist", "nichols", "step", "poles"]
# Curves drawn at the curve width per variant (+1 legend sample): two panels for Bode, one
# curve for Nyquist (its mirror is thinner) and Nichols, the output and u(kT) under it for
# step (every response is shown unless a document's variant says otherwise); none for the
# pole map.
CURVES = {"bode-z": 3, "bode-w": 3, "nyquist": 2, "nichols": 2, "step": 3, "poles": 1}
BLUE = (0x00, 0x72, 0xb2)        # first colour of the light palette (lw-plot-draw.c)
NYQUIST_GREY = (0x3a, 0x3a, 0x3a)
LIGHT_BG = (0xff, 0xff, 0xff)
DARK_BG = (0x1e, 0x1f, 0x22)
GRID_MAJOR = (0xd2, 0xd2, 0xd2)


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def run(args):
    p = subprocess.run([CLI] + args, capture_output=True, text=True, timeout=60)
    return p.returncode, p.stdout, p.stderr


def plot(view, path, extra=()):
    code, _, err = run(["plot"] + LOOP + ["--view", view, "--out", path] + list(extra))
    check(code == 0, f"plot {view} {os.path.basename(path)} exits 0 (got {code}: {err.strip()})")
    return code == 0


# ---- PNG decoding (8-bit RGBA, as cairo writes it) ---------------------------------------

def read_png(path):
    data = open(path, "rb").read()
    assert data[:8] == b"\x89PNG\r\n\x1a\n", "not a PNG"
    pos, idat = 8, b""
    w = h = None
    while pos < len(data):
        (n,) = struct.unpack(">I", data[pos:pos + 4])
        kind = data[pos + 4:pos + 8]
        body = data[pos + 8:pos + 8 + n]
        if kind == b"IHDR":
            w, h, depth, ctype = struct.unpack(">IIBB", body[:10])
            assert depth == 8 and ctype in (2, 6), f"PNG depth {depth} type {ctype}"
            bpp = 4 if ctype == 6 else 3
        elif kind == b"IDAT":
            idat += body
        pos += 12 + n
    raw = zlib.decompress(idat)
    stride = w * bpp
    rows, prev = [], bytearray(stride)
    for y in range(h):
        f = raw[y * (stride + 1)]
        line = bytearray(raw[y * (stride + 1) + 1:(y + 1) * (stride + 1)])
        for i in range(stride):
            a = line[i - bpp] if i >= bpp else 0
            b = prev[i]
            c = prev[i - bpp] if i >= bpp else 0
            if f == 1:
                line[i] = (line[i] + a) & 255
            elif f == 2:
                line[i] = (line[i] + b) & 255
            elif f == 3:
                line[i] = (line[i] + (a + b) // 2) & 255
            elif f == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                pr = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
                line[i] = (line[i] + pr) & 255
        rows.append(bytes(line))
        prev = line
    return w, h, bpp, rows


def pixel(img, x, y):
    w, h, bpp, rows = img
    r = rows[y]
    return tuple(r[x * bpp:x * bpp + 3])


def close(c1, c2, tol=6):
    return all(abs(a - b) <= tol for a, b in zip(c1, c2))


# ---- the analysis the labels must agree with ---------------------------------------------

code, out, err = run(["analyze"] + LOOP + ["--json"])
check(code == 0, "analyze --json runs")
ana = json.loads(out)


def find_key(obj, key):
    """First value of `key` anywhere in the JSON tree."""
    if isinstance(obj, dict):
        if key in obj:
            return obj[key]
        for v in obj.values():
            r = find_key(v, key)
            if r is not None:
                return r
    elif isinstance(obj, list):
        for v in obj:
            r = find_key(v, key)
            if r is not None:
                return r
    return None


pm = find_key(ana, "phase_margin_deg")
gm = find_key(ana, "gain_margin_db")
check(isinstance(pm, (int, float)) and isinstance(gm, (int, float)),
      f"analyze --json reports phase_margin_deg and gain_margin_db (got {pm}, {gm})")

have_poppler = shutil.which("pdftoppm") and shutil.which("pdftotext")

# ---- every view, every format -------------------------------------------------------------

for view in VIEWS:
    svg = os.path.join(TMP, view + ".svg")
    png = os.path.join(TMP, view + ".png")
    pdf = os.path.join(TMP, view + ".pdf")
    if plot(view, svg):
        root = ET.parse(svg).getroot()
        check(root.tag.endswith("svg"), f"{view}: SVG root element is <svg>")
        n_curves = 0
        for p in root.iter("{http://www.w3.org/2000/svg}path"):
            style = p.get("style", "")
            m = re.search(r"stroke:rgb\(([\d.]+)%,([\d.]+)%,([\d.]+)%\)", style)
            if "stroke-width:1.75;" in style and m:
                rgb = tuple(float(v) * 255 / 100 for v in m.groups())
                if close(rgb, BLUE, 0.6):
                    n_curves += 1
        check(n_curves == CURVES[view],
              f"{view}: {CURVES[view]} curve paths at width 1.75 in the variant colour, got {n_curves}")
    if plot(view, png):
        img = read_png(png)
        check(img[0] == 800 and img[1] == 600, f"{view}: PNG is 800x600 (got {img[0]}x{img[1]})")
        check(close(pixel(img, 3, 3), LIGHT_BG), f"{view}: light background at (3, 3)")
    if plot(view, pdf) and have_poppler:
        p = subprocess.run(["pdftoppm", "-r", "30", "-png", pdf, os.path.join(TMP, view + "-pdf")],
                           capture_output=True, timeout=60)
        check(p.returncode == 0, f"{view}: pdftoppm renders the PDF ({p.stderr[:200]!r})")

# ---- labels, from the PDF text --------------------------------------------------------------

def pdf_text(path):
    p = subprocess.run(["pdftotext", path, "-"], capture_output=True, text=True, timeout=60)
    return p.stdout


if have_poppler:
    txt = pdf_text(os.path.join(TMP, "bode-z.pdf"))
    for label in ["\u03c9 (rad/s)", "|L| (dB)", "0.1", "10", "100", "\u221290",
                  "\u2212180", "Nyquist \u03c0/T = 157.1 rad/s", "loop"]:
        check(label in txt, f"bode-z PDF text holds {label!r}")
    check(f"PM {pm:.1f}\u00b0" in txt, f"bode-z PDF holds 'PM {pm:.1f}°' from analyze")
    check(f"GM {gm:.1f} dB" in txt, f"bode-z PDF holds 'GM {gm:.1f} dB' from analyze")
    txt = pdf_text(os.path.join(TMP, "bode-w.pdf"))
    check("\u03bd (rad/s), w-plane" in txt, "bode-w PDF has the ν axis title")
    check("Nyquist" not in txt, "bode-w has no Nyquist line")
    txt = pdf_text(os.path.join(TMP, "nyquist.pdf"))
    for label in ["Re L", "Im L", "\u22121", "|L| = 1", f"PM {pm:.1f}\u00b0"]:
        check(label in txt, f"nyquist PDF text holds {label!r}")
    txt = pdf_text(os.path.join(TMP, "nichols.pdf"))
    for label in ["\u2220L (\u00b0)", "|L| (dB)", "\u2212180", f"GM {gm:.1f} dB"]:
        check(label in txt, f"nichols PDF text holds {label!r}")
    txt = pdf_text(os.path.join(TMP, "step.pdf"))
    check("t (s)" in txt, "step PDF has the time axis title")
    txt = pdf_text(os.path.join(TMP, "poles.pdf"))
    for label in ["Re z", "Im z", "|z| = 1", "closed-loop pole", "loop zero"]:
        check(label in txt, f"poles PDF text holds {label!r}")
    # requirement marks
    pdf = os.path.join(TMP, "req.pdf")
    if plot("bode-z", pdf, ["--target-crossover", "6", "--min-phase-margin", "45"]):
        txt = pdf_text(pdf)
        check("target crossover 6 rad/s" in txt, "target crossover mark labelled")
        check("required PM \u2265 45\u00b0" in txt, "minimum phase margin mark labelled")

# ---- SVG: a title of k more characters adds k glyph uses -------------------------------

def glyph_uses(path):
    n = 0
    for u in ET.parse(path).getroot().iter("{http://www.w3.org/2000/svg}use"):
        if u.get("{http://www.w3.org/1999/xlink}href", "").startswith("#glyph"):
            n += 1
    return n


a, b = os.path.join(TMP, "t0.svg"), os.path.join(TMP, "t1.svg")
if plot("nichols", a, ["--title", "Kiln"]) and plot("nichols", b, ["--title", "Kilns!"]):
    # "Kilns!" has two characters more than "Kiln" (cairo also emits a <use> for a space, so
    # the titles have none)
    check(glyph_uses(b) - glyph_uses(a) == 2,
          f"two more title glyphs in the SVG (got {glyph_uses(b) - glyph_uses(a)})")

# ---- PNG probes: the Nyquist line and the decade grid for two periods ----------------------

def decade_columns(img, y, x0, x1):
    """Centres of the major vertical grid lines crossing row y: contiguous grey pixels darker
    than the background, weighted by darkness. An anti-aliased line of width 0.9 and grey
    0xd2 has a total darkness of about 0.9·45 = 40 over its pixels, a minor line (0.6, 0xec)
    about 11: groups above 28 are major lines."""
    cols, group = [], []

    def flush():
        tot = sum(d for _, d in group)
        if tot > 28:
            cols.append(sum(x * d for x, d in group) / tot + 0.5)   # pixel x covers [x, x+1)
        group.clear()

    for x in range(x0, x1):
        r, g, b = pixel(img, x, y)
        grey = abs(r - g) < 4 and abs(g - b) < 4
        d = 255 - r
        if grey and d > 3:
            group.append((x, d))
        elif group:
            flush()
    if group:
        flush()
    return cols


for period in (0.02, 0.05):
    png = os.path.join(TMP, f"nyq-{period}.png")
    args = ["plot", "--plant", "40/(s*(s+8))", "--period", str(period), "--view", "bode-z",
            "--out", png, "--size", "800x600"]
    code, _, err = run(args)
    check(code == 0, f"bode-z at T = {period} renders ({err.strip()})")
    if code != 0:
        continue
    img = read_png(png)
    # layout rule (lw-plot.h): one legend row (the variant "loop", no title):
    # top = 14 + 20 = 34, bottom = 600 − 48 = 552, two panels with an 18 gap → 250 each;
    # the plot area spans x 78 … 776. The Nyquist line, 2 wide, is centred on x = 776.
    right, top, h = 800 - 24, 34, (552 - 34 - 18) / 2
    ys = range(int(top + 5), int(top + h - 5), 3)
    hits = sum(close(pixel(img, right - 1, y), NYQUIST_GREY, 12) for y in ys)
    # dash-dot 9-3-2-3: 11 of every 17 units are ink; demand well over half the probes
    check(hits > 0.5 * len(ys), f"T = {period}: Nyquist line at x = {right} ({hits}/{len(ys)})")
    # a row in the magnitude panel near its bottom, where the curve does not pass
    yrow = int(top + h - 3)
    cols = [c for c in decade_columns(img, yrow, 79, right - 2)]
    check(len(cols) >= 2, f"T = {period}: at least two decade lines found ({cols})")
    if len(cols) >= 2:
        x10, x100 = cols[-2], cols[-1]
        want = math.log10(math.pi / period) - math.floor(math.log10(math.pi / period))
        got = (right - x100) / (x100 - x10)
        # 1.5 px tolerance over one decade
        check(abs(got - want) <= 1.5 / (x100 - x10),
              f"T = {period}: Nyquist end {got:.4f} decades past the last decade, want {want:.4f}")

# ---- reproducible bytes, dark theme ---------------------------------------------------------

for ext in ("svg", "pdf"):
    a, b = os.path.join(TMP, "r1." + ext), os.path.join(TMP, "r2." + ext)
    if plot("bode-w", a) and plot("bode-w", b):
        check(open(a, "rb").read() == open(b, "rb").read(), f"{ext}: the same figure twice is byte-identical")
pdf = os.path.join(TMP, "dated.pdf")
if plot("step", pdf, ["--pdf-date", "2024-05-06T07:08:09Z"]):
    check(b"20240506070809" in open(pdf, "rb").read(), "--pdf-date is written as the creation date")
png = os.path.join(TMP, "dark.png")
if plot("nyquist", png, ["--theme", "dark", "--size", "640x480"]):
    img = read_png(png)
    check(img[0] == 640 and img[1] == 480, "--size 640x480 honoured")
    check(close(pixel(img, 3, 3), DARK_BG), "dark theme background")

# ---- bad input ------------------------------------------------------------------------------

BAD = [
    (["--view", "bode"], 2, ["--view", "unknown view 'bode'"]),
    ([], 2, ["--view", "required"]),
    (["--view", "step", "--out", os.path.join(TMP, "x.gif")], 2, ["--out", ".png, .svg or .pdf"]),
    (["--view", "step"], 2, ["--out", "required"]),
    (["--view", "step", "--out", os.path.join(TMP, "x.png"), "--size", "10x10"], 2, ["--size"]),
    (["--view", "step", "--out", os.path.join(TMP, "x.png"), "--size", "800"], 2, ["--size", "WIDTHxHEIGHT"]),
    (["--view", "step", "--out", os.path.join(TMP, "x.png"), "--theme", "pink"], 2, ["--theme", "pink"]),
    (["--view", "bode-z", "--out", os.path.join(TMP, "x.png"), "--phase-range", "all"], 2,
     ["--phase-range", "'all'", "crossovers, whole or turn"]),
    (["--view", "nyquist", "--out", os.path.join(TMP, "x.png"), "--nyquist-scale", "log"], 2,
     ["--nyquist-scale", "'log'", "linear or compressed"]),
    (["--view", "step", "--out", os.path.join(TMP, "x.pdf"), "--pdf-date", "yesterday"], 2, ["--pdf-date"]),
    (["--view", "bode-z", "--out", os.path.join(TMP, "x.png"), "--min-phase-margin", "200"], 2, ["--min-phase-margin"]),
    (["--view", "bode-z", "--out", os.path.join(TMP, "x.png"), "--target-crossover", "-1"], 2, ["--target-crossover"]),
    (["--view", "bode-z", "--out", "/nonexistent-dir/x.png"], 1, ["/nonexistent-dir/x.png"]),
    # work bounded by what can be shown (docs/cli.md, Limits): a PNG of at most 25e6 pixels
    # (20000x20000 took 1.6 GB), 1e5 frequency points, 1e6 step samples
    (["--view", "bode-z", "--out", os.path.join(TMP, "x.png"), "--size", "20000x20000"], 2,
     ["--size", "limit of 25000000", ".svg or .pdf"]),
    (["--view", "bode-z", "--out", os.path.join(TMP, "x.png"), "--size", "5001x5000"], 2, ["--size"]),
    (["--view", "bode-z", "--out", os.path.join(TMP, "x.png"), "--size", "20001x16"], 2, ["--size (width)"]),
    (["--view", "bode-z", "--out", os.path.join(TMP, "x.png"), "--points", "1000000"], 2, ["--points", "100000"]),
    (["--view", "step", "--out", os.path.join(TMP, "x.png"), "--steps", "10000000"], 2, ["--steps", "1000000"]),
]
for extra, want_code, subs in BAD:
    code, _, err = run(["plot"] + LOOP + extra)
    check(code == want_code, f"plot {extra}: exit {want_code} (got {code})")
    for s in subs:
        check(s in err, f"plot {extra}: stderr mentions {s!r} (got {err.strip()!r})")
# the limit is on pixels: a vector figure may be large (a 20000 x 20000 pt SVG costs no more
# than a small one), and a PNG at the limit is drawn
for size, out_name in (("20000x20000", "big.svg"), ("5000x5000", "big.png")):
    code, _, err = run(["plot"] + LOOP + ["--view", "step", "--size", size,
                                          "--out", os.path.join(TMP, out_name)])
    check(code == 0 and os.path.getsize(os.path.join(TMP, out_name)) > 0,
          f"plot --size {size} {out_name}: exit {code} {err.strip()!r}")
code, out, _ = run(["plot", "--help"])
check(code == 0 and "--view VIEW" in out, "plot --help")

shutil.rmtree(TMP, ignore_errors=True)
if failures:
    print(f"{len(failures)} failure(s)")
    sys.exit(1)
if not have_poppler:
    print("pdftoppm/pdftotext missing: PDF checks skipped")
    sys.exit(77)
print("all plot checks passed")
