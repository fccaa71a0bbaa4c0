#!/usr/bin/python3
"""Tests of `loopwright-cli suggest`, spawned as a user runs it.

Usage: test-cli-suggest.py PATH-TO-loopwright-cli

1. Designs on invented plants of our own (a camera slider axis, a pump with three lags, a kiln
   with transport delay): the phase margin reached must be the target plus the safety angle
   within 0.5 degrees and the crossover within 1 % (lw-synth.h: the safety is kept as a reserve).
2. The controller printed in the text report is fed back to `analyze --json --controller`:
   its margins must agree with those `suggest --json` reports (1e-9 relative: the same loop,
   the printed expression carries 17 significant digits).
3. Independent check with scipy/numpy (Debian's): the plant is discretized here with
   scipy.signal.cont2discrete (zero-order hold), the controller is evaluated from the JSON
   roots at w = j*nu, nu = (2/T) tan(omega T/2), and L = z^-N C P must satisfy |L| = 1 at the
   reported crossover and 180 + angle L = the reported phase margin (1e-6: scipy's expm and
   polynomial evaluation against the core's state space).
4. Refusal above 120 degrees of lead, and bad input naming the option.
"""

import cmath
import json
import math
import subprocess
import sys

import numpy as np
from scipy import signal

CLI = sys.argv[1]
failures = []


def run(args):
    p = subprocess.run([CLI] + args, capture_output=True, text=True, timeout=60)
    return p.returncode, p.stdout, p.stderr


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def near(got, ref, tol):
    return isinstance(got, (int, float)) and abs(got - ref) <= tol


# (name, plant, numerator/denominator in s for scipy, T, N, PM, crossover option, value, safety)
CASES = [
    ("camera slider", "40/(s*(s+8))", [40.0], [1.0, 8.0, 0.0], 0.002, 1, 50, "--crossover", "30", None),
    ("camera slider, no safety", "40/(s*(s+8))", [40.0], [1.0, 8.0, 0.0], 0.002, 1, 50, "--crossover", "30", "0"),
    ("pump, two leads", "8/((s+1)*(0.2*s+1)*(0.05*s+1))", [8.0],
     np.polymul(np.polymul([1.0, 1.0], [0.2, 1.0]), [0.05, 1.0]).tolist(), 0.01, 1, 60, "--crossover", "12", None),
    ("pump, rise time", "8/((s+1)*(0.2*s+1)*(0.05*s+1))", [8.0],
     np.polymul(np.polymul([1.0, 1.0], [0.2, 1.0]), [0.05, 1.0]).tolist(), 0.01, 0, 45, "--rise-time", "0.3", None),
    # kiln: two thermal lags and a 4 s transport delay (a whole number of 1 s samples)
    ("kiln", "0.8/((120*s+1)*(15*s+1))", [0.8], np.polymul([120.0, 1.0], [15.0, 1.0]).tolist(),
     1.0, 1, 55, "--crossover", "0.06", None, 4.0),
]
CASES = [c if len(c) == 11 else c + (0.0,) for c in CASES]

