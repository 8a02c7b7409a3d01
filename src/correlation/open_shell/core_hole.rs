//! Core-valence separation of the coupled-cluster amplitudes of a core-ionized state.
//!
//! The reference (UHF held by MOM, or ROHF) has one core spin orbital emptied: the hole,
//! here the lowest virtual orbital of its spin. An amplitude that puts an electron into the
//! hole has a denominator of the order of the 1s energy with the wrong sign, and the
//! iterations let the state collapse into a valence-ionized one. What is physical and what
//! is not is decided by the number of electrons left in the core orbital:
//!
//! - an excitation that fills the hole and leaves the other-spin core electron in place
//!   puts two electrons back into the core (the valence-ionized continuum): its amplitude is
//!   zero;
//! - an excitation that fills the hole *and* removes the other-spin core electron (the
//!   partner) keeps one electron in the core: it moves the hole from one spin to the other,
//!   the spin recoupling a doublet core-hole state needs among its determinants, with an
//!   ordinary valence-sized denominator. It is kept.
//!
//! This is core-valence separation by the occupation of the core orbital, the condition that
//! defines the core-ionized space of CVS configuration interaction (the core holds at most
//! one electron), applied to the amplitudes: T1, T2 and the (T) triples are projected the
//! same way. Removing the hole from the virtual space altogether (`excluded_virtuals`) also
//! drops the recoupling amplitudes; measured against CVS full configuration interaction in
//! docs/core-levels.md, that leaves ΔCCSD(T) 0.3–0.45 eV too high.
//!
//! The partner is the occupied orbital of the other spin whose Coulomb integral with the
//! hole, (pp|hh) = Σ_Q B^Q_pp B^Q_hh, is largest: the 1s of the same atom (several hartree,
//! against about 1/R for another atom's 1s and 1–2 hartree for a valence orbital).

use super::spin_blocks::{spin, Blocked};
use super::spin_system::SpinBlockedSystem;
use crate::{Error, Result};

/// The emptied core orbital and its other-spin partner, as indices of the spin-blocked
/// system (virtual index within the hole's spin, occupied index within the other spin).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct CoreHole {
    pub spin: usize,
    pub hole: usize,
    pub partner: usize,
}

impl CoreHole {
    /// The hole is the lowest virtual of `spin`; its partner the other spin's occupied
    /// orbital of largest Coulomb integral with it.
    pub fn locate(sys: &SpinBlockedSystem, spin: usize) -> Result<CoreHole> {
        let other = 1 - spin;
        let hole = (0..sys.v[spin])
            .min_by(|&a, &b| sys.fv[spin][a].total_cmp(&sys.fv[spin][b]))
            .ok_or_else(|| Error::computation("the core-hole spin has no virtual orbital"))?;
        if sys.fv[spin][hole] > -1.0 {
            return Err(Error::computation(format!(
                "the lowest virtual orbital of the core-hole spin lies at {:.3} Eh, not at a \
                 core energy: the reference does not hold a core hole",
                sys.fv[spin][hole]
            )));
        }
        let f = &sys.factors;
        let (mh, mo) = (f.m[spin], f.m[other]);
        let h = sys.o[spin] + hole;
        let coulomb: Vec<f64> = (0..sys.o[other])
            .map(|p| {
                (0..f.naux)
                    .map(|q| {
                        f.b[other][q * mo * mo + p * mo + p] * f.b[spin][q * mh * mh + h * mh + h]
                    })
                    .sum()
            })
            .collect();
        let partner = (0..sys.o[other])
            .max_by(|&a, &b| coulomb[a].total_cmp(&coulomb[b]))
            .ok_or_else(|| {
                Error::computation(
                    "no occupied orbital of the other spin to pair with the core hole \
                     (frozen core on a core-ionized state?)",
                )
            })?;
        Ok(CoreHole {
            spin,
            hole,
            partner,
        })
    }

    /// Whether an excitation from the occupied spin orbitals `occ` into the virtual ones
    /// `vir` ((spin, index) each) is outside the core-ionized space: it fills the hole
    /// without emptying the partner.
    pub fn forbidden(&self, occ: &[(usize, usize)], vir: &[(usize, usize)]) -> bool {
        vir.contains(&(self.spin, self.hole)) && !occ.contains(&(1 - self.spin, self.partner))
    }

