//! Spin-orbital CCSD on any single-determinant reference (UHF, ROHF, a core-hole state).
//!
//! The amplitude equations in the form of Stanton, Gauss, Watts & Bartlett, J. Chem. Phys.
//! 94 (1991) 4334, with the effective Fock blocks F_ae, F_mi, F_me and the two-particle
//! intermediates W_mnij, W_abef, W_mbej. They hold for a non-canonical reference: every
//! off-diagonal Fock element, including the occupied–virtual block f_ia of an ROHF or other
//! non-Hartree–Fock determinant, is kept (the orbital-energy denominators use only the
//! diagonal). E = Σ f_ia t_i^a + ¼ Σ ⟨ij||ab⟩ t_ij^ab + ½ Σ ⟨ij||ab⟩ t_i^a t_j^b.
//! The ladder term ½ Σ_ef τ_ij^ef W_abef is contracted piece by piece, never forming the
//! v⁴ intermediate W_abef.
//! Iteration: Jacobi step + DIIS (scf::diis::VectorDiis), as the closed-shell ccsd.rs.
//!
//! Memory (f64 words, o/v active occupied/virtual spin orbitals): amplitudes, residuals and
//! the intermediates and einsum temporaries of one residual ≈ 16 o²v², DIIS 2 × size × o²v².

use super::core_hole::CoreHole;
use super::spin_orbital::SpinOrbitalSystem;
use crate::correlation::tensor::{einsum, Tensor};
use crate::scf::diis::VectorDiis;
use crate::{Error, Result};

pub use crate::correlation::ccsd::CcsdOptions;

#[derive(Debug, Clone)]
pub struct SoCcsdResult {
    pub e_corr: f64,
    pub e_mp2: f64,
    pub t1: Tensor,
    pub t2: Tensor,
    pub iterations: usize,
    pub residual_norm: f64,
}

/// Words of the ground-state stage (see the module text).
pub fn peak_words(o: usize, v: usize, diis_size: usize) -> f64 {
    (16.0 + 2.0 * diis_size as f64) * (o * o * v * v) as f64
}

/// t_ij^ab ± antisymmetrizers: x − x with (a,b) swapped.
fn p_ab(x: &Tensor) -> Tensor {
    let mut r = x.clone();
    r.axpy(-1.0, &x.permute(&[0, 1, 3, 2]));
    r
}

fn p_ij(x: &Tensor) -> Tensor {
    let mut r = x.clone();
    r.axpy(-1.0, &x.permute(&[1, 0, 2, 3]));
    r
}

/// τ̃ (scale 0.5) or τ (scale 1): t_ij^ab + s (t_i^a t_j^b − t_i^b t_j^a).
fn tau(t1: &Tensor, t2: &Tensor, s: f64) -> Tensor {
    let mut r = t2.clone();
    let x = einsum("ia,jb->ijab", t1, t1);
    r.axpy(s, &p_ab(&x));
    r
}

pub fn energy(sys: &SpinOrbitalSystem, t1: &Tensor, t2: &Tensor) -> f64 {
    let x = einsum("ia,jb->ijab", t1, t1);
    sys.fov.dot(t1) + 0.25 * sys.oovv.dot(t2) + 0.5 * sys.oovv.dot(&x)
}

fn without_diagonal(f: &Tensor) -> Tensor {
    let n = f.shape[0];
    Tensor::from_fn(&[n, n], |x| if x[0] == x[1] { 0.0 } else { f.get(x) })
}

