//! (ia|jb) two-electron integrals over occupied (i, j) and virtual (a, b) molecular
//! orbitals, the only block MP2 needs, computed from AO shell quartets in two half
//! transformations:
//!
//!   H_μν(jb) = Σ_λσ (μν|λσ) C3_λj C4_σb          (ket half, per bra shell pair)
//!   (ia|jb)  = Σ_μν C1_μi C2_νa H_μν(jb)          (bra half, two matrix products)
//!
//! Memory: n_ao² · n_occ · n_virt doubles for H plus the result. Every quartet is computed
//! (no permutational symmetry): the code is meant for the small molecules ΔMP2 is offered
//! for. Bra shells are processed in parallel; each writes only its own rows of H, so the
//! result does not depend on the thread count.
//!
//! (A general MO-block transformation lives in `integrals::mo_transform` once merged; this
//! file is the core module's own until then.)

use rayon::prelude::*;

use bandcast_linalg::{mul, Mat};

use crate::basis::BasisSet;
use crate::error::{Error, Result};
use crate::integrals::EriEngine;

/// Bytes `ovov` needs for these dimensions.
pub fn estimate_bytes(n_ao: usize, n1: usize, n2: usize, n3: usize, n4: usize) -> usize {
    8 * (n_ao * n_ao * n3 * n4 + n1 * n_ao * n3 * n4 + n1 * n2 * n3 * n4 + n_ao * n_ao)
}

/// Half-transformed ket: H as a matrix with row μ and column ν·(n3·n4) + j·n4 + b.
pub fn ket_half(engine: &EriEngine, basis: &BasisSet, c3: &Mat<f64>, c4: &Mat<f64>) -> Mat<f64> {
    let n = basis.n_basis;
    let (n3, n4) = (c3.ncols(), c4.ncols());
    let w = n3 * n4;
    let nsh = basis.shells.len();
    let rows: Vec<(usize, Vec<f64>)> = (0..nsh)
        .into_par_iter()
        .map(|p| {
            let np = basis.shells[p].n_functions();
            let op = basis.offsets[p];
            // Rows μ ∈ P: values over (ν, j, b).
            let mut out = vec![0.0; np * n * w];
            let mut buf = Vec::new();
            let mut x = Mat::<f64>::zeros(n, n);
            for q in 0..nsh {
                let nq = basis.shells[q].n_functions();
                let oq = basis.offsets[q];
                // X[(i_p, i_q)] = (μν|λσ) over all λσ.
                let mut xs: Vec<Mat<f64>> = (0..np * nq).map(|_| Mat::zeros(n, n)).collect();
                for r in 0..nsh {
                    let nr = basis.shells[r].n_functions();
                    let or = basis.offsets[r];
                    for s in 0..nsh {
                        let ns = basis.shells[s].n_functions();
                        let os = basis.offsets[s];
                        engine.shell_quartet(p, q, r, s, &mut buf);
                        for i in 0..np {
                            for j in 0..nq {
                                let m = &mut xs[i * nq + j];
                                for k in 0..nr {
                                    for l in 0..ns {
                                        m[(or + k, os + l)] = buf[((i * nq + j) * nr + k) * ns + l];
                                    }
                                }
                            }
                        }
                    }
                }
                for i in 0..np {
                    for j in 0..nq {
                        std::mem::swap(&mut x, &mut xs[i * nq + j]);
                        let t = mul(x.as_ref(), false, c4.as_ref(), false); // λ × b
                        let y = mul(c3.as_ref(), true, t.as_ref(), false); // j × b
                        let base = (i * n + oq + j) * w;
                        for jj in 0..n3 {
                            for b in 0..n4 {
                                out[base + jj * n4 + b] = y[(jj, b)];
                            }
                        }
                    }
                }
            }
            (op, out)
        })
        .collect();
    let mut h = Mat::<f64>::zeros(n, n * w);
    for (op, out) in rows {
        let np = out.len() / (n * w);
        for i in 0..np {
            for c in 0..n * w {
                h[(op + i, c)] = out[i * n * w + c];
            }
        }
    }
    h
}