    /// Zero every forbidden element of t1 [o, v] and t2 [o, o, v, v] (amplitudes or
    /// residuals), all stored blocks.
    pub fn project(&self, t1: &mut Blocked, t2: &mut Blocked) {
        if let Some(b) = t1.blocks[self.spin * 3].as_mut() {
            let nv = b.shape[1];
            for i in 0..b.shape[0] {
                b.data[i * nv + self.hole] = 0.0;
            }
        }
        for (mask, b) in t2.blocks.iter_mut().enumerate() {
            let Some(b) = b else { continue };
            let s: [usize; 4] = std::array::from_fn(|k| spin(mask, k));
            if s[2] != self.spin && s[3] != self.spin {
                continue;
            }
            let [n0, n1, n2, n3] = [b.shape[0], b.shape[1], b.shape[2], b.shape[3]];
            for i in 0..n0 {
                for j in 0..n1 {
                    if !self.forbids_pair((s[0], i), (s[1], j)) {
                        continue;
                    }
                    let pair = &mut b.data[(i * n1 + j) * n2 * n3..(i * n1 + j + 1) * n2 * n3];
                    // the row a = hole and the column b = hole of this pair's [a, b] block
                    if s[2] == self.spin {
                        pair[self.hole * n3..(self.hole + 1) * n3].fill(0.0);
                    }
                    if s[3] == self.spin {
                        (0..n2).for_each(|a| pair[a * n3 + self.hole] = 0.0);
                    }
                }
            }
        }
    }

    /// Whether an occupied pair leaves the partner in place (so filling the hole from it is
    /// forbidden).
    fn forbids_pair(&self, i: (usize, usize), j: (usize, usize)) -> bool {
        let p = (1 - self.spin, self.partner);
        i != p && j != p
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A β hole at virtual 0 whose partner is α occupied 1: the counting rule of the module
    /// text, element by element (common practice: the core-ionized space of CVS holds the
    /// core orbital at most singly occupied).
    #[test]
    fn projection_keeps_exactly_the_amplitudes_that_leave_one_core_electron() {
        let h = CoreHole {
            spin: 1,
            hole: 0,
            partner: 1,
        };
        // T1: β i → hole refills the core
        assert!(h.forbidden(&[(1, 0)], &[(1, 0)]));
        assert!(!h.forbidden(&[(1, 0)], &[(1, 2)]));
        // T2: (α partner, β j) → (α a, β hole) moves the hole to α: kept
        assert!(!h.forbidden(&[(0, 1), (1, 0)], &[(0, 3), (1, 0)]));
        // (α other, β j) → (α a, β hole) fills it: zero
        assert!(h.forbidden(&[(0, 0), (1, 0)], &[(0, 3), (1, 0)]));
        // (β i, β j) → (β hole, β b): zero whatever else
        assert!(h.forbidden(&[(1, 0), (1, 1)], &[(1, 0), (1, 2)]));

        let (o, v) = ([2, 2], [3, 3]);
        let mut t1 = Blocked::from_fn(&[o, v], |_, _| 1.0);
        let mut t2 = Blocked::from_fn(&[o, o, v, v], |_, _| 1.0);
        h.project(&mut t1, &mut t2);
        // t1: β column of the hole zero, the rest untouched
        let b1 = t1.block(0b11).unwrap();
        for i in 0..2 {
            assert_eq!(b1.data[i * 3], 0.0);
            assert_eq!(b1.data[i * 3 + 1], 1.0);
        }
        assert!(t1.block(0b00).unwrap().data.iter().all(|&x| x == 1.0));
        // every stored t2 element against the rule
        for (mask, b) in t2.blocks.iter().enumerate() {
            let Some(b) = b else { continue };
            let s: [usize; 4] = std::array::from_fn(|k| spin(mask, k));
            let n = [b.shape[0], b.shape[1], b.shape[2], b.shape[3]];
            for (z, &x) in b.data.iter().enumerate() {
                let (i, j, a, c) = (
                    z / (n[1] * n[2] * n[3]),
                    z / (n[2] * n[3]) % n[1],
                    z / n[3] % n[2],
                    z % n[3],
                );
                let forbidden = h.forbidden(&[(s[0], i), (s[1], j)], &[(s[2], a), (s[3], c)]);
                assert_eq!(x, if forbidden { 0.0 } else { 1.0 }, "mask {mask:04b} {z}");
            }
        }
    }
}
