#!/usr/bin/python3
"""Plant families through the command line, against an independent brute force (scipy).

The family: P(s) = K/(s(s+a)) with K in 800 … 6400 and a in 9 … 14 (an invented loop, not a
worked example), sampled with a zero-order hold at T = 2 ms, one sample of computation delay,
and the controller C(w) = (1+w/80)(1+w/50)/((1+w/20)(1+w/500)): a lag and a lead that give the
loop's phase a dip, so the phase margin over K has its minimum inside the range (not at a
corner).

- The worst phase margin `analyze --range … --json` reports agrees within 0.05° with the
  minimum over a dense grid computed here without Loopwright: scipy.signal.cont2discrete
  (ZOH) for the plant, scipy.signal.bilinear for the controller (w = (2/T)(z−1)/(z+1)), the
  loop z^−1·C·P evaluated on the unit circle, every gain crossover found by brentq, the
  governing (smallest) phase margin; the grid is 41 × 41 over the box, then 41 × 41 again
  over ±1.5 cells around its worst point (the issue's 0.05°; the grid's own error near a
  smooth minimum is far below it).
- The worst member, analyzed alone with its parameter values (`--param`), gives the same
  phase margin (1e-9°: the same computation).
- The minimum is not at a corner here, and the family found it: its K lies inside the range.
- The dead time as a parameter (--range dead_time_s=LOW:HIGH, nominal --dead-time): the worst
  member alone reproduces its phase margin.
- Bad --range input is refused naming the option.

Usage: test-cli-family.py CLI
"""
import math
import os
import sys
import tempfile

import numpy as np
from scipy import optimize, signal

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwcli import FAILS, check, json_of, run  # noqa: E402

T = 0.002
CTL = '(1+w/80)/(1+w/20)*(1+w/50)/(1+w/500)'
K_RANGE = (800.0, 6400.0)
A_RANGE = (9.0, 14.0)


# the controller in z, once: C(w) with w = (2/T)(z-1)/(z+1)
BW = np.polymul([1 / 80.0, 1.0], [1 / 50.0, 1.0])
AW = np.polymul([1 / 20.0, 1.0], [1 / 500.0, 1.0])
BC, AC = signal.bilinear(BW, AW, fs=1.0 / T)
W_GRID = np.logspace(-1, math.log10(math.pi / T * 0.999999), 3000)


def loop_at(bp, ap, w):
    z = np.exp(1j * w * T)
    return (np.polyval(BC, z) / np.polyval(AC, z)) * (np.polyval(bp, z) / np.polyval(ap, z)) / z


def phase_margin(k, a):
    bd, ad, _ = signal.cont2discrete(([k], [1.0, a, 0.0]), T, method='zoh')
    bp, ap = np.ravel(bd), np.ravel(ad)
    mag = np.log(np.abs(loop_at(bp, ap, W_GRID)))
    pms = []
    for i in np.nonzero(np.sign(mag[:-1]) != np.sign(mag[1:]))[0]:
        wc = optimize.brentq(lambda x: math.log(abs(loop_at(bp, ap, x))), W_GRID[i],
                             W_GRID[i + 1], xtol=1e-13, rtol=1e-14)
        pm = 180.0 + math.degrees(np.angle(loop_at(bp, ap, wc)))
        pms.append((pm + 180.0) % 360.0 - 180.0)
    return min(pms)


def grid_min(k_lo, k_hi, a_lo, a_hi, n=41):
    best = None
    for k in np.linspace(k_lo, k_hi, n):
        for a in np.linspace(a_lo, a_hi, n):
            pm = phase_margin(k, a)
            if best is None or pm < best[0]:
                best = (pm, k, a)
    return best


