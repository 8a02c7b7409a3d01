//! Second-order Møller–Plesset amplitudes and energy for a closed-shell RHF reference.
//!
//! t_ij^ab = (ia|jb) / (ε_i + ε_j − ε_a − ε_b),
//! E(2) = Σ_ijab [2(ia|jb) − (ib|ja)] t_ij^ab
//! (Møller & Plesset, Phys. Rev. 46 (1934) 618; closed-shell form as in Szabo & Ostlund,
//! *Modern Quantum Chemistry* (1989), eq. 6.74). These first-order amplitudes are also the
//! T2 of EOM-IP-MBPT2 (Stanton & Gauss, J. Chem. Phys. 103 (1995) 1064).

use super::integrals::MoIntegrals;
use super::tensor::Tensor;

/// Energy denominators ε_i + ε_j − ε_a − ε_b as [i,j,a,b].
pub fn denominators(ints: &MoIntegrals) -> Tensor {
    let (o, v) = (ints.nocc, ints.nvir);
    let (eo, ev) = ints.eps();
    Tensor::from_fn(&[o, o, v, v], |x| eo[x[0]] + eo[x[1]] - ev[x[2]] - ev[x[3]])
}

/// First-order doubles amplitudes.
pub fn amplitudes(ints: &MoIntegrals) -> Tensor {
    let d = denominators(ints);
    let mut t2 = ints.ovov.permute(&[0, 2, 1, 3]);
    for (t, dd) in t2.data.iter_mut().zip(&d.data) {
        *t /= dd;
    }
    t2
}

/// Σ_ijab [2(ia|jb) − (ib|ja)] τ_ij^ab for any doubles-shaped τ.
pub fn pair_energy(ints: &MoIntegrals, tau: &Tensor) -> f64 {
    // lovov[i,a,j,b] → [i,j,a,b]
    let l = ints.lovov.permute(&[0, 2, 1, 3]);
    l.dot(tau)
}

/// MP2 correlation energy (hartree) and amplitudes.
pub fn mp2(ints: &MoIntegrals) -> (f64, Tensor) {
    let t2 = amplitudes(ints);
    (pair_energy(ints, &t2), t2)
}
