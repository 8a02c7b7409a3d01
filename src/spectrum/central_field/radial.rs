//! Radial Schrödinger equation on a logarithmic grid (Numerov), atomic units (hartree, bohr).
//!
//! With x = ln r and P(r) = r^{1/2} y(x), the radial equation
//! P'' = [2(V − E) + l(l+1)/r²] P becomes y'' = g(x) y with g = 2r²(V − E) + (l + ½)²,
//! which has no first-derivative term and is integrated by Numerov's method (common
//! practice; e.g. D. R. Hartree, *The Calculation of Atomic Structures*, 1957).
//! Bound states: shooting from both ends, node counting and the derivative-jump energy
//! correction at the outer turning point (Cooley's correction written for Numerov's
//! recurrence; common practice). Continuum states: outward integration, then the amplitude
//! is fixed from the local-momentum (WKB) invariant q P² + P′²/q = A² far out, so that
//! P → (2/(πk))^{1/2} sin(kr + …): normalised per unit energy (hartree), ∫P_E P_E′ dr = δ(E − E′).

/// A logarithmic radial grid r_i = exp(x0 + i h).
#[derive(Debug, Clone)]
pub struct Grid {
    pub x0: f64,
    pub h: f64,
    pub r: Vec<f64>,
}

impl Grid {
    /// Grid from `r_min` to at least `r_max` with step `h` in ln r.
    pub fn new(r_min: f64, r_max: f64, h: f64) -> Grid {
        let x0 = r_min.ln();
        let n = ((r_max.ln() - x0) / h).ceil() as usize + 1;
        let r = (0..n).map(|i| (x0 + i as f64 * h).exp()).collect();
        Grid { x0, h, r }
    }

    pub fn len(&self) -> usize {
        self.r.len()
    }

    pub fn is_empty(&self) -> bool {
        self.r.is_empty()
    }

    /// ∫ f(r) dr over the grid (trapezoid in x; dr = r dx).
    pub fn integrate(&self, f: impl Fn(usize) -> f64) -> f64 {
        let n = self.r.len();
        let mut s = 0.0;
        for i in 0..n {
            let w = if i == 0 || i == n - 1 { 0.5 } else { 1.0 };
            s += w * f(i) * self.r[i];
        }
        s * self.h
    }
}

/// Initial values y(r) ≈ r^{l+½}(1 − Z r/(l+1)) near the nucleus, with Z from the potential.
fn start_near_origin(grid: &Grid, v: &[f64], l: u32, i: usize) -> f64 {
    let z = -v[0] * grid.r[0];
    let r = grid.r[i];
    r.powf(l as f64 + 0.5) * (1.0 - z * r / (l as f64 + 1.0))
}

/// A bound orbital: energy (hartree) and P(r) normalised to ∫P² dr = 1, positive near r = 0.
#[derive(Debug, Clone)]
pub struct Bound {
    pub energy: f64,
    pub p: Vec<f64>,
}

/// Bound state with principal quantum number `n` and angular momentum `l` in the potential
/// `v` (V(r) on the grid, hartree). `guess`: a starting energy, if known.
pub fn bound(grid: &Grid, v: &[f64], n: u32, l: u32, guess: Option<f64>) -> Result<Bound, String> {
    let m = grid.len();
    let h = grid.h;
    let ddx12 = h * h / 12.0;
    let lh2 = (l as f64 + 0.5).powi(2);
    let ll = (l * (l + 1)) as f64;
    let target_nodes = (n - l - 1) as usize;
    let mut elow = (0..m)
        .map(|i| v[i] + 0.5 * ll / (grid.r[i] * grid.r[i]))
        .fold(f64::INFINITY, f64::min);
    let mut eup = v[m - 1] + 0.5 * ll / (grid.r[m - 1] * grid.r[m - 1]);
    let mut e = match guess {
        Some(g) if g > elow && g < eup => g,
        _ => 0.5 * (elow + eup),
    };
    let mut g = vec![0.0; m];
    let mut f = vec![0.0; m];
    let mut y = vec![0.0; m];
    for _ in 0..400 {
        for i in 0..m {
            g[i] = 2.0 * grid.r[i] * grid.r[i] * (v[i] - e) + lh2;
            f[i] = 1.0 - ddx12 * g[i];
        }
        // outer classical turning point: last sign change of g (g < 0 inside)
        let icl = (1..m).rev().find(|&i| g[i - 1] < 0.0 && g[i] >= 0.0);
        let Some(icl) = icl else {
            elow = e;
            e = 0.5 * (elow + eup);
            continue;
        };
        if icl >= m - 3 {
            eup = e;
            e = 0.5 * (elow + eup);
            continue;
        }
        // outward
        y.iter_mut().for_each(|t| *t = 0.0);
        y[0] = start_near_origin(grid, v, l, 0);
        y[1] = start_near_origin(grid, v, l, 1);
        let mut nodes = 0usize;
        for i in 1..icl {
            y[i + 1] = ((12.0 - 10.0 * f[i]) * y[i] - f[i - 1] * y[i - 1]) / f[i + 1];
            if y[i] * y[i + 1] < 0.0 {
                nodes += 1;
            }
        }
        let y_icl = y[icl];
        if nodes != target_nodes {
            if nodes > target_nodes {
                eup = e;
            } else {
                elow = e;
            }
            e = 0.5 * (elow + eup);
            continue;
        }
        // inward: start where the decay from the turning point exceeds e^-45
        let mut acc = 0.0;
        let mut istart = m - 1;
        for i in icl..m {
            acc += g[i].max(0.0).sqrt() * h;
            if acc > 45.0 {
                istart = i;
                break;
            }
        }
        let istart = istart.max(icl + 2);
        y[istart] = h;
        y[istart - 1] = (12.0 - 10.0 * f[istart]) * y[istart] / f[istart - 1];
        for i in (icl + 1..istart).rev() {
            y[i - 1] = ((12.0 - 10.0 * f[i]) * y[i] - f[i + 1] * y[i + 1]) / f[i - 1];
        }
        let scale = y_icl / y[icl];
        for t in y.iter_mut().take(istart + 1).skip(icl) {
            *t *= scale;
        }
        // normalise ∫ y² r² dx = 1
        let norm = grid.integrate(|i| y[i] * y[i] * grid.r[i]).sqrt();
        y.iter_mut().for_each(|t| *t /= norm);
        let ycusp =
            (y[icl - 1] * f[icl - 1] + f[icl + 1] * y[icl + 1] + 10.0 * f[icl] * y[icl]) / 12.0;
        let dfcusp = f[icl] * (y[icl] / ycusp - 1.0);
        // g changes by −2r² per hartree: the Numerov cusp formula gives ΔE·2
        let de = 0.5 * dfcusp / ddx12 * ycusp * ycusp * h;
        if de > 0.0 {
            elow = e;
        } else if de < 0.0 {
            eup = e;
        }
        let mut e_new = e + de;
        if e_new <= elow || e_new >= eup {
            e_new = 0.5 * (elow + eup);
        }
        let converged = de.abs() < 1e-11 * (1.0 + e.abs());
        e = e_new;
        if converged {
            let mut p: Vec<f64> = (0..m).map(|i| y[i] * grid.r[i].sqrt()).collect();
            if p.iter().find(|t| t.abs() > 1e-12).is_some_and(|t| *t < 0.0) {
                p.iter_mut().for_each(|t| *t = -*t);
            }
            return Ok(Bound { energy: e, p });
        }
        if eup - elow < 1e-14 * (1.0 + e.abs()) {
            break;
        }
    }
    Err(format!(
        "bound state n={n} l={l}: energy did not converge (last {e} Eh)"
    ))
}

