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
use crate::integrals::shell_pair::{PairData, Prim};
use crate::integrals::transform::{transform_axis_sparse, Sparse};
use crate::integrals::vrr::{self, BatchCoefs, VrrCoefs, LANES, NB_MAX};

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
    pub(crate) acc: Vec<f64>,
    pacc: Vec<f64>,
    bt: Box<BatchTemps>,
    idx_b: Vec<u32>,
    idx_k: Vec<u32>,
    lanes: Vec<f64>,
    rows: Vec<f64>,
    brows: Vec<f64>,
    t1: Vec<f64>,
    t2: Vec<f64>,
}

impl Scratch {
    /// The recurrence results of the last batch.
    pub(crate) fn vrr_slice(&self) -> &[f64] {
        &self.vrr
    }
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
    let n_acc = nmb * nmk * nt;
    grow(&mut s.acc, n_acc);
    if nmb * nmk == 1 && pb.n_prim == 1 && pk.n_prim == 1 {
        // one primitive quartet (uncontracted shells): straight into the targets
        if pb.bound[0] * pk.bound[0] >= tau {
            single(plan, &pb.prims[0], &pk.prims[0], &mut s.vrr);
            // 0 + v, as the summing paths (and `ket_batch`) give: same bits, signed zeros too
            for (x, &tg) in s.acc[..nt].iter_mut().zip(&plan.targets) {
                *x = 0.0 + s.vrr[tg as usize];
            }
        } else {
            s.acc[..nt].fill(0.0);
        }
    } else {
        s.acc[..n_acc].fill(0.0);
        if plan.l_total == 0 {
            primitives_ssss(pb, pk, tau, s);
        } else {
            primitives(plan, pb, pk, tau, s);
        }
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
        if pk.n_prim == 0 || bp * pk.bound[0] < tau {
            break;
        }
        let zeta = pb.prims[p].zeta;
        let pc = [
            pb.prims[p].center[0],
            pb.prims[p].center[1],
            pb.prims[p].center[2],
        ];
        let mut inner = 0.0;
        for q in 0..pk.n_prim {
            if bp * pk.bound[q] < tau {
                break;
            }
            let eta = pk.prims[q].zeta;
            let qc = [
                pk.prims[q].center[0],
                pk.prims[q].center[1],
                pk.prims[q].center[2],
            ];
            let inv = 1.0 / (zeta + eta);
            let rho = zeta * eta * inv;
            let pq = [pc[0] - qc[0], pc[1] - qc[1], pc[2] - qc[2]];
            boys_array(
                0,
                rho * (pq[0] * pq[0] + pq[1] * pq[1] + pq[2] * pq[2]),
                &mut f,
            );
            inner += inv.sqrt() * pk.prims[q].kpref * f[0];
        }
        sum += pb.prims[p].kpref * inner;
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
        if pk.n_prim == 0 || bp * pk.bound[0] < tau {
            break;
        }
        let (zeta, kp) = (pb.prims[p].zeta, pb.prims[p].kpref);
        let pc = [
            pb.prims[p].center[0],
            pb.prims[p].center[1],
            pb.prims[p].center[2],
        ];
        s.pacc.iter_mut().for_each(|x| *x = 0.0);
        for q in 0..pk.n_prim {
            if bp * pk.bound[q] < tau {
                break;
            }
            let eta = pk.prims[q].zeta;
            let inv = 1.0 / (zeta + eta);
            let rho = zeta * eta * inv;
            let pq = [
                pc[0] - pk.prims[q].center[0],
                pc[1] - pk.prims[q].center[1],
                pc[2] - pk.prims[q].center[2],
            ];
            boys_array(
                0,
                rho * (pq[0] * pq[0] + pq[1] * pq[1] + pq[2] * pq[2]),
                &mut f,
            );
            let v = TWO_PI_52 * inv.sqrt() * kp * pk.prims[q].kpref * f[0];
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
pub(crate) const BATCH_VALUES: usize = 16384;

/// Steps 1–2 for L > 0. Primitive quartets are run in batches through the vectorised
/// recurrence. For plain shell pairs (coefficients folded into `kpref`) a batch is any run
/// of the surviving primitive quartets, bra-major; with several batches the targets are
/// summed lane by lane (lane j collects the quartets at position j of their batch) and
/// reduced once at the end, in a fixed order. For general-contraction families the
/// primitive pairs of the side with more of them (the "inner" side) form the batches, for
/// each primitive pair of the other ("outer") side; the inner member coefficients are applied
/// per batch, the outer ones once per outer primitive.
#[inline(never)]
fn primitives(plan: &vrr::VrrPlan, pb: &PairData, pk: &PairData, tau: f64, s: &mut Scratch) {
    let nmk = pk.n_members;
    let nt = plan.targets.len();
    // (a multiple of LANES: batches are padded to whole chunks)
    let nb_max = (BATCH_VALUES / plan.buf_len).clamp(LANES, NB_MAX) / LANES * LANES;
    let mut lanes = std::mem::take(&mut s.lanes);
    let mut idx_b = std::mem::take(&mut s.idx_b);
    let mut idx_k = std::mem::take(&mut s.idx_k);
    let mut acc = std::mem::take(&mut s.acc);
    if pb.n_members == 1 && nmk == 1 {
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
        if idx_b.len() <= nb_max {
            // one batch: sum the targets straight away
            let st = batch(plan, pb, pk, &idx_b, &idx_k, s);
            contract(&plan.targets, None, &s.vrr, st, idx_b.len(), &mut acc[..nt]);
        } else {
            // several: sum lane by lane (lane width nb_max), reduce once
            grow(&mut lanes, nt * nb_max);
            lanes[..nt * nb_max].fill(0.0);
            for (cb, ck) in idx_b.chunks(nb_max).zip(idx_k.chunks(nb_max)) {
                let st = batch(plan, pb, pk, cb, ck, s);
                lanes_add(&plan.targets, &s.vrr, st, cb.len(), &mut lanes, nb_max);
            }
            for (x, l) in acc[..nt].iter_mut().zip(lanes.chunks_exact(nb_max)) {
                *x = sum(l);
            }
        }
    } else {
        let mut pacc = std::mem::take(&mut s.pacc);
        family_primitives(
            plan, pb, pk, tau, nb_max, &mut pacc, &mut idx_b, &mut idx_k, &mut acc, s,
        );
        s.pacc = pacc;
    }
    s.acc = acc;
    s.lanes = lanes;
    s.idx_b = idx_b;
    s.idx_k = idx_k;
}

/// The general-contraction case of [`primitives`].
#[allow(clippy::too_many_arguments)]
fn family_primitives(
    plan: &vrr::VrrPlan,
    pb: &PairData,
    pk: &PairData,
    tau: f64,
    nb_max: usize,
    pacc: &mut Vec<f64>,
    idx_b: &mut Vec<u32>,
    idx_k: &mut Vec<u32>,
    acc: &mut [f64],
    s: &mut Scratch,
) {
    let nmk = pk.n_members;
    let nt = plan.targets.len();
    let over_ket = pk.n_prim >= pb.n_prim;
    let (outer, inner) = if over_ket { (pb, pk) } else { (pk, pb) };
    let (nm_out, nm_in) = (outer.n_members, inner.n_members);
    // with a single outer member its coefficient is folded into kpref: accumulate directly
    let direct = nm_out == 1;
    grow(pacc, nm_in * nt);
    let (inner_idx, outer_idx) = if over_ket {
        (idx_k, idx_b)
    } else {
        (idx_b, idx_k)
    };
    inner_idx.clear();
    inner_idx.extend(0..inner.n_prim as u32);
    outer_idx.clear();
    outer_idx.resize(nb_max, 0);
    for o in 0..outer.n_prim {
        let bo = outer.bound[o];
        let n_in = inner.bound.partition_point(|&b| bo * b >= tau);
        if n_in == 0 {
            break;
        }
        let dst: &mut [f64] = if direct {
            &mut acc[..nm_in * nt]
        } else {
            pacc[..nm_in * nt].fill(0.0);
            &mut pacc[..nm_in * nt]
        };
        outer_idx.iter_mut().for_each(|x| *x = o as u32);
        let mut i0 = 0;
        while i0 < n_in {
            let nb = (n_in - i0).min(nb_max);
            let ii = &inner_idx[i0..i0 + nb];
            let oo = &outer_idx[..nb];
            let st = if over_ket {
                batch(plan, pb, pk, oo, ii, s)
            } else {
                batch(plan, pb, pk, ii, oo, s)
            };
            for mi in 0..nm_in {
                let cf = (nm_in > 1)
                    .then(|| &inner.coef[mi * inner.n_prim + i0..mi * inner.n_prim + i0 + nb]);
                contract(
                    &plan.targets,
                    cf,
                    &s.vrr,
                    st,
                    nb,
                    &mut dst[mi * nt..(mi + 1) * nt],
                );
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
}

/// out[t] += Σ_j c[j] · vrr[targets[t]·nb + j] (c = 1 when None), j < nb, in a fixed order.
pub(crate) fn contract(
    targets: &[u32],
    c: Option<&[f64]>,
    vrr: &[f64],
    stride: usize,
    nb: usize,
    out: &mut [f64],
) {
    #[cfg(target_arch = "x86_64")]
    if std::arch::is_x86_feature_detected!("avx2") {
        // SAFETY: the feature is present.
        unsafe { contract_avx2(targets, c, vrr, stride, nb, out) };
        return;
    }
    contract_impl(targets, c, vrr, stride, nb, out)
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2")]
unsafe fn contract_avx2(
    targets: &[u32],
    c: Option<&[f64]>,
    vrr: &[f64],
    stride: usize,
    nb: usize,
    out: &mut [f64],
) {
    contract_impl(targets, c, vrr, stride, nb, out)
}

#[inline(always)]
fn contract_impl(
    targets: &[u32],
    c: Option<&[f64]>,
    vrr: &[f64],
    stride: usize,
    nb: usize,
    out: &mut [f64],
) {
    for (x, &tg) in out.iter_mut().zip(targets) {
        let v = &vrr[tg as usize * stride..tg as usize * stride + nb];
        *x += match c {
            None => sum(v),
            Some(c) => dot(&c[..nb], v),
        };
    }
}

/// Σ c·v in a fixed order (four partial sums).
#[inline(always)]
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

/// lanes[t·stride + j] += vrr[targets[t]·nb + j] for j < nb.
fn lanes_add(
    targets: &[u32],
    vrr: &[f64],
    vstride: usize,
    nb: usize,
    lanes: &mut [f64],
    stride: usize,
) {
    #[cfg(target_arch = "x86_64")]
    if std::arch::is_x86_feature_detected!("avx2") {
        // SAFETY: the feature is present.
        unsafe { lanes_add_avx2(targets, vrr, vstride, nb, lanes, stride) };
        return;
    }
    lanes_add_impl(targets, vrr, vstride, nb, lanes, stride)
}

#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2")]
unsafe fn lanes_add_avx2(
    targets: &[u32],
    vrr: &[f64],
    vstride: usize,
    nb: usize,
    lanes: &mut [f64],
    stride: usize,
) {
    lanes_add_impl(targets, vrr, vstride, nb, lanes, stride)
}

#[inline(always)]
fn lanes_add_impl(
    targets: &[u32],
    vrr: &[f64],
    vstride: usize,
    nb: usize,
    lanes: &mut [f64],
    stride: usize,
) {
    for (t, &tg) in targets.iter().enumerate() {
        let v = &vrr[tg as usize * vstride..tg as usize * vstride + nb];
        let l = &mut lanes[t * stride..t * stride + nb];
        for (x, y) in l.iter_mut().zip(v) {
            *x += y;
        }
    }
}

/// Σ v in a fixed order (four partial sums).
#[inline(always)]
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
) -> usize {
    let lanes = ib
        .iter()
        .zip(ik)
        .map(|(&p, &q)| (&pb.prims[p as usize], &pk.prims[q as usize]));
    batch_lanes(plan, lanes, ib.len(), s)
}

/// As [`batch`] for `nb` primitive quartets given as pairs of primitive-pair records.
/// Returns the lane stride of the results in s.vrr (1 for a single quartet).
pub(crate) fn batch_lanes<'a>(
    plan: &vrr::VrrPlan,
    lanes: impl Iterator<Item = (&'a Prim, &'a Prim)> + Clone,
    nb: usize,
    s: &mut Scratch,
) -> usize {
    if nb == 1 {
        let (x, y) = lanes.clone().next().expect("one lane");
        single(plan, x, y, &mut s.vrr);
        return 1;
    }
    // padded to whole vector chunks; the padding lanes repeat quartet 0 with prefactor 0
    let nbp = nb.div_ceil(LANES) * LANES;
    let big_l = plan.l_total;
    let base = plan.base;
    let Scratch { vrr, bt, .. } = s;
    grow(vrr, plan.buf_len * nbp);
    let BatchTemps { bc, t, pref, fm } = &mut **bt;
    fill(lanes, bc, t, pref);
    for j in nb..nbp {
        bc.copy_lane(0, j);
        t[j] = t[0];
        pref[j] = 0.0;
    }
    for j in 0..nbp {
        boys_array(big_l, t[j], fm);
        for m in 0..=big_l {
            vrr[(base + m) * nbp + j] = pref[j] * fm[m];
        }
    }
    vrr::run_batch(plan, vrr, nbp, bc);
    nbp
}

/// Boys function and vertical recurrence of the single primitive quartet (p, q), results in
/// `vrr` at the plan's offsets.
fn single(plan: &vrr::VrrPlan, x: &Prim, y: &Prim, vrr: &mut Vec<f64>) {
    let (zeta, eta) = (x.zeta, y.zeta);
    let inv = 1.0 / (zeta + eta);
    let rho = zeta * eta * inv;
    let (wp, wq) = (-eta * inv, zeta * inv);
    let pq = [
        x.center[0] - y.center[0],
        x.center[1] - y.center[1],
        x.center[2] - y.center[2],
    ];
    let t = rho * (pq[0] * pq[0] + pq[1] * pq[1] + pq[2] * pq[2]);
    let pref = TWO_PI_52 * inv.sqrt() * x.kpref * y.kpref;
    let c = VrrCoefs {
        a: [x.pa[0], x.pa[1], x.pa[2], y.pa[0], y.pa[1], y.pa[2]],
        b: [
            wp * pq[0],
            wp * pq[1],
            wp * pq[2],
            wq * pq[0],
            wq * pq[1],
            wq * pq[2],
        ],
        c: [0.5 * x.inv_zeta, 0.5 * y.inv_zeta],
        d: [0.5 * eta * inv * x.inv_zeta, 0.5 * zeta * inv * y.inv_zeta],
        e: 0.5 * inv,
    };
    grow(vrr, plan.buf_len);
    let big_l = plan.l_total;
    let f = &mut vrr[plan.base..plan.base + big_l + 1];
    boys_array(big_l, t, f);
    for x in f.iter_mut() {
        *x *= pref;
    }
    if big_l > 0 {
        vrr::run(plan, vrr, &c);
    }
}

/// Batch temporaries (kept in the scratch: no zeroing per batch).
pub struct BatchTemps {
    bc: BatchCoefs,
    t: [f64; NB_MAX],
    pref: [f64; NB_MAX],
    fm: [f64; M_MAX + 1],
}

impl Default for BatchTemps {
    fn default() -> Self {
        BatchTemps {
            bc: BatchCoefs::default(),
            t: [0.0; NB_MAX],
            pref: [0.0; NB_MAX],
            fm: [0.0; M_MAX + 1],
        }
    }
}

/// Boys arguments, prefactors and recurrence coefficients of the batch of primitive
/// quartets (ib[j], ik[j]).
#[inline(never)]
fn fill<'a>(
    lanes: impl Iterator<Item = (&'a Prim, &'a Prim)>,
    bc: &mut BatchCoefs,
    t: &mut [f64; NB_MAX],
    pref: &mut [f64; NB_MAX],
) {
    for (j, (x, y)) in lanes.take(NB_MAX).enumerate() {
        let (zeta, eta) = (x.zeta, y.zeta);
        let inv = 1.0 / (zeta + eta);
        let rho = zeta * eta * inv;
        let (wp, wq) = (-eta * inv, zeta * inv);
        let pq = [
            x.center[0] - y.center[0],
            x.center[1] - y.center[1],
            x.center[2] - y.center[2],
        ];
        for d in 0..3 {
            bc.b[d][j] = wp * pq[d];
            bc.b[3 + d][j] = wq * pq[d];
            bc.a[d][j] = x.pa[d];
            bc.a[3 + d][j] = y.pa[d];
        }
        t[j] = rho * (pq[0] * pq[0] + pq[1] * pq[1] + pq[2] * pq[2]);
        pref[j] = TWO_PI_52 * inv.sqrt() * x.kpref * y.kpref;
        bc.c[0][j] = 0.5 * x.inv_zeta;
        bc.c[1][j] = 0.5 * y.inv_zeta;
        bc.d[0][j] = 0.5 * eta * inv * x.inv_zeta;
        bc.d[1][j] = 0.5 * zeta * inv * y.inv_zeta;
        bc.e[j] = 0.5 * inv;
    }
}

/// Apply the transforms (those that are not the identity) of the axes listed, in order, to
/// `src` with dimensions `dims`: through `tmp` when there are two, into `dst` (grown as
/// needed). Returns the data: `src` itself when there is nothing to do, else `dst`.
fn transform_axes<'a>(
    src: &'a [f64],
    dims: &mut [usize; 3],
    list: [(usize, &ShellMeta); 2],
    tmp: &mut Vec<f64>,
    dst: &'a mut Vec<f64>,
) -> &'a [f64] {
    let mut todo: [(usize, Option<&Sparse>, usize); 2] = [(0, None, 0); 2];
    let mut k = 0;
    for (axis, m) in list {
        if let Some(t) = &m.transform {
            todo[k] = (axis, Some(t), m.n_func);
            k += 1;
        }
    }
    let size = |dims: &[usize; 3], axis: usize, rows: usize| {
        dims.iter().product::<usize>() / dims[axis] * rows
    };
    match (k, todo) {
        (0, _) => src,
        (1, [(axis, Some(t), rows), _]) => {
            let n = size(dims, axis, rows);
            grow(dst, n);
            transform_axis_sparse(src, *dims, axis, t, &mut dst[..n]);
            dims[axis] = rows;
            &dst[..n]
        }
        (_, [(a1, Some(t1), r1), (a2, Some(t2), r2)]) => {
            let n1 = size(dims, a1, r1);
            grow(tmp, n1);
            transform_axis_sparse(src, *dims, a1, t1, &mut tmp[..n1]);
            dims[a1] = r1;
            let n2 = size(dims, a2, r2);
            grow(dst, n2);
            transform_axis_sparse(&tmp[..n1], *dims, a2, t2, &mut dst[..n2]);
            dims[a2] = r2;
            &dst[..n2]
        }
        _ => unreachable!("two axes at most"),
    }
}

pub(crate) fn grow(v: &mut Vec<f64>, n: usize) {
    if v.len() < n {
        v.resize(n, 0.0);
    }
}

/// Step 3 for one member pair: `acc` holds the contracted [e0|f0], f-major (n_f × n_e).
#[inline(never)]
pub(crate) fn finish(
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
        grow(rows, hp.n_rows * n_e);
        rows[..acc.len()].copy_from_slice(acc);
        hrr::run(hp, rows, n_e, cd);
        &rows[hp.out_start() * n_e..(hp.out_start() + hp.n_out) * n_e]
    } else {
        acc
    };
    // ket transforms on [c][d][e]
    let mut dims = [mc.n_cart, md.n_cart, n_e];
    let cur = transform_axes(ket, &mut dims, [(1, md), (0, mc)], t2, t1);
    let ncd = dims[0] * dims[1];
    // transpose [cd][e] → [e][cd]: the input rows of the bra HRR
    let bra_plan = (mb.l > 0).then(|| hrr::plan(ma.l, mb.l));
    grow(brows, bra_plan.map_or(n_e, |hp| hp.n_rows) * ncd);
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
    // bra transforms on [a][b][cd], the last one straight into `out`
    let mut dims = [ma.n_cart, mb.n_cart, ncd];
    let todo = [(1, mb), (0, ma)];
    match todo.iter().filter(|(_, m)| m.transform.is_some()).count() {
        0 => out.copy_from_slice(bra),
        1 => {
            let &(axis, m) = todo.iter().find(|(_, m)| m.transform.is_some()).unwrap();
            transform_axis_sparse(bra, dims, axis, m.transform.as_ref().unwrap(), out);
        }
        _ => {
            let n1 = ma.n_cart * mb.n_func * ncd;
            grow(t1, n1);
            transform_axis_sparse(bra, dims, 1, mb.transform.as_ref().unwrap(), &mut t1[..n1]);
            dims[1] = mb.n_func;
            transform_axis_sparse(&t1[..n1], dims, 0, ma.transform.as_ref().unwrap(), out);
        }
    }
}
