#!/usr/bin/env python3
"""Build the demo geometries in molecules/ from standard bond lengths and angles.

Not optimised: idealised planar rings / backbones with the values below (typical
values of the trade for these bond types, common practice; e.g. the bond-length tables of
Allen et al., J. Chem. Soc. Perkin Trans. 2 (1987) S1, from memory). Run from the
repository root: python3 tools/demo_geometries.py
"""
import math

# Bond lengths (Å)
C_O_DOUBLE = 1.20   # carbonyl C=O
C2_O_SINGLE = 1.34  # carbonate C(sp2)-O
O_C3 = 1.44         # O-C(sp3)
C3_C3 = 1.53        # C(sp3)-C(sp3)
C_H = 1.09          # C(sp3)-H
C_F = 1.38          # C(sp3)-F
# Angles (degrees)
O_C_O_RING = 110.0  # O-C(=O)-O inside the five-membered ring
TETRA = 109.47      # H-C-H and friends at sp3 carbon
O_C_O_OPEN = 110.0  # O-C(=O)-O in dimethyl carbonate
C_O_C_OPEN = 115.0  # C(=O)-O-CH3 in dimethyl carbonate

def v(x, y, z=0.0):
    return [x, y, z]

def add(a, b):
    return [a[i] + b[i] for i in range(3)]

def sub(a, b):
    return [a[i] - b[i] for i in range(3)]

def scale(a, s):
    return [x * s for x in a]

def norm(a):
    n = math.sqrt(sum(x * x for x in a))
    return [x / n for x in a]

def cross(a, b):
    return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]]

def sp3_pair(center, n1, n2, length):
    """Two substituent directions on an sp3 centre bonded to n1 and n2: in the plane
    bisecting n1-C-n2, perpendicular to the heavy-atom plane, tetrahedral opening."""
    b = norm(add(norm(sub(center, n1)), norm(sub(center, n2))))  # away from neighbours
    perp = norm(cross(sub(n1, center), sub(n2, center)))
    half = math.radians(TETRA / 2.0)
    d1 = add(scale(b, math.cos(half)), scale(perp, math.sin(half)))
    d2 = add(scale(b, math.cos(half)), scale(perp, -math.sin(half)))
    return add(center, scale(d1, length)), add(center, scale(d2, length))

def ring(fluorinated):
    # Planar C2v ring: carbonyl carbon C2 at the origin, ring O1/O3 at ±x, CH2 carbons at y>0.
    a = math.radians(O_C_O_RING / 2.0)
    c2 = v(0, 0)
    o_carb = v(0, -C_O_DOUBLE)
    o1 = v(-C2_O_SINGLE * math.sin(a), C2_O_SINGLE * math.cos(a))
    o3 = v(C2_O_SINGLE * math.sin(a), C2_O_SINGLE * math.cos(a))
    # C5 at x = -C3_C3/2 with |O1-C5| = O_C3
    dx = -C3_C3 / 2.0 - o1[0]
    c5 = v(-C3_C3 / 2.0, o1[1] + math.sqrt(O_C3 ** 2 - dx ** 2))
    c4 = v(C3_C3 / 2.0, c5[1])
    h5a, h5b = sp3_pair(c5, o1, c4, C_H)
    h4a, h4b = sp3_pair(c4, o3, c5, C_H)
    atoms = [("C", c2), ("O", o_carb), ("O", o1), ("O", o3), ("C", c4), ("C", c5)]
    if fluorinated:
        f4, _ = sp3_pair(c4, o3, c5, C_F)
        atoms += [("F", f4), ("H", h4b), ("H", h5a), ("H", h5b)]
    else:
        atoms += [("H", h4a), ("H", h4b), ("H", h5a), ("H", h5b)]
    return atoms

def dmc():
    # cis-cis (both methyls eclipsing the carbonyl O), planar heavy-atom frame, Cs/C2v.
    a = math.radians(O_C_O_OPEN / 2.0)
    c = v(0, 0)
    o_carb = v(0, -C_O_DOUBLE)
    oa = v(-C2_O_SINGLE * math.sin(a), C2_O_SINGLE * math.cos(a))
    ob = v(C2_O_SINGLE * math.sin(a), C2_O_SINGLE * math.cos(a))
    atoms = [("C", c), ("O", o_carb), ("O", oa), ("O", ob)]
    for o, sign in ((oa, -1.0), (ob, 1.0)):
        # methyl carbon: C-O-C angle C_O_C_OPEN, on the carbonyl side (cis)
        u = norm(sub(c, o))
        ang = math.radians(C_O_C_OPEN)
        # rotate u by ±ang in the plane, choosing the side that points towards -y (cis to C=O)
        cands = []
        for s in (1.0, -1.0):
            t = s * ang
            r = v(u[0] * math.cos(t) - u[1] * math.sin(t), u[0] * math.sin(t) + u[1] * math.cos(t))
            cands.append(add(o, scale(r, O_C3)))
        cm = min(cands, key=lambda p: p[1])
        atoms.append(("C", cm))
        # methyl H: one in plane, anti to the carbonate carbon about the O-CH3 bond
        # (dihedral C-O-C-H 180 deg), two out of plane (staggered)
        d = norm(sub(cm, o))
        perp = v(0, 0, 1)
        oc = sub(o, c)
        dot = sum(oc[i] * d[i] for i in range(3))
        inplane = norm(sub(oc, scale(d, dot)))
        theta = math.radians(180.0 - TETRA)
        for k, phi in enumerate((0.0, 120.0, 240.0)):
            ph = math.radians(phi)
            w = add(scale(d, math.cos(theta)), scale(add(scale(inplane, math.cos(ph)), scale(perp, math.sin(ph))), math.sin(theta)))
            atoms.append(("H", add(cm, scale(norm(w), C_H))))
    return atoms

NOTE = "built by the project from standard bond lengths and angles, not optimised"

def write(path, name, atoms, values):
    with open(path, "w") as f:
        f.write(f"{len(atoms)}\n")
        f.write(f"{name}; {NOTE} ({values}); see molecules/README.md\n")
        for s, p in atoms:
            f.write(f"{s:<2} {p[0]:12.6f} {p[1]:12.6f} {p[2]:12.6f}\n")

RING_VALUES = (f"C=O {C_O_DOUBLE}, C-O {C2_O_SINGLE}, O-C {O_C3}, C-C {C3_C3}, C-H {C_H} A; "
               f"O-C-O {O_C_O_RING}, H-C-H {TETRA} deg; planar ring")
write("molecules/ethylene-carbonate.xyz", "ethylene carbonate C3H4O3", ring(False), RING_VALUES)
write("molecules/fluoroethylene-carbonate.xyz", "fluoroethylene carbonate C3H3FO3", ring(True),
      RING_VALUES + f"; C-F {C_F} A in place of one C-H")
write("molecules/dimethyl-carbonate.xyz", "dimethyl carbonate C3H6O3 (cis-cis)", dmc(),
      f"C=O {C_O_DOUBLE}, C-O {C2_O_SINGLE}, O-CH3 {O_C3}, C-H {C_H} A; O-C-O {O_C_O_OPEN}, "
      f"C-O-C {C_O_C_OPEN}, tetrahedral methyl; planar heavy atoms")
