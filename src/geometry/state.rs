//! The electronic state a geometry is optimised (or its Hessian computed) for: the SCF
//! ground state of a charge, multiplicity and reference, or a cation with one electron
//! taken out of a chosen orbital of that state and held there by the maximum overlap
//! method (Gilbert, Besley & Gill, J. Phys. Chem. A 112 (2008) 13164), as the ΔSCF
//! ionization energies do (`crate::ionization::dscf`).
//!
//! A hole state is re-made at every geometry: the parent (closed-shell) SCF, the parent
//! orbital that best overlaps the previous geometry's hole orbital (the first geometry: the
//! orbital asked for), then the cation by MOM from the parent orbitals. The hole is
//! reported lost when the parent orbital followed changes character (overlap with the
//! previous one below one half) or when less than half of it is missing from the cation's
//! occupied space (`ionization::dscf::HOLE_KEPT`).

use bandcast_linalg::{mul, Mat};

use crate::basis::{self, BasisSet};
use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::integrals;
use crate::ionization::dscf::{hole_weight, HOLE_KEPT};
use crate::scf::{self, Guess, Occupation, Reference, ScfOptions, Wavefunction};

/// Which SCF state.
#[derive(Debug, Clone)]
pub struct StateSpec {
    /// Basis-set name or path.
    pub basis: String,
    /// Charge and multiplicity of the state itself, or, with a hole, of the closed-shell
    /// parent the electron is taken from.
    pub charge: i32,
    pub multiplicity: u32,
    /// Reference of the state (with a hole: of the cation, UHF or ROHF).
    pub reference: Reference,
    /// 0-based MO index of the parent orbital emptied (β electron).
    pub hole: Option<usize>,
    /// SCF thresholds and memory (reference, guess and occupation are set here).
    pub scf: ScfOptions,
}

/// One solved state at one geometry.
#[derive(Debug, Clone)]
pub struct SolvedState {
    pub molecule: Molecule,
    pub basis: BasisSet,
    pub wavefunction: Wavefunction,
    /// Hole states: the parent orbital emptied at this geometry (column of
    /// `parent.c_alpha`), the share of it missing from the cation's occupied space, and the
    /// overlap of this parent orbital with the previous geometry's one (1 at the start).
    pub hole: Option<HoleTrack>,
}

impl SolvedState {
    /// The analytic gradient of this state's energy: the density-fitted gradient when the
    /// spec asks for the density-fitted Fock builder (the energy is then the fitted one),
    /// else the exact-integral gradient.
    pub fn gradient(
        &self,
        spec: &StateSpec,
        opts: &crate::gradient::GradientOptions,
    ) -> Result<Vec<[f64; 3]>> {
        let g = if spec.scf.fock == scf::FockMethod::DensityFitted {
            let name = spec
                .scf
                .jk_fitting
                .as_deref()
                .unwrap_or(scf::context::DEFAULT_JK_FITTING);
            let aux = basis::load_auxiliary(name, &self.molecule)?;
            crate::gradient::scf_gradient_fitted(
                &self.molecule,
                &self.basis,
                &aux,
                &self.wavefunction,
                opts,
            )?
        } else {
            crate::gradient::scf_gradient(&self.molecule, &self.basis, &self.wavefunction, opts)?
        };
        Ok(g.total)
    }
}

#[derive(Debug, Clone)]
pub struct HoleTrack {
    pub parent: Wavefunction,
    pub orbital: usize,
    pub hole_weight: f64,
    pub continuity: f64,
}

impl StateSpec {
    /// Bytes the gradient of this state holds beyond the SCF's working set, known before
    /// any work: the density-fitted gradient's (P|μν) and T arrays and the exchange
    /// blocks (`gradient::density_fitted::fitted_gradient_bytes`); 0 for exact integrals
    /// (integral-direct, a few quartets per thread).
    pub fn gradient_bytes(&self, mol: &Molecule) -> Result<f64> {
        if self.scf.fock != scf::FockMethod::DensityFitted {
            return Ok(0.0);
        }
        let m = self.molecule_at(mol)?;
        let n = basis::load(&self.basis, &m, None)?.n_basis;
        let name = self
            .scf
            .jk_fitting
            .as_deref()
            .unwrap_or(scf::context::DEFAULT_JK_FITTING);
        let naux = basis::load_auxiliary(name, &m)?.n_basis;
        let (na, _) = m.n_alpha_beta();
        let terms = if self.reference == Reference::Rhf {
            1
        } else {
            2
        };
        Ok(crate::gradient::density_fitted::fitted_gradient_bytes(n, naux, na, terms) as f64)
    }

