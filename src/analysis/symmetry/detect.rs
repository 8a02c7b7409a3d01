//! Point-group detection from nuclear positions.
//!
//! Method (the usual search of symmetry elements):
//! 1. Fixed point: the centre of nuclear charge (every operation maps each atom onto an atom
//!    of the same element, so it fixes this point; no masses needed).
//! 2. Special cases: one atom (or all atoms at the centre) → the atom's group "Kh"; all atoms
//!    on a line → C∞v, or D∞h with an inversion centre.
//! 3. Candidate axes: the principal axes of the charge-weighted inertia tensor, the directions
//!    of atoms, of midpoints of pairs of equivalent atoms (same element, same distance from
//!    the centre), normals of planes through three equivalent atoms and through two of them
//!    and the centre. Every rotation axis of a molecule is among these: a Cn axis either holds
//!    an atom, or (n = 2) passes through the midpoint of a swapped pair or is normal to a plane
//!    holding all atoms (a principal axis), or (n ≥ 3) is normal to the polygon of an orbit.
//!    Candidate mirror normals: the candidate axes and the differences of equivalent pairs (a
//!    plane either swaps a pair or holds every atom).
//! 4. Each candidate operation is tested on the atoms: R maps every atom within the
//!    tolerance onto an atom of the same element.
//! 5. The found elements classify the group by the usual flow chart (linear; several C3 →
//!    cubic; highest Cn; n C2 ⊥ Cn → D groups; σh, n σv, S2n), then `orient` fixes the
//!    standard frame and `group` generates all operations from the character table's
//!    standard set, each re-checked on the geometry.
//!
//! Tolerance: `tol` (bohr) is the largest allowed distance between an image and its atom,
//! scaled by (1 + r/10 bohr) for an atom at distance r from the centre, so a fixed small
//! angular error in a candidate axis does not fail distant atoms first. Default
//! `DEFAULT_TOLERANCE` = 0.05 bohr (≈ 0.026 Å), chosen on the GW100 structures: several of
//! them ("experimental" or optimised, given to 6 decimals in Å) deviate from their textbook
//! symmetry by 0.005–0.01 Å, so that 1e-3 bohr finds C1/C2 for butane, cyclopentadiene and
//! cyclooctatetraene, and 0.01 bohr still misses pyridine's C2v and butane's C2h; at 0.05 bohr
//! all the textbook groups below are found (tests/symmetry.rs). Geometric distortions that
//! matter for a spectrum (Jahn–Teller, conformers) are far larger than 0.05 bohr. A
//! molecule that is only approximately symmetric gets labels in the higher group; where its
//! orbitals do not fit that group's irreps, `labels` falls back to an abelian subgroup and
//! says so.
//! Groups with icosahedral symmetry (C5 axes on several C3) are reported through their
//! subgroup D2h / D2 (no I/Ih table here).

use super::group::PointGroup;
use super::ops::{self, Mat3};
use super::orient;
use crate::chem::Molecule;
use std::f64::consts::PI;

/// Default coordinate tolerance in bohr (see the module documentation).
pub const DEFAULT_TOLERANCE: f64 = 0.05;

/// 1 − |cos| below which two found axes or plane normals are the same element (≈ 0.8°).
const SAME_DIRECTION: f64 = 1e-4;

/// Highest rotation order searched.
const MAX_ORDER: usize = 8;

/// Nuclei relative to the centre of nuclear charge.
#[derive(Debug, Clone)]
pub struct Nuclei {
    pub centre: [f64; 3],
    pub z: Vec<u32>,
    /// Positions relative to `centre` (bohr).
    pub r: Vec<[f64; 3]>,
    pub tol: f64,
}

