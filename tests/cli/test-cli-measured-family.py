#!/usr/bin/python3
"""A measured family: one controller's margins over several measured responses (one sweep per
machine), from a document's <measured> responses or `--measured` given more than once
(docs/families.md, "Measured families").

The machines are invented (filler-valve axes of one bottling line): P_i(s) = K_i/(s(s + a_i)),
sampled at T = 5 ms. Their "measured" responses are made here, independently of Loopwright,
with Debian's scipy: the zero-order-hold equivalent by scipy.signal.cont2discrete(method='zoh')
evaluated at z = e^{jwT} with numpy.polyval, 40 points per decade from 0.5 rad/s up to pi/T
(kind "sampled": the table already holds the hold). The controller is a gain and a lead in
the w-plane, (1 + w/8)/(1 + w/60), mapped by Tustin, w = (2/T)(z - 1)/(z + 1), so at
z = e^{jwT} w = j(2/T)tan(wT/2) (Franklin, Powell & Workman, "Digital Control of Dynamic
Systems", the bilinear transform; from memory); the loop L = z^-1 C(z) P(z) (computation delay
of one sample).

Independent figures per machine: the phase and gain margins of L found on a grid of 200 001
points with each crossing refined by scipy.optimize.brentq (the exact margins of the sampled
loop), the sensitivity peak max 1/|1 + L| at the measured points (the tool takes it there), and
the closed loop's stability from numpy.roots of the characteristic polynomial.

Tolerances:
- phase margin 0.05 deg, gain margin 0.05 dB: the tool reads the margins between the measured
  points, ln|L| and the unwrapped phase straight in ln w. The error of such a straight line over
  a step h = ln(10)/40 is at most h^2/8 times the largest second derivative in ln w: at most
  0.25 rad per real pole or zero for the phase (of atan(e^x)), 0.5 per pole for ln|L|, and
  wT(N + 1/2) <= 0.32 rad for the delay and the hold at these crossovers: with the two plant
  poles and the lead's pair about 4.3e-4 rad (0.025 deg) of phase and 8e-4 neper (0.007 dB) of
  magnitude, plus the shift of the crossing itself by about as much again. 0.05 holds that
  with room; the measured deviations are printed.
- sensitivity peak: relative 1e-9 (the same points; only rounding differs: the table is
  written with 17 significant digits).
- the worst machine named: the gap between the smallest and the next margin is checked to be
  larger than twice the tolerance, so the name is decided.

Also: `new` keeps five tables as a measured family (named by their files' stems) in canonical
form; analysis="model" shows the family without judging it; `check` exits 3 when one machine
fails (and 0 without it); a machine whose loop is unstable is counted and named, its verdict
matching numpy.roots; a plant family (ranged parameters) on a design judged on the data says
its members are the model's; refusals of the options.

Usage: test-cli-measured-family.py CLI
"""
import math
import os
import re
import sys
import tempfile

import numpy as np
from scipy import optimize, signal

from lwcli import FAILS, check, json_of, run, write_csv

T = 0.005
N_DELAY = 1
GAIN, ZERO, POLE = 1.0, 8.0, 60.0
MACHINES = {'valve-1': (150, 6), 'valve-2': (200, 5), 'valve-3': (120, 8), 'valve-4': (260, 4),
            'valve-5': (180, 10)}
WEAK = ('valve-6', (400, 3))         # phase margin about 30 deg: fails min 40
WILD = ('valve-7', (3000, 2))        # loop gain high enough to be unstable
PM_TOL = 0.05
GM_TOL = 0.05
PEAK_REL = 1e-9


def zoh(k, a):
    num, den, _ = signal.cont2discrete(([k], [1.0, a, 0.0]), T, method='zoh')
    return np.ravel(num), np.ravel(den)


def plant(k, a, w):
    num, den = zoh(k, a)
    z = np.exp(1j * w * T)
    return np.polyval(num, z) / np.polyval(den, z)


def controller(w):
    wp = 1j * (2.0 / T) * np.tan(w * T / 2.0)
    return GAIN * (1.0 + wp / ZERO) / (1.0 + wp / POLE)


def loop(k, a, w):
    w = np.asarray(w, dtype=float)
    return np.exp(-1j * w * T * N_DELAY) * controller(w) * plant(k, a, w)


