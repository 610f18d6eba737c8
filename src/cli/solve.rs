//! `quiddity solve CASE.yaml`: read the case file (and what it references), load the
//! catalogue, run the engine, print the outcome as aligned text or one JSON document.
//! Exit 0 with at least one candidate, 1 with none (the conflict is shown), 2 on bad input.

use super::casefile::{
    self, format_of, load_case, refuse_input_overwrite, write_atomic, LoadOptions,
};
use super::limits::LimitArgs;
use super::{io_failure, CommandResult, Failure, Status};
use crate::diag::Diagnostic;
use crate::engine::RuleOutKind;
use crate::engine::{self, Outcome, SolveOptions};
use crate::report::record::Record;
use crate::report::wording::{self, groups_text};
use crate::rules::Catalogue;
use clap::Args;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Arguments of `quiddity solve`.
#[derive(Debug, Args)]
#[command(after_help = super::EXIT_STATUS_HELP)]
pub struct SolveArgs {
    /// The case file (YAML).
    case: PathBuf,
    /// Print one JSON document on stdout.
    #[arg(long)]
    json: bool,
    /// Band-position tolerance on each side of a rule's range, cm⁻¹.
    #[arg(long, value_name = "CM1", default_value_t = engine::DEFAULT_TOLERANCE_CM1)]
    tolerance: f64,
    /// Show at most N candidates.
    #[arg(long, value_name = "N", default_value_t = 25)]
    max: usize,
    /// Stop collecting consistent combinations after N (the output says when it did).
    #[arg(long, value_name = "N", default_value_t = SolveOptions::default().enumeration_limit)]
    limit: usize,
    /// Use the rules catalogue in DIR instead of the built-in one.
    #[arg(long, value_name = "DIR")]
    rules: Option<PathBuf>,
    /// Write a report to FILE; the format follows the extension (.txt .md .json .html).
    /// May be given more than once.
    #[arg(long, value_name = "FILE")]
    report: Vec<PathBuf>,
    /// Write a record (conclusion, version, rules digest, input digests) beside the case
    /// as NAME.record.json, for `quiddity review`.
    #[arg(long)]
    record: bool,
    /// Put the current UTC time in the reports (they are otherwise byte-for-byte
    /// reproducible).
    #[arg(long)]
    timestamp: bool,
    /// Let the case name files outside its own directory tree.
    #[arg(long)]
    allow_outside: bool,
    #[command(flatten)]
    limits: LimitArgs,
}

/// Runs `quiddity solve`.
pub fn run(args: &SolveArgs, out: &mut dyn Write) -> CommandResult {
    if !(args.tolerance.is_finite() && (0.0..=100.0).contains(&args.tolerance)) {
        return Err(Diagnostic::error(
            "--tolerance",
            format!(
                "tolerance {} cm⁻¹ must be between 0 and 100",
                args.tolerance
            ),
        )
        .into());
    }
    if args.max == 0 {
        return Err(Diagnostic::error("--max", "--max must be at least 1").into());
    }
    let budget = args.limits.budget()?;
    let loaded = load_case(
        &args.case,
        &LoadOptions {
            allow_outside: args.allow_outside,
        },
    )?;
    let formats = args
        .report
        .iter()
        .map(|p| format_of(p))
        .collect::<Result<Vec<_>, _>>()?;
    let mut err = std::io::stderr().lock();
    for d in &loaded.warnings {
        let _ = writeln!(err, "{}", d.render());
    }
    if let Some(lib) = &loaded.library {
        for n in lib.loaded.notices() {
            let _ = writeln!(err, "{n}");
        }
    }
    let catalogue = load_catalogue(args.rules.as_deref())?;
    casefile::check_against_catalogue(&loaded, &catalogue)?;
    let options = SolveOptions {
        tolerance_cm1: args.tolerance,
        max_candidates: args.max,
        enumeration_limit: args.limit.max(args.max),
        ..SolveOptions::default()
    };
    let outcome = casefile::solve_within(&loaded, &catalogue, &options, budget)?;
    let stamp = args.timestamp.then(casefile::utc_now);
    for (path, format) in args.report.iter().zip(formats) {
        refuse_input_overwrite(&loaded, path)?;
        let text = casefile::report_text(&loaded, &outcome, format, stamp.clone());
        write_atomic(path, text.as_bytes(), true).map_err(|e| {
            Diagnostic::error(
                path.display().to_string(),
                format!("cannot write the report: {e}"),
            )
        })?;
        let _ = writeln!(err, "report written: {}", path.display());
    }
    if args.record {
        let path = casefile::record_path(&args.case);
        refuse_input_overwrite(&loaded, &path)?;
        let record = Record::new(&outcome, loaded.inputs.clone(), &options);
        write_atomic(&path, record.to_json().as_bytes(), true).map_err(|e| {
            Diagnostic::error(
                path.display().to_string(),
                format!("cannot write the record: {e}"),
            )
        })?;
        let _ = writeln!(err, "record written: {}", path.display());
    }
    if args.json {
        // The same document `--report x.json` writes, byte for byte.
        let doc = casefile::report_text(&loaded, &outcome, crate::report::Format::Json, stamp);
        out.write_all(doc.as_bytes()).map_err(io_failure)?;
    } else {
        let mut text = render_text(&outcome);
        if let Some((verdict, _)) = casefile::library_verdict(&loaded, &outcome, false) {
            text.push_str("\nreference library\n");
            text.push_str(&crate::report::library::text(&verdict));
        }
        out.write_all(text.as_bytes()).map_err(io_failure)?;
    }
    Ok(if outcome.candidates.is_empty() {
        Status::Negative
    } else {
        Status::Success
    })
}

