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

/// Renders the text report.
pub fn render(v: &ReportView) -> String {
    let mut s = String::new();
    let head = match (&v.case, &v.title) {
        (Some(c), Some(t)) => format!("quiddity case report · {} · {}", flat(c), flat(t)),
        (Some(c), None) => format!("quiddity case report · {}", flat(c)),
        (None, Some(t)) => format!("quiddity case report · {}", flat(t)),
        (None, None) => "quiddity case report".to_owned(),
    };
    line(&mut s, &head);
    line(&mut s, "=".repeat(head.chars().count()));
    line(&mut s, wording::cautions_sentence(&v.cautions));

    let smp = &v.sample;
    if smp.received.is_some()
        || smp.requested_by.is_some()
        || smp.description.is_some()
        || smp.technique.is_some()
        || smp.analyst.is_some()
    {
        heading(&mut s, "sample");
        field(&mut s, "received", smp.received.as_ref());
        field(&mut s, "requested by", smp.requested_by.as_ref());
        field(&mut s, "description", smp.description.as_ref());
        field(&mut s, "techniques", smp.technique.as_ref());
        field(&mut s, "analyst", smp.analyst.as_ref());
    }

    heading(&mut s, "evidence");
    let e = &v.evidence;
    field(&mut s, "formula", e.formula_written.as_ref());
    for m in &e.ms {
        line(&mut s, format!("  {:<14} {m}", "ms"));
    }
    if let Some((lo, hi)) = e.ir_window {
        line(
            &mut s,
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
    field(&mut s, "spectrum file", e.spectrum_file.as_ref());
    field(&mut s, "spectrum title", e.spectrum_title.as_ref());
    for n in &e.spectrum_notes {
        line(&mut s, format!("  {:<14} {}", "spectrum note", flat(n)));
    }

    if let Some(f) = &v.formula_facts {
        heading(&mut s, "formula facts");
        line(
            &mut s,
            format!("  {:<22} {}", "formula (Hill order)", f.formula),
        );
        line(
            &mut s,
            format!("  {:<22} {:.6} u", "monoisotopic mass", f.monoisotopic_mass),
        );
        line(
            &mut s,
            format!("  {:<22} {:.4} u", "average mass", f.average_mass),
        );
        line(
            &mut s,
            format!("  {:<22} {}", "nominal mass", f.nominal_mass),
        );
        line(&mut s, format!("  {:<22} {}", "DBE", wording::dbe(f.dbe)));
    }
    if !v.evidence_checks.is_empty() {
        heading(&mut s, "formula against the mass spectrum");
        for c in &v.evidence_checks {
            line(
                &mut s,
                format!(
                    "  {:<9} {}",
                    wording::agreement(c.agrees),
                    wording::evidence_check(c)
                ),
            );
        }
    }

    if let Some(salt) = &v.salt {
        heading(&mut s, "salt, hydrate and counter-ion");
        for l in super::wording::salt_lines(salt) {
            line(&mut s, format!("  {l}"));
        }
    }

    if let Some(m) = &v.mixture {
        heading(&mut s, "mixture");
        for l in super::wording::mixture_lines(m) {
            line(&mut s, format!("  {l}"));
        }
    }

    heading(&mut s, "candidates");
    if v.candidates.is_empty() {
        line(&mut s, format!("  {}", wording::NO_CANDIDATE));
    } else {
        line(&mut s, format!("  {}", v.count_sentence()));
        line(&mut s, format!("  {:>4}  {:>7}  groups", "rank", "score"));
        for c in &v.candidates {
            line(
                &mut s,
                format!("  {:>4}  {:>7.2}  {}", c.rank, c.score, c.groups_text),
            );
        }
        for c in &v.candidates {
            s.push('\n');
            line(&mut s, format!("  #{} {}", c.rank, c.groups_text));
            line(&mut s, format!("      {}", c.dbe_accounting));
            for a in &c.atom_accounting {
                line(&mut s, format!("      {a}"));
            }
            for w in &c.supporting {
                line(&mut s, format!("      {}", wording::supporting(&flat(w))));
            }
            for w in &c.weakening {
                line(&mut s, format!("      {}", wording::weakening(&flat(w))));
            }
        }
    }

    heading(&mut s, "band assignments");
    if v.band_table.rows.is_empty() {
        line(&mut s, format!("  {}", wording::NO_BANDS));
    } else {
        let width = 30;
        let mut head = format!("  {:>7}  {:<8}  {:<6}", "cm⁻¹", "strength", "shape");
        for r in &v.band_table.ranks {
            let _ = write!(head, "  {:<width$}", format!("#{r}"));
        }
        line(&mut s, head.trim_end());
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
            line(&mut s, l.trim_end());
        }
        if !v.band_table.treatments.is_empty() {
            line(&mut s, format!("  {}:", wording::TREATMENTS));
            for t in &v.band_table.treatments {
                line(&mut s, format!("    {}", flat(t)));
            }
        }
        if let Some(first) = v.band_table.rows.first() {
            if !first.cells.is_empty() {
                line(&mut s, format!("  {}:", wording::ASSIGNMENT_RULES));
                let mut seen = Vec::new();
                for row in &v.band_table.rows {
                    if let Some(rule) = row.cells.first().and_then(|c| c.rule.as_ref()) {
                        if !seen.contains(rule) {
                            line(&mut s, format!("    {} — {rule}", row.label()));
                            seen.push(rule.clone());
                        }
                    }
                }
            }
        }
    }

    if !v.ruled_out.is_empty() {
        heading(&mut s, "ruled out");
        let width = v.ruled_out.iter().map(|r| r.group.len()).max().unwrap_or(0);
        for r in &v.ruled_out {
            line(
                &mut s,
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
        heading(&mut s, "near misses");
        for n in &v.near_misses {
            line(
                &mut s,
                format!("  {}", wording::near_miss(&n.groups, &n.lacked)),
            );
        }
    }
    if !v.conflicts.is_empty() {
        heading(&mut s, "conflicts");
        for c in &v.conflicts {
            line(&mut s, format!("  {}:", wording::CONFLICT));
            for i in &c.items {
                line(&mut s, format!("    - {i}"));
            }
            for e in &c.explanation {
                line(&mut s, format!("    {}", wording::because(e)));
            }
            for limit in &c.search_limits {
                line(&mut s, format!("    {}", wording::search_limit(limit)));
            }
            for cause in &c.suggested_causes {
                line(&mut s, format!("    {}", wording::check_cause(cause)));
            }
        }
    }
    if !v.discriminating_checks.is_empty() {
        heading(&mut s, "discriminating checks");
        for d in &v.discriminating_checks {
            line(&mut s, format!("  {}", wording::discriminating(d, "#")));
        }
    }
    if let Some(l) = &v.library {
        heading(&mut s, "reference library");
        s.push_str(&super::library::text(l));
    }
    if let Some(c) = &v.conclusion {
        heading(&mut s, "analyst's conclusion");
        line(&mut s, format!("  {:<14} {}", "accepted", c.accepted_text));
        line(&mut s, format!("  {:<14} {}", "standing", c.standing));
        field(&mut s, "comments", c.comments.as_ref());
    }
    if let Some(r) = &v.review {
        heading(&mut s, "review");
        field(&mut s, "reviewer", r.reviewer.as_ref());
        field(&mut s, "date", r.date.as_ref());
        if let Some(verdict) = r.verdict {
            line(&mut s, format!("  {:<14} {}", "verdict", verdict.word()));
        }
        field(&mut s, "comments", r.comments.as_ref());
    }
    if let Some(n) = &v.notes {
        heading(&mut s, "notes");
        for l in n.lines() {
            line(&mut s, format!("  {l}"));
        }
    }
    heading(&mut s, "provenance");
    let p = &v.provenance;
    line(
        &mut s,
        format!("  {:<14} {}", "quiddity", p.quiddity_version),
    );
    line(
        &mut s,
        format!("  {:<14} {}", "rules digest", p.rules_digest),
    );
    line(
        &mut s,
        format!("  {:<14} ±{} cm⁻¹", "tolerance", p.tolerance_cm1),
    );
    for i in &p.inputs {
        line(
            &mut s,
            format!("  {:<14} {}  sha256 {}", i.role, flat(&i.path), i.sha256),
        );
    }
    if let Some(t) = &p.generated_at {
        line(&mut s, format!("  {:<14} {t}", "generated"));
    }
    heading(&mut s, "cautions");
    for c in &v.cautions {
        line(&mut s, format!("  - {c}"));
    }
    s
}