    /// The molecule carrying this state's charge and multiplicity (the cation for holes).
    pub fn molecule_at(&self, mol: &Molecule) -> Result<Molecule> {
        let parent = mol
            .clone()
            .with_charge_multiplicity(self.charge, self.multiplicity)?;
        match self.hole {
            None => Ok(parent),
            Some(_) => parent.with_charge_multiplicity(self.charge + 1, 2),
        }
    }

    /// Check the request before any work: a hole needs a closed-shell parent and an
    /// unrestricted or restricted open-shell cation.
    pub fn validate(&self, mol: &Molecule) -> Result<()> {
        let m = self.molecule_at(mol)?;
        if self.hole.is_some() {
            if self.multiplicity != 1 {
                return Err(Error::input(
                    "a hole is taken from a closed-shell state: multiplicity must be 1",
                ));
            }
            if self.reference == Reference::Rhf {
                return Err(Error::input(
                    "a cation with a hole is open-shell: use the uhf (default) or rohf reference",
                ));
            }
        } else if self.reference == Reference::Rhf && m.multiplicity != 1 {
            return Err(Error::input(format!(
                "RHF needs a closed shell, multiplicity {} is not: use uhf or rohf",
                m.multiplicity
            )));
        }
        Ok(())
    }

    /// Solve the state at the nuclei of `mol`. `previous` (the last geometry's solution)
    /// gives the starting orbitals and, for holes, the orbital to follow.
    pub fn solve(&self, mol: &Molecule, previous: Option<&SolvedState>) -> Result<SolvedState> {
        let target = self.molecule_at(mol)?;
        let basis = basis::load(&self.basis, &target, None)?;
        let guess_from = |wf: &Wavefunction| Guess::Orbitals {
            c_alpha: wf.c_alpha.clone(),
            c_beta: wf.c_beta.clone(),
        };
        let Some(hole0) = self.hole else {
            let opts = ScfOptions {
                reference: self.reference,
                guess: match previous {
                    Some(p) => guess_from(&p.wavefunction),
                    None => Guess::Sad,
                },
                occupation: Occupation::Aufbau,
                ..self.scf.clone()
            };
            let wf = run_scf(&target, &basis, &opts)?;
            return Ok(SolvedState {
                molecule: target,
                basis,
                wavefunction: wf,
                hole: None,
            });
        };
        let parent_mol = mol
            .clone()
            .with_charge_multiplicity(self.charge, self.multiplicity)?;
        let popts = ScfOptions {
            reference: Reference::Rhf,
            guess: match previous.and_then(|p| p.hole.as_ref()) {
                Some(h) => guess_from(&h.parent),
                None => Guess::Sad,
            },
            occupation: Occupation::Aufbau,
            ..self.scf.clone()
        };
        let parent = run_scf(&parent_mol, &basis, &popts)?;
        let s = integrals::overlap(&basis);
        let n_occ = parent.n_beta();
        if hole0 >= n_occ {
            return Err(Error::input(format!(
                "orbital {} is not occupied: the parent state has {n_occ} occupied orbitals",
                hole0 + 1
            )));
        }
        // follow the orbital from the previous geometry
        let (orbital, continuity) = match previous.and_then(|p| p.hole.as_ref()) {
            None => (hole0, 1.0),
            Some(h) => {
                let prev =
                    Mat::<f64>::from_fn(s.nrows(), 1, |mu, _| h.parent.c_alpha[(mu, h.orbital)]);
                let sp = mul(s.as_ref(), false, prev.as_ref(), false);
                let ov = mul(sp.as_ref(), true, parent.c_alpha.as_ref(), false);
                let best = (0..n_occ)
                    .max_by(|&a, &b| ov[(0, a)].abs().total_cmp(&ov[(0, b)].abs()))
                    .expect("occupied orbitals");
                (best, ov[(0, best)].powi(2))
            }
        };
        let mut occ_b = parent.occ_beta.clone();
        occ_b[orbital] = 0.0;
        let opts = ScfOptions {
            reference: self.reference,
            guess: guess_from(&parent),
            occupation: Occupation::Mom {
                c_alpha_ref: parent.c_alpha.clone(),
                c_beta_ref: parent.c_beta.clone(),
                occ_alpha: parent.occ_alpha.clone(),
                occ_beta: occ_b,
                initial: false,
            },
            ..self.scf.clone()
        };
        let wf = run_scf(&target, &basis, &opts)?;
        let w = hole_weight(&s, &parent.c_beta, orbital, &wf.c_beta, &wf.occ_beta);
        Ok(SolvedState {
            molecule: target,
            basis,
            wavefunction: wf,
            hole: Some(HoleTrack {
                parent,
                orbital,
                hole_weight: w,
                continuity,
            }),
        })
    }
}

