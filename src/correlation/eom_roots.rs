//! Which EOM-IP roots to look for, how each is followed, and how each ended.
//!
//! Guesses: the one-hole unit vectors of the target orbitals (homing references, one per
//! root), or for the n lowest roots the n + 2 highest occupied one-hole vectors (extra
//! vectors help degenerate sets). A root is "inner valence" when its one-hole weight
//! |R1|² / (|R1|² + |R2|²) is below [`INNER_VALENCE_WEIGHT`]: its intensity is shared with
//! satellites (2h1p states) lying close in energy, and the solver refines companion vectors
//! beside it and may accept it at a looser residual threshold (davidson.rs). Every root ends
//! with a [`RootOutcome`]; roots that did not converge, converged only loosely, or ended on
//! another orbital give a typed [`RootWarning`].

use serde::Serialize;

use super::davidson::{DavidsonOptions, Eigenpair, RootStatus, Selection};
use super::eom_ip_sigma::IpSpace;

/// One-hole weight below which a root counts as inner valence (0.8: the usual boundary
/// where the quasi-particle picture of a band starts to fail; common practice).
pub const INNER_VALENCE_WEIGHT: f64 = 0.8;

/// Unit vector of length `dim` at `i`.
fn unit(dim: usize, i: usize) -> Vec<f64> {
    let mut x = vec![0.0; dim];
    x[i] = 1.0;
    x
}

/// Guesses, number of roots and selection: one homing guess per target (active occupied
/// indices) or, without targets, the `lowest` + 2 highest one-hole vectors.
pub fn guesses(
    space: &IpSpace,
    targets: Option<&[usize]>,
    lowest: usize,
) -> (Vec<Vec<f64>>, usize, Selection) {
    let (o, dim) = (space.nocc, space.dim());
    match targets {
        None => {
            let k = lowest.min(o);
            let ng = (k + 2).min(o);
            let g = (0..ng).map(|x| unit(dim, o - 1 - x)).collect();
            (g, k, Selection::Lowest)
        }
        Some(t) => (
            t.iter().map(|&i| unit(dim, i)).collect(),
            t.len(),
            Selection::Follow,
        ),
    }
}

/// One-hole weight of an EOM-IP vector in the spin-orbital metric.
pub fn one_hole_weight(space: &IpSpace, x: &[f64]) -> f64 {
    let (n1, n2) = space.metric_norms(x);
    n1 / (n1 + n2).max(1e-300)
}

/// Whether a root with vector `x` is inner valence (loose thresholds apply).
pub fn is_inner_valence(space: &IpSpace, x: &[f64]) -> bool {
    one_hole_weight(space, x) < INNER_VALENCE_WEIGHT
}

/// How one root ended.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "code", rename_all = "kebab-case")]
pub enum RootOutcome {
    /// Residual below the strict threshold.
    Converged { residual: f64 },
    /// Inner-valence root accepted at the loose threshold.
    ConvergedLoose {
        residual: f64,
        threshold: f64,
        one_hole_weight: f64,
    },
    /// Not converged: no energy is reported for it.
    NotConverged { residual: f64, iterations: usize },
}

impl RootOutcome {
    pub fn of(p: &Eigenpair, space: &IpSpace, opts: &DavidsonOptions) -> RootOutcome {
        match p.status {
            RootStatus::Converged => RootOutcome::Converged {
                residual: p.residual,
            },
            RootStatus::ConvergedLoose => RootOutcome::ConvergedLoose {
                residual: p.residual,
                threshold: opts.loose_r_tol,
                one_hole_weight: one_hole_weight(space, &p.vector),
            },
            RootStatus::NotConverged => RootOutcome::NotConverged {
                residual: p.residual,
                iterations: p.iterations,
            },
        }
    }

    /// Whether the root's energy is reported.
    pub fn usable(&self) -> bool {
        !matches!(self, RootOutcome::NotConverged { .. })
    }
}

