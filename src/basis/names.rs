//! Basis-set names as people write them: case-insensitive, with the usual alternative
//! spellings (common practice): 6-31G* = 6-31G(d), 6-31G** = 6-31G(d,p),
//! 6-31+G* = 6-31+G(d), 6-311G** = 6-311G(d,p); hyphens, underscores and blanks are
//! ignored (def2-svp = def2svp = "def2 SVP"). Each set file may list further aliases.

use crate::basis::catalog;
use crate::error::{Error, Result};

/// The form names are compared in: lower case, without '-', '_' and blanks, with
/// "(d,p)" → "**" and "(d)" → "*".
pub fn spelling_key(name: &str) -> String {
    let mut k: String = name
        .chars()
        .filter(|c| !matches!(c, '-' | '_') && !c.is_whitespace())
        .flat_map(|c| c.to_lowercase())
        .collect();
    k = k.replace("(d,p)", "**").replace("(d)", "*");
    k
}

/// Canonical name of a bundled set from any accepted spelling. Unknown names give an input
/// error that lists the bundled sets.
pub fn resolve(name: &str) -> Result<&'static str> {
    if let Some(n) = catalog::exact(name.trim()) {
        return Ok(n);
    }
    if let Some(n) = catalog::by_key(&spelling_key(name)) {
        return Ok(n);
    }
    Err(Error::input(format!(
        "unknown basis set '{}'. Bundled orbital sets: {}. Fitting sets: {}. \
         A path to a .json file in the bandcast basis schema is also accepted \
         (`bandcast basis` lists the sets).",
        name.trim(),
        catalog::orbital_names().join(", "),
        catalog::fitting_names().join(", ")
    )))
}

/// The bundled fitting (RI) set made for an orbital set, for the correlated methods:
/// def2-X → def2-X-RIFIT, (aug-)cc-pVXZ → (aug-)cc-pVXZ-RIFIT, cc-pCVXZ → cc-pwCVXZ-RIFIT
/// (the core-valence fitting sets are published for the weighted core-valence sets; they
/// fit core correlation as well), 6-31G** / 6-311G** → …-RIFIT. None when no matching set
/// is bundled (STO-3G, 3-21G, 6-31G, 6-31G*, 6-31+G*, user files).
pub fn default_auxiliary_for(orbital_set_name: &str) -> Option<&'static str> {
    let name = resolve(orbital_set_name).ok()?;
    if spelling_key(name).ends_with("fit") {
        return None;
    }
    let candidate = match name.strip_prefix("cc-pCV") {
        Some(rest) => format!("cc-pwCV{rest}-RIFIT"),
        None => format!("{name}-RIFIT"),
    };
    catalog::exact(&candidate)
}

/// The bundled fitting set for Coulomb and exchange made for an orbital set: the def2
/// universal JK set for the def2 family (Weigend, J. Comput. Chem. 29 (2008) 167), else None.
pub fn default_jk_auxiliary_for(orbital_set_name: &str) -> Option<&'static str> {
    let name = resolve(orbital_set_name).ok()?;
    if name.starts_with("def2-") && !spelling_key(name).ends_with("fit") {
        catalog::exact("def2-universal-JKFIT")
    } else {
        None
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn keys() {
        assert_eq!(spelling_key("6-31G(d,p)"), spelling_key("6-31g**"));
        assert_eq!(spelling_key("6-31+G(d)"), "631+g*");
        assert_eq!(spelling_key("def2 SVP"), "def2svp");
    }

    #[test]
    fn resolves_common_spellings() {
        for (spelling, canonical) in [
            ("sto-3g", "STO-3G"),
            ("6-31g(d)", "6-31G*"),
            ("6-31G(D,P)", "6-31G**"),
            ("6-31+g(d)", "6-31+G*"),
            ("6-311g(d,p)", "6-311G**"),
            ("cc-pvdz", "cc-pVDZ"),
            ("CCPVTZ", "cc-pVTZ"),
            ("def2svp", "def2-SVP"),
            ("def2-tzvpp", "def2-TZVPP"),
            ("def2/jk", "def2-universal-JKFIT"),
        ] {
            assert_eq!(resolve(spelling).unwrap(), canonical, "{spelling}");
        }
    }

    #[test]
    fn unknown_lists_the_sets() {
        let e = resolve("6-31G***").unwrap_err();
        assert_eq!(e.exit_code(), 2);
        let s = e.to_string();
        assert!(s.contains("unknown basis set '6-31G***'"), "{s}");
        assert!(
            s.contains("cc-pVDZ") && s.contains("def2-TZVPP-RIFIT"),
            "{s}"
        );
    }

    #[test]
    fn default_fitting_sets() {
        assert_eq!(default_auxiliary_for("def2-svp"), Some("def2-SVP-RIFIT"));
        assert_eq!(
            default_auxiliary_for("def2-TZVPP"),
            Some("def2-TZVPP-RIFIT")
        );
        assert_eq!(default_auxiliary_for("cc-pvtz"), Some("cc-pVTZ-RIFIT"));
        assert_eq!(
            default_auxiliary_for("aug-cc-pVDZ"),
            Some("aug-cc-pVDZ-RIFIT")
        );
        assert_eq!(default_auxiliary_for("cc-pCVTZ"), Some("cc-pwCVTZ-RIFIT"));
        assert_eq!(default_auxiliary_for("6-31G(d,p)"), Some("6-31G**-RIFIT"));
        assert_eq!(default_auxiliary_for("STO-3G"), None);
        assert_eq!(default_auxiliary_for("cc-pVDZ-RIFIT"), None);
        assert_eq!(
            default_jk_auxiliary_for("def2-SVP"),
            Some("def2-universal-JKFIT")
        );
        assert_eq!(default_jk_auxiliary_for("cc-pVDZ"), None);
    }
}