impl Nuclei {
    pub fn new(mol: &Molecule, tol: f64) -> Self {
        let qsum: f64 = mol.atoms.iter().map(|a| a.z as f64).sum();
        let mut c = [0.0; 3];
        if qsum > 0.0 {
            for a in &mol.atoms {
                for k in 0..3 {
                    c[k] += a.z as f64 * a.position[k] / qsum;
                }
            }
        }
        Nuclei {
            centre: c,
            z: mol.atoms.iter().map(|a| a.z).collect(),
            r: mol
                .atoms
                .iter()
                .map(|a| ops::sub(&a.position, &c))
                .collect(),
            tol,
        }
    }

    /// Matching threshold for an atom at distance `r` from the centre.
    pub fn threshold(&self, r: f64) -> f64 {
        self.tol * (1.0 + r / 10.0)
    }

    /// Atom permutation p (atom i ↦ atom p[i]) when `m` maps the nuclei onto themselves.
    pub fn permutation(&self, m: &Mat3) -> Option<Vec<usize>> {
        self.permutation_with(m, 1.0)
    }

    /// As `permutation` with the threshold multiplied by `slack`.
    pub fn permutation_with(&self, m: &Mat3, slack: f64) -> Option<Vec<usize>> {
        let n = self.r.len();
        let mut perm = vec![usize::MAX; n];
        let mut used = vec![false; n];
        for i in 0..n {
            let img = ops::apply(m, &self.r[i]);
            let thr = slack * self.threshold(ops::norm(&self.r[i]));
            let mut best = None;
            let mut best_d = f64::INFINITY;
            for j in 0..n {
                if self.z[j] != self.z[i] || used[j] {
                    continue;
                }
                let d = ops::norm(&ops::sub(&img, &self.r[j]));
                if d < best_d {
                    best_d = d;
                    best = Some(j);
                }
            }
            match best {
                Some(j) if best_d <= thr => {
                    perm[i] = j;
                    used[j] = true;
                }
                _ => return None,
            }
        }
        Some(perm)
    }

    pub fn is_symmetry(&self, m: &Mat3) -> bool {
        self.permutation(m).is_some()
    }

    /// Length scale below which an atom counts as sitting at the centre / on an axis.
    pub fn small(&self) -> f64 {
        self.tol.max(1e-6)
    }

    /// Indices of atoms lying on the line through the centre along unit `u`.
    pub fn atoms_on_axis(&self, u: &[f64; 3]) -> usize {
        self.r
            .iter()
            .filter(|r| ops::norm(&ops::cross(r, u)) < self.threshold(ops::norm(r)))
            .count()
    }

    /// Atoms in the plane through the centre with unit normal `n`: (count, Σ Z).
    pub fn atoms_in_plane(&self, n: &[f64; 3]) -> (usize, u32) {
        let mut c = 0;
        let mut zs = 0;
        for (r, z) in self.r.iter().zip(&self.z) {
            if ops::dot(r, n).abs() < self.threshold(ops::norm(r)) {
                c += 1;
                zs += z;
            }
        }
        (c, zs)
    }

    /// Σ Z of atoms on an axis (tie-breaker).
    pub fn charge_on_axis(&self, u: &[f64; 3]) -> u32 {
        self.r
            .iter()
            .zip(&self.z)
            .filter(|(r, _)| ops::norm(&ops::cross(r, u)) < self.threshold(ops::norm(r)))
            .map(|(_, z)| *z)
            .sum()
    }
}

/// A proper rotation axis and its highest order.
#[derive(Debug, Clone, Copy)]
pub struct Axis {
    pub u: [f64; 3],
    pub order: usize,
}

/// Symmetry elements found on the geometry.
#[derive(Debug, Clone, Default)]
pub struct Elements {
    pub axes: Vec<Axis>,
    /// Unit normals of mirror planes.
    pub planes: Vec<[f64; 3]>,
    pub inversion: bool,
}

impl Elements {
    pub fn max_order(&self) -> usize {
        self.axes.iter().map(|a| a.order).max().unwrap_or(1)
    }
}

