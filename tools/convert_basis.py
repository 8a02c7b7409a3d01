#!/usr/bin/env python3
"""One-off conversion of published Gaussian basis sets into bandcast's own JSON schema.

The numbers come from the general-purpose reference data library `basis-set-exchange`
(PyPI).  This script is run by hand when a set is added; the build and the tests never
need Python.  Usage (from the repository root):

    python3 -m venv /tmp/bse-venv && /tmp/bse-venv/bin/pip install basis-set-exchange
    /tmp/bse-venv/bin/python tools/convert_basis.py            # writes basis/*.json

What it does, per set (schema documented in DEVELOPERS.md, "Basis-set files"):
  * keeps the elements H-Ar (Z = 1..18) that the set defines;
  * splits SP shells into an s and a p shell, and general contractions (several
    coefficient columns over one exponent list) into one segmented shell per column,
    dropping primitives whose published coefficient is exactly zero;
  * copies every exponent and coefficient as the library's decimal text (so the JSON holds
    the published digits; a value that is not a valid JSON number is re-written from its
    float value, and counted);
  * writes the reference papers (citation text from the library's reference data), grouped
    by the elements they cover;
  * sets the harmonic convention the set is published in (project table below).
"""

import json
import re
import sys
from pathlib import Path

import basis_set_exchange as bse

# (canonical name, file stem, kind, harmonics, extra aliases)
#   kind: "orbital" | "fitting-jk" | "fitting-ri"
#   harmonics: the convention of the set's publication / common practice:
#   the Pople 6-31G family, 3-21G and STO-3G are used with Cartesian d (6d); 6-311G**,
#   the correlation-consistent and the def2 sets (and their fitting sets) with real solid
#   harmonics (5d, 7f, 9g).
SETS = [
    ("STO-3G", "sto-3g", "orbital", "cartesian", []),
    ("3-21G", "3-21g", "orbital", "cartesian", []),
    ("6-31G", "6-31g", "orbital", "cartesian", []),
    ("6-31G*", "6-31g-star", "orbital", "cartesian", ["6-31G(d)"]),
    ("6-31G**", "6-31g-2star", "orbital", "cartesian", ["6-31G(d,p)"]),
    ("6-31+G*", "6-31+g-star", "orbital", "cartesian", ["6-31+G(d)"]),
    ("6-311G**", "6-311g-2star", "orbital", "pure", ["6-311G(d,p)"]),
    ("cc-pVDZ", "cc-pvdz", "orbital", "pure", []),
    ("cc-pVTZ", "cc-pvtz", "orbital", "pure", []),
    ("cc-pVQZ", "cc-pvqz", "orbital", "pure", []),
    ("aug-cc-pVDZ", "aug-cc-pvdz", "orbital", "pure", []),
    ("aug-cc-pVTZ", "aug-cc-pvtz", "orbital", "pure", []),
    ("cc-pCVDZ", "cc-pcvdz", "orbital", "pure", []),
    ("cc-pCVTZ", "cc-pcvtz", "orbital", "pure", []),
    ("def2-SVP", "def2-svp", "orbital", "pure", []),
    ("def2-TZVP", "def2-tzvp", "orbital", "pure", []),
    ("def2-TZVPP", "def2-tzvpp", "orbital", "pure", []),
    # Auxiliary (density-fitting) sets.
    ("def2-universal-JKFIT", "def2-universal-jkfit", "fitting-jk", "pure", ["def2-JKFIT", "def2/JK"]),
    ("def2-SVP-RIFIT", "def2-svp-rifit", "fitting-ri", "pure", ["def2-SVP-RI"]),
    ("def2-TZVP-RIFIT", "def2-tzvp-rifit", "fitting-ri", "pure", ["def2-TZVP-RI"]),
    ("def2-TZVPP-RIFIT", "def2-tzvpp-rifit", "fitting-ri", "pure", ["def2-TZVPP-RI"]),
    ("cc-pVDZ-RIFIT", "cc-pvdz-rifit", "fitting-ri", "pure", ["cc-pVDZ-RI"]),
    ("cc-pVTZ-RIFIT", "cc-pvtz-rifit", "fitting-ri", "pure", ["cc-pVTZ-RI"]),
    ("cc-pVQZ-RIFIT", "cc-pvqz-rifit", "fitting-ri", "pure", ["cc-pVQZ-RI"]),
    ("aug-cc-pVDZ-RIFIT", "aug-cc-pvdz-rifit", "fitting-ri", "pure", ["aug-cc-pVDZ-RI"]),
    ("aug-cc-pVTZ-RIFIT", "aug-cc-pvtz-rifit", "fitting-ri", "pure", ["aug-cc-pVTZ-RI"]),
    ("cc-pwCVDZ-RIFIT", "cc-pwcvdz-rifit", "fitting-ri", "pure", ["cc-pwCVDZ-RI"]),
    ("cc-pwCVTZ-RIFIT", "cc-pwcvtz-rifit", "fitting-ri", "pure", ["cc-pwCVTZ-RI"]),
    ("6-31G**-RIFIT", "6-31g-2star-rifit", "fitting-ri", "pure", ["6-31G(d,p)-RIFIT"]),
    ("6-311G**-RIFIT", "6-311g-2star-rifit", "fitting-ri", "pure", ["6-311G(d,p)-RIFIT"]),
]

