//! The `scf` workload of `bandcast bench`: SCF wall time, CPU time, iterations and peak
//! memory for a few molecules, and the speed-up from one thread to the pool's threads.
//! Speed is measured here, never in tests.

use std::path::Path;
use std::time::Instant;

use crate::basis;
use crate::chem::xyz::{read_xyz, LengthUnit};
use crate::error::{Error, Result};
use crate::scf::{self, DfStart, FockMethod, ScfContext, ScfOptions};
use crate::system::{peak_memory_mib, process_cpu_seconds, reset_peak_memory, resident_memory_mib};
use crate::units::HARTREE_TO_EV;

/// One benchmark case: a GW100 structure file stem, a basis and a Fock builder.
#[derive(Debug, Clone)]
pub struct Case {
    pub molecule: &'static str,
    pub basis: &'static str,
    pub fock: FockMethod,
    pub df_start: DfStart,
    /// Also time it on one thread (for the speed-up).
    pub one_thread: bool,
}

/// The cases: `quick` keeps only the two small ones; the full set adds benzene/def2-TZVPP
/// three ways (the default builder, integral-direct after a density-fitted start, and
/// density-fitted); `guanine` adds guanine/def2-TZVPP (default builder, which is direct
/// unless ~20 GiB are available, and density-fitted; long).
pub fn cases(quick: bool, guanine: bool) -> Vec<Case> {
    let case = |molecule, basis, fock, one_thread| Case {
        molecule,
        basis,
        fock,
        df_start: DfStart::Auto,
        one_thread,
    };
    let mut v = vec![
        case("water", "cc-pVTZ", FockMethod::Auto, true),
        case("benzene", "cc-pVDZ", FockMethod::Auto, true),
    ];
    if !quick {
        v.push(case("benzene", "def2-TZVPP", FockMethod::Auto, true));
        v.push(Case {
            df_start: DfStart::Always,
            ..case("benzene", "def2-TZVPP", FockMethod::Direct, false)
        });
        v.push(case(
            "benzene",
            "def2-TZVPP",
            FockMethod::DensityFitted,
            true,
        ));
    }
    if guanine {
        v.push(case("guanine", "def2-TZVPP", FockMethod::Auto, false));
        v.push(case(
            "guanine",
            "def2-TZVPP",
            FockMethod::DensityFitted,
            false,
        ));
    }
    v
}

#[derive(Debug, Clone)]
pub struct CaseResult {
    pub molecule: String,
    pub basis: String,
    pub n_basis: usize,
    /// The Fock builder of the final iterations, as the SCF describes it.
    pub builder: String,
    /// Density-fitted iterations before the exact ones (0: none).
    pub df_start_iterations: usize,
    pub energy: f64,
    pub homo_ev: f64,
    pub iterations: usize,
    /// Wall time (s) of the whole SCF (one-electron integrals, guess, ERIs, iterations) on
    /// the current thread pool.
    pub seconds: f64,
    pub threads: usize,
    /// CPU seconds of all threads during the timed run (comparable on a loaded machine).
    pub cpu_seconds: Option<f64>,
    /// Wall time on one thread, when measured.
    pub seconds_one_thread: Option<f64>,
    /// Peak resident memory during the case (VmHWM after resetting it, MiB), when readable.
    pub peak_mib: Option<f64>,
    /// Resident memory when the case started (memory kept by earlier cases), MiB.
    pub start_mib: Option<f64>,
    /// Memory budget for stored integrals (bytes).
    pub memory_budget_bytes: usize,
    /// Wall seconds per step of the timed run.
    pub timings: Vec<(String, f64)>,
}

struct Timed {
    seconds: f64,
    cpu: Option<f64>,
    wf: scf::Wavefunction,
    builder: String,
    df_start_iterations: usize,
    n_basis: usize,
    timings: Vec<(String, f64)>,
}

