//! Davidson's method for a few eigenpairs of a large non-symmetric matrix given only its
//! action on vectors (Davidson, J. Comput. Phys. 17 (1975) 87; the non-symmetric variant of
//! Hirao & Nakatsuji, J. Comput. Phys. 45 (1982) 246).
//!
//! Orthonormal search space V; subspace matrix G = Vᵀ A V (non-symmetric, small) solved by
//! `bandcast_linalg::eig_general`; right Ritz vectors x = V y; residual r = A x − θ x;
//! correction (θ − D)⁻¹ r with the diagonal D (Davidson's preconditioner), orthogonalised
//! twice against V. Complex Ritz pairs are represented by their real parts. Roots are
//! chosen either as the lowest real parts or by root following: each target keeps the Ritz
//! vector of largest overlap with its previous vector (initially its guess), so states
//! started from chosen orbitals stay on them. The space collapses onto the current Ritz
//! vectors when it reaches `max_subspace`.

use bandcast_linalg::{eig_general, Mat};

use crate::{Error, Result};

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Selection {
    /// The `n` roots with the lowest real eigenvalues.
    Lowest,
    /// One root per guess, followed by maximum overlap.
    Follow,
}

#[derive(Debug, Clone)]
pub struct DavidsonOptions {
    /// Convergence on the eigenvalue change (hartree).
    pub e_tol: f64,
    /// Convergence on the residual norm.
    pub r_tol: f64,
    pub max_iter: usize,
    /// Collapse threshold on the number of basis vectors (at least 3 × roots is sensible).
    pub max_subspace: usize,
}

impl Default for DavidsonOptions {
    fn default() -> Self {
        DavidsonOptions {
            e_tol: 1e-7,
            r_tol: 1e-5,
            max_iter: 120,
            max_subspace: 60,
        }
    }
}

#[derive(Debug, Clone)]
pub struct Eigenpair {
    pub value: f64,
    /// Imaginary part of the Ritz value (non-zero only for a complex pair).
    pub imag: f64,
    /// Right eigenvector, unit norm.
    pub vector: Vec<f64>,
    pub residual: f64,
    pub converged: bool,
}

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

/// Orthonormalise `x` against `basis` (two passes); returns false when nothing is left.
fn orthonormalise(basis: &[Vec<f64>], x: &mut [f64], tol: f64) -> bool {
    let n0 = dot(x, x).sqrt();
    if n0 == 0.0 {
        return false;
    }
    for _ in 0..2 {
        for v in basis {
            let c = dot(v, x);
            for (xi, vi) in x.iter_mut().zip(v) {
                *xi -= c * vi;
            }
        }
    }
    let n = dot(x, x).sqrt();
    if n < tol * n0.max(1.0) || n < 1e-14 {
        return false;
    }
    x.iter_mut().for_each(|xi| *xi /= n);
    true
}

