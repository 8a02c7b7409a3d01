//! Minimum-energy structures by a quasi-Newton method in Cartesian coordinates.
//!
//! - Start Hessian: the Lindh model Hessian (`model_hessian`), updated by BFGS
//!   (common practice; Nocedal & Wright, *Numerical Optimization*, eq. 6.19) when the
//!   curvature condition sᵀy > 0 holds.
//! - Step: Newton step in the space orthogonal to rigid translations and rotations
//!   (eigenvectors of the projected Hessian with |λ| > 1e-8; negative or small curvatures
//!   replaced by max(|λ|, 0.005) so the step always goes downhill), scaled down to a trust
//!   radius of 0.3 bohr on its longest atomic displacement; halved and retried when the
//!   energy rises by more than 1e-6 Eh.
//! - Point group of the start kept (`symmetrize`), unless `keep_symmetry` is false: then
//!   nothing is symmetrised and the point group reported is that of the final structure
//!   (a start that is exactly symmetric keeps its symmetry to rounding anyway, since its
//!   gradient is symmetric: distort it to leave a saddle point).
//! - Converged when all four criteria hold (common-practice thresholds): largest force
//!   component 4.5e-4, RMS force 3.0e-4 Eh/bohr, largest step component 1.8e-3, RMS step
//!   1.2e-3 bohr; or when the largest force component is below 1/100 of its threshold.

use bandcast_linalg::{eigh, Mat};

use super::model_hessian::lindh_hessian;
use super::state::{hole_lost, SolvedState, StateSpec};
use super::symmetrize::{symmetrize_positions, symmetrize_vectors};
use crate::analysis::symmetry::{detect_point_group, DEFAULT_TOLERANCE};
use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::gradient::GradientOptions;

/// Thresholds and limits.
#[derive(Debug, Clone)]
pub struct OptimizeOptions {
    pub max_force: f64,
    pub rms_force: f64,
    pub max_step: f64,
    pub rms_step: f64,
    /// Longest atomic displacement of one step (bohr).
    pub trust_radius: f64,
    pub max_iterations: usize,
    pub keep_symmetry: bool,
}

impl Default for OptimizeOptions {
    fn default() -> Self {
        OptimizeOptions {
            max_force: 4.5e-4,
            rms_force: 3.0e-4,
            max_step: 1.8e-3,
            rms_step: 1.2e-3,
            trust_radius: 0.3,
            max_iterations: 100,
            keep_symmetry: true,
        }
    }
}

/// One geometry of the optimisation.
#[derive(Debug, Clone, serde::Serialize)]
pub struct OptStep {
    pub iteration: usize,
    pub energy: f64,
    pub max_force: f64,
    pub rms_force: f64,
    /// Of the step that led to this geometry (0 at the start).
    pub max_step: f64,
    pub rms_step: f64,
}

#[derive(Debug, Clone)]
pub struct OptimizeResult {
    pub converged: bool,
    /// Final geometry (charge and multiplicity of the state).
    pub molecule: Molecule,
    pub energy: f64,
    /// Final gradient (hartree/bohr), forces = −gradient.
    pub gradient: Vec<[f64; 3]>,
    pub steps: Vec<OptStep>,
    pub n_gradients: usize,
    pub point_group: String,
    /// The final state (wavefunction, basis, hole).
    pub state: SolvedState,
    /// Why it stopped when not converged.
    pub stalled: Option<String>,
}

fn max_rms(v: &[f64]) -> (f64, f64) {
    let m = v.iter().fold(0.0f64, |a, x| a.max(x.abs()));
    let r = (v.iter().map(|x| x * x).sum::<f64>() / v.len().max(1) as f64).sqrt();
    (m, r)
}

fn flat(v: &[[f64; 3]]) -> Vec<f64> {
    v.iter().flatten().copied().collect()
}

fn unflat(v: &[f64]) -> Vec<[f64; 3]> {
    v.chunks(3).map(|c| [c[0], c[1], c[2]]).collect()
}

/// Orthonormal basis of rigid translations and rotations of positions `x` (3N vectors).
pub fn rigid_modes(x: &[[f64; 3]]) -> Vec<Vec<f64>> {
    let n = x.len();
    let mut c = [0.0; 3];
    for p in x {
        for k in 0..3 {
            c[k] += p[k] / n as f64;
        }
    }
    let mut raw: Vec<Vec<f64>> = Vec::new();
    for k in 0..3 {
        let mut v = vec![0.0; 3 * n];
        for a in 0..n {
            v[3 * a + k] = 1.0;
        }
        raw.push(v);
    }
    for k in 0..3 {
        let mut v = vec![0.0; 3 * n];
        for (a, p) in x.iter().enumerate() {
            let r = [p[0] - c[0], p[1] - c[1], p[2] - c[2]];
            // e_k × r
            let e = [
                (k == 0) as u8 as f64,
                (k == 1) as u8 as f64,
                (k == 2) as u8 as f64,
            ];
            let w = [
                e[1] * r[2] - e[2] * r[1],
                e[2] * r[0] - e[0] * r[2],
                e[0] * r[1] - e[1] * r[0],
            ];
            v[3 * a..3 * a + 3].copy_from_slice(&w);
        }
        raw.push(v);
    }
    // Gram–Schmidt, dropping dependent vectors (linear molecules have two rotations)
    let mut out: Vec<Vec<f64>> = Vec::new();
    for mut v in raw {
        for u in &out {
            let d: f64 = v.iter().zip(u).map(|(a, b)| a * b).sum();
            for (a, b) in v.iter_mut().zip(u) {
                *a -= d * b;
            }
        }
        let nv = v.iter().map(|a| a * a).sum::<f64>().sqrt();
        if nv > 1e-6 {
            out.push(v.iter().map(|a| a / nv).collect());
        }
    }
    out
}

