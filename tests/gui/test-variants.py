#!/usr/bin/python3
"""Variants in a real window (Xvfb): open an example with two variants, make a copy of the
active one (Ctrl+Shift+N), drag the copy's lead zero on the w-plane Bode view, save, and check
through the saved document that the reference variant's XML is byte for byte what it was
while the copy's lead moved; compare every variant (Ctrl+Shift+K) and check, in a screenshot, that the plots carry the colour of
each variant shown and not the colour of one more (palette of src/plot/lw-plot-draw.c, light
theme), and that the window reports three series per view and a metrics table with three
columns; undo twice (the drag, then the copy: one step each) and redo.

Usage: test-variants.py LOOPWRIGHT SCHEMA_DIR EXAMPLE ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb, xdotool, import or
convert is missing). Screenshots stay in ARTEFACT_DIR: variants-copy-dragged.png,
variants-compare.png; the window's output in variants.log.
"""
import os
import re
import shutil
import subprocess
import sys
import tempfile
import time

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import lwgui  # noqa: E402
from lwgui import (fail, find_window, key, kill_window, quit_window, run,  # noqa: E402
                   saved_after)

# The first four variant colours of the light theme (PALETTE_LIGHT in src/plot/lw-plot-draw.c).
PALETTE = [(0x00, 0x72, 0xb2), (0xd5, 0x5e, 0x00), (0x00, 0x9e, 0x73), (0xcc, 0x79, 0xa7)]
# A curve 1.75 px wide has a full-colour core along its whole length, hundreds of pixels in
# four views; antialiased edges and the legend's short sample lines are far fewer. Threshold
# and tolerance are choices of this test (no source): ±6 per channel accepts the core's
# rounding, 150 pixels is well above what the legend sample and labels alone give.
COLOUR_TOL = 6
MIN_PIXELS = 150


def outer(argv):
    lwgui.outer(__file__, 'LW_TEST_VARIANTS_INNER', argv, tools=('Xvfb', 'xdotool', 'import', 'convert'))


def wait_for(pred, what, timeout=15.0):
    return lwgui.wait_for(pred, what, timeout)


class Log:
    def __init__(self, path):
        self.path = path

    def lines(self):
        with open(self.path, encoding='utf-8', errors='replace') as f:
            return f.read().splitlines()

    def last(self, prefix, **match):
        for line in reversed(self.lines()):
            if not line.startswith(prefix):
                continue
            fields = dict(kv.split('=', 1) for kv in line.split()[1:] if '=' in kv)
            if all(fields.get(k) == str(v) for k, v in match.items()):
                return fields
        return None


def variant_xml(doc, name):
    """The bytes of <variant name="NAME"> … </variant> in a saved (canonical) document, without
    its compared="true" (whether it is compared is the window's choice, kept in the document)."""
    m = re.search(rb'<variant name="' + re.escape(name.encode()) + rb'"( compared="true")?>.*?</variant>',
                  doc, re.S)
    if m is None:
        fail('no variant "%s" in the saved document' % name)
    return m.group(0).replace(b' compared="true"', b'', 1)


def lead_zero(xml):
    return float(re.search(rb'<lead [^>]*zero_rad_s="([^"]+)"', xml).group(1))


def colour_counts(png):
    out = subprocess.run(['convert', png, '-depth', '8', 'rgb:-'], check=True,
                         capture_output=True).stdout
    img = np.frombuffer(out, dtype=np.uint8).reshape(-1, 3).astype(int)
    return [int(np.sum(np.all(np.abs(img - np.array(c)) <= COLOUR_TOL, axis=1)))
            for c in PALETTE]


