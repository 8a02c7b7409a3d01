//! Spin-integrated CCSD on any single-determinant reference (UHF, ROHF, a core-hole state):
//! amplitudes t1 (α, β) and t2 (αα, ββ, αβ and its antisymmetric images) held as spin
//! blocks (spin_blocks.rs).
//!
//! The equations are those of ccsd.rs — Stanton, Gauss, Watts & Bartlett, J. Chem. Phys.
//! 94 (1991) 4334, effective Fock blocks F_ae, F_mi, F_me and intermediates W_mnij, W_mbej,
//! every off-diagonal Fock element (f_ia of ROHF) kept — contracted block by block, which is
//! their spin integration (Crawford & Schaefer, Rev. Comput. Chem. 14 (2000) 33). The
//! particle–particle ladder ½ Σ_ef τ_ij^ef ⟨ab||ef⟩ comes from spin_system.rs (held (ae|bf)
//! or batches rebuilt from the factors); the rest of W_abef is contracted piece by piece.
//!
//! Memory (f64 words, n2 = Σ over the t2 spin blocks = o_α²v_α² + o_β²v_β² + 4 o_α o_β v_α
//! v_β): amplitudes, residuals, intermediates and temporaries ≈ 16 n2; DIIS keeps only the
//! distinct blocks αα, ββ, αβ (u2 = o_α²v_α² + o_β²v_β² + o_α o_β v_α v_β words; the other
//! αβ images follow by antisymmetry), 2 × size × u2.

use super::core_hole::CoreHole;
use super::spin_blocks::{beinsum, Blocked};
use super::spin_system::SpinBlockedSystem;
use crate::correlation::ccsd::CcsdOptions;
use crate::scf::diis::VectorDiis;
use crate::{Error, Result};

#[derive(Debug, Clone)]
pub struct UccsdResult {
    pub e_corr: f64,
    pub e_mp2: f64,
    pub t1: Blocked,
    pub t2: Blocked,
    pub iterations: usize,
    pub residual_norm: f64,
}

/// Words of the t2 spin blocks.
pub fn t2_words(o: [usize; 2], v: [usize; 2]) -> f64 {
    let (oa, ob, va, vb) = (o[0] as f64, o[1] as f64, v[0] as f64, v[1] as f64);
    oa * oa * va * va + ob * ob * vb * vb + 4.0 * oa * ob * va * vb
}

/// Words of the distinct t2 blocks (αα, ββ, αβ).
pub fn t2_unique_words(o: [usize; 2], v: [usize; 2]) -> f64 {
    let (oa, ob, va, vb) = (o[0] as f64, o[1] as f64, v[0] as f64, v[1] as f64);
    oa * oa * va * va + ob * ob * vb * vb + oa * ob * va * vb
}

/// Words of the ground-state stage (see the module text).
pub fn peak_words(o: [usize; 2], v: [usize; 2], diis_size: usize) -> f64 {
    16.0 * t2_words(o, v) + 2.0 * diis_size as f64 * t2_unique_words(o, v)
}

/// The distinct blocks of t1 (α, β) and t2 (αα, ββ, αβ) that DIIS extrapolates.
const T1_MASKS: [usize; 2] = [0b00, 0b11];
const T2_MASKS: [usize; 3] = [0b0000, 0b1111, 0b1010];

fn p_ab(x: &Blocked) -> Blocked {
    let mut r = x.clone();
    r.axpy(-1.0, &x.permute(&[0, 1, 3, 2]));
    r
}

fn p_ij(x: &Blocked) -> Blocked {
    let mut r = x.clone();
    r.axpy(-1.0, &x.permute(&[1, 0, 2, 3]));
    r
}

fn tau(t1: &Blocked, t2: &Blocked, s: f64) -> Blocked {
    let mut r = t2.clone();
    let x = beinsum("ia,jb->ijab", t1, t1);
    r.axpy(s, &p_ab(&x));
    r
}

pub fn energy(sys: &SpinBlockedSystem, t1: &Blocked, t2: &Blocked) -> f64 {
    let x = beinsum("ia,jb->ijab", t1, t1);
    sys.fov.dot(t1) + 0.25 * sys.oovv.dot(t2) + 0.5 * sys.oovv.dot(&x)
}

fn without_diagonal(f: &Blocked) -> Blocked {
    let mut r = f.clone();
    for b in r.blocks.iter_mut().flatten() {
        let n = b.shape[0];
        for p in 0..n {
            b.data[p * n + p] = 0.0;
        }
    }
    r
}

