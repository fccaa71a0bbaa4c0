#!/usr/bin/python3
# ref_measured_nyquist.py — closed-loop stability judged on measured data
# (`loopwright-cli analyze --measured … --measured-unstable-poles P --json`, the Nyquist
# criterion of docs/measured-data.md) against numpy.roots of the characteristic polynomial.
#
# Three invented loops of higher order with whole-sample dead time, T = 10 ms, one sample of
# computation delay (the CLI's default): a type-1 axis with a lead, an open-loop unstable plant
# (P = 1) with a lead, and a lag with a lightly damped resonance under a PI controller. The
# data are the plant's exact ZOH equivalent (scipy.signal.cont2discrete) times z^-d on the unit
# circle (numpy.polyval) at 50 points per decade from 1e-3/T, with pi/T as the last point,
# written as a sampled table; the controller is given in z. Reference: the closed-loop poles,
# numpy.roots of den_C·den_P·z^(1+d) + num_C·num_P; Z = their number outside the unit circle.
# Each loop is swept through gains across its stability boundary; gains whose closed-loop poles
# lie within 1e-3 of the circle are skipped (the boundary itself). The verdict must be Z
# exactly, or "undecided" with `low_end` exactly where the rule says so (0.5 < |L| < 2 at the
# lowest point, computed here from the same data).
#
# Usage: /usr/bin/python3 ref_measured_nyquist.py path/to/loopwright-cli
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
from lwref import Checker  # noqa: E402

T = 0.01

# (name, plant num, plant den (s), dead time in samples, controller zeros, poles, P, gains)
LOOPS = [
    ("type-1 axis, lead, 2 samples dead time", [1.0], [1.0, 5.0, 0.0], 2, [0.95], [0.6], 0,
     np.geomspace(20, 40000, 14)),
    ("unstable plant (pole at s = 2), lead, 1 sample", [20.0], np.polymul([1, -2], [1, 10]), 1,
     [0.9], [0.5], 1, np.geomspace(0.05, 20, 14)),
    ("lag and resonance (400 rad/s^2, zeta 0.1), PI, 3 samples", [400.0],
     np.polymul([1, 1], [1, 4, 400]), 3, [0.98], [1.0], 0, np.geomspace(0.2, 5000, 14)),
]


def main():
    cli = sys.argv[1]
    ck = Checker()
    tmp = tempfile.mkdtemp(prefix="lw-ref-nyquist-")
    nyq = math.pi / T
    w = np.append(10 ** np.arange(math.log10(1e-3 / T), math.log10(nyq) - 1e-9, 1 / 50), nyq)
    for name, num, den, d, cz, cp, p_given, gains in LOOPS:
        bd, ad, _ = sig.cont2discrete((num, den), T, method="zoh")
        bd = np.trim_zeros(np.ravel(bd), "f")
        ad = np.ravel(ad)
        # the plant with z^-d on the unit circle (num and den in descending powers of z)
        zw = np.exp(1j * w * T)
        hp = np.polyval(bd, zw) / np.polyval(ad, zw) / zw ** d
        path = os.path.join(tmp, "data.csv")
        with open(path, "w") as f:
            f.write("frequency_rad_s,real,imag\n")
            for wi, hi in zip(w, hp):
                f.write(f"{wi!r},{hi.real!r},{hi.imag!r}\n")
        # P, counted here from the plant's poles (the controller's are on or inside the circle;
        # a pole at z = 1 comes out of the ZOH within rounding of the circle: 1e-9)
        p_count = int(np.sum(np.abs(np.roots(ad)) > 1 + 1e-9))
        ck.true(f"{name}: P = {p_given}", p_count == p_given, f"numpy counts {p_count}")
        seen = set()
        for g in gains:
            nc = g * np.poly(cz)
            dc = np.poly(cp)
            char = np.polyadd(np.polymul(np.polymul(dc, ad), np.r_[1.0, np.zeros(1 + d)]),
                              np.polymul(nc, bd))
            r = np.abs(np.roots(char))
            if np.min(np.abs(r - 1)) < 1e-3:
                continue
            z_ref = int(np.sum(r > 1))
            zz = np.exp(1j * w[0] * T)
            l0 = abs(np.polyval(nc, zz) / np.polyval(dc, zz) * hp[0] / zz)
            ctrl = f"{g!r}*(z-{cz[0]!r})/(z-{cp[0]!r})"
            cmd = [cli, "analyze", "--measured", path, "--measured-kind", "sampled", "--period",
                   repr(T), "--controller-z", ctrl, "--measured-unstable-poles", str(p_given),
                   "--json"]
            pr = subprocess.run(cmd, capture_output=True, text=True, timeout=120)
            if pr.returncode != 0:
                ck.true(f"{name}, gain {g:.4g}: analyze ran", False, pr.stderr.strip())
                continue
            m = json.loads(pr.stdout)["measured"]
            if 0.5 < l0 < 2:
                ck.true(f"{name}, gain {g:.4g}: |L| = {l0:.3g} at the lowest point: undecided",
                        m["stability"] == "undecided"
                        and m["stability_undecided_because"] == ["low_end"], m["stability_note"])
                continue
            want = "stable" if z_ref == 0 else "unstable"
            ck.true(f"{name}, gain {g:.4g}: {want}, Z = {z_ref} (numpy.roots)",
                    m["stability"] == want and m["closed_loop_unstable_poles"] == z_ref,
                    f"got {m['stability']}, Z = {m['closed_loop_unstable_poles']}")
            seen.add(want)
        ck.true(f"{name}: the sweep crosses the boundary", seen == {"stable", "unstable"},
                str(sorted(seen)))
    ck.finish()


if __name__ == "__main__":
    main()
