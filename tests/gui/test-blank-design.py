#!/usr/bin/python3
"""A loop designed from a blank document with the window alone (Xvfb, keyboard and pointer
through xdotool), the whole job end to end:
  the window starts blank; type the plant (an invented pan axis, 25/(s(s+5))), the sample
  period 10 ms; add three requirements from the Add Requirement menu (phase margin at least
  45°, gain margin at least 6 dB, crossover 10 … 100 rad/s, the menu's defaults); save the
  document through Save As; run "Meet the requirements" (Ctrl+M, Return); save again and check
  with `loopwright-cli check` (an independent run of the engine from the file) that every
  requirement passes; switch the actuator limits on and set them to ±5 with anti-windup; save;
  open C Code and Coefficients (Ctrl+I) and save the C code into a folder; compare it byte for
  byte with what `loopwright-cli emit --form sections` writes from the saved document.

Usage: test-blank-design.py LOOPWRIGHT CLI SCHEMA_DIR ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or xdotool is missing).
The window's output goes to ARTEFACT_DIR/blank-design.log, screenshots to
ARTEFACT_DIR/blank-design-*.png. The code folder is given by the test hook LW_TEST_CODE_DIR
(the folder chooser is GTK's own and not under test here).
"""
import os
import shutil
import subprocess
import sys
import tempfile
import time
import xml.etree.ElementTree as ET

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwgui import (fail, find_window, key, kill_window, outer, quit_window,  # noqa: E402
                   run, saved_after, settle, type_field, wait_for, window_env)

NS = '{urn:loopwright:design}'


def log_has(path, text):
    with open(path, encoding='utf-8', errors='replace') as f:
        return text in f.read()


def shot(artefacts, name):
    subprocess.run(['import', '-window', 'root',
                    os.path.join(artefacts, 'blank-design-%s.png' % name)], check=False)


def inner(app, cli, schema_dir, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-blank-')
    try:
        design = os.path.join(tmp, 'pan-axis.lwd')
        code_dir = os.path.join(tmp, 'code')
        cli_dir = os.path.join(tmp, 'cli')
        os.makedirs(code_dir)
        os.makedirs(cli_dir)
        log_path = os.path.join(artefacts, 'blank-design.log')
        env = window_env(schema_dir, tmp, LW_TEST_CODE_DIR=code_dir)
        with open(log_path, 'w') as log_file:
            proc = subprocess.Popen([app], env=env, stdout=log_file, stderr=subprocess.STDOUT,
                                    cwd=tmp)
            try:
                wid = wait_for(lambda: find_window('^Untitled design — Loopwright$'),
                               'the blank window')
                settle(log_path)
                # the plant, then the period
                key(wid, 'ctrl+l')
                run('xdotool', 'type', '--delay', '20', '25/(s*(s+5))')
                time.sleep(0.5)
                type_field(wid, log_path, 'Sample-period', '0.01')
                # three requirements from the menu (Alt+R opens it on its first item)
                for downs in (0, 1, 3):
                    key(wid, 'alt+r')
                    time.sleep(0.6)
                    for _ in range(downs):
                        run('xdotool', 'key', '--clearmodifiers', 'Down')
                        time.sleep(0.15)
                    run('xdotool', 'key', '--clearmodifiers', 'Return')
                    time.sleep(0.6)
                settle(log_path)
                shot(artefacts, 'typed')

                # Save As with the path typed into GTK's chooser
                key(wid, 'ctrl+shift+s')
                time.sleep(1.5)
                run('xdotool', 'key', '--clearmodifiers', 'ctrl+a')
                run('xdotool', 'type', '--delay', '15', design)
                run('xdotool', 'key', '--clearmodifiers', 'Return')
                wait_for(lambda: os.path.exists(design), 'the document written by Save As')
                wid = wait_for(lambda: find_window('^pan-axis.lwd — Loopwright$'),
                               'the window named by its file')
                root = ET.parse(design).getroot()
                if root.find(NS + 'plant').text != '25/(s*(s+5))':
                    fail('the saved plant is %r' % root.find(NS + 'plant').text)
                if float(root.find(NS + 'sampling').get('period_s')) != 0.01:
                    fail('the saved period is %r' % root.find(NS + 'sampling').get('period_s'))
                kinds = [c.tag.replace(NS, '') for c in root.find(NS + 'requirements')]
                if kinds != ['phase-margin', 'gain-margin', 'crossover']:
                    fail('the saved requirements are %s' % kinds)
                r = subprocess.run([cli, 'check', design], capture_output=True, text=True)
                if r.returncode == 0:
                    fail('the bare plant already meets the requirements; the test proves '
                         'nothing:\n' + r.stdout)

                # Meet the requirements
                key(wid, 'ctrl+m')
                wait_for(lambda: log_has(log_path, 'helper-open meet proposal=1'),
                         'the meet dialog with a proposal')
                time.sleep(0.5)
                run('xdotool', 'key', '--clearmodifiers', 'Return')
                wait_for(lambda: log_has(log_path, 'helper-applied meet'), 'the proposal applied')
                settle(log_path)
                saved_after(wid, design)
                r = subprocess.run([cli, 'check', design], capture_output=True, text=True)
                if r.returncode != 0:
                    fail('after Meet the requirements, check fails:\n' + r.stdout + r.stderr)
                shot(artefacts, 'met')

                # the actuator: limits on (Alt+L), ±5, anti-windup (Alt+W)
                key(wid, 'alt+l')
                time.sleep(0.5)
                type_field(wid, log_path, 'Actuator-high', '5')
                type_field(wid, log_path, 'Actuator-low', '-5')
                key(wid, 'alt+w')
                time.sleep(0.5)
                settle(log_path)
                doc = saved_after(wid, design)
                act = ET.fromstring(doc).find('.//' + NS + 'variant/' + NS + 'actuator')
                if act is None or (act.get('low'), act.get('high'), act.get('anti_windup')) \
                        != ('-5', '5', 'true'):
                    fail('the saved actuator is %s' % (None if act is None else act.attrib))
                shot(artefacts, 'actuator')

                # C code from the window, and from emit
                key(wid, 'ctrl+i')
                wait_for(lambda: log_has(log_path, 'implementation-open'),
                         'the C code dialog')
                time.sleep(0.8)
                shot(artefacts, 'code')
                run('xdotool', 'key', '--clearmodifiers', 'Return')   # Save C Code (default)
                wait_for(lambda: log_has(log_path, 'implementation-saved'), 'the C code saved')
                r = subprocess.run([cli, 'emit', design, '--form', 'sections', '--out', cli_dir],
                                   capture_output=True, text=True)
                if r.returncode != 0:
                    fail('emit failed:\n' + r.stderr)
                for name in ('lw_ctrl_controller.h', 'lw_ctrl_controller.c'):
                    with open(os.path.join(code_dir, name), 'rb') as a, \
                            open(os.path.join(cli_dir, name), 'rb') as b:
                        if a.read() != b.read():
                            fail('%s from the window differs from emit\'s' % name)
                run('xdotool', 'key', '--clearmodifiers', 'Escape')
                time.sleep(0.3)
                quit_window(proc, wid)
            finally:
                kill_window(proc)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: a blank design typed, three requirements met by Meet the requirements, '
          'actuator limits saved, the window\'s C code equal to emit\'s')


def main():
    if len(sys.argv) != 5:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_BLANK_INNER') != '1':
        outer(__file__, 'LW_TEST_BLANK_INNER', sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
