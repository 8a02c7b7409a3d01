//! `bandcast batch`: run one command over every molecule of a manifest, one process per
//! molecule, a JSON record per molecule; `--merge` turns a folder of records into one table.

use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::Instant;

use bandcast::batch::merge::to_csv;
use bandcast::batch::{merge_records, read_manifest, Record, Shard, Status};
use bandcast::report::write_atomic;
use bandcast::{Error, Result};

/// Screen many molecules with one command, e.g. on a cluster's job array.
///
/// MANIFEST lists one structure file per line (XYZ, MOL or SD; paths relative to the
/// manifest), optionally followed by options for that molecule alone (`ion.xyz --charge 1`);
/// `#` starts a comment; a line may name record K of an SD file as `FILE.sdf#K`, and an SD
/// file stands for all its records. The manifest may itself be an SD file.
///
/// Everything after `--` is the command (`ionize`, `core` or `spectrum`) and its options,
/// applied to every molecule. Each molecule's result goes into DIR as one JSON file
/// (written whole or not at all): the command's own JSON output, or its error. Molecules
/// whose record exists are skipped, so a killed or timed-out job is simply started again;
/// failed molecules are recorded and not retried unless `--retry-failed`.
///
/// Shards: `--shard I/N` runs molecules I, I+N, I+2N, … (I from 1); without it, a Slurm job
/// array (SLURM_ARRAY_TASK_ID/MIN/COUNT) or a Grid Engine task array (SGE_TASK_ID/FIRST/LAST)
/// picks the share, and outside a job array one process runs everything. docs/batch.md has
/// a job-array script.
///
/// Examples:
///   bandcast batch solvents.txt --out c1s -- core --basis cc-pVDZ --element C --quick
///   bandcast batch --merge c1s > c1s.csv
#[derive(clap::Args, Debug)]
#[command(verbatim_doc_comment)]
pub struct Args {
    /// The manifest (text, one structure per line; or an SD file).
    #[arg(value_name = "MANIFEST", required_unless_present = "merge")]
    pub manifest: Option<PathBuf>,
    /// Folder for the per-molecule records (created if missing).
    #[arg(long, value_name = "DIR", required_unless_present = "merge")]
    pub out: Option<PathBuf>,
    /// Run share I of N (I from 1 to N) instead of the job array's or all.
    #[arg(long, value_name = "I/N")]
    pub shard: Option<String>,
    /// Run molecules again whose record says they failed.
    #[arg(long)]
    pub retry_failed: bool,
    /// Merge the records in DIR into one table (CSV on stdout; JSON with --json):
    /// molecule, label, energy_ev, method, warnings.
    #[arg(long, value_name = "DIR", conflicts_with_all = ["manifest", "out", "shard", "retry_failed"])]
    pub merge: Option<PathBuf>,
    /// With --merge: the table as a JSON list of rows instead of CSV.
    #[arg(long, requires = "merge")]
    pub json: bool,
    /// The command and its options: ionize|core|spectrum [OPTIONS…] (after `--`).
    #[arg(last = true, value_name = "COMMAND")]
    pub command: Vec<String>,
}

const COMMANDS: [&str; 3] = ["ionize", "core", "spectrum"];
/// Options the batch sets itself, or that would write one file for every molecule.
const REFUSED: [&str; 5] = ["--json", "--svg", "--csv", "--html", "--out"];

