//! Failures under `--json`: one JSON object on stdout (error, kind, file, line, exit_code) as
//! well as the message on stderr. Exit codes follow the project's rule (common practice for
//! command-line tools: 2 = bad input, 1 = the computation failed).

use std::process::Command;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_bandcast"))
}

fn scratch(name: &str) -> std::path::PathBuf {
    let d = std::env::temp_dir().join(format!("bandcast-clierr-{name}-{}", std::process::id()));
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn only_json_object(stdout: &[u8]) -> serde_json::Value {
    let text = String::from_utf8_lossy(stdout);
    let v: serde_json::Value = serde_json::from_str(text.trim())
        .unwrap_or_else(|e| panic!("stdout is not one JSON object ({e}): {text}"));
    assert!(v.is_object(), "{text}");
    v
}

#[test]
fn bad_xyz_line_gives_json_with_file_and_line_and_exit_2() {
    let d = scratch("xyz");
    let f = d.join("broken.xyz");
    // Line 4 has a coordinate that is not a number.
    std::fs::write(
        &f,
        "3\nwater\nO 0 0 0.117\nH 0 0.757 zz\nH 0 -0.757 -0.469\n",
    )
    .unwrap();
    let out = bin()
        .args(["scf", f.to_str().unwrap(), "--basis", "sto-3g", "--json"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let v = only_json_object(&out.stdout);
    assert_eq!(v["kind"], "input");
    assert_eq!(v["exit_code"], 2);
    assert_eq!(v["line"], 4);
    assert!(v["file"].as_str().unwrap().ends_with("broken.xyz"), "{v}");
    assert!(v["error"].as_str().unwrap().contains("broken.xyz:4"), "{v}");
    // The message is on stderr too.
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("broken.xyz:4"), "{err}");
    let _ = std::fs::remove_dir_all(&d);
}

#[test]
fn scf_that_cannot_converge_gives_json_kind_computation_and_exit_1() {
    let out = bin()
        .args([
            "scf",
            "tests/data/gw100/water.xyz",
            "--basis",
            "sto-3g",
            "--max-iter",
            "1",
            "--json",
        ])
        .output()
        .unwrap();
    assert_eq!(
        out.status.code(),
        Some(1),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v = only_json_object(&out.stdout);
    assert_eq!(v["kind"], "computation");
    assert_eq!(v["exit_code"], 1);
    assert!(v["file"].is_null() && v["line"].is_null(), "{v}");
    assert!(!v["error"].as_str().unwrap().is_empty());
}

#[test]
fn without_json_a_failure_leaves_stdout_empty() {
    let out = bin()
        .args(["scf", "tests/data/no-such-file.xyz", "--basis", "sto-3g"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(out.stdout.is_empty());
}
