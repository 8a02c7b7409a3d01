//! `bandcast spectrum` (being built).

use bandcast::{Error, Result};

#[derive(clap::Args, Debug)]
pub struct Args {}

pub fn run(_args: Args) -> Result<()> {
    Err(Error::computation("'bandcast spectrum' is not built yet"))
}
