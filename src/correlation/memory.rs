//! Memory estimates for the correlated methods, made before anything large is allocated.
//!
//! Counts are in f64 words of the arrays each stage holds at its peak (MO factors, stored
//! integral blocks, amplitudes, DIIS history, H̄ elements, Davidson space) plus the
//! temporaries of the largest contraction. The four-index (vv|vv) block is never part of a
//! plan for large virtual spaces: the ladder is contracted directly from the factors.

use crate::{Error, Result};

/// Which correlated method the plan is for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Stage {
    /// EOM-IP-CCSD (CCSD ground state, then EOM).
    EomCcsd,
    /// EOM-IP-MBPT2 (first-order T2, then EOM).
    EomMbpt2,
}

#[derive(Debug, Clone)]
pub struct MemoryPlan {
    /// Peak estimate (bytes).
    pub peak_bytes: f64,
    /// Whether the (ov|vv) block is stored (otherwise rebuilt in occupied slices).
    pub store_ovvv: bool,
    /// Whether the (vv|vv) block is stored (small virtual spaces only).
    pub store_vvvv: bool,
    /// Whether (vv|vv) is stored packed with its 8-fold symmetry (v⁴/8 words) for the CCSD
    /// ladder; otherwise the ladder is rebuilt from the factors every iteration.
    pub store_vvvv_packed: bool,
    /// Largest number of Cholesky vectors the budget allows.
    pub max_cholesky_vectors: usize,
    pub budget_bytes: f64,
}

/// Memory available to this process: `MemAvailable` from /proc/meminfo (Linux), or 4 GiB
/// when it cannot be read.
pub fn available_bytes() -> f64 {
    if let Ok(s) = std::fs::read_to_string("/proc/meminfo") {
        for line in s.lines() {
            if let Some(rest) = line.strip_prefix("MemAvailable:") {
                if let Some(kb) = rest
                    .split_whitespace()
                    .next()
                    .and_then(|x| x.parse::<f64>().ok())
                {
                    return kb * 1024.0;
                }
            }
        }
    }
    4.0 * 1024.0 * 1024.0 * 1024.0
}

/// Expected number of Cholesky vectors for `n` basis functions at threshold `tau`
/// (water/def2-TZVPP needs 6.1 n at 1e-5; the factor grows slowly as the threshold
/// tightens and falls slowly with molecular size).
pub fn expected_cholesky_vectors(n: usize, tau: f64) -> usize {
    let f = 5.0 + (1e-4 / tau.max(1e-14)).log10().max(0.0);
    ((f * n as f64) as usize).min(n * (n + 1) / 2).max(1)
}

fn gib(b: f64) -> String {
    format!("{:.2} GiB", b / (1024.0 * 1024.0 * 1024.0))
}

/// Plan a job, or refuse with `Error::TooLarge` naming the cheaper method to try.
#[allow(clippy::too_many_arguments)]
pub fn plan(
    stage: Stage,
    n_basis: usize,
    nocc: usize,
    nvir: usize,
    cholesky_tau: f64,
    diis_size: usize,
    davidson_space: usize,
    budget_bytes: f64,
) -> Result<MemoryPlan> {
    let w = 8.0;
    let (n, o, v) = (n_basis as f64, nocc as f64, nvir as f64);
    let npair = n * (n + 1.0) / 2.0;
    let nq = expected_cholesky_vectors(n_basis, cholesky_tau) as f64;
    let o2v2 = o * o * v * v;
    // Cholesky stage: AO vectors + one column batch (256 columns, twice for the gather).
    let chol = nq * npair + 2.0 * 256.0 * npair;
    // MO factors and stored blocks with at most two virtual indices.
    let factors = nq * (o * o + o * v + v * v);
    let blocks = o.powi(4) + 2.0 * o.powi(3) * v + 3.0 * o2v2;
    // Ground state.
    let ground = match stage {
        Stage::EomCcsd => (12.0 + 2.0 * diis_size as f64) * o2v2 + 3.0 * v * v * v,
        Stage::EomMbpt2 => 3.0 * o2v2,
    };
    // EOM: H̄ blocks (wovvo, wovov, woovv, t2, wovoo) + contraction temporaries + Davidson.
    let dim = o + o * o * v;
    let eom = 7.0 * o2v2 + 2.0 * o.powi(3) * v + 2.0 * davidson_space as f64 * dim;
    let ovvv_slice = 2.0 * 4.0 * v * v * v;
    let base = (factors + blocks + ground.max(eom) + ovvv_slice) * w;
    let peak_no_store = base.max((chol + factors) * w);
    if peak_no_store > budget_bytes {
        let hint = match stage {
            Stage::EomCcsd => "try --method eom-mp2 (EOM-IP-MBPT2) or ep2, or a smaller basis",
            Stage::EomMbpt2 => "try --method ep2, or a smaller basis",
        };
        return Err(Error::TooLarge(format!(
            "this job needs about {} of memory ({} basis functions, {} correlated occupied and \
             {} virtual orbitals, ~{} Cholesky vectors) but {} is available; {hint}",
            gib(peak_no_store),
            n_basis,
            nocc,
            nvir,
            nq as usize,
            gib(budget_bytes)
        )));
    }
    let ovvv = o * v * v * v * w;
    let store_ovvv = peak_no_store + ovvv < 0.6 * budget_bytes;
    let vvvv = v.powi(4) * w;
    let store_vvvv = v <= 120.0 && peak_no_store + ovvv + 2.0 * vvvv < 0.5 * budget_bytes;
    let mut peak = peak_no_store;
    if store_ovvv {
        peak += ovvv;
    }
    if store_vvvv {
        peak += 2.0 * vvvv;
    }
    let packed = super::integrals::PackedVvvv::words(nvir) * w;
    let store_vvvv_packed =
        stage == Stage::EomCcsd && !store_vvvv && peak + packed < 0.85 * budget_bytes;
    if store_vvvv_packed {
        peak += packed;
    }
    let room = (budget_bytes - factors * w - 2.0 * 256.0 * npair * w).max(0.0);
    let max_cholesky_vectors = ((room / (npair * w)) as usize).min(npair as usize).max(1);
    Ok(MemoryPlan {
        peak_bytes: peak,
        store_ovvv,
        store_vvvv,
        store_vvvv_packed,
        max_cholesky_vectors,
        budget_bytes,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The particle–particle block of benzene/def2-TZVPP (~200 virtuals, ~13 GB as a plain
    /// array) is never planned for storage, and a tiny budget is refused with a hint.
    #[test]
    fn plans_and_refusals() {
        let p = plan(Stage::EomCcsd, 270, 15, 249, 1e-5, 8, 60, 16e9).unwrap();
        assert!(!p.store_vvvv && p.store_vvvv_packed);
        let p = plan(Stage::EomCcsd, 270, 15, 249, 1e-5, 8, 60, 8e9).unwrap();
        assert!(!p.store_vvvv && !p.store_vvvv_packed);
        assert!(p.peak_bytes < 16e9);
        let e = plan(Stage::EomCcsd, 270, 15, 249, 1e-5, 8, 60, 0.2e9).unwrap_err();
        assert!(matches!(e, Error::TooLarge(_)));
        assert!(e.to_string().contains("eom-mp2"));
        let small = plan(Stage::EomCcsd, 24, 4, 19, 1e-8, 8, 60, 16e9).unwrap();
        assert!(small.store_vvvv && small.store_ovvv);
    }
}
