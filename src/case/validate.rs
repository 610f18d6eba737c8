//! From the raw case to the validated [`Case`]: every word, number and formula checked,
//! every problem reported with file, line, column and key path (all problems in one run).

use super::model::*;
use super::raw::*;
use super::yaml::{locate, locate_value, KeyPath};
use crate::diag::{closest_match, Diagnostic, Position};
use crate::ir::{Band, Shape, Strength};
use crate::rules::Technique;

/// Lowest and highest wavenumber a mid-IR band may have, cm⁻¹ (DESIGN.md, case files).
pub const BAND_LIMITS_CM1: (f64, f64) = (400.0, 4000.0);

/// Default ppm tolerance for an accurate molecular ion (common practice for
/// high-resolution instruments, from memory).
pub const DEFAULT_PPM: f64 = 5.0;

struct Ctx<'a> {
    src: &'a str,
    origin: &'a str,
    diagnostics: Vec<Diagnostic>,
}

impl Ctx<'_> {
    fn place(&self, path: &KeyPath) -> Place {
        Place {
            origin: self.origin.to_owned(),
            position: locate(self.src, path).map(|o| Position::of_offset(self.src, o)),
            key_path: path.to_string(),
        }
    }

    fn error(&mut self, path: &KeyPath, message: String, help: Option<String>) {
        let mut d = Diagnostic::error(self.origin, message).with_key_path(path.to_string());
        if let Some(offset) = locate_value(self.src, path) {
            d = d.at_offset(self.src, offset);
        }
        if let Some(h) = help {
            d = d.with_help(h);
        }
        self.diagnostics.push(d);
    }

    fn bad_word(&mut self, path: &KeyPath, what: &str, word: &str, allowed: &[&str]) {
        let help = closest_match(word, allowed.iter().copied())
            .map(|m| format!("did you mean \"{m}\"?"))
            .or_else(|| Some(format!("expected one of: {}", allowed.join(", "))));
        self.error(path, format!("unknown {what} \"{word}\""), help);
    }
}

/// Validates a raw case; returns the case when no error was found, plus every diagnostic.
pub fn validate(raw: &RawCase, src: &str, origin: &str) -> (Option<Case>, Vec<Diagnostic>) {
    let mut ctx = Ctx {
        src,
        origin,
        diagnostics: Vec::new(),
    };
    let formula = raw.formula.as_ref().and_then(|text| {
        let path = KeyPath::key("formula");
        match super::formula::parse_formula(text) {
            Ok((formula, composition)) => Some(StatedFormula {
                text: text.clone(),
                formula,
                composition,
                place: ctx.place(&path),
            }),
            Err(problem) => {
                let mut d = Diagnostic::error(
                    origin,
                    format!("invalid formula \"{text}\": {}", problem.message),
                )
                .with_key_path("formula");
                let key_offset = locate(src, &path);
                // Point into the formula text itself when the parser says where.
                let value_offset =
                    key_offset.and_then(|k| src[k..].find(text.as_str()).map(|v| k + v));
                match (value_offset, problem.offset, key_offset) {
                    (Some(v), Some(o), _) => d = d.at_offset(src, v + o),
                    (_, _, Some(k)) => d = d.at_offset(src, k),
                    _ => {}
                }
                if let Some(h) = problem.help {
                    d = d.with_help(h);
                }
                ctx.diagnostics.push(d);
                None
            }
        }
    });
    let ms = raw.ms.as_ref().map(|m| validate_ms(&mut ctx, m));
    let ir = raw.ir.as_ref().map(|i| validate_ir(&mut ctx, i));
    // Without a formula the engine derives candidate formulas from the molecular ion.
    let has_ion = ms.as_ref().is_some_and(|m| m.molecular_ion.is_some());
    if formula.is_none() && raw.formula.is_none() && !has_ion {
        ctx.diagnostics.push(
            Diagnostic::error(
                origin,
                "no formula: the case needs a molecular formula or an ms.molecular_ion",
            )
            .at_position(Position { line: 0, column: 0 })
            .with_key_path("formula")
            .with_help("add a line such as `formula: C8H8O`".to_owned()),
        );
    }
    let has_errors = ctx.diagnostics.iter().any(Diagnostic::is_error);
    let case = (!has_errors).then(|| Case {
        id: raw.case.clone(),
        title: raw.title.clone(),
        origin: origin.to_owned(),
        formula,
        ms,
        ir,
    });
    (case, ctx.diagnostics)
}

