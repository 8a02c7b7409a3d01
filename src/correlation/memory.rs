//! Memory estimates for the correlated methods, made before anything large is allocated.
//!
//! Counts are in f64 words of the arrays each stage holds at its peak: the factor stage
//! (three-centre blocks or Cholesky vectors), the MO factors and the stored blocks with at
//! most two virtual indices, the amplitudes and DIIS history of the ground state, the H̄
//! elements and Davidson space of the EOM stage, and the temporaries of the largest
//! contractions (about three o²v² arrays). Two optional stores follow if they fit: the
//! particle–particle ladder integrals V± (v⁴/4 words, ladder.rs; CCSD only) and the (ov|vv)
//! block (o v³ words). Without them the same quantities are rebuilt from the factors.

use crate::system::StageEstimate;
use crate::{Error, Result};

/// Which correlated method the plan is for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Stage {
    /// EOM-IP-CCSD (CCSD ground state, then EOM).
    EomCcsd,
    /// EOM-IP-MBPT2 (first-order T2, then EOM).
    EomMbpt2,
}

/// How the factors are produced (decides the first stage's memory).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FactorRoute {
    /// Density fitting with this many auxiliary functions.
    Fitted(usize),
    /// Cholesky decomposition; expected number of vectors.
    Cholesky(usize),
}

impl FactorRoute {
    pub fn rank(self) -> usize {
        match self {
            FactorRoute::Fitted(r) | FactorRoute::Cholesky(r) => r,
        }
    }
}

#[derive(Debug, Clone)]
pub struct MemoryPlan {
    /// Peak estimate (bytes).
    pub peak_bytes: f64,
    /// Whether the (ov|vv) block is stored (otherwise rebuilt in occupied slices).
    pub store_ovvv: bool,
    /// Whether the ladder integrals V± are stored (otherwise generated every CCSD
    /// iteration from the factors).
    pub store_vvvv: bool,
    /// Largest number of Cholesky vectors the budget allows.
    pub max_cholesky_vectors: usize,
    pub budget_bytes: f64,
    /// The parts of the peak, for `--verbose` (bytes each; the peak is not their sum, as
    /// the factor stage and the amplitude/EOM stages do not overlap).
    pub stages: Vec<StageEstimate>,
}

/// Expected number of Cholesky vectors for `n` basis functions at threshold `tau`
/// (water/def2-TZVPP needs 6.1 n at 1e-5; the factor grows slowly as the threshold
/// tightens and falls slowly with molecular size).
pub fn expected_cholesky_vectors(n: usize, tau: f64) -> usize {
    let f = 5.0 + (1e-4 / tau.max(1e-14)).log10().max(0.0);
    ((f * n as f64) as usize).min(n * (n + 1) / 2).max(1)
}

fn gib(b: f64) -> String {
    crate::system::format_bytes(b)
}

/// Largest (ov|vv) slice the passes over it hold at once (words).
pub const OVVV_SLICE_WORDS: usize = 1 << 24;

