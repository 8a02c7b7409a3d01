//! Contraction normalisation.
//!
//! A primitive x^a y^b z^c exp(−α r²) with a + b + c = l has the squared norm
//! (2a−1)!!(2b−1)!!(2c−1)!! / (4α)^l · (π/2α)^{3/2}  (common practice; e.g. Helgaker,
//! Jørgensen & Olsen, *Molecular Electronic-Structure Theory*, eq. 6.6.15).
//! Published coefficients multiply primitives normalised for the axial component x^l;
//! the contraction is then rescaled so that its x^l component has unit norm, and every
//! other Cartesian component gets the extra factor of [`component_factor`] so that it is
//! normalised too.

use crate::basis::cartesian::double_factorial;
use crate::basis::Shell;
use std::f64::consts::PI;

/// Normalisation constant of the primitive x^l exp(−α r²).
pub fn primitive_norm(alpha: f64, l: usize) -> f64 {
    let n2 = (2.0 * alpha / PI).powf(1.5) * (4.0 * alpha).powi(l as i32)
        / double_factorial(2 * l as i64 - 1);
    n2.sqrt()
}

/// Coefficients d_i that multiply the *raw* primitives x^l exp(−α_i r²) so that the
/// contraction Σ d_i x^l exp(−α_i r²) has unit norm.
pub fn contracted_coefficients(shell: &Shell) -> Vec<f64> {
    contracted_coefficients_for(shell.l, &shell.exponents, &shell.coefficients)
}

/// As [`contracted_coefficients`] from the raw parts.
pub fn contracted_coefficients_for(l: usize, exps: &[f64], coefs: &[f64]) -> Vec<f64> {
    let d: Vec<f64> = exps
        .iter()
        .zip(coefs)
        .map(|(&a, &c)| c * primitive_norm(a, l))
        .collect();
    // ⟨x^l e^{-α r²} | x^l e^{-β r²}⟩ = (2l−1)!!/(2p)^l (π/p)^{3/2}, p = α + β.
    let dfl = double_factorial(2 * l as i64 - 1);
    let mut s = 0.0;
    for (i, &ai) in exps.iter().enumerate() {
        for (j, &aj) in exps.iter().enumerate() {
            let p = ai + aj;
            s += d[i] * d[j] * dfl / (2.0 * p).powi(l as i32) * (PI / p).powf(1.5);
        }
    }
    let f = 1.0 / s.sqrt();
    d.into_iter().map(|x| x * f).collect()
}

/// Factor that normalises component x^a y^b z^c relative to the axial x^l one:
/// sqrt((2l−1)!! / ((2a−1)!!(2b−1)!!(2c−1)!!)).
pub fn component_factor(c: [usize; 3]) -> f64 {
    let l = (c[0] + c[1] + c[2]) as i64;
    (double_factorial(2 * l - 1)
        / (double_factorial(2 * c[0] as i64 - 1)
            * double_factorial(2 * c[1] as i64 - 1)
            * double_factorial(2 * c[2] as i64 - 1)))
    .sqrt()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn single_normalised_primitive_keeps_unit_coefficient() {
        // A single primitive with published coefficient 1 must come back as N(α, l).
        for l in 0..5 {
            let d = contracted_coefficients_for(l, &[0.8], &[1.0]);
            assert!((d[0] / primitive_norm(0.8, l) - 1.0).abs() < 1e-14);
        }
        assert_eq!(component_factor([1, 1, 0]), 3f64.sqrt());
        assert_eq!(component_factor([2, 0, 0]), 1.0);
    }
}
