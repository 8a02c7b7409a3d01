//! The `bandcast` command: the command line is parsed and run by the library
//! (`bandcast::cli`); this file sets the thread count and maps errors to exit codes.

use clap::Parser;

use bandcast::cli::{self, Cli};

fn main() {
    let cli = Cli::parse();
    if let Some(n) = cli.threads {
        if n == 0 {
            eprintln!("error: --threads must be at least 1");
            std::process::exit(2);
        }
        let _ = rayon::ThreadPoolBuilder::new()
            .num_threads(n)
            .build_global();
    }
    if let Err(e) = cli::run(cli) {
        eprintln!("error: {e}");
        std::process::exit(e.exit_code());
    }
}
