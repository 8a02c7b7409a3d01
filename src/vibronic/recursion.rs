//! Multidimensional harmonic Franck–Condon overlaps ⟨v|v′⟩ with Duschinsky rotation,
//! displacement and frequency change, by recursion.
//!
//! We implement the recursion of Doktorov, Malkin & Man'ko (J. Mol. Spectrosc. 64 (1977)
//! 302), in the matrix form with the five quantities A, b, C, d, E that is also used by
//! Sharp & Rosenstock (J. Chem. Phys. 41 (1964) 3453) and Ruhoff (Chem. Phys. 186 (1994)
//! 355) (citations from memory). The formulas below were re-derived here from the ladder
//! operators and are written in dimensionless coordinates; the unit tests check them
//! against closed forms and brute-force grid integrals, not against this derivation.
//!
//! **Setting.** Q′ = J Q + K (duschinsky.rs), Γ = diag(ω) (neutral), Γ′ = diag(ω′) (ion),
//! mass-weighted coordinates, ħ = 1. J is taken to be orthogonal. Define
//!   T = Γ′^{1/2} J Γ^{-1/2},   S = T Tᵀ (ion modes),   U = Tᵀ T (neutral modes),
//!   κ = Γ′^{1/2} K (dimensionless displacement in the ion's coordinates).
//! The neutral's annihilation operators are a = ½(T⁻¹+Tᵀ) a′ + ½(T⁻¹−Tᵀ) a′† − T⁻¹κ/√2;
//! eliminating either a′† or a gives
//!   A = (1 + S)⁻¹ (S − 1)            (ion × ion, symmetric)
//!   b = √2 (1 + S)⁻¹ κ               (ion)
//!   C = (1 − U)(1 + U)⁻¹             (neutral × neutral, symmetric)
//!   d = −√2 (1 + U)⁻¹ Tᵀ κ           (neutral)
//!   E = 2 (1 + U)⁻¹ Tᵀ               (neutral × ion)
//! and the recursions (1_k: one quantum in mode k)
//!   √(v′_k+1) ⟨v|v′+1_k⟩ = b_k ⟨v|v′⟩ + Σ_l A_kl √v′_l ⟨v|v′−1_l⟩ + Σ_i E_ik √v_i ⟨v−1_i|v′⟩
//!   √(v_i+1)  ⟨v+1_i|v′⟩ = d_i ⟨v|v′⟩ + Σ_j C_ij √v_j ⟨v−1_j|v′⟩ + Σ_k E_ik √v′_k ⟨v|v′−1_k⟩
//! started from the 0–0 overlap (Gaussian integral over Q)
//!   ⟨0|0′⟩ = 2^{N/2} (det Γ′ / det Γ)^{1/4} det(1 + S)^{-1/2} exp(−½ κᵀ (1 + S)⁻¹ κ),
//! which is positive (phase convention: every harmonic function positive at large positive
//! coordinate, the usual Hermite-function sign). One dimension, no displacement:
//! ⟨0|0′⟩² = 2√(ωω′)/(ω+ω′); equal frequencies: ⟨0|n′⟩² = e^{−s} sⁿ/n! with s = κ²/2.
//!
//! **Blocks.** An overlap ⟨v|v′⟩ needs only overlaps ⟨u|w⟩ with u ≤ v and w ≤ v′
//! componentwise, so all of them live on the small product lattice spanned by the modes in
//! which v and v′ are excited. `Block` evaluates such a lattice in one pass (mixed-radix
//! order: every predecessor has a smaller index), with memory Π (v_i+1) Π (n_k+1) numbers —
//! never the full product space of all modes.

use bandcast_linalg::{eigh, Mat};

use super::duschinsky::Duschinsky;

