//! Density-fitted J and K (resolution of the identity in the Coulomb metric: Vahtras, Almlöf
//! & Feyereisen, Chem. Phys. Lett. 213 (1993) 514; Weigend, Phys. Chem. Chem. Phys. 4 (2002)
//! 4285 for exchange):
//!
//!   (μν|λσ) ≈ Σ_Q B^Q_μν B^Q_λσ,   B^Q_μν = Σ_P [L⁻¹]_QP (P|μν),   (P|Q) = L Lᵀ,
//!
//! with an auxiliary basis {P} made for Coulomb and exchange fitting (default
//! def2-universal-JKFIT, Weigend, J. Comput. Chem. 29 (2008) 167).
//!
//! - J[D]_μν = Σ_Q B^Q_μν γ_Q with γ_Q = Σ_λσ B^Q_λσ D_λσ.
//! - K[D] = Σ_Q B^Q D B^Q. Each density is factorised, D = Σ_i s_i c_i c_iᵀ with s_i = ±1
//!   (eigen-decomposition; eigenvalues below 1e-13 of the largest dropped), so that
//!   K = Σ_Q Σ_i s_i (B^Q c_i)(B^Q c_i)ᵀ costs n_aux n² r multiply-adds twice for a density of
//!   rank r (the occupied count for an SCF density). The builder keeps no state between
//!   calls (no incremental builds: the factorised route does not profit from a small ΔD).
//!
//! Storage: B for μ ≥ ν only, row Q contiguous (n_aux · n(n+1)/2 doubles). Work is cut into
//! chunks that depend only on the sizes (fixed), run with dynamic scheduling, and summed in
//! chunk order (`schedule.rs`); every dense product inside a chunk is sequential. J and K are
//! therefore bit-for-bit the same on any number of threads.

use std::ops::Range;

use rayon::prelude::*;

use bandcast_linalg::{
    cholesky_lower_with, eigh_with, gemm, solve_lower_in_place_with, Mat, MatMut, MatRef, Par,
};

use super::schedule::{ordered_sum, Partial};
use super::{FockBuilder, Jk};
use crate::basis::BasisSet;
use crate::error::{Error, Result};
use crate::integrals::{eri2c, DfEngine};

/// Auxiliary functions per K chunk.
const AUX_PER_CHUNK: usize = 16;
/// Pair columns per chunk of the metric solve and of J.
const PAIRS_PER_CHUNK: usize = 2048;
/// (P|μν) blocks with sqrt((P|P)) · sqrt((μν|μν)) below this are not computed (zero).
const SCREEN_3C: f64 = 1e-14;

pub struct DfFock {
    n: usize,
    naux: usize,
    npair: usize,
    /// B^Q_μν, μ ≥ ν: b[Q · npair + μ(μ+1)/2 + ν].
    b: Vec<f64>,
    aux_name: String,
}

#[inline]
fn tri(mu: usize, nu: usize) -> usize {
    mu * (mu + 1) / 2 + nu
}

impl DfFock {
    /// Bytes of the fitted three-index tensor for `n` orbital and `naux` auxiliary functions.
    pub fn estimate_bytes(n: usize, naux: usize) -> usize {
        8 * naux * (n * (n + 1) / 2)
    }

    /// Three-centre integrals, metric, and B = L⁻¹ (P|μν); refuses with `Error::TooLarge`
    /// when B does not fit `budget` bytes.
    pub fn new(basis: &BasisSet, aux: &BasisSet, budget: usize) -> Result<Self> {
        let n = basis.n_basis;
        let naux = aux.n_basis;
        let npair = n * (n + 1) / 2;
        let need = Self::estimate_bytes(n, naux);
        if need > budget {
            return Err(Error::TooLarge(format!(
                "density fitting with {} needs {} for the three-index integrals, over \
                 the memory budget of {}",
                aux.name,
                crate::system::format_bytes(need as f64),
                crate::system::format_bytes(budget as f64)
            )));
        }
        let mut b = three_centre(basis, aux);
        let metric = eri2c(aux);
        match cholesky_lower_with(metric.as_ref(), Par::Seq) {
            Some(l) => solve_metric(&l, &mut b, naux, npair),
            None => {
                return Err(Error::computation(format!(
                    "the Coulomb metric of the fitting set {} is not positive definite on this \
                     molecule (nearly linearly dependent auxiliary functions); use the exact \
                     Fock builder",
                    aux.name
                )))
            }
        }
        Ok(DfFock {
            n,
            naux,
            npair,
            b,
            aux_name: aux.name.clone(),
        })
    }

    pub fn bytes(&self) -> usize {
        self.b.len() * 8
    }

