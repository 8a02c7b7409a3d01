#!/usr/bin/env python3
"""Sweep `bandcast ionize` with the default method over the bundled light-element GW100
structures (tests/data/gw100) and compare the HOMO with the ΔCCSD(T)/def2-TZVPP values of
docs/reference-data.md §2 where the file has one (a sanity bound: different basis, and
ΔCCSD(T) is not EOM-IP-CCSD, so differences of a few tenths of an eV are expected).

One molecule at a time, smallest first (estimated basis size), each under a wall-clock
limit; molecules not started before --deadline are listed as not run. Results go to a
Markdown table (--out) and one JSON line per molecule (--jsonl) as they finish, so a cut
run still leaves its table.

    python3 tools/gw100-sweep.py --bin target/release/bandcast --basis def2-svp \
        --limit 300 --out /tmp/sweep.md --jsonl /tmp/sweep.jsonl

Speed is not measured here (see `bandcast bench`); the CPU seconds are reported only so a
reader knows what the sweep costs.
"""

import argparse
import json
import os
import re
import resource
import subprocess
import sys
import time
from datetime import datetime, timezone

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(HERE)

# def2-SVP functions per atom (pure d): H, He 5; Li, Be 9; B–Ne 14; Na, Mg 15; Al–Ar 18.
# Only used to order the sweep, smallest first.
SVP = {"H": 5, "He": 5, "Li": 9, "Be": 9}
for e in "B C N O F Ne".split():
    SVP[e] = 14
for e in "Na Mg".split():
    SVP[e] = 15
for e in "Al Si P S Cl Ar".split():
    SVP[e] = 18


def size_of(path):
    with open(path) as f:
        lines = f.read().splitlines()
    n = int(lines[0].split()[0])
    return sum(SVP.get(l.split()[0].capitalize(), 20) for l in lines[2 : 2 + n])


def reference_values():
    """ΔCCSD(T)/def2-TZVPP HOMO values from docs/reference-data.md §2 (file stem → eV)."""
    text = open(os.path.join(ROOT, "docs", "reference-data.md")).read()
    sec = text.split("## 2.", 1)[1].split("\n## 3.", 1)[0]
    out = {}
    for line in sec.splitlines():
        cells = [c.strip() for c in line.strip().strip("|").split("|")]
        if len(cells) >= 3 and re.match(r"^[a-z0-9-]+$", cells[0]):
            try:
                out[cells[0]] = float(cells[2])
            except ValueError:
                pass
    return out


def run_one(binary, xyz, basis, limit, threads, extra):
    cmd = ["nice", "-n", "10", binary, "ionize", "--basis", basis, "--json"]
    if threads:
        cmd += ["--threads", str(threads)]
    cmd += extra + [xyz]
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.time()
    try:
        p = subprocess.run(cmd, capture_output=True, text=True, timeout=limit)
        timed_out = False
    except subprocess.TimeoutExpired as e:
        p = e
        timed_out = True
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    wall = time.time() - t0
    rec = {"cpu_s": round(cpu, 1), "wall_s": round(wall, 1)}
    if timed_out:
        rec["status"] = f"not finished in {limit // 60} min"
        return rec
    rec["exit"] = p.returncode
    if p.returncode != 0:
        rec["status"] = f"exit {p.returncode}"
        msg = (p.stderr or "").strip().splitlines()
        rec["error"] = msg[-1] if msg else ""
        return rec
    d = json.loads(p.stdout)
    bands = sorted(d["bands"], key=lambda b: b["ie_ev"])
    rec["status"] = "ok"
    rec["method"] = d.get("method")
    rec["homo_ev"] = bands[0]["ie_ev"] if bands else None
    rec["homo_label"] = bands[0]["label"] if bands else None
    rec["homo_method"] = bands[0].get("method") if bands else None
    rec["n_bands"] = len(bands)
    rec["warnings"] = [w["code"] for w in d.get("warning_details", [])]
    rec["warning_text"] = d.get("warnings", [])
    for n in d.get("note_details", []):
        if n["code"] == "default_method_chosen" and "; not used: " in n["message"]:
            rec["skipped"] = n["message"].split("; not used: ", 1)[1]
    return rec


