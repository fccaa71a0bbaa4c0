#!/usr/bin/python3
"""The formula helpers in a real window (Xvfb): on a copy of the camera slider, "Meet the
requirements" (Ctrl+M) opens its dialog with a proposal; Return applies it; the saved document
is byte for byte what `loopwright-cli suggest FILE --helper meet --output OUT` writes (one
engine behind both); one Ctrl+Z brings back the document as it was (one undo step). Then the
dialog again with its crossover typed wrong ("4O", a letter O for a zero): the dialog refuses
it, Return applies nothing. Design Details: a title typed there is saved in the document.

Usage: test-helpers.py LOOPWRIGHT CLI SCHEMA_DIR EXAMPLE ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb, xdotool or import is
missing). Screenshots in ARTEFACT_DIR: helpers-meet.png, helpers-refused.png.
"""
import os
import re
import shutil
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import lwgui  # noqa: E402
from lwgui import fail, key, kill_window, quit_window, saved_after  # noqa: E402


def log_has(path, prefix):
    with open(path, encoding='utf-8', errors='replace') as f:
        return [line for line in f.read().splitlines() if line.startswith(prefix)]


def main(argv):
    app, cli, schema_dir, example, artefacts = argv
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-helpers-')
    design = os.path.join(tmp, 'slider.lwd')
    shutil.copyfile(example, design)
    env = lwgui.window_env(schema_dir, tmp)
    log_path = os.path.join(artefacts, 'helpers.log')
    proc = None
    with open(log_path, 'w') as log:
        try:
            proc, wid = lwgui.start_window(app, design, env, log)
            lwgui.settle(log_path)
            original = saved_after(wid, design)

            # the CLI's proposal, written from the same (canonical) document
            expected_path = os.path.join(tmp, 'expected.lwd')
            r = subprocess.run([cli, 'suggest', design, '--helper', 'meet', '--output',
                                expected_path], capture_output=True, text=True)
            if r.returncode != 0:
                fail('suggest --helper meet: %s' % r.stderr)
            with open(expected_path, 'rb') as f:
                expected = f.read()

            key(wid, 'ctrl+m')
            lwgui.wait_for(lambda: log_has(log_path, 'helper-open meet proposal=1'),
                           'the meet dialog with a proposal')
            time.sleep(0.5)
            subprocess.run(['import', '-window', 'root',
                            os.path.join(artefacts, 'helpers-meet.png')], check=False)
            subprocess.run(['xdotool', 'key', '--clearmodifiers', 'Return'], check=True)
            lwgui.wait_for(lambda: log_has(log_path, 'helper-applied meet'),
                           'the proposal applied')
            lwgui.settle(log_path)
            subprocess.run(['import', '-window', 'root',
                            os.path.join(artefacts, 'helpers-applied.png')], check=False)
            applied = saved_after(wid, design)
            if applied != expected:
                with open(os.path.join(artefacts, 'helpers-window.lwd'), 'wb') as f:
                    f.write(applied)
                with open(os.path.join(artefacts, 'helpers-cli.lwd'), 'wb') as f:
                    f.write(expected)
                fail('the window applied another document than suggest --helper meet wrote '
                     '(both kept in the artefacts)')

            key(wid, 'ctrl+z')
            lwgui.settle(log_path)
            undone = saved_after(wid, design)
            if undone != original:
                fail('one Ctrl+Z did not bring back the document as it was')

            # the lead helper with a field typed wrong: refused, nothing applied
            key(wid, 'ctrl+m')
            lwgui.wait_for(lambda: len(log_has(log_path, 'helper-open meet')) >= 2,
                           'the meet dialog again')
            time.sleep(0.3)
            # the focus is on the first field (the crossover): type a letter O for a zero
            subprocess.run(['xdotool', 'type', '--delay', '40', '4O'], check=True)
            time.sleep(0.8)
            subprocess.run(['import', '-window', 'root',
                            os.path.join(artefacts, 'helpers-refused.png')], check=False)
            subprocess.run(['xdotool', 'key', '--clearmodifiers', 'Return'], check=True)
            time.sleep(0.8)
            if len(log_has(log_path, 'helper-applied')) != 1:
                fail('a refused field still applied a proposal')
            subprocess.run(['xdotool', 'key', '--clearmodifiers', 'Escape'], check=True)
            time.sleep(0.5)
            # the design's title through Design Details (Alt+Return): typed over the old
            # one, saved in the document
            key(wid, 'alt+Return')
            time.sleep(0.8)
            subprocess.run(['xdotool', 'type', '--delay', '30', 'Slider axis rev B'], check=True)
            time.sleep(0.5)
            subprocess.run(['xdotool', 'key', '--clearmodifiers', 'Escape'], check=True)
            time.sleep(0.5)
            titled = saved_after(wid, design)
            if b'<title>Slider axis rev B</title>' not in titled:
                m = re.search(rb'<title>[^<]*</title>', titled)
                fail('the title typed in Design Details is not in the saved document: %r'
                     % (m.group(0) if m else None))
            # saved: Ctrl+Q quits without asking (quit_window fails when the window is still
            # there 15 s later)
            quit_window(proc, wid)
        finally:
            if proc is not None:
                kill_window(proc)
    shutil.rmtree(tmp, ignore_errors=True)
    print('helpers: the window\'s proposal equals the CLI\'s; one undo step; a bad field refused')


if __name__ == '__main__':
    if os.environ.get('LW_TEST_HELPERS_INNER') != '1':
        lwgui.outer(__file__, 'LW_TEST_HELPERS_INNER', sys.argv[1:],
                    tools=('Xvfb', 'xdotool', 'import'))
    main(sys.argv[1:])
