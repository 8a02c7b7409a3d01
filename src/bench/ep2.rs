//! `bandcast bench ep2`: time the SCF and the EP2 step (MO integral blocks + Dyson solves)
//! for the valence bands of one molecule. Timings are measured here, never in tests.

use std::time::Instant;

use crate::basis::BasisSet;
use crate::chem::Molecule;
use crate::error::Result;
use crate::ionization::method::Method;
use crate::ionization::valence::{predict_with, ValenceOptions};
use crate::scf::{Reference, ScfOptions};
use crate::system::process_cpu_seconds;

/// What one EP2 benchmark run measured.
#[derive(Debug, Clone)]
pub struct Ep2Bench {
    pub n_basis: usize,
    pub n_bands: usize,
    pub scf_seconds: f64,
    /// EP2 for all valence bands (integral blocks, Newton iterations, labels).
    pub ep2_seconds: f64,
    /// CPU seconds (all threads) of the SCF and the EP2 step, when the OS tells.
    pub scf_cpu_seconds: Option<f64>,
    pub ep2_cpu_seconds: Option<f64>,
    pub homo_ie_ev: f64,
    pub threads: usize,
}

impl std::fmt::Display for Ep2Bench {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "ep2: {} basis functions, {} valence bands, {} threads: SCF {:.2} s wall{}, EP2 \
             {:.2} s wall{} (HOMO IE {:.3} eV)",
            self.n_basis,
            self.n_bands,
            self.threads,
            self.scf_seconds,
            cpu(self.scf_cpu_seconds),
            self.ep2_seconds,
            cpu(self.ep2_cpu_seconds),
            self.homo_ie_ev
        )
    }
}

fn cpu(s: Option<f64>) -> String {
    s.map(|c| format!(" / {c:.1} s CPU")).unwrap_or_default()
}

/// Run the closed-shell SCF, then EP2 for every valence band, timing each.
pub fn run_ep2_bench(mol: &Molecule, basis: &BasisSet) -> Result<Ep2Bench> {
    let c0 = process_cpu_seconds();
    let t0 = Instant::now();
    let scf = ScfOptions {
        reference: Reference::Rhf,
        ..Default::default()
    };
    let wf = crate::scf::run(mol, basis, &scf)?;
    let scf_seconds = t0.elapsed().as_secs_f64();
    let c1 = process_cpu_seconds();
    let t1 = Instant::now();
    let r = predict_with(
        mol,
        basis,
        &wf,
        &ValenceOptions {
            method: Method::Ep2,
            ..Default::default()
        },
    )?;
    let ep2_seconds = t1.elapsed().as_secs_f64();
    let c2 = process_cpu_seconds();
    Ok(Ep2Bench {
        n_basis: basis.n_basis,
        n_bands: r.bands.len(),
        scf_seconds,
        ep2_seconds,
        scf_cpu_seconds: c1.zip(c0).map(|(b, a)| b - a),
        ep2_cpu_seconds: c2.zip(c1).map(|(b, a)| b - a),
        homo_ie_ev: r.bands.first().map(|b| b.ie_ev).unwrap_or(f64::NAN),
        threads: rayon::current_num_threads(),
    })
}
