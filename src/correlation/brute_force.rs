//! Test-only reference: second quantisation over explicit spin-orbital determinants.
//!
//! For tiny active spaces (≤ 12 spin orbitals) the similarity-transformed Hamiltonian
//! H̄ = e^{−T} H e^{T} is applied literally, term by term, to determinant vectors of the
//! whole Fock space. This knows nothing of intermediates or spin adaptation, so agreement
//! with it checks the closed-shell CCSD residual and the spin-adapted EOM-IP sigma vectors
//! against the spin-orbital definitions (Stanton & Gauss, J. Chem. Phys. 101 (1994) 8938).
//! Spin orbital index: 2·p + σ (σ = 0 α, 1 β).

use super::integrals::MoFactors;
use super::tensor::Tensor;

pub struct FockSpace {
    pub n: usize,
    pub nocc: usize,
    /// One-electron integrals h_pq over spatial orbitals (recovered from the Fock matrix).
    h: Vec<f64>,
    /// (pq|rs) over spatial orbitals.
    eri: Tensor,
}

/// Apply a_p (create = false) or a†_p to a determinant; returns the new determinant and the
/// sign, or None.
fn op(det: u64, p: usize, create: bool) -> Option<(u64, f64)> {
    let bit = 1u64 << p;
    let occ = det & bit != 0;
    if occ == create {
        return None;
    }
    let below = (det & (bit - 1)).count_ones();
    let sign = if below.is_multiple_of(2) { 1.0 } else { -1.0 };
    Some((det ^ bit, sign))
}

/// Apply an operator string (rightmost acts first) given as (orbital, create) pairs.
pub fn apply_string(det: u64, ops: &[(usize, bool)]) -> Option<(u64, f64)> {
    let mut d = det;
    let mut s = 1.0;
    for &(p, c) in ops.iter().rev() {
        let (nd, ns) = op(d, p, c)?;
        d = nd;
        s *= ns;
    }
    Some((d, s))
}

impl FockSpace {
    pub fn new(f: &MoFactors, fock: &Tensor) -> Self {
        let n = f.nocc + f.nvir;
        assert!(2 * n <= 12, "brute-force reference only for tiny spaces");
        let eri = f.full_mo();
        let o = f.nocc;
        let mut h = vec![0.0; n * n];
        for p in 0..n {
            for q in 0..n {
                let mut g = 0.0;
                for k in 0..o {
                    g += 2.0 * eri.get(&[p, q, k, k]) - eri.get(&[p, k, k, q]);
                }
                h[p * n + q] = fock.get(&[p, q]) - g;
            }
        }
        FockSpace { n, nocc: o, h, eri }
    }

    pub fn dim(&self) -> usize {
        1 << (2 * self.n)
    }

    pub fn reference(&self) -> u64 {
        (1u64 << (2 * self.nocc)) - 1
    }

    fn so(p: usize, s: usize) -> usize {
        2 * p + s
    }

    /// H |ψ⟩ (no constant).
    pub fn apply_h(&self, psi: &[f64]) -> Vec<f64> {
        let n = self.n;
        let nso = 2 * n;
        let mut out = vec![0.0; psi.len()];
        for (det, &c) in psi.iter().enumerate() {
            if c == 0.0 {
                continue;
            }
            let det = det as u64;
            for p in 0..n {
                for q in 0..n {
                    let hpq = self.h[p * n + q];
                    if hpq == 0.0 {
                        continue;
                    }
                    for s in 0..2 {
                        if let Some((d, sg)) =
                            apply_string(det, &[(Self::so(p, s), true), (Self::so(q, s), false)])
                        {
                            out[d as usize] += hpq * sg * c;
                        }
                    }
                }
            }
            // ½ Σ <PQ|RS> a†P a†Q aS aR, <PQ|RS> = (pr|qs) δ(σP,σR) δ(σQ,σS)
            for pp in 0..nso {
                for qq in 0..nso {
                    if pp == qq {
                        continue;
                    }
                    for rr in 0..nso {
                        if pp % 2 != rr % 2 || det & (1 << rr) == 0 {
                            continue;
                        }
                        for ss in 0..nso {
                            if qq % 2 != ss % 2 || ss == rr || det & (1 << ss) == 0 {
                                continue;
                            }
                            let v = self.eri.get(&[pp / 2, rr / 2, qq / 2, ss / 2]);
                            if let Some((d, sg)) = apply_string(
                                det,
                                &[(pp, true), (qq, true), (ss, false), (rr, false)],
                            ) {
                                out[d as usize] += 0.5 * v * sg * c;
                            }
                        }
                    }
                }
            }
        }
        out
    }

