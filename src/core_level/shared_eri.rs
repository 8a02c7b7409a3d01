//! Two-electron integrals shared between the bases of different holes.
//!
//! Each hole has its own basis: the basis as named with core flexibility on the hole atom
//! (`predict.rs`). Every shell quartet without a shell on the hole atom is the same in all
//! of these bases and in the plain basis. `PlainQuartets` computes the plain basis's
//! significant unique quartets once; `MixedSource` serves a hole basis's in-core store from
//! it, computing only the quartets that touch the hole atom. For a 20-carbon chain that is
//! about a fifth of them.
//!
//! The copied blocks are the ones the engine would compute for the same shells (same
//! exponents, coefficients and centres), so results do not change.

use rayon::prelude::*;

use crate::basis::BasisSet;
use crate::integrals::EriEngine;
use crate::scf::fock::quartets::QuartetPlan;
use crate::scf::fock::source::{EngineSource, EriSource};
use crate::scf::fock::InCoreFock;

/// The significant unique shell quartets of a basis, stored once.
pub struct PlainQuartets {
    n_shells: usize,
    /// Sorted quartet keys ((a·n + b)·n + c)·n + d with a ≥ b, c ≥ d, (a, b) ≥ (c, d).
    keys: Vec<u64>,
    /// Start of each key's block in `values`.
    starts: Vec<usize>,
    values: Vec<f64>,
}

impl PlainQuartets {
    /// Bytes `new` would store for `basis` at `threshold`.
    pub fn estimate_bytes(basis: &BasisSet, threshold: f64) -> usize {
        let engine = EriEngine::new(basis);
        let src = EngineSource::new(&engine, basis);
        let plan = QuartetPlan::new(&src, threshold);
        InCoreFock::estimate_bytes(&plan) + plan.n_quartets * 16
    }

    /// Every quartet of `basis` that survives Schwarz screening at `threshold`.
    pub fn new(basis: &BasisSet, threshold: f64) -> Self {
        let engine = EriEngine::new(basis);
        let src = EngineSource::new(&engine, basis);
        let plan = QuartetPlan::new(&src, threshold);
        let n = basis.shells.len();
        let key = |a: usize, b: usize, c: usize, d: usize| -> u64 {
            (((a * n + b) * n + c) * n + d) as u64
        };
        let parts: Vec<(Vec<u64>, Vec<usize>, Vec<f64>)> = plan
            .chunks
            .par_iter()
            .map(|range| {
                let (mut k, mut st, mut v) = (Vec::new(), Vec::new(), Vec::new());
                let mut buf = Vec::new();
                for p in range.clone() {
                    let (a, b) = plan.pairs[p];
                    for r in 0..=p {
                        if plan.q[p] * plan.q[r] < plan.threshold {
                            continue;
                        }
                        let (c, d) = plan.pairs[r];
                        src.quartet(a, b, c, d, &mut buf);
                        k.push(key(a, b, c, d));
                        st.push(v.len());
                        v.extend_from_slice(&buf);
                    }
                }
                (k, st, v)
            })
            .collect();
        let total: usize = parts.iter().map(|p| p.2.len()).sum();
        let count: usize = parts.iter().map(|p| p.0.len()).sum();
        let mut entries: Vec<(u64, usize)> = Vec::with_capacity(count);
        let mut values = Vec::with_capacity(total);
        for (k, st, v) in parts {
            let base = values.len();
            entries.extend(k.into_iter().zip(st.into_iter().map(|s| s + base)));
            values.extend_from_slice(&v);
        }
        entries.sort_unstable_by_key(|e| e.0);
        PlainQuartets {
            n_shells: n,
            keys: entries.iter().map(|e| e.0).collect(),
            starts: entries.iter().map(|e| e.1).collect(),
            values,
        }
    }

    /// The stored block of (ab|cd) (plain shell indices, canonical order), if any.
    fn block(&self, a: usize, b: usize, c: usize, d: usize, len: usize) -> Option<&[f64]> {
        let n = self.n_shells;
        let k = (((a * n + b) * n + c) * n + d) as u64;
        let i = self.keys.binary_search(&k).ok()?;
        Some(&self.values[self.starts[i]..self.starts[i] + len])
    }

    pub fn bytes(&self) -> usize {
        self.values.len() * 8 + self.keys.len() * 16
    }
}

