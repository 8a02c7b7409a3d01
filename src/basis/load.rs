//! Putting a basis set on a molecule: by bundled name or from a user file in the bandcast
//! basis schema (`schema.rs`), one `Shell` per contraction on every atom.

use std::path::Path;

use crate::basis::catalog;
use crate::basis::schema::BasisData;
use crate::basis::shell::{BasisSet, Harmonics, Shell};
use crate::chem::{elements, Molecule};
use crate::error::{Error, Result};

/// Whether `name_or_path` is meant as a file: it names an existing file or ends in ".json".
pub fn is_path(name_or_path: &str) -> bool {
    let p = Path::new(name_or_path);
    p.is_file()
        || p.extension()
            .map(|e| e.eq_ignore_ascii_case("json"))
            .unwrap_or(false)
}

/// Read and check a user basis file.
pub fn read_user_file(path: &Path) -> Result<BasisData> {
    let text = std::fs::read_to_string(path)
        .map_err(|e| Error::input_at(path, None, format!("cannot read basis-set file: {e}")))?;
    BasisData::from_json(&text, Some(path))
}

/// The set's data: a user file (see `is_path`) or a bundled set by any accepted spelling.
/// Returns the data and the label the loaded `BasisSet` carries (canonical name or path).
pub fn find(name_or_path: &str) -> Result<(std::borrow::Cow<'static, BasisData>, String)> {
    if is_path(name_or_path) {
        let data = read_user_file(Path::new(name_or_path))?;
        Ok((std::borrow::Cow::Owned(data), name_or_path.to_string()))
    } else {
        let data = catalog::get(name_or_path)?;
        Ok((std::borrow::Cow::Borrowed(data), data.name.clone()))
    }
}

/// The orbital basis set `name_or_path` on every atom of `mol`.
///
/// `harmonics` overrides the set's published convention (Cartesian for the Pople sets and
/// STO-3G, real solid harmonics for 6-311G**, Dunning and def2 sets). Fitting sets are
/// refused here (use `load_auxiliary`). An element the set lacks is an input error naming
/// both.
pub fn load(name_or_path: &str, mol: &Molecule, harmonics: Option<Harmonics>) -> Result<BasisSet> {
    let (data, label) = find(name_or_path)?;
    if data.kind.is_fitting() {
        return Err(Error::input(format!(
            "'{}' is an auxiliary ({}) set for density fitting, not an orbital basis; \
             choose an orbital set (`bandcast basis` lists them)",
            data.name,
            data.kind.label()
        )));
    }
    build(&data, label, mol, harmonics)
}

/// An auxiliary (density-fitting) set on every atom of `mol`, in its published convention.
/// Accepts bundled fitting sets and user files (of any kind: the caller chose it).
pub fn load_auxiliary(name_or_path: &str, mol: &Molecule) -> Result<BasisSet> {
    let (data, label) = find(name_or_path)?;
    build(&data, label, mol, None)
}

/// Shells of `data` on every atom of `mol`, atom by atom in input order, shells in the
/// file's order. The `BasisSet` is named `label`.
pub fn build(
    data: &BasisData,
    label: String,
    mol: &Molecule,
    harmonics: Option<Harmonics>,
) -> Result<BasisSet> {
    let pure = harmonics.unwrap_or(data.harmonics) == Harmonics::Pure;
    let mut shells = Vec::new();
    for (i, atom) in mol.atoms.iter().enumerate() {
        let el = data
            .element(atom.z)
            .ok_or_else(|| missing_element(data, atom.z, i))?;
        for s in &el.shells {
            shells.push(Shell {
                l: s.l,
                pure,
                center: atom.position,
                atom: i,
                exponents: s.exponents.clone(),
                coefficients: s.coefficients.clone(),
            });
        }
    }
    Ok(BasisSet::from_shells(label, shells))
}

fn missing_element(data: &BasisData, z: u32, atom: usize) -> Error {
    Error::input(format!(
        "basis set '{}' has no functions for {} (atom {}); it defines {}",
        data.name,
        elements::symbol(z),
        atom + 1,
        element_ranges(&data.atomic_numbers())
    ))
}

/// Atomic numbers as symbol ranges: [1, 2, 3, 4, 5, 6, 8] → "H–C, O".
pub fn element_ranges(zs: &[u32]) -> String {
    let mut parts = Vec::new();
    let mut i = 0;
    while i < zs.len() {
        let mut j = i;
        while j + 1 < zs.len() && zs[j + 1] == zs[j] + 1 {
            j += 1;
        }
        parts.push(match j - i {
            0 => elements::symbol(zs[i]).to_string(),
            1 => format!("{}, {}", elements::symbol(zs[i]), elements::symbol(zs[j])),
            _ => format!("{}–{}", elements::symbol(zs[i]), elements::symbol(zs[j])),
        });
        i = j + 1;
    }
    parts.join(", ")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ranges() {
        assert_eq!(element_ranges(&[1, 2, 3, 4, 5, 6, 8]), "H–C, O");
        assert_eq!(element_ranges(&[1, 2, 10]), "H, He, Ne");
        assert_eq!(element_ranges(&[]), "");
    }
}
