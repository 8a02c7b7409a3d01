//! Derivative ERIs of one shell quartet in a single primitive pass: the centre derivatives
//! of (ab|cd) that a gradient needs, from one vertical recurrence per primitive quartet.
//!
//! Method: ∂/∂A_k (ab| = 2α (a+1_k b| − a_k (a−1_k b| on primitives (Helgaker, Jørgensen &
//! Olsen, *Molecular Electronic-Structure Theory*, eq. 9.2.13; common practice). Every
//! raised or lowered class needs the bra integrals [e0| over the same primitive products P,
//! ζ, only with other |e| and other weights: 2α_i for A raised, 2β_j for B raised, 1 for the
//! lowered terms. So the recurrence is run once on the widened range
//! |e| = l_a−1 … l_a+l_b+1 (and |f| likewise on the ket when a ket centre is needed), and the
//! targets are contracted with each weight in its own accumulator (each accumulator only
//! over the targets its classes read); the horizontal recurrence then runs per class on
//! contracted integrals, and each class is dotted with Γ taken back to raw Cartesian
//! components ([`DerivMaps`]) — no derivative block is transformed to AOs. On a
//! one-centre pair (A = B) only ∂_A + ∂_B is needed, and 2α(a+1|+2β(b+1| collapse to
//! 2ζ(a+1| (the same function at one centre), so the merged primitive pairs of the engine
//! serve as they are. Translational invariance (Σ of the four centre derivatives = 0) gives
//! the last centre: two-centre bra and ket → A, B, C computed, D = −(A+B+C); one one-centre
//! side → the other side's two centres, the one-centre side by invariance.
//!
//! Used for quartets of plain shell pairs; general-contraction family units go through
//! [`super::eri::EriDerivative::centre_derivative`], which shares their primitive work.

use std::cell::RefCell;
use std::collections::HashMap;
use std::rc::Rc;

type Selection = ([usize; 4], SideDerivs, SideDerivs);

use crate::basis::cartesian::n_cartesian;
use crate::integrals::quartet::{batch_lanes, contract, finish, grow, Scratch, ShellMeta};
use crate::integrals::shell_pair::{PairData, Prim};
use crate::integrals::vrr;

/// Which centre derivatives one side (bra or ket) of a quartet contributes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub(crate) enum SideDerivs {
    /// None (obtained by translational invariance).
    No,
    /// ∂ of the first plus the second centre (one-centre pair, weights 2ζ).
    Combined,
    /// ∂ of the first centre only.
    First,
    /// ∂ of each centre separately.
    Both,
}

/// Per shell: how Γ (final AOs) goes to raw Cartesian components, and which raised /
/// lowered components the derivative of each component takes. With T the raw-Cartesian →
/// AO matrix of the shell, ∂/∂A_k of AO μ is Σ_q T_μq (2α (q+1_k| − q_k (q−1_k|), so
/// Σ_μ Γ_μ ∂_k(μ| = Σ_q Γc_q (2α (q+1_k| − q_k (q−1_k|) with Γc = Tᵀ Γ: the derivative
/// blocks are dotted with Γc in raw Cartesian components and never transformed.
#[derive(Debug, Clone)]
pub(crate) struct DerivMaps {
    /// Tᵀ (n_cart × n_f, row-major); None when T is the identity.
    pub back: Option<Vec<f64>>,
    /// Per direction k: (index of q in l, index of q + 1_k in l + 1).
    pub raised: [Vec<(usize, usize)>; 3],
    /// Per direction k: (index of q in l, index of q − 1_k in l − 1, −q_k), q_k > 0.
    pub lowered: [Vec<(usize, usize, f64)>; 3],
}

