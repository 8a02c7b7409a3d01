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

/// Everything the CCSD residual takes from the (ov|vv) block, in one pass over occupied
/// slices k of (kc|ab). With Q[k,a,c,d] = (kd|ac) and L = 2Q − Q(c↔d):
/// `lvv_x[a,c]` = Σ_kd L[k,a,c,d] t_k^d (part of L_ac), `r1[i,a]` = Σ_kcd L[k,a,c,d] t_ik^cd,
/// `t2_tmp[i,j,a,b]` = Σ_c (ia|bc) t_j^c, `y[k,a,i,j]` = Σ_cd (kd|ac) τ_ij^cd,
/// `wvoov[a,k,i,c]` = Σ_d (kc|ad) t_i^d, `wvovo[a,k,c,i]` = Σ_d (kd|ac) t_i^d.
pub struct OvvvTerms {
    pub lvv_x: Tensor,
    pub r1: Tensor,
    pub t2_tmp: Tensor,
    pub y: Tensor,
    pub wvoov: Tensor,
    pub wvovo: Tensor,
}

/// One pass over (ov|vv); with `t2 = None` only `lvv_x` is formed.
pub fn ovvv_pass(ints: &MoIntegrals, t1: &Tensor, t2: Option<(&Tensor, &Tensor)>) -> OvvvTerms {
    let (o, v) = (ints.nocc, ints.nvir);
    let mut out = OvvvTerms {
        lvv_x: Tensor::zeros(&[v, v]),
        r1: Tensor::zeros(&[o, v]),
        t2_tmp: Tensor::zeros(&[o, o, v, v]),
        y: Tensor::zeros(&[o, v, o, o]),
        wvoov: Tensor::zeros(&[v, o, o, v]),
        wvovo: Tensor::zeros(&[v, o, v, o]),
    };
    let t2ki = t2.map(|(t2, _)| t2.permute(&[1, 0, 2, 3])); // [k,i,c,d]
    for (k0, k1) in ints.ovvv_batches(0) {
        let s = ints.ovvv_slice(k0, k1);
        let q = s.permute(&[0, 2, 3, 1]); // (kd|ac) as [k,a,c,d]
        let mut l = q.permute(&[0, 1, 3, 2]);
        l.scale(-1.0);
        l.axpy(2.0, &q);
        let t1s = rows(t1, k0, k1);
        // Σ_kd L[k,a,c,d] t_k^d, k by k (contiguous slices, no transposition)
        let vvv = v * v * v;
        for k in 0..k1 - k0 {
            let lk = Tensor {
                shape: vec![v, v, v],
                data: l.data[k * vvv..(k + 1) * vvv].to_vec(),
            };
            let tk = Tensor {
                shape: vec![v],
                data: t1s.data[k * v..(k + 1) * v].to_vec(),
            };
            out.lvv_x.axpy(1.0, &einsum("acd,d->ac", &lk, &tk));
            if let Some(t2ki) = &t2ki {
                let tk2 = Tensor {
                    shape: vec![o, v, v],
                    data: t2ki.data[(k0 + k) * o * v * v..(k0 + k + 1) * o * v * v].to_vec(),
                };
                out.r1.axpy(1.0, &einsum("acd,icd->ia", &lk, &tk2));
            }
        }
        drop(l);
        if let Some((_, tau)) = t2 {
            let part = einsum("iabc,jc->ijab", &s, t1);
            add_slice_along(&mut out.t2_tmp, &part, 0, k0);
            let y = einsum("kacd,ijcd->kaij", &q, tau);
            add_slice_along(&mut out.y, &y, 0, k0);
            let p = einsum("kcad,id->akic", &s, t1);
            add_slice_along(&mut out.wvoov, &p, 1, k0);
            let p = einsum("kacd,id->akci", &q, t1);
            add_slice_along(&mut out.wvovo, &p, 1, k0);
        }
    }
    out
}

/// The (ov|vv) part of L_ac: Σ_kd [2(kd|ac) − (kc|ad)] t_k^d.
pub fn lvv_ovvv_part(ints: &MoIntegrals, t1: &Tensor) -> Tensor {
    ovvv_pass(ints, t1, None).lvv_x
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
/// `ovvv_part` is `OvvvTerms::wvoov`.
pub fn wvoov(ints: &MoIntegrals, t1: &Tensor, t2: &Tensor, ovvv_part: &Tensor) -> Tensor {
    let ovov = &ints.ovov;
    // (kc|ai) = ovov[k,c,i,a] → [a,k,i,c]
    let mut w = ovov.permute(&[3, 0, 2, 1]);
    w.axpy(1.0, ovvv_part);
    w.axpy(-1.0, &einsum("kcli,la->akic", &ints.ovoo, t1));
    w.axpy(-0.5, &einsum("ldkc,ilda->akic", ovov, t2));
    w.axpy(-0.5, &einsum("lckd,ilad->akic", ovov, t2));
    let z = einsum("ldkc,id->lkci", ovov, t1);
    w.axpy(-1.0, &einsum("lkci,la->akic", &z, t1));
    w.axpy(1.0, &einsum("ldkc,ilad->akic", ovov, t2));
    w
}

/// W_akci (ring, "exchange" coupling) of the closed-shell equations.
/// `ovvv_part` is `OvvvTerms::wvovo`.
pub fn wvovo(ints: &MoIntegrals, t1: &Tensor, t2: &Tensor, ovvv_part: &Tensor) -> Tensor {
    let ovov = &ints.ovov;
    // (ki|ac) = oovv[k,i,a,c] → [a,k,c,i]
    let mut w = ints.oovv.permute(&[2, 0, 3, 1]);
    w.axpy(1.0, ovvv_part);
    w.axpy(-1.0, &einsum("lcki,la->akci", &ints.ovoo, t1));
    w.axpy(-0.5, &einsum("lckd,ilda->akci", ovov, t2));
    let z = einsum("lckd,id->lkci", ovov, t1);
    w.axpy(-1.0, &einsum("lkci,la->akci", &z, t1));
    w
}
