//! Suspected components of a mixture (`components:`): a cutting agent or diluent the
//! laboratory suspects, with its reference spectrum file or its band list. Validated here
//! like the case's own IR evidence; the engine subtracts them (`engine::mixture`).

use super::model::{KnownComponent, ReferencedFile};
use super::raw::RawComponent;
use super::validate::{observed_picked_bands, supplied_file, validate_bands, Ctx};
use crate::ir::{PickOptions, PreparedTrace, SpectrumData};
use crate::yaml::KeyPath;

/// The baseline-corrected absorbance trace of a spectrum file, for fitting; `None` for a
/// peak table or a file that cannot be read (its picking reports the error).
pub fn absorbance_trace(bytes: &[u8], origin: &str) -> Option<PreparedTrace> {
    let options = PickOptions::default();
    let read = crate::ir::read_spectrum(bytes, origin, &options.read).ok()?;
    match &read.data {
        SpectrumData::Trace(trace) => {
            let mut notes = Vec::new();
            let prepared = crate::ir::prepare_trace(trace, options.correct_baseline, &mut notes);
            (prepared.x.len() >= 4).then_some(prepared)
        }
        SpectrumData::PeakTable(_) => None,
    }
}

/// Validates the `components:` list: a name, and exactly one of `spectrum` (read by the
/// caller, picked here) and `bands`.
pub(super) fn validate_components(
    ctx: &mut Ctx<'_>,
    raw: &[RawComponent],
    files: &[ReferencedFile],
) -> Vec<KnownComponent> {
    let mut out = Vec::new();
    for (i, c) in raw.iter().enumerate() {
        let path = KeyPath::key("components").with_index(i);
        if c.name.trim().is_empty() {
            ctx.error(
                &path.with_key("name"),
                "a component needs a name".to_owned(),
                None,
            );
        }
        let place = ctx.place(&path);
        match (&c.spectrum, &c.bands) {
            (Some(_), Some(_)) | (None, None) => {
                ctx.error(
                    &path,
                    "a component gives exactly one of `spectrum` and `bands`".to_owned(),
                    Some("name its reference spectrum file, or list its bands".to_owned()),
                );
            }
            (None, Some(bands)) => {
                let bands = validate_bands(ctx, &path.with_key("bands"), Some(bands));
                if bands.is_empty() {
                    ctx.error(
                        &path.with_key("bands"),
                        "the component's band list is empty".to_owned(),
                        None,
                    );
                }
                out.push(KnownComponent {
                    name: c.name.clone(),
                    place,
                    spectrum: None,
                    bands,
                    trace: None,
                });
            }
            (Some(written), None) => {
                let spath = path.with_key("spectrum");
                let Some(file) = supplied_file(ctx, &spath, written, files) else {
                    continue;
                };
                match crate::ir::bands_from_file_contents(
                    &file.bytes,
                    &file.origin,
                    &PickOptions::default(),
                ) {
                    Ok(picked) => {
                        let bands = observed_picked_bands(&picked, &file.origin);
                        out.push(KnownComponent {
                            name: c.name.clone(),
                            place,
                            spectrum: Some(written.clone()),
                            bands,
                            trace: absorbance_trace(&file.bytes, &file.origin),
                        });
                    }
                    Err(diagnostics) => {
                        let first = diagnostics
                            .first()
                            .map_or_else(|| "unreadable".to_owned(), ToString::to_string);
                        ctx.error(
                            &spath,
                            format!("the reference spectrum \"{written}\" cannot be used: {first}"),
                            None,
                        );
                    }
                }
            }
        }
    }
    out
}
