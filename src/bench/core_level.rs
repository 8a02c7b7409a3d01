//! Benchmark workload for `bandcast bench`: the carbon 1s levels of an all-trans
//! n-alkane CnH2n+2 built from standard geometry (`chem::alkane`).

use std::time::Instant;

use crate::basis;
use crate::chem::alkane::alkane;
use crate::core_level::{predict, CoreOptions, CoreResult};
use crate::error::Result;

/// What the workload measured.
#[derive(Debug, Clone)]
pub struct CoreBenchReport {
    pub molecule: String,
    pub n_atoms: usize,
    pub n_holes: usize,
    pub seconds: f64,
    pub result: CoreResult,
}

/// The 1s levels `opts` asks for (normally `TargetSelection::Element(6)`: every carbon) of
/// CnH2n+2 in the basis set named `basis` (loading the set is not timed).
pub fn run_core_bench(
    n_carbons: usize,
    basis: &str,
    opts: &CoreOptions,
) -> Result<CoreBenchReport> {
    let mol = alkane(n_carbons);
    let set = basis::load(basis, &mol, None)?;
    let t = Instant::now();
    let result = predict(&mol, &set, opts)?;
    Ok(CoreBenchReport {
        molecule: mol.name.clone(),
        n_atoms: mol.atoms.len(),
        n_holes: result.core_levels.len(),
        seconds: t.elapsed().as_secs_f64(),
        result,
    })
}
