#!/usr/bin/python3
"""Operating points of a plant family (docs/families.md): named sets of parameter values, each
a member of the family, named wherever it is the worst.

The design: a pump's discharge pressure over its tank level, K/((0.3s+1)(tau·s+1)) with a
20 ms dead time, sampled at 100 Hz, a PID; the points "empty" (K 1.1, tau 0.03), "half" (the
nominal values given again), "full" (K 0.6, tau 0.09) and "late" (the dead time 30 ms): an
invented scenario, every number made up. What is checked:

- a family of points alone (no ranges) has the nominal and each point as members, and each
  figure's worst over the family equals, to 1e-9 relative, the worst of `analyze` run on a
  document holding each point's values as its nominals (the same engine: a member is
  evaluated as a plant alone is; 1e-9 leaves room for nothing but the last bits of a sum);
  the worst member carries the point's name in the JSON ("point") and in the text;
- the same with the loop options (--param, --point) against `analyze --param` at the
  point's values;
- with ranges too: a point outside the ranges is allowed, and the search for the worst stays
  in the ranges (every worst member that is not a point lies in the box);
- `check` fails when a requirement fails at a point only, naming the point;
- the report's family table gives each figure's nominal beside its worst and the point's name;
  `plot` draws every point as a member;
- the canonical save keeps the points; bad --point input and --point with a document are
  refused naming the option; a parameter called "point" does not go with points.

Usage: test-cli-family-points.py CLI
"""
import os
import re
import shutil
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwcli import FAILS, check, json_of, run  # noqa: E402

HEAD = """<?xml version="1.0" encoding="UTF-8"?>
<design xmlns="urn:loopwright:design" version="1">
  <title>Pump over tank level</title>
  <plant dead_time_s="0.02">K/((0.3*s+1)*(tau*s+1))</plant>
  <parameters>
%s  </parameters>
  <sampling period_s="0.01" hold="zero-order" compute_delay_samples="1"/>
  <requirements>
    <phase-margin min_deg="%s"/>
  </requirements>
  <variants active="pid">
    <variant name="pid">
      <pid label="pressure PID" kp="2" ti_s="0.3" td_s="0.03" filter_n="8"/>
    </variant>
  </variants>
</design>
"""
NOMINAL = {'K': 0.8, 'tau': 0.05, 'dead_time_s': 0.02}
POINTS = {'empty': {'K': 1.1, 'tau': 0.03}, 'half': {'K': 0.8}, 'full': {'K': 0.6, 'tau': 0.09},
          'late': {'dead_time_s': 0.03}}
# figure: (the family's key, the plain analyze's section and key, worse is smaller)
FIGURES = {
    'phase_margin': ('worst_phase_margin_deg', 'loop', 'phase_margin_deg', True),
    'gain_margin': ('worst_gain_margin_db', 'loop', 'gain_margin_db', True),
    'delay_margin': ('worst_delay_margin_s', 'loop', 'delay_margin_s', True),
    'sensitivity_peak': ('worst_sensitivity_peak', 'loop', 'sensitivity_peak', False),
    'overshoot': ('worst_overshoot_pct', 'step', 'overshoot_pct', False),
    'settling_time': ('worst_settling_time_s', 'step', 'settling_time_s', False),
}
REL = 1e-9


def params_xml(nominal, ranges=None, points=None):
    out = ''
    for name in ('K', 'tau', 'dead_time_s'):
        r = (ranges or {}).get(name)
        out += '    <parameter name="%s" nominal="%r"%s/>\n' % (
            name, nominal[name], ' low="%r" high="%r"' % r if r else '')
    for pname, values in (points or {}).items():
        out += '    <point name="%s">\n' % pname
        for k, v in values.items():
            out += '      <value parameter="%s" value="%r"/>\n' % (k, v)
        out += '    </point>\n'
    return out


def write(name, nominal, ranges=None, points=None, min_pm='50'):
    path = os.path.join(TMP, name)
    text = HEAD % (params_xml(nominal, ranges, points), min_pm)
    text = text.replace('dead_time_s="0.02"', 'dead_time_s="%r"' % nominal['dead_time_s'], 1)
    with open(path, 'w', encoding='utf-8') as f:
        f.write(text)
    return path


def close(a, b):
    return abs(a - b) <= REL * max(abs(a), abs(b))


