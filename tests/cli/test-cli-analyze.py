#!/usr/bin/python3
"""Tests of `loopwright-cli analyze`, spawned as a user runs it.

Usage: test-cli-analyze.py PATH-TO-loopwright-cli

1. Bad input, table-driven: each row is an argument list, the expected exit status and
   substrings the stderr message must contain; for an expression error also the 1-based
   character the caret must point at (the caret line sits under the expression line).
   Expected positions come from the grammar in src/core/lw-expr.h, counted by hand.
2. A good run, --json, on P(s) = 1/(s(s+1)), T = 1 s, no computation delay, C = 1: the JSON
   must have exactly the documented keys, and its numbers are checked against scipy/numpy
   (Debian's), computed here independently of the project.
3. The same run as a text report, and --help / --version.
"""

import cmath
import json
import math
import subprocess
import sys

import numpy as np
from scipy import optimize, signal

CLI = sys.argv[1]
failures = []


def run(args):
    p = subprocess.run([CLI] + args, capture_output=True, text=True, timeout=60)
    return p.returncode, p.stdout, p.stderr


def near(got, ref, tol):
    """|got − ref| <= tol; a missing value (JSON null) never passes."""
    return isinstance(got, (int, float)) and abs(got - ref) <= tol


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


P = "1/(s*(s+1))"
BASE = ["analyze", "--plant", P, "--period", "1"]

