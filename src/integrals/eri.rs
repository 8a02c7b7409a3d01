//! Two-electron repulsion integrals (ab|cd) by the McMurchie–Davidson scheme
//! (McMurchie & Davidson, J. Comput. Phys. 26 (1978) 218; Helgaker, Jørgensen & Olsen,
//! *Molecular Electronic-Structure Theory*, eq. 9.9.33):
//!
//! (ab|cd) = 2π^{5/2} / (pq √(p+q)) Σ_{tuv} E^{ab}_{tuv} Σ_{τνφ} (−1)^{τ+ν+φ} E^{cd}_{τνφ}
//!           R_{t+τ, u+ν, v+φ}(α, R_PQ),   α = pq/(p+q),
//!
//! with E^{ab}_{tuv} = E^{ab}_t(x) E^{ab}_u(y) E^{ab}_v(z) from `hermite_expansion` and R
//! from `hermite_coulomb`. For each quartet the ket is first contracted to Hermite form
//! per bra primitive pair, I_{tuv,cd} = Σ_q Σ_{τνφ} ± E^{cd}_{τνφ} R_{t+τ,…}, then the bra
//! expansion coefficients are applied, then both pairs are transformed to the final AO
//! basis (normalised Cartesian or real solid harmonics).

use crate::basis::normalize::contracted_coefficients;
use crate::basis::solid_harmonics;
use crate::basis::BasisSet;
use crate::integrals::cartesian::{components, n_cartesian};
use crate::integrals::hermite_coulomb::{hermite_r, r_index, RScratch};
use crate::integrals::hermite_expansion::e_index;
use crate::integrals::shell_pair::ShellPair;
use crate::integrals::transform::{is_identity, transform_axis};
use rayon::prelude::*;
use std::cell::RefCell;

#[derive(Debug, Clone)]
struct ShellMeta {
    l: usize,
    n_func: usize,
    n_cart: usize,
    /// Raw-Cartesian → final AO matrix (n_func × n_cart), None for the identity.
    transform: Option<&'static [f64]>,
}

/// ERI engine over one basis set: shell-pair data precomputed, Sync, no locking when
/// computing (each thread keeps its own scratch).
pub struct EriEngine {
    n_shells: usize,
    shells: Vec<ShellMeta>,
    pairs: Vec<ShellPair>,
    schwarz: Vec<f64>,
}

#[derive(Clone, Copy)]
struct KetTerm {
    cd: u32,
    off: u32,
    val: f64,
}

#[derive(Default)]
struct Scratch {
    cart: Vec<f64>,
    inner: Vec<f64>,
    ket_terms: Vec<KetTerm>,
    ket_ranges: Vec<(usize, usize)>,
    bra_base: Vec<usize>,
    herm_index: Vec<usize>,
    rs: RScratch,
    tmp: Vec<f64>,
}

thread_local! {
    static SCRATCH: RefCell<Scratch> = RefCell::new(Scratch::default());
}

impl EriEngine {
    pub fn new(basis: &BasisSet) -> Self {
        let n = basis.shells.len();
        let coefs: Vec<Vec<f64>> = basis.shells.iter().map(contracted_coefficients).collect();
        let shells: Vec<ShellMeta> = basis
            .shells
            .iter()
            .map(|s| {
                let t = solid_harmonics::transform(s.l, s.pure);
                let nc = n_cartesian(s.l);
                ShellMeta {
                    l: s.l,
                    n_func: s.n_functions(),
                    n_cart: nc,
                    transform: if is_identity(t, nc) { None } else { Some(t) },
                }
            })
            .collect();
        let pairs: Vec<ShellPair> = (0..n * n)
            .into_par_iter()
            .map(|ab| {
                let (a, b) = (ab / n, ab % n);
                ShellPair::new(&basis.shells[a], &basis.shells[b], &coefs[a], &coefs[b])
            })
            .collect();
        let mut eng = EriEngine {
            n_shells: n,
            shells,
            pairs,
            schwarz: Vec::new(),
        };
        let diag: Vec<(usize, usize, f64)> = (0..n)
            .flat_map(|a| (0..=a).map(move |b| (a, b)))
            .collect::<Vec<_>>()
            .into_par_iter()
            .map(|(a, b)| {
                let mut out = Vec::new();
                eng.shell_quartet(a, b, a, b, &mut out);
                let (na, nb) = (eng.shells[a].n_func, eng.shells[b].n_func);
                let mut m: f64 = 0.0;
                for i in 0..na {
                    for j in 0..nb {
                        m = m.max(out[((i * nb + j) * na + i) * nb + j].abs());
                    }
                }
                (a, b, m.sqrt())
            })
            .collect();
        let mut sch = vec![0.0; n * n];
        for (a, b, v) in diag {
            sch[a * n + b] = v;
            sch[b * n + a] = v;
        }
        eng.schwarz = sch;
        eng
    }

