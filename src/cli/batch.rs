//! `quiddity batch DIR --out DIR`: every case file (`*.yaml`, `*.yml`) directly in DIR,
//! solved in parallel, one report per case and format written atomically into the output
//! directory, then a summary table. One bad case is reported in its row and does not stop
//! the rest; an existing report is never overwritten without `--force`.
//!
//! Exit status: 0 when every case got its reports (whether or not it has a consistent
//! candidate: that is in the table), 2 when any case failed or the arguments are bad.

use super::casefile::{self, load_case, write_atomic, LoadOptions};
use super::limits::LimitArgs;
use super::solve::load_catalogue;
use super::{io_failure, print_json, CommandResult, Failure, Status};
use crate::budget::Budget;
use crate::diag::Diagnostic;
use crate::engine::SolveOptions;
use crate::report::wording::candidate_text;
use crate::report::Format;
use crate::rules::Catalogue;
use clap::Args;
use rayon::prelude::*;
use serde::Serialize;
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};

/// Arguments of `quiddity batch`.
#[derive(Debug, Args)]
pub struct BatchArgs {
    /// Directory holding the case files (not searched recursively).
    dir: PathBuf,
    /// Directory the reports go to (created when missing).
    #[arg(long, value_name = "DIR")]
    out: PathBuf,
    /// Overwrite existing reports.
    #[arg(long)]
    force: bool,
    /// Worker threads (default: one per CPU).
    #[arg(long, value_name = "N")]
    threads: Option<usize>,
    /// Report format(s): txt, md, json or html (repeat for several; default html).
    #[arg(long, value_name = "EXT")]
    format: Vec<String>,
    /// Print the summary as one JSON document.
    #[arg(long)]
    json: bool,
    #[command(flatten)]
    source: super::source_args::SourceArgs,
    #[command(flatten)]
    limits: LimitArgs,
}

/// What a batch run needs (the library face of `quiddity batch`).
#[derive(Clone, Debug)]
pub struct BatchOptions {
    /// Directory of case files.
    pub dir: PathBuf,
    /// Output directory.
    pub out: PathBuf,
    /// Overwrite existing reports.
    pub force: bool,
    /// Worker threads (0: one per CPU).
    pub threads: usize,
    /// Formats to write.
    pub formats: Vec<Format>,
    /// Load options of every case.
    pub load: LoadOptions,
    /// Show a progress bar (only ever on a terminal).
    pub progress: bool,
    /// Time and memory budget of each case; a case that spends it is reported in its row
    /// (which limit, what to add) and the batch goes on.
    pub budget: Budget,
}

/// One row of the summary.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct CaseSummary {
    /// The case file's name.
    pub file: String,
    /// Case identifier.
    pub case: Option<String>,
    /// The leading candidate in words.
    pub top: Option<String>,
    /// Consistent combinations found.
    pub n_candidates: usize,
    /// Conflicts found.
    pub n_conflicts: usize,
    /// What went wrong, when something did.
    pub error: Option<String>,
    /// Reports written.
    pub reports: Vec<String>,
}

/// The case files directly in `dir`, sorted by name.
pub fn case_files(dir: &Path) -> Result<Vec<PathBuf>, Failure> {
    let origin = dir.display().to_string();
    let entries = std::fs::read_dir(dir)
        .map_err(|e| Diagnostic::error(&origin, format!("cannot read the directory: {e}")))?;
    let mut files: Vec<PathBuf> = entries
        .flatten()
        .map(|e| e.path())
        .filter(|p| {
            p.is_file()
                && p.extension()
                    .and_then(|e| e.to_str())
                    .is_some_and(|e| e == "yaml" || e == "yml")
        })
        .collect();
    files.sort();
    if files.is_empty() {
        return Err(
            Diagnostic::error(origin, "no case files (*.yaml, *.yml) in this directory").into(),
        );
    }
    Ok(files)
}

fn first_line(failure: &Failure) -> String {
    let first = failure
        .diagnostics
        .iter()
        .find(|d| d.is_error())
        .or(failure.diagnostics.first())
        .map_or_else(|| "failed".to_owned(), ToString::to_string);
    let more = failure.diagnostics.len().saturating_sub(1);
    if more > 0 {
        format!("{first} (and {more} more)")
    } else {
        first
    }
}

/// The first error with its help (a budget failure says what to add to the case).
fn with_help(failure: &Failure) -> String {
    let help = failure
        .diagnostics
        .iter()
        .find(|d| d.is_error())
        .and_then(|d| d.help.clone());
    match help {
        Some(h) => format!("{}; {h}", first_line(failure)),
        None => first_line(failure),
    }
}

