//! Elements of the similarity-transformed Hamiltonian H̄ = e^{−T} H e^{T} that the
//! EOM-IP sigma vectors need, for a closed-shell reference.
//!
//! Spin-orbital definitions: Stanton & Gauss, J. Chem. Phys. 101 (1994) 8938, and Gauss &
//! Stanton, J. Chem. Phys. 103 (1995) 3561, Table III (H̄_me, H̄_mi, H̄_ae, H̄_mnij,
//! H̄_mnie, H̄_mbej, H̄_mbij). Each is reduced here to its αβ spin block(s) over spatial
//! orbitals; the names give the index order of the arrays:
//!
//! - `fov[m,e]` = H̄_me, `loo[m,i]` = H̄_mi, `lvv[a,e]` = H̄_ae (all spin-diagonal);
//! - `woooo[m,n,i,j]` = H̄_{mα nβ iα jβ}, `wooov[m,n,i,e]` = H̄_{mα nβ iα eβ};
//! - `wovvo[m,b,e,j]` = H̄_{mα bβ eα jβ} and `wovov[m,b,j,e]` = H̄_{mα bβ jα eβ}
//!   (the two spin couplings of H̄_mbej; the same-spin block is their difference);
//! - `wovoo[m,b,i,j]` = H̄_{mα bβ iα jβ};
//! - the three-body term reads ⟨mn|ef⟩ = (me|nf) and the ground-state T2.
//!
//! With T1 = 0 and first-order T2 the same expressions give EOM-IP-MBPT2 (Stanton & Gauss,
//! J. Chem. Phys. 103 (1995) 1064).

use super::ccsd_intermediates as imd;
use super::integrals::MoIntegrals;
use super::tensor::{einsum, sum_of_products, Tensor};

/// H̄ blocks, the large ones stored in the index order the sigma contractions read
/// (so no per-iteration transposition of o²v² arrays is needed).
pub struct IpHbar {
    pub fov: Tensor,
    pub loo: Tensor,
    pub lvv: Tensor,
    pub woooo: Tensor,
    pub wooov: Tensor,
    /// H̄_{mα bβ eα jβ} stored as [b,j,m,e]
    pub wovvo_bjme: Tensor,
    /// H̄_{mα bβ jα eβ} stored as [b,j,m,e]
    pub wovov_bjme: Tensor,
    pub wovoo: Tensor,
    /// 2(ld|kc) − (kd|lc) stored as [c,k,l,d]
    pub w3_cklb: Tensor,
    /// t_ij^cb stored as [c,i,j,b]
    pub t2_cijb: Tensor,
}

/// 2 t_ij^ab − t_ij^ba.
fn t2_tilde(t2: &Tensor) -> Tensor {
    let mut x = t2.permute(&[0, 1, 3, 2]);
    x.scale(-1.0);
    x.axpy(2.0, t2);
    x
}

/// Release a large tensor that is no longer needed.
fn free(t: &mut Tensor) {
    *t = Tensor::zeros(&[0]);
}