    pub fn n_shells(&self) -> usize {
        self.n_shells
    }

    /// Schwarz bounds sqrt(max |(ab|ab)|) per shell pair, n_shells × n_shells row-major.
    pub fn schwarz(&self) -> &[f64] {
        &self.schwarz
    }

    /// Number of final AO functions of shell `s`.
    pub fn n_functions(&self, s: usize) -> usize {
        self.shells[s].n_func
    }

    /// (ab|cd) in the final AO basis, chemists' notation, into `out` (resized) with layout
    /// out[((i·nb + j)·nc + k)·nd + l].
    pub fn shell_quartet(&self, a: usize, b: usize, c: usize, d: usize, out: &mut Vec<f64>) {
        SCRATCH.with(|s| self.quartet_with(a, b, c, d, out, &mut s.borrow_mut()));
    }

    fn quartet_with(
        &self,
        a: usize,
        b: usize,
        c: usize,
        d: usize,
        out: &mut Vec<f64>,
        s: &mut Scratch,
    ) {
        let n = self.n_shells;
        let pab = &self.pairs[a * n + b];
        let pcd = &self.pairs[c * n + d];
        let (sa, sb, sc, sd) = (
            &self.shells[a],
            &self.shells[b],
            &self.shells[c],
            &self.shells[d],
        );
        let (la, lb, lc, ld) = (sa.l, sb.l, sc.l, sd.l);
        let (lab, lcd) = (la + lb, lc + ld);
        let big_l = lab + lcd;
        let dim = big_l + 1;
        let nab = sa.n_cart * sb.n_cart;
        let ncd = sc.n_cart * sd.n_cart;
        let Scratch {
            cart,
            inner,
            ket_terms,
            ket_ranges,
            bra_base,
            herm_index,
            rs,
            tmp,
        } = s;

        // Hermite functions of the bra: (t,u,v), t+u+v ≤ lab; R offsets and a lookup cube.
        let hd = lab + 1;
        bra_base.clear();
        herm_index.clear();
        herm_index.resize(hd * hd * hd, usize::MAX);
        for t in 0..=lab {
            for u in 0..=lab - t {
                for v in 0..=lab - t - u {
                    herm_index[(t * hd + u) * hd + v] = bra_base.len();
                    bra_base.push(r_index(dim, t, u, v));
                }
            }
        }
        let nh = bra_base.len();

        // Ket Hermite terms per ket primitive pair, sign (−1)^{τ+ν+φ} folded in.
        ket_terms.clear();
        ket_ranges.clear();
        let comps_c = components(lc);
        let comps_d = components(ld);
        for q in 0..pcd.prims.len() {
            let (ex, ey, ez) = pcd.tables(q);
            let start = ket_terms.len();
            for (ic, cc) in comps_c.iter().enumerate() {
                for (id, dd) in comps_d.iter().enumerate() {
                    let cd = (ic * comps_d.len() + id) as u32;
                    for tau in 0..=cc[0] + dd[0] {
                        let vx = ex[e_index(ld, cc[0], dd[0], tau, lcd)];
                        for nu in 0..=cc[1] + dd[1] {
                            let vxy = vx * ey[e_index(ld, cc[1], dd[1], nu, lcd)];
                            for phi in 0..=cc[2] + dd[2] {
                                let val = vxy * ez[e_index(ld, cc[2], dd[2], phi, lcd)];
                                if val == 0.0 {
                                    continue;
                                }
                                let sign = if (tau + nu + phi) % 2 == 0 { 1.0 } else { -1.0 };
                                ket_terms.push(KetTerm {
                                    cd,
                                    off: r_index(dim, tau, nu, phi) as u32,
                                    val: sign * val,
                                });
                            }
                        }
                    }
                }
            }
            ket_ranges.push((start, ket_terms.len()));
        }

        cart.clear();
        cart.resize(nab * ncd, 0.0);
        inner.resize(ncd * nh, 0.0);
        let two_pi_52 = 2.0 * std::f64::consts::PI.powf(2.5);
        let comps_a = components(la);
        let comps_b = components(lb);
        for (kp, pp) in pab.prims.iter().enumerate() {
            inner.iter_mut().for_each(|x| *x = 0.0);
            for (kq, qq) in pcd.prims.iter().enumerate() {
                let psum = pp.p + qq.p;
                let alpha = pp.p * qq.p / psum;
                let pq = [
                    pp.center[0] - qq.center[0],
                    pp.center[1] - qq.center[1],
                    pp.center[2] - qq.center[2],
                ];
                let pref = two_pi_52 / (pp.p * qq.p * psum.sqrt()) * pp.coef * qq.coef;
                let r = hermite_r(big_l, alpha, pq, pref, rs);
                let (t0, t1) = ket_ranges[kq];
                for term in &ket_terms[t0..t1] {
                    let row = &mut inner[term.cd as usize * nh..(term.cd as usize + 1) * nh];
                    let rr = &r[term.off as usize..];
                    for (x, &bb) in row.iter_mut().zip(bra_base.iter()) {
                        *x += term.val * rr[bb];
                    }
                }
            }
            // apply the bra Hermite coefficients
            let (ex, ey, ez) = pab.tables(kp);
            for (ia, ca) in comps_a.iter().enumerate() {
                for (ib, cb) in comps_b.iter().enumerate() {
                    let ab = ia * comps_b.len() + ib;
                    let dst = &mut cart[ab * ncd..(ab + 1) * ncd];
                    for t in 0..=ca[0] + cb[0] {
                        let vx = ex[e_index(lb, ca[0], cb[0], t, lab)];
                        for u in 0..=ca[1] + cb[1] {
                            let vxy = vx * ey[e_index(lb, ca[1], cb[1], u, lab)];
                            for v in 0..=ca[2] + cb[2] {
                                let val = vxy * ez[e_index(lb, ca[2], cb[2], v, lab)];
                                if val == 0.0 {
                                    continue;
                                }
                                let h = herm_index[(t * hd + u) * hd + v];
                                for (cdi, x) in dst.iter_mut().enumerate() {
                                    *x += val * inner[cdi * nh + h];
                                }
                            }
                        }
                    }
                }
            }
        }

        // Transform to the final AO basis, index by index.
        let mut dims = [sa.n_cart, sb.n_cart, sc.n_cart, sd.n_cart];
        let metas = [sa, sb, sc, sd];
        let mut in_out = false; // false: data in `cart`, true: in `out`
        out.clear();
        for axis in (0..4).rev() {
            if let Some(t) = metas[axis].transform {
                let rows = metas[axis].n_func;
                if in_out {
                    transform_axis(out, &dims, axis, t, rows, tmp);
                    std::mem::swap(out, tmp);
                } else {
                    transform_axis(cart, &dims, axis, t, rows, out);
                    in_out = true;
                }
                dims[axis] = rows;
            }
        }
        if !in_out {
            out.extend_from_slice(cart);
        }
    }
}

