//! One-to-one assignment of predicted bands to measured peaks, with unmatched bands and
//! peaks allowed, and a confidence for every pair.
//!
//! Cost of pairing band i (aligned energy a_i) with peak j (energy m_j):
//! |m_j − a_i| + λ · min(|ln r_ij|, 3) + λ_s · min(s_ij, 2) (eV), where r_ij compares
//! relative intensities:
//! (area of peak j / median peak area) over (intensity of band i / median band intensity),
//! and λ = `intensity_ev` (0.1 eV per factor e by default). Band intensities are
//! occupation × degeneracy × pole strength or one-hole weight (predicted.rs); He I
//! intensities depart from that by factors of about two (cross sections differ by orbital
//! character), so the term is weak: at most 0.3 eV, it decides between bands of similar
//! position and lowers the margin of a pair whose intensity is far off. s_ij is the shape
//! mismatch of band_shape.rs (width; with a vibronic envelope at a resolution that shows
//! the progression, also its spacing and number of visible quanta), λ_s = `shape_ev`
//! (0.2 eV per factor e by default, chosen on the calibration set's training half: 0.1 and
//! 0.2 eV both raise the fraction right by about 1.5 points over 0, 0.2 calibrates
//! better): at most 0.4 eV, so a width estimated from the bonding character (good to a
//! factor of about two) decides between bands of similar position and lowers the margin
//! of a pair whose shape is far off, without overruling a clear position.
//! Leaving a band or a peak unmatched costs `cap/2` each, so a pair is only made when its
//! residual is below `cap`. A band outside the measured window
//! costs the same to leave out as one inside, so no alignment gains by pushing bands out
//! of the window; the constant cost of bands that lie outside for every shift changes
//! nothing. This is solved exactly as a
//! square assignment problem of size n + m with dummy rows and columns (common practice)
//! by the Hungarian method (hungarian.rs).
//!
//! Evidence for a pair (i, j), turned into a confidence by `confidence.rs`: the margin
//! Δ = C(i,j forbidden) − C(optimal) ≥ 0, the extra cost of the best assignment that does
//! not pair i with j (global shift/scale held fixed); the residual against the method's
//! single-band scatter; the intensity ratio; and whether the pair survives the prediction
//! moving within its method's error: every two bands closer than twice the method's
//! standard deviation σ (0.7 eV, Koopmans', for a method without error statistics) are moved σ towards each other and past (i up by σ, k down by σ)
//! and the matching is redone; a pair that changes is flagged low-confidence whatever its
//! number.

use serde::Serialize;

use super::band_shape::{PredictedShape, ShapeCheck, MAX_SHAPE_LOG};
use super::confidence::{calibrated, PairEvidence, UNKNOWN_SIGMA_EV};
use super::hungarian;

/// A predicted band (or a group of bands closer than the merge tolerance).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PredictedLine {
    pub label: String,
    /// Predicted binding energy (eV), before alignment.
    pub energy_ev: f64,
    pub intensity: f64,
    /// What is known of the band's shape (width estimate or vibronic envelope), if anything.
    pub shape: Option<PredictedShape>,
}

impl PredictedLine {
    /// A line with no shape information.
    pub fn new(label: impl Into<String>, energy_ev: f64, intensity: f64) -> Self {
        PredictedLine {
            label: label.into(),
            energy_ev,
            intensity,
            shape: None,
        }
    }
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
    /// λ: cost (eV) per factor e between measured and predicted relative intensity.
    pub intensity_ev: f64,
    /// λ_s: cost (eV) per unit of shape mismatch (band_shape.rs).
    pub shape_ev: f64,
}

/// Largest |ln r| counted in the cost.
pub const MAX_LOG_RATIO: f64 = 3.0;

fn median(v: &[f64]) -> f64 {
    let mut s: Vec<f64> = v.iter().cloned().filter(|x| *x > 0.0).collect();
    if s.is_empty() {
        return 0.0;
    }
    s.sort_by(|a, b| a.total_cmp(b));
    let n = s.len();
    if n % 2 == 1 {
        s[n / 2]
    } else {
        0.5 * (s[n / 2 - 1] + s[n / 2])
    }
}

/// ln r_ij = ln(peak area j / median area) − ln(band intensity i / median intensity);
/// None when either intensity is unknown (zero).
pub fn log_intensity_ratios(lines: &[PredictedLine], areas: &[f64]) -> Vec<Vec<Option<f64>>> {
    let mi = median(&lines.iter().map(|l| l.intensity).collect::<Vec<_>>());
    let ma = median(areas);
    lines
        .iter()
        .map(|l| {
            areas
                .iter()
                .map(|&a| {
                    (l.intensity > 0.0 && a > 0.0 && mi > 0.0 && ma > 0.0)
                        .then(|| (a / ma).ln() - (l.intensity / mi).ln())
                })
                .collect()
        })
        .collect()
}

