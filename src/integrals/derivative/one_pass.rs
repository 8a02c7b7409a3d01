//! Derivative ERIs of one shell quartet in a single primitive pass: the centre derivatives
//! of (ab|cd) that a gradient needs, from one vertical recurrence per primitive quartet.
//!
//! Method: ∂/∂A_k (ab| = 2α (a+1_k b| − a_k (a−1_k b| on primitives (Helgaker, Jørgensen &
//! Olsen, *Molecular Electronic-Structure Theory*, eq. 9.2.13; common practice). Every
//! raised or lowered class needs the bra integrals [e0| over the same primitive products P,
//! ζ, only with other |e| and other weights: 2α_i for A raised, 2β_j for B raised, 1 for the
//! lowered terms. So the recurrence is run once on the widened range
//! |e| = l_a−1 … l_a+l_b+1 (and |f| likewise on the ket when a ket centre is needed), and the
//! targets are contracted with each weight in its own accumulator; the horizontal
//! recurrence and the AO transforms then run per class on contracted integrals. On a
//! one-centre pair (A = B) only ∂_A + ∂_B is needed, and 2α(a+1|+2β(b+1| collapse to
//! 2ζ(a+1| (the same function at one centre), so the merged primitive pairs of the engine
//! serve as they are. Translational invariance (Σ of the four centre derivatives = 0) gives
//! the last centre: two-centre bra and ket → A, B, C computed, D = −(A+B+C); one one-centre
//! side → the other side's two centres, the one-centre side by invariance.
//!
//! Used for quartets of plain shell pairs; general-contraction family units go through
//! [`super::eri::EriDerivative::centre_derivative`], which shares their primitive work.

use std::cell::RefCell;

use crate::basis::cartesian::n_cartesian;
use crate::integrals::quartet::{batch_lanes, contract, finish, grow, Scratch, ShellMeta};
use crate::integrals::shell_pair::{PairData, Prim};
use crate::integrals::transform::transform_axis;
use crate::integrals::vrr;

/// Which centre derivatives one side (bra or ket) of a quartet contributes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
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

/// Per-shell matrices from raw raised / lowered Cartesian components to ∂/∂A_k of the
/// final AOs: `plus[k]` is n_f × n_cart(l+1), `minus[k]` n_f × n_cart(l−1).
#[derive(Debug, Clone)]
pub(crate) struct DerivMaps {
    pub plus: [Vec<f64>; 3],
    pub minus: [Vec<f64>; 3],
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
    tmp: Vec<f64>,
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

/// The centre derivatives of the quartet `q` asked for by `bra` and `ket`, in final AOs
/// with the quartet's layout, written to `out` as groups in this order: bra (Combined: one
/// group ∂_a+∂_b; First: ∂_a; Both: ∂_a, ∂_b), then ket likewise; each group is three
/// blocks (x, y, z). Returns the number of groups.
pub(crate) fn quartet_derivatives(
    q: &QuartetInput,
    bra: SideDerivs,
    ket: SideDerivs,
    out: &mut Vec<[Vec<f64>; 3]>,
) -> usize {
    PASS.with(|p| run(q, bra, ket, out, &mut p.borrow_mut()))
}

fn run(
    q: &QuartetInput,
    bra: SideDerivs,
    ket: SideDerivs,
    out: &mut Vec<[Vec<f64>; 3]>,
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
    let PassScratch {
        s,
        acc,
        w,
        wb,
        wk,
        idx,
        sub,
        block,
        tmp,
    } = ps;
    for (a, &on) in acc.iter_mut().zip(&wants) {
        a.clear();
        if on {
            a.resize(nt, 0.0);
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
        contract(&plan.targets, None, v, st, nb, &mut acc[0]);
        for i in 1..5 {
            if wants[i] {
                contract(&plan.targets, Some(&w[i - 1][..nb]), v, st, nb, &mut acc[i]);
            }
        }
    }
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
    let nf = q.metas.map(|m| m.n_func);
    let size: usize = nf.iter().product();
    while out.len() < groups.len() {
        out.push(Default::default());
    }
    for (g, terms) in groups.iter().enumerate() {
        for o in out[g].iter_mut() {
            o.clear();
            o.resize(size, 0.0);
        }
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
            let raw = ShellMeta {
                l: lc[pos],
                n_func: n_cartesian(lc[pos]),
                n_cart: n_cartesian(lc[pos]),
                transform: None,
            };
            let mut metas = q.metas;
            metas[pos] = &raw;
            let mut dims = nf;
            dims[pos] = raw.n_func;
            let len: usize = dims.iter().product();
            block.clear();
            block.resize(len, 0.0);
            let ab = q.pb.ab;
            let cd = q.pk.ab;
            finish(metas, &sub[..n_e * (f1 - f0)], ab, cd, n_e, block, s);
            let maps = if up {
                &q.maps[pos].plus
            } else {
                &q.maps[pos].minus
            };
            for (k, o) in out[g].iter_mut().enumerate() {
                transform_axis(block, &dims, pos, &maps[k], nf[pos], tmp);
                for (x, y) in o.iter_mut().zip(tmp.iter()) {
                    *x += y;
                }
            }
        }
    }
    groups.len()
}