def main():
    cli = sys.argv[1]
    loop = ['--plant', 'K/(s*(s+a))', '--param', 'K=2000', '--param', 'a=10', '--period',
            str(T), '--controller', CTL]
    fam = json_of(cli, 'analyze', *loop, '--range', 'K=%g:%g' % K_RANGE,
                  '--range', 'a=%g:%g' % A_RANGE, '--members', '60', '--json')['family']
    ours = fam['worst_phase_margin_deg']
    member = fam['worst_member']

    coarse = grid_min(*K_RANGE, *A_RANGE)
    dk = (K_RANGE[1] - K_RANGE[0]) / 40 * 1.5
    da = (A_RANGE[1] - A_RANGE[0]) / 40 * 1.5
    fine = grid_min(max(K_RANGE[0], coarse[1] - dk), min(K_RANGE[1], coarse[1] + dk),
                    max(A_RANGE[0], coarse[2] - da), min(A_RANGE[1], coarse[2] + da))
    print('worst phase margin: ours %.6f deg at %s; brute force %.6f deg at K=%.2f a=%.3f'
          % (ours, member, fine[0], fine[1], fine[2]))
    check(abs(ours - fine[0]) <= 0.05, 'worst phase margin within 0.05 deg of the brute force: '
          '%.6f vs %.6f' % (ours, fine[0]))
    check(K_RANGE[0] < member['K'] < K_RANGE[1] and K_RANGE[0] < fine[1] < K_RANGE[1],
          'the worst K lies inside its range (not a corner): %s' % member)

    # the worst member alone
    alone = json_of(cli, 'analyze', '--plant', 'K/(s*(s+a))', '--param', 'K=%r' % member['K'],
                    '--param', 'a=%r' % member['a'], '--period', str(T), '--controller', CTL,
                    '--json')['loop']['phase_margin_deg']
    check(abs(alone - ours) <= 1e-9, 'the worst member analyzed alone: %.12f vs %.12f'
          % (alone, ours))
    check(fam['members'] >= 1 + 4 + 60 and fam['corners'] == 4, 'members and corners: %s'
          % {k: fam[k] for k in ('members', 'corners')})

    # every member (--each-member): each one's phase margin against scipy's for its K and a
    # (within 1e-6 deg: both refine the crossover to ~1e-13, the margin is read from the same
    # loop), the family's worst the smallest of them, the origins in the family's order
    each = json_of(cli, 'analyze', *loop, '--range', 'K=%g:%g' % K_RANGE,
                   '--range', 'a=%g:%g' % A_RANGE, '--members', '8', '--json',
                   '--each-member')['family']
    rows = each['each_member']
    check(len(rows) == each['members'], '--each-member: %d rows for %d members'
          % (len(rows), each['members']))
    check([r['origin'] for r in rows[:5]] == ['nominal'] + ['corner'] * 4
          and all(r['origin'] in ('sample', 'search') for r in rows[5:]),
          '--each-member: origins %s' % [r['origin'] for r in rows])
    worst_each = min(r['phase_margin_deg'] for r in rows if r['evaluated'])
    check(worst_each == each['worst_phase_margin_deg'],
          '--each-member: the smallest margin %r is the family\'s worst %r'
          % (worst_each, each['worst_phase_margin_deg']))
    off = max(abs(r['phase_margin_deg'] - phase_margin(r['values']['K'], r['values']['a']))
              for r in rows)
    print('--each-member: %d members, largest difference to scipy %.2e deg' % (len(rows), off))
    check(off <= 1e-6, '--each-member: a member\'s phase margin differs from scipy by %.3g deg'
          % off)
    text = run(cli, 'analyze', *loop, '--range', 'K=%g:%g' % K_RANGE, '--members', '3',
               '--each-member')
    check(text.returncode == 0 and 'Every member (' in text.stdout
          and text.stdout.count(' corner ') == 2, '--each-member as text: %s'
          % text.stdout[-400:])
    r = run(cli, 'analyze', *loop, '--each-member')
    check(r.returncode == 2 and '--each-member' in r.stderr and 'plant family' in r.stderr,
          '--each-member without a family refused: %s' % r.stderr.strip())

    # the dead time as a family's parameter: its nominal is --dead-time; the worst member
    # analyzed alone with that dead time gives the same phase margin (the kiln-like loop of
    # the golden tests, an invented one)
    kiln = ['--plant', '0.8/((120*s+1)*(15*s+1))', '--period', '2', '--controller',
            '3*(w+0.02)/w']
    dfam = json_of(cli, 'analyze', *kiln, '--dead-time', '7', '--range', 'dead_time_s=4:12',
                   '--members', '20', '--json')['family']
    worst_dead = dfam['worst_member']['dead_time_s']
    alone = json_of(cli, 'analyze', *kiln, '--dead-time', repr(worst_dead),
                    '--json')['loop']['phase_margin_deg']
    check(abs(alone - dfam['worst_phase_margin_deg']) <= 1e-9 and 4 <= worst_dead <= 12,
          'a dead-time family: worst %.9f at %r, alone %.9f'
          % (dfam['worst_phase_margin_deg'], worst_dead, alone))
    r = run(cli, 'analyze', *kiln, '--param', 'dead_time_s=3')
    check(r.returncode == 2 and 'given with --dead-time' in r.stderr,
          '--param dead_time_s refused: %s' % r.stderr.strip())

    # the document's own members and seed (<parameters members seed>): the same family as
    # --members and --seed give a document without them; the options override them
    doc = '''<?xml version="1.0" encoding="UTF-8"?>
<design xmlns="urn:loopwright:design" version="1">
  <title>slider family</title>
  <plant dead_time_s="0">K/(s*(s+a))</plant>
  <parameters%s>
    <parameter name="K" nominal="2000" low="%g" high="%g"/>
    <parameter name="a" nominal="10" low="%g" high="%g"/>
  </parameters>
  <sampling period_s="%r" hold="zero-order" compute_delay_samples="1"/>
  <variants active="a">
    <variant name="a">
      <gain ratio="1"/>
    </variant>
  </variants>
</design>
'''
    with tempfile.TemporaryDirectory() as tmp:
        own, plain = os.path.join(tmp, 'own.lwd'), os.path.join(tmp, 'plain.lwd')
        for path, attrs in ((own, ' members="12" seed="5"'), (plain, '')):
            with open(path, 'w', encoding='utf-8') as f:
                f.write(doc % ((attrs,) + K_RANGE + A_RANGE + (T,)))
        a = json_of(cli, 'analyze', own, '--json')['family']
        b = json_of(cli, 'analyze', plain, '--json', '--members', '12', '--seed', '5')['family']
        c = json_of(cli, 'analyze', plain, '--json')['family']
        check(a == b and a != c, 'the document\'s members="12" seed="5" are --members 12 '
              '--seed 5 (%d, %d, default %d members)' % (a['members'], b['members'],
                                                        c['members']))
        a = json_of(cli, 'analyze', own, '--json', '--members', '7')['family']
        b = json_of(cli, 'analyze', plain, '--json', '--members', '7', '--seed', '5')['family']
        check(a == b, '--members over the document\'s members, its seed kept')

    # refusals
    for args, words in ((['--range', 'b=1:2'], "'b=1:2' names no --param"),
                        (['--range', 'K=3000:1000'], 'its range runs backwards'),
                        (['--range', 'K=2000:2000'], 'its range is empty'),
                        (['--range', 'K=2500:3000'], 'nominal value lies outside its range'),
                        (['--range', 'K=1e999:3000'], 'K'),
                        (['--range', 'K=100'], 'is not NAME=LOW:HIGH'),
                        (['--range', 'K=0:3000'], 'at the corner of the parameter ranges'),
                        (['--range', 'K=100:3000', '--range', 'K=100:3000'],
                         'given two ranges'),
                        (['--range', 'K=100:3000', '--members', '-1'], '--members')):
        r = run(cli, 'analyze', *loop, *args)
        check(r.returncode == 2 and words in r.stderr,
              'refused %s: %d %s' % (args, r.returncode, r.stderr.strip()))
    if FAILS:
        sys.exit('%d failures' % len(FAILS))
    print('ok: the family\'s worst phase margin agrees with the brute force')


if __name__ == '__main__':
    main()
