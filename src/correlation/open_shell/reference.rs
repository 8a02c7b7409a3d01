//! The reference of the open-shell coupled-cluster methods: which orbitals are correlated,
//! the Fock matrix over them, and each spin's three-index factors B^Q_pq (two_electron.rs),
//! from which spin_system.rs builds the spin-blocked integrals (and, in tests,
//! spin_orbital.rs the spin-orbital ⟨pq||rs⟩ = ⟨pq|rs⟩ − ⟨pq|sr⟩ blocks).
//!
//! - UHF (also a UHF state held by MOM): the converged orbitals diagonalize each spin's Fock
//!   matrix, so f = diag(ε) exactly, as the closed-shell code uses it.
//! - ROHF: the α and β Fock matrices of the ROHF determinant are not diagonal in its
//!   orbitals. They are built here, f^σ = h + J[Pα + Pβ] − K[Pσ], from the same factors as
//!   the integrals, and the occupied–occupied and virtual–virtual blocks of each spin are
//!   diagonalized (semicanonical orbitals; Watts, Gauss & Bartlett, J. Chem. Phys. 98
//!   (1993) 8718). The occupied–virtual block f_ia stays and enters CCSD and (T).
//! - Frozen core: the `n_frozen` lowest occupied orbitals of each spin (after the
//!   semicanonical rotation) are left uncorrelated; their effect stays in f.
//! - Excluded virtuals: spatial virtual orbitals of one spin removed from the correlation
//!   space (every amplitude into them is zero). core_level's ΔCC no longer uses this for
//!   its hole: it keeps the hole and projects the amplitudes (core_hole.rs), since removing
//!   the orbital also drops the amplitudes that move the hole to the other spin; the tests
//!   compare both.

use bandcast_linalg::{eigh, MatRef};
use rayon::prelude::*;

use crate::basis::BasisSet;
use crate::correlation::integrals::MoFactors;
use crate::correlation::two_electron::{self, Resolved};
use crate::scf::{Reference, Wavefunction};
use crate::{Error, Result};

/// Which orbitals to correlate.
#[derive(Debug, Clone, Default)]
pub struct Selection {
    /// Lowest occupied orbitals of each spin left uncorrelated.
    pub n_frozen: [usize; 2],
    /// MO columns (of `c_alpha` / `c_beta`) of unoccupied orbitals left out of the virtual
    /// space, per spin.
    pub excluded_virtuals: [Vec<usize>; 2],
}

/// Per-spin orbital lists: (occupied columns, kept virtual columns), each by ascending ε.
pub fn orbital_lists(wfn: &Wavefunction, sel: &Selection) -> [(Vec<usize>, Vec<usize>); 2] {
    let lists = |occ: &[f64], eps: &[f64], excl: &[usize]| {
        let mut o: Vec<usize> = (0..occ.len()).filter(|&p| occ[p] > 0.5).collect();
        let mut v: Vec<usize> = (0..occ.len())
            .filter(|&p| occ[p] <= 0.5 && !excl.contains(&p))
            .collect();
        o.sort_by(|&a, &b| eps[a].total_cmp(&eps[b]));
        v.sort_by(|&a, &b| eps[a].total_cmp(&eps[b]));
        (o, v)
    };
    [
        lists(&wfn.occ_alpha, &wfn.eps_alpha, &sel.excluded_virtuals[0]),
        lists(&wfn.occ_beta, &wfn.eps_beta, &sel.excluded_virtuals[1]),
    ]
}

/// Per-spin factors over [occupied (all), kept virtual] as a dense [Q][p][q] array.
pub(super) struct SpinFactors {
    pub(super) naux: usize,
    pub(super) m: usize,
    pub(super) nocc: usize,
    pub(super) b: Vec<f64>,
}

fn columns(c: &bandcast_linalg::Mat<f64>, cols: &[usize]) -> Vec<f64> {
    let n = c.nrows();
    let mut out = vec![0.0; n * cols.len()];
    for mu in 0..n {
        for (k, &p) in cols.iter().enumerate() {
            out[mu * cols.len() + k] = c[(mu, p)];
        }
    }
    out
}

