//! Core-level (1s) binding energies and chemical shifts by ΔSCF with a localised hole.
//!
//! For each target atom: the neutral closed-shell Hartree–Fock state, a 1s orbital
//! localised on that atom (`localize.rs`), and an unrestricted cation in which that orbital's
//! β electron is removed and kept removed by the maximum overlap method (Gilbert, Besley &
//! Gill, J. Phys. Chem. A 112 (2008) 13164). The binding energy is the energy difference.
//! The hole atoms get extra core flexibility (`flexibility.rs`). Several starts are tried
//! and the lowest state that still holds the hole is kept (`cation.rs`); failures are
//! detected (`hole_check.rs`) and reported as errors, never as numbers.
//!
//! The caller gives the molecule and its `BasisSet`; each hole's basis is derived from it.
//! The run is four stages, one file each, driven by `predict.rs`:
//!
//! | stage | file | what |
//! |---|---|---|
//! | 1 | plan.rs | targets, symmetry-equivalent holes, units of work (basis + holes) |
//! | 2 | neutrals.rs | each unit's basis, SCF context and neutral (shared quartets) |
//! | 3 | holes.rs | each hole: localise, SCF starts, best held state, ΔMP2 |
//! | 4 | assemble.rs | symmetry copies, shifts, relativistic correction, notes |
//!
//! Helpers of the stages:
//!
//! | file | idea |
//! |---|---|
//! | options.rs | what a run is asked to do |
//! | targets.rs | which atoms, checked against the molecule |
//! | equivalence.rs | symmetry-equivalent hole atoms, computed once |
//! | flexibility.rs | basis transforms for the hole atoms |
//! | population.rs | Löwdin populations of single orbitals |
//! | localize.rs | the localised 1s hole |
//! | delocalised.rs | the symmetry-constrained (delocalised) hole, for comparison |
//! | hole_check.rs | escaped / collapsed / spin-contaminated verdicts |
//! | lifetime.rs | natural widths of 1s holes where known (the one table) |
//! | result.rs | result records and conversion to bands |
//! | notes.rs | typed notes (code + message) |
//! | carry_over.rs | the neutral orbitals carried from one hole's basis to the next |
//! | cation.rs | the SCF starts for one hole (MOM, IMOM, ROHF) |
//! | shared_eri.rs | integrals shared by the bases of different holes |
//! | relativistic.rs | the optional relativistic correction of 1s levels |
//! | pauli.rs | first-order mass-velocity + Darwin energy at one nucleus (checks relativistic.rs) |
//! | breit_qed.rs | two-electron contact (Breit–Pauli) and one-loop QED energy at one nucleus (checks relativistic.rs) |
//! | shell.rs | which shell (1s, 2s, 2p) each atom gets, by request or photon energy |
//! | shell_hole.rs | the atom-localised 2s / 2p hole orbitals (principal axes for 2p) |
//! | spin_orbit.rs | the 2p spin–orbit doublet from the three 2p-hole energies |
//! | two_p.rs | the 2s and 2p levels of Na–Ar (the stages for the second shell) |
//! | default_method.rs | the default method: ΔCCSD(T) when it fits, else ΔSCF |
//! | delta_cc.rs | ΔCCSD / ΔCCSD(T) on the kept cation, core-valence separated |
//! | fitting.rs | density-fitted or exact J and K, the fitting set extended on the hole atom |
//! | memory.rs | the memory estimate of a run before any integral, and the refusal |
//!
//! ΔMP2 uses `correlation::mp2::mp2_energy`; the benchmark workload is
//! `bench::core_level`.
pub mod assemble;
pub mod breit_qed;
pub mod carry_over;
pub mod cation;
pub mod default_method;
pub mod delocalised;
pub mod delta_cc;
pub mod equivalence;
pub mod fitting;
pub mod flexibility;
pub mod hole_check;
pub mod holes;
pub mod lifetime;
pub mod localize;
pub mod memory;
pub mod neutrals;
pub mod notes;
pub mod options;
pub mod pauli;
pub mod plan;
pub mod population;
pub mod predict;
pub mod relativistic;
pub mod result;
pub mod shared_eri;
pub mod shell;
pub mod shell_hole;
pub mod spin_orbit;
pub mod targets;
pub mod two_p;

pub use fitting::{CoreFock, IntegralsUsed};
pub use hole_check::HoleStatus;
pub use neutrals::memory_budget_bytes;
pub use notes::{CoreNote, Notes};
pub use options::{
    CoreBasis, CoreOptions, IonReference, ReferenceMolecule, ShiftReference, TargetSelection,
};
pub use predict::{predict, predict_with_progress};
pub use result::{
    CoreLevel, CoreResult, CoreTimings, HoleAttempt, ShiftReferenceLevel, StageTiming,
};
pub use shell::{CoreShell, ShellChoice};
