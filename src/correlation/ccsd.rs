//! Closed-shell CCSD ground state: residual equations and their DIIS-accelerated solution.
//!
//! Amplitudes t_i^a and t_ij^ab ≡ t_{iα jβ}^{aα bβ} of an RHF reference; the residuals are
//! the projections ⟨Φ_{iα}^{aα}|H̄|Φ⟩ and ⟨Φ_{iα jβ}^{aα bβ}|H̄|Φ⟩ of
//! H̄ = e^{−T} H e^{T} (Purvis & Bartlett, J. Chem. Phys. 76 (1982) 1910), written with the
//! intermediates of ccsd_intermediates.rs (Stanton, Gauss, Watts & Bartlett 1991, reduced to
//! a closed-shell reference as in Scuseria, Janssen & Schaefer, J. Chem. Phys. 89 (1988)
//! 7382). The energy is E = Σ_ijab [2(ia|jb) − (ib|ja)] τ_ij^ab + 2 Σ_ia f_ia t_i^a.
//! Iteration: Jacobi step t ← t + R / D with orbital-energy denominators D, extrapolated
//! by DIIS (diis.rs); converged when |ΔE| and the residual norm are both below the
//! thresholds.

use super::ccsd_intermediates as imd;
use super::integrals::MoIntegrals;
use super::mp2;
use super::tensor::{einsum, Tensor};
use crate::scf::diis::VectorDiis as Diis;
use crate::{Error, Result};

#[derive(Debug, Clone)]
pub struct CcsdOptions {
    /// Convergence of the energy (hartree).
    pub e_tol: f64,
    /// Convergence of the residual norm ‖R‖ (RMS over both amplitude sets × √n).
    pub r_tol: f64,
    pub max_iter: usize,
    pub diis_size: usize,
}

impl Default for CcsdOptions {
    fn default() -> Self {
        CcsdOptions {
            e_tol: 1e-8,
            r_tol: 1e-8,
            max_iter: 100,
            diis_size: 8,
        }
    }
}

#[derive(Debug, Clone)]
pub struct CcsdResult {
    pub e_corr: f64,
    pub e_mp2: f64,
    pub t1: Tensor,
    pub t2: Tensor,
    pub iterations: usize,
    pub residual_norm: f64,
}

/// Swap (i,a) ↔ (j,b): x[i,j,a,b] → x[j,i,b,a].
pub fn pair_transpose(x: &Tensor) -> Tensor {
    x.permute(&[1, 0, 3, 2])
}

fn add_sym(r2: &mut Tensor, alpha: f64, tmp: &Tensor) {
    r2.axpy(alpha, tmp);
    r2.axpy(alpha, &pair_transpose(tmp));
}

/// CCSD correlation energy for given amplitudes.
pub fn energy(ints: &MoIntegrals, t1: &Tensor, t2: &Tensor) -> f64 {
    let tau = imd::tau(t1, t2);
    mp2::pair_energy(ints, &tau) + 2.0 * ints.fov.dot(t1)
}