/// The built-in catalogue, or every `*.yaml` of `dir`; any catalogue error is exit 2.
pub(crate) fn load_catalogue(dir: Option<&Path>) -> Result<Catalogue, Failure> {
    let Some(dir) = dir else {
        return crate::rules::embedded_catalogue().map_err(Failure::from);
    };
    let (catalogue, diagnostics, _) = super::rules::load_rules_dir(dir)?;
    if diagnostics.iter().any(Diagnostic::is_error) {
        return Err(diagnostics.into());
    }
    Ok(catalogue)
}

/// How many candidates get their full explanation in the text output.
const DETAILED: usize = 3;

/// Structures listed per candidate in the terminal output.
const STRUCTURES_SHOWN: usize = 8;

/// The terminal rendering: a header, the ranked table, details of the first few,
/// conflicts, ruled out, near misses, discriminating checks and the cautions. Every
/// sentence is `report::wording`'s, so the terminal and the reports say the same thing.
///
/// A salt or hydrate formula adds the report's salt lines under the header.
pub fn render_text(o: &Outcome) -> String {
    let mut s = String::new();
    header(&mut s, o);
    s.push('\n');
    if o.candidates.is_empty() {
        s.push_str(wording::NO_CANDIDATE);
        s.push('\n');
    } else {
        s.push_str(&wording::count(
            o.n_consistent,
            o.candidates.len(),
            o.list_truncated,
            o.enumeration_truncated,
        ));
        s.push_str("\n\n");
        formula_leads(&mut s, o);
        candidate_table(&mut s, o);
        for c in o.candidates.iter().take(DETAILED) {
            candidate_detail(&mut s, c);
        }
    }
    conflicts(&mut s, o);
    ruled_out(&mut s, o);
    if !o.near_misses.is_empty() {
        s.push_str("\nnear misses\n");
        for n in o.near_misses.iter().take(5) {
            s.push_str(&format!(
                "  {}\n",
                wording::near_miss(&n.groups, &n.reasons)
            ));
        }
    }
    if !o.discriminating_checks.is_empty() {
        s.push_str("\nto tell the leading candidates apart\n");
        for d in o.discriminating_checks.iter().take(8) {
            s.push_str(&format!("  {}\n", wording::discriminating(d, "#")));
        }
    }
    s.push('\n');
    s.push_str(&wording::cautions_sentence(&o.cautions));
    s.push('\n');
    s
}

/// The header line (case, formula, DBE, technique, tolerance), the formula-level checks
/// and the salt and mixture lines.
fn header(s: &mut String, o: &Outcome) {
    let mut head = Vec::new();
    if let Some(c) = &o.case {
        head.push(format!("case {c}"));
    }
    if let Some(f) = &o.formula {
        head.push(format!("formula {f}"));
    }
    if let Some(d) = o.dbe {
        head.push(format!("DBE {d}"));
    }
    head.push(format!(
        "technique {}",
        o.technique.as_deref().unwrap_or("not stated")
    ));
    head.push(format!("tolerance ±{} cm⁻¹", o.tolerance_cm1));
    s.push_str(&head.join(" · "));
    s.push('\n');
    for c in &o.evidence_checks {
        s.push_str(&format!(
            "  {:<9} {}\n",
            wording::agreement(c.agrees),
            wording::evidence_check(c)
        ));
    }
    if let Some(salt) = &o.salt {
        for l in wording::salt_lines(salt) {
            s.push_str(&format!("  salt {l}\n"));
        }
    }
    if let Some(m) = &o.mixture {
        for l in wording::mixture_lines(m) {
            s.push_str(&format!("  mixture {l}\n"));
        }
    }
}

/// The formulas proposed from the molecular ion, when the case states none.
fn formula_leads(s: &mut String, o: &Outcome) {
    if o.formula_leads.is_empty() {
        return;
    }
    s.push_str(wording::FORMULA_LEADS);
    s.push_str(":\n");
    s.push_str(&format!("  ({})\n", wording::FORMULA_LEADS_COMPARED));
    for l in &o.formula_leads {
        let ppm = l
            .error_ppm
            .map(|e| format!("{e:+.1} ppm"))
            .unwrap_or_else(|| "nominal".to_owned());
        s.push_str(&format!(
            "  {:>3}  {:<14} DBE {:<4} {:<10} MS score {:>6.2}  {} consistent\n",
            l.rank, l.formula, l.dbe, ppm, l.ms_score, l.n_consistent
        ));
    }
    s.push('\n');
}

