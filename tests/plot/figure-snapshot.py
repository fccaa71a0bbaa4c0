#!/usr/bin/python3
"""figure-snapshot.py — every figure the CLI draws, for checking that a change of the renderer
draws the same figures byte for byte (apart from cairo's surface ids).

    tests/plot/figure-snapshot.py CLI OUT_DIR        write the figures into OUT_DIR
    tests/plot/figure-snapshot.py --compare A B      compare two such directories

The figures: every view (from `CLI plot --help`, so a new view is included without an edit
here) of every bundled example and tests/gui/four-variants.lwd (its active variant, and all
variants overlaid), a loop given inline with requirement marks and a title, in both themes,
as SVG, PNG and PDF (fixed PDF date); and the design report of each document as HTML and PDF.
SVG and PDF carry cairo's surface ids (a counter of the process, `surfaceN`), which are set
aside when comparing. Exit status 0 when every file matches, 1 otherwise.
"""
import os
import re
import subprocess
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
TOP = os.path.dirname(os.path.dirname(HERE))
DOCS = sorted(os.path.join(TOP, "data", "examples", f)
              for f in os.listdir(os.path.join(TOP, "data", "examples")) if f.endswith(".lwd"))
DOCS.append(os.path.join(TOP, "tests", "gui", "four-variants.lwd"))


def views(cli):
    """The view names listed under "Views:" in the plot command's help."""
    out = subprocess.run([cli, "plot", "--help"], capture_output=True, text=True).stdout
    names, inside = [], False
    for line in out.splitlines():
        if line.startswith("Views:"):
            inside = True
        elif inside and line.startswith("  ") and line.strip():
            names.append(line.split()[0])
        elif inside:
            break
    if not names:
        sys.exit("no views found in `plot --help`")
    return names


def run(cmd):
    r = subprocess.run(cmd, capture_output=True, text=True)
    if r.returncode != 0:
        print("failed:", " ".join(cmd), r.stderr.strip(), file=sys.stderr)
    return r.returncode == 0


def snapshot(cli, out):
    os.makedirs(out, exist_ok=True)
    env_ok = True
    for view in views(cli):
        for doc in DOCS:
            base = os.path.splitext(os.path.basename(doc))[0]
            for fmt in ("svg", "png", "pdf"):
                env_ok &= run([cli, "plot", doc, "--view", view,
                               "--out", os.path.join(out, f"{base}-{view}.{fmt}")])
            env_ok &= run([cli, "plot", doc, "--all-variants", "--view", view, "--theme", "dark",
                           "--out", os.path.join(out, f"{base}-all-{view}.svg")])
            env_ok &= run([cli, "plot", doc, "--all-variants", "--view", view,
                           "--out", os.path.join(out, f"{base}-all-{view}.png")])
        for theme in ("light", "dark"):
            for fmt in ("svg", "png"):
                env_ok &= run([cli, "plot", "--plant", "40/(s*(s+8))", "--period", "0.02",
                               "--controller", "(1 + w/4)/(1 + w/40)", "--view", view,
                               "--title", "Kiln loop", "--target-crossover", "6",
                               "--min-phase-margin", "45", "--theme", theme, "--size", "640x480",
                               "--out", os.path.join(out, f"inline-{theme}-{view}.{fmt}")])
    for doc in DOCS:
        base = os.path.splitext(os.path.basename(doc))[0]
        for fmt in ("html", "pdf"):
            env_ok &= run([cli, "report", doc, "--date", "2026-01-02",
                           "--out", os.path.join(out, f"{base}-report.{fmt}")])
    return env_ok


def without_surface_ids(path):
    with open(path, "rb") as f:
        return re.sub(rb"surface\d+", b"surface", f.read())


def compare(a, b):
    names_a, names_b = set(os.listdir(a)), set(os.listdir(b))
    bad = sorted(names_a ^ names_b)
    for n in bad:
        print("only in one:", n)
    same = 0
    for n in sorted(names_a & names_b):
        if without_surface_ids(os.path.join(a, n)) == without_surface_ids(os.path.join(b, n)):
            same += 1
        else:
            print("differs:", n)
            bad.append(n)
    print(f"{same} of {len(names_a | names_b)} files identical")
    return not bad


if __name__ == "__main__":
    if len(sys.argv) == 4 and sys.argv[1] == "--compare":
        sys.exit(0 if compare(sys.argv[2], sys.argv[3]) else 1)
    if len(sys.argv) != 3:
        sys.exit(__doc__)
    sys.exit(0 if snapshot(sys.argv[1], sys.argv[2]) else 1)
