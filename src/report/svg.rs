//! The inline SVG plot of an HTML report: the spectrum trace (or, without one, a stick plot
//! of the band list), wavenumber decreasing to the right as the field draws IR spectra,
//! the fingerprint region (below 1500 cm⁻¹) shaded, and one mark per observed band
//! labelled with what explains it in the leading candidate.
//!
//! Marks and colours are our own: a filled triangle for a band a group explains, a hollow
//! circle for the skeleton, pattern or an artefact, a cross for an unexplained band.

use super::html::escape;
use super::view::{BandRow, ReportView};
use crate::ir::band::FINGERPRINT_BELOW_CM1;
use std::fmt::Write;

const WIDTH: f64 = 960.0;
const HEIGHT: f64 = 420.0;
const LEFT: f64 = 56.0;
const RIGHT: f64 = 24.0;
const TOP: f64 = 175.0;
const BOTTOM: f64 = 44.0;

/// Colour of a mark by the kind of its explanation.
fn colour(kind: &str) -> &'static str {
    match kind {
        "group" => "#0f6e68",
        "skeleton" | "pattern" => "#5b5f97",
        "artefact" => "#a06b00",
        _ => "#b3261e",
    }
}

/// The horizontal axis of a spectrum plot (shared by every plot the reports draw, so their
/// axes look alike): the base line and a tick with its label every 500 cm⁻¹, wavenumber
/// decreasing to the right through `px`.
pub(super) fn wavenumber_axis(
    s: &mut String,
    px: impl Fn(f64) -> f64,
    (low, high): (f64, f64),
    base_y: f64,
) {
    let _ = writeln!(
        s,
        "<line x1=\"{LEFT}\" y1=\"{base_y}\" x2=\"{}\" y2=\"{base_y}\" stroke=\"#333\"/>",
        WIDTH - RIGHT
    );
    let mut tick = (high / 500.0).floor() * 500.0;
    while tick >= low {
        let x = px(tick);
        let _ = writeln!(
            s,
            "<line x1=\"{0}\" y1=\"{base_y}\" x2=\"{0}\" y2=\"{1}\" stroke=\"#333\"/><text x=\"{0}\" y=\"{2}\" font-size=\"11\" text-anchor=\"middle\">{3:.0}</text>",
            fmt(x),
            fmt(base_y + 5.0),
            fmt(base_y + 18.0),
            tick
        );
        tick -= 500.0;
    }
}

fn fmt(v: f64) -> String {
    format!("{v:.1}")
}

/// The wavenumber span plotted, `(low, high)`.
fn span(view: &ReportView) -> (f64, f64) {
    let mut low: f64 = view.evidence.ir_window.map_or(400.0, |w| w.0);
    let mut high: f64 = view.evidence.ir_window.map_or(4000.0, |w| w.1);
    if let Some(p) = &view.plot {
        if let (Some(first), Some(last)) = (p.x.first(), p.x.last()) {
            low = low.min(*first);
            high = high.max(*last);
        }
    }
    for r in &view.band_table.rows {
        low = low.min(r.at - 20.0);
        high = high.max(r.at + 20.0);
    }
    (low.max(0.0), high)
}

