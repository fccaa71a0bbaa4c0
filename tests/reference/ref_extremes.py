#!/usr/bin/python3
# ref_extremes.py — a property test of `loopwright-cli analyze --json` at the extremes, against
# the zero-order-hold loop computed here in mpmath (tests/reference/lwzoh.py: partial fractions,
# 50 digits plus what clustered poles cost, checked against 20 digits more).
#
# Seeded random plants: orders 1–40, relative degree 1 … order, leading gains from about 1e-40
# to 1e40 (set from a crossover frequency drawn over the loop's whole range, times a factor up
# to 1e±20 for a fifth of them), sample periods 1e-6 … 1e3 times the plant's time constants
# (poles near z = 1 when sampling fast), real poles, lightly and well damped pairs, clusters of
# close poles, an integrator or a zero at s = 0 now and then, zeros in both half-planes, whole
# and fractional dead time, computation delay 0–2. Controller 1.
#
# For each loop the reference finds every crossover on a dense scan (log-spaced from well below
# the slowest corner — further with an integrator — to π/T, plus points around light damping,
# towards π/T, and every 1/(TD) rad/s for a delay of D samples), refines it with mp.findroot,
# and checks:
#   * every reference gain crossover, and every phase crossover where |L| is within 120 dB of 1,
#     is listed by the CLI (1e-6 relative) or lies in a band the CLI marks unresolved: nothing
#     missed at the low end or at the Nyquist end;
#   * at the listed ones: phase margin within 1e-4°, gain margin within 1e-4 dB (the brief's
#     tolerances; within 120 dB of 1);
#   * every crossover the CLI lists is real: it matches a reference crossover or mp.findroot
#     started at it converges to it (1e-6 relative): no invented crossover.
# Default 40 loops (about a minute on one core); LW_EXTREMES_COUNT=N for more,
# LW_EXTREMES_SEED=S for another draw.
#
# Usage: /usr/bin/python3 ref_extremes.py path/to/loopwright-cli
#
# SPDX-License-Identifier: GPL-3.0-or-later

import math
import os
import random
import sys

import mpmath as mp
import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwref import Checker, _num, model_eval, model_of, poly_text, run_analyze, wrap180  # noqa: E402
from lwzoh import ZohLoop  # noqa: E402

TOL_W = 1e-6          # crossover frequency, relative (the brief)
TOL_DEG = 1e-4        # phase margin, degrees (the brief)
TOL_DB = 1e-4         # gain margin, dB (the brief)
RANGE_DB = 120.0      # phase crossovers checked for presence where |L| is within this of 1
TOL_FORM = 1e-6       # plant_z / plant_w against the plant, relative, unless marked (the brief)


def draw_plant(rng):
    """Returns (leading gain, zeros, poles, text factors) with roots as exact Python floats."""
    n = max(1, min(40, int(round(math.exp(rng.uniform(0.0, math.log(40.0)))))))
    r = rng.randint(1, n)
    m = n - r
    tau0 = 10.0 ** rng.uniform(-3, 3)           # the plant's time scale, s
    poles, pfac = [], []

    def corner():
        return 10.0 ** rng.uniform(-2.0, 2.0) / tau0

    k = n
    if rng.random() < 0.25 and k > 0:
        poles.append(0.0)
        pfac.append([1.0, 0.0])
        k -= 1
    while k > 0:
        u = rng.random()
        if u < 0.35 and k >= 2:
            wn = corner()
            zeta = 10.0 ** rng.uniform(-1.7, -0.05)
            a, b = float(2 * zeta * wn), float(wn * wn)
            pfac.append([1.0, a, b])
            k -= 2
        elif u < 0.5 and k >= 3:
            # a cluster of three real poles 1e-3 … 1e-2 apart (relative)
            a0 = corner()
            sp = 10.0 ** rng.uniform(-3, -2)
            for j in range(3):
                pfac.append([1.0, float(a0 * (1 + sp * j))])
            k -= 3
        else:
            a = corner()
            if rng.random() < 0.05:
                a = -a * 0.3                     # a mildly unstable pole now and then
            pfac.append([1.0, float(a)])
            k -= 1
    zfac = []
    k = m
    if rng.random() < 0.08 and k > 0 and not poles:
        zfac.append([1.0, 0.0])
        k -= 1
    while k > 0:
        if rng.random() < 0.3 and k >= 2:
            wn = corner()
            zeta = rng.uniform(-0.5, 0.9)
            zfac.append([1.0, float(2 * zeta * wn), float(wn * wn)])
            k -= 2
        else:
            a = corner() * (1 if rng.random() < 0.8 else -1)
            zfac.append([1.0, float(a)])
            k -= 1
    return n, r, tau0, zfac, pfac


