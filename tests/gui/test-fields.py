#!/usr/bin/python3
"""Number fields that never lie, in a real window (Xvfb): on a copy of the camera slider, each
bad input of the issue is typed into its field and Tab pressed: "-0.01" as the sample period
(it used to become 1e-9 s), "abc" as the gain (it used to become 0), "0,5" as the lead's zero
in the C locale (it used to become 1e-6), "1e999" as the dead time, "1.5" as the computation
delay, and "−3" with a typographic minus as the lead's pole. Each must be refused at its field
with the reason (the window's debug line LW-FIELD-REFUSED names the field and the reason), and
the saved document must then be byte for byte the one before: nothing was converted into the
design. Then a small number, 0.00025 as the lead's zero, is taken exactly (it used to show as
"0.000" and be read back as such), survives moving the focus through the field again, and
one Ctrl+Z gives the first document back. The plant's input unit typed as "mA " is taken up to
"mA" and the space at its end refused (the document keeps "mA"); Alt+U switches u(t) off for the variant, saved as its
<responses>, and one undo takes it back.

Usage: test-fields.py LOOPWRIGHT SCHEMA_DIR EXAMPLE ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or xdotool is missing).
The window's output goes to ARTEFACT_DIR/fields.log; a screenshot of a refusal to
ARTEFACT_DIR/fields-refused.png.
"""
import os
import shutil
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwgui import (refusals,  # noqa: E402
                   click_field, fail, key, kill_window, last_line, outer,  # noqa: E402
                   quit_window, run, saved_after, settle, start_window, type_field, wait_for,
                   window_env)


# field (as the debug line names it), text typed, words the refusal must hold
BAD = [
    ('Sample-period', '-0.01', 'outside what this field takes'),
    ('Gain', 'abc', 'is not a number'),
    ('Zero', '0,5', 'decimal point'),
    ('Dead-time', '1e999', 'too large'),
    ('Computation-delay', '1.5', 'not a whole number'),
    ('Pole', '\u22123', 'typographic minus'),
]


def inner(app, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-fields-')
    try:
        design = os.path.join(tmp, 'fields.lwd')
        shutil.copyfile(example, design)
        log_path = os.path.join(artefacts, 'fields.log')
        with open(log_path, 'w') as log_file:
            proc, wid = start_window(app, design, window_env(schema_dir, tmp), log_file)
            try:
                for name, _, _ in BAD:
                    wait_for(lambda: last_line(log_path, 'LW-FIELD', name=name),
                             'the position of the field %s' % name)
                settle(log_path)
                doc0 = saved_after(wid, design)
                for n, (name, text, words) in enumerate(BAD):
                    label = name.replace('-', ' ')
                    mine = lambda: [r for r in refusals(log_path)  # noqa: E731
                                    if r.startswith('LW-FIELD-REFUSED %s: ' % label)]
                    before = len(mine())
                    type_field(wid, log_path, name, text)
                    # a field still holding a refused text says so again when it loses the
                    # focus: only this field's newest line counts
                    got = wait_for(lambda: len(mine()) > before and mine()[-1],
                                   'the refusal of %r in %s' % (text, name))
                    if words not in got:
                        fail('%r in %s: expected a refusal with %r, got %r'
                             % (text, name, words, got))
                    if n == 0:
                        subprocess.run(['import', '-window', 'root',
                                        os.path.join(artefacts, 'fields-refused.png')],
                                       check=False)
                doc1 = saved_after(wid, design)
                if doc1 != doc0:
                    fail('refused input changed the saved document')

                # a small value is taken as typed and kept through another focus change
                zero_refusals = lambda: [r for r in refusals(log_path)  # noqa: E731
                                         if r.startswith('LW-FIELD-REFUSED Zero: ')]
                n_zero = len(zero_refusals())
                type_field(wid, log_path, 'Zero', '0.00025')
                click_field(wid, log_path, 'Zero')     # in and out again, text untouched
                run('xdotool', 'key', '--clearmodifiers', 'Tab')
                time.sleep(0.5)
                if len(zero_refusals()) != n_zero:
                    fail('0.00025 was refused: %s' % zero_refusals()[n_zero:])
                doc2 = saved_after(wid, design)
                if b'zero_rad_s="0.00025"' not in doc2:
                    fail('0.00025 as the lead zero was not saved exactly:\n%s'
                         % doc2.decode(errors='replace'))
                key(wid, 'ctrl+z')
                time.sleep(0.4)
                if saved_after(wid, design) != doc0:
                    fail('one undo does not give the document before the small zero')

                # The units (Alt+N): typing "mA " — the unit is taken as typed until the space
                # at its end, which is refused (the document keeps "mA"). A response switch (Alt+U, u(t)) is the variant's,
                # saved as <responses>; both are undone one step each.
                n_unit = len([r for r in refusals(log_path) if 'Input unit: ' in r])
                key(wid, 'alt+n')
                run('xdotool', 'key', '--clearmodifiers', 'ctrl+a')
                run('xdotool', 'type', '--delay', '20', '--', 'mA ')
                time.sleep(0.8)
                got = wait_for(lambda: [r for r in refusals(log_path)
                                        if 'Input unit: ' in r][n_unit:],
                               'the refusal of a unit ending in a space')
                if 'space' not in got[-1]:
                    fail('a unit ending in a space: expected a refusal naming the space, got %r'
                         % got[-1])
                # the entry is read as it is typed: "mA" was taken before the space came
                doc3 = saved_after(wid, design)
                if b'input_unit="mA" output_unit="m"' not in doc3:
                    fail('the last good unit mA is not the saved one:\n%s'
                         % doc3.decode(errors='replace'))
                run('xdotool', 'key', '--clearmodifiers', 'BackSpace')
                time.sleep(0.8)
                if saved_after(wid, design) != doc3:
                    fail('taking the space away changed the document again')
                key(wid, 'alt+u')
                time.sleep(0.8)
                doc4 = saved_after(wid, design)
                want = (b'<responses shows="reference input-disturbance output-disturbance"/>')
                if want not in doc4:
                    fail('Alt+U (u(t) off) was not saved as %r:\n%s'
                         % (want, doc4.decode(errors='replace')))
                key(wid, 'ctrl+z')
                time.sleep(0.4)
                if saved_after(wid, design) != doc3:
                    fail('one undo does not take the response switch back')
                quit_window(proc, wid)
            finally:
                kill_window(proc)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: %d bad inputs refused at their fields, the document unchanged; 0.00025 taken '
          'exactly' % len(BAD))


def main():
    if len(sys.argv) != 5:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_FIELDS_INNER') != '1':
        outer(__file__, 'LW_TEST_FIELDS_INNER', sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
