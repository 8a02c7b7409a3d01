//! Intermediates of the closed-shell CCSD equations.
//!
//! These are the spin-orbital intermediates of Stanton, Gauss, Watts & Bartlett, J. Chem.
//! Phys. 94 (1991) 4334 (F_ae, F_mi, F_me, W_mnij, W_mbej, W_abef), reduced to spatial
//! orbitals for a closed-shell reference with the usual αβ amplitudes
//! t_ij^ab ≡ t_{iα jβ}^{aα bβ} (same-spin amplitudes t_ij^ab − t_ij^ba), in the spirit of
//! Scuseria, Janssen & Schaefer, J. Chem. Phys. 89 (1988) 7382. They are checked term by
//! term against literal second quantisation (brute_force.rs) in the tests of ccsd.rs.
//!
//! Index order of every tensor follows its name, e.g. `woooo[k,l,i,j]`; integrals are
//! chemists' (pq|rs) blocks from integrals.rs.

use super::integrals::MoIntegrals;
use super::tensor::{einsum, Tensor};

/// τ_ij^ab = t_ij^ab + t_i^a t_j^b.
pub fn tau(t1: &Tensor, t2: &Tensor) -> Tensor {
    let mut tau = t2.clone();
    let (o, v) = (t1.shape[0], t1.shape[1]);
    for i in 0..o {
        for j in 0..o {
            for a in 0..v {
                let tia = t1.data[i * v + a];
                if tia == 0.0 {
                    continue;
                }
                for b in 0..v {
                    tau.data[((i * o + j) * v + a) * v + b] += tia * t1.data[j * v + b];
                }
            }
        }
    }
    tau
}

/// F_kc = f_kc + Σ_ld [2(kc|ld) − (kd|lc)] t_l^d.
pub fn fov(ints: &MoIntegrals, t1: &Tensor) -> Tensor {
    let mut f = einsum("kcld,ld->kc", &ints.lovov, t1);
    f.axpy(1.0, &ints.fov);
    f
}

/// F_ki = f_ki + Σ_lcd [2(kc|ld) − (kd|lc)] τ_il^cd (diagonal kept).
pub fn foo(ints: &MoIntegrals, tau: &Tensor) -> Tensor {
    let mut f = einsum("kcld,ilcd->ki", &ints.lovov, tau);
    f.axpy(1.0, &ints.foo);
    f
}

/// F_ac = f_ac − Σ_kld [2(kc|ld) − (kd|lc)] τ_kl^ad (diagonal kept).
pub fn fvv(ints: &MoIntegrals, tau: &Tensor) -> Tensor {
    let mut f = einsum("kcld,klad->ac", &ints.lovov, tau);
    f.scale(-1.0);
    f.axpy(1.0, &ints.fvv);
    f
}

/// L_ki = F_ki + Σ_c f_kc t_i^c + Σ_lc [2(lc|ki) − (kc|li)] t_l^c.
pub fn loo(ints: &MoIntegrals, t1: &Tensor, foo: &Tensor) -> Tensor {
    let mut l = foo.clone();
    l.axpy(1.0, &einsum("kc,ic->ki", &ints.fov, t1));
    l.axpy(2.0, &einsum("lcki,lc->ki", &ints.ovoo, t1));
    l.axpy(-1.0, &einsum("kcli,lc->ki", &ints.ovoo, t1));
    l
}

/// The (ov|vv) part of L_ac: Σ_kd [2(kd|ac) − (kc|ad)] t_k^d, accumulated over batches.
pub fn lvv_ovvv_part(ints: &MoIntegrals, t1: &Tensor) -> Tensor {
    let (o, v) = (ints.nocc, ints.nvir);
    let mut x = Tensor::zeros(&[v, v]);
    for (k0, k1) in ints.ovvv_batches(4) {
        let s = ints.ovvv_slice(k0, k1);
        let t1s = rows(t1, k0, k1);
        x.axpy(2.0, &einsum("kdac,kd->ac", &s, &t1s));
        x.axpy(-1.0, &einsum("kcad,kd->ac", &s, &t1s));
    }
    let _ = o;
    x
}

