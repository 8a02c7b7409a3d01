//! Spin-blocked tensors: a spin-orbital tensor stored as its spin-conserving blocks only.
//!
//! Every index runs over the α spin orbitals of its space, then the β ones; a block is
//! named by its spin mask (bit k set = index k is β) and held as a dense `Tensor` over the
//! spatial orbitals of those spins. Blocks that spin symmetry makes zero (a 2-index block
//! with different spins, a 4-index block whose first pair and second pair differ in their
//! number of β indices) are never stored. A contraction over blocks visits only pairs of
//! stored blocks whose shared indices agree in spin, so the spin-orbital equations evaluated
//! here are the spin-integrated equations (Crawford & Schaefer, Rev. Comput. Chem. 14 (2000)
//! 33, on spin integration of the spin-orbital coupled-cluster equations) without writing
//! each spin case by hand.

use crate::correlation::tensor::{einsum, Tensor};

/// Tensor over spin orbitals held as its nonzero spin blocks.
#[derive(Debug, Clone)]
pub struct Blocked {
    /// Per index, the number of α and β orbitals of its space.
    pub dims: Vec<[usize; 2]>,
    /// Indexed by spin mask; None = zero block.
    pub blocks: Vec<Option<Tensor>>,
}

/// Spin of index k in mask.
#[inline]
pub fn spin(mask: usize, k: usize) -> usize {
    (mask >> k) & 1
}

/// Whether a block conserves spin: for 2 indices both equal, for 4 the two pairs carry the
/// same number of β indices.
pub fn conserving(mask: usize, n: usize) -> bool {
    match n {
        2 => spin(mask, 0) == spin(mask, 1),
        4 => spin(mask, 0) + spin(mask, 1) == spin(mask, 2) + spin(mask, 3),
        _ => true,
    }
}

impl Blocked {
    pub fn empty(dims: &[[usize; 2]]) -> Self {
        Blocked {
            dims: dims.to_vec(),
            blocks: vec![None; 1 << dims.len()],
        }
    }

    /// Every spin-conserving block, zero.
    pub fn zeros(dims: &[[usize; 2]]) -> Self {
        Self::from_fn(dims, |_, _| 0.0)
    }

    /// Every spin-conserving block filled by f(mask, spatial index).
    pub fn from_fn(dims: &[[usize; 2]], mut f: impl FnMut(usize, &[usize]) -> f64) -> Self {
        let mut t = Self::empty(dims);
        for mask in 0..t.blocks.len() {
            if conserving(mask, dims.len()) {
                let shape = t.block_shape(mask);
                t.blocks[mask] = Some(Tensor::from_fn(&shape, |x| f(mask, x)));
            }
        }
        t
    }

    pub fn block_shape(&self, mask: usize) -> Vec<usize> {
        self.dims
            .iter()
            .enumerate()
            .map(|(k, d)| d[spin(mask, k)])
            .collect()
    }

    pub fn block(&self, mask: usize) -> Option<&Tensor> {
        self.blocks[mask].as_ref()
    }

    /// Stored words.
    pub fn words(&self) -> usize {
        self.blocks.iter().flatten().map(|b| b.data.len()).sum()
    }

    /// Axes reordered as `Tensor::permute`: new axis k is old axis perm[k].
    pub fn permute(&self, perm: &[usize]) -> Blocked {
        let dims: Vec<[usize; 2]> = perm.iter().map(|&p| self.dims[p]).collect();
        let mut out = Blocked::empty(&dims);
        for (mask, b) in self.blocks.iter().enumerate() {
            if let Some(b) = b {
                let nm = (0..perm.len()).fold(0, |m, k| m | (spin(mask, perm[k]) << k));
                out.blocks[nm] = Some(b.permute(perm));
            }
        }
        out
    }

    /// The block of `mask` alone, axes reordered as in `permute` (None when not stored).
    pub fn permute_one(&self, mask: usize, perm: &[usize]) -> Option<Blocked> {
        let b = self.blocks[mask].as_ref()?;
        let dims: Vec<[usize; 2]> = perm.iter().map(|&p| self.dims[p]).collect();
        let mut out = Blocked::empty(&dims);
        let nm = (0..perm.len()).fold(0, |m, k| m | (spin(mask, perm[k]) << k));
        out.blocks[nm] = Some(b.permute(perm));
        Some(out)
    }

    /// self += alpha · other (blocks missing in self are created).
    pub fn axpy(&mut self, alpha: f64, other: &Blocked) {
        for (mask, b) in other.blocks.iter().enumerate() {
            if let Some(b) = b {
                match &mut self.blocks[mask] {
                    Some(s) => s.axpy(alpha, b),
                    None => {
                        let mut c = b.clone();
                        c.scale(alpha);
                        self.blocks[mask] = Some(c);
                    }
                }
            }
        }
    }

    pub fn scale(&mut self, alpha: f64) {
        self.blocks
            .iter_mut()
            .flatten()
            .for_each(|b| b.scale(alpha));
    }

    pub fn dot(&self, other: &Blocked) -> f64 {
        self.blocks
            .iter()
            .zip(&other.blocks)
            .map(|(a, b)| match (a, b) {
                (Some(a), Some(b)) => a.dot(b),
                _ => 0.0,
            })
            .sum()
    }

