//! The perturbative triples correction (T) on a spin-blocked CCSD solution.
//!
//! The spin-orbital formula of triples.rs (Raghavachari, Trucks, Pople & Head-Gordon, Chem.
//! Phys. Lett. 157 (1989) 479; with the f_ia t_jk^bc term of Watts, Gauss & Bartlett,
//! J. Chem. Phys. 98 (1993) 8718, for ROHF in semicanonical orbitals), evaluated in spin
//! blocks:
//! - occupied triples i < j < k run over spin orbitals (α, then β); a, b, c only over the one
//!   spin pattern (ααα, ααβ, αββ or βββ, α first) that conserves the spin of i, j, k. The
//!   summand t_c D (t_c + t_d) is unchanged by a permutation of a, b, c (both factors change
//!   sign together), so the other orderings of the pattern (αβα, βαα, …) count through a
//!   multiplicity 3.
//! - t(ijk,abc) = P(a/bc) Y(abc), Y = P(i/jk) raw; for the pattern (p0,p1,p2) this needs Y
//!   of the patterns (p0,p1,p2), (p1,p0,p2) and (p2,p1,p0); each raw term is one matrix
//!   product over spin blocks and is skipped when spin makes its blocks zero.
//!
//! Work: of order o³v⁴ (a few v⁴ products per occupied triple). Memory: the blocks and t2
//! are already held; each parallel task holds at most 8 v³ arrays, reused from triple to triple (`Scratch`;
//! `task_words` budgets 12).

use rayon::prelude::*;

use super::core_hole::CoreHole;
use super::spin_blocks::{conserving, Blocked};
use super::spin_system::SpinBlockedSystem;
use crate::correlation::tensor::gemm_rm;

/// Words per parallel task (v = the larger spin's virtual count).
pub fn task_words(v: usize) -> f64 {
    12.0 * (v * v * v) as f64
}

fn mask4(s: [usize; 4]) -> usize {
    s[0] | (s[1] << 1) | (s[2] << 2) | (s[3] << 3)
}

/// Row (p, q) of a 4-index block [p,q,·,·] as a slice, if the block is stored.
fn row<'a>(t: &'a Blocked, s: [usize; 4], p: usize, q: usize) -> Option<&'a [f64]> {
    let m = mask4(s);
    if !conserving(m, 4) {
        return None;
    }
    let b = t.block(m)?;
    let w = b.shape[2] * b.shape[3];
    let off = (p * b.shape[1] + q) * w;
    Some(&b.data[off..off + w])
}

/// Slice [p,·,·,·] of a 4-index block.
fn slab<'a>(t: &'a Blocked, s: [usize; 4], p: usize) -> Option<&'a [f64]> {
    let m = mask4(s);
    if !conserving(m, 4) {
        return None;
    }
    let b = t.block(m)?;
    let w = b.shape[1] * b.shape[2] * b.shape[3];
    Some(&b.data[p * w..(p + 1) * w])
}

/// Per-task buffers, reused from one occupied triple to the next: allocating v³ arrays
/// afresh for each triple costs a page fault per 4 KiB (most of the system time of a large
/// run). `ys` holds Y (connected, disconnected) of up to three spin patterns; `wc`, `wd` the
/// combined W.
#[derive(Default)]
struct Scratch {
    ys: Vec<(Vec<f64>, Vec<f64>)>,
    wc: Vec<f64>,
    wd: Vec<f64>,
}

/// Resize `x` to `n` words, all zero (no reallocation once it is large enough).
fn zeroed(x: &mut Vec<f64>, n: usize) {
    x.clear();
    x.resize(n, 0.0);
}

