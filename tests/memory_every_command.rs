//! `--memory GIB` means the same in every computing command (the option vocabulary in
//! DEVELOPERS.md): a budget far below what the job needs is refused with exit 2 before any
//! work, with a message naming the memory, and nothing on stdout or on disk.

use std::process::Command;

fn water() -> String {
    format!("{}/tests/data/gw100/water.xyz", env!("CARGO_MANIFEST_DIR"))
}

fn refused(args: &[&str]) {
    let out = Command::new(env!("CARGO_BIN_EXE_bandcast"))
        .args(args)
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
    assert!(err.to_lowercase().contains("memory"), "{args:?}: {err}");
    assert!(out.stdout.is_empty(), "{args:?}: stdout not empty");
}

#[test]
fn a_budget_far_too_small_is_refused_by_every_computing_command() {
    let w = water();
    let tiny = "1e-7";
    refused(&["scf", &w, "--basis", "cc-pVDZ", "--memory", tiny]);
    refused(&["ionize", &w, "--basis", "cc-pVDZ", "--memory", tiny]);
    refused(&["core", &w, "--basis", "cc-pVDZ", "--memory", tiny]);
    refused(&["spectrum", &w, "--basis", "cc-pVDZ", "--memory", tiny]);
    refused(&["vibrations", &w, "--basis", "cc-pVDZ", "--memory", tiny]);
    let out = std::env::temp_dir().join(format!("bandcast-mem-opt-{}.xyz", std::process::id()));
    refused(&[
        "optimize",
        &w,
        "--basis",
        "cc-pVDZ",
        "--memory",
        tiny,
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(!out.exists(), "optimize wrote {out:?} after refusing");
}
