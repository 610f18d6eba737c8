//! `quiddity bands`.

use super::{not_built, CommandResult};
use clap::Args;
use std::io::Write;

/// Arguments of `quiddity bands`.
#[derive(Debug, Args)]
pub struct BandsArgs {
    /// Print one JSON document on stdout.
    #[arg(long)]
    json: bool,
}

/// Runs `quiddity bands`.
pub fn run(args: &BandsArgs, _out: &mut dyn Write) -> CommandResult {
    let _ = args.json;
    not_built("quiddity bands")
}
