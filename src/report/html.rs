//! HTML report: one self-contained page (inline style, inline SVG, no script, no external
//! font, image or link), so it opens the same offline and in an archive. Every
//! user-supplied string goes through [`escape`].

use super::text::cell_text;
use super::view::{CellKind, ReportView};
use super::wording::{self, capitalised};
use std::fmt::Write;

/// Escapes text for HTML element content and attribute values.
pub fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            _ => out.push(c),
        }
    }
    out
}

const STYLE: &str = "body{font-family:system-ui,sans-serif;margin:2em auto;max-width:62em;color:#1d1d1d;line-height:1.4}\
h1{font-size:1.5em;margin-bottom:.2em}h2{font-size:1.15em;border-bottom:1px solid #c9c2b2;margin-top:1.6em}\
table{border-collapse:collapse;margin:.5em 0}td,th{border:1px solid #d8d2c4;padding:.2em .5em;vertical-align:top;text-align:left}\
th{background:#f4f1ea}td.num{text-align:right;font-variant-numeric:tabular-nums}\
.caution{background:#fff4e0;border-left:4px solid #a06b00;padding:.5em 1em}\
.unexplained{color:#b3261e;font-weight:bold}svg.spectrum{width:100%;height:auto}code{font-size:.9em}.legend span{margin-right:1.5em}";

fn row(s: &mut String, cells: &[String]) {
    s.push_str("<tr>");
    for c in cells {
        let _ = write!(s, "<td>{c}</td>");
    }
    s.push_str("</tr>\n");
}

fn kv(s: &mut String, label: &str, value: Option<&String>) {
    if let Some(v) = value {
        let _ = writeln!(
            s,
            "<tr><th>{}</th><td>{}</td></tr>",
            escape(label),
            escape(v)
        );
    }
}

/// Renders the HTML page, section by section.
pub fn render(v: &ReportView) -> String {
    SECTIONS.render(v)
}

/// This format's sections.
const SECTIONS: super::Sections = super::module_sections!(head);

/// The document head, the title and the cautions in one sentence.
fn head(s: &mut String, v: &ReportView) {
    let title = [v.case.as_deref(), v.title.as_deref()]
        .iter()
        .flatten()
        .copied()
        .collect::<Vec<_>>()
        .join(" · ");
    let _ = writeln!(
        s,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n<title>quiddity case report{}{}</title>\n<style>{STYLE}</style>\n</head>\n<body>",
        if title.is_empty() { "" } else { ": " },
        escape(&title)
    );
    let _ = writeln!(
        s,
        "<h1 id=\"case-title\">{}</h1>",
        escape(if title.is_empty() {
            "quiddity case report"
        } else {
            &title
        })
    );
    let _ = writeln!(
        s,
        "<p class=\"caution\"><strong>{}:</strong> {}.</p>",
        capitalised(wording::CAUTION),
        escape(&wording::cautions(&v.cautions))
    );
}

/// The sample table, when the case describes the sample.
fn sample(s: &mut String, v: &ReportView) {
    let smp = &v.sample;
    if [
        &smp.received,
        &smp.requested_by,
        &smp.description,
        &smp.technique,
        &smp.analyst,
    ]
    .iter()
    .any(|x| x.is_some())
    {
        s.push_str("<h2>Sample</h2>\n<table>\n");
        kv(s, "received", smp.received.as_ref());
        kv(s, "requested by", smp.requested_by.as_ref());
        kv(s, "description", smp.description.as_ref());
        kv(s, "techniques", smp.technique.as_ref());
        kv(s, "analyst", smp.analyst.as_ref());
        s.push_str("</table>\n");
    }
}

/// The evidence the case holds, and the plot of its bands.
fn evidence(s: &mut String, v: &ReportView) {
    s.push_str("<h2>Evidence</h2>\n<table>\n");
    let e = &v.evidence;
    kv(s, "formula", e.formula_written.as_ref());
    for m in &e.ms {
        kv(s, "ms", Some(m));
    }
    if let Some((lo, hi)) = e.ir_window {
        let ir = wording::ir_evidence(
            e.ir_technique.as_deref(),
            (lo, hi),
            e.n_bands_written,
            e.n_bands_picked,
        );
        kv(s, "ir", Some(&ir));
    }
    kv(s, "spectrum file", e.spectrum_file.as_ref());
    kv(s, "spectrum title", e.spectrum_title.as_ref());
    for n in &e.spectrum_notes {
        kv(s, "spectrum note", Some(n));
    }
    s.push_str("</table>\n");

    if !v.band_table.rows.is_empty() {
        s.push_str("<h2>Spectrum and band marks</h2>\n");
        s.push_str(&super::svg::render(v));
        s.push_str("<p class=\"legend\"><span style=\"color:#0f6e68\">▼ explained by a group</span><span style=\"color:#5b5f97\">○ skeleton, pattern or artefact</span><span style=\"color:#b3261e\">× unexplained</span><span>shaded: fingerprint region (below 1500 cm⁻¹)</span></p>\n");
    }
}

