#!/usr/bin/python3
# ref_simulate.py — checks the time-domain verification of `loopwright-cli analyze --json`
# (docs/simulation.md) against references computed here with scipy/numpy from Debian:
#   1. step.continuous (the continuous plant output between samples) against
#      scipy.signal.lsim of the continuous plant driven by the JSON step.actuator sequence,
#      held (ZOH) and delayed by τ, on the same fine grid t = jT/M (every switching instant
#      kT + τ is a grid point in the cases below); lsim with interp=False steps with the
#      matrix exponential and is exact for a piecewise-constant input. Whole and fractional τ.
#   2. disturbance.input_step and disturbance.output_step against scipy.signal.dlsim of the
#      closed-loop transfer functions P/(1 + L) and 1/(1 + L), L = z^−N C P, built here from
#      this script's own exact ZOH of the plant (scipy.linalg.expm; fractional dead time by the
#      modified-z state space) and the controller's polynomials.
#   3. the limited loop (--saturation, with and without --anti-windup) against a plain Python
#      re-simulation of the same clipped loop written here from docs/simulation.md: plant
#      state space, delay line, PI in parallel form, the clamping rule.
#
# Usage: /usr/bin/python3 ref_simulate.py path/to/loopwright-cli
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


def cont_ss(num, den):
    a, b, c, d = sig.tf2ss(num, den)
    return a, b, c, d


def zoh_blocks(a, b, h):
    """Φ(h), Γ(h) from the exponential of the augmented matrix."""
    n = a.shape[0]
    m = np.zeros((n + 1, n + 1))
    m[:n, :n] = a * h
    m[:n, n:] = b * h
    e = sla.expm(m)
    return e[:n, :n], e[:n, n:]


def sampled_plant(num, den, T, tau):
    """Exact ZOH state space with input dead time τ = dT + θ: returns (A, B, C, D, d).
    θ > 0: x+ = Φ(T)x + Φ(T−θ)Γ(θ)v + Γ(T−θ)u, v+ = u, y = Cx + Dv (modified z-transform)."""
    a, b, c, d = cont_ss(num, den)
    n = a.shape[0]
    dw = int(np.floor(tau / T + 1e-9))
    th = tau - dw * T
    if th < 1e-9 * T:
        phi, gam = zoh_blocks(a, b, T)
        return phi, gam, c, d, dw
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
    return A, B, C, np.zeros((1, 1)), dw


def plant_tf_z(num, den, T, tau):
    """P(z) = N(z)/D(z) including z^−d, as numpy polynomials (descending)."""
    A, B, C, D, dw = sampled_plant(num, den, T, tau)
    n, d = sig.ss2tf(A, B, C, D)
    n = np.atleast_1d(np.squeeze(n))
    d = np.atleast_1d(np.squeeze(d))
    d = np.concatenate([d, np.zeros(dw)])
    return n, d


