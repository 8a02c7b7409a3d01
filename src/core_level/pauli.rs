//! First-order scalar-relativistic energy of the electrons near one nucleus (Pauli
//! mass-velocity and Darwin terms), used to check the relativistic correction of 1s levels
//! (`relativistic.rs`) against a computation instead of a quoted law.
//!
//! E_MV = −(α²/8) Σ_i ⟨∇²φ_i|∇²φ_i⟩ and E_D = (πα²/2) Z_A ρ(R_A) (a.u.), the first-order
//! perturbation of the Breit–Pauli Hamiltonian's scalar terms (Cowan & Griffin, J. Opt. Soc.
//! Am. 66 (1976) 1010; textbook: Bethe & Salpeter, *Quantum Mechanics of One- and
//! Two-Electron Atoms*, §12). The 1s relativistic correction of a ΔSCF level is
//! [E_MV + E_D](ion) − [E_MV + E_D](neutral): removing a 1s electron removes the largest
//! (negative) relativistic energy, so it comes out positive.
//!
//! One-centre: the mass-velocity term keeps only AO pairs on the hole atom (same l, same
//! component), the Darwin term only the hole atom's nucleus (the density there from every
//! AO). The other atoms' cores change little between neutral and ion; for an atom the
//! result is the full first-order value.
//!
//! For a solid-harmonic Gaussian r^l Y_lm exp(−a r²):
//! ∇²[r^l Y_lm e^{−ar²}] = (4a²r² − 2a(2l+3)) r^l Y_lm e^{−ar²} (Y solid harmonic, ∇²(r^l Y)=0),
//! so the one-centre ⟨∇²χ|∇²χ'⟩ are radial Gaussian moments.

use bandcast_linalg::Mat;

use crate::basis::normalize::contracted_coefficients;
use crate::basis::BasisSet;
use crate::units::FINE_STRUCTURE;

/// ∫₀^∞ r^n e^{−p r²} dr = Γ((n+1)/2) / (2 p^{(n+1)/2}).
fn moment(n: usize, p: f64) -> f64 {
    gamma_half(n + 1) / (2.0 * p.powf((n as f64 + 1.0) / 2.0))
}

/// Γ(k/2) for k ≥ 1.
fn gamma_half(k: usize) -> f64 {
    let mut g = if k % 2 == 0 {
        1.0
    } else {
        std::f64::consts::PI.sqrt()
    };
    let mut x = if k % 2 == 0 { 1.0 } else { 0.5 };
    while x < k as f64 / 2.0 - 1e-12 {
        g *= x;
        x += 1.0;
    }
    g
}

/// Radial overlap and ∇⁴ integrals of two contracted radial functions of angular momentum l
/// (coefficients of the raw primitives r^l e^{−a r²}).
fn radial(l: usize, ea: &[f64], da: &[f64], eb: &[f64], db: &[f64]) -> (f64, f64) {
    let c = 2.0 * (2 * l + 3) as f64;
    let (mut s, mut k) = (0.0, 0.0);
    for (&a, &ca) in ea.iter().zip(da) {
        for (&b, &cb) in eb.iter().zip(db) {
            let p = a + b;
            let w = ca * cb;
            s += w * moment(2 * l + 2, p);
            k += w
                * (16.0 * a * a * b * b * moment(2 * l + 6, p)
                    - 4.0 * c * (a * a * b + a * b * b) * moment(2 * l + 4, p)
                    + c * c * a * b * moment(2 * l + 2, p));
        }
    }
    (s, k)
}

