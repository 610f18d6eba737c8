//! `quiddity from-mass`: candidate molecular formulas for a measured molecular-ion m/z.
//!
//! Exit status: 0 when at least one candidate formula is found, 1 when none is (a
//! scientific "no"), 2 on bad input (the place is shown on stderr).

use super::limits::LimitArgs;
use super::{io_failure, print_json, CommandResult, Failure, Status};
use crate::budget::{LimitReached, Metered};
use crate::diag::Diagnostic;
use crate::ms::rank::{MAX_MDA, MAX_MZ, MAX_PPM};
use crate::ms::{
    best_formulas_within, candidate_formulas_within, halogen_bounds_from_m2, ElementRanges,
    FormulaCandidate, HalogenBounds, IonType, MassQuery, MeasuredIsotopes, MeasuredMz, RankError,
    Tolerance,
};
use clap::Args;
use std::io::Write;

/// The caution printed with every list of formulas.
const CAUTION: &str = "A formula is a screening lead, not an identification: confirm with a \
reference standard under the laboratory's validated method. Treat unknowns as hazardous; \
local regulations and licensed practice prevail.";

/// Arguments of `quiddity from-mass`.
#[derive(Debug, Args)]
pub struct FromMassArgs {
    /// Measured m/z of the molecular ion, e.g. 195.0877 (accurate) or 194 (nominal: an
    /// integer without a decimal point, as from a low-resolution GC-MS).
    #[arg(allow_hyphen_values = true, value_name = "MZ")]
    mz: String,

    /// Ion type: M+. | [M+H]+ | [M+Na]+ | [M+K]+ | [M+NH4]+ | [M-H]-. Default: M+. for a
    /// nominal m/z, [M+H]+ for an accurate one.
    #[arg(long, allow_hyphen_values = true)]
    ion: Option<String>,

    /// Mass tolerance in ppm of the measured m/z (default 5).
    #[arg(long, allow_hyphen_values = true, conflicts_with = "mda")]
    ppm: Option<f64>,

    /// Mass tolerance in millidalton instead of ppm.
    #[arg(long, allow_hyphen_values = true)]
    mda: Option<f64>,

    /// Element ranges of the neutral molecule, e.g. C0-30H0-60N0-4O0-8 (elements not
    /// named do not appear). Default C0-60H0-120N0-10O0-20S0-4P0-3F0-10Cl0-6Br0-4I0-3Si0-4.
    #[arg(long, value_name = "RANGES")]
    elements: Option<String>,

    /// Measured M+1 intensity, percent of the molecular-ion peak.
    #[arg(long, allow_hyphen_values = true, value_name = "PCT")]
    m1: Option<f64>,

    /// Measured M+2 intensity, percent of the molecular-ion peak.
    #[arg(long, allow_hyphen_values = true, value_name = "PCT")]
    m2: Option<f64>,

    /// Error of --m1 / --m2 in percentage points (default: 10 % of the value, at least 0.5).
    #[arg(long, allow_hyphen_values = true, value_name = "PCT")]
    iso_error: Option<f64>,

    /// Treat the m/z as nominal even if written with a decimal point.
    #[arg(long)]
    nominal: bool,

    /// Rule out formulas outside the Seven Golden Rules' extended element ratios
    /// (by default those ratios only lower the score).
    #[arg(long)]
    strict_ratios: bool,

    /// Show at most N candidates (0 = all).
    #[arg(long, default_value_t = 20, value_name = "N")]
    max: usize,

    /// Print one JSON document on stdout.
    #[arg(long)]
    json: bool,

    #[command(flatten)]
    limits: LimitArgs,
}

/// The `--json` document.
#[derive(Debug, serde::Serialize)]
struct FromMassReport<'a> {
    query: QueryView,
    /// Candidates scored: all of them when `n_candidates_complete`, otherwise those scored
    /// before the best-first search knew no other formula could enter the list shown (a
    /// lower bound).
    n_candidates: usize,
    /// Whether `n_candidates` counts every candidate.
    n_candidates_complete: bool,
    candidates: &'a [FormulaCandidate],
    /// Cl / Br / S counts the M+2 peak allows, when --m2 was given.
    halogen_bounds: Option<HalogenBounds>,
    caution: &'static str,
}

