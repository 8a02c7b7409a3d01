//! Löwdin atomic populations of single orbitals, the measure used to localise a core hole
//! and to check afterwards that it stayed on its atom.
//!
//! Löwdin, J. Chem. Phys. 18 (1950) 365: in the symmetrically orthogonalised AO basis
//! S^{1/2} C the population of orbital φ on atom A is Σ_{μ∈A} (S^{1/2} c)_μ², which lies in
//! [0, 1] and sums to 1 over the atoms (unlike Mulliken's, it is never negative, which
//! makes it a clean target for a maximisation).

use bandcast_linalg::{eigh, mul, Mat};

use crate::basis::BasisSet;

/// S^{1/2} for a symmetric positive (semi-)definite overlap matrix. Eigenvalues below zero
/// from round-off are clipped.
pub fn sqrt_overlap(s: &Mat<f64>) -> Mat<f64> {
    let n = s.nrows();
    let (w, u) = eigh(s.as_ref());
    let mut us = u.clone();
    for (k, &wk) in w.iter().enumerate() {
        let r = wk.max(0.0).sqrt();
        for i in 0..n {
            us[(i, k)] *= r;
        }
    }
    mul(us.as_ref(), false, u.as_ref(), true)
}

/// AO indices belonging to one atom.
pub fn atom_aos(basis: &BasisSet, atom: usize) -> Vec<usize> {
    basis
        .ao_map()
        .iter()
        .enumerate()
        .filter(|(_, &(a, _, _))| a == atom)
        .map(|(i, _)| i)
        .collect()
}

/// Löwdin population on each atom of every column of `c` (AO × orbitals), given S^{1/2}.
/// Returns pop[orbital][atom].
pub fn orbital_atom_populations(
    basis: &BasisSet,
    n_atoms: usize,
    s_half: &Mat<f64>,
    c: &Mat<f64>,
) -> Vec<Vec<f64>> {
    let d = mul(s_half.as_ref(), false, c.as_ref(), false);
    let map = basis.ao_map();
    (0..c.ncols())
        .map(|k| {
            let mut p = vec![0.0; n_atoms];
            for (mu, &(a, _, _)) in map.iter().enumerate() {
                p[a] += d[(mu, k)] * d[(mu, k)];
            }
            p
        })
        .collect()
}

/// Population on `atom` of a single orbital `v` (AO coefficients).
pub fn orbital_population_on(basis: &BasisSet, s_half: &Mat<f64>, v: &[f64], atom: usize) -> f64 {
    let n = v.len();
    let aos = atom_aos(basis, atom);
    let mut total = 0.0;
    for &mu in &aos {
        let mut x = 0.0;
        for nu in 0..n {
            x += s_half[(mu, nu)] * v[nu];
        }
        total += x * x;
    }
    total
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::basis::Shell;

    #[test]
    fn sqrt_overlap_squares_back() {
        let s = Mat::<f64>::from_fn(3, 3, |i, j| if i == j { 1.0 } else { 0.3 });
        let h = sqrt_overlap(&s);
        let hh = mul(h.as_ref(), false, h.as_ref(), false);
        for i in 0..3 {
            for j in 0..3 {
                assert!((hh[(i, j)] - s[(i, j)]).abs() < 1e-13);
            }
        }
    }

    #[test]
    fn populations_of_a_normalised_orbital_sum_to_one() {
        // Two s functions on two atoms with overlap 0.4; the bonding orbital shares equally.
        let sh = |atom: usize| Shell {
            l: 0,
            pure: false,
            center: [0.0, 0.0, atom as f64],
            atom,
            exponents: vec![1.0],
            coefficients: vec![1.0],
        };
        let basis = BasisSet::from_shells("t", vec![sh(0), sh(1)]);
        let s = Mat::<f64>::from_fn(2, 2, |i, j| if i == j { 1.0 } else { 0.4 });
        let norm = 1.0 / (2.0f64 * 1.4).sqrt();
        let c = Mat::<f64>::from_fn(2, 1, |_, _| norm);
        let h = sqrt_overlap(&s);
        let p = orbital_atom_populations(&basis, 2, &h, &c);
        assert!((p[0][0] + p[0][1] - 1.0).abs() < 1e-12);
        assert!((p[0][0] - 0.5).abs() < 1e-12);
        let one = orbital_population_on(&basis, &h, &[norm, norm], 1);
        assert!((one - 0.5).abs() < 1e-12);
    }
}
