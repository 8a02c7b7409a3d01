//! Writes the README demo's SYNTHETIC "measured" spectra (examples/demo-synthetic-*.csv).
//!
//! They are invented by the project for the demo and are not measurements. Recipe (all
//! numbers below): Voigt lines (library line shapes) at chosen binding energies, a
//! Shirley-like step proportional to the area already passed, a flat background, and
//! counting noise √N drawn from a fixed-seed xorshift64 generator (Marsaglia 2003), so the
//! files are reproducible byte for byte:
//!
//!     cargo run --release --example demo_synthetic_spectra

use bandcast::spectrum::lineshape::voigt;

/// xorshift64 (G. Marsaglia, "Xorshift RNGs", J. Stat. Softw. 8 (2003) 14).
struct XorShift(u64);
impl XorShift {
    fn uniform(&mut self) -> f64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
    /// Approximately standard normal: sum of 12 uniforms − 6.
    fn normal(&mut self) -> f64 {
        (0..12).map(|_| self.uniform()).sum::<f64>() - 6.0
    }
}

struct Recipe {
    file: &'static str,
    title: &'static str,
    /// (binding energy eV, relative area, label)
    lines: &'static [(f64, f64, &'static str)],
    gauss_fwhm: f64,
    lorentz_fwhm: f64,
    lo: f64,
    hi: f64,
    step: f64,
    /// counts at the line maximum of unit area, flat background, step height per unit area
    peak_counts: f64,
    flat: f64,
    step_per_area: f64,
    seed: u64,
}

const FEC_C1S: Recipe = Recipe {
    file: "examples/demo-synthetic-c1s.csv",
    title: "fluoroethylene carbonate C 1s, Al Ka, gas phase",
    // Invented positions: the three carbon environments placed as a plausible measurement
    // might put them (carbonate C, CHF, CH2), not taken from any publication.
    lines: &[
        (297.10, 1.0, "O-C(=O)-O"),
        (295.25, 1.0, "O-CHF"),
        (293.05, 1.0, "O-CH2"),
    ],
    gauss_fwhm: 0.9,
    lorentz_fwhm: 0.1,
    lo: 288.0,
    hi: 302.0,
    step: 0.05,
    peak_counts: 1800.0,
    flat: 400.0,
    step_per_area: 60.0,
    seed: 0x5EED_C1C1_2026,
};

fn make(r: &Recipe) -> String {
    let mut rng = XorShift(r.seed);
    let n = ((r.hi - r.lo) / r.step).round() as usize + 1;
    let peak_norm = voigt(0.0, r.gauss_fwhm, r.lorentz_fwhm);
    let mut o = String::new();
    o.push_str("# SYNTHETIC DEMO DATA - invented by the bandcast project, NOT a measurement.\n");
    o.push_str(&format!("# {}\n", r.title));
    o.push_str(
        "# made by examples/demo_synthetic_spectra.rs (fixed-seed xorshift64 noise); recipe:\n",
    );
    for (e, a, l) in r.lines {
        o.push_str(&format!("#   line {l}: {e:.2} eV, relative area {a}\n"));
    }
    o.push_str(&format!(
        "#   Voigt FWHM gaussian {} eV, lorentzian {} eV; flat {} counts; Shirley-like step {} counts per unit area; sqrt(N) noise\n",
        r.gauss_fwhm, r.lorentz_fwhm, r.flat, r.step_per_area
    ));
    o.push_str("binding_energy_ev,counts\n");
    for i in 0..n {
        let e = r.lo + i as f64 * r.step;
        let mut signal = r.flat;
        for (p, a, _) in r.lines {
            signal += r.peak_counts * a * voigt(e - p, r.gauss_fwhm, r.lorentz_fwhm) / peak_norm;
            // area on the low-binding-energy side of e (inelastic tail rises to higher BE)
            let sigma = r.gauss_fwhm / 2.354820045;
            let cdf = 0.5 * (1.0 + erf_approx((e - p) / (sigma * std::f64::consts::SQRT_2)));
            signal += r.step_per_area * a * cdf;
        }
        let noisy = (signal + signal.sqrt() * rng.normal()).max(0.0);
        o.push_str(&format!("{e:.2},{:.0}\n", noisy));
    }
    o
}

/// erf by Abramowitz & Stegun 7.1.26 (|error| < 1.5e-7), enough for a background shape.
fn erf_approx(x: f64) -> f64 {
    let t = 1.0 / (1.0 + 0.3275911 * x.abs());
    let y = 1.0
        - (((((1.061405429 * t - 1.453152027) * t) + 1.421413741) * t - 0.284496736) * t
            + 0.254829592)
            * t
            * (-x * x).exp();
    if x >= 0.0 {
        y
    } else {
        -y
    }
}

fn main() {
    let r = &FEC_C1S;
    std::fs::write(r.file, make(r)).expect("write the synthetic spectrum");
    eprintln!("wrote {}", r.file);
}
