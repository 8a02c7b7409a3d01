//! `bandcast bench eom`: the EOM-IP workload (library: `bandcast::correlation::bench`).

use bandcast::Result;

#[derive(clap::Args, Debug)]
pub struct BenchArgs {
    /// Small stand-ins only (water/def2-TZVPP, EOM-IP-CCSD and EOM-IP-MBPT2).
    #[arg(long)]
    pub quick: bool,
    /// Directory holding benzene.xyz and guanine.xyz (GW100 structures, Å).
    #[arg(long, value_name = "DIR", default_value = "tests/data/gw100")]
    pub dir: std::path::PathBuf,
}

pub fn bench(a: BenchArgs) -> Result<()> {
    println!(
        "EOM-IP benchmark ({} threads): EOM-IP-CCSD benzene/def2-TZVPP (5 states), \
         EOM-IP-MBPT2 guanine/def2-TZVPP (5 states)",
        rayon::current_num_threads()
    );
    bandcast::correlation::bench::run_eom_bench(&a.dir, a.quick, &mut |r| {
        println!("{}", bandcast::correlation::bench::format_result(r));
    })?;
    Ok(())
}
