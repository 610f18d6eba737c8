//! The options `batch` and `review` share for where a case's rules and files may come
//! from (`--rules`, `--allow-outside`), flattened into each command's arguments.

use clap::Args;
use std::path::PathBuf;

/// Where the catalogue comes from and how far a case may reach for its files.
#[derive(Clone, Debug, Args)]
pub struct SourceArgs {
    /// Use the rules catalogue in DIR instead of the built-in one.
    #[arg(long, value_name = "DIR")]
    pub rules: Option<PathBuf>,
    /// Let a case name files outside its own directory tree.
    #[arg(long)]
    pub allow_outside: bool,
}
