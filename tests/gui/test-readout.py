#!/usr/bin/python3
"""The pointer's read-out over a Bode view gives |L| at the pointer's frequency, not the
pointer's height. On the camera slider, the pointer is put over the z-plane magnitude panel
at the gain crossover ω_c that `loopwright-cli analyze --json` reports for the active variant
(an evaluation path of its own), near the top of the panel, where the pointer's height reads
about +45 dB. The window's read-out (its debug line LW-READOUT) must give ω within 2 % of ω_c
and |L| within 0.5 dB of 0 dB: the pointer sits on a whole pixel, half a pixel on a log axis
of about four decades over ~320 px is ~1.4 % in ω, and |L| falls at 20 to 40 dB/decade there,
so at most ~0.25 dB (the tolerance doubles that).

Usage: test-readout.py LOOPWRIGHT CLI SCHEMA_DIR EXAMPLE ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or
xdotool is missing). The window's output goes to ARTEFACT_DIR/readout.log.
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

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwgui import (fail, kill_window, last_line, outer, quit_window, run,  # noqa: E402
                   settle, start_window, wait_for, window_env, window_origin)


def readouts(log_path):
    with open(log_path, encoding='utf-8', errors='replace') as f:
        return [line for line in f.read().splitlines()
                if line.startswith('LW-READOUT view=bode-z ')]


def inner(app, cli, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-readout-')
    try:
        design = os.path.join(tmp, 'readout.lwd')
        shutil.copyfile(example, design)
        p = subprocess.run([cli, 'analyze', design, '--json'], capture_output=True, text=True,
                           timeout=60)
        if p.returncode != 0:
            fail('analyze --json: exit %d: %s' % (p.returncode, p.stderr))
        wc = json.loads(p.stdout)['loop']['gain_crossover_rad_s']
        log_path = os.path.join(artefacts, 'readout.log')
        with open(log_path, 'w') as log_file:
            proc, wid = start_window(app, design, window_env(schema_dir, tmp), log_file)
            try:
                wait_for(lambda: last_line(log_path, 'LW-PANEL', view='bode-z'), 'the Bode pane')
                settle(log_path)
                pn = last_line(log_path, 'LW-PANEL', view='bode-z')
                lo, hi = float(pn['xlo']), float(pn['xhi'])
                frac = math.log(wc / lo) / math.log(hi / lo)
                x0, y0 = window_origin(wid)
                x = x0 + round(float(pn['left']) + frac * float(pn['width']))
                y = y0 + round(float(pn['top']) + 6)
                n0 = len(readouts(log_path))
                run('xdotool', 'mousemove', '--sync', str(x - 3), str(y))
                run('xdotool', 'mousemove', '--sync', str(x), str(y))
                wait_for(lambda: readouts(log_path)[n0:], 'the read-out over the Bode pane')
                time.sleep(0.6)   # the read-out of the last position, not of the one before
                line = readouts(log_path)[-1]
                m = re.search(r'ω (\S+) rad/s\s+\|L\| (\S+) dB', line)
                if m is None:
                    fail('the read-out %r does not give ω and |L|' % line)
                w, mag = float(m.group(1)), float(m.group(2).replace('\u2212', '-'))
                print('gain crossover %.6g rad/s (analyze); read-out %s' % (wc, line))
                if abs(w - wc) > 0.02 * wc:
                    fail('the read-out ω %g is not within 2 %% of the crossover %g' % (w, wc))
                if abs(mag) > 0.5:
                    fail('|L| read at the crossover is %g dB, not within 0.5 dB of 0 (the '
                         'pointer\'s height reads about +45 dB)' % mag)
                quit_window(proc, wid)
            finally:
                kill_window(proc)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: the read-out gives |L| at the pointer\'s frequency')


def main():
    if len(sys.argv) != 6:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_READOUT_INNER') != '1':
        outer(__file__, 'LW_TEST_READOUT_INNER', sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