#[derive(Debug, serde::Serialize)]
struct QueryView {
    mz: f64,
    mode: &'static str,
    ion: &'static str,
    neutral_mass: Option<f64>,
    tolerance: Option<Tolerance>,
    elements: String,
    isotopes: Option<MeasuredIsotopes>,
    strict_ratios: bool,
}

/// Runs `quiddity from-mass`.
pub fn run(args: &FromMassArgs, out: &mut dyn Write) -> CommandResult {
    let query = build_query(args)?;
    let mut meter = Metered::new(args.limits.budget()?);
    let failure = |e: RankError<LimitReached>| match e {
        RankError::Query(e) => Failure::from(Diagnostic::error("<arguments>", e.to_string())),
        RankError::Limit(stop) => {
            Failure::from(Diagnostic::error("<arguments>", stop.message()).with_help(
                "narrow the search: an accurate m/z with --ppm, --m1 / --m2, or tighter \
                 --elements; or raise the limit",
            ))
        }
    };
    // With --max N only the best N are looked for (best first, exact); --max 0 scores all.
    let (all, n_candidates, complete) = if args.max == 0 {
        let all = candidate_formulas_within(&query, &mut meter).map_err(failure)?;
        let n = all.len();
        (all, n, true)
    } else {
        let best = best_formulas_within(&query, args.max, &mut meter).map_err(failure)?;
        (best.best, best.n_scored, best.complete)
    };
    let shown = &all[..];
    let neutral_mass = match query.mz {
        MeasuredMz::Accurate(mz) => Some(query.ion.neutral_mass_of_mz(mz)),
        MeasuredMz::Nominal(n) => query.ion.neutral_nominal_mass(n).map(f64::from),
    };
    let halogen_bounds = query
        .isotopes
        .filter(|i| i.m2.is_some())
        .map(|i| halogen_bounds_from_m2(&i, neutral_mass, &query.ranges));
    let report = FromMassReport {
        query: QueryView {
            mz: query.mz.value(),
            mode: match query.mz {
                MeasuredMz::Accurate(_) => "accurate",
                MeasuredMz::Nominal(_) => "nominal",
            },
            ion: query.ion.canonical(),
            neutral_mass: match query.mz {
                MeasuredMz::Accurate(_) => neutral_mass,
                MeasuredMz::Nominal(_) => None,
            },
            tolerance: match query.mz {
                MeasuredMz::Accurate(_) => Some(query.tolerance),
                MeasuredMz::Nominal(_) => None,
            },
            elements: query.ranges.to_string(),
            isotopes: query.isotopes,
            strict_ratios: query.strict_ratios,
        },
        n_candidates,
        n_candidates_complete: complete,
        candidates: shown,
        halogen_bounds,
        caution: CAUTION,
    };
    let status = if all.is_empty() {
        Status::Negative
    } else {
        Status::Success
    };
    if args.json {
        print_json(out, &report)?;
    } else {
        write_text(out, &report).map_err(io_failure)?;
    }
    Ok(status)
}