fn time_one(dir: &Path, case: &Case, budget: usize) -> Result<Timed> {
    let path = dir.join(format!("{}.xyz", case.molecule));
    let mol = read_xyz(&path, LengthUnit::Angstrom)?;
    let b = basis::load(case.basis, &mol, None)?;
    let t0 = Instant::now();
    let c0 = process_cpu_seconds();
    let opts = ScfOptions {
        fock: case.fock,
        df_start: case.df_start,
        memory_budget_bytes: budget,
        ..ScfOptions::default()
    };
    let mut ctx = ScfContext::new(&mol, &b, opts.lindep_threshold)?;
    let wf = ctx.run(&mol, &opts, &mut |_| {})?;
    let cpu = match (c0, process_cpu_seconds()) {
        (Some(a), Some(b)) => Some(b - a),
        _ => None,
    };
    let mut timings = ctx.setup_timings.clone();
    timings.extend(ctx.last_run.timings.iter().cloned());
    Ok(Timed {
        seconds: t0.elapsed().as_secs_f64(),
        cpu,
        wf,
        builder: ctx.last_run.builder.clone(),
        df_start_iterations: ctx
            .last_run
            .df_start
            .as_ref()
            .map_or(0, |d| d.iterations + d.corrected_iterations),
        n_basis: b.n_basis,
        timings,
    })
}

/// Run the cases on structures from `dir` (GW100 XYZ files) with `budget` bytes for stored
/// integrals, calling `report` after each.
pub fn run_scf_bench(
    dir: &Path,
    quick: bool,
    guanine: bool,
    budget: usize,
    report: &mut dyn FnMut(&CaseResult),
) -> Result<Vec<CaseResult>> {
    let mut out = Vec::new();
    for case in cases(quick, guanine) {
        let can_reset = reset_peak_memory();
        let start_mib = resident_memory_mib();
        let t = time_one(dir, &case, budget)?;
        let peak = if can_reset { peak_memory_mib() } else { None };
        let seconds_one_thread = if case.one_thread && rayon::current_num_threads() > 1 {
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(1)
                .build()
                .map_err(|e| Error::computation(format!("thread pool: {e}")))?;
            let t1 = pool.install(|| time_one(dir, &case, budget))?;
            let diff = (t1.wf.energy - t.wf.energy).abs();
            if diff > 1e-10 {
                return Err(Error::computation(format!(
                    "{} / {}: energies on 1 and {} threads differ by {:.2e} Eh",
                    case.molecule,
                    case.basis,
                    rayon::current_num_threads(),
                    diff
                )));
            }
            Some(t1.seconds)
        } else {
            None
        };
        let wf = &t.wf;
        let homo = wf
            .occ_alpha
            .iter()
            .rposition(|&o| o > 0.5)
            .map(|i| wf.eps_alpha[i])
            .unwrap_or(f64::NAN);
        let r = CaseResult {
            molecule: case.molecule.into(),
            basis: case.basis.into(),
            n_basis: t.n_basis,
            builder: t.builder,
            df_start_iterations: t.df_start_iterations,
            energy: wf.energy,
            homo_ev: homo * HARTREE_TO_EV,
            iterations: wf.iterations,
            seconds: t.seconds,
            threads: rayon::current_num_threads(),
            cpu_seconds: t.cpu,
            seconds_one_thread,
            peak_mib: peak,
            start_mib,
            memory_budget_bytes: budget,
            timings: t.timings,
        };
        report(&r);
        out.push(r);
    }
    Ok(out)
}

/// One text line per case, and a second line with the steps' wall times.
pub fn format_result(r: &CaseResult) -> String {
    let speed = match r.seconds_one_thread {
        Some(t1) => format!(
            "1 thread {:>7.2} s, speed-up {:.2}×",
            t1,
            t1 / r.seconds.max(1e-9)
        ),
        None => "1 thread not timed".into(),
    };
    let iterations = if r.df_start_iterations > 0 {
        format!("{} + {} DF", r.iterations, r.df_start_iterations)
    } else {
        format!("{}", r.iterations)
    };
    let steps: Vec<String> = r
        .timings
        .iter()
        .filter(|(_, s)| *s >= 0.005)
        .map(|(w, s)| format!("{w} {s:.2}"))
        .collect();
    let peak = match (r.peak_mib, r.start_mib) {
        (Some(p), Some(s)) => format!("peak {p:>6.0} MiB ({:+.0} over the start)", p - s),
        (Some(p), None) => format!("peak {p:>6.0} MiB"),
        _ => "peak not readable".into(),
    };
    format!(
        "scf  {:<10} {:<11} {:>4} fn  {:>9} it  {:>8.2} s on {} threads, {:>7.1} CPU-s  ({})  \
         {}  E = {:.8}  HOMO {:.4} eV\n     builder: {}\n     steps (s): {}",
        r.molecule,
        r.basis,
        r.n_basis,
        iterations,
        r.seconds,
        r.threads,
        r.cpu_seconds.unwrap_or(f64::NAN),
        speed,
        peak,
        r.energy,
        r.homo_ev,
        r.builder,
        steps.join(", ")
    )
}
