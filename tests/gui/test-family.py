#!/usr/bin/python3
"""A design with a plant family shows the family's worst cases in the window: the fleet
example (camera slider over payload and belt ranges, data/examples/camera-slider-fleet.lwd)
opens with the family evaluated on the worker thread, and its debug line LW-FAMILY gives the
members, the requirements failing on some member and the worst phase margin — equal to
`loopwright-cli analyze FILE --json`'s family (the same engine function, the same default
members and seed: the worst phase margin to 1e-9°, the counts exactly). The robust variant passes on
every member. The family is drawn in the loop views: Export Figure of the Bode view in z
(through the test hook LW_TEST_FIGURE_PATH, 800 × 600) is byte for byte `plot FILE
--all-variants --view bode-z --size 800x600` (the same members drawn by the same code), with
one thin path per member drawn (LW-FAMILY drawn=N) in each panel and one for the key.
Dragging the lead's pole handle in the Bode w view: the drawn members follow the drag
(LW-FAMILY-DRAG lines: a band and the worst members' lines, their smallest phase margin no
smaller than the whole family's after the drag, less 1e-6° — a subset's minimum, the same
engine), and when the drag ends the whole family is evaluated again and equals `analyze` of the
saved document (1e-9°). The
metrics table's family column (LW-METRIC … family=) holds analyze's worst phase and gain
margin, sensitivity peak, overshoot and settling time (1e-9 relative: the same numbers
printed with 17 digits) and each requirement's verdict over the family. A screenshot of the
panel goes to ARTEFACT_DIR/family.png.

Usage: test-family.py LOOPWRIGHT CLI SCHEMA_DIR EXAMPLE ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or
xdotool is missing).
"""
import json
import os
import shutil
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwgui import (debug_lines, fail, key, kill_window, last_line, lsan_options,  # noqa: E402
                   outer, quit_window, run, saved_after, settle, start_window, wait_for,
                   window_env, window_origin, without_surface_ids)

FAMILY_WIDTH = b'stroke-width:0.85;'   # LW_PLOT_FAMILY_WIDTH: no other stroke of the view


def family_lines(log_path):
    return list(debug_lines(log_path, 'LW-FAMILY'))


def drag_and_check(cli, wid, log_path, doc):
    """Drags the lead's pole (stage 1, corner 1) in the Bode w view down by a third of a
    decade and checks the family's drag lines and the family after it."""
    h = wait_for(lambda: last_line(log_path, 'LW-HANDLE', view='bode-w', stage=1, corner=1),
                 'the lead pole\'s handle')
    x0, y0 = window_origin(wid)
    x, y = x0 + round(float(h['sx'])), y0 + round(float(h['sy']))
    before = len(family_lines(log_path))
    run('xdotool', 'mousemove', '--sync', str(x), str(y))
    time.sleep(0.3)
    run('xdotool', 'mousedown', '1')
    for i in range(1, 16):
        run('xdotool', 'mousemove', '--sync', str(x - 2 * i), str(y))
        time.sleep(0.08)
    wait_for(lambda: len(list(debug_lines(log_path, 'LW-FAMILY-DRAG'))) > 0,
             'the drawn members following the drag')
    time.sleep(0.5)
    run('xdotool', 'mouseup', '1')
    wait_for(lambda: len(family_lines(log_path)) > before, 'the family after the drag')
    settle(log_path)
    drags = list(debug_lines(log_path, 'LW-FAMILY-DRAG'))
    after = family_lines(log_path)[-1]
    last = drags[-1]
    print('drag: %d pictures, the last %s; family after it %s' % (len(drags), last, after))
    if last['band'] != '1' or int(last['lines']) < 1:
        fail('the drag draws no band or no member line: %s' % last)
    if not float(last['worst_pm']) >= float(after['worst_pm']) - 1e-6:
        fail('the drawn members\' smallest phase margin %s is below the family\'s %s'
             % (last['worst_pm'], after['worst_pm']))
    saved_after(wid, doc)
    r = subprocess.run([cli, 'analyze', doc, '--json'], capture_output=True, text=True)
    if r.returncode != 0:
        fail('analyze after the drag: %s' % r.stderr)
    want = json.loads(r.stdout)['family']['worst_phase_margin_deg']
    if abs(float(after['worst_pm']) - want) > 1e-9:
        fail('after the drag: the window\'s worst phase margin %s, analyze %.12f'
             % (after['worst_pm'], want))