impl IpHbar {
    /// Build from the MO integrals (consumed: blocks are released as soon as they are no
    /// longer needed, to keep the peak low) and the ground-state amplitudes. With T1 = 0
    /// (EOM-IP-MBPT2) the terms linear and quadratic in T1 are skipped.
    pub fn new(mut ints: MoIntegrals, t1: &Tensor, t2: Tensor) -> Self {
        let (o, v) = (ints.nocc, ints.nvir);
        ints.vvvv = None;
        let has_t1 = t1.data.iter().any(|&x| x != 0.0);
        let tau_t1 = has_t1.then(|| imd::tau(t1, &t2));
        let tau = tau_t1.as_ref().unwrap_or(&t2);
        let fov = imd::fov(&ints, t1);
        let foo = imd::foo(&ints, tau);
        let fvv = imd::fvv(&ints, tau);
        let lvv_x = if has_t1 {
            imd::lvv_ovvv_part(&ints, t1)
        } else {
            Tensor::zeros(&[v, v])
        };
        let loo = imd::loo(&ints, t1, &foo);
        let lvv = imd::lvv(&ints, t1, &fvv, &lvv_x);
        let woooo = imd::woooo(&ints, t1, tau);
        free(&mut ints.lovov);
        let t2x = t2_tilde(&t2);
        let ovov = &ints.ovov;
        let ovoo = &ints.ovoo;

        // H̄_mnie: (mi|ne) + Σ_f t_i^f (mf|ne)
        let mut wooov = ovoo.permute(&[2, 0, 3, 1]);
        if has_t1 {
            wooov.axpy(1.0, &einsum("ic,kcld->klid", t1, ovov));
        }

        // H̄_mbij without its (ov|vv) term
        let mut wovoo = ovoo.permute(&[2, 1, 3, 0]);
        wovoo.axpy(1.0, &einsum("me,ijeb->mbij", &fov, &t2));
        wovoo.axpy(1.0, &einsum("nemi,jnbe->mbij", ovoo, &t2x));
        wovoo.axpy(-1.0, &einsum("meni,jnbe->mbij", ovoo, &t2));
        wovoo.axpy(-1.0, &einsum("menj,ineb->mbij", ovoo, &t2));
        if has_t1 {
            wovoo.axpy(-1.0, &einsum("mnij,nb->mbij", &woooo, t1));
            wovoo.axpy(1.0, &einsum("mejb,ie->mbij", ovov, t1));
            let mut x = einsum("menf,njfb->mejb", ovov, &t2x);
            x.axpy(-1.0, &einsum("mfne,njfb->mejb", ovov, &t2));
            wovoo.axpy(1.0, &einsum("mejb,ie->mbij", &x, t1));
            drop(x);
            wovoo.axpy(1.0, &einsum("mibe,je->mbij", &ints.oovv, t1));
            let y = einsum("mfne,infb->meib", ovov, &t2);
            wovoo.axpy(-1.0, &einsum("meib,je->mbij", &y, t1));
        }

        // H̄_mbej, exchange coupling (stored as H̄_mbje)
        let mut wovov = ints.oovv.permute(&[0, 2, 1, 3]);
        free(&mut ints.oovv);
        let ovov = &ints.ovov;
        wovov.axpy(-1.0, &einsum("mfne,jnfb->mbje", ovov, &t2));
        if has_t1 {
            wovov.axpy(-1.0, &einsum("nemj,nb->mbje", ovoo, t1));
            let z = einsum("mfne,jf->mnej", ovov, t1);
            wovov.axpy(-1.0, &einsum("mnej,nb->mbje", &z, t1));
        }

        // H̄_mbej, direct coupling
        let mut wovvo = ovov.permute(&[0, 3, 1, 2]);
        wovvo.axpy(1.0, &einsum("menf,jnbf->mbej", ovov, &t2x));
        drop(t2x);
        wovvo.axpy(-1.0, &einsum("mfne,jnbf->mbej", ovov, &t2));
        if has_t1 {
            wovvo.axpy(-1.0, &einsum("menj,nb->mbej", ovoo, t1));
            let z = einsum("menf,jf->menj", ovov, t1);
            wovvo.axpy(-1.0, &einsum("menj,nb->mbej", &z, t1));
        }

        // (ov|vv) contributions, in slices over the occupied index m. The τ term is
        // contracted one (m, e) at a time so the slice is never reordered.
        let tau_efij = tau.permute(&[2, 3, 0, 1]);
        let vv = v * v;
        ints.for_each_ovvv_slice(&mut |k0, k1, s| {
            if has_t1 {
                let s = Tensor {
                    shape: vec![k1 - k0, v, v, v],
                    data: s.to_vec(),
                };
                let p = einsum("mebf,jf->mbej", &s, t1);
                imd::add_slice_along(&mut wovvo, &p, 0, k0);
                let p = einsum("mfbe,jf->mbje", &s, t1);
                imd::add_slice_along(&mut wovov, &p, 0, k0);
            }
            for m in 0..k1 - k0 {
                // wovoo[m][b][ij] += Σ_ef (me|bf) τ_ij^ef
                sum_of_products(
                    &mut wovoo.data[(k0 + m) * v * o * o..(k0 + m + 1) * v * o * o],
                    &s[m * v * vv..(m + 1) * v * vv],
                    &tau_efij.data,
                    v,
                    v,
                    o * o,
                    v,
                );
            }
        });
        drop(tau_efij);
        drop(tau_t1);
        // three-body term: Σ_kld [2 (ld|kc) − (kd|lc)] R2[k,l,d], as [c,k,l,d]
        let mut w3 = ovov.permute(&[3, 2, 0, 1]); // (ld|kc): ovov[l,d,k,c] → [c,k,l,d]
        w3.scale(2.0);
        w3.axpy(-1.0, &ovov.permute(&[3, 0, 2, 1])); // (kd|lc): ovov[k,d,l,c] → [c,k,l,d]
        drop(ints);
        let wovvo_bjme = wovvo.permute(&[1, 3, 0, 2]);
        drop(wovvo);
        let wovov_bjme = wovov.permute(&[1, 2, 0, 3]);
        drop(wovov);
        let t2_cijb = t2.permute(&[2, 0, 1, 3]);
        drop(t2);
        IpHbar {
            fov,
            loo,
            lvv,
            woooo,
            wooov,
            wovvo_bjme,
            wovov_bjme,
            wovoo,
            w3_cklb: w3,
            t2_cijb,
        }
    }
}