MAX_Z = 18
SYMBOLS = ["", "H", "He", "Li", "Be", "B", "C", "N", "O", "F", "Ne",
           "Na", "Mg", "Al", "Si", "P", "S", "Cl", "Ar"]
JSON_NUMBER = re.compile(r"^-?(0|[1-9][0-9]*)(\.[0-9]+)?([eE][+-]?[0-9]+)?$")
rewritten = 0


def number_text(s):
    """The library's decimal text as a JSON number, digits unchanged.

    Only the spelling is adapted where JSON demands it (".5" -> "0.5", "-.5" -> "-0.5",
    "+5" -> "5", "1.0D+00" -> "1.0E+00", "05" -> "5"); anything else is re-written from
    its f64 value and counted.
    """
    global rewritten
    t = s.strip().replace("D", "E").replace("d", "e")
    if t.startswith("+"):
        t = t[1:]
    sign = ""
    if t.startswith("-"):
        sign, t = "-", t[1:]
    if t.startswith("."):
        t = "0" + t
    while len(t) > 1 and t[0] == "0" and t[1].isdigit():
        t = t[1:]
    if t.endswith(".") or ".E" in t or ".e" in t:
        t = t.replace(".E", ".0E").replace(".e", ".0e")
        if t.endswith("."):
            t += "0"
    t = sign + t
    if JSON_NUMBER.match(t) and float(t) == float(s.strip().replace("D", "E").replace("d", "e")):
        return t
    rewritten += 1
    return repr(float(s.replace("D", "E").replace("d", "e")))


def citation(entry):
    """Citation text from one reference-data entry."""
    authors = "; ".join(entry.get("authors", []))
    parts = [authors] if authors else []
    if entry.get("title"):
        parts.append(entry["title"])
    where = []
    if entry.get("journal"):
        where.append(entry["journal"])
    if entry.get("volume"):
        where.append(entry["volume"])
    loc = " ".join(where)
    if entry.get("pages"):
        loc += (", " if loc else "") + entry["pages"]
    if entry.get("year"):
        loc += " (" + entry["year"] + ")"
    if entry.get("_entry_type") not in (None, "article") and not loc:
        loc = entry.get("_entry_type")
    if loc:
        parts.append(loc)
    text = ". ".join(p.rstrip(".") for p in parts)
    if entry.get("doi"):
        text += ". doi:" + entry["doi"]
    return text


def is_literature(entry):
    """A journal article, book or thesis (not a software manual)."""
    kind = entry.get("_entry_type", "article")
    if kind == "article":
        return bool(entry.get("journal"))
    return kind in ("book", "incollection", "inbook", "phdthesis", "mastersthesis")


def sources(name, elements):
    """Reference groups: [{"elements": [...], "note": ..., "cite": [...]}], merged by text."""
    merged = {}
    order = []
    for group in bse.get_references(name, elements=elements):
        els = [SYMBOLS[int(z)] for z in group["elements"]]
        for info in group["reference_info"]:
            note = info.get("reference_description", "")
            # Only published literature is cited. The library also lists, for a few
            # elements, the manual of a program that distributes the data; such entries are
            # left out (project rule: the data files name papers, not programs) and the
            # note says so.
            published = [d for _key, d in info["reference_data"] if is_literature(d)]
            if len(published) < len(info["reference_data"]):
                note += (" (no journal publication recorded for these elements: values as "
                         "distributed by the basis-set-exchange library)")
            cites = tuple(citation(d) for d in published)
            key = (note, cites)
            if key not in merged:
                merged[key] = []
                order.append(key)
            for e in els:
                if e not in merged[key]:
                    merged[key].append(e)
    out = []
    for key in order:
        els = sorted(merged[key], key=SYMBOLS.index)
        for prev in out:
            if prev["cite"] == list(key[1]) and prev["elements"] == els:
                prev["note"] += "; " + key[0]
                break
        else:
            out.append({"elements": els, "note": key[0], "cite": list(key[1])})
    return out