    /// Spin-orbital amplitudes from closed-shell spatial ones.
    fn t2so(t2: &Tensor, i: usize, j: usize, a: usize, b: usize) -> f64 {
        let mut v = 0.0;
        let (si, sj, sa, sb) = (i % 2, j % 2, a % 2, b % 2);
        let (i, j, a, b) = (i / 2, j / 2, a / 2, b / 2);
        if si == sa && sj == sb {
            v += t2.get(&[i, j, a, b]);
        }
        if si == sb && sj == sa {
            v -= t2.get(&[i, j, b, a]);
        }
        v
    }

    /// T |ψ⟩ with T = Σ t_i^a a†a ai + ¼ Σ t_ij^ab a†a a†b aj ai (occupied/virtual w.r.t.
    /// the reference; a is a virtual spatial index counted from the first virtual).
    pub fn apply_t(&self, t1: &Tensor, t2: &Tensor, psi: &[f64]) -> Vec<f64> {
        let o = self.nocc;
        let v = self.n - o;
        let mut out = vec![0.0; psi.len()];
        for (det, &c) in psi.iter().enumerate() {
            if c == 0.0 {
                continue;
            }
            let det = det as u64;
            for i in 0..2 * o {
                if det & (1 << i) == 0 {
                    continue;
                }
                for a in 0..2 * v {
                    if a % 2 != i % 2 {
                        continue;
                    }
                    let t = t1.get(&[i / 2, a / 2]);
                    if let Some((d, sg)) = apply_string(det, &[(2 * o + a, true), (i, false)]) {
                        out[d as usize] += t * sg * c;
                    }
                }
                for j in 0..2 * o {
                    if j == i || det & (1 << j) == 0 {
                        continue;
                    }
                    for a in 0..2 * v {
                        for b in 0..2 * v {
                            if a == b {
                                continue;
                            }
                            let t = Self::t2so(t2, i, j, a, b);
                            if t == 0.0 {
                                continue;
                            }
                            if let Some((d, sg)) = apply_string(
                                det,
                                &[(2 * o + a, true), (2 * o + b, true), (j, false), (i, false)],
                            ) {
                                out[d as usize] += 0.25 * t * sg * c;
                            }
                        }
                    }
                }
            }
        }
        out
    }

    /// e^{±T} |ψ⟩ by the terminating series.
    pub fn exp_t(&self, t1: &Tensor, t2: &Tensor, psi: &[f64], sign: f64) -> Vec<f64> {
        let mut out = psi.to_vec();
        let mut term = psi.to_vec();
        for k in 1..=2 * self.n {
            term = self.apply_t(t1, t2, &term);
            let f = sign / k as f64;
            term.iter_mut().for_each(|x| *x *= f);
            if term.iter().all(|&x| x == 0.0) {
                break;
            }
            for (o, t) in out.iter_mut().zip(&term) {
                *o += t;
            }
        }
        out
    }

    /// H̄ |ψ⟩.
    pub fn apply_hbar(&self, t1: &Tensor, t2: &Tensor, psi: &[f64]) -> Vec<f64> {
        let x = self.exp_t(t1, t2, psi, 1.0);
        let hx = self.apply_h(&x);
        self.exp_t(t1, t2, &hx, -1.0)
    }

    /// CC energy relative to the reference and residuals ⟨Φ_i^a|H̄|Φ⟩ (α→α) and
    /// ⟨Φ_{iα jβ}^{aα bβ}|H̄|Φ⟩.
    pub fn cc_residual(&self, t1: &Tensor, t2: &Tensor) -> (f64, Tensor, Tensor) {
        let o = self.nocc;
        let v = self.n - o;
        let r0 = self.reference();
        let mut phi = vec![0.0; self.dim()];
        phi[r0 as usize] = 1.0;
        let e_ref = self.apply_h(&phi)[r0 as usize];
        let hb = self.apply_hbar(t1, t2, &phi);
        let e = hb[r0 as usize] - e_ref;
        let mut r1 = Tensor::zeros(&[o, v]);
        for i in 0..o {
            for a in 0..v {
                let (d, s) = apply_string(r0, &[(2 * (o + a), true), (2 * i, false)]).unwrap();
                r1.data[i * v + a] = s * hb[d as usize];
            }
        }
        let mut r2 = Tensor::zeros(&[o, o, v, v]);
        for i in 0..o {
            for j in 0..o {
                for a in 0..v {
                    for b in 0..v {
                        let (d, s) = apply_string(
                            r0,
                            &[
                                (2 * (o + a), true),
                                (2 * (o + b) + 1, true),
                                (2 * j + 1, false),
                                (2 * i, false),
                            ],
                        )
                        .unwrap();
                        r2.data[((i * o + j) * v + a) * v + b] = s * hb[d as usize];
                    }
                }
            }
        }
        (e, r1, r2)
    }

