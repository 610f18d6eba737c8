//! `quiddity rules`: check, list, show and look up the rules catalogue.
//!
//! The library parses text; this file only finds the files, reads them, and prints.
//! Without `--rules DIR` (or the `DIR` of `check`) the catalogue built into the binary
//! is used.

use super::{io_failure, print_json, CommandResult, Failure, Status};
use crate::diag::{closest_match, Diagnostic};
use crate::rules::lookup::effective_range;
use crate::rules::{
    load, rules_at, BandRule, Catalogue, MsClueKind, Technique, EMBEDDED_FILES, MAX_WAVENUMBER,
    MIN_WAVENUMBER,
};
use clap::{Args, Subcommand, ValueEnum};
use serde::Serialize;
use std::io::Write;
use std::path::{Path, PathBuf};

/// Arguments of `quiddity rules`.
#[derive(Debug, Args)]
pub struct RulesArgs {
    #[command(subcommand)]
    command: RulesCommand,
    /// Use the catalogue in this directory (its `*.yaml` files) instead of the built-in one.
    #[arg(long, value_name = "DIR", global = true)]
    rules: Option<PathBuf>,
    /// Print one JSON document on stdout.
    #[arg(long, global = true)]
    json: bool,
}

#[derive(Debug, Subcommand)]
enum RulesCommand {
    /// Validate a catalogue and report every problem of every file (exit 2 if any).
    Check {
        /// Directory of `*.yaml` rules files (default: `--rules DIR`, else the built-in catalogue).
        dir: Option<PathBuf>,
    },
    /// List every functional group with its parents.
    List,
    /// Everything about one group (or rule): atoms, bonds, bands, MS clues, sources.
    Show {
        /// Group or rule id, e.g. `ketone`.
        id: String,
    },
    /// Which rule bands cover a wavenumber, best match first.
    At {
        /// Position in cm⁻¹.
        wavenumber: f64,
        /// Apply this technique's overrides and artefacts.
        #[arg(long, value_enum)]
        technique: Option<TechniqueArg>,
    },
}

/// Technique words as typed on the command line.
#[derive(Clone, Copy, Debug, ValueEnum)]
enum TechniqueArg {
    #[value(name = "ATR", alias = "atr")]
    Atr,
    #[value(name = "KBr", alias = "kbr")]
    Kbr,
    #[value(name = "film")]
    Film,
    #[value(name = "solution")]
    Solution,
    #[value(name = "gas")]
    Gas,
    #[value(name = "mull")]
    Mull,
}

impl From<TechniqueArg> for Technique {
    fn from(t: TechniqueArg) -> Technique {
        match t {
            TechniqueArg::Atr => Technique::Atr,
            TechniqueArg::Kbr => Technique::Kbr,
            TechniqueArg::Film => Technique::Film,
            TechniqueArg::Solution => Technique::Solution,
            TechniqueArg::Gas => Technique::Gas,
            TechniqueArg::Mull => Technique::Mull,
        }
    }
}

/// Runs `quiddity rules`.
pub fn run(args: &RulesArgs, out: &mut dyn Write) -> CommandResult {
    match &args.command {
        RulesCommand::Check { dir } => {
            let dir = dir.as_ref().or(args.rules.as_ref());
            check(dir.map(PathBuf::as_path), args.json, out)
        }
        RulesCommand::List => list(&catalogue(args.rules.as_deref())?, args.json, out),
        RulesCommand::Show { id } => show(&catalogue(args.rules.as_deref())?, id, args.json, out),
        RulesCommand::At {
            wavenumber,
            technique,
        } => at(
            &catalogue(args.rules.as_deref())?,
            *wavenumber,
            technique.map(Technique::from),
            args.json,
            out,
        ),
    }
}