/// Residuals (R1[i,a], R2[i,j,a,b]); zero at the CCSD solution.
pub fn residual(ints: &MoIntegrals, t1: &Tensor, t2: &Tensor) -> (Tensor, Tensor) {
    let fov0 = &ints.fov;
    let tau = imd::tau(t1, t2);
    let fov = imd::fov(ints, t1);
    let foo = imd::foo(ints, &tau);
    let fvv = imd::fvv(ints, &tau);
    let ov3 = imd::ovvv_pass(ints, t1, Some((t2, &tau)));
    let lvv_x = &ov3.lvv_x;

    // ---- T1 ----
    let mut r1 = fov0.clone();
    let z = einsum("kc,ka->ac", fov0, t1);
    r1.axpy(-2.0, &einsum("ac,ic->ia", &z, t1));
    r1.axpy(1.0, &einsum("ac,ic->ia", &fvv, t1));
    r1.axpy(-1.0, &einsum("ki,ka->ia", &foo, t1));
    r1.axpy(2.0, &einsum("kc,kica->ia", &fov, t2));
    r1.axpy(-1.0, &einsum("kc,ikca->ia", &fov, t2));
    let z = einsum("kc,ic->ki", &fov, t1);
    r1.axpy(1.0, &einsum("ki,ka->ia", &z, t1));
    r1.axpy(2.0, &einsum("kcia,kc->ia", &ints.ovov, t1));
    r1.axpy(-1.0, &einsum("kiac,kc->ia", &ints.oovv, t1));
    r1.axpy(1.0, &einsum("ac,ic->ia", lvv_x, t1));
    r1.axpy(1.0, &ov3.r1);
    r1.axpy(-2.0, &einsum("lcki,klac->ia", &ints.ovoo, t2));
    r1.axpy(1.0, &einsum("kcli,klac->ia", &ints.ovoo, t2));
    let z = einsum("lcki,lc->ki", &ints.ovoo, t1);
    r1.axpy(-2.0, &einsum("ki,ka->ia", &z, t1));
    let z = einsum("kcli,lc->ki", &ints.ovoo, t1);
    r1.axpy(1.0, &einsum("ki,ka->ia", &z, t1));

    // ---- T2 ----
    let mut r2 = ints.ovov.permute(&[0, 2, 1, 3]);
    // P(ia,jb) Σ_c [(ia|bc) − Σ_k (ki|bc) t_k^a] t_j^c
    let mut tmp = ov3.t2_tmp.clone();
    // Σ_k t_k^a [Σ_c (ki|bc) t_j^c]: the bracket is o³v, never an o v³ intermediate
    let z = einsum("kibc,jc->kibj", &ints.oovv, t1);
    tmp.axpy(-1.0, &einsum("kibj,ka->ijab", &z, t1));
    add_sym(&mut r2, 1.0, &tmp);
    // −P(ia,jb) Σ_k [(ia|kj) + Σ_c (kc|ai) t_j^c] t_k^b
    let mut z = ints.ovoo.permute(&[1, 3, 0, 2]);
    z.axpy(1.0, &einsum("kcia,jc->akij", &ints.ovov, t1));
    let tmp = einsum("akij,kb->ijab", &z, t1);
    add_sym(&mut r2, -1.0, &tmp);

    let loo = imd::loo(ints, t1, &foo);
    let lvv = imd::lvv(ints, t1, &fvv, lvv_x);
    let woooo = imd::woooo(ints, t1, &tau);
    let wvoov = imd::wvoov(ints, t1, t2, &ov3.wvoov);
    let wvovo = imd::wvovo(ints, t1, t2, &ov3.wvovo);

    r2.axpy(1.0, &einsum("klij,klab->ijab", &woooo, &tau));
    // Ladder with W_abcd = (ac|bd) − Σ_k t_k^b (kd|ac) − Σ_k t_k^a (kc|bd)
    r2.axpy(1.0, &ints.ladder(&tau));
    let tmp = einsum("kaij,kb->ijab", &ov3.y, t1);
    add_sym(&mut r2, -1.0, &tmp);

    let tmp = einsum("ac,ijcb->ijab", &lvv, t2);
    add_sym(&mut r2, 1.0, &tmp);
    let tmp = einsum("ki,kjab->ijab", &loo, t2);
    add_sym(&mut r2, -1.0, &tmp);
    // 2 W_akic − W_akci contracted in one product
    let mut w = wvovo.permute(&[0, 1, 3, 2]);
    w.scale(-1.0);
    w.axpy(2.0, &wvoov);
    let tmp = einsum("akic,kjcb->ijab", &w, t2);
    drop(w);
    add_sym(&mut r2, 1.0, &tmp);
    let tmp = einsum("akic,kjbc->ijab", &wvoov, t2);
    add_sym(&mut r2, -1.0, &tmp);
    let tmp = einsum("bkci,kjac->ijab", &wvovo, t2);
    add_sym(&mut r2, -1.0, &tmp);
    (r1, r2)
}

