//! When is the order of two bands in doubt? When they lie closer than the method's typical
//! error (`Method::typical_error_ev`), or when two methods put them in opposite order (the
//! classic case: Koopmans ionizes N2's 1πu before 3σg, correlated methods and experiment
//! the other way round).

use serde::Serialize;

use crate::ionization::band::Band;
use crate::ionization::method::Method;

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Doubt {
    /// The gap is smaller than the method's typical error.
    WithinError,
    /// Another method orders the two bands the other way.
    MethodsDisagree,
}

/// Two bands whose relative order should not be trusted.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UncertainPair {
    /// Indices into the band list (ordered by IE), first < second.
    pub first: usize,
    pub second: usize,
    pub labels: [String; 2],
    /// IE(second) − IE(first) by the main method, eV (≥ 0).
    pub gap_ev: f64,
    pub doubt: Doubt,
    /// One sentence for people.
    pub reason: String,
}

/// Pairs of bands (ordered by IE) closer than `error_ev`.
pub fn within_error(bands: &[Band], method: Method) -> Vec<UncertainPair> {
    let err = method.typical_error_ev();
    let mut out = Vec::new();
    for i in 0..bands.len() {
        for j in i + 1..bands.len() {
            let gap = bands[j].ie_ev - bands[i].ie_ev;
            if gap.abs() < err {
                out.push(UncertainPair {
                    first: i,
                    second: j,
                    labels: [bands[i].label.clone(), bands[j].label.clone()],
                    gap_ev: gap.abs(),
                    doubt: Doubt::WithinError,
                    reason: format!(
                        "{} and {} lie {:.2} eV apart, less than the typical {} error of {:.2} eV",
                        bands[i].label,
                        bands[j].label,
                        gap.abs(),
                        method,
                        err
                    ),
                });
            }
        }
    }
    out
}

/// Pairs that `other` orders the other way round. `other_ie_ev[k]` is the other method's IE
/// for band k of `bands`.
pub fn disagreements(
    bands: &[Band],
    method: Method,
    other_ie_ev: &[f64],
    other: Method,
) -> Vec<UncertainPair> {
    assert_eq!(bands.len(), other_ie_ev.len());
    let mut out = Vec::new();
    for i in 0..bands.len() {
        for j in i + 1..bands.len() {
            let d_main = bands[j].ie_ev - bands[i].ie_ev;
            let d_other = other_ie_ev[j] - other_ie_ev[i];
            if d_main * d_other < 0.0 {
                out.push(UncertainPair {
                    first: i,
                    second: j,
                    labels: [bands[i].label.clone(), bands[j].label.clone()],
                    gap_ev: d_main.abs(),
                    doubt: Doubt::MethodsDisagree,
                    reason: format!(
                        "{method} puts {} before {} ({:.2} eV apart); {other} puts them the other \
                         way round ({:.2} eV apart)",
                        bands[i].label,
                        bands[j].label,
                        d_main.abs(),
                        d_other.abs()
                    ),
                });
            }
        }
    }
    out
}

/// Both kinds, without listing a pair twice (disagreement wins, it says more).
pub fn merge(mut disagree: Vec<UncertainPair>, close: Vec<UncertainPair>) -> Vec<UncertainPair> {
    for c in close {
        if !disagree
            .iter()
            .any(|d| d.first == c.first && d.second == c.second)
        {
            disagree.push(c);
        }
    }
    disagree.sort_by_key(|p| (p.first, p.second));
    disagree
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ionization::band::Region;

    fn band(label: &str, ie: f64) -> Band {
        Band {
            label: label.into(),
            symmetry: None,
            ie_ev: ie,
            degeneracy: 1,
            occupation: 2.0,
            pole_strength: None,
            one_hole_weight: None,
            character: None,
            character_note: None,
            makeup: vec![],
            method: "ep2".into(),
            region: Region::Valence,
            atom: None,
            lifetime_fwhm_ev: None,
            environment: None,
        }
    }

    #[test]
    fn close_and_reversed_pairs_are_flagged_once() {
        // Koopmans/ep2 N2-like pattern: ep2 15.1 (σg), 16.9 (πu); Koopmans 17.3, 17.1
        let bands = vec![band("3σg", 15.1), band("1πu", 16.9), band("2σu", 18.6)];
        let koop = [17.3, 17.1, 21.2];
        let d = disagreements(&bands, Method::Ep2, &koop, Method::Koopmans);
        assert_eq!(d.len(), 1);
        assert_eq!((d[0].first, d[0].second), (0, 1));
        assert_eq!(d[0].doubt, Doubt::MethodsDisagree);
        let c = within_error(&bands, Method::Ep2);
        assert!(c.is_empty());
        let c = within_error(&bands, Method::Koopmans); // 0.68 eV: 1πu–2σu 1.7 apart: none
        assert!(c.is_empty());
        let close = vec![band("a", 10.0), band("b", 10.3)];
        let c = within_error(&close, Method::Ep2);
        assert_eq!(c.len(), 1);
        let m = merge(
            disagreements(&close, Method::Ep2, &[10.5, 10.2], Method::Koopmans),
            c,
        );
        assert_eq!(m.len(), 1);
        assert_eq!(m[0].doubt, Doubt::MethodsDisagree);
    }
}
