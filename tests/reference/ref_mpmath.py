#!/usr/bin/python3
# ref_mpmath.py — the accuracy case: `loopwright-cli analyze --json` on a 10th-order plant
# whose sampled poles cluster near z = 1 (T = 0.01 s, modes at 20–80 rad/s), against a
# 50-digit reference computed here with mpmath:
#   * the continuous state space built from the factored plant as a series of real first and
#     second-order sections (exact decimal inputs, mpmath arithmetic);
#   * the zero-order hold from mpmath.expm of the augmented matrix [[A, B], [0, 0]]·T
#     (Φ = e^{AT}, Γ = ∫_0^T e^{Aη}dη B);
#   * L(e^{jωT}) = e^{-jNωT}·C(w(z))·C_p (zI − Φ)^{-1} Γ with mpmath.lu_solve, the w-plane
#     controller substituted exactly, w = (2/T)(z−1)/(z+1);
#   * each crossover refined with mpmath.findroot starting from the CLI's value;
#   * a dense grid (modal form of Φ from mpmath.eig, checked against lu_solve) to count the
#     crossovers the loop really has.
# Then the same for an order-2 version of the plant, and a demonstration that evaluating the
# expanded z-polynomial in float64 (numpy.polyval) does not reach 1e-9 on this case, so the
# comparison above is sensitive to the evaluation method.
#
# Usage: /usr/bin/python3 ref_mpmath.py path/to/loopwright-cli
#
# SPDX-License-Identifier: GPL-3.0-or-later

import math
import os
import sys

import mpmath as mp
import numpy as np
import scipy.optimize as sopt
import scipy.signal as sig

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwref import Checker, Factored, run_analyze, wrap180  # noqa: E402

mp.mp.dps = 50

# ---- the case (invented for this test) ------------------------------------------------------
T_S = "0.01"                     # sample period, s
N_DELAY = 1                      # computation delay, samples
# lightly damped modes (ω rad/s, ζ) and one real lag; with the integrator the order is 10
MODES = [("20", "0.3"), ("35", "0.2"), ("55", "0.1"), ("80", "0.05")]
LAG = "50"                       # rad/s
K_LOW = "4"                      # low-frequency gain: P ≈ K_LOW / (s·(1 + s/50)) below 20 rad/s
# w-plane lead with a roll-off, biproper (so L(π/T) != 0): (1 + w/8)(1 + w/300) /
# ((1 + w/20)(1 + w/80)).  The loop is stable and conditionally so: gain crossovers near 4.9,
# 17.6 and 19.5 rad/s (the last two around the 20 rad/s mode), three phase crossovers.
CTRL = dict(gain="1", zeros=["8", "300"], poles=["20", "80"])

# tolerances (the brief's; justified where used)
TOL_REL = 1e-9                   # crossovers (rad/s), gain margins (dB) relative
TOL_DEG = 1e-9                   # phase margins, degrees absolute


def mpf(x):
    return mp.mpf(x)


# ---- factored models --------------------------------------------------------------------------

def plant_sections(order10):
    """Real sections (A, B, C) in mpmath, in series; DC gains 1 except the integrator."""
    secs = [(mp.matrix([[0]]), mp.matrix([[1]]), mp.matrix([[1]]))]          # 1/s
    lag = mpf(LAG)
    secs.append((mp.matrix([[-lag]]), mp.matrix([[1]]), mp.matrix([[lag]])))  # 50/(s+50)
    if order10:
        for w, z in MODES:
            w, z = mpf(w), mpf(z)
            # ω²/(s² + 2ζωs + ω²), controllable companion form
            secs.append((mp.matrix([[0, 1], [-w * w, -2 * z * w]]), mp.matrix([[0], [1]]),
                         mp.matrix([[w * w, 0]])))
    return secs


def plant_gain_leading(order10):
    """Leading-coefficient gain of the plant in s: K_LOW·50·∏ω²."""
    g = mpf(K_LOW) * mpf(LAG)
    if order10:
        for w, _ in MODES:
            g *= mpf(w) ** 2
    return g


