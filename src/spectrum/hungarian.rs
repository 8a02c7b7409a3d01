//! Minimum-cost assignment (the Hungarian method): H. W. Kuhn, "The Hungarian method for
//! the assignment problem", Naval Res. Logist. Q. 2 (1955) 83; J. Munkres, "Algorithms for
//! the assignment and transportation problems", J. SIAM 5 (1957) 32.
//!
//! This is the O(n²m) shortest-augmenting-path form with row and column potentials (dual
//! variables u, v with u_i + v_j ≤ c_ij, tight on the matched pairs), which is Kuhn's
//! method organised one row at a time (common practice).

/// Optimal assignment of the rows of the n×m cost matrix `cost` (n ≤ m) to distinct
/// columns. Returns the column of each row and the total cost. Costs must be finite.
pub fn assign(cost: &[Vec<f64>]) -> (Vec<usize>, f64) {
    let n = cost.len();
    if n == 0 {
        return (Vec::new(), 0.0);
    }
    let m = cost[0].len();
    assert!(n <= m, "hungarian: more rows than columns");
    // 1-based arrays with a virtual column 0, as in the textbook presentation.
    let mut u = vec![0.0; n + 1];
    let mut v = vec![0.0; m + 1];
    let mut p = vec![0usize; m + 1]; // p[j]: row matched to column j
    let mut way = vec![0usize; m + 1];
    for i in 1..=n {
        p[0] = i;
        let mut j0 = 0usize;
        let mut minv = vec![f64::INFINITY; m + 1];
        let mut used = vec![false; m + 1];
        loop {
            used[j0] = true;
            let i0 = p[j0];
            let mut delta = f64::INFINITY;
            let mut j1 = 0usize;
            for j in 1..=m {
                if !used[j] {
                    let cur = cost[i0 - 1][j - 1] - u[i0] - v[j];
                    if cur < minv[j] {
                        minv[j] = cur;
                        way[j] = j0;
                    }
                    if minv[j] < delta {
                        delta = minv[j];
                        j1 = j;
                    }
                }
            }
            for j in 0..=m {
                if used[j] {
                    u[p[j]] += delta;
                    v[j] -= delta;
                } else {
                    minv[j] -= delta;
                }
            }
            j0 = j1;
            if p[j0] == 0 {
                break;
            }
        }
        loop {
            let j1 = way[j0];
            p[j0] = p[j1];
            j0 = j1;
            if j0 == 0 {
                break;
            }
        }
    }
    let mut row_to_col = vec![usize::MAX; n];
    for j in 1..=m {
        if p[j] != 0 {
            row_to_col[p[j] - 1] = j - 1;
        }
    }
    let total = row_to_col
        .iter()
        .enumerate()
        .map(|(i, &j)| cost[i][j])
        .sum();
    (row_to_col, total)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn brute(cost: &[Vec<f64>]) -> f64 {
        fn rec(c: &[Vec<f64>], i: usize, used: &mut Vec<bool>) -> f64 {
            if i == c.len() {
                return 0.0;
            }
            let mut best = f64::INFINITY;
            for j in 0..c[0].len() {
                if !used[j] {
                    used[j] = true;
                    best = best.min(c[i][j] + rec(c, i + 1, used));
                    used[j] = false;
                }
            }
            best
        }
        rec(cost, 0, &mut vec![false; cost[0].len()])
    }

    #[test]
    fn matches_exhaustive_search() {
        // Optimality against enumeration of every assignment (definition of the problem).
        let mut s: u64 = 0x2545F4914F6CDD1D;
        for n in 1..=6 {
            for m in n..=7 {
                let c: Vec<Vec<f64>> = (0..n)
                    .map(|_| {
                        (0..m)
                            .map(|_| {
                                s ^= s << 13;
                                s ^= s >> 7;
                                s ^= s << 17;
                                (s % 1000) as f64 / 10.0
                            })
                            .collect()
                    })
                    .collect();
                let (a, t) = assign(&c);
                assert!((t - brute(&c)).abs() < 1e-9);
                let mut cols = a.clone();
                cols.sort();
                cols.dedup();
                assert_eq!(cols.len(), n);
            }
        }
    }
}