/// The `(name, text)` files of a catalogue directory: every `*.yaml` directly inside it.
fn read_rules_files(dir: &Path) -> Result<Vec<(String, String)>, Failure> {
    let origin = dir.display().to_string();
    let entries = std::fs::read_dir(dir)
        .map_err(|e| Diagnostic::error(&origin, format!("cannot read rules directory: {e}")))?;
    let mut files = Vec::new();
    for entry in entries {
        let entry = entry
            .map_err(|e| Diagnostic::error(&origin, format!("cannot read rules directory: {e}")))?;
        let name = entry.file_name().to_string_lossy().into_owned();
        if !name.ends_with(".yaml") {
            continue;
        }
        let path = entry.path();
        let text = std::fs::read_to_string(&path).map_err(|e| {
            Diagnostic::error(
                path.display().to_string(),
                format!("cannot read rules file: {e}"),
            )
        })?;
        files.push((name, text));
    }
    if files.is_empty() {
        return Err(Diagnostic::error(origin, "no rules files (*.yaml) in this directory").into());
    }
    files.sort();
    Ok(files)
}

/// Loads the catalogue from every `*.yaml` of a `--rules DIR` directory (the one reader of
/// such a directory, shared by every command): the catalogue, every problem with its
/// origin turned into the file's real path, and the number of files read. An unreadable
/// directory or one without rules files is exit 2.
pub(crate) fn load_rules_dir(dir: &Path) -> Result<(Catalogue, Vec<Diagnostic>, usize), Failure> {
    let files = read_rules_files(dir)?;
    let (catalogue, mut diagnostics) = load(files.iter().map(|(n, t)| (n.as_str(), t.as_str())));
    for d in &mut diagnostics {
        if !d.origin.starts_with('<') {
            d.origin = dir.join(&d.origin).display().to_string();
        }
    }
    Ok((catalogue, diagnostics, files.len()))
}

/// Loads the catalogue from `dir` or the built-in files, with diagnostics naming real paths.
fn load_from(dir: Option<&Path>) -> Result<(Catalogue, Vec<Diagnostic>, usize), Failure> {
    match dir {
        Some(dir) => load_rules_dir(dir),
        None => {
            let (catalogue, mut diagnostics) = load(EMBEDDED_FILES.iter().copied());
            for d in &mut diagnostics {
                if !d.origin.starts_with('<') {
                    d.origin = format!("<built-in>/{}", d.origin);
                }
            }
            Ok((catalogue, diagnostics, EMBEDDED_FILES.len()))
        }
    }
}

/// The catalogue, or exit 2 with every problem.
fn catalogue(dir: Option<&Path>) -> Result<Catalogue, Failure> {
    let (catalogue, diagnostics, _) = load_from(dir)?;
    if diagnostics.iter().any(Diagnostic::is_error) {
        return Err(diagnostics.into());
    }
    Ok(catalogue)
}

/// Counts of a clean catalogue, for `check`.
#[derive(Serialize)]
struct CheckSummary {
    ok: bool,
    files: usize,
    groups: usize,
    concrete_groups: usize,
    bands: usize,
    ms_clues: usize,
    skeleton_rules: usize,
    artefacts: usize,
    patterns: usize,
    technique_effects: usize,
    digest: String,
}

fn check(dir: Option<&Path>, json: bool, out: &mut dyn Write) -> CommandResult {
    let (catalogue, diagnostics, files) = load_from(dir)?;
    if !diagnostics.is_empty() {
        return Err(diagnostics.into());
    }
    let summary = CheckSummary {
        ok: true,
        files,
        groups: catalogue.groups.len(),
        concrete_groups: catalogue.concrete_groups().count(),
        bands: catalogue
            .groups
            .iter()
            .map(|g| g.bands.len())
            .sum::<usize>()
            + catalogue
                .patterns
                .iter()
                .map(|p| p.bands.len())
                .sum::<usize>()
            + catalogue.skeleton.len(),
        ms_clues: catalogue.groups.iter().map(|g| g.ms.len()).sum(),
        skeleton_rules: catalogue.skeleton.len(),
        artefacts: catalogue.artefacts.len(),
        patterns: catalogue.patterns.len(),
        technique_effects: catalogue.technique_effects.len(),
        digest: catalogue.digest.clone(),
    };
    if json {
        return print_json(out, &summary);
    }
    writeln!(
        out,
        "catalogue ok: {} files, {} groups ({} concrete), {} bands, {} MS clues, {} skeleton rules, {} artefacts, {} patterns, {} technique effects\ndigest sha256:{}",
        summary.files,
        summary.groups,
        summary.concrete_groups,
        summary.bands,
        summary.ms_clues,
        summary.skeleton_rules,
        summary.artefacts,
        summary.patterns,
        summary.technique_effects,
        summary.digest
    )
    .map_err(io_failure)?;
    Ok(Status::Success)
}

