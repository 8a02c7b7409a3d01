//! Precomputed shell-pair data for the two-electron engine: for every primitive pair that
//! survives screening, the exponent sum p, the product centre P, the product of the
//! normalised contraction coefficients and the one-dimensional Hermite expansion
//! coefficients E^{ij}_t (see `hermite_expansion`) for x, y and z, with the
//! Gaussian-product factor exp(−μ|AB|²) folded into the x table.

use crate::basis::normalize::primitive_norm;
use crate::basis::Shell;
use crate::integrals::hermite_expansion::{e_len, hermite_e};

/// Primitive pairs whose N_a N_b exp(−μ|AB|²) (π/p)^{3/2} (s-type normalised primitives)
/// falls below this are dropped.
pub const PRIMITIVE_PAIR_THRESHOLD: f64 = 1e-20;

#[derive(Debug, Clone)]
pub struct PrimitivePair {
    pub p: f64,
    pub center: [f64; 3],
    /// Product of the two normalised contraction coefficients.
    pub coef: f64,
    /// coef / p (used in the two-electron prefactor 2π^{5/2}/(pq√(p+q))).
    pub coef_over_p: f64,
}

#[derive(Debug, Clone)]
pub struct ShellPair {
    pub la: usize,
    pub lb: usize,
    pub prims: Vec<PrimitivePair>,
    /// For primitive k: E tables for x, y, z at k * 3 * e_len + d * e_len.
    pub e: Vec<f64>,
    pub e_len: usize,
}

impl ShellPair {
    /// Pair data from two shells with normalised coefficients `ca`, `cb`
    /// (see `crate::basis::normalize::contracted_coefficients`).
    pub fn new(sa: &Shell, sb: &Shell, ca: &[f64], cb: &[f64]) -> Self {
        let (la, lb) = (sa.l, sb.l);
        let el = e_len(la, lb);
        let mut prims = Vec::new();
        let mut e = Vec::new();
        let ab2: f64 = (0..3).map(|k| (sa.center[k] - sb.center[k]).powi(2)).sum();
        for (i, &alpha) in sa.exponents.iter().enumerate() {
            for (j, &beta) in sb.exponents.iter().enumerate() {
                let p = alpha + beta;
                let mu = alpha * beta / p;
                let kab = (-mu * ab2).exp();
                let coef = ca[i] * cb[j];
                // Screened on the normalised primitives only (not the contraction
                // coefficients), so that every member pair of a general-contraction family
                // keeps the same primitive list.
                // (an exponent-0 "unit" function, used for density fitting, counts as 1)
                let norm = |x: f64| if x > 0.0 { primitive_norm(x, 0) } else { 1.0 };
                let nab = norm(alpha) * norm(beta);
                if nab * kab * (std::f64::consts::PI / p).powf(1.5) < PRIMITIVE_PAIR_THRESHOLD {
                    continue;
                }
                let mut center = [0.0; 3];
                let base = e.len();
                e.resize(base + 3 * el, 0.0);
                for d in 0..3 {
                    center[d] = (alpha * sa.center[d] + beta * sb.center[d]) / p;
                    hermite_e(
                        la,
                        lb,
                        center[d] - sa.center[d],
                        center[d] - sb.center[d],
                        0.5 / p,
                        if d == 0 { kab } else { 1.0 },
                        &mut e[base + d * el..base + (d + 1) * el],
                    );
                }
                prims.push(PrimitivePair {
                    p,
                    center,
                    coef,
                    coef_over_p: coef / p,
                });
            }
        }
        ShellPair {
            la,
            lb,
            prims,
            e,
            e_len: el,
        }
    }

    /// The x, y, z tables of primitive pair `k`.
    #[inline(always)]
    pub fn tables(&self, k: usize) -> (&[f64], &[f64], &[f64]) {
        let b = k * 3 * self.e_len;
        let l = self.e_len;
        (
            &self.e[b..b + l],
            &self.e[b + l..b + 2 * l],
            &self.e[b + 2 * l..b + 3 * l],
        )
    }
}
