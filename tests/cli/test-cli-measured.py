#!/usr/bin/python3
"""`analyze --measured FILE.csv --measured-kind sampled|continuous` end to end.

The data are made here, independently of Loopwright, with Debian's scipy: the plant's
zero-order-hold equivalent by scipy.signal.cont2discrete and its response on the unit circle
by scipy.signal.freqz (the sampled kind), and the continuous G(jw) by scipy.signal.freqs (the
continuous kind), at 50 points per decade, written as CSV in the three forms of the table. The
margins on the data must agree with `analyze --plant` on the same loop (the model's margins,
checked against scipy in test-cli-helpers.py and tests/reference): crossovers within 1e-3
relative and margins within 0.1 deg / 0.1 dB — the issue's acceptance; interpolation linear in
log frequency errs by ~3e-4 at this density (docs/measured-data.md). For the continuous kind
only crossovers below pi/(5T) are compared (the aliasing terms are neglected there).

Then bad files through the CLI: each refused with exit status 2 and FILE:LINE:COLUMN.

Usage: test-cli-measured.py CLI
"""
import json
import math
import os
import re
import sys
import tempfile

import numpy as np
from scipy import signal

from lwcli import FAILS, check, run

PLANT = '180*40000/(s*(s+12)*(s^2+40*s+40000))'
NUM = [180 * 40000]
DEN = np.polymul([1, 12, 0], [1, 40, 40000])
CTRL = '3.4*(1+w/15)/(1+w/110)'
T = 0.002


def analyze(cli, *args):
    r = run(cli, 'analyze', '--period', str(T), '--controller', CTRL, '--json', *args)
    if r.returncode != 0:
        print(r.stderr)
        sys.exit('analyze failed: %s' % ' '.join(args))
    return json.loads(r.stdout)['loop'], json.loads(r.stdout)


def write_csv(path, w, h, form, coherence=None):
    with open(path, 'w') as f:
        f.write('# made by test-cli-measured.py with scipy\n')
        cols = {'hz': 'frequency_hz', 'rad': 'frequency_rad_s'}
        if form == 'db':
            f.write('frequency_hz,magnitude_db,phase_deg,drive_level\n')
            for wi, hi in zip(w, h):
                f.write('%.17g,%.17g,%.17g,1\n' % (wi / (2 * math.pi), 20 * math.log10(abs(hi)),
                                                 math.degrees(np.angle(hi))))
        elif form == 'ratio':
            f.write('phase_deg,magnitude,frequency_rad_s\n')
            for wi, hi in zip(w, h):
                f.write('%.17g,%.17g,%.17g\n' % (math.degrees(np.angle(hi)), abs(hi), wi))
        else:
            f.write('frequency_rad_s, real, imag%s\n' % (', coherence' if coherence else ''))
            for i, (wi, hi) in enumerate(zip(w, h)):
                f.write('%.17g, %.17g, %.17g%s\n' % (wi, hi.real, hi.imag,
                                                   ', %.3f' % coherence[i] if coherence else ''))
    del cols


def compare(model, data, up_to, label, last):
    """Every crossover of the model below up_to and strictly inside the data (below its last
    point, `last`) is found once in the data, its margin within tol."""
    up_to = min(up_to, last)
    for key_w, key_m, tol in (('gain_crossovers_rad_s', 'phase_margins_deg', 0.1),
                              ('phase_crossovers_rad_s', 'gain_margins_db', 0.1)):
        for wm, mm in zip(model[key_w], model[key_m]):
            if not (wm < up_to):
                continue
            near = [(wd, md) for wd, md in zip(data[key_w], data[key_m])
                    if abs(wd / wm - 1) <= 1e-3]
            check(len(near) == 1, '%s: %s %.6g of the model found once in the data (%s)'
                  % (label, key_w, wm, data[key_w]))
            if near:
                check(abs(near[0][1] - mm) <= tol, '%s: margin %.6g vs model %.6g at %.6g'
                      % (label, near[0][1], mm, wm))
                print('%s: %s %.6g: data %.6g, margin %.4f vs %.4f' % (label, key_w, wm,
                                                                      near[0][0], near[0][1], mm))