def roots_mp(factors):
    out = []
    for f in factors:
        if len(f) == 2:
            out.append(-mp.mpf(f[1]))
        else:
            a, b = mp.mpf(f[1]), mp.mpf(f[2])
            d = mp.sqrt(a * a / 4 - b + 0j)
            out += [-a / 2 + d, -a / 2 - d]
    return out


def cont_mag(gain, zs, ps, w):
    s = mp.mpc(0, w)
    v = mp.mpf(gain)
    for z in zs:
        v *= s - z
    for p in ps:
        v /= s - p
    return abs(v)


class Case:
    def __init__(self, rng, idx):
        self.idx = idx
        with mp.workdps(40):
            n, r, tau0, zfac, pfac = draw_plant(rng)
            self.n, self.r = n, r
            self.zs, self.ps = roots_mp(zfac), roots_mp(pfac)
            self.T = float(tau0 * 10.0 ** rng.uniform(-6, 3))
            wn = math.pi / self.T
            corners = [float(abs(x)) for x in self.zs + self.ps if x != 0]
            lo = min(corners + [wn]) / 10
            # leading gain so that |P(jω_c)| = 1 at a crossover drawn over the loop's range
            wc = 10.0 ** rng.uniform(math.log10(lo), math.log10(wn))
            g = 1 / cont_mag(1, self.zs, self.ps, wc)
            if rng.random() < 0.2:
                g *= mp.mpf(10) ** rng.uniform(-20, 20)
            g *= 10.0 ** rng.uniform(-0.5, 0.5)
            self.gain = float(g)
        u = rng.random()
        if u < 0.3:
            self.dead = _num(self.T * rng.randint(1, 20))
        elif u < 0.6:
            self.dead = _num(self.T * (rng.randint(0, 20) + rng.uniform(0.05, 0.95)))
        else:
            self.dead = "0"
        self.N = rng.choice([0, 1, 1, 2])
        if self.N == 0 and self.dead == "0" and r == 0:
            self.N = 1
        num = "".join(f"*({poly_text(f, 's')})" for f in zfac)
        den = "*".join(f"({poly_text(f, 's')})" for f in pfac)
        self.text = f"{_num(self.gain)}{num}/({den})"
        self.loop = ZohLoop(_num(self.gain), self.zs, self.ps, _num(self.T), self.dead, self.N,
                            dps=50)
        self.n_int = sum(1 for p in self.ps if p == 0) - sum(1 for z in self.zs if z == 0)

    def describe(self):
        return (f"loop {self.idx}: order {self.n}, relative degree {self.r}, gain "
                f"{self.gain:.3g}, T {self.T:.3g} s, dead time {self.dead} s, N {self.N}")