/// Right-hand sides minus D·t: zero at the CCSD solution.
pub fn residual(sys: &SpinOrbitalSystem, t1: &Tensor, t2: &Tensor) -> (Tensor, Tensor) {
    let taut = tau(t1, t2, 0.5);
    let tau = tau(t1, t2, 1.0);
    let (ovov, ovvv, ooov, oovv) = (&sys.ovov, &sys.ovvv, &sys.ooov, &sys.oovv);
    // ---- F intermediates ----
    let mut fae = without_diagonal(&sys.fvv);
    fae.axpy(-0.5, &einsum("me,ma->ae", &sys.fov, t1));
    // Σ_mf t_mf <ma||fe>
    fae.axpy(1.0, &einsum("mf,mafe->ae", t1, ovvv));
    fae.axpy(-0.5, &einsum("mnaf,mnef->ae", &taut, oovv));
    let mut fmi = without_diagonal(&sys.foo);
    fmi.axpy(0.5, &einsum("ie,me->mi", t1, &sys.fov));
    fmi.axpy(1.0, &einsum("ne,mnie->mi", t1, ooov));
    fmi.axpy(0.5, &einsum("inef,mnef->mi", &taut, oovv));
    let mut fme = sys.fov.clone();
    fme.axpy(1.0, &einsum("nf,mnef->me", t1, oovv));
    drop(taut);
    // ---- W_mnij = <mn||ij> + P(ij) t_je <mn||ie> + ¼ τ_ijef <mn||ef> ----
    let mut wmnij = sys.oooo.clone();
    let x = einsum("je,mnie->mnij", t1, ooov);
    wmnij.axpy(1.0, &x);
    wmnij.axpy(-1.0, &x.permute(&[0, 1, 3, 2]));
    wmnij.axpy(0.25, &einsum("ijef,mnef->mnij", &tau, oovv));
    // ---- W_mbej as [m,b,e,j] ----
    // <mb||ej> = −<mb||je> = −ovov[m,b,j,e]
    let mut wmbej = ovov.permute(&[0, 1, 3, 2]);
    wmbej.scale(-1.0);
    wmbej.axpy(1.0, &einsum("jf,mbef->mbej", t1, ovvv));
    // − t_nb <mn||ej> = + t_nb <mn||je>
    wmbej.axpy(1.0, &einsum("nb,mnje->mbej", t1, ooov));
    let mut y = t2.permute(&[0, 1, 2, 3]);
    y.scale(0.5);
    y.axpy(1.0, &einsum("jf,nb->jnfb", t1, t1));
    wmbej.axpy(-1.0, &einsum("jnfb,mnef->mbej", &y, oovv));
    drop(y);

    // ---- T1 ----
    let mut r1 = sys.fov.clone();
    r1.axpy(1.0, &einsum("ie,ae->ia", t1, &fae));
    r1.axpy(-1.0, &einsum("ma,mi->ia", t1, &fmi));
    r1.axpy(1.0, &einsum("imae,me->ia", t2, &fme));
    r1.axpy(-1.0, &einsum("nf,naif->ia", t1, ovov));
    r1.axpy(-0.5, &einsum("imef,maef->ia", t2, ovvv));
    // −½ t_mnae <nm||ei> = −½ t_mnae <mn||ie>
    r1.axpy(-0.5, &einsum("mnae,mnie->ia", t2, ooov));
    // minus the diagonal part: D_ia t_ia with D = f_ii − f_aa
    let (o, v) = (sys.nocc, sys.nvir);
    for i in 0..o {
        for a in 0..v {
            r1.data[i * v + a] -=
                (sys.foo.data[i * o + i] - sys.fvv.data[a * v + a]) * t1.data[i * v + a];
        }
    }

    // ---- T2 ----
    let mut r2 = oovv.clone();
    // P(ab) t_ijae (F_be − ½ t_mb F_me)
    let mut fbe = fae.clone();
    fbe.axpy(-0.5, &einsum("mb,me->be", t1, &fme));
    r2.axpy(1.0, &p_ab(&einsum("ijae,be->ijab", t2, &fbe)));
    // −P(ij) t_imab (F_mj + ½ t_je F_me)
    let mut fmj = fmi.clone();
    fmj.axpy(0.5, &einsum("je,me->mj", t1, &fme));
    r2.axpy(-1.0, &p_ij(&einsum("imab,mj->ijab", t2, &fmj)));
    // ½ τ_mnab W_mnij
    r2.axpy(0.5, &einsum("mnab,mnij->ijab", &tau, &wmnij));
    drop(wmnij);
    // ½ τ_ijef W_abef, W_abef = <ab||ef> − P(ab) t_mb <am||ef> + ¼ τ_mnab <mn||ef>
    r2.axpy(0.5, &einsum("ijef,abef->ijab", &tau, &sys.vvvv));
    // −P(ab) t_mb <am||ef> = +P(ab) t_mb <ma||ef>; contracted with ½ τ_ijef
    let yy = einsum("ijef,maef->ijma", &tau, ovvv);
    r2.axpy(0.5, &p_ab(&einsum("ijma,mb->ijab", &yy, t1)));
    drop(yy);
    let q = einsum("ijef,mnef->ijmn", &tau, oovv);
    r2.axpy(0.125, &einsum("ijmn,mnab->ijab", &q, &tau));
    drop(q);
    // P(ij)P(ab) (t_imae W_mbej − t_ie t_ma <mb||ej>)
    let mut z = einsum("imae,mbej->ijab", t2, &wmbej);
    drop(wmbej);
    // − t_ie t_ma <mb||ej> = + t_ie t_ma <mb||je>
    let x = einsum("ie,mbje->imbj", t1, ovov);
    z.axpy(1.0, &einsum("imbj,ma->ijab", &x, t1));
    r2.axpy(1.0, &p_ij(&p_ab(&z)));
    drop(z);
    // P(ij) t_ie <ab||ej>, <ab||ej> = −<je||ab> = −ovvv[j,e,a,b]
    r2.axpy(-1.0, &p_ij(&einsum("ie,jeab->ijab", t1, ovvv)));
    // −P(ab) t_ma <mb||ij>, <mb||ij> = <ij||mb> = ooov[i,j,m,b]
    r2.axpy(-1.0, &p_ab(&einsum("ma,ijmb->ijab", t1, ooov)));
    let d2 = denominators(sys);
    for (r, (d, t)) in r2.data.iter_mut().zip(d2.data.iter().zip(&t2.data)) {
        *r -= d * t;
    }
    (r1, r2)
}

