#!/usr/bin/python3
"""Autosave: every window keeps its own unsaved work, and all of it is offered after a crash.

Two windows of one process each get unsaved work (a copy of the active variant, Ctrl+Shift+N)
and must each get their own autosave; a second process started meanwhile must not offer the
first one's work (its session is locked while it lives); saving one window removes its own
autosave and leaves the other's; after kill -9 a third process must offer both, restore both
into windows of their own (Return on the offer), and the restored work saved from the window
must be the autosaved document byte for byte.  State is read from the LW-AUTOSAVE lines of
LW_DEBUG_HANDLES=1 (src/gui/lw-autosave.h); LW_TEST_AUTOSAVE_INTERVAL_MS makes a round every
300 ms instead of 30 s.

Usage: test-autosave.py LOOPWRIGHT SCHEMA_DIR EXAMPLE.lwd ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or xdotool is missing).
"""
import os
import shutil
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import lwgui  # noqa: E402
from lwgui import fail, wait_for, find_window, key, run  # noqa: E402


def autosave_lines(log_path, **match):
    return [f for f in lwgui.debug_lines(log_path, 'LW-AUTOSAVE')
            if all(f.get(k) == v for k, v in match.items())]


def read(path):
    with open(path, 'rb') as f:
        return f.read()


def n_variants(data):
    return data.count(b'<variant ')


def window_of(pid, name):
    """The X window of process pid titled name (a regular expression)."""
    out = run('xdotool', 'search', '--all', '--onlyvisible', '--pid', str(pid), '--name', name,
              check=False)
    return out.split()[0] if out else None


def screenshot(path):
    """The screen once something is drawn on it (a window just mapped is one flat colour)."""
    def drawn():
        run('import', '-window', 'root', path)
        return int(run('identify', '-format', '%k', path)) > 16
    wait_for(drawn, 'the screen to be drawn (' + os.path.basename(path) + ')')


