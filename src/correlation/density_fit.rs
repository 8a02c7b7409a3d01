//! Three-index MO factors from auxiliary-basis density fitting (resolution of the identity,
//! RI): (pq|rs) ≈ Σ_PQ (pq|P) [J⁻¹]_PQ (Q|rs) with the Coulomb metric J_PQ = (P|Q)
//! (Whitten, J. Chem. Phys. 58 (1973) 4496; Vahtras, Almlöf & Feyereisen, Chem. Phys. Lett.
//! 213 (1993) 514; for correlated methods Feyereisen, Fitzgerald & Komornicki, Chem. Phys.
//! Lett. 208 (1993) 359 and Weigend & Häser, Theor. Chem. Acc. 97 (1997) 331).
//!
//! With J = L Lᵀ (Cholesky), the factors are B^P_pq = Σ_Q [L⁻¹]_PQ (Q|pq), so that
//! (pq|rs) ≈ Σ_P B^P_pq B^P_rs, the same form the Cholesky route (cholesky.rs) produces.
//! The fitting sets made for each orbital set (def2-…-RIFIT, cc-pVXZ-RIFIT) keep the error
//! of correlation energies near 1e-4 Eh per atom and of energy differences such as
//! ionization energies at the meV level (Weigend, Häser, Patzelt & Ahlrichs, Chem. Phys.
//! Lett. 294 (1998) 143; common practice).
//!
//! The AO three-centre integrals (P|μν) are never held for all P at once: each auxiliary
//! shell's n_P × n × n block is computed (`DfEngine::three_centre`) and transformed to the
//! active MOs at once, (P|pq) = Σ_μν C_μp (P|μν) C_νq, by two matrix products.

use rayon::prelude::*;

use bandcast_linalg::{cholesky_lower, gemm, solve_lower_in_place, MatMut, MatRef, Par};

use crate::basis::BasisSet;
use crate::integrals::{eri2c, DfEngine};
use crate::{Error, Result};

use super::integrals::MoFactors;

/// Density-fitted factors over the active orbitals. `c_occ` (n × o) and `c_vir` (n × v) are
/// row-major with MOs as columns.
pub fn mo_factors(
    basis: &BasisSet,
    aux: &BasisSet,
    c_occ: &[f64],
    o: usize,
    c_vir: &[f64],
    v: usize,
) -> Result<MoFactors> {
    let n = basis.n_basis;
    let naux = aux.n_basis;
    let na = o + v;
    // C_act = [C_occ C_vir], n × na row-major
    let mut cact = vec![0.0; n * na];
    for mu in 0..n {
        cact[mu * na..mu * na + o].copy_from_slice(&c_occ[mu * o..(mu + 1) * o]);
        cact[mu * na + o..(mu + 1) * na].copy_from_slice(&c_vir[mu * v..(mu + 1) * v]);
    }
    let engine = DfEngine::new(aux, Some(basis));
    let mut b_oo = vec![0.0; naux * o * o];
    let mut b_ov = vec![0.0; naux * o * v];
    let mut b_vv = vec![0.0; naux * v * v];
    // Split the outputs into the rows of each auxiliary shell.
    let mut tasks: Vec<(usize, &mut [f64], &mut [f64], &mut [f64])> = Vec::new();
    {
        let (mut roo, mut rov, mut rvv) = (&mut b_oo[..], &mut b_ov[..], &mut b_vv[..]);
        for (p, s) in aux.shells.iter().enumerate() {
            let np = s.n_functions();
            let (hoo, too) = roo.split_at_mut(np * o * o);
            let (hov, tov) = rov.split_at_mut(np * o * v);
            let (hvv, tvv) = rvv.split_at_mut(np * v * v);
            tasks.push((p, hoo, hov, hvv));
            roo = too;
            rov = tov;
            rvv = tvv;
        }
    }
    let nsb = basis.shells.len();
    let pairs: Vec<(usize, usize)> = (0..nsb)
        .flat_map(|a| (0..=a).map(move |c| (a, c)))
        .collect();
    tasks.into_par_iter().for_each(|(p, boo, bov, bvv)| {
        let np = aux.shells[p].n_functions();
        let bp = engine.aux_bound(p);
        let mut ao = vec![0.0; np * n * n];
        let mut out = Vec::new();
        for &(a, c) in &pairs {
            if bp * engine.pair_bound(a, c) < 1e-14 {
                continue;
            }
            engine.three_centre(p, a, c, &mut out);
            let (sa, sc) = (&basis.shells[a], &basis.shells[c]);
            let (nfa, nfc) = (sa.n_functions(), sc.n_functions());
            let (oa, oc) = (basis.offsets[a], basis.offsets[c]);
            for i in 0..np {
                for x in 0..nfa {
                    for y in 0..nfc {
                        let val = out[(i * nfa + x) * nfc + y];
                        ao[(i * n + oa + x) * n + oc + y] = val;
                        ao[(i * n + oc + y) * n + oa + x] = val;
                    }
                }
            }
        }
        // half transform: H[(P,μ)][q] = Σ_ν (P|μν) C_νq
        let mut half = vec![0.0; np * n * na];
        let cm = MatRef::from_row_major_slice(&cact, n, na);
        gemm(
            MatMut::from_row_major_slice_mut(&mut half, np * n, na),
            false,
            MatRef::from_row_major_slice(&ao, np * n, n),
            false,
            cm,
            false,
            1.0,
            Par::Seq,
        );
        drop(ao);
        let mut full = vec![0.0; na * na];
        for i in 0..np {
            gemm(
                MatMut::from_row_major_slice_mut(&mut full, na, na),
                false,
                cm,
                true,
                MatRef::from_row_major_slice(&half[i * n * na..(i + 1) * n * na], n, na),
                false,
                1.0,
                Par::Seq,
            );
            for r in 0..o {
                boo[(i * o + r) * o..(i * o + r + 1) * o]
                    .copy_from_slice(&full[r * na..r * na + o]);
                bov[(i * o + r) * v..(i * o + r + 1) * v]
                    .copy_from_slice(&full[r * na + o..(r + 1) * na]);
            }
            for a in 0..v {
                bvv[(i * v + a) * v..(i * v + a + 1) * v]
                    .copy_from_slice(&full[(o + a) * na + o..(o + a + 1) * na]);
            }
        }
    });
    // B = L⁻¹ (P|pq), J = L Lᵀ.
    let metric = eri2c(aux);
    let l = cholesky_lower(metric.as_ref()).ok_or_else(|| {
        Error::computation(format!(
            "the Coulomb metric of the fitting set {} is not positive definite (near-linear \
             dependence among the auxiliary functions); use the Cholesky route instead",
            aux.name
        ))
    })?;
    for (b, w) in [(&mut b_oo, o * o), (&mut b_ov, o * v), (&mut b_vv, v * v)] {
        if w > 0 && naux > 0 {
            solve_lower_in_place(l.as_ref(), MatMut::from_row_major_slice_mut(b, naux, w));
        }
    }
    Ok(MoFactors {
        naux,
        nocc: o,
        nvir: v,
        b_oo,
        b_ov,
        b_vv,
    })
}

/// Words held at the peak of [`mo_factors`]: the factors, the metric and its factor, and
/// per thread one auxiliary shell's AO and half-transformed blocks (n_P ≤ 15).
pub fn peak_words(n: usize, naux: usize, o: usize, v: usize, threads: usize) -> f64 {
    let (n, naux, o, v) = (n as f64, naux as f64, o as f64, v as f64);
    naux * (o + v) * (o + v) + 2.0 * naux * naux + threads as f64 * 15.0 * (n * n + n * (o + v))
}
