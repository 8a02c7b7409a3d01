//! One contracted two-electron quartet (ab|cd) by the Head-Gordon–Pople scheme
//! (M. Head-Gordon & J. A. Pople, J. Chem. Phys. 89 (1988) 5777):
//!
//! 1. per primitive quartet: the Boys function F_m(T) (`boys`) and the vertical recurrence
//!    (`vrr`) for [e0|f0]^(0), l_a ≤ |e| ≤ l_a+l_b, l_c ≤ |f| ≤ l_c+l_d;
//! 2. contraction: the [e0|f0] are summed over the primitive quartets with the contraction
//!    coefficients (for general-contraction families, once per member pair, sharing step 1);
//! 3. per contracted quartet: the horizontal recurrence (`hrr`) on the ket, the ket's
//!    Cartesian → final-AO transform, the same on the bra, giving (ab|cd).
//!
//! Primitive quartets are skipped when the product of their pairs' Cauchy–Schwarz bounds
//! (`shell_pair::PairData::bound`, coefficients included) is below `tau`; the pairs are
//! sorted by bound, so the loops stop at the first small product.

use crate::integrals::boys::{boys_array, M_MAX};
use crate::integrals::hrr;
use crate::integrals::shell_pair::PairData;
use crate::integrals::transform::{transform_axis_sparse, Sparse};
use crate::integrals::vrr::{self, BatchCoefs, NB_MAX};

/// 2 π^{5/2}.
pub const TWO_PI_52: f64 = 2.0 * 17.493418327624862;

/// What the kernel needs to know of a shell.
#[derive(Debug, Clone)]
pub struct ShellMeta {
    pub l: usize,
    pub n_func: usize,
    pub n_cart: usize,
    /// Raw-Cartesian → final AO matrix (n_func × n_cart), None for the identity.
    pub transform: Option<Sparse>,
}

/// Reusable buffers of one thread.
#[derive(Default)]
pub struct Scratch {
    vrr: Vec<f64>,
    acc: Vec<f64>,
    pacc: Vec<f64>,
    bc: Box<BatchCoefs>,
    idx_b: Vec<u32>,
    idx_k: Vec<u32>,
    rows: Vec<f64>,
    brows: Vec<f64>,
    t1: Vec<f64>,
    t2: Vec<f64>,
}

/// (ab|cd) for every member pair of the bra (`pb`) and ket (`pk`) pair data, into
/// `out[(mb · n_members(pk) + mk) · block ..]`, block = n_a n_b n_c n_d final functions, each
/// block laid out [a][b][c][d].
pub fn contracted_quartet(
    metas: [&ShellMeta; 4],
    pb: &PairData,
    pk: &PairData,
    tau: f64,
    out: &mut [f64],
    s: &mut Scratch,
) {
    let [ma, mb, mc, md] = metas;
    let (la, lb, lc, ld) = (ma.l, mb.l, mc.l, md.l);
    let plan = vrr::plan(la, la + lb, lc, lc + ld);
    let nt = plan.targets.len();
    let (nmb, nmk) = (pb.n_members, pk.n_members);
    s.acc.clear();
    s.acc.resize(nmb * nmk * nt, 0.0);
    if plan.l_total == 0 {
        primitives_ssss(pb, pk, tau, s);
    } else {
        primitives(plan, pb, pk, tau, s);
    }
    let block = ma.n_func * mb.n_func * mc.n_func * md.n_func;
    let acc = std::mem::take(&mut s.acc);
    for (m, dst) in out[..nmb * nmk * block].chunks_exact_mut(block).enumerate() {
        finish(
            metas,
            &acc[m * nt..(m + 1) * nt],
            pb.ab,
            pk.ab,
            plan.n_e,
            dst,
            s,
        );
    }
    s.acc = acc;
}