    /// H̄ − E_CC in the 1h + 2h1p space of the N−1 electron sector with one β electron
    /// removed (doublets and quartets), built from the connected matrix elements
    /// ⟨μ|[H̄, R_ν]|Φ⟩ so that it holds for any amplitudes; with, for each basis
    /// determinant, its number of holes (1 for the one-hole determinants).
    fn ip_matrix(&self, t1: &Tensor, t2: &Tensor) -> (bandcast_linalg::Mat<f64>, Vec<u32>) {
        let o = self.nocc;
        let r0 = self.reference();
        let occ_mask = r0;
        let mut basis: Vec<u64> = Vec::new();
        for det in 0..self.dim() as u64 {
            let ne = det.count_ones() as usize;
            if ne != 2 * o - 1 {
                continue;
            }
            let nbeta = (0..2 * self.n)
                .filter(|p| p % 2 == 1 && det & (1 << p) != 0)
                .count();
            if nbeta != o - 1 {
                continue;
            }
            let holes = (occ_mask & !det).count_ones();
            let parts = (det & !occ_mask).count_ones();
            if parts <= 1 && holes == parts + 1 {
                basis.push(det);
            }
        }
        let mut phi = vec![0.0; self.dim()];
        phi[r0 as usize] = 1.0;
        let hphi = self.apply_hbar(t1, t2, &phi);
        let m = basis.len();
        let mut h = bandcast_linalg::Mat::<f64>::zeros(m, m);
        for (nu, &dn) in basis.iter().enumerate() {
            // R_ν as an operator string with |ν⟩ = sign · R_ν |Φ⟩.
            let holes: Vec<usize> = (0..2 * o).filter(|p| dn & (1 << p) == 0).collect();
            let parts: Vec<usize> = (2 * o..2 * self.n).filter(|p| dn & (1 << p) != 0).collect();
            let mut ops: Vec<(usize, bool)> = parts.iter().map(|&p| (p, true)).collect();
            ops.extend(holes.iter().rev().map(|&p| (p, false)));
            let (d, sign) = apply_string(r0, &ops).unwrap();
            assert_eq!(d, dn);
            let mut x = vec![0.0; self.dim()];
            x[dn as usize] = 1.0;
            let y = self.apply_hbar(t1, t2, &x);
            // connected part ⟨μ|[H̄, R_ν]|Φ⟩ = ⟨μ|H̄|ν⟩ − ⟨μ|R_ν H̄|Φ⟩: exact EOM matrix for
            // any amplitudes (the second term vanishes only at CC convergence).
            let mut z = vec![0.0; self.dim()];
            for (det, &c) in hphi.iter().enumerate() {
                if c != 0.0 {
                    if let Some((dd, sg)) = apply_string(det as u64, &ops) {
                        z[dd as usize] += sign * sg * c;
                    }
                }
            }
            for (mu, &dm) in basis.iter().enumerate() {
                h[(mu, nu)] = y[dm as usize] - z[dm as usize];
            }
        }
        let holes = basis
            .iter()
            .map(|&d| (occ_mask & !d).count_ones())
            .collect();
        (h, holes)
    }

    /// Eigenvalues (real, imaginary; ascending real part) of the IP matrix of `ip_matrix`.
    pub fn ip_spectrum(&self, t1: &Tensor, t2: &Tensor) -> Vec<(f64, f64)> {
        let (h, _) = self.ip_matrix(t1, t2);
        let (re, im, _, _) = bandcast_linalg::eig_general(h.as_ref()).unwrap();
        let mut ev: Vec<(f64, f64)> = re.into_iter().zip(im).collect();
        ev.sort_by(|a, b| a.0.total_cmp(&b.0));
        ev
    }

    /// Real eigenvalues of the IP matrix with the one-hole weight of each right eigenvector,
    /// Σ_{1h determinants} c² / Σ_all c², straight from the determinant coefficients.
    pub fn ip_one_hole_weights(&self, t1: &Tensor, t2: &Tensor) -> Vec<(f64, f64)> {
        let (h, holes) = self.ip_matrix(t1, t2);
        let (re, im, ur, _) = bandcast_linalg::eig_general(h.as_ref()).unwrap();
        let mut out = Vec::new();
        for k in 0..re.len() {
            if im[k] != 0.0 {
                continue;
            }
            let (mut n1, mut nt) = (0.0, 0.0);
            for (r, &nh) in holes.iter().enumerate() {
                let c2 = ur[(r, k)] * ur[(r, k)];
                nt += c2;
                if nh == 1 {
                    n1 += c2;
                }
            }
            out.push((re[k], n1 / nt));
        }
        out.sort_by(|a, b| a.0.total_cmp(&b.0));
        out
    }
}
