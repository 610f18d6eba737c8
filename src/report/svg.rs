//! The inline SVG plot of an HTML report: the spectrum trace (or, without one, a stick plot
//! of the band list), wavenumber decreasing to the right as the field draws IR spectra,
//! the fingerprint region (below 1500 cm⁻¹) shaded, and one mark per observed band
//! labelled with what explains it in the leading candidate.
//!
//! Marks and colours are our own: a filled triangle for a band a group explains, a hollow
//! circle for the skeleton, pattern or an artefact, a cross for an unexplained band.

use super::html::escape;
use super::plot::PlotTrace;
use super::view::{BandRow, CellKind, ReportView};
use crate::engine::ExplanationKind;
use crate::ir::band::FINGERPRINT_BELOW_CM1;
use crate::ir::Strength;
use std::fmt::Write;

const WIDTH: f64 = 960.0;
const HEIGHT: f64 = 420.0;
const LEFT: f64 = 56.0;
const RIGHT: f64 = 24.0;
const TOP: f64 = 175.0;
const BOTTOM: f64 = 44.0;

/// Colour of a mark by the kind of its explanation.
fn colour(kind: CellKind) -> &'static str {
    match kind {
        CellKind::Explained(ExplanationKind::Group) => "#0f6e68",
        CellKind::Explained(ExplanationKind::Skeleton | ExplanationKind::Pattern) => "#5b5f97",
        CellKind::Explained(ExplanationKind::Artefact) => "#a06b00",
        CellKind::Explained(ExplanationKind::Branch) | CellKind::Unexplained => "#b3261e",
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

/// Where things go: the wavenumber span and the plot area.
struct Frame {
    low: f64,
    high: f64,
    plot_w: f64,
    plot_h: f64,
    base_y: f64,
}

impl Frame {
    fn new(view: &ReportView) -> Frame {
        let (low, high) = span(view);
        let plot_h = HEIGHT - TOP - BOTTOM;
        Frame {
            low,
            high,
            plot_w: WIDTH - LEFT - RIGHT,
            plot_h,
            base_y: TOP + plot_h,
        }
    }

    /// The x of a wavenumber (decreasing to the right).
    fn px(&self, x: f64) -> f64 {
        LEFT + (self.high - x) / (self.high - self.low) * self.plot_w
    }

    /// The top of a band's stick in the stick plot: its height follows its strength.
    fn stick_top(&self, r: &BandRow) -> f64 {
        let height = if r.strength == Strength::Strong.word() {
            1.0
        } else if r.strength == Strength::Medium.word() {
            0.6
        } else {
            0.3
        };
        self.base_y - height * self.plot_h * 0.95
    }
}

/// Renders the plot as one `<svg>` element: the frame, the trace (or sticks), the marks.
pub fn render(view: &ReportView) -> String {
    let f = Frame::new(view);
    let mut s = String::new();
    frame(&mut s, view, &f);
    let feet = match &view.plot {
        Some(p) => trace(&mut s, view, p, &f),
        None => sticks(&mut s, view, &f),
    };
    band_marks(&mut s, view, &f, &feet);
    s.push_str("</svg>\n");
    s
}

/// The `<svg>` element's opening, the shaded fingerprint region and both axes.
fn frame(s: &mut String, view: &ReportView, f: &Frame) {
    let _ = writeln!(
        s,
        "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"spectrum\" viewBox=\"0 0 {WIDTH} {HEIGHT}\" role=\"img\" aria-label=\"{}\">",
        if view.plot.is_some() {
            "IR spectrum with its bands marked"
        } else {
            "IR band list with its bands marked"
        }
    );
    let fp_left = f.px(FINGERPRINT_BELOW_CM1.min(f.high));
    let fp_right = f.px(f.low);
    let _ = writeln!(
        s,
        "<rect class=\"fingerprint\" x=\"{}\" y=\"{TOP}\" width=\"{}\" height=\"{}\" fill=\"#efe9dc\"/>",
        fmt(fp_left),
        fmt((fp_right - fp_left).max(0.0)),
        f.plot_h
    );
    let _ = writeln!(
        s,
        "<text x=\"{}\" y=\"{}\" font-size=\"11\" fill=\"#7a6a4a\">fingerprint region</text>",
        fmt(fp_left + 6.0),
        fmt(f.base_y - 6.0)
    );
    wavenumber_axis(s, |x| f.px(x), (f.low, f.high), f.base_y);
    let _ = writeln!(
        s,
        "<text x=\"{}\" y=\"{}\" font-size=\"12\" text-anchor=\"middle\">wavenumber / cm⁻¹ (decreasing to the right)</text>",
        fmt(LEFT + f.plot_w / 2.0),
        fmt(HEIGHT - 8.0)
    );
    let _ = writeln!(
        s,
        "<text x=\"14\" y=\"{0}\" font-size=\"12\" transform=\"rotate(-90 14 {0})\" text-anchor=\"middle\">{1}</text>",
        fmt(TOP + f.plot_h / 2.0),
        if view.plot.is_some() { "absorbance" } else { "strength" }
    );
}

/// The spectrum trace; returns the trace height at each band, for the marks' feet.
fn trace(s: &mut String, view: &ReportView, p: &PlotTrace, f: &Frame) -> Vec<f64> {
    let max = p.y.iter().copied().fold(f64::MIN, f64::max).max(1e-12);
    let min = p.y.iter().copied().fold(f64::MAX, f64::min).min(0.0);
    let y_of = |y: f64| f.base_y - (y - min) / (max - min) * f.plot_h * 0.95;
    let mut d = String::new();
    for (i, (x, y)) in p.x.iter().zip(&p.y).enumerate() {
        if *x < f.low || *x > f.high {
            continue;
        }
        let _ = write!(
            d,
            "{}{} {}",
            if i == 0 || d.is_empty() { "M" } else { " L" },
            fmt(f.px(*x)),
            fmt(y_of(*y))
        );
    }
    let _ = writeln!(
        s,
        "<path class=\"trace\" d=\"{d}\" fill=\"none\" stroke=\"#222\" stroke-width=\"1\"/>"
    );
    view.band_table
        .rows
        .iter()
        .map(|r| {
            let i = p.x.partition_point(|x| *x < r.at).min(p.x.len() - 1);
            y_of(p.y[i])
        })
        .collect()
}

/// One stick per band of the band list; returns each stick's top, for the marks' feet.
fn sticks(s: &mut String, view: &ReportView, f: &Frame) -> Vec<f64> {
    view.band_table
        .rows
        .iter()
        .map(|r| {
            let top = f.stick_top(r);
            let _ = writeln!(
                s,
                "<line class=\"stick\" x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" y2=\"{2}\" stroke=\"#222\" stroke-width=\"2\"/>",
                fmt(f.px(r.at)),
                f.base_y,
                fmt(top)
            );
            top
        })
        .collect()
}

/// One mark per observed band, with its label; labels of close bands are pushed apart
/// (rows run from high to low wavenumber, so x grows along the loop).
fn band_marks(s: &mut String, view: &ReportView, f: &Frame, feet: &[f64]) {
    let mut last_label_x = f64::MIN;
    for (r, foot) in view.band_table.rows.iter().zip(feet) {
        let x = f.px(r.at);
        let label_x = x.max(last_label_x + 11.0);
        last_label_x = label_x;
        let kind = r.cell_kind();
        let c = colour(kind);
        let label = if r.label().is_empty() {
            format!("{:.0}", r.at)
        } else {
            format!("{:.0} {}", r.at, r.label())
        };
        let mark_y = TOP - 8.0;
        let _ = writeln!(
            s,
            "<g class=\"band-mark\" data-at=\"{at:.1}\" data-kind=\"{kind}\"><line x1=\"{x}\" y1=\"{top}\" x2=\"{x}\" y2=\"{foot}\" stroke=\"{c}\" stroke-dasharray=\"2 2\"/>{symbol}<text x=\"{lx}\" y=\"{ty}\" font-size=\"9\" fill=\"{c}\" transform=\"rotate(-90 {lx} {ty})\">{label}</text></g>",
            at = r.at,
            kind = escape(kind.word()),
            x = fmt(x),
            top = fmt(mark_y),
            foot = fmt(*foot),
            symbol = symbol(kind, x, mark_y, c),
            ty = fmt(mark_y - 14.0),
            lx = fmt(label_x + 3.0),
            label = escape(&label)
        );
    }
}

/// The mark's symbol: a filled triangle for a group, a hollow circle for the skeleton, a
/// pattern or an artefact, a cross for an unexplained band.
fn symbol(kind: CellKind, x: f64, mark_y: f64, c: &str) -> String {
    match kind {
        CellKind::Explained(ExplanationKind::Group) => format!(
            "<path d=\"M {} {} l 5 -9 l -10 0 z\" fill=\"{c}\"/>",
            fmt(x),
            fmt(mark_y)
        ),
        CellKind::Explained(
            ExplanationKind::Skeleton | ExplanationKind::Pattern | ExplanationKind::Artefact,
        ) => format!(
            "<circle cx=\"{}\" cy=\"{}\" r=\"4\" fill=\"#fff\" stroke=\"{c}\" stroke-width=\"1.5\"/>",
            fmt(x),
            fmt(mark_y - 4.0)
        ),
        CellKind::Explained(ExplanationKind::Branch) | CellKind::Unexplained => format!(
            "<path d=\"M {0} {1} l 8 -8 M {2} {1} l -8 -8\" stroke=\"{c}\" stroke-width=\"2\"/>",
            fmt(x - 4.0),
            fmt(mark_y),
            fmt(x + 4.0)
        ),
    }
}
