//! The confidence of an assigned pair: a calibrated probability that the pair is right.
//!
//! Evidence (assign.rs): the margin feature m = Δ/(Δ + τ) (Δ the extra cost of the best
//! assignment without the pair, τ = 0.25 eV), the method's single-band scatter σ
//! (method_error.rs; 0.7 eV, Koopmans', when the method is unknown; the residual itself is
//! already in Δ, and a residual over σ fitted the wrong way round: broad bands scatter the
//! peak positions of accurate methods more than their σ), the intensity
//! mismatch |ln r| (capped at 3; 0 when unknown) and whether the pair changes when the
//! prediction moves within its method's error (s = 0/1), and the shape mismatch h
//! (band_shape.rs: width, and with a resolved vibronic progression its spacing and visible
//! quanta; capped at 2; 0 when unknown). The probability is logistic:
//! p = 1 / (1 + exp(−(b0 + b1 m + b2 min(σ, 2) + b3 min(|ln r|, 3) + b4 s + b5 min(h, 2)))).
//! b5 is fitted on widths only (the synthetic set has no vibronic structure): the
//! progression terms borrow the width's coefficient.
//!
//! The coefficients `COEF` were fitted by maximum likelihood (Newton's method) on the
//! training half of a synthetic set: He I band positions, relative intensities and widths
//! of water, N2, CO, HCN and benzene (tests/data/he1-bands.csv, with its sources), made into
//! traces at several resolutions, noise levels, calibration shifts and with missing bands,
//! against predictions drawn as published position + method mean error + normal scatter of
//! the method's s.d. (koopmans, ep2, eom-mp2, eom-ccsd). How to refit:
//! `cargo test --release --test assign_calibration -- --ignored --nocapture fit_confidence`
//! prints the coefficients; the held-back half is checked by the same file's
//! `calibration_on_held_back_half` (fraction right per confidence bin within 0.1 of the
//! bin's mean confidence). The table is in docs/spectrum-and-assign.md.

/// Evidence of one pair.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PairEvidence {
    /// Δ/(Δ + τ).
    pub margin_feature: f64,
    /// Single-band scatter σ of the method (eV), if the method is known.
    pub sigma_ev: Option<f64>,
    /// ln(measured relative area / predicted relative intensity), if both are known.
    pub intensity_log_ratio: Option<f64>,
    /// The pair changes when the prediction moves within its method's error.
    pub swaps: bool,
    /// Shape mismatch (band_shape.rs), when known.
    pub shape_mismatch: Option<f64>,
}

/// Number of features (and coefficients).
pub const FEATURES: usize = 6;

/// Fitted coefficients b0..b5 (see the module text for how they were made).
pub const COEF: [f64; FEATURES] = [
    1.5934308889451478,
    3.8813315775894885,
    -3.4194777485789856,
    -0.7101487295267349,
    -1.197653590971722,
    -0.10238266550270606,
];

/// σ assumed for a method without error statistics (eV).
pub const UNKNOWN_SIGMA_EV: f64 = 0.7;

/// The feature vector (1, m, min(σ, 2), min(|ln r|,3), s, min(h, 2)).
pub fn features(e: &PairEvidence) -> [f64; FEATURES] {
    [
        1.0,
        e.margin_feature,
        e.sigma_ev.unwrap_or(UNKNOWN_SIGMA_EV).min(2.0),
        e.intensity_log_ratio.map_or(0.0, |r| r.abs().min(3.0)),
        if e.swaps { 1.0 } else { 0.0 },
        e.shape_mismatch.map_or(0.0, |h| h.min(2.0)),
    ]
}

/// Logistic probability for coefficients `b`.
pub fn logistic(b: &[f64; FEATURES], x: &[f64; FEATURES]) -> f64 {
    let t: f64 = b.iter().zip(x).map(|(b, x)| b * x).sum();
    1.0 / (1.0 + (-t).exp())
}

/// The calibrated confidence of a pair.
pub fn calibrated(e: &PairEvidence) -> f64 {
    logistic(&COEF, &features(e))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn more_evidence_more_confidence() {
        let base = PairEvidence {
            margin_feature: 0.8,
            sigma_ev: Some(0.3),
            intensity_log_ratio: Some(0.1),
            swaps: false,
            shape_mismatch: Some(0.1),
        };
        let weaker = PairEvidence {
            margin_feature: 0.2,
            ..base
        };
        assert!(calibrated(&base) > calibrated(&weaker));
        let swapped = PairEvidence {
            swaps: true,
            ..base
        };
        assert!(calibrated(&base) >= calibrated(&swapped));
    }
}
