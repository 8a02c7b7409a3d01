//! Starting densities.
//!
//! - Core guess: orbitals of h = T + V alone.
//! - Superposition of atomic densities (SAD; J. Almlöf, K. Faegri & K. Korsell, J. Comput.
//!   Chem. 3 (1982) 385; Van Lenthe et al., J. Comput. Chem. 27 (2006) 926): for every
//!   distinct element the atom is solved on its own, in its own shells of the molecular
//!   basis, by a spin-restricted SCF with fractional occupations: orbitals are filled two
//!   electrons each in order of energy, and the electrons left for the last (degenerate) set
//!   are spread evenly over it, which keeps the atomic density spherical (an average of
//!   configurations, e.g. C 1s² 2s² 2p^{2/3 each}). The molecular guess is the block-diagonal
//!   sum of the atomic densities, split equally between α and β. It is not idempotent and
//!   holds the neutral-atom electron count; only the first Fock matrix is built from it.

use bandcast_linalg::Mat;

use super::diis::Diis;
use super::driver::{commutator, trace_product};
use super::fock::FockBuilder;
use super::orthogonalize::Orthogonalizer;
use crate::error::Result;

/// Occupation numbers (0..2) for ascending orbital energies: aufbau, with the electrons left
/// for the last partly filled degenerate set spread over it evenly.
pub fn fractional_occupations(eps: &[f64], n_electrons: f64) -> Vec<f64> {
    let m = eps.len();
    let mut occ = vec![0.0; m];
    let mut left = n_electrons;
    let mut i = 0;
    while i < m && left > 1e-12 {
        // degenerate group starting at i
        let mut j = i + 1;
        while j < m && (eps[j] - eps[i]).abs() < 1e-4 * eps[i].abs().max(1.0) {
            j += 1;
        }
        let g = (j - i) as f64;
        let put = left.min(2.0 * g);
        for o in occ.iter_mut().take(j).skip(i) {
            *o = put / g;
        }
        left -= put;
        i = j;
    }
    occ
}

/// Total (α + β) density of a spherically averaged atom with `n_electrons` by the fractional
/// occupation SCF described in the module docs. Converges to an RMS commutator of 1e-6 or
/// stops after 100 iterations (a guess needs no more).
pub fn atomic_density(
    h: &Mat<f64>,
    s: &Mat<f64>,
    builder: &mut dyn FockBuilder,
    n_electrons: f64,
) -> Result<Mat<f64>> {
    let ortho = Orthogonalizer::canonical(s, 1e-7)?;
    let (mut eps, mut c) = ortho.solve(h);
    let mut p = occupied_density(&c, &fractional_occupations(&eps, n_electrons));
    let mut diis = Diis::new(6);
    let mut e_prev = f64::NAN;
    for _ in 0..100 {
        let jk = builder.jk(&[&p])?;
        let n = h.nrows();
        let f = Mat::<f64>::from_fn(n, n, |i, j| {
            h[(i, j)] + jk[0].j[(i, j)] - 0.5 * jk[0].k[(i, j)]
        });
        let e = 0.5 * (trace_product(&p, h) + trace_product(&p, &f));
        let err = commutator(&f, &p, s, &ortho);
        let rms = (err.iter().map(|v| v * v).sum::<f64>() / err.len().max(1) as f64).sqrt();
        if rms < 1e-6 && (e - e_prev).abs() < 1e-8 {
            break;
        }
        e_prev = e;
        let fx = diis.extrapolate(vec![f], err);
        (eps, c) = ortho.solve(&fx[0]);
        p = occupied_density(&c, &fractional_occupations(&eps, n_electrons));
    }
    Ok(p)
}

fn occupied_density(c: &Mat<f64>, occ: &[f64]) -> Mat<f64> {
    super::driver::density(c, occ)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn carbon_like_filling_spreads_over_degenerate_set() {
        let eps = [-11.0, -0.7, -0.4, -0.4, -0.4, 0.3];
        let o = fractional_occupations(&eps, 6.0);
        assert_eq!(o[0], 2.0);
        assert_eq!(o[1], 2.0);
        for v in &o[2..5] {
            assert!((v - 2.0 / 3.0).abs() < 1e-15);
        }
        assert_eq!(o[5], 0.0);
        assert!((o.iter().sum::<f64>() - 6.0).abs() < 1e-14);
    }

    #[test]
    fn hydrogen_gets_one_electron() {
        let o = fractional_occupations(&[-0.5, 0.2], 1.0);
        assert_eq!(o, vec![1.0, 0.0]);
    }
}