/// D_ij^ab = f_ii + f_jj − f_aa − f_bb.
pub fn denominators(sys: &SpinOrbitalSystem) -> Tensor {
    let (o, v) = (sys.nocc, sys.nvir);
    let fo = |i: usize| sys.foo.data[i * o + i];
    let fv = |a: usize| sys.fvv.data[a * v + a];
    Tensor::from_fn(&[o, o, v, v], |x| fo(x[0]) + fo(x[1]) - fv(x[2]) - fv(x[3]))
}

/// Solve the CCSD equations from first-order amplitudes t_ij^ab = ⟨ij||ab⟩ / D.
/// The spin-orbital indices (occupied, virtual) as (spin, index within the spin).
pub fn spin_index(sys: &SpinOrbitalSystem, idx: usize, vir: bool) -> (usize, usize) {
    let spins = if vir { &sys.spin_vir } else { &sys.spin_occ };
    let s = spins[idx] as usize;
    (s, spins[..idx].iter().filter(|&&x| x as usize == s).count())
}

/// Zero the elements of t1 [o, v] and t2 [o, o, v, v] outside the core-ionized space
/// (core_hole.rs), element by element in spin-orbital form.
pub fn project(sys: &SpinOrbitalSystem, h: &CoreHole, t1: &mut Tensor, t2: &mut Tensor) {
    let (o, v) = (sys.nocc, sys.nvir);
    let occ: Vec<_> = (0..o).map(|i| spin_index(sys, i, false)).collect();
    let vir: Vec<_> = (0..v).map(|a| spin_index(sys, a, true)).collect();
    for i in 0..o {
        for a in 0..v {
            if h.forbidden(&[occ[i]], &[vir[a]]) {
                t1.data[i * v + a] = 0.0;
            }
        }
    }
    for i in 0..o {
        for j in 0..o {
            for a in 0..v {
                for b in 0..v {
                    if h.forbidden(&[occ[i], occ[j]], &[vir[a], vir[b]]) {
                        t2.data[((i * o + j) * v + a) * v + b] = 0.0;
                    }
                }
            }
        }
    }
}

pub fn solve(
    sys: &SpinOrbitalSystem,
    opts: &CcsdOptions,
    hole: Option<&CoreHole>,
    log: &mut dyn FnMut(&str),
) -> Result<SoCcsdResult> {
    let (o, v) = (sys.nocc, sys.nvir);
    let d2 = denominators(sys);
    let fo = |i: usize| sys.foo.data[i * o + i];
    let fv = |a: usize| sys.fvv.data[a * v + a];
    let d1 = Tensor::from_fn(&[o, v], |x| fo(x[0]) - fv(x[1]));
    // A non-aufbau reference (a MOM hole below occupied orbitals) has some positive
    // denominators; the iterations can still converge. A vanishing one cannot be used.
    if d1.data.iter().any(|&d| d.abs() < 1e-4) {
        return Err(Error::computation(
            "an occupied and a virtual orbital of the same spin are degenerate (|f_ii − f_aa| \
             < 1e-4 Eh): the coupled-cluster denominators vanish",
        ));
    }
    let mut t2 = sys.oovv.clone();
    for (t, d) in t2.data.iter_mut().zip(&d2.data) {
        *t /= d;
    }
    let mut t1 = sys.fov.clone();
    for (t, d) in t1.data.iter_mut().zip(&d1.data) {
        *t /= d;
    }
    if let Some(h) = hole {
        project(sys, h, &mut t1, &mut t2);
    }
    let e_mp2 = 0.25 * sys.oovv.dot(&t2);
    log(&format!("MP2-like first-order energy {e_mp2:.10} Eh"));
    let mut e_old = energy(sys, &t1, &t2);
    let mut diis = VectorDiis::new(opts.diis_size);
    let mut de = f64::INFINITY;
    for it in 1..=opts.max_iter {
        let (mut r1, mut r2) = residual(sys, &t1, &t2);
        if let Some(h) = hole {
            project(sys, h, &mut r1, &mut r2);
        }
        let rnorm = (r1.dot(&r1) + r2.dot(&r2)).sqrt();
        if rnorm < opts.r_tol && de.abs() < opts.e_tol {
            log(&format!(
                "open-shell CCSD converged: E(corr) = {e_old:.10} Eh, {} iterations",
                it - 1
            ));
            return Ok(SoCcsdResult {
                e_corr: e_old,
                e_mp2,
                t1,
                t2,
                iterations: it - 1,
                residual_norm: rnorm,
            });
        }
        crate::correlation::tensor::diis_amplitude_step(
            &mut diis,
            &mut t1,
            &mut t2,
            [&r1, &r2],
            [&d1, &d2],
        );
        if let Some(h) = hole {
            project(sys, h, &mut t1, &mut t2);
        }
        let e_new = energy(sys, &t1, &t2);
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
        "open-shell CCSD did not converge in {} iterations (last E(corr) = {e_old:.10} Eh); \
         DIIS with {} vectors from first-order amplitudes was used",
        opts.max_iter, opts.diis_size
    )))
}
