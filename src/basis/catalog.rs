//! The basis sets bundled with bandcast: `basis/*.json` embedded in the binary (so it runs
//! from any directory), each parsed once, on first use.
//!
//! The data were converted from the reference data library basis-set-exchange by
//! `tools/convert_basis.py`; every file names its source papers (`source`).

use std::sync::OnceLock;

use crate::basis::names;
use crate::basis::schema::{BasisData, SetKind};
use crate::error::{Error, Result};

struct Entry {
    name: &'static str,
    text: &'static str,
    parsed: OnceLock<std::result::Result<BasisData, String>>,
}

const fn entry(name: &'static str, text: &'static str) -> Entry {
    Entry {
        name,
        text,
        parsed: OnceLock::new(),
    }
}

/// The bundled sets, canonical name and file text. To add one: tools/convert_basis.py
/// (DEVELOPERS.md, "How to add a basis set"), then a line here.
static CATALOG: [Entry; 30] = [
    entry("STO-3G", include_str!("../../basis/sto-3g.json")),
    entry("3-21G", include_str!("../../basis/3-21g.json")),
    entry("6-31G", include_str!("../../basis/6-31g.json")),
    entry("6-31G*", include_str!("../../basis/6-31g-star.json")),
    entry("6-31G**", include_str!("../../basis/6-31g-2star.json")),
    entry("6-31+G*", include_str!("../../basis/6-31+g-star.json")),
    entry("6-311G**", include_str!("../../basis/6-311g-2star.json")),
    entry("cc-pVDZ", include_str!("../../basis/cc-pvdz.json")),
    entry("cc-pVTZ", include_str!("../../basis/cc-pvtz.json")),
    entry("cc-pVQZ", include_str!("../../basis/cc-pvqz.json")),
    entry("aug-cc-pVDZ", include_str!("../../basis/aug-cc-pvdz.json")),
    entry("aug-cc-pVTZ", include_str!("../../basis/aug-cc-pvtz.json")),
    entry("cc-pCVDZ", include_str!("../../basis/cc-pcvdz.json")),
    entry("cc-pCVTZ", include_str!("../../basis/cc-pcvtz.json")),
    entry("def2-SVP", include_str!("../../basis/def2-svp.json")),
    entry("def2-TZVP", include_str!("../../basis/def2-tzvp.json")),
    entry("def2-TZVPP", include_str!("../../basis/def2-tzvpp.json")),
    entry(
        "def2-universal-JKFIT",
        include_str!("../../basis/def2-universal-jkfit.json"),
    ),
    entry(
        "def2-SVP-RIFIT",
        include_str!("../../basis/def2-svp-rifit.json"),
    ),
    entry(
        "def2-TZVP-RIFIT",
        include_str!("../../basis/def2-tzvp-rifit.json"),
    ),
    entry(
        "def2-TZVPP-RIFIT",
        include_str!("../../basis/def2-tzvpp-rifit.json"),
    ),
    entry(
        "cc-pVDZ-RIFIT",
        include_str!("../../basis/cc-pvdz-rifit.json"),
    ),
    entry(
        "cc-pVTZ-RIFIT",
        include_str!("../../basis/cc-pvtz-rifit.json"),
    ),
    entry(
        "cc-pVQZ-RIFIT",
        include_str!("../../basis/cc-pvqz-rifit.json"),
    ),
    entry(
        "aug-cc-pVDZ-RIFIT",
        include_str!("../../basis/aug-cc-pvdz-rifit.json"),
    ),
    entry(
        "aug-cc-pVTZ-RIFIT",
        include_str!("../../basis/aug-cc-pvtz-rifit.json"),
    ),
    entry(
        "cc-pwCVDZ-RIFIT",
        include_str!("../../basis/cc-pwcvdz-rifit.json"),
    ),
    entry(
        "cc-pwCVTZ-RIFIT",
        include_str!("../../basis/cc-pwcvtz-rifit.json"),
    ),
    entry(
        "6-31G**-RIFIT",
        include_str!("../../basis/6-31g-2star-rifit.json"),
    ),
    entry(
        "6-311G**-RIFIT",
        include_str!("../../basis/6-311g-2star-rifit.json"),
    ),
];

/// Canonical names of all bundled sets (orbital sets first, then fitting sets), in the
/// order of the catalogue.
pub fn names() -> Vec<&'static str> {
    CATALOG.iter().map(|e| e.name).collect()
}

/// Canonical names of the bundled orbital basis sets.
pub fn orbital_names() -> Vec<&'static str> {
    CATALOG
        .iter()
        .filter(|e| matches!(parsed(e).map(|d| d.kind), Ok(SetKind::Orbital)))
        .map(|e| e.name)
        .collect()
}

/// Canonical names of the bundled auxiliary (density-fitting) sets.
pub fn fitting_names() -> Vec<&'static str> {
    CATALOG
        .iter()
        .filter(|e| matches!(parsed(e).map(|d| d.kind.is_fitting()), Ok(true)))
        .map(|e| e.name)
        .collect()
}

/// The canonical name if `name` is exactly (ignoring case) a bundled set's name.
pub(crate) fn exact(name: &str) -> Option<&'static str> {
    CATALOG
        .iter()
        .find(|e| e.name.eq_ignore_ascii_case(name))
        .map(|e| e.name)
}

/// Canonical name whose spelling-normalised form (see `names::spelling_key`) matches, or
/// one of whose aliases does.
pub(crate) fn by_key(key: &str) -> Option<&'static str> {
    if let Some(e) = CATALOG.iter().find(|e| names::spelling_key(e.name) == key) {
        return Some(e.name);
    }
    CATALOG
        .iter()
        .find(|e| {
            parsed(e)
                .map(|d| d.aliases.iter().any(|a| names::spelling_key(a) == key))
                .unwrap_or(false)
        })
        .map(|e| e.name)
}

fn parsed(e: &'static Entry) -> Result<&'static BasisData> {
    e.parsed
        .get_or_init(|| BasisData::from_json(e.text, None).map_err(|err| err.to_string()))
        .as_ref()
        .map_err(|msg| Error::computation(format!("bundled set {}: {msg}", e.name)))
}

/// The data of a bundled set, by any accepted spelling of its name.
pub fn get(name: &str) -> Result<&'static BasisData> {
    let canonical = names::resolve(name)?;
    let e = CATALOG
        .iter()
        .find(|e| e.name == canonical)
        .expect("resolve returns catalogue names");
    parsed(e)
}

/// Atomic numbers a bundled set defines, increasing.
pub fn elements_of(name: &str) -> Result<Vec<u32>> {
    Ok(get(name)?.atomic_numbers())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_entry_parses_under_its_own_name() {
        for e in CATALOG.iter() {
            let d = parsed(e).unwrap();
            assert_eq!(d.name, e.name, "catalogue name and file name differ");
        }
        assert_eq!(orbital_names().len() + fitting_names().len(), names().len());
    }
}