/// Renders the plot as one `<svg>` element.
pub fn render(view: &ReportView) -> String {
    let (low, high) = span(view);
    let plot_w = WIDTH - LEFT - RIGHT;
    let plot_h = HEIGHT - TOP - BOTTOM;
    let px = |x: f64| LEFT + (high - x) / (high - low) * plot_w;
    let base_y = TOP + plot_h;
    let mut s = String::new();
    let _ = writeln!(
        s,
        "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"spectrum\" viewBox=\"0 0 {WIDTH} {HEIGHT}\" role=\"img\" aria-label=\"{}\">",
        if view.plot.is_some() {
            "IR spectrum with its bands marked"
        } else {
            "IR band list with its bands marked"
        }
    );
    // Fingerprint region.
    let fp_left = px(FINGERPRINT_BELOW_CM1.min(high));
    let fp_right = px(low);
    let _ = writeln!(
        s,
        "<rect class=\"fingerprint\" x=\"{}\" y=\"{TOP}\" width=\"{}\" height=\"{plot_h}\" fill=\"#efe9dc\"/>",
        fmt(fp_left),
        fmt((fp_right - fp_left).max(0.0))
    );
    let _ = writeln!(
        s,
        "<text x=\"{}\" y=\"{}\" font-size=\"11\" fill=\"#7a6a4a\">fingerprint region</text>",
        fmt(fp_left + 6.0),
        fmt(base_y - 6.0)
    );
    wavenumber_axis(&mut s, px, (low, high), base_y);
    let _ = writeln!(
        s,
        "<text x=\"{}\" y=\"{}\" font-size=\"12\" text-anchor=\"middle\">wavenumber / cm⁻¹ (decreasing to the right)</text>",
        fmt(LEFT + plot_w / 2.0),
        fmt(HEIGHT - 8.0)
    );
    let _ = writeln!(
        s,
        "<text x=\"14\" y=\"{0}\" font-size=\"12\" transform=\"rotate(-90 14 {0})\" text-anchor=\"middle\">{1}</text>",
        fmt(TOP + plot_h / 2.0),
        if view.plot.is_some() { "absorbance" } else { "strength" }
    );
    // The trace, or sticks for the band list.
    let stick = |r: &BandRow| match r.strength.as_str() {
        "strong" => 1.0,
        "medium" => 0.6,
        _ => 0.3,
    };
    let y_of: Box<dyn Fn(f64) -> f64> = match &view.plot {
        Some(p) => {
            let max = p.y.iter().copied().fold(f64::MIN, f64::max).max(1e-12);
            let min = p.y.iter().copied().fold(f64::MAX, f64::min).min(0.0);
            let mut d = String::new();
            for (i, (x, y)) in p.x.iter().zip(&p.y).enumerate() {
                if *x < low || *x > high {
                    continue;
                }
                let yy = base_y - (y - min) / (max - min) * plot_h * 0.95;
                let _ = write!(
                    d,
                    "{}{} {}",
                    if i == 0 || d.is_empty() { "M" } else { " L" },
                    fmt(px(*x)),
                    fmt(yy)
                );
            }
            let _ = writeln!(
                s,
                "<path class=\"trace\" d=\"{d}\" fill=\"none\" stroke=\"#222\" stroke-width=\"1\"/>"
            );
            let trace = p.clone();
            Box::new(move |at: f64| {
                // The trace height at the band, for the mark's foot.
                let i = trace.x.partition_point(|x| *x < at).min(trace.x.len() - 1);
                base_y - (trace.y[i] - min) / (max - min) * plot_h * 0.95
            })
        }
        None => {
            for r in &view.band_table.rows {
                let _ = writeln!(
                    s,
                    "<line class=\"stick\" x1=\"{0}\" y1=\"{base_y}\" x2=\"{0}\" y2=\"{1}\" stroke=\"#222\" stroke-width=\"2\"/>",
                    fmt(px(r.at)),
                    fmt(base_y - stick(r) * plot_h * 0.95)
                );
            }
            Box::new(move |_| base_y)
        }
    };
    // One mark per observed band, with its label; labels of close bands are pushed apart
    // (rows run from high to low wavenumber, so x grows along the loop).
    let mut last_label_x = f64::MIN;
    for r in &view.band_table.rows {
        let x = px(r.at);
        let label_x = x.max(last_label_x + 11.0);
        last_label_x = label_x;
        let foot = match &view.plot {
            Some(_) => y_of(r.at),
            None => base_y - stick(r) * plot_h * 0.95,
        };
        let c = colour(r.kind());
        let label = if r.label().is_empty() {
            format!("{:.0}", r.at)
        } else {
            format!("{:.0} {}", r.at, r.label())
        };
        let mark_y = TOP - 8.0;
        let symbol = match r.kind() {
            "group" => format!(
                "<path d=\"M {} {} l 5 -9 l -10 0 z\" fill=\"{c}\"/>",
                fmt(x),
                fmt(mark_y)
            ),
            "skeleton" | "pattern" | "artefact" => format!(
                "<circle cx=\"{}\" cy=\"{}\" r=\"4\" fill=\"#fff\" stroke=\"{c}\" stroke-width=\"1.5\"/>",
                fmt(x),
                fmt(mark_y - 4.0)
            ),
            _ => format!(
                "<path d=\"M {0} {1} l 8 -8 M {2} {1} l -8 -8\" stroke=\"{c}\" stroke-width=\"2\"/>",
                fmt(x - 4.0),
                fmt(mark_y),
                fmt(x + 4.0)
            ),
        };
        let _ = writeln!(
            s,
            "<g class=\"band-mark\" data-at=\"{at:.1}\" data-kind=\"{kind}\"><line x1=\"{x}\" y1=\"{top}\" x2=\"{x}\" y2=\"{foot}\" stroke=\"{c}\" stroke-dasharray=\"2 2\"/>{symbol}<text x=\"{lx}\" y=\"{ty}\" font-size=\"9\" fill=\"{c}\" transform=\"rotate(-90 {lx} {ty})\">{label}</text></g>",
            at = r.at,
            kind = escape(r.kind()),
            x = fmt(x),
            top = fmt(mark_y),
            foot = fmt(foot),
            ty = fmt(mark_y - 14.0),
            lx = fmt(label_x + 3.0),
            label = escape(&label)
        );
    }
    s.push_str("</svg>\n");
    s
}
