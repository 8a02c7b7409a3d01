#!/usr/bin/env python3
"""Writes the MOL/SDF test fixtures in tests/data/sdf with a general-purpose chemistry
library (RDKit, from PyPI), so the reader is checked against files that another program
wrote. Not a dependency of the build or the tests: run it in a throw-away venv,

    python3 -m venv /tmp/rdkit-venv && /tmp/rdkit-venv/bin/pip install rdkit
    /tmp/rdkit-venv/bin/python tools/make_sdf_fixtures.py

Each structure is also written as XYZ by the same library, so a test can compare the two
readers atom by atom."""
import os
from rdkit import Chem, rdBase
from rdkit.Chem import AllChem, rdDetermineBonds

OUT = "tests/data/sdf"
GW = "tests/data/gw100"
os.makedirs(OUT, exist_ok=True)

def from_xyz(name, charge=0):
    m = Chem.MolFromXYZFile(f"{GW}/{name}.xyz")
    rdDetermineBonds.DetermineBonds(m, charge=charge)
    m.SetProp("_Name", name)
    return m

def xyz(m, path):
    with open(path, "w") as f:
        f.write(Chem.MolToXYZBlock(m))

water, ammonia, benzene, ethanol = (from_xyz(n) for n in ["water", "ammonia", "benzene", "ethanol"])
# V2000 and V3000 single records
Chem.MolToMolFile(water, f"{OUT}/water-v2000.mol")
Chem.MolToMolFile(benzene, f"{OUT}/benzene-v3000.mol", forceV3000=True)
xyz(water, f"{OUT}/water.xyz")
xyz(benzene, f"{OUT}/benzene.xyz")
# a three-record SDF with a data field
w = Chem.SDWriter(f"{OUT}/three.sdf")
for m in (water, ammonia, ethanol):
    m.SetProp("source", "GW100 structure")
    w.write(m)
w.close()
for m, n in ((ammonia, "ammonia"), (ethanol, "ethanol")):
    xyz(m, f"{OUT}/{n}.xyz")
# charged species with 3D coordinates from the library's embedding (ETKDG, fixed seed)
for smi, n in (("[NH4+]", "ammonium"), ("CC(=O)[O-]", "acetate")):
    m = Chem.AddHs(Chem.MolFromSmiles(smi))
    AllChem.EmbedMolecule(m, randomSeed=7)
    m.SetProp("_Name", n)
    Chem.MolToMolFile(m, f"{OUT}/{n}-v2000.mol")
    Chem.MolToMolFile(m, f"{OUT}/{n}-v3000.mol", forceV3000=True)
    xyz(m, f"{OUT}/{n}.xyz")
# a radical: the library writes its unpaired electron as an RAD property
m = Chem.MolFromSmiles("[CH3]")
m = Chem.AddHs(m)
AllChem.EmbedMolecule(m, randomSeed=7)
m.SetProp("_Name", "methyl")
Chem.MolToMolFile(m, f"{OUT}/methyl-v2000.mol")
xyz(m, f"{OUT}/methyl.xyz")
# a 2D record (depiction coordinates, z = 0): must be refused
m = Chem.MolFromSmiles("c1ccccc1O")
AllChem.Compute2DCoords(m)
m.SetProp("_Name", "phenol-2d")
Chem.MolToMolFile(m, f"{OUT}/phenol-2d.mol")
with open(f"{OUT}/PROVENANCE", "w") as f:
    f.write(f"Written by tools/make_sdf_fixtures.py with RDKit {rdBase.rdkitVersion} "
            "from the GW100 structures in tests/data/gw100 (water, ammonia, benzene, ethanol) "
            "and from SMILES embedded by the library (ammonium, acetate, methyl, phenol-2d).\n")