fn dense(f: &MoFactors) -> SpinFactors {
    let m = f.nocc + f.nvir;
    let mut b = vec![0.0; f.naux * m * m];
    b.par_chunks_mut(m * m).enumerate().for_each(|(q, bq)| {
        for p in 0..m {
            for r in 0..m {
                bq[p * m + r] = f.get(q, p, r);
            }
        }
    });
    SpinFactors {
        naux: f.naux,
        m,
        nocc: f.nocc,
        b,
    }
}

impl SpinFactors {
    /// B ← Uᵀ B U for every Q (U m × m, row-major).
    fn rotate(&mut self, u: &[f64]) {
        let m = self.m;
        self.b.par_chunks_mut(m * m).for_each(|bq| {
            let mut t = vec![0.0; m * m];
            // t = Uᵀ B
            for k in 0..m {
                for p in 0..m {
                    let ukp = u[k * m + p];
                    if ukp == 0.0 {
                        continue;
                    }
                    for r in 0..m {
                        t[p * m + r] += ukp * bq[k * m + r];
                    }
                }
            }
            // B = t U
            bq.iter_mut().for_each(|x| *x = 0.0);
            for p in 0..m {
                for k in 0..m {
                    let tpk = t[p * m + k];
                    if tpk == 0.0 {
                        continue;
                    }
                    for r in 0..m {
                        bq[p * m + r] += tpk * u[k * m + r];
                    }
                }
            }
        });
    }
}

/// Fock matrices of both spins over each spin's [occupied, kept virtual] orbitals,
/// built from the core Hamiltonian and the factors.
fn fock_from_factors(
    h_ao: &bandcast_linalg::Mat<f64>,
    coef: [&[f64]; 2],
    n: usize,
    fac: [&SpinFactors; 2],
) -> ([Vec<f64>; 2], f64) {
    let naux = fac[0].naux;
    let mut e = 0.0;
    // Coulomb: d_Q = Σ_σ Σ_m B^σ_Q,mm
    let mut d = vec![0.0; naux];
    for f in fac {
        for (q, dq) in d.iter_mut().enumerate() {
            for i in 0..f.nocc {
                *dq += f.b[q * f.m * f.m + i * f.m + i];
            }
        }
    }
    let mut out = [Vec::new(), Vec::new()];
    for s in 0..2 {
        let f = fac[s];
        let m = f.m;
        // h in this spin's orbitals
        let c = coef[s];
        let mut hm = vec![0.0; m * m];
        let mut hc = vec![0.0; n * m];
        for mu in 0..n {
            for nu in 0..n {
                let h = h_ao[(mu, nu)];
                for p in 0..m {
                    hc[mu * m + p] += h * c[nu * m + p];
                }
            }
        }
        for mu in 0..n {
            for p in 0..m {
                let cmp = c[mu * m + p];
                for r in 0..m {
                    hm[p * m + r] += cmp * hc[mu * m + r];
                }
            }
        }
        for i in 0..f.nocc {
            e += 0.5 * hm[i * m + i];
        }
        for q in 0..naux {
            let bq = &f.b[q * m * m..(q + 1) * m * m];
            for p in 0..m {
                for r in 0..m {
                    let mut k = 0.0;
                    for i in 0..f.nocc {
                        k += bq[p * m + i] * bq[i * m + r];
                    }
                    hm[p * m + r] += d[q] * bq[p * m + r] - k;
                }
            }
        }
        for i in 0..f.nocc {
            e += 0.5 * hm[i * m + i];
        }
        out[s] = hm;
    }
    (out, e)
}

/// Rotation diagonalizing the occupied–occupied and virtual–virtual blocks of `f` (m × m);
/// returns (U, new diagonal).
fn semicanonical(f: &[f64], m: usize, o: usize) -> (Vec<f64>, Vec<f64>) {
    let mut u = vec![0.0; m * m];
    let mut diag = vec![0.0; m];
    for (lo, hi) in [(0, o), (o, m)] {
        let k = hi - lo;
        if k == 0 {
            continue;
        }
        let mut blk = vec![0.0; k * k];
        for p in 0..k {
            for r in 0..k {
                blk[p * k + r] = f[(lo + p) * m + lo + r];
            }
        }
        let (w, vecs) = eigh(MatRef::from_row_major_slice(&blk, k, k));
        for p in 0..k {
            diag[lo + p] = w[p];
            for r in 0..k {
                u[(lo + r) * m + lo + p] = vecs[(r, p)];
            }
        }
    }
    (u, diag)
}

