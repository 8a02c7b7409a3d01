//! Second-order Møller–Plesset correlation energy of a closed-shell (RMP2) or unrestricted
//! (UMP2) Hartree–Fock state, all electrons correlated, for ΔMP2 core binding energies.
//!
//! Spin-orbital form (Møller & Plesset, Phys. Rev. 46 (1934) 618; Szabo & Ostlund,
//! *Modern Quantum Chemistry* (1989) eq. 6.74): E2 = ¼ Σ_ijab |⟨ij||ab⟩|² / (εi+εj−εa−εb).
//! Split by spin, with (ia|jb) in chemists' notation:
//!   E_σσ = ½ Σ_{ij∈σ occ, ab∈σ virt} (ia|jb) [(ia|jb) − (ib|ja)] / D,
//!   E_αβ = Σ_{i,a∈α; j,b∈β} (ia|jb)² / D,
//! and for RHF E2 = Σ_ijab (ia|jb) [2(ia|jb) − (ib|ja)] / D.
//!
//! For a core-ionised cation "occupied" and "virtual" follow the MOM occupations, so the
//! vacated 1s is a virtual orbital with a very negative energy. Excitations into it have
//! positive denominators and raise E2: that is the correlation of the hole itself (the
//! usual ΔMP2 treatment of core holes).

use bandcast_linalg::Mat;

use crate::basis::BasisSet;
use crate::error::{Error, Result};
use crate::integrals::EriEngine;

use super::ovov::{bra_half, check_budget, estimate_bytes, ket_half};
use crate::scf::{Reference, Wavefunction};

/// Memory the (ia|jb) blocks and the transformation may use (bytes).
pub const MP2_MEMORY_BYTES: usize = 2 << 30;

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

/// The second-order correlation energy (hartree) of `wf` in `basis`.
pub fn mp2_energy(basis: &BasisSet, wf: &Wavefunction) -> Result<f64> {
    let n = basis.n_basis;
    let engine = EriEngine::new(basis);
    let (oa, va) = split(&wf.occ_alpha);
    let ca_o = columns(&wf.c_alpha, &oa);
    let ca_v = columns(&wf.c_alpha, &va);
    let ea_o: Vec<f64> = oa.iter().map(|&k| wf.eps_alpha[k]).collect();
    let ea_v: Vec<f64> = va.iter().map(|&k| wf.eps_alpha[k]).collect();
    let (no, nv) = (oa.len(), va.len());
    if wf.reference == Reference::Rhf {
        check_budget(estimate_bytes(n, no, nv, no, nv), MP2_MEMORY_BYTES)?;
        let h = ket_half(&engine, basis, &ca_o, &ca_v);
        let g = bra_half(&h, &ca_o, &ca_v, no, nv);
        return closed_shell(&g, &ea_o, &ea_v);
    }
    let (ob, vb) = split(&wf.occ_beta);
    let cb_o = columns(&wf.c_beta, &ob);
    let cb_v = columns(&wf.c_beta, &vb);
    let eb_o: Vec<f64> = ob.iter().map(|&k| wf.eps_beta[k]).collect();
    let eb_v: Vec<f64> = vb.iter().map(|&k| wf.eps_beta[k]).collect();
    let (nob, nvb) = (ob.len(), vb.len());
    check_budget(
        estimate_bytes(n, no, nv, no, nv) + estimate_bytes(n, no.max(nob), nv.max(nvb), nob, nvb),
        MP2_MEMORY_BYTES,
    )?;
    let ha = ket_half(&engine, basis, &ca_o, &ca_v);
    let gaa = bra_half(&ha, &ca_o, &ca_v, no, nv);
    drop(ha);
    let hb = ket_half(&engine, basis, &cb_o, &cb_v);
    let gbb = bra_half(&hb, &cb_o, &cb_v, nob, nvb);
    let gab = bra_half(&hb, &ca_o, &ca_v, nob, nvb);
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
mod tests {
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