/// P = 1 − Σ t tᵀ over the rigid modes, applied to a vector.
fn project(v: &mut [f64], modes: &[Vec<f64>]) {
    for u in modes {
        let d: f64 = v.iter().zip(u).map(|(a, b)| a * b).sum();
        for (a, b) in v.iter_mut().zip(u) {
            *a -= d * b;
        }
    }
}

/// Quasi-Newton step −H⁺g in the projected space.
fn newton_step(h: &[f64], g: &[f64], modes: &[Vec<f64>]) -> Vec<f64> {
    let dim = g.len();
    // projected Hessian P H P
    let mut ph = Mat::<f64>::from_fn(dim, dim, |i, j| h[i * dim + j]);
    for u in modes {
        // H ← (1 − uuᵀ) H (1 − uuᵀ)
        let hu: Vec<f64> = (0..dim)
            .map(|i| (0..dim).map(|j| ph[(i, j)] * u[j]).sum())
            .collect();
        let uhu: f64 = (0..dim).map(|i| u[i] * hu[i]).sum();
        for i in 0..dim {
            for j in 0..dim {
                ph[(i, j)] += -hu[i] * u[j] - u[i] * hu[j] + uhu * u[i] * u[j];
            }
        }
    }
    let (lam, v) = eigh(ph.as_ref());
    let mut step = vec![0.0; dim];
    for (k, &l) in lam.iter().enumerate() {
        // skip the rigid-mode eigenvectors (zero by construction)
        let overlap_rigid: f64 = modes
            .iter()
            .map(|u| (0..dim).map(|i| u[i] * v[(i, k)]).sum::<f64>().powi(2))
            .sum();
        if overlap_rigid > 0.5 {
            continue;
        }
        let gk: f64 = (0..dim).map(|i| g[i] * v[(i, k)]).sum();
        let curv = l.abs().max(0.005);
        for i in 0..dim {
            step[i] -= gk / curv * v[(i, k)];
        }
    }
    project(&mut step, modes);
    step
}

