//! The library section of every report format: what was compared, the verdict sentence,
//! the hit table (similarity, name, formula, standing), each hit's checks and regions, the
//! caution; and for HTML the overlay plot of the unknown and its best hits (wavenumber
//! decreasing to the right, fingerprint region shaded, as the spectrum plot).

use super::html::escape;
use super::markdown::md;
use super::plot::LibraryOverlay;
use super::text::flat;
use super::wording;
use crate::library::grid::FINGERPRINT_BELOW_CM1;
use crate::verdict::{CheckStatus, CheckedHit, LibraryVerdict};
use std::fmt::Write;

fn hit_line(h: &CheckedHit) -> String {
    format!(
        "{:>4}  {:>10.4}  {:<12} {} [{}]",
        h.rank,
        h.similarity,
        h.formula.as_deref().unwrap_or("?"),
        flat(&h.name),
        flat(&h.file)
    )
}

/// The text section (also the tail of `solve`'s terminal output).
pub fn text(l: &LibraryVerdict) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "  {:<14} {} ({}, digest {})",
        "library",
        flat(&l.library),
        wording::references(l.n_references),
        l.digest
    );
    let _ = writeln!(
        s,
        "  {:<14} {}",
        "compared",
        wording::library_compared(l.n_compared, &l.phase)
    );
    for n in &l.notes {
        let _ = writeln!(s, "  {:<14} {}", "note", flat(n));
    }
    let _ = writeln!(s, "  {:<14} {}", "verdict", flat(&l.summary));
    if !l.hits.is_empty() {
        let _ = writeln!(
            s,
            "  {:>4}  {:>10}  {:<12} name [file]",
            "rank", "similarity", "formula"
        );
        for h in &l.hits {
            let _ = writeln!(s, "  {}", hit_line(h));
        }
        for h in &l.hits {
            let _ = writeln!(
                s,
                "\n  #{} {} — {}, {}",
                h.rank,
                flat(&h.name),
                h.quality,
                h.standing
            );
            for c in &h.checks {
                let _ = writeln!(
                    s,
                    "      {:<11} {:<13} {}",
                    c.status.words(),
                    c.item,
                    flat(&c.detail)
                );
            }
            let _ = writeln!(s, "      {}", wording::compared_over(h));
        }
    }
    let _ = writeln!(s, "  {:<14} {}.", "caution", l.caution);
    s
}

/// The Markdown section (heading included).
pub fn markdown(l: &LibraryVerdict) -> String {
    let mut s = String::from("\n## Reference library\n\n");
    let _ = writeln!(
        s,
        "- **library:** {} ({}, digest `{}`)",
        md(&l.library),
        wording::references(l.n_references),
        l.digest
    );
    let _ = writeln!(
        s,
        "- **compared:** {}",
        md(&wording::library_compared(l.n_compared, &l.phase))
    );
    for n in &l.notes {
        let _ = writeln!(s, "- **note:** {}", md(n));
    }
    let _ = writeln!(s, "- **verdict:** {}", md(&l.summary));
    if !l.hits.is_empty() {
        s.push_str("\n| rank | similarity | name | formula | file | standing |\n|---:|---:|---|---|---|---|\n");
        for h in &l.hits {
            let _ = writeln!(
                s,
                "| {} | {:.4} | {} | {} | {} | {} |",
                h.rank,
                h.similarity,
                md(&h.name),
                md(h.formula.as_deref().unwrap_or("?")),
                md(&h.file),
                md(&h.standing)
            );
        }
        for h in &l.hits {
            let _ = writeln!(
                s,
                "\n### #{} {} ({})\n",
                h.rank,
                md(&h.name),
                md(&h.quality)
            );
            for c in &h.checks {
                let _ = writeln!(
                    s,
                    "- {} **{}**: {}",
                    c.status.words(),
                    md(&c.item),
                    md(&c.detail)
                );
            }
            let _ = writeln!(s, "- {}", md(&wording::compared_over(h)));
        }
    }
    let _ = writeln!(s, "\n> **Caution:** {}.", md(&l.caution));
    s
}