/// L_ac = F_ac − Σ_k f_kc t_k^a + (ov|vv) part.
pub fn lvv(ints: &MoIntegrals, t1: &Tensor, fvv: &Tensor, ovvv_part: &Tensor) -> Tensor {
    let mut l = fvv.clone();
    l.axpy(-1.0, &einsum("kc,ka->ac", &ints.fov, t1));
    l.axpy(1.0, ovvv_part);
    l
}

/// W_klij = (ki|lj) + Σ_c (lc|ki) t_j^c + Σ_c (kc|lj) t_i^c + Σ_cd (kc|ld) τ_ij^cd.
pub fn woooo(ints: &MoIntegrals, t1: &Tensor, tau: &Tensor) -> Tensor {
    let mut w = ints.oooo.permute(&[0, 2, 1, 3]);
    w.axpy(1.0, &einsum("lcki,jc->klij", &ints.ovoo, t1));
    w.axpy(1.0, &einsum("kclj,ic->klij", &ints.ovoo, t1));
    w.axpy(1.0, &einsum("kcld,ijcd->klij", &ints.ovov, tau));
    w
}

/// Rows k0..k1 of a matrix-shaped tensor (first axis sliced).
pub fn rows(t: &Tensor, k0: usize, k1: usize) -> Tensor {
    let inner: usize = t.shape[1..].iter().product();
    let mut shape = t.shape.clone();
    shape[0] = k1 - k0;
    Tensor {
        shape,
        data: t.data[k0 * inner..k1 * inner].to_vec(),
    }
}

/// Write `src` (first axis k0..k1 of the full tensor, along axis `axis`) into `dst`.
pub fn add_slice_along(dst: &mut Tensor, src: &Tensor, axis: usize, k0: usize) {
    let outer: usize = dst.shape[..axis].iter().product();
    let inner: usize = dst.shape[axis + 1..].iter().product();
    let nd = dst.shape[axis];
    let ns = src.shape[axis];
    for o in 0..outer {
        for k in 0..ns {
            let d0 = (o * nd + k0 + k) * inner;
            let s0 = (o * ns + k) * inner;
            for x in 0..inner {
                dst.data[d0 + x] += src.data[s0 + x];
            }
        }
    }
}

/// W_akic (ring, "direct" coupling) of the closed-shell equations.
pub fn wvoov(ints: &MoIntegrals, t1: &Tensor, t2: &Tensor) -> Tensor {
    let ovov = &ints.ovov;
    // (kc|ai) = ovov[k,c,i,a] → [a,k,i,c]
    let mut w = ovov.permute(&[3, 0, 2, 1]);
    for (k0, k1) in ints.ovvv_batches(4) {
        let s = ints.ovvv_slice(k0, k1);
        let part = einsum("kcad,id->akic", &s, t1);
        add_slice_along(&mut w, &part, 1, k0);
    }
    w.axpy(-1.0, &einsum("kcli,la->akic", &ints.ovoo, t1));
    w.axpy(-0.5, &einsum("ldkc,ilda->akic", ovov, t2));
    w.axpy(-0.5, &einsum("lckd,ilad->akic", ovov, t2));
    let z = einsum("ldkc,id->lkci", ovov, t1);
    w.axpy(-1.0, &einsum("lkci,la->akic", &z, t1));
    w.axpy(1.0, &einsum("ldkc,ilad->akic", ovov, t2));
    w
}

/// W_akci (ring, "exchange" coupling) of the closed-shell equations.
pub fn wvovo(ints: &MoIntegrals, t1: &Tensor, t2: &Tensor) -> Tensor {
    let ovov = &ints.ovov;
    // (ki|ac) = oovv[k,i,a,c] → [a,k,c,i]
    let mut w = ints.oovv.permute(&[2, 0, 3, 1]);
    for (k0, k1) in ints.ovvv_batches(4) {
        let s = ints.ovvv_slice(k0, k1);
        let part = einsum("kdac,id->akci", &s, t1);
        add_slice_along(&mut w, &part, 1, k0);
    }
    w.axpy(-1.0, &einsum("lcki,la->akci", &ints.ovoo, t1));
    w.axpy(-0.5, &einsum("lckd,ilda->akci", ovov, t2));
    let z = einsum("lckd,id->lkci", ovov, t1);
    w.axpy(-1.0, &einsum("lkci,la->akci", &z, t1));
    w
}