/// The intensity part of the pair costs, λ · min(|ln r|, 3) (0 where unknown).
pub fn intensity_costs(ratios: &[Vec<Option<f64>>], lambda_ev: f64) -> Vec<Vec<f64>> {
    ratios
        .iter()
        .map(|row| {
            row.iter()
                .map(|r| r.map_or(0.0, |r| lambda_ev * r.abs().min(MAX_LOG_RATIO)))
                .collect()
        })
        .collect()
}

/// The shape part of the pair costs, λ_s · min(s, 2), added to `extra` (0 where unknown).
pub fn add_shape_costs(extra: &mut [Vec<f64>], shapes: &[Vec<Option<ShapeCheck>>], lambda_ev: f64) {
    for (row, srow) in extra.iter_mut().zip(shapes) {
        for (c, s) in row.iter_mut().zip(srow) {
            if let Some(s) = s {
                *c += lambda_ev * s.mismatch.min(MAX_SHAPE_LOG);
            }
        }
    }
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
    extra: Option<&[Vec<f64>]>,
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
                c[i][j] = d + extra.map_or(0.0, |x| x[i][j]);
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

/// Optimal matching of `aligned` band energies to `peaks` (both eV); `extra` adds a cost
/// per pair (the intensity term).
pub fn match_lines(
    aligned: &[f64],
    peaks: &[f64],
    extra: Option<&[Vec<f64>]>,
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
    let c = cost_matrix(aligned, peaks, extra, opt, forbid);
    let (cols, total) = hungarian::assign(&c);
    let pairs = (0..n)
        .filter_map(|i| (cols[i] < m).then_some((i, cols[i])))
        .collect();
    Matching {
        pairs,
        total_cost: total,
    }
}

/// Map a cost margin Δ (eV) to [0, 1): Δ / (Δ + τ), the margin feature of the confidence.
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
    /// Calibrated probability that the pair is right (confidence.rs).
    pub confidence: f64,
    /// Below 0.5, or the pair changes when the prediction moves within its method's error.
    pub low_confidence: bool,
    /// The band the peak would go to in the best assignment without this pair, if any.
    pub alternative: Option<String>,
    /// Extra cost (eV) of the best assignment without this pair.
    pub margin_ev: f64,
    /// ln(measured relative area / predicted relative intensity), when both are known.
    pub intensity_log_ratio: Option<f64>,
    /// The pair changes when two bands move within their method's error.
    pub swaps_within_error: bool,
    /// Width (and vibronic progression) of the pair, measured against predicted.
    pub shape: Option<ShapeCheck>,
}

/// What the confidence of a pair is computed from besides the matching.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PairContext<'a> {
    /// Peak areas (same order as the peaks), for the intensity term.
    pub areas: &'a [f64],
    /// Single-band scatter σ of the method (eV), if known.
    pub sigma_ev: Option<f64>,
    /// τ of the margin feature (eV).
    pub tau_ev: f64,
    /// Shape comparison of every band (rows) with every peak (columns); empty when none.
    pub shapes: &'a [Vec<Option<ShapeCheck>>],
}

/// Pairs of the optimal matching with their confidence; sorted by measured energy.
pub fn assigned_pairs(
    lines: &[PredictedLine],
    peaks: &[f64],
    align: Alignment,
    opt: &MatchOptions,
    ctx: &PairContext,
) -> (Vec<AssignedPair>, Matching) {
    let aligned: Vec<f64> = lines.iter().map(|l| align.apply(l.energy_ev)).collect();
    let ratios = log_intensity_ratios(lines, ctx.areas);
    let mut extra = intensity_costs(&ratios, opt.intensity_ev);
    add_shape_costs(&mut extra, ctx.shapes, opt.shape_ev);
    let best = match_lines(&aligned, peaks, Some(&extra), opt, None);
    // a method without error statistics is taken as scattered as Koopmans' (confidence.rs)
    let swap_sigma = Some(ctx.sigma_ev.unwrap_or(UNKNOWN_SIGMA_EV));
    let swapped = swap_sensitive(&aligned, peaks, &extra, opt, &best, swap_sigma);
    let mut rows = Vec::new();
    for &(i, j) in &best.pairs {
        let alt = match_lines(&aligned, peaks, Some(&extra), opt, Some((i, j)));
        let delta = (alt.total_cost - best.total_cost).max(0.0);
        let alternative = alt
            .pairs
            .iter()
            .find(|&&(_, jj)| jj == j)
            .map(|&(ii, _)| lines[ii].label.clone());
        let residual = peaks[j] - aligned[i];
        let shape = ctx.shapes.get(i).and_then(|r| r.get(j)).cloned().flatten();
        let ev = PairEvidence {
            margin_feature: confidence_from_margin(delta, ctx.tau_ev),
            sigma_ev: ctx.sigma_ev,
            intensity_log_ratio: ratios[i][j],
            swaps: swapped.contains(&i),
            shape_mismatch: shape.as_ref().map(|s| s.mismatch),
        };
        let conf = calibrated(&ev);
        rows.push(AssignedPair {
            measured_ev: peaks[j],
            label: lines[i].label.clone(),
            predicted_ev: lines[i].energy_ev,
            aligned_ev: aligned[i],
            residual_ev: residual,
            confidence: conf,
            low_confidence: conf < LOW_CONFIDENCE || ev.swaps,
            alternative,
            margin_ev: delta,
            intensity_log_ratio: ratios[i][j],
            swaps_within_error: ev.swaps,
            shape,
        });
    }
    rows.sort_by(|a, b| a.measured_ev.total_cmp(&b.measured_ev));
    (rows, best)
}