def inner(app, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-variants-')
    design = os.path.join(tmp, 'design.lwd')
    shutil.copyfile(example, design)
    os.utime(design, (time.time() + 5, time.time() + 5))
    env = lwgui.window_env(schema_dir, tmp)
    log_path = os.path.join(artefacts, 'variants.log')
    log_file = open(log_path, 'w')
    log = Log(log_path)
    proc = subprocess.Popen([app, design], env=env, stdout=log_file, stderr=subprocess.STDOUT)
    try:
        wid = wait_for(lambda: proc.poll() is None and find_window('design.lwd — Loopwright$')
                       or (proc.poll() is not None and fail('loopwright exited early (%d)'
                                                            % proc.returncode)),
                       'the window on design.lwd', 30)
        wait_for(lambda: log.last('LW-HANDLE', view='bode-w', stage=1, corner=0),
                 'the handles of the w-plane Bode view')
        time.sleep(0.5)
        doc0 = saved_after(wid, design)
        ref0 = variant_xml(doc0, 'notched')

        # A copy of the active variant: active now, the original compared with it.
        key(wid, 'ctrl+shift+n')
        wait_for(lambda: log.last('LW-SERIES', view='bode-w', variants=2),
                 'two variants in the w-plane Bode view after the copy')
        time.sleep(0.5)
        doc_a = saved_after(wid, design)
        if b'active="notched copy"' not in doc_a:
            fail('the copy is not the active variant in the saved document')
        copy_a = variant_xml(doc_a, 'notched copy')
        if copy_a.replace(b'notched copy', b'notched') != ref0:
            fail('the copy\'s stages differ from the original\'s')

        # Drag the copy's lead zero to the right, once the window has settled (its figures
        # arrive from the evaluation worker).
        lwgui.settle(log_path)
        geo = run('xdotool', 'getwindowgeometry', wid)
        m = re.search(r'Position: (-?\d+),(-?\d+)', geo)
        wx, wy = int(m.group(1)), int(m.group(2))
        h = log.last('LW-HANDLE', view='bode-w', stage=1, corner=0)
        hx, hy = wx + round(float(h['sx'])), wy + round(float(h['sy']))
        run('xdotool', 'mousemove', '--sync', str(hx), str(hy))
        time.sleep(0.2)
        run('xdotool', 'mousedown', '1')
        for i in range(1, 11):
            run('xdotool', 'mousemove', '--sync', str(hx + 4 * i), str(hy))
            time.sleep(0.05)
        time.sleep(0.3)
        run('import', '-window', 'root', os.path.join(artefacts, 'variants-copy-dragged.png'))
        run('xdotool', 'mouseup', '1')
        time.sleep(0.5)
        doc_b = saved_after(wid, design)

        # The reference did not change, byte for byte; the copy's lead zero moved right.
        if variant_xml(doc_b, 'notched') != ref0:
            fail('the reference variant changed during a drag in the copy')
        z_a, z_b = lead_zero(copy_a), lead_zero(variant_xml(doc_b, 'notched copy'))
        print('copy\'s lead zero %.6g -> %.6g rad/s' % (z_a, z_b))
        # 40 px to the right on an axis of a few hundred px per decade: well over 5 %.
        if not z_b > 1.05 * z_a:
            fail('the drag did not move the copy\'s lead zero up (%g -> %g)' % (z_a, z_b))

        # Compare every variant: three series per view, three colours, not a fourth (the
        # copy differs from its original now, so each curve shows).
        key(wid, 'ctrl+shift+k')
        for view in ('bode-z', 'bode-w', 'step', 'nyquist'):
            wait_for(lambda: log.last('LW-SERIES', view=view, variants=3),
                     'three variants in the %s view' % view)
        # the table is printed after the plots: wait for the one with the three variants
        def three_columns():
            m = log.last('LW-METRIC', row='phase-margin')
            return m is not None and len(m['values'].split(',')) == 3
        wait_for(three_columns, 'the metrics table')
        pm = log.last('LW-METRIC', row='phase-margin')
        if len(pm['values'].split(',')) != 3:
            fail('the metrics table has %s, not three columns' % pm['values'])
        time.sleep(0.8)
        shot = os.path.join(artefacts, 'variants-compare.png')
        run('import', '-window', 'root', shot)
        counts = colour_counts(shot)
        print('pixels of the variant colours: %s' % counts)
        for i in range(3):
            if counts[i] < MIN_PIXELS:
                fail('variant %d\'s colour has %d pixels, expected at least %d'
                     % (i, counts[i], MIN_PIXELS))
        if counts[3] >= MIN_PIXELS:
            fail('a fourth variant colour shows (%d pixels) with three variants'
                 % counts[3])

        # Undo: comparing every variant (kept in the document), the drag, then the copy, each
        # one step.
        doc_c = saved_after(wid, design)
        if doc_c.count(b'compared="true"') != 2:
            fail('the saved document does not mark the two other variants compared')
        key(wid, 'ctrl+z')
        time.sleep(0.4)
        if saved_after(wid, design) != doc_b:
            fail('one undo after comparing does not give the document after the drag')
        key(wid, 'ctrl+z')
        time.sleep(0.4)
        if saved_after(wid, design) != doc_a:
            fail('a second undo does not give the document after the copy')
        key(wid, 'ctrl+z')
        time.sleep(0.4)
        if saved_after(wid, design) != doc0:
            fail('a third undo does not give the document before the copy')
        key(wid, 'ctrl+shift+z')
        time.sleep(0.4)
        if saved_after(wid, design) != doc_a:
            fail('redo does not bring the copy back')

        quit_window(proc, wid)
    finally:
        kill_window(proc)
        log_file.close()
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: a copied variant edits alone, the reference stays byte for byte, undo is one '
          'step per action, compare draws every variant')


def main():
    if len(sys.argv) != 5:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_VARIANTS_INNER') != '1':
        outer(sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