/// Right-hand sides minus D·t: zero at the CCSD solution.
pub fn residual(sys: &SpinBlockedSystem, t1: &Blocked, t2: &Blocked) -> (Blocked, Blocked) {
    let taut = tau(t1, t2, 0.5);
    let tau = tau(t1, t2, 1.0);
    let (ovov, ovvv, ooov, oovv) = (&sys.ovov, &sys.ovvv, &sys.ooov, &sys.oovv);
    // The three contractions that read ⟨ma||ef⟩ with a among the summed or free letters
    // out of place read it reordered as [m,e,f,a], where each is one product in place;
    // one spin block is reordered at a time, so no more than one block's copy is alive
    // (as when each contraction reordered it for itself, three times as often).
    let mut fae = without_diagonal(&sys.fvv);
    let mut r1 = sys.fov.clone();
    let mut r2 = oovv.clone();
    let mut t1_ovvv: Option<Blocked> = None;
    for mask in 0..ovvv.blocks.len() {
        let Some(y) = ovvv.permute_one(mask, &[0, 2, 3, 1]) else {
            continue;
        };
        fae.axpy(1.0, &beinsum("mf,mfea->ae", t1, &y));
        r1.axpy(-0.5, &beinsum("imef,mefa->ia", t2, &y));
        let x = beinsum("ie,jabe->ijab", t1, &y);
        match &mut t1_ovvv {
            Some(acc) => acc.axpy(1.0, &x),
            None => t1_ovvv = Some(x),
        }
    }
    if let Some(x) = t1_ovvv {
        r2.axpy(-1.0, &p_ij(&x));
    }
    fae.axpy(-0.5, &beinsum("me,ma->ae", &sys.fov, t1));
    fae.axpy(-0.5, &beinsum("mnaf,mnef->ae", &taut, oovv));
    let mut fmi = without_diagonal(&sys.foo);
    fmi.axpy(0.5, &beinsum("ie,me->mi", t1, &sys.fov));
    fmi.axpy(1.0, &beinsum("ne,mnie->mi", t1, ooov));
    fmi.axpy(0.5, &beinsum("inef,mnef->mi", &taut, oovv));
    let mut fme = sys.fov.clone();
    fme.axpy(1.0, &beinsum("nf,mnef->me", t1, oovv));
    drop(taut);
    let mut wmnij = sys.oooo.clone();
    let x = beinsum("je,mnie->mnij", t1, ooov);
    wmnij.axpy(1.0, &x);
    wmnij.axpy(-1.0, &x.permute(&[0, 1, 3, 2]));
    wmnij.axpy(0.25, &beinsum("ijef,mnef->mnij", &tau, oovv));
    let mut wmbej = ovov.permute(&[0, 1, 3, 2]);
    wmbej.scale(-1.0);
    wmbej.axpy(1.0, &beinsum("jf,mbef->mbej", t1, ovvv));
    wmbej.axpy(1.0, &beinsum("nb,mnje->mbej", t1, ooov));
    let mut y = t2.clone();
    y.scale(0.5);
    y.axpy(1.0, &beinsum("jf,nb->jnfb", t1, t1));
    wmbej.axpy(-1.0, &beinsum("jnfb,mnef->mbej", &y, oovv));
    drop(y);

    r1.axpy(1.0, &beinsum("ie,ae->ia", t1, &fae));
    r1.axpy(-1.0, &beinsum("ma,mi->ia", t1, &fmi));
    r1.axpy(1.0, &beinsum("imae,me->ia", t2, &fme));
    r1.axpy(-1.0, &beinsum("nf,naif->ia", t1, ovov));
    r1.axpy(-0.5, &beinsum("mnae,mnie->ia", t2, ooov));
    let (d1, d2) = denominators(sys);
    sub_d(&mut r1, &d1, t1);

    let mut fbe = fae.clone();
    fbe.axpy(-0.5, &beinsum("mb,me->be", t1, &fme));
    r2.axpy(1.0, &p_ab(&beinsum("ijae,be->ijab", t2, &fbe)));
    let mut fmj = fmi.clone();
    fmj.axpy(0.5, &beinsum("je,me->mj", t1, &fme));
    r2.axpy(-1.0, &p_ij(&beinsum("imab,mj->ijab", t2, &fmj)));
    r2.axpy(0.5, &beinsum("mnab,mnij->ijab", &tau, &wmnij));
    drop(wmnij);
    // ½ τ_ijef ⟨ab||ef⟩
    r2.axpy(1.0, &sys.ladder(&tau));
    let yy = beinsum("ijef,maef->ijma", &tau, ovvv);
    r2.axpy(0.5, &p_ab(&beinsum("ijma,mb->ijab", &yy, t1)));
    drop(yy);
    let q = beinsum("ijef,mnef->ijmn", &tau, oovv);
    r2.axpy(0.125, &beinsum("ijmn,mnab->ijab", &q, &tau));
    drop(q);
    let mut z = beinsum("imae,mbej->ijab", t2, &wmbej);
    drop(wmbej);
    let x = beinsum("ie,mbje->imbj", t1, ovov);
    z.axpy(1.0, &beinsum("imbj,ma->ijab", &x, t1));
    r2.axpy(1.0, &p_ij(&p_ab(&z)));
    drop(z);
    r2.axpy(-1.0, &p_ab(&beinsum("ma,ijmb->ijab", t1, ooov)));
    sub_d(&mut r2, &d2, t2);
    (r1, r2)
}

