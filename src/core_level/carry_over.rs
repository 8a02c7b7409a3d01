//! The neutral's orbitals carried from one hole's basis to the next.
//!
//! Every hole has its own basis (the basis as named, flexible on the hole atom), so every
//! hole needs its own neutral SCF. The bases differ only on two atoms, so the previous
//! hole's converged occupied orbitals, projected into the next basis, are a far better start
//! than superposed atomic densities. Projection: C' = S'⁻¹ S'' C with S' the overlap of the
//! new basis and S'' its overlap with the old one (least-squares fit of each orbital in the
//! new functions), then Löwdin orthonormalisation of the occupied set, C' (C'ᵀ S' C')^{-1/2}.

use bandcast_linalg::{cholesky_lower, eigh, mul, solve_lower_in_place, solve_upper_in_place, Mat};

use crate::basis::BasisSet;
use crate::integrals;

/// The occupied columns `occ` of `c_from` (orbitals in `from`) projected into `to`, with
/// `s_to` the overlap of `to`; None when the projection is numerically unusable.
pub fn project_occupied(
    from: &BasisSet,
    c_from: &Mat<f64>,
    occ: &[usize],
    to: &BasisSet,
    s_to: &Mat<f64>,
) -> Option<Mat<f64>> {
    let (nt, nf) = (to.n_basis, from.n_basis);
    let mut shells = to.shells.clone();
    shells.extend(from.shells.iter().cloned());
    let both = BasisSet::from_shells("projection", shells);
    let s_all = integrals::overlap(&both);
    // B = S'' C_occ (nt × n_occ), then solve S' X = B by Cholesky.
    let c_occ = Mat::<f64>::from_fn(nf, occ.len(), |mu, k| c_from[(mu, occ[k])]);
    let s_cross = Mat::<f64>::from_fn(nt, nf, |i, j| s_all[(i, nt + j)]);
    let mut x = mul(s_cross.as_ref(), false, c_occ.as_ref(), false);
    let l = cholesky_lower(s_to.as_ref())?;
    solve_lower_in_place(l.as_ref(), x.as_mut());
    solve_upper_in_place(l.transpose(), x.as_mut());
    // Löwdin orthonormalisation of the occupied set.
    let sx = mul(s_to.as_ref(), false, x.as_ref(), false);
    let m = mul(x.as_ref(), true, sx.as_ref(), false);
    let (w, u) = eigh(m.as_ref());
    if w.iter().any(|&v| !(v > 1e-6)) {
        return None;
    }
    let k = w.len();
    let uw = Mat::<f64>::from_fn(k, k, |i, j| u[(i, j)] / w[j].sqrt());
    let m_inv_half = mul(uw.as_ref(), false, u.as_ref(), true);
    let c = mul(x.as_ref(), false, m_inv_half.as_ref(), false);
    c.as_ref().norm_max().is_finite().then_some(c)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::basis;
    use crate::chem::xyz::{parse_xyz, LengthUnit};
    use crate::core_level::flexibility::uncontract;
    use crate::scf::{self, Guess, ScfOptions};

    #[test]
    fn carried_orbitals_start_the_next_neutral_close_to_convergence() {
        // Water STO-3G with O uncontracted, then with H1 uncontracted instead (two bases
        // that differ on two atoms, as two holes' bases do).
        let m = parse_xyz(
            "3\nwater\nO 0 0 0.1173\nH 0 0.7572 -0.4692\nH 0 -0.7572 -0.4692\n",
            LengthUnit::Angstrom,
        )
        .unwrap();
        let plain = basis::load("sto-3g", &m, None).unwrap();
        let a = uncontract(&plain, &[0], 1);
        let b = uncontract(&plain, &[1], 1);
        let wa = scf::run(&m, &a, &ScfOptions::default()).unwrap();
        let sad = scf::run(&m, &b, &ScfOptions::default()).unwrap();
        let s_b = crate::integrals::overlap(&b);
        let occ: Vec<usize> = (0..5).collect();
        let c = project_occupied(&a, &wa.c_alpha, &occ, &b, &s_b).expect("projection");
        // Orthonormal in the new basis.
        let ctsc = mul(
            c.as_ref(),
            true,
            mul(s_b.as_ref(), false, c.as_ref(), false).as_ref(),
            false,
        );
        for i in 0..5 {
            for j in 0..5 {
                let e = if i == j { 1.0 } else { 0.0 };
                assert!((ctsc[(i, j)] - e).abs() < 1e-10);
            }
        }
        let carried = scf::run(
            &m,
            &b,
            &ScfOptions {
                guess: Guess::Orbitals {
                    c_alpha: c.clone(),
                    c_beta: c,
                },
                ..ScfOptions::default()
            },
        )
        .unwrap();
        // Same state, fewer iterations than from superposed atomic densities.
        assert!((carried.energy - sad.energy).abs() < 1e-9);
        assert!(
            carried.iterations < sad.iterations,
            "{} vs {}",
            carried.iterations,
            sad.iterations
        );
    }
}
