//! Schwarz screening: |(ab|cd)| ≤ √|(ab|ab)| √|(cd|cd)| (Cauchy–Schwarz inequality for the
//! positive-definite Coulomb metric; common practice). The per-shell-pair bounds are
//! computed once by `EriEngine::new` and returned by `EriEngine::schwarz`.

/// Whether the quartet (ab|cd) can be skipped at threshold `tol` given the engine's bounds
/// (n_shells × n_shells, row-major).
#[inline]
pub fn negligible(
    bounds: &[f64],
    n_shells: usize,
    a: usize,
    b: usize,
    c: usize,
    d: usize,
    tol: f64,
) -> bool {
    bounds[a * n_shells + b] * bounds[c * n_shells + d] < tol
}

/// Same test including a density factor (for direct Fock builds): bound × max|D| < tol.
#[inline]
pub fn negligible_with_density(bound_ab: f64, bound_cd: f64, dmax: f64, tol: f64) -> bool {
    bound_ab * bound_cd * dmax < tol
}
