//! The perturbative triples correction (T) on a closed-shell (RHF) CCSD solution, in
//! spatial orbitals.
//!
//! Published method: Raghavachari, Trucks, Pople & Head-Gordon, Chem. Phys. Lett. 157
//! (1989) 479; closed-shell spin adaptation as in Rendell, Lee & Komornicki, Chem. Phys.
//! Lett. 178 (1991) 462 (from memory). With t_ij^ab ≡ t_{iα jβ}^{aα bβ} (ccsd.rs), chemists'
//! integrals and D = ε_i + ε_j + ε_k − ε_a − ε_b − ε_c:
//!
//! - connected W_ijk^abc = P [ Σ_d t_ij^ad (bd|ck) − Σ_l t_il^ab (jl|kc) ], where P sums the
//!   six simultaneous permutations of the pairs (i,a), (j,b), (k,c);
//! - V_ijk^abc = W_ijk^abc + t_i^a (jb|kc) + t_j^b (ia|kc) + t_k^c (ia|jb);
//! - E(T) = ⅓ Σ_ijk Σ_abc (4 W^abc + W^bca + W^cab)(V^abc − V^cba) / D.
//!
//! Only i ≥ j ≥ k is computed. W and V of a permuted occupied triple are W and V of
//! (i, j, k) with the virtual indices permuted the same way, so the sum of the summand over
//! the distinct orderings of (i, j, k) is, after relabelling a, b, c, ⅓·(1/s) Σ_abc
//! (4 W^abc + W^bca + W^cab)(6 V^abc − 2 V^acb − 2 V^bac − 2 V^cba) / D with s = 1, 2 or 6
//! orderings of (i, j, k) giving the same triple (the two 3-cycles are conjugate to each
//! other, the three transpositions to each other). The check is the spin-blocked (T) of
//! open_shell/utriples.rs on the same closed shell (open_shell/tests.rs), to 1e-9 Eh.
//!
//! Work: about o³/6 occupied triples × six v⁴ products, a sixth of a loop over every
//! ordered triple and far less than the spin-orbital triples of the spin-blocked code.
//! Memory (f64 words): (kc|bd) reordered, o v³; t2 reordered, o²v²; (kc|jl), o³v; and four
//! v³ arrays per parallel task (`task_words`).

use rayon::prelude::*;

use super::integrals::MoIntegrals;
use super::tensor::{gemm_rm, Tensor};

/// Words each parallel task holds (W, V, one raw product, spare).
pub fn task_words(v: usize) -> f64 {
    4.0 * (v * v * v) as f64
}

/// Words of the arrays held for the whole (T) stage besides the integrals and amplitudes.
pub fn shared_words(o: usize, v: usize) -> f64 {
    let (o, v) = (o as f64, v as f64);
    o * v * v * v + o * o * v * v + o * o * o * v
}

/// w[a,b,c] += g at the position of (a,b,c) in g's own index order: g's axis q holds the
/// index `order[q]` of (a, b, c). In tiles, so both arrays stay in cache whatever the order.
fn add_reordered(w: &mut [f64], g: &[f64], v: usize, order: [usize; 3]) {
    let mut stride = [0usize; 3];
    for (q, &m) in order.iter().enumerate() {
        stride[m] = v.pow(2 - q as u32);
    }
    if stride == [v * v, v, 1] {
        w.iter_mut().zip(g).for_each(|(x, y)| *x += y);
        return;
    }
    tiles(v, |a, b, cs| {
        let gb = a * stride[0] + b * stride[1];
        let row = &mut w[(a * v + b) * v..(a * v + b + 1) * v];
        for c in cs {
            row[c] += g[gb + c * stride[2]];
        }
    });
}

/// Visit every (a, b, c) of a v³ cube in 16³ tiles: `f(a, b, c range)`, so that arrays read
/// along any axis order stay in cache within a tile.
fn tiles(v: usize, mut f: impl FnMut(usize, usize, std::ops::Range<usize>)) {
    const TILE: usize = 16;
    for a0 in (0..v).step_by(TILE) {
        for b0 in (0..v).step_by(TILE) {
            for c0 in (0..v).step_by(TILE) {
                for a in a0..(a0 + TILE).min(v) {
                    for b in b0..(b0 + TILE).min(v) {
                        f(a, b, c0..(c0 + TILE).min(v));
                    }
                }
            }
        }
    }
}