/// Sign-normalised unit vector: first component with |v| > 1e-6 positive.
fn canonical_sign(u: [f64; 3]) -> [f64; 3] {
    for k in 0..3 {
        if u[k].abs() > 1e-6 {
            return if u[k] < 0.0 { [-u[0], -u[1], -u[2]] } else { u };
        }
    }
    u
}

fn push_unique(list: &mut Vec<[f64; 3]>, v: [f64; 3]) {
    let v = canonical_sign(v);
    if !list.iter().any(|w| 1.0 - ops::dot(w, &v).abs() < 1e-10) {
        list.push(v);
    }
}

/// Eigenvectors (rows) of a symmetric 3×3 matrix by Jacobi rotations, eigenvalues ascending.
pub fn sym3_eigen(a: &Mat3) -> ([f64; 3], Mat3) {
    let mut a = *a;
    let mut v = ops::IDENTITY;
    for _ in 0..50 {
        let off = a[0][1].abs() + a[0][2].abs() + a[1][2].abs();
        if off < 1e-15 {
            break;
        }
        for (p, q) in [(0, 1), (0, 2), (1, 2)] {
            if a[p][q].abs() < 1e-300 {
                continue;
            }
            let theta = (a[q][q] - a[p][p]) / (2.0 * a[p][q]);
            let t = theta.signum() / (theta.abs() + (theta * theta + 1.0).sqrt());
            let t = if theta == 0.0 { 1.0 } else { t };
            let c = 1.0 / (t * t + 1.0).sqrt();
            let s = t * c;
            let mut j = ops::IDENTITY;
            j[p][p] = c;
            j[q][q] = c;
            j[p][q] = s;
            j[q][p] = -s;
            a = ops::mul(&ops::transpose(&j), &ops::mul(&a, &j));
            v = ops::mul(&v, &j);
        }
    }
    let mut idx = [0usize, 1, 2];
    idx.sort_by(|&i, &j| a[i][i].partial_cmp(&a[j][j]).unwrap());
    let w = [a[idx[0]][idx[0]], a[idx[1]][idx[1]], a[idx[2]][idx[2]]];
    let vt = ops::transpose(&v);
    (w, [vt[idx[0]], vt[idx[1]], vt[idx[2]]])
}

/// Principal axes (rows) of the charge-weighted inertia tensor.
pub fn principal_axes(n: &Nuclei) -> ([f64; 3], Mat3) {
    let mut t = [[0.0; 3]; 3];
    for (r, &z) in n.r.iter().zip(&n.z) {
        let r2 = ops::dot(r, r);
        for i in 0..3 {
            for j in 0..3 {
                t[i][j] += z as f64 * ((if i == j { r2 } else { 0.0 }) - r[i] * r[j]);
            }
        }
    }
    sym3_eigen(&t)
}

/// Groups of equivalent-looking atoms: same element, same distance from the centre.
fn equivalence_classes(n: &Nuclei) -> Vec<Vec<usize>> {
    let mut classes: Vec<Vec<usize>> = Vec::new();
    for i in 0..n.r.len() {
        let ri = ops::norm(&n.r[i]);
        let found = classes.iter_mut().find(|c| {
            let j = c[0];
            n.z[j] == n.z[i] && (ops::norm(&n.r[j]) - ri).abs() < n.threshold(ri)
        });
        match found {
            Some(c) => c.push(i),
            None => classes.push(vec![i]),
        }
    }
    classes
}

