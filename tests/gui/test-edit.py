#!/usr/bin/python3
"""Editing in a real window (Xvfb): open an example design, drag the lead's zero corner on the
w-plane Bode view with the pointer, save, and check through the saved document and
`loopwright-cli analyze --json` that the corner moved by the ratio the pointer's travel means on
the log axis and that the margins shown are those of the saved design; undo and check the
document is restored byte for byte; open a broken document and check the error is shown and
nothing is lost.

Usage: test-edit.py LOOPWRIGHT LOOPWRIGHT_CLI SCHEMA_DIR EXAMPLE ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or xdotool is missing).
The window prints its handle positions with LW_DEBUG_HANDLES=1 (src/gui/lw-plot-pane.h).
Screenshots stay in ARTEFACT_DIR: edit-before.png, edit-dragged.png, edit-broken.png.
"""
import json
import math
import os
import re
import shutil
import subprocess
import sys
import tempfile
import time
import xml.etree.ElementTree as ET

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import lwgui  # noqa: E402
from lwgui import (fail, find_window, key, kill_window, quit_window, run, settle,  # noqa: E402
                   saved_after)

NS = '{urn:loopwright:design}'
TARGET_RATIO = 2.5    # about how far the drag moves the zero (it must stay below the pole)


def outer(argv):
    lwgui.outer(__file__, 'LW_TEST_EDIT_INNER', argv, tools=('Xvfb', 'xdotool', 'import'))


def wait_for(pred, what, timeout=15.0):
    return lwgui.wait_for(pred, what, timeout)


def lead_corners(path):
    root = ET.parse(path).getroot()
    active = root.find(NS + 'variants').get('active')
    for v in root.find(NS + 'variants'):
        if v.get('name') == active:
            lead = v.find(NS + 'lead')
            return float(lead.get('zero_rad_s')), float(lead.get('pole_rad_s'))
    fail('no lead in the active variant of ' + path)


def analyze(cli, path):
    return json.loads(run(cli, 'analyze', path, '--json'))['loop']


class Log:
    """The window's stdout: handle positions and the margins it shows."""

    def __init__(self, path):
        self.path = path

    def lines(self):
        with open(self.path, encoding='utf-8', errors='replace') as f:
            return f.read().splitlines()

    def last(self, prefix, **match):
        for line in reversed(self.lines()):
            if not line.startswith(prefix):
                continue
            fields = dict(kv.split('=', 1) for kv in line.split()[1:])
            if all(fields.get(k) == str(v) for k, v in match.items()):
                return fields
        return None

    def count(self, prefix):
        return sum(1 for line in self.lines() if line.startswith(prefix))