# (arguments, exit status, substrings of stderr, caret character (1-based) or None)
BAD_INPUT = [
    # malformed --plant expressions; positions counted by hand from the grammar
    (["analyze", "--plant", "2s", "--period", "1"], 2, ["--plant:", "at character 2"], 2),
    (["analyze", "--plant", "(s+1)*x", "--period", "1"], 2, ["--plant:", "'x'", "at character 7"], 7),
    (["analyze", "--plant", "s+", "--period", "1"], 2, ["--plant:", "at character 3"], 3),
    (["analyze", "--plant", "1/(s+1", "--period", "1"], 2, ["--plant:", "')'", "at character 7"], 7),
    (["analyze", "--plant", "1/(s+1))", "--period", "1"], 2, ["--plant:", "at character 8"], 8),
    (["analyze", "--plant", "1/(s^x)", "--period", "1"], 2, ["--plant:", "at character 6"], 6),
    (["analyze", "--plant", "1e999/(s+1)", "--period", "1"], 2, ["--plant:", "at character 1"], 1),
    (["analyze", "--plant", "", "--period", "1"], 2, ["--plant:", "at character 1"], 1),
    # a non-ASCII character: positions count characters, not bytes ('·' is character 5)
    (["analyze", "--plant", "1/(s\u00b72+1)", "--period", "1"], 2, ["--plant:", "at character 5"], 5),
    # improper plant: reported at the start of the expression (lw-expr.h: position 0)
    (["analyze", "--plant", "s^2/(s+1)", "--period", "1"], 2, ["--plant:", "improper", "at character 1"], 1),
    # controllers are read in their own variable
    (BASE + ["--controller", "z+1"], 2, ["--controller:", "at character 1"], 1),
    (BASE + ["--controller-z", "(z+1)/w"], 2, ["--controller-z:", "at character 7"], 7),
    (BASE + ["--controller", "w^2/(w+1)"], 2, ["--controller:", "improper"], 1),
    # the sample period
    (["analyze", "--plant", P, "--period", "0"], 2, ["--period:", "greater than 0"], None),
    (["analyze", "--plant", P, "--period", "-1"], 2, ["--period:", "greater than 0"], None),
    (["analyze", "--plant", P, "--period", "abc"], 2, ["--period:", "'abc' is not a number"], None),
    (["analyze", "--plant", P, "--period", "1e999"], 2, ["--period:", "not a finite number"], None),
    (["analyze", "--plant", P, "--period", "nan"], 2, ["--period:", "not a finite number"], None),
    (["analyze", "--plant", P, "--period", "1,5"], 2, ["--period:", "not a number"], None),
    (["analyze", "--plant", P, "--period"], 2, ["--period"], None),
    # one number syntax with documents and expressions (src/core/lw-number.h): no hexadecimal,
    # no spaces around, no trailing '.'
    (["analyze", "--plant", P, "--period", "0x10"], 2, ["--period:", "hexadecimal"], None),
    (["analyze", "--plant", P, "--period", " 0.002"], 2, ["--period:", "spaces"], None),
    (["analyze", "--plant", P, "--period", "0.002 "], 2, ["--period:", "spaces"], None),
    (["analyze", "--plant", P, "--period", "5."], 2, ["--period:", "'5.' is not a number"], None),
    (["analyze", "--plant", P, "--period", "1e"], 2, ["--period:", "not a number"], None),
    (BASE + ["--compute-delay", "0x2"], 2, ["--compute-delay:", "not a whole number"], None),
    (BASE + ["--compute-delay", " 2"], 2, ["--compute-delay:", "not a whole number"], None),
    (BASE + ["--points", "1e3"], 2, ["--points:", "not a whole number: write it in digits"], None),
    # periods the numerics cannot represent (docs/cli.md: 1e-12 to 1e9 s)
    (["analyze", "--plant", P, "--period", "1e-300"], 2, ["--period:", "1e-12 to 1e+09 s"], None),
    (["analyze", "--plant", P, "--period", "4.9e-324"], 2, ["--period:", "outside"], None),
    (["analyze", "--plant", P, "--period", "1e300"], 2, ["--period:", "outside"], None),
    (["analyze", "--plant", P, "--period", "1e-13"], 2, ["--period:", "outside"], None),
    (["analyze", "--plant", P, "--period", "2e9"], 2, ["--period:", "outside"], None),
    # the dead time is blamed on --dead-time, not on --plant (limit 1e6 samples)
    (BASE + ["--dead-time", "1e300"], 2, ["--dead-time:", "more than the limit of 1000000"], None),
    (["analyze", "--plant", P, "--period", "0.002", "--dead-time", "2000.5"], 2,
     ["--dead-time:", "1.00025e+06 sample periods"], None),
    # text that is not UTF-8 or not ASCII names the option and the character
    (["analyze", "--plant", b"1/(s+\xff1)", "--period", "1"], 2,
     ["--plant:", "byte 0xff at character 6 is not valid UTF-8"], 6),
    (["analyze", "--plant", P, "--period", b"0.\xff1"], 2, ["--period:", "not a number"], None),
    (["analyze", "--plant", "1/(s\u22121)", "--period", "1"], 2,
     ["--plant:", "U+2212", "use '-' (U+002D)", "at character 5"], 5),
    (BASE + ["--controller", "2\u2013w"], 2, ["--controller:", "use '-' (U+002D)"], 2),
    (BASE + ["--saturation", b"0:\xff"], 2, ["--saturation:", "not valid UTF-8"], None),
    # integers and their ranges
    (BASE + ["--compute-delay", "-1"], 2, ["--compute-delay:", "from 0 to 1000"], None),
    (BASE + ["--compute-delay", "1001"], 2, ["--compute-delay:", "from 0 to 1000"], None),
    (BASE + ["--compute-delay", "1.5"], 2, ["--compute-delay:", "not a whole number"], None),
    (BASE + ["--points", "3"], 2, ["--points:", "from 16 to 100000"], None),
    (BASE + ["--points", "100001"], 2, ["--points:", "from 16 to 100000"], None),
    (BASE + ["--points", "1000000"], 2, ["--points:", "from 16 to 100000"], None),
    (BASE + ["--steps", "1"], 2, ["--steps:", "from 2 to 1000000"], None),
    (BASE + ["--steps", "10000000", "--substeps", "0"], 2, ["--steps:", "from 2 to 1000000"], None),
    (BASE + ["--steps", "99999999999999999999999"], 2, ["--steps:", "out of range"], None),
    (BASE + ["--dead-time", "-0.001"], 2, ["--dead-time:", "0 or more"], None),
    (BASE + ["--dead-time", "inf"], 2, ["--dead-time:", "not a finite number"], None),
    # actuator limits, anti-windup, sub-steps (docs/cli.md)
    (BASE + ["--saturation", "1"], 2, ["--saturation:", "LOW:HIGH"], None),
    (BASE + ["--saturation", "1:1"], 2, ["--saturation:", "LOW must be less than HIGH"], None),
    (BASE + ["--saturation", "2:-2"], 2, ["--saturation:", "LOW must be less than HIGH"], None),
    (BASE + ["--saturation", "x:1"], 2, ["--saturation (LOW):", "'x' is not a number"], None),
    (BASE + ["--saturation", "0:inf"], 2, ["--saturation (HIGH):", "not a finite number"], None),
    (BASE + ["--anti-windup"], 2, ["--anti-windup:", "needs --saturation"], None),
    (BASE + ["--substeps", "-1"], 2, ["--substeps:", "from 0 to 1000"], None),
    (BASE + ["--substeps", "1001"], 2, ["--substeps:", "from 0 to 1000"], None),
    (BASE + ["--steps", "1000000", "--substeps", "20"], 2,
     ["--substeps:", "19999980 continuous points", "limit of 2000000"], None),
    (BASE + ["--steps", "100001", "--substeps", "21"], 2, ["--substeps:", "limit of 2000000"], None),
    # --json writes every sample: at most 2e6 numbers (6 x N + 2 x ((N-1) x M + 1))
    (BASE + ["--steps", "1000000", "--substeps", "0", "--json"], 2,
     ["--steps:", "writes 6000000 numbers", "limit of 2000000"], None),
    (BASE + ["--steps", "333334", "--substeps", "0", "--json"], 2, ["--steps:", "2000004 numbers"], None),
    (BASE + ["--steps", "50001", "--substeps", "17", "--json"], 2,
     ["--substeps:", "2000008 numbers"], None),
    # an algebraic loop: direct feedthrough with no delay and 1 + C(∞)P(∞) = 0 (it crashed with
    # a double free once; issue 11)
    (["analyze", "--plant", "1", "--period", "0.002", "--compute-delay", "0", "--controller", "-1"],
     2, ["algebraic loop", "computation delay"], None),
    # combinations and unknowns
    (BASE + ["--controller", "1", "--controller-z", "1"], 2, ["--controller-z:", "--controller"], None),
    (BASE + ["--gain", "2"], 2, ["--gain"], None),
    (BASE + ["surplus"], 2, ["unexpected argument 'surplus'"], None),
    (["analyze", "--period", "1"], 2, ["--plant is required"], None),
    (["analyze", "--plant", P], 2, ["--period is required"], None),
    (["frobnicate"], 2, ["unknown command or option 'frobnicate'"], None),
    ([], 2, ["Usage:"], None),
]

