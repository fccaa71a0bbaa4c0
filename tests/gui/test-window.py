#!/usr/bin/python3
"""The designer window in a real X server (Xvfb): start loopwright on a bundled example (a
window started without a file shows a blank design, whose plots are empty), wait for its
window, take screenshots, check that the panels and the plots are drawn, quit with Ctrl+Q.

Usage: test-window.py LOOPWRIGHT SCHEMA_DIR EXAMPLE ARTEFACT_DIR
Re-runs itself on an Xvfb server of its own (lwgui.outer; exit 77, skipped, when Xvfb is missing). Screenshots
stay in ARTEFACT_DIR (screen.png, window.png, plots.png).
"""
import os
import subprocess
import sys
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import lwgui  # noqa: E402
from lwgui import fail, run  # noqa: E402


def image_figure(path, fx, crop=None):
    """An ImageMagick fx figure of a PNG, e.g. standard_deviation or mean, over an optional
    crop geometry WxH+X+Y."""
    args = ['convert', path]
    if crop:
        args += ['-crop', crop, '+repage']
    if fx.startswith('-fx '):
        args += ['-fx', fx[4:]]
        fx = 'mean'
    args += ['-format', '%[fx:' + fx + ']', 'info:']
    return float(run(*args))


def outer(argv):
    lwgui.outer(__file__, 'LW_TEST_WINDOW_INNER', argv,
                tools=('Xvfb', 'xdotool', 'import', 'convert'))


def inner(app, schema_dir, example, artefacts):
    os.makedirs(artefacts, exist_ok=True)
    env = dict(os.environ, GTK_A11Y='none', GSK_RENDERER='cairo', GDK_DEBUG='gl-disable',
               GSETTINGS_SCHEMA_DIR=schema_dir, GSETTINGS_BACKEND='memory', LANGUAGE='C',
               LC_ALL='C.UTF-8')
    env.pop('DBUS_SESSION_BUS_ADDRESS', None)
    # Under the sanitizer build: leaks of system libraries' caches are suppressed (lsan.supp).
    supp = os.path.join(os.path.dirname(os.path.abspath(__file__)), 'lsan.supp')
    env['LSAN_OPTIONS'] = ':'.join(filter(None, [os.environ.get('LSAN_OPTIONS'),
                                                 'suppressions=' + supp,
                                                 'print_suppressions=0']))
    log = open(os.path.join(artefacts, 'loopwright.log'), 'w')
    proc = subprocess.Popen([app, example], env=env, stdout=log, stderr=subprocess.STDOUT)
    try:
        wid = None
        deadline = time.monotonic() + 30
        while time.monotonic() < deadline and wid is None:
            if proc.poll() is not None:
                fail('loopwright exited early with status %d (see loopwright.log)'
                     % proc.returncode)
            out = run('xdotool', 'search', '--onlyvisible', '--name', ' — Loopwright$',
                      check=False)
            if out:
                wid = out.split()[0]
            else:
                time.sleep(0.25)
        if wid is None:
            fail('no window titled “… — Loopwright” within 30 s')
        time.sleep(2.0)   # let the first frame be drawn

        screen = os.path.join(artefacts, 'screen.png')
        window = os.path.join(artefacts, 'window.png')
        run('import', '-window', 'root', screen)
        run('import', '-window', wid, window)
        geometry = run('identify', '-format', '%w %h', window)
        width, height = (int(v) for v in geometry.split())
        if width < 800 or height < 500:
            fail('window is only %dx%d' % (width, height))

        # Not blank: a window that drew nothing is one flat colour (standard deviation 0 on
        # ImageMagick's 0..1 scale); panels with text and plots give well over 0.05 here. The
        # threshold 0.02 leaves room for themes with little contrast.
        sd = image_figure(window, 'standard_deviation')
        print('window standard deviation %.4f' % sd)
        if sd < 0.02:
            fail('the window looks blank (standard deviation %.4f)' % sd)

        # The plot area is right of the panel column (the paned divider starts at 520 px):
        # its pixels must vary too, and the loop's curves must be there — strongly blue
        # pixels (blue above red by 0.25), which no grid, text or background colour of the
        # light theme has. At least 0.1 % of the area: four plots with curves give about 1 %.
        plots = os.path.join(artefacts, 'plots.png')
        crop = '%dx%d+%d+%d' % (width - 560, height - 80, 560, 60)
        run('convert', window, '-crop', crop, '+repage', plots)
        sd_plots = image_figure(plots, 'standard_deviation')
        blue = image_figure(plots, '-fx b-r>0.25?1:0')
        print('plot area standard deviation %.4f, curve pixels %.4f %%' % (sd_plots, 100 * blue))
        if sd_plots < 0.02:
            fail('the plot area looks blank (standard deviation %.4f)' % sd_plots)
        if blue < 0.001:
            fail('no curve drawn in the plot area (%.4f %% curve pixels)' % (100 * blue))

        # Quit through the application's action (Ctrl+Q): the process must end by itself.
        run('xdotool', 'windowfocus', '--sync', wid, check=False)
        run('xdotool', 'key', '--clearmodifiers', 'ctrl+q')
        try:
            status = proc.wait(timeout=15)
        except subprocess.TimeoutExpired:
            fail('loopwright did not quit within 15 s of Ctrl+Q')
        if status != 0:
            fail('loopwright exited with status %d' % status)
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.wait()
        log.close()
    print('ok: window %dx%d drawn, plots drawn, quit with Ctrl+Q' % (width, height))


def main():
    if len(sys.argv) != 5:
        print(__doc__, file=sys.stderr)
        sys.exit(2)
    if os.environ.get('LW_TEST_WINDOW_INNER') != '1':
        outer(sys.argv[1:])
    inner(*sys.argv[1:])


if __name__ == '__main__':
    main()