/// Solve for eigenpairs of A. `apply` maps a batch of vectors to A times each. `guesses`
/// seed the space (one per root for `Follow`; at least `nroots` for `Lowest`).
pub fn solve(
    apply: &mut dyn FnMut(&[Vec<f64>]) -> Vec<Vec<f64>>,
    diag: &[f64],
    guesses: Vec<Vec<f64>>,
    nroots: usize,
    selection: Selection,
    opts: &DavidsonOptions,
    log: &mut dyn FnMut(&str),
) -> Result<Vec<Eigenpair>> {
    let n = diag.len();
    let nroots = nroots.min(n);
    if nroots == 0 {
        return Ok(Vec::new());
    }
    let mut v: Vec<Vec<f64>> = Vec::new();
    for mut g in guesses.clone() {
        if orthonormalise(&v, &mut g, 1e-8) {
            v.push(g);
        }
    }
    if v.len() < nroots {
        return Err(Error::computation(
            "Davidson: the starting vectors are linearly dependent",
        ));
    }
    let mut av: Vec<Vec<f64>> = apply(&v);
    // previous vectors of followed roots (in full space)
    let mut previous: Vec<Vec<f64>> = match selection {
        Selection::Follow => guesses.into_iter().take(nroots).collect(),
        Selection::Lowest => Vec::new(),
    };
    let mut theta_old = vec![f64::INFINITY; nroots];
    let max_sub = opts.max_subspace.max(3 * nroots).min(n);
    for iter in 1..=opts.max_iter {
        let m = v.len();
        let mut g = Mat::<f64>::zeros(m, m);
        for i in 0..m {
            for j in 0..m {
                g[(i, j)] = dot(&v[i], &av[j]);
            }
        }
        let (re, im, yr, _yi) = eig_general(g.as_ref())
            .ok_or_else(|| Error::computation("Davidson: subspace eigenproblem failed"))?;
        // Ritz vectors in the subspace, real parts, normalised.
        let ritz_y = |k: usize| -> Vec<f64> {
            let mut y: Vec<f64> = (0..m).map(|i| yr[(i, k)]).collect();
            let nn = dot(&y, &y).sqrt().max(1e-300);
            y.iter_mut().for_each(|a| *a /= nn);
            y
        };
        let expand = |y: &[f64], basis: &[Vec<f64>]| -> Vec<f64> {
            let mut x = vec![0.0; n];
            for (c, b) in y.iter().zip(basis) {
                for (xi, bi) in x.iter_mut().zip(b) {
                    *xi += c * bi;
                }
            }
            x
        };
        let mut order: Vec<usize> = (0..m).collect();
        order.sort_by(|&a, &b| re[a].total_cmp(&re[b]));
        // Skip the second member of complex pairs (same real part).
        let mut chosen: Vec<usize> = Vec::with_capacity(nroots);
        match selection {
            Selection::Lowest => {
                let mut last: Option<(f64, f64)> = None;
                for &k in &order {
                    if let Some((r, i)) = last {
                        if im[k] != 0.0 && (re[k] - r).abs() < 1e-12 && (im[k] + i).abs() < 1e-12 {
                            continue;
                        }
                    }
                    chosen.push(k);
                    last = Some((re[k], im[k]));
                    if chosen.len() == nroots {
                        break;
                    }
                }
            }
            Selection::Follow => {
                // overlaps of each Ritz vector with each previous vector
                let xs: Vec<Vec<f64>> = (0..m).map(|k| expand(&ritz_y(k), &v)).collect();
                for prev in previous.iter() {
                    let best = (0..m)
                        .filter(|k| !chosen.contains(k))
                        .max_by(|&a, &b| {
                            dot(&xs[a], prev).abs().total_cmp(&dot(&xs[b], prev).abs())
                        })
                        .unwrap_or(0);
                    chosen.push(best);
                }
            }
        }
        while chosen.len() < nroots {
            chosen.push(*order.last().unwrap());
        }
        let mut pairs = Vec::with_capacity(nroots);
        let mut corrections = Vec::new();
        let mut all_conv = true;
        for (r, &k) in chosen.iter().enumerate() {
            let y = ritz_y(k);
            let x = expand(&y, &v);
            let ax = expand(&y, &av);
            let theta = re[k];
            let res: Vec<f64> = ax.iter().zip(&x).map(|(a, b)| a - theta * b).collect();
            let rn = dot(&res, &res).sqrt();
            let conv = rn < opts.r_tol && (theta - theta_old[r]).abs() < opts.e_tol;
            all_conv &= conv;
            theta_old[r] = theta;
            if !conv {
                let mut c: Vec<f64> = res
                    .iter()
                    .zip(diag)
                    .map(|(ri, d)| {
                        let den = theta - d;
                        if den.abs() < 1e-4 {
                            ri / 1e-4_f64.copysign(den)
                        } else {
                            ri / den
                        }
                    })
                    .collect();
                let nc = dot(&c, &c).sqrt().max(1e-300);
                c.iter_mut().for_each(|a| *a /= nc);
                corrections.push(c);
            }
            pairs.push(Eigenpair {
                value: theta,
                imag: im[k],
                vector: x,
                residual: rn,
                converged: conv,
            });
        }
        log(&format!(
            "Davidson iter {iter:3}: subspace {m:3}, max residual {:.2e}",
            pairs.iter().map(|p| p.residual).fold(0.0, f64::max)
        ));
        if matches!(selection, Selection::Follow) {
            previous = pairs.iter().map(|p| p.vector.clone()).collect();
        }
        if all_conv {
            return Ok(pairs);
        }
        // Collapse when full.
        if v.len() + corrections.len() > max_sub {
            let mut nv: Vec<Vec<f64>> = Vec::new();
            for p in &pairs {
                let mut x = p.vector.clone();
                if orthonormalise(&nv, &mut x, 1e-8) {
                    nv.push(x);
                }
            }
            v = nv;
            av = apply(&v);
        }
        let mut added = Vec::new();
        for mut c in corrections {
            let mut all: Vec<Vec<f64>> = v.clone();
            all.extend(added.iter().cloned());
            if orthonormalise(&all, &mut c, 1e-6) {
                added.push(c);
            }
        }
        if added.is_empty() {
            // Nothing new to add: the space is exhausted; return what we have.
            return Ok(pairs);
        }
        let aadd = apply(&added);
        v.extend(added);
        av.extend(aadd);
    }
    Err(Error::computation(format!(
        "Davidson did not converge in {} iterations (residual threshold {:.0e})",
        opts.max_iter, opts.r_tol
    )))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::correlation::integrals::toy::Lcg;

    fn test_matrix(n: usize) -> Mat<f64> {
        let mut rng = Lcg(17);
        Mat::<f64>::from_fn(n, n, |i, j| {
            if i == j {
                1.0 + i as f64 * 0.5
            } else {
                0.05 * rng.next() + if i < j { 0.02 } else { 0.0 }
            }
        })
    }

    /// Lowest roots of a diagonally dominant non-symmetric matrix agree with a full
    /// diagonalisation.
    #[test]
    fn davidson_matches_full_diagonalisation() {
        let n = 120;
        let a = test_matrix(n);
        let diag: Vec<f64> = (0..n).map(|i| a[(i, i)]).collect();
        let mut apply = |xs: &[Vec<f64>]| -> Vec<Vec<f64>> {
            xs.iter()
                .map(|x| {
                    (0..n)
                        .map(|i| (0..n).map(|j| a[(i, j)] * x[j]).sum())
                        .collect()
                })
                .collect()
        };
        let guesses: Vec<Vec<f64>> = (0..4)
            .map(|k| (0..n).map(|i| if i == k { 1.0 } else { 0.0 }).collect())
            .collect();
        let opts = DavidsonOptions {
            e_tol: 1e-10,
            r_tol: 1e-8,
            max_subspace: 20,
            ..Default::default()
        };
        let got = solve(
            &mut apply,
            &diag,
            guesses,
            3,
            Selection::Lowest,
            &opts,
            &mut |_| {},
        )
        .unwrap();
        let (re, _, _, _) = eig_general(a.as_ref()).unwrap();
        let mut re = re;
        re.sort_by(|x, y| x.total_cmp(y));
        for k in 0..3 {
            assert!(
                (got[k].value - re[k]).abs() < 1e-9,
                "{} vs {}",
                got[k].value,
                re[k]
            );
            assert!(got[k].converged);
        }
        // Root following from the 6th unit vector finds the eigenvalue nearest 1 + 5·0.5.
        let g = vec![(0..n).map(|i| if i == 5 { 1.0 } else { 0.0 }).collect()];
        let got = solve(
            &mut apply,
            &diag,
            g,
            1,
            Selection::Follow,
            &opts,
            &mut |_| {},
        )
        .unwrap();
        let target = re
            .iter()
            .copied()
            .min_by(|x, y| (x - 3.5).abs().total_cmp(&(y - 3.5).abs()))
            .unwrap();
        assert!((got[0].value - target).abs() < 1e-9);
    }
}
