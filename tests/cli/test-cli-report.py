#!/usr/bin/python3
"""Tests of `loopwright-cli report`, spawned as a user runs it.

Usage: test-cli-report.py PATH-TO-loopwright-cli SOURCE-ROOT

What is checked, and against what:
1. The HTML parses (html.parser, Python's own) and holds every section of docs/report.md (by
   its id) and, per variant, its tables (stages, difference, sections, requirements, margins,
   performance); exactly four inline <svg> figures, and every id in the page is unique (the
   figures' ids are prefixed per figure).
2. Its numbers equal the CLI's, read from the other commands' JSON: phase margin, gain margin,
   crossovers, delay margin and max|S| from `analyze FILE --variant NAME --json` (the report
   prints 6 significant digits: relative 5e-6, half a unit in the sixth digit); the
   difference-equation and section coefficients from `emit FILE --variant NAME --json`
   (printed with 17 digits, so they read back to the same double: exact); the requirement
   results from analyze's `requirements`. The comparison table marks the larger phase margin
   as the better one.
3. Reproducible: the same document twice gives the same HTML bytes and the same PDF bytes;
   another --date changes the PDF (the date is the only thing that varies), and
   SOURCE_DATE_EPOCH stands in for --date.
4. The PDF renders: pdftoppm (poppler, outside the project) turns every page into a PNG, and
   pdftotext finds the section headings, the caution and the margins. Without poppler the PDF
   part is skipped (exit 77) after the HTML part passed.
5. Bad input is refused with exit 2 and a message naming the option.
"""

import html.parser
import json
import os
import shutil
import subprocess
import sys
import tempfile

CLI, ROOT = sys.argv[1], sys.argv[2]
EX = os.path.join(ROOT, "data", "examples")
TMP = tempfile.mkdtemp(prefix="lw-report-test-")
failures = []
SECTIONS = ["design", "plant", "figures", "comparison", "caution"]
VARIANT_TABLES = ["stages", "difference", "sections", "requirements", "margins", "performance"]


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def run(args, env=None):
    p = subprocess.run([CLI] + args, capture_output=True, text=True, timeout=120, env=env)
    return p.returncode, p.stdout, p.stderr


def rel_close(text, ref, rel):
    try:
        v = float(text)
    except ValueError:
        return False
    return abs(v - ref) <= rel * abs(ref)


class Page(html.parser.HTMLParser):
    """Sections, tables (data-table, data-variant, rows of cell texts and best flags), SVGs."""

    def __init__(self):
        super().__init__()
        self.sections, self.tables, self.ids = [], [], []
        self.svgs = 0
        self.cell = None
        self.text = []

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if "id" in a:
            self.ids.append(a["id"])
        if tag == "section":
            self.sections.append(a.get("id"))
        elif tag == "svg":
            self.svgs += 1
        elif tag == "table":
            self.tables.append({"name": a.get("data-table"), "variant": a.get("data-variant"),
                                "rows": []})
        elif tag == "tr" and self.tables:
            self.tables[-1]["rows"].append([])
        elif tag in ("td", "th"):
            self.cell = {"text": "", "best": a.get("class") == "best", "head": tag == "th"}
        elif tag == "br" and self.cell is not None:
            self.cell["text"] += "\n"

    def handle_endtag(self, tag):
        if tag in ("td", "th") and self.cell is not None:
            self.tables[-1]["rows"][-1].append(self.cell)
            self.cell = None

    def handle_data(self, data):
        if self.cell is not None:
            self.cell["text"] += data
        self.text.append(data)


def table(page, name, variant=None):
    for t in page.tables:
        if t["name"] == name and t["variant"] == variant:
            return t
    return None


def body(t):
    return [r for r in t["rows"] if r and not r[0]["head"]]


def report(doc, out, extra=(), env=None):
    rc, _, err = run(["report", doc, "--out", out] + list(extra), env=env)
    check(rc == 0, f"report {os.path.basename(doc)} -> {os.path.basename(out)} exits 0 "
                   f"(got {rc}: {err.strip()})")
    return rc == 0


# ---- 1 and 2: the HTML of the camera slider, both variants --------------------------------

