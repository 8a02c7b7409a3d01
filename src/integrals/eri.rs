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
use crate::basis::{BasisSet, Shell};
use crate::integrals::boys::boys_array;
use crate::integrals::cartesian::{components, n_cartesian, MAX_L};
use crate::integrals::hermite_coulomb::{hermite_r, r_index, RScratch};
use crate::integrals::hermite_expansion::e_index;
use crate::integrals::shell_pair::ShellPair;
use crate::integrals::transform::{is_identity, transform_axis};
use rayon::prelude::*;
use std::cell::RefCell;
use std::sync::OnceLock;

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
    /// Position in `pairs` of the ordered pair (a, b), index a·n + b (u32::MAX: not kept).
    pair_index: Vec<u32>,
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
    inner_t: Vec<f64>,
    ket_terms: Vec<KetTerm>,
    ket_ranges: Vec<(usize, usize)>,
    bra_base: Vec<usize>,
    rs: RScratch,
    tmp: Vec<f64>,
}

const TWO_PI_52: f64 = 2.0 * 17.493418327624862; // 2 π^{5/2}

/// (ss|ss) for contracted s shells: Σ_pq 2π^{5/2}/(pq√(p+q)) c_p c_q E_p E_q F_0(α R_PQ²)
/// (the general formula with L = 0).
fn ssss(pab: &ShellPair, pcd: &ShellPair) -> f64 {
    let mut sum = 0.0;
    let mut f = [0.0; 1];
    for (kp, pp) in pab.prims.iter().enumerate() {
        // E^{00}_0 of x carries exp(−μ|AB|²); y and z tables are 1
        let cp = pp.coef_over_p * pab.tables(kp).0[0];
        let mut inner = 0.0;
        for (kq, qq) in pcd.prims.iter().enumerate() {
            let psum = pp.p + qq.p;
            let inv_sqrt = 1.0 / psum.sqrt();
            let alpha = pp.p * qq.p * (inv_sqrt * inv_sqrt);
            let r2 = (pp.center[0] - qq.center[0]).powi(2)
                + (pp.center[1] - qq.center[1]).powi(2)
                + (pp.center[2] - qq.center[2]).powi(2);
            boys_array(0, alpha * r2, &mut f);
            inner += qq.coef_over_p * pcd.tables(kq).0[0] * f[0] * inv_sqrt;
        }
        sum += cp * inner;
    }
    TWO_PI_52 * sum
}

/// One (component pair, Hermite index) entry of a pair's expansion: the Cartesian pair
/// index, the positions of E^{ij}_t in the x, y, z tables, (t, u, v) and its index in
/// [`hermite_list`].
#[derive(Clone, Copy)]
struct TermIdx {
    pair: u32,
    ix: u16,
    iy: u16,
    iz: u16,
    t: u8,
    u: u8,
    v: u8,
    h: u16,
}

/// (t, u, v) with t + u + v ≤ l, t outermost.
fn hermite_list(l: usize) -> &'static [[usize; 3]] {
    static LISTS: OnceLock<Vec<Vec<[usize; 3]>>> = OnceLock::new();
    &LISTS.get_or_init(|| {
        (0..=2 * MAX_L)
            .map(|l| {
                let mut v = Vec::new();
                for t in 0..=l {
                    for u in 0..=l - t {
                        for w in 0..=l - t - u {
                            v.push([t, u, w]);
                        }
                    }
                }
                v
            })
            .collect()
    })[l]
}

