//! `bandcast batch`: shards run one after another give the same merged table as one run; a
//! run stopped part-way and started again completes without recomputing finished molecules;
//! failures are recorded instead of stopping the shard. (Exact conditions of the runner; the
//! energies themselves are Koopmans/STO-3G values checked elsewhere.)

use std::path::{Path, PathBuf};
use std::process::Command;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_bandcast"))
}

fn scratch(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("bandcast-batch-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn manifest(dir: &Path) -> PathBuf {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let gw = root.join("tests/data/gw100");
    let sdf = root.join("tests/data/sdf/three.sdf");
    let text = format!(
        "# four structures and an SD file of three\n{}\n{}\n{} # a comment after the path\n{}\n{}\n{} --charge 7\n",
        gw.join("water.xyz").display(),
        gw.join("nitrogen.xyz").display(),
        gw.join("methane.xyz").display(),
        gw.join("hydrogen-fluoride.xyz").display(),
        sdf.display(),
        gw.join("hydrogen.xyz").display(),
    );
    let p = dir.join("manifest.txt");
    std::fs::write(&p, text).unwrap();
    p
}

const COMMAND: [&str; 5] = ["ionize", "--basis", "sto-3g", "--method", "koopmans"];

fn run_batch(m: &Path, out: &Path, shard: Option<&str>) -> String {
    let mut c = bin();
    c.arg("batch").arg(m).arg("--out").arg(out);
    if let Some(s) = shard {
        c.args(["--shard", s]);
    }
    // a scheduler's variables must not leak in from the environment running the tests
    c.env_remove("SLURM_ARRAY_TASK_ID")
        .env_remove("SGE_TASK_ID");
    let o = c.arg("--").args(COMMAND).output().unwrap();
    assert!(
        o.status.success(),
        "batch failed: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    String::from_utf8_lossy(&o.stderr).into_owned()
}

fn merged(out: &Path, json: bool) -> String {
    let mut c = bin();
    c.args(["batch", "--merge"]).arg(out);
    if json {
        c.arg("--json");
    }
    let o = c.output().unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    String::from_utf8(o.stdout).unwrap()
}

#[test]
fn shards_one_after_another_equal_one_run() {
    let d = scratch("shards");
    let m = manifest(&d);
    run_batch(&m, &d.join("whole"), None);
    for i in 1..=3 {
        run_batch(&m, &d.join("sharded"), Some(&format!("{i}/3")));
    }
    let whole = merged(&d.join("whole"), false);
    assert_eq!(whole, merged(&d.join("sharded"), false));
    // 4 + 3 molecules succeed, H2 with charge +7 fails and is a row of its own
    let lines: Vec<&str> = whole.lines().collect();
    assert_eq!(lines[0], "molecule,label,energy_ev,method,warnings");
    assert!(lines.iter().any(|l| l.starts_with("water,1b1,")), "{whole}");
    assert!(lines.iter().any(|l| l.starts_with("ethanol,")), "{whole}");
    let failed: Vec<&&str> = lines.iter().filter(|l| l.contains("failed:")).collect();
    assert_eq!(failed.len(), 1, "{whole}");
    assert!(failed[0].starts_with("hydrogen,,"), "{whole}");
    let rows: serde_json::Value = serde_json::from_str(&merged(&d.join("whole"), true)).unwrap();
    assert_eq!(rows.as_array().unwrap().len(), lines.len() - 1);
    std::fs::remove_dir_all(&d).ok();
}

#[test]
fn a_restarted_run_skips_finished_molecules() {
    let d = scratch("restart");
    let m = manifest(&d);
    let out = d.join("out");
    run_batch(&m, &out, None);
    let records: Vec<PathBuf> = std::fs::read_dir(&out)
        .unwrap()
        .map(|e| e.unwrap().path())
        .collect();
    assert_eq!(records.len(), 8, "one record per molecule");
    // as if the job had been killed before these two were written (a leftover temporary
    // file of the interrupted write is ignored)
    let mut sorted = records.clone();
    sorted.sort();
    let (gone1, gone2) = (sorted[2].clone(), sorted[5].clone());
    let kept_times: Vec<_> = sorted
        .iter()
        .filter(|p| **p != gone1 && **p != gone2)
        .map(|p| (p.clone(), std::fs::metadata(p).unwrap().modified().unwrap()))
        .collect();
    let before = merged(&out, false);
    std::fs::remove_file(&gone1).unwrap();
    std::fs::remove_file(&gone2).unwrap();
    std::fs::write(out.join(".00003-x.json.123.tmp"), "{ half a rec").unwrap();
    let log = run_batch(&m, &out, None);
    assert!(log.contains("2 run, 6 already done"), "{log}");
    for (p, t) in kept_times {
        assert_eq!(
            std::fs::metadata(&p).unwrap().modified().unwrap(),
            t,
            "{} was recomputed",
            p.display()
        );
    }
    assert_eq!(merged(&out, false), before);
    std::fs::remove_dir_all(&d).ok();
}

#[test]
fn bad_options_are_refused_before_any_work() {
    let d = scratch("refuse");
    let m = manifest(&d);
    let out = d.join("out");
    let o = bin()
        .arg("batch")
        .arg(&m)
        .arg("--out")
        .arg(&out)
        .args(["--", "ionize", "--basis", "sto-3g", "--no-such-option"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(err.contains("manifest.txt:2:"), "{err}");
    assert!(
        !out.exists() || std::fs::read_dir(&out).unwrap().next().is_none(),
        "nothing written"
    );
    std::fs::remove_dir_all(&d).ok();
}