/// Continuum wave P_{E l}(r) at energy `e` > 0 (hartree), normalised per unit energy
/// (hartree). The grid must extend to where V is Coulombic and must resolve the local
/// wavelength (q r h ≲ 0.05 at the far end). The last `n_avg` points are used for the
/// amplitude (the invariant is averaged there to cancel its small oscillation).
pub fn continuum(grid: &Grid, v: &[f64], l: u32, e: f64, n_avg: usize) -> Vec<f64> {
    let m = grid.len();
    let h = grid.h;
    let ddx12 = h * h / 12.0;
    let lh2 = (l as f64 + 0.5).powi(2);
    let f: Vec<f64> = (0..m)
        .map(|i| 1.0 - ddx12 * (2.0 * grid.r[i] * grid.r[i] * (v[i] - e) + lh2))
        .collect();
    let mut y = vec![0.0; m];
    y[0] = start_near_origin(grid, v, l, 0);
    y[1] = start_near_origin(grid, v, l, 1);
    for i in 1..m - 1 {
        y[i + 1] = ((12.0 - 10.0 * f[i]) * y[i] - f[i - 1] * y[i - 1]) / f[i + 1];
        if y[i + 1].abs() > 1e200 {
            let s = 1e-200;
            y.iter_mut().take(i + 2).for_each(|t| *t *= s);
        }
    }
    let mut p: Vec<f64> = (0..m).map(|i| y[i] * grid.r[i].sqrt()).collect();
    let ll = (l * (l + 1)) as f64;
    let lo = m.saturating_sub(n_avg + 1).max(1);
    let mut a2 = 0.0;
    let mut cnt = 0.0;
    for i in lo..m - 1 {
        let r = grid.r[i];
        let q = (2.0 * (e - v[i]) - ll / (r * r)).sqrt();
        let dp = (p[i + 1] - p[i - 1]) / (2.0 * h * r);
        a2 += q * p[i] * p[i] + dp * dp / q;
        cnt += 1.0;
    }
    let a2 = a2 / cnt;
    let s = (2.0 / std::f64::consts::PI / a2).sqrt();
    p.iter_mut().for_each(|t| *t *= s);
    p
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hydrogen_levels() {
        // E_n = −Z²/(2n²) hartree for −Z/r (exact; Bethe & Salpeter 1957 §2).
        let z = 3.0;
        let grid = Grid::new(1e-5 / z, 120.0, 0.01);
        let v: Vec<f64> = grid.r.iter().map(|r| -z / r).collect();
        for (n, l) in [(1, 0), (2, 0), (2, 1), (3, 1), (3, 2)] {
            let b = bound(&grid, &v, n, l, None).unwrap();
            let exact = -z * z / (2.0 * (n * n) as f64);
            assert!(
                (b.energy - exact).abs() < 1e-7,
                "{n}{l}: {} vs {exact}",
                b.energy
            );
            let norm = grid.integrate(|i| b.p[i] * b.p[i]);
            assert!((norm - 1.0).abs() < 1e-9);
        }
    }
}
