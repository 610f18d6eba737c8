//! `quiddity new-case [PATH]`: write a commented template case file (never over an existing
//! file). The template is itself a valid invented case, so it can be solved at once.

use super::casefile::write_atomic;
use super::{CommandResult, Status};
use crate::diag::Diagnostic;
use clap::Args;
use std::io::Write;
use std::path::PathBuf;

/// Arguments of `quiddity new-case`.
#[derive(Debug, Args)]
pub struct NewCaseArgs {
    /// Where to write the template.
    #[arg(default_value = "new-case.yaml")]
    path: PathBuf,
}

/// The template: every field a case may use, each with a comment; invented values.
pub const TEMPLATE: &str = include_str!("new_case_template.yaml");

/// Runs `quiddity new-case`.
pub fn run(args: &NewCaseArgs, out: &mut dyn Write) -> CommandResult {
    let origin = args.path.display().to_string();
    write_atomic(&args.path, TEMPLATE.as_bytes(), false).map_err(|e| {
        if e.kind() == std::io::ErrorKind::AlreadyExists {
            Diagnostic::error(&origin, "the file exists; refusing to overwrite it")
                .with_help("choose another path or move the file away")
        } else {
            Diagnostic::error(&origin, format!("cannot write the template: {e}"))
        }
    })?;
    writeln!(out, "template written: {origin}").map_err(super::io_failure)?;
    Ok(Status::Success)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_template_is_a_valid_case_using_every_block() {
        let (case, diagnostics) = crate::case::parse(TEMPLATE, "template.yaml");
        assert!(diagnostics.is_empty(), "{diagnostics:?}");
        let case = case.expect("valid");
        assert!(case.sample.analyst.is_some());
        assert!(case.conclusion.is_some() && case.review.is_some() && case.notes.is_some());
        assert!(TEMPLATE.contains("invented"));
    }
}
