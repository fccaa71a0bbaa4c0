#!/usr/bin/python3
"""The window's metrics table against the CLI (Xvfb): open a document with three variants —
the example's two and a copy of the active one sampled at its own, faster period — compare
all of them (Ctrl+Shift+K), and check every figure of the table (printed by the window with
LW_DEBUG_HANDLES=1 as `LW-METRIC row=KEY … values=V1,V2,V3`, 17 significant digits, the
variants in the document's order) against `loopwright-cli analyze FILE --variant NAME --json`.

Tolerance: 1e-9 relative (and 1e-12 absolute for figures near 0). The window and the CLI call
the same core functions with the same default options, so they should agree to the last
digits; 1e-9 leaves room for a different order of floating-point sums, not for a different
loop (the period override alone moves the margins by degrees).

Usage: test-metrics.py LOOPWRIGHT LOOPWRIGHT-CLI SCHEMA_DIR EXAMPLE ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or xdotool is missing).
The window's output goes to ARTEFACT_DIR/metrics.log.
"""
import json
import math
import os
import re
import shutil
import subprocess
import sys
import tempfile
import time

REL, ABS = 1e-9, 1e-12
FAST = '0.001'                 # the third variant's own period, s (the example's is 0.002)

# table row -> the figure of analyze --json (a path of keys, or a function of the JSON)
ROWS = {
    'phase-margin': ('loop', 'phase_margin_deg'),
    'gain-margin': ('loop', 'gain_margin_db'),
    'crossover': ('loop', 'gain_crossover_rad_s'),
    'delay-margin': ('loop', 'delay_margin_s'),
    'sensitivity-peak': ('loop', 'sensitivity_peak'),
    'overshoot': ('step', 'overshoot_pct'),
    'rise-time': ('step', 'rise_time_s'),
    'settling-time': ('step', 'settling_time_s'),
    'iae': ('indices', 'iae'),
    'ise': ('indices', 'ise'),
    'itae': ('indices', 'itae'),
    'control-effort': ('indices', 'control_effort'),
    'actuator-peak': lambda j: max(abs(u) for u in j['step']['actuator']),
}


sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwgui import (debug_lines, fail, key, kill_window, outer, quit_window,  # noqa: E402
                   start_window, wait_for, window_env)


def metrics(log_path, n):
    """The last printed value of every row, when every row has n values."""
    rows = {}
    for fields in debug_lines(log_path, 'LW-METRIC'):
        vals = fields.get('values', '').split(',')
        if 'values' in fields and len(vals) == n:
            rows[fields['row']] = [float(v) for v in vals]
    return rows if all(r in rows for r in ROWS) else None


def figure(j, where):
    if callable(where):
        return where(j)
    for k in where:
        j = j.get(k) if isinstance(j, dict) else None
    return float('nan') if j is None else float(j)


def close(a, b):
    if math.isnan(a) or math.isnan(b):
        return math.isnan(a) and math.isnan(b)
    return abs(a - b) <= max(ABS, REL * max(abs(a), abs(b)))


def inner(app, cli, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-metrics-')
    try:
        text = open(example, encoding='utf-8').read()
        active = re.search(r'<variants active="([^"]+)">', text).group(1)
        m = re.search(r'( *)<variant name="' + re.escape(active) + r'">.*?</variant>\n', text,
                      re.S)
        fast = m.group(0).replace('name="%s"' % active,
                                  'name="%s fast" period_s="%s"' % (active, FAST), 1)
        text = text.replace('  </variants>', fast + '  </variants>', 1)
        design = os.path.join(tmp, 'rates.lwd')
        with open(design, 'w', encoding='utf-8') as f:
            f.write(text)
        names = re.findall(r'<variant name="([^"]+)"', text)
        if len(names) != 3:
            fail('expected three variants, got %s' % names)

        log_path = os.path.join(artefacts, 'metrics.log')
        with open(log_path, 'w') as log_file:
            proc, wid = start_window(app, design, window_env(schema_dir, tmp), log_file)
            try:
                time.sleep(0.5)
                key(wid, 'ctrl+shift+k')
                table = wait_for(lambda: metrics(log_path, 3), 'the metrics table of three')
                # the compared set is part of the document (docs/file-format.md): save it, so
                # that Ctrl+Q closes without asking
                key(wid, 'ctrl+s')
                time.sleep(0.5)
                quit_window(proc, wid)
            finally:
                kill_window(proc)

        bad = []
        for j, name in enumerate(names):
            p = subprocess.run([cli, 'analyze', design, '--variant', name, '--json'],
                               capture_output=True, text=True, timeout=60)
            if p.returncode != 0:
                fail('analyze --variant %s: exit %d: %s' % (name, p.returncode, p.stderr))
            ref = json.loads(p.stdout)
            want_T = float(FAST) if name.endswith(' fast') else None
            if want_T is not None and ref['sample_period_s'] != want_T:
                fail('analyze --variant %s: sample_period_s %s' % (name, ref['sample_period_s']))
            for row, where in ROWS.items():
                got, want = table[row][j], figure(ref, where)
                if not close(got, want):
                    bad.append('%s of %s: window %.17g, analyze %.17g' % (row, name, got, want))
        if bad:
            fail('the metrics table differs from analyze --json:\n  ' + '\n  '.join(bad))
        # the period override shows in the table: the faster copy has another phase margin
        pm = table['phase-margin']
        if abs(pm[names.index(active)] - pm[2]) < 0.5:
            fail('the faster copy\'s phase margin %.6g equals the original\'s %.6g'
                 % (pm[2], pm[names.index(active)]))
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    print('ok: every figure of the metrics table equals analyze --json of its variant (%d rows '
          '× 3 variants, one at its own period)' % len(ROWS))


def main():
    if len(sys.argv) != 6:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_METRICS_INNER') != '1':
        outer(__file__, 'LW_TEST_METRICS_INNER', sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
