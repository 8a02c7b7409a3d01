//! The list of unique, Schwarz-significant shell quartets (ab|cd) with a ≥ b, c ≥ d and
//! pair(ab) ≥ pair(cd) in the plan's pair order, cut into a fixed number of contiguous chunks
//! of similar estimated cost. The chunk count does not depend on the number of threads, and
//! partial results are reduced in chunk order (`schedule.rs`), so J and K come out
//! bit-for-bit the same on any thread count.
//!
//! Schwarz inequality: |(ab|cd)| ≤ Q_ab Q_cd with Q_ab = sqrt(max|(ab|ab)|)
//! (M. Häser & R. Ahlrichs, J. Comput. Chem. 10 (1989) 104).
//!
//! Pair order. Shells that share centre, l and primitive exponents (the members of a general
//! contraction, e.g. the 1s and 2s shells of carbon in cc-pVDZ) form a family, and the ERI
//! engine computes a quartet of families at once and keeps the blocks in a small per-thread
//! cache. The pairs are therefore ordered family pair by family pair (all members of one
//! family pair adjacent), and chunk boundaries fall only between family pairs, so the other
//! members' blocks are still in that cache when they are asked for.
//!
//! Cost model (for cutting chunks). A quartet costs about its primitive quartets times the
//! work per primitive quartet, which grows like (L+1)³ with L the total angular momentum
//! (the Hermite Coulomb integrals), plus the block size (transformation and digestion);
//! a family's primitive work is shared by its members.

use std::ops::Range;

use super::source::EriSource;

/// Number of work chunks (fixed: determinism across thread counts). Chunks are handed out
/// dynamically, so many small chunks balance the load on any number of threads.
pub const N_CHUNKS: usize = 128;

#[derive(Debug, Clone)]
pub struct QuartetPlan {
    /// Significant shell pairs (a, b), a ≥ b, family pair by family pair.
    pub pairs: Vec<(usize, usize)>,
    /// Schwarz bound of each pair.
    pub q: Vec<f64>,
    /// Chunks of bra-pair indices; a chunk covers all (p, r ≤ p) with p in its range.
    pub chunks: Vec<Range<usize>>,
    pub threshold: f64,
    /// Number of significant quartets and of integrals in their blocks.
    pub n_quartets: usize,
    pub n_integrals: usize,
}

/// 8-fold degeneracy factor of a unique quartet at shell level (each off-diagonal symmetry
/// doubles it).
#[inline]
pub fn degeneracy(a: usize, b: usize, c: usize, d: usize) -> f64 {
    let s12 = if a == b { 1.0 } else { 2.0 };
    let s34 = if c == d { 1.0 } else { 2.0 };
    let s1234 = if a == c && b == d { 1.0 } else { 2.0 };
    s12 * s34 * s1234
}

impl QuartetPlan {
    pub fn new(src: &dyn EriSource, threshold: f64) -> Self {
        Self::with_chunks(src, threshold, N_CHUNKS)
    }

