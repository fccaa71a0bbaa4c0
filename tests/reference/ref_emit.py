#!/usr/bin/python3
# ref_emit.py — checks `loopwright-cli emit` end to end: the generated C is compiled (cc from
# PATH, -std=c99 -Wall -Wextra -Werror -pedantic) with a driver written here, run, and its
# output compared with references computed here:
#   * the controller: the w-plane controller of each case is mapped to z here with
#     scipy.signal.bilinear_zpk(fs = 1/T) (w = (2/T)(z-1)/(z+1) is exactly the bilinear map);
#     the product of the emitted sections must match it on the unit circle;
#   * floating-point forms: the compiled step() on the self-test impulse and on a random input
#     against scipy.signal.sosfilt (sections) and scipy.signal.lfilter (difference equation) of
#     the coefficients printed by `emit --json`;
#   * fixed point: the compiled step() bit for bit against a Python model of the integer
#     arithmetic written here from its definition (docs/implementation.md), and against
#     sosfilt of the quantized coefficients within the rounding bound derived there;
#   * the generated self-test function returns 0.
# Exit 77 (skipped) when no C compiler is on PATH.
#
# Usage: /usr/bin/python3 ref_emit.py path/to/loopwright-cli
#
# SPDX-License-Identifier: GPL-3.0-or-later

import json
import os
import shutil
import subprocess
import sys
import tempfile

import numpy as np
import scipy.signal as sig

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwref import Checker, Factored  # noqa: E402

CFLAGS = ["-std=c99", "-Wall", "-Wextra", "-Werror", "-pedantic", "-O1"]
PLANT = "40/(s*(s+8))"   # an invented motor-and-load axis of our own
T = 0.002


def run_emit(cli, outdir, controller, form, fixed=None, prefix=None):
    args = [cli, "emit", "--plant", PLANT, "--period", repr(T), "--controller", controller,
            "--form", form, "--out", outdir, "--json"]
    if fixed:
        args += ["--fixed", fixed]
    if prefix:
        args += ["--prefix", prefix]
    print("# command: " + " ".join(repr(a) if " " in a or "(" in a else a for a in args),
          flush=True)
    proc = subprocess.run(args, capture_output=True, text=True, timeout=120)
    if proc.returncode != 0:
        raise RuntimeError(f"emit exited {proc.returncode}: {proc.stderr.strip()}")
    return json.loads(proc.stdout)


def compile_and_run(cc, outdir, prefix, x, fixed):
    """Writes a driver that prints self_test() then step() over x; returns (rc, outputs)."""
    n = len(x)
    if fixed:
        data = ",\n".join(str(int(v)) for v in x)
        decl = f"static const int16_t x[{n}] = {{\n{data}\n}};"
        show = 'printf ("%d\\n", (int) {p}step (&st, x[i]));'.format(p=prefix)
    else:
        data = ",\n".join(repr(float(v)) for v in x)
        decl = f"static const double x[{n}] = {{\n{data}\n}};"
        show = 'printf ("%.17g\\n", {p}step (&st, x[i]));'.format(p=prefix)
    driver = f"""#include <stdio.h>
#include "{prefix}controller.h"
{decl}
int main (void)
{{
  {prefix}state st;
  int i;
  printf ("%d\\n", {prefix}self_test ());
  {prefix}init (&st);
  for (i = 0; i < {n}; i++)
    {show}
  return 0;
}}
"""
    with open(os.path.join(outdir, "driver.c"), "w") as f:
        f.write(driver)
    exe = os.path.join(outdir, "driver")
    cmd = [cc] + CFLAGS + ["-o", exe, os.path.join(outdir, f"{prefix}controller.c"),
                           os.path.join(outdir, "driver.c")]
    proc = subprocess.run(cmd, capture_output=True, text=True, timeout=120)
    if proc.returncode != 0:
        raise RuntimeError("compile failed:\n" + proc.stderr)
    out = subprocess.run([exe], capture_output=True, text=True, timeout=60, check=True)
    lines = out.stdout.split()
    return int(lines[0]), np.array([float(v) for v in lines[1:]])


def sos_of(js):
    return np.array([s["b"] + s["a"] for s in js["sections"]], dtype=float)


def w_to_z(ctrl):
    """The w-plane controller mapped to z by scipy.signal.bilinear_zpk (fs = 1/T)."""
    n, d = ctrl.tf()
    z, p, k = sig.tf2zpk(n, d)
    return sig.bilinear_zpk(z, p, k, fs=1.0 / T)


