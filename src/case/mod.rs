//! Case files: the raw YAML schema, the validated case, and the parse step that turns
//! case-file text into a [`Case`] plus diagnostics. Only the CLI reads files; it calls
//! [`parse_raw_every_error`], reads what [`referenced_files`] lists, then [`validate`].

mod components;
pub mod digest;
mod formula;
pub use formula::formula_parts;
pub mod model;
pub mod paths;
pub mod raw;
pub mod solvents;
mod validate;

pub use components::absorbance_trace;
pub use model::*;
pub use raw::{
    referenced_files, RawBand, RawCase, RawComponent, RawConclusion, RawIr, RawMs, RawReview,
    RawSample,
};
pub use validate::{
    check_group_ids, is_iso_date, validate, validate_with_files, BAND_LIMITS_CM1, DEFAULT_PPM,
};

use crate::diag::Diagnostic;

/// Parses case-file text into its raw form; a YAML or schema error (unknown key, wrong
/// type) is one diagnostic with its place.
pub fn parse_raw(src: &str, origin: &str) -> Result<RawCase, Box<Diagnostic>> {
    crate::yaml::from_str::<RawCase>(src, origin)
}

/// Parses and validates case-file text: the case when it is usable, and every problem
/// found (errors and warnings) with file, line, column and key path.
pub fn parse(src: &str, origin: &str) -> (Option<Case>, Vec<Diagnostic>) {
    match parse_raw_every_error(src, origin) {
        Ok(raw) => validate(&raw, src, origin),
        Err(diagnostics) => (None, diagnostics),
    }
}

/// Like [`parse_raw`], but a file that does not fit the schema comes back with every
/// schema error found (each with file, line, column and key path), not only the first.
pub fn parse_raw_every_error(src: &str, origin: &str) -> Result<RawCase, Vec<Diagnostic>> {
    crate::yaml::from_str_every_error::<RawCase>(src, origin)
}

#[cfg(test)]
mod tests;