/// (ss|ss) of two single-member pairs: Σ_pq 2π^{5/2}/(ζη√(ζ+η)) K_AB K_CD c_p c_q F_0(ρ|PQ|²),
/// with the same screening as [`contracted_quartet`] (the short path for the commonest class).
#[inline(never)]
pub fn ssss(pb: &PairData, pk: &PairData, tau: f64) -> f64 {
    let mut f = [0.0; 1];
    let mut sum = 0.0;
    for p in 0..pb.n_prim {
        let bp = pb.bound[p];
        if bp * pk.bound[0] < tau {
            break;
        }
        let zeta = pb.zeta[p];
        let pc = [pb.center[0][p], pb.center[1][p], pb.center[2][p]];
        let mut inner = 0.0;
        for q in 0..pk.n_prim {
            if bp * pk.bound[q] < tau {
                break;
            }
            let eta = pk.zeta[q];
            let qc = [pk.center[0][q], pk.center[1][q], pk.center[2][q]];
            let inv = 1.0 / (zeta + eta);
            let rho = zeta * eta * inv;
            let pq = [pc[0] - qc[0], pc[1] - qc[1], pc[2] - qc[2]];
            boys_array(
                0,
                rho * (pq[0] * pq[0] + pq[1] * pq[1] + pq[2] * pq[2]),
                &mut f,
            );
            inner += inv.sqrt() * pk.kpref[q] * f[0];
        }
        sum += pb.kpref[p] * inner;
    }
    TWO_PI_52 * sum
}

/// Steps 1–2 for L = 0: [00|00] = 2π^{5/2}/(ζη√(ζ+η)) K_AB K_CD F_0(ρ|PQ|²).
#[inline(never)]
fn primitives_ssss(pb: &PairData, pk: &PairData, tau: f64, s: &mut Scratch) {
    let (nmb, nmk) = (pb.n_members, pk.n_members);
    let mut f = [0.0; 1];
    s.pacc.clear();
    s.pacc.resize(nmk, 0.0);
    for p in 0..pb.n_prim {
        let bp = pb.bound[p];
        if bp * pk.bound[0] < tau {
            break;
        }
        let (zeta, kp) = (pb.zeta[p], pb.kpref[p]);
        let pc = [pb.center[0][p], pb.center[1][p], pb.center[2][p]];
        s.pacc.iter_mut().for_each(|x| *x = 0.0);
        for q in 0..pk.n_prim {
            if bp * pk.bound[q] < tau {
                break;
            }
            let eta = pk.zeta[q];
            let inv = 1.0 / (zeta + eta);
            let rho = zeta * eta * inv;
            let pq = [
                pc[0] - pk.center[0][q],
                pc[1] - pk.center[1][q],
                pc[2] - pk.center[2][q],
            ];
            boys_array(
                0,
                rho * (pq[0] * pq[0] + pq[1] * pq[1] + pq[2] * pq[2]),
                &mut f,
            );
            let v = TWO_PI_52 * inv.sqrt() * kp * pk.kpref[q] * f[0];
            if nmk == 1 {
                s.pacc[0] += v;
            } else {
                for (mk, x) in s.pacc.iter_mut().enumerate() {
                    *x += pk.coef[mk * pk.n_prim + q] * v;
                }
            }
        }
        if nmb == 1 {
            for (x, y) in s.acc.iter_mut().zip(&s.pacc) {
                *x += y;
            }
        } else {
            for m in 0..nmb {
                let c = pb.coef[m * pb.n_prim + p];
                for (x, y) in s.acc[m * nmk..(m + 1) * nmk].iter_mut().zip(&s.pacc) {
                    *x += c * y;
                }
            }
        }
    }
}

/// Values of VRR scratch per batch (keeps a batch in the fast caches).
const BATCH_VALUES: usize = 16384;

