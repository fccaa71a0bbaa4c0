#!/usr/bin/python3
"""A measured frequency response kept in a design document, through the command line.

The data are made here with Debian's scipy (the continuous G(jw) by scipy.signal.freqs, the
sampled kind by scipy.signal.cont2discrete + freqz), written as CSV with 17 significant digits.

- `new --measured FILE.csv --measured-kind KIND` keeps the table: every number in the
  document reads back (Python's float) to the CSV's double exactly — the same binary64, no
  tolerance: the document writes the shortest text that reads back exactly; the new document
  is canonical (`tidy --check` exits 0).
- `analyze FILE.lwd --json` has a `measured` object equal, member for member and exactly,
  to the one of `analyze --measured FILE.csv` with the document's loop given as options (the
  same code closes the loop on the data: only the plant-less inputs differ in where they come
  from). With `analysis="data"` the `loop` block is the data's, exactly as `analyze --measured`
  prints it. `--all-variants` closes each variant's loop (its own period) on the data.
- The text report has the section; bad `new` options are refused with exit status 2, a bad
  table with FILE:LINE:COLUMN.

Usage: test-cli-measured-doc.py CLI
"""
import math
import os
import re
import sys
import tempfile

import numpy as np
from scipy import signal

from lwcli import FAILS, check, json_of, run, write_csv

PLANT = '180*40000/(s*(s+12)*(s^2+40*s+40000))'
NUM = [180 * 40000]
DEN = np.polymul([1, 12, 0], [1, 40, 40000])
T = 0.002
DEAD = '0.0013'
# members of the measured object that name where the data came from, not the numbers
NAMING = {'file', 'note', 'source', 'analysis', 'open_loop_unstable_poles'}


def table_of(lwd):
    """The rows of <measured> in the document, as floats."""
    text = open(lwd).read()
    body = re.search(r'<measured[^>]*>\n(.*?)\n  </measured>', text, re.S).group(1)
    lines = body.split('\n')
    return lines[0], [[float(x) for x in line.split(',')] for line in lines[1:]]


def numbers_of(measured):
    return {k: v for k, v in measured.items() if k not in NAMING}


def set_attr(lwd, old, new):
    text = open(lwd).read()
    assert old in text, old
    with open(lwd, 'w') as f:
        f.write(text.replace(old, new, 1))