/// Something about one EOM-IP root the user should know. Orbitals are 1-based MO numbers.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "code", rename_all = "kebab-case")]
pub enum RootWarning {
    /// The root did not converge; its band is left out.
    RootNotConverged {
        method: &'static str,
        orbital: usize,
        residual: f64,
        iterations: usize,
        last_ie_ev: f64,
    },
    /// An inner-valence root accepted at the loose residual threshold.
    RootConvergedLoosely {
        method: &'static str,
        orbital: usize,
        residual: f64,
        threshold: f64,
        strict: f64,
        one_hole_weight: f64,
    },
    /// The root started from one orbital ended dominated by another.
    RootMoved {
        method: &'static str,
        orbital: usize,
        ended_on: usize,
    },
}

impl RootWarning {
    /// Stable identifier of the kind of warning.
    pub fn code(&self) -> &'static str {
        match self {
            RootWarning::RootNotConverged { .. } => "root-not-converged",
            RootWarning::RootConvergedLoosely { .. } => "root-converged-loosely",
            RootWarning::RootMoved { .. } => "root-moved",
        }
    }
}

impl std::fmt::Display for RootWarning {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            RootWarning::RootNotConverged {
                method,
                orbital,
                residual,
                iterations,
                last_ie_ev,
            } => write!(
                f,
                "{method}: the root started from MO {orbital} did not converge in {iterations} \
                 iterations (residual {residual:.1e}; last estimate {last_ie_ev:.2} eV, not \
                 reliable): that band is left out"
            ),
            RootWarning::RootConvergedLoosely {
                method,
                orbital,
                residual,
                threshold,
                strict,
                one_hole_weight,
            } => write!(
                f,
                "{method}: the root started from MO {orbital} is inner valence (one-hole weight \
                 {one_hole_weight:.2}, satellites close by) and was converged to the looser \
                 residual threshold {threshold:.0e} (residual {residual:.1e}) instead of \
                 {strict:.0e}: its IE is less precise"
            ),
            RootWarning::RootMoved {
                method,
                orbital,
                ended_on,
            } => write!(
                f,
                "{method}: the root started from MO {orbital} ended dominated by MO {ended_on}"
            ),
        }
    }
}

/// Warnings for a root started from MO `target` (0-based) that ended as `state`.
pub fn warnings(
    state: &super::eom_ip::IonizedState,
    target: usize,
    opts: &DavidsonOptions,
) -> Vec<RootWarning> {
    let mut w = Vec::new();
    match state.outcome {
        RootOutcome::Converged { .. } => {}
        RootOutcome::ConvergedLoose {
            residual,
            threshold,
            one_hole_weight,
        } => w.push(RootWarning::RootConvergedLoosely {
            method: state.method,
            orbital: target + 1,
            residual,
            threshold,
            strict: opts.r_tol,
            one_hole_weight,
        }),
        RootOutcome::NotConverged {
            residual,
            iterations,
        } => w.push(RootWarning::RootNotConverged {
            method: state.method,
            orbital: target + 1,
            residual,
            iterations,
            last_ie_ev: state.ie_ev,
        }),
    }
    if state.outcome.usable() && state.dominant_orbital != target {
        w.push(RootWarning::RootMoved {
            method: state.method,
            orbital: target + 1,
            ended_on: state.dominant_orbital + 1,
        });
    }
    w
}

#[cfg(test)]
mod tests {
    use super::*;

    /// An unconverged root gives a warning carrying its residual and a stable code; a
    /// loosely converged one states the looser threshold (regression: wording and codes).
    #[test]
    fn warnings_carry_residuals_and_codes() {
        let w = RootWarning::RootNotConverged {
            method: "eom-ccsd",
            orbital: 4,
            residual: 3.2e-2,
            iterations: 120,
            last_ie_ev: 41.8,
        };
        assert_eq!(w.code(), "root-not-converged");
        let text = w.to_string();
        assert!(text.contains("MO 4") && text.contains("3.2e-2") && text.contains("left out"));
        let j = serde_json::to_value(&w).unwrap();
        assert_eq!(j["code"], "root-not-converged");
        let l = RootWarning::RootConvergedLoosely {
            method: "eom-mp2",
            orbital: 3,
            residual: 4e-4,
            threshold: 1e-3,
            strict: 1e-5,
            one_hole_weight: 0.55,
        };
        assert!(l.to_string().contains("looser residual threshold 1e-3"));
        assert_eq!(serde_json::to_value(&l).unwrap()["code"], l.code());
    }
}