fn validate_ms(ctx: &mut Ctx<'_>, raw: &RawMs) -> MsEvidence {
    let base = KeyPath::key("ms");
    let ion = match &raw.ion {
        None => IonType::RadicalCation,
        Some(word) => match IonType::ALL.iter().find(|(_, w)| w == word) {
            Some((t, _)) => *t,
            None => {
                let words: Vec<&str> = IonType::ALL.iter().map(|(_, w)| *w).collect();
                ctx.bad_word(&base.with_key("ion"), "ion type", word, &words);
                IonType::RadicalCation
            }
        },
    };
    let molecular_ion = raw.molecular_ion.and_then(|mz| {
        let path = base.with_key("molecular_ion");
        if !(mz.is_finite() && mz > 0.0 && mz < 5000.0) {
            ctx.error(
                &path,
                format!("molecular_ion {mz} is not an m/z between 0 and 5000"),
                None,
            );
            None
        } else {
            Some((mz, ctx.place(&path)))
        }
    });
    let ppm = match raw.ppm {
        None => DEFAULT_PPM,
        Some(p) if p.is_finite() && p > 0.0 && p <= 1000.0 => p,
        Some(p) => {
            ctx.error(
                &base.with_key("ppm"),
                format!("ppm {p} is not between 0 and 1000"),
                None,
            );
            DEFAULT_PPM
        }
    };
    let mut m_plus_1 = None;
    let mut m_plus_2 = None;
    if let Some(isotopes) = &raw.isotopes {
        for (key, value) in isotopes {
            let path = base.with_key("isotopes").with_key(key);
            if !(value.is_finite() && *value >= 0.0 && *value <= 1000.0) {
                ctx.error(
                    &path,
                    format!("{key} {value} is not a percentage of M between 0 and 1000"),
                    None,
                );
                continue;
            }
            match key.as_str() {
                "M+1" => m_plus_1 = Some((*value, ctx.place(&path))),
                "M+2" => m_plus_2 = Some((*value, ctx.place(&path))),
                other => ctx.bad_word(&path, "isotope peak", other, &["M+1", "M+2"]),
            }
        }
    }
    let mut fragments = Vec::new();
    for (i, (mz, rel)) in raw.fragments.iter().flatten().enumerate() {
        let path = base.with_key("fragments").with_index(i);
        if !(mz.is_finite() && *mz > 0.0 && rel.is_finite() && *rel >= 0.0) {
            ctx.error(
                &path,
                format!("fragment [{mz}, {rel}] needs a positive m/z and a non-negative intensity"),
                None,
            );
            continue;
        }
        fragments.push(((*mz, *rel), ctx.place(&path)));
    }
    MsEvidence {
        molecular_ion,
        ion,
        ppm,
        m_plus_1,
        m_plus_2,
        fragments,
    }
}

fn validate_ir(ctx: &mut Ctx<'_>, raw: &RawIr) -> IrEvidence {
    let base = KeyPath::key("ir");
    let technique = raw.technique.as_ref().and_then(|word| {
        let found = Technique::ALL.into_iter().find(|t| t.word() == word);
        if found.is_none() {
            let words: Vec<&str> = Technique::ALL.iter().map(|t| t.word()).collect();
            ctx.bad_word(&base.with_key("technique"), "technique", word, &words);
        }
        found
    });
    if raw.spectrum.is_some() {
        ctx.error(
            &base.with_key("spectrum"),
            "reading spectrum files is not available in this build".to_owned(),
            Some("list the bands under `ir.bands` instead".to_owned()),
        );
    }
    let (lo, hi) = BAND_LIMITS_CM1;
    let mut bands = Vec::new();
    for (i, b) in raw.bands.iter().flatten().enumerate() {
        let path = base.with_key("bands").with_index(i);
        let mut ok = true;
        if !(b.at.is_finite() && b.at >= lo && b.at <= hi) {
            ctx.error(
                &path.with_key("at"),
                format!("band at {} cm⁻¹ is outside {lo}–{hi} cm⁻¹", b.at),
                None,
            );
            ok = false;
        }
        let strength = Strength::from_word(&b.strength);
        if strength.is_none() {
            let words: Vec<&str> = Strength::ALL.iter().map(|s| s.word()).collect();
            ctx.bad_word(&path.with_key("strength"), "strength", &b.strength, &words);
        }
        let shape = match &b.shape {
            None => Some(None),
            Some(w) => match Shape::from_word(w) {
                Some(s) => Some(Some(s)),
                None => {
                    ctx.bad_word(&path.with_key("shape"), "shape", w, &["broad", "sharp"]);
                    None
                }
            },
        };
        if let (true, Some(strength), Some(shape)) = (ok, strength, shape) {
            bands.push(ObservedBand {
                band: Band {
                    at: b.at,
                    strength,
                    shape,
                },
                place: ctx.place(&path),
            });
        }
    }
    let window = match raw.window {
        None => default_window(technique),
        Some((w_lo, w_hi)) if w_lo >= lo && w_hi <= hi && w_lo < w_hi => (w_lo, w_hi),
        Some((w_lo, w_hi)) => {
            ctx.error(
                &base.with_key("window"),
                format!("window [{w_lo}, {w_hi}] must be increasing and inside {lo}–{hi} cm⁻¹"),
                None,
            );
            default_window(technique)
        }
    };
    if raw.bands.as_ref().is_none_or(Vec::is_empty) && raw.spectrum.is_none() {
        ctx.error(
            &base,
            "the ir block holds no bands".to_owned(),
            Some("add `bands:` or remove the `ir:` block".to_owned()),
        );
    }
    IrEvidence {
        technique,
        bands,
        window,
    }
}
