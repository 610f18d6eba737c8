//! `quiddity isomers`: every constitutional isomer of a formula, optionally only those
//! showing exactly a given functional-group multiset, as canonical SMILES with their
//! structure-level IR features.

use super::limits::{limit_failure, LimitArgs};
use super::{io_failure, print_json, CommandResult, Failure, Status};
use crate::budget::{LimitReached, Metered};
use crate::chem::Formula;
use crate::diag::Diagnostic;
use crate::structure::{self, Enumeration, GroupCounts, StructureError, StructureFeatures};
use clap::Args;
use std::io::{IsTerminal, Write};

/// Cap on listed structures when `--max` is not given (counting has no default cap).
pub const DEFAULT_LIST_CAP: usize = 10_000;

const CAUTION: &str =
    "Constitutional isomers only (cis/trans and optical isomers are not told apart). \
Each structure is a screening lead, not an identification: confirm with a reference standard \
under the laboratory's validated method, treat unknowns as hazardous, and follow local \
regulations and licensed practice.";

/// Arguments of `quiddity isomers`.
#[derive(Debug, Args)]
#[command(after_help = "\
Exit status: 0 at least one structure; 1 no structure (the reason is shown); 2 bad input,
or the time or memory limit reached (the message says which and what narrows the search).
Constitutional isomers only: cis/trans and optical isomers are not told apart.")]
pub struct IsomersArgs {
    /// Neutral molecular formula of C, H, N, O, S, P, F, Cl, Br, I, e.g. C6H14 or C10H12O.
    formula: String,

    /// Keep only structures whose perceived groups are exactly these, e.g.
    /// ketone:1,aromatic_ring:1 (a count of 1 may be left out; `ring` counts rings).
    #[arg(long, value_name = "ID:N,...")]
    groups: Option<String>,

    /// Print only how many structures there are (with --json, `structures` is empty).
    #[arg(long)]
    count: bool,

    /// Stop after N structures [default: 10000 when listing, no cap when counting].
    #[arg(long, value_name = "N")]
    max: Option<usize>,

    /// Print one JSON document on stdout.
    #[arg(long)]
    json: bool,

    #[command(flatten)]
    limits: LimitArgs,
}

/// The `--json` document.
#[derive(Debug, serde::Serialize)]
struct IsomersReport {
    formula: String,
    groups: Option<GroupCounts>,
    count: usize,
    truncated: bool,
    /// Set when formula and groups cannot fit together.
    no_structure_reason: Option<String>,
    structures: Vec<StructureView>,
    caution: &'static str,
}

#[derive(Debug, serde::Serialize)]
struct StructureView {
    smiles: String,
    groups: GroupCounts,
    features: StructureFeatures,
}

/// Runs `quiddity isomers`.
pub fn run(args: &IsomersArgs, out: &mut dyn Write) -> CommandResult {
    let formula = Formula::parse(&args.formula).map_err(|e| e.to_diagnostic("<formula>"))?;
    let groups = match &args.groups {
        Some(text) => Some(GroupCounts::parse(text).map_err(|e| e.to_diagnostic("--groups"))?),
        None => None,
    };
    if args.max == Some(0) {
        return Err(Diagnostic::error("--max", "the cap must be at least 1").into());
    }
    let cap = match (args.max, args.count) {
        (Some(n), _) => Some(n),
        (None, true) => None,
        (None, false) => Some(DEFAULT_LIST_CAP),
    };
    let mut meter = Metered::new(args.limits.budget()?);
    let (count, e) = with_progress(|progress| {
        if args.count {
            count_only(&formula, groups.as_ref(), cap, &mut meter, progress)
        } else {
            let e =
                structure::enumerate_within(&formula, groups.as_ref(), cap, &mut meter, progress)?;
            Ok(e.map(|e| (e.structures.len(), e)))
        }
    })
    .map_err(|e| structure_failure(&e))?
    .map_err(|stop| limit_failure("<formula>", &stop))?;
    if e.truncated {
        let mut err = std::io::stderr().lock();
        let _ = writeln!(
            err,
            "note: truncated at {count} structures; raise --max to see more"
        );
    }
    let status = if count > 0 {
        Status::Success
    } else {
        Status::Negative
    };
    if args.json {
        let report = IsomersReport {
            formula: formula.to_string(),
            groups,
            count,
            truncated: e.truncated,
            no_structure_reason: e.no_structure_reason,
            structures: e
                .structures
                .into_iter()
                .map(|s| StructureView {
                    smiles: s.smiles,
                    groups: s.groups,
                    features: s.features,
                })
                .collect(),
            caution: CAUTION,
        };
        print_json(out, &report)?;
        return Ok(status);
    }
    write_text(out, &formula, groups.as_ref(), count, &e, args.count).map_err(io_failure)?;
    Ok(status)
}

