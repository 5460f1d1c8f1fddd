#!/usr/bin/env python3
"""Prints the circles among the top-level modules of each crate (strongly connected components
of `crate::module` references in code: comments and tests left out), and the largest files.
   python3 scripts/module-cycles.py"""
import os, re, sys

def modules(src):
    graph = {}
    for root, _, files in os.walk(src):
        for f in files:
            if not f.endswith('.rs'):
                continue
            path = os.path.join(root, f)
            rel = os.path.relpath(path, src)
            top = rel.split(os.sep)[0].removesuffix('.rs')
            if top in ('lib', 'main'):
                continue
            text = open(path).read()
            text = re.split(r'#\[cfg\(test\)\]\s*mod tests', text)[0]
            text = '\n'.join(l for l in text.splitlines() if not l.lstrip().startswith('//'))
            refs = set(re.findall(r'crate::(\w+)', text))
            refs |= {m for m in re.findall(r'use crate::\{([^}]*)\}', text) for m in re.findall(r'(\w+)::', m)}
            graph.setdefault(top, set()).update(r for r in refs if r != top)
    return graph

def sccs(g):
    index, low, stack, on, out, n = {}, {}, [], set(), [], [0]
    def visit(v):
        index[v] = low[v] = n[0]; n[0] += 1; stack.append(v); on.add(v)
        for w in g.get(v, ()):
            if w not in g: continue
            if w not in index:
                visit(w); low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = []
            while True:
                w = stack.pop(); on.discard(w); comp.append(w)
                if w == v: break
            out.append(sorted(comp))
    sys.setrecursionlimit(10000)
    for v in g:
        if v not in index: visit(v)
    return [c for c in out if len(c) > 1]

found = False
for src in ['crates/neckline-core/src', 'crates/neckline-render/src', 'src']:
    for c in sccs(modules(src)):
        found = True
        print(f'{src}: circle of {len(c)}: {", ".join(c)}')
if not found:
    print('no circles among modules')
sizes = []
for d in ['crates', 'src', 'tests', 'benches']:
    for root, _, files in os.walk(d):
        for f in files:
            if f.endswith('.rs'):
                p = os.path.join(root, f)
                sizes.append((sum(1 for _ in open(p)), p))
for n, p in sorted(sizes, reverse=True)[:10]:
    print(f'{n:6} {p}')