def check_worst(fam, alone, where):
    """Each figure's worst over the family against the worst of the members analyzed alone
    (alone: name -> analyze JSON; 'nominal' is the nominal's)."""
    for fig, (fkey, section, key, smaller) in FIGURES.items():
        values = {m: j[section][key] for m, j in alone.items() if j[section].get(key) is not None}
        pick = min if smaller else max
        worst = pick(values.values())
        who = [m for m, v in values.items() if v == worst]
        got = fam[fkey]
        check(got is not None and close(got, worst), '%s: worst %s %r, alone %r (%s)'
              % (where, fig, got, worst, who))
        member = fam['worst_members'][fig]
        if who == ['nominal']:
            check('point' not in member, '%s: worst %s is the nominal, not a point: %r'
                  % (where, fig, member))
        elif 'nominal' not in who and len(who) == 1:
            check(member.get('point') == who[0], '%s: worst %s at point %r, named %r'
                  % (where, fig, who[0], member.get('point')))
        print('%s: worst %-16s %.12g (%s), relative difference %.1e'
              % (where, fig, got, ', '.join(who), abs(got - worst) / abs(worst)))


def main():
    cli = sys.argv[1]
    # a family of points alone, in a document
    doc = write('pump-points.lwd', NOMINAL, points=POINTS)
    fam = json_of(cli, 'analyze', doc, '--json')['family']
    check(fam['members'] == 1 + len(POINTS) and fam['points'] == len(POINTS)
          and fam['corners'] == 0, 'members: the nominal and the points: %r' % fam['members'])
    alone = {'nominal': json_of(cli, 'analyze', doc, '--json')}
    for pname, values in POINTS.items():
        at = dict(NOMINAL, **values)
        alone[pname] = json_of(cli, 'analyze', write('alone-%s.lwd' % pname, at), '--json')
    check_worst(fam, alone, 'document')
    check(fam['worst_member'].get('point') == 'full', 'the worst phase margin at "full": %r'
          % fam['worst_member'])
    text = run(cli, 'analyze', doc).stdout
    check(re.search(r"worst phase margin .* at point 'full' \(K = 0\.6, tau = 0\.09", text)
          is not None, 'the text names the point: ' + text[text.find('Plant family'):][:300])

    # the same with the loop options
    loop = ['--plant', 'K/((0.3*s+1)*(tau*s+1))', '--period', '0.01', '--dead-time', '0.02',
            '--controller-z', '1.5*(z-0.9)/(z-1)']
    params = ['--param', 'K=0.8', '--param', 'tau=0.05']
    pts = []
    for pname, values in POINTS.items():
        pts += ['--point', '%s:%s' % (pname, ','.join('%s=%r' % kv for kv in values.items()))]
    lfam = json_of(cli, 'analyze', *loop, *params, *pts, '--json')['family']
    lalone = {'nominal': json_of(cli, 'analyze', *loop, *params, '--json')}
    for pname, values in POINTS.items():
        at = dict(NOMINAL, **values)
        lalone[pname] = json_of(cli, 'analyze', '--plant', loop[1], '--period', '0.01',
                                '--dead-time', repr(at['dead_time_s']), loop[6], loop[7],
                                '--param', 'K=%r' % at['K'], '--param', 'tau=%r' % at['tau'],
                                '--json')
    check_worst(lfam, lalone, 'loop options')

    # with ranges: a point outside them is allowed, the search stays inside
    ranges = {'K': (0.7, 0.9), 'tau': (0.04, 0.06)}
    outside = {'flooded': {'K': 1.3, 'tau': 0.02}}
    rdoc = write('pump-ranges.lwd', NOMINAL, ranges, outside)
    rfam = json_of(cli, 'analyze', rdoc, '--json')['family']
    check(rfam['points'] == 1 and rfam['corners'] == 4, 'one point and 4 corners: %r / %r'
          % (rfam['points'], rfam['corners']))
    for fig, m in rfam['worst_members'].items():
        if 'point' in m:
            check(m['point'] == 'flooded' and m['K'] == 1.3, 'the point: %r' % m)
            continue
        inside = all(lo <= m[k] <= hi for k, (lo, hi) in ranges.items())
        check(inside, 'worst %s found in the ranges: %r' % (fig, m))
    print('ranges + point: worst members %r' % rfam['worst_members'])

    # check fails at a point only: the nominal passes 70 deg, "full" does not
    nominal_pm = alone['nominal']['loop']['phase_margin_deg']
    full_pm = alone['full']['loop']['phase_margin_deg']
    check(full_pm < 70.0 < nominal_pm, 'the scenario: nominal %.3f, full %.3f' % (nominal_pm,
                                                                                 full_pm))
    r = run(cli, 'check', write('pump-70.lwd', NOMINAL, points=POINTS, min_pm='70'))
    check(r.returncode == 3 and "FAIL" in r.stdout and "at point 'full'" in r.stdout,
          'check fails at the point: %d %s' % (r.returncode, r.stdout[-400:]))

    # the report: nominal beside worst, the point named
    html = os.path.join(TMP, 'r.html')
    r = run(cli, 'report', doc, '--out', html)
    check(r.returncode == 0, 'report: ' + r.stderr)
    with open(html, encoding='utf-8') as f:
        h = f.read()
    m = re.search(r'<table data-table="family-worst"[^>]*>.*?<td>phase margin \(deg\)</td>'
                  r'<td>([^<]*)</td><td>([^<]*)</td><td>([^<]*)</td>', h, re.S)
    check(m is not None, 'the family table has the phase margin row')
    if m:
        # 6 significant digits in the report: 1e-5 relative holds them
        check(abs(float(m.group(1)) - nominal_pm) <= 1e-5 * nominal_pm,
              'report nominal %s, analyze %.9g' % (m.group(1), nominal_pm))
        check(abs(float(m.group(2)) - full_pm) <= 1e-5 * full_pm,
              'report worst %s, analyze "full" %.9g' % (m.group(2), full_pm))
        check(m.group(3).startswith('point “full”: K = 0.6, tau = 0.09'),
              'report member: ' + m.group(3))

    # plot: every point drawn (the worst PM's dashed), nothing else but the nominal's curve
    svg = os.path.join(TMP, 'p.svg')
    r = run(cli, 'plot', doc, '--view', 'nyquist', '--out', svg)
    check(r.returncode == 0, 'plot: ' + r.stderr)
    with open(svg, encoding='utf-8') as f:
        s = f.read()
    thin, dashed = s.count('stroke-width:0.85;'), s.count('stroke-width:1.35;')
    check(dashed == 1 and thin == len(POINTS) - 1 + 1, 'nyquist: %d thin, %d dashed for %d '
          'points (+1 key)' % (thin, dashed, len(POINTS)))

    # the canonical save keeps the points as they are
    tidy = os.path.join(TMP, 'tidy.lwd')
    r = run(cli, 'tidy', doc, '--out', tidy)
    check(r.returncode == 0, 'tidy: ' + r.stderr)
    with open(doc, encoding='utf-8') as a, open(tidy, encoding='utf-8') as b:
        check(a.read() == b.read(), 'the document is in canonical form with its points')

    # refused, naming the option
    for args, words in ((['--point', 'x'], 'is not NAME:PARAM=VALUE'),
                        (['--point', 'a:m=1'], "'m' names no --param"),
                        (['--point', 'a:K=1,K=2'], "parameter 'K' is given twice"),
                        (['--point', 'a:K=inf'], 'not a finite number'),
                        (['--point', 'a:K=0'], "at operating point 'a'"),
                        (['--point', 'a:K=1', '--point', 'a:K=2'], 'given twice'),
                        (['--point', 'a:dead_time_s=-1'], 'negative')):
        r = run(cli, 'analyze', *loop, *params, *args)
        check(r.returncode == 2 and '--point' in r.stderr and words in r.stderr,
              '%s: %d %s' % (args, r.returncode, r.stderr.strip()))
    for cmd in (['analyze', doc], ['plot', doc, '--view', 'bode-z', '--out', svg]):
        r = run(cli, *cmd, '--point', 'a:K=1')
        check(r.returncode == 2 and '--point' in r.stderr, '%s --point refused: %s'
              % (cmd[0], r.stderr.strip()))
    for cmd in (['analyze'], ['plot', '--view', 'bode-z', '--out', svg]):
        r = run(cli, *cmd, '--measured', os.devnull, '--measured-kind', 'sampled', '--period',
                '0.1', '--point', 'a:K=1')
        check(r.returncode == 2 and '--point' in r.stderr and 'measured data' in r.stderr,
              '%s: --point with measured data refused: %s' % (cmd[0], r.stderr.strip()))
    r = run(cli, 'analyze', '--plant', 'point/(s+1)', '--param', 'point=2', '--period', '0.1',
            '--point', 'a:point=3')
    check(r.returncode == 2 and "parameter called 'point'" in r.stderr,
          'a parameter called point: ' + r.stderr.strip())


TMP = tempfile.mkdtemp(prefix='lw-family-points-')
try:
    main()
finally:
    shutil.rmtree(TMP, ignore_errors=True)
if FAILS:
    sys.exit('%d check(s) failed' % len(FAILS))
print('ok')