for args, status, needles, caret in BAD_INPUT:
    rc, out, err = run(args)
    label = " ".join(repr(a) for a in args)
    check(rc == status, f"{label}: exit {rc}, expected {status}; stderr: {err!r}")
    check(out == "", f"{label}: nothing on stdout on bad input, got {out!r}")
    for n in needles:
        check(n in err, f"{label}: stderr {err!r} lacks {n!r}")
    if caret is not None:
        lines = err.rstrip("\n").split("\n")
        check(len(lines) == 3, f"{label}: expected message, expression and caret lines: {err!r}")
        if len(lines) == 3:
            check(lines[1].startswith("    "), f"{label}: expression line not indented")
            col = lines[2].find("^")
            # the caret line repeats the 4-space indent; characters before the caret = caret-1
            check(col - 4 == caret - 1, f"{label}: caret at column {col - 4 + 1}, expected {caret}")

# the text report lists at most 50 crossovers of each kind (docs/cli.md, Limits): L = z^-1
# has |L| = 1 at every frequency, and the grid used to list each point
rc, out, err = run(["analyze", "--plant", "1", "--period", "1", "--points", "100000"])
rows = [l for l in out.splitlines() if l.startswith("  ") and l.split()[0][0].isdigit()]
check(rc == 0 and len(out) < 20000, f"|L| = 1 loop: exit {rc}, {len(out)} bytes of report")
check(len(rows) <= 2 * 50 + 20, f"|L| = 1 loop: {len(rows)} rows listed")

# ---- a good run, --json ----------------------------------------------------------------------
T = 1.0
N_STEPS = 500
rc, out, err = run(["analyze", "--plant", P, "--period", "1", "--compute-delay", "0",
                    "--json", "--steps", str(N_STEPS)])
check(rc == 0, f"--json run: exit {rc}, stderr {err!r}")
doc = json.loads(out)   # raises (test fails) when the text is not valid JSON

TOP = {"sample_period_s", "plant_z", "plant_w", "loop", "closed_loop", "step", "disturbance",
       "indices", "plant_z_form_error", "plant_w_form_error"}
