#!/usr/bin/python3
# ref_delay.py — long whole-sample delays (issue 11: they are z^-d, not states) in
# `loopwright-cli analyze --json` against references computed here with scipy/numpy (Debian):
#   1. the unit step response against scipy.signal.dlsim of the closed loop L/(1 + L),
#      L = z^-N C(z) P(z), with P(z) from this script's own exact ZOH (scipy.linalg.expm,
#      fractional dead time by the modified-z state space, lwref-style) and z^-d as zeros
#      appended to the denominator — a transfer function of order 300+, which scipy turns into
#      a state space with the delay as states (the very thing the tool avoids);
#   2. stability and the number of closed-loop poles on or outside the unit circle against
#      numpy.roots of the characteristic polynomial (eigenvalues of its companion matrix);
#   3. the dominant poles reported against those roots, and the final value against
#      T(1) = L(1)/(1 + L(1));
#   4. the step figures of a horizon shorter than the delay: none (the output has not moved).
# The delays (300–900 samples) put the closed-loop order above 150, so the tool takes its
# Nyquist path there (docs/conventions.md).
#
# Usage: /usr/bin/python3 ref_delay.py path/to/loopwright-cli
#
# SPDX-License-Identifier: GPL-3.0-or-later

import json
import os
import subprocess
import sys

import numpy as np
import scipy.linalg as sla
import scipy.signal as sig

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwref import Checker  # noqa: E402


def run(cli, args):
    cmd = [cli, "analyze"] + args + ["--json"]
    print("# command: " + " ".join(repr(a) if " " in a or "(" in a else a for a in cmd),
          flush=True)
    p = subprocess.run(cmd, capture_output=True, text=True, timeout=120)
    if p.returncode != 0:
        raise RuntimeError(f"CLI exited {p.returncode}: {p.stderr.strip()}")
    return json.loads(p.stdout)


def zoh_blocks(a, b, h):
    n = a.shape[0]
    m = np.zeros((n + 1, n + 1))
    m[:n, :n] = a * h
    m[:n, n:] = b * h
    e = sla.expm(m)
    return e[:n, :n], e[:n, n:]


def plant_tf_z(num, den, T, tau):
    """P(z) = N(z)/D(z) including z^-d (descending numpy polynomials): exact ZOH, dead time
    τ = dT + θ, θ > 0 by x+ = Φ(T)x + Φ(T−θ)Γ(θ)v + Γ(T−θ)u, v+ = u, y = Cx + Dv."""
    a, b, c, d = sig.tf2ss(num, den)
    n = a.shape[0]
    dw = int(np.floor(tau / T + 1e-9))
    th = tau - dw * T
    if th < 1e-9 * T:
        A, B = zoh_blocks(a, b, T)
        C, D = c, d
    else:
        p1, g1 = zoh_blocks(a, b, th)
        p2, g2 = zoh_blocks(a, b, T - th)
        A = np.zeros((n + 1, n + 1))
        A[:n, :n] = p2 @ p1
        A[:n, n:] = p2 @ g1
        B = np.zeros((n + 1, 1))
        B[:n] = g2
        B[n, 0] = 1.0
        C = np.zeros((1, n + 1))
        C[:, :n] = c
        C[0, n] = d[0, 0]
        D = np.zeros((1, 1))
    nz, dz = sig.ss2tf(A, B, C, D)
    nz = np.atleast_1d(np.squeeze(nz))
    dz = np.atleast_1d(np.squeeze(dz))
    return nz, np.concatenate([dz, np.zeros(dw)])