/// Plan a job, or refuse with `Error::TooLarge` naming the cheaper method to try.
#[allow(clippy::too_many_arguments)]
pub fn plan(
    stage: Stage,
    n_basis: usize,
    nocc: usize,
    nvir: usize,
    route: FactorRoute,
    diis_size: usize,
    davidson_space: usize,
    budget_bytes: f64,
) -> Result<MemoryPlan> {
    let w = 8.0;
    let (n, o, v) = (n_basis as f64, nocc as f64, nvir as f64);
    let npair = n * (n + 1.0) / 2.0;
    let nq = route.rank() as f64;
    let o2v2 = o * o * v * v;
    let factors = nq * (o + v) * (o + v);
    let factor_stage = match route {
        FactorRoute::Fitted(_) => super::density_fit::peak_words(
            n_basis,
            route.rank(),
            nocc,
            nvir,
            rayon::current_num_threads(),
        ),
        // AO vectors + one column batch (256 columns, twice for the gather), then the MO
        // factors next to the AO vectors
        FactorRoute::Cholesky(_) => nq * npair + 2.0 * 256.0 * npair + factors,
    };
    // Stored blocks with at most two virtual indices: oooo, ovoo, ovov, oovv, lovov.
    let blocks = o.powi(4) + o.powi(3) * v + 3.0 * o2v2;
    // One (ov|vv) slice and its two reordered copies.
    let slice = 3.0 * (o * v * v * v).min(OVVV_SLICE_WORDS as f64).max(v * v * v);
    let ground = match stage {
        // amplitudes, residuals, intermediates and einsum temporaries (about 24 arrays at
        // the peak of a residual, measured on benzene/def2-TZVPP); DIIS vectors + errors
        Stage::EomCcsd => (24.0 + 2.0 * diis_size as f64) * o2v2,
        // amplitudes and denominators
        Stage::EomMbpt2 => 2.0 * o2v2,
    };
    // H̄ construction (amplitudes, 2 t2 combinations, 4 H̄ blocks, temporaries) and Davidson.
    let dim = o + o * o * v;
    let eom = 8.0 * o2v2 + 4.0 * o.powi(3) * v + 2.0 * davidson_space as f64 * dim;
    // generating ladder blocks every iteration (when they are not stored)
    let ladder_scratch = match stage {
        Stage::EomCcsd => super::ladder::block_scratch_words(nvir),
        Stage::EomMbpt2 => 0.0,
    };
    let base = factors + blocks + slice + ground.max(eom);
    let peak_min = (base + ladder_scratch).max(factor_stage) * w;
    if peak_min > budget_bytes {
        let hint = match stage {
            Stage::EomCcsd => "try --method eom-mp2 (EOM-IP-MBPT2) or ep2, or a smaller basis",
            Stage::EomMbpt2 => "try --method ep2, or a smaller basis",
        };
        let factor_text = match route {
            FactorRoute::Fitted(r) => format!("{r} auxiliary functions"),
            FactorRoute::Cholesky(r) => format!("~{r} Cholesky vectors"),
        };
        return Err(Error::TooLarge(format!(
            "this job needs about {} of memory ({} basis functions, {} correlated occupied and \
             {} virtual orbitals, {factor_text}) but the budget is {}; {hint}",
            gib(peak_min),
            n_basis,
            nocc,
            nvir,
            gib(budget_bytes)
        )));
    }
    // Optional stores, the one saving more time per byte first; keep 10 % in reserve.
    let room = 0.9 * budget_bytes;
    let mut peak = peak_min;
    let ladder = super::ladder::stored_words(nvir);
    // stored: no per-iteration scratch; the build holds one block's scratch next to them
    let with_ladder = (base + ladder)
        .max(factors + blocks + ladder + ladder_scratch)
        .max(factor_stage)
        * w;
    let store_vvvv = stage == Stage::EomCcsd && with_ladder <= room;
    if store_vvvv {
        peak = with_ladder;
    }
    let ovvv = o * v * v * v * w;
    let store_ovvv = peak + ovvv <= room;
    if store_ovvv {
        peak += ovvv;
    }
    let left = (budget_bytes - 2.0 * 256.0 * npair * w - factors * w).max(0.0);
    let max_cholesky_vectors = ((left / (npair * w)) as usize).min(npair as usize).max(1);
    let name = match stage {
        Stage::EomCcsd => "eom-ccsd",
        Stage::EomMbpt2 => "eom-mp2",
    };
    let mut stages = vec![
        StageEstimate::needed(
            format!(
                "{name}: two-electron factors ({})",
                match route {
                    FactorRoute::Fitted(r) => format!("{r} fitting functions"),
                    FactorRoute::Cholesky(r) => format!("~{r} Cholesky vectors"),
                }
            ),
            factor_stage * w,
        ),
        StageEstimate::needed(
            format!("{name}: MO integrals (factors and blocks with ≤ 2 virtual indices)"),
            (factors + blocks + slice) * w,
        ),
        StageEstimate::needed(
            format!(
                "{name}: {}",
                match stage {
                    Stage::EomCcsd => "CC amplitudes, residuals and DIIS history",
                    Stage::EomMbpt2 => "first-order amplitudes",
                }
            ),
            ground * w,
        ),
        StageEstimate::needed(
            format!("{name}: EOM H̄ blocks and Davidson vectors"),
            eom * w,
        ),
    ];
    if stage == Stage::EomCcsd {
        stages.push(StageEstimate::optional(
            format!("{name}: stored ladder integrals (vv|vv)"),
            ladder * w,
        ));
    }
    stages.push(StageEstimate::optional(
        format!("{name}: stored (ov|vv) block"),
        ovvv,
    ));
    stages.push(StageEstimate::needed(
        format!(
            "{name}: peak as planned ({}{})",
            if store_vvvv {
                "ladder stored"
            } else {
                "ladder rebuilt"
            },
            if store_ovvv { ", (ov|vv) stored" } else { "" }
        ),
        peak,
    ));
    Ok(MemoryPlan {
        stages,
        peak_bytes: peak,
        store_ovvv,
        store_vvvv,
        max_cholesky_vectors,
        budget_bytes,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Benzene/def2-TZVPP (270 functions, 15 correlated occupied, 249 virtual, 636 fitting
    /// functions): the ladder integrals (~7.7 GB) are stored with a 14 GiB budget but not
    /// with 8 GB; a tiny budget is refused with a hint naming the cheaper method.
    #[test]
    fn plans_and_refusals() {
        let ri = FactorRoute::Fitted(636);
        let gib = 1024.0 * 1024.0 * 1024.0;
        let p = plan(Stage::EomCcsd, 270, 15, 249, ri, 8, 60, 14.0 * gib).unwrap();
        assert!(p.store_vvvv);
        assert!(p.peak_bytes < 14.0 * gib);
        let p = plan(Stage::EomCcsd, 270, 15, 249, ri, 8, 60, 8e9).unwrap();
        assert!(!p.store_vvvv && p.peak_bytes < 8e9);
        let e = plan(Stage::EomCcsd, 270, 15, 249, ri, 8, 60, 0.2e9).unwrap_err();
        assert!(matches!(e, Error::TooLarge(_)));
        assert!(e.to_string().contains("eom-mp2"));
        let e = plan(
            Stage::EomMbpt2,
            411,
            28,
            372,
            FactorRoute::Fitted(986),
            8,
            60,
            2e9,
        )
        .unwrap_err();
        assert!(e.to_string().contains("ep2"));
        let chol = FactorRoute::Cholesky(expected_cholesky_vectors(24, 1e-8));
        let small = plan(Stage::EomCcsd, 24, 4, 19, chol, 8, 60, 16e9).unwrap();
        assert!(small.store_vvvv && small.store_ovvv);
    }
}
