//! `quiddity bands`: read a spectrum file (JCAMP-DX or two-column text), pick its bands and
//! print them with a summary of the file's header.

use super::{io_failure, print_json, CommandResult, Status};
use crate::diag::Diagnostic;
use crate::ir::{
    bands_from_file_contents, BandKind, Ordinate, PickOptions, PickedSpectrum, SamplePhase,
    Strength, XUnits,
};
use clap::Args;
use serde::Serialize;
use std::io::Write;
use std::path::PathBuf;

/// Arguments of `quiddity bands`.
#[derive(Debug, Args)]
pub struct BandsArgs {
    /// Spectrum file: JCAMP-DX (.jdx, .dx) or two-column text (CSV, TSV, spaces).
    file: PathBuf,
    /// Print one JSON document on stdout.
    #[arg(long)]
    json: bool,
    /// Keep only bands at least this strong: weak, medium or strong.
    #[arg(long, value_name = "CLASS", default_value = "weak", value_parser = parse_strength)]
    min_strength: Strength,
    /// Keep only bands between LO and HI cm-1, e.g. 1500-4000.
    #[arg(long, value_name = "LO-HI", value_parser = parse_region)]
    region: Option<(f64, f64)>,
    /// X units when the file does not state them: cm-1 or um.
    #[arg(long, value_name = "UNITS", value_parser = parse_x_units)]
    x_units: Option<XUnits>,
    /// Intensity units when the file does not state them: absorbance or transmittance.
    #[arg(long, value_name = "UNITS", value_parser = parse_y_units)]
    y_units: Option<Ordinate>,
    /// Keep the baseline as it is (no asymmetric least squares correction).
    #[arg(long)]
    no_baseline: bool,
    /// Physical state of the sample: condensed (film, ATR, KBr, mull, solution; default)
    /// or vapour (gas cell, GC-IR: P/R branches merged, water-vapour lines marked).
    #[arg(long, value_name = "PHASE", default_value = "condensed", value_parser = parse_phase)]
    phase: SamplePhase,
}

fn parse_phase(word: &str) -> Result<SamplePhase, String> {
    match word {
        "condensed" => Ok(SamplePhase::Condensed),
        "vapour" | "vapor" | "gas" => Ok(SamplePhase::Vapour),
        _ => Err(format!("{word:?}: expected condensed or vapour")),
    }
}

fn parse_strength(word: &str) -> Result<Strength, String> {
    Strength::from_word(word).ok_or_else(|| format!("{word:?}: expected weak, medium or strong"))
}

fn parse_x_units(word: &str) -> Result<XUnits, String> {
    XUnits::from_word(word).ok_or_else(|| format!("{word:?}: expected cm-1 or um"))
}

fn parse_y_units(word: &str) -> Result<Ordinate, String> {
    Ordinate::from_word(word)
        .ok_or_else(|| format!("{word:?}: expected absorbance or transmittance"))
}

/// Parses `LO-HI` (either order) in cm⁻¹.
fn parse_region(text: &str) -> Result<(f64, f64), String> {
    let expected = || format!("{text:?}: expected LO-HI in cm-1, e.g. 1500-4000");
    let (lo, hi) = text.split_once('-').ok_or_else(expected)?;
    let lo: f64 = lo.trim().parse().map_err(|_| expected())?;
    let hi: f64 = hi.trim().parse().map_err(|_| expected())?;
    if !lo.is_finite() || !hi.is_finite() || lo == hi {
        return Err(expected());
    }
    Ok((lo.min(hi), lo.max(hi)))
}

/// JSON view of one band: the case-file words first, then the measurements.
#[derive(Serialize)]
struct BandView {
    at: f64,
    strength: Strength,
    /// Always present (null when the width is unknown, as for a peak table), so scripts
    /// can rely on the contract's three keys.
    shape: Option<crate::ir::Shape>,
    kind: BandKind,
    height: f64,
    relative_height: f64,
    prominence: f64,
    fwhm: Option<f64>,
}

/// JSON view of the command's output.
#[derive(Serialize)]
struct BandsView<'a> {
    file: String,
    header: &'a crate::ir::HeaderSummary,
    notes: &'a [String],
    #[serde(skip_serializing_if = "Option::is_none")]
    stats: Option<crate::ir::PickStats>,
    bands: Vec<BandView>,
    caution: &'static str,
}

const CAUTION: &str = "bands are measured features of the trace, to be checked against the plotted spectrum; any reading of them is a screening lead, not an identification";

/// Four decimals for ordinary absorbances, scientific notation for tiny ones (some files
/// carry absorption coefficients of order 10⁻⁴).
fn significant(v: f64) -> String {
    if v.abs() >= 0.01 || v == 0.0 {
        format!("{v:.4}")
    } else {
        format!("{v:.3e}")
    }
}

/// Rounds to `decimals` places, or to 4 significant digits when that would lose the value.
fn round(v: f64, decimals: i32) -> f64 {
    if v != 0.0 && v.abs() < 10f64.powi(-decimals + 1) {
        let digits = 3 - v.abs().log10().floor() as i32;
        let f = 10f64.powi(digits);
        return (v * f).round() / f;
    }
    let f = 10f64.powi(decimals);
    (v * f).round() / f
}

