//! The `bandcast` command: the command line is parsed and run by the library
//! (`bandcast::cli`); this file keeps freed memory in the process (system/freed_memory.rs), sets
//! the thread count and maps errors to exit codes.

use clap::Parser;

use bandcast::cli::{self, Cli};

fn main() {
    bandcast::system::keep_freed_memory();
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
    let json = cli.command.wants_json();
    if let Err(e) = cli::run(cli) {
        fail(&e, json);
    }
}

/// Report a failure: the message on stderr, and with `--json` also one JSON object on stdout;
/// then exit with the error's code.
fn fail(err: &bandcast::Error, json: bool) -> ! {
    eprintln!("error: {err}");
    if json {
        println!("{}", err.to_json());
    }
    std::process::exit(err.exit_code());
}
