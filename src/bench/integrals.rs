//! Integral workloads for `bandcast bench integrals`: ERI throughput per angular-momentum
//! class and wall time for all ERIs of a molecule. Plain functions returning plain
//! results; the CLI prints them. Timings are wall-clock and depend on the machine.

use crate::basis::cartesian::n_cartesian;
use crate::basis::{BasisSet, Shell};
use crate::integrals::EriEngine;
use crate::system::{process_cpu_seconds, thread_cpu_seconds};
use rayon::prelude::*;
use std::time::Instant;

/// Throughput of one class (la lb | lc ld), one thread.
#[derive(Debug, Clone, serde::Serialize)]
pub struct ClassTiming {
    pub label: String,
    pub primitives_per_shell: usize,
    pub quartets: usize,
    pub seconds: f64,
    /// CPU seconds of the timing thread (when available).
    pub cpu_seconds: Option<f64>,
    /// Final (contracted, pure) integrals per second.
    pub integrals_per_s: f64,
    /// Cartesian primitive integrals per second (n_cart⁴-type count × primitive quartets).
    pub primitive_integrals_per_s: f64,
}

/// Timing of all unique ERIs of a basis on a molecule (all rayon threads).
#[derive(Debug, Clone, serde::Serialize)]
pub struct MoleculeTiming {
    pub n_basis: usize,
    pub n_shells: usize,
    pub threads: usize,
    pub setup_seconds: f64,
    pub seconds: f64,
    /// CPU seconds of the whole process during the run (all threads, when available).
    pub cpu_seconds: Option<f64>,
    pub quartets_computed: usize,
    pub quartets_screened: usize,
    pub integrals: usize,
    pub integrals_per_s: f64,
    /// Σ |(ab|cd)| over the unique quartets computed, to compare runs.
    pub checksum: f64,
}

/// Time the class (la lb | lc ld) on four pure shells at fixed, water-like positions, each
/// with `n_prim` primitives, repeating until `min_seconds` have passed.
pub fn class_throughput(ls: [usize; 4], n_prim: usize, min_seconds: f64) -> ClassTiming {
    let centres = [
        [0.0, 0.0, 0.0],
        [1.43, 1.1, 0.0],
        [-1.43, 1.1, 0.0],
        [0.0, -0.4, 1.2],
    ];
    let shells: Vec<Shell> = (0..4)
        .map(|i| {
            let exps: Vec<f64> = (0..n_prim).map(|k| 0.8 * 3f64.powi(k as i32)).collect();
            let coefs: Vec<f64> = (0..n_prim).map(|k| 1.0 / (k + 1) as f64).collect();
            Shell {
                l: ls[i],
                pure: true,
                center: centres[i],
                atom: i,
                exponents: exps,
                coefficients: coefs,
            }
        })
        .collect();
    let basis = BasisSet::from_shells("bench", shells);
    let engine = EriEngine::new(&basis);
    let mut out = Vec::new();
    let cpu0 = thread_cpu_seconds();
    let start = Instant::now();
    let mut reps = 0usize;
    loop {
        for _ in 0..16 {
            engine.shell_quartet(0, 1, 2, 3, &mut out);
        }
        reps += 16;
        if start.elapsed().as_secs_f64() >= min_seconds {
            break;
        }
    }
    let dt = start.elapsed().as_secs_f64();
    let cpu = thread_cpu_seconds().zip(cpu0).map(|(a, b)| a - b);
    let letters = ['s', 'p', 'd', 'f', 'g', 'h'];
    let n_cart: usize = ls.iter().map(|&l| n_cartesian(l)).product();
    ClassTiming {
        label: format!(
            "({}{}|{}{})",
            letters[ls[0]], letters[ls[1]], letters[ls[2]], letters[ls[3]]
        ),
        primitives_per_shell: n_prim,
        quartets: reps,
        seconds: dt,
        cpu_seconds: cpu,
        integrals_per_s: (out.len() * reps) as f64 / dt,
        primitive_integrals_per_s: (n_cart * n_prim.pow(4) * reps) as f64 / dt,
    }
}

/// Compute every unique shell quartet (8-fold symmetry) not removed by the Schwarz bound
/// at `threshold`, in parallel over bra pairs: one `EriEngine::shell_quartet` call per
/// quartet, or with `ket_batches` one `EriEngine::shell_quartets` call per bra pair.
pub fn all_eris(basis: &BasisSet, threshold: f64, ket_batches: bool) -> MoleculeTiming {
    let t0 = Instant::now();
    let engine = EriEngine::new(basis);
    let setup = t0.elapsed().as_secs_f64();
    let n = engine.n_shells();
    let sch = engine.schwarz();
    let pairs: Vec<(usize, usize)> = (0..n).flat_map(|a| (0..=a).map(move |b| (a, b))).collect();
    let cpu0 = process_cpu_seconds();
    let t1 = Instant::now();
    let per_pair: Vec<(usize, usize, usize, f64)> = pairs
        .par_iter()
        .enumerate()
        .map(|(i, &(a, b))| {
            let mut out = Vec::new();
            let (mut done, mut skipped, mut count, mut sum) = (0, 0, 0, 0.0);
            let sab = sch[a * n + b];
            let mut kets = Vec::new();
            for &(c, d) in &pairs[..=i] {
                if sab * sch[c * n + d] < threshold {
                    skipped += 1;
                    continue;
                }
                if ket_batches {
                    kets.push((c, d));
                    continue;
                }
                engine.shell_quartet(a, b, c, d, &mut out);
                done += 1;
                count += out.len();
                sum += out.iter().map(|x| x.abs()).sum::<f64>();
            }
            if ket_batches {
                engine.shell_quartets(a, b, &kets, &mut out);
                done += kets.len();
                count += out.len();
                sum += out.iter().map(|x| x.abs()).sum::<f64>();
            }
            (done, skipped, count, sum)
        })
        .collect();
    let dt = t1.elapsed().as_secs_f64();
    let cpu = process_cpu_seconds().zip(cpu0).map(|(a, b)| a - b);
    let (mut done, mut skipped, mut count, mut sum) = (0, 0, 0, 0.0);
    for (d, s, c, x) in per_pair {
        done += d;
        skipped += s;
        count += c;
        sum += x;
    }
    MoleculeTiming {
        n_basis: basis.n_basis,
        n_shells: n,
        threads: rayon::current_num_threads(),
        setup_seconds: setup,
        seconds: dt,
        cpu_seconds: cpu,
        quartets_computed: done,
        quartets_screened: skipped,
        integrals: count,
        integrals_per_s: count as f64 / dt,
        checksum: sum,
    }
}
