//! `quiddity from-mass`.

use super::{not_built, CommandResult};
use clap::Args;
use std::io::Write;

/// Arguments of `quiddity from-mass`.
#[derive(Debug, Args)]
pub struct FromMassArgs {
    /// Print one JSON document on stdout.
    #[arg(long)]
    json: bool,
}

/// Runs `quiddity from-mass`.
pub fn run(args: &FromMassArgs, _out: &mut dyn Write) -> CommandResult {
    let _ = args.json;
    not_built("quiddity from-mass")
}