/// Static expansion structure of a shell pair with angular momenta (la, lb).
fn term_table(la: usize, lb: usize) -> &'static [TermIdx] {
    static TABLES: OnceLock<Vec<Vec<TermIdx>>> = OnceLock::new();
    let t = TABLES.get_or_init(|| {
        let mut all = Vec::new();
        for la in 0..=MAX_L {
            for lb in 0..=MAX_L {
                let lab = la + lb;
                let list = hermite_list(lab);
                let hidx = |t: usize, u: usize, v: usize| {
                    list.iter().position(|&x| x == [t, u, v]).unwrap()
                };
                let ca = components(la);
                let cb = components(lb);
                let mut terms = Vec::new();
                for (ia, a) in ca.iter().enumerate() {
                    for (ib, b) in cb.iter().enumerate() {
                        for t in 0..=a[0] + b[0] {
                            for u in 0..=a[1] + b[1] {
                                for v in 0..=a[2] + b[2] {
                                    terms.push(TermIdx {
                                        pair: (ia * cb.len() + ib) as u32,
                                        ix: e_index(lb, a[0], b[0], t, lab) as u16,
                                        iy: e_index(lb, a[1], b[1], u, lab) as u16,
                                        iz: e_index(lb, a[2], b[2], v, lab) as u16,
                                        t: t as u8,
                                        u: u as u8,
                                        v: v as u8,
                                        h: hidx(t, u, v) as u16,
                                    });
                                }
                            }
                        }
                    }
                }
                all.push(terms);
            }
        }
        all
    });
    &t[la * (MAX_L + 1) + lb]
}

thread_local! {
    static SCRATCH: RefCell<Scratch> = RefCell::new(Scratch::default());
}

impl EriEngine {
    pub fn new(basis: &BasisSet) -> Self {
        let coefs: Vec<Vec<f64>> = basis.shells.iter().map(contracted_coefficients).collect();
        Self::build(&basis.shells, &coefs, &|_, _| true)
    }