/// The ranked table: rank, score, the formula when candidates differ in it, groups.
fn candidate_table(s: &mut String, o: &Outcome) {
    let formula_width = o
        .candidates
        .iter()
        .filter_map(|c| c.formula.as_ref().map(|f| f.chars().count()))
        .max();
    match formula_width {
        Some(w) => s.push_str(&format!(" rank   score  {:<w$}  groups\n", "formula")),
        None => s.push_str(" rank   score  groups\n"),
    }
    for c in &o.candidates {
        let formula = match (formula_width, &c.formula) {
            (Some(w), Some(f)) => format!("{f:<w$}  "),
            _ => String::new(),
        };
        s.push_str(&format!(
            "{:>5}  {:>6.2}  {formula}{}\n",
            c.rank,
            c.score,
            groups_text(&c.groups)
        ));
    }
}

/// One candidate in full: families, DBE and atom accounting, its bands, the evidence
/// against it and its structures.
fn candidate_detail(s: &mut String, c: &crate::engine::Candidate) {
    s.push_str(&format!("\n#{}  {}\n", c.rank, groups_text(&c.groups)));
    let fam: Vec<String> = c
        .families
        .iter()
        .filter(|(k, _)| !c.groups.contains_key(*k))
        .map(|(k, v)| format!("{k} {v}"))
        .collect();
    if !fam.is_empty() {
        s.push_str(&format!("    families   {}\n", fam.join(", ")));
    }
    s.push_str(&format!("    {}\n", c.dbe_accounting));
    for a in &c.atom_accounting {
        s.push_str(&format!("    {a}\n"));
    }
    s.push_str("    bands\n");
    for b in &c.bands {
        let obs = format!(
            "{:.0} {}{}",
            b.at,
            b.strength,
            b.shape
                .as_ref()
                .map(|x| format!(" {x}"))
                .unwrap_or_default()
        );
        let why = match b.explained_by.first() {
            Some(e) => wording::explanation(e, 9),
            None => wording::unexplained(b.demanded).to_owned(),
        };
        s.push_str(&format!("      {obs:<20} {why}\n"));
        if let Some(t) = &b.treatment {
            s.push_str(&format!("      {:<20}   ↳ {t}\n", ""));
        }
    }
    for w in &c.weakening {
        s.push_str(&format!("    {}\n", wording::weakening(&w.text)));
    }
    if let Some(st) = &c.structures {
        structures(s, st);
    }
}

/// A candidate's constitutional isomers, the first few.
fn structures(s: &mut String, st: &crate::engine::StructureSection) {
    match (&st.note, st.count) {
        (Some(note), _) => s.push_str(&format!("    structures {note}\n")),
        (None, Some(n)) => {
            s.push_str(&format!("    structures {}\n", wording::isomer_count(n)));
            for r in st.ranked.iter().take(STRUCTURES_SHOWN) {
                s.push_str(&format!("      {:>5.1}  {}\n", r.score, r.smiles));
            }
            if st.ranked.len() > STRUCTURES_SHOWN {
                s.push_str(&format!(
                    "      {}\n",
                    wording::more_isomers(st.ranked.len() - STRUCTURES_SHOWN)
                ));
            }
        }
        (None, None) => {}
    }
}

/// The conflicts: the items, why they cannot hold together, the causes to check.
fn conflicts(s: &mut String, o: &Outcome) {
    if o.conflicts.is_empty() {
        return;
    }
    s.push_str(&format!("\nconflict: {}\n", wording::CONFLICT));
    for c in &o.conflicts {
        for i in &c.items {
            s.push_str(&format!("  - {i}\n"));
        }
        for e in &c.explanation {
            s.push_str(&format!("    {}\n", wording::because(&e.text)));
        }
        for limit in &c.search_limits {
            s.push_str(&format!("    {}\n", wording::search_limit(limit)));
        }
        for cause in &c.suggested_causes {
            s.push_str(&format!("    {}\n", wording::check_cause(cause)));
        }
    }
}

/// The groups ruled out, those the formula cannot hold counted only.
fn ruled_out(s: &mut String, o: &Outcome) {
    if o.ruled_out.is_empty() {
        return;
    }
    s.push_str("\nruled out\n");
    let width = o.ruled_out.iter().map(|r| r.group.len()).max().unwrap_or(0);
    for r in o
        .ruled_out
        .iter()
        .filter(|r| r.kind != RuleOutKind::Composition)
    {
        s.push_str(&format!(
            "  {:<width$}  {}{}\n",
            r.group,
            r.reason,
            wording::ruled_out_rule(r.rule.as_deref())
        ));
    }
    let by_formula = o
        .ruled_out
        .iter()
        .filter(|r| r.kind == RuleOutKind::Composition)
        .count();
    if by_formula > 0 {
        s.push_str(&format!(
            "  {}\n",
            wording::composition_left_out(by_formula)
        ));
    }
}
