//! A prediction for the wrong molecule must not explain a trace with confidence: the OH
//! radical's bands against a water He I trace (issue example: "an OH prediction matched a
//! water trace at 0.78–0.82"), with water's own prediction as the control that the same
//! trace and settings do give a good assignment.
//!
//! The trace: water's He I bands from tests/data/he1-bands.csv (Kimura et al. 1981; Turner et
//! al. 1970: positions 12.62, 14.74, 18.55 eV, relative areas and envelope widths, see the
//! file's header for which values are from memory), drawn as Gaussians of the published
//! widths with a little noise.

use bandcast::chem::xyz::{parse_xyz, LengthUnit};
use bandcast::ionization::Region;
use bandcast::predict::{predict, Request};
use bandcast::spectrum::assignment::{assign_bands, Assignment, AssignmentOptions};
use bandcast::spectrum::measured::Measured;
use bandcast::spectrum::method_error::BasisClass;
use bandcast::spectrum::verdict::Verdict;
use bandcast::spectrum::Photon;

/// Water's rows of tests/data/he1-bands.csv: (position, area, FWHM) in eV.
fn water_bands() -> Vec<(f64, f64, f64)> {
    include_str!("data/he1-bands.csv")
        .lines()
        .filter(|l| l.starts_with("water,"))
        .map(|l| {
            let f: Vec<&str> = l.split(',').collect();
            (
                f[2].parse().unwrap(),
                f[4].parse().unwrap(),
                f[5].parse().unwrap(),
            )
        })
        .collect()
}

/// The trace every 0.01 eV over 11–20.5 eV; deterministic noise of 1 % of the 1b1 height
/// (a linear congruential sequence: Knuth's MMIX constants, common practice).
fn water_trace() -> Measured {
    let bands = water_bands();
    assert_eq!(bands.len(), 3);
    let mut state: u64 = 12345;
    let mut noise = || {
        state = state
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (state >> 11) as f64 / (1u64 << 53) as f64 - 0.5
    };
    let (mut e, mut y) = (Vec::new(), Vec::new());
    for i in 0..=950 {
        let x = 11.0 + 0.01 * i as f64;
        let mut v = 0.02;
        for &(p, a, w) in &bands {
            let s = w / 2.354820045;
            v += a / (s * (2.0 * std::f64::consts::PI).sqrt())
                * (-0.5 * ((x - p) / s).powi(2)).exp();
        }
        e.push(x);
        y.push(v + 0.02 * noise());
    }
    Measured {
        energy_ev: e,
        intensity: y,
    }
}

fn assign(xyz: &str) -> Assignment {
    let mol = parse_xyz(xyz, LengthUnit::Angstrom).unwrap();
    let set = bandcast::basis::load("cc-pvdz", &mol, None).unwrap();
    let p = predict(&Request::new(&mol, &set, Region::Valence), &|_| {}).unwrap();
    let mut opts = AssignmentOptions::new(Region::Valence);
    opts.photon = Some(Photon::He1);
    opts.basis = BasisClass::of("cc-pvdz");
    assign_bands(&p.bands, &water_trace(), &opts).unwrap()
}

/// Water at its experimental geometry (GW100 set, van Setten et al. 2015).
const WATER_XYZ: &str = include_str!("data/gw100/water.xyz");
/// OH radical X²Π, r_e = 0.9697 Å (Huber & Herzberg 1979, from memory).
const OH_XYZ: &str = "2\nhydroxyl radical\nO 0 0 0\nH 0 0 0.9697\n";

#[test]
fn oh_prediction_does_not_explain_a_water_trace() {
    let a = assign(OH_XYZ);
    let c = &a.comparison;
    assert_ne!(c.verdict, Verdict::Good, "{}", c.verdict_reason);
    // no pair may be both unflagged and confident
    for p in &c.assignments {
        assert!(
            p.low_confidence || p.confidence < 0.7,
            "{} at {:.2} eV: confidence {:.2} without a LOW flag ({})",
            p.label,
            p.measured_ev,
            p.confidence,
            c.verdict_reason
        );
    }
}

#[test]
fn water_prediction_explains_the_same_trace() {
    // The control: the textbook order 1b1, 3a1, 1b2 (Turner 1970), confident, verdict good.
    let a = assign(WATER_XYZ);
    let c = &a.comparison;
    let labels: Vec<&str> = c.assignments.iter().map(|p| p.label.as_str()).collect();
    assert_eq!(labels, ["1b1", "3a1", "1b2"], "{c:?}");
    assert!(c.assignments.iter().all(|p| p.confidence >= 0.5));
    assert_eq!(c.verdict, Verdict::Good, "{}", c.verdict_reason);
}
