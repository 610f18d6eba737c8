//! `quiddity formula`: masses, unsaturation, validity checks and isotope pattern of one
//! molecular formula or ion.

use super::{io_failure, print_json, CommandResult, Status};
use crate::chem::{
    aggregated_pattern, fine_structure_pattern, Formula, LewisCheck, NitrogenRule, RelativePeak,
    SeniorCheck,
};
use crate::diag::Diagnostic;
use clap::Args;
use std::io::Write;

/// Peaks below this percentage of the most abundant one are left out of the output.
const MIN_RELATIVE_SHOWN: f64 = 0.01;

/// Below this retained probability the text output says the pattern is incomplete.
const TRUNCATION_WARNING_BELOW: f64 = 0.999;

/// Where a formula typed on the command line comes from, for diagnostics.
const ORIGIN: &str = "<formula>";

/// Arguments of `quiddity formula`.
#[derive(Debug, Args)]
pub struct FormulaArgs {
    /// Molecular formula, e.g. C8H10N4O2, CH3(CH2)4OH, CuSO4·5H2O, [13C]H4, C6H6+.
    #[arg(allow_hyphen_values = true)]
    formula: String,

    /// Print one JSON document on stdout.
    #[arg(long)]
    json: bool,

    /// Charge of the ion (overrides a charge written in the formula), e.g. 1 or -1.
    #[arg(long, allow_hyphen_values = true)]
    charge: Option<i32>,

    /// Resolving power m/Δm (FWHM) for the fine-structure isotope pattern; without it the
    /// pattern is aggregated by nominal mass.
    #[arg(long, value_name = "R")]
    resolution: Option<f64>,
}

/// The `--json` document (the contract of DEVELOPERS.md, "Contracts", plus extra fields).
#[derive(Debug, serde::Serialize)]
struct FormulaReport {
    formula: String,
    charge: i32,
    monoisotopic_mass: f64,
    average_mass: f64,
    nominal_mass: u64,
    /// m/z of the monoisotopic ion (electron masses removed); null when neutral.
    mz: Option<f64>,
    dbe: f64,
    odd_electron: bool,
    nitrogen_rule: NitrogenRule,
    senior: SeniorReport,
    lewis: LewisReport,
    /// "aggregated" or "fine".
    pattern: &'static str,
    resolving_power: Option<f64>,
    /// Probability held by the computed isotopologues (below 1 only when pruning or the
    /// fine-structure cap dropped some; see `chem::isotopes`).
    retained_probability: f64,
    isotopes: Vec<RelativePeak>,
}

#[derive(Debug, serde::Serialize)]
struct SeniorReport {
    passes: bool,
    #[serde(flatten)]
    check: SeniorCheck,
}

#[derive(Debug, serde::Serialize)]
struct LewisReport {
    passes: bool,
    #[serde(flatten)]
    check: LewisCheck,
}

/// Runs `quiddity formula`.
pub fn run(args: &FormulaArgs, out: &mut dyn Write) -> CommandResult {
    let report = build_report(args)?;
    if args.json {
        return print_json(out, &report);
    }
    write_text(out, &report).map_err(io_failure)?;
    Ok(Status::Success)
}

fn build_report(args: &FormulaArgs) -> Result<FormulaReport, super::Failure> {
    let mut formula = Formula::parse(&args.formula).map_err(|e| e.to_diagnostic(ORIGIN))?;
    if formula.is_empty() {
        return Err(Diagnostic::error(ORIGIN, "empty formula").into());
    }
    if let Some(z) = args.charge {
        if z.unsigned_abs() > crate::chem::formula::MAX_CHARGE {
            return Err(Diagnostic::error(
                "--charge",
                format!(
                    "charge exceeds the limit of {}",
                    crate::chem::formula::MAX_CHARGE
                ),
            )
            .into());
        }
        formula = formula.with_charge(z);
    }
    let (pattern_kind, pattern) = match args.resolution {
        None => ("aggregated", aggregated_pattern(&formula)),
        Some(r) => {
            let pattern = fine_structure_pattern(&formula, r).ok_or_else(|| {
                Diagnostic::error(
                    "--resolution",
                    format!("resolving power must be a positive number, got {r}"),
                )
            })?;
            ("fine", pattern)
        }
    };
    let senior = formula.senior();
    let lewis = formula.lewis();
    Ok(FormulaReport {
        formula: formula.to_string(),
        charge: formula.charge(),
        monoisotopic_mass: formula.monoisotopic_mass(),
        average_mass: formula.average_mass(),
        nominal_mass: formula.nominal_mass(),
        mz: formula.mz(),
        dbe: formula.dbe(),
        odd_electron: formula.is_odd_electron(),
        nitrogen_rule: formula.nitrogen_rule(),
        senior: SeniorReport {
            passes: senior.passes(),
            check: senior,
        },
        lewis: LewisReport {
            passes: lewis.passes(),
            check: lewis,
        },
        pattern: pattern_kind,
        resolving_power: args.resolution,
        retained_probability: pattern.retained_probability(),
        isotopes: pattern.relative(MIN_RELATIVE_SHOWN),
    })
}