/// The HTML section (heading, overlay plot, hit table, checks).
pub fn html(l: &LibraryVerdict, overlay: Option<&LibraryOverlay>) -> String {
    let mut s = String::from("<h2>Reference library</h2>\n");
    let _ = writeln!(
        s,
        "<p class=\"caution\"><strong>Caution:</strong> {}.</p>",
        escape(&l.caution)
    );
    let _ = writeln!(
        s,
        "<table>\n<tr><th>library</th><td>{} ({})<br><code>digest {}</code></td></tr>\n<tr><th>compared</th><td>{}</td></tr>",
        escape(&l.library),
        wording::references(l.n_references),
        escape(&l.digest),
        escape(&wording::library_compared(l.n_compared, &l.phase))
    );
    for n in &l.notes {
        let _ = writeln!(s, "<tr><th>note</th><td>{}</td></tr>", escape(n));
    }
    let _ = writeln!(
        s,
        "<tr><th>verdict</th><td id=\"library-verdict\">{}</td></tr>\n</table>",
        escape(&l.summary)
    );
    if let Some(o) = overlay.filter(|o| o.traces.len() > 1) {
        s.push_str(&overlay_svg(o));
    }
    if !l.hits.is_empty() {
        s.push_str("<table class=\"library-hits\">\n<tr><th>rank</th><th>similarity</th><th>name</th><th>formula</th><th>file</th><th>checks</th><th>regions</th></tr>\n");
        for h in &l.hits {
            let checks: Vec<String> = h
                .checks
                .iter()
                .map(|c| {
                    let word = if c.status == CheckStatus::Contradicts {
                        format!("<span class=\"unexplained\">{}</span>", c.status.words())
                    } else {
                        c.status.words().to_owned()
                    };
                    format!(
                        "{word} <strong>{}</strong>: {}",
                        escape(&c.item),
                        escape(&c.detail)
                    )
                })
                .collect();
            let _ = writeln!(
                s,
                "<tr class=\"library-hit\" data-contradicts=\"{}\"><td>{}</td><td class=\"num\">{:.4}<br><small>{}</small></td><td>{}<br><small>{}</small></td><td>{}</td><td>{}</td><td>{}</td><td><small>{}</small></td></tr>",
                h.contradicts,
                h.rank,
                h.similarity,
                escape(&h.quality),
                escape(&h.name),
                escape(&h.standing),
                escape(h.formula.as_deref().unwrap_or("?")),
                escape(&h.file),
                checks.join("<br>"),
                escape(&wording::regions(h))
            );
        }
        s.push_str("</table>\n");
    }
    s
}

const WIDTH: f64 = 960.0;
const HEIGHT: f64 = 340.0;
const LEFT: f64 = 56.0;
const RIGHT: f64 = 24.0;
const TOP: f64 = 20.0;
const BOTTOM: f64 = 64.0;
/// Colours of the traces: the unknown, then the hits.
const COLOURS: [&str; 4] = ["#222222", "#0f6e68", "#a06b00", "#5b5f97"];

/// The overlay plot: the unknown and its best hits, each scaled to a maximum of 1, on one
/// axis with wavenumber decreasing to the right.
pub fn overlay_svg(o: &LibraryOverlay) -> String {
    let low = o
        .traces
        .iter()
        .filter_map(|t| t.x.first().copied())
        .fold(f64::INFINITY, f64::min);
    let high = o
        .traces
        .iter()
        .filter_map(|t| t.x.last().copied())
        .fold(f64::NEG_INFINITY, f64::max);
    let mut s = String::new();
    if !(low.is_finite() && high.is_finite() && high > low) {
        return s;
    }
    let plot_w = WIDTH - LEFT - RIGHT;
    let plot_h = HEIGHT - TOP - BOTTOM;
    let base_y = TOP + plot_h;
    let px = |x: f64| LEFT + (high - x) / (high - low) * plot_w;
    let py = |y: f64| base_y - y.clamp(-0.05, 1.05) * plot_h * 0.95;
    let _ = writeln!(
        s,
        "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"spectrum library-overlay\" viewBox=\"0 0 {WIDTH} {HEIGHT}\" role=\"img\" aria-label=\"the unknown's spectrum over its best library hits\">"
    );
    let fp_left = px(FINGERPRINT_BELOW_CM1.min(high));
    let _ = writeln!(
        s,
        "<rect class=\"fingerprint\" x=\"{fp_left:.1}\" y=\"{TOP}\" width=\"{:.1}\" height=\"{plot_h}\" fill=\"#efe9dc\"/>",
        (px(low) - fp_left).max(0.0)
    );
    super::svg::wavenumber_axis(&mut s, px, (low, high), base_y);
    let _ = writeln!(
        s,
        "<text x=\"{:.1}\" y=\"{:.1}\" font-size=\"12\" text-anchor=\"middle\">wavenumber / cm⁻¹ (decreasing to the right); absorbance scaled to 1</text>",
        LEFT + plot_w / 2.0,
        base_y + 34.0
    );
    for (i, t) in o.traces.iter().enumerate() {
        let colour = COLOURS[i.min(COLOURS.len() - 1)];
        let mut d = String::new();
        for (x, y) in t.x.iter().zip(&t.y) {
            let _ = write!(
                d,
                "{}{:.1} {:.1}",
                if d.is_empty() { "M" } else { " L" },
                px(*x),
                py(*y)
            );
        }
        let _ = writeln!(
            s,
            "<path class=\"overlay-trace\" data-label=\"{}\" d=\"{d}\" fill=\"none\" stroke=\"{colour}\" stroke-width=\"{}\"{}/>",
            escape(&t.label),
            if i == 0 { "1.6" } else { "1" },
            if i == 0 { "" } else { " stroke-dasharray=\"5 2\"" }
        );
        let lx = LEFT + 8.0 + 230.0 * i as f64;
        let _ = writeln!(
            s,
            "<text x=\"{lx:.1}\" y=\"{:.1}\" font-size=\"11\" fill=\"{colour}\">{}</text>",
            HEIGHT - 8.0,
            escape(&t.label)
        );
    }
    s.push_str("</svg>\n");
    s
}