def case(chk, cli, name, plant, num, den, T, tau, N, cz_text, cnum, cden, steps):
    doc = run(cli, ["--plant", plant, "--period", repr(T), "--dead-time", repr(tau),
                    "--compute-delay", str(N), "--controller-z", cz_text,
                    "--steps", str(steps), "--substeps", "0"])
    np_, dp = plant_tf_z(num, den, T, tau)
    zN = np.concatenate([[1.0], np.zeros(N)])
    ln = np.polymul(cnum, np_)                          # L = ln / ld
    ld = np.polymul(zN, np.polymul(cden, dp))
    char = np.polyadd(ld, ln)
    cl = doc["closed_loop"]
    order = len(char) - 1
    chk.true(f"{name}: closed-loop order {cl['order']} = degree of the characteristic "
             f"polynomial {order}", cl["order"] == order)
    chk.true(f"{name}: only the dominant poles (order {order} > 150)",
             cl["poles_complete"] is False and 0 < len(cl["poles"]) <= 32)
    roots = np.roots(char)
    mods = np.abs(roots)
    bound = 1.0 - 1e-10
    # a root within 1e-6 of the bound would make the count depend on rounding; none here
    chk.true(f"{name}: no root near |z| = 1 (else the count is moot)",
             np.min(np.abs(mods - bound)) > 1e-6, f"closest {np.min(np.abs(mods - bound)):.2e}")
    n_out = int(np.sum(mods >= bound))
    chk.true(f"{name}: unstable poles {cl['unstable_poles']} = roots with |z| >= 1 - 1e-10 "
             f"({n_out})", cl["unstable_poles"] == n_out)
    chk.true(f"{name}: stable = {cl['stable']}", cl["stable"] == (n_out == 0))
    # dominant poles: each a root of the characteristic polynomial. numpy.roots of a degree
    # 300–900 polynomial whose roots crowd a circle: companion eigenvalues with a backward
    # error ~1e-15·‖coefficients‖, well-separated simple roots (spacing ~2π/D ≈ 1e-2): 1e-7
    # absolute is far above that and far below the spacing
    worst = 0.0
    for re, im in cl["poles"]:
        worst = max(worst, float(np.min(np.abs(roots - complex(re, im)))))
    chk.le(f"{name}: dominant poles are roots of the characteristic polynomial, abs", worst, 1e-7)
    top = float(np.max(mods))
    chk.le(f"{name}: the largest |z| is the first dominant pole, abs",
           abs(abs(complex(*cl["poles"][0])) - top), 1e-7)
    st = doc["step"]
    y = np.array(st["samples"], dtype=float)
    if n_out == 0:
        _, yr = sig.dlsim((ln, char, T), np.ones(len(y)))
        yr = np.ravel(yr)
        scale = max(1.0, float(np.max(np.abs(yr))))
        # the CLI: a structural recursion with a ring buffer; dlsim: a companion state space of
        # order 300+ (a shift register for the delay, exact) — both of low-order dynamics in
        # double precision on a stable loop: rounding ~1e-13; 1e-9 relative to the response
        chk.le(f"{name}: step vs dlsim of L/(1+L), rel", float(np.max(np.abs(y - yr))) / scale,
               1e-9)
        # the PI's pole at z = 1 makes the loop type 1: a stable loop settles at exactly 1
        # (zero steady-state error of integral action, e.g. Ogata, Discrete-Time Control
        # Systems). T(1) from the polynomials here would lose ~1e-10 to the cancellation at
        # z = 1; the tool's DC solve of a small closed loop: rounding, 1e-12
        chk.le(f"{name}: final value vs 1 (type-1 loop), abs", abs(st["final_value"] - 1.0),
               1e-12)
    else:
        chk.true(f"{name}: no final value for an unstable loop", st["final_value"] is None)
    return doc


def main():
    if len(sys.argv) != 2:
        print("usage: ref_delay.py path/to/loopwright-cli", file=sys.stderr)
        sys.exit(2)
    cli = sys.argv[1]
    chk = Checker()
    # an invented kiln: 1.5/((40 s + 1)(6 s + 1)), T = 0.5 s, PI in z, transport delay of
    # 150 s (300 samples); then the same with a fractional dead time, a gain twenty times
    # higher (unstable), and a longer delay of 450 s (900 samples)
    plant, num, den = "1.5/((40*s+1)*(6*s+1))", [1.5], np.polymul([40.0, 1.0], [6.0, 1.0])
    for name, tau, N, kp, steps in (("kiln, 300 samples", 150.0, 1, 0.05, 1500),
                                    ("kiln, 300.5 samples", 150.25, 1, 0.05, 1500),
                                    ("kiln, 300 samples, gain x20", 150.0, 1, 1.0, 400),
                                    ("kiln, 900 samples, N = 0", 450.0, 0, 0.02, 2500)):
        cz = f"{kp}*(z-0.995)/(z-1)"
        case(chk, cli, name, plant, num, den, 0.5, tau, N, cz, [kp, -kp * 0.995], [1.0, -1.0],
             steps)
    # a horizon shorter than the delay: the output has not moved, no figure is made of it
    doc = run(cli, ["--plant", plant, "--period", "0.5", "--dead-time", "150",
                    "--controller-z", "0.05*(z-0.995)/(z-1)", "--steps", "200", "--substeps", "0"])
    st = doc["step"]
    chk.true("horizon before the delay: every sample 0 (exact)", all(v == 0.0 for v in st["samples"]))
    chk.true("horizon before the delay: no overshoot, rise or settling figure",
             st["overshoot_pct"] is None and st["rise_time_s"] is None
             and st["settling_time_s"] is None)
    chk.finish()


if __name__ == "__main__":
    main()
