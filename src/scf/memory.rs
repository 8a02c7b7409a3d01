//! The smallest memory an SCF run needs, estimated from the basis size before any integral
//! is computed: the direct Fock build stores no two-electron integrals, but it still holds
//! the N×N matrices (overlap, core Hamiltonian, orthogonaliser, Fock, density, orbitals,
//! the DIIS history of Fock and error matrices, one Fock accumulator per worker thread and
//! a few temporaries for the diagonalisation). Twice the spin-dependent ones for UHF/ROHF.
//! In-core integrals and the density-fitting start are optional above this floor (they are
//! skipped when they do not fit), so a budget below it is refused outright.

use super::options::ScfOptions;
use super::wavefunction::Reference;
use crate::system::{format_bytes, StageEstimate};
use crate::{Error, Result};

/// Words of N×N matrices a direct SCF holds at its peak.
fn matrix_count(reference: Reference, diis_space: usize, threads: usize) -> f64 {
    // S, H, X (orthogonaliser), and about four diagonalisation temporaries
    let shared = 7.0;
    // F, D, C and the DIIS Fock + error pairs, per spin
    let per_spin = 3.0 + 2.0 * diis_space as f64;
    let spins = match reference {
        Reference::Rhf => 1.0,
        Reference::Uhf | Reference::Rohf => 2.0,
    };
    shared + spins * (per_spin + threads as f64)
}

/// Estimated peak bytes of a direct SCF with `n_basis` functions.
pub fn direct_floor_bytes(n_basis: usize, opts: &ScfOptions) -> f64 {
    let n = n_basis as f64;
    let threads = rayon::current_num_threads();
    8.0 * n * n * matrix_count(opts.reference, opts.diis_space, threads)
}

/// Upper bound of the in-core integral store (bytes) before any screening: every unique
/// (μν|λσ) with μ≥ν, λ≥σ, μν≥λσ stored as one f64, plus 16 bytes of bookkeeping per
/// shell quartet (the layout of `fock::incore`). Schwarz screening makes the real store
/// smaller; it is measured when the SCF starts.
pub fn in_core_bound_bytes(n_basis: usize, n_shells: usize) -> f64 {
    let npair = n_basis as f64 * (n_basis as f64 + 1.0) / 2.0;
    let spair = n_shells as f64 * (n_shells as f64 + 1.0) / 2.0;
    8.0 * npair * (npair + 1.0) / 2.0 + 16.0 * spair * (spair + 1.0) / 2.0
}

/// The SCF's stage estimates, before any integral: the direct floor (needed) and the
/// unscreened bound of the in-core store (optional: the SCF stores the integrals only when
/// the screened store fits the budget, and computes them on the fly otherwise).
pub fn estimates(n_basis: usize, n_shells: usize, opts: &ScfOptions) -> Vec<StageEstimate> {
    vec![
        StageEstimate::needed(
            "SCF matrices (integrals computed on the fly)",
            direct_floor_bytes(n_basis, opts),
        ),
        StageEstimate::optional(
            "SCF in-core integral store (before screening, at most)",
            in_core_bound_bytes(n_basis, n_shells),
        ),
    ]
}

/// Refuse (`Error::TooLarge`) when even a direct SCF cannot fit `opts.memory_budget_bytes`;
/// otherwise return the floor estimate in bytes.
pub fn check(n_basis: usize, opts: &ScfOptions) -> Result<f64> {
    let need = direct_floor_bytes(n_basis, opts);
    let budget = opts.memory_budget_bytes as f64;
    if need > budget {
        return Err(Error::TooLarge(format!(
            "the SCF needs at least {} even with integrals computed on the fly ({n_basis} basis \
             functions), over the memory budget of {}; raise --memory or use a smaller basis",
            format_bytes(need),
            format_bytes(budget)
        )));
    }
    Ok(need)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn floor_grows_as_n_squared_and_refuses_a_tiny_budget() {
        // Exact condition: the floor is a fixed number of N×N matrices, so doubling N
        // multiplies it by four.
        let opts = ScfOptions::default();
        let a = direct_floor_bytes(100, &opts);
        let b = direct_floor_bytes(200, &opts);
        assert!((b / a - 4.0).abs() < 1e-12);
        let tiny = ScfOptions {
            memory_budget_bytes: 1 << 20,
            ..ScfOptions::default()
        };
        assert!(matches!(check(1000, &tiny), Err(Error::TooLarge(_))));
        assert!(check(10, &tiny).is_ok());
    }

    #[test]
    fn in_core_bound_counts_unique_quartets() {
        // Exact condition: n functions have n(n+1)/2 pairs and P(P+1)/2 unique pairs of
        // pairs (8-fold permutational symmetry of real (μν|λσ)); 2 functions → 3 pairs → 6.
        assert_eq!(in_core_bound_bytes(2, 1), 8.0 * 6.0 + 16.0);
        let e = estimates(24, 12, &ScfOptions::default());
        assert!(!e[0].optional && e[1].optional);
    }
}