def inner(app, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-autosave-')
    design = os.path.join(tmp, 'slider.lwd')
    shutil.copyfile(example, design)
    design_uri = 'file://' + design
    env = lwgui.window_env(schema_dir, tmp, LW_TEST_AUTOSAVE_INTERVAL_MS='300')
    autosave_dir = os.path.join(tmp, 'state', 'loopwright', 'autosave')
    logs = [os.path.join(artefacts, 'autosave-%d.log' % i) for i in (1, 2, 3)]
    files = [open(p, 'w') for p in logs]
    procs = []
    try:
        # ---- one process, two windows with unsaved work
        p1, w1 = lwgui.start_window(app, design, env, files[0])
        procs.append(p1)
        key(w1, 'ctrl+n')
        w2 = wait_for(lambda: find_window('^Untitled design — Loopwright$'), 'the second window')
        # a new window shows a blank design: its plant first (a design without one cannot be
        # written, so there would be nothing to autosave)
        key(w2, 'ctrl+l')
        run('xdotool', 'type', '--delay', '20', '1/(s*(s+1))')
        key(w1, 'ctrl+shift+n')
        key(w2, 'ctrl+shift+n')

        def wrote_both():
            a = autosave_lines(logs[0], event='wrote', source=design_uri)
            b = autosave_lines(logs[0], event='wrote', source='-')
            return (a[-1], b[-1]) if a and b else None

        def wrote_copies():
            # the newest autosave of each window, once both hold their copies (a slow run may
            # write the second window's plant before its copy)
            got = wrote_both()
            if got is None or got[0]['path'] == got[1]['path']:
                return got
            try:
                counts = (n_variants(read(got[0]['path'])), n_variants(read(got[1]['path'])))
            except OSError:
                return None
            return got if counts == (3, 2) else None
        deadline = time.monotonic() + 20.0
        while time.monotonic() < deadline and not wrote_copies():
            time.sleep(0.1)
        # then the newest of each, copies or not: the checks below say what is wrong
        a, b = wait_for(wrote_both, 'an autosave of each window')
        if a['slot'] == b['slot'] or a['path'] == b['path']:
            fail('the two windows share an autosave: %s and %s' % (a, b))
        doc_a, doc_b = read(a['path']), read(b['path'])
        # camera-slider.lwd has two variants, the window's new design one: each plus the copy
        if (n_variants(doc_a), n_variants(doc_b)) != (3, 2):
            fail('the autosaves hold %d and %d variants, expected 3 and 2 (the unsaved copies)'
                 % (n_variants(doc_a), n_variants(doc_b)))
        print('ok: two windows, two autosaves (slots %s and %s)' % (a['slot'], b['slot']))

        # ---- a second process while the first lives: nothing of the first is offered
        p2 = subprocess.Popen([app], env=env, stdout=files[1], stderr=subprocess.STDOUT)
        procs.append(p2)
        stale = wait_for(lambda: autosave_lines(logs[1], event='stale')[:1],
                         'the second process to look for stale autosaves')[0]
        if stale.get('n') != '0':
            fail('a second process offered the live one\'s work: %s' % stale)
        w3 = wait_for(lambda: window_of(p2.pid, 'Loopwright$'), 'the second process\'s window')
        lwgui.quit_window(p2, w3)
        sessions = sorted(os.listdir(autosave_dir))
        if len(sessions) != 1:
            fail('after a clean quit of the second process, sessions left: %s' % sessions)
        print('ok: a second process offered nothing of the live one and cleaned up its own')

        # ---- saving one window removes its autosave only
        lwgui.saved_after(w1, design)
        wait_for(lambda: autosave_lines(logs[0], event='removed', slot=a['slot'])
                 and not os.path.exists(a['path']), 'the saved window\'s autosave to go')
        if not os.path.exists(b['path']) or read(b['path']) != doc_b:
            fail('saving one window touched the other window\'s autosave')
        print('ok: saving one window removed its autosave and left the other\'s')

        # ---- more unsaved work in the saved window, then a crash
        n_before = len(autosave_lines(logs[0], event='wrote', slot=a['slot']))
        key(w1, 'ctrl+shift+n')
        wait_for(lambda: len(autosave_lines(logs[0], event='wrote', slot=a['slot'])) > n_before
                 and os.path.exists(a['path']), 'the saved window\'s new autosave')
        doc_a = read(a['path'])
        if n_variants(doc_a) != 4:
            fail('the new autosave holds %d variants, expected 4' % n_variants(doc_a))
        p1.kill()
        p1.wait()

        # ---- after the crash: both offered, both restored
        p3 = subprocess.Popen([app], env=env, stdout=files[2], stderr=subprocess.STDOUT)
        procs.append(p3)
        stale = wait_for(lambda: autosave_lines(logs[2], event='stale')[:1],
                         'the third process to look for stale autosaves')[0]
        offered = sorted(stale.get('paths', '').split(','))
        if stale.get('n') != '2' or offered != sorted([a['path'], b['path']]):
            fail('after the crash offered %s, expected both autosaves %s'
                 % (stale, [a['path'], b['path']]))
        dialog = wait_for(lambda: window_of(p3.pid, '^Restore unsaved work\\?$'),
                          'the offer to restore')
        screenshot(os.path.join(artefacts, 'autosave-offer.png'))
        key(dialog, 'Return')
        adopted = wait_for(lambda: len(autosave_lines(logs[2], event='adopted')) == 2
                           and autosave_lines(logs[2], event='adopted'), 'both restored')
        by_source = {}
        for f in adopted:
            by_source[f['from']] = f
        if sorted(by_source) != offered:
            fail('restored %s, expected %s' % (sorted(by_source), offered))
        r1 = wait_for(lambda: window_of(p3.pid, '^• slider.lwd — Loopwright$'),
                      'the restored window on slider.lwd')
        wait_for(lambda: window_of(p3.pid, '^• Untitled design — Loopwright$'),
                 'the restored new design')
        for p in offered:
            if os.path.exists(p):
                fail('the restored autosave %s is still there' % p)
        screenshot(os.path.join(artefacts, 'autosave-restored.png'))

        # the restored work is what was autosaved: saved from the window, byte for byte
        saved = lwgui.saved_after(r1, design)
        if saved != doc_a:
            fail('the restored and saved document differs from the autosave')
        print('ok: after kill -9 both autosaves were offered and restored; the restored work '
              'saves as autosaved')
        lwgui.kill_window(p3)
    finally:
        for p in procs:
            lwgui.kill_window(p)
        for f in files:
            f.close()
    shutil.rmtree(tmp, ignore_errors=True)


def main():
    if len(sys.argv) != 5:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_AUTOSAVE_INNER') != '1':
        lwgui.outer(__file__, 'LW_TEST_AUTOSAVE_INNER', sys.argv[1:],
                    tools=('Xvfb', 'xdotool', 'import'))
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
