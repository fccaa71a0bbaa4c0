#!/usr/bin/python3
"""A plant family drawn by `plot` and written by `report` (docs/families.md, docs/plot.md).

The design: the camera slider example's loop with its plant named by parameters,
K·wr²/(s(s+12)(s²+4s+wr²)), K from 160 to 200 (payload) and wr from 197 to 209 rad/s (belt
stiffness), an invented scenario. What is checked, against `analyze --json` of the same
document (the family's own numbers, computed by the code `check` uses):

- `plot --view bode-z` to SVG draws one thin path per drawn member in each panel (stroke
  width 0.85, LW_PLOT_FAMILY_WIDTH, used by no other stroke of the frequency views) and one for
  the key's sample, the worst phase margin's member twice (1.35, dashed: magnitude and phase);
  the members drawn are the distinct worst members (the nominal left out: it is the variant's
  own curve) and up to 40 others;
- with `--members 10` every member but the nominal is drawn (fewer than 40 + the worst);
- Nyquist, Nichols, the sensitivity view (|S|) and the step view (the output) draw one path
  per member; the pole map the members' closed-loop poles as dots; the disturbance view none;
- the key says "family (N members)" with N = analyze's family.members, and the worst member
  is labelled "worst PM" (read from a PDF with pdftotext, when poppler is installed);
- a design without ranged parameters draws no family path (its bytes are tests/golden's);
- `--range` with a document is refused naming the option;
- the report has a "Plant family" section whose worst phase margin equals
  family.worst_phase_margin_deg (to the report's 6 significant digits), its nominal the
  nominal loop's phase margin, with the member's parameter values, and its Bode figure holds
  the family's paths;
- the loop options without a document (--plant, --param, --range, --point, as `analyze` takes
  them; the plant K/(s(s+a)) and controller of test-cli-family.py) draw the family as a
  document does: the same count of member paths from `analyze`'s family with the same options,
  the operating points among them, and the label "worst PM" with analyze's worst phase margin
  to the label's one decimal; without --range or --point no family is drawn.

Usage: test-cli-family-figures.py CLI EXAMPLES_DIR
"""
import os
import re
import shutil
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwcli import FAILS, check, json_of, run  # noqa: E402

FAMILY_WIDTH = 'stroke-width:0.85;'
WORST_WIDTH = 'stroke-width:1.35;'
OTHERS = 40   # LW_FAMILY_LOOPS_OTHERS

DOC = """<?xml version="1.0" encoding="UTF-8"?>
<design xmlns="urn:loopwright:design" version="1">
  <title>Camera slider over payload and belt</title>
  <plant dead_time_s="0" input_unit="A" output_unit="m">K*wr^2/(s*(s+12)*(s^2+4*s+wr^2))</plant>
  <parameters>
    <parameter name="K" nominal="180" low="160" high="200"/>
    <parameter name="wr" nominal="200" low="197" high="209"/>
  </parameters>
  <sampling period_s="0.002" hold="zero-order" compute_delay_samples="1"/>
  <requirements>
    <phase-margin min_deg="45"/>
    <gain-margin min_db="6"/>
  </requirements>
  <variants active="notched">
    <variant name="notched">
      <gain label="loop gain" ratio="3.4"/>
      <lead label="phase lead" zero_rad_s="15" pole_rad_s="110"/>
      <notch label="belt notch" centre_rad_s="203" depth_db="30" width_rad_s="120"/>
    </variant>
  </variants>
</design>
"""
NOMINAL = (180.0, 200.0)


def svg_of(cli, doc, view, *extra):
    """The SVG of a view of doc, or of the loop options in extra when doc is None."""
    out = os.path.join(TMP, 'fig-%s.svg' % view)
    r = run(cli, 'plot', *([doc] if doc else []), '--view', view, '--out', out, *extra)
    check(r.returncode == 0, 'plot %s %s: %s' % (view, ' '.join(extra), r.stderr))
    with open(out, encoding='utf-8') as f:
        return f.read()


def drawn_members(fam, keys=('K', 'wr'), nominal=NOMINAL):
    """The members the figures draw: the distinct worst ones but the nominal, and up to
    OTHERS of the rest (the operating points first)."""
    worst = {tuple(m[k] for k in keys) for m in fam['worst_members'].values()}
    worst.discard(nominal)
    rest = fam['members'] - 1 - len(worst)
    return len(worst) + min(OTHERS, rest)


