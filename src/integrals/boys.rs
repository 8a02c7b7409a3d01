//! The Boys function F_m(T) = ∫₀¹ t^{2m} exp(−T t²) dt.
//!
//! Method (common practice; Helgaker, Jørgensen & Olsen, *Molecular Electronic-Structure
//! Theory*, §9.8):
//! - 0 ≤ T < `T_SWITCH`: six-term Taylor expansion about the nearest grid point T₀ of a
//!   pretabulated F_n(T₀) (eq. 9.8.12), F_m(T) = Σ_k F_{m+k}(T₀) (T₀ − T)^k / k!,
//!   for the highest m requested, then downward recursion (eq. 9.8.13)
//!   F_m = (2T F_{m+1} + e^{−T}) / (2m + 1), which is stable.
//! - T ≥ `T_SWITCH`: F_0 = ½ √(π/T) (erfc(√T) below 1e−18 there), then upward recursion
//!   F_{m+1} = ((2m+1) F_m − e^{−T}) / (2T), stable for 2T > 2m + 1.
//! The table itself comes from the convergent series
//! F_m(T) = e^{−T} Σ_k (2T)^k / ((2m+1)(2m+3)…(2m+2k+1)) (eq. 9.8.9) at the highest order
//! and downward recursion.

use std::sync::OnceLock;

/// Highest order the table serves (4·l_max for l = 5 plus headroom).
pub const M_MAX: usize = 32;
const N_TAYLOR: usize = 7; // terms k = 0..6 (the evaluation below is written out for 7)
const GRID_STEP: f64 = 0.05;
/// Above this T the large-argument form is used.
pub const T_SWITCH: f64 = 40.0;
const N_GRID: usize = (T_SWITCH / GRID_STEP) as usize + 2;
const N_COLS: usize = M_MAX + N_TAYLOR + 1;

/// exp(−T₀) at the grid points.
fn exp_table() -> &'static [f64] {
    static TABLE: OnceLock<Vec<f64>> = OnceLock::new();
    TABLE.get_or_init(|| {
        (0..N_GRID)
            .map(|g| (-(g as f64) * GRID_STEP).exp())
            .collect()
    })
}

fn table() -> &'static [f64] {
    static TABLE: OnceLock<Vec<f64>> = OnceLock::new();
    TABLE.get_or_init(|| {
        let mut t = vec![0.0; N_GRID * N_COLS];
        for g in 0..N_GRID {
            let x = g as f64 * GRID_STEP;
            let row = &mut t[g * N_COLS..(g + 1) * N_COLS];
            row[N_COLS - 1] = series(N_COLS - 1, x);
            let ex = (-x).exp();
            for m in (0..N_COLS - 1).rev() {
                row[m] = (2.0 * x * row[m + 1] + ex) / (2 * m + 1) as f64;
            }
        }
        t
    })
}

/// Series value of F_m(T) (slow; used to build the table and in tests).
pub fn series(m: usize, t: f64) -> f64 {
    let mut term = 1.0 / (2 * m + 1) as f64;
    let mut sum = term;
    let mut k = 1;
    loop {
        term *= 2.0 * t / (2 * m + 2 * k + 1) as f64;
        sum += term;
        if term < 1e-17 * sum {
            break;
        }
        k += 1;
    }
    (-t).exp() * sum
}

/// For each m_max, the T above which e^{−T} < 1e−18 (2m+1) F_m(T) for every m < m_max, so
/// that the upward recursion may leave it out (F_m from its asymptotic form, eq. 9.8.16, an
/// upper bound close to the value for T ≥ `T_SWITCH`).
fn no_exp_above() -> &'static [f64; M_MAX + 1] {
    static TABLE: OnceLock<[f64; M_MAX + 1]> = OnceLock::new();
    TABLE.get_or_init(|| {
        let ok = |m: usize, t: f64| {
            // ln of (2m+1)!! √π / 2^{m+1} T^{−m−1/2}, minus T, against ln 1e−18
            let mut ln_df = 0.0;
            let mut k = 2 * m as i64 + 1;
            while k > 1 {
                ln_df += (k as f64).ln();
                k -= 2;
            }
            let ln_f = ln_df + 0.5 * std::f64::consts::PI.ln()
                - (m as f64 + 1.0) * 2f64.ln()
                - (m as f64 + 0.5) * t.ln();
            -t < ln_f - 18.0 * 10f64.ln()
        };
        let mut out = [f64::INFINITY; M_MAX + 1];
        for (m_max, o) in out.iter_mut().enumerate() {
            let mut t = T_SWITCH;
            while !(0..m_max).all(|m| ok(m, t)) {
                t += 0.5;
            }
            *o = t;
        }
        out
    })
}