/// Optimise the structure of `state` starting from `start`. `progress` sees every
/// accepted geometry. Returns `converged == false` with `stalled` when the iteration limit
/// is reached; errors (exit 1) when the SCF fails or a hole state loses its hole.
pub fn optimize(
    start: &Molecule,
    state: &StateSpec,
    opts: &OptimizeOptions,
    progress: &mut dyn FnMut(&OptStep),
) -> Result<OptimizeResult> {
    state.validate(start)?;
    let pg = detect_point_group(start, DEFAULT_TOLERANCE);
    let pg_opt = (opts.keep_symmetry && pg.operations.len() > 1).then_some(&pg);
    let mut mol = state.molecule_at(start)?;
    if let Some(pg) = pg_opt {
        let x: Vec<[f64; 3]> = mol.atoms.iter().map(|a| a.position).collect();
        for (a, p) in mol.atoms.iter_mut().zip(symmetrize_positions(pg, &x)) {
            a.position = p;
        }
    }
    // the group reported at the end: the start's when kept, else found again (empty here)
    let pg_name: &str = if opts.keep_symmetry { &pg.name } else { "" };
    let gopts = GradientOptions::default();
    let mut n_gradients = 0;
    let evaluate = |mol: &Molecule,
                    prev: Option<&SolvedState>,
                    n: &mut usize|
     -> Result<(SolvedState, Vec<[f64; 3]>)> {
        let st = state.solve(mol, prev)?;
        if let Some(reason) = st.hole.as_ref().and_then(hole_lost) {
            return Err(Error::computation(format!(
                "the hole state was lost at geometry {}: {reason}; the structure is not optimised \
                 (the last geometry kept its hole)",
                *n + 1
            )));
        }
        let g = st.gradient(state, &gopts)?;
        *n += 1;
        let g = match pg_opt {
            Some(pg) => symmetrize_vectors(pg, &g),
            None => g,
        };
        Ok((st, g))
    };
    let (mut cur, mut g) = evaluate(&mol, None, &mut n_gradients)?;
    let mut h = lindh_hessian(&mol);
    let mut steps = Vec::new();
    let (mf, rf) = max_rms(&flat(&g));
    let first = OptStep {
        iteration: 0,
        energy: cur.wavefunction.energy,
        max_force: mf,
        rms_force: rf,
        max_step: 0.0,
        rms_step: 0.0,
    };
    progress(&first);
    steps.push(first);
    let converged_forces = |mf: f64, rf: f64| mf < opts.max_force && rf < opts.rms_force;
    if mf < opts.max_force / 100.0 {
        return Ok(finish(true, mol, cur, g, steps, n_gradients, pg_name, None));
    }
    for it in 1..=opts.max_iterations {
        let x: Vec<[f64; 3]> = mol.atoms.iter().map(|a| a.position).collect();
        let modes = rigid_modes(&x);
        let gf = flat(&g);
        let mut s = newton_step(&h, &gf, &modes);
        if let Some(pg) = pg_opt {
            s = flat(&symmetrize_vectors(pg, &unflat(&s)));
        }
        let longest = s
            .chunks(3)
            .map(|c| (c[0] * c[0] + c[1] * c[1] + c[2] * c[2]).sqrt())
            .fold(0.0, f64::max);
        if longest > opts.trust_radius {
            let f = opts.trust_radius / longest;
            s.iter_mut().for_each(|v| *v *= f);
        }
        // take the step, halving it while the energy rises noticeably
        let mut tries = 0;
        let (new_mol, new_state, new_g) = loop {
            let mut m = mol.clone();
            for (a, atom) in m.atoms.iter_mut().enumerate() {
                for k in 0..3 {
                    atom.position[k] += s[3 * a + k];
                }
            }
            let (st, gn) = evaluate(&m, Some(&cur), &mut n_gradients)?;
            if st.wavefunction.energy <= cur.wavefunction.energy + 1e-6 || tries >= 4 {
                break (m, st, gn);
            }
            tries += 1;
            s.iter_mut().for_each(|v| *v *= 0.5);
        };
        let gn = flat(&new_g);
        let y: Vec<f64> = gn.iter().zip(&gf).map(|(a, b)| a - b).collect();
        let sy: f64 = s.iter().zip(&y).map(|(a, b)| a * b).sum();
        let dim = s.len();
        if sy > 1e-12 {
            let hs: Vec<f64> = (0..dim)
                .map(|i| (0..dim).map(|j| h[i * dim + j] * s[j]).sum())
                .collect();
            let shs: f64 = s.iter().zip(&hs).map(|(a, b)| a * b).sum();
            for i in 0..dim {
                for j in 0..dim {
                    h[i * dim + j] += y[i] * y[j] / sy - hs[i] * hs[j] / shs;
                }
            }
        }
        let (ms, rs) = max_rms(&s);
        let (mf, rf) = max_rms(&gn);
        mol = new_mol;
        cur = new_state;
        g = new_g;
        let st = OptStep {
            iteration: it,
            energy: cur.wavefunction.energy,
            max_force: mf,
            rms_force: rf,
            max_step: ms,
            rms_step: rs,
        };
        progress(&st);
        steps.push(st);
        if (converged_forces(mf, rf) && ms < opts.max_step && rs < opts.rms_step)
            || mf < opts.max_force / 100.0
        {
            return Ok(finish(true, mol, cur, g, steps, n_gradients, pg_name, None));
        }
    }
    let last = steps.last().expect("at least one step");
    let reason = format!(
        "no convergence in {} steps: last energy {:.8} Eh, largest force {:.2e} Eh/bohr (threshold {:.1e}), \
         RMS force {:.2e} ({:.1e}), largest step {:.2e} bohr ({:.1e}), RMS step {:.2e} ({:.1e})",
        opts.max_iterations,
        last.energy,
        last.max_force,
        opts.max_force,
        last.rms_force,
        opts.rms_force,
        last.max_step,
        opts.max_step,
        last.rms_step,
        opts.rms_step
    );
    Ok(finish(
        false,
        mol,
        cur,
        g,
        steps,
        n_gradients,
        pg_name,
        Some(reason),
    ))
}

#[allow(clippy::too_many_arguments)]
fn finish(
    converged: bool,
    mol: Molecule,
    state: SolvedState,
    g: Vec<[f64; 3]>,
    steps: Vec<OptStep>,
    n_gradients: usize,
    pg: &str,
    stalled: Option<String>,
) -> OptimizeResult {
    let point_group = if pg.is_empty() {
        // symmetry not kept: the group of the final structure
        detect_point_group(&mol, DEFAULT_TOLERANCE).name
    } else {
        pg.to_string()
    };
    OptimizeResult {
        converged,
        energy: state.wavefunction.energy,
        molecule: mol,
        gradient: g,
        steps,
        n_gradients,
        point_group,
        state,
        stalled,
    }
}
