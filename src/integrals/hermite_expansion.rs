//! McMurchie–Davidson Hermite expansion coefficients E^{ij}_t of a one-dimensional
//! Gaussian overlap distribution (McMurchie & Davidson, J. Comput. Phys. 26 (1978) 218;
//! Helgaker, Jørgensen & Olsen, *Molecular Electronic-Structure Theory*, eqs. 9.5.6–9.5.7):
//!
//! x_A^i x_B^j exp(−α x_A² − β x_B²) = Σ_t E^{ij}_t Λ_t(x_P; p),
//! E^{00}_0 = exp(−μ X_AB²),  μ = αβ/p,
//! E^{i+1,j}_t = 1/(2p) E^{ij}_{t−1} + X_PA E^{ij}_t + (t+1) E^{ij}_{t+1},
//! E^{i,j+1}_t = 1/(2p) E^{ij}_{t−1} + X_PB E^{ij}_t + (t+1) E^{ij}_{t+1}.

/// Index of E^{ij}_t in the flat layout filled by [`hermite_e`] for maxima (la, lb).
#[inline(always)]
pub fn e_index(lb: usize, i: usize, j: usize, t: usize, la_lb: usize) -> usize {
    (i * (lb + 1) + j) * (la_lb + 1) + t
}

/// Length of the flat table for maxima (la, lb).
pub fn e_len(la: usize, lb: usize) -> usize {
    (la + 1) * (lb + 1) * (la + lb + 1)
}

/// Fill E^{ij}_t for 0 ≤ i ≤ la, 0 ≤ j ≤ lb, 0 ≤ t ≤ la + lb (zero for t > i + j).
/// `xpa` = P − A, `xpb` = P − B, `inv2p` = 1/(2p), `e00` = exp(−μ X_AB²).
pub fn hermite_e(la: usize, lb: usize, xpa: f64, xpb: f64, inv2p: f64, e00: f64, out: &mut [f64]) {
    let n = la + lb;
    let len = e_len(la, lb);
    out[..len].iter_mut().for_each(|x| *x = 0.0);
    out[0] = e00;
    // raise i with j = 0
    for i in 0..la {
        for t in 0..=i + 1 {
            let mut v = 0.0;
            if t > 0 {
                v += inv2p * out[e_index(lb, i, 0, t - 1, n)];
            }
            if t <= i {
                v += xpa * out[e_index(lb, i, 0, t, n)];
            }
            if t < i {
                v += (t + 1) as f64 * out[e_index(lb, i, 0, t + 1, n)];
            }
            out[e_index(lb, i + 1, 0, t, n)] = v;
        }
    }
    // raise j for every i
    for i in 0..=la {
        for j in 0..lb {
            let top = i + j;
            for t in 0..=top + 1 {
                let mut v = 0.0;
                if t > 0 {
                    v += inv2p * out[e_index(lb, i, j, t - 1, n)];
                }
                if t <= top {
                    v += xpb * out[e_index(lb, i, j, t, n)];
                }
                if t < top {
                    v += (t + 1) as f64 * out[e_index(lb, i, j, t + 1, n)];
                }
                out[e_index(lb, i, j + 1, t, n)] = v;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn overlap_from_e0_matches_direct_quadrature() {
        // ∫ x_A^i x_B^j e^{−α x_A² − β x_B²} dx = E^{ij}_0 √(π/p) (Helgaker et al. eq. 9.5.41);
        // compared with a fine trapezoid rule (exact to round-off for Gaussians).
        let (a, b, alpha, beta) = (0.3, -0.5, 1.1, 0.7);
        let p = alpha + beta;
        let px = (alpha * a + beta * b) / p;
        let mu = alpha * beta / p;
        let (la, lb) = (4, 3);
        let mut e = vec![0.0; e_len(la, lb)];
        hermite_e(
            la,
            lb,
            px - a,
            px - b,
            0.5 / p,
            (-mu * (a - b) * (a - b)).exp(),
            &mut e,
        );
        for i in 0..=la {
            for j in 0..=lb {
                let h = 1e-3;
                let mut s = 0.0;
                for k in -12000..=12000 {
                    let x = k as f64 * h;
                    s += (x - a).powi(i as i32)
                        * (x - b).powi(j as i32)
                        * (-alpha * (x - a).powi(2) - beta * (x - b).powi(2)).exp();
                }
                s *= h;
                let got = e[e_index(lb, i, j, 0, la + lb)] * (std::f64::consts::PI / p).sqrt();
                assert!((got - s).abs() < 1e-12, "i={i} j={j}: {got} vs {s}");
            }
        }
    }
}
