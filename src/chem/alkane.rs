//! An all-trans n-alkane CnH2n+2 built from standard geometry (C–C 1.54 Å, C–H 1.09 Å,
//! tetrahedral angles: common-practice textbook values), for benchmarks and tests.

use crate::chem::{Atom, Molecule};
use crate::units::ANGSTROM_TO_BOHR;

/// Tetrahedral angle (degrees).
const TETRAHEDRAL_DEG: f64 = 109.4712206;
const CC_ANGSTROM: f64 = 1.54;
const CH_ANGSTROM: f64 = 1.09;

/// All-trans n-alkane with `n` carbons (n ≥ 1), carbons first then hydrogens.
pub fn alkane(n: usize) -> Molecule {
    let n = n.max(1);
    let half = (TETRAHEDRAL_DEG / 2.0).to_radians();
    let (dx, dy) = (CC_ANGSTROM * half.sin(), CC_ANGSTROM * half.cos());
    let c: Vec<[f64; 3]> = (0..n)
        .map(|k| [k as f64 * dx, if k % 2 == 1 { dy } else { 0.0 }, 0.0])
        .collect();
    let mut atoms: Vec<Atom> = c
        .iter()
        .map(|p| Atom {
            z: 6,
            position: p.map(|x| x * ANGSTROM_TO_BOHR),
        })
        .collect();
    let mut h = |p: [f64; 3], d: [f64; 3]| {
        let norm = (d[0] * d[0] + d[1] * d[1] + d[2] * d[2]).sqrt();
        atoms.push(Atom {
            z: 1,
            position: [0, 1, 2].map(|i| (p[i] + CH_ANGSTROM * d[i] / norm) * ANGSTROM_TO_BOHR),
        });
    };
    for k in 0..n {
        // In-plane direction away from the carbon backbone, and the two out-of-plane H.
        let up = if k % 2 == 1 { 1.0 } else { -1.0 };
        let hh = (TETRAHEDRAL_DEG / 2.0).to_radians();
        if n == 1 {
            // Methane: regular tetrahedron.
            for d in [
                [1.0, 1.0, 1.0],
                [1.0, -1.0, -1.0],
                [-1.0, 1.0, -1.0],
                [-1.0, -1.0, 1.0],
            ] {
                h(c[0], d);
            }
            break;
        }
        h(c[k], [0.0, up * hh.cos(), hh.sin()]);
        h(c[k], [0.0, up * hh.cos(), -hh.sin()]);
        if k == 0 {
            h(
                c[k],
                [-dx, if n > 1 { c[1][1] - c[0][1] } else { 0.0 }, 0.0],
            );
        }
        if k == n - 1 && n > 1 {
            h(c[k], [dx, c[k - 1][1] - c[k][1], 0.0]);
        }
    }
    let mut m = Molecule::new(atoms);
    m.name = format!("C{n}H{} (all-trans, standard geometry)", 2 * n + 2);
    m
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::molecule::distance;

    #[test]
    fn alkane_geometry_has_standard_bonds_and_formula() {
        for n in [1usize, 2, 5] {
            let m = alkane(n);
            assert_eq!(m.atoms.len(), 3 * n + 2);
            let c: Vec<_> = m.atoms.iter().filter(|a| a.z == 6).collect();
            let hs: Vec<_> = m.atoms.iter().filter(|a| a.z == 1).collect();
            assert_eq!(hs.len(), 2 * n + 2);
            for w in c.windows(2) {
                let d = distance(&w[0].position, &w[1].position) / ANGSTROM_TO_BOHR;
                assert!((d - CC_ANGSTROM).abs() < 1e-9);
            }
            // Every H is 1.09 Å from its nearest carbon, and no two atoms clash.
            for h in &hs {
                let d = c
                    .iter()
                    .map(|a| distance(&a.position, &h.position))
                    .fold(f64::MAX, f64::min)
                    / ANGSTROM_TO_BOHR;
                assert!((d - CH_ANGSTROM).abs() < 1e-9);
            }
            for (i, a) in m.atoms.iter().enumerate() {
                for b in &m.atoms[..i] {
                    assert!(distance(&a.position, &b.position) / ANGSTROM_TO_BOHR > 1.0);
                }
            }
        }
    }
}
