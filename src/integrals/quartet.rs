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

use crate::integrals::boys::boys_array;
use crate::integrals::hrr;
use crate::integrals::shell_pair::PairData;
use crate::integrals::transform::transform_axis;
use crate::integrals::vrr::{self, VrrCoefs};

/// 2 π^{5/2}.
pub const TWO_PI_52: f64 = 2.0 * 17.493418327624862;

/// What the kernel needs to know of a shell.
#[derive(Debug, Clone)]
pub struct ShellMeta {
    pub l: usize,
    pub n_func: usize,
    pub n_cart: usize,
    /// Raw-Cartesian → final AO matrix (n_func × n_cart), None for the identity.
    pub transform: Option<&'static [f64]>,
}

/// Reusable buffers of one thread.
#[derive(Default)]
pub struct Scratch {
    vrr: Vec<f64>,
    acc: Vec<f64>,
    pacc: Vec<f64>,
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
pub fn ssss(pb: &PairData, pk: &PairData, tau: f64) -> f64 {
    let mut f = [0.0; 1];
    let mut sum = 0.0;
    for p in 0..pb.n_prim {
        let bp = pb.bound[p];
        if bp * pk.bound[0] < tau {
            break;
        }
        let (zeta, pc) = (pb.zeta[p], pb.center[p]);
        let mut inner = 0.0;
        for q in 0..pk.n_prim {
            if bp * pk.bound[q] < tau {
                break;
            }
            let eta = pk.zeta[q];
            let qc = pk.center[q];
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
        let (zeta, pc, kp) = (pb.zeta[p], pb.center[p], pb.kpref[p]);
        s.pacc.iter_mut().for_each(|x| *x = 0.0);
        for q in 0..pk.n_prim {
            if bp * pk.bound[q] < tau {
                break;
            }
            let eta = pk.zeta[q];
            let qc = pk.center[q];
            let inv = 1.0 / (zeta + eta);
            let rho = zeta * eta * inv;
            let pq = [pc[0] - qc[0], pc[1] - qc[1], pc[2] - qc[2]];
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

/// Steps 1–2 for L > 0.
fn primitives(plan: &vrr::VrrPlan, pb: &PairData, pk: &PairData, tau: f64, s: &mut Scratch) {
    let (nmb, nmk) = (pb.n_members, pk.n_members);
    let nt = plan.targets.len();
    let big_l = plan.l_total;
    let Scratch { vrr, acc, pacc, .. } = s;
    if vrr.len() < plan.buf_len {
        vrr.resize(plan.buf_len, 0.0);
    }
    vrr[..big_l + 2].iter_mut().for_each(|x| *x = 0.0);
    pacc.clear();
    pacc.resize(nmk * nt, 0.0);
    let base = plan.base;
    let mut c = VrrCoefs::default();
    for p in 0..pb.n_prim {
        let bp = pb.bound[p];
        if bp * pk.bound[0] < tau {
            break;
        }
        let (zeta, pc, kp) = (pb.zeta[p], pb.center[p], pb.kpref[p]);
        c.a[..3].copy_from_slice(&pb.pa[p]);
        c.c[0] = 0.5 / zeta;
        if nmb > 1 {
            pacc.iter_mut().for_each(|x| *x = 0.0);
        }
        for q in 0..pk.n_prim {
            if bp * pk.bound[q] < tau {
                break;
            }
            let eta = pk.zeta[q];
            let qc = pk.center[q];
            let inv = 1.0 / (zeta + eta);
            let rho = zeta * eta * inv;
            let pq = [pc[0] - qc[0], pc[1] - qc[1], pc[2] - qc[2]];
            let t = rho * (pq[0] * pq[0] + pq[1] * pq[1] + pq[2] * pq[2]);
            let f = &mut vrr[base..base + big_l + 1];
            boys_array(big_l, t, f);
            let pref = TWO_PI_52 * inv.sqrt() * kp * pk.kpref[q];
            f.iter_mut().for_each(|x| *x *= pref);
            let qa = pk.pa[q];
            c.a[3] = qa[0];
            c.a[4] = qa[1];
            c.a[5] = qa[2];
            let (wp, wq) = (-eta * inv, zeta * inv);
            for d in 0..3 {
                c.b[d] = wp * pq[d];
                c.b[3 + d] = wq * pq[d];
            }
            c.c[1] = 0.5 / eta;
            c.d[0] = 0.5 * eta * inv / zeta;
            c.d[1] = 0.5 * zeta * inv / eta;
            c.e = 0.5 * inv;
            vrr::run(plan, vrr, &c);
            let dst: &mut [f64] = if nmb == 1 { acc } else { pacc };
            if nmk == 1 {
                for (x, &t) in dst.iter_mut().zip(&plan.targets) {
                    *x += vrr[t as usize];
                }
            } else {
                for mk in 0..nmk {
                    let cq = pk.coef[mk * pk.n_prim + q];
                    for (x, &t) in dst[mk * nt..(mk + 1) * nt].iter_mut().zip(&plan.targets) {
                        *x += cq * vrr[t as usize];
                    }
                }
            }
        }
        if nmb > 1 {
            for m in 0..nmb {
                let cp = pb.coef[m * pb.n_prim + p];
                let row = &mut acc[m * nmk * nt..(m + 1) * nmk * nt];
                for (x, y) in row.iter_mut().zip(pacc.iter()) {
                    *x += cp * y;
                }
            }
        }
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
        if let Some(t) = m.transform {
            match state {
                None => transform_axis(src, &dims[..], axis, t, m.n_func, t1),
                Some(false) => transform_axis(t1, &dims[..], axis, t, m.n_func, t2),
                Some(true) => transform_axis(t2, &dims[..], axis, t, m.n_func, t1),
            }
            state = Some(state == Some(false));
            dims[axis] = m.n_func;
        }
    }
    state
}

/// Step 3 for one member pair: `acc` holds the contracted [e0|f0], f-major (n_f × n_e).
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