MODEL_KEYS = {"gain", "zeros", "poles"}
LOOP = {"gain_crossovers_rad_s", "phase_margins_deg", "phase_crossovers_rad_s",
        "gain_margins_db", "phase_margin_deg", "gain_crossover_rad_s", "gain_margin_db",
        "phase_crossover_rad_s", "delay_margin_s", "delay_margin_samples", "sensitivity_peak",
        "sensitivity_peak_rad_s", "unresolved_gain_crossovers", "unresolved_phase_crossovers",
        "unresolved_bands_rad_s"}
CLOSED = {"stable", "poles", "poles_complete", "order", "unstable_poles"}
STEP = {"final_value", "overshoot_pct", "rise_time_s", "settling_time_s", "samples",
        "actuator", "saturated_samples", "held_samples", "continuous", "intersample_ripple"}
CONTINUOUS = {"t_s", "y", "peak", "peak_time_s"}
DISTURBANCE = {"input_step", "output_step"}
DIST_RESPONSE = {"samples", "actuator", "peak", "peak_time_s", "last_value", "saturated_samples",
                 "held_samples", "intersample_ripple", "continuous_peak", "indices"}
INDICES = {"iae", "ise", "itae", "control_effort"}
check(set(doc) == TOP, f"top-level keys {sorted(doc)}")
# the factored plant checked against the plant (docs/conventions.md, "Factored forms"): the
# issue's 1/(s+1)^9 at T = 0.01 s has a plant_z off by a factor ~2 and must be marked, the
# camera slider's is the plant to rounding
check(doc["plant_z_form_error"] is not None and doc["plant_z_form_error"] < 1e-10,
      f"plant_z_form_error {doc['plant_z_form_error']}")
bad = json.loads(subprocess.run([CLI, "analyze", "--plant", "1/(s+1)^9", "--period", "0.01",
                                 "--json"], capture_output=True, text=True, check=True).stdout)
check(bad["plant_z_form_error"] is None or bad["plant_z_form_error"] > 1e-6,
      f"1/(s+1)^9: plant_z_form_error {bad['plant_z_form_error']} not marked")
text = subprocess.run([CLI, "analyze", "--plant", "1/(s+1)^9", "--period", "0.01"],
                      capture_output=True, text=True, check=True).stdout
check("ILL-CONDITIONED" in text or "NOT VERIFIED" in text, "the text report marks P(z)")
check(set(doc["plant_z"]) == MODEL_KEYS, f"plant_z keys {sorted(doc['plant_z'])}")
check(set(doc["plant_w"]) == MODEL_KEYS, f"plant_w keys {sorted(doc['plant_w'])}")
check(set(doc["loop"]) == LOOP, f"loop keys {sorted(doc['loop'])}")
check(set(doc["closed_loop"]) == CLOSED, f"closed_loop keys {sorted(doc['closed_loop'])}")
check(set(doc["step"]) == STEP, f"step keys {sorted(doc['step'])}")
check(set(doc["step"]["continuous"]) == CONTINUOUS,
      f"step.continuous keys {sorted(doc['step']['continuous'])}")
check(set(doc["disturbance"]) == DISTURBANCE, f"disturbance keys {sorted(doc['disturbance'])}")
for part in ("input_step", "output_step"):
    check(set(doc["disturbance"][part]) == DIST_RESPONSE,
          f"disturbance.{part} keys {sorted(doc['disturbance'][part])}")
    check(set(doc["disturbance"][part]["indices"]) == INDICES, f"disturbance.{part}.indices keys")
check(set(doc["indices"]) == INDICES, f"indices keys {sorted(doc['indices'])}")
check(doc["sample_period_s"] == T, "sample_period_s")

# Reference: scipy's ZOH discretization of 1/(s^2 + s) at T = 1 s.
numz, denz, _ = signal.cont2discrete(([1.0], [1.0, 1.0, 0.0]), T, method="zoh")
numz = np.trim_zeros(np.atleast_1d(np.squeeze(numz)), "f")
denz = np.atleast_1d(np.squeeze(denz))


def roots_of(pairs):
    return sorted((complex(re, im) for re, im in pairs), key=lambda c: (c.real, c.imag))


def sorted_roots(poly):
    return sorted(np.roots(poly), key=lambda c: (c.real, c.imag))


def close_roots(a, b, tol):
    return len(a) == len(b) and all(abs(x - y) <= tol for x, y in zip(a, b))


def model_eval(m, x):
    v = m["gain"]
    for re, im in m["zeros"]:
        v *= x - complex(re, im)
    for re, im in m["poles"]:
        v /= x - complex(re, im)
    return v