/// The shell-level inputs of one quartet, in the order computed.
pub(crate) struct QuartetInput<'a> {
    pub metas: [&'a ShellMeta; 4],
    pub maps: [&'a DerivMaps; 4],
    pub pb: &'a PairData,
    pub pk: &'a PairData,
    pub tau: f64,
}

#[derive(Default)]
struct PassScratch {
    s: Scratch,
    acc: [Vec<f64>; 5],
    w: [Vec<f64>; 4],
    wb: [Vec<f64>; 2],
    wk: [Vec<f64>; 2],
    idx: Vec<(u32, u32)>,
    sub: Vec<f64>,
    block: Vec<f64>,
    /// Per (l of the four shells, bra, ket) and accumulator: the flat target positions it
    /// contracts and their VRR targets (made once per thread and shape).
    sel: HashMap<Selection, Rc<[(Vec<u32>, Vec<u32>); 5]>>,
    /// Per accumulator: the compact sums.
    cacc: [Vec<f64>; 5],
}

thread_local! {
    static PASS: RefCell<PassScratch> = RefCell::new(PassScratch::default());
}

/// Exponents (first, second) of a primitive pair: from ζ and P − A = −(β/ζ)(A − B).
fn exponents(p: &Prim, ab: [f64; 3]) -> (f64, f64) {
    let ab2 = ab[0] * ab[0] + ab[1] * ab[1] + ab[2] * ab[2];
    if ab2 == 0.0 {
        return (p.zeta, 0.0);
    }
    let beta = -p.zeta * (p.pa[0] * ab[0] + p.pa[1] * ab[1] + p.pa[2] * ab[2]) / ab2;
    (p.zeta - beta, beta)
}

/// Number of Cartesian components with lo ≤ l < hi.
fn span(lo: usize, hi: usize) -> usize {
    (lo..hi).map(n_cartesian).sum()
}

/// The centre-derivative contractions Σ Γ ∂(ab|cd) of the quartet `q` asked for by `bra`
/// and `ket`, with `gamma_c` = Γ over the quartet in raw Cartesian components (layout of
/// the quartet, see [`DerivMaps`]), written to `out` as groups in this order: bra
/// (Combined: one group ∂_a+∂_b; First: ∂_a; Both: ∂_a, ∂_b), then ket likewise; each group
/// is [x, y, z]. Returns the number of groups.
pub(crate) fn quartet_gradient(
    q: &QuartetInput,
    bra: SideDerivs,
    ket: SideDerivs,
    gamma_c: &[f64],
    out: &mut [[f64; 3]; 4],
) -> usize {
    PASS.with(|p| run(q, bra, ket, gamma_c, out, &mut p.borrow_mut()))
}

/// Σ over the quartet of f · Γc[.., q, ..] · C[.., t, ..] along axis `pos` for the listed
/// (q, t, f); `dims` are C's dimensions, Γc has `nq` components on axis `pos`.
fn gather_dot(
    gc: &[f64],
    c: &[f64],
    dims: [usize; 4],
    pos: usize,
    nq: usize,
    list: impl Iterator<Item = (usize, usize, f64)> + Clone,
) -> f64 {
    let outer: usize = dims[..pos].iter().product();
    let inner: usize = dims[pos + 1..].iter().product();
    let nt = dims[pos];
    let mut total = 0.0;
    for o in 0..outer {
        for (qi, ti, f) in list.clone() {
            let a = &gc[(o * nq + qi) * inner..(o * nq + qi + 1) * inner];
            let b = &c[(o * nt + ti) * inner..(o * nt + ti + 1) * inner];
            let d: f64 = a.iter().zip(b).map(|(x, y)| x * y).sum();
            total += f * d;
        }
    }
    total
}

fn run(
    q: &QuartetInput,
    bra: SideDerivs,
    ket: SideDerivs,
    gamma_c: &[f64],
    out: &mut [[f64; 3]; 4],
    ps: &mut PassScratch,
) -> usize {
    let l = q.metas.map(|m| m.l);
    let raise_b = bra != SideDerivs::No;
    let raise_k = ket != SideDerivs::No;
    let (e_lo, e_hi) = if raise_b {
        (l[0].saturating_sub(1), l[0] + l[1] + 1)
    } else {
        (l[0], l[0] + l[1])
    };
    let (f_lo, f_hi) = if raise_k {
        (l[2].saturating_sub(1), l[2] + l[3] + 1)
    } else {
        (l[2], l[2] + l[3])
    };
    let plan = vrr::plan(e_lo, e_hi, f_lo, f_hi);
    let nt = plan.targets.len();
    // accumulators: 0 weight 1; 1, 2 the bra's first / second centre raised; 3, 4 the
    // ket's
    let wants = [
        true,
        raise_b,
        bra == SideDerivs::Both,
        raise_k,
        ket == SideDerivs::Both,
    ];
    // the classes: (position, raised?, accumulator)
    let mut groups: Vec<Vec<(usize, bool, usize)>> = Vec::new();
    match bra {
        SideDerivs::No => {}
        SideDerivs::Combined => {
            groups.push(vec![(0, true, 1), (0, false, 0), (1, false, 0)]);
        }
        SideDerivs::First => groups.push(vec![(0, true, 1), (0, false, 0)]),
        SideDerivs::Both => {
            groups.push(vec![(0, true, 1), (0, false, 0)]);
            groups.push(vec![(1, true, 2), (1, false, 0)]);
        }
    }
    match ket {
        SideDerivs::No => {}
        SideDerivs::Combined => {
            groups.push(vec![(2, true, 3), (2, false, 0), (3, false, 0)]);
        }
        SideDerivs::First => groups.push(vec![(2, true, 3), (2, false, 0)]),
        SideDerivs::Both => {
            groups.push(vec![(2, true, 3), (2, false, 0)]);
            groups.push(vec![(3, true, 4), (3, false, 0)]);
        }
    }
    let PassScratch {
        s,
        acc,
        w,
        wb,
        wk,
        idx,
        sub,
        block,
        sel,
        cacc,
    } = ps;
    // each accumulator contracts only the targets its classes read: the sub-blocks
    // e ∈ [lc0, lc0+lc1], f ∈ [lc2, lc2+lc3] of the widened range (the same per-target
    // sums, fewer of them)
    let rect = |lc: [usize; 4]| {
        (
            span(e_lo, lc[0]),
            span(e_lo, lc[0] + lc[1] + 1),
            span(f_lo, lc[2]),
            span(f_lo, lc[2] + lc[3] + 1),
        )
    };
    let key = (l, bra, ket);
    let selection = match sel.get(&key) {
        Some(x) => x.clone(),
        None => {
            let mut rects: [Vec<(usize, usize, usize, usize)>; 5] = Default::default();
            for terms in &groups {
                for &(pos, up, ai) in terms {
                    if !up && l[pos] == 0 {
                        continue;
                    }
                    let mut lc = l;
                    lc[pos] = if up { l[pos] + 1 } else { l[pos] - 1 };
                    rects[ai].push(rect(lc));
                }
            }
            let mut lists: [(Vec<u32>, Vec<u32>); 5] = Default::default();
            for ai in 0..5 {
                for t in 0..nt {
                    let (fi, ei) = (t / plan.n_e, t % plan.n_e);
                    if rects[ai]
                        .iter()
                        .any(|&(e0, e1, f0, f1)| ei >= e0 && ei < e1 && fi >= f0 && fi < f1)
                    {
                        lists[ai].0.push(t as u32);
                        lists[ai].1.push(plan.targets[t]);
                    }
                }
            }
            let x = std::rc::Rc::new(lists);
            sel.insert(key, x.clone());
            x
        }
    };
    for ai in 0..5 {
        cacc[ai].clear();
        acc[ai].clear();
        if wants[ai] {
            acc[ai].resize(nt, 0.0);
            cacc[ai].resize(selection[ai].0.len(), 0.0);
        }
    }
    // per-primitive-pair weights
    let weights = |pd: &PairData, mode: SideDerivs, dst: &mut [Vec<f64>; 2]| {
        dst[0].clear();
        dst[1].clear();
        for p in &pd.prims {
            let (x, y) = exponents(p, pd.ab);
            match mode {
                SideDerivs::Combined => dst[0].push(2.0 * p.zeta),
                _ => {
                    dst[0].push(2.0 * x);
                    dst[1].push(2.0 * y);
                }
            }
        }
    };
    for x in wb.iter_mut().chain(wk.iter_mut()) {
        x.clear();
    }
    if raise_b {
        weights(q.pb, bra, wb);
    }
    if raise_k {
        weights(q.pk, ket, wk);
    }
    let wmax = wb
        .iter()
        .chain(wk.iter())
        .flatten()
        .fold(1.0f64, |m, &x| m.max(x));
    let tau = q.tau / wmax;
    idx.clear();
    for pidx in 0..q.pb.n_prim {
        let bp = q.pb.bound[pidx];
        let n_q = q.pk.bound.partition_point(|&b| bp * b >= tau);
        if n_q == 0 {
            break;
        }
        idx.extend((0..n_q as u32).map(|k| (pidx as u32, k)));
    }
    let nb_max = (crate::integrals::quartet::BATCH_VALUES / plan.buf_len)
        .clamp(vrr::LANES, vrr::NB_MAX)
        / vrr::LANES
        * vrr::LANES;
    for chunk in idx.chunks(nb_max) {
        let nb = chunk.len();
        let lanes = chunk
            .iter()
            .map(|&(p, k)| (&q.pb.prims[p as usize], &q.pk.prims[k as usize]));
        let st = batch_lanes(plan, lanes, nb, s);
        for x in w.iter_mut() {
            grow(x, nb);
        }
        for (j, &(p, k)) in chunk.iter().enumerate() {
            let (p, k) = (p as usize, k as usize);
            if wants[1] {
                w[0][j] = wb[0][p];
            }
            if wants[2] {
                w[1][j] = wb[1][p];
            }
            if wants[3] {
                w[2][j] = wk[0][k];
            }
            if wants[4] {
                w[3][j] = wk[1][k];
            }
        }
        let v = s.vrr_slice();
        contract(&selection[0].1, None, v, st, nb, &mut cacc[0]);
        for i in 1..5 {
            if wants[i] {
                contract(
                    &selection[i].1,
                    Some(&w[i - 1][..nb]),
                    v,
                    st,
                    nb,
                    &mut cacc[i],
                );
            }
        }
    }
    for ai in 0..5 {
        for (&t, &x) in selection[ai].0.iter().zip(&cacc[ai]) {
            acc[ai][t as usize] = x;
        }
    }
    let nc = l.map(n_cartesian);
    let raw = |l: usize| ShellMeta {
        l,
        n_func: n_cartesian(l),
        n_cart: n_cartesian(l),
        transform: None,
    };
    let raws = l.map(raw);
    for (g, terms) in groups.iter().enumerate() {
        out[g] = [0.0; 3];
        for &(pos, up, ai) in terms {
            if !up && l[pos] == 0 {
                continue;
            }
            let mut lc = l;
            lc[pos] = if up { l[pos] + 1 } else { l[pos] - 1 };
            let src = &acc[ai];
            // sub-block e ∈ [lc0, lc0+lc1], f ∈ [lc2, lc2+lc3] of the widened targets
            let (e0, e1) = (span(e_lo, lc[0]), span(e_lo, lc[0] + lc[1] + 1));
            let (f0, f1) = (span(f_lo, lc[2]), span(f_lo, lc[2] + lc[3] + 1));
            let n_e = e1 - e0;
            sub.clear();
            for fi in f0..f1 {
                sub.extend_from_slice(&src[fi * plan.n_e + e0..fi * plan.n_e + e1]);
            }
            let changed = raw(lc[pos]);
            let mut metas = [&raws[0], &raws[1], &raws[2], &raws[3]];
            metas[pos] = &changed;
            let mut dims = nc;
            dims[pos] = changed.n_func;
            let len: usize = dims.iter().product();
            block.clear();
            block.resize(len, 0.0);
            finish(
                metas,
                &sub[..n_e * (f1 - f0)],
                q.pb.ab,
                q.pk.ab,
                n_e,
                block,
                s,
            );
            let m = q.maps[pos];
            for (k, o) in out[g].iter_mut().enumerate() {
                *o += if up {
                    let list = m.raised[k].iter().map(|&(a, b)| (a, b, 1.0));
                    gather_dot(gamma_c, block, dims, pos, nc[pos], list)
                } else {
                    let list = m.lowered[k].iter().copied();
                    gather_dot(gamma_c, block, dims, pos, nc[pos], list)
                };
            }
        }
    }
    groups.len()
}
