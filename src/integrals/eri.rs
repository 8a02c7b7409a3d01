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
    /// Representative (lowest index) of each shell's general-contraction family: shells on
    /// the same centre with the same l, harmonics and primitive exponents.
    family_of: Vec<usize>,
    /// Members of the family of each shell (including itself), in index order.
    members: Vec<Vec<usize>>,
    /// Distinguishes engines in the thread-local family cache.
    id: u64,
}

static ENGINE_ID: std::sync::atomic::AtomicU64 = std::sync::atomic::AtomicU64::new(1);

/// Thread-local cache of family blocks (F_a F_b|F_c F_d): callers that ask for the members
/// of general contractions close together (in any order) get them without recomputation.
/// Cleared when the engine changes or when it holds more than `FAMILY_CACHE_LIMIT` values.
#[derive(Default)]
struct FamilyCache {
    engine: u64,
    blocks: std::collections::HashMap<[usize; 4], Vec<Vec<f64>>>,
    values: usize,
}

const FAMILY_CACHE_LIMIT: usize = 4 << 20;

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
    fam_cart: Vec<f64>,
    fam_inner: Vec<f64>,
    fam_temp: Vec<f64>,
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
    static FAMILY: RefCell<FamilyCache> = RefCell::new(FamilyCache::default());
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
        let mut family_of: Vec<usize> = (0..n).collect();
        for a in 0..n {
            let sa = &shells_in[a];
            if sa.exponents.len() < 2 {
                continue;
            }
            if let Some(r) = (0..a).find(|&r| {
                let sr = &shells_in[r];
                family_of[r] == r
                    && sr.l == sa.l
                    && sr.pure == sa.pure
                    && sr.center == sa.center
                    && sr.exponents == sa.exponents
            }) {
                family_of[a] = r;
            }
        }
        let mut members: Vec<Vec<usize>> = vec![Vec::new(); n];
        for a in 0..n {
            members[family_of[a]].push(a);
        }
        for a in 0..n {
            if family_of[a] != a {
                members[a] = members[family_of[a]].clone();
            }
        }
        let mut eng = EriEngine {
            n_shells: n,
            shells,
            pairs,
            pair_index,
            schwarz: Vec::new(),
            family_of,
            members,
            id: ENGINE_ID.fetch_add(1, std::sync::atomic::Ordering::Relaxed),
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
        let (fa, fb) = (&self.members[a], &self.members[b]);
        let (fc, fd) = (&self.members[c], &self.members[d]);
        let n = self.n_shells;
        let kept = |f: &[usize], g: &[usize]| {
            f.iter()
                .all(|&x| g.iter().all(|&y| self.pair_index[x * n + y] != u32::MAX))
        };
        let family = fa.len() * fb.len() * fc.len() * fd.len() > 1 && kept(fa, fb) && kept(fc, fd);
        if !family {
            SCRATCH.with(|s| self.quartet_with(a, b, c, d, out, &mut s.borrow_mut()));
            return;
        }
        FAMILY.with(|cache| {
            let mut cache = cache.borrow_mut();
            if cache.engine != self.id || cache.values > FAMILY_CACHE_LIMIT {
                cache.blocks.clear();
                cache.values = 0;
                cache.engine = self.id;
            }
            let key = [
                self.family_of[a],
                self.family_of[b],
                self.family_of[c],
                self.family_of[d],
            ];
            if !cache.blocks.contains_key(&key) {
                let combos = |f: &[usize], g: &[usize]| -> Vec<(usize, usize)> {
                    f.iter()
                        .flat_map(|&x| g.iter().map(move |&y| (x, y)))
                        .collect()
                };
                let (bras, kets) = (combos(fa, fb), combos(fc, fd));
                let mut blocks = Vec::new();
                SCRATCH
                    .with(|s| self.quartet_family(&bras, &kets, &mut blocks, &mut s.borrow_mut()));
                cache.values += blocks.iter().map(|v| v.len()).sum::<usize>();
                cache.blocks.insert(key, blocks);
            }
            let pos = |f: &[usize], x: usize| f.iter().position(|&y| y == x).unwrap();
            let ib = pos(fa, a) * fb.len() + pos(fb, b);
            let ik = pos(fc, c) * fd.len() + pos(fd, d);
            out.clear();
            out.extend_from_slice(&cache.blocks[&key][ib * fc.len() * fd.len() + ik]);
        });
    }

    /// (ab|c_m d_m) for ket pairs that share exponents and centres (members of
    /// general-contraction families, so their primitive pairs coincide and differ only in
    /// coefficients): the Boys function, R and the ket Hermite gather are done once per
    /// primitive quartet and scaled into each member's intermediate.
    fn quartet_family(
        &self,
        bras: &[(usize, usize)],
        kets: &[(usize, usize)],
        outs: &mut Vec<Vec<f64>>,
        s: &mut Scratch,
    ) {
        let n = self.n_shells;
        let mcount = kets.len();
        let bcount = bras.len();
        outs.resize_with(mcount * bcount, Vec::new);
        let (a, b) = bras[0];
        let bp_list: Vec<&ShellPair> = bras
            .iter()
            .map(|&(x, y)| &self.pairs[self.pair_index[x * n + y] as usize])
            .collect();
        let pab = bp_list[0];
        assert!(bp_list.iter().all(|p| p.prims.len() == pab.prims.len()));
        let kp_list: Vec<&ShellPair> = kets
            .iter()
            .map(|&(c, d)| &self.pairs[self.pair_index[c * n + d] as usize])
            .collect();
        let pcd = kp_list[0];
        assert!(kp_list.iter().all(|p| p.prims.len() == pcd.prims.len()));
        let (c0, d0) = kets[0];
        let (sa, sb, sc, sd) = (
            &self.shells[a],
            &self.shells[b],
            &self.shells[c0],
            &self.shells[d0],
        );
        let (la, lb, lc, ld) = (sa.l, sb.l, sc.l, sd.l);
        if la + lb + lc + ld == 0 {
            // (ss|ss): G_pq = E_p E_q F_0 / (p q √(p+q)) once, then c_bra^T G c_ket per member
            let mut res = vec![0.0; bcount * mcount];
            let mut acc = vec![0.0; mcount];
            let mut f = [0.0; 1];
            for (kp, pp) in pab.prims.iter().enumerate() {
                acc.iter_mut().for_each(|x| *x = 0.0);
                let ep = pab.tables(kp).0[0] / pp.p;
                for (kq, qq) in pcd.prims.iter().enumerate() {
                    let psum = pp.p + qq.p;
                    let inv_sqrt = 1.0 / psum.sqrt();
                    let alpha = pp.p * qq.p * (inv_sqrt * inv_sqrt);
                    let r2 = (pp.center[0] - qq.center[0]).powi(2)
                        + (pp.center[1] - qq.center[1]).powi(2)
                        + (pp.center[2] - qq.center[2]).powi(2);
                    boys_array(0, alpha * r2, &mut f);
                    let g = pcd.tables(kq).0[0] / qq.p * f[0] * inv_sqrt;
                    for (m, kpm) in kp_list.iter().enumerate() {
                        acc[m] += kpm.prims[kq].coef * g;
                    }
                }
                for (mb, bpm) in bp_list.iter().enumerate() {
                    let cb = bpm.prims[kp].coef * ep;
                    for m in 0..mcount {
                        res[mb * mcount + m] += cb * acc[m];
                    }
                }
            }
            for (k, v) in res.into_iter().enumerate() {
                outs[k].clear();
                outs[k].push(TWO_PI_52 * v);
            }
            return;
        }
        let (lab, lcd) = (la + lb, lc + ld);
        let big_l = lab + lcd;
        let dim = big_l + 1;
        let nab = sa.n_cart * sb.n_cart;
        let ncd = sc.n_cart * sd.n_cart;
        let Scratch {
            cart,
            inner_t,
            ket_terms,
            ket_ranges,
            bra_base,
            rs,
            tmp,
            fam_cart,
            fam_inner,
            fam_temp,
            ..
        } = s;
        bra_base.clear();
        for &[t, u, v] in hermite_list(lab) {
            bra_base.push(r_index(dim, t, u, v));
        }
        let nh = bra_base.len();
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
        let blk = ncd * nh;
        fam_cart.clear();
        fam_cart.resize(bcount * mcount * nab * ncd, 0.0);
        fam_inner.resize(mcount * blk, 0.0);
        fam_temp.resize(blk, 0.0);
        inner_t.resize(blk, 0.0);
        let bra_table = term_table(la, lb);
        for (kp, pp) in pab.prims.iter().enumerate() {
            fam_inner.iter_mut().for_each(|x| *x = 0.0);
            for (kq, qq) in pcd.prims.iter().enumerate() {
                let psum = pp.p + qq.p;
                let inv_sqrt = 1.0 / psum.sqrt();
                let alpha = pp.p * qq.p * (inv_sqrt * inv_sqrt);
                let pq = [
                    pp.center[0] - qq.center[0],
                    pp.center[1] - qq.center[1],
                    pp.center[2] - qq.center[2],
                ];
                // contraction coefficients are applied per member below
                let pref = TWO_PI_52 * inv_sqrt / (pp.p * qq.p);
                let r = hermite_r(big_l, alpha, pq, pref, rs);
                fam_temp.iter_mut().for_each(|x| *x = 0.0);
                let (t0, t1) = ket_ranges[kq];
                for term in &ket_terms[t0..t1] {
                    let row = &mut fam_temp[term.cd as usize * nh..(term.cd as usize + 1) * nh];
                    let rr = &r[term.off as usize..];
                    let val = term.val;
                    for (x, &bb) in row.iter_mut().zip(bra_base.iter()) {
                        *x += val * rr[bb];
                    }
                }
                for (m, kpm) in kp_list.iter().enumerate() {
                    let cm = kpm.prims[kq].coef;
                    if cm == 0.0 {
                        continue;
                    }
                    let dst = &mut fam_inner[m * blk..(m + 1) * blk];
                    for (x, &y) in dst.iter_mut().zip(fam_temp.iter()) {
                        *x += cm * y;
                    }
                }
            }
            let (ex, ey, ez) = pab.tables(kp);
            for m in 0..mcount {
                let inner = &fam_inner[m * blk..(m + 1) * blk];
                for cdi in 0..ncd {
                    for h in 0..nh {
                        inner_t[h * ncd + cdi] = inner[cdi * nh + h];
                    }
                }
                for (mb, bpm) in bp_list.iter().enumerate() {
                    let cb = bpm.prims[kp].coef;
                    if cb == 0.0 {
                        continue;
                    }
                    let o = (mb * mcount + m) * nab * ncd;
                    let cart_m = &mut fam_cart[o..o + nab * ncd];
                    for tm in bra_table {
                        let val = cb * ex[tm.ix as usize] * ey[tm.iy as usize] * ez[tm.iz as usize];
                        if val == 0.0 {
                            continue;
                        }
                        let ab = tm.pair as usize;
                        let h = tm.h as usize;
                        let dst = &mut cart_m[ab * ncd..(ab + 1) * ncd];
                        let src = &inner_t[h * ncd..(h + 1) * ncd];
                        for (x, &y) in dst.iter_mut().zip(src) {
                            *x += val * y;
                        }
                    }
                }
            }
        }
        let metas = [sa, sb, sc, sd];
        for m in 0..mcount * bcount {
            cart.clear();
            cart.extend_from_slice(&fam_cart[m * nab * ncd..(m + 1) * nab * ncd]);
            let out = &mut outs[m];
            let mut dims = [sa.n_cart, sb.n_cart, sc.n_cart, sd.n_cart];
            let mut in_out = false;
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
            ..
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
