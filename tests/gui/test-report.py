#!/usr/bin/python3
"""The design report from the window (Xvfb): open an example with two variants, compare both
(Ctrl+Shift+K) and export the report (Ctrl+Shift+E) as HTML, then, in a second window on the
same document, the active variant alone as PDF; each must be byte for byte the report that
`loopwright-cli report FILE --variants … --date …` writes for the same saved document and the
same date (the CLI is the reference: the window must not build a report of its own).

The file chooser is bypassed by the test hook LW_TEST_REPORT_PATH (Export Report writes
there at once); the date comes from SOURCE_DATE_EPOCH, which the window reads like the CLI.

Usage: test-report.py LOOPWRIGHT LOOPWRIGHT-CLI SCHEMA_DIR EXAMPLE ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or xdotool is missing).
The window's output goes to ARTEFACT_DIR/report-*.log.
"""
import os
import shutil
import subprocess
import sys
import tempfile
import time

EPOCH = '1768435200'          # 2026-01-15T00:00:00Z
DATE = '2026-01-15'

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwgui import (debug_lines, fail, key, kill_window, lsan_options, outer,  # noqa: E402
                   quit_window, start_window, wait_for, window_env)


def log_has(log_path, prefix, **match):
    return any(all(f.get(k) == str(v) for k, v in match.items())
               for f in debug_lines(log_path, prefix))


def window_report(app, schema_dir, design, out, compare_all, log_path, tmp):
    env = window_env(schema_dir, tmp, LW_TEST_REPORT_PATH=out, SOURCE_DATE_EPOCH=EPOCH)
    with open(log_path, 'w') as log_file:
        proc, wid = start_window(app, design, env, log_file)
        try:
            wait_for(lambda: log_has(log_path, 'LW-SERIES', view='bode-w'), 'the first plots')
            n = 1
            if compare_all:
                key(wid, 'ctrl+shift+k')
                wait_for(lambda: log_has(log_path, 'LW-SERIES', view='bode-w', variants=2),
                         'two variants shown')
                n = 2
            key(wid, 'ctrl+shift+e')
            wait_for(lambda: log_has(log_path, 'LW-REPORT', path=out, variants=n),
                     'the report to be written')
            # the window says where it wrote (the notice over the plots)
            with open(log_path, encoding='utf-8', errors='replace') as f:
                if ('LW-NOTICE Report written to ' + out) not in f.read():
                    fail('no notice of where the report was written')
            # the compared set is part of the document (docs/file-format.md): save it, so
            # that Ctrl+Q closes without asking
            key(wid, 'ctrl+s')
            time.sleep(0.5)
            quit_window(proc, wid)
        finally:
            kill_window(proc)
    with open(out, 'rb') as f:
        return f.read()


def keep(artefacts, name_a, a, name_b, b):
    """Both reports into ARTEFACT_DIR, to look at the difference."""
    for name, data in ((name_a, a), (name_b, b)):
        with open(os.path.join(artefacts, name), 'wb') as f:
            f.write(data)


def cli_report(cli, design, out, variants):
    # the CLI too keeps fontconfig's cache until exit (lsan.supp, for the ASan pass)
    lsan = lsan_options()
    which = ['--variants', variants] if variants is not None else ['--compared']
    p = subprocess.run([cli, 'report', design, '--out', out] + which +
                       ['--date', DATE], capture_output=True, text=True, timeout=60,
                       env=dict(os.environ, LC_ALL='C.UTF-8', LSAN_OPTIONS=lsan))
    if p.returncode != 0:
        fail('loopwright-cli report: exit %d: %s' % (p.returncode, p.stderr))
    with open(out, 'rb') as f:
        return f.read()


def inner(app, cli, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-report-')
    try:
        design = os.path.join(tmp, 'slider.lwd')
        shutil.copyfile(example, design)
        # the variants in document order, the active one first in the window's single report
        names = [l.split('name="', 1)[1].split('"', 1)[0]
                 for l in open(example, encoding='utf-8') if '<variant ' in l]
        active = open(example, encoding='utf-8').read().split('active="', 1)[1].split('"')[0]
        if len(names) != 2 or active not in names:
            fail('the example should have two variants, got %s' % names)

        html = window_report(app, schema_dir, design, os.path.join(tmp, 'window.html'), True,
                             os.path.join(artefacts, 'report-html.log'), tmp)
        ref = cli_report(cli, design, os.path.join(tmp, 'cli.html'), ','.join(names))
        if html != ref:
            keep(artefacts, 'report-window.html', html, 'report-cli.html', ref)
            fail('the window\'s HTML report (%d bytes) differs from the CLI\'s (%d bytes)'
                 % (len(html), len(ref)))
        if DATE.encode() not in html or b'Simulation is not validation' not in html:
            fail('the HTML report lacks its date or the caution')
        for n in names:
            if n.encode() not in html:
                fail('the HTML report does not name variant %s' % n)

        # the first window saved its compared set with the document: the CLI's --compared
        # reads it back
        ref2 = cli_report(cli, design, os.path.join(tmp, 'cli2.html'), None)
        if ref2 != html:
            fail('report --compared on the saved document differs from the window\'s report')

        # the PDF of the active variant alone, from a fresh copy (nothing compared)
        single = os.path.join(tmp, 'slider-single.lwd')
        shutil.copyfile(example, single)
        pdf = window_report(app, schema_dir, single, os.path.join(tmp, 'window.pdf'), False,
                            os.path.join(artefacts, 'report-pdf.log'), tmp)
        ref = cli_report(cli, single, os.path.join(tmp, 'cli.pdf'), active)
        if not pdf.startswith(b'%PDF-'):
            fail('the window\'s PDF report is not a PDF')
        if pdf != ref:
            keep(artefacts, 'report-window.pdf', pdf, 'report-cli.pdf', ref)
            fail('the window\'s PDF report (%d bytes) differs from the CLI\'s (%d bytes)'
                 % (len(pdf), len(ref)))
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: Export Report writes the CLI\'s report byte for byte (HTML of two variants, '
          'PDF of one)')


def main():
    if len(sys.argv) != 6:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_REPORT_INNER') != '1':
        outer(__file__, 'LW_TEST_REPORT_INNER', sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