def model_at(model, x):
    z, p, k = model
    return k * np.prod([x - r for r in z], axis=0) / np.prod([x - r for r in p], axis=0)


def fixed_model(secs, frac, x):
    """The fixed-point arithmetic as defined in docs/implementation.md, in Python integers.
    Returns (y, saturated?)."""
    i32min, i32max, i16min, i16max = -2**31, 2**31 - 1, -2**15, 2**15 - 1
    sat_hit = [False]

    def sat(v, lo, hi):
        if v < lo or v > hi:
            sat_hit[0] = True
        return min(max(v, lo), hi)

    def rshift_round(v):
        if frac == 0:
            return v
        return (v + (1 << (frac - 1))) >> frac   # Python >> is floor: floor(v/2^n + 1/2)

    s1 = [0] * len(secs)
    s2 = [0] * len(secs)
    y = []
    for xv in x:
        v = int(xv)
        for j, (b0, b1, b2, a1, a2) in enumerate(secs):
            acc = sat(b0 * v + s1[j], i32min, i32max)
            out = sat(rshift_round(acc), i16min, i16max)
            s1[j] = sat(sat(b1 * v - a1 * out, i32min, i32max) + s2[j], i32min, i32max)
            s2[j] = sat(b2 * v - a2 * out, i32min, i32max)
            v = out
        y.append(v)
    return np.array(y), sat_hit[0]