    /// Engine over `shells` with normalised coefficients `coefs` (see
    /// `crate::basis::normalize`), keeping pair data only for the pairs (a, b) where
    /// `wanted(a, b)` (called with a ≥ b; the pair (b, a) is kept with it). Quartets may only
    /// use kept pairs. Schwarz bounds of pairs not kept are zero.
    pub(crate) fn build(
        shells_in: &[Shell],
        coefs: &[Vec<f64>],
        wanted: &(dyn Fn(usize, usize) -> bool + Sync),
    ) -> Self {
        let n = shells_in.len();
        let shells: Vec<ShellMeta> = shells_in
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
        let list: Vec<(usize, usize)> = (0..n)
            .flat_map(|a| (0..n).map(move |b| (a, b)))
            .filter(|&(a, b)| wanted(a.max(b), a.min(b)))
            .collect();
        let pairs: Vec<ShellPair> = list
            .par_iter()
            .map(|&(a, b)| ShellPair::new(&shells_in[a], &shells_in[b], &coefs[a], &coefs[b]))
            .collect();
        let mut pair_index = vec![u32::MAX; n * n];
        for (k, &(a, b)) in list.iter().enumerate() {
            pair_index[a * n + b] = k as u32;
        }
        let mut eng = EriEngine {
            n_shells: n,
            shells,
            pairs,
            pair_index,
            schwarz: Vec::new(),
        };
        let diag: Vec<(usize, usize, f64)> = list
            .iter()
            .filter(|&&(a, b)| {
                a >= b
                    && !eng.pairs[eng.pair_index[a * n + b] as usize]
                        .prims
                        .iter()
                        .any(|p| p.p <= 0.0)
            })
            .copied()
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
        let pab = &self.pairs[self.pair_index[a * n + b] as usize];
        let pcd = &self.pairs[self.pair_index[c * n + d] as usize];
        let (sa, sb, sc, sd) = (
            &self.shells[a],
            &self.shells[b],
            &self.shells[c],
            &self.shells[d],
        );
        let (la, lb, lc, ld) = (sa.l, sb.l, sc.l, sd.l);
        if la + lb + lc + ld == 0 {
            out.clear();
            out.push(ssss(pab, pcd));
            return;
        }
        let (lab, lcd) = (la + lb, lc + ld);
        let big_l = lab + lcd;
        let dim = big_l + 1;
        let nab = sa.n_cart * sb.n_cart;
        let ncd = sc.n_cart * sd.n_cart;
        let Scratch {
            cart,
            inner,
            inner_t,
            ket_terms,
            ket_ranges,
            bra_base,
            rs,
            tmp,
        } = s;

        // Hermite functions of the bra (t,u,v), t+u+v ≤ lab, in `hermite_list` order:
        // their offsets in the R cube.
        bra_base.clear();
        for &[t, u, v] in hermite_list(lab) {
            bra_base.push(r_index(dim, t, u, v));
        }
        let nh = bra_base.len();

        // Ket Hermite terms per ket primitive pair, sign (−1)^{τ+ν+φ} folded in.
        ket_terms.clear();
        ket_ranges.clear();
        let ket_table = term_table(lc, ld);
        for q in 0..pcd.prims.len() {
            let (ex, ey, ez) = pcd.tables(q);
            let start = ket_terms.len();
            for tm in ket_table {
                let val = ex[tm.ix as usize] * ey[tm.iy as usize] * ez[tm.iz as usize];
                if val == 0.0 {
                    continue;
                }
                let (t, u, v) = (tm.t as usize, tm.u as usize, tm.v as usize);
                let sign = if (t + u + v) % 2 == 0 { 1.0 } else { -1.0 };
                ket_terms.push(KetTerm {
                    cd: tm.pair,
                    off: r_index(dim, t, u, v) as u32,
                    val: sign * val,
                });
            }
            ket_ranges.push((start, ket_terms.len()));
        }

        cart.clear();
        cart.resize(nab * ncd, 0.0);
        inner.resize(ncd * nh, 0.0);
        inner_t.resize(ncd * nh, 0.0);
        let bra_table = term_table(la, lb);
        for (kp, pp) in pab.prims.iter().enumerate() {
            inner.iter_mut().for_each(|x| *x = 0.0);
            for (kq, qq) in pcd.prims.iter().enumerate() {
                let psum = pp.p + qq.p;
                let inv_sqrt = 1.0 / psum.sqrt();
                let alpha = pp.p * qq.p * (inv_sqrt * inv_sqrt);
                let pq = [
                    pp.center[0] - qq.center[0],
                    pp.center[1] - qq.center[1],
                    pp.center[2] - qq.center[2],
                ];
                let pref = TWO_PI_52 * inv_sqrt * pp.coef_over_p * qq.coef_over_p;
                let r = hermite_r(big_l, alpha, pq, pref, rs);
                let (t0, t1) = ket_ranges[kq];
                if nh == 1 {
                    // bra (ss|: one Hermite function, a plain scatter over the ket terms
                    for term in &ket_terms[t0..t1] {
                        inner[term.cd as usize] += term.val * r[term.off as usize];
                    }
                    continue;
                }
                for term in &ket_terms[t0..t1] {
                    let row = &mut inner[term.cd as usize * nh..(term.cd as usize + 1) * nh];
                    let rr = &r[term.off as usize..];
                    let val = term.val;
                    for (x, &bb) in row.iter_mut().zip(bra_base.iter()) {
                        *x += val * rr[bb];
                    }
                }
            }
            // transpose to [h][cd] so the bra step runs over contiguous rows
            for cdi in 0..ncd {
                for h in 0..nh {
                    inner_t[h * ncd + cdi] = inner[cdi * nh + h];
                }
            }
            // apply the bra Hermite coefficients
            let (ex, ey, ez) = pab.tables(kp);
            for tm in bra_table {
                let val = ex[tm.ix as usize] * ey[tm.iy as usize] * ez[tm.iz as usize];
                if val == 0.0 {
                    continue;
                }
                let ab = tm.pair as usize;
                let h = tm.h as usize;
                let dst = &mut cart[ab * ncd..(ab + 1) * ncd];
                let src = &inner_t[h * ncd..(h + 1) * ncd];
                for (x, &y) in dst.iter_mut().zip(src) {
                    *x += val * y;
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