/// Bands whose pair changes when two bands closer than 2σ move σ towards and past each
/// other (the lower one up, the upper one down).
fn swap_sensitive(
    aligned: &[f64],
    peaks: &[f64],
    extra: &[Vec<f64>],
    opt: &MatchOptions,
    best: &Matching,
    sigma: Option<f64>,
) -> Vec<usize> {
    let Some(s) = sigma else {
        return Vec::new();
    };
    let peak_of = |m: &Matching, i: usize| m.pairs.iter().find(|p| p.0 == i).map(|p| p.1);
    let mut out = Vec::new();
    for i in 0..aligned.len() {
        for k in 0..aligned.len() {
            let gap = aligned[k] - aligned[i];
            if k == i || !(gap >= 0.0 && gap < 2.0 * s) {
                continue;
            }
            if peak_of(best, i).is_none() && peak_of(best, k).is_none() {
                continue;
            }
            let mut moved = aligned.to_vec();
            moved[i] += s;
            moved[k] -= s;
            let m = match_lines(&moved, peaks, Some(extra), opt, None);
            for b in [i, k] {
                if peak_of(&m, b) != peak_of(best, b) && !out.contains(&b) {
                    out.push(b);
                }
            }
        }
    }
    out
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
                let merged_e = if w > 0.0 {
                    (last.energy_ev * last.intensity + l.energy_ev * l.intensity) / w
                } else {
                    last.energy_ev
                };
                last.shape = merge_shapes(last, &l, merged_e);
                last.energy_ev = merged_e;
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

/// The shape of two lines merged at `at` (eV): the wider width estimate; vibronic sticks
/// put together, each line's sticks weighted by its intensity; none when the kinds differ.
fn merge_shapes(a: &PredictedLine, b: &PredictedLine, at: f64) -> Option<PredictedShape> {
    match (&a.shape, &b.shape) {
        (Some(PredictedShape::Width(x)), Some(PredictedShape::Width(y))) => {
            Some(PredictedShape::Width(x.max(*y)))
        }
        (Some(PredictedShape::Vibronic(x)), Some(PredictedShape::Vibronic(y))) => {
            let w = (a.intensity + b.intensity).max(1e-300);
            let mut sticks = Vec::new();
            for (line, v) in [(a, x), (b, y)] {
                let total: f64 = v.sticks.iter().map(|s| s.1).sum::<f64>().max(1e-300);
                let f = line.intensity / w / total;
                sticks.extend(
                    v.sticks
                        .iter()
                        .map(|&(e, i)| (e + line.energy_ev - at, i * f)),
                );
            }
            let main = if a.intensity >= b.intensity { x } else { y };
            Some(PredictedShape::Vibronic(super::band_shape::VibronicShape {
                sticks,
                spacing_ev: main.spacing_ev,
                resolved: main.resolved,
            }))
        }
        _ => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn line(label: &str, e: f64) -> PredictedLine {
        PredictedLine::new(label, e, 1.0)
    }

    #[test]
    fn leaves_far_bands_unmatched() {
        let opt = MatchOptions {
            cap_ev: 1.0,
            intensity_ev: 0.1,
            shape_ev: 0.1,
        };
        let m = match_lines(&[12.0, 15.0, 18.0], &[12.1, 17.9], None, &opt, None);
        assert_eq!(m.pairs, vec![(0, 0), (2, 1)]);
    }

    #[test]
    fn close_pair_is_low_confidence() {
        let opt = MatchOptions {
            cap_ev: 1.5,
            intensity_ev: 0.1,
            shape_ev: 0.1,
        };
        let lines = vec![line("a", 13.0), line("b", 13.1)];
        let id = Alignment {
            shift_ev: 0.0,
            scale: 1.0,
        };
        let ctx = PairContext {
            areas: &[1.0],
            sigma_ev: Some(0.3),
            tau_ev: 0.25,
            shapes: &[],
        };
        let (rows, _) = assigned_pairs(&lines, &[13.05], id, &opt, &ctx);
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
