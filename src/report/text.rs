//! Plain-text report: aligned columns, one section per part of the view, for printing and
//! for a reviewer's line-by-line check.

use super::view::{BandRow, CellKind, ReportView};
use super::wording;
use std::fmt::Write;

fn line(s: &mut String, text: impl AsRef<str>) {
    s.push_str(text.as_ref());
    s.push('\n');
}

fn heading(s: &mut String, text: &str) {
    s.push('\n');
    line(s, text);
    line(s, "-".repeat(text.chars().count()));
}

/// Free text on one line: newlines and tabs become spaces so columns stay aligned.
pub fn flat(text: &str) -> String {
    text.split_whitespace().collect::<Vec<_>>().join(" ")
}

fn field(s: &mut String, label: &str, value: Option<&String>) {
    if let Some(v) = value {
        line(s, format!("  {label:<14} {}", flat(v)));
    }
}

/// The text of one band cell: `id (kind)`.
pub fn cell_text(row: &BandRow, i: usize) -> String {
    match row.cells.get(i) {
        Some(c) if c.kind == CellKind::Unexplained => wording::unexplained(row.demanded).to_owned(),
        Some(c) => wording::cell(&c.id, c.kind.word()),
        None => String::new(),
    }
}

/// Renders the text report, section by section.
pub fn render(v: &ReportView) -> String {
    SECTIONS.render(v)
}

/// This format's sections.
const SECTIONS: super::Sections = super::module_sections!(title);

/// The title, underlined, and the cautions in one sentence.
fn title(s: &mut String, v: &ReportView) {
    let head = match (&v.case, &v.title) {
        (Some(c), Some(t)) => format!("quiddity case report · {} · {}", flat(c), flat(t)),
        (Some(c), None) => format!("quiddity case report · {}", flat(c)),
        (None, Some(t)) => format!("quiddity case report · {}", flat(t)),
        (None, None) => "quiddity case report".to_owned(),
    };
    line(s, &head);
    line(s, "=".repeat(head.chars().count()));
    line(s, wording::cautions_sentence(&v.cautions));
}

/// The sample block, when the case describes the sample.
fn sample(s: &mut String, v: &ReportView) {
    let smp = &v.sample;
    if smp.received.is_some()
        || smp.requested_by.is_some()
        || smp.description.is_some()
        || smp.technique.is_some()
        || smp.analyst.is_some()
    {
        heading(s, "sample");
        field(s, "received", smp.received.as_ref());
        field(s, "requested by", smp.requested_by.as_ref());
        field(s, "description", smp.description.as_ref());
        field(s, "techniques", smp.technique.as_ref());
        field(s, "analyst", smp.analyst.as_ref());
    }
}

/// The evidence the case holds.
fn evidence(s: &mut String, v: &ReportView) {
    heading(s, "evidence");
    let e = &v.evidence;
    field(s, "formula", e.formula_written.as_ref());
    for m in &e.ms {
        line(s, format!("  {:<14} {m}", "ms"));
    }
    if let Some((lo, hi)) = e.ir_window {
        line(
            s,
            format!(
                "  {:<14} {}",
                "ir",
                wording::ir_evidence(
                    e.ir_technique.as_deref(),
                    (lo, hi),
                    e.n_bands_written,
                    e.n_bands_picked
                )
            ),
        );
    }
    field(s, "spectrum file", e.spectrum_file.as_ref());
    field(s, "spectrum title", e.spectrum_title.as_ref());
    for n in &e.spectrum_notes {
        line(s, format!("  {:<14} {}", "spectrum note", flat(n)));
    }
}

/// Masses and DBE of the formula, and the formula against the mass spectrum.
fn formula(s: &mut String, v: &ReportView) {
    if let Some(f) = &v.formula_facts {
        heading(s, "formula facts");
        line(s, format!("  {:<22} {}", "formula (Hill order)", f.formula));
        line(
            s,
            format!("  {:<22} {:.6} u", "monoisotopic mass", f.monoisotopic_mass),
        );
        line(
            s,
            format!("  {:<22} {:.4} u", "average mass", f.average_mass),
        );
        line(s, format!("  {:<22} {}", "nominal mass", f.nominal_mass));
        line(s, format!("  {:<22} {}", "DBE", wording::dbe(f.dbe)));
    }
    if !v.evidence_checks.is_empty() {
        heading(s, "formula against the mass spectrum");
        for c in &v.evidence_checks {
            line(
                s,
                format!(
                    "  {:<9} {}",
                    wording::agreement(c.agrees),
                    wording::evidence_check(c)
                ),
            );
        }
    }
}

/// The salt or hydrate reading and the mixture reading, when there is one.
fn salt_and_mixture(s: &mut String, v: &ReportView) {
    if let Some(salt) = &v.salt {
        heading(s, "salt, hydrate and counter-ion");
        for l in super::wording::salt_lines(salt) {
            line(s, format!("  {l}"));
        }
    }

    if let Some(m) = &v.mixture {
        heading(s, "mixture");
        for l in super::wording::mixture_lines(m) {
            line(s, format!("  {l}"));
        }
    }
}

/// The ranked candidates, then each with its accounting and evidence.
fn candidates(s: &mut String, v: &ReportView) {
    heading(s, "candidates");
    if v.candidates.is_empty() {
        line(s, format!("  {}", wording::NO_CANDIDATE));
    } else {
        line(s, format!("  {}", v.count_sentence()));
        line(s, format!("  {:>4}  {:>7}  groups", "rank", "score"));
        for c in &v.candidates {
            line(
                s,
                format!("  {:>4}  {:>7.2}  {}", c.rank, c.score, c.groups_text),
            );
        }
        for c in &v.candidates {
            s.push('\n');
            line(s, format!("  #{} {}", c.rank, c.groups_text));
            line(s, format!("      {}", c.dbe_accounting));
            for a in &c.atom_accounting {
                line(s, format!("      {a}"));
            }
            for w in &c.supporting {
                line(s, format!("      {}", wording::supporting(&flat(w))));
            }
            for w in &c.weakening {
                line(s, format!("      {}", wording::weakening(&flat(w))));
            }
        }
    }
}

