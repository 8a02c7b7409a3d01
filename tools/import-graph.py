#!/usr/bin/env python3
"""Module-level import graph of src/ (top-level rooms), upward imports and cycles.

Usage: python3 tools/import-graph.py [src-dir]
A room is the first path component under src/ (chem, basis, integrals, ...). An edge A -> B
means some file in A names `crate::B` (in a `use` or a path). Upward = against the allowed
order below. Cycles = elementary cycles among the rooms (Johnson-style DFS, small graph).
"""
import os, re, sys

ORDER = ["units", "error", "system", "chem", "basis", "integrals", "scf", "gradient",
         "analysis", "correlation", "ionization", "core_level", "geometry", "vibrations",
         "vibronic", "request", "predict", "spectrum", "batch", "report", "bench", "cli",
         "main", "lib"]
RANK = {r: i for i, r in enumerate(ORDER)}
# units and error are on the same level (both leaves)
RANK["error"] = RANK["units"]
# the request path: src/request.rs or src/predict/
RANK["predict"] = RANK["request"]

src = sys.argv[1] if len(sys.argv) > 1 else "src"
edges = {}
evidence = {}
pat = re.compile(r"crate::([a-z_]+)")
for root, _, files in os.walk(src):
    for f in files:
        if not f.endswith(".rs"):
            continue
        path = os.path.join(root, f)
        rel = os.path.relpath(path, src)
        room = rel.split(os.sep)[0].removesuffix(".rs")
        if rel.startswith(os.path.join("ionization", "core") + os.sep):
            room = "core_level"  # the core-hole room, whatever folder it lives in
        text = open(path, encoding="utf-8").read()
        # ignore comment lines
        text = "\n".join(l for l in text.splitlines() if not l.lstrip().startswith("//"))
        # `use super::super::` etc are within a room; only crate:: paths cross rooms
        for m in pat.finditer(text):
            tgt = m.group(1)
            if tgt == "ionization" and text[m.end():m.end() + 6] == "::core":
                tgt = "core_level"
            if tgt == room or tgt not in RANK:
                continue
            edges.setdefault(room, set()).add(tgt)
            evidence.setdefault((room, tgt), set()).add(rel)

rooms = sorted(set(edges) | {t for ts in edges.values() for t in ts}, key=lambda r: RANK.get(r, 99))
print("edges (room -> rooms it imports):")
for r in rooms:
    if r in edges:
        print(f"  {r:12} -> {', '.join(sorted(edges[r], key=lambda x: RANK.get(x, 99)))}")
up = [(a, b) for a in edges for b in edges[a] if RANK.get(b, 99) > RANK.get(a, 99)]
print(f"\nupward imports: {len(up)}")
for a, b in sorted(up):
    print(f"  {a} -> {b}   ({', '.join(sorted(evidence[(a, b)]))})")

# elementary cycles
cycles = set()
def dfs(start, node, path, seen):
    for n in edges.get(node, ()):
        if n == start:
            cyc = path[:]
            i = cyc.index(min(cyc))
            cycles.add(tuple(cyc[i:] + cyc[:i]))
        elif n not in seen and RANK.get(n, 99) >= 0:
            seen.add(n); path.append(n)
            dfs(start, n, path, seen)
            path.pop(); seen.discard(n)
for s in rooms:
    dfs(s, s, [s], {s})
print(f"\ncycles: {len(cycles)}")
for c in sorted(cycles):
    print("  " + " -> ".join(c + (c[0],)))
