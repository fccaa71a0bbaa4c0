#!/usr/bin/python3
"""The mouse wheel over the panels scrolls them and edits nothing (Xvfb): open a design, save
it (the canonical form of what was loaded), put the pointer over the left column (400, 500 of
the window) and turn the wheel 30 notches down and 30 up, 10 ms apart as a quick flick gives,
so that number fields of the stages and the requirements pass under the pointer; save again
and compare the bytes: they must be the same, and the window's title must not mark the design
changed. Without lw_gui_spin_wheel_off a number field that passes under the still pointer
takes a notch as one step of its value (checked: the test then fails on the title).

Usage: test-wheel.py LOOPWRIGHT SCHEMA_DIR EXAMPLE
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or xdotool is missing).
"""
import os
import re
import shutil
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwgui import (debug_lines, fail, kill_window, outer, quit_window, run,  # noqa: E402
                   saved_after, start_window, wait_for, window_env)


def inner(app, schema_dir, example):
    tmp = tempfile.mkdtemp(prefix='lw-test-wheel-')
    design = os.path.join(tmp, 'wheel.lwd')
    shutil.copyfile(example, design)
    os.utime(design, (time.time() - 10, time.time() - 10))
    log_path = os.path.join(tmp, 'wheel.log')
    with open(log_path, 'w') as log_file:
        proc, wid = start_window(app, design, window_env(schema_dir, tmp), log_file)
        try:
            wait_for(lambda: list(debug_lines(log_path, 'LW-HANDLE')), 'the plots')
            time.sleep(0.5)
            doc0 = saved_after(wid, design)
            geo = run('xdotool', 'getwindowgeometry', wid)
            m = re.search(r'Position: (-?\d+),(-?\d+)', geo)
            wx, wy = int(m.group(1)), int(m.group(2))
            run('xdotool', 'mousemove', '--sync', str(wx + 400), str(wy + 500))
            time.sleep(0.3)
            for button in ('5', '4'):
                run('xdotool', 'click', '--repeat', '30', '--delay', '10', button)
                time.sleep(0.5)
            title = run('xdotool', 'getwindowname', wid)
            if title.startswith('\u2022'):
                fail('the wheel marked the design changed (title %r)' % title)
            os.utime(design, (time.time() - 10, time.time() - 10))
            doc1 = saved_after(wid, design)
            if doc1 != doc0:
                fail('the wheel over the panels changed the design')
            quit_window(proc, wid)
        finally:
            kill_window(proc)
    print('60 notches of the wheel over the panels: the design is unchanged')


if __name__ == '__main__':
    if len(sys.argv) != 4:
        fail('usage: test-wheel.py LOOPWRIGHT SCHEMA_DIR EXAMPLE')
    if os.environ.get('LW_TEST_WHEEL_INNER') != '1':
        outer(__file__, 'LW_TEST_WHEEL_INNER', sys.argv[1:])
    inner(*sys.argv[1:])
