//! Benchmark workloads behind `bandcast bench …`, kept out of the numerical modules. Plain
//! functions returning plain results; the CLI prints them. Timings are wall-clock and CPU
//! seconds from `system`, and depend on the machine.
//!
//! - `integrals`: ERI throughput per angular-momentum class, all ERIs of a molecule.
//! - `scf`: SCF cases (wall, CPU, peak memory).
//! - `ep2`: SCF and EP2 for all valence bands.
//! - `eom`: EOM-IP stages (factors → MO blocks → ground state → H̄ → roots).
//! - `core_level`: carbon 1s levels of an all-trans n-alkane.
//! - `delta_cc`: ΔCCSD(T) valence and core, with and without frozen natural orbitals.
//! - `gradient`: one analytic RHF gradient against its SCF, and a full harmonic analysis.
//! - `franck_condon`: Franck–Condon progressions of random molecule-shaped Duschinsky
//!   relations.
pub mod core_level;
pub mod delta_cc;
pub mod eom;
pub mod ep2;
pub mod franck_condon;
pub mod gradient;
pub mod integrals;
pub mod scf;