/// Masses and DBE of the formula, and the formula against the mass spectrum.
fn formula(s: &mut String, v: &ReportView) {
    if let Some(f) = &v.formula_facts {
        s.push_str("<h2>Formula facts</h2>\n<table>\n");
        let _ = writeln!(
            s,
            "<tr><th>formula (Hill order)</th><td>{}</td></tr>",
            escape(&f.formula)
        );
        let _ = writeln!(
            s,
            "<tr><th>monoisotopic mass</th><td class=\"num\">{:.6} u</td></tr>",
            f.monoisotopic_mass
        );
        let _ = writeln!(
            s,
            "<tr><th>average mass</th><td class=\"num\">{:.4} u</td></tr>",
            f.average_mass
        );
        let _ = writeln!(
            s,
            "<tr><th>nominal mass</th><td class=\"num\">{}</td></tr>",
            f.nominal_mass
        );
        let _ = writeln!(
            s,
            "<tr><th>DBE</th><td class=\"num\">{}</td></tr>",
            wording::dbe(f.dbe)
        );
        s.push_str("</table>\n");
    }
    if !v.evidence_checks.is_empty() {
        s.push_str("<h2>Formula against the mass spectrum</h2>\n<ul>\n");
        for c in &v.evidence_checks {
            let _ = writeln!(
                s,
                "<li>{} {}</li>",
                if c.agrees {
                    wording::agreement(true).to_owned()
                } else {
                    format!(
                        "<span class=\"unexplained\">{}</span>",
                        wording::agreement(false)
                    )
                },
                escape(&wording::evidence_check(c))
            );
        }
        s.push_str("</ul>\n");
    }
}

/// The salt or hydrate reading and the mixture reading, when there is one.
fn salt_and_mixture(s: &mut String, v: &ReportView) {
    if let Some(salt) = &v.salt {
        s.push_str("<h2>Salt, hydrate and counter-ion</h2>\n<ul>\n");
        for l in super::wording::salt_lines(salt) {
            let _ = writeln!(s, "<li>{}</li>", escape(&l));
        }
        s.push_str("</ul>\n");
    }
    if let Some(m) = &v.mixture {
        s.push_str("<h2>Mixture</h2>\n<ul>\n");
        for l in super::wording::mixture_lines(m) {
            let _ = writeln!(s, "<li>{}</li>", escape(&l));
        }
        s.push_str("</ul>\n");
    }
}

/// The ranked candidates with their accounting and evidence.
fn candidates(s: &mut String, v: &ReportView) {
    s.push_str("<h2>Candidates</h2>\n");
    if v.candidates.is_empty() {
        let _ = writeln!(s, "<p>{}.</p>", escape(&capitalised(wording::NO_CANDIDATE)));
    } else {
        let _ = writeln!(s, "<p>{}.</p>", v.count_sentence());
        s.push_str("<table class=\"candidates\">\n<tr><th>rank</th><th>score</th><th>groups</th><th>DBE</th><th>atoms</th><th>for / against</th></tr>\n");
        for c in &v.candidates {
            let notes: Vec<String> = c
                .supporting
                .iter()
                .map(|w| escape(&wording::supporting(w)))
                .chain(c.weakening.iter().map(|w| escape(&wording::weakening(w))))
                .collect();
            row(
                s,
                &[
                    c.rank.to_string(),
                    format!("{:.2}", c.score),
                    escape(&c.groups_text),
                    escape(&c.dbe_accounting),
                    c.atom_accounting
                        .iter()
                        .map(|a| escape(a))
                        .collect::<Vec<_>>()
                        .join("<br>"),
                    notes.join("<br>"),
                ],
            );
        }
        s.push_str("</table>\n");
    }
}

/// Observed bands against the leading candidates.
fn band_assignments(s: &mut String, v: &ReportView) {
    s.push_str("<h2>Band assignments</h2>\n");
    if v.band_table.rows.is_empty() {
        let _ = writeln!(s, "<p>{}.</p>", capitalised(wording::NO_BANDS));
    } else {
        s.push_str("<table class=\"bands\">\n<tr><th>cm⁻¹</th><th>strength</th><th>shape</th><th>from</th>");
        for r in &v.band_table.ranks {
            let _ = write!(s, "<th>#{r}</th>");
        }
        s.push_str("</tr>\n");
        for b in &v.band_table.rows {
            let mut cells = vec![
                format!("{:.1}", b.at),
                escape(&b.strength),
                escape(b.shape.as_deref().unwrap_or("-")),
                escape(&b.place),
            ];
            for i in 0..v.band_table.ranks.len() {
                let t = escape(&cell_text(b, i));
                let cell = b.cells.get(i);
                cells.push(
                    match (cell.map(|c| c.kind), cell.and_then(|c| c.rule.as_ref())) {
                        (Some(CellKind::Unexplained), _) if b.demanded => {
                            format!("<span class=\"unexplained\">{t}</span>")
                        }
                        (_, Some(r)) => format!("{t}<br><small>{}</small>", escape(r)),
                        _ => t,
                    },
                );
            }
            row(s, &cells);
        }
        s.push_str("</table>\n");
        if !v.band_table.treatments.is_empty() {
            let _ = writeln!(s, "<p>{}:</p>\n<ul>", capitalised(wording::TREATMENTS));
            for t in &v.band_table.treatments {
                let _ = writeln!(s, "<li>{}</li>", escape(t));
            }
            s.push_str("</ul>\n");
        }
    }
}

