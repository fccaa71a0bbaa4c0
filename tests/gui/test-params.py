#!/usr/bin/python3
"""A plant family made in the window alone (Xvfb), on a copy of the camera slider: the plant is
typed with a name, K/(s*(s+12)); a row for K appears with an empty value (the window's debug
line LW-FIELD name=K-nominal), 180 typed there adds the parameter; its drop-down made "range",
the low and high ends typed (150 and 220), each one undo step. The saved document must hold
<parameter name="K" nominal="180" low="150" high="220"/>, and the window's family (its debug
line LW-FAMILY, printed with 17 significant digits) must have the same members and the same
worst phase margin as `loopwright-cli analyze --json` of the saved file: the same engine
function with the same default members and seed, so the numbers must be identical (compared
as the doubles both print, no tolerance). A backward range (100 as the high end) and a nominal
outside the range (190 as the low end) are refused at their fields, named in
LW-FIELD-REFUSED, and the document saved after them is byte for byte the one before; one
Ctrl+Z then gives the document before the high end was typed, byte for byte. "Vary" beside
the dead-time field adds <parameter name="dead_time_s" nominal="0" low="0" high="0.002"/> (a
sample period of range), undone by one Ctrl+Z. The family's members and seed fields
(lw-family-sampling.c) are not shown while K is fixed, and are once it has a range. A
screenshot of the rows goes to ARTEFACT_DIR/params.png.

Usage: test-params.py LOOPWRIGHT CLI SCHEMA_DIR EXAMPLE ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or
xdotool is missing).
"""
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwgui import (refusals, undo_outside_fields,  # noqa: E402
                   click_field, debug_lines, fail, key, kill_window, last_line,  # noqa: E402
                   outer, quit_window, run, saved_after, settle, start_window, type_field,
                   wait_for, window_env)


def params_of(doc):
    """The <parameter …/> lines of a saved document, as text."""
    return re.findall(r'<parameter [^>]*/>', doc.decode())


def inner(app, cli, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-params-')
    try:
        design = os.path.join(tmp, 'params.lwd')
        shutil.copyfile(example, design)
        with open(design, 'rb') as f:
            if b'<parameters>' in f.read():
                fail('the example already has parameters')
        log_path = os.path.join(artefacts, 'params.log')
        with open(log_path, 'w') as log_file:
            proc, wid = start_window(app, design, window_env(schema_dir, tmp), log_file)
            try:
                settle(log_path)
                # the plant with a name no parameter gives: a row to fill appears for it
                key(wid, 'ctrl+l')
                run('xdotool', 'key', '--clearmodifiers', 'ctrl+a')
                run('xdotool', 'type', '--delay', '20', '--', 'K/(s*(s+12))')
                time.sleep(1.0)
                type_field(wid, log_path, 'K-nominal', '180')
                wait_for(lambda: last_line(log_path, 'LW-FIELD', name='K-range'),
                         'the row of the parameter K')
                doc_fixed = saved_after(wid, design)
                if params_of(doc_fixed) != ['<parameter name="K" nominal="180"/>']:
                    fail('after the value: %s' % params_of(doc_fixed))
                # a fixed parameter is no family: the members and seed fields are not shown
                if last_line(log_path, 'LW-FIELD', name='Members-drawn') is not None:
                    fail('the family\'s members field is shown without a family')
                # "range" from the drop-down, by the keyboard in its list
                click_field(wid, log_path, 'K-range')
                time.sleep(0.5)
                run('xdotool', 'key', '--clearmodifiers', 'Down')
                run('xdotool', 'key', '--clearmodifiers', 'Return')
                wait_for(lambda: last_line(log_path, 'LW-FIELD', name='K-low'),
                         'the range row of K')
                wait_for(lambda: last_line(log_path, 'LW-FIELD', name='Members-drawn'),
                         'the family\'s members field, shown with the range')
                time.sleep(1.0)
                type_field(wid, log_path, 'K-low', '150')
                doc_low = saved_after(wid, design)
                if params_of(doc_low) != ['<parameter name="K" nominal="180" low="150" '
                                          'high="198"/>']:
                    fail('after the low end: %s' % params_of(doc_low))
                type_field(wid, log_path, 'K-high', '220')
                doc = saved_after(wid, design)
                want = '<parameter name="K" nominal="180" low="150" high="220"/>'
                if params_of(doc) != [want]:
                    fail('saved parameters %s, expected %s' % (params_of(doc), want))
                if b'>K/(s*(s+12))</plant>' not in doc:
                    fail('the plant was not saved as typed')

                # the window's family equals analyze's on the saved file
                r = subprocess.run([cli, 'analyze', design, '--json'], capture_output=True,
                                   text=True)
                if r.returncode != 0:
                    fail('analyze: %s' % r.stderr)
                fam = json.loads(r.stdout)['family']
                settle(log_path)
                lines = list(debug_lines(log_path, 'LW-FAMILY'))
                if not lines:
                    fail('the window evaluated no family')
                line = lines[-1]
                print('window: %s; analyze: members %d, worst phase margin %r'
                      % (line, fam['members'], fam['worst_phase_margin_deg']))
                if int(line['members']) != fam['members']:
                    fail('members %s, analyze %d' % (line['members'], fam['members']))
                if float(line['worst_pm']) != fam['worst_phase_margin_deg']:
                    fail('worst phase margin %r, analyze %r'
                         % (float(line['worst_pm']), fam['worst_phase_margin_deg']))
                run('import', '-window', 'root', os.path.join(artefacts, 'params.png'),
                    check=False)

                # bad ranges: refused at the field named, the document unchanged
                before = len(refusals(log_path))
                for name, text, words in [('K-high', '100', 'backwards'),
                                          ('K-low', '190', 'outside its range')]:
                    type_field(wid, log_path, name, text)
                    got = refusals(log_path)[before:]
                    field = name.replace('-', ' ')
                    if not any(g.startswith('LW-FIELD-REFUSED %s:' % field) and words in g
                               for g in got):
                        fail('%s as %s: no refusal naming the field with "%s": %s'
                             % (text, field, words, got))
                    before = len(refusals(log_path))
                if saved_after(wid, design) != doc:
                    fail('a refused range changed the document')

                # one undo step: the high end typed is taken back, byte for byte (the focus
                # first on the drop-down: in a field, Ctrl+Z undoes the typing of its text)
                undo_outside_fields(wid, log_path)
                undone = saved_after(wid, design)
                if undone != doc_low:
                    fail('one undo did not give the document before the high end back: %s'
                         % params_of(undone))

                # the dead time as a parameter: "Vary" beside its field gives it a range of a
                # sample period (2 ms) above its nominal 0 s, one step
                click_field(wid, log_path, 'Vary-dead-time')
                wait_for(lambda: last_line(log_path, 'LW-FIELD', name='dead_time_s-high'),
                         'the range row of the dead time')
                varied = saved_after(wid, design)
                want_dead = '<parameter name="dead_time_s" nominal="0" low="0" high="0.002"/>'
                if params_of(varied) != params_of(doc_low) + [want_dead]:
                    fail('after Vary: %s' % params_of(varied))
                key(wid, 'ctrl+z')
                time.sleep(0.5)
                if saved_after(wid, design) != doc_low:
                    fail('one undo did not take the dead time\'s range back')
                quit_window(proc, wid)
            finally:
                kill_window(proc)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: a family made in the window; its worst phase margin equals analyze\'s')


def main():
    if len(sys.argv) != 6:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_PARAMS_INNER') != '1':
        outer(__file__, 'LW_TEST_PARAMS_INNER', sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