/// Solve the CCSD equations from MP2 starting amplitudes. `log` receives one line per
/// iteration (energy, change, residual norm).
pub fn solve(
    ints: &MoIntegrals,
    opts: &CcsdOptions,
    log: &mut dyn FnMut(&str),
) -> Result<CcsdResult> {
    let (o, v) = (ints.nocc, ints.nvir);
    let (eo, ev) = ints.eps();
    let d2 = mp2::denominators(ints);
    let d1 = Tensor::from_fn(&[o, v], |x| eo[x[0]] - ev[x[1]]);
    let (e_mp2, t2_0) = mp2::mp2(ints);
    log(&format!("MP2 correlation energy {e_mp2:.10} Eh"));
    let mut t1 = Tensor::zeros(&[o, v]);
    let mut t2 = t2_0;
    let mut e_old = energy(ints, &t1, &t2);
    let mut diis = Diis::new(opts.diis_size);
    let mut de = f64::INFINITY;
    for it in 1..=opts.max_iter {
        let (r1, r2) = residual(ints, &t1, &t2);
        let rnorm = (r1.dot(&r1) + r2.dot(&r2)).sqrt();
        if rnorm < opts.r_tol && de.abs() < opts.e_tol {
            log(&format!(
                "CCSD converged: E(corr) = {e_old:.10} Eh, |ΔE| = {:.1e}, ‖R‖ = {rnorm:.1e}, {} iterations",
                de.abs(),
                it - 1
            ));
            return Ok(CcsdResult {
                e_corr: e_old,
                e_mp2,
                t1,
                t2,
                iterations: it - 1,
                residual_norm: rnorm,
            });
        }
        super::tensor::diis_amplitude_step(&mut diis, &mut t1, &mut t2, [&r1, &r2], [&d1, &d2]);
        // keep the pair symmetry t_ij^ab = t_ji^ba exact
        let sym = pair_transpose(&t2);
        for (a, b) in t2.data.iter_mut().zip(&sym.data) {
            *a = 0.5 * (*a + b);
        }
        let e_new = energy(ints, &t1, &t2);
        de = e_new - e_old;
        log(&format!(
            "CCSD iter {it:3}: E(corr) = {e_new:.12} Eh, ΔE = {de:.2e}, ‖R‖ = {rnorm:.2e}"
        ));
        e_old = e_new;
        if !e_new.is_finite() {
            break;
        }
    }
    Err(Error::computation(format!(
        "CCSD did not converge in {} iterations (last E(corr) = {e_old:.10} Eh); \
         DIIS with {} vectors from MP2 amplitudes was used",
        opts.max_iter, opts.diis_size
    )))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::correlation::brute_force::FockSpace;
    use crate::correlation::integrals::toy::{toy_system, Lcg};

    fn random_amps(o: usize, v: usize, seed: u64, scale: f64) -> (Tensor, Tensor) {
        let mut rng = Lcg(seed);
        let t1 = Tensor::from_fn(&[o, v], |_| scale * rng.next());
        let mut t2 = Tensor::zeros(&[o, o, v, v]);
        for i in 0..o {
            for j in 0..o {
                for a in 0..v {
                    for b in 0..v {
                        let x = scale * rng.next();
                        t2.data[((i * o + j) * v + a) * v + b] += x;
                        t2.data[((j * o + i) * v + b) * v + a] += x;
                    }
                }
            }
        }
        (t1, t2)
    }

    /// The spin-adapted residual equals the literal ⟨Φ_μ|e^{−T}He^{T}|Φ⟩ for arbitrary
    /// (not converged) amplitudes, non-canonical Fock matrix included.
    #[test]
    fn residual_matches_second_quantisation() {
        for &(o, v, store) in &[(2usize, 3usize, true), (2, 3, false), (3, 2, true)] {
            let (f, fock) = toy_system(o, v, 6, 7 + o as u64, 1.0);
            let ints = MoIntegrals::new(f.clone(), &fock, store, store);
            let (t1, t2) = random_amps(o, v, 99, 0.2);
            let (r1, r2) = residual(&ints, &t1, &t2);
            let fs = FockSpace::new(&f, &fock);
            let (e_bf, r1_bf, r2_bf) = fs.cc_residual(&t1, &t2);
            let e = energy(&ints, &t1, &t2);
            assert!((e - e_bf).abs() < 1e-11, "energy {e} vs {e_bf}");
            for k in 0..r1.len() {
                assert!(
                    (r1.data[k] - r1_bf.data[k]).abs() < 1e-11,
                    "R1[{k}] {} vs {}",
                    r1.data[k],
                    r1_bf.data[k]
                );
            }
            for k in 0..r2.len() {
                assert!(
                    (r2.data[k] - r2_bf.data[k]).abs() < 1e-11,
                    "R2[{k}] {} vs {}",
                    r2.data[k],
                    r2_bf.data[k]
                );
            }
        }
    }

    #[test]
    fn ccsd_converges_on_toy_system() {
        let (f, fock) = toy_system(3, 4, 8, 3, 0.0);
        let ints = MoIntegrals::new(f.clone(), &fock, true, false);
        let res = solve(&ints, &CcsdOptions::default(), &mut |_| {}).unwrap();
        let (r1, r2) = residual(&ints, &res.t1, &res.t2);
        assert!((r1.dot(&r1) + r2.dot(&r2)).sqrt() < 1e-8);
        assert!(res.e_corr < 0.0);
    }
}
