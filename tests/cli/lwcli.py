"""What the Python tests of loopwright-cli on measured data share: the check that records a
failure and goes on, running the CLI, its JSON, and writing a measured table as CSV
(docs/measured-data.md) with every number to 17 significant digits (the same double read
back).
"""
import json
import os
import subprocess
import sys

FAILS = []


def check(ok, what):
    """Records a failure (the test exits non-zero at its end when FAILS is not empty)."""
    if not ok:
        FAILS.append(what)
        print('FAIL:', what)


def run(cli, *args):
    return subprocess.run([cli, *args], capture_output=True, text=True, timeout=120)


def json_of(cli, *args):
    """The JSON the CLI prints; the test stops when the command fails."""
    r = run(cli, *args)
    if r.returncode != 0:
        print(r.stderr)
        sys.exit('failed: %s' % ' '.join(args))
    return json.loads(r.stdout)


def write_csv(path, w, h, coherence=None):
    """Columns frequency_rad_s, real, imag (and coherence when given)."""
    with open(path, 'w') as f:
        f.write('# made by %s with scipy\n' % os.path.basename(sys.argv[0]))
        f.write('frequency_rad_s,real,imag%s\n' % (',coherence' if coherence else ''))
        for i, (wi, hi) in enumerate(zip(w, h)):
            f.write('%.17g,%.17g,%.17g%s\n' % (wi, hi.real, hi.imag,
                                               ',%.17g' % coherence[i] if coherence else ''))