/// Per-spin factors and Fock matrices over each spin's [occupied (all), kept virtual]
/// orbitals (semicanonical for ROHF), before the frozen core is removed.
pub(super) struct Prepared {
    pub(super) fac: Vec<SpinFactors>,
    pub(super) fock: Vec<Vec<f64>>,
    pub(super) e_det: Option<f64>,
    pub(super) rohf: bool,
    pub(super) note: String,
}

/// Factors, Fock matrices and (ROHF) semicanonical rotation, shared by the spin-orbital
/// and the spin-blocked systems.
pub(super) fn prepare(
    basis: &BasisSet,
    h_ao: &bandcast_linalg::Mat<f64>,
    wfn: &Wavefunction,
    sel: &Selection,
    how: &Resolved,
    max_cholesky_vectors: usize,
    log: &mut dyn FnMut(&str),
) -> Result<Prepared> {
    let n = basis.n_basis;
    let lists = orbital_lists(wfn, sel);
    let mut coefs = Vec::new();
    let mut cols = Vec::new();
    for (s, (occ, vir)) in lists.iter().enumerate() {
        let c = if s == 0 { &wfn.c_alpha } else { &wfn.c_beta };
        cols.push((columns(c, occ), columns(c, vir)));
        let all: Vec<usize> = occ.iter().chain(vir).copied().collect();
        coefs.push(columns(c, &all));
    }
    let (factors, note) = two_electron::mo_factors_both_spins(
        how,
        basis,
        [0, 1].map(|s| {
            (
                &cols[s].0[..],
                lists[s].0.len(),
                &cols[s].1[..],
                lists[s].1.len(),
            )
        }),
        max_cholesky_vectors,
        log,
    )?;
    drop(cols);
    // one spin at a time, so at most one MO-factor copy is alive beside the dense ones
    let [fa, fb] = factors;
    let da = dense(&fa);
    drop(fa);
    let db = dense(&fb);
    drop(fb);
    let mut fac = vec![da, db];
    let rohf = wfn.reference == Reference::Rohf;
    // Fock over each spin's kept orbitals
    let mut fock: Vec<Vec<f64>> = Vec::new();
    let mut e_det = None;
    if rohf {
        let (f, e) = fock_from_factors(h_ao, [&coefs[0], &coefs[1]], n, [&fac[0], &fac[1]]);
        e_det = Some(e);
        for (s, fs) in f.into_iter().enumerate() {
            let m = fac[s].m;
            let (u, _) = semicanonical(&fs, m, fac[s].nocc);
            fac[s].rotate(&u);
            // f' = Uᵀ f U
            let mut t = vec![0.0; m * m];
            for p in 0..m {
                for r in 0..m {
                    t[p * m + r] = (0..m).map(|k| u[k * m + p] * fs[k * m + r]).sum();
                }
            }
            let mut fr = vec![0.0; m * m];
            for p in 0..m {
                for r in 0..m {
                    fr[p * m + r] = (0..m).map(|k| t[p * m + k] * u[k * m + r]).sum();
                }
            }
            fock.push(fr);
        }
    } else {
        for (s, (occ, vir)) in lists.iter().enumerate() {
            let eps = if s == 0 {
                &wfn.eps_alpha
            } else {
                &wfn.eps_beta
            };
            let all: Vec<usize> = occ.iter().chain(vir).copied().collect();
            let m = all.len();
            let mut f = vec![0.0; m * m];
            for (k, &p) in all.iter().enumerate() {
                f[k * m + k] = eps[p];
            }
            fock.push(f);
        }
    }
    for s in 0..2 {
        let nf = sel.n_frozen[s];
        if nf > fac[s].nocc {
            return Err(Error::input(format!(
                "{nf} frozen orbitals requested but spin {} has only {} occupied",
                if s == 0 { "α" } else { "β" },
                fac[s].nocc
            )));
        }
    }
    Ok(Prepared {
        fac,
        fock,
        e_det,
        rohf,
        note,
    })
}