/// The recursion coefficients and the 0–0 overlap of one Duschinsky relation.
#[derive(Debug, Clone)]
pub struct FcCoefficients {
    n: usize,
    /// A (ion × ion), row-major.
    pub a: Vec<f64>,
    pub b: Vec<f64>,
    /// C (neutral × neutral), row-major.
    pub c: Vec<f64>,
    pub d: Vec<f64>,
    /// E (neutral × ion), row-major: e[i * n + k].
    pub e: Vec<f64>,
    /// ⟨0|0′⟩.
    pub overlap00: f64,
}

/// (1 + X)⁻¹ and ln det(1 + X) of a symmetric positive semi-definite X (row-major).
fn inv_one_plus(x: &[f64], n: usize) -> (Vec<f64>, f64) {
    let m = Mat::<f64>::from_fn(n, n, |i, j| 0.5 * (x[i * n + j] + x[j * n + i]));
    let (w, v) = eigh(m.as_ref());
    let mut inv = vec![0.0; n * n];
    let mut logdet = 0.0;
    for (k, &lam) in w.iter().enumerate() {
        let f = 1.0 / (1.0 + lam);
        logdet += (1.0 + lam).ln();
        for i in 0..n {
            let vi = v[(i, k)] * f;
            for j in 0..n {
                inv[i * n + j] += vi * v[(j, k)];
            }
        }
    }
    (inv, logdet)
}

impl FcCoefficients {
    pub fn new(d: &Duschinsky) -> Self {
        let n = d.n_modes();
        let sw: Vec<f64> = d.initial_frequencies.iter().map(|w| w.sqrt()).collect();
        let swp: Vec<f64> = d.final_frequencies.iter().map(|w| w.sqrt()).collect();
        // T[f][i] = √ω′_f J_fi / √ω_i
        let t: Vec<f64> = (0..n * n)
            .map(|x| {
                let (f, i) = (x / n, x % n);
                swp[f] * d.j[f][i] / sw[i]
            })
            .collect();
        let mut s = vec![0.0; n * n];
        let mut u = vec![0.0; n * n];
        for p in 0..n {
            for q in 0..n {
                let mut ss = 0.0;
                let mut uu = 0.0;
                for r in 0..n {
                    ss += t[p * n + r] * t[q * n + r];
                    uu += t[r * n + p] * t[r * n + q];
                }
                s[p * n + q] = ss;
                u[p * n + q] = uu;
            }
        }
        let kappa: Vec<f64> = (0..n).map(|f| swp[f] * d.k[f]).collect();
        let (is, logdet_s) = inv_one_plus(&s, n);
        let (iu, _) = inv_one_plus(&u, n);
        let sq2 = std::f64::consts::SQRT_2;
        let mut a = vec![0.0; n * n];
        let mut c = vec![0.0; n * n];
        for p in 0..n {
            for q in 0..n {
                let delta = if p == q { 1.0 } else { 0.0 };
                a[p * n + q] = delta - 2.0 * is[p * n + q];
                c[p * n + q] = 2.0 * iu[p * n + q] - delta;
            }
        }
        let isk: Vec<f64> = (0..n)
            .map(|p| (0..n).map(|q| is[p * n + q] * kappa[q]).sum())
            .collect();
        let b: Vec<f64> = isk.iter().map(|x| sq2 * x).collect();
        // E = 2 (1+U)⁻¹ Tᵀ : e[i][k] = 2 Σ_j iu[i][j] T[k][j]
        let mut e = vec![0.0; n * n];
        for i in 0..n {
            for k in 0..n {
                e[i * n + k] = 2.0 * (0..n).map(|j| iu[i * n + j] * t[k * n + j]).sum::<f64>();
            }
        }
        // d = −√2 (1+U)⁻¹ Tᵀ κ = −(E κ)/√2
        let dvec: Vec<f64> = (0..n)
            .map(|i| -(0..n).map(|k| e[i * n + k] * kappa[k]).sum::<f64>() / sq2)
            .collect();
        let log_ratio: f64 = d
            .final_frequencies
            .iter()
            .zip(&d.initial_frequencies)
            .map(|(wf, wi)| (wf / wi).ln())
            .sum();
        let quad: f64 = kappa.iter().zip(&isk).map(|(x, y)| x * y).sum();
        let ln00 = 0.5 * n as f64 * std::f64::consts::LN_2 + 0.25 * log_ratio
            - 0.5 * logdet_s
            - 0.5 * quad;
        FcCoefficients {
            n,
            a,
            b,
            c,
            d: dvec,
            e,
            overlap00: ln00.exp(),
        }
    }

