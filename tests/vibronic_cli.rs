//! `--vibronic` on the command line: the thermal population of `--temperature`, the
//! refusal before work, the HTML page. Sources beside each check.

mod common;

use std::process::Command;

fn h2_file() -> std::path::PathBuf {
    let p = common::temp_path("vibronic-cli", "h2.xyz");
    std::fs::write(&p, "2\nhydrogen\nH 0 0 0\nH 0 0 0.74\n").unwrap();
    p
}

fn run(args: &[&str]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_bandcast"))
        .args(args)
        .output()
        .unwrap()
}

#[test]
fn hot_bands_follow_the_boltzmann_law_and_bad_requests_stop_before_work() {
    let f = h2_file();
    let file = f.to_str().unwrap();
    let html = common::temp_path("vibronic-cli", "h2.html");
    let out = run(&[
        "spectrum",
        file,
        "--basis",
        "cc-pVDZ",
        "--photon",
        "he1",
        "--vibronic",
        "--vibronic-count",
        "1",
        "--temperature",
        "3000",
        "--json",
        "--html",
        html.to_str().unwrap(),
    ]);
    let v = common::json_of(&out);
    assert_eq!(v["temperature_k"], 3000.0);
    let b = &v["bands"][0];
    let lines = b["lines"].as_array().unwrap();
    let level = |l: &serde_json::Value| -> u64 {
        l.get("neutral_quanta")
            .and_then(|q| q.as_array())
            .map(|q| q.iter().map(|x| x["quanta"].as_u64().unwrap()).sum())
            .unwrap_or(0)
    };
    let ion = |l: &serde_json::Value| -> u64 {
        l["quanta"]
            .as_array()
            .unwrap()
            .iter()
            .map(|x| x["quanta"].as_u64().unwrap())
            .sum()
    };
    let find = |v: u64, vp: u64| {
        lines
            .iter()
            .find(|l| level(l) == v && ion(l) == vp)
            .unwrap_or_else(|| panic!("no line {v} → {vp}′"))
    };
    let e00 = find(0, 0)["energy_ev"].as_f64().unwrap();
    let hot = find(1, 0)["energy_ev"].as_f64().unwrap();
    // the hot line 1″ → 0′ lies one neutral quantum below the 0–0 line (harmonic levels)
    assert!(hot < e00 - 0.3, "hot line {hot} vs 0–0 {e00}");
    // Exact condition (statistical mechanics + completeness of the ion's levels): every
    // initial level's lines sum to its Boltzmann population p_v ∝ exp(−v ω″/kT), so the
    // lines from v″ = 1 over those from v″ = 0 equal exp(−ω″/kT), with ω″ = E(0–0) − E(1″→0′)
    // and k_B = 8.617333262e-5 eV/K (CODATA 2018).
    let sum = |v: u64| -> f64 {
        lines
            .iter()
            .filter(|l| level(l) == v)
            .map(|l| l["intensity"].as_f64().unwrap())
            .sum()
    };
    let ratio = sum(1) / sum(0);
    let boltzmann = (-(e00 - hot) / (8.617333262e-5 * 3000.0)).exp();
    assert!(
        (ratio / boltzmann - 1.0).abs() < 1e-3,
        "v″=1/v″=0 {ratio:.5} vs Boltzmann {boltzmann:.5}"
    );
    assert!(b["thermal_population"].as_f64().unwrap() > 0.999);
    // the HTML page carries the figure with its labelled sticks and the hot-band lines
    let page = std::fs::read_to_string(&html).unwrap();
    assert!(page.contains("<svg") && page.contains("1σg 2ν1"));
    assert!(page.contains("← 1ν1″"));
    let _ = std::fs::remove_file(&html);

    // 0 K (the default): no hot lines, no thermal keys
    let out = run(&[
        "ionize",
        file,
        "--basis",
        "cc-pVDZ",
        "--vibronic",
        "--count",
        "1",
        "--json",
    ]);
    assert!(out.status.success());
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["temperature_k"], 0.0);
    assert!(v["bands"][0].get("thermal_population").is_none());
    assert!(v["bands"][0]["lines"]
        .as_array()
        .unwrap()
        .iter()
        .all(|l| l.get("neutral_quanta").is_none()));

    // refused before any work (exit 2): a memory budget it cannot fit, a negative
    // temperature, --temperature without --vibronic
    for args in [
        vec![
            "ionize",
            file,
            "--basis",
            "cc-pVDZ",
            "--vibronic",
            "--memory",
            "0.001",
        ],
        vec![
            "ionize",
            file,
            "--basis",
            "cc-pVDZ",
            "--vibronic",
            "--temperature=-5",
        ],
        vec!["ionize", file, "--basis", "cc-pVDZ", "--temperature", "5"],
    ] {
        let out = run(&args);
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        assert!(out.stdout.is_empty());
        assert!(!String::from_utf8_lossy(&out.stderr).contains("first gradient"));
    }
    let _ = std::fs::remove_file(&f);
}