    pub fn n_aux(&self) -> usize {
        self.naux
    }

    pub fn aux_name(&self) -> &str {
        &self.aux_name
    }

    /// γ_Q = Σ_λσ B^Q_λσ D_λσ for each Q (one dot product per row: order fixed).
    fn gamma(&self, d: &Mat<f64>) -> Vec<f64> {
        let n = self.n;
        let mut dp = vec![0.0; self.npair];
        for mu in 0..n {
            for nu in 0..mu {
                dp[tri(mu, nu)] = d[(mu, nu)] + d[(nu, mu)];
            }
            dp[tri(mu, mu)] = d[(mu, mu)];
        }
        self.b
            .par_chunks(self.npair)
            .map(|row| row.iter().zip(&dp).map(|(x, y)| x * y).sum())
            .collect()
    }

    /// J (packed, μ ≥ ν) = Σ_Q γ_Q B^Q, over fixed column chunks, Q in order.
    fn coulomb(&self, gamma: &[f64]) -> Mat<f64> {
        let (n, npair) = (self.n, self.npair);
        let mut jp = vec![0.0; npair];
        jp.par_chunks_mut(PAIRS_PER_CHUNK)
            .enumerate()
            .for_each(|(c, out)| {
                let c0 = c * PAIRS_PER_CHUNK;
                for (q, &g) in gamma.iter().enumerate() {
                    let row = &self.b[q * npair + c0..q * npair + c0 + out.len()];
                    out.iter_mut().zip(row).for_each(|(o, x)| *o += g * x);
                }
            });
        Mat::<f64>::from_fn(n, n, |i, j| jp[tri(i.max(j), i.min(j))])
    }

    /// K[D] = Σ_Q Σ_i s_i (B^Q c_i)(B^Q c_i)ᵀ with the signed factors of D.
    fn exchange(&self, d: &Mat<f64>) -> Mat<f64> {
        let n = self.n;
        let (plus, minus) = factorise(d);
        let chunks: Vec<Range<usize>> = (0..self.naux)
            .step_by(AUX_PER_CHUNK)
            .map(|q| q..(q + AUX_PER_CHUNK).min(self.naux))
            .collect();
        let total = ordered_sum(
            chunks.len(),
            || MatSum(Mat::zeros(n, n)),
            |k, acc| {
                let mut bq = Mat::<f64>::zeros(n, n);
                for (c, sign) in [(&plus, 1.0), (&minus, -1.0)] {
                    let r = c.ncols();
                    if r == 0 {
                        continue;
                    }
                    let range = chunks[k].clone();
                    let mut z = Mat::<f64>::zeros(n, r * range.len());
                    for (slot, q) in range.enumerate() {
                        self.unpack(q, bq.as_mut());
                        gemm(
                            z.as_mut().subcols_mut(slot * r, r),
                            false,
                            bq.as_ref(),
                            false,
                            c.as_ref(),
                            false,
                            1.0,
                            Par::Seq,
                        );
                    }
                    lower_rank_update(acc.0.as_mut(), z.as_ref(), sign);
                }
            },
        );
        // Only the lower triangle was summed; K is symmetric.
        let k = total.0;
        Mat::<f64>::from_fn(n, n, |i, j| k[(i.max(j), i.min(j))])
    }

    /// B^Q as a full symmetric n × n matrix.
    fn unpack(&self, q: usize, mut out: MatMut<'_, f64>) {
        let row = &self.b[q * self.npair..(q + 1) * self.npair];
        for mu in 0..self.n {
            for nu in 0..=mu {
                let v = row[tri(mu, nu)];
                out[(mu, nu)] = v;
                out[(nu, mu)] = v;
            }
        }
    }
}

impl FockBuilder for DfFock {
    fn describe(&self) -> String {
        format!(
            "density-fitted J and K ({}, {} fitting functions, {:.1} MiB)",
            self.aux_name,
            self.naux,
            self.bytes() as f64 / (1u64 << 20) as f64
        )
    }

    fn jk(&mut self, densities: &[&Mat<f64>]) -> Result<Vec<Jk>> {
        Ok(densities
            .iter()
            .map(|d| Jk {
                j: self.coulomb(&self.gamma(d)),
                k: self.exchange(d),
            })
            .collect())
    }
}

/// Rows per block of the lower-triangular update.
const ROWS_PER_BLOCK: usize = 64;

