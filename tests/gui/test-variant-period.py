#!/usr/bin/python3
"""A variant's own sample period from the window (Xvfb): open an example, open the Variants
popover (its button's position comes from the window's debug line LW-WIDGET), tick "Own
sample period" with the keyboard (Tab, Tab, Space from the name entry that has the focus),
save, and check that the saved document gives the active variant period_s equal to the
design's period (the spin starts at it) and leaves the other variant alone; one undo takes it
away again (one undo step), and the saved document is then byte for byte the first one.

Usage: test-variant-period.py LOOPWRIGHT SCHEMA_DIR EXAMPLE ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or xdotool is missing).
The window's output goes to ARTEFACT_DIR/variant-period.log.
"""
import os
import re
import shutil
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwgui import (fail, key, kill_window, last_line, outer, quit_window, run,  # noqa: E402
                   saved_after, start_window, wait_for, window_env, window_origin)


def inner(app, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-period-')
    try:
        design = os.path.join(tmp, 'period.lwd')
        shutil.copyfile(example, design)
        os.utime(design, (time.time() + 5, time.time() + 5))
        text = open(example, encoding='utf-8').read()
        active = re.search(r'<variants active="([^"]+)">', text).group(1)
        period = re.search(r'<sampling period_s="([^"]+)"', text).group(1)
        log_path = os.path.join(artefacts, 'variant-period.log')
        with open(log_path, 'w') as log_file:
            proc, wid = start_window(app, design, window_env(schema_dir, tmp), log_file)
            try:
                b = wait_for(lambda: last_line(log_path, 'LW-WIDGET', name='variants-button'),
                             'the position of the Variants button')
                time.sleep(0.5)
                doc0 = saved_after(wid, design)
                b = last_line(log_path, 'LW-WIDGET', name='variants-button')
                x0, y0 = window_origin(wid)
                x = x0 + round(float(b['sx']))
                y = y0 + round(float(b['sy']))
                run('xdotool', 'mousemove', '--sync', str(x), str(y))
                run('xdotool', 'click', '1')
                time.sleep(0.8)
                # the name entry has the focus; then Rename, then the check button
                for k in ('Tab', 'Tab', 'space'):
                    run('xdotool', 'key', '--clearmodifiers', k)
                    time.sleep(0.2)
                time.sleep(0.3)
                run('xdotool', 'key', '--clearmodifiers', 'Escape')
                time.sleep(0.3)
                doc1 = saved_after(wid, design)
                want = ('<variant name="%s" period_s="%s">' % (active, period)).encode()
                if want not in doc1:
                    fail('the saved document lacks %s:\n%s' % (want.decode(),
                                                              doc1.decode(errors='replace')))
                if doc1.count(b'period_s=') != 2:   # <sampling> and the active variant only
                    fail('period_s on more than the active variant')
                key(wid, 'ctrl+z')
                time.sleep(0.4)
                if saved_after(wid, design) != doc0:
                    fail('one undo does not give the document before the period override')
                quit_window(proc, wid)
            finally:
                kill_window(proc)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: the Variants popover sets the active variant\'s own period, one undo step')


def main():
    if len(sys.argv) != 5:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_PERIOD_INNER') != '1':
        outer(__file__, 'LW_TEST_PERIOD_INNER', sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
