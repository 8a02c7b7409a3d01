//! The `eom` workload of `bandcast bench`: EOM-IP-CCSD for the five lowest states of
//! benzene/def2-TZVPP and EOM-IP-MBPT2 for guanine/def2-TZVPP (GW100 structures), with wall
//! time, CPU time and peak memory (VmHWM) per stage, the SCF included as its own stage.
//! Speed is measured here, never in tests.

use std::path::Path;

use crate::basis;
use crate::chem::xyz::{read_xyz, LengthUnit};
use crate::error::Result;
use crate::scf::{self, ScfOptions};

use crate::correlation::eom_ip::{ionize_report, EomMethod, EomOptions, RootSpec};
use crate::correlation::stages::{StageClock, StageRecord};

#[derive(Debug, Clone)]
pub struct Case {
    pub molecule: &'static str,
    pub basis: &'static str,
    pub method: EomMethod,
    pub roots: usize,
}

/// Default cases; `quick` runs small stand-ins (water/def2-TZVPP, benzene/def2-SVP).
pub fn cases(quick: bool) -> Vec<Case> {
    let case = |molecule, basis, method| Case {
        molecule,
        basis,
        method,
        roots: 5,
    };
    if quick {
        return vec![
            case("water", "def2-TZVPP", EomMethod::Ccsd),
            case("benzene", "def2-SVP", EomMethod::Ccsd),
            case("benzene", "def2-SVP", EomMethod::Mbpt2),
        ];
    }
    vec![
        case("benzene", "def2-TZVPP", EomMethod::Ccsd),
        case("guanine", "def2-TZVPP", EomMethod::Mbpt2),
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
    pub n_factors: usize,
    pub density_fitted: bool,
    pub ccsd_iterations: usize,
    pub ies_ev: Vec<f64>,
    pub one_hole_weights: Vec<f64>,
    pub threads: usize,
    pub memory_estimate_mib: f64,
    pub budget_mib: f64,
    /// "SCF" then the stages of `EomReport::stages`.
    pub stages: Vec<StageRecord>,
    pub notes: Vec<String>,
}

/// Run the cases (those whose molecule is in `only`, when given) on structures from `dir`
/// with a memory budget of `budget_bytes`, calling `report` after each and `log` with
/// progress lines.
pub fn run_eom_bench(
    dir: &Path,
    quick: bool,
    only: &[String],
    budget_bytes: f64,
    log: &mut dyn FnMut(&str),
    report: &mut dyn FnMut(&CaseResult),
) -> Result<Vec<CaseResult>> {
    let mut out = Vec::new();
    for case in cases(quick) {
        if !only.is_empty() && !only.iter().any(|m| m == case.molecule) {
            continue;
        }
        let mol = read_xyz(
            &dir.join(format!("{}.xyz", case.molecule)),
            LengthUnit::Angstrom,
        )?;
        let b = basis::load(case.basis, &mol, None)?;
        log(&format!(
            "{} {} {}: SCF ({} basis functions)",
            case.molecule,
            case.basis,
            case.method.name(),
            b.n_basis
        ));
        let mut clock = StageClock::new(true);
        let wfn = scf::run(&mol, &b, &ScfOptions::default())?;
        let mut stages = vec![clock.finish("SCF").clone()];
        log(&stages[0].describe());
        let opts = EomOptions {
            method: case.method,
            roots: RootSpec::Lowest(case.roots),
            memory_budget: Some(budget_bytes),
            stage_peaks: true,
            ..Default::default()
        };
        let rep = ionize_report(&mol, &b, &wfn, &opts, log)?;
        stages.extend(rep.stages.iter().cloned());
        let r = CaseResult {
            molecule: case.molecule.into(),
            basis: case.basis.into(),
            method: case.method.name(),
            n_basis: b.n_basis,
            n_occupied: rep.n_active_occupied,
            n_virtual: rep.n_virtual,
            n_factors: rep.n_factors,
            density_fitted: rep.density_fitted,
            ccsd_iterations: rep.ccsd_iterations,
            ies_ev: rep.states.iter().map(|s| s.ie_ev).collect(),
            one_hole_weights: rep.states.iter().map(|s| s.one_hole_weight).collect(),
            threads: rayon::current_num_threads(),
            memory_estimate_mib: rep.memory_estimate / 1048576.0,
            budget_mib: budget_bytes / 1048576.0,
            stages,
            notes: rep.notes,
        };
        report(&r);
        out.push(r);
    }
    Ok(out)
}

/// A text block per case: a header line, one line per stage, the notes and the states.
pub fn format_result(r: &CaseResult) -> String {
    let mut s = format!(
        "{} {} {}: {} basis functions, {} correlated occupied, {} virtual, {} {}; \
         {} threads; memory estimate {:.0} MiB (budget {:.0} MiB)\n",
        r.molecule,
        r.basis,
        r.method,
        r.n_basis,
        r.n_occupied,
        r.n_virtual,
        r.n_factors,
        if r.density_fitted {
            "auxiliary functions"
        } else {
            "Cholesky vectors"
        },
        r.threads,
        r.memory_estimate_mib,
        r.budget_mib
    );
    s.push_str(&format!(
        "  {:<14} {:>9} {:>9} {:>11}\n",
        "stage", "wall s", "CPU-s", "peak MiB"
    ));
    let mut wall = 0.0;
    let mut cpu = 0.0;
    for st in &r.stages {
        wall += st.wall_seconds;
        cpu += st.cpu_seconds.unwrap_or(f64::NAN);
        s.push_str(&format!(
            "  {:<14} {:>9.1} {:>9.1} {:>11.0}\n",
            st.name,
            st.wall_seconds,
            st.cpu_seconds.unwrap_or(f64::NAN),
            st.peak_mib.unwrap_or(f64::NAN)
        ));
    }
    let peak = r
        .stages
        .iter()
        .filter_map(|x| x.peak_mib)
        .fold(0.0, f64::max);
    s.push_str(&format!(
        "  {:<14} {:>9.1} {:>9.1} {:>11.0}\n",
        "total", wall, cpu, peak
    ));
    if r.ccsd_iterations > 0 {
        s.push_str(&format!("  CCSD iterations: {}\n", r.ccsd_iterations));
    }
    for n in &r.notes {
        s.push_str(&format!("  note: {n}\n"));
    }
    let ies: Vec<String> = r
        .ies_ev
        .iter()
        .zip(&r.one_hole_weights)
        .map(|(e, w)| format!("{e:.3} ({w:.2})"))
        .collect();
    s.push_str(&format!("  IE/eV (one-hole weight): {}\n", ies.join(", ")));
    s
}