/// F_0(T), …, F_{m_max}(T) into `out[..=m_max]`.
#[inline]
pub fn boys_array(m_max: usize, t: f64, out: &mut [f64]) {
    debug_assert!(m_max <= M_MAX && out.len() > m_max);
    if t >= T_SWITCH {
        let inv2t = 0.5 / t;
        out[0] = 0.5 * (std::f64::consts::PI / t).sqrt();
        if m_max == 0 {
            return;
        }
        // e^{−T} only matters while it is not negligible next to (2m+1) F_m (upward recursion)
        let ex = if t < no_exp_above()[m_max] {
            (-t).exp()
        } else {
            0.0
        };
        for m in 0..m_max {
            out[m + 1] = ((2 * m + 1) as f64 * out[m] - ex) * inv2t;
        }
        return;
    }
    let tab = table();
    let g = (t * (1.0 / GRID_STEP) + 0.5) as usize;
    let dt = g as f64 * GRID_STEP - t;
    let row = &tab[g * N_COLS + m_max..g * N_COLS + m_max + N_TAYLOR];
    // Taylor terms dt^k / k! evaluated independently (short dependency chains).
    let d2 = dt * dt;
    let d3 = d2 * dt;
    let p = [
        1.0,
        dt,
        d2 * 0.5,
        d3 * (1.0 / 6.0),
        d2 * d2 * (1.0 / 24.0),
        d2 * d3 * (1.0 / 120.0),
        d3 * d3 * (1.0 / 720.0),
    ];
    let f = (row[0] + row[1] * p[1])
        + (row[2] * p[2] + row[3] * p[3])
        + ((row[4] * p[4] + row[5] * p[5]) + row[6] * p[6]);
    out[m_max] = f;
    if m_max > 0 {
        // e^{−T} = e^{−T₀} e^{T₀−T}, the second factor by its Taylor series (|T₀−T| ≤ 0.025).
        let e =
            (p[0] + p[1]) + (p[2] + p[3]) + (p[4] + p[5] + p[6]) + d3 * d2 * d2 * (1.0 / 5040.0);
        let ex = exp_table()[g] * e;
        let t2 = 2.0 * t;
        let inv = inv_odd();
        for m in (0..m_max).rev() {
            out[m] = (t2 * out[m + 1] + ex) * inv[m];
        }
    }
}

/// 1/(2m+1) for m = 0..M_MAX.
#[inline(always)]
fn inv_odd() -> &'static [f64; M_MAX + 1] {
    const INV: [f64; M_MAX + 1] = {
        let mut a = [0.0; M_MAX + 1];
        let mut m = 0;
        while m <= M_MAX {
            a[m] = 1.0 / (2 * m + 1) as f64;
            m += 1;
        }
        a
    };
    &INV
}

/// A single F_m(T).
pub fn boys(m: usize, t: f64) -> f64 {
    let mut b = [0.0; M_MAX + 1];
    boys_array(m, t, &mut b);
    b[m]
}

#[cfg(test)]
mod tests {
    use super::*;

    /// erf by its Maclaurin series (x < 1.6) or the Laplace continued fraction for erfc
    /// (common practice; Abramowitz & Stegun 7.1.5 and 7.1.14), independent of the code above.
    fn erf(x: f64) -> f64 {
        if x < 1.6 {
            let mut term = x;
            let mut sum = x;
            let mut n = 0.0;
            loop {
                n += 1.0;
                term *= -x * x / n;
                let add = term / (2.0 * n + 1.0);
                sum += add;
                if add.abs() < 1e-18 * sum.abs() {
                    break;
                }
            }
            sum * 2.0 / std::f64::consts::PI.sqrt()
        } else {
            // erfc(x) = exp(-x²)/√π · 1/(x + (1/2)/(x + 1/(x + (3/2)/(x + …))))
            let mut f = x;
            for k in (1..4000).rev() {
                f = x + (k as f64 / 2.0) / f;
            }
            1.0 - (-x * x).exp() / std::f64::consts::PI.sqrt() / f
        }
    }

    #[test]
    fn f0_matches_error_function() {
        // F_0(T) = ½ √(π/T) erf(√T) (common practice).
        for &t in &[
            1e-3, 0.01, 0.3, 1.0, 2.49, 5.0, 8.8, 15.0, 29.9, 39.99, 40.0, 55.0, 300.0,
        ] {
            let want = 0.5 * (std::f64::consts::PI / t).sqrt() * erf(t.sqrt());
            let got = boys(0, t);
            assert!((got / want - 1.0).abs() < 1e-14, "T={t}: {got} vs {want}");
        }
        assert!((boys(0, 0.0) - 1.0).abs() < 1e-15);
    }

    #[test]
    fn all_orders_match_series_and_asymptote() {
        // Series eq. 9.8.9 (Helgaker et al.) at many T; F_m(0) = 1/(2m+1) (common practice).
        let mut out = [0.0; M_MAX + 1];
        // (up to T = 150: covers the switch to the large-T form and the region where the
        // upward recursion leaves e^{−T} out)
        for i in 0..1450 {
            let t = i as f64 * 0.1037;
            boys_array(M_MAX, t, &mut out);
            for m in 0..=M_MAX {
                let want = series(m, t);
                assert!(
                    (out[m] / want - 1.0).abs() < 2e-14,
                    "m={m} T={t}: {} vs {want}",
                    out[m]
                );
            }
        }
        boys_array(M_MAX, 0.0, &mut out);
        for m in 0..=M_MAX {
            assert!((out[m] * (2 * m + 1) as f64 - 1.0).abs() < 1e-15);
        }
        // Large T: F_m(T) → (2m−1)!!/2^{m+1} √(π/T^{2m+1}) (eq. 9.8.16), exact to e^{−T}.
        for &t in &[100.0, 500.0] {
            boys_array(16, t, &mut out);
            for m in 0..=16 {
                let mut df = 1.0;
                let mut k = 2 * m as i64 - 1;
                while k > 1 {
                    df *= k as f64;
                    k -= 2;
                }
                let want = df / 2f64.powi(m as i32 + 1)
                    * (std::f64::consts::PI / t.powi(2 * m as i32 + 1)).sqrt();
                assert!((out[m] / want - 1.0).abs() < 1e-13, "m={m} T={t}");
            }
        }
    }
}
