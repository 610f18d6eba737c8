//! `quiddity rules`.

use super::{not_built, CommandResult};
use clap::Args;
use std::io::Write;

/// Arguments of `quiddity rules`.
#[derive(Debug, Args)]
pub struct RulesArgs {
    /// Print one JSON document on stdout.
    #[arg(long)]
    json: bool,
}

/// Runs `quiddity rules`.
pub fn run(args: &RulesArgs, _out: &mut dyn Write) -> CommandResult {
    let _ = args.json;
    not_built("quiddity rules")
}