fn build_query(args: &FromMassArgs) -> Result<MassQuery, Failure> {
    let mz = parse_mz(&args.mz, args.nominal)?;
    let ion = match &args.ion {
        Some(text) => IonType::parse(text).map_err(|e| e.to_diagnostic("--ion"))?,
        None => match mz {
            MeasuredMz::Nominal(_) => IonType::RadicalCation,
            MeasuredMz::Accurate(_) => IonType::Protonated,
        },
    };
    let tolerance = match (args.ppm, args.mda) {
        (_, Some(mda)) => {
            if !(mda.is_finite() && mda > 0.0 && mda <= MAX_MDA) {
                return Err(Diagnostic::error(
                    "--mda",
                    format!("tolerance must be positive and at most {MAX_MDA} mDa, got {mda}"),
                )
                .into());
            }
            Tolerance::Mda(mda)
        }
        (ppm, None) => {
            let ppm = ppm.unwrap_or(5.0);
            if !(ppm.is_finite() && ppm > 0.0 && ppm <= MAX_PPM) {
                return Err(Diagnostic::error(
                    "--ppm",
                    format!("tolerance must be positive and at most {MAX_PPM} ppm, got {ppm}"),
                )
                .into());
            }
            Tolerance::Ppm(ppm)
        }
    };
    let ranges = match &args.elements {
        Some(text) => {
            ElementRanges::parse(text).map_err(|e| e.to_diagnostic("--elements", text))?
        }
        None => ElementRanges::default(),
    };
    for (name, value) in [("--m1", args.m1), ("--m2", args.m2)] {
        if let Some(v) = value {
            if !(v.is_finite() && (0.0..=10_000.0).contains(&v)) {
                return Err(Diagnostic::error(
                    name,
                    format!("isotope intensity must be between 0 and 10000 % of M, got {v}"),
                )
                .into());
            }
        }
    }
    if let Some(e) = args.iso_error {
        if !(e.is_finite() && e > 0.0) {
            return Err(Diagnostic::error(
                "--iso-error",
                format!("error must be a positive number of percentage points, got {e}"),
            )
            .into());
        }
    }
    let isotopes = (args.m1.is_some() || args.m2.is_some()).then_some(MeasuredIsotopes {
        m1: args.m1,
        m2: args.m2,
        error: args.iso_error,
    });
    Ok(MassQuery {
        mz,
        ion,
        tolerance,
        ranges,
        isotopes,
        strict_ratios: args.strict_ratios,
    })
}

/// Parses the m/z argument: a positive decimal number up to [`MAX_MZ`]; nominal when it
/// has no decimal point (or `nominal` is set).
fn parse_mz(text: &str, nominal: bool) -> Result<MeasuredMz, Failure> {
    const ORIGIN: &str = "<m/z>";
    let trimmed = text.trim();
    let lead = text.len() - text.trim_start().len();
    let bad_at = trimmed
        .char_indices()
        .find(|(i, c)| !(c.is_ascii_digit() || *c == '.' || (*i == 0 && (*c == '-' || *c == '+'))))
        .map(|(i, _)| i + lead);
    let value: Option<f64> = if bad_at.is_none() {
        trimmed.parse().ok()
    } else {
        None
    };
    let Some(value) = value else {
        let at = bad_at.unwrap_or(lead);
        return Err(Diagnostic::error(
            ORIGIN,
            format!("m/z must be a number such as 195.0877, got \"{text}\""),
        )
        .at_offset(text, at)
        .into());
    };
    if !(value > 0.0 && value <= MAX_MZ) {
        return Err(Diagnostic::error(
            ORIGIN,
            format!("m/z must be positive and at most {MAX_MZ}, got {value}"),
        )
        .at_offset(text, lead)
        .into());
    }
    if nominal || !trimmed.contains('.') {
        let rounded = value.round();
        if (value - rounded).abs() > 0.5 || rounded < 1.0 {
            return Err(
                Diagnostic::error(ORIGIN, "nominal m/z must be a positive integer")
                    .at_offset(text, lead)
                    .into(),
            );
        }
        // 1 ≤ rounded ≤ MAX_MZ, so it fits in u32.
        return Ok(MeasuredMz::Nominal(rounded as u32));
    }
    Ok(MeasuredMz::Accurate(value))
}

