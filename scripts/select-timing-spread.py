#!/usr/bin/env python3
"""select-timing-spread.py - how far an answer's measured ns per step moves
from run to run of the same `select`: runs it N times (the reference cache
warm after the first) with each given propbench binary, alternating, and
prints per method the smallest, median and largest ns/step and max/min, then
over the methods the median and largest (max - min) / median.

usage: scripts/select-timing-spread.py N BINARY [BINARY2] -- SELECT-ARGS...
e.g.   scripts/select-timing-spread.py 6 build/propbench -- \
           --problem leo-j2 --horizon-s 86400 --max-pos-err-m 1
"""
import json
import os
import statistics
import subprocess
import sys
import tempfile


def main(argv):
    if '--' not in argv or len(argv) < 4:
        sys.stderr.write(__doc__)
        return 2
    cut = argv.index('--')
    head, args = argv[1:cut], argv[cut + 1:]
    try:
        n = int(head[0])
    except ValueError:
        sys.stderr.write('select-timing-spread: N must be a whole number\n')
        return 2
    bins = head[1:]
    if n < 2 or not bins:
        sys.stderr.write('select-timing-spread: need N >= 2 and a binary\n')
        return 2
    tmp = tempfile.mkdtemp(prefix='pb-spread.')
    per = {b: {} for b in bins}
    for _ in range(n):
        for b in bins:
            out = os.path.join(tmp, 'select.json')
            cmd = [b, 'select', *args, '--cache', os.path.join(tmp, 'cache'), '--out', out]
            if subprocess.run(cmd, stdout=subprocess.DEVNULL).returncode not in (0, 1):
                sys.stderr.write('select-timing-spread: %s failed\n' % ' '.join(cmd))
                return 2
            with open(out) as f:
                for m in json.load(f)['ranking']:
                    if m.get('ns_per_step'):
                        per[b].setdefault(m['method'], []).append(m['ns_per_step'])
    for b in bins:
        print('%s, %d runs:' % (b, n))
        spreads = []
        for name, v in sorted(per[b].items()):
            med = statistics.median(v)
            spreads.append((max(v) - min(v)) / med)
            print('  %-18s min %9.1f  median %9.1f  max %9.1f  max/min %5.2f'
                  % (name, min(v), med, max(v), max(v) / min(v)))
        print('  (max - min) / median over %d answers: median %.2f, largest %.2f'
              % (len(spreads), statistics.median(spreads), max(spreads)))
    return 0


if __name__ == '__main__':
    sys.exit(main(sys.argv))