pz = doc["plant_z"]
# Roots of O(1) size from two double-precision routes (exact ZOH both ways; the core's zeros
# from a generalized eigenproblem, said to agree to ~1e-13 in DESIGN.md): tolerance 1e-9.
check(near(pz["gain"], numz[0] / denz[0], 1e-9), f"plant_z gain {pz['gain']} vs {numz[0] / denz[0]}")
check(close_roots(roots_of(pz["zeros"]), sorted_roots(numz), 1e-9), f"plant_z zeros {pz['zeros']}")
check(close_roots(roots_of(pz["poles"]), sorted_roots(denz), 1e-9), f"plant_z poles {pz['poles']}")


def G(z):
    return np.polyval(numz, z) / np.polyval(denz, z)


# plant_w is the same function under z = (1 + wT/2)/(1 − wT/2): compare at a few points,
# relative 1e-9 (same reasoning as the roots).
for w in (0.3j, 1.0 + 2.0j, -0.5 + 0.1j, 5.0j):
    z = (1 + w * T / 2) / (1 - w * T / 2)
    ref = G(z)
    got = model_eval(doc["plant_w"], w)
    check(abs(got - ref) <= 1e-9 * abs(ref), f"plant_w at w={w}: {got} vs {ref}")

# Closed loop with C = 1 and no computation delay: characteristic polynomial den + num.
charpoly = np.polyadd(denz, numz)
cl = doc["closed_loop"]
check(close_roots(roots_of(cl["poles"]), sorted_roots(charpoly), 1e-9), f"closed-loop poles {cl['poles']}")
check(cl["stable"] is True and all(abs(complex(*p)) < 1 for p in cl["poles"]), "stable")
check(cl["poles_complete"] is True and cl["order"] == 2 and cl["unstable_poles"] == 0,
      f"closed loop: every pole of order 2, none unstable: {cl}")

# A long dead time (issue 11: it grew like its cube, and 100 000 samples crashed): 10 000 samples
# of dead time, L = 2·z^-10001·P(z) with P the ZOH of 1/(s+1) at T = 0.002 s. |L(1)| = 2 and
# the delay turns the phase through -180° long before |P| falls to 1/2 (at ω = √3 rad/s the
# delay alone gives -20 rad), so the loop is unstable; only the dominant poles are listed,
# the largest outside the unit circle (|z| > 1, consistent with the count).
rc, out, err = run(["analyze", "--plant", "1/(s+1)", "--period", "0.002", "--dead-time", "20",
                    "--controller", "2", "--substeps", "0", "--steps", "20", "--json"])
check(rc == 0, f"--dead-time 20: exit {rc}, stderr {err!r}")
if rc == 0:
    cl = json.loads(out)["closed_loop"]
    check(cl["poles_complete"] is False and cl["order"] == 1 + 10000 + 1,
          f"--dead-time 20: order {cl['order']}, complete {cl['poles_complete']}")
    check(cl["stable"] is False and cl["unstable_poles"] >= 1, f"--dead-time 20: {cl['unstable_poles']}")
    check(0 < len(cl["poles"]) <= 32 and abs(complex(*cl["poles"][0])) > 1.0,
          f"--dead-time 20: dominant poles {cl['poles'][:2]}")
# 100 000 samples (a failed allocation once took the double-free path): a result, exit 0
rc, out, err = run(["analyze", "--plant", "1/(s+1)", "--period", "0.002", "--dead-time", "200",
                    "--controller", "0.3", "--substeps", "0", "--steps", "20"])
check(rc == 0 and "dominant (largest |z|) of 100002" in out,
      f"--dead-time 200: exit {rc}, stderr {err!r}")
check("stable: every pole strictly inside" in out, "--dead-time 200 with |L| <= 0.3: stable")

# Gain crossover and phase margin on the unit circle, refined by brentq (xtol 1e-14).
def logmag(w):
    return math.log(abs(G(cmath.exp(1j * w * T))))


wc = optimize.brentq(logmag, 1e-6, math.pi / T, xtol=1e-14)
pm = 180.0 + math.degrees(cmath.phase(G(cmath.exp(1j * wc * T))))
pm = pm - 360.0 if pm > 180.0 else pm
lp = doc["loop"]
check(len(lp["gain_crossovers_rad_s"]) == 1 and len(lp["phase_margins_deg"]) == 1,
      f"one gain crossover: {lp['gain_crossovers_rad_s']}")