/// One group as `list --json` prints it.
#[derive(Serialize)]
struct ListedGroup<'a> {
    id: &'a str,
    name: &'a str,
    subtype_of: &'a [String],
    lineage: Vec<String>,
    concrete: bool,
    formula: String,
    dbe: u32,
    open_bonds: u32,
    bands: usize,
    defined_at: String,
}

fn list(catalogue: &Catalogue, json: bool, out: &mut dyn Write) -> CommandResult {
    let rows: Vec<ListedGroup> = catalogue
        .groups
        .iter()
        .map(|g| ListedGroup {
            id: &g.id,
            name: &g.name,
            subtype_of: &g.subtype_of,
            lineage: catalogue.lineage(&g.id),
            concrete: !catalogue.has_subtypes(&g.id),
            formula: g.atoms.to_string(),
            dbe: g.dbe,
            open_bonds: g.bonds.total(),
            bands: g.bands.len(),
            defined_at: format!("{}:{}", g.defined_at.file, g.defined_at.line),
        })
        .collect();
    if json {
        return print_json(out, &rows);
    }
    let width = rows.iter().map(|r| r.id.len()).max().unwrap_or(0);
    for r in &rows {
        let parent = if r.subtype_of.is_empty() {
            String::new()
        } else {
            format!("  (subtype of {})", r.subtype_of.join(", "))
        };
        let family = if r.concrete { "" } else { "  [family]" };
        writeln!(out, "{:width$}  {}{parent}{family}", r.id, r.name).map_err(io_failure)?;
    }
    Ok(Status::Success)
}

/// `show --json` output for a group.
#[derive(Serialize)]
struct ShownGroup<'a> {
    #[serde(flatten)]
    group: &'a crate::rules::Group,
    formula: String,
    lineage: Vec<String>,
    subtypes: Vec<&'a str>,
    concrete: bool,
}

fn show(catalogue: &Catalogue, id: &str, json: bool, out: &mut dyn Write) -> CommandResult {
    let Some(group) = catalogue.group(id) else {
        return show_rule(catalogue, id, json, out);
    };
    let subtypes: Vec<&str> = catalogue
        .groups
        .iter()
        .filter(|g| g.subtype_of.iter().any(|p| p == id))
        .map(|g| g.id.as_str())
        .collect();
    if json {
        return print_json(
            out,
            &ShownGroup {
                group,
                formula: group.atoms.to_string(),
                lineage: catalogue.lineage(id),
                subtypes,
                concrete: !catalogue.has_subtypes(id),
            },
        );
    }
    let mut text = String::new();
    text.push_str(&format!("{} — {}\n", group.id, group.name));
    text.push_str(&format!(
        "  defined at {}:{}\n",
        group.defined_at.file, group.defined_at.line
    ));
    let atoms = if group.atoms.n_atoms() == 0 {
        "none".to_owned()
    } else {
        group.atoms.to_string()
    };
    text.push_str(&format!("  atoms: {atoms}   dbe: {}\n", group.dbe));
    let b = group.bonds;
    text.push_str(&format!(
        "  open bonds: {} (hetero {}, hetero_or_h {}, carbon {}, carbon_or_h {})\n",
        b.total(),
        b.hetero,
        b.hetero_or_h,
        b.carbon,
        b.carbon_or_h
    ));
    let lineage = catalogue.lineage(id);
    if lineage.len() > 1 {
        text.push_str(&format!("  a kind of: {}\n", lineage[1..].join(" → ")));
    }
    if !subtypes.is_empty() {
        text.push_str(&format!(
            "  family of: {} (the engine enumerates these)\n",
            subtypes.join(", ")
        ));
    }
    if !group.requires_any.is_empty() {
        text.push_str(&format!(
            "  requires one of: {}\n",
            group.requires_any.join(", ")
        ));
    }
    if !group.excludes.is_empty() {
        text.push_str(&format!("  excludes: {}\n", group.excludes.join(", ")));
    }
    if let Some(note) = &group.note {
        text.push_str(&format!("  note: {note}\n"));
    }
    text.push_str(&format!("  source: {}\n", group.source));
    if group.bands.is_empty() {
        text.push_str("  IR bands: none of its own\n");
    } else {
        text.push_str("  IR bands:\n");
        for band in &group.bands {
            text.push_str(&band_text(band));
        }
    }
    if !group.ms.is_empty() {
        text.push_str("  MS clues (soft evidence):\n");
        for clue in &group.ms {
            let what = match clue.kind {
                MsClueKind::Ion { mz } => format!("ion m/z {mz}"),
                MsClueKind::Loss { mass } => format!("loss of {mass}"),
            };
            text.push_str(&format!(
                "    {what}: {}\n      source: {}\n",
                clue.label, clue.source
            ));
        }
    }
    write!(out, "{text}").map_err(io_failure)?;
    Ok(Status::Success)
}

