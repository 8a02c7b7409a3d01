//! Two- and three-centre Coulomb integrals for density fitting (resolution of the identity):
//! (P|Q) = ∫∫ χ_P(r₁) χ_Q(r₂) / r₁₂ and (P|μν) = ∫∫ χ_P(r₁) φ_μ(r₂) φ_ν(r₂) / r₁₂.
//!
//! Method: the four-centre engine (`eri`) with the missing centre replaced by a "unit" s
//! shell, exponent 0 and raw coefficient 1, so that (P 1|Q 1) = (P|Q) and (P 1|μν) = (P|μν)
//! (common practice). Auxiliary shells are normalised like orbital shells (each auxiliary
//! function has unit overlap norm).
//!
//! Layout of the three-centre array: `b[(P · n + μ) · n + ν]` with P over auxiliary functions
//! (slowest) and μ, ν over orbital AOs, i.e. an n_aux × n² row-major matrix whose rows are
//! symmetric n × n matrices. Memory 8 · n_aux · n² bytes: see [`eri3c_bytes`].

use crate::basis::normalize::contracted_coefficients;
use crate::basis::{BasisSet, Shell};
use crate::integrals::eri::EriEngine;
use bandcast_linalg::Mat;
use rayon::prelude::*;

fn unit_shell() -> Shell {
    Shell {
        l: 0,
        pure: false,
        center: [0.0; 3],
        atom: usize::MAX,
        exponents: vec![0.0],
        coefficients: vec![1.0],
    }
}

/// Engine for (P|Q) and (P|μν) over an auxiliary and (optionally) an orbital basis.
/// Sync; precomputes the pair data (P, 1) and (μ, ν) only.
pub struct DfEngine {
    engine: EriEngine,
    n_aux_shells: usize,
    n_orb_shells: usize,
    unit: usize,
    aux_offsets: Vec<usize>,
    orb_offsets: Vec<usize>,
    n_aux: usize,
    n_orb: usize,
}

impl DfEngine {
    /// `orbital` may be None for two-centre integrals only.
    pub fn new(aux: &BasisSet, orbital: Option<&BasisSet>) -> Self {
        let mut shells: Vec<Shell> = aux.shells.clone();
        let na = shells.len();
        let mut coefs: Vec<Vec<f64>> = aux.shells.iter().map(contracted_coefficients).collect();
        let (no, orb_offsets, n_orb) = match orbital {
            Some(b) => {
                shells.extend(b.shells.iter().cloned());
                coefs.extend(b.shells.iter().map(contracted_coefficients));
                (b.shells.len(), b.offsets.clone(), b.n_basis)
            }
            None => (0, Vec::new(), 0),
        };
        let unit = shells.len();
        shells.push(unit_shell());
        coefs.push(vec![1.0]);
        // pairs kept: (unit, P) for auxiliary P; (μ, ν) within the orbital basis
        let wanted = move |a: usize, b: usize| {
            (a == unit && b < na) || (a >= na && a < na + no && b >= na && b < na + no)
        };
        let engine = EriEngine::build(&shells, &coefs, &wanted);
        DfEngine {
            engine,
            n_aux_shells: na,
            n_orb_shells: no,
            unit,
            aux_offsets: aux.offsets.clone(),
            orb_offsets,
            n_aux: aux.n_basis,
            n_orb,
        }
    }

    /// (P|Q) for auxiliary shells p, q into `out` (n_p × n_q, row-major).
    pub fn two_centre(&self, p: usize, q: usize, out: &mut Vec<f64>) {
        self.engine.shell_quartet(p, self.unit, q, self.unit, out);
    }

    /// (P|μν) for auxiliary shell p and orbital shells a, b into `out` (n_p × n_a × n_b).
    pub fn three_centre(&self, p: usize, a: usize, b: usize, out: &mut Vec<f64>) {
        let o = self.n_aux_shells;
        self.engine.shell_quartet(p, self.unit, o + a, o + b, out);
    }

    /// Schwarz-type bound sqrt((P|P)) for auxiliary shell p.
    pub fn aux_bound(&self, p: usize) -> f64 {
        self.engine.schwarz()[p * self.engine.n_shells() + self.unit]
    }