# both refined to full precision: 1e-8 rad/s and 1e-6 degree leave room for the refinement's
# stopping rule
check(near(lp["gain_crossover_rad_s"], wc, 1e-8), f"gain crossover {lp['gain_crossover_rad_s']} vs {wc}")
check(near(lp["phase_margin_deg"], pm, 1e-6), f"phase margin {lp['phase_margin_deg']} vs {pm}")
check(near((lp["phase_margins_deg"] or [None])[0], pm, 1e-6), "phase_margins_deg[0]")
dm = math.radians(pm) / wc
check(near(lp["delay_margin_s"], dm, 1e-6 * dm), f"delay margin {lp['delay_margin_s']} vs {dm}")
check(near(lp["delay_margin_samples"], dm / T, 1e-6 * dm / T), "delay margin in samples")
check(len(lp["phase_crossovers_rad_s"]) == len(lp["gain_margins_db"]), "phase crossover arrays")
# Phase crossovers ∠L = −180°, i.e. Im L = 0 with Re L < 0: sign changes of Im L on a dense grid
# strictly inside (0, π/T), refined by brentq. G(e^{jπ}) = G(−1) is also a negative real number,
# so π/T is a crossover too; whether the end point counts is a convention of
# docs/conventions.md, so it is checked only when reported.
def im_l(w):
    return G(cmath.exp(1j * w * T)).imag


wgrid = np.linspace(1e-6, math.pi / T * (1 - 1e-9), 20001)
ims = np.array([im_l(w) for w in wgrid])
wpc = [optimize.brentq(im_l, wgrid[i], wgrid[i + 1], xtol=1e-14)
       for i in range(len(wgrid) - 1)
       if ims[i] * ims[i + 1] < 0 and G(cmath.exp(1j * wgrid[i] * T)).real < 0]
check(len(wpc) == 1, f"scipy reference finds one interior phase crossover, {wpc}")
got_pc = lp["phase_crossovers_rad_s"]
got_gm = lp["gain_margins_db"]
interior = [(w, g) for w, g in zip(got_pc, got_gm) if w < math.pi / T * (1 - 1e-9)]
check(len(interior) == len(wpc), f"interior phase crossovers {got_pc} vs {wpc}")
for (w, g), wref in zip(interior, wpc):
    gref = -20.0 * math.log10(abs(G(cmath.exp(1j * wref * T))))
    # refined to full precision: 1e-8 rad/s, 1e-6 dB
    check(near(w, wref, 1e-8), f"phase crossover {w} vs {wref}")
    check(near(g, gref, 1e-6), f"gain margin {g} vs {gref}")
if len(got_pc) > len(interior):
    gm_end = -20.0 * math.log10(abs(G(-1.0)))
    check(near(got_pc[-1], math.pi / T, 1e-8), "phase crossover at pi/T")
    check(near(got_gm[-1], gm_end, 1e-6), f"gain margin at pi/T {got_gm[-1]} vs {gm_end}")
# which margin governs is a convention (docs/conventions.md); it must be one of those listed
check(lp["gain_margin_db"] in got_gm and lp["phase_crossover_rad_s"] in got_pc,
      f"governing gain margin {lp['gain_margin_db']} at {lp['phase_crossover_rad_s']}")

# Sensitivity peak max |1/(1+L)| on [0, π/T]: dense grid, then bounded refinement.
grid = np.linspace(1e-9, math.pi / T, 200001)
s_mag = 1.0 / np.abs(1.0 + G(np.exp(1j * grid * T)))
k = int(np.argmax(s_mag))
lo, hi = grid[max(k - 1, 0)], grid[min(k + 1, len(grid) - 1)]
res = optimize.minimize_scalar(lambda w: -1.0 / abs(1.0 + G(cmath.exp(1j * w * T))),
                               bounds=(lo, hi), method="bounded", options={"xatol": 1e-12})
ms, wms = -res.fun, res.x
# The core may take the peak on its own grid (2000 points) without refining; the value error
# of a sampled smooth maximum is second order in the spacing, so 1e-4 relative is loose for
# that and still tight enough to catch a wrong formula. The location of a flat maximum is
# ill-conditioned (first order in sqrt of the value error): 1e-2 relative.
check(near(lp["sensitivity_peak"], ms, 1e-4 * ms), f"sensitivity peak {lp['sensitivity_peak']} vs {ms}")
check(near(lp["sensitivity_peak_rad_s"], wms, 1e-2 * wms),
      f"sensitivity peak frequency {lp['sensitivity_peak_rad_s']} vs {wms}")

