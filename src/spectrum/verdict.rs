//! Does the prediction explain the trace? One verdict per run, with its reason.
//!
//! - "does not match": no pair; or the assigned peaks carry less than half of the
//!   measured peak area; or the shift is outside the method's plausible range (valence;
//!   method_error.rs); or the median confidence is below 0.3.
//! - "doubtful": a low-confidence pair on a peak with at least a quarter of the largest
//!   area; fewer than two degrees of freedom left in the alignment; relative intensities
//!   off by more than a factor e on average (mean |ln r| > 1); an unassigned peak with more
//!   than 30 % of the largest area; or a predicted band inside the window with no peak.
//! - "good": none of these.
//!
//! The thresholds are set by judgement, not fitted; the reason names the criterion so a
//! reader can weigh it.

use serde::Serialize;

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Verdict {
    Good,
    Doubtful,
    DoesNotMatch,
}

impl Verdict {
    pub fn name(self) -> &'static str {
        match self {
            Verdict::Good => "good",
            Verdict::Doubtful => "doubtful",
            Verdict::DoesNotMatch => "does not match",
        }
    }
}

/// What the verdict is made from (compare.rs fills it).
#[derive(Debug, Clone, PartialEq)]
pub struct VerdictInput {
    /// Per assigned pair: (confidence, low flag, peak area, |ln r| if known).
    pub pairs: Vec<(f64, bool, f64, Option<f64>)>,
    /// Areas of the unassigned peaks.
    pub unassigned_areas: Vec<f64>,
    /// Predicted bands inside the window with no peak (labels).
    pub unseen_inside: Vec<String>,
    pub shift_plausible: bool,
    pub dof: i64,
}

/// The verdict and its reason.
pub fn verdict(v: &VerdictInput) -> (Verdict, String) {
    if v.pairs.is_empty() {
        return (
            Verdict::DoesNotMatch,
            "no predicted band could be paired with a measured peak".into(),
        );
    }
    let assigned: f64 = v.pairs.iter().map(|p| p.2).sum();
    let unassigned: f64 = v.unassigned_areas.iter().sum();
    let total = assigned + unassigned;
    let max_area = v
        .pairs
        .iter()
        .map(|p| p.2)
        .chain(v.unassigned_areas.iter().cloned())
        .fold(0.0, f64::max);
    if total > 0.0 && assigned < 0.5 * total {
        return (
            Verdict::DoesNotMatch,
            format!(
                "the assigned peaks carry only {:.0} % of the measured peak area",
                100.0 * assigned / total
            ),
        );
    }
    if !v.shift_plausible {
        return (
            Verdict::DoesNotMatch,
            "the shift needed is outside what the method's errors make plausible".into(),
        );
    }
    let mut conf: Vec<f64> = v.pairs.iter().map(|p| p.0).collect();
    conf.sort_by(|a, b| a.total_cmp(b));
    let median = conf[conf.len() / 2];
    if median < 0.3 {
        return (
            Verdict::DoesNotMatch,
            format!("the median confidence of the pairs is {median:.2}"),
        );
    }
    let mut reasons = Vec::new();
    let weak = v
        .pairs
        .iter()
        .filter(|p| p.1 && p.2 >= 0.25 * max_area)
        .count();
    if weak > 0 {
        reasons.push(format!("{weak} strong peak(s) have a low-confidence band"));
    }
    if v.dof < 2 {
        reasons.push(format!(
            "only {} degree(s) of freedom left in the alignment",
            v.dof.max(0)
        ));
    }
    let lr: Vec<f64> = v.pairs.iter().filter_map(|p| p.3).collect();
    if !lr.is_empty() {
        let mean = lr.iter().sum::<f64>() / lr.len() as f64;
        if mean > 1.0 {
            reasons.push(format!(
                "relative intensities are off by a factor {:.1} on average",
                mean.exp()
            ));
        }
    }
    let big = v
        .unassigned_areas
        .iter()
        .filter(|&&a| a > 0.3 * max_area)
        .count();
    if big > 0 {
        reasons.push(format!("{big} strong peak(s) have no predicted band"));
    }
    if !v.unseen_inside.is_empty() {
        reasons.push(format!(
            "predicted band(s) {} fall inside the window but no peak was found for them",
            v.unseen_inside.join(", ")
        ));
    }
    if reasons.is_empty() {
        (
            Verdict::Good,
            "every strong peak is explained with good confidence at a plausible shift".into(),
        )
    } else {
        (Verdict::Doubtful, reasons.join("; "))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn input() -> VerdictInput {
        VerdictInput {
            pairs: vec![
                (0.9, false, 1.0, Some(0.2)),
                (0.8, false, 0.7, Some(0.1)),
                (0.85, false, 0.5, None),
            ],
            unassigned_areas: vec![],
            unseen_inside: vec![],
            shift_plausible: true,
            dof: 2,
        }
    }

    #[test]
    fn criteria_in_order() {
        assert_eq!(verdict(&input()).0, Verdict::Good);
        let mut v = input();
        v.dof = 1;
        assert_eq!(verdict(&v).0, Verdict::Doubtful);
        let mut v = input();
        v.unassigned_areas = vec![5.0];
        assert_eq!(verdict(&v).0, Verdict::DoesNotMatch);
        let mut v = input();
        v.shift_plausible = false;
        assert_eq!(verdict(&v).0, Verdict::DoesNotMatch);
    }
}
