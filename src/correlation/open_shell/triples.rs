//! The perturbative triples correction (T) on a spin-orbital CCSD solution.
//!
//! Raghavachari, Trucks, Pople & Head-Gordon, Chem. Phys. Lett. 157 (1989) 479, in the
//! spin-orbital form: with P(i/jk) f(ijk) = f(ijk) − f(jik) − f(kji),
//!   D t_c(ijk,abc) = P(i/jk) P(a/bc) [Σ_e t_jk^ae ⟨ei||bc⟩ − Σ_m t_im^bc ⟨ma||jk⟩]   (connected)
//!   D t_d(ijk,abc) = P(i/jk) P(a/bc) [t_i^a ⟨jk||bc⟩ + f_ia t_jk^bc]             (disconnected)
//!   E(T) = (1/36) Σ t_c D (t_c + t_d),  D = f_ii + f_jj + f_kk − f_aa − f_bb − f_cc.
//! The f_ia t_jk^bc term is zero for a Hartree–Fock reference; for ROHF it is the
//! non-Hartree–Fock term of Watts, Gauss & Bartlett, J. Chem. Phys. 98 (1993) 8718, whose
//! ROHF-CCSD(T) is defined in semicanonical orbitals (reference.rs rotates them so).
//!
//! Work: o³v⁴/6 multiply–adds per term (loops over i < j < k, each a v × v³ product).
//! Memory: t2 and the ⟨ei||bc⟩ = −⟨ie||bc⟩ block are already held; each parallel task holds
//! four v³ arrays.

use rayon::prelude::*;

use super::core_hole::CoreHole;
use super::spin_orbital::SpinOrbitalSystem;
use crate::correlation::tensor::{gemm_rm, Tensor};

/// Words per parallel task.
pub fn task_words(v: usize) -> f64 {
    4.0 * (v * v * v) as f64
}

/// E(T) in hartree.
pub fn correction(
    sys: &SpinOrbitalSystem,
    t1: &Tensor,
    t2: &Tensor,
    hole: Option<&CoreHole>,
) -> f64 {
    let occ_of = |i: usize| super::ccsd::spin_index(sys, i, false);
    let vir_of = |a: usize| super::ccsd::spin_index(sys, a, true);
    let (o, v) = (sys.nocc, sys.nvir);
    let v2 = v * v;
    let v3 = v2 * v;
    let fo: Vec<f64> = (0..o).map(|i| sys.foo.data[i * o + i]).collect();
    let fv: Vec<f64> = (0..v).map(|a| sys.fvv.data[a * v + a]).collect();
    // <ma||jk> = <jk||ma> = ooov[j,k,m,a] → stored as ma_jk[j][k][a][m]
    let ooov = &sys.ooov;
    let mut triples = Vec::new();
    for i in 0..o {
        for j in i + 1..o {
            for k in j + 1..o {
                triples.push((i, j, k));
            }
        }
    }
    let t2s = |i: usize, j: usize| &t2.data[(i * o + j) * v2..(i * o + j + 1) * v2];
    // W(ijk)[a,b,c] before the P(a/bc) permutation:
    //   Σ_e t_jk^ae <ei||bc> − Σ_m t_im^bc <ma||jk>
    let raw_c = |i: usize, j: usize, k: usize, out: &mut [f64], tmp: &mut Vec<f64>| {
        // Σ_e t_jk[a,e] (−ovvv[i,e,b,c])
        let ovvv_i = &sys.ovvv.data[i * v3..(i + 1) * v3];
        gemm_rm(out, false, t2s(j, k), ovvv_i, v, v, v2, -1.0);
        // − Σ_m <ma||jk> t_im[b,c]: M[a,m] = ooov[j,k,m,a]
        tmp.clear();
        tmp.resize(v * o, 0.0);
        for m in 0..o {
            for a in 0..v {
                tmp[a * o + m] = ooov.data[((j * o + k) * o + m) * v + a];
            }
        }
        let t_i = &t2.data[i * o * v2..(i + 1) * o * v2];
        gemm_rm(out, true, tmp, t_i, v, o, v2, -1.0);
    };
    let raw_d = |i: usize, j: usize, k: usize, out: &mut [f64]| {
        // t_i^a <jk||bc> + f_ia t_jk^bc
        let w = &sys.oovv.data[(j * o + k) * v2..(j * o + k + 1) * v2];
        let t = t2s(j, k);
        for a in 0..v {
            let ta = t1.data[i * v + a];
            let fa = sys.fov.data[i * v + a];
            for bc in 0..v2 {
                out[a * v2 + bc] += ta * w[bc] + fa * t[bc];
            }
        }
    };
    // P(a/bc) x[a,b,c] = x[a,b,c] − x[b,a,c] − x[c,b,a]
    let p_abc = |x: &[f64], out: &mut [f64]| {
        for a in 0..v {
            for b in 0..v {
                for c in 0..v {
                    out[(a * v + b) * v + c] =
                        x[(a * v + b) * v + c] - x[(b * v + a) * v + c] - x[(c * v + b) * v + a];
                }
            }
        }
    };
    let sum: f64 = triples
        .par_iter()
        .map(|&(i, j, k)| {
            let mut wc = vec![0.0; v3];
            let mut wd = vec![0.0; v3];
            let mut tmp = Vec::new();
            // P(i/jk): (ijk) − (jik) − (kji)
            for (sgn, (p, q, r)) in [(1.0, (i, j, k)), (-1.0, (j, i, k)), (-1.0, (k, j, i))] {
                let mut x = vec![0.0; v3];
                raw_c(p, q, r, &mut x, &mut tmp);
                let mut y = vec![0.0; v3];
                raw_d(p, q, r, &mut y);
                for n in 0..v3 {
                    wc[n] += sgn * x[n];
                    wd[n] += sgn * y[n];
                }
            }
            let mut pc = vec![0.0; v3];
            let mut pd = vec![0.0; v3];
            p_abc(&wc, &mut pc);
            p_abc(&wd, &mut pd);
            let dijk = fo[i] + fo[j] + fo[k];
            let ijk = [occ_of(i), occ_of(j), occ_of(k)];
            let mut e = 0.0;
            for a in 0..v {
                for b in 0..v {
                    for c in 0..v {
                        if hole
                            .is_some_and(|h| h.forbidden(&ijk, &[vir_of(a), vir_of(b), vir_of(c)]))
                        {
                            continue;
                        }
                        let n = (a * v + b) * v + c;
                        let d = dijk - fv[a] - fv[b] - fv[c];
                        e += pc[n] * (pc[n] + pd[n]) / d;
                    }
                }
            }
            e
        })
        .collect::<Vec<f64>>()
        .iter()
        .sum();
    // Σ over i<j<k covers each unordered triple once: 1/36 · 6 = 1/6
    sum / 6.0
}