# Step response of the unity-feedback loop y(kT), k = 0 … n−1: scipy's dstep.
_, (yref,) = signal.dstep((numz, charpoly, T), n=N_STEPS)
yref = yref.ravel()
st = doc["step"]
y = np.array([math.nan if v is None else v for v in st["samples"]], dtype=float)
check(len(y) == N_STEPS, f"{len(y)} step samples")
# values of order 1 from two double-precision recursions: 1e-9 absolute
check(len(y) == N_STEPS and np.max(np.abs(y - yref)) <= 1e-9, "step samples vs scipy dstep")
final = np.polyval(numz, 1.0) / np.polyval(charpoly, 1.0)   # closed-loop DC gain T(1)
check(near(st["final_value"], final, 1e-9), f"final value {st['final_value']} vs {final}")
os_ref = (np.max(yref) - final) / final * 100.0
check(near(st["overshoot_pct"], os_ref, 1e-6), f"overshoot {st['overshoot_pct']} vs {os_ref}")


def crossing(level):
    i = int(np.argmax(yref >= level))
    return (i - 1 + (level - yref[i - 1]) / (yref[i] - yref[i - 1])) * T


rise = crossing(0.9 * final) - crossing(0.1 * final)   # 10 % → 90 %, linear between samples
check(near(st["rise_time_s"], rise, 1e-9), f"rise time {st['rise_time_s']} vs {rise}")
outside = np.nonzero(np.abs(yref - final) > 0.02 * abs(final))[0]
settle = (outside[-1] + 1) * T   # first sample after the last one outside ±2 %
# whether the entry instant is the sample or interpolated between samples is a convention:
# tolerance one sample period
check(near(st["settling_time_s"], settle, T), f"settling time {st['settling_time_s']} vs {settle}")

# Time-domain verification (docs/simulation.md): with C = 1 and N = 0 the actuator signal is
# the error, u = 1 − y, and the indices are sums over the samples times T; against the dstep
# reference, 1e-9 (as the samples), relative for the sums of 500 terms.
u = np.array(st["actuator"], dtype=float)
check(len(u) == N_STEPS and np.max(np.abs(u - (1.0 - yref))) <= 1e-9, "actuator = error for C = 1")
e = 1.0 - yref
ix = doc["indices"]
for key, ref in (("iae", T * np.sum(np.abs(e))), ("ise", T * np.sum(e ** 2)),
                 ("itae", T * np.sum(np.arange(N_STEPS) * T * np.abs(e))),
                 ("control_effort", T * np.sum(e ** 2))):
    check(near(ix[key], ref, 1e-9 * abs(ref)), f"indices.{key} {ix[key]} vs {ref}")
check(st["saturated_samples"] == 0 and st["held_samples"] == 0, "no limits, nothing saturated")

# ---- the same run as a text report -----------------------------------------------------------
rc, out, err = run(["analyze", "--plant", P, "--period", "1", "--compute-delay", "0"])
check(rc == 0 and err == "", f"text run: exit {rc}, stderr {err!r}")
for needle in ("Plant", "Controller", "Margins", "phase margin", "delay margin",
               "sensitivity peak", "closed-loop bandwidth", "Closed-loop poles", "stable",
               "rise time", "settling time", "Time-domain verification", "intersample ripple",
               "input-disturbance step", "output-disturbance step", "IAE"):
    check(needle in out, f"text report lacks {needle!r}")
lines = out.rstrip("\n").split("\n")
check(lines[-1] == "caution: simulation is not validation; commission with safe limits.",
      f"last line {lines[-1]!r}")
# rise time ≈ 1–2 s at T = 1 s: fewer than 10 samples per rise time (common practice, no source)
check(any(l.startswith("note:") and "fewer than" in l for l in lines), "note about the period")

rc, out, err = run(["analyze", "--help"])
check(rc == 0 and "--plant" in out and "--period" in out and err == "", "analyze --help")
rc, out, err = run(["--help"])
check(rc == 0 and "analyze" in out and err == "", "--help")
rc, out, err = run(["--version"])
check(rc == 0 and out.startswith("loopwright-cli ") and err == "", "--version")

if failures:
    print(f"{len(failures)} check(s) failed")
    sys.exit(1)
print("all checks passed")
