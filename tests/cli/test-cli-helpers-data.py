#!/usr/bin/python3
"""`loopwright-cli suggest --helper NAME` on a design document whose analysis is on its measured
data (<measured analysis="data">), spawned as a user runs it.

The document is made as a user makes it: `new --plant MODEL --measured FILE.csv
--measured-kind KIND`, then analysis="data" set in its text (docs/file-format.md). The model is
the camera slider's (a belt resonance at 200 rad/s, damping 0.01); the "machine" that made the
data has its belt resonance at 230 rad/s with damping 0.03 (an invented rig: the model is off,
the data are right). The data are made here with Debian's scipy: the sampled kind by
scipy.signal.cont2discrete (zero-order hold) and freqz, the continuous kind by freqs, at 50
points per decade.

Independent checks (numpy, from the JSON): the controller C(w) of the JSON evaluated at
w = j nu, nu = (2/T) tan(omega T/2) (C(z) = C(w) on the unit circle), L = z^-1 C P_data at the
two measured points around the frequency, and ln|L| and the unwrapped phase interpolated
linearly in ln omega there (docs/measured-data.md, the method of the margins on data):
  crossover-gain  |L| = 1 at the crossover asked: 1e-9 (the gain is 1/|L| of the same
                  interpolation; rounding only); the JSON's data crossover there within 1e-3
                  relative (the issue's acceptance)
  lead            180 + angle L = the phase margin asked (safety 0) within 0.2 deg (the
                  issue's), |L| = 1 within 1e-9
  notch           the notch's centre within 1 % of the w-plane image (2/T) tanh(pT/2) of the
                  data's true pole p (the resonance's omega_n within 1 %: a notch that far off a
                  resonance of damping 0.02 still takes all but 1 dB off its peak)
  meet            the margins requirements judged on the data pass (the rounds judge them on
                  the loop closed on the data)
With analysis="model" the same document's helpers use the model (the notch on its resonance).
A design on the data alone (no model) gets the same stages and loop on the data.
Refusals (exit 2, the message naming what and where): a crossover below the data's first point
(the frequency and the data's range named), a notch on data without a resonance.
"""

import cmath
import json
import math
import os
import shutil
import subprocess
import sys
import tempfile

import numpy as np
from scipy import signal

CLI = sys.argv[1]
HERE = os.path.dirname(os.path.abspath(__file__))
SLIDER = os.path.join(HERE, "..", "..", "data", "examples", "camera-slider.lwd")
T = 0.002
MODEL = "180*40000/(s*(s+12)*(s^2+4*s+40000))"
WR, ZR = 230.0, 0.03
NUM = [180.0 * WR * WR]
DEN = np.polymul([1.0, 12.0, 0.0], [1.0, 2 * ZR * WR, WR * WR])
failures = []


def check(cond, what):
    if not cond:
        failures.append(what)
        print("FAIL:", what)


def run(args):
    p = subprocess.run([CLI] + args, capture_output=True, text=True, timeout=120)
    return p.returncode, p.stdout, p.stderr


def write_csv(path, w, h):
    with open(path, "w", encoding="utf-8") as f:
        f.write("# made by test-cli-helpers-data.py with scipy\nfrequency_rad_s,real,imag\n")
        for wi, hi in zip(w, h):
            f.write("%.17g,%.17g,%.17g\n" % (wi, hi.real, hi.imag))


def sampled_data(num, den, lo):
    w = 10 ** np.arange(math.log10(lo), math.log10(math.pi / T), 1 / 50)
    bd, ad, _ = signal.cont2discrete((num, den), T, method="zoh")
    _, h = signal.freqz(np.ravel(bd), ad, worN=w * T)
    return w, h


def document(tmp, name, w, h, kind="sampled", requirements=True, model=True):
    csv = os.path.join(tmp, name + ".csv")
    write_csv(csv, w, h)
    lwd = os.path.join(tmp, name + ".lwd")
    rc, _, err = run(["new"] + (["--plant", MODEL] if model else [])
                     + ["--period", str(T), "--compute-delay", "1",
                        "--measured", csv, "--measured-kind", kind, "--out", lwd])
    check(rc == 0, f"new --measured {name}: {err}")
    text = open(lwd, encoding="utf-8").read()
    if model:
        assert 'analysis="model"' in text
        text = text.replace('analysis="model"', 'analysis="data"', 1)
    if requirements:
        slider = open(SLIDER, encoding="utf-8").read()
        reqs = slider[slider.index("  <requirements>"):slider.index("</requirements>") + 16]
        text = text.replace("  <variants", reqs + "\n  <variants", 1)
    with open(lwd, "w", encoding="utf-8") as f:
        f.write(text)
    return lwd


