//! From the raw case to the validated [`Case`]: every word, number and formula checked,
//! every problem reported with file, line, column and key path (all problems in one run).

use super::model::*;
use super::raw::*;
use crate::diag::{closest_match, Diagnostic, Position};
use crate::ir::{Band, PickOptions, Shape, Strength};
use crate::rules::Technique;
use crate::yaml::{locate, locate_value, KeyPath};

/// Lowest and highest wavenumber a mid-IR band may have, cm⁻¹ (the mid-IR window; docs/cases.md).
pub const BAND_LIMITS_CM1: (f64, f64) = (400.0, 4000.0);

/// Default ppm tolerance for an accurate molecular ion (common practice for
/// high-resolution instruments, from memory).
pub const DEFAULT_PPM: f64 = 5.0;

pub(super) struct Ctx<'a> {
    src: &'a str,
    origin: &'a str,
    diagnostics: Vec<Diagnostic>,
}

impl Ctx<'_> {
    pub(super) fn place(&self, path: &KeyPath) -> Place {
        Place {
            origin: self.origin.to_owned(),
            position: locate(self.src, path).map(|o| Position::of_offset(self.src, o)),
            key_path: path.to_string(),
        }
    }

    pub(super) fn error(&mut self, path: &KeyPath, message: String, help: Option<String>) {
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

/// Validates a raw case that names no file, or whose files the caller did not read (a
/// named spectrum file is then an error); see [`validate_with_files`].
pub fn validate(raw: &RawCase, src: &str, origin: &str) -> (Option<Case>, Vec<Diagnostic>) {
    validate_with_files(raw, src, origin, &[])
}

/// Validates a raw case; `files` holds the contents of the files the case refers to (see
/// [`referenced_files`]), read by the caller. Returns the case when no error was found,
/// plus every diagnostic.
pub fn validate_with_files(
    raw: &RawCase,
    src: &str,
    origin: &str,
    files: &[ReferencedFile],
) -> (Option<Case>, Vec<Diagnostic>) {
    let mut ctx = Ctx {
        src,
        origin,
        diagnostics: Vec::new(),
    };
    let formula = raw.formula.as_ref().and_then(|text| {
        let path = KeyPath::key("formula");
        match super::formula::parse_formula(text) {
            Ok((formula, composition)) => Some(StatedFormula {
                parts: super::formula::formula_parts(text),
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
    let ir = raw.ir.as_ref().map(|i| validate_ir(&mut ctx, i, files));
    let sample = validate_sample(&mut ctx, raw.sample.as_ref());
    let conclusion = raw.conclusion.as_ref().map(|c| Conclusion {
        accepted: c.accepted.clone().unwrap_or_default(),
        accepted_place: c
            .accepted
            .as_ref()
            .map(|_| ctx.place(&KeyPath::key("conclusion").with_key("accepted"))),
        comments: c.comments.clone(),
    });
    let review = raw.review.as_ref().map(|r| validate_review(&mut ctx, r));
    let components = super::components::validate_components(
        &mut ctx,
        raw.components.as_deref().unwrap_or_default(),
        files,
    );
    let library = raw.library.as_ref().and_then(|written| {
        let path = KeyPath::key("library");
        if written.trim().is_empty() {
            ctx.error(
                &path,
                "the library path is empty".to_owned(),
                Some("name the folder of reference spectra, relative to the case file".to_owned()),
            );
            return None;
        }
        Some(LibraryRef {
            written: written.clone(),
            place: ctx.place(&path),
        })
    });
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
        sample,
        notes: raw.notes.clone(),
        conclusion,
        review,
        components,
        library,
    });
    (case, ctx.diagnostics)
}

/// True for a real calendar date written `YYYY-MM-DD`.
pub fn is_iso_date(text: &str) -> bool {
    let parts: Vec<&str> = text.split('-').collect();
    let [y, m, d] = parts.as_slice() else {
        return false;
    };
    if y.len() != 4 || m.len() != 2 || d.len() != 2 {
        return false;
    }
    let (Ok(y), Ok(m), Ok(d)) = (y.parse::<u32>(), m.parse::<u32>(), d.parse::<u32>()) else {
        return false;
    };
    let leap = (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
    let days = match m {
        1 | 3 | 5 | 7 | 8 | 10 | 12 => 31,
        4 | 6 | 9 | 11 => 30,
        2 if leap => 29,
        2 => 28,
        _ => return false,
    };
    (1..=days).contains(&d)
}

fn check_date(ctx: &mut Ctx<'_>, path: &KeyPath, text: Option<&String>) {
    if let Some(t) = text {
        if !is_iso_date(t) {
            ctx.error(
                path,
                format!("date \"{t}\" is not a calendar date written YYYY-MM-DD"),
                Some("write dates as e.g. 2026-03-14".to_owned()),
            );
        }
    }
}

fn validate_sample(ctx: &mut Ctx<'_>, raw: Option<&RawSample>) -> Sample {
    let Some(raw) = raw else {
        return Sample::default();
    };
    check_date(
        ctx,
        &KeyPath::key("sample").with_key("received"),
        raw.received.as_ref(),
    );
    Sample {
        received: raw.received.clone(),
        requested_by: raw.requested_by.clone(),
        description: raw.description.clone(),
        technique: raw.technique.clone(),
        analyst: raw.analyst.clone(),
    }
}

fn validate_review(ctx: &mut Ctx<'_>, raw: &RawReview) -> Review {
    let base = KeyPath::key("review");
    check_date(ctx, &base.with_key("date"), raw.date.as_ref());
    let verdict = raw.verdict.as_ref().and_then(|word| {
        let found = Verdict::ALL
            .iter()
            .find(|(_, w)| w == word)
            .map(|(v, _)| *v);
        if found.is_none() {
            let words: Vec<&str> = Verdict::ALL.iter().map(|(_, w)| *w).collect();
            ctx.bad_word(&base.with_key("verdict"), "verdict", word, &words);
        }
        found
    });
    Review {
        reviewer: raw.reviewer.clone(),
        date: raw.date.clone(),
        verdict,
        comments: raw.comments.clone(),
    }
}

/// The file the case names as `written` at `path`; `None`, with an error, when the caller
/// did not supply it (only the command line reads files).
pub(super) fn supplied_file<'f>(
    ctx: &mut Ctx<'_>,
    path: &KeyPath,
    written: &str,
    files: &'f [ReferencedFile],
) -> Option<&'f ReferencedFile> {
    let file = files.iter().find(|f| f.written == written);
    if file.is_none() {
        ctx.error(
            path,
            format!("the spectrum file \"{written}\" was not read"),
            Some(
                "run the case through the quiddity command, which reads the files it names"
                    .to_owned(),
            ),
        );
    }
    file
}

/// The bands picked from the file `origin`, each placed as `picked band N`.
pub(super) fn observed_picked_bands(
    picked: &crate::ir::PickedSpectrum,
    origin: &str,
) -> Vec<ObservedBand> {
    picked
        .bands()
        .into_iter()
        .enumerate()
        .map(|(i, band)| ObservedBand {
            band,
            place: Place {
                origin: origin.to_owned(),
                position: None,
                key_path: format!("picked band {}", i + 1),
            },
        })
        .collect()
}

/// Picks the bands of the named spectrum file; `None` (with an error) when the file was
/// not supplied or cannot be read.
fn pick_spectrum(
    ctx: &mut Ctx<'_>,
    written: &str,
    files: &[ReferencedFile],
    technique: Option<Technique>,
) -> Option<(SpectrumSource, Vec<ObservedBand>)> {
    let path = KeyPath::key("ir").with_key("spectrum");
    let file = supplied_file(ctx, &path, written, files)?;
    // A gas-phase case is picked as a vapour spectrum (P/R contours merged, water-vapour
    // lines and CO2 kept weak); every other technique is a condensed phase.
    let mut options = PickOptions::default();
    if technique == Some(Technique::Gas) {
        options.pick.phase = crate::ir::SamplePhase::Vapour;
    }
    match crate::ir::bands_from_file_contents(&file.bytes, &file.origin, &options) {
        Ok(picked) => {
            let bands = observed_picked_bands(&picked, &file.origin);
            let source = SpectrumSource {
                written: written.to_owned(),
                origin: file.origin.clone(),
                n_picked: bands.len(),
                n_overridden: 0,
                title: picked.header.title.clone(),
                notes: picked.notes.clone(),
            };
            Some((source, bands))
        }
        Err(diagnostics) => {
            ctx.error(
                &path,
                format!("the spectrum file \"{written}\" cannot be read"),
                Some("the problems in the file are listed below".to_owned()),
            );
            ctx.diagnostics.extend(diagnostics);
            None
        }
    }
}

fn validate_ms(ctx: &mut Ctx<'_>, raw: &RawMs) -> MsEvidence {
    let base = KeyPath::key("ms");
    let ion = match &raw.ion {
        None => IonType::RadicalCation,
        // Case files take the canonical spelling only, so that they read the same everywhere.
        Some(word) => match IonType::ALL.into_iter().find(|t| t.canonical() == word) {
            Some(t) => t,
            None => {
                let words: Vec<&str> = IonType::ALL.iter().map(|t| t.canonical()).collect();
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

/// Widest full width at half height a case may state for one band, cm⁻¹ (the broadest
/// hydrogen-bonded envelopes, carboxylic acid O–H, span about 800; common practice).
pub const MAX_BAND_WIDTH_CM1: f64 = 1000.0;

fn validate_ir(ctx: &mut Ctx<'_>, raw: &RawIr, files: &[ReferencedFile]) -> IrEvidence {
    let base = KeyPath::key("ir");
    let technique = raw.technique.as_ref().and_then(|word| {
        let found = Technique::ALL.into_iter().find(|t| t.word() == word);
        if found.is_none() {
            let words: Vec<&str> = Technique::ALL.iter().map(|t| t.word()).collect();
            ctx.bad_word(&base.with_key("technique"), "technique", word, &words);
        }
        found
    });
    let picked = raw
        .spectrum
        .as_ref()
        .and_then(|written| pick_spectrum(ctx, written, files, technique));
    let (lo, hi) = BAND_LIMITS_CM1;
    let mut bands = validate_bands(ctx, &base.with_key("bands"), raw.bands.as_deref());
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
    let mut opaque = Vec::new();
    if let Some(word) = &raw.solvent {
        match super::solvents::solvent(word) {
            Some(s) => opaque.extend_from_slice(s.opaque),
            None => {
                let words: Vec<&str> = super::solvents::SOLVENTS.iter().map(|s| s.word).collect();
                ctx.bad_word(&base.with_key("solvent"), "solvent", word, &words);
            }
        }
    }
    for (i, &(o_lo, o_hi)) in raw.opaque.iter().flatten().enumerate() {
        if o_lo >= lo && o_hi <= hi && o_lo < o_hi {
            opaque.push((o_lo, o_hi));
        } else {
            ctx.error(
                &base.with_key("opaque").with_index(i),
                format!(
                    "opaque region [{o_lo}, {o_hi}] must be increasing and inside {lo}–{hi} cm⁻¹"
                ),
                None,
            );
        }
    }
    if raw.bands.as_ref().is_none_or(Vec::is_empty) && raw.spectrum.is_none() {
        ctx.error(
            &base,
            "the ir block holds no bands".to_owned(),
            Some("add `bands:` or remove the `ir:` block".to_owned()),
        );
    }
    let spectrum = picked.map(|(mut source, picked_bands)| {
        // Written bands are the analyst's reading: they replace a picked band of the same
        // feature, and the rest of the picked bands join them.
        let mut kept = Vec::new();
        for p in picked_bands {
            if bands
                .iter()
                .any(|w: &ObservedBand| (w.band.at - p.band.at).abs() < OVERRIDE_CM1)
            {
                source.n_overridden += 1;
            } else {
                kept.push(p);
            }
        }
        bands.extend(kept);
        bands.sort_by(|a, b| b.band.at.total_cmp(&a.band.at));
        source
    });
    let absorbance = raw.spectrum.as_ref().and_then(|written| {
        files
            .iter()
            .find(|f| &f.written == written)
            .and_then(|f| super::components::absorbance_trace(&f.bytes, &f.origin))
    });
    IrEvidence {
        technique,
        bands,
        window,
        opaque,
        solvent: raw.solvent.clone(),
        spectrum,
        absorbance,
    }
}

/// Checks a written band list (`ir.bands`, `components[i].bands`): position inside the
/// mid-IR limits, strength and shape words; every problem reported at its place.
pub(super) fn validate_bands(
    ctx: &mut Ctx<'_>,
    list: &KeyPath,
    raw: Option<&[RawBand]>,
) -> Vec<ObservedBand> {
    let (lo, hi) = BAND_LIMITS_CM1;
    let mut bands = Vec::new();
    for (i, b) in raw.into_iter().flatten().enumerate() {
        let path = list.with_index(i);
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
        if let Some(w) = b.width {
            if !(w.is_finite() && w > 0.0 && w <= MAX_BAND_WIDTH_CM1) {
                ctx.error(
                    &path.with_key("width"),
                    format!("width {w} cm⁻¹ is not between 0 and {MAX_BAND_WIDTH_CM1} cm⁻¹"),
                    None,
                );
                ok = false;
            }
        }
        if let (true, Some(strength), Some(shape)) = (ok, strength, shape) {
            bands.push(ObservedBand {
                band: Band {
                    at: b.at,
                    strength,
                    shape,
                    width: b.width,
                },
                place: ctx.place(&path),
            });
        }
    }
    bands
}

/// Checks the group ids of the analyst's accepted candidate against the catalogue (the
/// case layer cannot know the catalogue while validating): an unknown id is an error with
/// its place and a "did you mean" hint. `ring` (plain carbocyclic rings) is always known.
pub fn check_group_ids(
    case: &Case,
    src: &str,
    catalogue: &crate::rules::Catalogue,
) -> Vec<Diagnostic> {
    let mut ctx = Ctx {
        src,
        origin: &case.origin,
        diagnostics: Vec::new(),
    };
    let Some(conclusion) = &case.conclusion else {
        return Vec::new();
    };
    let mut known: Vec<&str> = catalogue.groups.iter().map(|g| g.id.as_str()).collect();
    known.push("ring");
    for id in conclusion.accepted.keys() {
        if !known.contains(&id.as_str()) {
            let path = KeyPath::key("conclusion").with_key("accepted").with_key(id);
            ctx.bad_word(&path, "group id", id, &known);
        }
    }
    ctx.diagnostics
}
