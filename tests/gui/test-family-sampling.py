#!/usr/bin/python3
"""The plant family's drawn members and seed edited in the window (Xvfb), on a copy of the
fleet example (data/examples/camera-slider-fleet.lwd, which gives neither, so the defaults 100
and 1 hold): 20 typed into the members field (debug line LW-FIELD name=Members-drawn) and 4
into the seed field (name=Seed), each one undo step. The saved document must open its
parameters with <parameters members="20" seed="4">, and the window's family (its debug line
LW-FAMILY, printed with 17 significant digits) must have the same members and the same worst
phase margin as `loopwright-cli analyze --json` of the saved file: the same engine function
with the same members and seed, so the numbers must be identical (compared as the doubles both
print, no tolerance); the members count is 1 nominal + 4 corners + 20 drawn = 25 (the family's
order, docs/families.md). A fraction (2.5), a number over the limit (100001) and a negative
one (-1) are refused at their fields, named in LW-FIELD-REFUSED, and the document saved after
them is byte for byte the one before; one Ctrl+Z then gives the document before the seed was
typed, byte for byte. A screenshot goes to ARTEFACT_DIR/family-sampling.png.

Usage: test-family-sampling.py LOOPWRIGHT CLI SCHEMA_DIR EXAMPLE ARTEFACT_DIR
(EXAMPLE: the camera slider; the fleet example beside it is used.) Re-runs itself on an Xvfb
server of its own (lwgui.outer; exit 77, skipped, when Xvfb or xdotool is missing).
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


def parameters_tag(doc):
    m = re.search(rb'<parameters[^>]*>', doc)
    return m.group(0).decode() if m else None


def family_lines(log_path):
    return list(debug_lines(log_path, 'LW-FAMILY'))


def inner(app, cli, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-family-sampling-')
    try:
        design = os.path.join(tmp, 'fleet.lwd')
        shutil.copyfile(os.path.join(os.path.dirname(example), 'camera-slider-fleet.lwd'),
                        design)
        with open(design, 'rb') as f:
            original = f.read()
        if parameters_tag(original) != '<parameters>':
            fail('the fleet example already gives members or a seed: %s'
                 % parameters_tag(original))
        log_path = os.path.join(artefacts, 'family-sampling.log')
        with open(log_path, 'w') as log_file:
            proc, wid = start_window(app, design, window_env(schema_dir, tmp), log_file)
            try:
                settle(log_path)
                wait_for(lambda: family_lines(log_path), 'the family evaluated')
                if family_lines(log_path)[-1]['members'] != '105':
                    fail('the default family has %s members, not 1 + 4 + 100'
                         % family_lines(log_path)[-1]['members'])
                wait_for(lambda: last_line(log_path, 'LW-FIELD', name='Members-drawn'),
                         'the members field')

                type_field(wid, log_path, 'Members-drawn', '20')
                doc_members = saved_after(wid, design)
                if parameters_tag(doc_members) != '<parameters members="20">':
                    fail('after the members: %s' % parameters_tag(doc_members))
                type_field(wid, log_path, 'Seed', '4')
                doc = saved_after(wid, design)
                if parameters_tag(doc) != '<parameters members="20" seed="4">':
                    fail('after the seed: %s' % parameters_tag(doc))
                # nothing else of the document changed
                if doc.replace(b'<parameters members="20" seed="4">', b'<parameters>') \
                        != original:
                    fail('the save changed more than the <parameters> tag')

                # the window's family equals analyze's on the saved file
                r = subprocess.run([cli, 'analyze', design, '--json'], capture_output=True,
                                   text=True)
                if r.returncode != 0:
                    fail('analyze: %s' % r.stderr)
                fam = json.loads(r.stdout)['family']
                if fam['members'] != 25:
                    fail('analyze counts %d members, not 1 + 4 + 20' % fam['members'])
                settle(log_path)
                line = wait_for(lambda: [ln for ln in family_lines(log_path)[-1:]
                                         if ln['members'] == '25'],
                                'the family of 25 members in the window')[0]
                print('window: %s; analyze: members %d, worst phase margin %r'
                      % (line, fam['members'], fam['worst_phase_margin_deg']))
                if float(line['worst_pm']) != fam['worst_phase_margin_deg']:
                    fail('worst phase margin %r, analyze %r'
                         % (float(line['worst_pm']), fam['worst_phase_margin_deg']))
                run('import', '-window', 'root', os.path.join(artefacts, 'family-sampling.png'),
                    check=False)

                # a fraction, too many and a negative: refused at the field named
                before = len(refusals(log_path))
                for name, text, words in [('Members-drawn', '2.5', 'not a whole number'),
                                          ('Members-drawn', '100001', 'outside'),
                                          ('Seed', '-1', 'outside')]:
                    type_field(wid, log_path, name, text)
                    got = refusals(log_path)[before:]
                    field = name.replace('-', ' ')
                    if not any(g.startswith('LW-FIELD-REFUSED %s:' % field) and words in g
                               and text in g for g in got):
                        fail('%s in %s: no refusal naming the field with "%s": %s'
                             % (text, field, words, got))
                    before = len(refusals(log_path))
                if saved_after(wid, design) != doc:
                    fail('a refused value changed the document')

                # one undo step: the seed typed is taken back, byte for byte (the focus first
                # on a drop-down: in a field, Ctrl+Z undoes the typing of its text)
                undo_outside_fields(wid, log_path)
                undone = saved_after(wid, design)
                if undone != doc_members:
                    fail('one undo did not give the document before the seed back: %s'
                         % parameters_tag(undone))
                quit_window(proc, wid)
            finally:
                kill_window(proc)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: members and seed edited in the window; its family equals analyze\'s')


def main():
    if len(sys.argv) != 6:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_FAMILY_SAMPLING_INNER') != '1':
        outer(__file__, 'LW_TEST_FAMILY_SAMPLING_INNER', sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