/// Text of one band with its overrides, shifts and source.
fn band_text(band: &BandRule) -> String {
    let words = format!("{:?}, {:?}, {:?}", band.role, band.strength, band.shape).to_lowercase();
    let mut text = format!(
        "    {:.0}–{:.0} cm⁻¹  {}  [{words}{}{}]  (line {})\n",
        band.range.lo,
        band.range.hi,
        band.label,
        band.one_of
            .as_ref()
            .map_or(String::new(), |t| format!(", one of \"{t}\"")),
        if band.may_be_absent {
            ", may be absent"
        } else {
            ""
        },
        band.defined_at.line,
    );
    text.push_str(&format!("      source: {}\n", band.source));
    for (technique, o) in &band.by_technique {
        let r = effective_range(band, Some(*technique));
        let mut changes = Vec::new();
        if o.range.is_some() {
            changes.push(format!("{:.0}–{:.0} cm⁻¹", r.lo, r.hi));
        }
        if let Some(s) = o.strength {
            changes.push(format!("{s:?}").to_lowercase());
        }
        if let Some(s) = o.shape {
            changes.push(format!("{s:?}").to_lowercase());
        }
        if let Some(a) = o.may_be_absent {
            changes.push(if a { "may be absent" } else { "must be seen" }.to_owned());
        }
        text.push_str(&format!(
            "      {}: {}  (source: {})\n",
            technique.word(),
            changes.join(", "),
            o.source
        ));
    }
    for s in &band.shifts {
        text.push_str(&format!(
            "      shift by {}: {:+.0} to {:+.0} cm⁻¹  (source: {})\n",
            s.cause, s.by.lo, s.by.hi, s.source
        ));
    }
    text
}

