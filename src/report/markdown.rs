//! Markdown report: the same sections as the text report, as headings, lists and tables.
//! Every user-supplied string is escaped so that it stays text (no markup, no raw HTML).

use super::text::{cell_text, flat};
use super::view::ReportView;
use super::wording::{self, capitalised};

/// Escapes free text for Markdown: one line, inline markup characters backslash-escaped
/// (emphasis, code, links, raw HTML, table pipes, entities, strike-through). Line-start
/// markup (`#`, `-`, `1.`) needs no escape: every call site puts a prefix before the text.
pub fn md(text: &str) -> String {
    let mut out = String::new();
    for c in flat(text).chars() {
        if "\\`*_[]<>|&~".contains(c) {
            out.push('\\');
        }
        out.push(c);
    }
    out
}

/// A pusher of whole lines onto `s`.
fn lines(s: &mut String) -> impl FnMut(String) + '_ {
    move |t| {
        s.push_str(&t);
        s.push('\n');
    }
}

/// Renders the Markdown report, section by section.
pub fn render(v: &ReportView) -> String {
    SECTIONS.render(v)
}

/// This format's sections.
const SECTIONS: super::Sections = super::module_sections!(title);

/// The title and the cautions in one sentence.
fn title(s: &mut String, v: &ReportView) {
    let mut push = lines(s);
    let title = [v.case.as_deref(), v.title.as_deref()]
        .iter()
        .flatten()
        .map(|t| md(t))
        .collect::<Vec<_>>()
        .join(" · ");
    push(format!(
        "# quiddity case report{}{title}",
        if title.is_empty() { "" } else { ": " }
    ));
    push(String::new());
    push(format!(
        "> **{}:** {}.",
        capitalised(wording::CAUTION),
        md(&wording::cautions(&v.cautions))
    ));
}

/// The sample block, when the case describes the sample.
fn sample(s: &mut String, v: &ReportView) {
    let mut push = lines(s);
    let smp = &v.sample;
    let sample_rows: Vec<(&str, &Option<String>)> = vec![
        ("received", &smp.received),
        ("requested by", &smp.requested_by),
        ("description", &smp.description),
        ("techniques", &smp.technique),
        ("analyst", &smp.analyst),
    ];
    if sample_rows.iter().any(|(_, x)| x.is_some()) {
        push("\n## Sample\n".into());
        for (k, x) in sample_rows {
            if let Some(x) = x {
                push(format!("- **{k}:** {}", md(x)));
            }
        }
    }
}

/// The evidence the case holds.
fn evidence(s: &mut String, v: &ReportView) {
    let mut push = lines(s);
    push("\n## Evidence\n".into());
    let e = &v.evidence;
    if let Some(f) = &e.formula_written {
        push(format!("- **formula:** {}", md(f)));
    }
    for m in &e.ms {
        push(format!("- **ms:** {}", md(m)));
    }
    if let Some((lo, hi)) = e.ir_window {
        push(format!(
            "- **ir:** {}",
            md(&wording::ir_evidence(
                e.ir_technique.as_deref(),
                (lo, hi),
                e.n_bands_written,
                e.n_bands_picked
            ))
        ));
    }
    if let Some(f) = &e.spectrum_file {
        push(format!("- **spectrum file:** {}", md(f)));
    }
    if let Some(t) = &e.spectrum_title {
        push(format!("- **spectrum title:** {}", md(t)));
    }
    for n in &e.spectrum_notes {
        push(format!("- **spectrum note:** {}", md(n)));
    }
}

/// Masses and DBE of the formula, and the formula against the mass spectrum.
fn formula(s: &mut String, v: &ReportView) {
    let mut push = lines(s);
    if let Some(f) = &v.formula_facts {
        push("\n## Formula facts\n".into());
        push("| quantity | value |\n|---|---|".into());
        push(format!("| formula (Hill order) | {} |", md(&f.formula)));
        push(format!(
            "| monoisotopic mass | {:.6} u |",
            f.monoisotopic_mass
        ));
        push(format!("| average mass | {:.4} u |", f.average_mass));
        push(format!("| nominal mass | {} |", f.nominal_mass));
        push(format!("| DBE | {} |", wording::dbe(f.dbe)));
    }
    if !v.evidence_checks.is_empty() {
        push("\n## Formula against the mass spectrum\n".into());
        for c in &v.evidence_checks {
            push(format!(
                "- {} {}",
                wording::agreement(c.agrees),
                md(&wording::evidence_check(c))
            ));
        }
    }
}

/// The salt or hydrate reading and the mixture reading, when there is one.
fn salt_and_mixture(s: &mut String, v: &ReportView) {
    let mut push = lines(s);
    if let Some(salt) = &v.salt {
        push("\n## Salt, hydrate and counter-ion\n".into());
        for l in super::wording::salt_lines(salt) {
            push(format!("- {}", md(&l)));
        }
    }
    if let Some(m) = &v.mixture {
        push("\n## Mixture\n".into());
        for l in super::wording::mixture_lines(m) {
            push(format!("- {}", md(&l)));
        }
    }
}