/// Steps 1–2 for L > 0. Primitive quartets are run in batches through the vectorised
/// recurrence. For plain shell pairs (coefficients folded into `kpref`) a batch is any run of
/// the surviving primitive quartets, bra-major. For general-contraction families the
/// primitive pairs of the side with more of them (the "inner" side) form the batches, for
/// each primitive pair of the other ("outer") side; the inner member coefficients are applied
/// per batch, the outer ones once per outer primitive.
#[inline(never)]
fn primitives(plan: &vrr::VrrPlan, pb: &PairData, pk: &PairData, tau: f64, s: &mut Scratch) {
    let nmk = pk.n_members;
    let nt = plan.targets.len();
    let nb_max = (BATCH_VALUES / plan.buf_len).clamp(1, NB_MAX);
    if s.vrr.len() < plan.buf_len * nb_max {
        s.vrr.resize(plan.buf_len * nb_max, 0.0);
    }
    if pb.n_members == 1 && nmk == 1 {
        let Scratch {
            idx_b, idx_k, acc, ..
        } = s;
        idx_b.clear();
        idx_k.clear();
        for p in 0..pb.n_prim {
            let bp = pb.bound[p];
            let n_q = pk.bound.partition_point(|&b| bp * b >= tau);
            if n_q == 0 {
                break;
            }
            idx_b.extend(std::iter::repeat_n(p as u32, n_q));
            idx_k.extend(0..n_q as u32);
        }
        let mut sums = std::mem::take(acc);
        let (ib, ik) = (std::mem::take(idx_b), std::mem::take(idx_k));
        for (cb, ck) in ib.chunks(nb_max).zip(ik.chunks(nb_max)) {
            let nb = cb.len();
            batch(plan, pb, pk, cb, ck, s);
            for (x, &tg) in sums[..nt].iter_mut().zip(&plan.targets) {
                *x += sum(&s.vrr[tg as usize * nb..(tg as usize + 1) * nb]);
            }
        }
        s.acc = sums;
        s.idx_b = ib;
        s.idx_k = ik;
        return;
    }
    let over_ket = pk.n_prim >= pb.n_prim;
    let (outer, inner) = if over_ket { (pb, pk) } else { (pk, pb) };
    let (nm_out, nm_in) = (outer.n_members, inner.n_members);
    // with a single outer member its coefficient is folded into kpref: accumulate directly
    let direct = nm_out == 1;
    let mut acc = std::mem::take(&mut s.acc);
    let mut pacc = std::mem::take(&mut s.pacc);
    pacc.clear();
    pacc.resize(nm_in * nt, 0.0);
    let inner_idx: Vec<u32> = (0..inner.n_prim as u32).collect();
    let mut outer_idx = vec![0u32; nb_max];
    for o in 0..outer.n_prim {
        let bo = outer.bound[o];
        let n_in = inner.bound.partition_point(|&b| bo * b >= tau);
        if n_in == 0 {
            break;
        }
        if !direct {
            pacc.iter_mut().for_each(|x| *x = 0.0);
        }
        let dst: &mut [f64] = if direct { &mut acc } else { &mut pacc };
        outer_idx.iter_mut().for_each(|x| *x = o as u32);
        let mut i0 = 0;
        while i0 < n_in {
            let nb = (n_in - i0).min(nb_max);
            let ii = &inner_idx[i0..i0 + nb];
            let oo = &outer_idx[..nb];
            if over_ket {
                batch(plan, pb, pk, oo, ii, s);
            } else {
                batch(plan, pb, pk, ii, oo, s);
            }
            let vrr = &s.vrr;
            if nm_in == 1 {
                for (x, &tg) in dst[..nt].iter_mut().zip(&plan.targets) {
                    *x += sum(&vrr[tg as usize * nb..(tg as usize + 1) * nb]);
                }
            } else {
                for mi in 0..nm_in {
                    let cf = &inner.coef[mi * inner.n_prim + i0..mi * inner.n_prim + i0 + nb];
                    for (x, &tg) in dst[mi * nt..(mi + 1) * nt].iter_mut().zip(&plan.targets) {
                        *x += dot(cf, &vrr[tg as usize * nb..(tg as usize + 1) * nb]);
                    }
                }
            }
            i0 += nb;
        }
        if !direct {
            for mo in 0..nm_out {
                let co = outer.coef[mo * outer.n_prim + o];
                for mi in 0..nm_in {
                    let (mb, mk) = if over_ket { (mo, mi) } else { (mi, mo) };
                    let row = &mut acc[(mb * nmk + mk) * nt..(mb * nmk + mk + 1) * nt];
                    for (x, y) in row.iter_mut().zip(&pacc[mi * nt..(mi + 1) * nt]) {
                        *x += co * y;
                    }
                }
            }
        }
    }
    s.acc = acc;
    s.pacc = pacc;
}

