//! The `delta-cc` workload of `bandcast bench`: state-specific coupled cluster (ΔCCSD(T)),
//! valence and core, with and without frozen natural orbitals, on GW100 structures (read
//! from a directory, as `eom` does). Per case: wall time, CPU time of all threads, peak
//! resident memory (VmHWM, reset before each case where the kernel allows), the energy and
//! the kept virtual orbitals. Speed is measured here, never in tests.
//!
//! Cases (small, the default):
//! - water 1b1, def2-TZVPP, all virtuals and `--fno 99.5`;
//! - water O 1s, cc-pCVTZ on O / cc-pVTZ, all virtuals and `--fno 99.5`.
//!
//! `large` adds ethanol C 1s of the CH2OH carbon (atom 2), cc-pCVTZ on the hole / cc-pVTZ,
//! `--fno 99.5` (ΔCCSD(T) C 1s of ethanol in cc-pCVTZ-on-hole / cc-pVTZ; figures in
//! docs/benchmarks.md).

use std::path::Path;
use std::time::Instant;

use crate::basis;
use crate::chem::xyz::{read_xyz, LengthUnit};
use crate::core_level::delta_cc::DeltaCc;
use crate::core_level::notes::CoreNote;
use crate::core_level::{predict, CoreBasis, CoreOptions, TargetSelection};
use crate::correlation::open_shell::CutPair;
use crate::error::{Error, Result};
use crate::ionization::method::Method;
use crate::ionization::notice::ValenceNotice;
use crate::ionization::valence::{predict_with, ValenceOptions};
use crate::scf::{self, Reference, ScfOptions};
use crate::system::{peak_memory_mib, process_cpu_seconds, reset_peak_memory};

/// One benchmark case.
#[derive(Debug, Clone)]
pub struct Case {
    /// GW100 file stem.
    pub molecule: &'static str,
    /// What is ionized, for the report ("1b1", "O 1s", …).
    pub level: &'static str,
    pub basis: &'static str,
    pub kind: Kind,
    /// Frozen natural orbitals: the kept percentage of the MP2 virtual population.
    pub fno: Option<f64>,
}

#[derive(Debug, Clone)]
pub enum Kind {
    /// The lowest valence band (`ionize --method dccsd-t --count 1`).
    Valence,
    /// The 1s level of this atom (0-based), with this core-valence set on it.
    Core {
        atom: usize,
        hole_basis: &'static str,
    },
}

/// The cases of a run: the small ones, and ethanol when `large`.
pub fn cases(large: bool) -> Vec<Case> {
    let mut out = Vec::new();
    for fno in [None, Some(99.5)] {
        out.push(Case {
            molecule: "water",
            level: "1b1",
            basis: "def2-TZVPP",
            kind: Kind::Valence,
            fno,
        });
    }
    for fno in [None, Some(99.5)] {
        out.push(Case {
            molecule: "water",
            level: "O 1s",
            basis: "cc-pVTZ",
            kind: Kind::Core {
                atom: 0,
                hole_basis: "cc-pCVTZ",
            },
            fno,
        });
    }
    if large {
        out.push(Case {
            molecule: "ethanol",
            level: "C2 1s (CH2OH)",
            basis: "cc-pVTZ",
            kind: Kind::Core {
                atom: 1,
                hole_basis: "cc-pCVTZ",
            },
            fno: Some(99.5),
        });
    }
    out
}

/// What one case measured.
#[derive(Debug, Clone)]
pub struct CaseResult {
    pub case: Case,
    pub n_basis: usize,
    /// ΔCCSD(T) energy (eV): the IE or the non-relativistic binding energy.
    pub energy_ev: f64,
    pub wall_seconds: f64,
    pub cpu_seconds: Option<f64>,
    /// Peak resident memory of the process during the case (MiB); when the kernel does not
    /// let the peak be reset, the peak of the run so far.
    pub peak_mib: Option<f64>,
    pub peak_is_per_case: bool,
    /// The frozen-natural-orbital cut, when one was made.
    pub cut: Option<CutPair>,
}