def main():
    cli = sys.argv[1]
    tmp = tempfile.mkdtemp(prefix='lw-test-measured-doc-')
    nyq = math.pi / T
    # continuous: G(jw) up to 3 pi/T (the points above pi/T are dropped by the analysis)
    w = 10 ** np.arange(-1, math.log10(3 * nyq), 1 / 40)
    _, h = signal.freqs(NUM, DEN, worN=w)
    coh = [0.5 + 0.5 * math.cos(i / 7.0) ** 2 for i in range(len(w))]
    csv = os.path.join(tmp, 'rig sweep.csv')
    write_csv(csv, w, h, coh)
    lwd = os.path.join(tmp, 'with-data.lwd')
    loop = ['--plant', PLANT, '--period', str(T), '--dead-time', DEAD, '--compute-delay', '2']
    r = run(cli, 'new', *loop, '--title', 'bench data', '--measured', csv,
            '--measured-kind', 'continuous', '--out', lwd)
    check(r.returncode == 0, 'new --measured: %s' % r.stderr.strip())

    # the table kept exactly, the document canonical
    header, rows = table_of(lwd)
    check(header == 'frequency_rad_s,real,imag,coherence', 'header: %s' % header)
    check(len(rows) == len(w), 'rows: %d of %d' % (len(rows), len(w)))
    exact = all(row == [wi, hi.real, hi.imag, ci] for row, wi, hi, ci in zip(rows, w, h, coh))
    check(exact, 'every number of the table read back exactly')
    text = open(lwd).read()
    check('<measured kind="continuous" analysis="model" source="rig sweep.csv" '
          'open_loop_unstable_poles="0">' in text, 'attributes of <measured>')
    r = run(cli, 'tidy', lwd, '--check')
    check(r.returncode == 0, 'tidy --check on the new document: %d %s' % (r.returncode, r.stderr))

    # analyze FILE.lwd: the measured object equals analyze --measured's with the same loop
    doc = json_of(cli, 'analyze', lwd, '--json')
    inline = json_of(cli, 'analyze', *loop, '--measured', csv, '--measured-kind',
                     'continuous', '--json')
    check(numbers_of(doc['measured']) == numbers_of(inline['measured']),
          'measured numbers equal: %s vs %s' % (numbers_of(doc['measured']),
                                                numbers_of(inline['measured'])))
    check(len(doc['measured']['gain_crossovers_rad_s']) >= 1, 'a gain crossover in the data')
    # the document's model against its data: the aliasing terms neglected for continuous data
    # make it large near pi/T (docs/measured-data.md); here only present and finite
    check(math.isfinite(doc['measured']['model_relative_difference']), 'model compared')
    check(doc['measured']['source'] == 'rig sweep.csv' and doc['measured']['analysis'] == 'model'
          and doc['measured']['open_loop_unstable_poles'] == 0, 'naming members')
    model_loop = json_of(cli, 'analyze', *loop, '--json')['loop']
    check(doc['loop'] == model_loop, 'analysis="model": the loop block is the model\'s')

    # analysis="data": the loop block is the data's
    set_attr(lwd, 'analysis="model"', 'analysis="data"')
    doc = json_of(cli, 'analyze', lwd, '--json')
    check(doc['loop'] == inline['loop'], 'analysis="data": the loop block is the data\'s')
    check(doc['measured']['analysis'] == 'data', 'analysis member')

    # a gain stage and a variant with its own period: each variant's loop closed on the data
    set_attr(lwd, '<variant name="initial"/>',
             '<variant name="initial">\n      <gain ratio="0.5"/>\n    </variant>\n'
             '    <variant name="slow" period_s="0.004"/>')
    every = json_of(cli, 'analyze', lwd, '--all-variants', '--json')['variants']
    slow_loop = ['--plant', PLANT, '--period', '0.004', '--dead-time', DEAD,
                 '--compute-delay', '2']
    for entry, opts in ((every[0], loop + ['--controller', '0.5']), (every[1], slow_loop)):
        ref = json_of(cli, 'analyze', *opts, '--measured', csv, '--measured-kind', 'continuous',
                      '--json')
        check(numbers_of(entry['measured']) == numbers_of(ref['measured'])
              and entry['loop'] == ref['loop'], 'variant %s closed on the data' % entry['name'])
    check(every[1]['measured']['points_below_nyquist']
          < every[0]['measured']['points_below_nyquist'], 'the slower period drops more points')

    # the text report's section
    r = run(cli, 'analyze', lwd)
    check(r.returncode == 0 and 'Measured plant: <measured> of ' in r.stdout
          and 'source: rig sweep.csv' in r.stdout and 'analysis="data"' in r.stdout
          and 'phase margin' in r.stdout.split('Measured plant')[1], 'text report section')

    # sampled data: made by scipy's ZOH of the plant, no dead time, below pi/T
    ws = 10 ** np.arange(-1, math.log10(nyq), 1 / 40)
    bd, ad, _ = signal.cont2discrete((NUM, DEN), T, method='zoh')
    _, hz = signal.freqz(np.ravel(bd), ad, worN=ws * T)
    csv_s = os.path.join(tmp, 'sampled.csv')
    write_csv(csv_s, ws, hz)
    lwd_s = os.path.join(tmp, 'sampled.lwd')
    loop_s = ['--plant', PLANT, '--period', str(T)]
    r = run(cli, 'new', *loop_s, '--measured', csv_s, '--measured-kind', 'sampled', '--out', lwd_s)
    check(r.returncode == 0, 'new --measured sampled: %s' % r.stderr.strip())
    check(table_of(lwd_s)[0] == 'frequency_rad_s,real,imag', 'no coherence column')
    doc = json_of(cli, 'analyze', lwd_s, '--json')
    inline = json_of(cli, 'analyze', *loop_s, '--measured', csv_s, '--measured-kind', 'sampled',
                     '--json')
    check(numbers_of(doc['measured']) == numbers_of(inline['measured']), 'sampled: equal')
    # scipy's ZOH against ours, both exact; scipy's through polynomial coefficients of degree
    # 4 (2.4e-9 relative measured in test-cli-measured.py): 1e-8
    check(doc['measured']['model_relative_difference'] < 1e-8,
          'sampled: the model against its own data: %g'
          % doc['measured']['model_relative_difference'])
    # a variant at a longer period puts the sampled data above its pi/T: refused, named
    set_attr(lwd_s, '<variant name="initial"/>', '<variant name="initial" period_s="0.01"/>')
    r = run(cli, 'analyze', lwd_s, '--json')
    check(r.returncode == 2 and lwd_s + ': <measured>' in r.stderr,
          'sampled data above the variant\'s pi/T: %s' % r.stderr.strip())

    # a design on the data alone: new --measured without --plant; the loop is closed on the
    # data exactly as analyze --measured without --plant closes it (the same core function:
    # equal to the last bit); what needs a model is not available, never passed
    lwd_a = os.path.join(tmp, 'alone.lwd')
    r = run(cli, 'new', '--period', str(T), '--measured', csv_s, '--measured-kind', 'sampled',
            '--out', lwd_a)
    check(r.returncode == 0, 'new --measured without --plant: %s' % r.stderr.strip())
    text = open(lwd_a).read()
    check('<plant dead_time_s="0"></plant>' in text and 'analysis="data"' in text,
          'an empty plant and analysis="data"')
    check(run(cli, 'tidy', lwd_a, '--check').returncode == 0, 'data alone: canonical')
    set_attr(lwd_a, '<variant name="initial"/>',
             '<variant name="initial">\n      <gain ratio="0.5"/>\n    </variant>')
    set_attr(lwd_a, '  <variants', '  <requirements>\n    <phase-margin min_deg="%s"/>\n'
             '    <overshoot max_pct="30"/>\n  </requirements>\n  <variants')
    inline = json_of(cli, 'analyze', '--period', str(T), '--controller', '0.5', '--measured',
                     csv_s, '--measured-kind', 'sampled', '--json')
    pm = inline['loop']['phase_margin_deg']
    for limit, verdict in ((pm - 1.0, 'pass'), (pm + 1.0, 'fail')):
        text = open(lwd_a).read()
        with open(lwd_a + '.t.lwd', 'w') as f:
            f.write(text.replace('min_deg="%s"', 'min_deg="%.6f"' % limit))
        doc = json_of(cli, 'analyze', lwd_a + '.t.lwd', '--json')
        check(doc['model'] is None and doc['loop'] == inline['loop']
              and numbers_of(doc['measured']) == numbers_of(inline['measured']),
              'data alone: the loop block is the data\'s, exactly')
        reqs = {q['kind']: q for q in doc['requirements']}
        check(reqs['phase-margin']['status'] == verdict,
              'data alone: phase margin %s judged on the data: %s' % (verdict, reqs))
        check(reqs['overshoot']['status'] == 'not-available',
              'data alone: overshoot not available: %s' % reqs['overshoot'])
        r = run(cli, 'check', lwd_a + '.t.lwd')
        check(r.returncode == 3 and 'on the measured data alone' in r.stdout,
              'check on data alone fails (overshoot not available): %d %s'
              % (r.returncode, r.stdout))
    r = run(cli, 'analyze', lwd_a + '.t.lwd')
    check(r.returncode == 0 and 'No plant model' in r.stdout and 'Measured plant' in r.stdout
          and 'NOT AVAILABLE (needs a plant model' in r.stdout, 'data alone: the text report')
    # data that stop just above the crossover (|L| > 0.5 at the last point) do not decide
    # the closed loop's stability: without a model the phase margin is then not available
    wc = inline['loop']['gain_crossover_rad_s']
    short = [i for i, wi in enumerate(ws) if wi <= 1.3 * wc]
    csv_short = os.path.join(tmp, 'short.csv')
    write_csv(csv_short, ws[short], hz[short])
    lwd_short = os.path.join(tmp, 'short.lwd')
    r = run(cli, 'new', '--period', str(T), '--measured', csv_short, '--measured-kind',
            'sampled', '--out', lwd_short)
    check(r.returncode == 0, 'new on the short table: %s' % r.stderr.strip())
    text = open(lwd_a + '.t.lwd').read()
    table = re.search(r'<measured.*?</measured>\n', open(lwd_short).read(), re.S).group(0)
    with open(lwd_short, 'w') as f:
        f.write(re.sub(r'<measured.*?</measured>\n', lambda m: table, text, flags=re.S))
    doc = json_of(cli, 'analyze', lwd_short, '--json')
    reqs = {q['kind']: q for q in doc['requirements']}
    check(doc['measured']['stability'] == 'undecided'
          and reqs['phase-margin']['status'] == 'not-available',
          'data alone, undecided stability: the phase margin not available: %s %s'
          % (doc['measured']['stability'], reqs['phase-margin']))
    r = run(cli, 'analyze', lwd_a + '.t.lwd', '--saturation', '-1:1')
    check(r.returncode == 2 and '--saturation' in r.stderr and 'needs a model' in r.stderr,
          'data alone: --saturation refused: %s' % r.stderr.strip())
    r = run(cli, 'emit', lwd_a + '.t.lwd', '--form', 'difference', '--out',
            tmp)
    check(r.returncode == 2 and 'no plant model' in r.stderr,
          'data alone: emit says it needs a model: %d %s' % (r.returncode, r.stderr.strip()))

    # bad options of new
    bad_csv = os.path.join(tmp, 'bad.csv')
    with open(bad_csv, 'w') as f:
        f.write('frequency_rad_s,real,imag\n' + ''.join('%d,1,-1\n' % (i + 1) for i in range(11))
                + '12,1,x\n')
    for args, expect in (([], '--measured-kind'),
                         (['--measured-kind', 'sampled'], None),
                         (['--measured-kind', 'analog'], 'analog')):
        a = list(args)
        if expect is None:
            r = run(cli, 'new', *loop_s, '--measured-kind', 'sampled')
            expect = '--measured'
        else:
            r = run(cli, 'new', *loop_s, '--measured', csv_s, *a)
        check(r.returncode == 2 and expect in r.stderr, 'new refuses %s: %s' % (a, r.stderr))
    r = run(cli, 'new', *loop_s, '--measured', bad_csv, '--measured-kind', 'sampled')
    check(r.returncode == 2 and bad_csv + ':13:3:' in r.stderr and r.stdout == '',
          'bad table by FILE:LINE:COLUMN: %s' % r.stderr.strip())
    if FAILS:
        sys.exit('%d failures' % len(FAILS))
    print('ok: the table kept exactly; analyze FILE.lwd closes the loop on it as analyze '
          '--measured does')


if __name__ == '__main__':
    main()