def short(s, n=90):
    s = s.replace("|", "/")
    return s if len(s) <= n else s[: n - 1] + "…"


def table(rows, refs):
    out = [
        "| Molecule | nbf est. | Method | HOMO (eV) | ΔCCSD(T) (eV) | Diff (eV) | Fallbacks / warnings | CPU s |",
        "|---|---|---|---|---|---|---|---|",
    ]
    for name, nbf, r in rows:
        ref = refs.get(name)
        homo = r.get("homo_ev")
        diff = f"{homo - ref:+.2f}" if (homo is not None and ref is not None) else ""
        notes = []
        if r.get("skipped"):
            notes.append("not used: " + r["skipped"])
        if r.get("warnings"):
            codes = {}
            for c in r["warnings"]:
                codes[c] = codes.get(c, 0) + 1
            notes.append(", ".join(f"{c}×{k}" for c, k in codes.items()))
        if r["status"] != "ok":
            notes.append(r["status"] + (": " + r["error"] if r.get("error") else ""))
        out.append(
            "| {} | {} | {} | {} | {} | {} | {} | {} |".format(
                name,
                nbf,
                r.get("method", "—"),
                f"{homo:.3f} ({r['homo_label']})" if homo is not None else "—",
                f"{ref:.3f}" if ref is not None else "",
                diff,
                short("; ".join(notes), 160),
                r.get("cpu_s", ""),
            )
        )
    return "\n".join(out) + "\n"


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--bin", default=os.path.join(ROOT, "target", "release", "bandcast"))
    ap.add_argument("--basis", default="def2-svp")
    ap.add_argument("--dir", default=os.path.join(ROOT, "tests", "data", "gw100"))
    ap.add_argument("--limit", type=int, default=300, help="wall-clock seconds per molecule")
    ap.add_argument("--deadline", help="UTC HH:MM after which no molecule is started")
    ap.add_argument("--threads", type=int, default=0)
    ap.add_argument("--out", default="gw100-sweep.md")
    ap.add_argument("--jsonl", default="gw100-sweep.jsonl")
    ap.add_argument("--only", nargs="*", help="file stems to run (default: all)")
    ap.add_argument("extra", nargs="*", help="further ionize options (after --)")
    a = ap.parse_args()

    refs = reference_values()
    files = sorted(f for f in os.listdir(a.dir) if f.endswith(".xyz"))
    jobs = sorted(
        ((f[:-4], size_of(os.path.join(a.dir, f))) for f in files),
        key=lambda t: (t[1], t[0]),
    )
    if a.only:
        jobs = [j for j in jobs if j[0] in a.only]
    deadline = None
    if a.deadline:
        h, m = map(int, a.deadline.split(":"))
        now = datetime.now(timezone.utc)
        deadline = now.replace(hour=h, minute=m, second=0, microsecond=0)
        if deadline < now:
            deadline = deadline.replace(day=now.day + 1)
    rows = []
    with open(a.jsonl, "w") as jl:
        for name, nbf in jobs:
            if deadline and datetime.now(timezone.utc) >= deadline:
                r = {"status": "not run (sweep deadline)"}
            else:
                r = run_one(a.bin, os.path.join(a.dir, name + ".xyz"), a.basis, a.limit, a.threads, a.extra)
            r["molecule"] = name
            r["nbf_estimate"] = nbf
            rows.append((name, nbf, r))
            jl.write(json.dumps(r) + "\n")
            jl.flush()
            print(f"{name:28s} {r['status']:24s} {r.get('method', '')!s:9s} "
                  f"{r.get('homo_ev', '')!s:.8s} cpu {r.get('cpu_s', '')}", flush=True)
            with open(a.out, "w") as f:
                f.write(table(rows, refs))
    ok = sum(1 for _, _, r in rows if r["status"] == "ok")
    print(f"{ok}/{len(rows)} gave a HOMO", flush=True)


if __name__ == "__main__":
    sys.exit(main())
