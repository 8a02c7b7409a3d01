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
//! | lifetime.rs | natural widths of 1s holes where known |
//! | result.rs | result records and conversion to bands |
//! | carry_over.rs | the neutral orbitals carried from one hole's basis to the next |
//! | cation.rs | the SCF starts for one hole (MOM, IMOM, ROHF) |
//! | predict.rs | the driver (`predict`) |
//! | shared_eri.rs | integrals shared by the bases of different holes |
//! | ovov.rs | (ia\|jb) integrals for MP2 |
//! | mp2.rs | RMP2 / UMP2 energies for ΔMP2 |
//! | relativistic.rs | the optional relativistic correction of 1s levels |
//! | bench.rs | the `bandcast bench core` workload |
pub mod bench;
pub mod carry_over;
pub mod cation;
pub mod delocalised;
pub mod equivalence;
pub mod flexibility;
pub mod hole_check;
pub mod lifetime;
pub mod localize;
pub mod mp2;
pub mod options;
pub mod ovov;
pub mod population;
pub mod predict;
pub mod relativistic;
pub mod result;
pub mod shared_eri;
pub mod targets;

pub use hole_check::HoleStatus;
pub use options::{CoreBasis, CoreOptions, ShiftReference, TargetSelection};
pub use predict::{predict, predict_with_progress};
pub use result::{
    CoreLevel, CoreResult, CoreTimings, HoleAttempt, ShiftReferenceLevel, StageTiming,
};
