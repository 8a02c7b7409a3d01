//! Predicted spectra: line shapes, the Faddeeva function, photon energies, broadening,
//! mixtures, the Gelius intensities.

mod common;

use bandcast::ionization::{Band, Region};
use bandcast::spectrum::broaden::{auto_grid, broaden};
use bandcast::spectrum::build::{build_spectrum, Component, SpectrumOptions};
use bandcast::spectrum::faddeeva::{dawson, faddeeva, Complex};
use bandcast::spectrum::lineshape::{gaussian, lorentzian, voigt};
use bandcast::spectrum::note::Note;
use bandcast::spectrum::photon::{Axis, Photon};
use bandcast::spectrum::predicted::{sticks_from_bands, IntensityModel, StickOptions};
use bandcast::spectrum::Shape;
use common::hand_band as band;

/// ∫ f over the whole real line by the substitution x = s·tan θ and composite Simpson on
/// θ ∈ (−π/2, π/2) (common practice for heavy-tailed integrands).
fn integral(f: impl Fn(f64) -> f64, s: f64) -> f64 {
    let n = 200_000; // even
    let a = -std::f64::consts::FRAC_PI_2;
    let h = std::f64::consts::PI / n as f64;
    let g = |t: f64| {
        let c = t.cos();
        if c.abs() < 1e-300 {
            0.0
        } else {
            f(s * t.tan()) * s / (c * c)
        }
    };
    let mut sum = g(a) + g(-a);
    for i in 1..n {
        let t = a + i as f64 * h;
        sum += if i % 2 == 1 { 4.0 } else { 2.0 } * g(t);
    }
    sum * h / 3.0
}

#[test]
fn every_line_shape_has_unit_area() {
    // Normalisation to unit area (definition; checked by quadrature, common practice).
    for &w in &[0.05, 0.3, 1.0] {
        assert!((integral(|x| gaussian(x, w), w) - 1.0).abs() < 1e-6);
        assert!((integral(|x| lorentzian(x, w), w) - 1.0).abs() < 1e-6);
        for &l in &[0.02, 0.1, 0.5, 2.0] {
            let a = integral(|x| voigt(x, w, l), w.max(l));
            assert!((a - 1.0).abs() < 1e-6, "voigt g={w} l={l}: {a}");
        }
    }
}

#[test]
fn dawson_integral_table_values() {
    // Abramowitz & Stegun (1964) Table 7.5 (Dawson's integral), from memory.
    assert!((dawson(1.0) - 0.5380795069).abs() < 2e-9);
    assert!((dawson(2.0) - 0.3013403889).abs() < 2e-9);
    // Im w(x) = 2/√π F(x) and Re w(x) = exp(−x²) on the real axis (A&S 7.1.3, 7.1.16;
    // common practice).
    let w = faddeeva(Complex::new(1.0, 0.0));
    assert!((w.re - (-1.0f64).exp()).abs() < 1e-12);
    assert!((w.im - 2.0 / std::f64::consts::PI.sqrt() * 0.5380795069).abs() < 2e-9);
}

#[test]
fn faddeeva_on_the_imaginary_axis() {
    // w(iy) = exp(y²) erfc(y) (A&S 7.1.3); erfc(1) = 0.1572992070 (A&S Table 7.1, from
    // memory), erfc(0) = 1.
    let w = faddeeva(Complex::new(0.0, 1.0));
    assert!((w.re - 1f64.exp() * 0.1572992070).abs() < 1e-9, "{w:?}");
    assert!(w.im.abs() < 1e-12);
    let w0 = faddeeva(Complex::new(0.0, 0.0));
    assert!((w0.re - 1.0).abs() < 1e-12 && w0.im.abs() < 1e-12);
}

#[test]
fn faddeeva_off_axis() {
    // w(1 + i) = 0.30474420525691 + 0.20821893820283 i (a standard test value of complex
    // error function routines, e.g. in Poppe & Wijers, ACM TOMS 16 (1990) 38; from memory).
    let w = faddeeva(Complex::new(1.0, 1.0));
    assert!((w.re - 0.304744205257).abs() < 1e-8, "{w:?}");
    assert!((w.im - 0.208218938203).abs() < 1e-8, "{w:?}");
}