/// The full ERI array (μν|λσ) over all AOs, index ((μ n + ν) n + λ) n + σ, built from the
/// unique quartets (8-fold permutational symmetry) in parallel. Memory 8 n⁴ bytes: for
/// small systems and tests.
pub fn eri_tensor(basis: &BasisSet) -> Vec<f64> {
    let engine = EriEngine::new(basis);
    eri_tensor_with(&engine, basis)
}

struct SyncPtr(*mut f64);
unsafe impl Sync for SyncPtr {}
unsafe impl Send for SyncPtr {}

/// As [`eri_tensor`] with an existing engine.
pub fn eri_tensor_with(engine: &EriEngine, basis: &BasisSet) -> Vec<f64> {
    let nb = basis.n_basis;
    let ns = basis.shells.len();
    let mut g = vec![0.0; nb * nb * nb * nb];
    let ptr = SyncPtr(g.as_mut_ptr());
    let pairs: Vec<(usize, usize)> = (0..ns).flat_map(|a| (0..=a).map(move |b| (a, b))).collect();
    let off = &basis.offsets;
    pairs.par_iter().enumerate().for_each(|(iab, &(a, b))| {
        let ptr = &ptr;
        let mut buf = Vec::new();
        for &(c, d) in &pairs[..=iab] {
            engine.shell_quartet(a, b, c, d, &mut buf);
            let (na, nbb, nc, nd) = (
                engine.n_functions(a),
                engine.n_functions(b),
                engine.n_functions(c),
                engine.n_functions(d),
            );
            for i in 0..na {
                for j in 0..nbb {
                    for k in 0..nc {
                        for l in 0..nd {
                            let v = buf[((i * nbb + j) * nc + k) * nd + l];
                            let (p, q, r, s) = (off[a] + i, off[b] + j, off[c] + k, off[d] + l);
                            for (w, x, y, z) in [
                                (p, q, r, s),
                                (q, p, r, s),
                                (p, q, s, r),
                                (q, p, s, r),
                                (r, s, p, q),
                                (s, r, p, q),
                                (r, s, q, p),
                                (s, r, q, p),
                            ] {
                                // SAFETY: every element belongs to exactly one unique shell
                                // quartet, handled by exactly one task; images written twice
                                // within a task carry the same value.
                                unsafe {
                                    *ptr.0.add(((w * nb + x) * nb + y) * nb + z) = v;
                                }
                            }
                        }
                    }
                }
            }
        }
    });
    g
}
