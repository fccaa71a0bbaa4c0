#!/usr/bin/python3
"""An operating point made in the window alone (Xvfb), on a copy of the fleet example
(data/examples/camera-slider-fleet.lwd: K from 150 to 220, wn from 180 to 225): "Add operating
point" adds a row named "point 1" (the window's debug line LW-FIELD name=point-1-name), renamed
"light" (a lighter camera: a higher gain than the range holds), K given 260 there, each one
undo step. The saved document must hold
<point name="light"><value parameter="K" value="260"/></point> after the <parameter> elements,
and the window's family (its debug line LW-FAMILY, printed with 17 significant digits) must
have the same members and the same worst phase margin as `loopwright-cli analyze --json` of
the saved file: the same engine function with the same default members and seed, so the
numbers must be identical (compared as the doubles both print, no tolerance); analyze names
the point as the worst member. Refused at their fields, named in LW-FIELD-REFUSED: a value
that is not a number ("abc" for wn), one not finite (1e999), one where the plant is zero
(K = 0), a name with ':' and the name of a second point given to the first; the document saved
after them (the second point removed again with its ×) is byte for byte the one before; one
Ctrl+Z then gives the document before K was given, byte for byte. A screenshot of the rows
goes to ARTEFACT_DIR/points.png.

Usage: test-points.py LOOPWRIGHT CLI SCHEMA_DIR EXAMPLE ARTEFACT_DIR
(EXAMPLE: the camera slider; the fleet example is read beside it.)
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


def points_of(doc):
    """The <point> elements of a saved document, as text."""
    return re.findall(r'<point [^>]*/>|<point [^>]*>.*?</point>', doc.decode(), re.S)


def add_point(wid, log_path, name):
    """Clicks "Add operating point" and waits for the new row's name field."""
    click_field(wid, log_path, 'Add-operating-point')
    wait_for(lambda: last_line(log_path, 'LW-FIELD', name=name + '-name'),
             'the row of the new point ' + name)
    time.sleep(0.5)


def inner(app, cli, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-points-')
    try:
        design = os.path.join(tmp, 'points.lwd')
        shutil.copyfile(os.path.join(os.path.dirname(example), 'camera-slider-fleet.lwd'),
                        design)
        with open(design, 'rb') as f:
            if b'<point ' in f.read():
                fail('the example already has operating points')
        log_path = os.path.join(artefacts, 'points.log')
        with open(log_path, 'w') as log_file:
            proc, wid = start_window(app, design, window_env(schema_dir, tmp), log_file)
            try:
                settle(log_path)
                add_point(wid, log_path, 'point-1')
                doc_added = saved_after(wid, design)
                if points_of(doc_added) != ['<point name="point 1"/>']:
                    fail('after Add operating point: %s' % points_of(doc_added))
                type_field(wid, log_path, 'point-1-name', 'light')
                wait_for(lambda: last_line(log_path, 'LW-FIELD', name='K-at-light'),
                         'the value fields of the point renamed')
                time.sleep(0.5)
                doc_named = saved_after(wid, design)
                if points_of(doc_named) != ['<point name="light"/>']:
                    fail('after the name: %s' % points_of(doc_named))
                type_field(wid, log_path, 'K-at-light', '260')
                doc = saved_after(wid, design)
                want = ('<point name="light">\n      <value parameter="K" value="260"/>\n'
                        '    </point>')
                if points_of(doc) != [want]:
                    fail('saved points %s, expected %s' % (points_of(doc), [want]))
                if not re.search(rb'<parameter name="zeta" nominal="0.01"/>\n    <point ', doc):
                    fail('the point is not right after the parameters')

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
                print('window: %s; analyze: members %d, points %d, worst phase margin %r at %s'
                      % (line, fam['members'], fam['points'], fam['worst_phase_margin_deg'],
                         fam['worst_member']))
                if fam['points'] != 1 or fam['worst_member'].get('point') != 'light':
                    fail('analyze: %d points, the worst member %s (expected the point light)'
                         % (fam['points'], fam['worst_member']))
                if int(line['members']) != fam['members']:
                    fail('members %s, analyze %d' % (line['members'], fam['members']))
                if float(line['worst_pm']) != fam['worst_phase_margin_deg']:
                    fail('worst phase margin %r, analyze %r'
                         % (float(line['worst_pm']), fam['worst_phase_margin_deg']))
                run('import', '-window', 'root', os.path.join(artefacts, 'points.png'),
                    check=False)

                # bad values and names: refused at the field named, the document unchanged
                add_point(wid, log_path, 'point-2')
                before = len(refusals(log_path))
                for name, text, field, words in [
                        ('wn-at-light', 'abc', 'wn at light', 'not a number'),
                        ('wn-at-light', '1e999', 'wn at light', 'too large'),
                        ('K-at-light', '0', 'K at light', 'identically zero'),
                        ('light-name', 'a:b', 'light name', "':'"),
                        ('light-name', 'point 2', 'light name', 'given twice')]:
                    type_field(wid, log_path, name, text)
                    got = refusals(log_path)[before:]
                    if not any(g.startswith('LW-FIELD-REFUSED %s:' % field) and words in g
                               for g in got):
                        fail('%s as %s: no refusal naming the field with "%s": %s'
                             % (text, field, words, got))
                    before = len(refusals(log_path))
                # the second point removed with its ×: the document as before the refusals
                click_field(wid, log_path, 'Remove-point-2')
                time.sleep(0.5)
                if saved_after(wid, design) != doc:
                    fail('the refusals or the second point\'s removal changed the document')

                # one undo step: the value given is taken back, byte for byte (the focus
                # first on a drop-down: in a text field, Ctrl+Z undoes the typing of its text)
                undo_outside_fields(wid, log_path)   # the second point's removal
                key(wid, 'ctrl+z')   # its adding
                time.sleep(0.5)
                if saved_after(wid, design) != doc:
                    fail('two undos did not take the second point back out')
                key(wid, 'ctrl+z')
                time.sleep(0.5)
                undone = saved_after(wid, design)
                if undone != doc_named:
                    fail('one undo did not give the document before K was given: %s'
                         % points_of(undone))
                quit_window(proc, wid)
            finally:
                kill_window(proc)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: an operating point made in the window; its worst phase margin equals analyze\'s')


def main():
    if len(sys.argv) != 6:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_POINTS_INNER') != '1':
        outer(__file__, 'LW_TEST_POINTS_INNER', sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