def plant_text(order10):
    """The same plant typed for the CLI, in factored form, exact decimals."""
    den = ["s", f"(s + {LAG})"]
    if order10:
        for w, z in MODES:
            a = mp.nstr(2 * mpf(z) * mpf(w), 30, strip_zeros=True)
            b = mp.nstr(mpf(w) ** 2, 30, strip_zeros=True)
            den.append(f"(s^2 + {a}*s + {b})")
    g = mp.nstr(plant_gain_leading(order10), 40, strip_zeros=True)
    return f"{g}/(" + "*".join(den) + ")"


def plant_float(order10):
    """Factored float64 version (for the naive expanded-polynomial evaluation)."""
    den = [[1.0, 0.0], [1.0, float(LAG)]]
    if order10:
        for w, z in MODES:
            den.append([1.0, 2 * float(z) * float(w), float(w) ** 2])
    return Factored(float(plant_gain_leading(order10)), [], den)


def ctrl_text():
    num = "*".join(f"(1 + w/{z})" for z in CTRL["zeros"])
    den = "*".join(f"(1 + w/{p})" for p in CTRL["poles"])
    return f"{CTRL['gain']}*{num}/({den})"


def ctrl_eval_w(w):
    c = mpf(CTRL["gain"])
    for z in CTRL["zeros"]:
        c *= 1 + w / mpf(z)
    for p in CTRL["poles"]:
        c /= 1 + w / mpf(p)
    return c


def series_ss(secs, gain):
    """Series connection: section i+1 is driven by the output of section i."""
    n = sum(a.rows for a, _, _ in secs)
    A = mp.zeros(n, n)
    B = mp.zeros(n, 1)
    C = mp.zeros(1, n)
    off = 0
    prev = None
    for a, b, c in secs:
        k = a.rows
        for i in range(k):
            for j in range(k):
                A[off + i, off + j] = a[i, j]
        if prev is None:
            for i in range(k):
                B[off + i, 0] = gain * b[i, 0]
        else:
            po, pc = prev
            for i in range(k):
                for j in range(pc.cols):
                    A[off + i, po + j] += b[i, 0] * pc[0, j]
        prev = (off, c)
        off += k
    po, pc = prev
    for j in range(pc.cols):
        C[0, po + j] = pc[0, j]
    return A, B, C


def zoh(A, B, T):
    """Φ, Γ from mpmath.expm of [[A, B], [0, 0]]·T."""
    n = A.rows
    M = mp.zeros(n + 1, n + 1)
    for i in range(n):
        for j in range(n):
            M[i, j] = A[i, j] * T
        M[i, n] = B[i, 0] * T
    E = mp.expm(M)
    Phi = mp.zeros(n, n)
    Gam = mp.zeros(n, 1)
    for i in range(n):
        for j in range(n):
            Phi[i, j] = E[i, j]
        Gam[i, 0] = E[i, n]
    return Phi, Gam


class MpLoop:
    def __init__(self, order10):
        self.T = mpf(T_S)
        secs = plant_sections(order10)
        # DC gain of the sections is 1 (integrator aside) so K_LOW sets the low-frequency gain
        self.A, self.B, self.C = series_ss(secs, mpf(K_LOW))
        self.Phi, self.Gam = zoh(self.A, self.B, self.T)
        self.n = self.A.rows
        E, EL, ER = mp.eig(self.Phi, left=True, right=True)
        # residues for the modal form P(z) = Σ r_i/(z − λ_i); EL rows normalized so EL·ER = I
        self.lam = E
        self.res = []
        for i in range(self.n):
            cr = sum(self.C[0, k] * ER[k, i] for k in range(self.n))
            lg = sum(EL[i, k] * self.Gam[k, 0] for k in range(self.n))
            nrm = sum(EL[i, k] * ER[k, i] for k in range(self.n))
            self.res.append(cr * lg / nrm)

    def z_of(self, omega):
        return mp.exp(mp.mpc(0, 1) * omega * self.T)

    def ctrl(self, z):
        w = (2 / self.T) * (z - 1) / (z + 1)
        return ctrl_eval_w(w)

    def plant_lu(self, z):
        M = z * mp.eye(self.n) - self.Phi
        x = mp.lu_solve(M, self.Gam)
        return sum(self.C[0, k] * x[k] for k in range(self.n))

    def plant_modal(self, z):
        return sum(r / (z - l) for r, l in zip(self.res, self.lam))

    def L(self, omega, modal=False):
        omega = mpf(omega)
        z = self.z_of(omega)
        p = self.plant_modal(z) if modal else self.plant_lu(z)
        return p * self.ctrl(z) * z ** (-N_DELAY)


