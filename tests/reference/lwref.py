# lwref.py — shared helpers for the reference scripts in tests/reference/.
#
# Runs `loopwright-cli analyze --json`, turns its JSON into numpy values, builds expression
# strings from factored models kept as lists of real polynomial factors, and records each
# check as one printed line (measured error, tolerance, PASS/FAIL).  Nothing here computes a
# reference value; the scripts do that with scipy / mpmath.
#
# SPDX-License-Identifier: GPL-3.0-or-later

import json
import subprocess
import sys

import numpy as np


class Checker:
    """Collects checks; each prints one line and a failure makes finish() exit non-zero."""

    def __init__(self):
        self.n = 0
        self.failed = []

    def le(self, name, err, tol, unit=""):
        """Passes when err <= tol (err must be a finite number)."""
        self.n += 1
        ok = bool(np.isfinite(err)) and err <= tol
        print(f"{'PASS' if ok else 'FAIL'}  {name}: error {err:.3e}{unit}  tol {tol:.1e}{unit}",
              flush=True)
        if not ok:
            self.failed.append(name)
        return ok

    def true(self, name, cond, detail=""):
        self.n += 1
        ok = bool(cond)
        print(f"{'PASS' if ok else 'FAIL'}  {name}{': ' + detail if detail else ''}", flush=True)
        if not ok:
            self.failed.append(name)
        return ok

    def finish(self):
        print(f"{self.n - len(self.failed)}/{self.n} checks passed", flush=True)
        if self.failed:
            print("failed:", file=sys.stderr)
            for f in self.failed:
                print("  " + f, file=sys.stderr)
            sys.exit(1)
        sys.exit(0)


def _num(x):
    # repr() of a float round-trips exactly, so the CLI parses the very number we use here.
    r = repr(float(x))
    return r


def poly_text(coeffs, var):
    """Real polynomial (descending powers) as an expression, e.g. [1, 4, 400] -> s^2 + 4*s + 400."""
    coeffs = [float(c) for c in coeffs]
    deg = len(coeffs) - 1
    terms = []
    for i, c in enumerate(coeffs):
        p = deg - i
        if c == 0.0:
            continue
        mag = abs(c)
        if p == 0:
            body = _num(mag)
        else:
            v = var if p == 1 else f"{var}^{p}"
            body = v if mag == 1.0 else f"{_num(mag)}*{v}"
        sign = "-" if c < 0 else "+"
        if not terms:
            terms.append(("-" if c < 0 else "") + body)
        else:
            terms.append(f" {sign} {body}")
    return "".join(terms) if terms else "0"


class Factored:
    """gain * prod(num factors) / prod(den factors); each factor a real polynomial, descending."""

    def __init__(self, gain, num=(), den=()):
        self.gain = float(gain)
        self.num = [list(map(float, f)) for f in num]
        self.den = [list(map(float, f)) for f in den]

    def text(self, var):
        t = _num(self.gain)
        for f in self.num:
            t += f"*({poly_text(f, var)})"
        if self.den:
            t += "/(" + "*".join(f"({poly_text(f, var)})" for f in self.den) + ")"
        return t

    def tf(self):
        """Expanded numerator and denominator, descending powers (numpy polynomials)."""
        n = np.array([self.gain])
        for f in self.num:
            n = np.polymul(n, f)
        d = np.array([1.0])
        for f in self.den:
            d = np.polymul(d, f)
        return np.atleast_1d(n), np.atleast_1d(d)

    def order(self):
        return sum(len(f) - 1 for f in self.den)


def run_analyze(cli, plant, period, compute_delay=None, dead_time=None, controller=None,
                controller_z=None, points=None, steps=None):
    args = [cli, "analyze", "--plant", plant, "--period", _num(period)]
    if compute_delay is not None:
        args += ["--compute-delay", str(int(compute_delay))]
    if dead_time is not None:
        args += ["--dead-time", _num(dead_time)]
    if controller is not None:
        args += ["--controller", controller]
    if controller_z is not None:
        args += ["--controller-z", controller_z]
    if points is not None:
        args += ["--points", str(int(points))]
    if steps is not None:
        args += ["--steps", str(int(steps))]
    args.append("--json")
    shown = " ".join(a if a.replace(".", "").replace("-", "").isalnum() else repr(a) for a in args)
    print(f"# command: {shown}", flush=True)
    proc = subprocess.run(args, capture_output=True, text=True, timeout=120)
    if proc.returncode != 0:
        raise RuntimeError(f"CLI exited {proc.returncode}: {proc.stderr.strip()}")
    return json.loads(proc.stdout)


def roots_of(js_list):
    return np.array([complex(r[0], r[1]) for r in (js_list or [])], dtype=complex)


def model_of(js):
    """(zeros, poles, gain) from a JSON {gain, zeros, poles} object."""
    return roots_of(js.get("zeros")), roots_of(js.get("poles")), float(js["gain"])


def model_eval(model, x):
    z, p, k = model
    x = np.asarray(x, dtype=complex)
    num = np.full(x.shape, k, dtype=complex)
    for r in z:
        num = num * (x - r)
    den = np.ones(x.shape, dtype=complex)
    for r in p:
        den = den * (x - r)
    return num / den


def match_roots(a, b):
    """Largest distance, relative to max(1,|root|), after pairing each root of a with a distinct
    root of b (greedy nearest; fine for the well-separated sets used here). inf on count
    mismatch."""
    a = list(np.asarray(a, dtype=complex))
    b = list(np.asarray(b, dtype=complex))
    if len(a) != len(b):
        return np.inf
    worst = 0.0
    # pair the most isolated roots first
    while a:
        best = None
        for i, ra in enumerate(a):
            for j, rb in enumerate(b):
                d = abs(ra - rb) / max(1.0, abs(rb))
                if best is None or d < best[0]:
                    best = (d, i, j)
        d, i, j = best
        worst = max(worst, d)
        a.pop(i)
        b.pop(j)
    return worst


def wrap180(deg):
    """Degrees wrapped to (-180, 180]."""
    w = np.mod(np.asarray(deg, dtype=float) + 180.0, 360.0) - 180.0
    return np.where(w == -180.0, 180.0, w)


def none_or(x):
    return None if x is None else float(x)