def suggest(lwd, *args):
    rc, out, err = run(["suggest", lwd, "--json", *args])
    return rc, (json.loads(out) if rc == 0 else None), err


def controller(js):
    c = js["controller_w"]
    z = [complex(*r) for r in c["zeros"]]
    p = [complex(*r) for r in c["poles"]]
    return lambda s: c["gain"] * np.prod([s - r for r in z]) / np.prod([s - r for r in p])


def loop_on_data(js, w, h, omega):
    """|L| and the unwrapped phase (deg) at omega, interpolated between the points."""
    cw = controller(js)
    nu = 2 / T * np.tan(w * T / 2)
    lp = np.array([cw(1j * n) for n in nu]) * h * np.exp(-1j * w * T)
    ph = np.unwrap(np.angle(lp))
    ph -= 2 * math.pi * math.ceil(ph[0] / (2 * math.pi))
    i = int(np.searchsorted(w, omega)) - 1
    t = (math.log(omega) - math.log(w[i])) / (math.log(w[i + 1]) - math.log(w[i]))
    lg = math.log(abs(lp[i])) + t * (math.log(abs(lp[i + 1])) - math.log(abs(lp[i])))
    return math.exp(lg), math.degrees(ph[i] + t * (ph[i + 1] - ph[i]))


def main():
    tmp = tempfile.mkdtemp(prefix="lw-test-helpers-data-")
    w, h = sampled_data(NUM, DEN, 1.0)
    lwd = document(tmp, "rig", w, h)

    # crossover gain: the data's crossover at the target
    rc, js, err = suggest(lwd, "--helper", "crossover-gain", "--crossover", "40")
    check(rc == 0, f"crossover-gain: {err}")
    if js:
        check(js["analysis"] == "data", "crossover-gain: analysis member")
        check(js["steps"][0].startswith("on the measured data (sampled kind"),
              f"crossover-gain: says it used the data: {js['steps'][0]}")
        mag, _ = loop_on_data(js, w, h, 40.0)
        check(abs(mag - 1) < 1e-9, f"crossover-gain: |L| on the data at 40 rad/s = {mag}")
        wc = js["loop"]["gain_crossover_rad_s"]
        check(abs(wc / 40.0 - 1) < 1e-3, f"crossover-gain: the data's crossover {wc}")

    # lead for a phase margin, safety 0: the margin on the data is the target
    rc, js, err = suggest(lwd, "--helper", "lead", "--crossover", "40", "--phase-margin", "50",
                          "--safety", "0")
    check(rc == 0, f"lead: {err}")
    if js:
        mag, ph = loop_on_data(js, w, h, 40.0)
        check(abs(mag - 1) < 1e-9, f"lead: |L| on the data {mag}")
        check(abs(180 + ph - 50) < 0.2, f"lead: phase margin on the data {180 + ph}")
        check(abs(js["loop"]["phase_margins_deg"][0] - 50) < 0.2,
              f"lead: the JSON's data margin {js['loop']['phase_margins_deg']}")

    # the text report says the helper used the data and shows the margins on them
    rc, out, err = run(["suggest", lwd, "--helper", "lead", "--crossover", "40"])
    check(rc == 0 and "on the measured data (sampled kind" in out
          and "Reached on the measured data" in out
          and "Reached on the model (not what the requirements are judged on)" in out,
          f"lead: text report: {out} {err}")

    # notch on the data's resonance (the model's is at 200 rad/s; the data's at 230)
    for kind in ("sampled", "continuous"):
        if kind == "continuous":
            wk = 10 ** np.arange(0, math.log10(math.pi / T), 1 / 50)
            _, hk = signal.freqs(NUM, DEN, worN=wk)
            doc = document(tmp, "rig-continuous", wk, hk, "continuous")
        else:
            doc = lwd
        rc, js, err = suggest(doc, "--helper", "notch")
        check(rc == 0, f"notch ({kind}): {err}")
        if js:
            p = WR * complex(-ZR, math.sqrt(1 - ZR * ZR))
            centre = abs(2 / T * cmath.tanh(p * T / 2))
            got = js["stages"][0]["params"]["centre_rad_s"]
            check(abs(got / centre - 1) < 0.01, f"notch ({kind}): centre {got} vs {centre}")
            check(any("resonance in the measured data" in s for s in js["steps"]),
                  f"notch ({kind}): steps {js['steps']}")

    # meet the requirements on the data: the margins requirements pass on the data
    rc, js, err = suggest(lwd, "--helper", "meet")
    check(rc == 0, f"meet: {err}")
    if js:
        reqs = {r["kind"]: r for r in js["requirements"]}
        for k in ("phase-margin", "gain-margin", "crossover", "sensitivity-peak"):
            check(reqs[k]["pass"], f"meet: {k} on the data: {reqs[k]}")
        kinds = [s["kind"] for s in js["stages"]]
        check("notch" in kinds, f"meet: the data's resonance notched: {kinds}")
        pm = js["loop"]["phase_margin_deg"]
        check(pm >= 45, f"meet: the data's phase margin {pm}")
        # the data reach 1513.6 rad/s of pi/T = 1570.8 with |L| far below 0.5 there, and a
        # type-1 asymptote at the low end: the Nyquist criterion on the data decides
        check(js["stability_on_data"] == "stable", f"meet: {js['stability_on_data']}")

    # the same document with analysis="model": the helpers use the model (its resonance at
    # 200 rad/s, damping 0.01: the notch where test-cli-helpers.py puts it), not the data
    model_doc = os.path.join(tmp, "rig-model.lwd")
    with open(model_doc, "w", encoding="utf-8") as f:
        f.write(open(lwd, encoding="utf-8").read().replace('analysis="data"', 'analysis="model"'))
    rc, js, err = suggest(model_doc, "--helper", "notch")
    check(rc == 0, f"notch on the model: {err}")
    if js:
        p = complex(-2.0, math.sqrt(40000.0 - 4.0))
        centre = abs(2 / T * cmath.tanh(p * T / 2))
        got = js["stages"][0]["params"]["centre_rad_s"]
        check(abs(got - centre) < 1e-9 * centre, f"notch on the model: {got} vs {centre}")
        check(js["analysis"] == "model" and not js["steps"][0].startswith("on the measured"),
              f"notch on the model: {js['analysis']} {js['steps'][0]}")

    # a design on the data alone (new --measured without --plant): the same helpers, the same
    # stages, since they never use the model; meet judges on the data what it can and reads
    # the plant's integrator off the data's slope; a lag without a ratio is refused
    alone = document(tmp, "rig-alone", w, h, model=False)
    for args in (["--helper", "crossover-gain", "--crossover", "40"],
                 ["--helper", "lead", "--crossover", "40", "--phase-margin", "50"],
                 ["--helper", "notch"], ["--helper", "meet"]):
        rc_a, ja, err_a = suggest(alone, *args)
        rc_m, jm, err_m = suggest(lwd, *args)
        check(rc_a == 0 and rc_m == 0, f"data alone {args}: {err_a} {err_m}")
        if ja and jm:
            check(ja["stages"] == jm["stages"] and ja["loop"] == jm["loop"],
                  f"data alone {args}: stages or loop differ from the design with a model")
            check("stable" not in ja, f"data alone {args}: no model's stability without a model")
            check(ja["stability_on_data"] == jm["stability_on_data"],
                  f"data alone {args}: the same verdict on the data")
    rc, ja, err = suggest(alone, "--helper", "meet")
    if ja:
        check(any(x.startswith("the plant has 1 integrator(s) by the data") for x in ja["steps"]),
              f"data alone: integrator from the data: {ja['steps']}")
        passed = {r["kind"] for r in ja["requirements"] if r["pass"]}
        check({"phase-margin", "gain-margin", "crossover", "sensitivity-peak"} <= passed,
              f"data alone: meet on the data {ja['requirements']}")
        check({n["requirement"] for n in ja["not_met"]} == {5, 6},
              f"data alone: overshoot and step error need a model: {ja['not_met']}")
    rc, out, err = run(["suggest", alone, "--helper", "lag"])
    check(rc == 2 and "give the ratio" in err, f"data alone: lag without a ratio: {rc} {err}")

    # refusals
    rc, out, err = run(["suggest", lwd, "--helper", "crossover-gain", "--crossover", "0.5"])
    check(rc == 2 and "0.5 rad/s lies outside the measured data" in err
          and "which cover 1 … 1" in err, f"outside the data: {rc} {err}")
    rc, out, err = run(["suggest", lwd, "--helper", "pi", "--crossover", "0.5"])
    check(rc == 2 and "outside the measured data" in err, f"PI outside the data: {rc} {err}")
    wn, hn = sampled_data([180.0], [1.0, 12.0, 0.0], 1.0)
    plain = document(tmp, "no-resonance", wn, hn)
    rc, out, err = run(["suggest", plain, "--helper", "notch"])
    check(rc == 2 and "show no resonance" in err and "nothing to notch" in err,
          f"no resonance in the data: {rc} {err}")

    shutil.rmtree(tmp)
    if failures:
        print(f"{len(failures)} failure(s)")
        sys.exit(1)
    print("all helper checks on data passed")


main()