/// Whether a hole state still has its hole (see the module docs), with a reason if not.
pub fn hole_lost(track: &HoleTrack) -> Option<String> {
    if track.continuity < 0.5 {
        return Some(format!(
            "the parent orbital followed changed character (overlap² {:.2} with the previous geometry's)",
            track.continuity
        ));
    }
    if track.hole_weight < HOLE_KEPT {
        return Some(format!(
            "only {:.0} % of the emptied orbital is missing from the cation (the hole moved to another orbital)",
            100.0 * track.hole_weight
        ));
    }
    None
}

fn run_scf(mol: &Molecule, basis: &BasisSet, opts: &ScfOptions) -> Result<Wavefunction> {
    let wf = scf::run(mol, basis, opts)?;
    if !wf.converged {
        return Err(Error::computation("the SCF did not converge".to_string()));
    }
    Ok(wf)
}

/// Labels are assigned with orbitals within this energy (hartree) treated as degenerate,
/// as `bandcast ionize` does (`ionization::annotate`).
const LABEL_DEGENERACY_EH: f64 = 1e-5;

/// The 0-based parent MO emptied for `hole`: a 1-based number ("5") or an irrep label as
/// `bandcast ionize` prints it ("1b1", "3σg"; for a degenerate set the first of its
/// orbitals), resolved on the closed-shell parent of `spec` at the geometry of `mol`.
pub fn resolve_hole(mol: &Molecule, spec: &StateSpec, hole: &str) -> Result<usize> {
    let t = hole.trim();
    if let Ok(n) = t.parse::<usize>() {
        if n == 0 {
            return Err(Error::input("--hole counts orbitals from 1"));
        }
        return Ok(n - 1);
    }
    let parent_mol = mol
        .clone()
        .with_charge_multiplicity(spec.charge, spec.multiplicity)?;
    let basis = basis::load(&spec.basis, &parent_mol, None)?;
    let opts = ScfOptions {
        reference: Reference::Rhf,
        ..spec.scf.clone()
    };
    let wf = run_scf(&parent_mol, &basis, &opts)?;
    let s = integrals::overlap(&basis);
    let pg = crate::analysis::symmetry::detect_point_group(
        &parent_mol,
        crate::analysis::symmetry::DEFAULT_TOLERANCE,
    );
    let n_occ = wf.n_beta();
    let labels = crate::analysis::symmetry::label_orbitals(
        &pg,
        &parent_mol,
        &basis,
        &s,
        &wf.c_alpha,
        &wf.eps_alpha,
        LABEL_DEGENERACY_EH,
    );
    let want = t.to_lowercase();
    let found = labels
        .iter()
        .filter(|l| l.mo < n_occ)
        .find(|l| l.label.as_deref().map(|x| x.to_lowercase()) == Some(want.clone()));
    match found {
        Some(l) => Ok(l.mo),
        None => {
            let known: Vec<String> = labels
                .iter()
                .filter(|l| l.mo < n_occ)
                .filter_map(|l| l.label.clone())
                .collect();
            Err(Error::input(format!(
                "no occupied orbital is labelled '{t}' ({}): occupied labels are {}",
                pg.name,
                if known.is_empty() {
                    "none".to_string()
                } else {
                    known.join(", ")
                }
            )))
        }
    }
}