def mp_deg(x):
    return x * 180 / mp.pi


def dense_crossovers(loop):
    """Counts and brackets of |L| = 1 and ∠L = −180 (mod 360) on a dense grid (modal form, 50
    digits): 4000 log-spaced points 0.05 … π/T·(1 − 1e-9) plus 200 points within ±30 % of
    each mode (half-power width of the lightest mode 2ζω = 2 rad/s, spacing there < 0.1)."""
    wn = math.pi / float(loop.T)
    g = list(np.logspace(math.log10(0.05), math.log10(wn * (1 - 1e-9)), 4000))
    for w, _ in MODES:
        g += list(np.linspace(0.7 * float(w), 1.3 * float(w), 200))
    grid = np.unique(np.array(g))
    H = np.array([complex(loop.L(w, modal=True)) for w in grid])
    lm = np.log(np.abs(H))
    ph = np.degrees(np.unwrap(np.angle(H)))
    gb = [(grid[i], grid[i + 1]) for i in np.flatnonzero(np.sign(lm[:-1]) != np.sign(lm[1:]))]
    k = np.floor((ph + 180.0) / 360.0)
    pb = [(grid[i], grid[i + 1]) for i in np.flatnonzero(k[:-1] != k[1:])]
    # Nyquist end point: a phase crossover when the phase tends to -180 (mod 360) there
    lim = float(mp_deg(mp.arg(loop.L(mp.pi / loop.T * (1 - mp.mpf("1e-12")), modal=True))))
    return gb, pb, abs(float(wrap180(lim + 180.0))) < 1e-3


def refine_gain(loop, w0, bracket=None):
    f = lambda w: mp.log(abs(loop.L(w)))              # noqa: E731
    if bracket is not None:
        return mp.findroot(f, (mpf(bracket[0]), mpf(bracket[1])), solver="anderson")
    return mp.findroot(f, mpf(w0), tol=mp.mpf(10) ** -40)


def refine_phase(loop, w0, bracket=None):
    # −L(ω) is near the positive real axis at a phase crossover: arg(−L) is continuous there
    f = lambda w: mp.arg(-loop.L(w))                  # noqa: E731
    if bracket is not None:
        return mp.findroot(f, (mpf(bracket[0]), mpf(bracket[1])), solver="anderson")
    return mp.findroot(f, mpf(w0), tol=mp.mpf(10) ** -40)


