//! Move the atoms of a structure that is symmetric within the tolerance onto exactly
//! symmetric positions: each atom becomes the average over the group's operations of the
//! images of its partners, r'_i = o + (1/|G|) Σ_g R_gᵀ (r_{π_g(i)} − o), where operation g
//! carries atom i onto atom π_g(i). The result is invariant under every operation of the
//! detected group (the matrices form a group), so equivalent atoms are exactly equivalent.

use super::detect::detect_point_group;
use super::group::PointGroup;
use super::ops;
use crate::basis::BasisSet;
use crate::chem::Molecule;

/// The symmetrised structure, the largest displacement of an atom (bohr) and the group.
///
/// Averaging over the group found first can bring the structure within the tolerance of a
/// larger group (a distorted benzene first found D3h is D6h within tolerance once averaged):
/// then it is averaged again over the larger group (a few rounds at most), so the group
/// returned is the group of the returned positions, as detection on them finds it. When the
/// first group holds, the result is that of one averaging.
pub fn symmetrize(mol: &Molecule, tol: f64) -> (Molecule, f64, PointGroup) {
    let (mut out, mut disp, mut pg) = symmetrize_once(mol, tol);
    for _ in 0..4 {
        let again = detect_point_group(&out, tol);
        if again.name == pg.name && again.operations.len() == pg.operations.len() {
            break;
        }
        let (next, _, g) = symmetrize_once(&out, tol);
        out = next;
        pg = g;
        disp = mol
            .atoms
            .iter()
            .zip(&out.atoms)
            .map(|(a, b)| ops::norm(&ops::sub(&a.position, &b.position)))
            .fold(0.0, f64::max);
    }
    (out, disp, pg)
}

fn symmetrize_once(mol: &Molecule, tol: f64) -> (Molecule, f64, PointGroup) {
    let pg = detect_point_group(mol, tol);
    let mut out = mol.clone();
    if pg.operations.is_empty() || pg.is_atom() {
        return (out, 0.0, pg);
    }
    let o = pg.frame.origin;
    let nops = pg.operations.len() as f64;
    let mut max_disp: f64 = 0.0;
    for (i, atom) in out.atoms.iter_mut().enumerate() {
        let mut sum = [0.0; 3];
        for op in &pg.operations {
            let p = op.permutation[i];
            let d = ops::sub(&mol.atoms[p].position, &o);
            let back = ops::apply(&ops::transpose(&op.matrix), &d);
            for k in 0..3 {
                sum[k] += back[k];
            }
        }
        let new = [
            o[0] + sum[0] / nops,
            o[1] + sum[1] / nops,
            o[2] + sum[2] / nops,
        ];
        max_disp = max_disp.max(ops::norm(&ops::sub(&new, &atom.position)));
        atom.position = new;
    }
    (out, max_disp, pg)
}

/// Displacements below this (bohr) leave the input as it is (rounding-level asymmetry):
/// the job then runs on the unchanged structure and no note is given.
pub const MOVED_BOHR: f64 = 1e-6;

/// A job's structure and basis after symmetrisation (the same functions on moved atoms).
#[derive(Debug, Clone)]
pub struct SymmetrisedJob {
    pub molecule: Molecule,
    pub basis: BasisSet,
    /// Largest displacement of an atom (bohr).
    pub max_displacement_bohr: f64,
    /// Schoenflies symbol of the group detected with the tolerance used.
    pub group: String,
    /// Whether any atom moved by more than [`MOVED_BOHR`].
    pub moved: bool,
}

/// Symmetrise a job's structure within `tol` (bohr) and move its basis functions with the
/// atoms: the one step every command that computes levels runs first, so the point group it
/// reports and the equivalence of its atoms come from the same detection.
pub fn symmetrize_job(mol: &Molecule, basis: &BasisSet, tol: f64) -> SymmetrisedJob {
    let (symmetric, displacement, group) = symmetrize(mol, tol);
    let moved = displacement > MOVED_BOHR;
    let (molecule, basis) = if moved {
        let mut b = basis.clone();
        for sh in &mut b.shells {
            sh.center = symmetric.atoms[sh.atom].position;
        }
        (symmetric, b)
    } else {
        (mol.clone(), basis.clone())
    };
    SymmetrisedJob {
        molecule,
        basis,
        max_displacement_bohr: displacement,
        group: group.name,
        moved,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::analysis::symmetry::DEFAULT_TOLERANCE;
    use crate::chem::xyz::{parse_xyz, LengthUnit};

    #[test]
    fn a_slightly_bent_co2_is_made_exactly_linear_and_symmetric() {
        // Exact condition: a D∞h structure has both O at equal distance from C on one line.
        let m = parse_xyz(
            "3\nco2\nC 0 0 0\nO 0 0.005 1.16\nO 0 0 -1.17\n",
            LengthUnit::Angstrom,
        )
        .unwrap();
        let (s, disp, pg) = symmetrize(&m, DEFAULT_TOLERANCE);
        assert_eq!(pg.name, "D∞h");
        let p = |i: usize| s.atoms[i].position;
        let d1 = ops::norm(&ops::sub(&p(1), &p(0)));
        let d2 = ops::norm(&ops::sub(&p(2), &p(0)));
        assert!((d1 - d2).abs() < 1e-10, "{d1} {d2}");
        assert!(disp > 0.0 && disp < DEFAULT_TOLERANCE, "{disp}");
        // symmetrising twice changes nothing (idempotent)
        let (_, again, _) = symmetrize(&s, DEFAULT_TOLERANCE);
        assert!(again < 1e-10, "{again}");
    }

    #[test]
    fn the_group_returned_is_the_group_of_the_returned_positions() {
        // Benzene (GW100 positions) with each atom pushed by up to 0.03 bohr: detection on
        // the input may find a subgroup of D6h; on the returned positions it must find the
        // returned group (exact condition of a consistent report).
        let base = [
            ("C", 0.0, 1.399),
            ("C", 1.2115, 0.6995),
            ("C", 1.2115, -0.6995),
            ("C", 0.0, -1.399),
            ("C", -1.2115, -0.6995),
            ("C", -1.2115, 0.6995),
            ("H", 0.0, 2.5),
            ("H", 2.1651, 1.25),
            ("H", 2.1651, -1.25),
            ("H", 0.0, -2.5),
            ("H", -2.1651, -1.25),
            ("H", -2.1651, 1.25),
        ];
        let mut text = String::from("12\nbenzene\n");
        for (i, (e, x, y)) in base.iter().enumerate() {
            let i = i as f64;
            let (dx, dy) = (0.016 * (1.7 * i).sin(), 0.016 * (2.3 * i + 0.5).cos());
            text += &format!("{e} {} {} 0\n", x + dx, y + dy);
        }
        let m = parse_xyz(&text, LengthUnit::Angstrom).unwrap();
        let (s, _, pg) = symmetrize(&m, DEFAULT_TOLERANCE);
        assert_eq!(detect_point_group(&s, DEFAULT_TOLERANCE).name, pg.name);
        assert_eq!(pg.name, "D6h");
    }
}
