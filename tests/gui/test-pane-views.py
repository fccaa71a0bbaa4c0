#!/usr/bin/python3
"""Any view in any pane (Xvfb): on a copy of the camera slider, the secondary button on the
Nyquist pane opens its menu of views; with the pointer off the menu, the sensitivity view's
mnemonic 's' picks it, and it takes the pane (the window's debug line
LW-ARRANGE shows it at the pane's place and Nyquist nowhere); the saved document lists it in
<view shows="…">, in pane order; one Ctrl+Z brings the Nyquist pane back and the document
as it was. A design whose <view shows> starts with the pole-zero map opens with it in the
first pane.

Usage: test-pane-views.py LOOPWRIGHT SCHEMA_DIR EXAMPLE ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or xdotool is missing).
The window's output goes to ARTEFACT_DIR/pane-views.log; a screenshot to
ARTEFACT_DIR/pane-views.png.
"""
import os
import re
import shutil
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwgui import (debug_lines, fail, key, kill_window, last_line, outer,  # noqa: E402
                   quit_window, run, saved_after, settle, start_window, wait_for, window_env,
                   window_origin)


def arrangement(log_path):
    lines = list(debug_lines(log_path, 'LW-ARRANGE'))
    if not lines:
        return None
    return dict((v.split(':')[0], tuple(v.split(':')[1:])) for v in lines[-1]['views'].split(','))


def inner(app, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-panes-')
    try:
        design = os.path.join(tmp, 'panes.lwd')
        shutil.copyfile(example, design)
        log_path = os.path.join(artefacts, 'pane-views.log')
        with open(log_path, 'w') as log_file:
            proc, wid = start_window(app, design, window_env(schema_dir, tmp), log_file)
            try:
                wait_for(lambda: last_line(log_path, 'LW-PANEL', view='nyquist'), 'the Nyquist pane')
                settle(log_path)
                doc0 = saved_after(wid, design)
                where = arrangement(log_path).get('nyquist')
                if where is None:
                    fail('no Nyquist pane at first: %s' % arrangement(log_path))
                p = last_line(log_path, 'LW-PANEL', view='nyquist')
                x0, y0 = window_origin(wid)
                x = x0 + round(float(p['left']) + float(p['width']) / 2)
                # low in the pane: the menu drops from the pane's top, so it opens with no
                # item under the pointer (a hovered item would take the keys)
                y = y0 + round(float(p['top']) + 0.9 * float(p['height']))
                run('xdotool', 'mousemove', '--sync', str(x), str(y))
                run('xdotool', 'click', '3')
                wait_for(lambda: last_line(log_path, 'LW-PANE-MENU'), 'the pane\'s menu')
                time.sleep(0.5)
                # the pointer off the menu (a hovered item would take the keys), then the
                # sensitivity view's mnemonic
                run('xdotool', 'mousemove', '--sync', str(x0 + 20), str(y0 + 20))
                time.sleep(0.3)
                run('xdotool', 'key', '--clearmodifiers', 's')
                got = wait_for(lambda: (arrangement(log_path) or {}).get('sensitivity'),
                               'the sensitivity view in a pane')
                if got != where or 'nyquist' in arrangement(log_path):
                    fail('after the menu: %s (the Nyquist pane was at %s)'
                         % (arrangement(log_path), where))
                settle(log_path)
                subprocess.run(['import', '-window', 'root',
                                os.path.join(artefacts, 'pane-views.png')], check=False)
                doc1 = saved_after(wid, design)
                m = re.search(rb'shows="([^"]*)"', doc1)
                if m is None or m.group(1).split()[-1] != b'sensitivity' \
                        or b'nyquist' in m.group(1):
                    fail('the saved arrangement: %s' % (m.group(0) if m else doc1))
                key(wid, 'ctrl+z')
                wait_for(lambda: (arrangement(log_path) or {}).get('nyquist') == where,
                         'the Nyquist pane back after one undo')
                if saved_after(wid, design) != doc0:
                    fail('one undo does not give the document as it was')

                # the menu's first item, _Whole Phase Range: the Bode phase axis then reaches
                # the whole curve (the camera slider's runs past −600°; by default the axis
                # ends at −450°, the curve continuing off it)
                settle(log_path)
                b = last_line(log_path, 'LW-PANEL', view='bode-z')
                lo0 = float(b['y2lo'])
                run('xdotool', 'mousemove', '--sync',
                    str(x0 + round(float(b['left']) + float(b['width']) / 2)),
                    str(y0 + round(float(b['top']) + 0.9 * float(b['height']))))
                run('xdotool', 'click', '3')
                wait_for(lambda: len(list(debug_lines(log_path, 'LW-PANE-MENU'))) >= 2,
                         'the Bode pane\'s menu')
                time.sleep(0.5)
                run('xdotool', 'mousemove', '--sync', str(x0 + 20), str(y0 + 20))
                time.sleep(0.3)
                run('xdotool', 'key', '--clearmodifiers', 'w')   # its mnemonic
                got = wait_for(lambda: float(last_line(log_path, 'LW-PANEL', view='bode-z')
                                             ['y2lo']) < lo0 - 100
                               and last_line(log_path, 'LW-PANEL', view='bode-z'),
                               'the whole phase range (below %g°)' % lo0)
                print('phase axis: %g° by default, %s° with the whole range' % (lo0, got['y2lo']))
                if saved_after(wid, design) != doc0:
                    fail('a display option changed the document')
                quit_window(proc, wid)
            finally:
                kill_window(proc)

        # a document that asks for the pole-zero map first
        text = open(example, encoding='utf-8').read()
        text = re.sub(r'shows="[^"]*"', 'shows="poles step"', text)
        with open(design, 'w', encoding='utf-8') as f:
            f.write(text)
        with open(log_path, 'a') as log_file:
            log_file.write('---- second window\n')
            log_file.flush()
            proc, wid = start_window(app, design, window_env(schema_dir, tmp), log_file)
            try:
                got = wait_for(lambda: (arrangement(log_path) or {}).get('poles'),
                               'the pole-zero map from the document')
                if got != ('0', '0'):
                    fail('the pole-zero map is at %s, not in the first pane' % (got,))
                quit_window(proc, wid)
            finally:
                kill_window(proc)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: a pane shows the view picked from its menu, saved in the document, one undo '
          'step; a document\'s arrangement opens as saved')


def main():
    if len(sys.argv) != 5:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_PANES_INNER') != '1':
        outer(__file__, 'LW_TEST_PANES_INNER', sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
