//! Is a measured trace fit to be assigned? The noise level, an inverted trace, negative
//! intensities.
//!
//! Noise: σ = 1.4826 · median|y[i−1] − 2y[i] + y[i+1]| / √6, the median absolute second
//! difference of the raw intensities. A band several points wide barely changes the second
//! difference, white noise of standard deviation σ gives differences of standard deviation
//! √6 σ, and 1.4826 · MAD is σ for normal noise (common practice in signal processing).
//! A peak must stand `NOISE_K` = 4 σ above its surroundings (prominence) to count; below
//! that a smoothed noise ripple could pass for a band.
//!
//! Inverted: after the background is removed, a trace whose deepest dip is more than twice
//! its highest peak and stands above the noise is a sign-inverted trace (photoelectron
//! counts are never below the background), an input error. Raw intensities below
//! −`NOISE_K` σ are reported as a warning (an offset or a background subtracted twice).

/// Peaks need a prominence of at least this many noise standard deviations.
pub const NOISE_K: f64 = 4.0;

/// Noise standard deviation of `y` from its second differences (see the module text).
pub fn noise_sigma(y: &[f64]) -> f64 {
    if y.len() < 3 {
        return 0.0;
    }
    let mut d: Vec<f64> = y
        .windows(3)
        .map(|w| (w[0] - 2.0 * w[1] + w[2]).abs())
        .collect();
    d.sort_by(|a, b| a.total_cmp(b));
    let n = d.len();
    let med = if n % 2 == 1 {
        d[n / 2]
    } else {
        0.5 * (d[n / 2 - 1] + d[n / 2])
    };
    1.4826 * med / 6f64.sqrt()
}

/// What the check found (the trace is usable).
#[derive(Debug, Clone, PartialEq)]
pub struct TraceCheck {
    /// Noise standard deviation (intensity units).
    pub noise: f64,
    /// Number of raw points below −NOISE_K σ, and the lowest value.
    pub negative: Option<(usize, f64)>,
}

/// Check a trace: `raw` intensities and the background-free smoothed `signal`.
/// Err: why the trace cannot be used (the caller adds the file).
pub fn check_trace(raw: &[f64], signal: &[f64]) -> Result<TraceCheck, String> {
    let noise = noise_sigma(raw);
    let up = signal.iter().cloned().fold(f64::NEG_INFINITY, f64::max);
    let down = -signal.iter().cloned().fold(f64::INFINITY, f64::min);
    if down > 2.0 * up.max(0.0) && down > NOISE_K * noise {
        return Err(format!(
            "the trace looks inverted: its deepest dip ({down:.3e} below the background) is more \
             than twice its highest peak ({:.3e}); photoelectron intensities rise above the \
             background, so the sign of the intensity column is probably flipped",
            up.max(0.0)
        ));
    }
    let neg: Vec<f64> = raw
        .iter()
        .cloned()
        .filter(|&v| v < -NOISE_K * noise && v < 0.0)
        .collect();
    let negative =
        (!neg.is_empty()).then(|| (neg.len(), neg.iter().cloned().fold(f64::INFINITY, f64::min)));
    Ok(TraceCheck { noise, negative })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn noise_of_a_smooth_band_plus_known_noise() {
        // A Gaussian band 0.3 eV wide sampled every 0.01 eV with ±s alternating noise:
        // the second difference of ±s is ±4s, so σ = 1.4826·4s/√6 ≈ 2.42 s (exact for
        // alternating signs; the band adds < 1 %).
        let s = 0.01;
        let y: Vec<f64> = (0..600)
            .map(|i| {
                let x = i as f64 * 0.01;
                (-((x - 3.0) / 0.18).powi(2)).exp() + if i % 2 == 0 { s } else { -s }
            })
            .collect();
        let n = noise_sigma(&y);
        assert!((n - 1.4826 * 4.0 * s / 6f64.sqrt()).abs() < 0.03 * n, "{n}");
    }

    #[test]
    fn inverted_trace_is_refused() {
        let sig: Vec<f64> = (0..200)
            .map(|i| -(-((i as f64 - 100.0) / 10.0).powi(2)).exp())
            .collect();
        assert!(check_trace(&sig, &sig).unwrap_err().contains("inverted"));
        let up: Vec<f64> = sig.iter().map(|v| -v).collect();
        assert!(check_trace(&up, &up).is_ok());
    }
}
