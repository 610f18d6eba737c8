//! `quiddity review CASE.yaml`: recompute the case and compare with its record (written by
//! `solve --record`) and with the analyst's conclusion in the case. Exit 0 when everything
//! agrees, 1 with the list of differences, 2 on bad input or when there is nothing to
//! compare against.

use super::casefile::{self, load_case, LoadOptions};
use super::solve::load_catalogue;
use super::{io_failure, print_json, CommandResult, Failure, Status};
use crate::budget::Budget;
use crate::diag::Diagnostic;
use crate::engine::SolveOptions;
use crate::report::record::{compare, Difference, Record, ReviewFindings};
use crate::report::wording;
use clap::Args;
use serde::Serialize;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Arguments of `quiddity review`.
#[derive(Debug, Args)]
pub struct ReviewArgs {
    /// The case file (YAML).
    case: PathBuf,
    /// The record to compare with (default: NAME.record.json beside the case).
    #[arg(long, value_name = "FILE")]
    record: Option<PathBuf>,
    /// Print one JSON document on stdout.
    #[arg(long)]
    json: bool,
    #[command(flatten)]
    source: super::source_args::SourceArgs,
}

#[derive(Serialize)]
struct ReviewView<'a> {
    case: String,
    record: Option<String>,
    agrees: bool,
    differences: &'a [Difference],
    notes: &'a [String],
}

/// What a review compared and found.
#[derive(Clone, Debug)]
pub struct ReviewReport {
    /// The record file compared with, when there was one.
    pub record: Option<PathBuf>,
    /// The findings.
    pub findings: ReviewFindings,
}

/// Recomputes the case at `case` and compares it with its record (`record`, or the one
/// beside the case when it exists) and the analyst's conclusion.
pub fn review_case(
    case: &Path,
    record: Option<&Path>,
    rules: Option<&Path>,
    load: &LoadOptions,
) -> Result<ReviewReport, Failure> {
    let loaded = load_case(case, load)?;
    let record_path = record.map_or_else(|| casefile::record_path(case), Path::to_path_buf);
    let recorded = if record_path.exists() || record.is_some() {
        let origin = record_path.display().to_string();
        let text = std::fs::read_to_string(&record_path)
            .map_err(|e| Diagnostic::error(&origin, format!("cannot read the record: {e}")))?;
        Some(Record::from_json(&text, &origin).map_err(|d| Failure::from(*d))?)
    } else {
        None
    };
    let accepted = loaded
        .case
        .conclusion
        .as_ref()
        .map(|c| &c.accepted)
        .filter(|a| !a.is_empty());
    if recorded.is_none() && accepted.is_none() {
        return Err(Diagnostic::error(
            case.display().to_string(),
            format!(
                "nothing to review against: no record at {} and no accepted candidate in the case",
                record_path.display()
            ),
        )
        .with_help("run `quiddity solve CASE --record` first, or write `conclusion: accepted:` in the case")
        .into());
    }
    let catalogue = load_catalogue(rules)?;
    casefile::check_against_catalogue(&loaded, &catalogue)?;
    let defaults = SolveOptions::default();
    let options = SolveOptions {
        tolerance_cm1: recorded
            .as_ref()
            .map_or(defaults.tolerance_cm1, |r| r.tolerance_cm1),
        max_candidates: recorded
            .as_ref()
            .map_or(defaults.max_candidates, |r| r.max_candidates),
        ..defaults
    };
    let outcome = casefile::solve_within(&loaded, &catalogue, &options, Budget::default())?;
    let now = Record::new(&outcome, loaded.inputs.clone(), &options);
    let findings = compare(recorded.as_ref(), &now, &outcome, accepted);
    Ok(ReviewReport {
        record: recorded.map(|_| record_path),
        findings,
    })
}

/// Runs `quiddity review`.
pub fn run(args: &ReviewArgs, out: &mut dyn Write) -> CommandResult {
    let report = review_case(
        &args.case,
        args.record.as_deref(),
        args.source.rules.as_deref(),
        &LoadOptions {
            allow_outside: args.source.allow_outside,
        },
    )?;
    let findings = &report.findings;
    if args.json {
        print_json(
            out,
            &ReviewView {
                case: args.case.display().to_string(),
                record: report.record.as_ref().map(|p| p.display().to_string()),
                agrees: findings.agrees(),
                differences: &findings.differences,
                notes: &findings.notes,
            },
        )?;
    } else {
        out.write_all(
            render_text(
                &args.case.display().to_string(),
                report.record.as_deref(),
                findings,
            )
            .as_bytes(),
        )
        .map_err(io_failure)?;
    }
    Ok(if findings.agrees() {
        Status::Success
    } else {
        Status::Negative
    })
}

/// The review in words: a headline, one line per difference, then the notes.
pub fn render_text(case: &str, record: Option<&Path>, findings: &ReviewFindings) -> String {
    let mut s = String::new();
    let record = record.map(|p| p.display().to_string());
    s.push_str(&wording::review_headline(
        case,
        record.as_deref(),
        findings.differences.len(),
    ));
    s.push('\n');
    for d in &findings.differences {
        s.push_str(&format!("  - {d}\n"));
    }
    for n in &findings.notes {
        s.push_str(&format!("  note: {n}\n"));
    }
    s
}
