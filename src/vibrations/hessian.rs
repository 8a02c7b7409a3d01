//! The Cartesian Hessian by central differences of analytic gradients:
//! H_ij ≈ [g_j(x + h e_i) − g_j(x − h e_i)] / 2h, symmetrised (common practice;
//! h = 0.005 bohr, error O(h²)). The 6N displaced gradients are independent: they run
//! `concurrency` at a time on the thread pool, each gradient parallel inside, and the
//! results are put back in displacement order, so the Hessian does not depend on the
//! number of threads or on which displacement finished first. The state at each displaced
//! geometry starts from the reference solution (and hole states follow the reference's
//! hole, see `geometry::state`).

use rayon::prelude::*;

use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::geometry::state::hole_lost;
use crate::geometry::{SolvedState, StateSpec};
use crate::gradient::GradientOptions;

/// Displacement (bohr) of the central differences.
pub const HESSIAN_STEP: f64 = 0.005;

/// Hessian (3N × 3N row-major, hartree/bohr²) of `state` at the nuclei of `reference`,
/// displacements as many at a time as the thread pool has threads. `progress(done,
/// total)` after each gradient.
pub fn hessian_by_gradients(
    reference: &SolvedState,
    state: &StateSpec,
    progress: &mut dyn FnMut(usize, usize),
) -> Result<Vec<f64>> {
    hessian_by_gradients_with(reference, state, rayon::current_num_threads(), progress)
}

/// As [`hessian_by_gradients`] with at most `concurrency` (≥ 1) displaced gradients at a
/// time (each holds its own SCF: the SCF's budget for stored integrals is divided among
/// them; the rest of the memory grows with it, see [`HessianEstimate`]).
pub fn hessian_by_gradients_with(
    reference: &SolvedState,
    state: &StateSpec,
    concurrency: usize,
    progress: &mut dyn FnMut(usize, usize),
) -> Result<Vec<f64>> {
    let mol: &Molecule = &reference.molecule;
    let n = 3 * mol.atoms.len();
    let total = 2 * n;
    let gopts = GradientOptions::default();
    let concurrency = concurrency.clamp(1, total.max(1));
    // the integral budget is shared by the SCFs that run at once
    let mut shared = state.clone();
    shared.scf.memory_budget_bytes /= concurrency;
    let state = &shared;
    let one = |d: usize| -> Result<Vec<[f64; 3]>> {
        let (i, sign) = (d / 2, if d % 2 == 0 { 1.0 } else { -1.0 });
        let mut m = mol.clone();
        m.atoms[i / 3].position[i % 3] += sign * HESSIAN_STEP;
        let st = state.solve(&m, Some(reference))?;
        if let Some(reason) = st.hole.as_ref().and_then(hole_lost) {
            return Err(Error::computation(format!(
                "the hole state was lost at a displaced geometry (coordinate {}): {reason}",
                i + 1
            )));
        }
        st.gradient(state, &gopts)
    };
    let (tx, rx) = std::sync::mpsc::channel::<()>();
    let grads: Vec<Result<Vec<[f64; 3]>>> = std::thread::scope(|scope| {
        let worker = scope.spawn(move || {
            // displacements in groups of `concurrency`, each group in parallel
            let mut out = Vec::with_capacity(total);
            for start in (0..total).step_by(concurrency) {
                let end = (start + concurrency).min(total);
                let part: Vec<Result<Vec<[f64; 3]>>> = (start..end)
                    .into_par_iter()
                    .map(|d| {
                        let r = one(d);
                        let _ = tx.send(());
                        r
                    })
                    .collect();
                let failed = part.iter().any(|r| r.is_err());
                out.extend(part);
                if failed {
                    break;
                }
            }
            out
        });
        let mut done = 0;
        while rx.recv().is_ok() {
            done += 1;
            progress(done, total);
        }
        worker.join().expect("Hessian worker thread")
    });
    let mut g = Vec::with_capacity(total);
    for r in grads {
        g.push(r?);
    }
    let mut h = vec![0.0; n * n];
    for i in 0..n {
        let (gp, gm) = (&g[2 * i], &g[2 * i + 1]);
        for j in 0..n {
            h[i * n + j] = (gp[j / 3][j % 3] - gm[j / 3][j % 3]) / (2.0 * HESSIAN_STEP);
        }
    }
    for i in 0..n {
        for j in 0..i {
            let v = 0.5 * (h[i * n + j] + h[j * n + i]);
            h[i * n + j] = v;
            h[j * n + i] = v;
        }
    }
    Ok(h)
}

/// Up-front estimate of a finite-difference Hessian (before any displaced gradient).
#[derive(Debug, Clone, serde::Serialize)]
pub struct HessianEstimate {
    pub gradients: usize,
    /// Displaced gradients at a time.
    pub concurrency: usize,
    /// The 3N × 3N Hessian and the 6N stored gradients.
    pub hessian_bytes: f64,
    /// Working memory of one displaced SCF and gradient apart from stored integrals:
    /// about 64 n_basis² doubles (orbitals, densities, Fock matrices, DIIS history of both
    /// spins, the gradient's Fock rebuild; a generous count, not measured), plus what the
    /// gradient itself holds (`StateSpec::gradient_bytes`: the density-fitted arrays).
    pub per_gradient_bytes: f64,
    /// Hessian + concurrency × per-gradient working memory.
    pub minimum_bytes: f64,
    /// Wall seconds: 6N / concurrency × the seconds one SCF and gradient took at the
    /// reference geometry (displaced SCFs start from its orbitals, so usually less).
    pub seconds: f64,
}

/// The estimate for `n_atoms` atoms, `n_basis` functions, `concurrency` displacements at a
/// time, `seconds_per_gradient` (a measured reference SCF + gradient) and
/// `gradient_bytes` held by each gradient (`StateSpec::gradient_bytes`).
pub fn hessian_estimate(
    n_atoms: usize,
    n_basis: usize,
    concurrency: usize,
    seconds_per_gradient: f64,
    gradient_bytes: f64,
) -> HessianEstimate {
    let n3 = 3 * n_atoms;
    let gradients = 2 * n3;
    let c = concurrency.max(1);
    let hessian_bytes = 8.0 * (n3 * n3 + gradients * n3) as f64;
    let per_gradient_bytes = 64.0 * 8.0 * (n_basis * n_basis) as f64 + gradient_bytes;
    HessianEstimate {
        gradients,
        concurrency: c,
        hessian_bytes,
        per_gradient_bytes,
        minimum_bytes: hessian_bytes + c as f64 * per_gradient_bytes,
        seconds: gradients.div_ceil(c) as f64 * seconds_per_gradient,
    }
}