def check_continuous(chk, cli, name, plant, num, den, T, tau, M, extra):
    doc = run(cli, ["--plant", plant, "--period", repr(T), "--dead-time", repr(tau),
                    "--substeps", str(M)] + extra)
    st = doc["step"]
    u = np.array(st["actuator"], dtype=float)
    yc_cli = np.array(st["continuous"]["y"], dtype=float)
    t_cli = np.array(st["continuous"]["t_s"], dtype=float)
    n = len(u)
    h = T / M
    off = int(round(tau / h))
    assert abs(off * h - tau) <= 1e-12 * max(tau, 1.0), "τ must be a whole number of T/M here"
    j = np.arange((n - 1) * M + 1)
    t = j * h
    k = np.floor_divide(j - off, M)                 # held sample reaching the plant at t_j
    uc = np.where(k >= 0, u[np.clip(k, 0, n - 1)], 0.0)
    _, yref, _ = sig.lsim((num, den), uc, t, interp=False)
    scale = max(1.0, float(np.max(np.abs(yref))))
    chk.true(f"{name}: {len(yc_cli)} continuous points", len(yc_cli) == len(t))
    # times j·T/M: the CLI computes kT + iT/M, here jT/M; equal to a few ulps
    chk.le(f"{name}: continuous times vs j*T/M, abs", float(np.max(np.abs(t_cli - t))), 1e-12)
    # both exact up to rounding (matrix exponential steps); (n−1)·M ≈ 6000–10000 steps
    # accumulate ~1e-12 relative: 1e-9 relative to the response's size
    chk.le(f"{name}: continuous output vs lsim of the held, delayed actuator (tau={tau}), rel",
           float(np.max(np.abs(yc_cli - yref))) / scale, 1e-9)
    # the ripple as defined in docs/simulation.md, recomputed from the reference
    y = np.array(st["samples"], dtype=float)
    kk = np.minimum(j // M, n - 1)
    i = j % M
    line = y[kk] + np.where(i > 0, (y[np.minimum(kk + 1, n - 1)] - y[kk]) * i / M, 0.0)
    ripple = float(np.max(np.abs(yref - line)))
    chk.le(f"{name}: intersample ripple vs its definition on the reference, abs",
           abs(st["intersample_ripple"] - ripple), 1e-9 * scale)
    return doc


def check_disturbances(chk, name, doc, num, den, T, tau, N, cnum, cden):
    """dlsim of P S and S against the CLI's disturbance responses (unit steps at k = 0)."""
    np_, dp = plant_tf_z(num, den, T, tau)
    zN = np.concatenate([[1.0], np.zeros(N)])
    char = np.polyadd(np.polymul(zN, np.polymul(cden, dp)), np.polymul(cnum, np_))
    s_num = np.polymul(zN, np.polymul(cden, dp))        # S = 1/(1 + L)
    ps_num = np.polymul(zN, np.polymul(cden, np_))      # P S
    for key, tnum in (("output_step", s_num), ("input_step", ps_num)):
        y = np.array(doc["disturbance"][key]["samples"], dtype=float)
        _, yr = sig.dlsim((tnum, char, T), np.ones(len(y)))
        yr = np.ravel(yr)
        scale = max(1.0, float(np.max(np.abs(yr))))
        # two double-precision linear recursions of low order (<= 6) on a stable loop:
        # rounding ~1e-13; 1e-9 relative to the response's size
        chk.le(f"{name}: disturbance.{key} vs dlsim of the closed loop, rel",
               float(np.max(np.abs(y - yr))) / scale, 1e-9)
        e = -yr
        u = np.array(doc["disturbance"][key]["actuator"], dtype=float)
        ix = doc["disturbance"][key]["indices"]
        for ikey, ref in (("iae", T * np.sum(np.abs(e))), ("ise", T * np.sum(e * e)),
                          ("itae", T * np.sum(np.arange(len(e)) * T * np.abs(e))),
                          ("control_effort", T * np.sum(u * u))):
            chk.le(f"{name}: disturbance.{key}.indices.{ikey} vs sums over the samples, rel",
                   abs(ix[ikey] - ref) / max(abs(ref), 1e-300), 1e-9)


def resimulate_pi(num, den, T, tau, N, kp, ki, lo, hi, anti_windup, n, r=1.0):
    """Plain re-simulation of docs/simulation.md with C(z) = kp + ki/(z − 1)."""
    A, B, C, D, dw = sampled_plant(num, den, T, tau)
    x = np.zeros((A.shape[0], 1))
    xi = 0.0
    comp = [0.0] * N          # computation delay line (limited outputs)
    dead = [0.0] * dw         # whole samples of dead time
    ys, us, sat_count, held = [], [], 0, 0
    for k in range(n):
        a = comp[0] if N > 0 else None
        if dw > 0:
            ud = dead[0]
        else:
            ud = a
        y = float((C @ x)[0, 0] + D[0, 0] * ud)
        e = r - y
        v = kp * e + xi
        s = min(max(v, lo), hi)
        if N > 0:
            comp = comp[1:] + [s]
        else:
            a = s
        if dw > 0:
            dead = dead[1:] + [a]
        sat = s != v
        sat_count += sat
        hold = anti_windup and sat and ((v > s and e > 0) or (v < s and e < 0))
        held += hold
        if not hold:
            xi += ki * e
        x = A @ x + B * ud
        ys.append(y)
        us.append(a)
    return np.array(ys), np.array(us), sat_count, held


def main():
    if len(sys.argv) != 2:
        print("usage: ref_simulate.py path/to/loopwright-cli", file=sys.stderr)
        sys.exit(2)
    cli = sys.argv[1]
    chk = Checker()

    # 1 + 2: an invented lightly damped positioning stage with a PI in z, whole and fractional
    # dead time, and a biproper plant (output jumps at the switching instants)
    cases = [
        ("resonant, whole tau", "100/(s^2+2*s+100)", [100.0], [1.0, 2.0, 100.0],
         0.02, 0.04, 20, 1, "0.2*(z-0.8)/(z-1)", [0.2, -0.16], [1.0, -1.0]),
        ("resonant, fractional tau", "100/(s^2+2*s+100)", [100.0], [1.0, 2.0, 100.0],
         0.02, 0.033, 20, 1, "0.2*(z-0.8)/(z-1)", [0.2, -0.16], [1.0, -1.0]),
        ("biproper, fractional tau", "(s+3)/(s+1)", [1.0, 3.0], [1.0, 1.0],
         0.1, 0.04, 10, 0, "0.5*(z-0.5)/(z-1)", [0.5, -0.25], [1.0, -1.0]),
        ("first order, no dead time", "5/(2*s+1)", [5.0], [2.0, 1.0],
         0.05, 0.0, 25, 1, "(z-0.9)/(z-1)", [1.0, -0.9], [1.0, -1.0]),
    ]
    for (name, plant, num, den, T, tau, M, N, cz, cnum, cden) in cases:
        doc = check_continuous(chk, cli, name, plant, num, den, T, tau, M,
                               ["--compute-delay", str(N), "--controller-z", cz, "--steps", "400"])
        check_disturbances(chk, name, doc, num, den, T, tau, N, np.array(cnum), np.array(cden))

    # 1 with limits: the continuous output follows the clipped actuator just the same
    check_continuous(chk, cli, "pump loop limited, fractional tau", "5/(2*s+1)", [5.0],
                     [2.0, 1.0], 0.05, 0.0125, 20,
                     ["--compute-delay", "1", "--controller-z", "(z-0.9)/(z-1)",
                      "--saturation", "0:0.5", "--steps", "300"])

    # 3: the invented pump pressure loop of tests/core/test-simulate.c, P(s) = 5/(2s + 1),
    # C(z) = (z − 0.9)/(z − 1) = 1 + 0.1/(z − 1), pump command limited to 0 … 0.5 (a unit
    # setpoint needs 0.2 in steady state, the first samples ask for more)
    for tau in (0.0, 0.013):
        for aw in (False, True):
            args = ["--plant", "5/(2*s+1)", "--period", "0.05", "--dead-time", repr(tau),
                    "--compute-delay", "1", "--controller-z", "(z-0.9)/(z-1)",
                    "--saturation", "0:0.5", "--steps", "400", "--substeps", "0"]
            if aw:
                args.append("--anti-windup")
            doc = run(cli, args)
            st = doc["step"]
            y = np.array(st["samples"], dtype=float)
            u = np.array(st["actuator"], dtype=float)
            yr, ur, nsat, nheld = resimulate_pi([5.0], [2.0, 1.0], 0.05, tau, 1, 1.0, 0.1,
                                                0.0, 0.5, aw, len(y))
            label = f"pump loop, tau={tau}, {'clamping' if aw else 'windup'}"
            # the same operations in another realization (parallel PI, scipy's state space):
            # rounding ~1e-15 per sample, no clipping decision near its edge: 1e-12 absolute
            # for outputs of order 1
            chk.le(f"{label}: step.samples vs plain re-simulation, abs",
                   float(np.max(np.abs(y - yr))), 1e-12)
            chk.le(f"{label}: step.actuator vs plain re-simulation, abs",
                   float(np.max(np.abs(u - ur))), 1e-12)
            chk.true(f"{label}: actuator within 0 … 0.5",
                     bool(np.all(u >= 0.0) and np.all(u <= 0.5)))
            chk.true(f"{label}: saturated samples {st['saturated_samples']} = {nsat}",
                     st["saturated_samples"] == nsat and nsat > 0)
            chk.true(f"{label}: held samples {st['held_samples']} = {nheld}",
                     st["held_samples"] == nheld and (nheld > 0) == aw)
    chk.finish()


if __name__ == "__main__":
    main()
