//! `quiddity formula`.

use super::{not_built, CommandResult};
use clap::Args;
use std::io::Write;

/// Arguments of `quiddity formula`.
#[derive(Debug, Args)]
pub struct FormulaArgs {
    /// Print one JSON document on stdout.
    #[arg(long)]
    json: bool,
}

/// Runs `quiddity formula`.
pub fn run(args: &FormulaArgs, _out: &mut dyn Write) -> CommandResult {
    let _ = args.json;
    not_built("quiddity formula")
}
