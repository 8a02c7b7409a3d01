//! Trace sanity of `bandcast assign`: a flat trace, a sign-inverted trace, a kinetic-energy
//! file (header, or only its energy range), and a scale fitted to three peaks. Water He I
//! bands 12.62 (1b1), 14.74 (3a1), 18.55 (1b2) eV (Kimura et al. 1981; docs/reference-data.md
//! §3 for 1b1, the rest from memory); He I 21.218 eV (NIST ASD, spectrum/photon.rs).

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use bandcast::ionization::Region;
use bandcast::spectrum::assign::PredictedLine;
use bandcast::spectrum::compare::{compare, CompareOptions};
use bandcast::spectrum::measured::Measured;

const WATER: [(f64, f64, f64); 3] = [(12.62, 1.0, 0.35), (14.74, 0.5, 1.0), (18.55, 0.45, 1.1)];

fn water_trace(sign: f64) -> Vec<(f64, f64)> {
    (0..1000)
        .map(|i| {
            let e = 11.0 + 0.01 * i as f64;
            let y: f64 = WATER
                .iter()
                .map(|&(p, h, w)| h * (-0.5 * ((e - p) / (w / 2.3548)).powi(2)).exp())
                .sum();
            // deterministic small ripple as "noise"
            (
                e,
                sign * (0.05 + y) + 0.002 * ((i * 7919) % 13) as f64 / 13.0,
            )
        })
        .collect()
}

fn setup(tag: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("bandcast-trace-{tag}-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    // Water geometry of docs/reference-data.md §1 (Crawford group projects), in Å.
    std::fs::write(
        dir.join("water.xyz"),
        "3\nwater\nO 0.000000 -0.075791844 0.0\nH 0.866811829 0.601435779 0.0\nH -0.866811829 0.601435779 0.0\n",
    )
    .unwrap();
    dir
}

fn write(dir: &Path, name: &str, header: &str, pts: &[(f64, f64)]) -> PathBuf {
    let mut t = format!("{header}\n");
    for (e, y) in pts {
        t.push_str(&format!("{e:.4},{y:.6}\n"));
    }
    let p = dir.join(name);
    std::fs::write(&p, t).unwrap();
    p
}

fn assign(dir: &Path, data: &Path, extra: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_bandcast"))
        .args([
            "assign",
            dir.join("water.xyz").to_str().unwrap(),
            "--basis",
            "sto-3g",
            "--method",
            "koopmans",
            "--measured",
            data.to_str().unwrap(),
        ])
        .args(extra)
        .output()
        .unwrap()
}

#[test]
fn flat_trace_gives_no_assignment_exit_1() {
    let dir = setup("flat");
    // constant with rounding-level ripple (what gave "3 peaks" of prominence 1e-14)
    let pts: Vec<(f64, f64)> = (0..500)
        .map(|i| (10.0 + 0.02 * i as f64, 1.0 + 1e-14 * ((i % 3) as f64)))
        .collect();
    let data = write(&dir, "flat.csv", "energy,intensity", &pts);
    let out = assign(&dir, &data, &[]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1), "{err}");
    assert!(err.contains("no peak stands above the noise"), "{err}");
    assert!(out.stdout.is_empty());
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn inverted_trace_is_an_input_error_naming_the_file() {
    let dir = setup("inv");
    let data = write(&dir, "inverted.csv", "energy,intensity", &water_trace(-1.0));
    let out = assign(&dir, &data, &[]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(
        err.contains("inverted.csv") && err.contains("inverted"),
        "{err}"
    );
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn kinetic_energy_file_is_converted_or_refused() {
    let dir = setup("ke");
    let hv = 21.218;
    let ke: Vec<(f64, f64)> = water_trace(1.0)
        .iter()
        .rev()
        .map(|&(e, y)| (hv - e, y))
        .collect();
    // header says kinetic, no photon: refused before any computation
    let data = write(&dir, "ke.csv", "kinetic energy (eV),counts", &ke);
    let out = assign(&dir, &data, &[]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("ke.csv") && err.contains("kinetic"), "{err}");
    // with the photon: converted (EKE = hν − IE, common practice) and said so
    let out = assign(&dir, &data, &["--photon", "he1", "--json"]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let codes: Vec<&str> = v["note_details"]
        .as_array()
        .unwrap()
        .iter()
        .map(|n| n["code"].as_str().unwrap())
        .collect();
    assert!(codes.contains(&"kinetic_converted"), "{codes:?}");
    let first = &v["assignments"][0];
    assert!(
        (first["measured_ev"].as_f64().unwrap() - 12.62).abs() < 0.05,
        "{first}"
    );
    assert!(v["verdict"].is_string() && v["verdict_reason"].is_string());
    // no header, only the range (2.7–10.2 eV) says kinetic for He I: refused with a message
    let data = write(&dir, "ke-plain.csv", "# no header", &ke);
    let out = assign(&dir, &data, &["--photon", "he1"]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(err.contains("probably kinetic"), "{err}");
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn scale_on_three_peaks_warns_of_few_degrees_of_freedom() {
    let (e, y): (Vec<f64>, Vec<f64>) = water_trace(1.0).into_iter().unzip();
    let m = Measured {
        energy_ev: e,
        intensity: y,
    };
    let lines: Vec<PredictedLine> = [("1b1", 13.85), ("3a1", 15.9), ("1b2", 19.5)]
        .iter()
        .map(|&(l, e)| PredictedLine::new(l, e, 2.0))
        .collect();
    let mut opt = CompareOptions::defaults(Region::Valence, 0.3);
    opt.fit_scale = true;
    let c = compare(&lines, &m, &opt).unwrap();
    assert_eq!(c.assignments.len(), 3);
    assert_eq!(c.degrees_of_freedom, 1, "{c:?}");
    assert!(c.notes.iter().any(|n| n.code() == "few_degrees_of_freedom"));
    assert_ne!(c.verdict, bandcast::spectrum::verdict::Verdict::Good);
    // shift alone: two degrees of freedom left, and a standard error
    opt.fit_scale = false;
    let c = compare(&lines, &m, &opt).unwrap();
    assert_eq!(c.degrees_of_freedom, 2);
    assert!(c.shift_sd_ev.is_some());
}
