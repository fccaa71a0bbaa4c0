#!/usr/bin/python3
"""A design document holding a measured response shows it in the window: a document made by
`loopwright-cli new --measured` from a table written here with scipy (the continuous response
of an invented belt axis with a resonance its model lacks, a coherence column dipping at the
resonance) and given a gain and a lead opens with the data's loop drawn beside the model's in
the frequency views (the window's debug line LW-SERIES: two series in bode-z, bode-w and
nyquist) and not in the step view (one series: the data have no time response). The numbers
on the data are the core's (lw_measured_loop_close), checked against the model that made the
data in tests/core/test-measured.c and tests/cli/test-cli-measured*.py.

Usage: test-measured.py LOOPWRIGHT CLI SCHEMA_DIR EXAMPLE ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or
xdotool is missing). The window's output goes to ARTEFACT_DIR/measured.log, a screenshot to
ARTEFACT_DIR/measured.png.
"""
import math
import os
import shutil
import subprocess
import sys
import tempfile

import numpy as np
from scipy import signal

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwgui import (debug_lines, fail, key, kill_window, outer, quit_window,  # noqa: E402
                   saved_after, settle, start_window, wait_for, window_env)


PLANT_TEXT = '180*40000/(s*(s+12)*(s^2+40*s+40000))'


def series(log_path):
    got = {}
    for d in debug_lines(log_path, 'LW-SERIES'):
        got[d['view']] = int(d['variants'])
    return got


def inner(app, cli, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-measured-')
    try:
        w = 10 ** np.arange(0, math.log10(3 * math.pi / 0.002), 1 / 50)
        num = np.polymul([180 * 40000], [1, 2 * 0.04 * 310, 310 ** 2])
        den = np.polymul(np.polymul([1, 12, 0], [1, 40, 40000]), [1, 2 * 0.08 * 330, 330 ** 2])
        _, h = signal.freqs(num * (330 ** 2 / 310 ** 2), den, worN=w)
        table = os.path.join(tmp, 'axis.csv')
        with open(table, 'w') as f:
            f.write('frequency_rad_s,real,imag,coherence\n')
            for wi, hi in zip(w, h):
                coh = 0.99 - 0.4 * math.exp(-math.log(wi / 310) ** 2 / 0.01)
                f.write('%.17g,%.17g,%.17g,%.3f\n' % (wi, hi.real, hi.imag, coh))
        design = os.path.join(tmp, 'axis.lwd')
        p = subprocess.run([cli, 'new', '--plant', PLANT_TEXT,
                            '--period', '0.002', '--measured', table, '--measured-kind',
                            'continuous', '--out', design], capture_output=True, text=True)
        if p.returncode != 0:
            fail('new --measured: %s' % p.stderr)
        text = open(design, encoding='utf-8').read()
        text = text.replace('<variant name="initial"/>',
                            '<variant name="initial">\n      <gain ratio="3.4"/>\n'
                            '      <lead zero_rad_s="15" pole_rad_s="110"/>\n    </variant>')
        with open(design, 'w', encoding='utf-8') as f:
            f.write(text)
        log_path = os.path.join(artefacts, 'measured.log')
        with open(log_path, 'w') as log_file:
            proc, wid = start_window(app, design, window_env(schema_dir, tmp), log_file)
            try:
                want = {'bode-z': 2, 'bode-w': 2, 'nyquist': 2, 'step': 1}
                wait_for(lambda: all(series(log_path).get(k) == v for k, v in want.items()),
                         'the data drawn beside the model (%s)' % want)
                settle(log_path)
                subprocess.run(['import', '-window', 'root',
                                os.path.join(artefacts, 'measured.png')], check=False)
                print('series per view:', series(log_path))
                quit_window(proc, wid)
            finally:
                kill_window(proc)

        # a design on the data alone (no plant model): the data's loop in the frequency
        # views, drawn as the variant's own (one series each, marked data=alone), the step
        # view without a series (it says a model is needed); saved unchanged
        alone = os.path.join(tmp, 'alone.lwd')
        p = subprocess.run([cli, 'new', '--period', '0.002', '--measured', table,
                            '--measured-kind', 'continuous', '--out', alone],
                           capture_output=True, text=True)
        if p.returncode != 0:
            fail('new --measured without --plant: %s' % p.stderr)
        text = open(alone, encoding='utf-8').read().replace(
            '<variant name="initial"/>', '<variant name="initial">\n      <gain ratio="3.4"/>\n'
            '      <lead zero_rad_s="15" pole_rad_s="110"/>\n    </variant>')
        with open(alone, 'w', encoding='utf-8') as f:
            f.write(text)
        log3 = os.path.join(artefacts, 'measured-alone.log')
        with open(log3, 'w') as log_file:
            proc, wid = start_window(app, alone, window_env(schema_dir, tmp), log_file)
            try:
                def alone_series():
                    return {d['view']: int(d['variants'])
                            for d in debug_lines(log3, 'LW-SERIES') if d.get('data') == 'alone'}
                want = {'bode-z': 1, 'bode-w': 1, 'nyquist': 1}
                wait_for(lambda: all(alone_series().get(k) == v for k, v in want.items()),
                         'the data alone drawn (%s)' % want)
                settle(log3)
                if 'step' in alone_series():
                    fail('the step view drew a series without a model')
                subprocess.run(['import', '-window', 'root',
                                os.path.join(artefacts, 'measured-alone.png')], check=False)
                before = open(alone, 'rb').read()
                if saved_after(wid, alone) != before:
                    fail('saving the design on data alone changed it')
                quit_window(proc, wid)
            finally:
                kill_window(proc)

        # the import, on a copy of an example without a measurement
        slider = os.path.join(tmp, 'slider.lwd')
        shutil.copyfile(example, slider)
        log2 = os.path.join(artefacts, 'measured-import.log')
        env = window_env(schema_dir, tmp, LW_TEST_MEASURED_CSV=table,
                         LW_TEST_MEASURED_KIND='continuous')
        with open(log2, 'w') as log_file:
            proc, wid = start_window(app, slider, env, log_file)
            try:
                wait_for(lambda: series(log2).get('bode-z') == 1, 'the slider\'s Bode view')
                settle(log2)
                before = saved_after(wid, slider)
                if b'<measured' in before:
                    fail('the example holds a measurement already')
                key(wid, 'ctrl+shift+m')
                wait_for(lambda: series(log2).get('bode-z') == 2, 'the imported data drawn')
                after = saved_after(wid, slider)
                if b'<measured kind="continuous"' not in after or b'source="axis.csv"' not in after \
                        or after.count(b'\n') < before.count(b'\n') + len(w):
                    fail('the saved document does not hold the table: %r'
                         % after[:600])
                key(wid, 'ctrl+z')
                wait_for(lambda: series(log2).get('bode-z') == 1, 'the data gone after Ctrl+Z')
                if saved_after(wid, slider) != before:
                    fail('one undo does not give the document as it was')
                quit_window(proc, wid)
            finally:
                kill_window(proc)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: the document\'s measured response is drawn in the frequency views')


def main():
    if len(sys.argv) != 6:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_MEASURED_INNER') != '1':
        outer(__file__, 'LW_TEST_MEASURED_INNER', sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