#[test]
fn voigt_equals_the_numerical_convolution() {
    // V = G ⊗ L by definition (Armstrong 1967); the convolution integral is done by
    // Simpson's rule with the substitution t = s tan θ, as for the areas.
    let (g, l) = (0.4, 0.15);
    for &x in &[0.0, 0.1, 0.3, 0.8, 2.0] {
        let conv = integral(|t| gaussian(t, g) * lorentzian(x - t, l), 0.2);
        let v = voigt(x, g, l);
        assert!(
            (conv - v).abs() < 1e-7 * v.max(1e-3),
            "x={x}: {conv} vs {v}"
        );
    }
}

#[test]
fn kinetic_energies_at_the_four_sources() {
    // E_kin = hν − E_bind (Einstein relation); hν: He I 21.218, He II 40.814 (NIST ASD),
    // Mg Kα 1253.6, Al Kα 1486.6 eV (Bearden 1967 via the X-ray Data Booklet) — from memory.
    let cases = [
        (Photon::He1, 12.62, 8.598),
        (Photon::He2, 12.62, 28.194),
        (Photon::MgKa, 290.8, 962.8),
        (Photon::AlKa, 290.8, 1195.8),
    ];
    for (p, be, ke) in cases {
        assert!((p.kinetic_ev(be) - ke).abs() < 1e-9, "{p:?}");
        assert!((p.binding_ev(ke) - be).abs() < 1e-9);
    }
    assert!(!Photon::He1.reaches(32.2)); // water 2a1 is beyond He I (docs/reference-data.md §3)
    assert!(Photon::He2.reaches(32.2));
}

#[test]
fn unreachable_bands_are_left_out_and_said() {
    // Hand-made water-like bands (positions from docs/reference-data.md §3, Kimura 1981 / X-ray PES).
    let bands = vec![
        band("1b1", 12.62, &[], Region::Valence),
        band("2a1", 32.2, &[], Region::Valence),
    ];
    let mut notes = Vec::new();
    let opts = StickOptions {
        photon: Photon::He1,
        intensity: IntensityModel::Occupation,
        gaussian_fwhm_ev: 0.3,
        weight: 1.0,
        component: 0,
    };
    let (s, e) = sticks_from_bands(&bands, &opts, &mut notes);
    assert_eq!(s.len(), 1);
    assert_eq!(e.len(), 1);
    assert!(e[0].reason.contains("above the photon energy"));
    // The built spectrum says so with a typed note (He I: 21.218 eV, common practice).
    let built = build_spectrum(
        &[Component {
            bands: &bands,
            weight: 1.0,
            name: "water".into(),
        }],
        &SpectrumOptions {
            photon: Photon::He1,
            region: Region::Valence,
            axis: Axis::Binding,
            fwhm_ev: None,
            shape: None,
            intensity: IntensityModel::Occupation,
            window: None,
        },
    )
    .unwrap();
    assert_eq!(built.sticks.len(), 1);
    assert_eq!(
        built.notes,
        vec![Note::BandsAbovePhoton {
            count: 1,
            photon_ev: Photon::He1.energy_ev()
        }]
    );
    assert_eq!(built.notes[0].code(), "bands_above_photon");
}

#[test]
fn gelius_ratio_follows_the_table() {
    // Yeh & Lindau (1985) at 1486.6 eV (reproduced table): σ(O 2p) = 2.4e-4 Mb for 4 electrons,
    // σ(C 2p) = 1.0e-5 Mb for 2 electrons → per electron ratio 12.
    let o = band("o", 12.0, &[("O1", "2p", 1.0)], Region::Valence);
    let c = band("c", 14.0, &[("C2", "2p", 1.0)], Region::Valence);
    let mut notes = Vec::new();
    let opts = StickOptions {
        photon: Photon::AlKa,
        intensity: IntensityModel::Gelius,
        gaussian_fwhm_ev: 0.9,
        weight: 1.0,
        component: 0,
    };
    let (s, _) = sticks_from_bands(&[o, c], &opts, &mut notes);
    assert!((s[0].intensity / s[1].intensity - 12.0).abs() < 1e-9);
    // He I favours 2p over 2s (Yeh & Lindau 1985, from memory: both C 2p/C 2s > 1 at 21.2 eV).
    let p = band("p", 12.0, &[("C1", "2p", 1.0)], Region::Valence);
    let s2 = band("s", 19.0, &[("C1", "2s", 1.0)], Region::Valence);
    let opts = StickOptions {
        photon: Photon::He1,
        ..opts
    };
    let (s, _) = sticks_from_bands(&[p, s2], &opts, &mut notes);
    assert!(s[0].intensity > s[1].intensity);
}

