//! Koopmans' theorem: the vertical ionization energy of an occupied canonical Hartree–Fock
//! orbital is minus its orbital energy, IE_i ≈ −ε_i (T. Koopmans, Physica 1 (1934) 104).
//!
//! The orbitals of the neutral are kept frozen, so relaxation of the cation (which lowers
//! the IE) and the change of correlation energy (which mostly raises it) are both missing.
//! For valence HOMOs the two partly cancel (mean error about 0.7 eV on the GW100 set); for
//! lone pairs and core levels relaxation wins and Koopmans' IEs come out too high.

use crate::scf::{Reference, Wavefunction};

/// Which spin an orbital belongs to.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Spin {
    /// A doubly occupied spatial orbital of a restricted closed-shell reference.
    Restricted,
    Alpha,
    Beta,
}

/// One occupied orbital and its Koopmans ionization energy.
#[derive(Debug, Clone, PartialEq)]
pub struct OrbitalIe {
    pub spin: Spin,
    /// MO index (column of `c_alpha` / `c_beta`).
    pub index: usize,
    /// Orbital energy ε (hartree).
    pub epsilon: f64,
    /// −ε (hartree).
    pub ie: f64,
}

/// −ε of every occupied canonical orbital, in order of increasing IE: one entry per spatial
/// orbital for RHF, one per spin orbital (alpha, then beta) for UHF and ROHF.
pub fn koopmans(wf: &Wavefunction) -> Vec<OrbitalIe> {
    let mut out = Vec::new();
    let mut push = |eps: &[f64], occ: &[f64], spin: Spin| {
        for (i, (&e, &o)) in eps.iter().zip(occ).enumerate() {
            if o > 0.5 {
                out.push(OrbitalIe {
                    spin,
                    index: i,
                    epsilon: e,
                    ie: -e,
                });
            }
        }
    };
    match wf.reference {
        Reference::Rhf => push(&wf.eps_alpha, &wf.occ_alpha, Spin::Restricted),
        Reference::Uhf | Reference::Rohf => {
            push(&wf.eps_alpha, &wf.occ_alpha, Spin::Alpha);
            push(&wf.eps_beta, &wf.occ_beta, Spin::Beta);
        }
    }
    out.sort_by(|a, b| a.ie.total_cmp(&b.ie));
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use bandcast_linalg::Mat;

    fn toy(reference: Reference) -> Wavefunction {
        Wavefunction {
            reference,
            energy: 0.0,
            nuclear_repulsion: 0.0,
            one_electron: 0.0,
            two_electron: 0.0,
            converged: true,
            iterations: 1,
            c_alpha: Mat::identity(3, 3),
            c_beta: Mat::identity(3, 3),
            eps_alpha: vec![-1.0, -0.5, 0.2],
            eps_beta: vec![-0.9, -0.3, 0.1],
            occ_alpha: vec![1.0, 1.0, 0.0],
            occ_beta: vec![1.0, 0.0, 0.0],
            s2: 0.75,
            n_basis: 3,
            n_independent: 3,
            dipole: [0.0; 3],
        }
    }

    #[test]
    fn occupied_orbitals_only_sorted_by_ie() {
        let r = koopmans(&toy(Reference::Uhf));
        let ies: Vec<f64> = r.iter().map(|o| o.ie).collect();
        assert_eq!(ies, vec![0.5, 0.9, 1.0]);
        assert_eq!(r[0].spin, Spin::Alpha);
        assert_eq!(r[1].spin, Spin::Beta);
        let r = koopmans(&toy(Reference::Rhf));
        assert_eq!(r.len(), 2);
        assert!(r.iter().all(|o| o.spin == Spin::Restricted));
    }
}