/// One batch: primitive quartets (ib[j], ik[j]) of the bra and ket pair data through the
/// Boys function and the vertical recurrence; results in s.vrr (batch layout of
/// `vrr::run_batch`).
fn batch(
    plan: &vrr::VrrPlan,
    pb: &PairData,
    pk: &PairData,
    ib: &[u32],
    ik: &[u32],
    s: &mut Scratch,
) {
    let nb = ib.len();
    let big_l = plan.l_total;
    let base = plan.base;
    let mut t = [0.0; NB_MAX];
    let mut pref = [0.0; NB_MAX];
    let mut fm = [0.0; M_MAX + 1];
    let Scratch { vrr, bc, .. } = s;
    fill(pb, pk, ib, ik, bc, &mut t, &mut pref);
    for j in 0..nb {
        boys_array(big_l, t[j], &mut fm);
        for m in 0..=big_l {
            vrr[(base + m) * nb + j] = pref[j] * fm[m];
        }
    }
    if nb == 1 {
        vrr::run(plan, vrr, &bc.single(0));
    } else {
        vrr::run_batch(plan, vrr, nb, bc);
    }
}

/// Σ v in a fixed order (four partial sums).
#[inline]
fn sum(v: &[f64]) -> f64 {
    let mut s = [0.0; 4];
    let mut ch = v.chunks_exact(4);
    for c in &mut ch {
        for k in 0..4 {
            s[k] += c[k];
        }
    }
    let mut r = (s[0] + s[1]) + (s[2] + s[3]);
    for x in ch.remainder() {
        r += x;
    }
    r
}

/// Σ c·v in a fixed order (four partial sums).
#[inline]
fn dot(c: &[f64], v: &[f64]) -> f64 {
    let mut s = [0.0; 4];
    let mut cc = c.chunks_exact(4);
    let mut vv = v.chunks_exact(4);
    for (a, b) in (&mut cc).zip(&mut vv) {
        for k in 0..4 {
            s[k] += a[k] * b[k];
        }
    }
    let mut r = (s[0] + s[1]) + (s[2] + s[3]);
    for (a, b) in cc.remainder().iter().zip(vv.remainder()) {
        r += a * b;
    }
    r
}

/// Boys arguments, prefactors and recurrence coefficients of the batch of primitive
/// quartets (ib[j], ik[j]).
#[inline(never)]
fn fill(
    pb: &PairData,
    pk: &PairData,
    ib: &[u32],
    ik: &[u32],
    bc: &mut BatchCoefs,
    t: &mut [f64; NB_MAX],
    pref: &mut [f64; NB_MAX],
) {
    for (j, (&p, &q)) in ib.iter().zip(ik).enumerate() {
        let (p, q) = (p as usize, q as usize);
        let (zeta, eta) = (pb.zeta[p], pk.zeta[q]);
        let inv = 1.0 / (zeta + eta);
        let rho = zeta * eta * inv;
        let (wp, wq) = (-eta * inv, zeta * inv);
        let mut r2 = 0.0;
        for d in 0..3 {
            let pq = pb.center[d][p] - pk.center[d][q];
            r2 += pq * pq;
            bc.b[d][j] = wp * pq;
            bc.b[3 + d][j] = wq * pq;
            bc.a[d][j] = pb.pa[d][p];
            bc.a[3 + d][j] = pk.pa[d][q];
        }
        t[j] = rho * r2;
        pref[j] = TWO_PI_52 * inv.sqrt() * pb.kpref[p] * pk.kpref[q];
        bc.c[0][j] = 0.5 * pb.inv_zeta[p];
        bc.c[1][j] = 0.5 * pk.inv_zeta[q];
        bc.d[0][j] = 0.5 * eta * inv * pb.inv_zeta[p];
        bc.d[1][j] = 0.5 * zeta * inv * pk.inv_zeta[q];
        bc.e[j] = 0.5 * inv;
    }
}