#[test]
fn mixture_is_the_weighted_sum() {
    let a = vec![band("a", 12.0, &[], Region::Valence)];
    let b = vec![band("b", 15.0, &[], Region::Valence)];
    let mut notes = Vec::new();
    let mk = |bands: &[Band], w: f64, k: usize, notes: &mut Vec<Note>| {
        sticks_from_bands(
            bands,
            &StickOptions {
                photon: Photon::He1,
                intensity: IntensityModel::Occupation,
                gaussian_fwhm_ev: 0.3,
                weight: w,
                component: k,
            },
            notes,
        )
        .0
    };
    let mut sticks = mk(&a, 0.3, 0, &mut notes);
    sticks.extend(mk(&b, 0.7, 1, &mut notes));
    let g = auto_grid(&sticks, Axis::Binding, None).unwrap();
    let c = broaden(
        &sticks,
        Shape::Gaussian,
        Axis::Binding,
        g,
        &["a".into(), "b".into()],
    );
    let area0: f64 = c.components[0].iter().sum::<f64>() * g.step;
    let area1: f64 = c.components[1].iter().sum::<f64>() * g.step;
    // occupation 2 × degeneracy 1 × weight
    assert!((area0 - 0.6).abs() < 1e-6 && (area1 - 1.4).abs() < 1e-6);
    for i in 0..c.total.len() {
        assert!((c.total[i] - c.components[0][i] - c.components[1][i]).abs() < 1e-15);
    }
    // The same through the spectrum builder the command uses: areas 0.3·2 and 0.7·2.
    let built = build_spectrum(
        &[
            Component {
                bands: &a,
                weight: 0.3,
                name: "a".into(),
            },
            Component {
                bands: &b,
                weight: 0.7,
                name: "b".into(),
            },
        ],
        &SpectrumOptions {
            photon: Photon::He1,
            region: Region::Valence,
            axis: Axis::Binding,
            fwhm_ev: Some(0.3),
            shape: Some(Shape::Gaussian),
            intensity: IntensityModel::Occupation,
            window: None,
        },
    )
    .unwrap();
    let step = built.curve.energy_ev[1] - built.curve.energy_ev[0];
    let area0: f64 = built.curve.components[0].iter().sum::<f64>() * step;
    let area1: f64 = built.curve.components[1].iter().sum::<f64>() * step;
    assert!((area0 - 0.6).abs() < 1e-6 && (area1 - 1.4).abs() < 1e-6);
    assert_eq!(built.sticks[0].label, "a: a");
}

#[test]
fn core_levels_get_lifetime_width() {
    let mut notes = Vec::new();
    let c = band("C1 1s", 290.8, &[], Region::Core);
    let (s, _) = sticks_from_bands(
        &[c],
        &StickOptions {
            photon: Photon::AlKa,
            intensity: IntensityModel::Occupation,
            gaussian_fwhm_ev: 0.9,
            weight: 1.0,
            component: 0,
        },
        &mut notes,
    );
    // C 1s lifetime ≈ 0.1 eV (docs/reference-data.md §4, memory; lifetime.rs table, memory).
    assert!((s[0].lorentzian_fwhm_ev - 0.1).abs() < 0.03);
}

#[test]
fn faddeeva_against_arbitrary_precision() {
    // w(z) = exp(−z²) erfc(−iz) evaluated with the general-purpose arbitrary-precision
    // library mpmath 1.3.0 at 30 significant digits (values printed to 17 digits).
    let cases = [
        ((1.0, 1.0), (0.304_744_205_256_912_6, 0.20821893820283163)),
        (
            (3.0, 0.5),
            (0.037_126_366_054_692_34, 0.192_983_755_300_362_1),
        ),
        ((0.2, 3.0), (0.17836772786315944, 0.010838720005426803)),
        (
            (8.0, 0.01),
            (9.030_605_868_376_257e-5, 0.071_087_996_059_197_48),
        ),
        (
            (0.5, 0.05),
            (0.747_281_158_048_569_3, 0.441_915_827_491_037_6),
        ),
        ((2.0, 0.2), (0.059_531_297_313_814_17, 0.32133240973557654)),
        ((5.5, 0.001), (1.966_263_304_119_652e-5, 0.1043674326597317)),
    ];
    let mut worst: f64 = 0.0;
    for ((x, y), (re, im)) in cases {
        let w = faddeeva(Complex::new(x, y));
        let err = ((w.re - re).powi(2) + (w.im - im).powi(2)).sqrt() / (re * re + im * im).sqrt();
        worst = worst.max(err);
    }
    eprintln!("worst relative error of w(z): {worst:e}");
    assert!(worst < 1e-10, "{worst:e}");
}
