#!/usr/bin/python3
"""Named parameters of the plant expression, through the command line.

- `--param NAME=VALUE` substitutes the value where the name stands: the analysis of
  K*wn^2/(s*(s^2+2*zeta*wn*s+wn^2)) with K, wn, zeta given equals, key for key and exactly,
  the analysis of the same text with the numbers typed in (the parser reads the same doubles
  and combines them in the same order: no tolerance).
- `new --param` keeps them in <parameters>; `analyze FILE.lwd` reads the plant with them
  (equal, exactly, to the loop options); a range added by hand is kept by `tidy` and does not
  change the nominal analysis.
- Refusals name the option or the parameter: a name the text lacks (at its character), a
  parameter the text does not use, a value that is not a number, a name that is a variable,
  --param with a document.

Usage: test-cli-params.py CLI
"""
import os
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from lwcli import FAILS, check, json_of, run  # noqa: E402


def main():
    cli = sys.argv[1]
    tmp = tempfile.mkdtemp(prefix='lw-test-params-')
    plant = 'K*wn^2/(s*(s^2+2*zeta*wn*s+wn^2))'
    values = {'K': '2.5', 'wn': '120', 'zeta': '0.05'}
    typed = plant
    for name in ('zeta', 'wn', 'K'):
        typed = typed.replace(name, values[name])
    params = sum((['--param', '%s=%s' % (k, v)] for k, v in values.items()), [])
    loop = ['--period', '0.001', '--controller', '0.4*(1+w/30)/(1+w/300)']
    by_name = json_of(cli, 'analyze', '--plant', plant, *params, *loop, '--json')
    by_number = json_of(cli, 'analyze', '--plant', typed, *loop, '--json')
    check(by_name == by_number, 'the parameters substituted give the typed plant\'s analysis')
    check(by_name['loop']['phase_margin_deg'] is not None, 'a phase margin to compare')

    # new --param keeps them; analyze FILE reads the plant with them
    lwd = os.path.join(tmp, 'family.lwd')
    r = run(cli, 'new', '--plant', plant, *params, '--period', '0.001', '--out', lwd)
    check(r.returncode == 0, 'new --param: %s' % r.stderr.strip())
    text = open(lwd).read()
    check('<parameters>\n    <parameter name="K" nominal="2.5"/>\n'
          '    <parameter name="wn" nominal="120"/>\n'
          '    <parameter name="zeta" nominal="0.05"/>\n  </parameters>' in text,
          'the <parameters> element: %s' % text)
    doc = json_of(cli, 'analyze', lwd, '--json')
    bare = json_of(cli, 'analyze', '--plant', plant, *params, '--period', '0.001', '--json')
    check(doc['loop'] == bare['loop'], 'the document\'s plant read with its parameters')
    # a range, added by hand, is kept by tidy and leaves the nominal analysis alone
    with open(lwd, 'w') as f:
        f.write(text.replace('<parameter name="wn" nominal="120"/>',
                             '<parameter name="wn" nominal="120" low="90" high="150" '
                             'spread="log"/>'))
    r = run(cli, 'tidy', lwd, '--check')
    check(r.returncode == 0, 'a document with a range is canonical: %s' % r.stderr)
    check(json_of(cli, 'analyze', lwd, '--json')['loop'] == bare['loop'],
          'the nominal analysis with a range given')

    # refusals
    for args, place, words in (
            (['--plant', 'K/(s+wm)', '--param', 'K=2', '--param', 'wn=3'], '--plant',
             "unknown parameter 'wm' at character 6"),
            (['--plant', 'K/(s+1)', '--param', 'K=2', '--param', 'wn=3'], '--param',
             "parameter 'wn' is given but the expression does not use it"),
            (['--plant', 'K/(s+1)', '--param', 'K'], '--param', "'K' is not NAME=VALUE"),
            (['--plant', 'K/(s+1)', '--param', 'K=abc'], '--param K', "'abc' is not a number"),
            (['--plant', 'K/(s+1)', '--param', 'K=2', '--param', 'K=3'], '--param',
             "parameter 'K' is given twice"),
            (['--plant', 's/(s+1)', '--param', 's=2'], '--param',
             "s, w and z are the variables"),
            (['--plant', 'K/(s+1)', '--param', 'K=0'], '--plant', 'identically zero'),
            (['--plant', 'gain/(s+1)'], '--plant', "unknown name 'gain' at character 1")):
        r = run(cli, 'analyze', *args, '--period', '0.001')
        check(r.returncode == 2 and ('loopwright-cli: %s: ' % place) in r.stderr
              and words in r.stderr, 'refused %s: %s' % (args, r.stderr.strip()))
    r = run(cli, 'analyze', lwd, '--param', 'K=3')
    check(r.returncode == 2 and '--param' in r.stderr, '--param with a document: %s' % r.stderr)
    if FAILS:
        sys.exit('%d failures' % len(FAILS))
    print('ok: named parameters substituted exactly, kept in documents, refused by name')


if __name__ == '__main__':
    main()