def inner(app, cli, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-edit-')
    design = os.path.join(tmp, 'design.lwd')
    shutil.copyfile(example, design)
    os.utime(design, (time.time() + 5, time.time() + 5))   # newer than any autosave here
    env = lwgui.window_env(schema_dir, tmp)
    log_path = os.path.join(artefacts, 'edit.log')
    log_file = open(log_path, 'w')
    log = Log(log_path)
    proc = subprocess.Popen([app, design], env=env, stdout=log_file, stderr=subprocess.STDOUT)
    try:
        wid = wait_for(lambda: proc.poll() is None and find_window('^design.lwd — Loopwright$')
                       or (proc.poll() is not None and fail('loopwright exited early (%d)'
                                                            % proc.returncode)),
                       'the window on design.lwd', 30)
        wait_for(lambda: log.last('LW-HANDLE', view='bode-w', stage=1, corner=0),
                 'the handles of the w-plane Bode view')
        settle(log_path)
        run('import', '-window', 'root', os.path.join(artefacts, 'edit-before.png'))

        # The canonical form of the document as opened, and its analysis.
        doc_a = saved_after(wid, design)
        z0, p0 = lead_corners(design)
        loop0 = analyze(cli, design)

        # Window position on the screen (no window manager: the X window is where GTK put it).
        geo = run('xdotool', 'getwindowgeometry', wid)
        m = re.search(r'Position: (-?\d+),(-?\d+)', geo)
        wx, wy = int(m.group(1)), int(m.group(2))
        panel = log.last('LW-PANEL', view='bode-w')
        h = log.last('LW-HANDLE', view='bode-w', stage=1, corner=0)
        hx, hy = wx + round(float(h['sx'])), wy + round(float(h['sy']))
        print('lead zero handle at %d,%d (ν = %s rad/s)' % (hx, hy, h['x']))
        # Pointer travel to the right, whole pixels, for about TARGET_RATIO on the log axis.
        decades_px = float(panel['width']) / math.log(float(panel['xhi']) / float(panel['xlo']))
        drag_px = max(5, round(decades_px * math.log(TARGET_RATIO)))

        run('xdotool', 'mousemove', '--sync', str(hx), str(hy))
        time.sleep(0.2)
        run('xdotool', 'mousedown', '1')
        for i in range(1, 11):
            run('xdotool', 'mousemove', '--sync', str(hx + drag_px * i // 10), str(hy))
            time.sleep(0.05)
        time.sleep(0.3)
        run('import', '-window', 'root', os.path.join(artefacts, 'edit-dragged.png'))
        run('xdotool', 'mouseup', '1')
        time.sleep(0.5)

        doc_b = saved_after(wid, design)
        z1, p1 = lead_corners(design)
        # The log axis maps x pixels to ln ν linearly: ν ratio = (xhi/xlo)^(Δpx / width).
        # Δpx is exact (whole pointer pixels); tolerance 0.2 %: the only other error is the
        # pointer position's conversion in floating point, far below that.
        expected = math.exp(drag_px / float(panel['width'])
                            * math.log(float(panel['xhi']) / float(panel['xlo'])))
        ratio = z1 / z0
        print('lead zero %.6g -> %.6g rad/s: ratio %.6f, expected %.6f' % (z0, z1, ratio,
                                                                          expected))
        if abs(ratio / expected - 1) > 2e-3:
            fail('the zero moved by %.6f, expected %.6f' % (ratio, expected))
        if p1 != p0:
            fail('a plain drag moved the pole too (%g -> %g)' % (p0, p1))

        # Margins: the saved design's analysis differs from the original's, and the window
        # shows the saved design's figures (same core, same options: equal to 1e-9 relative,
        # the rounding of %.17g text both ways).
        loop1 = analyze(cli, design)
        shown = wait_for(lambda: log.last('LW-SHOWN'), 'the margins shown')
        pm_shown = float(shown['phase_margin_deg'])
        print('phase margin %.4f° -> %.4f° (shown %.4f°)' % (loop0['phase_margin_deg'],
                                                               loop1['phase_margin_deg'],
                                                               pm_shown))
        if abs(loop1['phase_margin_deg'] - loop0['phase_margin_deg']) < 0.1:
            fail('the drag did not change the phase margin')
        if abs(pm_shown - loop1['phase_margin_deg']) > 1e-9 * abs(loop1['phase_margin_deg']):
            fail('the window shows a phase margin of %.12g°, the saved design has %.12g°'
                 % (pm_shown, loop1['phase_margin_deg']))
        if abs(float(shown['gain_margin_db']) - loop1['gain_margin_db']) > 1e-9 * abs(
                loop1['gain_margin_db']):
            fail('the gain margin shown differs from the saved design\'s')

        # Undo restores the document byte for byte.
        key(wid, 'ctrl+z')
        time.sleep(0.5)
        doc_c = saved_after(wid, design)
        if doc_c != doc_a:
            fail('after undo the saved document differs from the one before the drag')
        if doc_b == doc_a:
            fail('the drag did not change the document')

        # A broken document: the error names the file and line, and nothing is lost.
        broken = os.path.join(tmp, 'broken.lwd')
        with open(design, encoding='utf-8') as f:
            lines = f.read().splitlines(True)
        bad_line = next(i for i, l in enumerate(lines) if '<lead ' in l)
        lines[bad_line] = re.sub(r'zero_rad_s="[^"]*"', 'zero_rad_s="fast"', lines[bad_line])
        with open(broken, 'w', encoding='utf-8') as f:
            f.writelines(lines)
        key(wid, 'ctrl+o')
        chooser = wait_for(lambda: find_window('^Open Design$'), 'the file chooser')
        key(chooser, 'ctrl+l')
        time.sleep(0.3)
        run('xdotool', 'type', '--delay', '20', broken)
        time.sleep(0.3)
        run('xdotool', 'key', 'Return')
        dialog = wait_for(lambda: find_window('^Could not open'), 'the error dialog')
        time.sleep(0.5)
        run('import', '-window', 'root', os.path.join(artefacts, 'edit-broken.png'))
        where = 'broken.lwd:%d:' % (bad_line + 1)
        if not any(where in l for l in log.lines()):
            fail('the error does not name %s (see edit.log)' % where)
        key(dialog, 'Return')
        wait_for(lambda: not find_window('^Could not open'), 'the error dialog to close')
        if not find_window('^design.lwd — Loopwright$'):
            fail('the window no longer shows design.lwd after the failed open')
        others = run('xdotool', 'search', '--onlyvisible', '--name', ' — Loopwright$',
                     check=False).split()
        if len(others) != 1:
            fail('%d windows after the failed open, expected the one there was' % len(others))
        doc_d = saved_after(wid, design)
        if doc_d != doc_a:
            fail('the design changed after a failed open')

        quit_window(proc, wid)
    finally:
        kill_window(proc)
        log_file.close()
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: drag moved the lead zero by the expected ratio, margins follow, undo exact, '
          'broken document refused without loss')


def main():
    if len(sys.argv) != 6:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_EDIT_INNER') != '1':
        outer(sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
