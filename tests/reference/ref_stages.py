#!/usr/bin/python3
# ref_stages.py — compensator stages through the whole product path (a design document read by
# `loopwright-cli analyze FILE.lwd --json`: document → stage → w → z → evaluation) against
# scipy, for the resonant stage (src/core/stages/lw-stage-resonant.c):
#
#   C(w) = (w² + 2ζz·ν0·w + ν0²)/(w² + 2ζp·ν0·w + ν0²),  ζz = width/(2ν0),
#          ζp = ζz·10^(−peak/20)
#
# evaluated here with scipy.signal.freqs on those polynomials, and mapped to z here with
# scipy.signal.bilinear (w = (2/T)(z−1)/(z+1) is scipy's s = 2·fs·(z−1)/(z+1) with fs = 1/T).
#
#   * Plant 1, a gain k and the stage: L(e^{jωT}) = k·C(jν) with ν = (2/T)·tan(ωT/2), so the
#     CLI's gain crossovers are the two ν where |C| = 1/k. Closed form (derived from the
#     definition: with x = (ν0² − ν²)/(ν0·ν), |C|² = (x² + 4ζz²)/(x² + 4ζp²), so |C| = Λ at
#     x² = 4(ζz² − Λ²ζp²)/(Λ² − 1); the two points satisfy ν1·ν2 = ν0² and ν2 − ν1 = ν0·|x|).
#     For Λ = √2 (3 dB above unity) and a very high peak ν2 − ν1 → 2ζz·ν0 = width.
#     Checked: crossovers against the closed form, |k·C| there from freqs, the phase margins
#     against 180° + arg(k·C) from freqs, and |C(jν0)| = 10^(peak/20) through the CLI (a gain
#     k slightly below 10^(−peak/20) puts the crossovers just either side of ν0).
#   * A motor-driven spindle of our own (invented numbers) with the stage rejecting a runout
#     disturbance: closed-loop poles against numpy.roots of the characteristic polynomial built
#     from scipy.signal.cont2discrete (ZOH) of the plant and bilinear of the stage.
#
# Usage: /usr/bin/python3 ref_stages.py path/to/loopwright-cli
#
# SPDX-License-Identifier: GPL-3.0-or-later

import json
import math
import os
import subprocess
import sys
import tempfile

import numpy as np
import scipy.signal as sig

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwref import Checker, match_roots, roots_of, wrap180  # noqa: E402


def resonant_tf(nu0, peak_db, width):
    zz = width / (2.0 * nu0)
    zp = zz * 10.0 ** (-peak_db / 20.0)
    return (np.array([1.0, 2.0 * zz * nu0, nu0 * nu0]),
            np.array([1.0, 2.0 * zp * nu0, nu0 * nu0]), zz, zp)


def document(plant, period, k, nu0, peak_db, width):
    return f"""<?xml version="1.0" encoding="UTF-8"?>
<design xmlns="urn:loopwright:design" version="1">
  <title>Resonant stage reference</title>
  <plant>{plant}</plant>
  <sampling period_s="{period!r}" hold="zero-order" compute_delay_samples="0"/>
  <variants active="a">
    <variant name="a">
      <gain ratio="{k!r}"/>
      <resonant label="runout" centre_rad_s="{nu0!r}" peak_db="{peak_db!r}" width_rad_s="{width!r}"/>
    </variant>
  </variants>
</design>
"""


def analyze(cli, text):
    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "resonant.lwd")
        with open(path, "w", encoding="utf-8") as f:
            f.write(text)
        print(f"# command: {cli} analyze {path} --json", flush=True)
        proc = subprocess.run([cli, "analyze", path, "--json"], capture_output=True, text=True,
                              timeout=120)
    if proc.returncode != 0:
        raise RuntimeError(f"CLI exited {proc.returncode}: {proc.stderr.strip()}")
    return json.loads(proc.stdout)


def level_points(nu0, zz, zp, lam):
    """The two ν where |C(jν)| = lam (closed form above)."""
    x = 2.0 * math.sqrt((zz * zz - lam * lam * zp * zp) / (lam * lam - 1.0))
    half = 0.5 * nu0 * x
    mid = math.sqrt(nu0 * nu0 + half * half)
    return mid - half, mid + half


