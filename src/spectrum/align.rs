//! The best global alignment (shift, optionally a linear scale) between predicted band
//! energies and measured peaks.
//!
//! Predictions carry a systematic error (Koopmans' theorem overestimates valence IEs by
//! ~1 eV and core IEs by 10–20 eV; common practice), so peaks are compared with
//! aligned = scale · predicted + shift. The objective is the cost of the optimal matching
//! (assign.rs: Σ|residual| + cap/2 per unmatched band or peak), searched on a grid:
//! shifts in [−max_shift, +max_shift] every `step`, and, with `fit_scale`, scales in
//! [0.85, 1.15] every 0.005 about the mean predicted energy. Ties go to the smallest
//! |shift| (then |scale − 1|). The best grid point is refined by least squares over its
//! pairs (mean residual for the shift; linear regression when the scale is fitted, which
//! needs three pairs or more), re-matching until the pairs stop changing.
//!
//! The uncertainty of the fitted shift is the standard error of the least-squares
//! estimate, s/√n with s² = Σ residual²/(n − p) (p = 1 for a shift, 2 with a scale; for the
//! scale fit the shift's error is taken at the pairs' mean energy); with no degree of freedom
//! left (n = p) it is unknown. Fewer than two degrees of freedom is reported (a note): the
//! fit then says little about how well the prediction matches.

use serde::Serialize;