/// Runs `quiddity bands`.
pub fn run(args: &BandsArgs, out: &mut dyn Write) -> CommandResult {
    let origin = args.file.display().to_string();
    let bytes = std::fs::read(&args.file)
        .map_err(|e| Diagnostic::error(origin.clone(), format!("cannot read the file: {e}")))?;
    let mut options = PickOptions {
        min_strength: args.min_strength,
        region: args.region,
        correct_baseline: !args.no_baseline,
        ..PickOptions::default()
    };
    options.read.x_units = args.x_units;
    options.read.ordinate = args.y_units;
    options.pick.phase = args.phase;
    let picked = bands_from_file_contents(&bytes, &origin, &options)?;
    if args.json {
        let view = BandsView {
            file: origin,
            header: &picked.header,
            notes: &picked.notes,
            stats: picked.stats,
            bands: picked
                .bands
                .iter()
                .map(|b| BandView {
                    at: round(b.at, 1),
                    strength: b.strength,
                    shape: b.shape,
                    kind: b.kind,
                    height: round(b.height, 4),
                    relative_height: round(b.relative_height, 3),
                    prominence: round(b.prominence, 4),
                    fwhm: b.fwhm.map(|w| round(w, 1)),
                })
                .collect(),
            caution: CAUTION,
        };
        return print_json(out, &view);
    }
    write_text(out, &origin, &picked).map_err(io_failure)?;
    Ok(Status::Success)
}

/// The human-readable report: header summary, notes, aligned band table.
fn write_text(out: &mut dyn Write, origin: &str, picked: &PickedSpectrum) -> std::io::Result<()> {
    let h = &picked.header;
    let mut rows: Vec<(String, String)> = vec![
        ("file".to_owned(), origin.to_owned()),
        ("format".to_owned(), h.format.clone()),
    ];
    if let Some(title) = &h.title {
        rows.push(("title".to_owned(), title.clone()));
    }
    if let Some(data_type) = &h.data_type {
        rows.push(("data type".to_owned(), data_type.clone()));
    }
    for field in &h.fields {
        rows.push((field.label.to_lowercase(), field.value.clone()));
    }
    if let Some(resolution) = &h.resolution {
        rows.push(("resolution".to_owned(), resolution.clone()));
    }
    let mut points = h.n_points.to_string();
    if let Some((lo, hi)) = h.range_cm1 {
        points.push_str(&format!(", {lo:.1}–{hi:.1} cm-1"));
    }
    if let Some(stats) = &picked.stats {
        points.push_str(&format!(", spacing {:.3} cm-1", stats.spacing_cm1));
    }
    rows.push(("points".to_owned(), points));
    rows.push((
        "units".to_owned(),
        format!("x {}, y {}", h.x_units, h.y_units),
    ));
    if let Some(stats) = &picked.stats {
        rows.push((
            "noise".to_owned(),
            format!("{:.2e} absorbance (robust σ)", stats.noise),
        ));
    }
    for note in &picked.notes {
        rows.push(("note".to_owned(), note.clone()));
    }
    let width = rows
        .iter()
        .map(|(k, _)| k.chars().count())
        .max()
        .unwrap_or(0)
        .max(10);
    for (key, value) in &rows {
        writeln!(out, "{key:<width$}  {value}")?;
    }
    writeln!(out)?;
    if picked.bands.is_empty() {
        writeln!(out, "no bands found")?;
    } else {
        writeln!(
            out,
            "{:>8}  {:<8}  {:<6}  {:>9}  {:>5}  {:>6}  {:<8}",
            "cm-1", "strength", "shape", "height", "rel", "FWHM", "kind"
        )?;
        for b in &picked.bands {
            writeln!(
                out,
                "{:>8.1}  {:<8}  {:<6}  {:>9}  {:>5.2}  {:>6}  {:<8}",
                b.at,
                b.strength.word(),
                b.shape.map_or("-", |s| s.word()),
                significant(b.height),
                b.relative_height,
                b.fwhm.map_or("-".to_owned(), |w| format!("{w:.1}")),
                match b.kind {
                    BandKind::Peak => "peak",
                    BandKind::Shoulder => "shoulder",
                    BandKind::Contour => "contour",
                    BandKind::LineForest => "line-forest",
                    BandKind::Co2 => "co2",
                },
            )?;
        }
    }
    writeln!(out)?;
    writeln!(out, "caution: {CAUTION}")?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn phases_parse_with_their_synonyms() {
        assert_eq!(parse_phase("vapour"), Ok(SamplePhase::Vapour));
        assert_eq!(parse_phase("gas"), Ok(SamplePhase::Vapour));
        assert_eq!(parse_phase("condensed"), Ok(SamplePhase::Condensed));
        assert!(parse_phase("liquid").is_err());
    }

    #[test]
    fn regions_parse_in_either_order() {
        assert_eq!(parse_region("1500-4000"), Ok((1500.0, 4000.0)));
        assert_eq!(parse_region("4000-1500"), Ok((1500.0, 4000.0)));
        assert!(parse_region("1500").is_err());
        assert!(parse_region("a-b").is_err());
    }
}