def split_shells(name, z, shells):
    """Segmented single-l shells from the library's (possibly general / SP) shells."""
    out = []
    for sh in shells:
        if sh["function_type"] not in ("gto", "gto_cartesian", "gto_spherical"):
            sys.exit(f"{name} Z={z}: unsupported function type {sh['function_type']}")
        am = sh["angular_momentum"]
        cols = sh["coefficients"]
        if len(am) > 1:
            if len(am) != len(cols):
                sys.exit(f"{name} Z={z}: fused shell with {len(am)} l and {len(cols)} columns")
            pairs = list(zip(am, cols))
        else:
            pairs = [(am[0], c) for c in cols]
        for l, col in pairs:
            if len(col) != len(sh["exponents"]):
                sys.exit(f"{name} Z={z}: column length differs from exponent count")
            prims = [(e, c) for e, c in zip(sh["exponents"], col) if float(c) != 0.0]
            if not prims:
                continue
            out.append({
                "l": l,
                "exponents": [number_text(e) for e, _ in prims],
                "coefficients": [number_text(c) for _, c in prims],
            })
    return out


def verify(name, data, written):
    """The written file holds exactly the library's primitives: for every element and l,
    the multiset of (exponent, coefficient) pairs with nonzero coefficient agrees as f64."""
    def pairs_library(el):
        out = []
        for sh in el["electron_shells"]:
            am = sh["angular_momentum"]
            for i, col in enumerate(sh["coefficients"]):
                l = am[i] if len(am) > 1 else am[0]
                out += [(l, float(e), float(c)) for e, c in zip(sh["exponents"], col)
                        if float(c) != 0.0]
        return sorted(out)
    for z, el in data["elements"].items():
        if int(z) > MAX_Z:
            continue
        mine = sorted((sh["l"], e, c) for sh in written["elements"][SYMBOLS[int(z)]]
                      for e, c in zip(sh["exponents"], sh["coefficients"]))
        if mine != pairs_library(el):
            sys.exit(f"{name} Z={z}: written shells differ from the library's")


def emit(doc, shells_by_element):
    """JSON text: metadata pretty-printed, one shell per line, numbers as published."""
    lines = ["{"]
    for key, value in doc.items():
        if key == "source":
            lines.append('  "source": [')
            for k, entry in enumerate(value):
                comma = "," if k + 1 < len(value) else ""
                lines.append("    " + json.dumps(entry, ensure_ascii=False) + comma)
            lines.append("  ],")
        else:
            lines.append(f"  {json.dumps(key)}: {json.dumps(value, ensure_ascii=False)},")
    lines.append('  "elements": {')
    items = list(shells_by_element.items())
    for i, (sym, shells) in enumerate(items):
        lines.append(f"    {json.dumps(sym)}: [")
        for j, sh in enumerate(shells):
            text = ('      {"l": %d, "exponents": [%s], "coefficients": [%s]}'
                    % (sh["l"], ", ".join(sh["exponents"]), ", ".join(sh["coefficients"])))
            lines.append(text + ("," if j + 1 < len(shells) else ""))
        lines.append("    ]" + ("," if i + 1 < len(items) else ""))
    lines.append("  }")
    lines.append("}")
    return "\n".join(lines) + "\n"


def convert(name, stem, kind, harmonics, aliases, outdir):
    data = bse.get_basis(name)
    zs = sorted(int(z) for z in data["elements"] if int(z) <= MAX_Z)
    if not zs:
        sys.exit(f"{name}: no element H-Ar")
    shells_by_element = {}
    for z in zs:
        el = data["elements"][str(z)]
        if "ecp_potentials" in el:
            sys.exit(f"{name} Z={z}: has an effective core potential (not supported)")
        shells_by_element[SYMBOLS[z]] = split_shells(name, z, el["electron_shells"])
    doc = {
        "name": name,
        "aliases": aliases,
        "kind": kind,
        "harmonics": harmonics,
        "description": data.get("description", ""),
        "source": sources(name, zs),
        # The library's free-text revision description is not copied: it names the
        # programs the data were taken from. Version and date identify the data.
        "provenance": "converted by tools/convert_basis.py from basis-set-exchange %s "
                      "(set version %s, revised %s)"
                      % (bse.version(), data.get("version", "?"), data.get("revision_date", "?")),
    }
    text = emit(doc, shells_by_element)
    verify(name, data, json.loads(text))
    path = outdir / f"{stem}.json"
    path.write_text(text, encoding="utf-8")
    print(f"{name:22s} {len(zs):2d} elements  {len(text)/1024:7.1f} KiB  -> {path}")


def main():
    outdir = Path(__file__).resolve().parent.parent / "basis"
    outdir.mkdir(exist_ok=True)
    only = set(sys.argv[1:])
    for name, stem, kind, harmonics, aliases in SETS:
        if only and name not in only:
            continue
        convert(name, stem, kind, harmonics, aliases, outdir)
    if rewritten:
        print(f"{rewritten} values were not valid JSON numbers and were re-written from f64")


if __name__ == "__main__":
    main()
