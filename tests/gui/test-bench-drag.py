#!/usr/bin/env python3
"""The drag benchmark's code path runs to the end and prints its one line (a smoke test: the
figures are not checked — speed goals are benchmarks, docs/benchmarks.md). Its value is under
the sanitizer pass of build-aux/test: a compare-mode drag once read a freed sampled plant.
  test-bench-drag.py GUI_EXE SCHEMA_DIR DOCUMENT"""
import os, re, shutil, subprocess, sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import lwgui  # noqa: E402

gui, schema_dir, doc = sys.argv[1:4]
if shutil.which("Xvfb") is None:
    print("Xvfb not found: skipped")
    sys.exit(77)
env = dict(os.environ, GTK_A11Y="none", GSK_RENDERER="cairo", GDK_DEBUG="gl-disable",
           GSETTINGS_SCHEMA_DIR=schema_dir, NO_AT_BRIDGE="1")
supp = os.path.join(os.path.dirname(os.path.abspath(__file__)), "lsan.supp")
env["LSAN_OPTIONS"] = (env.get("LSAN_OPTIONS", "") + ":suppressions=" + supp).lstrip(":")
server, env["DISPLAY"] = lwgui.x_server()   # a display of its own (lwgui.x_server)
env.pop("WAYLAND_DISPLAY", None)
try:
    r = subprocess.run([gui, "--bench-drag", "20", doc], env=env, capture_output=True, text=True,
                       timeout=240)
finally:
    lwgui.stop_x_server(server)
sys.stderr.write(r.stderr[-4000:])
line = r.stdout.strip().splitlines()[-1] if r.stdout.strip() else ""
print(line)
if r.returncode != 0:
    print(f"FAIL: exit status {r.returncode}")
    sys.exit(1)
if not re.fullmatch(r"drag frames: 20, paint median [0-9.]+ ms, p95 [0-9.]+ ms", line):
    print("FAIL: the benchmark line is not 'drag frames: 20, paint median X ms, p95 Y ms'")
    sys.exit(1)
print("1 passed, 0 failed")
