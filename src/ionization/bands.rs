//! From orbitals to bands: occupied orbitals whose energies agree within a tolerance (and
//! whose symmetry labels, when known, agree) ionize as one band of that degeneracy.

use crate::ionization::band::{Band, MakeupEntry, Region};
use crate::ionization::koopmans::{OrbitalIe, Spin};

/// Orbital energies closer than this (hartree, ≈ 3 meV) count as degenerate. Symmetry-
/// equivalent orbitals of a converged SCF agree to ~1e-7 Eh; accidental near-degeneracies
/// this close are rare and are split anyway when their irreps differ.
pub const DEGENERACY_TOL: f64 = 1e-4;

/// What the orbital analysis says about one orbital.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct OrbitalNotes {
    /// Display label with its running number, e.g. "1b1", "3σg".
    pub label: Option<String>,
    /// Irreducible representation, lower case, e.g. "b1", "e1g".
    pub symmetry: Option<String>,
    pub makeup: Vec<MakeupEntry>,
    /// "bonding" / "nonbonding" / "antibonding".
    pub character: Option<String>,
    /// What removing an electron from it does (bond lengthens, …).
    pub character_note: Option<String>,
}

/// A set of degenerate occupied orbitals of one spin.
#[derive(Debug, Clone, PartialEq)]
pub struct OrbitalSet {
    pub spin: Spin,
    /// MO indices, ascending; the first is the representative.
    pub orbitals: Vec<usize>,
    /// Mean orbital energy (hartree).
    pub epsilon: f64,
}

impl OrbitalSet {
    pub fn representative(&self) -> usize {
        self.orbitals[0]
    }
    pub fn degeneracy(&self) -> usize {
        self.orbitals.len()
    }
    /// Koopmans IE of the set (hartree).
    pub fn koopmans_ie(&self) -> f64 {
        -self.epsilon
    }
}

/// Orbitals the symmetry analysis puts in one degenerate set are joined when their energies
/// differ by less than this (hartree): slightly distorted input geometries split degenerate
/// levels by more than `DEGENERACY_TOL` but keep their labels.
pub const LABELLED_SPLIT_TOL: f64 = 1e-2;

/// Group orbitals (any order) into degenerate sets, returned in order of increasing IE.
/// `set_key(spin, index)` names the degenerate set the symmetry analysis put an orbital in
/// (e.g. irrep and set number), when known: orbitals with equal keys join (within
/// `LABELLED_SPLIT_TOL`), different keys never do, and without keys energies closer than
/// `tol` decide.
pub fn group_degenerate(
    orbitals: &[OrbitalIe],
    set_key: impl Fn(Spin, usize) -> Option<String>,
    tol: f64,
) -> Vec<OrbitalSet> {
    let mut sorted: Vec<&OrbitalIe> = orbitals.iter().collect();
    sorted.sort_by(|a, b| a.ie.total_cmp(&b.ie).then(a.index.cmp(&b.index)));
    let mut sets: Vec<(OrbitalSet, f64, Option<String>)> = Vec::new(); // (set, last ε, irrep)
    for o in sorted {
        let irrep = set_key(o.spin, o.index);
        let join = sets
            .iter()
            .rposition(|(s, _, _)| s.spin == o.spin)
            .filter(|&k| {
                let (_, last, key) = &sets[k];
                let gap = (o.epsilon - last).abs();
                match (key, &irrep) {
                    (Some(a), Some(b)) => a == b && gap < LABELLED_SPLIT_TOL,
                    (None, None) => gap < tol,
                    _ => false,
                }
            });
        match join {
            Some(k) => {
                let (set, last, _) = &mut sets[k];
                let m = set.orbitals.len() as f64;
                set.epsilon = (set.epsilon * m + o.epsilon) / (m + 1.0);
                set.orbitals.push(o.index);
                *last = o.epsilon;
            }
            None => sets.push((
                OrbitalSet {
                    spin: o.spin,
                    orbitals: vec![o.index],
                    epsilon: o.epsilon,
                },
                o.epsilon,
                irrep,
            )),
        }
    }
    let mut out: Vec<OrbitalSet> = sets
        .into_iter()
        .map(|(mut s, _, _)| {
            s.orbitals.sort_unstable();
            s
        })
        .collect();
    out.sort_by(|a, b| a.koopmans_ie().total_cmp(&b.koopmans_ie()));
    out
}

