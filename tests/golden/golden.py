#!/usr/bin/python3
"""Every figure, report and analysis of the bundled examples, byte for byte.

Runs loopwright-cli over the bundled example documents and a few loops given on the command
line, and compares each output with the SHA-256 recorded in expected.sha256 beside this script.
It guards refactoring: a change in the code's structure must not change a single byte of what
the engineer gets (apart from cairo's per-process surface ids, `surfaceN`, set aside in SVG and
in the SVG figures inside HTML reports).

A change that is meant to change outputs (a numerical fix, a new figure element) regenerates
the list with
    tests/golden/golden.py CLI --update
and says in its commit which outputs changed and why. `--dump DIR` writes every output into
DIR, so two builds can be compared with diff.

Usage: golden.py CLI [--update | --dump DIR]
"""
import hashlib
import os
import re
import subprocess
import sys
import tempfile

HERE = os.path.dirname(os.path.abspath(__file__))
TOP = os.path.dirname(os.path.dirname(HERE))
EXPECTED = os.path.join(HERE, 'expected.sha256')

DOCUMENTS = [
    'data/examples/camera-slider.lwd',
    'data/examples/kiln.lwd',
    'data/examples/pump-pressure.lwd',
    'data/examples/belt-conveyor.lwd',
    'data/examples/camera-slider-fleet.lwd',
    'tests/gui/four-variants.lwd',
]
VIEWS = ['bode-z', 'bode-w', 'nyquist', 'nichols', 'step', 'poles']

# Loops given on the command line (invented numbers): a camera-slider axis with a lead, a
# kiln with dead time and a PI, a lightly damped pump stage with two samples of delay.
LOOPS = {
    'slider': ['--plant', '180/(s*(s+12))', '--period', '0.002',
               '--controller', '2.5*(1+w/10)/(1+w/80)'],
    'kiln': ['--plant', '0.8/((120*s+1)*(15*s+1))', '--period', '2', '--dead-time', '7',
             '--controller', '3*(w+0.02)/w'],
    'pump': ['--plant', '40/(s^2+0.6*s+400)', '--period', '0.001', '--compute-delay', '2',
             '--controller', '0.05*(w+20)/w'],
}


def outputs(cli, work):
    """Yields (name, bytes) for every output, in a fixed order."""
    def run(args, name):
        r = subprocess.run([cli] + args, capture_output=True, cwd=TOP,
                           env=dict(os.environ, LC_ALL='C.UTF-8', SOURCE_DATE_EPOCH='',
                                    TZ='UTC'))
        if r.returncode not in (0, 3):
            sys.exit('golden: %s: exit %d\n%s' % (' '.join(args), r.returncode,
                                                 r.stderr.decode(errors='replace')))
        return r.stdout

    for doc in DOCUMENTS:
        base = os.path.splitext(os.path.basename(doc))[0]
        yield base + '.analyze.json', run(['analyze', '--json', '--all-variants', doc], base)
        yield base + '.analyze.txt', run(['analyze', '--all-variants', doc], base)
        yield base + '.check.txt', run(['check', doc], base)
        for view in VIEWS:
            for ext in ('svg',):   # PNG: cairo's rasterizer, not ours; SVG holds the same figure
                out = os.path.join(work, '%s.%s.%s' % (base, view, ext))
                run(['plot', doc, '--all-variants', '--view', view, '--out', out], base)
                with open(out, 'rb') as f:
                    yield os.path.basename(out), f.read()
        for ext in ('html', 'pdf'):
            out = os.path.join(work, '%s.report.%s' % (base, ext))
            run(['report', doc, '--date', '2026-01-02', '--out', out], base)
            with open(out, 'rb') as f:
                yield os.path.basename(out), f.read()
        for form in ('difference', 'sections'):
            outdir = os.path.join(work, '%s-%s' % (base, form))
            os.makedirs(outdir, exist_ok=True)
            run(['emit', doc, '--form', form, '--out', outdir], base)
            for ext in ('.h', '.c'):
                with open(os.path.join(outdir, 'lw_ctrl_controller' + ext), 'rb') as f:
                    yield '%s-%s%s' % (base, form, ext), f.read()
    for name, loop in LOOPS.items():
        yield name + '.analyze.json', run(['analyze', '--json'] + loop, name)
        for view in VIEWS:
            out = os.path.join(work, '%s.%s.svg' % (name, view))
            run(['plot'] + loop + ['--view', view, '--out', out], name)
            with open(out, 'rb') as f:
                yield os.path.basename(out), f.read()


def normalized(name, data):
    if name.endswith('.svg') or name.endswith('.html'):
        data = re.sub(rb'surface\d+', b'surface', data)
    return data


def main():
    if len(sys.argv) < 2:
        sys.exit(__doc__)
    cli = os.path.abspath(sys.argv[1])
    update = '--update' in sys.argv[2:]
    dump = sys.argv[sys.argv.index('--dump') + 1] if '--dump' in sys.argv[2:] else None
    got = {}
    with tempfile.TemporaryDirectory() as work:
        for name, data in outputs(cli, work):
            data = normalized(name, data)
            got[name] = hashlib.sha256(data).hexdigest()
            if dump:
                os.makedirs(dump, exist_ok=True)
                with open(os.path.join(dump, name), 'wb') as f:
                    f.write(data)
    if update:
        with open(EXPECTED, 'w') as f:
            for name in sorted(got):
                f.write('%s  %s\n' % (got[name], name))
        print('golden: wrote %d hashes to %s' % (len(got), EXPECTED))
        return
    expected = {}
    with open(EXPECTED) as f:
        for line in f:
            h, name = line.split()
            expected[name] = h
    bad = 0
    for name in sorted(set(got) | set(expected)):
        if got.get(name) != expected.get(name):
            bad += 1
            print('golden: %s differs (expected %s, got %s)' %
                  (name, expected.get(name, 'nothing'), got.get(name, 'nothing')))
    if bad:
        print('golden: %d of %d outputs differ; if the change is meant, run %s CLI --update '
              'and say why in the commit; --dump DIR writes the outputs for diff'
              % (bad, len(expected), sys.argv[0]))
        sys.exit(1)
    print('golden: all %d outputs byte-identical' % len(got))


if __name__ == '__main__':
    main()
