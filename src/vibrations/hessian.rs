//! The Cartesian Hessian by central differences of analytic gradients:
//! H_ij ≈ [g_j(x + h e_i) − g_j(x − h e_i)] / 2h, symmetrised (common practice;
//! h = 0.005 bohr, error O(h²)). Displacements run one after the other, each gradient in
//! parallel; the state at each displaced geometry starts from the reference solution (and
//! hole states follow the reference's hole, see `geometry::state`).

use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::geometry::state::hole_lost;
use crate::geometry::{SolvedState, StateSpec};
use crate::gradient::{scf_gradient, GradientOptions};

/// Displacement (bohr) of the central differences.
pub const HESSIAN_STEP: f64 = 0.005;

/// Hessian (3N × 3N row-major, hartree/bohr²) of `state` at the nuclei of `reference`.
/// `progress(done, total)` after each gradient.
pub fn hessian_by_gradients(
    reference: &SolvedState,
    state: &StateSpec,
    progress: &mut dyn FnMut(usize, usize),
) -> Result<Vec<f64>> {
    let mol: &Molecule = &reference.molecule;
    let n = 3 * mol.atoms.len();
    let total = 2 * n;
    let mut h = vec![0.0; n * n];
    let gopts = GradientOptions::default();
    let mut done = 0;
    for i in 0..n {
        let mut g2 = Vec::with_capacity(2);
        for sign in [1.0, -1.0] {
            let mut m = mol.clone();
            m.atoms[i / 3].position[i % 3] += sign * HESSIAN_STEP;
            let st = state.solve(&m, Some(reference))?;
            if let Some(reason) = st.hole.as_ref().and_then(hole_lost) {
                return Err(Error::computation(format!(
                    "the hole state was lost at a displaced geometry (coordinate {}): {reason}",
                    i + 1
                )));
            }
            g2.push(scf_gradient(&st.molecule, &st.basis, &st.wavefunction, &gopts)?.total);
            done += 1;
            progress(done, total);
        }
        for j in 0..n {
            h[i * n + j] = (g2[0][j / 3][j % 3] - g2[1][j / 3][j % 3]) / (2.0 * HESSIAN_STEP);
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
