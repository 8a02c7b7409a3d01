//! The list of unique, Schwarz-significant shell quartets (ab|cd) with a ≥ b, c ≥ d and
//! pair(ab) ≥ pair(cd), cut into a fixed number of contiguous chunks of similar estimated
//! cost. The chunk count does not depend on the number of threads, and partial results are
//! reduced in chunk order, so J and K come out bit-for-bit the same on any thread count.
//!
//! Schwarz inequality: |(ab|cd)| ≤ Q_ab Q_cd with Q_ab = sqrt(max|(ab|ab)|)
//! (M. Häser & R. Ahlrichs, J. Comput. Chem. 10 (1989) 104).

use std::ops::Range;

use super::source::EriSource;

/// Number of work chunks (fixed: determinism across thread counts).
pub const N_CHUNKS: usize = 32;

#[derive(Debug, Clone)]
pub struct QuartetPlan {
    /// Significant shell pairs (a, b), a ≥ b, in lexicographic order.
    pub pairs: Vec<(usize, usize)>,
    /// Schwarz bound of each pair.
    pub q: Vec<f64>,
    /// Chunks of bra-pair indices; a chunk covers all (p, q ≤ p) with p in its range.
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
        let sizes = src.shell_sizes();
        let ns = sizes.len();
        let sch = src.schwarz();
        let qmax = sch.iter().copied().fold(0.0f64, f64::max);
        let mut pairs = Vec::new();
        let mut q = Vec::new();
        for a in 0..ns {
            for b in 0..=a {
                let v = sch[a * ns + b];
                if v * qmax >= threshold && v > 0.0 {
                    pairs.push((a, b));
                    q.push(v);
                }
            }
        }
        // Estimated cost per bra pair: Σ over significant ket pairs of the block size.
        let psize: Vec<usize> = pairs.iter().map(|&(a, b)| sizes[a] * sizes[b]).collect();
        let mut cost = vec![0usize; pairs.len()];
        let mut n_quartets = 0;
        let mut n_integrals = 0;
        for p in 0..pairs.len() {
            let mut c = 0;
            let mut nq = 0;
            for r in 0..=p {
                if q[p] * q[r] >= threshold {
                    c += psize[r];
                    nq += 1;
                }
            }
            cost[p] = c * psize[p];
            n_quartets += nq;
            n_integrals += cost[p];
        }
        let chunks = split_by_cost(&cost, N_CHUNKS);
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

/// Contiguous ranges with roughly equal sums of `cost` (at most `n` ranges, none empty).
fn split_by_cost(cost: &[usize], n: usize) -> Vec<Range<usize>> {
    let total: usize = cost.iter().sum();
    let mut out = Vec::new();
    if cost.is_empty() {
        return out;
    }
    let target = (total as f64 / n as f64).max(1.0);
    let mut start = 0;
    let mut acc = 0usize;
    for (i, &c) in cost.iter().enumerate() {
        acc += c;
        if acc as f64 >= target * (out.len() + 1) as f64 && out.len() + 1 < n {
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
        let cost: Vec<usize> = (0..100).map(|i| i * i % 17 + 1).collect();
        let ch = split_by_cost(&cost, 8);
        assert!(ch.len() <= 8);
        let mut next = 0;
        for r in &ch {
            assert_eq!(r.start, next);
            assert!(r.end > r.start);
            next = r.end;
        }
        assert_eq!(next, 100);
    }

    #[test]
    fn degeneracy_counts_distinct_permutations() {
        assert_eq!(degeneracy(0, 0, 0, 0), 1.0);
        assert_eq!(degeneracy(1, 0, 1, 0), 4.0);
        assert_eq!(degeneracy(3, 2, 1, 0), 8.0);
        assert_eq!(degeneracy(1, 1, 0, 0), 2.0);
    }
}