def main():
    cli = sys.argv[1]
    tmp = tempfile.mkdtemp(prefix='lw-test-measured-')
    model, _ = analyze(cli, '--plant', PLANT)
    nyq = math.pi / T
    w = 10 ** np.arange(-1, math.log10(nyq), 1 / 50)
    # sampled: the ZOH plant from scipy, on the unit circle
    bd, ad, _ = signal.cont2discrete((NUM, DEN), T, method='zoh')
    _, hz = signal.freqz(np.ravel(bd), ad, worN=w * T)
    for form in ('db', 'ratio', 'complex'):
        path = os.path.join(tmp, 'sampled-%s.csv' % form)
        write_csv(path, w, hz, form)
        data, whole = analyze(cli, '--measured', path, '--measured-kind', 'sampled')
        compare(model, data, math.inf, 'sampled/' + form, w[-1])
        check(whole['measured']['points'] == len(w), 'points counted')
        if form == 'db':
            check('drive_level' in whole['measured']['note'], 'extra column named in the note')
        for a, b in zip(data['gain_crossovers_rad_s'],
                        whole['measured']['gain_crossover_intervals_rad_s']):
            check(b[0] <= a <= b[1], 'crossover inside its interval')
    # with the model beside: the difference of the data from the model's sampled response is
    # scipy's ZOH against ours; both exact, scipy's through polynomial coefficients of degree 4
    # (2.4e-9 relative measured at the high end): 1e-8
    _, whole = analyze(cli, '--plant', PLANT, '--measured', os.path.join(tmp, 'sampled-db.csv'),
                       '--measured-kind', 'sampled')
    check(whole['measured']['model_relative_difference'] < 1e-8,
          'model against data: %g' % whole['measured']['model_relative_difference'])
    # continuous: G(jw) from scipy, up to 3 pi/T (the points above pi/T dropped)
    wc = 10 ** np.arange(-1, math.log10(3 * nyq), 1 / 50)
    _, hs = signal.freqs(NUM, DEN, worN=wc)
    path = os.path.join(tmp, 'continuous.csv')
    write_csv(path, wc, hs, 'complex', coherence=[0.99] * len(wc))
    data, whole = analyze(cli, '--measured', path, '--measured-kind', 'continuous')
    compare(model, data, nyq / 5, 'continuous', wc[-1])
    check(whole['measured']['points_below_nyquist'] < len(wc), 'points above pi/T dropped')
    # drawn: the data's loop, faded (two curves at opacity 0.3 in the SVG, |L| and phase) only
    # where a coherence column is given; a view that needs a model is refused
    for coh_file, faded in ((path, 2), (os.path.join(tmp, 'sampled-db.csv'), 0)):
        svg = os.path.join(tmp, 'data.svg')
        r = run(cli, 'plot', '--period', str(T), '--controller', CTRL, '--measured', coh_file,
                '--measured-kind', 'continuous' if faded else 'sampled', '--view', 'bode-z',
                '--out', svg)
        check(r.returncode == 0, 'plot --measured: %s' % r.stderr.strip())
        if r.returncode == 0:
            text = open(svg).read()
            check(text.count('opacity:0.3') == faded, 'faded curves: %d, want %d'
                  % (text.count('opacity:0.3'), faded))
    r = run(cli, 'plot', '--period', str(T), '--measured', path, '--measured-kind', 'continuous',
            '--view', 'step', '--out', os.path.join(tmp, 'x.svg'))
    check(r.returncode == 2 and 'needs a model' in r.stderr, 'step view needs a model')
    # with a dead time: continuous data take --dead-time, sampled data refuse it
    model_d, _ = analyze(cli, '--plant', PLANT, '--dead-time', '0.0013')
    data_d, _ = analyze(cli, '--measured', path, '--measured-kind', 'continuous',
                        '--dead-time', '0.0013')
    compare(model_d, data_d, nyq / 5, 'continuous, dead time', wc[-1])
    r = run(cli, 'analyze', '--period', str(T), '--measured', path, '--measured-kind', 'sampled',
            '--dead-time', '0.001')
    check(r.returncode == 2 and '--dead-time' in r.stderr, 'sampled data refuse --dead-time')
    # sampled data above pi/T: refused
    r = run(cli, 'analyze', '--period', str(T * 2), '--measured',
            os.path.join(tmp, 'sampled-db.csv'), '--measured-kind', 'sampled')
    check(r.returncode == 2 and 'Nyquist' in r.stderr, 'sampled data above pi/T refused: %s'
          % r.stderr.strip())
    # text report
    r = run(cli, 'analyze', '--period', str(T), '--controller', CTRL, '--measured',
            os.path.join(tmp, 'sampled-db.csv'), '--measured-kind', 'sampled')
    check(r.returncode == 0 and 'phase margin' in r.stdout and 'need a model' in r.stdout,
          'text report')

    # bad files: exit 2 and the place
    bad = {
        'nonumber.csv': ('frequency_hz,magnitude_db,phase_deg\n' +
                         ''.join('%d,0,-90\n' % (i + 1) for i in range(12)) + '13,abc,-90\n',
                         ':14:2:'),
        'decreasing.csv': ('frequency_hz,magnitude_db,phase_deg\n' +
                           ''.join('%d,0,-90\n' % (i + 1) for i in range(12)) + '5,0,-90\n',
                           ':14:'),
        'short.csv': ('frequency_hz,magnitude_db,phase_deg\n' +
                      ''.join('%d,0,-90\n' % (i + 1) for i in range(9)), ''),
        'noheader.csv': ('# nothing\n', ''),
    }
    for name, (text, place) in bad.items():
        p = os.path.join(tmp, name)
        with open(p, 'w') as f:
            f.write(text)
        r = run(cli, 'analyze', '--period', str(T), '--measured', p, '--measured-kind', 'sampled')
        check(r.returncode == 2 and p in r.stderr and place in r.stderr,
              '%s refused with its place (%s): %s' % (name, place, r.stderr.strip()))
        print('%s: %s' % (name, r.stderr.strip()))
    with open(os.path.join(tmp, 'binary.csv'), 'wb') as f:
        f.write(b'frequency_hz,magnitude_db,phase_deg\n1,0,0\n\x00\xff\xfe garbage')
    r = run(cli, 'analyze', '--period', str(T), '--measured', os.path.join(tmp, 'binary.csv'),
            '--measured-kind', 'sampled')
    check(r.returncode == 2, 'binary refused: %s' % r.stderr.strip())
    r = run(cli, 'analyze', '--period', str(T), '--measured', os.path.join(tmp, 'none.csv'),
            '--measured-kind', 'sampled')
    check(r.returncode == 2 and '--measured' in r.stderr, 'missing file: %s' % r.stderr.strip())
    r = run(cli, 'analyze', '--period', str(T), '--measured', os.path.join(tmp, 'short.csv'))
    check(r.returncode == 2 and '--measured-kind' in r.stderr, 'kind required')
    r = run(cli, 'analyze', '--period', str(T), '--measured', os.path.join(tmp, 'short.csv'),
            '--measured-kind', 'analog')
    check(r.returncode == 2 and 'analog' in r.stderr, 'unknown kind')
    # fit: a model in s from the continuous data (scipy's G(jw) of the true plant, noise-free),
    # given back as --plant: the loop's margins then equal the true model's to 1e-6 deg
    # (vector fitting recovers noise-free rational data to ~1e-13, tests/core/test-measured-fit.c)
    path = os.path.join(tmp, 'fit.csv')
    wf = 10 ** np.arange(-1, 3.5, 1 / 50)
    _, hf = signal.freqs(NUM, DEN, worN=wf)
    write_csv(path, wf, hf, 'complex')
    r = run(cli, 'fit', '--measured', path, '--measured-kind', 'continuous', '--order', '4',
            '--relative-degree', '4', '--json')
    check(r.returncode == 0, 'fit: %s' % r.stderr.strip())
    if r.returncode == 0:
        fit = json.loads(r.stdout)
        check(fit['max_relative_error'] < 1e-9, 'fit error %g' % fit['max_relative_error'])
        check(len(fit['relative_errors']) == len(wf), 'an error per point')
        fitted, _ = analyze(cli, '--plant', fit['plant'])
        check(abs(fitted['phase_margin_deg'] - model['phase_margin_deg']) < 1e-6,
              'PM of the fitted plant %.9f vs %.9f' % (fitted['phase_margin_deg'],
                                                       model['phase_margin_deg']))
        print('fit: error %.3g, PM %.9f vs %.9f' % (fit['max_relative_error'],
                                                     fitted['phase_margin_deg'],
                                                     model['phase_margin_deg']))
    r = run(cli, 'fit', '--measured', path, '--measured-kind', 'sampled', '--order', '4')
    check(r.returncode == 2 and 'continuous' in r.stderr, 'fit of sampled data refused')
    r = run(cli, 'fit', '--measured', path, '--measured-kind', 'continuous', '--order', '0')
    check(r.returncode == 2 and '--order' in r.stderr, 'order 0 refused')
    # a document judged on its data (<measured analysis="data">): a phase-margin requirement
    # between the model's phase margin and the data's passes on the model and fails on the
    # data (the belt data below hold a resonance the model lacks: PM lower on the data)
    wb = 10 ** np.arange(0, math.log10(3 * nyq), 1 / 60)
    _, hb = signal.freqs(np.polymul(NUM, [1, 2 * 0.04 * 310, 310 ** 2]) * (330 ** 2 / 310 ** 2),
                         np.polymul(DEN, [1, 2 * 0.08 * 330, 330 ** 2]), worN=wb)
    belt = os.path.join(tmp, 'belt.csv')
    write_csv(belt, wb, hb, 'complex')
    doc = os.path.join(tmp, 'belt.lwd')
    r = run(cli, 'new', '--plant', PLANT, '--period', str(T), '--measured', belt,
            '--measured-kind', 'continuous', '--out', doc)
    check(r.returncode == 0, 'new --measured: %s' % r.stderr.strip())
    data, _ = analyze(cli, '--measured', belt, '--measured-kind', 'continuous')
    pm_data, pm_model = data['phase_margin_deg'], model['phase_margin_deg']
    check(pm_data < pm_model - 0.2, 'the belt data lower the PM (%g vs %g)' % (pm_data, pm_model))
    limit = 0.5 * (pm_data + pm_model)
    text = open(doc).read()
    text = text.replace('<variant name="initial"/>',
                        '<variant name="initial">\n      <gain ratio="3.4"/>\n      '
                        '<lead zero_rad_s="15" pole_rad_s="110"/>\n    </variant>')
    text = text.replace('<variants', '<requirements>\n    <phase-margin min_deg="%.6f"/>\n'
                        '  </requirements>\n  <variants' % limit, 1)
    for analysis, want in (('model', 0), ('data', 3)):
        with open(doc, 'w') as f:
            f.write(re.sub(r'analysis="[a-z]+"', 'analysis="%s"' % analysis, text))
        r = run(cli, 'check', doc)
        check(r.returncode == want, 'check with analysis="%s": exit %d, want %d: %s'
              % (analysis, r.returncode, want, r.stdout + r.stderr))
        print('check, analysis=%s: exit %d (PM %.4f on the model, %.4f on the data, limit %.4f)'
              % (analysis, r.returncode, pm_model, pm_data, limit))
    if FAILS:
        sys.exit('%d failures' % len(FAILS))
    print('ok: margins on data agree with the model that made them; bad files refused with '
          'their place')


if __name__ == '__main__':
    main()