slider = os.path.join(EX, "camera-slider.lwd")
h1, h2 = os.path.join(TMP, "a.html"), os.path.join(TMP, "b.html")
page = Page()
if report(slider, h1, ["--date", "2024-05-17"]):
    page.feed(open(h1, encoding="utf-8").read())
    for s in SECTIONS:
        check(s in page.sections, f"HTML has the section {s!r} ({page.sections})")
    check(page.svgs == 4, f"four inline SVG figures (got {page.svgs})")
    dup = {i for i in page.ids if page.ids.count(i) > 1}
    check(not dup, f"every id in the page is unique (repeated: {sorted(dup)[:5]})")
    text = "".join(page.text)
    check("2024-05-17" in text, "the date is printed")
    check("Simulation is not validation" in text and "local codes prevail" in text,
          "the caution text is there")

    rc, out, _ = run(["analyze", slider, "--all-variants", "--json"])
    variants = json.loads(out)["variants"]
    for k, v in enumerate(variants):
        name = v["name"]
        check(f"variant-{k + 1}" in page.sections, f"a section for variant {name!r}")
        for t in VARIANT_TABLES:
            check(table(page, t, name) is not None, f"variant {name!r}: table {t!r}")
        m = table(page, "margins", name)
        if m:
            rows = {r[0]["text"]: r for r in body(m)}
            lp = v["loop"]
            # 6 significant digits printed: relative 5e-6
            for label, key, col in [("phase margin (deg)", "phase_margin_deg", 1),
                                    ("phase margin (deg)", "gain_crossover_rad_s", 2),
                                    ("gain margin (dB)", "gain_margin_db", 1),
                                    ("gain margin (dB)", "phase_crossover_rad_s", 2),
                                    ("delay margin (s)", "delay_margin_s", 1),
                                    ("sensitivity peak max|S| (ratio)", "sensitivity_peak", 1)]:
                got = rows.get(label, [{}] * 3)[col].get("text", "")
                check(rel_close(got, lp[key], 5e-6),
                      f"{name!r} margins: {label} column {col} = {got!r}, analyze {lp[key]}")
        q = table(page, "requirements", name)
        if q:
            got = [r[3]["text"] == "pass" for r in body(q)]
            ref = [r["pass"] for r in v["requirements"]]
            check(got == ref, f"{name!r}: requirement results {got} equal analyze's {ref}")
        rc, out, err = run(["emit", slider, "--variant", name, "--form", "sections",
                            "--out", TMP, "--json"])
        check(rc == 0, f"emit {name!r} exits 0 ({err.strip()})")
        em = json.loads(out) if rc == 0 else None
        d = table(page, "difference", name)
        if d and em:
            b = [float(r[1]["text"]) for r in body(d)]
            a = [float(r[2]["text"]) for r in body(d)]
            # 17 digits: exactly the double of emit's JSON
            check(b == em["difference"]["b"], f"{name!r}: b[i] equal emit's ({b})")
            check(a == em["difference"]["a"], f"{name!r}: a[i] equal emit's ({a})")
        sct = table(page, "sections", name)
        if sct and em:
            rows = body(sct)
            check(len(rows) == len(em["sections"]), f"{name!r}: one row per section")
            for r, s in zip(rows, em["sections"]):
                bs = [float(x) for x in r[1]["text"].split("\n")]
                as_ = [float(x) for x in r[2]["text"].split("\n")]
                check(bs == s["b"], f"{name!r}: section b {bs} equal emit's {s['b']}")
                check([1.0] + as_ == s["a"], f"{name!r}: section a {as_} equal emit's {s['a']}")
    c = table(page, "comparison")
    if c and len(variants) == 2:
        pm_row = [r for r in body(c) if r[0]["text"] == "phase margin (deg)"][0]
        pms = [v["loop"]["phase_margin_deg"] for v in variants]
        best = pms.index(max(pms))
        check(pm_row[1 + best]["best"] and not pm_row[2 - best]["best"],
              f"comparison: the larger phase margin is marked ({pms})")
        check("(" in pm_row[2]["text"], "comparison: the second column gives the difference")

# --variants: one variant, the other left out
h3 = os.path.join(TMP, "one.html")
if report(slider, h3, ["--variants", "no notch"]):
    p3 = Page()
    p3.feed(open(h3, encoding="utf-8").read())
    check(table(p3, "margins", "no notch") is not None and table(p3, "margins", "notched") is None,
          "--variants 'no notch': only that variant")
    check("not stated" in "".join(p3.text), "without --date the date is 'not stated'")