/// E(T) in hartree for canonical (or semicanonical) orbitals: the Fock diagonal of `ints`
/// gives the denominators, f_ia = 0 is assumed (RHF).
pub fn correction(ints: &MoIntegrals, t1: &Tensor, t2: &Tensor) -> f64 {
    let (o, v) = (ints.nocc, ints.nvir);
    if o == 0 || v == 0 {
        return 0.0;
    }
    let (eo, ev) = ints.eps();
    let v2 = v * v;
    let v3 = v2 * v;
    // x[k][d][b][c] = (kc|bd)
    let mut x = vec![0.0; o * v3];
    ints.for_each_ovvv_slice(&mut |k0, k1, s| {
        x[k0 * v3..k1 * v3]
            .par_chunks_mut(v3)
            .enumerate()
            .for_each(|(dk, xk)| {
                let sk = &s[dk * v3..(dk + 1) * v3];
                for c in 0..v {
                    for b in 0..v {
                        let src = &sk[(c * v + b) * v..(c * v + b + 1) * v];
                        for (d, val) in src.iter().enumerate() {
                            xk[(d * v + b) * v + c] = *val;
                        }
                    }
                }
            });
    });
    // tt[i][a][b][l] = t_il^ab
    let mut tt = vec![0.0; o * o * v2];
    tt.par_chunks_mut(o * v2).enumerate().for_each(|(i, ti)| {
        for l in 0..o {
            let src = &t2.data[(i * o + l) * v2..(i * o + l + 1) * v2];
            for (ab, val) in src.iter().enumerate() {
                ti[ab * o + l] = *val;
            }
        }
    });
    // kk[j][k][l][c] = (kc|jl)
    let kk = Tensor::from_fn(&[o, o, o, v], |q| {
        ints.ovoo.data[((q[1] * v + q[3]) * o + q[0]) * o + q[2]]
    });
    let ovov = &ints.ovov.data; // (ia|jb) at ((i v + a) o + j) v + b
    let mut triples = Vec::with_capacity(o * (o + 1) * (o + 2) / 6);
    for i in 0..o {
        for j in 0..=i {
            for k in 0..=j {
                triples.push((i, j, k));
            }
        }
    }
    // raw(i,j,k)[x][y][z] = Σ_d t_ij^xd (yd|zk) − Σ_l t_il^xy (jl|kz)
    let raw = |i: usize, j: usize, k: usize, g: &mut [f64]| {
        let tij = &t2.data[(i * o + j) * v2..(i * o + j + 1) * v2];
        gemm_rm(g, false, tij, &x[k * v3..(k + 1) * v3], v, v, v2, 1.0);
        let kjk = &kk.data[(j * o + k) * o * v..(j * o + k + 1) * o * v];
        gemm_rm(
            g,
            true,
            &tt[i * o * v2..(i + 1) * o * v2],
            kjk,
            v2,
            o,
            v,
            -1.0,
        );
    };
    #[derive(Default)]
    struct Scratch {
        w: Vec<f64>,
        vv: Vec<f64>,
        g: Vec<f64>,
    }
    let sum: f64 = triples
        .par_iter()
        .map_init(Scratch::default, |scr, &(i, j, k)| {
            let Scratch { w, vv, g } = scr;
            w.clear();
            w.resize(v3, 0.0);
            g.resize(v3, 0.0);
            // W^abc = raw(ijk)[abc] + raw(ikj)[acb] + raw(kij)[cab] + raw(kji)[cba]
            //       + raw(jki)[bca] + raw(jik)[bac]
            for (occ, order) in [
                ((i, j, k), [0, 1, 2]),
                ((i, k, j), [0, 2, 1]),
                ((k, i, j), [2, 0, 1]),
                ((k, j, i), [2, 1, 0]),
                ((j, k, i), [1, 2, 0]),
                ((j, i, k), [1, 0, 2]),
            ] {
                raw(occ.0, occ.1, occ.2, g);
                add_reordered(w, g, v, order);
            }
            vv.clear();
            vv.extend_from_slice(w);
            let tk = &t1.data[k * v..(k + 1) * v];
            for a in 0..v {
                let tia = t1.data[i * v + a];
                for b in 0..v {
                    let tjb = t1.data[j * v + b];
                    let jbkc = &ovov[((j * v + b) * o + k) * v..((j * v + b) * o + k + 1) * v];
                    let iakc = &ovov[((i * v + a) * o + k) * v..((i * v + a) * o + k + 1) * v];
                    let iajb = ovov[((i * v + a) * o + j) * v + b];
                    let row = &mut vv[(a * v + b) * v..(a * v + b + 1) * v];
                    for c in 0..v {
                        row[c] += tia * jbkc[c] + tjb * iakc[c] + tk[c] * iajb;
                    }
                }
            }
            let s = if i == j && j == k {
                6.0
            } else if i == j || j == k {
                2.0
            } else {
                1.0
            };
            let dijk = eo[i] + eo[j] + eo[k];
            let at = |t: &[f64], a: usize, b: usize, c: usize| t[(a * v + b) * v + c];
            let mut e = 0.0;
            tiles(v, |a, b, cs| {
                let dab = dijk - ev[a] - ev[b];
                for c in cs {
                    let z = 4.0 * at(w, a, b, c) + at(w, b, c, a) + at(w, c, a, b);
                    let y =
                        3.0 * at(vv, a, b, c) - at(vv, a, c, b) - at(vv, b, a, c) - at(vv, c, b, a);
                    e += z * y / (dab - ev[c]);
                }
            });
            2.0 * e / (3.0 * s)
        })
        .sum();
    sum
}
