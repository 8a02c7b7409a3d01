//! Test helpers for the derivative integrals: a small basis with s to g shells on every
//! centre, a random symmetric matrix, and central differences over one coordinate.

use crate::basis::{BasisSet, Shell};
use bandcast_linalg::Mat;

/// Shells s (two primitives), p, d, f, g (one or two primitives) on each centre; atom i at
/// centre i. Exponents moderate so that finite differences are well conditioned.
pub fn mixed_basis(centres: &[[f64; 3]], pure: bool) -> BasisSet {
    let all: Vec<&[usize]> = centres.iter().map(|_| &[0usize, 1, 2, 3, 4][..]).collect();
    basis_with(centres, pure, &all)
}

/// As [`mixed_basis`] with only the angular momenta `ls[i]` on centre i.
pub fn basis_with(centres: &[[f64; 3]], pure: bool, ls: &[&[usize]]) -> BasisSet {
    let mut shells = Vec::new();
    for (atom, &c) in centres.iter().enumerate() {
        let list: [(usize, Vec<f64>, Vec<f64>); 5] = [
            (0, vec![3.1, 0.6], vec![0.4, 0.7]),
            (1, vec![1.2, 0.35], vec![0.5, 0.6]),
            (2, vec![0.9], vec![1.0]),
            (3, vec![0.8, 0.3], vec![0.3, 0.8]),
            (4, vec![0.7], vec![1.0]),
        ];
        for (l, e, co) in list {
            if !ls[atom].contains(&l) {
                continue;
            }
            shells.push(Shell {
                l,
                pure,
                center: c,
                atom,
                exponents: e,
                coefficients: co,
            });
        }
    }
    BasisSet::from_shells("test", shells)
}

/// A reproducible symmetric matrix with entries in (−1, 1).
pub fn random_symmetric(n: usize, seed: u64) -> Mat<f64> {
    let mut s = seed.wrapping_mul(2654435761).wrapping_add(1);
    let mut rnd = || {
        s = s
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        ((s >> 11) as f64 / (1u64 << 53) as f64) * 2.0 - 1.0
    };
    let mut m = Mat::<f64>::zeros(n, n);
    for i in 0..n {
        for j in 0..=i {
            let v = rnd();
            m[(i, j)] = v;
            m[(j, i)] = v;
        }
    }
    m
}

/// (f(R + h e) − f(R − h e)) / 2h for coordinate `k` of centre `atom`, h = 1e-4 bohr.
pub fn central_difference(
    centres: &[[f64; 3]],
    atom: usize,
    k: usize,
    f: impl Fn(&[[f64; 3]]) -> f64,
) -> f64 {
    let h = 1e-4;
    let mut plus = centres.to_vec();
    plus[atom][k] += h;
    let mut minus = centres.to_vec();
    minus[atom][k] -= h;
    (f(&plus) - f(&minus)) / (2.0 * h)
}