    pub fn n_modes(&self) -> usize {
        self.n
    }

    /// ⟨v|v′⟩ for one pair of (dense) quantum-number vectors, through a block.
    pub fn overlap(&self, v: &[u32], vp: &[u32]) -> f64 {
        let init: Vec<(usize, u32)> = v
            .iter()
            .enumerate()
            .filter(|(_, &q)| q > 0)
            .map(|(i, &q)| (i, q))
            .collect();
        let fin: Vec<(usize, u32)> = vp
            .iter()
            .enumerate()
            .filter(|(_, &q)| q > 0)
            .map(|(i, &q)| (i, q))
            .collect();
        let mut blk = Block::new(&init, &fin);
        blk.evaluate(self);
        blk.values[blk.values.len() - 1]
    }
}

/// The product lattice u ≤ v (neutral modes `init`) × w ≤ n (ion modes `fin`) of overlaps
/// ⟨u|w⟩, all other modes in their ground level.
#[derive(Debug, Clone)]
pub struct Block {
    /// (neutral mode, quanta v_i) with v_i ≥ 1.
    pub init: Vec<(usize, u32)>,
    /// (ion mode, largest quanta n_k) with n_k ≥ 1.
    pub fin: Vec<(usize, u32)>,
    /// Strides of the initial digits then the final digits (last final digit fastest).
    strides: Vec<usize>,
    /// ⟨u|w⟩ in mixed-radix order.
    pub values: Vec<f64>,
}

impl Block {
    /// Number of lattice points of a block (without allocating it).
    pub fn size(init: &[(usize, u32)], fin: &[(usize, u32)]) -> usize {
        init.iter()
            .chain(fin)
            .fold(1usize, |acc, &(_, q)| acc.saturating_mul(q as usize + 1))
    }

    pub fn new(init: &[(usize, u32)], fin: &[(usize, u32)]) -> Self {
        let dims: Vec<usize> = init
            .iter()
            .chain(fin)
            .map(|&(_, q)| q as usize + 1)
            .collect();
        let mut strides = vec![1usize; dims.len()];
        for p in (0..dims.len().saturating_sub(1)).rev() {
            strides[p] = strides[p + 1] * dims[p + 1];
        }
        Block {
            init: init.to_vec(),
            fin: fin.to_vec(),
            strides,
            values: vec![0.0; Self::size(init, fin)],
        }
    }

