//! `quiddity solve`.

use super::{not_built, CommandResult};
use clap::Args;
use std::io::Write;

/// Arguments of `quiddity solve`.
#[derive(Debug, Args)]
pub struct SolveArgs {
    /// Print one JSON document on stdout.
    #[arg(long)]
    json: bool,
}

/// Runs `quiddity solve`.
pub fn run(args: &SolveArgs, _out: &mut dyn Write) -> CommandResult {
    let _ = args.json;
    not_built("quiddity solve")
}
