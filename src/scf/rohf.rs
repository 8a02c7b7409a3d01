//! Restricted open-shell Hartree–Fock: one set of orbitals split into closed (α and β),
//! open (α only) and virtual shells, made self-consistent through a single effective Fock
//! matrix whose off-diagonal blocks are the ROHF stationarity conditions
//! (Roothaan, Rev. Mod. Phys. 32 (1960) 179; in the form of Guest & Saunders, Mol. Phys. 28
//! (1974) 819, with all diagonal blocks the average F_c = (F^α + F^β)/2):
//!
//! ```text
//!            closed   open    virtual
//! closed   [  F_c     F^β     F_c  ]
//! open     [  F^β     F_c     F^α  ]
//! virtual  [  F_c     F^α     F_c  ]
//! ```
//!
//! (MO basis of the current orbitals). The closed–open block vanishes at convergence because
//! only β electrons can move between those shells, the open–virtual one because only α can,
//! and the closed–virtual one because both can. Occupations may be any 0/1 patterns with
//! the β set inside the α set, so MOM core holes (a singly occupied 1s) work the same way.

use bandcast_linalg::{congruence, mul, Mat};

#[derive(Clone, Copy, PartialEq, Eq)]
enum Class {
    Closed,
    Open,
    Virtual,
}

fn classes(occ_a: &[f64], occ_b: &[f64]) -> Vec<Class> {
    occ_a
        .iter()
        .zip(occ_b)
        .map(|(&a, &b)| match (a > 0.5, b > 0.5) {
            (true, true) => Class::Closed,
            (true, false) => Class::Open,
            // β without α is not a ROHF occupation; `run` rejects it, treat as open here.
            (false, true) => Class::Open,
            (false, false) => Class::Virtual,
        })
        .collect()
}

/// The effective Fock matrix in the AO basis: (S C) R (S C)ᵀ with R as in the module docs.
pub fn effective_fock(
    fa: &Mat<f64>,
    fb: &Mat<f64>,
    c: &Mat<f64>,
    occ_a: &[f64],
    occ_b: &[f64],
    s: &Mat<f64>,
) -> Mat<f64> {
    let a = congruence(c.as_ref(), fa.as_ref());
    let b = congruence(c.as_ref(), fb.as_ref());
    let cls = classes(occ_a, occ_b);
    let m = c.ncols();
    let r = Mat::<f64>::from_fn(m, m, |i, j| {
        use Class::*;
        match (cls[i], cls[j]) {
            (Closed, Open) | (Open, Closed) => b[(i, j)],
            (Open, Virtual) | (Virtual, Open) => a[(i, j)],
            _ => 0.5 * (a[(i, j)] + b[(i, j)]),
        }
    });
    let sc = mul(s.as_ref(), false, c.as_ref(), false);
    let scr = mul(sc.as_ref(), false, r.as_ref(), false);
    mul(scr.as_ref(), false, sc.as_ref(), true)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn blocks_are_placed_as_documented() {
        // Orthonormal AO basis (S = 1, C = 1): the effective matrix is R itself.
        let n = 3;
        let one = Mat::<f64>::from_fn(n, n, |i, j| if i == j { 1.0 } else { 0.0 });
        let fa = Mat::<f64>::from_fn(n, n, |i, j| 1.0 + (i + j) as f64);
        let fb = Mat::<f64>::from_fn(n, n, |i, j| -1.0 - (i * j) as f64);
        let r = effective_fock(&fa, &fb, &one, &[1.0, 1.0, 0.0], &[1.0, 0.0, 0.0], &one);
        assert_eq!(r[(0, 1)], fb[(0, 1)]); // closed–open: β
        assert_eq!(r[(1, 2)], fa[(1, 2)]); // open–virtual: α
        assert_eq!(r[(0, 2)], 0.5 * (fa[(0, 2)] + fb[(0, 2)])); // closed–virtual: average
        assert_eq!(r[(1, 1)], 0.5 * (fa[(1, 1)] + fb[(1, 1)]));
        assert_eq!(r[(2, 1)], r[(1, 2)]);
    }
}