/// Fallback label when no symmetry label is known: "MO 5" (1-based), with the spin for
/// unrestricted references.
pub fn fallback_label(set: &OrbitalSet) -> String {
    let base = format!("MO {}", set.representative() + 1);
    spin_suffix(base, set.spin)
}

fn spin_suffix(label: String, spin: Spin) -> String {
    match spin {
        Spin::Restricted => label,
        Spin::Alpha => format!("{label}α"),
        Spin::Beta => format!("{label}β"),
    }
}

/// Per-band numbers a method adds to the orbital set.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct BandEnergy {
    /// Vertical IE (hartree).
    pub ie: f64,
    pub pole_strength: Option<f64>,
    pub one_hole_weight: Option<f64>,
}

/// A valence band for an orbital set, with the analysis notes of its representative orbital.
pub fn make_band(set: &OrbitalSet, energy: BandEnergy, notes: &OrbitalNotes, method: &str) -> Band {
    let label = match &notes.label {
        Some(l) => spin_suffix(l.clone(), set.spin),
        None => fallback_label(set),
    };
    Band {
        label,
        symmetry: notes.symmetry.clone(),
        ie_ev: crate::units::ev(energy.ie),
        degeneracy: set.degeneracy(),
        occupation: if set.spin == Spin::Restricted {
            2.0
        } else {
            1.0
        },
        pole_strength: energy.pole_strength,
        one_hole_weight: energy.one_hole_weight,
        character: notes.character.clone(),
        character_note: notes.character_note.clone(),
        makeup: notes.makeup.clone(),
        method: method.to_string(),
        region: Region::Valence,
        atom: None,
        lifetime_fwhm_ev: None,
        environment: None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn orb(spin: Spin, index: usize, eps: f64) -> OrbitalIe {
        OrbitalIe {
            spin,
            index,
            epsilon: eps,
            ie: -eps,
        }
    }

    #[test]
    fn degenerate_orbitals_join_and_irreps_split() {
        let r = Spin::Restricted;
        let orbs = vec![
            orb(r, 4, -0.5450000),
            orb(r, 2, -0.9),
            orb(r, 3, -0.54500001),
            orb(r, 5, -0.54500002),
            orb(r, 6, -0.4),
            orb(r, 7, -0.40000003),
        ];
        // 6 and 7 nearly degenerate but of different irreps
        let sym = |_: Spin, i: usize| Some(if i == 7 { "b2" } else { "x" }.to_string());
        let sets = group_degenerate(&orbs, sym, DEGENERACY_TOL);
        let degs: Vec<usize> = sets.iter().map(|s| s.degeneracy()).collect();
        assert_eq!(degs, vec![1, 1, 3, 1]);
        assert_eq!(sets[2].orbitals, vec![3, 4, 5]);
        assert!((sets[2].epsilon + 0.54500001).abs() < 1e-9);
        // without irreps the near-degenerate pair joins
        let sets = group_degenerate(&orbs, |_, _| None, DEGENERACY_TOL);
        assert_eq!(sets.len(), 3);
        assert_eq!(sets[0].degeneracy(), 2);
    }

    #[test]
    fn spins_never_mix_and_labels_fall_back() {
        let orbs = vec![orb(Spin::Alpha, 0, -0.5), orb(Spin::Beta, 0, -0.5)];
        let sets = group_degenerate(&orbs, |_, _| None, DEGENERACY_TOL);
        assert_eq!(sets.len(), 2);
        let b = make_band(
            &sets[0],
            BandEnergy {
                ie: 0.5,
                ..Default::default()
            },
            &OrbitalNotes::default(),
            "koopmans",
        );
        assert!(b.label.starts_with("MO 1"));
        assert_eq!(b.occupation, 1.0);
        assert!((b.ie_ev - 13.605693122994).abs() < 1e-9);
    }
}