    /// Schwarz bound sqrt(max (μν|μν)) for orbital shells a, b.
    pub fn pair_bound(&self, a: usize, b: usize) -> f64 {
        let o = self.n_aux_shells;
        self.engine.schwarz()[(o + a) * self.engine.n_shells() + o + b]
    }

    pub fn n_aux(&self) -> usize {
        self.n_aux
    }
    pub fn n_orbital(&self) -> usize {
        self.n_orb
    }
    pub fn n_aux_shells(&self) -> usize {
        self.n_aux_shells
    }
    pub fn n_orbital_shells(&self) -> usize {
        self.n_orb_shells
    }
}

/// The Coulomb metric (P|Q) over the auxiliary basis (symmetric, positive definite).
pub fn eri2c(aux: &BasisSet) -> Mat<f64> {
    let e = DfEngine::new(aux, None);
    let ns = aux.shells.len();
    let pairs: Vec<(usize, usize)> = (0..ns).flat_map(|a| (0..=a).map(move |b| (a, b))).collect();
    let blocks: Vec<Vec<f64>> = pairs
        .par_iter()
        .map(|&(p, q)| {
            let mut out = Vec::new();
            e.two_centre(p, q, &mut out);
            out
        })
        .collect();
    let mut m = Mat::zeros(aux.n_basis, aux.n_basis);
    for (&(p, q), blk) in pairs.iter().zip(&blocks) {
        let (np, nq) = (aux.shells[p].n_functions(), aux.shells[q].n_functions());
        for i in 0..np {
            for j in 0..nq {
                let v = blk[i * nq + j];
                m[(e.aux_offsets[p] + i, e.aux_offsets[q] + j)] = v;
                m[(e.aux_offsets[q] + j, e.aux_offsets[p] + i)] = v;
            }
        }
    }
    m
}

/// Bytes needed by [`eri3c`].
pub fn eri3c_bytes(aux: &BasisSet, basis: &BasisSet) -> usize {
    8 * aux.n_basis * basis.n_basis * basis.n_basis
}

/// Three-centre integrals (P|μν), layout `b[(P · n + μ) · n + ν]` (see the module doc),
/// computed in parallel over auxiliary shells with (μν) pairs screened at 1e-14 by
/// sqrt((P|P)) · sqrt((μν|μν)).
pub fn eri3c(aux: &BasisSet, basis: &BasisSet) -> Vec<f64> {
    let e = DfEngine::new(aux, Some(basis));
    eri3c_with(&e, aux, basis)
}

/// As [`eri3c`] with an existing engine.
pub fn eri3c_with(e: &DfEngine, aux: &BasisSet, basis: &BasisSet) -> Vec<f64> {
    let n = basis.n_basis;
    let nsb = basis.shells.len();
    let mut b = vec![0.0; aux.n_basis * n * n];
    let pairs: Vec<(usize, usize)> = (0..nsb)
        .flat_map(|a| (0..=a).map(move |c| (a, c)))
        .collect();
    // split the output into the row blocks of each auxiliary shell
    let mut chunks: Vec<(usize, &mut [f64])> = Vec::with_capacity(aux.shells.len());
    let mut rest: &mut [f64] = &mut b;
    for (p, s) in aux.shells.iter().enumerate() {
        let (head, tail) = rest.split_at_mut(s.n_functions() * n * n);
        chunks.push((p, head));
        rest = tail;
    }
    chunks.into_par_iter().for_each(|(p, rows)| {
        let np = aux.shells[p].n_functions();
        let bp = e.aux_bound(p);
        let mut out = Vec::new();
        for &(a, c) in &pairs {
            if bp * e.pair_bound(a, c) < 1e-14 {
                continue;
            }
            e.three_centre(p, a, c, &mut out);
            let (na, nc) = (basis.shells[a].n_functions(), basis.shells[c].n_functions());
            let (oa, oc) = (e.orb_offsets[a], e.orb_offsets[c]);
            for i in 0..np {
                for x in 0..na {
                    for y in 0..nc {
                        let v = out[(i * na + x) * nc + y];
                        rows[(i * n + oa + x) * n + oc + y] = v;
                        rows[(i * n + oc + y) * n + oa + x] = v;
                    }
                }
            }
        }
    });
    b
}