    pub fn with_chunks(src: &dyn EriSource, threshold: f64, n_chunks: usize) -> Self {
        let sizes = src.shell_sizes();
        let ns = sizes.len();
        let sch = src.schwarz();
        let fam = src.families();
        let prims = src.primitives();
        let ls = src.angular_momenta();
        let mut members = vec![0usize; ns];
        for &f in &fam {
            members[f] += 1;
        }
        let qmax = sch.iter().copied().fold(0.0f64, f64::max);
        let mut pairs = Vec::new();
        for a in 0..ns {
            for b in 0..=a {
                let v = sch[a * ns + b];
                if v * qmax >= threshold && v > 0.0 {
                    pairs.push((a, b));
                }
            }
        }
        // Family pair key: (larger, smaller) representative, then the pair itself.
        let key = |&(a, b): &(usize, usize)| {
            let (fa, fb) = (fam[a], fam[b]);
            (fa.max(fb), fa.min(fb), a, b)
        };
        pairs.sort_by_key(key);
        let group: Vec<(usize, usize)> = pairs
            .iter()
            .map(|p| {
                let k = key(p);
                (k.0, k.1)
            })
            .collect();
        let q: Vec<f64> = pairs.iter().map(|&(a, b)| sch[a * ns + b]).collect();
        // Per pair: block size, amortised primitive pairs (shared by the family's members),
        // angular momentum.
        let psize: Vec<usize> = pairs.iter().map(|&(a, b)| sizes[a] * sizes[b]).collect();
        let pprim: Vec<f64> = pairs
            .iter()
            .map(|&(a, b)| {
                (prims[a] * prims[b]) as f64 / (members[fam[a]] * members[fam[b]]) as f64
            })
            .collect();
        let pl: Vec<usize> = pairs.iter().map(|&(a, b)| ls[a] + ls[b]).collect();
        let mut cost = vec![0.0f64; pairs.len()];
        let mut n_quartets = 0;
        let mut n_integrals = 0;
        for p in 0..pairs.len() {
            let mut c = 0.0;
            let mut nq = 0;
            let mut ni = 0;
            for r in 0..=p {
                if q[p] * q[r] >= threshold {
                    let l1 = (pl[p] + pl[r] + 1) as f64;
                    let size = psize[p] * psize[r];
                    c += pprim[p] * pprim[r] * l1 * l1 * l1 + 4.0 * size as f64 + 20.0;
                    nq += 1;
                    ni += size;
                }
            }
            cost[p] = c;
            n_quartets += nq;
            n_integrals += ni;
        }
        let chunks = split_by_cost(&cost, &group, n_chunks);
        QuartetPlan {
            pairs,
            q,
            chunks,
            threshold,
            n_quartets,
            n_integrals,
        }
    }
}

/// Contiguous ranges with roughly equal sums of `cost` (at most `n` ranges, none empty),
/// cut only where `group` changes.
fn split_by_cost<G: PartialEq>(cost: &[f64], group: &[G], n: usize) -> Vec<Range<usize>> {
    let total: f64 = cost.iter().sum();
    let mut out = Vec::new();
    if cost.is_empty() {
        return out;
    }
    let target = total / n.max(1) as f64;
    let mut start = 0;
    let mut acc = 0.0;
    for (i, &c) in cost.iter().enumerate() {
        acc += c;
        let boundary = i + 1 == cost.len() || group[i + 1] != group[i];
        if boundary && acc >= target * (out.len() + 1) as f64 && out.len() + 1 < n {
            out.push(start..i + 1);
            start = i + 1;
        }
    }
    if start < cost.len() {
        out.push(start..cost.len());
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn chunks_cover_everything_once() {
        let cost: Vec<f64> = (0..100).map(|i| (i * i % 17 + 1) as f64).collect();
        let group: Vec<usize> = (0..100).collect();
        let ch = split_by_cost(&cost, &group, 8);
        assert!(ch.len() <= 8 && ch.len() >= 6);
        let mut next = 0;
        for r in &ch {
            assert_eq!(r.start, next);
            assert!(r.end > r.start);
            next = r.end;
        }
        assert_eq!(next, 100);
    }

    #[test]
    fn chunks_do_not_split_groups() {
        let cost = vec![1.0; 40];
        let group: Vec<usize> = (0..40).map(|i| i / 4).collect();
        let ch = split_by_cost(&cost, &group, 16);
        for r in &ch {
            assert_eq!(r.start % 4, 0, "{r:?}");
            assert_eq!(r.end % 4, 0, "{r:?}");
        }
    }

    #[test]
    fn degeneracy_counts_distinct_permutations() {
        assert_eq!(degeneracy(0, 0, 0, 0), 1.0);
        assert_eq!(degeneracy(1, 0, 1, 0), 4.0);
        assert_eq!(degeneracy(3, 2, 1, 0), 8.0);
        assert_eq!(degeneracy(1, 1, 0, 0), 2.0);
    }
}
