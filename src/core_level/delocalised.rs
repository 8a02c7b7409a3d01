//! The delocalised core hole, computed for comparison with the localised one.
//!
//! On symmetry-equivalent atoms (the two N of N2) the canonical 1s orbitals are gerade and
//! ungerade combinations spread over both atoms. A hole in one of them keeps the molecule's
//! symmetry, but in unrestricted Hartree–Fock that state is unstable: the SCF breaks the
//! symmetry and ends in the localised hole. To obtain the delocalised state at all, the
//! cation SCF is run with its densities averaged over the point group at every Fock build
//! (`scf::symmetrise`): P ↦ (1/|G|) Σ_R R P Rᵀ, R the AO representation of each operation
//! (`analysis::symmetry::ao_action`). Each non-degenerate canonical orbital of the core block
//! is tried as the hole and the lowest converged state is kept.
//!
//! The localised hole relaxes the valence electrons around one atom and lies several eV
//! lower; the delocalised one is the symmetry-restricted solution that Bagus & Schaefer,
//! J. Chem. Phys. 56 (1972) 224, compared with it for O2⁺. Reported beside the localised
//! value; the localised one is the binding energy to compare with a measurement.

use std::sync::Arc;

use bandcast_linalg::{mul, Mat};
use serde::Serialize;

use crate::analysis::symmetry::{ao_actions, detect_point_group};
use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::scf::{DensitySymmetry, ScfContext};

use super::cation::{final_hole_population_on, run_start, HoleSetup};
use super::equivalence::TOLERANCE;
use super::hole_check::HoleStatus;
use super::targets::atom_label;

/// Canonical orbitals within this energy (hartree) of another are treated as degenerate: a
/// hole in one member of a degenerate set has no totally symmetric density and is not tried.
pub const DEGENERATE_EH: f64 = 1e-6;

/// P ↦ (1/|G|) Σ_R R P Rᵀ over the operations of a point group.
#[derive(Debug)]
pub struct GroupAverage {
    name: String,
    ops: Vec<Mat<f64>>,
}

impl GroupAverage {
    /// The point group of `mol` (detected with the tolerance used for equivalent atoms)
    /// acting on `basis`; None when the basis does not map onto itself (the hole atom and
    /// its partners must carry the same functions).
    pub fn new(mol: &Molecule, basis: &BasisSet) -> Option<GroupAverage> {
        let pg = detect_point_group(mol, TOLERANCE);
        let acts = ao_actions(&pg, basis, true)?;
        Some(GroupAverage {
            name: pg.name.clone(),
            ops: acts.iter().map(|a| a.matrix(basis)).collect(),
        })
    }
}

impl DensitySymmetry for GroupAverage {
    fn symmetrise(&self, p: &Mat<f64>) -> Mat<f64> {
        let n = p.nrows();
        let mut acc = Mat::<f64>::zeros(n, n);
        for r in &self.ops {
            let rp = mul(r.as_ref(), false, p.as_ref(), false);
            let rprt = mul(rp.as_ref(), false, r.as_ref(), true);
            acc = &acc + &rprt;
        }
        let w = 1.0 / self.ops.len() as f64;
        Mat::<f64>::from_fn(n, n, |i, j| w * acc[(i, j)])
    }

    fn describe(&self) -> String {
        format!("{}, {} operations", self.name, self.ops.len())
    }
}

/// The delocalised hole of one atom.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DelocalisedHole {
    /// ΔSCF binding energy (eV) of the lowest symmetry-constrained state.
    pub dscf_ev: f64,
    pub s2: f64,
    /// Löwdin population of the final vacancy on the target atom and on each of its
    /// equivalent partners (`atom` from 1, population): equal shares when the hole stayed
    /// delocalised.
    pub vacancy_shares: Vec<(usize, f64)>,
    /// Point group used for the constraint.
    pub group: String,
    /// Every canonical orbital tried as the hole: (MO number from 1, orbital energy in eV,
    /// ΔSCF in eV or null when that start failed).
    pub tried: Vec<(usize, f64, Option<f64>)>,
}

/// Everything the delocalised search needs besides the SCF context.
pub struct DelocalisedSetup<'a> {
    pub cation: &'a Molecule,
    pub basis: &'a BasisSet,
    pub s: &'a Mat<f64>,
    pub s_half: &'a Mat<f64>,
    /// Canonical neutral orbitals, energies and occupations.
    pub c: &'a Mat<f64>,
    pub eps: &'a [f64],
    pub occ: &'a [f64],
    /// Canonical columns of the core block (the 1s orbitals of the equivalent atoms).
    pub block: &'a [usize],
    pub atom: usize,
    pub partners: &'a [usize],
    pub e_neutral: f64,
    pub memory_budget_bytes: usize,
    pub jk_fitting: Option<String>,
}

