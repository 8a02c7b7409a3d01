//! Move the atoms of a structure that is symmetric within the tolerance onto exactly
//! symmetric positions: each atom becomes the average over the group's operations of the
//! images of its partners, r'_i = o + (1/|G|) Σ_g R_gᵀ (r_{π_g(i)} − o), where operation g
//! carries atom i onto atom π_g(i). The result is invariant under every operation of the
//! detected group (the matrices form a group), so equivalent atoms are exactly equivalent.

use super::detect::detect_point_group;
use super::group::PointGroup;
use super::ops;
use crate::chem::Molecule;

/// The symmetrised structure, the largest displacement of an atom (bohr) and the group.
pub fn symmetrize(mol: &Molecule, tol: f64) -> (Molecule, f64, PointGroup) {
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
}