/// Ruled out, near misses, conflicts and discriminating checks.
fn verdicts(s: &mut String, v: &ReportView) {
    if !v.ruled_out.is_empty() {
        s.push_str(
            "<h2>Ruled out</h2>\n<table>\n<tr><th>group</th><th>why</th><th>rule</th></tr>\n",
        );
        for r in &v.ruled_out {
            row(
                s,
                &[
                    escape(&r.group),
                    escape(&r.reason),
                    escape(r.rule.as_deref().unwrap_or("")),
                ],
            );
        }
        s.push_str("</table>\n");
    }
    if !v.near_misses.is_empty() {
        s.push_str("<h2>Near misses</h2>\n<ul>\n");
        for n in &v.near_misses {
            let _ = writeln!(
                s,
                "<li>{}</li>",
                escape(&wording::near_miss(&n.groups, &n.reasons))
            );
        }
        s.push_str("</ul>\n");
    }
    if !v.conflicts.is_empty() {
        s.push_str("<h2>Conflicts</h2>\n");
        for c in &v.conflicts {
            let _ = writeln!(s, "<p>{}:</p>\n<ul>", capitalised(wording::CONFLICT));
            for i in &c.items {
                let _ = writeln!(s, "<li>{}</li>", escape(i));
            }
            for x in &c.explanation {
                let _ = writeln!(s, "<li>{}</li>", escape(&wording::because(&x.text)));
            }
            for x in &c.search_limits {
                let _ = writeln!(s, "<li>{}</li>", escape(&wording::search_limit(x)));
            }
            for x in &c.suggested_causes {
                let _ = writeln!(s, "<li>{}</li>", escape(&wording::check_cause(x)));
            }
            s.push_str("</ul>\n");
        }
    }
    if !v.discriminating_checks.is_empty() {
        s.push_str("<h2>Discriminating checks</h2>\n<ul>\n");
        for d in &v.discriminating_checks {
            let _ = writeln!(s, "<li>{}</li>", escape(&wording::discriminating(d, "#")));
        }
        s.push_str("</ul>\n");
    }
}

/// The library search, the analyst's conclusion, the review and the notes.
fn case_record(s: &mut String, v: &ReportView) {
    if let Some(l) = &v.library {
        s.push_str(&super::library::html(l, v.library_overlay.as_ref()));
    }
    if let Some(c) = &v.conclusion {
        s.push_str("<h2>Analyst's conclusion</h2>\n<table>\n");
        kv(s, "accepted", Some(&c.accepted_text));
        kv(s, "standing", Some(&c.standing));
        kv(s, "comments", c.comments.as_ref());
        s.push_str("</table>\n");
    }
    if let Some(r) = &v.review {
        s.push_str("<h2>Review</h2>\n<table>\n");
        kv(s, "reviewer", r.reviewer.as_ref());
        kv(s, "date", r.date.as_ref());
        kv(
            s,
            "verdict",
            r.verdict.map(|x| x.word().to_owned()).as_ref(),
        );
        kv(s, "comments", r.comments.as_ref());
        s.push_str("</table>\n");
    }
    if let Some(n) = &v.notes {
        let _ = writeln!(
            s,
            "<h2>Notes</h2>\n<pre class=\"notes\">{}</pre>",
            escape(n)
        );
    }
}

/// Where the report came from, the cautions in full, and the end of the page.
fn provenance(s: &mut String, v: &ReportView) {
    s.push_str("<h2>Provenance</h2>\n<table>\n");
    let p = &v.provenance;
    kv(s, "quiddity", Some(&p.quiddity_version));
    kv(s, "rules digest", Some(&p.rules_digest));
    kv(s, "tolerance", Some(&format!("±{} cm⁻¹", p.tolerance_cm1)));
    for i in &p.inputs {
        let _ = writeln!(
            s,
            "<tr><th>{}</th><td>{}<br><code>sha256 {}</code></td></tr>",
            escape(i.role.word()),
            escape(&i.path),
            escape(&i.sha256)
        );
    }
    kv(s, "generated", p.generated_at.as_ref());
    s.push_str("</table>\n<h2>Cautions</h2>\n<ul class=\"cautions\">\n");
    for c in &v.cautions {
        let _ = writeln!(s, "<li>{}</li>", escape(c));
    }
    s.push_str("</ul>\n</body>\n</html>\n");
}