    /// Fills `values` by the recursions of the module comment.
    pub fn evaluate(&mut self, co: &FcCoefficients) {
        let n = co.n;
        let mi = self.init.len();
        let mf = self.fin.len();
        let dims: Vec<u32> = self.init.iter().chain(&self.fin).map(|&(_, q)| q).collect();
        let mut digit = vec![0u32; mi + mf];
        let sqrt: Vec<f64> = (0..=dims.iter().copied().max().unwrap_or(0) as usize + 1)
            .map(|q| (q as f64).sqrt())
            .collect();
        let len = self.values.len();
        for idx in 0..len {
            let val = if idx == 0 {
                co.overlap00
            } else if let Some(pk) = (mi..mi + mf).rev().find(|&p| digit[p] > 0) {
                // raise ion mode k from the predecessor w − 1_k
                let k = self.fin[pk - mi].0;
                let prev = idx - self.strides[pk];
                let mut s = co.b[k] * self.values[prev];
                for pl in mi..mi + mf {
                    let q = digit[pl] - (pl == pk) as u32;
                    if q > 0 {
                        let l = self.fin[pl - mi].0;
                        s += co.a[k * n + l]
                            * sqrt[q as usize]
                            * self.values[prev - self.strides[pl]];
                    }
                }
                for pi in 0..mi {
                    let q = digit[pi];
                    if q > 0 {
                        let i = self.init[pi].0;
                        s += co.e[i * n + k]
                            * sqrt[q as usize]
                            * self.values[prev - self.strides[pi]];
                    }
                }
                s / sqrt[digit[pk] as usize]
            } else {
                // all ion modes at 0: raise a neutral mode
                let pj = (0..mi).rev().find(|&p| digit[p] > 0).expect("idx > 0");
                let j = self.init[pj].0;
                let prev = idx - self.strides[pj];
                let mut s = co.d[j] * self.values[prev];
                for pi in 0..mi {
                    let q = digit[pi] - (pi == pj) as u32;
                    if q > 0 {
                        let i = self.init[pi].0;
                        s += co.c[j * n + i]
                            * sqrt[q as usize]
                            * self.values[prev - self.strides[pi]];
                    }
                }
                s / sqrt[digit[pj] as usize]
            };
            self.values[idx] = val;
            // next mixed-radix digit vector
            for p in (0..mi + mf).rev() {
                if digit[p] < dims[p] {
                    digit[p] += 1;
                    break;
                }
                digit[p] = 0;
            }
        }
    }

