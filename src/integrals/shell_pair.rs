//! Precomputed data of a pair of shells — or of a pair of general-contraction families,
//! whose members share centre, l and exponents and differ only in contraction
//! coefficients — for the two-electron engine: per surviving primitive pair the exponent sum
//! ζ = α + β, the product centre P, P − A and K_AB/ζ with K_AB = exp(−αβ/ζ |AB|²), plus the
//! contraction-coefficient products of every member pair.
//!
//! One-centre pairs (A = B) have P = A and K_AB = 1 whatever the exponents, so every
//! primitive pair is determined by ζ alone: pairs with the same ζ (in particular (α_i, α_j)
//! and (α_j, α_i) of a shell with itself or with another member of its family) are merged
//! into one, their coefficient products summed. For a 9-primitive s family this takes the
//! pair's 81 primitive pairs down to 45.

use crate::basis::normalize::primitive_norm;
use crate::basis::Shell;

/// Primitive pairs whose N_a N_b exp(−μ|AB|²) (π/ζ)^{3/2} (s-type normalised primitives)
/// falls below this are dropped (coefficients left out, so that every member pair of a
/// general-contraction family keeps the same primitive list).
pub const PRIMITIVE_PAIR_THRESHOLD: f64 = 1e-20;

/// One primitive pair.
#[derive(Debug, Clone, Copy)]
pub struct Prim {
    pub zeta: f64,
    /// 1/ζ.
    pub inv_zeta: f64,
    /// K_AB / ζ, times the coefficient product when there is a single member.
    pub kpref: f64,
    /// P.
    pub center: [f64; 3],
    /// P − A.
    pub pa: [f64; 3],
}

#[derive(Debug, Clone)]
pub struct PairData {
    pub la: usize,
    pub lb: usize,
    /// A − B.
    pub ab: [f64; 3],
    /// Number of member pairs (1 for a pair of plain shells); member (i, j) of the two
    /// families has index i · n_b + j.
    pub n_members: usize,
    pub n_prim: usize,
    pub prims: Vec<Prim>,
    /// Coefficient products, member-major: coef[m · n_prim + k].
    pub coef: Vec<f64>,
    /// Screening bound of each primitive pair (Cauchy–Schwarz factor times the largest
    /// |coefficient product| of its members), in descending order once the engine has set
    /// them (`set_bounds`).
    pub bound: Vec<f64>,
}

impl PairData {
    /// Pair data of shells `sa` and `sb` for the members whose normalised coefficients (see
    /// `crate::basis::normalize::contracted_coefficients`) are `ca` and `cb` (one entry for a
    /// plain shell; all members share the exponents of `sa`, resp. `sb`).
    pub fn new(sa: &Shell, sb: &Shell, ca: &[&[f64]], cb: &[&[f64]]) -> Self {
        let (la, lb) = (sa.l, sb.l);
        let ab = [
            sa.center[0] - sb.center[0],
            sa.center[1] - sb.center[1],
            sa.center[2] - sb.center[2],
        ];
        let ab2 = ab[0] * ab[0] + ab[1] * ab[1] + ab[2] * ab[2];
        let one_centre = sa.center == sb.center;
        let n_members = ca.len() * cb.len();
        // (ζ, P, P − A, K_AB, coefficient product per member)
        let mut prims: Vec<(f64, [f64; 3], [f64; 3], f64, Vec<f64>)> = Vec::new();
        for (i, &alpha) in sa.exponents.iter().enumerate() {
            for (j, &beta) in sb.exponents.iter().enumerate() {
                let zeta = alpha + beta;
                let coefs: Vec<f64> = ca
                    .iter()
                    .flat_map(|x| cb.iter().map(move |y| x[i] * y[j]))
                    .collect();
                if one_centre {
                    if let Some(pr) = prims.iter_mut().find(|pr| pr.0 == zeta) {
                        for (s, c) in pr.4.iter_mut().zip(&coefs) {
                            *s += c;
                        }
                        continue;
                    }
                    prims.push((zeta, sa.center, [0.0; 3], 1.0, coefs));
                    continue;
                }
                let mu = alpha * beta / zeta;
                let kab = (-mu * ab2).exp();
                // (an exponent-0 "unit" function, used for density fitting, counts as 1)
                let norm = |x: f64| if x > 0.0 { primitive_norm(x, 0) } else { 1.0 };
                let nab = norm(alpha) * norm(beta);
                if nab * kab * (std::f64::consts::PI / zeta).powf(1.5) < PRIMITIVE_PAIR_THRESHOLD {
                    continue;
                }
                let mut p = [0.0; 3];
                let mut pa = [0.0; 3];
                for d in 0..3 {
                    p[d] = (alpha * sa.center[d] + beta * sb.center[d]) / zeta;
                    pa[d] = p[d] - sa.center[d];
                }
                prims.push((zeta, p, pa, kab, coefs));
            }
        }
        let n_prim = prims.len();
        let mut coef = vec![0.0; n_members * n_prim];
        for (k, pr) in prims.iter().enumerate() {
            for m in 0..n_members {
                coef[m * n_prim + k] = pr.4[m];
            }
        }
        PairData {
            la,
            lb,
            ab,
            n_members,
            n_prim,
            prims: prims
                .iter()
                .map(|p| Prim {
                    zeta: p.0,
                    inv_zeta: 1.0 / p.0,
                    kpref: p.3 / p.0 * if n_members == 1 { p.4[0] } else { 1.0 },
                    center: p.1,
                    pa: p.2,
                })
                .collect(),
            coef,
            bound: vec![1.0; n_prim],
        }
    }

    /// Primitive pair `k` alone, coefficient 1 (for the Cauchy–Schwarz factor).
    pub fn single(&self, k: usize) -> PairData {
        let c = if self.n_members == 1 {
            self.coef[k]
        } else {
            1.0
        };
        PairData {
            la: self.la,
            lb: self.lb,
            ab: self.ab,
            n_members: 1,
            n_prim: 1,
            prims: vec![Prim {
                kpref: self.prims[k].kpref / c,
                ..self.prims[k]
            }],
            coef: vec![1.0],
            bound: vec![1.0],
        }
    }

    /// Set the screening bounds from the Cauchy–Schwarz factors q[k] = √max|(ab|ab)_kk| of
    /// the single primitive pairs and sort the primitive pairs by descending bound.
    pub fn set_bounds(&mut self, q: &[f64]) {
        let n = self.n_prim;
        let bound: Vec<f64> = (0..n)
            .map(|k| {
                let c = (0..self.n_members)
                    .map(|m| self.coef[m * n + k].abs())
                    .fold(0.0, f64::max);
                q[k] * c
            })
            .collect();
        let mut order: Vec<usize> = (0..n).collect();
        // stable: ties keep their construction order
        order.sort_by(|&x, &y| bound[y].total_cmp(&bound[x]));
        let perm = |v: &[f64]| order.iter().map(|&k| v[k]).collect::<Vec<f64>>();
        self.prims = order.iter().map(|&k| self.prims[k]).collect();
        self.bound = perm(&bound);
        let mut coef = vec![0.0; self.coef.len()];
        for m in 0..self.n_members {
            for (dst, &k) in order.iter().enumerate() {
                coef[m * n + dst] = self.coef[m * n + k];
            }
        }
        self.coef = coef;
    }
}
