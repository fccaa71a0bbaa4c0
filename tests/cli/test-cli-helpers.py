#!/usr/bin/python3
"""Tests of `loopwright-cli suggest --helper NAME`, the formula helpers of the engine
(src/engine/lw-proposal.h), spawned as a user runs them.

Usage: test-cli-helpers.py PATH-TO-loopwright-cli WORKDIR

Independent checks with Debian's scipy/numpy: the plant is discretized here with
scipy.signal.cont2discrete (zero-order hold), the controller evaluated from the JSON roots at
w = j*nu, nu = (2/T) tan(omega T/2) (on the unit circle C(z) = C(w) exactly), and
L = z^-N C P.  Tolerances: 1e-6 on |L| and 1e-4 deg on phases (scipy's expm and polynomial
evaluation against the core's state space; both are far below what a design needs).
  crossover-gain  |L(j omega_c)| = 1 at the crossover asked
  lead            |L| = 1 there and 180 + angle L = PM + safety (lw-synth.h keeps the safety)
  lag             C(0)/C(inf) = the ratio asked, its zero a decade below nu_c (the lag of
                  Ogata, Modern Control Engineering: zero and pole a ratio apart, unit gain
                  at high frequency)
  pi              |L| = 1 at the crossover with the zero at 0.1 nu_c
  notch           centre at |w| of the plant's resonance mapped to the w-plane,
                  w = (2/T) tanh(pT/2) (the bilinear map of z = e^{pT})
  meet            every requirement of the camera slider passes (the document saved with
                  --output passes `check`); a ramp-error requirement gets K_v >= 1/e with
                  K_v computed here from the plant and the controller's low-frequency gain;
                  a type-0 plant with a zero step error gets an integrator (PI)
And bad input: an unknown helper, helper options without --helper, a lag with nothing to take
its ratio from, a document with no crossover to aim at.
"""

import cmath
import json
import math
import os
import re
import subprocess
import sys

import numpy as np
from scipy import signal

CLI = sys.argv[1]
WORK = sys.argv[2] if len(sys.argv) > 2 else "."
HERE = os.path.dirname(os.path.abspath(__file__))
EXAMPLES = os.path.join(HERE, "..", "..", "data", "examples")
failures = []


def run(args):
    p = subprocess.run([CLI] + args, capture_output=True, text=True, timeout=120)
    return p.returncode, p.stdout, p.stderr


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def roots(js):
    return [complex(r[0], r[1]) for r in js]


def cw_eval(cw, w):
    v = cw["gain"]
    for z in roots(cw["zeros"]):
        v *= (w - z)
    for p in roots(cw["poles"]):
        v /= (w - p)
    return v


def loop_at(num, den, T, N, cw, omega):
    """L(e^{j omega T}) = z^-N C P with P the scipy ZOH of num/den."""
    nd, dd, _ = signal.cont2discrete((num, den), T, method="zoh")
    nd = np.atleast_1d(np.squeeze(nd))
    z = cmath.exp(1j * omega * T)
    p = np.polyval(nd, z) / np.polyval(dd, z)
    nu = 2.0 / T * math.tan(omega * T / 2.0)
    return z ** (-N) * cw_eval(cw, 1j * nu) * p


def suggest(args):
    rc, out, err = run(["suggest"] + args + ["--json"])
    if rc != 0:
        return rc, None, err
    return rc, json.loads(out), err


# the camera slider's rigid-body axis (invented numbers)
NUM, DEN, T, N = [40.0], [1.0, 8.0, 0.0], 0.002, 1
LOOP = ["--plant", "40/(s*(s+8))", "--period", str(T), "--compute-delay", str(N)]

# crossover gain
rc, js, err = suggest(LOOP + ["--helper", "crossover-gain", "--crossover", "30"])
check(rc == 0, f"crossover-gain: exit {rc}: {err}")
if js:
    L = loop_at(NUM, DEN, T, N, js["controller_w"], 30.0)
    check(abs(abs(L) - 1.0) < 1e-6, f"crossover-gain: |L(30)| = {abs(L)}")
    check([s["kind"] for s in js["stages"]] == ["gain"], f"crossover-gain stages {js['stages']}")

# lead, with the default 5 deg safety
rc, js, err = suggest(LOOP + ["--helper", "lead", "--crossover", "30", "--phase-margin", "50"])
check(rc == 0, f"lead: exit {rc}: {err}")
if js:
    L = loop_at(NUM, DEN, T, N, js["controller_w"], 30.0)
    check(abs(abs(L) - 1.0) < 1e-6, f"lead: |L(30)| = {abs(L)}")
    pm = 180.0 + math.degrees(cmath.phase(L))
    check(abs(pm - 55.0) < 1e-4, f"lead: PM {pm} vs 55")
    check(abs(js["loop"]["phase_margin_deg"] - pm) < 1e-4, f"lead: reported PM {js['loop']}")

# lag: ratio 5, a decade below the w-plane crossover
rc, js, err = suggest(LOOP + ["--helper", "lag", "--crossover", "30", "--ratio", "5"])
check(rc == 0, f"lag: exit {rc}: {err}")
if js:
    cw = js["controller_w"]
    ratio = abs(cw_eval(cw, 1e-9j)) / abs(cw_eval(cw, 1e9j))
    check(abs(ratio - 5.0) < 1e-6, f"lag: low/high gain {ratio}")
    nu_c = 2.0 / T * math.tan(30.0 * T / 2.0)
    z = -roots(cw["zeros"])[0].real
    check(abs(z - nu_c / 10.0) < 1e-9 * nu_c, f"lag: zero {z} vs {nu_c / 10}")