/// Mass-velocity and Darwin energies (hartree) of the total density `p` (α + β, AO basis)
/// at atom `atom` of nuclear charge `z` (one-centre, see the module text). None when the
/// hole atom carries Cartesian shells of l ≥ 2 (their components are not orthogonal).
pub fn one_centre(basis: &BasisSet, atom: usize, z: f64, p: &Mat<f64>) -> Option<(f64, f64)> {
    let a2 = FINE_STRUCTURE * FINE_STRUCTURE;
    let on: Vec<usize> = (0..basis.shells.len())
        .filter(|&i| basis.shells[i].atom == atom)
        .collect();
    if on
        .iter()
        .any(|&i| basis.shells[i].l >= 2 && !basis.shells[i].pure)
    {
        return None;
    }
    let coefs: Vec<Vec<f64>> = basis.shells.iter().map(contracted_coefficients).collect();
    let mut mv = 0.0;
    for &i in &on {
        for &j in &on {
            let (si, sj) = (&basis.shells[i], &basis.shells[j]);
            if si.l != sj.l {
                continue;
            }
            let (sii, _) = radial(si.l, &si.exponents, &coefs[i], &si.exponents, &coefs[i]);
            let (sjj, _) = radial(sj.l, &sj.exponents, &coefs[j], &sj.exponents, &coefs[j]);
            let (_, kij) = radial(si.l, &si.exponents, &coefs[i], &sj.exponents, &coefs[j]);
            let k = kij / (sii * sjj).sqrt();
            for m in 0..si.n_functions() {
                mv += p[(basis.offsets[i] + m, basis.offsets[j] + m)] * k;
            }
        }
    }
    let rho = super::breit_qed::density_at(basis, basis.shells[on[0]].center, &[p]);
    Some((-a2 / 8.0 * mv, std::f64::consts::PI * a2 / 2.0 * z * rho))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::basis::Shell;

    fn single(l: usize, a: f64) -> BasisSet {
        BasisSet::from_shells("one", vec![Shell::primitive(l, a, [0.0; 3], 0)])
    }

    #[test]
    fn single_gaussians_match_the_momentum_space_moments() {
        // Normalised e^{−ar²}: ⟨p⁴⟩ = 15a², ρ(0) = (2a/π)^{3/2}; x e^{−ar²}: ⟨p⁴⟩ = 35a²,
        // ρ(0) = 0 (Gaussian momentum distribution of variance a per axis; textbook).
        let a2 = FINE_STRUCTURE * FINE_STRUCTURE;
        for a in [0.3, 7.0, 1200.0] {
            let b = single(0, a);
            let p = Mat::<f64>::from_fn(1, 1, |_, _| 1.0);
            let (mv, d) = one_centre(&b, 0, 1.0, &p).unwrap();
            let want = -a2 / 8.0 * 15.0 * a * a;
            assert!((mv - want).abs() < 1e-10 * want.abs(), "{mv} {want}");
            let rho = (2.0 * a / std::f64::consts::PI).powf(1.5);
            let wd = std::f64::consts::PI * a2 / 2.0 * rho;
            assert!((d - wd).abs() < 1e-10 * wd, "{d} {wd}");
            let b = single(1, a);
            let p = Mat::<f64>::from_fn(3, 3, |i, j| if i == j { 1.0 } else { 0.0 });
            let (mv, d) = one_centre(&b, 0, 1.0, &p).unwrap();
            let want = -a2 / 8.0 * 3.0 * 35.0 * a * a;
            assert!((mv - want).abs() < 1e-10 * want.abs(), "{mv} {want}");
            assert!(d.abs() < 1e-14);
        }
    }

    #[test]
    fn hydrogen_like_1s_approaches_the_dirac_value() {
        // Hydrogen-like 1s: E_MV + E_D = −Z⁴α²/8 (first-order Pauli = the α² term of the
        // Dirac energy; textbook). Fitted 1s of Z = 1 in 40 even-tempered s Gaussians
        // (exponents 10^{-2}…10^{7}): the energy-optimal expansion; the cusp region makes
        // ⟨p⁴⟩ converge slowly, so 2 % is asked.
        let exps: Vec<f64> = (0..40)
            .map(|k| 1e-2 * 10f64.powf(9.0 * k as f64 / 39.0))
            .collect();
        // Least-squares fit of e^{−r} would need integrals; use the 1s projection instead:
        // c ∝ S⁻¹⟨g|e^{−r}⟩ with ⟨g_a|e^{−r}⟩ computed by radial quadrature.
        let n = exps.len();
        let norm = |a: f64| (2.0 * a / std::f64::consts::PI).powf(0.75);
        let s = Mat::<f64>::from_fn(n, n, |i, j| {
            let p = exps[i] + exps[j];
            norm(exps[i]) * norm(exps[j]) * (std::f64::consts::PI / p).powf(1.5)
        });
        let proj: Vec<f64> = exps
            .iter()
            .map(|&a| {
                // 4π ∫ r² e^{−ar²} e^{−r} / √π dr by a fine trapezoid in r.
                let (h, mut sum) = (1e-4, 0.0);
                for k in 1..400000 {
                    let r = k as f64 * h;
                    sum += r * r * (-a * r * r - r).exp();
                }
                norm(a) * 4.0 * std::f64::consts::PI * sum * h / std::f64::consts::PI.sqrt()
            })
            .collect();
        let (lam, v) = bandcast_linalg::eigh(s.as_ref());
        let c: Vec<f64> = (0..n)
            .map(|i| {
                (0..n)
                    .filter(|&k| lam[k] > 1e-11)
                    .map(|k| v[(i, k)] * (0..n).map(|j| v[(j, k)] * proj[j]).sum::<f64>() / lam[k])
                    .sum()
            })
            .collect();
        let shells: Vec<Shell> = exps
            .iter()
            .map(|&a| Shell::primitive(0, a, [0.0; 3], 0))
            .collect();
        let b = BasisSet::from_shells("et", shells);
        let nrm: f64 = (0..n)
            .map(|i| (0..n).map(|j| c[i] * s[(i, j)] * c[j]).sum::<f64>())
            .sum();
        let p = Mat::<f64>::from_fn(n, n, |i, j| c[i] * c[j] / nrm);
        let (mv, d) = one_centre(&b, 0, 1.0, &p).unwrap();
        let a2 = FINE_STRUCTURE * FINE_STRUCTURE;
        let want = -a2 / 8.0;
        assert!(
            ((mv + d) - want).abs() < 0.02 * want.abs(),
            "{} vs {want}",
            mv + d
        );
        // Separately ⟨p⁴⟩ = 5 and ρ(0) = 1/π for Z = 1.
        assert!((mv / (-a2 / 8.0) - 5.0).abs() < 0.1, "{}", mv / (-a2 / 8.0));
    }
}