def crossings(f, w):
    """Refined zeros of f (a real function of w) between the grid points where it changes sign."""
    v = f(w)
    out = []
    for j in np.where(np.sign(v[:-1]) != np.sign(v[1:]))[0]:
        out.append(optimize.brentq(lambda x: f(np.array([x]))[0], w[j], w[j + 1], xtol=1e-13))
    return out


def margins(k, a):
    """The governing phase margin (deg) and gain margin (dB) of the sampled loop."""
    w = np.logspace(math.log10(0.5), math.log10(math.pi / T * 0.999999), 200001)
    gains = crossings(lambda x: np.log(np.abs(loop(k, a, x))), w)
    pms = [math.degrees(np.angle(loop(k, a, [x])[0])) + 180.0 for x in gains]
    pms = [(p + 180.0) % 360.0 - 180.0 for p in pms]
    # the phase crossing -180 deg: Im L = 0 with Re L < 0
    phases = [x for x in crossings(lambda x: np.imag(loop(k, a, x)), w)
              if np.real(loop(k, a, [x])[0]) < 0]
    gms = [-20.0 * math.log10(abs(loop(k, a, [x])[0])) for x in phases]
    pm = min(pms, key=abs) if pms else None
    gm = min(gms, key=abs) if gms else None
    return pm, gm


def stable(k, a):
    """The closed loop's poles inside the unit circle (numpy.roots of the characteristic
    polynomial z^N den_c den_p + num_c num_p, the controller's Tustin image in z)."""
    # C(z) = GAIN (1 + w/ZERO)/(1 + w/POLE), w = (2/T)(z - 1)/(z + 1)
    c = 2.0 / T
    num_c = GAIN * np.array([1.0 + c / ZERO, 1.0 - c / ZERO])
    den_c = np.array([1.0 + c / POLE, 1.0 - c / POLE])
    num_p, den_p = zoh(k, a)
    zn = np.zeros(N_DELAY + 1)
    zn[0] = 1.0
    char = np.polyadd(np.polymul(zn, np.polymul(den_c, den_p)), np.polymul(num_c, num_p))
    return bool(np.all(np.abs(np.roots(char)) < 1.0))


def frequencies():
    w = 10 ** np.arange(math.log10(0.5), math.log10(math.pi / T), 1 / 40)
    return np.append(w[w < math.pi / T * 0.999], math.pi / T)


def set_text(path, old, new):
    text = open(path).read()
    check(old in text, 'edit of %s: %r present' % (os.path.basename(path), old))
    with open(path, 'w') as f:
        f.write(text.replace(old, new, 1))


