#!/usr/bin/env python3
"""Compare reference-run JSON files of two directories: every number under the same key path,
and (when key paths differ) the sorted multiset of energy-like numbers. Timings ignored."""
import json, sys, os, re
SKIP = re.compile(r'(time|second|wall|cpu|memory|gib|mib|peak|threads)', re.I)
def flat(o, p=''):
    if isinstance(o, dict):
        for k, v in o.items():
            yield from flat(v, p + '/' + k)
    elif isinstance(o, list):
        for i, v in enumerate(o):
            yield from flat(v, p + f'[{i}]')
    elif isinstance(o, (int, float)) and not isinstance(o, bool):
        if not SKIP.search(p): yield p, float(o)
a, b = sys.argv[1], sys.argv[2]
worst = 0.0; bad = 0
for f in sorted(os.listdir(a)):
    if not f.endswith('.json'): continue
    try:
        A = dict(flat(json.load(open(os.path.join(a, f)))))
        B = dict(flat(json.load(open(os.path.join(b, f)))))
    except Exception as e:
        print(f'{f}: cannot read ({e})'); bad += 1; continue
    common = set(A) & set(B)
    d = max((abs(A[k] - B[k]) for k in common), default=0.0)
    ev = lambda D: sorted(v for k, v in D.items() if re.search(r'(energy|_ev|hartree|binding|ie)', k, re.I))
    ea, eb = ev(A), ev(B)
    dm = max((abs(x - y) for x, y in zip(ea, eb)), default=0.0) if len(ea) == len(eb) else float('nan')
    worst = max(worst, d)
    flag = 'OK' if d <= 3e-9 and (dm != dm or dm <= 3e-9) else 'DIFF'
    if flag != 'OK': bad += 1
    print(f'{f:32s} {flag} common={len(common)} only_before={len(set(A)-set(B))} only_after={len(set(B)-set(A))} maxdiff={d:.2e} energy-multiset maxdiff={dm:.2e}')
print('worst', worst, 'files differing', bad)