def main():
    cli = sys.argv[1]
    cc = shutil.which("cc") or shutil.which("gcc") or shutil.which("clang")
    if cc is None:
        print("no C compiler (cc) on PATH: skipping")
        sys.exit(77)
    chk = Checker()
    rng = np.random.default_rng(20240611)

    # Case 1: PI plus lead plus a second-order roll-off, designed in the w-plane (our own):
    # C(w) = 2 (w + 3)/w · (w/6 + 1)/(w/60 + 1) · 1/((w/400)^2 + 2·0.6·w/400 + 1)
    ctrl = Factored(2.0 * 10.0 * 400.0**2, num=[[1, 3], [1, 6]],
                    den=[[1, 0], [1, 60], [1, 2 * 0.6 * 400, 400.0**2]])
    ctrl_text = ctrl.text("w")
    ref_z = w_to_z(ctrl)
    with tempfile.TemporaryDirectory() as tmp:
        for form in ("sections", "difference"):
            d = os.path.join(tmp, form)
            os.mkdir(d)
            js = run_emit(cli, d, ctrl_text, form)
            sos = sos_of(js)
            b = np.array(js["difference"]["b"])
            a = np.array(js["difference"]["a"])
            # stop short of θ = π: the double zero at z = −1 makes |C| vanish there
            th = np.linspace(0.01, 3.0, 500)
            zz = np.exp(1j * th)
            want = model_at(ref_z, zz)
            _, hs = sig.sosfreqz(sos, worN=th)
            # 1e-10: the bilinear map done two ways (factor by factor vs scipy's), then a few
            # short products; well above rounding, far below any wrong root
            chk.le(f"{form}: sections vs bilinear_zpk(C(w)) on |z| = 1",
                   float(np.max(np.abs(hs - want) / np.abs(want))), 1e-10)
            _, hd = sig.freqz(b, a, worN=th)
            # 1e-9: the expanded order-4 polynomial near z = 1 loses a few digits (cond ~1e4)
            chk.le(f"{form}: difference equation vs bilinear_zpk(C(w))",
                   float(np.max(np.abs(hd - want) / np.abs(want))), 1e-9)

            n_rand = 400
            x = np.concatenate([[1.0], np.zeros(63), rng.standard_normal(n_rand)])
            rc, y = compile_and_run(cc, d, "lw_ctrl_", x, fixed=False)
            chk.true(f"{form}: generated self_test() returns 0", rc == 0, f"got {rc}")
            imp = np.array(js["impulse_response"])
            # reference filters on the whole sequence: impulse then random input
            ref = sig.sosfilt(sos, x) if form == "sections" else sig.lfilter(b, a, x)
            scale = float(np.max(np.abs(ref)))
            # 1e-12 of the peak: same arithmetic (DF2T per section / direct form), only the
            # operation order of scipy's loops differs; the integrator makes the random part
            # grow, so the bound is relative to the peak
            chk.le(f"{form}: compiled step() vs scipy {'sosfilt' if form == 'sections' else 'lfilter'}",
                   float(np.max(np.abs(y - ref))) / scale, 1e-12)
            chk.le(f"{form}: compiled impulse response vs the emitted self-test vector",
                   float(np.max(np.abs(y[:64] - imp))) / max(1e-300, float(np.max(np.abs(imp)))),
                   1e-12)

    # Case 2: fixed point, a lead-lag without integrator whose coefficients fit Q4.12:
    # C(w) = 1.5 (w/10 + 1)(w/40 + 1) / ((w/2 + 1)(w/250 + 1)(w/300 + 1))
    ctrl2 = Factored(1.5 * (1 / 10) * (1 / 40) / ((1 / 2) * (1 / 250) * (1 / 300)),
                     num=[[1, 10], [1, 40]], den=[[1, 2], [1, 250], [1, 300]])
    with tempfile.TemporaryDirectory() as tmp:
        prefix = "axis_"
        js = run_emit(cli, tmp, ctrl2.text("w"), "sections", fixed="Q4.12", prefix=prefix)
        fx = js["fixed"]
        frac = fx["frac_bits"]
        chk.true("fixed: Q4.12 reported", fx["int_bits"] == 4 and frac == 12)
        secs = [(s["b"][0], s["b"][1], s["b"][2], s["a"][1], s["a"][2]) for s in fx["sections"]]
        # quantization rule: the nearest multiple of 2^-12 to each coefficient
        exact = sos_of(js)
        qerr = max(abs(q - c * 2**frac) for s, e in zip(secs, exact)
                   for q, c in zip(s, [e[0], e[1], e[2], e[4], e[5]]))
        chk.le("fixed: each integer is the nearest to coefficient·2^12", qerr, 0.5)
        n = 600
        x = np.round(rng.uniform(-2000, 2000, n)).astype(int)
        rc, y = compile_and_run(cc, tmp, prefix, x, fixed=True)
        chk.true("fixed: generated self_test() returns 0", rc == 0, f"got {rc}")
        model, sat_hit = fixed_model(secs, frac, x)
        chk.true("fixed: the test input does not saturate (so the bound below applies)",
                 not sat_hit)
        chk.le("fixed: compiled step() vs the Python integer model (bit-exact)",
               float(np.max(np.abs(y - model))), 0.0, " counts")
        imp_model, _ = fixed_model(secs, frac, [fx["impulse_counts"]] + [0] * 63)
        chk.le("fixed: emitted fixed self-test vector vs the Python model (bit-exact)",
               float(np.max(np.abs(np.array(fx["impulse_response"]) - imp_model))), 0.0,
               " counts")
        # against float sosfilt of the quantized coefficients: the only other error is the
        # rounding of each section's output (|e| <= 1/2 count). The rounded output also feeds
        # the section's own recursion, so e_k reaches the output through 1/A_k(z) and then the
        # sections after it: bound = 1/2 · Σ_k ||h_k||_1 with h_k the impulse response of
        # (1/A_k)·H_{k+1}…H_K, summed over 20000 samples (long decayed)
        sosq = np.array([[b0, b1, b2, 2**frac, a1, a2] for b0, b1, b2, a1, a2 in secs],
                        dtype=float) / 2**frac
        yf = sig.sosfilt(sosq, x.astype(float))
        bound = 0.0
        for k in range(len(secs)):
            own = sosq[k].copy()
            own[:3] = [1.0, 0.0, 0.0]          # 1/A_k
            chain = np.vstack([own[None, :], sosq[k + 1:]])
            imp = np.zeros(20000)
            imp[0] = 1.0
            h = sig.sosfilt(chain, imp)
            bound += 0.5 * float(np.sum(np.abs(h)))
        chk.le("fixed: compiled step() vs sosfilt of the quantized coefficients (rounding bound)",
               float(np.max(np.abs(y - yf))), bound * (1 + 1e-9), " counts")
        print(f"# rounding bound {bound:.3f} counts; float peak {np.max(np.abs(yf)):.1f} counts",
              flush=True)
        # pole shifts: the quantized poles are the roots of z^2 + a1 z + a2 computed here
        worst = 0.0
        for s, (b0, b1, b2, a1, a2) in zip(fx["sections"], secs):
            order = 2 if len(s["poles_exact"]) == 2 else 1
            den = [1.0, a1 / 2**frac, a2 / 2**frac][:order + 1]
            r = np.sort_complex(np.roots(den))
            got = np.sort_complex(np.array([complex(*p) for p in s["poles_quantized"]]))
            worst = max(worst, float(np.max(np.abs(r - got))))
        # 1e-12: roots of well-separated quadratics, a few ulp
        chk.le("fixed: reported quantized poles vs numpy.roots", worst, 1e-12)
    chk.finish()


if __name__ == "__main__":
    main()
