#!/usr/bin/python3
"""Stability judged on measured data (the Nyquist criterion, docs/measured-data.md) through
the command line: `analyze --measured … --measured-unstable-poles N` and a document's
`<measured open_loop_unstable_poles>`.

The data: the belt axis of test-cli-measured.py, its ZOH equivalent by Debian's
scipy.signal.cont2discrete on the unit circle (numpy.polyval) at 50 points per decade from
0.1 rad/s up to pi/T; closed through the lead 3.4(1 + w/15)/(1 + w/110) and one sample of
computation delay, a stable loop (phase margin 56°: test-cli-measured.py checks the margins
against the model), type 1 (the plant's integrator). numpy.roots of the characteristic
polynomial confirms it is stable. Checked: the verdict and its keys; P = 2 given makes Z = 2
(Z = P − N, N = 0 from the data); data that start near the crossover are undecided at the
low end; data that stop at pi/(2T) (|L| far below 0.5 there) are decided under the stated
assumption; bad values of the option are refused with exit status 2; a document's count is
used by `analyze FILE.lwd`.

Usage: test-cli-measured-stability.py CLI
"""
import json
import math
import os
import subprocess
import sys
import tempfile

import numpy as np
from scipy import signal

PLANT = '180*40000/(s*(s+12)*(s^2+40*s+40000))'
NUM = [180 * 40000]
DEN = np.polymul([1, 12, 0], [1, 40, 40000])
CTRL = '3.4*(1+w/15)/(1+w/110)'
T = 0.002
FAILS = []


def check(ok, what):
    print('ok  ' if ok else 'FAIL', what)
    if not ok:
        FAILS.append(what)


def run(cli, *args):
    return subprocess.run([cli, *args], capture_output=True, text=True)


def write_csv(path, w, h):
    with open(path, 'w') as f:
        f.write('frequency_rad_s,real,imag\n')
        for wi, hi in zip(w, h):
            f.write('%r,%r,%r\n' % (float(wi), float(hi.real), float(hi.imag)))


def measured(cli, path, *extra):
    r = run(cli, 'analyze', '--measured', path, '--measured-kind', 'sampled', '--period', str(T),
            '--controller', CTRL, '--json', *extra)
    if r.returncode != 0:
        sys.exit('analyze failed: %s' % r.stderr)
    return json.loads(r.stdout)['measured']


def main():
    cli = sys.argv[1]
    tmp = tempfile.mkdtemp(prefix='lw-test-stability-')
    nyq = math.pi / T
    w = np.append(10 ** np.arange(-1, math.log10(nyq) - 1e-9, 1 / 50), nyq)
    bd, ad, _ = signal.cont2discrete((NUM, DEN), T, method='zoh')
    bd, ad = np.ravel(bd), np.ravel(ad)
    z = np.exp(1j * w * T)
    hp = np.polyval(bd, z) / np.polyval(ad, z)
    path = os.path.join(tmp, 'belt.csv')
    write_csv(path, w, hp)

    # the reference: the model's closed loop (controller by Tustin from the w-plane lead)
    k, wz, wp = 3.4, 15.0, 110.0
    # C(w) = k (1 + w/wz)/(1 + w/wp), w = (2/T)(z - 1)/(z + 1)
    a = 2 / T
    nc = k * np.array([1 + a / wz, 1 - a / wz])
    dc = np.array([1 + a / wp, 1 - a / wp])
    char = np.polyadd(np.polymul(np.polymul(dc, ad), [1, 0]), np.polymul(nc, bd))
    roots = np.abs(np.roots(char))
    check(np.all(roots < 1), 'numpy.roots: the loop is stable (largest |z| %.4f)' % max(roots))

    m = measured(cli, path)
    check(m['stability'] == 'stable' and m['closed_loop_unstable_poles'] == 0
          and m['encirclements'] == 0 and m['loop_type'] == 1
          and m['stability_undecided_because'] == [] and m['open_loop_unstable_poles'] == 0,
          'stable, Z = 0, N = 0, type 1: %s' % m['stability_note'])
    m = measured(cli, path, '--measured-unstable-poles', '2')
    check(m['stability'] == 'unstable' and m['closed_loop_unstable_poles'] == 2
          and m['open_loop_unstable_poles'] == 2, 'P = 2 given: Z = 2: %s' % m['stability_note'])

    # data from 30 rad/s (|L| about 1.4 at the lowest point): undecided at the low end
    cut = w >= 30
    short_lo = os.path.join(tmp, 'from30.csv')
    write_csv(short_lo, w[cut], hp[cut])
    m = measured(cli, short_lo)
    check(m['stability'] == 'undecided' and m['stability_undecided_because'] == ['low_end']
          and m['closed_loop_unstable_poles'] is None and m['encirclements'] is None
          and 'measure lower' in m['stability_note'], 'low end short: %s' % m['stability_note'])
    r = run(cli, 'analyze', '--measured', short_lo, '--measured-kind', 'sampled', '--period',
            str(T), '--controller', CTRL)
    check(r.returncode == 0 and 'Stability on the data' in r.stdout and 'undecided' in r.stdout,
          'text report: the verdict and why')
    # data up to pi/(2T): |L| < 0.5 at the last point, |L| < 1 assumed above
    cut = w <= nyq / 2
    short_hi = os.path.join(tmp, 'to-half.csv')
    write_csv(short_hi, w[cut], hp[cut])
    m = measured(cli, short_hi)
    check(m['stability'] == 'stable' and 'above' in m['stability_note'],
          'high end short, |L| small there: %s' % m['stability_note'])

    # refusals
    for bad, what in (('1001', 'out of range'), ('-1', 'out of range'), ('x', '')):
        r = run(cli, 'analyze', '--measured', path, '--measured-kind', 'sampled', '--period',
                str(T), '--measured-unstable-poles', bad)
        check(r.returncode == 2 and '--measured-unstable-poles' in r.stderr and what in r.stderr,
              '--measured-unstable-poles %s refused: %s' % (bad, r.stderr.strip()))
    r = run(cli, 'analyze', '--plant', PLANT, '--period', str(T), '--measured-unstable-poles', '1')
    check(r.returncode == 2 and 'needs --measured' in r.stderr,
          'without --measured refused: %s' % r.stderr.strip())

    # a document's count: open_loop_unstable_poles="2" gives Z = 2 in analyze FILE.lwd
    doc = os.path.join(tmp, 'belt.lwd')
    r = run(cli, 'new', '--plant', PLANT, '--period', str(T), '--measured', path,
            '--measured-kind', 'sampled', '--out', doc)
    check(r.returncode == 0, 'new --measured: %s' % r.stderr.strip())
    text = open(doc).read()
    check('open_loop_unstable_poles="0"' in text, 'the document states P = 0')
    with open(doc, 'w') as f:
        f.write(text.replace('open_loop_unstable_poles="0"', 'open_loop_unstable_poles="2"'))
    r = run(cli, 'analyze', doc, '--json')
    check(r.returncode == 0, 'analyze FILE.lwd: %s' % r.stderr.strip())
    if r.returncode == 0:
        m = json.loads(r.stdout)['measured']
        check(m['open_loop_unstable_poles'] == 2 and m['stability'] == 'unstable'
              and m['closed_loop_unstable_poles'] == 2, 'the document\'s P used: %s'
              % m['stability_note'])
    if FAILS:
        sys.exit('%d failures' % len(FAILS))


if __name__ == '__main__':
    main()
