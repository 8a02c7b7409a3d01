//! One-to-one assignment of predicted bands to measured peaks, with unmatched bands and
//! peaks allowed, and a confidence for every pair.
//!
//! Cost of pairing band i (aligned energy a_i) with peak j (energy m_j): |m_j − a_i| (eV).
//! Leaving a band or a peak unmatched costs `cap/2` each, so a pair is only made when its
//! residual is below `cap` (a pair saves cap − |d|). A band outside the measured window
//! costs the same to leave out as one inside, so no alignment gains by pushing bands out
//! of the window; the constant cost of bands that lie outside for every shift changes
//! nothing. This is solved exactly as a
//! square assignment problem of size n + m with dummy rows and columns (common practice)
//! by the Hungarian method (hungarian.rs).
//!
//! Confidence of a pair (i, j): Δ = C(i,j forbidden) − C(optimal) ≥ 0, the extra cost of
//! the best assignment that does not pair i with j, mapped to [0, 1) by Δ / (Δ + τ) with
//! τ = `confidence_scale` (default 0.25 eV, about the width of a valence band envelope).
//! Δ = 0 (another choice is just as good) gives 0; a margin of τ gives 0.5; a margin of
//! 1 eV gives 0.8. Pairs below 0.5 are flagged low-confidence. The global shift/scale is
//! held fixed while the margin is computed.

use serde::Serialize;

use super::hungarian;

/// A predicted band (or a group of bands closer than the merge tolerance).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PredictedLine {
    pub label: String,
    /// Predicted binding energy (eV), before alignment.
    pub energy_ev: f64,
    pub intensity: f64,
}

/// Affine map from predicted to measured energies: aligned = scale · predicted + shift.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Alignment {
    pub shift_ev: f64,
    pub scale: f64,
}

impl Alignment {
    pub fn apply(&self, e: f64) -> f64 {
        self.scale * e + self.shift_ev
    }
}

/// Parameters of the matching.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MatchOptions {
    /// Largest residual (eV) a pair may have.
    pub cap_ev: f64,
}

/// The result of one matching.
#[derive(Debug, Clone, PartialEq)]
pub struct Matching {
    /// (band index, peak index) pairs.
    pub pairs: Vec<(usize, usize)>,
    pub total_cost: f64,
}

const FORBIDDEN: f64 = 1e9;

fn cost_matrix(
    aligned: &[f64],
    peaks: &[f64],
    opt: &MatchOptions,
    forbid: Option<(usize, usize)>,
) -> Vec<Vec<f64>> {
    let n = aligned.len();
    let m = peaks.len();
    let k = n + m;
    let half = 0.5 * opt.cap_ev;
    let mut c = vec![vec![FORBIDDEN; k]; k];
    for i in 0..n {
        for j in 0..m {
            let d = (peaks[j] - aligned[i]).abs();
            if d < opt.cap_ev && forbid != Some((i, j)) {
                c[i][j] = d;
            }
        }
        // band i unmatched: its own dummy column m + i
        c[i][m + i] = half;
    }
    for j in 0..m {
        // peak j unmatched: dummy row n + j, column j
        c[n + j][j] = half;
        // dummy rows × dummy columns: free
        for i in 0..n {
            c[n + j][m + i] = 0.0;
        }
    }
    c
}

/// Optimal matching of `aligned` band energies to `peaks` (both eV).
pub fn match_lines(
    aligned: &[f64],
    peaks: &[f64],
    opt: &MatchOptions,
    forbid: Option<(usize, usize)>,
) -> Matching {
    let n = aligned.len();
    let m = peaks.len();
    if n == 0 || m == 0 {
        let cost = (n + m) as f64 * 0.5 * opt.cap_ev;
        return Matching {
            pairs: Vec::new(),
            total_cost: cost,
        };
    }
    let c = cost_matrix(aligned, peaks, opt, forbid);
    let (cols, total) = hungarian::assign(&c);
    let pairs = (0..n)
        .filter_map(|i| (cols[i] < m).then_some((i, cols[i])))
        .collect();
    Matching {
        pairs,
        total_cost: total,
    }
}

/// Map a cost margin Δ (eV) to a confidence in [0, 1).
pub fn confidence_from_margin(delta_ev: f64, scale_ev: f64) -> f64 {
    let d = delta_ev.max(0.0);
    d / (d + scale_ev)
}