def main():
    cli, examples = sys.argv[1], sys.argv[2]
    doc = os.path.join(TMP, 'slider-family.lwd')
    with open(doc, 'w', encoding='utf-8') as f:
        f.write(DOC)
    fam = json_of(cli, 'analyze', doc, '--json')['family']
    n = drawn_members(fam)
    print('members %d, drawn %d, worst PM %.6g deg' % (fam['members'], n,
                                                        fam['worst_phase_margin_deg']))

    svg = svg_of(cli, doc, 'bode-z')
    check(svg.count(FAMILY_WIDTH) == 2 * (n - 1) + 1,
          'bode-z: %d thin paths, expected 2 x %d members + 1 key' % (svg.count(FAMILY_WIDTH),
                                                                     n - 1))
    check(svg.count(WORST_WIDTH) == 2, 'bode-z: the worst member in both panels (%d)'
          % svg.count(WORST_WIDTH))
    # one path per member: the loop (Nyquist, Nichols), |S| (sensitivity), the output of the
    # reference step (step: the actuator panel draws none)
    for view in ('nyquist', 'nichols', 'sensitivity', 'step'):
        s = svg_of(cli, doc, view)
        check(s.count(FAMILY_WIDTH) == (n - 1) + 1 and s.count(WORST_WIDTH) == 1,
              '%s: %d thin, %d worst paths for %d members' % (view, s.count(FAMILY_WIDTH),
                                                               s.count(WORST_WIDTH), n))
    s = svg_of(cli, doc, 'poles')
    check(s.count(FAMILY_WIDTH) == 1 and WORST_WIDTH not in s,
          'poles: the members\' closed-loop poles are dots, the key\'s sample the one line (%d)'
          % s.count(FAMILY_WIDTH))
    s = svg_of(cli, doc, 'disturbance')
    check(FAMILY_WIDTH not in s, 'the disturbance view draws no family')

    small = json_of(cli, 'analyze', doc, '--json', '--members', '10')['family']
    check(small['members'] - 1 < OTHERS, 'a family of 10 drawn members is smaller than 40')
    s = svg_of(cli, doc, 'bode-w', '--members', '10')
    # every member but the nominal drawn: the worst one dashed, the others thin
    check(s.count(FAMILY_WIDTH) == 2 * (small['members'] - 2) + 1
          and s.count(WORST_WIDTH) == 2,
          '--members 10: every member but the nominal drawn (%d thin paths, %d members)'
          % (s.count(FAMILY_WIDTH), small['members']))

    plain = svg_of(cli, os.path.join(examples, 'camera-slider.lwd'), 'bode-z')
    check(FAMILY_WIDTH not in plain and WORST_WIDTH not in plain,
          'a design without ranged parameters draws no family')

    r = run(cli, 'plot', doc, '--view', 'bode-z', '--out', os.path.join(TMP, 'x.svg'),
            '--range', 'K=1:2')
    check(r.returncode == 2 and '--range' in r.stderr, '--range with a document refused: %s'
          % r.stderr)

    if shutil.which('pdftotext'):
        pdf = os.path.join(TMP, 'fig.pdf')
        r = run(cli, 'plot', doc, '--view', 'bode-z', '--out', pdf)
        check(r.returncode == 0, 'plot to PDF: ' + r.stderr)
        text = subprocess.run(['pdftotext', pdf, '-'], capture_output=True, text=True,
                              timeout=60).stdout
        check('family (%d members)' % fam['members'] in text, 'the key names the family: '
              + repr(text[:200]))
        check('worst PM' in text, 'the worst member is labelled')
    else:
        print('SKIP: the key text needs pdftotext (poppler-utils)')

    html_path = os.path.join(TMP, 'report.html')
    r = run(cli, 'report', doc, '--out', html_path)
    check(r.returncode == 0, 'report: ' + r.stderr)
    with open(html_path, encoding='utf-8') as f:
        html = f.read()
    check('Plant family' in html, 'the report has the family section')
    m = re.search(r'<table data-table="family-worst"[^>]*>.*?<td>phase margin \(deg\)</td>'
                  r'<td>([^<]*)</td><td>([^<]*)</td><td>([^<]*)</td>', html, re.S)
    check(m is not None, 'the family table has the worst phase margin')
    if m:
        # the report writes 6 significant digits: a relative 1e-5 holds them
        got, want = float(m.group(2)), fam['worst_phase_margin_deg']
        check(abs(got - want) <= 1e-5 * abs(want), 'report worst PM %s, analyze %.9g'
              % (m.group(2), want))
        nominal = json_of(cli, 'analyze', doc, '--json')['loop']['phase_margin_deg']
        check(abs(float(m.group(1)) - nominal) <= 1e-5 * abs(nominal),
              'report nominal PM %s, analyze %.9g' % (m.group(1), nominal))
        wm = fam['worst_member']
        check(m.group(3) == 'K = %.6g, wr = %.6g' % (wm['K'], wm['wr']),
              'the worst member\'s values: ' + m.group(3))
    check('data-table="family-requirements"' in html, 'requirements judged on the members')
    check(FAMILY_WIDTH in html or 'stroke-width:0.85' in html,
          'the report\'s figures draw the family')

    loop_options(cli)


