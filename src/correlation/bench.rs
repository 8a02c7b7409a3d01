//! The `eom` workload of `bandcast bench`: EOM-IP-CCSD for the five lowest states of
//! benzene/def2-TZVPP and EOM-IP-MBPT2 for guanine/def2-TZVPP (GW100 structures), with wall
//! time per stage and peak memory (VmHWM). Speed is measured here, never in tests.

use std::path::Path;
use std::time::Instant;

use crate::basis;
use crate::chem::xyz::{read_xyz, LengthUnit};
use crate::error::Result;
use crate::scf::{self, ScfOptions};

use super::eom_ip::{ionize_report, EomMethod, EomOptions, RootSpec};

#[derive(Debug, Clone)]
pub struct Case {
    pub molecule: &'static str,
    pub basis: &'static str,
    pub method: EomMethod,
    pub roots: usize,
}

/// Default cases; `quick` runs small stand-ins (water/def2-TZVPP) for a smoke test.
pub fn cases(quick: bool) -> Vec<Case> {
    if quick {
        return vec![
            Case {
                molecule: "water",
                basis: "def2-TZVPP",
                method: EomMethod::Ccsd,
                roots: 5,
            },
            Case {
                molecule: "water",
                basis: "def2-TZVPP",
                method: EomMethod::Mbpt2,
                roots: 5,
            },
        ];
    }
    vec![
        Case {
            molecule: "benzene",
            basis: "def2-TZVPP",
            method: EomMethod::Ccsd,
            roots: 5,
        },
        Case {
            molecule: "guanine",
            basis: "def2-TZVPP",
            method: EomMethod::Mbpt2,
            roots: 5,
        },
    ]
}

#[derive(Debug, Clone)]
pub struct CaseResult {
    pub molecule: String,
    pub basis: String,
    pub method: &'static str,
    pub n_basis: usize,
    pub n_occupied: usize,
    pub n_virtual: usize,
    pub n_cholesky: usize,
    pub seconds_scf: f64,
    pub seconds_integrals: f64,
    pub seconds_ground: f64,
    pub seconds_eom: f64,
    pub ccsd_iterations: usize,
    pub ies_ev: Vec<f64>,
    pub threads: usize,
    pub memory_estimate_mib: f64,
    pub peak_mib: Option<f64>,
}

/// Run the cases on structures from `dir`, calling `report` after each.
pub fn run_eom_bench(
    dir: &Path,
    quick: bool,
    report: &mut dyn FnMut(&CaseResult),
) -> Result<Vec<CaseResult>> {
    let mut out = Vec::new();
    for case in cases(quick) {
        let mol = read_xyz(
            &dir.join(format!("{}.xyz", case.molecule)),
            LengthUnit::Angstrom,
        )?;
        let b = basis::load(case.basis, &mol, None)?;
        let t0 = Instant::now();
        let wfn = scf::run(&mol, &b, &ScfOptions::default())?;
        let seconds_scf = t0.elapsed().as_secs_f64();
        let opts = EomOptions {
            method: case.method,
            roots: RootSpec::Lowest(case.roots),
            ..Default::default()
        };
        let rep = ionize_report(&mol, &b, &wfn, &opts, &mut |_| {})?;
        let r = CaseResult {
            molecule: case.molecule.into(),
            basis: case.basis.into(),
            method: case.method.name(),
            n_basis: b.n_basis,
            n_occupied: rep.n_active_occupied,
            n_virtual: rep.n_virtual,
            n_cholesky: rep.n_cholesky_vectors,
            seconds_scf,
            seconds_integrals: rep.seconds_integrals,
            seconds_ground: rep.seconds_ground,
            seconds_eom: rep.seconds_eom,
            ccsd_iterations: rep.ccsd_iterations,
            ies_ev: rep.states.iter().map(|s| s.ie_ev).collect(),
            threads: rayon::current_num_threads(),
            memory_estimate_mib: rep.memory_estimate / 1048576.0,
            peak_mib: scf::bench::peak_memory_mib(),
        };
        report(&r);
        out.push(r);
    }
    Ok(out)
}

/// One text line per case.
pub fn format_result(r: &CaseResult) -> String {
    let ies: Vec<String> = r.ies_ev.iter().map(|e| format!("{e:.3}")).collect();
    format!(
        "eom  {:<8} {:<10} {:<8} {:>4} fn ({} occ, {} vir, {} Cholesky)  SCF {:.1} s, \
         integrals {:.1} s, ground state {:.1} s ({} it), EOM {:.1} s on {} threads; \
         memory estimate {:.0} MiB, peak {:.0} MiB; IE/eV {}",
        r.molecule,
        r.basis,
        r.method,
        r.n_basis,
        r.n_occupied,
        r.n_virtual,
        r.n_cholesky,
        r.seconds_scf,
        r.seconds_integrals,
        r.seconds_ground,
        r.ccsd_iterations,
        r.seconds_eom,
        r.threads,
        r.memory_estimate_mib,
        r.peak_mib.unwrap_or(f64::NAN),
        ies.join(", ")
    )
}