/// (ia|jb) at ((i·n2 + a)·n3 + j)·n4 + b from a ket half `h` (see `ket_half`).
pub fn bra_half(h: &Mat<f64>, c1: &Mat<f64>, c2: &Mat<f64>, n3: usize, n4: usize) -> Vec<f64> {
    let n = c1.nrows();
    let (n1, n2) = (c1.ncols(), c2.ncols());
    let w = n3 * n4;
    // T[i][(ν, jb)] = Σ_μ C1_μi H[μ][(ν, jb)].
    let t = mul(c1.as_ref(), true, h.as_ref(), false);
    let mut out = vec![0.0; n1 * n2 * w];
    for i in 0..n1 {
        let ti = Mat::<f64>::from_fn(n, w, |nu, c| t[(i, nu * w + c)]);
        let r = mul(c2.as_ref(), true, ti.as_ref(), false); // a × jb
        for a in 0..n2 {
            for c in 0..w {
                out[(i * n2 + a) * w + c] = r[(a, c)];
            }
        }
    }
    out
}

/// Refuse cleanly when the blocks would not fit.
pub fn check_budget(need: usize, budget: usize) -> Result<()> {
    if need > budget {
        return Err(Error::TooLarge(format!(
            "ΔMP2 needs about {:.2} GB for its (ia|jb) integrals, over the budget of {:.2} GB \
             (use a smaller basis or drop --mp2)",
            need as f64 / 1e9,
            budget as f64 / 1e9
        )));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::basis::Shell;
    use crate::integrals::eri_tensor;

    #[test]
    fn matches_a_transformed_dense_tensor() {
        let sh = |l: usize, e: f64, z: f64, atom: usize| Shell {
            l,
            pure: true,
            center: [0.0, 0.3 * z, z],
            atom,
            exponents: vec![e, 0.4 * e],
            coefficients: vec![0.6, 0.5],
        };
        let basis = BasisSet::from_shells(
            "t",
            vec![
                sh(0, 3.0, 0.0, 0),
                sh(1, 1.2, 0.0, 0),
                sh(0, 1.5, 1.4, 1),
                sh(2, 0.9, 1.4, 1),
            ],
        );
        let n = basis.n_basis;
        let c = Mat::<f64>::from_fn(n, n, |i, j| ((i * 7 + j * 3) % 5) as f64 * 0.1 - 0.2);
        let cols = |a: usize, b: usize| Mat::<f64>::from_fn(n, b - a, |i, j| c[(i, a + j)]);
        let (c1, c2, c3, c4) = (cols(0, 2), cols(2, n), cols(0, 3), cols(3, n));
        let engine = EriEngine::new(&basis);
        let h = ket_half(&engine, &basis, &c3, &c4);
        let g = bra_half(&h, &c1, &c2, c3.ncols(), c4.ncols());
        let t = eri_tensor(&basis);
        let (n1, n2, n3, n4) = (c1.ncols(), c2.ncols(), c3.ncols(), c4.ncols());
        for (i, a, j, b) in [(0, 0, 0, 0), (1, 3, 2, 5), (0, n2 - 1, n3 - 1, n4 - 1)] {
            let mut e = 0.0;
            for p in 0..n {
                for q in 0..n {
                    for r in 0..n {
                        for s in 0..n {
                            e += c1[(p, i)]
                                * c2[(q, a)]
                                * c3[(r, j)]
                                * c4[(s, b)]
                                * t[((p * n + q) * n + r) * n + s];
                        }
                    }
                }
            }
            let got = g[((i * n2 + a) * n3 + j) * n4 + b];
            assert!((got - e).abs() < 1e-12, "{got} {e}");
        }
        let _ = n1;
    }
}