def check_loop(chk, cli, order10):
    tag = "order 10" if order10 else "order 2"
    loop = MpLoop(order10)
    js = run_analyze(cli, plant_text(order10), float(T_S), compute_delay=N_DELAY,
                     controller=ctrl_text(), steps=10)
    lp = js["loop"]
    def arr(key):                                     # null inside a list -> NaN (fails)
        return [math.nan if x is None else float(x) for x in (lp[key] or [])]

    gcs, pms = arr("gain_crossovers_rad_s"), arr("phase_margins_deg")
    pcs, gms = arr("phase_crossovers_rad_s"), arr("gain_margins_db")
    print(f"# {tag}: CLI gain crossovers {gcs}", flush=True)
    print(f"# {tag}: CLI phase crossovers {pcs}", flush=True)

    # self-check of the reference: modal form vs lu_solve (both 50 digits) at 3 frequencies;
    # agreement to 1e-35 relative shows the eigen-decomposition is not the weak link
    worst = max(abs(loop.L(w, True) - loop.L(w)) / abs(loop.L(w)) for w in ("3", "21", "300"))
    chk.le(f"{tag}: reference modal form vs lu_solve (self-check)", float(worst), 1e-35)

    # dense-grid count: every crossover the loop has, none spurious
    gb, pb, nyq = dense_crossovers(loop)
    n_pc_ref = len(pb) + (1 if nyq else 0)
    chk.true(f"{tag}: gain crossover count {len(gcs)} == dense 50-digit grid {len(gb)}",
             len(gcs) == len(gb))
    chk.true(f"{tag}: phase crossover count {len(pcs)} == dense 50-digit grid {n_pc_ref}",
             len(pcs) == n_pc_ref)

    # each CLI crossover refined with findroot from the CLI's value (lu_solve evaluation);
    # the dense grid's bracket for the same index must hold the same root
    for i, wc in enumerate(gcs):
        r = refine_gain(loop, wc)
        # crossover frequency: 50-digit root; the CLI's double carries ~1e-16 relative plus its
        # evaluation error (~1e-13 per the design notes) over the slope: tol 1e-9 relative
        chk.le(f"{tag}: w_gc[{i}]={wc:.10g} vs mp.findroot", float(abs(wc - r) / r), TOL_REL)
        if i < len(gb):
            rb = refine_gain(loop, None, gb[i])
            chk.le(f"{tag}: w_gc[{i}] vs root in dense-grid bracket {i}",
                   float(abs(wc - rb) / rb), TOL_REL)
        # phase margin at the 50-digit crossover: 180 + ∠L wrapped; tol 1e-9 deg absolute
        pm = float(wrap180(float(180 + mp_deg(mp.arg(loop.L(r))))))
        chk.le(f"{tag}: PM[{i}]={pms[i]:.12g} vs 50-digit", abs(pms[i] - pm), TOL_DEG, " deg")
    wn = math.pi / float(T_S)
    for i, wp in enumerate(pcs):
        if wp == wn:
            r = mp.pi / loop.T                         # the Nyquist end point, exact
            chk.true(f"{tag}: w_pc[{i}] at pi/T is a real phase crossover", nyq)
        else:
            r = refine_phase(loop, wp)
            chk.le(f"{tag}: w_pc[{i}]={wp:.10g} vs mp.findroot", float(abs(wp - r) / r), TOL_REL)
        gm = float(-20 * mp.log10(abs(loop.L(r))))
        # gain margin: tol 1e-9 relative (floor 1e-9 dB for a margin near 0 dB)
        chk.le(f"{tag}: GM[{i}]={gms[i]:.12g} dB vs 50-digit", abs(gms[i] - gm),
               max(TOL_REL * abs(gm), 1e-9), " dB")
    # delay margin: the smallest extra loop delay that puts a crossover point on -1: the
    # point at ω_c turns clockwise by PM, or by PM + 360° when PM < 0 (a conditionally stable
    # loop, as here); min over the 50-digit crossovers; tol 1e-9 relative
    if js["closed_loop"]["stable"] and gcs:
        dms = []
        for wc in gcs:
            r = refine_gain(loop, wc)
            pm = float(wrap180(float(180 + mp_deg(mp.arg(loop.L(r))))))
            dms.append(math.radians(pm if pm > 0 else pm + 360.0) / float(r))
        dm = min(dms)
        only_pos = [d for d, wc, pm in zip(dms, gcs, pms) if pm > 0]
        print(f"# {tag}: delay margin {dm:.12g} s (positive-PM crossovers only would give "
              f"{min(only_pos) if only_pos else None})", flush=True)
        got = lp["delay_margin_s"]
        chk.le(f"{tag}: delay margin vs 50-digit", abs(got - dm) / dm if got is not None
               else math.inf, TOL_REL)
    return loop, js


