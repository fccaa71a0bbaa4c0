#!/usr/bin/python3
"""A design holding several measured responses (a measured family: one sweep per machine,
docs/families.md "Measured families") shows the family's worst cases in the window: its
debug line LW-MEASURED-FAMILY gives the responses, the worst phase margin with the response
giving it and the requirements judged on the data that fail on some response — equal to
`loopwright-cli analyze FILE --json`'s "measured_family" (the same engine function,
lw_measured_family_evaluate, on the same loop: the worst phase margin to 1e-9 deg, which only
allows for the printing; the name and the counts exactly).

The machines are invented (filler-valve axes, as in tests/cli/test-cli-measured-family.py):
P_i(s) = K_i/(s(s + a_i)) sampled at T = 5 ms, their responses made here with Debian's scipy
(scipy.signal.cont2discrete, method='zoh', evaluated at z = e^{jwT}), 40 points per decade;
the third machine is weak (phase margin about 30 deg with the lead below), so the phase-margin
requirement (min 40 deg) fails on it: failing=1, worst set "valve-6" (analyze's verdicts; the
exact margins are checked against brentq in the CLI test).

Also checked:
- the design is judged on the data and has a ranged parameter: the plant family's summary
  says its members are the model's, in analyze's words (LW-FAMILY-NOTE equals analyze
  --json's family "note");
- dragging the lead's pole handle: no measured family is evaluated during the drag (no new
  line before the button is released), one after it, equal to analyze of the saved document;
- the same document with analysis="model": the family is shown, not judged (judged=0,
  failing=0, as analyze's "judged": false), and the plant family has no note.
A screenshot of the panel goes to ARTEFACT_DIR/measured-family.png.

Usage: test-measured-family.py LOOPWRIGHT CLI SCHEMA_DIR EXAMPLE ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or
xdotool is missing).
"""
import json
import math
import os
import shutil
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwgui import (debug_lines, fail, kill_window, last_line, outer, quit_window,  # noqa: E402
                   run, saved_after, settle, start_window, wait_for, window_env,
                   window_origin)

T = 0.005
MACHINES = {'valve-1': (150, 6), 'valve-2': (200, 5), 'valve-6': (400, 3)}
PM_TOL = 1e-9   # the same function on the same loop: only the printing (17 digits) differs


def write_machines(tmp):
    """Each machine's sampled response as a CSV table (frequency_rad_s, real, imag); scipy
    from Debian (/usr/bin/python3)."""
    import numpy as np
    from scipy import signal
    w = 10 ** np.arange(math.log10(0.5), math.log10(math.pi / T), 1 / 40)
    w = np.append(w[w < math.pi / T * 0.999], math.pi / T)
    paths = []
    for name, (k, a) in MACHINES.items():
        num, den, _ = signal.cont2discrete(([k], [1.0, a, 0.0]), T, method='zoh')
        z = np.exp(1j * w * T)
        h = np.polyval(np.ravel(num), z) / np.polyval(np.ravel(den), z)
        path = os.path.join(tmp, name + '.csv')
        with open(path, 'w') as f:
            f.write('frequency_rad_s,real,imag\n')
            for wi, hi in zip(w, h):
                f.write('%.17g,%.17g,%.17g\n' % (wi, hi.real, hi.imag))
        paths.append(path)
    return paths


def make_document(cli, tmp):
    doc = os.path.join(tmp, 'valves.lwd')
    r = subprocess.run([cli, 'new', '--plant', 'K/(s*(s+a))', '--param', 'K=200', '--param',
                        'a=5', '--period', str(T), '--title', 'filler valves',
                        *sum((['--measured', p] for p in write_machines(tmp)), []),
                        '--measured-kind', 'sampled', '--out', doc],
                       capture_output=True, text=True)
    if r.returncode != 0:
        fail('new with three --measured: %s' % r.stderr)
    text = open(doc).read()
    for old, new in (('  <variants active="initial">\n    <variant name="initial"/>',
                      '  <requirements>\n    <phase-margin min_deg="40"/>\n'
                      '    <gain-margin min_db="6"/>\n'
                      '    <sensitivity-peak max_ratio="2.5"/>\n'
                      '    <overshoot max_pct="40"/>\n  </requirements>\n'
                      '  <variants active="initial">\n    <variant name="initial">\n'
                      '      <gain ratio="1"/>\n'
                      '      <lead zero_rad_s="8" pole_rad_s="60"/>\n    </variant>'),
                     ('analysis="model"', 'analysis="data"'),
                     ('<parameter name="K" nominal="200"/>',
                      '<parameter name="K" nominal="200" low="150" high="260"/>')):
        if old not in text:
            fail('the new document has no %r' % old)
        text = text.replace(old, new, 1)
    with open(doc, 'w') as f:
        f.write(text)
    return doc


def analyze(cli, doc):
    r = subprocess.run([cli, 'analyze', doc, '--json'], capture_output=True, text=True)
    if r.returncode != 0:
        fail('analyze: %s' % r.stderr)
    return json.loads(r.stdout)


def mf_lines(log_path):
    return list(debug_lines(log_path, 'LW-MEASURED-FAMILY'))