/// The lowest symmetry-constrained core-ionised state with the hole in one of the block's
/// non-degenerate canonical orbitals; None when the basis or geometry has no usable
/// symmetry or no start converged to a core hole.
pub fn delocalised_hole(d: &DelocalisedSetup, scf: &mut ScfContext) -> Option<DelocalisedHole> {
    let sym = GroupAverage::new(d.cation, d.basis)?;
    let group = sym.name.clone();
    let sym: Arc<dyn DensitySymmetry> = Arc::new(sym);
    let mut best: Option<(f64, f64, Vec<(usize, f64)>)> = None;
    let mut tried = Vec::new();
    for &k in d.block {
        let degenerate = d
            .block
            .iter()
            .any(|&j| j != k && (d.eps[j] - d.eps[k]).abs() < DEGENERATE_EH);
        if degenerate {
            continue;
        }
        let mut occ_beta = d.occ.to_vec();
        occ_beta[k] = 0.0;
        let setup = HoleSetup {
            cation: d.cation,
            basis: d.basis,
            s: d.s,
            s_half: d.s_half,
            c_ref: d.c,
            occ_alpha: d.occ.to_vec(),
            occ_beta,
            hole: k,
            atom: d.atom,
            e_neutral: d.e_neutral,
            koopmans: -d.eps[k],
            localised: false,
            memory_budget_bytes: d.memory_budget_bytes,
            symmetry: Some(sym.clone()),
            jk_fitting: d.jk_fitting.clone(),
        };
        let st = run_start(&setup, scf, "mom");
        let ok = st.attempt.status == HoleStatus::Held;
        tried.push((
            k + 1,
            crate::units::ev(d.eps[k]),
            if ok { st.attempt.dscf_ev } else { None },
        ));
        if let (true, Some(wf), Some(e)) = (ok, st.wf.as_ref(), st.attempt.dscf_ev) {
            if best.as_ref().is_none_or(|b| e < b.0) {
                let mut shares = vec![(d.atom + 1, final_hole_population_on(&setup, wf, d.atom))];
                for &p in d.partners {
                    shares.push((p + 1, final_hole_population_on(&setup, wf, p)));
                }
                best = Some((e, wf.s2, shares));
            }
        }
    }
    let (dscf_ev, s2, vacancy_shares) = best?;
    Some(DelocalisedHole {
        dscf_ev,
        s2,
        vacancy_shares,
        group,
        tried,
    })
}

/// "N1 0.50, N2 0.50" for notes.
pub fn describe_shares(mol: &Molecule, shares: &[(usize, f64)]) -> String {
    let v: Vec<String> = shares
        .iter()
        .map(|&(a, p)| format!("{} {p:.2}", atom_label(mol, a - 1)))
        .collect();
    v.join(", ")
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::basis;
    use crate::chem::xyz::{parse_xyz, LengthUnit};

    #[test]
    fn group_average_is_a_projection_that_keeps_symmetric_densities() {
        // N2 at 1.0977 Å (common practice), STO-3G: a density with weight on one atom only
        // becomes the average of both atoms; applying the average twice changes nothing.
        let m = parse_xyz("2\nN2\nN 0 0 0\nN 0 0 1.0977\n", LengthUnit::Angstrom).unwrap();
        let b = basis::load("sto-3g", &m, None).unwrap();
        let g = GroupAverage::new(&m, &b).expect("D∞h acts on the basis");
        let n = b.n_basis;
        assert_eq!(n, 10);
        // 1s of atom 1 only (AO 0); the same function on atom 2 is AO 5.
        let p = Mat::<f64>::from_fn(n, n, |i, j| if i == 0 && j == 0 { 1.0 } else { 0.0 });
        let q = g.symmetrise(&p);
        assert!((q[(0, 0)] - 0.5).abs() < 1e-12 && (q[(5, 5)] - 0.5).abs() < 1e-12);
        let q2 = g.symmetrise(&q);
        let diff = (0..n)
            .flat_map(|i| (0..n).map(move |j| (i, j)))
            .map(|(i, j)| (q2[(i, j)] - q[(i, j)]).abs())
            .fold(0.0, f64::max);
        assert!(diff < 1e-12);
        // A p_x ⊗ p_x density on atom 1 spreads over p_x and p_y of both atoms (the C∞
        // rotations), keeping its trace.
        let px = 2; // AO order of STO-3G N: 1s, 2s, 2px, 2py, 2pz
        let p = Mat::<f64>::from_fn(n, n, |i, j| if i == px && j == px { 1.0 } else { 0.0 });
        let q = g.symmetrise(&p);
        assert!((q[(px, px)] - 0.25).abs() < 1e-9 && (q[(px + 1, px + 1)] - 0.25).abs() < 1e-9);
        let tr: f64 = (0..n).map(|i| q[(i, i)]).sum();
        assert!((tr - 1.0).abs() < 1e-12);
    }
}
