//! `bandcast bench eom`: the EOM-IP workload (library: `bandcast::bench::eom`).

use bandcast::{Error, Result};

#[derive(clap::Args, Debug)]
pub struct BenchArgs {
    /// Small stand-ins only (water/def2-TZVPP and benzene/def2-SVP).
    #[arg(long)]
    pub small: bool,
    /// Old spelling of --small, kept for one release.
    #[arg(long, hide = true)]
    pub quick: bool,
    /// Run only the cases of these molecules (e.g. --only benzene).
    #[arg(long, value_name = "NAME")]
    pub only: Vec<String>,
    /// Memory budget in GiB for the correlated stages.
    #[arg(long, value_name = "GIB", default_value_t = 14.0)]
    pub memory: f64,
    /// Directory holding benzene.xyz and guanine.xyz (GW100 structures, Å).
    #[arg(long, value_name = "DIR", default_value = "tests/data/gw100")]
    pub dir: std::path::PathBuf,
}

pub fn bench(a: BenchArgs) -> Result<()> {
    if a.quick {
        eprintln!("{}", super::bench::QUICK_NOTE);
    }
    if !(a.memory > 0.0) {
        return Err(Error::input("--memory must be a positive number of GiB"));
    }
    println!(
        "EOM-IP benchmark ({} threads): EOM-IP-CCSD benzene/def2-TZVPP (5 states), \
         EOM-IP-MBPT2 guanine/def2-TZVPP (5 states); per stage: wall time, CPU time of \
         all threads, peak resident memory (VmHWM) within the stage",
        rayon::current_num_threads()
    );
    bandcast::bench::eom::run_eom_bench(
        &a.dir,
        a.small || a.quick,
        &a.only,
        a.memory * 1024.0 * 1024.0 * 1024.0,
        &mut |l| eprintln!("{l}"),
        &mut |r| print!("{}", bandcast::bench::eom::format_result(r)),
    )?;
    Ok(())
}
