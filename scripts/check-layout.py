#!/usr/bin/env python3
"""check-layout.py - the layout rules of DEVELOPERS.md, checked: no .c file
directly in bench/, includes run one way down the layers, no include cycle
between modules (x.c with x.h), no source file over 600 lines (generated
coefficient tables aside), no function over 80 lines outside the numerical
kernels listed below. Prints each breach; exit 1 if any."""
import os, re, sys

ARGS = [a for a in sys.argv[1:] if not a.startswith('--')]
ROOT = os.path.abspath(ARGS[0] if ARGS else '.')
# Top to bottom: a folder may include its own layer and any layer below it.
LAYERS = ['bench/perf', 'bench/cli', 'bench/study', 'bench/gate', 'bench/report',
          'bench/store', 'bench/measure', 'integrators', 'problems', 'include/propbench']
# perf is a program of its own beside the CLI: it may use measure and below.
EXTRA_FORBIDDEN = {'bench/perf': ['bench/cli', 'bench/study', 'bench/gate', 'bench/report',
                                  'bench/store']}
MAX_FILE_LINES = 600
MAX_FUNC_LINES = 80
# Numerical kernels whose length is the scheme itself (one pass of a
# published algorithm), where splitting would hide the formulas; none today.
KERNELS = set()

def sources():
    for top in ('bench', 'integrators', 'problems', 'include'):
        for d, _, fs in os.walk(os.path.join(ROOT, top)):
            for f in sorted(fs):
                if f.endswith(('.c', '.h')):
                    yield os.path.relpath(os.path.join(d, f), ROOT)

def layer(path):
    for l in LAYERS:
        if path.startswith(l + '/'):
            return l
    return None

def includes(path):
    out = []
    d = os.path.dirname(path)
    for line in open(os.path.join(ROOT, path), encoding='utf-8'):
        m = re.match(r'\s*#\s*include\s+["<]([^">]+)[">]', line)
        if not m:
            continue
        inc = m.group(1)
        for cand in (os.path.normpath(os.path.join(d, inc)), inc, os.path.join('include', inc)):
            if os.path.exists(os.path.join(ROOT, cand)):
                out.append(cand)
                break
    return out

def functions(path):
    """(name, first line, length) of each top-level function definition: a
    line at column 0 with a '(' and no ';' or '=' before it, whose body opens
    with '{' at the end of that line or of a following one and closes with a
    '}' at column 0."""
    lines = open(os.path.join(ROOT, path), encoding='utf-8').read().split('\n')
    i = 0
    while i < len(lines):
        line = lines[i]
        m = re.match(r'^(?!typedef|struct|enum|union|#|/|\*|\s|\})[^;=(]*?\b(\w+)\s*\(', line)
        if not m or line.rstrip().endswith(';') or line.rstrip().endswith('\\'):
            i += 1
            continue
        j = i
        while j < len(lines) and not lines[j].rstrip().endswith('{') and ';' not in lines[j]:
            j += 1
        if j < len(lines) and lines[j].rstrip().endswith('{') and ';' not in lines[j]:
            k = j + 1
            while k < len(lines) and lines[k] != '}':
                k += 1
            yield m.group(1), i + 1, k - i + 1
            i = k
        i += 1

def check():
    bad = []
    files = list(sources())
    for f in files:
        if re.match(r'bench/[^/]+\.c$', f):
            bad.append(f'{f}: a source file directly in bench/ (put it in its layer folder)')
        n = sum(1 for _ in open(os.path.join(ROOT, f), encoding='utf-8'))
        if n > MAX_FILE_LINES and not f.endswith('_coeffs.h'):
            bad.append(f'{f}: {n} lines (more than {MAX_FILE_LINES})')
        if f.startswith('bench/') and re.match(r'bench/[^/]+/', f) and layer(f) is None:
            bad.append(f'{f}: in a folder of bench/ that is not a layer (add it to LAYERS in its place)')
        if not f.endswith('_coeffs.h'):
            for name, at, length in functions(f):
                if length > MAX_FUNC_LINES and name not in KERNELS:
                    bad.append(f'{f}:{at}: function {name} is {length} lines (more than {MAX_FUNC_LINES})')
        lf = layer(f)
        for inc in includes(f):
            li = layer(inc)
            if lf is None or li is None or lf == li:
                continue
            if LAYERS.index(li) < LAYERS.index(lf) or li in EXTRA_FORBIDDEN.get(lf, []):
                bad.append(f'{f}: includes {inc}, a layer above its own ({lf})')
    # module graph: x.c and x.h are one module
    mod = lambda p: os.path.splitext(p)[0]
    graph = {}
    for f in files:
        graph.setdefault(mod(f), set()).update(mod(i) for i in includes(f) if mod(i) != mod(f))
    state, stack = {}, []
    def visit(u):
        state[u] = 1
        stack.append(u)
        for v in sorted(graph.get(u, ())):
            if state.get(v) == 1:
                cyc = stack[stack.index(v):] + [v]
                bad.append('include cycle: ' + ' -> '.join(cyc))
            elif v not in state:
                visit(v)
        stack.pop()
        state[u] = 2
    for u in sorted(graph):
        if u not in state:
            visit(u)
    return files, bad

def self_test():
    """Build a small tree with one breach of each kind and check that every
    one is reported (a checker that finds nothing would pass any tree)."""
    import tempfile
    global ROOT
    body = '\n'.join('    x++;' for _ in range(90))
    tree = {
        'bench/measure/m.c': '#include <bench/store/s.h>\n',           # up a layer
        'bench/store/s.h': '#include "bench/store/t.h"\n',
        'bench/store/t.h': '#include "bench/store/s.h"\n',           # cycle s <-> t
        'bench/util/u.c': '#include "bench/measure/m.h"\n',          # not a layer
        'bench/top.c': '\n',                                         # directly in bench/
        'problems/long.c': 'static const char *f(int x) {\n' + body + '\n}\n',
        'problems/big.h': '\n' * 700,
    }
    want = ['includes bench/store/s.h', 'include cycle', 'not a layer', 'directly in bench/',
            'function f is', 'big.h: 700 lines']
    with tempfile.TemporaryDirectory() as d:
        for path, text in tree.items():
            os.makedirs(os.path.join(d, os.path.dirname(path)), exist_ok=True)
            open(os.path.join(d, path), 'w').write(text)
        ROOT = d
        _, bad = check()
    missed = [w for w in want if not any(w in b for b in bad)]
    for w in missed:
        print(f'check-layout: self-test: a breach was not reported: {w}')
    print(f'check-layout: self-test: {len(want) - len(missed)} of {len(want)} breaches reported')
    return 1 if missed else 0

def main():
    if '--self-test' in sys.argv:
        return self_test()
    files, bad = check()
    for b in bad:
        print('check-layout: ' + b)
    print(f'check-layout: {len(files)} files, {len(bad)} breaches')
    return 1 if bad else 0

if __name__ == '__main__':
    sys.exit(main())