    /// Visits the points with u = v (all initial digits at their maximum) and every ion
    /// digit ≥ 1 — the overlaps that belong to this block's set of excited ion modes —
    /// as (ion quanta in `fin` order, ⟨v|w⟩).
    pub fn for_each_interior(&self, mut f: impl FnMut(&[u32], f64)) {
        let mi = self.init.len();
        let mf = self.fin.len();
        let base: usize = (0..mi)
            .map(|p| self.init[p].1 as usize * self.strides[p])
            .sum();
        let dims: Vec<u32> = self.fin.iter().map(|&(_, q)| q).collect();
        let mut w = vec![1u32; mf];
        if mf == 0 {
            f(&w, self.values[base]);
            return;
        }
        loop {
            let idx = base
                + (0..mf)
                    .map(|p| w[p] as usize * self.strides[mi + p])
                    .sum::<usize>();
            f(&w, self.values[idx]);
            let mut p = mf;
            loop {
                if p == 0 {
                    return;
                }
                p -= 1;
                if w[p] < dims[p] {
                    w[p] += 1;
                    break;
                }
                w[p] = 1;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn factorial(n: u32) -> f64 {
        (1..=n).map(|x| x as f64).product()
    }

    #[test]
    fn displaced_oscillator_gives_the_poisson_distribution() {
        // Exact closed form (textbook, e.g. the linear-coupling model): equal frequencies,
        // displacement K: |⟨0|n′⟩|² = e^{−s} sⁿ/n!, s = ωK²/2.
        let w = 0.0073;
        for &kk in &[0.0, 3.0, -11.0, 25.0] {
            let d = Duschinsky::parallel(vec![w], vec![w], vec![kk]);
            let co = FcCoefficients::new(&d);
            let s = 0.5 * w * kk * kk;
            let mut blk = Block::new(&[], &[(0, 40)]);
            blk.evaluate(&co);
            for n in 0..=40u32 {
                let want = (-s).exp() * s.powi(n as i32) / factorial(n);
                let got = blk.values[n as usize].powi(2);
                assert!((got - want).abs() < 1e-13, "K={kk} n={n}: {got} vs {want}");
            }
        }
    }

    /// ⟨n|m′⟩ for one mode by direct quadrature on a fine grid (Hermite functions by their
    /// stable three-term recurrence, trapezoid rule: spectrally accurate for these
    /// Gaussian-damped integrands).
    fn hermite_functions(y: f64, nmax: usize) -> Vec<f64> {
        let mut h = vec![0.0; nmax + 1];
        h[0] = std::f64::consts::PI.powf(-0.25) * (-0.5 * y * y).exp();
        if nmax > 0 {
            h[1] = std::f64::consts::SQRT_2 * y * h[0];
        }
        for n in 1..nmax {
            h[n + 1] = (2.0 / (n as f64 + 1.0)).sqrt() * y * h[n]
                - (n as f64 / (n as f64 + 1.0)).sqrt() * h[n - 1];
        }
        h
    }

    #[test]
    fn frequency_change_matches_the_two_frequency_closed_forms() {
        // Exact closed forms for one mode with ω ≠ ω′ (Gaussian integrals, textbook):
        //   ⟨0|0′⟩² = 2√(ωω′)/(ω+ω′) · exp(−ωω′K²/(ω+ω′)),
        //   no displacement: odd levels vanish and
        //   ⟨0|2m′⟩² = ⟨0|0′⟩² (2m)!/(2^{2m} (m!)²) · ((ω′−ω)/(ω′+ω))^{2m}.
        let (w, wp) = (0.010, 0.0062);
        let d = Duschinsky::parallel(vec![w], vec![wp], vec![0.0]);
        let co = FcCoefficients::new(&d);
        let o00 = 2.0 * (w * wp).sqrt() / (w + wp);
        let mut blk = Block::new(&[], &[(0, 20)]);
        blk.evaluate(&co);
        let r = (wp - w) / (wp + w);
        for m in 0..=10u32 {
            let want = o00 * factorial(2 * m) / (4f64.powi(m as i32) * factorial(m).powi(2))
                * r.powi(2 * m as i32);
            assert!(
                (blk.values[2 * m as usize].powi(2) - want).abs() < 1e-14,
                "m={m}"
            );
            if m < 10 {
                assert!(blk.values[2 * m as usize + 1].abs() < 1e-15);
            }
        }
        let kk = 14.0;
        let d = Duschinsky::parallel(vec![w], vec![wp], vec![kk]);
        let co = FcCoefficients::new(&d);
        let want = o00 * (-w * wp * kk * kk / (w + wp)).exp();
        assert!((co.overlap00.powi(2) - want).abs() < 1e-15);
    }

    #[test]
    fn one_mode_with_both_changes_matches_a_grid_integral() {
        // ⟨n|m′⟩ (thermal rows too) against direct quadrature ∫ φ_n(Q) φ′_m(Q + K) dQ.
        let (w, wp, kk) = (1.0, 0.64, 0.9);
        let d = Duschinsky::parallel(vec![w], vec![wp], vec![kk]);
        let co = FcCoefficients::new(&d);
        let (nmax, mmax) = (3usize, 8usize);
        let mut blk = Block::new(&[(0, nmax as u32)], &[(0, mmax as u32)]);
        blk.evaluate(&co);
        let h = 0.01;
        let mut grid = vec![0.0; (nmax + 1) * (mmax + 1)];
        let mut x = -14.0;
        while x <= 14.0 {
            let a = hermite_functions(w.sqrt() * x, nmax);
            let b = hermite_functions(wp.sqrt() * (x + kk), mmax);
            let s = h * (w * wp).powf(0.25);
            for n in 0..=nmax {
                for m in 0..=mmax {
                    grid[n * (mmax + 1) + m] += s * a[n] * b[m];
                }
            }
            x += h;
        }
        for n in 0..=nmax {
            for m in 0..=mmax {
                let got = blk.values[n * (mmax + 1) + m];
                let want = grid[n * (mmax + 1) + m];
                assert!((got - want).abs() < 1e-10, "⟨{n}|{m}′⟩ {got} vs {want}");
            }
        }
    }

    #[test]
    fn two_mode_duschinsky_case_matches_brute_force_grid_overlaps() {
        // Brute-force check: ⟨v|v′⟩ = ∬ Ψ_v(Q) Ψ′_v′(JQ + K) dQ₁dQ₂ on a 2D grid of products of
        // Hermite functions, for a rotated (J orthogonal, angle 0.35 rad), displaced,
        // frequency-changed pair of modes; thermal rows v = (0..2, 0..1) included so that
        // C, d and E are tested as well as A and b.
        let (w, wp) = ([1.0, 1.7], [0.75, 1.45]);
        let th: f64 = 0.35;
        let j = vec![vec![th.cos(), -th.sin()], vec![th.sin(), th.cos()]];
        let kk = vec![0.8, -0.55];
        let d = Duschinsky {
            j: j.clone(),
            k: kk.clone(),
            initial_frequencies: w.to_vec(),
            final_frequencies: wp.to_vec(),
        };
        let co = FcCoefficients::new(&d);
        let (vi, vf) = ([2u32, 1u32], [4u32, 4u32]);
        let mut blk = Block::new(&[(0, vi[0]), (1, vi[1])], &[(0, vf[0]), (1, vf[1])]);
        blk.evaluate(&co);
        let h = 0.04;
        let lim = 9.0;
        let npts = (2.0 * lim / h) as usize + 1;
        let nrow = (vi[0] as usize + 1) * (vi[1] as usize + 1);
        let ncol = (vf[0] as usize + 1) * (vf[1] as usize + 1);
        let mut grid = vec![0.0; nrow * ncol];
        let norm = (w[0] * w[1] * wp[0] * wp[1]).powf(0.25) * h * h;
        for a in 0..npts {
            let q1 = -lim + a as f64 * h;
            let h1 = hermite_functions(w[0].sqrt() * q1, vi[0] as usize);
            for b in 0..npts {
                let q2 = -lim + b as f64 * h;
                let h2 = hermite_functions(w[1].sqrt() * q2, vi[1] as usize);
                let p1 = j[0][0] * q1 + j[0][1] * q2 + kk[0];
                let p2 = j[1][0] * q1 + j[1][1] * q2 + kk[1];
                let g1 = hermite_functions(wp[0].sqrt() * p1, vf[0] as usize);
                let g2 = hermite_functions(wp[1].sqrt() * p2, vf[1] as usize);
                for u0 in 0..=vi[0] as usize {
                    for u1 in 0..=vi[1] as usize {
                        let left = norm * h1[u0] * h2[u1];
                        let r = u0 * (vi[1] as usize + 1) + u1;
                        for w0 in 0..=vf[0] as usize {
                            for w1 in 0..=vf[1] as usize {
                                grid[r * ncol + w0 * (vf[1] as usize + 1) + w1] +=
                                    left * g1[w0] * g2[w1];
                            }
                        }
                    }
                }
            }
        }
        let mut worst = 0.0f64;
        for r in 0..nrow {
            for c in 0..ncol {
                worst = worst.max((blk.values[r * ncol + c] - grid[r * ncol + c]).abs());
            }
        }
        assert!(
            worst < 1e-9,
            "largest deviation from the grid integrals {worst:e}"
        );
        // and the 0–0 value is not trivially small
        assert!(co.overlap00 > 0.3);
    }

    #[test]
    fn overlap_of_a_single_pair_equals_the_block_value() {
        // regression (the shortcut and the block are the same recursion)
        let d = Duschinsky::parallel(vec![0.01, 0.02], vec![0.009, 0.021], vec![5.0, -3.0]);
        let co = FcCoefficients::new(&d);
        let mut blk = Block::new(&[], &[(0, 3), (1, 2)]);
        blk.evaluate(&co);
        assert_eq!(
            co.overlap(&[0, 0], &[3, 2]),
            blk.values[blk.values.len() - 1]
        );
        assert_eq!(co.overlap(&[0, 0], &[0, 0]), co.overlap00);
    }
}