# PI: zero at 0.1 nu_c, |L| = 1 at the crossover
rc, js, err = suggest(LOOP + ["--helper", "pi", "--crossover", "30"])
check(rc == 0, f"pi: exit {rc}: {err}")
if js:
    L = loop_at(NUM, DEN, T, N, js["controller_w"], 30.0)
    check(abs(abs(L) - 1.0) < 1e-6, f"pi: |L(30)| = {abs(L)}")
    nu_c = 2.0 / T * math.tan(30.0 * T / 2.0)
    check(abs(js["stages"][0]["params"]["zero_rad_s"] - 0.1 * nu_c) < 1e-9 * nu_c,
          f"pi: zero {js['stages'][0]['params']}")

# notch on the belt resonance of the camera slider (poles -2 ± 199.99j)
slider = os.path.join(EXAMPLES, "camera-slider.lwd")
rc, js, err = suggest([slider, "--helper", "notch"])
check(rc == 0, f"notch: exit {rc}: {err}")
if js:
    p = complex(-2.0, math.sqrt(40000.0 - 4.0))
    w = 2.0 / T * cmath.tanh(p * T / 2.0)
    centre = js["stages"][0]["params"]["centre_rad_s"]
    check(abs(centre - abs(w)) < 1e-9 * abs(w), f"notch: centre {centre} vs {abs(w)}")
    check(js["replaces_stages"] is False, "notch: appended, not replacing")

# meet on the camera slider: every requirement passes; the saved document passes check
out_doc = os.path.join(WORK, "helpers-slider-met.lwd")
rc, js, err = suggest([slider, "--helper", "meet", "--output", out_doc])
check(rc == 0, f"meet slider: exit {rc}: {err}")
if js:
    check(js["replaces_stages"] is True, "meet: replaces the stages")
    check(js["not_met"] == [], f"meet slider: not met {js['not_met']}")
    check(all(r["pass"] for r in js["requirements"]), f"meet slider: {js['requirements']}")
    kinds = [s["kind"] for s in js["stages"]]
    check("notch" in kinds and "lead" in kinds, f"meet slider: stages {kinds}")
    # the reached phase margin, independently
    num = [180.0 * 40000.0]
    den = np.polymul([1.0, 12.0, 0.0], [1.0, 4.0, 40000.0]).tolist()
    wc = js["loop"]["gain_crossover_rad_s"]
    L = loop_at(num, den, T, N, js["controller_w"], wc)
    check(abs(abs(L) - 1.0) < 1e-6, f"meet slider: |L(wc)| = {abs(L)}")
    pm = 180.0 + math.degrees(cmath.phase(L))
    check(abs(pm - js["loop"]["phase_margin_deg"]) < 1e-4, f"meet slider: PM {pm}")
    rc, out, err = run(["check", out_doc])
    check(rc == 0, f"check of the met document: exit {rc}: {out} {err}")

# meet with a ramp-error requirement on the rigid-body axis: K_v >= 1/e
with open(slider, encoding="utf-8") as f:
    text = f.read()
ramp = re.sub(r"<step-error [^>]*/>", '<ramp-error max_s="0.002"/>', text)
ramp = ramp.replace("180*40000/(s*(s+12)*(s^2+4*s+40000))", "180/(s*(s+12))")
ramp_doc = os.path.join(WORK, "helpers-ramp.lwd")
with open(ramp_doc, "w", encoding="utf-8") as f:
    f.write(ramp)
rc, js, err = suggest([ramp_doc, "--helper", "meet"])
check(rc == 0, f"meet ramp: exit {rc}: {err}")
if js:
    kinds = [s["kind"] for s in js["stages"]]
    check("lag" in kinds, f"meet ramp: a lag expected, stages {kinds}")
    kv = 180.0 / 12.0 * abs(cw_eval(js["controller_w"], 1e-9j))
    check(kv >= 1.0 / 0.002 * (1 - 1e-9), f"meet ramp: Kv {kv} < 500")
    reqs = {r["kind"]: r for r in js["requirements"]}
    check(reqs["ramp-error"]["pass"], f"meet ramp: {reqs['ramp-error']}")

# meet on the pump (a type-0 plant, zero step error): an integrator is added
pump = os.path.join(EXAMPLES, "pump-pressure.lwd")
rc, js, err = suggest([pump, "--helper", "meet"])
check(rc == 0, f"meet pump: exit {rc}: {err}")
if js:
    check(js["stages"][0]["kind"] == "pi", f"meet pump: stages {js['stages']}")
    reqs = {r["kind"]: r for r in js["requirements"]}
    check(reqs["step-error"]["pass"], f"meet pump: {reqs['step-error']}")

# bad input, each naming its place
for args, place, words in [
    (LOOP + ["--helper", "nonsense"], "--helper", "unknown helper"),
    (LOOP + ["--ratio", "3", "--crossover", "30", "--phase-margin", "50"], "--ratio", "needs --helper"),
    (LOOP + ["--helper", "lag", "--crossover", "30"], "suggest", "no ratio given"),
    (LOOP + ["--helper", "lag", "--crossover", "30", "--ratio", "0.5"], "suggest", "ratio"),
    (LOOP + ["--helper", "lead", "--crossover", "3000"], "suggest", "Nyquist"),
    ([os.path.join(EXAMPLES, "kiln.lwd"), "--helper", "meet"], "kiln.lwd", "no crossover"),
    ([slider, "--helper", "meet", "--variant", "nope"], "--variant", "nope"),
]:
    rc, out, err = run(["suggest"] + args)
    check(rc == 2, f"{args}: exit {rc}, expected 2")
    check(place in err and words in err, f"{args}: message {err!r}")

if failures:
    print(f"{len(failures)} failure(s)")
    sys.exit(1)
print("all helper checks passed")
