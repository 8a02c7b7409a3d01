//! Second-order Møller–Plesset amplitudes and energy for a closed-shell RHF reference.
//!
//! t_ij^ab = (ia|jb) / (ε_i + ε_j − ε_a − ε_b),
//! E(2) = Σ_ijab [2(ia|jb) − (ib|ja)] t_ij^ab
//! (Møller & Plesset, Phys. Rev. 46 (1934) 618; closed-shell form as in Szabo & Ostlund,
//! *Modern Quantum Chemistry* (1989), eq. 6.74). These first-order amplitudes are also the
//! T2 of EOM-IP-MBPT2 (Stanton & Gauss, J. Chem. Phys. 103 (1995) 1064).
//!
//! `mp2_energy`: the energy of any SCF wavefunction, closed-shell (RMP2) or unrestricted
//! (UMP2), all electrons correlated, for ΔMP2 core binding energies. Spin-orbital form
//! (Szabo & Ostlund eq. 6.74): E2 = ¼ Σ_ijab |⟨ij||ab⟩|² / (εi+εj−εa−εb). Split by spin,
//! with (ia|jb) in chemists' notation:
//!   E_σσ = ½ Σ_{ij∈σ occ, ab∈σ virt} (ia|jb) [(ia|jb) − (ib|ja)] / D,
//!   E_αβ = Σ_{i,a∈α; j,b∈β} (ia|jb)² / D,
//! and for RHF E2 = Σ_ijab (ia|jb) [2(ia|jb) − (ib|ja)] / D.
//!
//! For a core-ionised cation "occupied" and "virtual" follow the MOM occupations, so the
//! vacated 1s is a virtual orbital with a very negative energy. Excitations into it have
//! positive denominators and raise E2: that is the correlation of the hole itself (the
//! usual ΔMP2 treatment of core holes).

use bandcast_linalg::Mat;

use super::integrals::MoIntegrals;
use super::tensor::Tensor;
use crate::basis::BasisSet;
use crate::error::{Error, Result};
use crate::integrals::mo_transform::{check_budget, mo_eri_blocks, BlockSpec};
use crate::integrals::EriEngine;
use crate::scf::{Reference, Wavefunction};

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

/// Memory the (ia|jb) blocks and the transformation may use (bytes).
pub const MP2_MEMORY_BYTES: usize = 2 << 30;

/// The MO-transform memory of ΔMP2 on `mol` in `basis`, estimated before any SCF from the
/// orbital counts (the peak is the cation's UMP2: three (ia|jb) blocks, all electrons
/// correlated). Refuses with `Error::TooLarge` over `MP2_MEMORY_BYTES`, naming the cheaper
/// option; returns the estimate (bytes) otherwise.
pub fn delta_mp2_preflight(basis: &BasisSet, n_electrons: usize) -> Result<usize> {
    use crate::integrals::mo_transform::{estimate_bytes_for, max_shell_functions};
    let n = basis.n_basis;
    // the cation of a closed shell: n/2 alpha and n/2 − 1 beta occupied (the larger side)
    let oa = n_electrons.div_ceil(2).min(n);
    let ob = (n_electrons / 2).saturating_sub(1).min(n);
    let (va, vb) = (n - oa, n - ob);
    let dims = [[oa, va, oa, va], [ob, vb, ob, vb], [oa, va, ob, vb]];
    let need = estimate_bytes_for(
        n,
        max_shell_functions(basis),
        &dims,
        rayon::current_num_threads(),
    );
    if need > MP2_MEMORY_BYTES {
        return Err(Error::TooLarge(format!(
            "ΔMP2 needs about {} for the MO integral transformation ({n} basis functions), over \
             its budget of {}; use --method dscf or a smaller basis",
            crate::system::format_bytes(need as f64),
            crate::system::format_bytes(MP2_MEMORY_BYTES as f64)
        )));
    }
    Ok(need)
}

/// Smallest |denominator| (hartree) accepted; smaller ones make the energy meaningless.
const MIN_DENOMINATOR: f64 = 1e-4;

fn columns(c: &Mat<f64>, cols: &[usize]) -> Mat<f64> {
    Mat::<f64>::from_fn(c.nrows(), cols.len(), |mu, k| c[(mu, cols[k])])
}

fn split(occ: &[f64]) -> (Vec<usize>, Vec<usize>) {
    let o = (0..occ.len()).filter(|&k| occ[k] > 0.5).collect();
    let v = (0..occ.len()).filter(|&k| occ[k] <= 0.5).collect();
    (o, v)
}

