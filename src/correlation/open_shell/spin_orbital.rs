//! The spin-orbital form of the open-shell coupled-cluster reference: every index runs over
//! α and β spin orbitals, and the antisymmetrized blocks ⟨pq||rs⟩ are held whole (a v⁴
//! block 16× the spatial one). Compiled for tests only: it feeds ccsd.rs and triples.rs,
//! the independent check of the spin-blocked code (spin_system.rs, uccsd.rs, utriples.rs).
//! The shared parts (orbital selection, Fock, semicanonical rotation, factors) are in
//! reference.rs.
//!
//! Memory (f64 words; m_σ orbitals kept per spin, N_Q factors, o and v active occupied and
//! virtual spin orbitals): factors N_Q (m_α² + m_β²) + N_Q (o+v)², the blocks o⁴ + o³v +
//! 2 o²v² + o v³ + v⁴, and while the largest block is antisymmetrized one more copy of it
//! (max(v⁴, o v³)).

use bandcast_linalg::{MatMut, MatRef};
use rayon::prelude::*;

use super::reference::{prepare, Prepared, Selection};
use crate::basis::BasisSet;
use crate::correlation::tensor::{par_gemm, Tensor};
use crate::correlation::two_electron::Resolved;
use crate::scf::Wavefunction;
use crate::{Error, Result};

/// Fock blocks and antisymmetrized integrals over the active spin orbitals.
#[derive(Debug, Clone)]
pub struct SpinOrbitalSystem {
    pub nocc: usize,
    pub nvir: usize,
    /// Spin (0 α, 1 β) of each active occupied and virtual spin orbital.
    pub spin_occ: Vec<u8>,
    pub spin_vir: Vec<u8>,
    pub foo: Tensor,
    pub fov: Tensor,
    pub fvv: Tensor,
    /// ⟨ij||kl⟩ [i,j,k,l]
    pub oooo: Tensor,
    /// ⟨ij||ka⟩ [i,j,k,a]
    pub ooov: Tensor,
    /// ⟨ij||ab⟩ [i,j,a,b]
    pub oovv: Tensor,
    /// ⟨ia||jb⟩ [i,a,j,b]
    pub ovov: Tensor,
    /// ⟨ia||bc⟩ [i,a,b,c]
    pub ovvv: Tensor,
    /// ⟨ab||cd⟩ [a,b,c,d]
    pub vvvv: Tensor,
    /// Whether the orbitals were rotated to semicanonical form (ROHF).
    pub semicanonical: bool,
    /// Electronic energy of the determinant, ½ Σ_i (h_ii + f_ii) over every occupied spin
    /// orbital, when the Fock matrix was built from the factors (ROHF).
    pub e_determinant_electronic: Option<f64>,
}

/// Words the reference stage holds at its peak (see the module text).
pub fn peak_words(naux: usize, m: [usize; 2], o: usize, v: usize) -> f64 {
    let (nq, o, v) = (naux as f64, o as f64, v as f64);
    let fac = nq * ((m[0] * m[0] + m[1] * m[1]) as f64) + nq * (o + v) * (o + v);
    let blocks = o.powi(4) + o.powi(3) * v + 2.0 * o * o * v * v + o * v.powi(3) + v.powi(4);
    fac + blocks + v.powi(4).max(o * v.powi(3))
}

/// Build the spin-orbital system for `wfn` (UHF or ROHF; an RHF wavefunction is treated
/// as UHF with equal spins).
pub fn build(
    basis: &BasisSet,
    h_ao: &bandcast_linalg::Mat<f64>,
    wfn: &Wavefunction,
    sel: &Selection,
    how: &Resolved,
    max_cholesky_vectors: usize,
    log: &mut dyn FnMut(&str),
) -> Result<(SpinOrbitalSystem, String)> {
    let Prepared {
        fac,
        fock,
        e_det,
        rohf,
        note,
    } = prepare(basis, h_ao, wfn, sel, how, max_cholesky_vectors, log)?;
    // Active spin orbitals: (spin, index within that spin's kept list).
    let mut occ_so = Vec::new();
    let mut vir_so = Vec::new();
    for s in 0..2 {
        let nf = sel.n_frozen[s];
        if nf > fac[s].nocc {
            return Err(Error::input(format!(
                "{nf} frozen orbitals requested but spin {} has only {} occupied",
                if s == 0 { "α" } else { "β" },
                fac[s].nocc
            )));
        }
        occ_so.extend((nf..fac[s].nocc).map(|p| (s, p)));
    }
    for s in 0..2 {
        vir_so.extend((fac[s].nocc..fac[s].m).map(|p| (s, p)));
    }
    let (o, v) = (occ_so.len(), vir_so.len());
    if o == 0 || v == 0 {
        return Err(Error::input(
            "coupled cluster needs at least one correlated occupied and one virtual orbital",
        ));
    }
    let fget = |a: (usize, usize), b: (usize, usize)| -> f64 {
        if a.0 != b.0 {
            0.0
        } else {
            fock[a.0][a.1 * fac[a.0].m + b.1]
        }
    };
    let foo = Tensor::from_fn(&[o, o], |x| fget(occ_so[x[0]], occ_so[x[1]]));
    let fov = Tensor::from_fn(&[o, v], |x| fget(occ_so[x[0]], vir_so[x[1]]));
    let fvv = Tensor::from_fn(&[v, v], |x| fget(vir_so[x[0]], vir_so[x[1]]));
    // Spin-orbital factors [Q][P][R] over the active list (occupied then virtual).
    let all_so: Vec<(usize, usize)> = occ_so.iter().chain(&vir_so).copied().collect();
    let nso = all_so.len();
    let naux = fac[0].naux;
    let mut bso = vec![0.0; naux * nso * nso];
    bso.par_chunks_mut(nso * nso)
        .enumerate()
        .for_each(|(q, bq)| {
            for (pp, &(sp, p)) in all_so.iter().enumerate() {
                let f = &fac[sp];
                for (rr, &(sr, r)) in all_so.iter().enumerate() {
                    if sp == sr {
                        bq[pp * nso + rr] = f.b[q * f.m * f.m + p * f.m + r];
                    }
                }
            }
        });
    drop(fac);
    let sys = Blocks {
        naux,
        nso,
        o,
        b: &bso,
    };
    let so = SpinOrbitalSystem {
        nocc: o,
        nvir: v,
        spin_occ: occ_so.iter().map(|x| x.0 as u8).collect(),
        spin_vir: vir_so.iter().map(|x| x.0 as u8).collect(),
        foo,
        fov,
        fvv,
        oooo: sys.antisym([O, O, O, O]),
        ooov: sys.antisym([O, O, O, V]),
        oovv: sys.antisym([O, O, V, V]),
        ovov: sys.antisym([O, V, O, V]),
        ovvv: sys.antisym([O, V, V, V]),
        vvvv: sys.antisym([V, V, V, V]),
        semicanonical: rohf,
        e_determinant_electronic: e_det,
    };
    Ok((so, note))
}