fn sub_d(r: &mut Blocked, d: &Blocked, t: &Blocked) {
    for (mask, rb) in r.blocks.iter_mut().enumerate() {
        if let (Some(rb), Some(db), Some(tb)) = (rb, d.block(mask), t.block(mask)) {
            for ((x, d), t) in rb.data.iter_mut().zip(&db.data).zip(&tb.data) {
                *x -= d * t;
            }
        }
    }
}

/// D_i^a = f_ii − f_aa and D_ij^ab = f_ii + f_jj − f_aa − f_bb, per spin block.
pub fn denominators(sys: &SpinBlockedSystem) -> (Blocked, Blocked) {
    let (o, v) = (sys.o, sys.v);
    let sp = super::spin_blocks::spin;
    let d1 = Blocked::from_fn(&[o, v], |m, x| {
        sys.fo[sp(m, 0)][x[0]] - sys.fv[sp(m, 1)][x[1]]
    });
    let d2 = Blocked::from_fn(&[o, o, v, v], |m, x| {
        sys.fo[sp(m, 0)][x[0]] + sys.fo[sp(m, 1)][x[1]]
            - sys.fv[sp(m, 2)][x[2]]
            - sys.fv[sp(m, 3)][x[3]]
    });
    (d1, d2)
}

/// Solve the CCSD equations from first-order amplitudes t_ij^ab = ⟨ij||ab⟩ / D.
pub fn solve(
    sys: &SpinBlockedSystem,
    opts: &CcsdOptions,
    hole: Option<&CoreHole>,
    log: &mut dyn FnMut(&str),
) -> Result<UccsdResult> {
    let (d1, d2) = denominators(sys);
    if d1
        .blocks
        .iter()
        .flatten()
        .any(|b| b.data.iter().any(|&d| d.abs() < 1e-4))
    {
        return Err(Error::computation(
            "an occupied and a virtual orbital of the same spin are degenerate (|f_ii − f_aa| \
             < 1e-4 Eh): the coupled-cluster denominators vanish",
        ));
    }
    let div = |x: &Blocked, d: &Blocked| {
        let mut t = x.clone();
        for (mask, b) in t.blocks.iter_mut().enumerate() {
            if let (Some(b), Some(db)) = (b, d.block(mask)) {
                b.data.iter_mut().zip(&db.data).for_each(|(t, d)| *t /= d);
            }
        }
        t
    };
    let mut t2 = div(&sys.oovv, &d2);
    let mut t1 = div(&sys.fov, &d1);
    if let Some(h) = hole {
        h.project(&mut t1, &mut t2);
    }
    let e_mp2 = 0.25 * sys.oovv.dot(&t2);
    log(&format!("MP2-like first-order energy {e_mp2:.10} Eh"));
    let mut e_old = energy(sys, &t1, &t2);
    let mut diis = VectorDiis::new(opts.diis_size);
    let mut de = f64::INFINITY;
    let (fd1, fd2) = (d1.flatten_masks(&T1_MASKS), d2.flatten_masks(&T2_MASKS));
    for it in 1..=opts.max_iter {
        let (mut r1, mut r2) = residual(sys, &t1, &t2);
        if let Some(h) = hole {
            h.project(&mut r1, &mut r2);
        }
        let rnorm = (r1.dot(&r1) + r2.dot(&r2)).sqrt();
        if rnorm < opts.r_tol && de.abs() < opts.e_tol {
            log(&format!(
                "spin-blocked CCSD converged: E(corr) = {e_old:.10} Eh, {} iterations",
                it - 1
            ));
            return Ok(UccsdResult {
                e_corr: e_old,
                e_mp2,
                t1,
                t2,
                iterations: it - 1,
                residual_norm: rnorm,
            });
        }
        let (fr1, fr2) = (r1.flatten_masks(&T1_MASKS), r2.flatten_masks(&T2_MASKS));
        drop((r1, r2));
        let n1 = fr1.len();
        let mut step = Vec::with_capacity(n1 + fr2.len());
        step.extend(fr1.iter().zip(&fd1).map(|(r, d)| r / d));
        step.extend(fr2.iter().zip(&fd2).map(|(r, d)| r / d));
        let mut x = t1.flatten_masks(&T1_MASKS);
        x.extend(t2.flatten_masks(&T2_MASKS));
        let xn = diis.extrapolate(x, step);
        t1.fill_masks(&T1_MASKS, &xn[..n1]);
        t2.fill_masks(&T2_MASKS, &xn[n1..]);
        t2.restore_mixed_images();
        if let Some(h) = hole {
            h.project(&mut t1, &mut t2);
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
