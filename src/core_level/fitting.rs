//! How the SCFs of a core run build J and K: density-fitted (the default) or with exact
//! integrals, and the fitting set used.
//!
//! Density fitting (`scf::fock::df`) replaces the four-index integrals by three-index ones
//! over an auxiliary set made for Coulomb and exchange fitting (def2-universal-JKFIT,
//! Weigend, J. Comput. Chem. 29 (2008) 167). Its error on a total energy is 2e-6 to 4e-5 Eh
//! per atom and mostly cancels in an energy difference; a 1s hole changes the core density
//! of one atom, where the valence-oriented set has one contracted tight s function. So the
//! hole atom gets an extended set (`FittingKind::CoreExtended`): its fitting shells split
//! into primitives, plus s and p functions at twice each tight s exponent of the hole atom's
//! orbital basis (the exponents of the 1s–1s products a Gaussian product makes). The error
//! on ΔSCF core levels, measured against exact integrals, is in docs/core-levels.md
//! ("Density-fitted J and K").

use serde::Serialize;

use crate::basis::{BasisSet, Shell};
use crate::chem::Molecule;
use crate::error::Result;
use crate::scf::{FockMethod, ScfOptions};

/// The fitting set of every core run.
pub const CORE_JK_FITTING: &str = crate::scf::context::DEFAULT_JK_FITTING;

/// How J and K are built in the SCFs of a core run.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum CoreFock {
    /// Density-fitted with the bundled JK set, extended on the hole atom.
    #[default]
    DensityFitted,
    /// Density-fitted with the bundled JK set as it is (for measuring the extension).
    DensityFittedPlain,
    /// Exact integrals (in-core when they fit the budget, else integral-direct).
    Exact,
}

/// What a run used (JSON `integrals`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct IntegralsUsed {
    /// "density_fitted" or "exact".
    pub kind: String,
    /// The fitting set (with the hole-atom extension when there was one); null for exact.
    pub fitting_basis: Option<String>,
}

impl Default for IntegralsUsed {
    fn default() -> Self {
        IntegralsUsed {
            kind: "exact".into(),
            fitting_basis: None,
        }
    }
}

impl IntegralsUsed {
    /// One line for the text report.
    pub fn describe(&self) -> String {
        match &self.fitting_basis {
            Some(f) => format!("density-fitted J and K ({f})"),
            None => "exact two-electron integrals".into(),
        }
    }
}

/// The fitting set of a unit whose hole atoms are `flex`: the bundled JK set on every atom,
/// extended on the hole atoms as `fock` asks; None for exact integrals.
pub fn fitting_set(
    mol: &Molecule,
    orbital: &BasisSet,
    flex: &[usize],
    fock: CoreFock,
) -> Result<Option<BasisSet>> {
    let base = match fock {
        CoreFock::Exact => return Ok(None),
        _ => crate::basis::load_auxiliary(CORE_JK_FITTING, mol)?,
    };
    if fock == CoreFock::DensityFittedPlain || flex.is_empty() {
        return Ok(Some(base));
    }
    let mut shells: Vec<Shell> = Vec::with_capacity(base.shells.len() + 8 * flex.len());
    for (i, _) in mol.atoms.iter().enumerate() {
        let own = base.shells.iter().filter(|s| s.atom == i);
        if !flex.contains(&i) {
            shells.extend(own.cloned());
            continue;
        }
        // split into primitives
        for s in own {
            for &e in &s.exponents {
                shells.push(Shell {
                    exponents: vec![e],
                    coefficients: vec![1.0],
                    ..s.clone()
                });
            }
        }
        shells.extend(tight_functions(&base, orbital, i));
    }
    let names: Vec<String> = flex.iter().map(|a| (a + 1).to_string()).collect();
    let name = format!("{}, extended on hole atom {}", base.name, names.join(", "));
    Ok(Some(BasisSet::from_shells(name, shells)))
}

/// s and p fitting functions at 2α for each s exponent α of `atom`'s orbital functions
/// whose 2α lies beyond the tightest s exponent of the fitting set on that atom.
fn tight_functions(aux: &BasisSet, orbital: &BasisSet, atom: usize) -> Vec<Shell> {
    let max_aux = aux
        .shells
        .iter()
        .filter(|s| s.atom == atom && s.l == 0)
        .flat_map(|s| s.exponents.iter().copied())
        .fold(0.0f64, f64::max);
    let Some(template) = aux.shells.iter().find(|s| s.atom == atom) else {
        return Vec::new();
    };
    let mut tight: Vec<f64> = orbital
        .shells
        .iter()
        .filter(|s| s.atom == atom && s.l == 0)
        .flat_map(|s| s.exponents.iter().map(|e| 2.0 * e))
        .filter(|&e| e > max_aux * 1.5)
        .collect();
    tight.sort_by(|a, b| b.total_cmp(a));
    tight.dedup_by(|a, b| (*a / *b - 1.0).abs() < 1e-6);
    let mut out = Vec::new();
    for &e in &tight {
        for l in [0, 1] {
            out.push(Shell {
                l,
                exponents: vec![e],
                coefficients: vec![1.0],
                ..template.clone()
            });
        }
    }
    out
}

/// What a run that asked for `fock` used: density-fitted when at least one unit's SCF was
/// (`df` true), else exact.
pub fn used(fock: CoreFock, df: bool) -> IntegralsUsed {
    if !df {
        return IntegralsUsed::default();
    }
    let set = match fock {
        CoreFock::DensityFittedPlain => CORE_JK_FITTING.to_string(),
        _ => format!(
            "{CORE_JK_FITTING}; on the hole atom split into primitives, with tight s and p \
             functions added"
        ),
    };
    IntegralsUsed {
        kind: "density_fitted".into(),
        fitting_basis: Some(set),
    }
}

/// Set `o` to build J and K with the fitting set named `jk` (None: exact integrals, left as
/// they are).
pub fn apply(o: &mut ScfOptions, jk: Option<&str>) {
    if let Some(name) = jk {
        o.fock = FockMethod::DensityFitted;
        o.jk_fitting = Some(name.to_string());
    }
}