fn candidate_axes(n: &Nuclei) -> Vec<[f64; 3]> {
    let small = n.small();
    let mut axes = Vec::new();
    let (_, pa) = principal_axes(n);
    for u in pa {
        push_unique(&mut axes, u);
    }
    for r in &n.r {
        if let Some(u) = ops::unit(r, small) {
            push_unique(&mut axes, u);
        }
    }
    for class in equivalence_classes(n) {
        let m = class.len();
        for a in 0..m {
            for b in a + 1..m {
                let (ra, rb) = (&n.r[class[a]], &n.r[class[b]]);
                if let Some(u) = ops::unit(&ops::add(ra, rb), small) {
                    push_unique(&mut axes, u);
                }
                if let Some(u) = ops::unit(&ops::cross(ra, rb), small * small) {
                    push_unique(&mut axes, u);
                }
                if m <= 24 {
                    for c in b + 1..m {
                        let rc = &n.r[class[c]];
                        let nrm = ops::cross(&ops::sub(rb, ra), &ops::sub(rc, ra));
                        if let Some(u) = ops::unit(&nrm, small * small) {
                            push_unique(&mut axes, u);
                        }
                    }
                }
            }
        }
    }
    axes
}

fn candidate_planes(n: &Nuclei, axes: &[[f64; 3]]) -> Vec<[f64; 3]> {
    let small = n.small();
    let mut normals: Vec<[f64; 3]> = axes.to_vec();
    for class in equivalence_classes(n) {
        for a in 0..class.len() {
            for b in a + 1..class.len() {
                let d = ops::sub(&n.r[class[a]], &n.r[class[b]]);
                if let Some(u) = ops::unit(&d, small) {
                    push_unique(&mut normals, u);
                }
            }
        }
    }
    normals
}

/// Search all symmetry elements of a non-linear arrangement.
pub fn find_elements(n: &Nuclei) -> Elements {
    let axes = candidate_axes(n);
    let mut found = Elements {
        inversion: n.is_symmetry(&ops::INVERSION),
        ..Default::default()
    };
    for u in &axes {
        let mut order = 1;
        for k in (2..=MAX_ORDER).rev() {
            if n.is_symmetry(&ops::rotation(u, 2.0 * PI / k as f64)) {
                order = k;
                break;
            }
        }
        if order > 1 {
            // Near-duplicates (the same axis from two candidate sources) merge.
            match found
                .axes
                .iter_mut()
                .find(|a| 1.0 - ops::dot(&a.u, u).abs() < SAME_DIRECTION)
            {
                Some(a) => a.order = a.order.max(order),
                None => found.axes.push(Axis { u: *u, order }),
            }
        }
    }
    for u in candidate_planes(n, &axes) {
        if n.is_symmetry(&ops::reflection(&u))
            && !found
                .planes
                .iter()
                .any(|p| 1.0 - ops::dot(p, &u).abs() < SAME_DIRECTION)
        {
            found.planes.push(u);
        }
    }
    found
}

/// Whether S_m about `u` is a symmetry.
pub fn has_improper(n: &Nuclei, u: &[f64; 3], m: usize) -> bool {
    n.is_symmetry(&ops::improper(u, 2.0 * PI / m as f64))
}

/// True when all atoms lie on one line through the centre; returns its direction.
fn linear_axis(n: &Nuclei) -> Option<[f64; 3]> {
    let far =
        n.r.iter()
            .max_by(|a, b| ops::norm(a).partial_cmp(&ops::norm(b)).unwrap())?;
    let u = ops::unit(far, n.small())?;
    n.r.iter()
        .all(|r| ops::norm(&ops::cross(r, &u)) < n.threshold(ops::norm(r)))
        .then_some(u)
}

/// The point group of a molecule, operations expressed in the input frame (see the module
/// documentation for the method and the meaning of `tol`, in bohr).
///
/// When the classified group's operations do not all fit the atoms (a loose tolerance let
/// through an element the rest of the group contradicts), detection is repeated with the
/// tolerance halved, up to five times; the result then says so in its notes.
pub fn detect_point_group(mol: &Molecule, tol: f64) -> PointGroup {
    let tol = if tol.is_finite() && tol > 0.0 {
        tol
    } else {
        DEFAULT_TOLERANCE
    };
    let mut t = tol;
    let mut first = None;
    for attempt in 0..6 {
        let nuc = Nuclei::new(mol, t);
        if nuc.r.iter().all(|r| ops::norm(r) < nuc.threshold(0.0)) {
            return PointGroup::atom(mol, &nuc);
        }
        let (name, frame) = classify_at(&nuc);
        if let Some(mut g) = PointGroup::try_place(&name, frame, &nuc) {
            if attempt > 0 {
                g.notes.push(format!(
                    "detected with the tolerance reduced from {tol} to {t} bohr: the group found \
                     at {tol} bohr did not fit the geometry as a whole"
                ));
            }
            return g;
        }
        first.get_or_insert((name, frame, nuc));
        t *= 0.5;
    }
    let (name, frame, nuc) = first.expect("at least one attempt");
    PointGroup::build(&name, frame, mol, &nuc)
}

