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
use super::tensor::{einsum, par_gemm, sum_of_products, Tensor};

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
///
/// Every term is read from the slice in its stored order s_k[c][a][b] = (kc|ab), one
/// occupied k at a time, as matrix products over (v × v) or (v² × v) views of s_k; the
/// amplitudes are reordered instead (o²v² once per pass), never the o v³ slice.
pub fn ovvv_pass(ints: &MoIntegrals, t1: &Tensor, t2: Option<(&Tensor, &Tensor)>) -> OvvvTerms {
    use bandcast_linalg::{MatMut, MatRef};
    let (o, v) = (ints.nocc, ints.nvir);
    let (vv, vvv) = (v * v, v * v * v);
    let mut out = OvvvTerms {
        lvv_x: Tensor::zeros(&[v, v]),
        r1: Tensor::zeros(&[o, v]),
        t2_tmp: Tensor::zeros(&[o, o, v, v]),
        y: Tensor::zeros(&[o, v, o, o]),
        wvoov: Tensor::zeros(&[v, o, o, v]),
        wvovo: Tensor::zeros(&[v, o, v, o]),
    };
    // U[k,e,f,i] = 2 t_ik^fe − t_ik^ef; τ as [d,c,i,j]
    let amps = t2.map(|(t2, tau)| {
        let mut u = t2.permute(&[1, 3, 2, 0]);
        u.scale(2.0);
        u.axpy(-1.0, &t2.permute(&[1, 2, 3, 0]));
        (u, tau.permute(&[3, 2, 0, 1]))
    });
    let t1m = MatRef::from_row_major_slice(&t1.data, o, v);
    let mut r1t = vec![0.0; v * o]; // r1 as [a][i]
    let mut m_vvo = vec![0.0; vv * o];
    let mut m_vv = vec![0.0; vv];
    let mut y_k = vec![0.0; v * o * o];
    ints.for_each_ovvv_slice(&mut |k0, k1, s| {
        for kk in 0..k1 - k0 {
            let k = k0 + kk;
            let sk = &s[kk * vvv..(kk + 1) * vvv];
            let s_rows = MatRef::from_row_major_slice(sk, vv, v); // [(c,a)][b]
            let s_cols = MatRef::from_row_major_slice(sk, v, vv); // [c][(a,b)]
            let tk = t1m.subrows(k, 1);
            // lvv_x[a][c] += 2 Σ_d t_k^d (kd|ac) − Σ_d (kc|ad) t_k^d
            par_gemm(
                MatMut::from_row_major_slice_mut(&mut out.lvv_x.data, 1, vv),
                true,
                tk,
                s_cols,
                2.0,
            );
            par_gemm(
                MatMut::from_row_major_slice_mut(&mut m_vv, vv, 1),
                false,
                s_rows,
                tk.transpose(),
                1.0,
            );
            for c in 0..v {
                for a in 0..v {
                    out.lvv_x.data[a * v + c] -= m_vv[c * v + a];
                }
            }
            let Some((u, tau_dcij)) = &amps else { continue };
            // r1[i][a] += Σ_ef (ke|af) U[k,e,f,i]
            sum_of_products(
                &mut r1t,
                sk,
                &u.data[k * v * v * o..(k + 1) * v * v * o],
                v,
                v,
                o,
                v,
            );
            // y[k][a][ij] = Σ_dc (kd|ac) τ_ij^cd
            y_k.iter_mut().for_each(|x| *x = 0.0);
            sum_of_products(&mut y_k, sk, &tau_dcij.data, v, v, o * o, v);
            out.y.data[k * v * o * o..(k + 1) * v * o * o].copy_from_slice(&y_k);
            // t2_tmp[k][j][a][b] += Σ_c (ka|bc) t_j^c:  M[(a,b)][j] = s_k[(a,b)][c] t1ᵀ
            par_gemm(
                MatMut::from_row_major_slice_mut(&mut m_vvo, vv, o),
                false,
                s_rows,
                t1m.transpose(),
                1.0,
            );
            for j in 0..o {
                let dst = &mut out.t2_tmp.data[(k * o + j) * vv..(k * o + j + 1) * vv];
                for (ab, x) in dst.iter_mut().enumerate() {
                    *x += m_vvo[ab * o + j];
                }
            }
            // wvoov[a][k][i][c] = Σ_d (kc|ad) t_i^d: the same M read as [(c,a)][i]
            for c in 0..v {
                for a in 0..v {
                    let src = &m_vvo[(c * v + a) * o..(c * v + a + 1) * o];
                    for (i, &x) in src.iter().enumerate() {
                        out.wvoov.data[((a * o + k) * o + i) * v + c] += x;
                    }
                }
            }
            // wvovo[a][k][c][i] = Σ_d t_i^d (kd|ac): M[i][(a,c)] = t1 s_k
            par_gemm(
                MatMut::from_row_major_slice_mut(&mut m_vvo, o, vv),
                false,
                t1m,
                s_cols,
                1.0,
            );
            for i in 0..o {
                for a in 0..v {
                    for c in 0..v {
                        out.wvovo.data[((a * o + k) * v + c) * o + i] += m_vvo[i * vv + a * v + c];
                    }
                }
            }
        }
    });
    for i in 0..o {
        for a in 0..v {
            out.r1.data[i * v + a] = r1t[a * o + i];
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
    // −½ Σ_ld (ld|kc) t_il^da + Σ_ld (ld|kc) t_il^ad in one product
    let mut x = t2.permute(&[0, 1, 3, 2]);
    x.axpy(-0.5, t2);
    w.axpy(1.0, &einsum("ldkc,ilda->akic", ovov, &x));
    drop(x);
    w.axpy(-0.5, &einsum("lckd,ilad->akic", ovov, t2));
    let z = einsum("ldkc,id->lkci", ovov, t1);
    w.axpy(-1.0, &einsum("lkci,la->akic", &z, t1));
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