/// acc ← acc + sign · Z Zᵀ on the blocks on and below the diagonal (blocks of
/// `ROWS_PER_BLOCK` rows; entries above the diagonal inside diagonal blocks are written too
/// but not read): about half the multiply-adds of the full product.
fn lower_rank_update(mut acc: MatMut<'_, f64>, z: MatRef<'_, f64>, sign: f64) {
    let n = z.nrows();
    let mut i0 = 0;
    while i0 < n {
        let ni = ROWS_PER_BLOCK.min(n - i0);
        let zi = z.subrows(i0, ni);
        let width = i0 + ni;
        gemm(
            acc.as_mut().submatrix_mut(i0, 0, ni, width),
            true,
            zi,
            false,
            z.subrows(0, width),
            true,
            sign,
            Par::Seq,
        );
        i0 += ni;
    }
}

/// Partial K of a chunk of auxiliary functions.
struct MatSum(Mat<f64>);

impl Partial for MatSum {
    fn clear(&mut self) {
        self.0.fill(0.0);
    }
    fn add(&mut self, other: &Self) {
        self.0 += &other.0;
    }
}

/// D = C₊C₊ᵀ − C₋C₋ᵀ from the eigen-decomposition of the symmetrised D (sequential, so the
/// same bits on any thread count); eigenvalues below 1e-13 of the largest are dropped.
fn factorise(d: &Mat<f64>) -> (Mat<f64>, Mat<f64>) {
    let n = d.nrows();
    let ds = Mat::<f64>::from_fn(n, n, |i, j| 0.5 * (d[(i, j)] + d[(j, i)]));
    let (w, u) = eigh_with(ds.as_ref(), Par::Seq);
    let wmax = w.iter().fold(0.0f64, |m, x| m.max(x.abs()));
    let cut = 1e-13 * wmax;
    let cols = |positive: bool| -> Mat<f64> {
        let keep: Vec<usize> = (0..n)
            .filter(|&k| if positive { w[k] > cut } else { w[k] < -cut })
            .collect();
        Mat::<f64>::from_fn(n, keep.len(), |i, c| {
            u[(i, keep[c])] * w[keep[c]].abs().sqrt()
        })
    };
    (cols(true), cols(false))
}

/// (P|μν) for μ ≥ ν, rows P, computed in parallel over auxiliary shells (each shell writes
/// its own rows).
fn three_centre(basis: &BasisSet, aux: &BasisSet) -> Vec<f64> {
    let n = basis.n_basis;
    let npair = n * (n + 1) / 2;
    let e = DfEngine::new(aux, Some(basis));
    let nsb = basis.shells.len();
    let shell_pairs: Vec<(usize, usize)> = (0..nsb)
        .flat_map(|a| (0..=a).map(move |c| (a, c)))
        .collect();
    let mut b = vec![0.0; aux.n_basis * npair];
    let mut rows: Vec<(usize, &mut [f64])> = Vec::with_capacity(aux.shells.len());
    let mut rest: &mut [f64] = &mut b;
    for (p, s) in aux.shells.iter().enumerate() {
        let (head, tail) = rest.split_at_mut(s.n_functions() * npair);
        rows.push((p, head));
        rest = tail;
    }
    rows.into_par_iter().with_max_len(1).for_each(|(p, rows)| {
        bandcast_linalg::clear_vector_state();
        let np = aux.shells[p].n_functions();
        let bp = e.aux_bound(p);
        let mut out = Vec::new();
        for &(a, c) in &shell_pairs {
            if bp * e.pair_bound(a, c) < SCREEN_3C {
                continue;
            }
            e.three_centre(p, a, c, &mut out);
            let (na, nc) = (basis.shells[a].n_functions(), basis.shells[c].n_functions());
            let (oa, oc) = (basis.offsets[a], basis.offsets[c]);
            for i in 0..np {
                let row = &mut rows[i * npair..(i + 1) * npair];
                for x in 0..na {
                    let ymax = if a == c { x + 1 } else { nc };
                    for y in 0..ymax {
                        row[tri(oa + x, oc + y)] = out[(i * na + x) * nc + y];
                    }
                }
            }
        }
    });
    b
}

/// b ← L⁻¹ b for the naux × npair row-major b, in fixed column chunks solved sequentially.
fn solve_metric(l: &Mat<f64>, b: &mut [f64], naux: usize, npair: usize) {
    let whole = MatMut::from_row_major_slice_mut(b, naux, npair);
    let mut pieces: Vec<MatMut<'_, f64>> = Vec::new();
    let mut rest = whole;
    while rest.ncols() > PAIRS_PER_CHUNK {
        let (head, tail) = rest.split_at_col_mut(PAIRS_PER_CHUNK);
        pieces.push(head);
        rest = tail;
    }
    pieces.push(rest);
    let l: MatRef<'_, f64> = l.as_ref();
    pieces
        .into_par_iter()
        .with_max_len(1)
        .for_each(|piece| solve_lower_in_place_with(l, piece, Par::Seq));
}