/// Apply the transforms of the listed axes (those that are not the identity) to `src` with
/// dimensions `dims`, alternating between `t1` and `t2`. Returns where the result is:
/// None (nothing applied: still `src`), Some(false) = `t1`, Some(true) = `t2`.
fn transform_axes(
    src: &[f64],
    dims: &mut [usize; 3],
    list: [(usize, &ShellMeta); 2],
    t1: &mut Vec<f64>,
    t2: &mut Vec<f64>,
) -> Option<bool> {
    let mut state = None;
    for (axis, m) in list {
        if let Some(t) = &m.transform {
            match state {
                None => transform_axis_sparse(src, &dims[..], axis, t, t1),
                Some(false) => transform_axis_sparse(t1, &dims[..], axis, t, t2),
                Some(true) => transform_axis_sparse(t2, &dims[..], axis, t, t1),
            }
            state = Some(state == Some(false));
            dims[axis] = m.n_func;
        }
    }
    state
}

/// Step 3 for one member pair: `acc` holds the contracted [e0|f0], f-major (n_f × n_e).
#[inline(never)]
fn finish(
    metas: [&ShellMeta; 4],
    acc: &[f64],
    ab: [f64; 3],
    cd: [f64; 3],
    n_e: usize,
    out: &mut [f64],
    s: &mut Scratch,
) {
    let [ma, mb, mc, md] = metas;
    if ma.l + mb.l + mc.l + md.l == 0 {
        out[0] = acc[0];
        return;
    }
    let Scratch {
        rows,
        brows,
        t1,
        t2,
        ..
    } = s;
    // ket HRR: rows f (length n_e) → rows (c, d)
    let ket: &[f64] = if md.l > 0 {
        let hp = hrr::plan(mc.l, md.l);
        if rows.len() < hp.n_rows * n_e {
            rows.resize(hp.n_rows * n_e, 0.0);
        }
        rows[..acc.len()].copy_from_slice(acc);
        hrr::run(hp, rows, n_e, cd);
        &rows[hp.out_start() * n_e..(hp.out_start() + hp.n_out) * n_e]
    } else {
        acc
    };
    // ket transforms on [c][d][e]
    let mut dims = [mc.n_cart, md.n_cart, n_e];
    let cur: &[f64] = match transform_axes(ket, &mut dims, [(1, md), (0, mc)], t1, t2) {
        None => ket,
        Some(false) => t1,
        Some(true) => t2,
    };
    let ncd = dims[0] * dims[1];
    // transpose [cd][e] → [e][cd]: the input rows of the bra HRR
    let bra_plan = (mb.l > 0).then(|| hrr::plan(ma.l, mb.l));
    let need = bra_plan.map_or(n_e, |hp| hp.n_rows) * ncd;
    if brows.len() < need {
        brows.resize(need, 0.0);
    }
    for k in 0..ncd {
        let src = &cur[k * n_e..(k + 1) * n_e];
        for (e, &v) in src.iter().enumerate() {
            brows[e * ncd + k] = v;
        }
    }
    let (start, n_ab) = match bra_plan {
        Some(hp) => {
            hrr::run(hp, brows, ncd, ab);
            (hp.out_start(), hp.n_out)
        }
        None => (0, n_e),
    };
    let bra = &brows[start * ncd..(start + n_ab) * ncd];
    // bra transforms on [a][b][cd]
    let mut dims = [ma.n_cart, mb.n_cart, ncd];
    let res: &[f64] = match transform_axes(bra, &mut dims, [(1, mb), (0, ma)], t1, t2) {
        None => bra,
        Some(false) => t1,
        Some(true) => t2,
    };
    out.copy_from_slice(&res[..out.len()]);
}