/// Observed bands against the leading candidates, with the rules behind them.
fn band_assignments(s: &mut String, v: &ReportView) {
    heading(s, "band assignments");
    if v.band_table.rows.is_empty() {
        line(s, format!("  {}", wording::NO_BANDS));
    } else {
        let width = 30;
        let mut head = format!("  {:>7}  {:<8}  {:<6}", "cm⁻¹", "strength", "shape");
        for r in &v.band_table.ranks {
            let _ = write!(head, "  {:<width$}", format!("#{r}"));
        }
        line(s, head.trim_end());
        for row in &v.band_table.rows {
            let mut l = format!(
                "  {:>7.1}  {:<8}  {:<6}",
                row.at,
                row.strength,
                row.shape.as_deref().unwrap_or("-")
            );
            for i in 0..v.band_table.ranks.len() {
                let _ = write!(l, "  {:<width$}", cell_text(row, i));
            }
            let _ = write!(l, "  from {}", row.place);
            line(s, l.trim_end());
        }
        if !v.band_table.treatments.is_empty() {
            line(s, format!("  {}:", wording::TREATMENTS));
            for t in &v.band_table.treatments {
                line(s, format!("    {}", flat(t)));
            }
        }
        if let Some(first) = v.band_table.rows.first() {
            if !first.cells.is_empty() {
                line(s, format!("  {}:", wording::ASSIGNMENT_RULES));
                let mut seen = Vec::new();
                for row in &v.band_table.rows {
                    if let Some(rule) = row.cells.first().and_then(|c| c.rule.as_ref()) {
                        if !seen.contains(rule) {
                            line(s, format!("    {} — {rule}", row.label()));
                            seen.push(rule.clone());
                        }
                    }
                }
            }
        }
    }
}

/// Ruled out, near misses, conflicts and discriminating checks.
fn verdicts(s: &mut String, v: &ReportView) {
    if !v.ruled_out.is_empty() {
        heading(s, "ruled out");
        let width = v.ruled_out.iter().map(|r| r.group.len()).max().unwrap_or(0);
        for r in &v.ruled_out {
            line(
                s,
                format!(
                    "  {:<width$}  {}{}",
                    r.group,
                    flat(&r.reason),
                    wording::ruled_out_rule(r.rule.as_deref())
                ),
            );
        }
    }
    if !v.near_misses.is_empty() {
        heading(s, "near misses");
        for n in &v.near_misses {
            line(
                s,
                format!("  {}", wording::near_miss(&n.groups, &n.reasons)),
            );
        }
    }
    if !v.conflicts.is_empty() {
        heading(s, "conflicts");
        for c in &v.conflicts {
            line(s, format!("  {}:", wording::CONFLICT));
            for i in &c.items {
                line(s, format!("    - {i}"));
            }
            for e in &c.explanation {
                line(s, format!("    {}", wording::because(&e.text)));
            }
            for limit in &c.search_limits {
                line(s, format!("    {}", wording::search_limit(limit)));
            }
            for cause in &c.suggested_causes {
                line(s, format!("    {}", wording::check_cause(cause)));
            }
        }
    }
    if !v.discriminating_checks.is_empty() {
        heading(s, "discriminating checks");
        for d in &v.discriminating_checks {
            line(s, format!("  {}", wording::discriminating(d, "#")));
        }
    }
}

/// The library search, the analyst's conclusion, the review and the notes.
fn case_record(s: &mut String, v: &ReportView) {
    if let Some(l) = &v.library {
        heading(s, "reference library");
        s.push_str(&super::library::text(l));
    }
    if let Some(c) = &v.conclusion {
        heading(s, "analyst's conclusion");
        line(s, format!("  {:<14} {}", "accepted", c.accepted_text));
        line(s, format!("  {:<14} {}", "standing", c.standing));
        field(s, "comments", c.comments.as_ref());
    }
    if let Some(r) = &v.review {
        heading(s, "review");
        field(s, "reviewer", r.reviewer.as_ref());
        field(s, "date", r.date.as_ref());
        if let Some(verdict) = r.verdict {
            line(s, format!("  {:<14} {}", "verdict", verdict.word()));
        }
        field(s, "comments", r.comments.as_ref());
    }
    if let Some(n) = &v.notes {
        heading(s, "notes");
        for l in n.lines() {
            line(s, format!("  {l}"));
        }
    }
}

/// Where the report came from, and the cautions in full.
fn provenance(s: &mut String, v: &ReportView) {
    heading(s, "provenance");
    let p = &v.provenance;
    line(s, format!("  {:<14} {}", "quiddity", p.quiddity_version));
    line(s, format!("  {:<14} {}", "rules digest", p.rules_digest));
    line(
        s,
        format!("  {:<14} ±{} cm⁻¹", "tolerance", p.tolerance_cm1),
    );
    for i in &p.inputs {
        line(
            s,
            format!("  {:<14} {}  sha256 {}", i.role, flat(&i.path), i.sha256),
        );
    }
    if let Some(t) = &p.generated_at {
        line(s, format!("  {:<14} {t}", "generated"));
    }
    heading(s, "cautions");
    for c in &v.cautions {
        line(s, format!("  - {c}"));
    }
}