fn yes_no(b: bool) -> &'static str {
    if b {
        "yes"
    } else {
        "no"
    }
}

fn write_text(out: &mut dyn Write, r: &FormulaReport) -> std::io::Result<()> {
    let mut rows: Vec<(String, String)> = vec![
        ("formula (Hill order)".into(), r.formula.clone()),
        (
            "monoisotopic mass".into(),
            format!("{:.6} u", r.monoisotopic_mass),
        ),
        ("average mass".into(), format!("{:.4} u", r.average_mass)),
        ("nominal mass".into(), r.nominal_mass.to_string()),
    ];
    if let Some(mz) = r.mz {
        rows.push(("charge".into(), format!("{:+}", r.charge)));
        rows.push(("m/z (monoisotopic ion)".into(), format!("{mz:.6}")));
    }
    rows.push(("DBE (rings + double bonds)".into(), format_dbe(r.dbe)));
    rows.push((
        "electrons".into(),
        if r.odd_electron {
            "odd (radical)"
        } else {
            "even"
        }
        .into(),
    ));
    rows.push((
        "nitrogen rule".into(),
        format!(
            "{} ({} N-type atom(s), nominal mass {})",
            if r.nitrogen_rule.holds {
                "holds"
            } else {
                "broken"
            },
            r.nitrogen_rule.n_parity_atoms,
            if r.nominal_mass % 2 == 1 {
                "odd"
            } else {
                "even"
            }
        ),
    ));
    rows.push((
        "SENIOR rules".into(),
        format!(
            "{} (even valence sum: {}, ≥ 2 × max valence: {}, connected: {})",
            if r.senior.passes { "pass" } else { "fail" },
            yes_no(r.senior.check.even_valence_sum),
            yes_no(r.senior.check.covers_max_valence),
            yes_no(r.senior.check.connected)
        ),
    ));
    rows.push((
        "LEWIS check".into(),
        format!(
            "{} (even electrons: {}, DBE ≥ 0: {})",
            if r.lewis.passes { "pass" } else { "fail" },
            yes_no(r.lewis.check.even_electrons),
            yes_no(r.lewis.check.dbe_non_negative)
        ),
    ));
    let width = rows
        .iter()
        .map(|(k, _)| k.chars().count())
        .max()
        .unwrap_or(0);
    for (key, value) in &rows {
        let pad = width - key.chars().count();
        writeln!(out, "{key}{}  {value}", " ".repeat(pad))?;
    }
    writeln!(out)?;
    match r.resolving_power {
        Some(rp) => writeln!(out, "isotope pattern (fine structure at R = {rp})")?,
        None => writeln!(out, "isotope pattern (aggregated by nominal mass)")?,
    }
    let mz_header = if r.charge == 0 { "mass" } else { "m/z" };
    writeln!(out, "  {mz_header:>14}  {:>9}", "relative")?;
    for p in &r.isotopes {
        writeln!(out, "  {:>14.6}  {:>9.3}", p.mz, p.relative)?;
    }
    writeln!(
        out,
        "  (peaks below {MIN_RELATIVE_SHOWN} % of the most abundant are not shown)"
    )?;
    if r.retained_probability < TRUNCATION_WARNING_BELOW {
        writeln!(
            out,
            "  caution: only the most probable isotopologues were computed ({:.2} % of the \
             total); intensities are relative to those",
            100.0 * r.retained_probability
        )?;
    }
    Ok(())
}

fn format_dbe(dbe: f64) -> String {
    if dbe.fract() == 0.0 {
        format!("{dbe:.0}")
    } else {
        format!("{dbe:.1} (half-integer: an even-electron ion or a radical)")
    }
}
