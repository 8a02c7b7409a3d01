//! Line shapes, each normalised to unit area over the whole energy axis.
//!
//! - Gaussian of full width at half maximum Γ_G: σ = Γ_G / (2√(2 ln 2)).
//! - Lorentzian (Cauchy) of FWHM Γ_L: γ = Γ_L/2, L(x) = γ / (π (x² + γ²)).
//! - Voigt (their convolution): V(x) = Re w((x + iγ)/(σ√2)) / (σ√(2π)), w the Faddeeva
//!   function (Armstrong, J. Quant. Spectrosc. Radiat. Transfer 7 (1967) 61, eq. 5; common
//!   practice), evaluated by Weideman's algorithm in `faddeeva.rs`.
//!
//! Instrumental resolution is Gaussian; core-hole lifetime broadening is Lorentzian; a
//! band with both is a Voigt (common practice in photoelectron spectroscopy).

use serde::Serialize;

use super::faddeeva::{faddeeva, Complex};

/// 2√(2 ln 2): FWHM of a Gaussian over its standard deviation.
pub const FWHM_PER_SIGMA: f64 = 2.354_820_045_030_949_3;

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Shape {
    Gaussian,
    Lorentzian,
    Voigt,
}

impl Shape {
    pub fn parse(s: &str) -> Option<Shape> {
        match s.to_ascii_lowercase().as_str() {
            "gaussian" => Some(Shape::Gaussian),
            "lorentzian" => Some(Shape::Lorentzian),
            "voigt" => Some(Shape::Voigt),
            _ => None,
        }
    }
    pub fn name(self) -> &'static str {
        match self {
            Shape::Gaussian => "gaussian",
            Shape::Lorentzian => "lorentzian",
            Shape::Voigt => "voigt",
        }
    }
}

/// Unit-area Gaussian of FWHM `fwhm` at offset `x` from its centre.
pub fn gaussian(x: f64, fwhm: f64) -> f64 {
    let sigma = fwhm / FWHM_PER_SIGMA;
    (-0.5 * (x / sigma).powi(2)).exp() / (sigma * (2.0 * std::f64::consts::PI).sqrt())
}

/// Unit-area Lorentzian of FWHM `fwhm` at offset `x`.
pub fn lorentzian(x: f64, fwhm: f64) -> f64 {
    let g = 0.5 * fwhm;
    g / (std::f64::consts::PI * (x * x + g * g))
}

/// Unit-area Voigt profile: Gaussian FWHM `g_fwhm` convolved with Lorentzian FWHM `l_fwhm`.
/// Falls back to the pure shape when one width is zero.
pub fn voigt(x: f64, g_fwhm: f64, l_fwhm: f64) -> f64 {
    if l_fwhm <= 0.0 {
        return gaussian(x, g_fwhm);
    }
    if g_fwhm <= 0.0 {
        return lorentzian(x, l_fwhm);
    }
    let sigma = g_fwhm / FWHM_PER_SIGMA;
    let gamma = 0.5 * l_fwhm;
    let s = sigma * std::f64::consts::SQRT_2;
    let w = faddeeva(Complex::new(x / s, gamma / s));
    w.re / (sigma * (2.0 * std::f64::consts::PI).sqrt())
}

/// Full width at half maximum of a Voigt profile, Olivero & Longbothum, J. Quant. Spectrosc.
/// Radiat. Transfer 17 (1977) 233: f_V ≈ 0.5346 f_L + √(0.2166 f_L² + f_G²), accurate to
/// about 0.02 % (their statement; from memory). Used only to choose grid steps and margins.
pub fn voigt_fwhm(g_fwhm: f64, l_fwhm: f64) -> f64 {
    0.5346 * l_fwhm + (0.2166 * l_fwhm * l_fwhm + g_fwhm * g_fwhm).sqrt()
}

/// A line of the given shape. For `Shape::Gaussian` the Lorentzian width is ignored, for
/// `Shape::Lorentzian` the Gaussian width is used as the Lorentzian FWHM plus the lifetime
/// width, for `Shape::Voigt` both are used.
pub fn profile(shape: Shape, x: f64, g_fwhm: f64, l_fwhm: f64) -> f64 {
    match shape {
        Shape::Gaussian => gaussian(x, g_fwhm),
        Shape::Lorentzian => lorentzian(x, g_fwhm + l_fwhm),
        Shape::Voigt => voigt(x, g_fwhm, l_fwhm),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn half_maximum_at_half_width() {
        // Definition of FWHM (common practice).
        let g0 = gaussian(0.0, 0.5);
        assert!((gaussian(0.25, 0.5) / g0 - 0.5).abs() < 1e-12);
        let l0 = lorentzian(0.0, 0.5);
        assert!((lorentzian(0.25, 0.5) / l0 - 0.5).abs() < 1e-12);
    }

    #[test]
    fn voigt_limits() {
        // A Voigt with a tiny Lorentzian is the Gaussian, with a tiny Gaussian the Lorentzian.
        for &x in &[0.0, 0.1, 0.3, 0.7] {
            assert!((voigt(x, 0.4, 1e-7) - gaussian(x, 0.4)).abs() < 1e-5);
            assert!((voigt(x, 1e-6, 0.4) - lorentzian(x, 0.4)).abs() < 1e-4);
        }
    }
}
