"""Helpers shared by the window tests that drive a real window under Xvfb: re-running on an
Xvfb server of its own, waiting, keys through xdotool, the window's environment, saving, and reading its
debug lines (LW_DEBUG_HANDLES=1)."""
import os
import re
import shutil
import subprocess
import sys
import time

SCREEN = '1600x1000x24'


def fail(msg):
    print('FAIL: ' + msg, file=sys.stderr)
    sys.exit(1)


def run(*cmd, check=True):
    return subprocess.run(cmd, check=check, capture_output=True, text=True).stdout.strip()


def x_server():
    """Starts an Xvfb server of its own and returns (process, DISPLAY). The server picks a
    free display itself and writes its number to a pipe (-displayfd): two tests starting at
    once cannot pick the same display, as they can with `xvfb-run -a` (a check-then-start race
    that lost a window's display under load). -noreset: the server stays up when its last
    client leaves, so a test's second window finds it (a reset in between refused it)."""
    rfd, wfd = os.pipe()
    server = subprocess.Popen(['Xvfb', '-displayfd', str(wfd), '-screen', '0', SCREEN,
                               '-nolisten', 'tcp', '-noreset'], pass_fds=(wfd,),
                              stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    os.close(wfd)
    number = b''
    with os.fdopen(rfd, 'rb') as r:
        while not number.endswith(b'\n'):
            chunk = r.read(1)
            if not chunk:
                break
            number += chunk
    if not number.strip().isdigit():
        server.kill()
        fail('Xvfb did not start (no display number)')
    return server, ':' + number.strip().decode()


def stop_x_server(server):
    server.terminate()
    try:
        server.wait(timeout=10)
    except subprocess.TimeoutExpired:
        server.kill()


def outer(script, inner_var, argv, tools=('Xvfb', 'xdotool')):
    """Runs script again on an X server of its own (x_server) with inner_var=1; exit 77
    (skipped) when a tool is missing."""
    for tool in tools:
        if shutil.which(tool) is None:
            print(tool + ' not found: skipped')
            sys.exit(77)
    server, display = x_server()
    env = dict(os.environ, **{inner_var: '1', 'DISPLAY': display})
    env.pop('WAYLAND_DISPLAY', None)
    try:
        r = subprocess.run([sys.executable, os.path.abspath(script)] + argv, env=env)
    finally:
        stop_x_server(server)
    sys.exit(r.returncode)


def wait_for(pred, what, timeout=20.0):
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        v = pred()
        if v:
            return v
        time.sleep(0.1)
    fail('timed out waiting for ' + what)


def settle(path, quiet=1.0, timeout=30.0):
    """Waits until the window's log at path has printed nothing new for `quiet` seconds: its
    evaluations run in a worker and their figures arrive when they finish, so a layout read
    before that may be replaced by a later one."""
    deadline = time.monotonic() + timeout
    last, since = None, time.monotonic()
    while time.monotonic() < deadline:
        with open(path, 'rb') as f:
            size = len(f.read())
        if size != last:
            last, since = size, time.monotonic()
        elif time.monotonic() - since >= quiet:
            return
        time.sleep(0.1)
    fail('the window did not settle within %g s' % timeout)


def find_window(name):
    out = run('xdotool', 'search', '--onlyvisible', '--name', name, check=False)
    return out.split()[0] if out else None


def key(wid, keys):
    run('xdotool', 'windowfocus', '--sync', wid, check=False)
    run('xdotool', 'key', '--clearmodifiers', keys)


def lsan_options():
    """LSAN_OPTIONS with lsan.supp (fontconfig's cache, kept until exit) for the ASan pass."""
    supp = os.path.join(os.path.dirname(os.path.abspath(__file__)), 'lsan.supp')
    return ':'.join(filter(None, [os.environ.get('LSAN_OPTIONS'), 'suppressions=' + supp,
                                  'print_suppressions=0']))


def window_env(schema_dir, tmp, **extra):
    """The environment of a window under test: cairo rendering, memory settings, C locale,
    debug lines on, state and data under tmp, no session bus."""
    env = dict(os.environ, GTK_A11Y='none', GSK_RENDERER='cairo', GDK_DEBUG='gl-disable',
               GSETTINGS_SCHEMA_DIR=schema_dir, GSETTINGS_BACKEND='memory', LANGUAGE='C',
               LC_ALL='C.UTF-8', LW_DEBUG_HANDLES='1', XDG_STATE_HOME=os.path.join(tmp, 'state'),
               XDG_DATA_HOME=os.path.join(tmp, 'data'), HOME=tmp, LSAN_OPTIONS=lsan_options(),
               **extra)
    env.pop('DBUS_SESSION_BUS_ADDRESS', None)
    return env


def debug_lines(log_path, prefix):
    """The fields (KEY=VALUE, split at spaces) of every line of log_path starting with prefix."""
    with open(log_path, encoding='utf-8', errors='replace') as f:
        for line in f.read().splitlines():
            if line.startswith(prefix + ' '):
                yield dict(kv.split('=', 1) for kv in line.split()[1:] if '=' in kv)


def last_line(log_path, prefix, **match):
    """The fields of the newest line of prefix whose fields include match (None: no such line);
    positions are printed again when things move, so the newest one counts."""
    found = None
    for f in debug_lines(log_path, prefix):
        if all(f.get(k) == str(v) for k, v in match.items()):
            found = f
    return found


def window_origin(wid):
    """The window's top left on the screen, to add to the window-surface positions of the
    debug lines."""
    m = re.search(r'Position: (-?\d+),(-?\d+)', run('xdotool', 'getwindowgeometry', wid))
    return int(m.group(1)), int(m.group(2))


def click_field(wid, log_path, name):
    """Clicks into the number field NAME at its newest LW-FIELD position."""
    f = wait_for(lambda: last_line(log_path, 'LW-FIELD', name=name), 'the field ' + name)
    x0, y0 = window_origin(wid)
    run('xdotool', 'mousemove', '--sync', str(x0 + round(float(f['sx']))),
        str(y0 + round(float(f['sy']))))
    run('xdotool', 'click', '1')
    time.sleep(0.3)


def type_field(wid, log_path, name, text):
    """Replaces the text of the number field NAME with text and leaves it with Tab."""
    click_field(wid, log_path, name)
    run('xdotool', 'key', '--clearmodifiers', 'ctrl+a')
    run('xdotool', 'type', '--delay', '20', '--', text)
    run('xdotool', 'key', '--clearmodifiers', 'Tab')
    time.sleep(1.0)   # a refusal shown above other fields moves them: let the lines follow


def start_window(app, design, env, log_file):
    """Starts the window on design; returns (process, X window id)."""
    proc = subprocess.Popen([app, design], env=env, stdout=log_file, stderr=subprocess.STDOUT)
    wid = wait_for(lambda: proc.poll() is None
                   and find_window(os.path.basename(design) + ' — Loopwright$')
                   or (proc.poll() is not None
                       and fail('loopwright exited early (%d)' % proc.returncode)),
                   'the window on ' + os.path.basename(design), 30)
    return proc, wid


def quit_window(proc, wid):
    """Ctrl+Q, and the window must exit with status 0 within 15 s."""
    key(wid, 'ctrl+q')
    try:
        status = proc.wait(timeout=15)
    except subprocess.TimeoutExpired:
        fail('loopwright did not quit within 15 s of Ctrl+Q')
    if status != 0:
        fail('loopwright exited with status %d' % status)


def saved_after(wid, path, keys='ctrl+s'):
    """Saves with keys (Ctrl+S) and gives the bytes written, once path's time has changed."""
    before = os.stat(path).st_mtime_ns if os.path.exists(path) else 0
    key(wid, keys)
    wait_for(lambda: os.path.exists(path) and os.stat(path).st_mtime_ns != before,
             'the document to be saved (' + keys + ')')
    time.sleep(0.2)
    with open(path, 'rb') as f:
        return f.read()


def kill_window(proc):
    if proc.poll() is None:
        proc.kill()
        proc.wait()


def without_surface_ids(path):
    """An SVG's bytes with cairo's surface numbers taken out (they count the surfaces the
    process made before)."""
    with open(path, 'rb') as f:
        return re.sub(rb'surface\d+', b'surface', f.read())


def refusals(log_path):
    """Every LW-FIELD-REFUSED line of log_path (a number field's refusal, lw-number-field.c)."""
    with open(log_path, encoding='utf-8', errors='replace') as f:
        return [line for line in f.read().splitlines() if line.startswith('LW-FIELD-REFUSED ')]


def undo_outside_fields(wid, log_path):
    """Ctrl+Z with the focus on the K range's drop-down, out of any text field (in a field,
    Ctrl+Z undoes the typing of its text, not the design's last edit)."""
    click_field(wid, log_path, 'K-range')
    run('xdotool', 'key', '--clearmodifiers', 'Escape')
    time.sleep(0.3)
    key(wid, 'ctrl+z')
    time.sleep(0.5)