def naive_float64(chk, loop, js):
    """The expanded z-polynomial in float64: scipy.signal.cont2discrete (zoh) of the expanded
    continuous tf, the w controller through scipy.signal.bilinear, numpy.polyval.  Measures its
    error at the 50-digit crossovers and counts its crossovers on the dense grid."""
    T = float(T_S)
    num_s, den_s = plant_float(True).tf()
    nz, dz, _ = sig.cont2discrete((num_s, den_s), T, method="zoh")
    nz = np.ravel(nz)
    dz = np.ravel(dz)
    cb = np.array([1.0])
    ca = np.array([1.0])
    for z in CTRL["zeros"]:
        cb = np.polymul(cb, [1.0 / float(z), 1.0])
    for p in CTRL["poles"]:
        ca = np.polymul(ca, [1.0 / float(p), 1.0])
    cbz, caz = sig.bilinear(float(CTRL["gain"]) * cb, ca, fs=1.0 / T)

    def Lf(w):
        z = np.exp(1j * np.asarray(w, dtype=float) * T)
        return (np.polyval(nz, z) / np.polyval(dz, z) * np.polyval(cbz, z) / np.polyval(caz, z)
                * z ** (-N_DELAY))

    lp = js["loop"]
    worst_w = 0.0
    worst_pm = 0.0
    for wc in lp["gain_crossovers_rad_s"] or []:
        r = refine_gain(loop, wc)
        rf = float(r)
        f = lambda w: math.log(abs(Lf(w)))            # noqa: E731
        try:
            wn = sopt.brentq(f, rf * 0.98, rf * 1.02, xtol=1e-15)
            worst_w = max(worst_w, abs(wn - rf) / rf)
        except ValueError:                            # no sign change: the crossover is lost
            worst_w = math.inf
        pm_f = float(wrap180(180 + math.degrees(np.angle(Lf(rf)))))
        pm_r = float(wrap180(float(180 + mp_deg(mp.arg(loop.L(r))))))
        worst_pm = max(worst_pm, abs(pm_f - pm_r))
    wgrid = np.logspace(math.log10(0.05), math.log10(math.pi / T * (1 - 1e-9)), 20000)
    H = Lf(wgrid)
    lm = np.log(np.abs(H))
    ncross = int(np.count_nonzero(np.sign(lm[:-1]) != np.sign(lm[1:])))
    print(f"# float64 expanded polynomial: crossover error {worst_w:.3e} rel, PM error "
          f"{worst_pm:.3e} deg, {ncross} gain crossovers on a 20000-point grid "
          f"(reference: {len(lp['gain_crossovers_rad_s'] or [])})", flush=True)
    # the test is sensitive only if this naive evaluation misses the 1e-9 tolerances
    chk.true("float64 expanded z-polynomial misses 1e-9 (shows the comparison is sensitive)",
             worst_w > TOL_REL or worst_pm > TOL_DEG,
             f"crossover err {worst_w:.3e}, PM err {worst_pm:.3e} deg, {ncross} crossovers")


def precision_selfcheck(chk):
    """The 50-digit reference against the same at 70 digits at one frequency: the expm and
    solves are good to far below the 1e-9 tolerances (expected ~1e-45)."""
    a = MpLoop(True).L("10")
    with mp.workdps(70):
        b = MpLoop(True).L("10")
        d = abs(a - b) / abs(b)
    chk.le("reference at 50 vs 70 digits, L(j10) (self-check)", float(d), 1e-40)


def main():
    if len(sys.argv) != 2:
        print("usage: ref_mpmath.py path/to/loopwright-cli", file=sys.stderr)
        sys.exit(2)
    cli = sys.argv[1]
    chk = Checker()
    try:
        precision_selfcheck(chk)
        loop10, js10 = check_loop(chk, cli, True)
        check_loop(chk, cli, False)
        naive_float64(chk, loop10, js10)
    except Exception as e:
        chk.true("ran without error", False, repr(e))
    chk.finish()


if __name__ == "__main__":
    main()
