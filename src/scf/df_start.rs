//! A density-fitted start for exact integral-direct SCF.
//!
//! Exact direct Fock builds cost about one pass over all two-electron integrals each, so
//! the aim is to need as few of them as possible:
//!
//! 1. Converge with density-fitted J/K (cheap) to |ΔE| < 1e-7 Eh and commutator < 1e-5:
//!    density D₀.
//! 2. One exact build at D₀ and the fitting error there, Δ = G_exact(D₀) − G_DF(D₀)
//!    (J and K per density).
//! 3. Converge fully with G(D) ≈ G_DF(D) + Δ (cheap again): D₁. The remaining error of this
//!    Fock matrix is the change of the fitting error between D₀ and D₁, a fraction of the
//!    fitting error times |D₁ − D₀|.
//! 4. The caller iterates with the exact builder from D₁; that builder still holds
//!    G_exact(D₀), so its first build is incremental in D₁ − D₀ (small, well screened), and
//!    two or three exact iterations usually reach the thresholds. The final energy and
//!    orbitals are those of the exact Fock matrix.

use bandcast_linalg::Mat;

use super::driver::{self, IterationInfo, Problem, Solution, Start};
use super::fock::{DfFock, FockBuilder, Jk};
use super::options::{Reference, ScfOptions};
use crate::error::Result;

/// Convergence of step 1.
pub const DF_START_E_TOL: f64 = 1e-7;
pub const DF_START_COMMUTATOR_TOL: f64 = 1e-5;

/// What the start did.
#[derive(Debug, Clone)]
pub struct DfStartRecord {
    /// Density-fitted iterations (step 1) and iterations with the corrected fit (step 3).
    pub iterations: usize,
    pub corrected_iterations: usize,
    pub builder: String,
    /// The density-fitted energy of step 1.
    pub energy: f64,
}

/// Steps 1–3; returns the start for the exact iterations. `exact` must be the builder the
/// exact iterations will use (it keeps G_exact(D₀) for an incremental first build).
pub fn df_start(
    problem: &Problem,
    df: &mut DfFock,
    exact: &mut dyn FockBuilder,
    opts: &ScfOptions,
    start: Start,
    log: &mut dyn FnMut(&IterationInfo),
) -> Result<(Start, DfStartRecord)> {
    let loose = ScfOptions {
        e_tol: opts.e_tol.max(DF_START_E_TOL),
        commutator_tol: opts.commutator_tol.max(DF_START_COMMUTATOR_TOL),
        ..opts.clone()
    };
    let mut tagged = |stage: &str, i: &IterationInfo| {
        let mut j = i.clone();
        j.note = format!("{stage} {}", j.note).trim_end().to_string();
        log(&j)
    };
    let pre = driver::iterate(problem, df, &loose, start, &mut |i| {
        tagged("density-fitted start", i)
    })?;
    let dens = densities(opts.reference, &pre);
    let refs: Vec<&Mat<f64>> = dens.iter().collect();
    let g_exact = exact.jk(&refs)?;
    let g_fit = df.jk(&refs)?;
    let delta: Vec<Jk> = g_exact
        .iter()
        .zip(&g_fit)
        .map(|(e, f)| Jk {
            j: &e.j - &f.j,
            k: &e.k - &f.k,
        })
        .collect();
    let mut corrected = Corrected { df, delta };
    let post = driver::iterate(problem, &mut corrected, opts, orbitals(&pre), &mut |i| {
        tagged("density-fitted + exact correction", i)
    })?;
    let record = DfStartRecord {
        iterations: pre.iterations,
        corrected_iterations: post.iterations,
        builder: corrected.df.describe(),
        energy: pre.energy,
    };
    Ok((orbitals(&post), record))
}

/// The densities the driver passes to a builder: [P^α] for RHF, [P^α, P^β] otherwise.
fn densities(reference: Reference, s: &Solution) -> Vec<Mat<f64>> {
    let pa = driver::density(&s.c_alpha, &s.occ_alpha);
    match reference {
        Reference::Rhf => vec![pa],
        _ => vec![pa, driver::density(&s.c_beta, &s.occ_beta)],
    }
}

fn orbitals(s: &Solution) -> Start {
    Start::Orbitals {
        c_alpha: s.c_alpha.clone(),
        c_beta: s.c_beta.clone(),
        occ_alpha: s.occ_alpha.clone(),
        occ_beta: s.occ_beta.clone(),
    }
}

/// Density-fitted J/K plus a fixed correction per density.
struct Corrected<'a> {
    df: &'a mut DfFock,
    delta: Vec<Jk>,
}

impl FockBuilder for Corrected<'_> {
    fn describe(&self) -> String {
        format!("{} + exact correction", self.df.describe())
    }

    fn jk(&mut self, densities: &[&Mat<f64>]) -> Result<Vec<Jk>> {
        let fit = self.df.jk(densities)?;
        Ok(fit
            .into_iter()
            .zip(&self.delta)
            .map(|(f, d)| Jk {
                j: &f.j + &d.j,
                k: &f.k + &d.k,
            })
            .collect())
    }
}