pub fn run(a: Args) -> Result<()> {
    if let Some(dir) = &a.merge {
        return merge(dir, a.json);
    }
    let manifest = a.manifest.as_deref().expect("clap requires MANIFEST");
    let out = a.out.as_deref().expect("clap requires --out");
    let Some((cmd, options)) = a.command.split_first() else {
        return Err(Error::input(format!(
            "give the command after `--`: bandcast batch {} --out {} -- ionize|core|spectrum [OPTIONS]",
            manifest.display(),
            out.display()
        )));
    };
    if !COMMANDS.contains(&cmd.as_str()) {
        return Err(Error::input(format!(
            "batch runs ionize, core or spectrum, not '{cmd}'"
        )));
    }
    if let Some(bad) = options.iter().find(|o| {
        REFUSED
            .iter()
            .any(|r| o.as_str() == *r || o.starts_with(&format!("{r}=")))
    }) {
        return Err(Error::input(format!(
            "'{bad}' cannot be a batch option (the batch writes one JSON record per molecule)"
        )));
    }
    let entries = read_manifest(manifest)?;
    // Check the command line once, before any work, with the command's own parser.
    for e in &entries {
        let mut argv = vec!["bandcast".to_string(), cmd.clone(), e.spec.clone()];
        argv.extend(options.iter().cloned());
        argv.extend(e.options.iter().cloned());
        if let Err(err) = <super::Cli as clap::Parser>::try_parse_from(&argv) {
            let msg = err.to_string();
            let first = msg
                .lines()
                .next()
                .unwrap_or("")
                .trim_start_matches("error: ")
                .to_string();
            return Err(Error::input_at(
                manifest,
                Some(e.line),
                format!("the options for this molecule do not parse: {first}"),
            ));
        }
    }
    let (shard, source) = match &a.shard {
        Some(s) => (Shard::parse(s)?, "--shard"),
        None => {
            Shard::from_env(|k| std::env::var(k).ok())?.unwrap_or((Shard::ALL, "all molecules"))
        }
    };
    std::fs::create_dir_all(out)
        .map_err(|e| Error::input_at(out, None, format!("cannot create the output folder: {e}")))?;
    let exe = std::env::current_exe()
        .map_err(|e| Error::computation(format!("cannot find the bandcast executable: {e}")))?;
    let mine: Vec<_> = entries
        .iter()
        .enumerate()
        .filter(|(j, _)| shard.owns(*j))
        .map(|(_, e)| e)
        .collect();
    eprintln!(
        "batch: shard {}/{} ({source}): {} of {} molecules, `{cmd}` into {}",
        shard.index,
        shard.count,
        mine.len(),
        entries.len(),
        out.display()
    );
    let (mut done, mut ran, mut failed) = (0, 0, 0);
    for (k, e) in mine.iter().enumerate() {
        let path = out.join(format!("{}.json", e.key));
        if let Some(old) = read_record(&path) {
            if old.status == Status::Ok || !a.retry_failed {
                done += 1;
                eprintln!(
                    "[{}/{}] {} — already done ({})",
                    k + 1,
                    mine.len(),
                    e.name,
                    if old.status == Status::Ok {
                        "ok"
                    } else {
                        "failed before"
                    }
                );
                continue;
            }
        }
        let mut args = vec![e.spec.clone()];
        args.extend(options.iter().cloned());
        args.extend(e.options.iter().cloned());
        let t0 = Instant::now();
        let output = Command::new(&exe)
            .arg(cmd)
            .args(&args)
            .arg("--json")
            .output();
        let wall = t0.elapsed().as_secs_f64();
        let record = match output {
            Ok(o) if o.status.success() => {
                match serde_json::from_slice::<serde_json::Value>(&o.stdout) {
                    Ok(v) => Record {
                        molecule: e.name.clone(),
                        structure: e.spec.clone(),
                        manifest_line: e.line,
                        command: cmd.clone(),
                        arguments: args.clone(),
                        status: Status::Ok,
                        exit_code: Some(0),
                        result: Some(v),
                        error: None,
                        wall_seconds: wall,
                    },
                    Err(err) => failure(
                        e,
                        cmd,
                        &args,
                        Some(0),
                        format!("the command's output is not JSON: {err}"),
                        wall,
                    ),
                }
            }
            Ok(o) => {
                let stderr = String::from_utf8_lossy(&o.stderr);
                let msg = stderr
                    .lines()
                    .filter(|l| l.starts_with("error"))
                    .last()
                    .or(stderr.lines().last())
                    .unwrap_or("no message")
                    .to_string();
                failure(e, cmd, &args, o.status.code(), msg, wall)
            }
            Err(err) => failure(e, cmd, &args, None, format!("could not start: {err}"), wall),
        };
        let ok = record.status == Status::Ok;
        let text = serde_json::to_string_pretty(&record).expect("a record serialises");
        write_atomic(&path, text.as_bytes())?;
        ran += 1;
        if !ok {
            failed += 1;
        }
        eprintln!(
            "[{}/{}] {} — {} ({wall:.1} s){}",
            k + 1,
            mine.len(),
            e.name,
            if ok { "ok" } else { "FAILED" },
            record
                .error
                .as_deref()
                .map(|m| format!(": {m}"))
                .unwrap_or_default()
        );
    }
    eprintln!("batch: {ran} run, {done} already done, {failed} failed (recorded in their files); merge with `bandcast batch --merge {}`", out.display());
    Ok(())
}

fn failure(
    e: &bandcast::batch::Entry,
    cmd: &str,
    args: &[String],
    code: Option<i32>,
    msg: String,
    wall: f64,
) -> Record {
    Record {
        molecule: e.name.clone(),
        structure: e.spec.clone(),
        manifest_line: e.line,
        command: cmd.to_string(),
        arguments: args.to_vec(),
        status: Status::Failed,
        exit_code: code,
        result: None,
        error: Some(msg.trim_start_matches("error: ").to_string()),
        wall_seconds: wall,
    }
}

/// A finished record, or None when there is none (or it cannot be read: then it is run again).
fn read_record(path: &Path) -> Option<Record> {
    let text = std::fs::read_to_string(path).ok()?;
    serde_json::from_str(&text).ok()
}

fn merge(dir: &Path, json: bool) -> Result<()> {
    let listing = std::fs::read_dir(dir)
        .map_err(|e| Error::input_at(dir, None, format!("cannot read the folder: {e}")))?;
    let mut records = Vec::new();
    for entry in listing.flatten() {
        let p = entry.path();
        let name = p
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default();
        if name.starts_with('.') || !name.ends_with(".json") {
            continue;
        }
        let text = std::fs::read_to_string(&p)
            .map_err(|e| Error::input_at(&p, None, format!("cannot read: {e}")))?;
        let r: Record = serde_json::from_str(&text)
            .map_err(|e| Error::input_at(&p, Some(e.line()), format!("not a batch record: {e}")))?;
        records.push(r);
    }
    if records.is_empty() {
        return Err(Error::input_at(
            dir,
            None,
            "no batch records in this folder",
        ));
    }
    let rows = merge_records(records);
    if json {
        println!(
            "{}",
            serde_json::to_string_pretty(&rows).expect("rows serialise")
        );
    } else {
        print!("{}", to_csv(&rows));
    }
    Ok(())
}
