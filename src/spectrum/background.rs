//! Background under a measured spectrum.
//!
//! - Linear: the straight line through the mean of the first and of the last few points
//!   (common practice for valence spectra).
//! - Shirley: D. A. Shirley, "High-resolution X-ray photoemission spectrum of the valence
//!   bands of gold", Phys. Rev. B 5 (1972) 4709. The background at binding energy E is
//!   proportional to the peak area on the low-binding-energy (high-kinetic-energy) side of E:
//!   B(E) = I_lo + (I_hi − I_lo) · A(E_lo..E) / A(E_lo..E_hi), with A the area of
//!   (signal − background), iterated to self-consistency (the iterative form of Proctor &
//!   Sherwood, Anal. Chem. 54 (1982) 13; common practice). Inelastically scattered
//!   electrons appear on the high-binding-energy side of a core line, so the step rises
//!   towards higher binding energy.

/// How many end points are averaged to fix the background ends.
fn end_points(n: usize) -> usize {
    (n / 20).clamp(1, 10)
}

fn mean(v: &[f64]) -> f64 {
    v.iter().sum::<f64>() / v.len() as f64
}

/// Linear background through the averaged end points. `x` increasing.
pub fn linear(x: &[f64], y: &[f64]) -> Vec<f64> {
    let n = y.len();
    let k = end_points(n);
    let (x0, y0) = (mean(&x[..k]), mean(&y[..k]));
    let (x1, y1) = (mean(&x[n - k..]), mean(&y[n - k..]));
    let slope = if x1 > x0 { (y1 - y0) / (x1 - x0) } else { 0.0 };
    x.iter().map(|&xi| y0 + slope * (xi - x0)).collect()
}

/// Shirley background for a trace on an increasing binding-energy axis `x`.
pub fn shirley(x: &[f64], y: &[f64]) -> Vec<f64> {
    let n = y.len();
    let k = end_points(n);
    let i_lo = mean(&y[..k]); // low binding energy end
    let i_hi = mean(&y[n - k..]); // high binding energy end
    let mut b = vec![i_lo; n];
    for _ in 0..50 {
        // cumulative trapezoid area of (y − b) from the low-BE end
        let mut cum = vec![0.0; n];
        for i in 1..n {
            let d0 = y[i - 1] - b[i - 1];
            let d1 = y[i] - b[i];
            cum[i] = cum[i - 1] + 0.5 * (d0 + d1) * (x[i] - x[i - 1]);
        }
        let total = cum[n - 1];
        let new: Vec<f64> = if total.abs() < 1e-300 {
            linear(x, y)
        } else {
            cum.iter()
                .map(|&c| i_lo + (i_hi - i_lo) * c / total)
                .collect()
        };
        let change = new
            .iter()
            .zip(&b)
            .map(|(a, c)| (a - c).abs())
            .fold(0.0, f64::max);
        b = new;
        if change <= 1e-9 * (i_hi - i_lo).abs().max(1e-300) {
            break;
        }
    }
    b
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn linear_removes_a_sloped_baseline() {
        let x: Vec<f64> = (0..100).map(|i| i as f64 * 0.1).collect();
        let y: Vec<f64> = x.iter().map(|&e| 2.0 + 0.3 * e).collect();
        let b = linear(&x, &y);
        for (a, c) in b.iter().zip(&y) {
            assert!((a - c).abs() < 1e-9);
        }
    }

    #[test]
    fn shirley_step_follows_the_peak_area() {
        // A Gaussian on a step whose height is proportional to the integrated peak: the
        // defining property of the Shirley background (Shirley 1972).
        let x: Vec<f64> = (0..400).map(|i| 280.0 + i as f64 * 0.05).collect();
        let peak = |e: f64| (-((e - 290.0) / 0.5).powi(2)).exp();
        let erf_like = |e: f64| {
            // cumulative area of the peak from the left, by summation
            let mut s = 0.0;
            let mut t = 280.0;
            while t < e {
                s += peak(t) * 0.001;
                t += 0.001;
            }
            s
        };
        let total = erf_like(300.0);
        let y: Vec<f64> = x
            .iter()
            .map(|&e| 1.0 + peak(e) * 10.0 + 2.0 * erf_like(e) / total)
            .collect();
        let b = shirley(&x, &y);
        // background at the ends equals the data; mid-peak it is halfway up the step
        assert!((b[0] - y[0]).abs() < 0.05);
        assert!((b[399] - y[399]).abs() < 0.1);
        let mid = x.iter().position(|&e| e >= 290.0).unwrap();
        assert!((b[mid] - 2.0).abs() < 0.15, "{}", b[mid]);
    }
}
