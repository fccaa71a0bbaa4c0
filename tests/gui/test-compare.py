#!/usr/bin/python3
"""Compared variants in a real window (Xvfb): open a document with four variants, compare all
of them (Ctrl+Shift+K), and check that
0. Export Figure (Ctrl+E, through the test hook LW_TEST_FIGURE_PATH: Bode w, SVG, 800 × 600)
   writes the four variants overlaid, the same figure as `loopwright-cli plot FILE
   --all-variants --view bode-w --size 800x600`: byte for byte once cairo's surface ids (a
   counter of the process, `surfaceN`) are set aside;
then turn the split view on (Ctrl+Shift+B) and check that
1. the window reports the split view with the active variant (first in the document) left and
   the next compared one right (`LW-SPLIT on=1 left=1 right=2`, styles = place + 1);
2. the grid holds Bode z, Bode w and the step response in two columns (`LW-ARRANGE`), each
   pair side by side with the same vertical place and size (`LW-PANEL` lines);
3. in a screenshot, the right w-plane pane holds the second variant's colour and not the
   first's, and the left pane the first's and not the second's (light palette, as in
   test-variants.py);
4. the frequency axes are linked: zooming the left w-plane pane with the scroll wheel changes
   its visible range, and the right pane follows to the same range (relative 1e-9: both are
   set from the same two doubles and printed with 17 digits);
5. Ctrl+Shift+B again leaves the split view (`LW-SPLIT on=0`) and the grid holds the four
   views of the window again, the Nyquist view among them (`LW-ARRANGE`).

Usage: test-compare.py LOOPWRIGHT LOOPWRIGHT-CLI SCHEMA_DIR DESIGN ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb, xdotool, import or
convert is missing). The screenshot stays in ARTEFACT_DIR/split.png, the figures in
ARTEFACT_DIR/compare-window.svg and compare-cli.svg, the window's output in
ARTEFACT_DIR/split.log.
"""
import math
import os
import re
import shutil
import subprocess
import sys
import tempfile
import time

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwgui import (debug_lines, fail, key, kill_window, lsan_options, outer,  # noqa: E402
                   quit_window, run, start_window, wait_for, window_env,
                   without_surface_ids)

# The first two variant colours of the light theme (PALETTE_LIGHT in src/plot/lw-plot-draw.c);
# tolerance as in test-variants.py. Only the magnitude panel of a pane is counted (its
# rectangle is what the window prints): the curve crosses it once, over 200 px wide, so its
# full-colour core gives well over 80 pixels; the threshold is a choice of this test (no
# source), above what a few labels alone give (panes carry no legend: the key is above them).
PALETTE = [(0x00, 0x72, 0xb2), (0xd5, 0x5e, 0x00)]
COLOUR_TOL = 6
MIN_PIXELS = 80
T = 0.002   # the sample period of tests/gui/four-variants.lwd (its <sampling>)
SPLIT_VIEWS = ('bode-z', 'bode-w', 'step')


def panels(log_path):
    """The last LW-PANEL line of every (view, left edge) since the log began."""
    out = {}
    for f in debug_lines(log_path, 'LW-PANEL'):
        out[(f['view'], round(float(f['left'])))] = f
    return out


def split_line(log_path, on):
    last = None
    for f in debug_lines(log_path, 'LW-SPLIT'):
        last = f
    return last if last is not None and last.get('on') == str(on) else None


def columns(log_path, view, after):
    """(left pane, right pane) of view among the LW-PANEL lines after line `after`, or None."""
    lines = open(log_path, encoding='utf-8', errors='replace').read().splitlines()[after:]
    seen = {}
    for line in lines:
        if line.startswith('LW-PANEL '):
            f = dict(kv.split('=', 1) for kv in line.split()[1:] if '=' in kv)
            if f['view'] == view:
                seen[round(float(f['left']))] = f
    if len(seen) < 2:
        return None
    lefts = sorted(seen)
    return seen[lefts[0]], seen[lefts[-1]]


def n_lines(log_path):
    with open(log_path, encoding='utf-8', errors='replace') as f:
        return len(f.read().splitlines())