/// The ranked candidates, then the evidence for and against each.
fn candidates(s: &mut String, v: &ReportView) {
    let mut push = lines(s);
    push("\n## Candidates\n".into());
    if v.candidates.is_empty() {
        push(md(&capitalised(wording::NO_CANDIDATE)) + ".");
    } else {
        push(format!("{}.\n", v.count_sentence()));
        push("| rank | score | groups | DBE | atoms |\n|---:|---:|---|---|---|".into());
        for c in &v.candidates {
            push(format!(
                "| {} | {:.2} | {} | {} | {} |",
                c.rank,
                c.score,
                md(&c.groups_text),
                md(&c.dbe_accounting),
                c.atom_accounting
                    .iter()
                    .map(|a| md(a))
                    .collect::<Vec<_>>()
                    .join("<br>")
            ));
        }
        for c in v
            .candidates
            .iter()
            .filter(|c| !c.supporting.is_empty() || !c.weakening.is_empty())
        {
            push(format!("\n**#{} {}**\n", c.rank, md(&c.groups_text)));
            for w in &c.supporting {
                push(format!("- {}", md(&wording::supporting(w))));
            }
            for w in &c.weakening {
                push(format!("- {}", md(&wording::weakening(w))));
            }
        }
    }
}

/// Observed bands against the leading candidates.
fn band_assignments(s: &mut String, v: &ReportView) {
    let mut push = lines(s);
    push("\n## Band assignments\n".into());
    if v.band_table.rows.is_empty() {
        push(capitalised(wording::NO_BANDS) + ".");
    } else {
        let mut head = "| cm⁻¹ | strength | shape |".to_owned();
        let mut rule = "|---:|---|---|".to_owned();
        for r in &v.band_table.ranks {
            head.push_str(&format!(" #{r} |"));
            rule.push_str("---|");
        }
        push(head);
        push(rule);
        for row in &v.band_table.rows {
            let mut l = format!(
                "| {:.1} | {} | {} |",
                row.at,
                md(&row.strength),
                md(row.shape.as_deref().unwrap_or("-"))
            );
            for i in 0..v.band_table.ranks.len() {
                l.push_str(&format!(" {} |", md(&cell_text(row, i))));
            }
            push(l);
        }
        if !v.band_table.treatments.is_empty() {
            push(format!("\n{}:\n", capitalised(wording::TREATMENTS)));
            for t in &v.band_table.treatments {
                push(format!("- {}", md(t)));
            }
        }
    }
}

/// Ruled out, near misses, conflicts and discriminating checks.
fn verdicts(s: &mut String, v: &ReportView) {
    let mut push = lines(s);
    if !v.ruled_out.is_empty() {
        push("\n## Ruled out\n".into());
        push("| group | why | rule |\n|---|---|---|".into());
        for r in &v.ruled_out {
            push(format!(
                "| {} | {} | {} |",
                md(&r.group),
                md(&r.reason),
                md(r.rule.as_deref().unwrap_or(""))
            ));
        }
    }
    if !v.near_misses.is_empty() {
        push("\n## Near misses\n".into());
        for n in &v.near_misses {
            push(format!(
                "- {}",
                md(&wording::near_miss(&n.groups, &n.reasons))
            ));
        }
    }
    if !v.conflicts.is_empty() {
        push("\n## Conflicts\n".into());
        for c in &v.conflicts {
            push(format!("{}:\n", capitalised(wording::CONFLICT)));
            for i in &c.items {
                push(format!("- {}", md(i)));
            }
            for x in &c.explanation {
                push(format!("- {}", md(&wording::because(&x.text))));
            }
            for x in &c.search_limits {
                push(format!("- {}", md(&wording::search_limit(x))));
            }
            for x in &c.suggested_causes {
                push(format!("- {}", md(&wording::check_cause(x))));
            }
        }
    }
    if !v.discriminating_checks.is_empty() {
        push("\n## Discriminating checks\n".into());
        for d in &v.discriminating_checks {
            // `#` escaped so that no renderer takes `#2` for a link.
            push(format!(
                "- {}",
                md(&wording::discriminating(d, "#")).replace('#', "\\#")
            ));
        }
    }
}

/// The library search, the analyst's conclusion, the review and the notes.
fn case_record(s: &mut String, v: &ReportView) {
    let mut push = lines(s);
    if let Some(l) = &v.library {
        push(super::library::markdown(l).trim_end().to_owned());
    }
    if let Some(c) = &v.conclusion {
        push("\n## Analyst's conclusion\n".into());
        push(format!("- **accepted:** {}", md(&c.accepted_text)));
        push(format!("- **standing:** {}", md(&c.standing)));
        if let Some(x) = &c.comments {
            push(format!("- **comments:** {}", md(x)));
        }
    }
    if let Some(r) = &v.review {
        push("\n## Review\n".into());
        if let Some(x) = &r.reviewer {
            push(format!("- **reviewer:** {}", md(x)));
        }
        if let Some(x) = &r.date {
            push(format!("- **date:** {}", md(x)));
        }
        if let Some(x) = r.verdict {
            push(format!("- **verdict:** {}", x.word()));
        }
        if let Some(x) = &r.comments {
            push(format!("- **comments:** {}", md(x)));
        }
    }
    if let Some(n) = &v.notes {
        push("\n## Notes\n".into());
        for l in n.lines().filter(|l| !l.trim().is_empty()) {
            push(format!("> {}", md(l)));
        }
    }
}

/// Where the report came from, and the cautions in full.
fn provenance(s: &mut String, v: &ReportView) {
    let mut push = lines(s);
    push("\n## Provenance\n".into());
    let p = &v.provenance;
    push(format!("- **quiddity:** {}", md(&p.quiddity_version)));
    push(format!("- **rules digest:** `{}`", p.rules_digest));
    push(format!("- **tolerance:** ±{} cm⁻¹", p.tolerance_cm1));
    for i in &p.inputs {
        push(format!(
            "- **{}:** {} — sha256 `{}`",
            i.role,
            md(&i.path),
            i.sha256
        ));
    }
    if let Some(t) = &p.generated_at {
        push(format!("- **generated:** {}", md(t)));
    }
    push("\n## Cautions\n".into());
    for c in &v.cautions {
        push(format!("- {c}"));
    }
}