impl std::fmt::Display for CaseResult {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let c = &self.case;
        let basis = match c.kind {
            Kind::Valence => c.basis.to_string(),
            Kind::Core { hole_basis, .. } => format!("{hole_basis} on the hole / {}", c.basis),
        };
        write!(
            f,
            "{} {} | {basis} ({} functions) | {} | {:.3} eV | {:.1} s wall",
            c.molecule,
            c.level,
            self.n_basis,
            match c.fno {
                Some(p) => format!("--fno {p}"),
                None => "all virtuals".to_string(),
            },
            self.energy_ev,
            self.wall_seconds
        )?;
        if let Some(s) = self.cpu_seconds {
            write!(f, ", {s:.1} CPU-s")?;
        }
        if let Some(m) = self.peak_mib {
            let what = if self.peak_is_per_case {
                "peak"
            } else {
                "peak of the run so far"
            };
            write!(f, ", {what} {:.2} GiB", m / 1024.0)?;
        }
        if let Some(cut) = &self.cut {
            write!(
                f,
                " | kept {}α+{}β of {}α+{}β virtuals (neutral), {}α+{}β of {}α+{}β (ion)",
                cut.neutral_kept[0],
                cut.neutral_kept[1],
                cut.neutral_full[0],
                cut.neutral_full[1],
                cut.ion_kept[0],
                cut.ion_kept[1],
                cut.ion_full[0],
                cut.ion_full[1]
            )?;
        }
        Ok(())
    }
}

/// Run the cases on structures from `dir` with a memory budget of `budget_bytes`, calling
/// `report` after each.
pub fn run(
    dir: &Path,
    large: bool,
    budget_bytes: f64,
    progress: bool,
    report: &mut dyn FnMut(&CaseResult),
) -> Result<Vec<CaseResult>> {
    let mut out = Vec::new();
    for case in cases(large) {
        let path = dir.join(format!("{}.xyz", case.molecule));
        if !path.is_file() {
            return Err(Error::input(format!(
                "{}: not found (the benchmark reads GW100 structures from --dir)",
                path.display()
            )));
        }
        let mol = read_xyz(&path, LengthUnit::Angstrom)?;
        let per_case = reset_peak_memory();
        let c0 = process_cpu_seconds();
        let t0 = Instant::now();
        let (n_basis, energy_ev, cut) = match case.kind {
            Kind::Valence => {
                let set = basis::load(case.basis, &mol, None)?;
                let wf = scf::run(
                    &mol,
                    &set,
                    &ScfOptions {
                        reference: Reference::Rhf,
                        ..Default::default()
                    },
                )?;
                let r = predict_with(
                    &mol,
                    &set,
                    &wf,
                    &ValenceOptions {
                        method: Method::DccsdT,
                        count: Some(1),
                        memory_bytes: budget_bytes as usize,
                        natural_virtuals: case.fno.map(|p| p / 100.0),
                        progress,
                        ..Default::default()
                    },
                )?;
                let band = r.bands.first().ok_or_else(|| {
                    Error::computation(format!("{}: no ΔCCSD(T) band", case.molecule))
                })?;
                let cut = r.notes.iter().find_map(|n| match n {
                    ValenceNotice::NaturalVirtuals { cut, .. } => Some(cut.clone()),
                    _ => None,
                });
                (set.n_basis, band.ie_ev, cut)
            }
            Kind::Core { atom, hole_basis } => {
                let set = basis::load(case.basis, &mol, None)?;
                let r = predict(
                    &mol,
                    &set,
                    &CoreOptions {
                        targets: TargetSelection::Atoms(vec![atom]),
                        core_basis: CoreBasis::Named(hole_basis.to_string()),
                        thorough: false,
                        cc: Some(DeltaCc::CcsdT),
                        memory_bytes: Some(budget_bytes as usize),
                        natural_virtuals: case.fno.map(|p| p / 100.0),
                        progress,
                        ..Default::default()
                    },
                )?;
                let level = r.core_levels.first().ok_or_else(|| {
                    Error::computation(format!("{}: no core level", case.molecule))
                })?;
                let e = level.cc.dccsdt_ev.ok_or_else(|| {
                    Error::computation(format!(
                        "{} {}: the ΔCCSD(T) did not run",
                        case.molecule, case.level
                    ))
                })?;
                let cut = level.notes.iter().find_map(|n| match n {
                    CoreNote::NaturalVirtuals(cut) => Some(cut.clone()),
                    _ => None,
                });
                (r.n_basis, e, cut)
            }
        };
        let res = CaseResult {
            case,
            n_basis,
            energy_ev,
            wall_seconds: t0.elapsed().as_secs_f64(),
            cpu_seconds: process_cpu_seconds().zip(c0).map(|(b, a)| b - a),
            peak_mib: peak_memory_mib(),
            peak_is_per_case: per_case,
            cut,
        };
        report(&res);
        out.push(res);
    }
    Ok(out)
}