const O: bool = false;
const V: bool = true;

struct Blocks<'a> {
    naux: usize,
    nso: usize,
    o: usize,
    b: &'a [f64],
}

impl Blocks<'_> {
    fn range(&self, vir: bool) -> (usize, usize) {
        if vir {
            (self.o, self.nso)
        } else {
            (0, self.o)
        }
    }

    /// (pq|rs) for p, q, r, s in the given spaces, as [p,q,r,s].
    fn chem(&self, x: [bool; 4]) -> Tensor {
        let r: Vec<(usize, usize)> = x.iter().map(|&v| self.range(v)).collect();
        let d: Vec<usize> = r.iter().map(|(a, b)| b - a).collect();
        let slab = |p: (usize, usize), q: (usize, usize)| -> Vec<f64> {
            let (np, nq) = (p.1 - p.0, q.1 - q.0);
            let mut out = vec![0.0; self.naux * np * nq];
            out.par_chunks_mut(np * nq).enumerate().for_each(|(k, o)| {
                let bq = &self.b[k * self.nso * self.nso..];
                for a in 0..np {
                    o[a * nq..(a + 1) * nq].copy_from_slice(
                        &bq[(p.0 + a) * self.nso + q.0..(p.0 + a) * self.nso + q.1],
                    );
                }
            });
            out
        };
        let left = slab(r[0], r[1]);
        let right = slab(r[2], r[3]);
        let (m, nn) = (d[0] * d[1], d[2] * d[3]);
        let mut out = vec![0.0; m * nn];
        if m > 0 && nn > 0 && self.naux > 0 {
            let l = MatRef::from_row_major_slice(&left, self.naux, m);
            let rr = MatRef::from_row_major_slice(&right, self.naux, nn);
            let c = MatMut::from_row_major_slice_mut(&mut out, m, nn);
            par_gemm(c, false, l.transpose(), rr, 1.0);
        }
        Tensor {
            shape: d,
            data: out,
        }
    }

    /// ⟨pq||rs⟩ = (pr|qs) − (ps|qr) for p, q, r, s in the given spaces, as [p,q,r,s].
    fn antisym(&self, x: [bool; 4]) -> Tensor {
        let g1 = self.chem([x[0], x[2], x[1], x[3]]);
        let g2 = if x[2] == x[3] {
            None
        } else {
            Some(self.chem([x[0], x[3], x[1], x[2]]))
        };
        let g2r = g2.as_ref().unwrap_or(&g1);
        let d = [g1.shape[0], g1.shape[2], g1.shape[1], g1.shape[3]];
        let (s1, s2) = (&g1.shape, &g2r.shape);
        let mut out = vec![0.0; d.iter().product()];
        out.par_chunks_mut(d[1] * d[2] * d[3])
            .enumerate()
            .for_each(|(p, op)| {
                for q in 0..d[1] {
                    for r in 0..d[2] {
                        for s in 0..d[3] {
                            // g1[p,r,q,s] − g2[p,s,q,r]
                            let a = g1.data[((p * s1[1] + r) * s1[2] + q) * s1[3] + s];
                            let b = g2r.data[((p * s2[1] + s) * s2[2] + q) * s2[3] + r];
                            op[(q * d[2] + r) * d[3] + s] = a - b;
                        }
                    }
                }
            });
        Tensor {
            shape: d.to_vec(),
            data: out,
        }
    }
}