#[cfg(test)]
mod tests {
    use super::super::tests::max_diff;
    use super::*;
    use crate::basis::Shell;
    use crate::scf::fock::TensorFock;

    fn shell(l: usize, exponent: f64) -> Shell {
        Shell {
            l,
            pure: true,
            center: [0.1, -0.2, 0.3],
            atom: 0,
            exponents: vec![exponent],
            coefficients: vec![1.0],
        }
    }

    /// One centre, orbitals s(α) and p(β): every product φ_μ φ_ν is one of the Gaussians
    /// s(2α), p(α+β) or Cartesian d(2β) (x_i x_j e^{−2βr²}; Gaussian product rule), so
    /// with exactly those fitting functions the Coulomb-metric fit reproduces every
    /// integral and DF must give the exact J and K for any density (indefinite ones too).
    #[test]
    fn exact_when_the_fitting_set_spans_all_products() {
        let (a, b) = (1.3, 0.7);
        let basis = BasisSet::from_shells("orbital", vec![shell(0, a), shell(1, b)]);
        let aux = BasisSet::from_shells(
            "fit",
            vec![
                shell(0, 2.0 * a),
                shell(1, a + b),
                Shell {
                    pure: false,
                    ..shell(2, 2.0 * b)
                },
            ],
        );
        let n = basis.n_basis;
        let mut df = DfFock::new(&basis, &aux, 1 << 30).unwrap();
        let mut exact = TensorFock::new(n, crate::integrals::eri_tensor(&basis));
        for shift in [0.0, 0.7] {
            let d = Mat::<f64>::from_fn(n, n, |i, j| {
                ((i + 2 * j) as f64 * 0.37 + shift).sin()
                    + ((j + 2 * i) as f64 * 0.37 + shift).sin()
            });
            let want = exact.jk(&[&d]).unwrap();
            let got = df.jk(&[&d]).unwrap();
            assert!(
                max_diff(&want[0].j, &got[0].j) < 1e-10,
                "J {}",
                max_diff(&want[0].j, &got[0].j)
            );
            assert!(
                max_diff(&want[0].k, &got[0].k) < 1e-10,
                "K {}",
                max_diff(&want[0].k, &got[0].k)
            );
        }
    }

    #[test]
    fn same_bits_on_one_and_two_threads() {
        let path = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/data/gw100/water.xyz");
        let mol = crate::chem::xyz::read_xyz(
            std::path::Path::new(path),
            crate::chem::xyz::LengthUnit::Angstrom,
        )
        .unwrap();
        let basis = crate::basis::load("cc-pVDZ", &mol, None).unwrap();
        let aux = crate::basis::load_auxiliary("def2-universal-JKFIT", &mol).unwrap();
        let n = basis.n_basis;
        let d = Mat::<f64>::from_fn(n, n, |i, j| 1.0 / (1.0 + (i as f64 - j as f64).abs()));
        let run = |threads: usize| {
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .unwrap();
            pool.install(|| {
                let mut df = DfFock::new(&basis, &aux, 1 << 30).unwrap();
                df.jk(&[&d]).unwrap()
            })
        };
        let (x, y) = (run(1), run(2));
        assert_eq!(max_diff(&x[0].j, &y[0].j), 0.0);
        assert_eq!(max_diff(&x[0].k, &y[0].k), 0.0);
    }

    #[test]
    fn refuses_over_budget() {
        let basis = BasisSet::from_shells("orbital", vec![shell(0, 1.0), shell(1, 0.5)]);
        let aux = BasisSet::from_shells("fit", vec![shell(0, 2.0), shell(1, 1.5)]);
        assert!(matches!(
            DfFock::new(&basis, &aux, 8),
            Err(Error::TooLarge(_))
        ));
    }

    #[test]
    fn factorisation_reproduces_an_indefinite_density() {
        let n = 7;
        let d = Mat::<f64>::from_fn(n, n, |i, j| {
            ((i + 2 * j) as f64 * 0.37).sin() + ((j + 2 * i) as f64 * 0.37).sin()
        });
        let (p, m) = factorise(&d);
        assert!(p.ncols() > 0 && m.ncols() > 0);
        for i in 0..n {
            for j in 0..n {
                let mut v = 0.0;
                for c in 0..p.ncols() {
                    v += p[(i, c)] * p[(j, c)];
                }
                for c in 0..m.ncols() {
                    v -= m[(i, c)] * m[(j, c)];
                }
                assert!((v - d[(i, j)]).abs() < 1e-12);
            }
        }
    }
}