fn write_text(out: &mut dyn Write, r: &FromMassReport<'_>) -> std::io::Result<()> {
    let q = &r.query;
    let tolerance = match q.tolerance {
        Some(Tolerance::Ppm(p)) => format!("within {p} ppm"),
        Some(Tolerance::Mda(m)) => format!("within {m} mDa"),
        None => "nominal mass".to_owned(),
    };
    writeln!(
        out,
        "m/z {} as {} ({}), {tolerance}; elements {}",
        q.mz, q.ion, q.mode, q.elements
    )?;
    if let Some(iso) = &q.isotopes {
        let show = |v: Option<f64>| v.map_or("-".to_owned(), |v| format!("{v} %"));
        writeln!(
            out,
            "measured M+1 {}, M+2 {} of M",
            show(iso.m1),
            show(iso.m2)
        )?;
    }
    writeln!(
        out,
        "{}{} candidate formula(s){}",
        if r.n_candidates_complete {
            ""
        } else {
            "at least "
        },
        r.n_candidates,
        if r.candidates.len() < r.n_candidates {
            format!(", best {} shown", r.candidates.len())
        } else {
            String::new()
        }
    )?;
    if !r.candidates.is_empty() {
        writeln!(out)?;
        let width = r
            .candidates
            .iter()
            .map(|c| c.formula.len())
            .max()
            .unwrap_or(0)
            .max("formula (M)".len());
        writeln!(
            out,
            "{:>4}  {:<width$}  {:>11}  {:>8}  {:>4}  {:>6}  {:>6}  {:>7}  notes",
            "rank", "formula (M)", "ion m/z", "err ppm", "DBE", "M+1 %", "M+2 %", "score"
        )?;
        for c in r.candidates {
            let err = c.error_ppm.map_or("-".to_owned(), |e| {
                format!("{:+.2}", without_negative_zero(e, 2))
            });
            let notes: Vec<&str> = c.heuristic_notes.iter().map(|n| n.rule.as_str()).collect();
            writeln!(
                out,
                "{:>4}  {:<width$}  {:>11.5}  {:>8}  {:>4}  {:>6.2}  {:>6.2}  {:>7.2}  {}",
                c.rank,
                c.formula,
                c.ion_mz,
                err,
                c.dbe,
                c.isotope_fit.computed.m1,
                c.isotope_fit.computed.m2,
                without_negative_zero(c.score.total, 2),
                notes.join(", ")
            )?;
        }
    }
    if let Some(b) = &r.halogen_bounds {
        let span = |s: Option<(u32, u32)>| match s {
            Some((lo, hi)) if lo == hi => lo.to_string(),
            Some((lo, hi)) => format!("{lo}-{hi}"),
            None => "none".to_owned(),
        };
        writeln!(out)?;
        writeln!(
            out,
            "M+2 alone allows Cl {}, Br {}, S {} ({} combination(s))",
            span(b.cl),
            span(b.br),
            span(b.s),
            b.combinations.len()
        )?;
    }
    writeln!(out)?;
    writeln!(
        out,
        "score = mass fit + isotope fit + heuristics (0 is perfect; see docs/mass-spectra.md)"
    )?;
    writeln!(out, "{CAUTION}")?;
    Ok(())
}

/// `v` with a value that shows as zero at `decimals` places made +0, so that a tiny
/// negative number prints as 0.00, not -0.00.
fn without_negative_zero(v: f64, decimals: i32) -> f64 {
    let scale = 10f64.powi(decimals);
    if (v * scale).round() == 0.0 {
        0.0
    } else {
        v
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_tiny_negative_number_prints_as_zero() {
        assert_eq!(format!("{:+.2}", without_negative_zero(-0.001, 2)), "+0.00");
        assert_eq!(format!("{:.2}", without_negative_zero(-0.004, 2)), "0.00");
        assert_eq!(format!("{:.2}", without_negative_zero(-0.006, 2)), "-0.01");
    }

    /// One line per bad m/z: the text and the 1-based column of the error.
    #[test]
    fn bad_mz_is_reported_with_its_column() {
        let cases: &[(&str, usize, &str)] = &[
            ("abc", 1, "m/z must be a number"),
            ("195.08x7", 7, "m/z must be a number"),
            ("-5", 1, "m/z must be positive"),
            ("0", 1, "m/z must be positive"),
            ("1e9", 2, "m/z must be a number"),
            ("99999", 1, "m/z must be positive and at most 5000"),
        ];
        for (text, column, start) in cases {
            let d = match parse_mz(text, false) {
                Err(f) => f.diagnostics.into_iter().next().unwrap(),
                Ok(v) => panic!("{text} parsed as {v:?}"),
            };
            assert_eq!(d.position.map(|p| p.column + 1), Some(*column), "{text}");
            assert!(d.message.starts_with(start), "{text}: {}", d.message);
        }
    }

    #[test]
    fn integer_mz_means_nominal() {
        assert!(matches!(
            parse_mz("194", false),
            Ok(MeasuredMz::Nominal(194))
        ));
        assert!(matches!(
            parse_mz("195.0877", false),
            Ok(MeasuredMz::Accurate(_))
        ));
        assert!(matches!(
            parse_mz("194.0", true),
            Ok(MeasuredMz::Nominal(194))
        ));
    }
}