def compare(line, fam, what):
    """The window's LW-MEASURED-FAMILY fields against analyze --json's measured_family."""
    failing = sum(1 for q in fam['requirements'] if q['status'] != 'pass') if fam['judged'] else 0
    print('%s: window %s; analyze: sets %d, worst %.12f on %s, failing %d, judged %s'
          % (what, line, fam['sets'], fam['worst_phase_margin_deg'], fam['worst_set'], failing,
             fam['judged']))
    if int(line['sets']) != fam['sets']:
        fail('%s: %s responses, analyze %d' % (what, line['sets'], fam['sets']))
    if abs(float(line['worst_pm']) - fam['worst_phase_margin_deg']) > PM_TOL:
        fail('%s: worst phase margin %s, analyze %.12f' % (what, line['worst_pm'],
                                                          fam['worst_phase_margin_deg']))
    if line['worst_set'] != fam['worst_set']:
        fail('%s: worst response %s, analyze %s' % (what, line['worst_set'], fam['worst_set']))
    if int(line['failing']) != failing or line['judged'] != ('1' if fam['judged'] else '0'):
        fail('%s: failing %s judged %s, analyze %d %s' % (what, line['failing'], line['judged'],
                                                        failing, fam['judged']))
    if int(line['unstable']) != fam['unstable_sets'] \
            or int(line['undecided']) != fam['undecided_sets']:
        fail('%s: unstable/undecided differ from analyze' % what)


def drag_and_check(cli, wid, log_path, doc):
    """Drags the lead's pole (stage 1, corner 1) in the Bode w view: nothing evaluated during
    the drag, the family after it equal to analyze of the saved document."""
    h = wait_for(lambda: last_line(log_path, 'LW-HANDLE', view='bode-w', stage=1, corner=1),
                 'the lead pole\'s handle')
    x0, y0 = window_origin(wid)
    x, y = x0 + round(float(h['sx'])), y0 + round(float(h['sy']))
    before = len(mf_lines(log_path))
    run('xdotool', 'mousemove', '--sync', str(x), str(y))
    time.sleep(0.3)
    run('xdotool', 'mousedown', '1')
    for i in range(1, 16):
        run('xdotool', 'mousemove', '--sync', str(x - 2 * i), str(y))
        time.sleep(0.08)
    wait_for(lambda: len(list(debug_lines(log_path, 'LW-FAMILY-DRAG'))) > 0,
             'the drag to be under way')
    time.sleep(0.5)
    during = len(mf_lines(log_path))
    run('xdotool', 'mouseup', '1')
    if during != before:
        fail('%d measured families shown during the drag' % (during - before))
    wait_for(lambda: len(mf_lines(log_path)) > before, 'the measured family after the drag')
    settle(log_path)
    saved_after(wid, doc)
    after = mf_lines(log_path)[-1]
    compare(after, analyze(cli, doc)['measured_family'], 'after the drag')


def run_window(app, doc, schema_dir, tmp, log_path):
    env = window_env(schema_dir, tmp)
    log_file = open(log_path, 'w')
    proc, wid = start_window(app, doc, env, log_file)
    return proc, wid, log_file


def inner(app, cli, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-measured-family-')
    try:
        doc = make_document(cli, tmp)
        want = analyze(cli, doc)
        fam = want['measured_family']
        if not fam['judged'] or fam['worst_set'] != 'valve-6':
            fail('analyze: the weak machine is not the judged worst: %s' % fam['worst_set'])
        log_path = os.path.join(artefacts, 'measured-family.log')
        proc, wid, log_file = run_window(app, doc, schema_dir, tmp, log_path)
        try:
            wait_for(lambda: mf_lines(log_path), 'the measured family evaluated')
            wait_for(lambda: list(debug_lines(log_path, 'LW-FAMILY')), 'the plant family')
            settle(log_path)
            compare(mf_lines(log_path)[-1], fam, 'judged on the data')
            if int(mf_lines(log_path)[-1]['failing']) != 1:
                fail('the weak machine\'s phase margin should fail one requirement')
            with open(log_path, encoding='utf-8') as f:
                notes = [ln[len('LW-FAMILY-NOTE '):] for ln in f.read().splitlines()
                         if ln.startswith('LW-FAMILY-NOTE ')]
            print('plant family note: %s' % notes)
            if not notes or notes[-1] != want['family']['note']:
                fail('the plant family\'s note %r, analyze\'s %r'
                     % (notes[-1:], want['family'].get('note')))
            subprocess.run(['xdotool', 'mousemove', '--window', str(wid), '250', '700'],
                           check=False)
            for _ in range(40):
                subprocess.run(['xdotool', 'click', '5'], check=False)
            time.sleep(0.5)
            subprocess.run(['import', '-window', 'root',
                            os.path.join(artefacts, 'measured-family.png')], check=False)
            drag_and_check(cli, wid, log_path, doc)
            quit_window(proc, wid)
        finally:
            kill_window(proc)
            log_file.close()

        # analysis="model": shown, not judged; the plant family without the note
        text = open(doc).read().replace('analysis="data"', 'analysis="model"', 1)
        model_doc = os.path.join(tmp, 'valves-model.lwd')
        with open(model_doc, 'w') as f:
            f.write(text)
        fam = analyze(cli, model_doc)['measured_family']
        if fam['judged']:
            fail('analyze: analysis="model" judged')
        log_path = os.path.join(artefacts, 'measured-family-model.log')
        proc, wid, log_file = run_window(app, model_doc, schema_dir, tmp, log_path)
        try:
            wait_for(lambda: mf_lines(log_path), 'the measured family evaluated')
            wait_for(lambda: list(debug_lines(log_path, 'LW-FAMILY')), 'the plant family')
            settle(log_path)
            compare(mf_lines(log_path)[-1], fam, 'analysis="model"')
            if list(debug_lines(log_path, 'LW-FAMILY-NOTE')):
                fail('a design judged on the model: the plant family says it is the model\'s')
            quit_window(proc, wid)
        finally:
            kill_window(proc)
            log_file.close()
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: the window\'s measured family equals analyze\'s')


def main():
    if len(sys.argv) != 6:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_MEASURED_FAMILY_INNER') != '1':
        outer(__file__, 'LW_TEST_MEASURED_FAMILY_INNER', sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
