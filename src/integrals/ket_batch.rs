//! One bra pair against many ket pairs of the same class: (ab|c_k d_k) for k = 1, 2, ….
//!
//! Uncontracted shells give one primitive quartet per shell quartet, too few to fill the
//! vectorised vertical recurrence (`vrr::run_batch`). Here the primitive quartets of several
//! ket pairs share a batch: the Boys function and the recurrence run once per batch, each
//! ket's targets are summed over its own lanes, and the horizontal recurrence and AO
//! transforms (`quartet::finish`) follow per ket.
//!
//! A ket's primitive quartets are never split between batches; a ket with more of them than
//! a batch holds goes through `quartet::contracted_quartet` alone. Every block is therefore
//! computed with exactly the operations, in the same order, as a call of
//! `EriEngine::shell_quartet` for that quartet: the values are bit-for-bit the same.

use crate::integrals::quartet::{
    batch_lanes, contract, contracted_quartet, finish, grow, ssss, Scratch, ShellMeta, BATCH_VALUES,
};
use crate::integrals::shell_pair::PairData;
use crate::integrals::vrr::{self, LANES, NB_MAX};

/// Blocks (ab|c_k d_k) of the single-member bra pair `pb` with the single-member ket pairs
/// `kets`, all with the shells described by `metas` (the ket shells' angular momenta and
/// harmonics are those of metas[2], metas[3]); block k goes to out[offs[k]..offs[k] + block],
/// block = n_a n_b n_c n_d, layout [a][b][c][d].
pub fn ket_batch(
    metas: [&ShellMeta; 4],
    pb: &PairData,
    kets: &[&PairData],
    offs: &[usize],
    tau: f64,
    out: &mut [f64],
    s: &mut Scratch,
) {
    assert!(pb.n_members == 1 && kets.iter().all(|k| k.n_members == 1));
    let [ma, mb, mc, md] = metas;
    let block = ma.n_func * mb.n_func * mc.n_func * md.n_func;
    if ma.l + mb.l + mc.l + md.l == 0 {
        for (pk, &o) in kets.iter().zip(offs) {
            out[o] = ssss(pb, pk, tau);
        }
        return;
    }
    let plan = vrr::plan(ma.l, ma.l + mb.l, mc.l, mc.l + md.l);
    let nt = plan.targets.len();
    let nb_max = (BATCH_VALUES / plan.buf_len).clamp(LANES, NB_MAX) / LANES * LANES;
    // lanes of the batch being filled: (ket, bra primitive, ket primitive); segments
    // (ket, first lane, lanes)
    let mut lanes: Vec<(u32, u32, u32)> = Vec::with_capacity(nb_max);
    let mut segs: Vec<(usize, usize, usize)> = Vec::new();
    let flush = |lanes: &mut Vec<(u32, u32, u32)>,
                 segs: &mut Vec<(usize, usize, usize)>,
                 out: &mut [f64],
                 s: &mut Scratch| {
        if lanes.is_empty() {
            return;
        }
        let it = lanes
            .iter()
            .map(|&(k, p, q)| (&pb.prims[p as usize], &kets[k as usize].prims[q as usize]));
        let stride = batch_lanes(plan, it, lanes.len(), s);
        let mut acc = std::mem::take(&mut s.acc);
        grow(&mut acc, nt);
        for &(k, first, n) in segs.iter() {
            let v = &s.vrr_slice()[first..];
            if n == 1 {
                // one lane: 0 + value, as the sum over one lane gives
                for (x, &tg) in acc[..nt].iter_mut().zip(&plan.targets) {
                    *x = 0.0 + v[tg as usize * stride];
                }
            } else {
                acc[..nt].fill(0.0);
                contract(&plan.targets, None, v, stride, n, &mut acc[..nt]);
            }
            let o = offs[k];
            finish(
                metas,
                &acc[..nt],
                pb.ab,
                kets[k].ab,
                plan.n_e,
                &mut out[o..o + block],
                s,
            );
        }
        s.acc = acc;
        lanes.clear();
        segs.clear();
    };
    for (k, pk) in kets.iter().enumerate() {
        // surviving primitive quartets, bra-major (the order of the single-quartet path)
        let start = lanes.len();
        let mut n = 0;
        for p in 0..pb.n_prim {
            let bp = pb.bound[p];
            let n_q = pk.bound.partition_point(|&b| bp * b >= tau);
            if n_q == 0 {
                break;
            }
            n += n_q;
        }
        let o = offs[k];
        if n == 0 {
            out[o..o + block].fill(0.0);
            continue;
        }
        if n > nb_max {
            contracted_quartet(metas, pb, pk, tau, &mut out[o..o + block], s);
            continue;
        }
        let start = if start + n > nb_max {
            flush(&mut lanes, &mut segs, out, s);
            0
        } else {
            start
        };
        for p in 0..pb.n_prim {
            let bp = pb.bound[p];
            let n_q = pk.bound.partition_point(|&b| bp * b >= tau);
            if n_q == 0 {
                break;
            }
            lanes.extend((0..n_q as u32).map(|q| (k as u32, p as u32, q)));
        }
        segs.push((k, start, n));
    }
    flush(&mut lanes, &mut segs, out, s);
}
