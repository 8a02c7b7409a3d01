//! `bandcast ionize` (being built).

use bandcast::{Error, Result};

#[derive(clap::Args, Debug)]
pub struct Args {}

pub fn run(_args: Args) -> Result<()> {
    Err(Error::computation("'bandcast ionize' is not built yet"))
}