def scan(case):
    """Reference brackets of gain and phase crossovers on a dense grid (30 + extra digits)."""
    lp = case.loop
    wn = math.pi / case.T
    corners = [float(abs(x)) for x in case.zs + case.ps if x != 0]
    lo = min(corners + [wn]) / 1000
    with mp.workdps(lp.dps):
        if case.n_int != 0:
            for _ in range(60):
                m = abs(lp.L(lo))
                if (case.n_int > 0 and m > 1e3) or (case.n_int < 0 and m < 1e-3):
                    break
                lo /= 10
    g = list(np.logspace(math.log10(lo), math.log10(wn), 700))
    for x in case.ps + case.zs:
        if x == 0:
            continue
        w0, zeta = float(abs(x)), float(-mp.re(x) / abs(x))
        if abs(zeta) < 0.3 and w0 < wn:
            g += list(w0 * (1 + max(abs(zeta), 1e-4) * np.linspace(-8, 8, 60)))
    g += [wn * (1 - 10.0 ** -k) for k in np.arange(0.5, 12.5, 0.5)]
    D = lp.N + lp.d + float(lp.theta / lp.T)
    if D > 0:
        step = 0.5 / (case.T * D)
        w_from = max(lo, 0.5 / (case.T * D * (math.log(wn / lo) / 700)))
        if w_from < wn:
            cnt = min(4000, int((wn - w_from) / step) + 1)
            g += list(np.linspace(w_from, wn, cnt))
    grid = np.unique(np.array([w for w in g if lo <= w <= wn]))
    grid[-1] = wn
    with mp.workdps(lp.dps):
        vals = [lp.L(w) for w in grid[:-1]] + [lp.L(mp.pi / lp.T)]
    mag = np.array([float(mp.log(abs(v))) if v != 0 else -np.inf for v in vals])
    ph = np.unwrap(np.array([float(mp.arg(v)) for v in vals]))
    gb = [(grid[i], grid[i + 1]) for i in range(len(grid) - 1)
          if np.isfinite(mag[i]) and np.isfinite(mag[i + 1]) and (mag[i] > 0) != (mag[i + 1] > 0)]
    k = np.floor((ph + math.pi) / (2 * math.pi))
    pb = [(grid[i], grid[i + 1]) for i in range(len(grid) - 2) if k[i] != k[i + 1]]
    # the last interval ends at π/T where L is real: a crossover exactly there is handled apart
    last = vals[-1]
    nyq = bool(mp.re(last) < 0 and abs(mp.im(last)) <= abs(last) * mp.mpf(10) ** -20)
    if len(grid) >= 2 and k[-2] != k[-1] and not nyq:
        pb.append((grid[-2], grid[-1]))
    return gb, pb, nyq, grid[0]


def refine(lp, f, a, b):
    """A root of f in [a, b]: a sign change of f where f is continuous (the ends less than π
    apart — arg(−L) jumps by 2π where L is positive real), narrowed on 64 subdivisions when
    needed, then mp.findroot. None when there is none."""
    with mp.workdps(lp.dps):
        a, b = mp.mpf(a), mp.mpf(b)
        for _ in range(4):
            fa, fb = f(a), f(b)
            if fa * fb <= 0 and abs(fa - fb) < mp.pi:
                for solver in ("anderson", "illinois", "bisect"):
                    try:
                        r = mp.findroot(f, (a, b), solver=solver, tol=mp.mpf(10) ** -60,
                                        maxsteps=400, verify=False)
                    except (ValueError, ZeroDivisionError):
                        continue
                    # 1e-20 relative in ω is far below every tolerance checked here
                    if a <= r <= b and abs(f(r)) < mp.mpf(10) ** -20:
                        return r
                return None
            xs = [a + (b - a) * i / 64 for i in range(65)]
            fs = [f(x) for x in xs]
            cand = [i for i in range(64)
                    if fs[i] * fs[i + 1] <= 0 and abs(fs[i] - fs[i + 1]) < mp.pi]
            if not cand:
                return None
            a, b = xs[cand[0]], xs[cand[0] + 1]
        return None


def fgain(lp):
    return lambda w: mp.log(abs(lp.L(w)))


def fphase(lp):
    return lambda w: mp.arg(-lp.L(w))


