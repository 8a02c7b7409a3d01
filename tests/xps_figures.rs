//! XPS figures and labels end to end: one panel per element and shell, each over its own
//! binding-energy range, and core levels named by their chemical environment (common
//! practice of naming XPS components by functional group: methanol's carbon is C–O, its
//! oxygen C–O–H; FEC's carbonate carbon O–C(=O)–O) in JSON, tables, SVG and HTML.

mod common;

use std::process::Command;

fn bandcast(args: &[&str]) -> std::process::Output {
    let out = Command::new(env!("CARGO_BIN_EXE_bandcast"))
        .args(args)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    out
}

/// The numeric tick labels of one SVG panel.
fn ticks(svg: &str) -> Vec<f64> {
    svg.split("text-anchor=\"middle\" fill=\"#333\">")
        .skip(1)
        .filter_map(|s| s.split('<').next()?.parse().ok())
        .collect()
}

/// The arguments of every run here: `command FILE --basis sto-3g --region core --quick
/// --photon alka`, then `more`.
fn xps_args<'a>(command: &'a str, file: &'a str, more: &[&'a str]) -> Vec<&'a str> {
    let mut v = vec![
        command, file, "--basis", "sto-3g", "--region", "core", "--quick", "--photon", "alka",
    ];
    v.extend_from_slice(more);
    v
}

const METHANOL: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/data/gw100/methanol.xyz");

/// The nested panels of a figure holding C 1s and O 1s: two, C 1s (lower binding energy)
/// first, each axis's ticks inside its own range.
fn c_and_o_panels(doc: &str, c_range: std::ops::Range<f64>, o_range: std::ops::Range<f64>) {
    let panels: Vec<&str> = doc.split("<svg x=\"0\" y=").skip(1).collect();
    assert_eq!(panels.len(), 2, "{doc}");
    assert!(panels[0].contains(">C 1s<") && panels[1].contains(">O 1s<"));
    let (c, o) = (ticks(panels[0]), ticks(panels[1]));
    assert!(
        !c.is_empty() && c.iter().all(|t| c_range.contains(t)),
        "{c:?}"
    );
    assert!(
        !o.is_empty() && o.iter().all(|t| o_range.contains(t)),
        "{o:?}"
    );
}

#[test]
fn methanol_core_spectrum_has_a_panel_per_element_and_environments() {
    let svg = common::temp_path("xps", "methanol.svg");
    let html = common::temp_path("xps", "methanol.html");
    let out = bandcast(&xps_args(
        "spectrum",
        METHANOL,
        &[
            "--svg",
            svg.to_str().unwrap(),
            "--html",
            html.to_str().unwrap(),
            "--json",
        ],
    ));
    let j: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let env: Vec<(&str, &str)> = j["bands"]
        .as_array()
        .unwrap()
        .iter()
        .map(|b| {
            (
                b["label"].as_str().unwrap(),
                b["environment"].as_str().unwrap(),
            )
        })
        .collect();
    assert_eq!(env, [("C1 1s", "C–O"), ("O2 1s", "C–O–H")]);
    let text = std::fs::read_to_string(&svg).unwrap();
    // two nested panels, C 1s (lower binding energy) first, each with its own clip path;
    // each panel's axis covers its own level only: C 1s near 285–300 eV, O 1s near 530 eV
    c_and_o_panels(&text, 270.0..320.0, 510.0..560.0);
    assert!(text.contains("id=\"plotarea1\"") && text.contains("id=\"plotarea2\""));
    assert!(text.contains("C1 1s (C–O)") && text.contains("O2 1s (C–O–H)"));
    let page = std::fs::read_to_string(&html).unwrap();
    assert!(page.contains("<td class=\"l\">C–O–H</td>") && page.contains(">O 1s<"));
    for p in [svg, html] {
        let _ = std::fs::remove_file(p);
    }
}

#[test]
fn one_element_is_one_plot() {
    let svg = common::temp_path("xps", "methanol-c.svg");
    bandcast(&xps_args(
        "spectrum",
        METHANOL,
        &["--element", "C", "--svg", svg.to_str().unwrap()],
    ));
    let text = std::fs::read_to_string(&svg).unwrap();
    assert_eq!(text.matches("<svg").count(), 1);
    let _ = std::fs::remove_file(svg);
}

#[test]
fn assign_names_the_environments() {
    // The demo's synthetic FEC C 1s trace (examples/demo-synthetic-c1s.csv, invented demo
    // data): only the labels are checked here.
    let html = common::temp_path("xps", "fec.html");
    let m = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/examples/demo-synthetic-c1s.csv"
    );
    let fec = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/molecules/fluoroethylene-carbonate.xyz"
    );
    let args = xps_args("assign", fec, &["--element", "C", "--measured", m]);
    let mut with_json = args.clone();
    with_json.extend(["--json", "--html", html.to_str().unwrap()]);
    let out = bandcast(&with_json);
    let j: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let envs = j["environments"].as_array().unwrap();
    assert!(envs
        .iter()
        .any(|e| e["band"] == "C1 1s" && e["environment"] == "O–C(=O)–O"));
    assert!(envs
        .iter()
        .any(|e| e["band"] == "C5 1s" && e["environment"] == "F–C–O"));
    // The confidence model is fitted on He I valence traces only: a core-level assignment
    // says so, in the JSON notes with its code and in the text.
    let codes = common::note_codes(&j);
    assert!(
        codes.contains(&"confidence_uncalibrated_for_core"),
        "{codes:?}"
    );
    let page = std::fs::read_to_string(&html).unwrap();
    assert!(page.contains("C1 1s (O–C(=O)–O)"));
    let text = String::from_utf8(bandcast(&args).stdout).unwrap();
    assert!(text.contains("C6 1s (C–O)"), "{text}");
    assert!(
        text.contains("note: the confidences come from a model fitted on He I valence traces"),
        "{text}"
    );
    let _ = std::fs::remove_file(html);
}

#[test]
fn assign_draws_a_panel_per_element() {
    // A rendering check only: an invented two-peak trace (C 1s and O 1s regions, 3 eV above
    // methanol's STO-3G levels) so that the prediction holds two elements.
    let data = common::temp_path("xps", "methanol-xps.csv");
    let html = common::temp_path("xps", "methanol-assign.html");
    let mut text =
        String::from("# invented rendering-test trace, not a measurement\nenergy,intensity\n");
    for i in 0..=5300 {
        let x = 280.0 + 0.05 * i as f64;
        let mut v = 10.0 + 0.5 * (7.3 * x).sin();
        for p in [291.0, 537.0] {
            v += 100.0 * (-0.5 * ((x - p) / 0.45f64).powi(2)).exp();
        }
        text.push_str(&format!("{x:.2},{v:.4}\n"));
    }
    std::fs::write(&data, text).unwrap();
    bandcast(&xps_args(
        "assign",
        METHANOL,
        &[
            "--measured",
            data.to_str().unwrap(),
            "--html",
            html.to_str().unwrap(),
        ],
    ));
    let page = std::fs::read_to_string(&html).unwrap();
    c_and_o_panels(&page, 280.0..305.0, 520.0..546.0);
    for p in [data, html] {
        let _ = std::fs::remove_file(p);
    }
}