for name, plant, num, den, T, N, pm, opt, val, safety, dead in CASES:
    base = ["--plant", plant, "--period", str(T), "--compute-delay", str(N), "--dead-time", str(dead)]
    extra = [opt, val, "--phase-margin", str(pm)] + (["--safety", safety] if safety else [])
    rc, out, err = run(["suggest"] + base + extra + ["--json"])
    check(rc == 0, f"{name}: suggest --json exit {rc}: {err}")
    if rc != 0:
        continue
    js = json.loads(out)
    check(set(js) == {"stages", "controller_w", "controller_w_expression", "design", "loop",
                      "stable"}, f"{name}: keys {sorted(js)}")
    loop = js["loop"]
    aim = pm + (float(safety) if safety else 5.0)
    omega_c = float(val) if opt == "--crossover" else 1.7 / float(val)
    check(near(loop["phase_margin_deg"], aim, 0.5), f"{name}: PM {loop['phase_margin_deg']} vs {aim}")
    check(near(loop["gain_crossover_rad_s"], omega_c, 0.01 * omega_c),
          f"{name}: crossover {loop['gain_crossover_rad_s']} vs {omega_c}")
    check(js["stable"] is True, f"{name}: not stable")
    for st in js["stages"]:
        check(st["kind"] in ("gain", "lead") and isinstance(st["params"], dict),
              f"{name}: stage {st}")

    # 2. the printed controller, back through analyze
    rc, text, err = run(["suggest"] + base + extra)
    check(rc == 0, f"{name}: suggest (text) exit {rc}: {err}")
    lines = text.splitlines()
    idx = [i for i, l in enumerate(lines) if l.startswith("Controller in w")]
    check(len(idx) == 1, f"{name}: no controller line in the report")
    if not idx:
        continue
    expr = lines[idx[0] + 1].strip()
    check(expr == js["controller_w_expression"], f"{name}: text and JSON expressions differ")
    check("caution: simulation is not validation" in text, f"{name}: no caution line")
    rc, aout, err = run(["analyze"] + base + ["--controller", expr, "--json"])
    check(rc == 0, f"{name}: analyze of the printed controller exit {rc}: {err}")
    if rc != 0:
        continue
    back = json.loads(aout)["loop"]
    for key in ("phase_margin_deg", "gain_crossover_rad_s", "gain_margin_db", "phase_crossover_rad_s",
                "sensitivity_peak"):
        a, b = back[key], loop[key]
        check(near(a, b, 1e-9 * max(1.0, abs(b))), f"{name}: analyze {key} {a} vs suggest {b}")

    # 3. independent: scipy ZOH of the plant, controller from its JSON roots
    ad, bd, cd, dd, _ = signal.cont2discrete(signal.tf2ss(num, den), T, method="zoh")
    w = loop["gain_crossover_rad_s"]
    z = cmath.exp(1j * w * T)
    p = (cd @ np.linalg.solve(z * np.eye(ad.shape[0]) - ad, bd) + dd)[0, 0]
    nu = 2 / T * math.tan(w * T / 2)
    cw = js["controller_w"]
    c = cw["gain"]
    for re, im in cw["zeros"]:
        c *= (1j * nu - complex(re, im))
    for re, im in cw["poles"]:
        c /= (1j * nu - complex(re, im))
    L = c * p * z ** (-N - round(dead / T))   # dead time: whole samples only in these cases
    check(abs(abs(L) - 1) <= 1e-6, f"{name}: scipy |L| at the crossover = {abs(L)}")
    pm_ref = 180 + math.degrees(cmath.phase(L))
    pm_ref -= 360 * math.ceil((pm_ref - 180) / 360)
    check(abs(pm_ref - loop["phase_margin_deg"]) <= 1e-6,
          f"{name}: scipy PM {pm_ref} vs {loop['phase_margin_deg']}")
    print(f"{name}: PM {loop['phase_margin_deg']:.6f} deg at {w:.6f} rad/s, "
          f"{js['design']['leads']} lead(s); scipy |L| - 1 = {abs(L) - 1:.2e}")

# 4. refusal and bad input
PUMP = ["suggest", "--plant", "8/((s+1)*(0.2*s+1)*(0.05*s+1))", "--period", "0.01"]
BAD = [
    (PUMP + ["--phase-margin", "60", "--crossover", "40"], ["suggest:", "more than the 120 degrees"]),
    (PUMP + ["--crossover", "10"], ["--phase-margin is required"]),
    (PUMP + ["--phase-margin", "60"], ["exactly one of --crossover and --rise-time"]),
    (PUMP + ["--phase-margin", "60", "--crossover", "10", "--rise-time", "0.2"],
     ["exactly one of --crossover and --rise-time"]),
    (PUMP + ["--phase-margin", "190", "--crossover", "10"], ["--phase-margin:", "less than 180"]),
    (PUMP + ["--phase-margin", "abc", "--crossover", "10"], ["--phase-margin:", "not a number"]),
    (PUMP + ["--phase-margin", "60", "--crossover", "400"], ["--crossover:", "Nyquist"]),
    (PUMP + ["--phase-margin", "60", "--crossover", "-1"], ["--crossover:", "more than 0"]),
    (PUMP + ["--phase-margin", "60", "--rise-time", "0"], ["--rise-time:", "more than 0"]),
    (PUMP + ["--phase-margin", "60", "--crossover", "10", "--safety", "95"], ["--safety:"]),
    (PUMP + ["--phase-margin", "60", "--crossover", "10", "--controller", "1"], ["suggest:", "controller"]),
    (["suggest", "--plant", "1/(s+", "--period", "0.01", "--phase-margin", "60", "--crossover", "1"],
     ["--plant:", "at character 6"]),
]
for args, needles in BAD:
    rc, out, err = run(args)
    check(rc == 2, f"{args}: exit {rc}, want 2")
    check(out == "", f"{args}: output on stdout")
    for n in needles:
        check(n in err, f"{args}: '{n}' not in stderr: {err.strip()}")

rc, out, _ = run(["suggest", "--help"])
check(rc == 0 and "--phase-margin DEG" in out, "suggest --help")
rc, out, _ = run(["--help"])
check(rc == 0 and "suggest" in out, "suggest listed in the main help")

if failures:
    print(f"{len(failures)} failure(s)")
    sys.exit(1)
print("all suggest checks passed")