use super::assign::{match_lines, Alignment, MatchOptions, Matching, PredictedLine};
use super::note::Note;

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AlignOptions {
    pub max_shift_ev: f64,
    pub step_ev: f64,
    pub fit_scale: bool,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AlignResult {
    pub alignment: Alignment,
    /// Cost of the matching at the final alignment.
    pub cost: f64,
    pub n_pairs: usize,
    /// Degrees of freedom left: pairs − fitted parameters.
    pub dof: i64,
    /// Standard error of the shift (eV), None with no degree of freedom left.
    pub shift_sd_ev: Option<f64>,
    /// Why the scale was not fitted although asked, if so.
    pub note: Option<Note>,
}

fn matching_at(
    lines: &[PredictedLine],
    peaks: &[f64],
    extra: Option<&[Vec<f64>]>,
    a: Alignment,
    opt: &MatchOptions,
) -> Matching {
    let aligned: Vec<f64> = lines.iter().map(|l| a.apply(l.energy_ev)).collect();
    match_lines(&aligned, peaks, extra, opt, None)
}

/// Search the alignment; `extra` is the intensity part of the pair costs (assign.rs).
pub fn align(
    lines: &[PredictedLine],
    peaks: &[f64],
    extra: Option<&[Vec<f64>]>,
    mopt: &MatchOptions,
    aopt: &AlignOptions,
) -> AlignResult {
    let pivot = if lines.is_empty() {
        0.0
    } else {
        lines.iter().map(|l| l.energy_ev).sum::<f64>() / lines.len() as f64
    };
    let n_shift = (aopt.max_shift_ev / aopt.step_ev).ceil() as i64;
    let scales: Vec<f64> = if aopt.fit_scale {
        (-30..=30).map(|k| 1.0 + 0.005 * k as f64).collect()
    } else {
        vec![1.0]
    };
    let mut best: Option<(f64, f64, Alignment)> = None; // (cost + tie penalty, raw cost, a)
    for &scale in &scales {
        for k in -n_shift..=n_shift {
            let s = k as f64 * aopt.step_ev;
            // aligned = pivot + scale (e − pivot) + s = scale e + (s + pivot (1 − scale))
            let a = Alignment {
                shift_ev: s + pivot * (1.0 - scale),
                scale,
            };
            let m = matching_at(lines, peaks, extra, a, mopt);
            let key = m.total_cost + 1e-6 * (s.abs() + 10.0 * (scale - 1.0).abs());
            if best.as_ref().is_none_or(|b| key < b.0) {
                best = Some((key, m.total_cost, a));
            }
        }
    }
    let (_, _, mut a) = best.expect("at least one grid point");
    let mut note = None;
    let mut m = matching_at(lines, peaks, extra, a, mopt);
    for _ in 0..20 {
        if m.pairs.is_empty() {
            break;
        }
        let xs: Vec<f64> = m.pairs.iter().map(|&(i, _)| lines[i].energy_ev).collect();
        let ys: Vec<f64> = m.pairs.iter().map(|&(_, j)| peaks[j]).collect();
        let n = xs.len() as f64;
        let new = if aopt.fit_scale && xs.len() >= 3 {
            let mx = xs.iter().sum::<f64>() / n;
            let my = ys.iter().sum::<f64>() / n;
            let sxx: f64 = xs.iter().map(|x| (x - mx).powi(2)).sum();
            let sxy: f64 = xs.iter().zip(&ys).map(|(x, y)| (x - mx) * (y - my)).sum();
            if sxx > 1e-12 {
                let scale = sxy / sxx;
                Alignment {
                    shift_ev: my - scale * mx,
                    scale,
                }
            } else {
                a
            }
        } else {
            if aopt.fit_scale {
                note = Some(Note::ScaleNotFitted { pairs: xs.len() });
            }
            let scale = if aopt.fit_scale { 1.0 } else { a.scale };
            let shift = ys.iter().zip(&xs).map(|(y, x)| y - scale * x).sum::<f64>() / n;
            Alignment {
                shift_ev: shift,
                scale,
            }
        };
        let m2 = matching_at(lines, peaks, extra, new, mopt);
        let same = m2.pairs == m.pairs;
        // keep the refinement only if it does not make the matching worse
        if m2.total_cost <= m.total_cost + 1e-9 || same {
            a = new;
            m = m2;
        } else {
            break;
        }
        if same {
            break;
        }
    }
    if aopt.fit_scale && m.pairs.len() < 3 && a.scale != 1.0 {
        // Too few pairs to determine a scale: fall back to a pure shift.
        note = Some(Note::ScaleNotFitted {
            pairs: m.pairs.len(),
        });
        let fallback = AlignOptions {
            fit_scale: false,
            ..*aopt
        };
        let mut r = align(lines, peaks, extra, mopt, &fallback);
        r.note = note;
        return r;
    }
    let n = m.pairs.len();
    let p = if aopt.fit_scale && a.scale != 1.0 {
        2
    } else {
        1
    };
    let dof = n as i64 - p as i64;
    let shift_sd_ev = (dof > 0).then(|| {
        let ss: f64 = m
            .pairs
            .iter()
            .map(|&(i, j)| (peaks[j] - a.apply(lines[i].energy_ev)).powi(2))
            .sum();
        (ss / dof as f64).sqrt() / (n as f64).sqrt()
    });
    AlignResult {
        alignment: a,
        cost: m.total_cost,
        n_pairs: n,
        dof,
        shift_sd_ev,
        note,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn recovers_a_shift() {
        let lines: Vec<PredictedLine> = [11.0, 13.5, 17.2]
            .iter()
            .enumerate()
            .map(|(i, &e)| PredictedLine::new(format!("b{i}"), e, 1.0))
            .collect();
        let peaks = [12.6, 15.1, 18.8];
        let mopt = MatchOptions {
            cap_ev: 1.5,
            intensity_ev: 0.1,
            shape_ev: 0.1,
        };
        let aopt = AlignOptions {
            max_shift_ev: 5.0,
            step_ev: 0.02,
            fit_scale: false,
        };
        let r = align(&lines, &peaks, None, &mopt, &aopt);
        assert!((r.alignment.shift_ev - 1.6).abs() < 1e-9, "{r:?}");
        assert_eq!(r.n_pairs, 3);
        assert_eq!(r.dof, 2);
        assert!(r.shift_sd_ev.unwrap() < 1e-9);
    }
}