# ---- 3. reproducible ----------------------------------------------------------------------

if report(slider, h2, ["--date", "2024-05-17"]):
    check(open(h1, "rb").read() == open(h2, "rb").read(), "same document: same HTML bytes")
p1, p2, p3_ = (os.path.join(TMP, n) for n in ("a.pdf", "b.pdf", "c.pdf"))
ok = report(slider, p1, ["--date", "2024-05-17"]) and report(slider, p2, ["--date", "2024-05-17"])
if ok:
    check(open(p1, "rb").read() == open(p2, "rb").read(), "same document: same PDF bytes")
env = dict(os.environ, SOURCE_DATE_EPOCH="1715904000")   # 2024-05-17T00:00:00Z
if report(slider, p3_, env=env):
    check(open(p1, "rb").read() == open(p3_, "rb").read(),
          "SOURCE_DATE_EPOCH of the same day gives the same PDF as --date")
p4 = os.path.join(TMP, "d.pdf")
if report(slider, p4, ["--date", "2024-05-18"]):
    check(open(p1, "rb").read() != open(p4, "rb").read(), "another --date: another PDF")

# ---- 5. bad input -------------------------------------------------------------------------

BAD = [
    (["report", slider, "--out", os.path.join(TMP, "x.txt")], ["--out", ".html or .pdf"]),
    (["report", slider], ["--out"]),
    (["report", slider, "--out", h1, "--date", "2024-02-30"], ["--date", "2024-02-30"]),
    (["report", slider, "--out", h1, "--date", "17.5.2024"], ["--date"]),
    (["report", slider, "--out", h1, "--variants", "nope"], ["--variants", "'nope'", "'notched'"]),
    (["report", slider, "--out", h1, "--variants", "notched,notched"], ["--variants", "twice"]),
    (["report", slider, "--out", h1, "--variants", "notched,"], ["--variants", "empty"]),
    (["report", "--out", h1], ["design document"]),
]
for args, parts in BAD:
    rc, out, err = run(args)
    check(rc == 2, f"{' '.join(args[3:])}: exit 2 (got {rc})")
    for p in parts:
        check(p in err, f"{' '.join(args[3:])}: message names {p!r} ({err.strip()})")

# ---- 4. the PDF renders -------------------------------------------------------------------

if failures:
    print(f"{len(failures)} check(s) failed")
    sys.exit(1)
if not (shutil.which("pdftoppm") and shutil.which("pdftotext")):
    print("SKIP: the PDF part needs pdftoppm and pdftotext (poppler-utils)")
    sys.exit(77)
for doc in ("camera-slider.lwd", "kiln.lwd", "pump-pressure.lwd"):
    pdf = os.path.join(TMP, doc + ".pdf")
    if not report(os.path.join(EX, doc), pdf, ["--date", "2024-05-17"]):
        continue
    r = subprocess.run(["pdftoppm", "-r", "40", "-png", pdf, os.path.join(TMP, doc)],
                       capture_output=True, timeout=120)
    pngs = [f for f in os.listdir(TMP) if f.startswith(doc + "-") and f.endswith(".png")]
    check(r.returncode == 0 and len(pngs) >= 3, f"{doc}: pdftoppm renders the pages "
                                                f"({r.returncode}, {len(pngs)} pages)")
    t = subprocess.run(["pdftotext", pdf, "-"], capture_output=True, text=True, timeout=60).stdout
    for heading in ["Design", "Plant and sampling", "Figures", "Comparison of the variants",
                    "Caution", "Difference equation", "Second-order sections", "Margins"]:
        check(heading in t, f"{doc}: the PDF text holds {heading!r}")
    check("local codes prevail" in t.replace("\n", " "), f"{doc}: the PDF holds the caution")
    rc, out, _ = run(["analyze", os.path.join(EX, doc), "--json"])
    pm = json.loads(out)["loop"]["phase_margin_deg"]
    check(f"{pm:.6g}" in t, f"{doc}: the PDF shows the phase margin {pm:.6g}")

if failures:
    print(f"{len(failures)} check(s) failed")
    sys.exit(1)
print("all report checks passed")