/// The second-order correlation energy (hartree) of `wf` in `basis`, all electrons
/// correlated: RMP2 for an RHF state, UMP2 otherwise. The (ia|jb) blocks come from one pass
/// over the AO integrals (`integrals::mo_transform`).
pub fn mp2_energy(basis: &BasisSet, wf: &Wavefunction) -> Result<f64> {
    let engine = EriEngine::new(basis);
    let (oa, va) = split(&wf.occ_alpha);
    let ca_o = columns(&wf.c_alpha, &oa);
    let ca_v = columns(&wf.c_alpha, &va);
    let ea_o: Vec<f64> = oa.iter().map(|&k| wf.eps_alpha[k]).collect();
    let ea_v: Vec<f64> = va.iter().map(|&k| wf.eps_alpha[k]).collect();
    if wf.reference == Reference::Rhf {
        let blocks = [BlockSpec::new(&ca_o, &ca_v, &ca_o, &ca_v)];
        check_budget(basis, &blocks, MP2_MEMORY_BYTES)?;
        let g = mo_eri_blocks(&engine, basis, &blocks)
            .pop()
            .expect("one block");
        return closed_shell(&g, &ea_o, &ea_v);
    }
    let (ob, vb) = split(&wf.occ_beta);
    let cb_o = columns(&wf.c_beta, &ob);
    let cb_v = columns(&wf.c_beta, &vb);
    let eb_o: Vec<f64> = ob.iter().map(|&k| wf.eps_beta[k]).collect();
    let eb_v: Vec<f64> = vb.iter().map(|&k| wf.eps_beta[k]).collect();
    let blocks = [
        BlockSpec::new(&ca_o, &ca_v, &ca_o, &ca_v),
        BlockSpec::new(&cb_o, &cb_v, &cb_o, &cb_v),
        BlockSpec::new(&ca_o, &ca_v, &cb_o, &cb_v),
    ];
    check_budget(basis, &blocks, MP2_MEMORY_BYTES)?;
    let mut g = mo_eri_blocks(&engine, basis, &blocks);
    let gab = g.pop().expect("three blocks");
    let gbb = g.pop().expect("three blocks");
    let gaa = g.pop().expect("three blocks");
    Ok(same_spin(&gaa, &ea_o, &ea_v)?
        + same_spin(&gbb, &eb_o, &eb_v)?
        + opposite_spin(&gab, &ea_o, &ea_v, &eb_o, &eb_v)?)
}

fn denominator(d: f64) -> Result<f64> {
    if d.abs() < MIN_DENOMINATOR {
        return Err(Error::computation(format!(
            "MP2: an orbital-energy denominator of {d:.2e} hartree makes the second-order energy \
             meaningless (near-degenerate occupied and virtual orbitals)"
        )));
    }
    Ok(d)
}

/// RMP2 from g = (ia|jb) at ((i*nv + a)*no + j)*nv + b.
pub fn closed_shell(g: &[f64], eo: &[f64], ev: &[f64]) -> Result<f64> {
    let (no, nv) = (eo.len(), ev.len());
    let at = |i: usize, a: usize, j: usize, b: usize| g[((i * nv + a) * no + j) * nv + b];
    let mut e = 0.0;
    for i in 0..no {
        for j in 0..no {
            for a in 0..nv {
                for b in 0..nv {
                    let d = denominator(eo[i] + eo[j] - ev[a] - ev[b])?;
                    let x = at(i, a, j, b);
                    e += x * (2.0 * x - at(i, b, j, a)) / d;
                }
            }
        }
    }
    Ok(e)
}

/// Same-spin UMP2 part.
pub fn same_spin(g: &[f64], eo: &[f64], ev: &[f64]) -> Result<f64> {
    let (no, nv) = (eo.len(), ev.len());
    let at = |i: usize, a: usize, j: usize, b: usize| g[((i * nv + a) * no + j) * nv + b];
    let mut e = 0.0;
    for i in 0..no {
        for j in 0..no {
            for a in 0..nv {
                for b in 0..nv {
                    let d = denominator(eo[i] + eo[j] - ev[a] - ev[b])?;
                    let x = at(i, a, j, b);
                    e += x * (x - at(i, b, j, a)) / d;
                }
            }
        }
    }
    Ok(0.5 * e)
}

/// Opposite-spin UMP2 part, g = (iα aα | jβ bβ).
pub fn opposite_spin(g: &[f64], eoa: &[f64], eva: &[f64], eob: &[f64], evb: &[f64]) -> Result<f64> {
    let (noa, nva, nob, nvb) = (eoa.len(), eva.len(), eob.len(), evb.len());
    let mut e = 0.0;
    for i in 0..noa {
        for a in 0..nva {
            for j in 0..nob {
                for b in 0..nvb {
                    let d = denominator(eoa[i] + eob[j] - eva[a] - evb[b])?;
                    let x = g[((i * nva + a) * nob + j) * nvb + b];
                    e += x * x / d;
                }
            }
        }
    }
    Ok(e)
}

#[cfg(test)]
mod wavefunction_tests {
    use super::*;

    /// A closed-shell state written as UHF must give the same E2 from the spin-split
    /// formulas as from the RMP2 formula (same integrals, both spins identical).
    #[test]
    fn spin_split_matches_closed_shell_formula() {
        let (no, nv) = (2usize, 3usize);
        let eo = [-1.3, -0.6];
        let ev = [0.2, 0.5, 1.1];
        // Any (ia|jb) with the pair symmetry (ia|jb) = (jb|ia).
        let mut g = vec![0.0; no * nv * no * nv];
        for i in 0..no {
            for a in 0..nv {
                for j in 0..no {
                    for b in 0..nv {
                        let p = i * nv + a;
                        let q = j * nv + b;
                        let (lo, hi) = (p.min(q) as f64, p.max(q) as f64);
                        g[((i * nv + a) * no + j) * nv + b] = 0.05 / (1.0 + lo + 0.3 * hi);
                    }
                }
            }
        }
        let r = closed_shell(&g, &eo, &ev).unwrap();
        let u =
            2.0 * same_spin(&g, &eo, &ev).unwrap() + opposite_spin(&g, &eo, &ev, &eo, &ev).unwrap();
        assert!((r - u).abs() < 1e-14, "{r} {u}");
        assert!(r < 0.0);
    }
}
