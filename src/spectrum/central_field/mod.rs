//! Photoionisation cross sections of free atoms computed in the Hartree–Fock–Slater central
//! field — the model of the Yeh & Lindau (1985) tables — used to carry the tabulated Al Kα
//! values to other photon energies (`spectrum::cross_section`).
//!
//! `radial` (log grid, Numerov bound and continuum states) → `atom` (Herman–Skillman
//! self-consistent field with the Latter tail) → `photo` (dipole matrix elements, σ_nl)
//! → `table` (the precomputed values the program uses, with their regeneration test).
pub mod atom;
pub mod photo;
pub mod radial;
pub mod table;
