//! Stage 4, assemble: every hole atom in input order (symmetry-equivalent atoms copy their
//! representative's level), shifts against the reference levels, the optional relativistic
//! correction, the run's notes, and the `CoreResult`.

use crate::chem::Molecule;

use super::equivalence::TOLERANCE;
use super::notes::{CoreNote, Notes};
use super::plan::Plan;
use super::relativistic;
use super::result::{CoreLevel, ShiftReferenceLevel};
use super::targets::atom_label;

/// Every hole atom of the plan in input order, from the computed levels (atom, level).
pub fn expand_equivalent(
    mol: &Molecule,
    plan: &Plan,
    computed: &[(usize, CoreLevel)],
) -> Vec<CoreLevel> {
    let eq = &plan.equivalence;
    let mut levels = Vec::with_capacity(plan.hole_atoms.len());
    for (&a, &rep) in plan.hole_atoms.iter().zip(&eq.representative) {
        let (_, src) = computed
            .iter()
            .find(|(c, _)| *c == rep)
            .expect("every representative was computed");
        if a == rep {
            levels.push(src.clone());
        } else {
            levels.push(symmetry_copy(mol, src, a, &eq.group));
        }
    }
    levels
}

/// The level of `atom`, equivalent by symmetry to the computed level `src`.
fn symmetry_copy(mol: &Molecule, src: &CoreLevel, atom: usize, group: &str) -> CoreLevel {
    let label = atom_label(mol, atom);
    let src_label = atom_label(mol, src.atom - 1);
    let mut l = src.clone();
    l.atom = atom + 1;
    l.label = format!("{label} 1s");
    l.same_as_atom = Some(src.atom);
    // Notes about the computed atom's hole belong to it; the rest (spin contamination) apply.
    l.notes.retain(|n| !n.is_about_the_computed_atom());
    l.notes.insert(
        0,
        CoreNote::EquivalentTo {
            atom: src_label,
            group: group.to_string(),
        },
    );
    l
}

/// The reference level of an atom of this molecule.
pub fn atom_reference(mol: &Molecule, level: &CoreLevel) -> ShiftReferenceLevel {
    reference_level("atom", mol, level)
}

/// A reference level computed in another molecule.
pub fn molecule_reference(refmol: &Molecule, level: &CoreLevel) -> ShiftReferenceLevel {
    reference_level("molecule", refmol, level)
}

fn reference_level(kind: &str, mol: &Molecule, l: &CoreLevel) -> ShiftReferenceLevel {
    ShiftReferenceLevel {
        kind: kind.into(),
        molecule: mol.name.clone(),
        atom: l.atom,
        element: l.element.clone(),
        shell: l.shell.clone(),
        dscf_ev: l.dscf_ev,
        dmp2_ev: l.dmp2_ev,
        binding_ev: l.cc.binding_ev - l.relativistic_correction_ev.unwrap_or(0.0),
    }
}

/// Each level's shift against the reference of its element (ΔSCF, and ΔMP2 when both have it).
pub fn apply_shifts(levels: &mut [CoreLevel], references: &[ShiftReferenceLevel]) {
    for l in levels {
        if let Some(r) = references.iter().find(|r| r.element == l.element) {
            l.shift_ev = Some(l.dscf_ev - r.dscf_ev);
            l.cc.shift_binding_ev = Some(l.cc.binding_ev - r.binding_ev);
            l.shift_dmp2_ev = match (l.dmp2_ev, r.dmp2_ev) {
                (Some(a), Some(b)) => Some(a - b),
                _ => None,
            };
        }
    }
}

/// The relativistic correction on every level; returns its source.
pub fn apply_relativistic(levels: &mut [CoreLevel], notes: &mut Notes) -> String {
    for l in levels {
        let c = relativistic::correction_ev(l.dscf_ev);
        l.relativistic_correction_ev = Some(c);
        l.dscf_relativistic_ev = Some(l.dscf_ev + c);
        l.cc.binding_ev += c;
    }
    notes.push(CoreNote::RelativisticAdded {
        source: relativistic::SOURCE.to_string(),
    });
    relativistic::SOURCE.to_string()
}

/// Minimal or double-zeta by the name of a standard basis set (None for other names and
/// basis files).
pub fn small_basis_kind(name: &str) -> Option<&'static str> {
    let n = name.to_ascii_lowercase();
    if n.starts_with("sto-") {
        Some("minimal")
    } else if n.contains("vdz")
        || n.starts_with("def2-svp")
        || (n.starts_with("6-31") && !n.starts_with("6-311"))
        || n.starts_with("3-21")
    {
        Some("double-zeta")
    } else {
        None
    }
}

/// The run's note on what a small basis does to absolute coupled-cluster 1s values, when a
/// 1s level's recommended value is a coupled-cluster one.
pub fn note_basis_limits(basis_name: &str, levels: &[CoreLevel], notes: &mut Notes) {
    let cc = levels
        .iter()
        .any(|l| l.shell == "1s" && l.cc.method.starts_with("dccsd"));
    if let (true, Some(kind)) = (cc, small_basis_kind(basis_name)) {
        notes.push(CoreNote::BasisLimitsAbsolute { kind });
    }
}

/// The run's note on localised holes, when any level has one.
pub fn note_localised(levels: &[CoreLevel], notes: &mut Notes) {
    if levels.iter().any(|l| l.localised) {
        notes.push(CoreNote::HolesLocalised);
    }
}

/// The run's note on symmetry copies, when any level is one.
pub fn note_equivalent(levels: &[CoreLevel], plan: &Plan, notes: &mut Notes) {
    if levels.iter().any(|l| l.same_as_atom.is_some()) {
        notes.push(CoreNote::EquivalentComputedOnce {
            group: plan.equivalence.group.clone(),
            tolerance_bohr: TOLERANCE,
            computed: plan.computed.len(),
            levels: levels.len(),
        });
    }
}

#[cfg(test)]
mod tests {
    use super::small_basis_kind;

    /// Zeta level by the standard names (common practice: the D of cc-pVDZ, the SV of
    /// def2-SVP and the split valence of 6-31G are double-zeta; STO-3G is minimal).
    #[test]
    fn small_basis_kind_by_name() {
        for n in [
            "cc-pVDZ",
            "aug-cc-pVDZ",
            "cc-pCVDZ",
            "def2-SVP",
            "6-31G*",
            "3-21G",
        ] {
            assert_eq!(small_basis_kind(n), Some("double-zeta"), "{n}");
        }
        assert_eq!(small_basis_kind("STO-3G"), Some("minimal"));
        for n in [
            "cc-pVTZ",
            "cc-pVQZ",
            "def2-TZVPP",
            "6-311G**",
            "/tmp/x.json",
        ] {
            assert_eq!(small_basis_kind(n), None, "{n}");
        }
    }
}
