//! A point group placed on a molecule: its name, standard frame, character table, and every
//! operation as a 3×3 matrix in the input frame with the atom permutation it induces.

use super::detect::Nuclei;
use super::ops::{self, Mat3};
use super::orient::Frame;
use super::subgroup;
use super::tables::{self, CharacterTable};
use crate::chem::Molecule;

/// One operation of the group on this molecule.
#[derive(Debug, Clone)]
pub struct SymOp {
    /// The operation in the input frame, acting on displacements from `PointGroup::frame`'s
    /// origin: r ↦ origin + R (r − origin).
    pub matrix: Mat3,
    /// Class index in `PointGroup::table`.
    pub class: usize,
    /// Atom i is carried onto atom `permutation[i]`.
    pub permutation: Vec<usize>,
}

#[derive(Debug, Clone)]
pub struct PointGroup {
    /// Schoenflies name: "C2v", "D6h", "D∞h"; "Kh" for a single atom.
    pub name: String,
    /// Standard orientation (see `orient`).
    pub frame: Frame,
    pub table: CharacterTable,
    pub operations: Vec<SymOp>,
    /// Coordinate tolerance used (bohr).
    pub tolerance: f64,
    /// What was simplified on the way ("linear group handled through D10h", "operations of
    /// D3h did not all fit the geometry: using C2v", …).
    pub notes: Vec<String>,
}

impl PointGroup {
    /// True for a single atom (labels are atomic shells, s p d …).
    pub fn is_atom(&self) -> bool {
        self.name == "Kh"
    }

    pub fn is_linear(&self) -> bool {
        self.name == "C∞v" || self.name == "D∞h"
    }

    pub fn order(&self) -> usize {
        self.operations.len()
    }

    /// The group `name` in `frame`, when every one of its operations maps the nuclei onto
    /// themselves (threshold relaxed ×3 because the frame itself was fitted to the atoms).
    pub fn try_place(name: &str, frame: Frame, nuc: &Nuclei) -> Option<PointGroup> {
        let table = tables::table(name)?;
        let mut operations = Vec::with_capacity(table.order);
        for (r, &class) in table.elements.iter().zip(&table.element_class) {
            let m = frame.op_to_input(r);
            let permutation = nuc.permutation_with(&m, 3.0)?;
            operations.push(SymOp {
                matrix: m,
                class,
                permutation,
            });
        }
        let mut notes = Vec::new();
        if let Some(sub) = &table.represented_by {
            notes.push(format!(
                "{name} is handled through its subgroup {sub}, which separates σ, π, δ, φ, γ"
            ));
        }
        Some(PointGroup {
            name: name.to_string(),
            frame,
            table,
            operations,
            tolerance: nuc.tol,
            notes,
        })
    }

    /// Place the detected group; if some operation does not fit, use its abelian subgroup,
    /// and C1 as the last resort.
    pub fn build(name: &str, frame: Frame, _mol: &Molecule, nuc: &Nuclei) -> PointGroup {
        if let Some(g) = Self::try_place(name, frame, nuc) {
            return g;
        }
        let (sub, p) = subgroup::abelian_subgroup(name);
        if let Some(mut g) = Self::try_place(sub, frame.sub_frame(&p), nuc) {
            g.notes.push(format!(
                "the operations of {name} did not all fit the geometry within {} bohr: using {sub}",
                nuc.tol
            ));
            return g;
        }
        let mut g = Self::c1(nuc);
        g.notes.push(format!(
            "the operations of {name} did not fit the geometry within {} bohr: using C1",
            nuc.tol
        ));
        g
    }

    fn c1(nuc: &Nuclei) -> PointGroup {
        let frame = Frame {
            origin: nuc.centre,
            axes: ops::IDENTITY,
        };
        Self::try_place("C1", frame, nuc).expect("identity always fits")
    }

    /// A single atom: the full rotation-reflection group, labelled by atomic shells.
    pub fn atom(_mol: &Molecule, nuc: &Nuclei) -> PointGroup {
        let mut g = Self::c1(nuc);
        g.name = "Kh".into();
        g.table.group = "Kh".into();
        g.notes
            .push("single atom: orbitals are labelled by their angular momentum".into());
        g
    }

    /// The abelian subgroup (see `subgroup`) placed in this group's frame.
    pub fn abelian_subgroup(&self) -> PointGroup {
        let (sub, p) = subgroup::abelian_subgroup(&self.name);
        let table = tables::table(sub).expect("abelian subgroup table");
        let frame = self.frame.sub_frame(&p);
        let operations = table
            .elements
            .iter()
            .zip(&table.element_class)
            .map(|(r, &class)| {
                let m = frame.op_to_input(r);
                // The subgroup's operations are operations of this group: take their
                // permutations from there.
                let permutation = self
                    .operations
                    .iter()
                    .min_by(|a, b| {
                        ops::max_diff(&a.matrix, &m)
                            .partial_cmp(&ops::max_diff(&b.matrix, &m))
                            .unwrap()
                    })
                    .map(|op| op.permutation.clone())
                    .unwrap_or_default();
                SymOp {
                    matrix: m,
                    class,
                    permutation,
                }
            })
            .collect();
        PointGroup {
            name: sub.to_string(),
            frame,
            table,
            operations,
            tolerance: self.tolerance,
            notes: Vec::new(),
        }
    }
}