    pub fn norm(&self) -> f64 {
        self.dot(self).sqrt()
    }

    /// The blocks of these masks, joined (each must be stored).
    pub fn flatten_masks(&self, masks: &[usize]) -> Vec<f64> {
        let mut out = Vec::new();
        for &m in masks {
            out.extend_from_slice(&self.blocks[m].as_ref().expect("block").data);
        }
        out
    }

    /// Inverse of `flatten_masks`.
    pub fn fill_masks(&mut self, masks: &[usize], x: &[f64]) {
        let mut k = 0;
        for &m in masks {
            let b = self.blocks[m].as_mut().expect("block");
            let n = b.data.len();
            b.data.copy_from_slice(&x[k..k + n]);
            k += n;
        }
    }

    /// A 4-index tensor antisymmetric in its first and in its last pair: set the blocks
    /// βα·· and ··βα (masks 0110, 1001, 0101) from the αβαβ block (mask 1010).
    pub fn restore_mixed_images(&mut self) {
        let ab = self.blocks[0b1010].clone().expect("αβαβ block");
        let mut x = ab.permute(&[0, 1, 3, 2]);
        x.scale(-1.0);
        self.blocks[0b0110] = Some(x);
        let mut x = ab.permute(&[1, 0, 2, 3]);
        x.scale(-1.0);
        self.blocks[0b1001] = Some(x);
        self.blocks[0b0101] = Some(ab.permute(&[1, 0, 3, 2]));
    }
}

/// Binary contraction over spin blocks with the letters of `tensor::einsum`.
pub fn beinsum(spec: &str, a: &Blocked, b: &Blocked) -> Blocked {
    let (lhs, out) = spec.split_once("->").expect("einsum spec needs ->");
    let (sa, sb) = lhs.split_once(',').expect("einsum spec needs two operands");
    let (la, lb, lo): (Vec<char>, Vec<char>, Vec<char>) = (
        sa.chars().collect(),
        sb.chars().collect(),
        out.chars().collect(),
    );
    let dims: Vec<[usize; 2]> = lo
        .iter()
        .map(|c| match la.iter().position(|x| x == c) {
            Some(k) => a.dims[k],
            None => b.dims[lb.iter().position(|x| x == c).expect("free letter")],
        })
        .collect();
    let mut res = Blocked::empty(&dims);
    for (ma, ta) in a.blocks.iter().enumerate() {
        let Some(ta) = ta else { continue };
        for (mb, tb) in b.blocks.iter().enumerate() {
            let Some(tb) = tb else { continue };
            // shared letters must agree in spin
            let ok = la.iter().enumerate().all(|(ka, c)| {
                lb.iter()
                    .position(|x| x == c)
                    .is_none_or(|kb| spin(ma, ka) == spin(mb, kb))
            });
            if !ok {
                continue;
            }
            let mo = lo.iter().enumerate().fold(0, |m, (k, c)| {
                let s = match la.iter().position(|x| x == c) {
                    Some(ka) => spin(ma, ka),
                    None => spin(mb, lb.iter().position(|x| x == c).unwrap()),
                };
                m | (s << k)
            });
            let shape = res.block_shape(mo);
            if ta.data.is_empty() || tb.data.is_empty() || shape.iter().any(|&d| d == 0) {
                if res.blocks[mo].is_none() {
                    res.blocks[mo] = Some(Tensor::zeros(&shape));
                }
                continue;
            }
            let c = einsum(spec, ta, tb);
            match &mut res.blocks[mo] {
                Some(r) => r.axpy(1.0, &c),
                None => res.blocks[mo] = Some(c),
            }
        }
    }
    res
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Exact condition: a blocked contraction equals the dense spin-orbital one with the
    /// zero blocks written out (α orbitals first, then β).
    #[test]
    fn blocked_einsum_matches_dense() {
        let d = [[2usize, 3], [3, 1]];
        let val = |m: usize, x: &[usize]| (m as f64 + 1.0) * 0.1 + x.iter().sum::<usize>() as f64;
        let a = Blocked::from_fn(&[d[0], d[0], d[1], d[1]], val);
        let b = Blocked::from_fn(&[d[1], d[0]], |m, x| val(m, x) - 0.7);
        let dense = |t: &Blocked| {
            let n: Vec<usize> = t.dims.iter().map(|d| d[0] + d[1]).collect();
            Tensor::from_fn(&n, |x| {
                let mut mask = 0;
                let mut loc = Vec::new();
                for (k, &i) in x.iter().enumerate() {
                    let s = usize::from(i >= t.dims[k][0]);
                    mask |= s << k;
                    loc.push(i - s * t.dims[k][0]);
                }
                t.block(mask).map_or(0.0, |b| b.get(&loc))
            })
        };
        let c = beinsum("ijab,bk->ijak", &a, &b);
        let cd = einsum("ijab,bk->ijak", &dense(&a), &dense(&b));
        let diff = dense(&c);
        for (x, y) in diff.data.iter().zip(&cd.data) {
            assert!((x - y).abs() < 1e-12);
        }
        let p = a.permute(&[1, 0, 3, 2]);
        let pd = dense(&a).permute(&[1, 0, 3, 2]);
        for (x, y) in dense(&p).data.iter().zip(&pd.data) {
            assert!((x - y).abs() < 1e-12);
        }
    }
}
