//! What a prediction is asked to do: the typed request.

use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::error::{Error, Result};
use crate::ionization::{Method, Region};

/// The method of a core-level run.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum CoreMethod {
    /// ΔSCF with a localised hole.
    Dscf,
    /// ΔSCF plus the second-order (ΔMP2) correction.
    Dmp2,
}

impl CoreMethod {
    pub fn name(self) -> &'static str {
        match self {
            CoreMethod::Dscf => "dscf",
            CoreMethod::Dmp2 => "dmp2",
        }
    }
}

/// Which method: the default rule, or one asked for by name.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum MethodChoice {
    /// The most accurate method that fits (valence), ΔSCF (core).
    #[default]
    Default,
    Valence(Method),
    Core(CoreMethod),
}

impl MethodChoice {
    /// Read a method name for a region (`None`: the default rule).
    pub fn parse(region: Region, name: Option<&str>) -> Result<MethodChoice> {
        let Some(name) = name else {
            return Ok(MethodChoice::Default);
        };
        match region {
            Region::Valence => Ok(MethodChoice::Valence(Method::parse(name)?)),
            Region::Core => match name.trim().to_ascii_lowercase().as_str() {
                "dscf" => Ok(MethodChoice::Core(CoreMethod::Dscf)),
                "dmp2" => Ok(MethodChoice::Core(CoreMethod::Dmp2)),
                m => Err(Error::input(format!(
                    "core levels are computed by dscf or dmp2, not '{m}'"
                ))),
            },
        }
    }
}

/// Options that narrow or tune a prediction. Unset fields take each method's default.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct RequestOptions {
    /// Valence: keep the `count` bands of lowest binding energy.
    pub count: Option<usize>,
    /// Valence: keep bands with binding energy up to this value (eV).
    pub window_max_ev: Option<f64>,
    /// Core: the atoms of one element only (atomic number).
    pub element: Option<u32>,
    /// Core: these atoms only (0-based input order); wins over `element`.
    pub atoms: Option<Vec<usize>>,
    /// Core: keep the first SCF start that holds the hole (faster, may keep a higher state).
    pub quick: bool,
    /// Memory budget in bytes (None: the machine-dependent default of `scf::options`).
    pub memory_bytes: Option<usize>,
    /// Core: the photon energy (eV) of the spectrum, which picks the shell of each atom
    /// (`core_level::shell`); None: Al Kα.
    pub photon_ev: Option<f64>,
}

/// One prediction of the bands of one molecule.
#[derive(Debug, Clone)]
pub struct Request<'a> {
    pub molecule: &'a Molecule,
    pub basis: &'a BasisSet,
    pub region: Region,
    pub method: MethodChoice,
    pub options: RequestOptions,
}

impl<'a> Request<'a> {
    /// A request with the default method and default options.
    pub fn new(molecule: &'a Molecule, basis: &'a BasisSet, region: Region) -> Self {
        Request {
            molecule,
            basis,
            region,
            method: MethodChoice::Default,
            options: RequestOptions::default(),
        }
    }

    /// The memory budget in bytes.
    pub fn memory_bytes(&self) -> usize {
        self.options
            .memory_bytes
            .unwrap_or_else(crate::system::default_memory_budget)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn method_names_by_region() {
        assert_eq!(
            MethodChoice::parse(Region::Valence, None).unwrap(),
            MethodChoice::Default
        );
        assert_eq!(
            MethodChoice::parse(Region::Valence, Some("eom-ccsd")).unwrap(),
            MethodChoice::Valence(Method::EomCcsd)
        );
        assert_eq!(
            MethodChoice::parse(Region::Core, Some("DMP2")).unwrap(),
            MethodChoice::Core(CoreMethod::Dmp2)
        );
        assert!(MethodChoice::parse(Region::Core, Some("ep2")).is_err());
        assert!(MethodChoice::parse(Region::Valence, Some("dmp2")).is_err());
    }
}