/// Confidences below this are flagged.
pub const LOW_CONFIDENCE: f64 = 0.5;

/// One row of the assignment table.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AssignedPair {
    pub measured_ev: f64,
    pub label: String,
    /// Predicted binding energy before alignment.
    pub predicted_ev: f64,
    /// scale · predicted + shift.
    pub aligned_ev: f64,
    /// measured − aligned.
    pub residual_ev: f64,
    pub confidence: f64,
    pub low_confidence: bool,
    /// The band the peak would go to in the best assignment without this pair, if any.
    pub alternative: Option<String>,
}

/// Pairs of the optimal matching with their confidence; sorted by measured energy.
pub fn assigned_pairs(
    lines: &[PredictedLine],
    peaks: &[f64],
    align: Alignment,
    opt: &MatchOptions,
    confidence_scale: f64,
) -> (Vec<AssignedPair>, Matching) {
    let aligned: Vec<f64> = lines.iter().map(|l| align.apply(l.energy_ev)).collect();
    let best = match_lines(&aligned, peaks, opt, None);
    let mut rows = Vec::new();
    for &(i, j) in &best.pairs {
        let alt = match_lines(&aligned, peaks, opt, Some((i, j)));
        let delta = alt.total_cost - best.total_cost;
        let alternative = alt
            .pairs
            .iter()
            .find(|&&(_, jj)| jj == j)
            .map(|&(ii, _)| lines[ii].label.clone());
        let conf = confidence_from_margin(delta, confidence_scale);
        rows.push(AssignedPair {
            measured_ev: peaks[j],
            label: lines[i].label.clone(),
            predicted_ev: lines[i].energy_ev,
            aligned_ev: aligned[i],
            residual_ev: peaks[j] - aligned[i],
            confidence: conf,
            low_confidence: conf < LOW_CONFIDENCE,
            alternative,
        });
    }
    rows.sort_by(|a, b| a.measured_ev.total_cmp(&b.measured_ev));
    (rows, best)
}

/// Merge predicted lines closer than `tol_ev` into groups ("a + b"), energies averaged
/// with intensity weights. Input in any order; output sorted by energy.
pub fn merge_close(lines: &[PredictedLine], tol_ev: f64) -> Vec<PredictedLine> {
    let mut v = lines.to_vec();
    v.sort_by(|a, b| a.energy_ev.total_cmp(&b.energy_ev));
    let mut out: Vec<(PredictedLine, f64)> = Vec::new();
    for l in v {
        if let Some((last, first_e)) = out.last_mut() {
            if l.energy_ev - *first_e <= tol_ev {
                let w = last.intensity + l.intensity;
                if w > 0.0 {
                    last.energy_ev =
                        (last.energy_ev * last.intensity + l.energy_ev * l.intensity) / w;
                }
                last.intensity = w;
                last.label = format!("{} + {}", last.label, l.label);
                continue;
            }
        }
        let e = l.energy_ev;
        out.push((l, e));
    }
    out.into_iter().map(|(l, _)| l).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn line(label: &str, e: f64) -> PredictedLine {
        PredictedLine {
            label: label.into(),
            energy_ev: e,
            intensity: 1.0,
        }
    }

    #[test]
    fn leaves_far_bands_unmatched() {
        let opt = MatchOptions { cap_ev: 1.0 };
        let m = match_lines(&[12.0, 15.0, 18.0], &[12.1, 17.9], &opt, None);
        assert_eq!(m.pairs, vec![(0, 0), (2, 1)]);
    }

    #[test]
    fn close_pair_is_low_confidence() {
        let opt = MatchOptions { cap_ev: 1.5 };
        let lines = vec![line("a", 13.0), line("b", 13.1)];
        let id = Alignment {
            shift_ev: 0.0,
            scale: 1.0,
        };
        let (rows, _) = assigned_pairs(&lines, &[13.05], id, &opt, 0.25);
        assert_eq!(rows.len(), 1);
        assert!(rows[0].low_confidence, "{rows:?}");
        assert!(rows[0].alternative.is_some());
    }

    #[test]
    fn merges_degenerate_lines() {
        let g = merge_close(
            &[
                line("C1 1s", 290.0),
                line("C5 1s", 290.01),
                line("C3", 292.0),
            ],
            0.05,
        );
        assert_eq!(g.len(), 2);
        assert_eq!(g[0].label, "C1 1s + C5 1s");
    }
}