def inner(app, cli, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-family-')
    try:
        fleet = os.path.join(os.path.dirname(example), 'camera-slider-fleet.lwd')
        doc = os.path.join(tmp, 'fleet.lwd')
        shutil.copyfile(fleet, doc)
        r = subprocess.run([cli, 'analyze', doc, '--json'], capture_output=True, text=True)
        if r.returncode != 0:
            fail('analyze: %s' % r.stderr)
        fam = json.loads(r.stdout)['family']
        failing = sum(1 for q in fam['requirements'] if q['status'] != 'pass')
        log_path = os.path.join(artefacts, 'family.log')
        fig_win = os.path.join(artefacts, 'family-window.svg')
        fig_cli = os.path.join(artefacts, 'family-cli.svg')
        for f in (fig_win, fig_cli):
            if os.path.exists(f):
                os.remove(f)
        env = window_env(schema_dir, tmp, LW_TEST_FIGURE_PATH=fig_win,
                         LW_TEST_FIGURE_VIEW='bode-z')
        with open(log_path, 'w') as log_file:
            proc, wid = start_window(app, doc, env, log_file)
            try:
                wait_for(lambda: len(family_lines(log_path)) > 0, 'the family evaluated')
                settle(log_path)
                line = family_lines(log_path)[-1]
                got = float(line['worst_pm'])
                print('window: %s; analyze: members %d, failing %d, worst %.12f'
                      % (line, fam['members'], failing, fam['worst_phase_margin_deg']))
                if int(line['members']) != fam['members'] or int(line['failing']) != failing:
                    fail('members or failing requirements differ from analyze: %s' % line)
                if abs(got - fam['worst_phase_margin_deg']) > 1e-9:
                    fail('worst phase margin %.12f, analyze %.12f'
                         % (got, fam['worst_phase_margin_deg']))
                if failing != 0:
                    fail('the robust variant fails on some member: %d' % failing)
                metric = {}
                for m in debug_lines(log_path, 'LW-METRIC'):
                    metric[m['row']] = m.get('family')
                for row, k in (('phase-margin', 'worst_phase_margin_deg'),
                               ('gain-margin', 'worst_gain_margin_db'),
                               ('sensitivity-peak', 'worst_sensitivity_peak'),
                               ('overshoot', 'worst_overshoot_pct'),
                               ('settling-time', 'worst_settling_time_s')):
                    got_v, want = float(metric.get(row) or 'nan'), fam[k]
                    if not abs(got_v - want) <= 1e-9 * abs(want):
                        fail('metrics table, family column, %s: %r, analyze %r'
                             % (row, metric.get(row), want))
                for i, q in enumerate(fam['requirements']):
                    if metric.get('req-%d' % i) != q['status']:
                        fail('metrics table, family column, requirement %d: %s, analyze %s'
                             % (i, metric.get('req-%d' % i), q['status']))
                key(wid, 'ctrl+e')
                wait_for(lambda: os.path.exists(fig_win) and os.path.getsize(fig_win) > 0,
                         'the exported figure')
                r = subprocess.run([cli, 'plot', doc, '--all-variants', '--view', 'bode-z',
                                    '--size', '800x600', '--out', fig_cli], capture_output=True,
                                   text=True, timeout=120,
                                   env=dict(os.environ, LSAN_OPTIONS=lsan_options()))
                if r.returncode != 0:
                    fail('plot: exit %d: %s' % (r.returncode, r.stderr))
                drawn = int(line['drawn'])
                thin = without_surface_ids(fig_win).count(FAMILY_WIDTH)
                print('members drawn %d, thin paths in the exported figure %d' % (drawn, thin))
                if drawn < 2 or thin != 2 * (drawn - 1) + 1:
                    fail('the window\'s figure has %d thin paths for %d members drawn'
                         % (thin, drawn))
                if without_surface_ids(fig_win) != without_surface_ids(fig_cli):
                    fail('the exported figure differs from plot\'s (%s, %s)' % (fig_win, fig_cli))
                drag_and_check(cli, wid, log_path, doc)
                subprocess.run(['xdotool', 'mousemove', '--window', str(wid), '250', '700'],
                               check=False)
                for _ in range(30):
                    subprocess.run(['xdotool', 'click', '5'], check=False)
                subprocess.run(['import', '-window', 'root',
                                os.path.join(artefacts, 'family.png')], check=False)
                quit_window(proc, wid)
            finally:
                kill_window(proc)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: the window\'s family equals analyze\'s, its figure plot\'s')


def main():
    if len(sys.argv) != 6:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_FAMILY_INNER') != '1':
        outer(__file__, 'LW_TEST_FAMILY_INNER', sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