/// For each shell of `flexible`: the index of the identical shell of `plain`, or None for
/// shells on the `flex_atoms` (and any shell without an identical, same-rank twin). None
/// overall when the kept shells do not appear in the same order in both bases (the copied
/// blocks would then not be in canonical order).
pub fn shell_map(
    plain: &BasisSet,
    flexible: &BasisSet,
    flex_atoms: &[usize],
) -> Option<Vec<Option<usize>>> {
    let mut map = Vec::with_capacity(flexible.shells.len());
    let mut last: Option<usize> = None;
    for sh in &flexible.shells {
        if flex_atoms.contains(&sh.atom) {
            map.push(None);
            continue;
        }
        let found = plain.shells.iter().enumerate().position(|(i, p)| {
            last.is_none_or(|l| i > l)
                && p.atom == sh.atom
                && p.l == sh.l
                && p.pure == sh.pure
                && p.center == sh.center
                && p.exponents == sh.exponents
                && p.coefficients == sh.coefficients
        })?;
        last = Some(found);
        map.push(Some(found));
    }
    Some(map)
}

/// The ERI engine of a hole basis, with blocks shared with the plain basis copied.
pub struct MixedSource<'a> {
    pub engine: EngineSource<'a>,
    pub plain: &'a PlainQuartets,
    pub map: &'a [Option<usize>],
}

impl EriSource for MixedSource<'_> {
    fn shell_sizes(&self) -> &[usize] {
        self.engine.shell_sizes()
    }
    fn shell_offsets(&self) -> &[usize] {
        self.engine.shell_offsets()
    }
    fn schwarz(&self) -> &[f64] {
        self.engine.schwarz()
    }
    fn quartet(&self, a: usize, b: usize, c: usize, d: usize, out: &mut Vec<f64>) {
        if let (Some(pa), Some(pb), Some(pc), Some(pd)) =
            (self.map[a], self.map[b], self.map[c], self.map[d])
        {
            let s = self.engine.shell_sizes();
            let len = s[a] * s[b] * s[c] * s[d];
            if let Some(v) = self.plain.block(pa, pb, pc, pd, len) {
                out.clear();
                out.extend_from_slice(v);
                return;
            }
        }
        self.engine.quartet(a, b, c, d, out);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::basis;
    use crate::chem::xyz::{parse_xyz, LengthUnit};
    use crate::core_level::flexibility::uncontract;

    #[test]
    fn copied_blocks_equal_computed_ones() {
        // Water, STO-3G, O uncontracted: every quartet of the flexible basis served by the
        // mixed source equals the engine's own block for that basis.
        let m = parse_xyz(
            "3\nwater\nO 0 0 0.1173\nH 0 0.7572 -0.4692\nH 0 -0.7572 -0.4692\n",
            LengthUnit::Angstrom,
        )
        .unwrap();
        let plain = basis::load("sto-3g", &m, None).unwrap();
        let flex = uncontract(&plain, &[0], 1);
        let cache = PlainQuartets::new(&plain, 1e-12);
        let map = shell_map(&plain, &flex, &[0]).expect("same order");
        assert!(map.iter().filter(|m| m.is_some()).count() == 2, "{map:?}");
        let engine = EriEngine::new(&flex);
        let mixed = MixedSource {
            engine: EngineSource::new(&engine, &flex),
            plain: &cache,
            map: &map,
        };
        let reference = EngineSource::new(&engine, &flex);
        let ns = flex.shells.len();
        let (mut x, mut y) = (Vec::new(), Vec::new());
        let mut copied = 0;
        for a in 0..ns {
            for b in 0..=a {
                for c in 0..ns {
                    for d in 0..=c {
                        if (c, d) > (a, b) {
                            continue;
                        }
                        mixed.quartet(a, b, c, d, &mut x);
                        reference.quartet(a, b, c, d, &mut y);
                        assert_eq!(x.len(), y.len());
                        for (u, v) in x.iter().zip(&y) {
                            assert!((u - v).abs() < 1e-14, "({a}{b}|{c}{d}) {u} {v}");
                        }
                        if map[a].is_some()
                            && map[b].is_some()
                            && map[c].is_some()
                            && map[d].is_some()
                        {
                            copied += 1;
                        }
                    }
                }
            }
        }
        assert!(copied > 0);
    }
}