/// Solves one case and writes its reports.
pub fn process_one(
    path: &Path,
    options: &BatchOptions,
    catalogue: &Catalogue,
    solve: &SolveOptions,
) -> CaseSummary {
    let mut row = CaseSummary {
        file: casefile::file_name(path),
        case: None,
        top: None,
        n_candidates: 0,
        n_conflicts: 0,
        error: None,
        reports: Vec::new(),
    };
    let loaded = match load_case(path, &options.load) {
        Ok(l) => l,
        Err(f) => {
            row.error = Some(first_line(&f));
            return row;
        }
    };
    if let Err(f) = casefile::check_against_catalogue(&loaded, catalogue) {
        row.error = Some(first_line(&f));
        return row;
    }
    let outcome = match casefile::solve_within(&loaded, catalogue, solve, options.budget) {
        Ok(o) => o,
        Err(f) => {
            row.case = loaded.case.id.clone();
            row.error = Some(with_help(&f));
            return row;
        }
    };
    row.case = outcome.case.clone();
    row.top = outcome.candidates.first().map(candidate_text);
    row.n_candidates = outcome.n_consistent;
    row.n_conflicts = outcome.conflicts.len();
    let stem = path
        .file_stem()
        .map_or_else(|| "case".to_owned(), |s| s.to_string_lossy().into_owned());
    for format in &options.formats {
        let target = options.out.join(format!("{stem}.{}", format.extension()));
        let text = casefile::report_text(&loaded, &outcome, *format, None);
        match write_atomic(&target, text.as_bytes(), options.force) {
            Ok(()) => row.reports.push(target.display().to_string()),
            Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => {
                row.error = Some(format!(
                    "{} exists; not overwritten (use --force)",
                    target.display()
                ));
            }
            Err(e) => {
                row.error = Some(format!("cannot write {}: {e}", target.display()));
            }
        }
    }
    row
}

/// Runs a batch: every case of `options.dir`, in parallel; rows in file-name order.
pub fn process(
    options: &BatchOptions,
    catalogue: &Catalogue,
    solve: &SolveOptions,
) -> Result<Vec<CaseSummary>, Failure> {
    let files = case_files(&options.dir)?;
    std::fs::create_dir_all(&options.out).map_err(|e| {
        Diagnostic::error(
            options.out.display().to_string(),
            format!("cannot create the output directory: {e}"),
        )
    })?;
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(options.threads)
        .build()
        .map_err(|e| Diagnostic::error("--threads", format!("cannot start the workers: {e}")))?;
    let bar = if options.progress && std::io::stderr().is_terminal() {
        let bar = indicatif::ProgressBar::new(files.len() as u64);
        if let Ok(style) =
            indicatif::ProgressStyle::with_template("{bar:40} {pos}/{len} cases {elapsed}")
        {
            bar.set_style(style);
        }
        bar
    } else {
        indicatif::ProgressBar::hidden()
    };
    let rows = pool.install(|| {
        files
            .par_iter()
            .map(|p| {
                let row = process_one(p, options, catalogue, solve);
                bar.inc(1);
                row
            })
            .collect::<Vec<_>>()
    });
    bar.finish_and_clear();
    Ok(rows)
}

/// The summary as an aligned table.
pub fn render_summary(rows: &[CaseSummary]) -> String {
    let cell = |s: &Option<String>| s.clone().unwrap_or_else(|| "-".to_owned());
    let w_file = rows
        .iter()
        .map(|r| r.file.chars().count())
        .max()
        .unwrap_or(4)
        .max(4);
    let w_case = rows
        .iter()
        .map(|r| cell(&r.case).chars().count())
        .max()
        .unwrap_or(4)
        .max(4);
    let w_top = rows
        .iter()
        .map(|r| cell(&r.top).chars().count())
        .max()
        .unwrap_or(13)
        .max(13);
    let mut s = format!(
        "{:<w_file$}  {:<w_case$}  {:<w_top$}  {:>10}  {:>9}  error\n",
        "file", "case", "top candidate", "candidates", "conflicts"
    );
    for r in rows {
        s.push_str(
            format!(
                "{:<w_file$}  {:<w_case$}  {:<w_top$}  {:>10}  {:>9}  {}\n",
                r.file,
                cell(&r.case),
                cell(&r.top),
                r.n_candidates,
                r.n_conflicts,
                cell(&r.error)
            )
            .trim_end()
            .to_owned()
            .as_str(),
        );
        s.push('\n');
    }
    let failed = rows.iter().filter(|r| r.error.is_some()).count();
    s.push_str(&format!(
        "{} case(s): {} reported, {} failed; every result is a screening lead, not an identification\n",
        rows.len(),
        rows.len() - failed,
        failed
    ));
    s
}

/// Runs `quiddity batch`.
pub fn run(args: &BatchArgs, out: &mut dyn Write) -> CommandResult {
    let mut formats = Vec::new();
    for word in &args.format {
        let f = Format::from_extension(word.trim_start_matches('.')).ok_or_else(|| {
            Diagnostic::error("--format", format!("unknown report format \"{word}\""))
                .with_help("use txt, md, json or html")
        })?;
        if !formats.contains(&f) {
            formats.push(f);
        }
    }
    if formats.is_empty() {
        formats.push(Format::Html);
    }
    if args.threads == Some(0) {
        return Err(Diagnostic::error("--threads", "--threads must be at least 1").into());
    }
    let catalogue = load_catalogue(args.source.rules.as_deref())?;
    let options = BatchOptions {
        dir: args.dir.clone(),
        out: args.out.clone(),
        force: args.force,
        threads: args.threads.unwrap_or(0),
        formats,
        load: LoadOptions {
            allow_outside: args.source.allow_outside,
        },
        progress: true,
        budget: args.limits.budget()?,
    };
    let rows = process(&options, &catalogue, &SolveOptions::default())?;
    if args.json {
        print_json(out, &rows)?;
    } else {
        out.write_all(render_summary(&rows).as_bytes())
            .map_err(io_failure)?;
    }
    if rows.iter().any(|r| r.error.is_some()) {
        Err(Failure {
            diagnostics: vec![Diagnostic::error(
                args.dir.display().to_string(),
                format!(
                    "{} of {} case(s) failed (see the error column)",
                    rows.iter().filter(|r| r.error.is_some()).count(),
                    rows.len()
                ),
            )],
        })
    } else {
        Ok(Status::Success)
    }
}