def main():
    cli = sys.argv[1]
    tmp = tempfile.mkdtemp(prefix='lw-test-measured-family-')
    w = frequencies()
    csv = {}
    for name, (k, a) in list(MACHINES.items()) + [WEAK, WILD]:
        csv[name] = os.path.join(tmp, name + '.csv')
        write_csv(csv[name], w, plant(k, a, w))

    # the independent figures per machine
    ref = {}
    for name, (k, a) in list(MACHINES.items()) + [WEAK]:
        pm, gm = margins(k, a)
        peak = float(np.max(1.0 / np.abs(1.0 + loop(k, a, w))))
        ref[name] = (pm, gm, peak)
        check(stable(k, a), '%s: stable by numpy.roots' % name)
    check(not stable(*WILD[1]), '%s: unstable by numpy.roots' % WILD[0])

    # a document holding the five machines' sweeps
    lwd = os.path.join(tmp, 'valves.lwd')
    r = run(cli, 'new', '--plant', 'K/(s*(s+a))', '--param', 'K=200', '--param', 'a=5',
            '--period', str(T), '--title', 'filler valves',
            *sum((['--measured', csv[n]] for n in MACHINES), []),
            '--measured-kind', 'sampled', '--out', lwd)
    check(r.returncode == 0, 'new with five --measured: %s' % r.stderr.strip())
    text = open(lwd).read()
    names = re.findall(r'<measured name="([^"]*)"', text)
    check(names == list(MACHINES), 'the responses named by their files\' stems: %s' % names)
    check(text.count('analysis=') == 1, 'the analysis choice on the first <measured> only')
    r = run(cli, 'tidy', lwd, '--check')
    check(r.returncode == 0, 'the new document is canonical: %s' % r.stderr.strip())
    set_text(lwd, '  <variants active="initial">\n    <variant name="initial"/>',
             '  <requirements>\n    <phase-margin min_deg="40"/>\n'
             '    <gain-margin min_db="6"/>\n    <sensitivity-peak max_ratio="2.5"/>\n'
             '    <overshoot max_pct="40"/>\n  </requirements>\n'
             '  <variants active="initial">\n    <variant name="initial">\n'
             '      <gain ratio="%r"/>\n      <lead zero_rad_s="%r" pole_rad_s="%r"/>\n'
             '    </variant>' % (GAIN, ZERO, POLE))

    # analysis="model": the family shown, not judged
    doc = json_of(cli, 'analyze', lwd, '--json')
    fam = doc.get('measured_family')
    check(fam is not None and fam['sets'] == 5 and fam['judged'] is False,
          'analysis="model": a measured family of 5, not judged: %s' % (fam and fam['judged']))
    r = run(cli, 'check', lwd, '--measured', csv['valve-1'], '--measured', csv[WEAK[0]],
            '--measured-kind', 'sampled')
    check(r.returncode == 3, 'check --measured twice judges on the data: exit %d' % r.returncode)

    # analysis="data": judged on every machine
    set_text(lwd, 'analysis="model"', 'analysis="data"')
    doc = json_of(cli, 'analyze', lwd, '--json')
    fam = doc['measured_family']
    check(fam['judged'] is True and fam['unstable_sets'] == 0 and fam['undecided_sets'] == 0
          and fam['failed_sets'] == 0, 'judged, every machine stable on the data')
    worst_pm = max_dpm = max_dgm = max_dpeak = 0.0
    for entry in fam['per_set']:
        pm, gm, peak = ref[entry['name']]
        dpm = abs(entry['phase_margin_deg'] - pm)
        dgm = abs(entry['gain_margin_db'] - gm)
        dpeak = abs(entry['sensitivity_peak'] - peak) / peak
        max_dpm, max_dgm, max_dpeak = max(max_dpm, dpm), max(max_dgm, dgm), max(max_dpeak, dpeak)
        check(dpm <= PM_TOL, '%s: phase margin %.6f against %.6f' % (entry['name'],
                                                                     entry['phase_margin_deg'], pm))
        check(dgm <= GM_TOL, '%s: gain margin %.6f against %.6f' % (entry['name'],
                                                                    entry['gain_margin_db'], gm))
        check(dpeak <= PEAK_REL, '%s: sensitivity peak %.12g against %.12g'
              % (entry['name'], entry['sensitivity_peak'], peak))
        check(entry['stability'] == 'stable', '%s: stable on the data' % entry['name'])
    print('largest deviations: phase margin %.2g deg, gain margin %.2g dB, peak %.2g relative'
          % (max_dpm, max_dgm, max_dpeak))
    five = {n: ref[n] for n in MACHINES}
    order = sorted(five, key=lambda n: five[n][0])
    check(five[order[1]][0] - five[order[0]][0] > 2 * PM_TOL, 'the worst machine is decided')
    worst_pm = five[order[0]][0]
    check(abs(fam['worst_phase_margin_deg'] - worst_pm) <= PM_TOL,
          'worst phase margin %.6f against the independent worst %.6f'
          % (fam['worst_phase_margin_deg'], worst_pm))
    check(fam['worst_set'] == order[0], 'worst set %s, expected %s' % (fam['worst_set'], order[0]))
    gm_order = sorted(five, key=lambda n: five[n][1])
    check(abs(fam['worst_gain_margin_db'] - five[gm_order[0]][1]) <= GM_TOL
          and fam['worst_sets']['gain_margin'] == gm_order[0], 'worst gain margin and its machine')
    peak_order = sorted(five, key=lambda n: -five[n][2])
    check(fam['worst_sets']['sensitivity_peak'] == peak_order[0]
          and abs(fam['worst_sensitivity_peak'] - five[peak_order[0]][2])
          <= PEAK_REL * five[peak_order[0]][2], 'largest sensitivity peak and its machine')
    reqs = {q['name']: q for q in fam['requirements']}
    check(sorted(reqs) == ['gain-margin', 'phase-margin', 'sensitivity-peak'],
          'the requirements on the data are judged on the family (overshoot is the model\'s)')
    check(reqs['phase-margin']['status'] == 'pass' and reqs['phase-margin']['set'] == order[0],
          'phase margin passes, on the worst machine')
    # the first response is the design's own: the document's loop block is its loop
    check(abs(doc['loop']['phase_margin_deg'] - ref['valve-1'][0]) <= PM_TOL,
          'the first response stays THE measured response')
    r = run(cli, 'check', lwd)
    check(r.returncode == 0, 'check passes on five machines: exit %d\n%s' % (r.returncode, r.stdout))
    check('Measured family: 5 measured responses' in r.stdout, 'check prints the family')

    # a sixth, weak machine (given on the command line, in the middle): check fails on it
    given = [csv['valve-1'], csv['valve-2'], csv[WEAK[0]], csv['valve-3']]
    opts = sum((['--measured', f] for f in given), []) + ['--measured-kind', 'sampled']
    r = run(cli, 'check', lwd, *opts)
    check(r.returncode == 3, 'check fails when one machine fails: exit %d' % r.returncode)
    check('phase-margin             FAIL           on "valve-6"' in r.stdout,
          'the failing machine named:\n%s' % r.stdout)
    fam6 = json_of(cli, 'analyze', lwd, *opts, '--json')['measured_family']
    check(fam6['sets'] == 4 and fam6['worst_set'] == 'valve-6'
          and abs(fam6['worst_phase_margin_deg'] - ref['valve-6'][0]) <= PM_TOL,
          'the weak machine is the worst: %s %.4f' % (fam6['worst_set'],
                                                     fam6['worst_phase_margin_deg']))
    status = {q['name']: (q['status'], q['set']) for q in fam6['requirements']}
    check(status['phase-margin'] == ('fail', 'valve-6'), 'phase margin fails on valve-6: %s'
          % (status['phase-margin'],))

    # an unstable machine: counted, named, and the check fails
    opts = ['--measured', csv['valve-1'], '--measured', csv[WILD[0]], '--measured-kind', 'sampled']
    fam7 = json_of(cli, 'analyze', lwd, *opts, '--json')['measured_family']
    verdicts = {e['name']: e['stability'] for e in fam7['per_set']}
    check(fam7['unstable_sets'] == 1 and verdicts == {'valve-1': 'stable', 'valve-7': 'unstable'},
          'the unstable machine (numpy.roots: unstable) on the data: %s' % verdicts)
    r = run(cli, 'check', lwd, *opts)
    check(r.returncode == 3 and 'whose loop the data call NOT stable' in r.stdout,
          'check fails on an unstable machine: exit %d' % r.returncode)

    # the report's section
    html = os.path.join(tmp, 'valves.html')
    r = run(cli, 'report', lwd, '--out', html, '--date', '2026-01-01')
    check(r.returncode == 0, 'report: %s' % r.stderr.strip())
    page = open(html).read() if r.returncode == 0 else ''
    check('Measured family' in page and '“%s”' % order[0] in page,
          'the report has the section and names the worst machine')

    # a plant family on a design judged on the data: its numbers are the model's members
    set_text(lwd, '<parameter name="K" nominal="200"/>',
             '<parameter name="K" nominal="200" low="150" high="260"/>')
    doc = json_of(cli, 'analyze', lwd, '--json')
    check(doc['family'].get('analysis') == 'model' and 'plant model' in doc['family'].get('note', ''),
          'the plant family says it is the model\'s: %s' % doc['family'].get('analysis'))
    r = run(cli, 'analyze', lwd)
    check('these are the plant model\'s members' in r.stdout, 'analyze text says so too')
    set_text(lwd, 'analysis="data"', 'analysis="model"')
    doc = json_of(cli, 'analyze', lwd, '--json')
    check('analysis' not in doc['family'], 'on the model, the family JSON is as before')

    # refusals
    r = run(cli, 'check', lwd, '--measured', csv['valve-1'], '--measured', csv['valve-1'],
            '--measured-kind', 'sampled')
    check(r.returncode == 2 and 'given twice' in r.stderr, 'the same file twice: %s'
          % r.stderr.strip())
    r = run(cli, 'plot', lwd, '--measured', csv['valve-1'], '--measured', csv['valve-2'],
            '--measured-kind', 'sampled', '--out', os.path.join(tmp, 'x.svg'))
    check(r.returncode == 2 and 'more than once' in r.stderr, 'plot takes one: %s'
          % r.stderr.strip())
    r = run(cli, 'analyze', '--measured', csv['valve-1'], '--measured', csv['valve-2'],
            '--measured-kind', 'sampled', '--period', str(T), '--controller', '1')
    check(r.returncode == 2 and 'design document' in r.stderr, 'without a document: %s'
          % r.stderr.strip())

    if FAILS:
        sys.exit('%d check(s) failed' % len(FAILS))
    print('measured family: every check passed')


if __name__ == '__main__':
    main()
