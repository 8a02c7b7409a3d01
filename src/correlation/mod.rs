//! Correlated methods on a closed-shell RHF reference: MP2, CCSD, and ionization energies
//! from EOM-IP-CCSD and EOM-IP-MBPT2.
//!
//! Files: two_electron.rs (which factorisation of the two-electron integrals),
//! density_fit.rs and cholesky.rs (the two factorisations), integrals.rs (MO integral
//! blocks from three-index factors), ladder.rs (the (vv|vv) ladder), tensor.rs (dense
//! tensors and contractions through matrix products), mp2.rs, ccsd_intermediates.rs,
//! ccsd.rs (DIIS from scf::diis), davidson.rs (non-symmetric Davidson), eom_ip*.rs (H̄, sigma vectors
//! and the `ionize` entry point), memory.rs (estimates before anything large is
//! allocated), stages.rs (wall/CPU/peak memory per stage).
pub mod ccsd;
pub mod ccsd_intermediates;
pub mod cholesky;
pub mod closed_triples;
pub mod davidson;
pub mod density_fit;
pub mod integrals;
pub mod ladder;
pub mod mp2;
pub mod open_shell;
pub mod tensor;

#[cfg(test)]
pub(crate) mod brute_force;
pub mod eom_ip;
pub mod eom_ip_intermediates;
pub mod eom_ip_sigma;
pub mod eom_roots;
pub mod memory;
pub mod stages;
pub mod two_electron;