/// E(T) in hartree.
pub fn correction(
    sys: &SpinBlockedSystem,
    t1: &Blocked,
    t2: &Blocked,
    hole: Option<&CoreHole>,
) -> f64 {
    let (o, v) = (sys.o, sys.v);
    let occ: Vec<(usize, usize)> = (0..2)
        .flat_map(|s| (0..o[s]).map(move |i| (s, i)))
        .collect();
    let mut triples = Vec::new();
    for i in 0..occ.len() {
        for j in i + 1..occ.len() {
            for k in j + 1..occ.len() {
                triples.push((occ[i], occ[j], occ[k]));
            }
        }
    }
    type So = (usize, usize);
    // raw_q(I,J,K)[a,b,c], connected (into xc) and disconnected (into xd), accumulated × sgn
    let raw = |q: [usize; 3], ii: So, jj: So, kk: So, sgn: f64, xc: &mut [f64], xd: &mut [f64]| {
        let (va, vb, vc) = (v[q[0]], v[q[1]], v[q[2]]);
        let bc = vb * vc;
        // Σ_e t_JK^ae (−⟨Ie||bc⟩)
        for se in 0..2 {
            let (Some(t), Some(w)) = (
                row(t2, [jj.0, kk.0, q[0], se], jj.1, kk.1),
                slab(&sys.ovvv, [ii.0, se, q[1], q[2]], ii.1),
            ) else {
                continue;
            };
            gemm_rm(xc, true, t, w, va, v[se], bc, -sgn);
        }
        // − Σ_m ⟨JK||ma⟩ t_Im^bc
        for sm in 0..2 {
            let (Some(g), Some(t)) = (
                row(&sys.ooov, [jj.0, kk.0, sm, q[0]], jj.1, kk.1),
                slab(t2, [ii.0, sm, q[1], q[2]], ii.1),
            ) else {
                continue;
            };
            let om = o[sm];
            let mut gt = vec![0.0; va * om];
            for m in 0..om {
                for a in 0..va {
                    gt[a * om + m] = g[m * va + a];
                }
            }
            gemm_rm(xc, true, &gt, t, va, om, bc, -sgn);
        }
        // t_I^a ⟨JK||bc⟩ + f_Ia t_JK^bc
        if ii.0 == q[0] {
            let (Some(w), Some(t)) = (
                row(&sys.oovv, [jj.0, kk.0, q[1], q[2]], jj.1, kk.1),
                row(t2, [jj.0, kk.0, q[1], q[2]], jj.1, kk.1),
            ) else {
                return;
            };
            let t1b = t1.block(ii.0 * 3).unwrap();
            let fb = sys.fov.block(ii.0 * 3).unwrap();
            for a in 0..va {
                let ta = sgn * t1b.data[ii.1 * va + a];
                let fa = sgn * fb.data[ii.1 * va + a];
                let out = &mut xd[a * bc..(a + 1) * bc];
                for n in 0..bc {
                    out[n] += ta * w[n] + fa * t[n];
                }
            }
        }
    };
    let sum: f64 = triples
        .par_iter()
        .map_init(Scratch::default, |scr, &(ii, jj, kk)| {
            let nb = ii.0 + jj.0 + kk.0;
            let p: [usize; 3] = match nb {
                0 => [0, 0, 0],
                1 => [0, 0, 1],
                2 => [0, 1, 1],
                _ => [1, 1, 1],
            };
            let mult = if nb == 0 || nb == 3 { 1.0 } else { 3.0 };
            let pats = [p, [p[1], p[0], p[2]], [p[2], p[1], p[0]]];
            // Y of each needed pattern (connected, disconnected), in reused buffers
            let mut slot = [0usize; 3];
            let mut distinct: Vec<[usize; 3]> = Vec::with_capacity(3);
            for (k, q) in pats.into_iter().enumerate() {
                if let Some(d) = distinct.iter().position(|&x| x == q) {
                    slot[k] = d;
                    continue;
                }
                slot[k] = distinct.len();
                distinct.push(q);
            }
            while scr.ys.len() < distinct.len() {
                scr.ys.push((Vec::new(), Vec::new()));
            }
            for (d, q) in distinct.iter().enumerate() {
                let n = v[q[0]] * v[q[1]] * v[q[2]];
                let (yc, yd) = &mut scr.ys[d];
                zeroed(yc, n);
                zeroed(yd, n);
                for (sgn, (a, b, c)) in [
                    (1.0, (ii, jj, kk)),
                    (-1.0, (jj, ii, kk)),
                    (-1.0, (kk, jj, ii)),
                ] {
                    raw(*q, a, b, c, sgn, yc, yd);
                }
            }
            let (na, nb_, nc) = (v[p[0]], v[p[1]], v[p[2]]);
            let n = na * nb_ * nc;
            // W[a,b,c] = Y_p[a,b,c] − Y_p'[b,a,c] − Y_p''[c,b,a], connected and disconnected
            let Scratch { ys, wc, wd } = scr;
            for (w, part) in [(&mut *wc, 0usize), (&mut *wd, 1)] {
                let pick = |k: usize| -> &[f64] {
                    let y = &ys[slot[k]];
                    if part == 0 {
                        &y.0[..n]
                    } else {
                        &y.1[..n]
                    }
                };
                let (y0, y1, y2) = (pick(0), pick(1), pick(2));
                w.clear();
                w.extend_from_slice(y0);
                for a in 0..na {
                    for b in 0..nb_ {
                        let dst = &mut w[(a * nb_ + b) * nc..(a * nb_ + b + 1) * nc];
                        let src = &y1[(b * na + a) * nc..(b * na + a + 1) * nc];
                        dst.iter_mut().zip(src).for_each(|(x, y)| *x -= y);
                    }
                }
                // y2[c,b,a] in tiles of a and c (both strided in one of the arrays)
                const TILE: usize = 16;
                for b in 0..nb_ {
                    for a0 in (0..na).step_by(TILE) {
                        for c0 in (0..nc).step_by(TILE) {
                            for a in a0..(a0 + TILE).min(na) {
                                for c in c0..(c0 + TILE).min(nc) {
                                    w[(a * nb_ + b) * nc + c] -= y2[(c * nb_ + b) * na + a];
                                }
                            }
                        }
                    }
                }
            }
            let fva = &sys.fv[p[0]];
            let fvb = &sys.fv[p[1]];
            let fvc = &sys.fv[p[2]];
            let dijk = sys.fo[ii.0][ii.1] + sys.fo[jj.0][jj.1] + sys.fo[kk.0][kk.1];
            // a triple that fills the core hole without emptying its partner is outside
            // the core-ionized space (core_hole.rs): its virtual index at the hole is skipped
            let skip = |k: usize| -> Option<usize> {
                let h = hole?;
                (p[k] == h.spin && h.forbidden(&[ii, jj, kk], &[(h.spin, h.hole)]))
                    .then_some(h.hole)
            };
            let (sa, sb, sc) = (skip(0), skip(1), skip(2));
            let mut e = 0.0;
            for a in 0..na {
                if sa == Some(a) {
                    continue;
                }
                for b in 0..nb_ {
                    if sb == Some(b) {
                        continue;
                    }
                    let dab = dijk - fva[a] - fvb[b];
                    let base = (a * nb_ + b) * nc;
                    for c in 0..nc {
                        if sc == Some(c) {
                            continue;
                        }
                        let (x, y) = (wc[base + c], wd[base + c]);
                        e += x * (x + y) / (dab - fvc[c]);
                    }
                }
            }
            mult * e
        })
        .sum();
    sum / 6.0
}