def check_levels(chk, cli, name, T, nu0, peak_db, width, lam):
    b, a, zz, zp = resonant_tf(nu0, peak_db, width)
    k = 1.0 / lam
    js = analyze(cli, document("1", T, k, nu0, peak_db, width))
    omegas = np.array(js["loop"]["gain_crossovers_rad_s"], dtype=float)
    chk.true(f"{name}: two gain crossovers", len(omegas) == 2, f"{omegas}")
    if len(omegas) != 2:
        return
    nus = (2.0 / T) * np.tan(omegas * T / 2.0)
    want = level_points(nu0, zz, zp, lam)
    # Brent-refined crossovers of an exactly evaluated loop: 1e-9 relative (the w → z map
    # and the evaluation in z cost a few digits near the poles 2ζp·ν0 apart).
    for i in range(2):
        chk.le(f"{name}: crossover {i + 1} against the closed form ν = {want[i]:.6g}",
               abs(nus[i] - want[i]) / want[i], 1e-9)
    _, h = sig.freqs(b, a, worN=nus)
    chk.le(f"{name}: |k·C| at the crossovers (scipy.signal.freqs)",
           float(np.max(np.abs(np.abs(k * h) - 1.0))), 1e-9)
    pm = np.array(js["loop"]["phase_margins_deg"], dtype=float)
    want_pm = wrap180(180.0 + np.degrees(np.angle(k * h)))
    chk.le(f"{name}: phase margins against 180° + arg(k·C) (freqs)",
           float(np.max(np.abs(wrap180(pm - want_pm)))), 1e-7, " deg")
    return nus


def main():
    if len(sys.argv) != 2:
        print("usage: ref_stages.py path/to/loopwright-cli", file=sys.stderr)
        sys.exit(2)
    cli = sys.argv[1]
    chk = Checker()
    T = 0.002
    nu0, peak, width = 12.5, 20.0, 4.0
    try:
        print("== resonant: the points 3 dB above unity", flush=True)
        check_levels(chk, cli, "3 dB", T, nu0, peak, width, math.sqrt(2.0))
        print("== resonant: a very high peak; the 3 dB points are `width` apart", flush=True)
        nus = check_levels(chk, cli, "240 dB", T, nu0, 240.0, width, math.sqrt(2.0))
        if nus is not None:
            chk.le("240 dB: ν2 − ν1 against the width (1e-9: the peak's finite height adds "
                   "~1e-24)", abs((nus[1] - nus[0]) - width) / width, 1e-9)
        print("== resonant: the peak height through the loop", flush=True)
        # crossovers either side of ν0, 0.46 % apart (at 0.999 of the peak, 0.14 % apart, the
        # evaluation grid misses them: a loop barely above 1 in so narrow a band; noted)
        lam = 10.0 ** (peak / 20.0) * 0.99
        nus = check_levels(chk, cli, "peak", T, nu0, peak, width, lam)
        if nus is not None:
            chk.true("peak: crossovers either side of ν0", nus[0] < nu0 < nus[1],
                     f"{nus[0]:.9g} < {nu0} < {nus[1]:.9g}")

        print("== resonant: a spindle's closed-loop poles", flush=True)
        plant_num, plant_den = [40.0], [0.05, 1.0, 0.0]    # 40/(s(0.05 s + 1))
        k = 0.8
        js = analyze(cli, document("40/(s*(0.05*s+1))", T, k, nu0, peak, width))
        b, a, _, _ = resonant_tf(nu0, peak, width)
        bz, az = sig.bilinear(k * b, a, fs=1.0 / T)
        nP, dP, _ = sig.cont2discrete((plant_num, plant_den), T, method="zoh")
        nP = np.trim_zeros(np.atleast_1d(np.squeeze(nP)), "f")
        char = np.polyadd(np.polymul(dP, az), np.polymul(nP, bz))
        want = np.roots(char)
        got = roots_of(js["closed_loop"]["poles"])
        # poles near z = 1 from an expanded degree-4 polynomial: numpy.roots is good to
        # ~1e-10 here (condition of clustered roots); tolerance 1e-8 relative
        chk.le("spindle: closed-loop poles against numpy.roots (cont2discrete + bilinear)",
               match_roots(got, want), 1e-8)
        chk.true("spindle: stable", js["closed_loop"]["stable"] is True)
    except Exception as e:  # a crash is a failure, reported with the others
        chk.true("ran without error", False, repr(e))
    chk.finish()


if __name__ == "__main__":
    main()
