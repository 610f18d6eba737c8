//! The command line: clap types, one file per subcommand, exit codes. The only module that
//! reads files and writes to the terminal; everything it does is a call into the library.
//!
//! Exit status is a contract (also in `--help` and the README):
//! 0 = success (for `solve`: at least one consistent candidate), 1 = a scientific "no"
//! (no consistent candidate, with its conflict shown), 2 = bad input or usage.

mod bands;
pub mod batch;
pub mod casefile;
mod formula;
mod from_mass;
mod isomers;
pub mod library;
pub mod limits;
mod new_case;
pub mod review;
mod rules;
mod solve;
mod source_args;

use crate::diag::Diagnostic;
use clap::{Parser, Subcommand};
use std::ffi::OsString;
use std::io::Write;
use std::process::ExitCode;

pub(crate) const EXIT_STATUS_HELP: &str = "\
Exit status:
  0  success; for solve, at least one consistent candidate
  1  no consistent candidate (the conflicting evidence is shown)
  2  bad input or usage (the place of the problem is shown on stderr)

Every result is a screening lead, not an identification: confirm against a reference
standard under the laboratory's validated method, treat unknowns as hazardous, and
follow local regulations and licensed practice.";

/// quiddity: which functional groups can an unknown compound hold, and why.
#[derive(Debug, Parser)]
#[command(name = "quiddity", version, about, after_help = EXIT_STATUS_HELP)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Debug, Subcommand)]
enum Command {
    /// Masses, unsaturation and isotope pattern of a molecular formula.
    Formula(formula::FormulaArgs),
    /// Inspect, list and check the rules catalogue.
    Rules(rules::RulesArgs),
    /// Deduce the consistent functional-group combinations of a case file.
    Solve(solve::SolveArgs),
    /// Pick the bands of an IR spectrum file.
    Bands(bands::BandsArgs),
    /// Candidate formulas for a measured m/z.
    FromMass(from_mass::FromMassArgs),
    /// Constitutional isomers of a formula, optionally with an exact group multiset.
    Isomers(isomers::IsomersArgs),
    /// Recompute a case and compare with its record and the analyst's conclusion.
    Review(review::ReviewArgs),
    /// Solve every case file of a directory in parallel and write one report per case.
    Batch(batch::BatchArgs),
    /// Write a commented template case file.
    NewCase(new_case::NewCaseArgs),
    /// Index a folder of reference spectra, or search it with a spectrum.
    Library(library::LibraryArgs),
}

/// What a subcommand reports back to `run`: the exit status it earned.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Status {
    /// Exit 0.
    Success,
    /// Exit 1: a scientific "no" (no consistent candidate, review found differences).
    Negative,
}

/// A failure that ends the command with exit status 2.
#[derive(Debug)]
pub struct Failure {
    /// What went wrong and where.
    pub diagnostics: Vec<Diagnostic>,
}

impl From<Diagnostic> for Failure {
    fn from(d: Diagnostic) -> Failure {
        Failure {
            diagnostics: vec![d],
        }
    }
}

impl From<Vec<Diagnostic>> for Failure {
    fn from(diagnostics: Vec<Diagnostic>) -> Failure {
        Failure { diagnostics }
    }
}

/// Result type of every subcommand.
pub type CommandResult = Result<Status, Failure>;

/// Runs the command line given by `args` and returns the process exit code.
pub fn run<I, T>(args: I) -> ExitCode
where
    I: IntoIterator<Item = T>,
    T: Into<OsString> + Clone,
{
    let cli = match Cli::try_parse_from(args) {
        Ok(cli) => cli,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    let stdout = std::io::stdout();
    let mut out = stdout.lock();
    let result = match &cli.command {
        Command::Formula(a) => formula::run(a, &mut out),
        Command::Rules(a) => rules::run(a, &mut out),
        Command::Solve(a) => solve::run(a, &mut out),
        Command::Bands(a) => bands::run(a, &mut out),
        Command::FromMass(a) => from_mass::run(a, &mut out),
        Command::Isomers(a) => isomers::run(a, &mut out),
        Command::Review(a) => review::run(a, &mut out),
        Command::Batch(a) => batch::run(a, &mut out),
        Command::NewCase(a) => new_case::run(a, &mut out),
        Command::Library(a) => library::run(a, &mut out),
    };
    let _ = out.flush();
    match result {
        Ok(Status::Success) => ExitCode::from(0),
        Ok(Status::Negative) => ExitCode::from(1),
        Err(failure) if failure.diagnostics.is_empty() => ExitCode::from(0),
        Err(failure) => {
            let mut err = std::io::stderr().lock();
            for d in &failure.diagnostics {
                let _ = writeln!(err, "{}", d.render());
            }
            ExitCode::from(2)
        }
    }
}

/// Writes `value` as one pretty JSON document followed by a newline.
pub(crate) fn print_json<T: serde::Serialize>(out: &mut dyn Write, value: &T) -> CommandResult {
    let text = serde_json::to_string_pretty(value)
        .map_err(|e| Diagnostic::error("<output>", format!("cannot encode JSON: {e}")))?;
    writeln!(out, "{text}").map_err(io_failure)?;
    Ok(Status::Success)
}

/// Turns a failed write to stdout into a failure. A reader that closed the pipe early
/// (`quiddity ... | head`) is not an error of ours: that failure carries no diagnostics
/// and ends the command quietly with status 0.
pub(crate) fn io_failure(e: std::io::Error) -> Failure {
    if e.kind() == std::io::ErrorKind::BrokenPipe {
        return Failure {
            diagnostics: Vec::new(),
        };
    }
    Diagnostic::error("<stdout>", format!("cannot write output: {e}")).into()
}