def colour_counts(png, box):
    x0, y0, x1, y1 = (int(round(v)) for v in box)
    out = subprocess.run(['convert', png, '-crop', '%dx%d+%d+%d' % (x1 - x0, y1 - y0, x0, y0),
                          '-depth', '8', 'rgb:-'], check=True, capture_output=True).stdout
    img = np.frombuffer(out, dtype=np.uint8).reshape(-1, 3).astype(int)
    return [int(np.sum(np.all(np.abs(img - np.array(c)) <= COLOUR_TOL, axis=1)))
            for c in PALETTE]


def close(a, b):
    return abs(a - b) <= 1e-9 * max(abs(a), abs(b))


def inner(app, cli, schema_dir, design, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-compare-')
    log_path = os.path.join(artefacts, 'split.log')
    # a copy: the window saves the compared set into it before quitting
    source, design = design, os.path.join(tmp, os.path.basename(design))
    shutil.copyfile(source, design)
    fig_win = os.path.join(artefacts, 'compare-window.svg')
    fig_cli = os.path.join(artefacts, 'compare-cli.svg')
    for f in (fig_win, fig_cli):
        if os.path.exists(f):
            os.remove(f)
    with open(log_path, 'w') as log_file:
        env = window_env(schema_dir, tmp, LW_TEST_FIGURE_PATH=fig_win,
                         LW_TEST_FIGURE_VIEW='bode-w')
        proc, wid = start_window(app, design, env, log_file)
        try:
            time.sleep(0.5)
            key(wid, 'ctrl+shift+k')
            wait_for(lambda: any(f.get('variants') == '4'
                                 for f in debug_lines(log_path, 'LW-SERIES')),
                     'four variants compared')
            key(wid, 'ctrl+e')
            wait_for(lambda: os.path.exists(fig_win) and os.path.getsize(fig_win) > 0,
                     'the exported figure')
            time.sleep(0.3)
            r = subprocess.run([cli, 'plot', design, '--all-variants', '--view', 'bode-w',
                                '--size', '800x600', '--out', fig_cli], capture_output=True,
                               text=True, timeout=60,
                               # under the sanitizer build: fontconfig's cache, kept to exit
                               env=dict(os.environ, LSAN_OPTIONS=lsan_options()))
            if r.returncode != 0:
                fail('plot --all-variants: exit %d: %s' % (r.returncode, r.stderr))
            if without_surface_ids(fig_win) != without_surface_ids(fig_cli):
                fail('the exported figure differs from plot --all-variants (%s, %s)'
                     % (fig_win, fig_cli))
            mark = n_lines(log_path)
            key(wid, 'ctrl+shift+b')
            sp = wait_for(lambda: split_line(log_path, 1), 'the split view (LW-SPLIT on=1)')
            if (sp['left'], sp['right']) != ('1', '2'):
                fail('split view: left style %s, right style %s (want 1 and 2)'
                     % (sp['left'], sp['right']))
            views = list(debug_lines(log_path, 'LW-ARRANGE'))[-1]['views'].split(',')
            want = ['%s:%d:%d' % (v, c, r) for c in (0, 1) for r, v in enumerate(SPLIT_VIEWS)]
            if sorted(views) != sorted(want):
                fail('the split view\'s grid holds %s (want %s)' % (views, want))
            cols = {}
            for view in SPLIT_VIEWS:
                cols[view] = wait_for(lambda v=view: columns(log_path, v, mark),
                                      'two panes of ' + view)
                a, b = cols[view]
                if not float(b['left']) > float(a['left']) + float(a['width']):
                    fail('%s: the right pane (left=%s) is not right of the left one (%s + %s)'
                         % (view, b['left'], a['left'], a['width']))
                # equal up to the one pixel an odd width leaves when split in two columns
                for k in ('top', 'width', 'height'):
                    if abs(float(a[k]) - float(b[k])) > 1.0:
                        fail('%s: the two panes differ in %s (%s, %s)' % (view, k, a[k], b[k]))
            time.sleep(0.5)
            shot = os.path.join(artefacts, 'split.png')
            run('import', '-window', 'root', shot)
            geo = run('xdotool', 'getwindowgeometry', wid)
            m = re.search(r'Position: (-?\d+),(-?\d+)', geo)
            wx, wy = int(m.group(1)), int(m.group(2))
            a, b = cols['bode-w']
            for side, f, own, other in (('left', a, 0, 1), ('right', b, 1, 0)):
                box = (wx + float(f['left']), wy + float(f['top']),
                       wx + float(f['left']) + float(f['width']),
                       wy + float(f['top']) + float(f['height']))
                counts = colour_counts(shot, box)
                print('%s w-plane pane: pixels of the first two colours %s' % (side, counts))
                if counts[own] < MIN_PIXELS:
                    fail('%s pane: %d pixels of its variant\'s colour (want >= %d)'
                         % (side, counts[own], MIN_PIXELS))
                if counts[other] > 0:
                    fail('%s pane: %d pixels of the other variant\'s colour (want 0)'
                         % (side, counts[other]))

            # linked frequency axes: zoom the left w-plane pane, the right one follows
            lo0, hi0 = float(a['xlo']), float(a['xhi'])
            mark = n_lines(log_path)
            cx = wx + float(a['left']) + 0.5 * float(a['width'])
            cy = wy + float(a['top']) + 0.5 * float(a['height'])
            run('xdotool', 'mousemove', '--sync', str(int(cx)), str(int(cy)))
            for _ in range(3):
                run('xdotool', 'click', '4')
                time.sleep(0.1)

            def zoomed():
                c = columns(log_path, 'bode-w', mark)
                if c is None:
                    return None
                l, r = c
                if close(float(l['xlo']), lo0) and close(float(l['xhi']), hi0):
                    return None
                return c if close(float(l['xlo']), float(r['xlo'])) \
                    and close(float(l['xhi']), float(r['xhi'])) else None
            l, r = wait_for(zoomed, 'the right w-plane pane to follow the zoom of the left')
            print('zoomed: left %s … %s, right %s … %s' % (l['xlo'], l['xhi'], r['xlo'], r['xhi']))
            if not float(l['xhi']) / float(l['xlo']) < hi0 / lo0:
                fail('the scroll wheel did not zoom in (%s … %s, was %g … %g)'
                     % (l['xlo'], l['xhi'], lo0, hi0))

            # ... and the z-plane panes show the same stretch of the loop: their ω range is the
            # w-plane range unwarped, ω = (2/T)·atan(νT/2) (the bilinear map; T = 2 ms of the
            # document), to 1e-9 relative (both computed in double)
            want_lo = 2 / T * math.atan(float(l['xlo']) * T / 2)
            want_hi = 2 / T * math.atan(float(l['xhi']) * T / 2)

            def z_followed():
                c = columns(log_path, 'bode-z', mark)
                return c if c is not None and all(
                    abs(float(p['xlo']) - want_lo) <= 1e-9 * want_lo
                    and abs(float(p['xhi']) - want_hi) <= 1e-9 * want_hi for p in c) else None
            zl, zr = wait_for(z_followed, 'the z-plane panes to follow the w-plane zoom '
                              '(ω %g … %g)' % (want_lo, want_hi))
            print('z-plane panes: %s … %s rad/s' % (zl['xlo'], zl['xhi']))

            key(wid, 'ctrl+shift+b')
            wait_for(lambda: split_line(log_path, 0), 'the split view off (LW-SPLIT on=0)')
            views = list(debug_lines(log_path, 'LW-ARRANGE'))[-1]['views'].split(',')
            want = ['bode-z:0:0', 'bode-w:1:0', 'step:0:1', 'nyquist:1:1']
            if sorted(views) != sorted(want):
                fail('after the split view the grid holds %s (want %s)' % (views, want))
            # the compared set is part of the document (docs/file-format.md): save it, so
            # that Ctrl+Q closes without asking
            key(wid, 'ctrl+s')
            time.sleep(0.5)
            quit_window(proc, wid)
        finally:
            kill_window(proc)
    print('compare: the exported figure equals the CLI\'s; split view: two columns, the '
          'variants\' colours, linked frequency axes, and back')


if __name__ == '__main__':
    if len(sys.argv) != 6:
        fail('usage: test-compare.py LOOPWRIGHT LOOPWRIGHT-CLI SCHEMA_DIR DESIGN ARTEFACT_DIR')
    if os.environ.get('LW_TEST_COMPARE_INNER') != '1':
        outer(__file__, 'LW_TEST_COMPARE_INNER', sys.argv[1:],
              tools=('Xvfb', 'xdotool', 'import', 'convert'))
    inner(*sys.argv[1:])