/// How many structures there are (at most `cap`), without keeping them.
fn count_only(
    formula: &Formula,
    groups: Option<&GroupCounts>,
    cap: Option<usize>,
    meter: &mut Metered,
    progress: &mut dyn FnMut(usize),
) -> Result<Result<(usize, Enumeration), LimitReached>, StructureError> {
    let mut n = 0usize;
    let mut truncated = false;
    let summary = structure::for_each_structure_within(formula, groups, meter, |_| {
        if cap.is_some_and(|c| n >= c) {
            truncated = true;
            return std::ops::ControlFlow::Break(());
        }
        n += 1;
        progress(n);
        std::ops::ControlFlow::Continue(())
    })?;
    Ok(summary.map(|summary| {
        (
            n,
            Enumeration {
                structures: Vec::new(),
                truncated,
                no_structure_reason: summary.no_structure_reason,
            },
        )
    }))
}

/// Runs `job` with a spinner on stderr when stderr is a terminal.
fn with_progress<T>(job: impl FnOnce(&mut dyn FnMut(usize)) -> T) -> T {
    let bar = if std::io::stderr().is_terminal() {
        let bar = indicatif::ProgressBar::new_spinner();
        if let Ok(style) =
            indicatif::ProgressStyle::with_template("{spinner} {pos} structures ({elapsed})")
        {
            bar.set_style(style);
        }
        bar.enable_steady_tick(std::time::Duration::from_millis(120));
        Some(bar)
    } else {
        None
    };
    let mut tick = |n: usize| {
        if let Some(b) = &bar {
            b.set_position(n as u64);
        }
    };
    let result = job(&mut tick);
    if let Some(b) = bar {
        b.finish_and_clear();
    }
    result
}

fn structure_failure(e: &StructureError) -> Failure {
    Diagnostic::error("<formula>", e.to_string()).into()
}

fn write_text(
    out: &mut dyn Write,
    formula: &Formula,
    groups: Option<&GroupCounts>,
    count: usize,
    e: &Enumeration,
    count_only: bool,
) -> std::io::Result<()> {
    if count_only {
        writeln!(out, "{count}")?;
        return Ok(());
    }
    let with = match groups {
        Some(g) => format!(" with groups {g}"),
        None => String::new(),
    };
    let more = if e.truncated { " (truncated)" } else { "" };
    writeln!(out, "{formula}{with}: {count} structure(s){more}")?;
    if let Some(reason) = &e.no_structure_reason {
        writeln!(out, "no structure: {reason}")?;
    }
    let width = e
        .structures
        .iter()
        .map(|s| s.smiles.len())
        .max()
        .unwrap_or(0);
    for (k, s) in e.structures.iter().enumerate() {
        let f = &s.features;
        let mut notes = Vec::new();
        if !f.rings.is_empty() {
            notes.push(format!("ring {}", join(&f.rings)));
        }
        if !f.alkenes.is_empty() {
            notes.push(format!("C=C {}", join(&f.alkenes)));
        }
        if !f.alkynes.is_empty() {
            notes.push(format!("C#C {}", join(&f.alkynes)));
        }
        for c in &f.carbonyls {
            notes.push(format!("C=O {} conj. {}", c.kind, c.conjugation));
        }
        if !f.alcohols.is_empty() {
            notes.push(format!("alcohol {}", join(&f.alcohols)));
        }
        writeln!(
            out,
            "{:>5}  {:<width$}  {}",
            k + 1,
            s.smiles,
            notes.join("; ")
        )?;
    }
    writeln!(out)?;
    writeln!(out, "{CAUTION}")?;
    Ok(())
}

fn join<T: std::fmt::Display>(items: &[T]) -> String {
    items
        .iter()
        .map(ToString::to_string)
        .collect::<Vec<_>>()
        .join(", ")
}