def in_bands(bands, w):
    # a band runs from its first to its last unresolved grid point; the crossover may sit up
    # to the neighbouring resolved point, a grid step (< 5 %) away
    return any(lo / 1.05 <= w <= hi * 1.05 for lo, hi in bands)


def check_case(chk, cli, case):
    tag = f"loop {case.idx}"
    print("# " + case.describe(), flush=True)
    try:
        js = run_analyze(cli, case.text, case.T, compute_delay=case.N, dead_time=case.dead,
                         steps=2)
    except RuntimeError as e:
        # the tool may refuse a loop (exit 2, the option named); a failure to factor the
        # sampled plant for display (exit 1, issue 11's plant_z item, not this test's subject)
        # is reported as a note and the loop skipped
        msg = str(e)
        if "could not factor the sampled plant" in msg:
            print(f"# NOTE {tag}: skipped, the display factorization failed: {msg}", flush=True)
            return
        chk.true(f"{tag}: refused with a message naming --plant", "exited 2" in msg
                 and "--plant" in msg, msg)
        return
    lp_js = js["loop"]
    gcs = [float(x) for x in lp_js["gain_crossovers_rad_s"]]
    pms = [float(x) for x in lp_js["phase_margins_deg"]]
    pcs = [float(x) for x in lp_js["phase_crossovers_rad_s"]]
    gms = [float(x) for x in lp_js["gain_margins_db"]]
    bands = [tuple(b) for b in lp_js["unresolved_bands_rad_s"]]
    lp = case.loop
    wn = math.pi / case.T
    gb, pb, nyq, wlo = scan(case)
    print(f"# {tag}: CLI {len(gcs)} gain / {len(pcs)} phase crossovers, {len(bands)} unresolved "
          f"band(s); reference {len(gb)} / {len(pb) + nyq}", flush=True)
    chk.true(f"{tag}: lists ascending", all(a < b for a, b in zip(gcs, gcs[1:]))
             and all(a < b for a, b in zip(pcs, pcs[1:])))

    # the factored plant_z and plant_w: the plant to 1e-6 relative at random points on the
    # unit circle (and the matching w = j(2/T)tan(ωT/2)), or marked ill-conditioned by a
    # plant_*_form_error above 1e-6, or null: not verifiable (docs/cli.md)
    rng = random.Random(case.idx)
    marked_z = js.get("plant_z_form_error")
    marked_w = js.get("plant_w_form_error")
    mz, mw = model_of(js["plant_z"]), model_of(js["plant_w"])
    worst_z = worst_w = 0.0
    with mp.workdps(lp.dps):
        peak = 0.0
        pts = []
        for _ in range(5):
            w = wn * 10 ** rng.uniform(-3, math.log10(0.999))
            ref = lp.core(w) * mp.exp(-mp.mpc(0, 1) * mp.mpf(w) * lp.T * lp.d) / lp.k * mp.mpf(_num(case.gain))
            pts.append((w, complex(ref)))
            peak = max(peak, abs(complex(ref)))
    for w, ref in pts:
        if not abs(ref) > 1e-9 * peak:
            continue
        z = complex(math.cos(w * case.T), math.sin(w * case.T))
        wv = complex(0, (2 / case.T) * math.tan(w * case.T / 2))
        worst_z = max(worst_z, abs(complex(model_eval(mz, z)) - ref) / abs(ref))
        worst_w = max(worst_w, abs(complex(model_eval(mw, wv)) - ref) / abs(ref))
    chk.true(f"{tag}: plant_z is the plant to {TOL_FORM:g} or marked ill-conditioned "
             f"(worst {worst_z:.2g}, marked {marked_z})",
             worst_z <= TOL_FORM or marked_z is None or marked_z > TOL_FORM)
    chk.true(f"{tag}: plant_w is the plant to {TOL_FORM:g} or marked ill-conditioned "
             f"(worst {worst_w:.2g}, marked {marked_w})",
             worst_w <= TOL_FORM or marked_w is None or marked_w > TOL_FORM)

    # reference crossovers
    ref_gc = [r for r in (refine(lp, fgain(lp), a, b) for a, b in gb) if r is not None]
    ref_pc = [r for r in (refine(lp, fphase(lp), a, b) for a, b in pb) if r is not None]
    if nyq:
        ref_pc.append(mp.pi / lp.T)

    def near(x, lst):
        return min((abs(float(x) - float(y)) / float(y) for y in lst), default=math.inf)

    # nothing missed
    for r in ref_gc:
        ok = near(r, gcs) <= TOL_W or in_bands(bands, float(r))
        chk.true(f"{tag}: reference gain crossover {float(r):.10g} listed or marked", ok,
                 f"CLI {gcs}, bands {bands}")
    for r in ref_pc:
        with mp.workdps(lp.dps):
            db = float(20 * mp.log10(abs(lp.L(r))))
        if abs(db) > RANGE_DB:
            continue
        ok = near(r, pcs) <= TOL_W or in_bands(bands, float(r))
        chk.true(f"{tag}: reference phase crossover {float(r):.10g} ({db:.1f} dB) listed or "
                 f"marked", ok, f"CLI {pcs}, bands {bands}")

    # nothing invented, and the margins at the listed ones
    for w, pm in zip(gcs, pms):
        if near(w, ref_gc) <= TOL_W:
            r = min(ref_gc, key=lambda y: abs(float(y) - w))
        else:
            r = refine(lp, fgain(lp), w * (1 - TOL_W), w * (1 + TOL_W))
            if r is None or abs(float(r) - w) / w > TOL_W:
                chk.true(f"{tag}: listed gain crossover {w:.10g} is real", False)
                continue
        with mp.workdps(lp.dps):
            pm_ref = float(wrap180(float(180 + mp.arg(lp.L(r)) * 180 / mp.pi)))
        chk.le(f"{tag}: w_gc {w:.10g}", abs(float(r) - w) / w, TOL_W)
        d = abs(float(wrap180(pm - pm_ref)))
        chk.le(f"{tag}: PM at {w:.6g}", d, TOL_DEG, " deg")
    for w, gm in zip(pcs, gms):
        if w == wn:
            r = mp.pi / lp.T
            if not nyq:
                chk.true(f"{tag}: listed phase crossover at pi/T is real", False,
                         f"L(pi/T) = {mp.nstr(lp.L(r), 5)}")
                continue
        elif near(w, ref_pc) <= TOL_W:
            r = min(ref_pc, key=lambda y: abs(float(y) - w))
        else:
            r = refine(lp, fphase(lp), w * (1 - TOL_W), w * (1 + TOL_W))
            if r is None or abs(float(r) - w) / w > TOL_W:
                with mp.workdps(lp.dps):
                    detail = (f"reference phase there {float(mp.arg(lp.L(w)) * 180 / mp.pi):.2f}"
                              f" deg, |L| {float(20 * mp.log10(abs(lp.L(w)))):.1f} dB")
                chk.true(f"{tag}: listed phase crossover {w:.10g} is real", False, detail)
                continue
        with mp.workdps(lp.dps):
            gm_ref = float(-20 * mp.log10(abs(lp.L(r))))
        chk.le(f"{tag}: w_pc {w:.10g}", abs(float(r) - w) / w, TOL_W)
        if abs(gm_ref) <= RANGE_DB:
            chk.le(f"{tag}: GM at {w:.6g}", abs(gm - gm_ref), TOL_DB, " dB")


def main():
    cli = sys.argv[1]
    count = int(os.environ.get("LW_EXTREMES_COUNT", "40"))
    seed = int(os.environ.get("LW_EXTREMES_SEED", "20261203"))
    rng = random.Random(seed)
    chk = Checker()
    print(f"# {count} loops, seed {seed}", flush=True)
    for i in range(count):
        case = Case(rng, i)
        check_case(chk, cli, case)
    chk.finish()


if __name__ == "__main__":
    main()
