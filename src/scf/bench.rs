//! The `scf` workload of `bandcast bench`: SCF wall time, iterations and peak memory for a few
//! molecules, and the speed-up from one to two threads. Speed is measured here, never in
//! tests.

use std::path::Path;
use std::time::Instant;

use crate::basis;
use crate::chem::xyz::{read_xyz, LengthUnit};
use crate::error::{Error, Result};
use crate::scf::{self, ScfContext, ScfOptions};
use crate::units::HARTREE_TO_EV;

/// One benchmark case: a GW100 structure file stem and a basis.
#[derive(Debug, Clone)]
pub struct Case {
    pub molecule: &'static str,
    pub basis: &'static str,
    /// Also time it on one thread (for the speed-up).
    pub one_thread: bool,
}

/// The cases: `quick` keeps only the two small ones; `guanine` adds guanine/def2-TZVPP
/// (integral-direct, long).
pub fn cases(quick: bool, guanine: bool) -> Vec<Case> {
    let mut v = vec![
        Case {
            molecule: "water",
            basis: "cc-pVTZ",
            one_thread: true,
        },
        Case {
            molecule: "benzene",
            basis: "cc-pVDZ",
            one_thread: true,
        },
    ];
    if !quick {
        v.push(Case {
            molecule: "benzene",
            basis: "def2-TZVPP",
            one_thread: true,
        });
    }
    if guanine {
        v.push(Case {
            molecule: "guanine",
            basis: "def2-TZVPP",
            one_thread: false,
        });
    }
    v
}

#[derive(Debug, Clone)]
pub struct CaseResult {
    pub molecule: String,
    pub basis: String,
    pub n_basis: usize,
    pub builder: String,
    pub energy: f64,
    pub homo_ev: f64,
    pub iterations: usize,
    /// Wall time (s) on the default thread pool: setup (one-electron integrals, SAD) and total.
    pub seconds: f64,
    pub threads: usize,
    /// CPU seconds of all threads during the timed run (comparable on a loaded machine).
    pub cpu_seconds: Option<f64>,
    /// Wall time on one thread, when measured.
    pub seconds_one_thread: Option<f64>,
    /// Peak resident memory of the process so far (VmHWM, MiB), when readable.
    pub peak_mib: Option<f64>,
}

/// CPU time (user + system, all threads) of the process so far, from /proc/self/stat
/// (Linux; clock ticks assumed 100 per second, the Linux default).
pub fn cpu_seconds() -> Option<f64> {
    let s = std::fs::read_to_string("/proc/self/stat").ok()?;
    let rest = &s[s.rfind(')')? + 2..];
    let f: Vec<&str> = rest.split_whitespace().collect();
    let ut: f64 = f.get(11)?.parse().ok()?;
    let st: f64 = f.get(12)?.parse().ok()?;
    Some((ut + st) / 100.0)
}

/// Peak resident set size from /proc/self/status (Linux), MiB.
pub fn peak_memory_mib() -> Option<f64> {
    let s = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = s.lines().find(|l| l.starts_with("VmHWM:"))?;
    let kb: f64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kb / 1024.0)
}

type Timed = (f64, Option<f64>, scf::Wavefunction, String, usize);

fn time_one(dir: &Path, case: &Case) -> Result<Timed> {
    let path = dir.join(format!("{}.xyz", case.molecule));
    let mol = read_xyz(&path, LengthUnit::Angstrom)?;
    let b = basis::load(case.basis, &mol, None)?;
    let t0 = Instant::now();
    let c0 = cpu_seconds();
    let opts = ScfOptions::default();
    let mut ctx = ScfContext::new(&mol, &b, opts.lindep_threshold)?;
    let wf = ctx.run(&mol, &opts, &mut |_| {})?;
    let cpu = match (c0, cpu_seconds()) {
        (Some(a), Some(b)) => Some(b - a),
        _ => None,
    };
    Ok((
        t0.elapsed().as_secs_f64(),
        cpu,
        wf,
        ctx.last_builder.clone(),
        b.n_basis,
    ))
}

/// Run the cases on structures from `dir` (GW100 XYZ files), calling `report` after each.
pub fn run_scf_bench(
    dir: &Path,
    quick: bool,
    guanine: bool,
    report: &mut dyn FnMut(&CaseResult),
) -> Result<Vec<CaseResult>> {
    let mut out = Vec::new();
    for case in cases(quick, guanine) {
        let (seconds, cpu, wf, builder, n_basis) = time_one(dir, &case)?;
        let seconds_one_thread = if case.one_thread && rayon::current_num_threads() > 1 {
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(1)
                .build()
                .map_err(|e| Error::computation(format!("thread pool: {e}")))?;
            let (t1, _, w1, _, _) = pool.install(|| time_one(dir, &case))?;
            if (w1.energy - wf.energy).abs() > 1e-10 {
                return Err(Error::computation(format!(
                    "{} / {}: energies on 1 and {} threads differ by {:.2e} Eh",
                    case.molecule,
                    case.basis,
                    rayon::current_num_threads(),
                    (w1.energy - wf.energy).abs()
                )));
            }
            Some(t1)
        } else {
            None
        };
        let homo = wf
            .occ_alpha
            .iter()
            .rposition(|&o| o > 0.5)
            .map(|i| wf.eps_alpha[i])
            .unwrap_or(f64::NAN);
        let r = CaseResult {
            molecule: case.molecule.into(),
            basis: case.basis.into(),
            n_basis,
            builder,
            energy: wf.energy,
            homo_ev: homo * HARTREE_TO_EV,
            iterations: wf.iterations,
            seconds,
            threads: rayon::current_num_threads(),
            cpu_seconds: cpu,
            seconds_one_thread,
            peak_mib: peak_memory_mib(),
        };
        report(&r);
        out.push(r);
    }
    Ok(out)
}

/// One text line per case.
pub fn format_result(r: &CaseResult) -> String {
    let speed = match r.seconds_one_thread {
        Some(t1) => format!(
            "1 thread {:>7.2} s, speed-up {:.2}×",
            t1,
            t1 / r.seconds.max(1e-9)
        ),
        None => "1 thread not timed".into(),
    };
    format!(
        "scf  {:<10} {:<11} {:>4} fn  {:>3} it  {:>8.2} s on {} threads, {:.1} CPU-s  ({})  peak {:>7.0} MiB  \
         E = {:.8}  HOMO {:.4} eV  [{}]",
        r.molecule,
        r.basis,
        r.n_basis,
        r.iterations,
        r.seconds,
        r.threads,
        r.cpu_seconds.unwrap_or(f64::NAN),
        speed,
        r.peak_mib.unwrap_or(f64::NAN),
        r.energy,
        r.homo_ev,
        r.builder
    )
}