/// `show` for a skeleton, artefact, pattern or technique rule id.
fn show_rule(catalogue: &Catalogue, id: &str, json: bool, out: &mut dyn Write) -> CommandResult {
    if let Some(rule) = catalogue.skeleton.iter().find(|r| r.id == id) {
        if json {
            return print_json(out, rule);
        }
        let text = format!(
            "{} — skeleton rule, applies with any of: {}\n{}",
            rule.id,
            rule.needs_any.join(", "),
            band_text(&rule.band)
        );
        write!(out, "{text}").map_err(io_failure)?;
        return Ok(Status::Success);
    }
    if let Some(rule) = catalogue.artefacts.iter().find(|r| r.id == id) {
        if json {
            return print_json(out, rule);
        }
        let techniques = if rule.techniques.is_empty() {
            "any technique".to_owned()
        } else {
            rule.techniques
                .iter()
                .map(|t| t.word())
                .collect::<Vec<_>>()
                .join(", ")
        };
        writeln!(
            out,
            "{} — artefact: {}\n    {:.0}–{:.0} cm⁻¹ under {techniques}\n      source: {}",
            rule.id, rule.label, rule.range.lo, rule.range.hi, rule.source
        )
        .map_err(io_failure)?;
        return Ok(Status::Success);
    }
    if let Some(rule) = catalogue.patterns.iter().find(|r| r.id == id) {
        if json {
            return print_json(out, rule);
        }
        let mut text = format!(
            "{} — pattern: {} (supports {})\n  source: {}\n",
            rule.id, rule.feature, rule.supports, rule.source
        );
        for band in &rule.bands {
            text.push_str(&band_text(band));
        }
        write!(out, "{text}").map_err(io_failure)?;
        return Ok(Status::Success);
    }
    if let Some(rule) = catalogue.technique_effects.iter().find(|r| r.id == id) {
        if json {
            return print_json(out, rule);
        }
        writeln!(
            out,
            "{} — {}: {}\n    {:.0}–{:.0} cm⁻¹, up to {} strength class(es) weaker\n      source: {}",
            rule.id,
            rule.technique.word(),
            rule.label,
            rule.range.lo,
            rule.range.hi,
            rule.weaker_by,
            rule.source
        )
        .map_err(io_failure)?;
        return Ok(Status::Success);
    }
    let mut ids: Vec<&str> = catalogue.groups.iter().map(|g| g.id.as_str()).collect();
    ids.extend(catalogue.skeleton.iter().map(|r| r.id.as_str()));
    ids.extend(catalogue.artefacts.iter().map(|r| r.id.as_str()));
    ids.extend(catalogue.patterns.iter().map(|r| r.id.as_str()));
    ids.extend(catalogue.technique_effects.iter().map(|r| r.id.as_str()));
    let mut d = Diagnostic::error("<argument>", format!("unknown group or rule id \"{id}\""));
    d = match closest_match(id, ids) {
        Some(s) => d.with_help(format!("did you mean \"{s}\"?")),
        None => d.with_help("`quiddity rules list` shows every group id"),
    };
    Err(d.into())
}

/// `at --json` output.
#[derive(Serialize)]
struct AtReport<'a> {
    at: f64,
    technique: Option<&'static str>,
    matches: &'a [crate::rules::Coverage],
}

fn at(
    catalogue: &Catalogue,
    wavenumber: f64,
    technique: Option<Technique>,
    json: bool,
    out: &mut dyn Write,
) -> CommandResult {
    if !(MIN_WAVENUMBER..=MAX_WAVENUMBER).contains(&wavenumber) {
        return Err(Diagnostic::error(
            "<argument>",
            format!(
                "wavenumber {wavenumber} is outside the {MIN_WAVENUMBER}–{MAX_WAVENUMBER} cm⁻¹ window the catalogue covers"
            ),
        )
        .into());
    }
    let matches = rules_at(catalogue, wavenumber, technique);
    if json {
        return print_json(
            out,
            &AtReport {
                at: wavenumber,
                technique: technique.map(Technique::word),
                matches: &matches,
            },
        );
    }
    let mut text = format!(
        "rules covering {wavenumber} cm⁻¹{}, best match first:\n",
        technique.map_or(String::new(), |t| format!(" ({})", t.word()))
    );
    if matches.is_empty() {
        text.push_str("  none\n");
    }
    for m in &matches {
        let family = if m.lineage.len() > 1 {
            format!(" ({})", m.lineage[1..].join(" → "))
        } else {
            String::new()
        };
        let kind = format!("{:?}", m.kind).to_lowercase();
        let role = m
            .role
            .map_or("artefact".to_owned(), |r| format!("{r:?}").to_lowercase());
        text.push_str(&format!(
            "  {:.2}  {kind:8}  {}{family}: {}  {:.0}–{:.0} cm⁻¹, {role}\n",
            m.distance, m.id, m.label, m.range.lo, m.range.hi
        ));
    }
    text.push_str(
        "a band position suggests groups; it does not identify a compound (screening lead only)\n",
    );
    write!(out, "{text}").map_err(io_failure)?;
    Ok(Status::Success)
}