# test-cli-family.py's loop: K/(s(s+a)), K 800 … 6400, a 9 … 14, a lag and a lead in w
LOOP = ['--plant', 'K/(s*(s+a))', '--param', 'K=2000', '--param', 'a=10', '--period', '0.002',
        '--controller', '(1+w/80)/(1+w/20)*(1+w/50)/(1+w/500)']
RANGES = ['--range', 'K=800:6400', '--range', 'a=9:14', '--members', '60']


def loop_options(cli):
    """plot with the loop options draws the family analyze evaluates with them."""
    for extra in ([], ['--point', 'cold:K=1200,a=16', '--point', 'hot:K=7000,a=8.5']):
        fam = json_of(cli, 'analyze', *LOOP, *RANGES, *extra, '--json')['family']
        n = drawn_members(fam, ('K', 'a'), (2000.0, 10.0))
        print('loop options%s: members %d, drawn %d, worst PM %.6g deg'
              % (' with points' if extra else '', fam['members'], n,
                 fam['worst_phase_margin_deg']))
        svg = svg_of(cli, None, 'bode-z', *LOOP, *RANGES, *extra)
        check(svg.count(FAMILY_WIDTH) == 2 * (n - 1) + 1 and svg.count(WORST_WIDTH) == 2,
              'loop options bode-z: %d thin, %d worst paths; expected 2 x %d + 1, 2'
              % (svg.count(FAMILY_WIDTH), svg.count(WORST_WIDTH), n - 1))
        s = svg_of(cli, None, 'nichols', *LOOP, *RANGES, *extra)
        check(s.count(FAMILY_WIDTH) == (n - 1) + 1 and s.count(WORST_WIDTH) == 1,
              'loop options nichols: %d thin, %d worst for %d members'
              % (s.count(FAMILY_WIDTH), s.count(WORST_WIDTH), n))
        if shutil.which('pdftotext'):
            pdf = os.path.join(TMP, 'loop.pdf')
            r = run(cli, 'plot', *LOOP, *RANGES, *extra, '--view', 'bode-z', '--out', pdf)
            check(r.returncode == 0, 'plot loop options to PDF: ' + r.stderr)
            text = subprocess.run(['pdftotext', pdf, '-'], capture_output=True, text=True,
                                  timeout=60).stdout
            label = 'worst PM %.1f' % fam['worst_phase_margin_deg']
            check(label in text, 'the label %r in %r' % (label, text[:300]))
            check('family (%d members)' % fam['members'] in text, 'the key names the family')
    # only points, no range: the nominal and the points, every point drawn
    pfam = json_of(cli, 'analyze', *LOOP, '--point', 'cold:K=1700,a=9', '--point',
                   'hot:K=7000,a=8.5', '--json')['family']
    check(pfam['members'] == 3 and pfam['worst_member'].get('point') == 'cold',
          'a family of two points: %d members, the worst PM at %r' % (pfam['members'],
                                                                      pfam['worst_member']))
    s = svg_of(cli, None, 'nyquist', *LOOP, '--point', 'cold:K=1700,a=9', '--point',
               'hot:K=7000,a=8.5')
    # the worst phase margin's member dashed, unless it is the nominal (the loop's own curve)
    dashed = 1 if 'point' in pfam['worst_member'] else 0
    check(s.count(FAMILY_WIDTH) == 2 - dashed + 1 and s.count(WORST_WIDTH) == dashed,
          'two points drawn: %d thin, %d worst (the worst PM at %r)'
          % (s.count(FAMILY_WIDTH), s.count(WORST_WIDTH), pfam['worst_member']))
    s = svg_of(cli, None, 'bode-z', *LOOP)
    check(FAMILY_WIDTH not in s and WORST_WIDTH not in s, 'no --range: no family drawn')
    r = run(cli, 'plot', *LOOP, '--range', 'K=0:10', '--view', 'step', '--out',
            os.path.join(TMP, 'x.svg'))
    check(r.returncode == 2 and '--range' in r.stderr, 'a bad --range refused in any view: '
          + r.stderr.strip())


TMP = tempfile.mkdtemp(prefix='lw-family-fig-')
try:
    main()
finally:
    shutil.rmtree(TMP, ignore_errors=True)
if FAILS:
    sys.exit('%d check(s) failed' % len(FAILS))
print('ok')
