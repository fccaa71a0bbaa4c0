#!/usr/bin/python3
"""The add-stage menu and the stage row come from the stage-kind table (src/core/lw-stage-kinds.h):
open a design with a resonant stage (the kind appended last to the table), check its corner
handle is shown; open Add Stage (Ctrl+Shift+A), take the menu's last item with the keyboard,
save, and check that the document gained a resonant stage placed by the table around the
crossover the window shows (centre 0.3·ν_c, peak 20 dB, width 0.1·ν_c, ν_c from
`loopwright-cli analyze --json` of the design as opened).

Usage: test-add-stage.py LOOPWRIGHT LOOPWRIGHT_CLI SCHEMA_DIR ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb or xdotool is missing).
Screenshots stay in ARTEFACT_DIR: add-stage-menu.png, add-stage-after.png.
"""
import json
import math
import os
import subprocess
import sys
import tempfile
import time
import xml.etree.ElementTree as ET

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import lwgui  # noqa: E402
from lwgui import fail, find_window, key, kill_window, quit_window, run, saved_after  # noqa: E402

NS = '{urn:loopwright:design}'
PERIOD = 0.002
DESIGN = """<?xml version="1.0" encoding="UTF-8"?>
<design xmlns="urn:loopwright:design" version="1">
  <title>Spindle with runout</title>
  <plant>40/(s*(0.05*s+1))</plant>
  <sampling period_s="0.002" hold="zero-order" compute_delay_samples="0"/>
  <variants active="a">
    <variant name="a">
      <gain ratio="0.8"/>
      <resonant label="runout" centre_rad_s="12.5" peak_db="20" width_rad_s="4"/>
    </variant>
  </variants>
</design>
"""


def outer(argv):
    lwgui.outer(__file__, 'LW_TEST_ADD_STAGE_INNER', argv, tools=('Xvfb', 'xdotool', 'import'))


def stages(path):
    root = ET.parse(path).getroot()
    return [(s.tag.replace(NS, ''), dict(s.attrib)) for s in root.find(NS + 'variants')[0]]


def inner(app, cli, schema_dir, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    tmp = tempfile.mkdtemp(prefix='lw-test-add-stage-')
    design = os.path.join(tmp, 'spindle.lwd')
    with open(design, 'w', encoding='utf-8') as f:
        f.write(DESIGN)
    os.utime(design, (time.time() + 5, time.time() + 5))   # newer than any autosave here
    # the crossover of the design as opened, around which the new stage is placed
    loop = json.loads(run(cli, 'analyze', design, '--json'))['loop']
    nu_c = (2.0 / PERIOD) * math.tan(loop['gain_crossover_rad_s'] * PERIOD / 2.0)
    env = lwgui.window_env(schema_dir, tmp)
    log_path = os.path.join(artefacts, 'add-stage.log')
    log_file = open(log_path, 'w')
    proc, wid = lwgui.start_window(app, design, env, log_file)
    try:
        # the resonant stage's handle (stage 1, corner 0) at its centre ν0 = 12.5 rad/s on the
        # w-plane view (the window may show other designs' handles before the file's)
        def resonant_handle():
            hs = [d for d in lwgui.debug_lines(log_path, 'LW-HANDLE')
                  if d.get('view') == 'bode-w' and d.get('stage') == '1'
                  and d.get('corner') == '0']
            return hs and abs(float(hs[-1]['x']) / 12.5 - 1) <= 1e-12 and hs[-1]
        lwgui.wait_for(resonant_handle, 'the resonant stage\'s handle at ν = 12.5 rad/s', 20)
        # the file's evaluation is shown (the menu places new stages around its crossover):
        # its phase margin, equal to the CLI's to 1e-9 relative (%.17g text both ways)
        def shown():
            s = list(lwgui.debug_lines(log_path, 'LW-SHOWN'))
            return s and abs(float(s[-1]['phase_margin_deg']) - loop['phase_margin_deg']) <= \
                1e-9 * abs(loop['phase_margin_deg'])
        lwgui.wait_for(shown, 'the margins of the design shown', 20)
        time.sleep(0.5)
        # the button's mnemonic (the plant entry has the focus and takes Ctrl+Shift+A itself)
        key(wid, 'alt+a')
        lwgui.wait_for(lambda: lwgui.last_line(log_path, 'LW-ADD-MENU') is not None,
                       'the add-stage menu on screen', 20)
        time.sleep(0.3)
        run('import', '-window', 'root', os.path.join(artefacts, 'add-stage-menu.png'))
        # the last item: Up from the first wraps round in a popover menu
        run('xdotool', 'key', '--clearmodifiers', 'Up')
        time.sleep(0.3)
        run('xdotool', 'key', '--clearmodifiers', 'Return')
        # saved until the third stage is there (a loaded machine may take a while to add it)
        for _ in range(10):
            time.sleep(0.5)
            saved_after(wid, design)
            if len(stages(design)) >= 3:
                break
        got = stages(design)
        run('import', '-window', 'root', os.path.join(artefacts, 'add-stage-after.png'))
        print('stages after Add Stage → last item:', got)
        if len(got) != 3 or got[2][0] != 'resonant':
            fail('the last item of the add-stage menu did not add a resonant stage: %s' % got)

        a = got[2][1]
        # the window's crossover and the CLI's come from the same core on the same design;
        # 1e-9 relative covers the %.17g text of the document both ways
        for name, want in (('centre_rad_s', 0.3 * nu_c), ('peak_db', 20.0),
                           ('width_rad_s', 0.1 * nu_c)):
            if abs(float(a[name]) / want - 1) > 1e-9:
                fail('new resonant stage: %s = %s, the table places it at %.12g' % (
                    name, a[name], want))
        print('placed at ν_c = %.6g rad/s: %s' % (nu_c, a))
        quit_window(proc, wid)
    finally:
        kill_window(proc)
        log_file.close()
    print('add-stage: OK')


if __name__ == '__main__':
    if os.environ.get('LW_TEST_ADD_STAGE_INNER') != '1':
        outer(sys.argv[1:])
    inner(*sys.argv[1:5])