/// Group name and standard frame at one tolerance.
fn classify_at(nuc: &Nuclei) -> (String, super::orient::Frame) {
    if let Some(u) = linear_axis(nuc) {
        let name = if nuc.is_symmetry(&ops::INVERSION) {
            "D∞h"
        } else {
            "C∞v"
        };
        (name.to_string(), orient::linear_frame(nuc, &u))
    } else {
        let el = find_elements(nuc);
        let (name, main) = classify(nuc, &el);
        let frame = orient::standard_frame(&name, main, &el, nuc);
        (name, frame)
    }
}

/// Schoenflies name of the group spanned by the found elements, and the principal axis
/// when the elements fix it (None for C1/Cs/Ci and for D2/D2h, whose z axis `orient`
/// chooses among three equivalent-order axes).
pub fn classify(n: &Nuclei, el: &Elements) -> (String, Option<[f64; 3]>) {
    let c3 = el.axes.iter().filter(|a| a.order % 3 == 0).count();
    if c3 >= 2 {
        // Cubic (or icosahedral) groups.
        let name = if el.axes.iter().any(|a| a.order == 5) {
            // No icosahedral tables: keep the inversion only (documented limitation).
            if el.inversion {
                "Ci"
            } else {
                "C1"
            }
        } else if el.axes.iter().any(|a| a.order == 4) {
            if el.inversion {
                "Oh"
            } else {
                "O"
            }
        } else if el.inversion {
            "Th"
        } else if !el.planes.is_empty() {
            "Td"
        } else {
            "T"
        };
        return (name.to_string(), None);
    }
    let nmax = el.max_order();
    if nmax == 1 {
        let name = if !el.planes.is_empty() {
            "Cs"
        } else if el.inversion {
            "Ci"
        } else {
            "C1"
        };
        return (name.to_string(), None);
    }
    let tops: Vec<&Axis> = el.axes.iter().filter(|a| a.order == nmax).collect();
    let main = if nmax == 2 && tops.len() >= 3 {
        // D2d: the C2 that is also an S4 axis is principal; otherwise D2 / D2h.
        match tops.iter().find(|a| has_improper(n, &a.u, 4)) {
            Some(a) => a.u,
            None => {
                let name = if el.inversion { "D2h" } else { "D2" };
                return (name.to_string(), None);
            }
        }
    } else {
        tops[0].u
    };
    let perp_c2 = el
        .axes
        .iter()
        .filter(|a| ops::dot(&a.u, &main).abs() < 0.02)
        .count();
    let sigma_h = el.planes.iter().any(|p| ops::dot(p, &main).abs() > 0.98);
    let sigma_v = el
        .planes
        .iter()
        .filter(|p| ops::dot(p, &main).abs() < 0.02)
        .count();
    let k = nmax;
    let name = if perp_c2 >= k {
        if sigma_h {
            format!("D{k}h")
        } else if sigma_v >= k {
            format!("D{k}d")
        } else {
            format!("D{k}")
        }
    } else if sigma_h {
        format!("C{k}h")
    } else if sigma_v >= k {
        format!("C{k}v")
    } else if has_improper(n, &main, 2 * k) {
        format!("S{}", 2 * k)
    } else {
        format!("C{k}")
    };
    (name, Some(main))
}
